"""Predicted band patterns: one reporter class on one isomer, ready to show.

:func:`band_pattern` builds the energy-factored (Cotton–Kraihanzel) model of
the class (:mod:`enumerator.vibrations.model`), takes the default constants of
``rules/forcefields.toml`` with any overrides, solves it by Wilson's GF method
with bond-dipole intensities (:mod:`enumerator.vibrations.solver`) and adds
notes a chemist should read: bands allowed by symmetry that the bond-dipole
model makes silent, and bands outside the class's usual range.

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.abstract import parse_abstract
>>> from enumerator.workflow.pipeline import apply_settings
>>> from enumerator.isomers.enumeration import enumerate_isomers
>>> comp = apply_settings(parse_abstract("Ma6"), reporters=[("a", "CO")])
>>> iso = enumerate_isomers(comp, load_rules().geometry("OC-6")).isomers[0]
>>> [(round(b.wavenumber), b.species, b.intensity) for b in predict_bands(iso, "CO", {"k": 16.4, "kc": 0.3, "kt": 0.6})]
[(2123, 'A1g', 0.0), (2015, 'Eg', 0.0), (1978, 'T1u', 1.0)]
>>> parse_constants("k=16.2, kc=0.3")
{'k': 16.2, 'kc': 0.3}
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

from enumerator.errors import InputError
from enumerator.isomers.enumeration import Isomer
from enumerator.rules.ruleset import RuleSet
from enumerator.vibrations.model import Model, build_model
from enumerator.vibrations.solver import Band, Mode, solve_modes

__all__ = ["BandPattern", "band_pattern", "predict_bands", "parse_constants"]


@dataclass(frozen=True)
class BandPattern:
    """Predicted bands of one reporter class on one isomer.

    ``constants`` are the values used, (name, mdyn/Å) in the model's order;
    ``bands`` highest wavenumber first; ``species`` the representation
    ('2A1 + B1 + E', None without a character table); ``notes`` cautions on
    the prediction.
    """

    isomer_id: str
    reporter_class: str
    model: Model
    constants: tuple[tuple[str, float], ...]
    bands: tuple[Band, ...]
    species: str | None
    notes: tuple[str, ...] = ()

    @property
    def ir_bands(self) -> tuple[Band, ...]:
        """The bands with non-zero bond-dipole intensity."""
        return tuple(b for b in self.bands if b.ir_active)

    def shifted_constants(self, dk: float) -> dict[str, float]:
        """The constants with every stretching constant moved by ``dk`` (mdyn/Å)."""
        vals = dict(self.constants)
        for s in self.model.sets:
            vals[s.name] = vals[s.name] + dk
        return vals

    def to_dict(self) -> dict[str, Any]:
        """The pattern's JSON object (rounded for byte-stable output)."""
        return {
            "reporter_class": self.reporter_class,
            "species": self.species,
            "constants": {k: round(v, 4) for k, v in self.constants},
            "constant_sets": [
                {
                    "name": s.name,
                    "sites": [x + 1 for x in s.sites],
                    "trans_to": s.trans_to,
                    "environment": s.environment,
                    "description": s.describe(self.reporter_class),
                }
                for s in self.model.sets
            ],
            "oscillators": [
                {"site": o.site + 1, "ligand": o.ligand, "atoms": o.label, "inverse_reduced_mass": round(o.g, 6)}
                for o in self.model.oscillators
            ],
            "bands": [b.to_dict() for b in self.bands],
            "ir_count": len(self.ir_bands),
            "notes": list(self.notes),
        }


def _pattern_notes(model: Model, modes: Sequence[Mode], note: str | None) -> tuple[str, ...]:
    notes = [note] if note else []
    quiet = [m.band.name for m in modes if m.band.dipole_forbidden]
    if quiet:
        notes.append(
            f"{', '.join(quiet)}: IR-allowed by symmetry but of zero intensity in the bond-dipole model "
            "(trans oscillators moving in phase): expect weak band(s)"
        )
    lo, hi = model.field.range
    out = [m.band for m in modes if m.band.ir_active and not lo <= m.band.wavenumber <= hi]
    if out:
        notes.append(
            f"{len(out)} IR band(s) fall outside the usual {model.field.name} range {lo:.0f}-{hi:.0f} cm-1: "
            "check the constants"
        )
    return tuple(notes)


def band_pattern(
    isomer: Isomer,
    reporter_class: str,
    params: Mapping[str, float] | None = None,
    *,
    rules: RuleSet | None = None,
) -> BandPattern:
    """Predict the bands of one reporter class on one isomer.

    Parameters
    ----------
    isomer : Isomer
    reporter_class : str
        'CO', 'CN', 'NO', ... (case-insensitive).
    params : Mapping[str, float], optional
        Overrides of the default constants (see :meth:`Model.resolve
        <enumerator.vibrations.model.Model.resolve>`: ``k`` sets every
        stretching constant).
    rules : RuleSet, optional
        Where the defaults come from (default: the built-in rules).

    Returns
    -------
    BandPattern

    Raises
    ------
    InputError
        For an unknown class, an isomer without it, an unknown constant name
        or constants that give an imaginary frequency.
    """
    model = build_model(isomer, reporter_class, rules)
    values = model.resolve(params)
    solution = solve_modes(model, isomer, values)
    return BandPattern(
        isomer_id=isomer.id,
        reporter_class=model.reporter_class,
        model=model,
        constants=tuple((k, float(values[k])) for k in model.parameter_names),
        bands=solution.bands,
        species=solution.species,
        notes=_pattern_notes(model, solution.modes, solution.note),
    )


def predict_bands(
    isomer: Isomer,
    reporter_class: str,
    params: Mapping[str, float] | None = None,
    *,
    rules: RuleSet | None = None,
) -> tuple[Band, ...]:
    """The predicted bands alone, highest wavenumber first.

    Parameters are those of :func:`band_pattern`.

    Returns
    -------
    tuple[Band, ...]
    """
    return band_pattern(isomer, reporter_class, params, rules=rules).bands


def parse_constants(text: str) -> dict[str, float]:
    """Read force constants as written on the command line.

    Parameters
    ----------
    text : str
        'k=16.2,kc=0.3,kt=0.6' (mdyn/Å).

    Returns
    -------
    dict[str, float]
        {'k': 16.2, 'kc': 0.3, 'kt': 0.6}

    Raises
    ------
    InputError
        For a part that is not NAME=NUMBER, or no part at all.
    """
    out: dict[str, float] = {}
    for part in (p.strip() for p in text.split(",")):
        if not part:
            continue
        name, sep, val = part.partition("=")
        name = name.strip()
        try:
            v = float(val)
        except ValueError:
            v = float("nan")
        if not sep or not name or not math.isfinite(v):
            raise InputError(
                f"constant '{part}' is not NAME=NUMBER", "write e.g. --constants k=16.2,kc=0.3,kt=0.6 (mdyn/Å)"
            )
        out[name] = v
    if not out:
        raise InputError("no constants given", "write e.g. --constants k=16.2,kc=0.3,kt=0.6")
    return out
