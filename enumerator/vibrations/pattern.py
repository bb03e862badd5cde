"""Predicted band patterns: one reporter class on one isomer, ready to show.

:func:`band_pattern` builds the energy-factored (Cotton–Kraihanzel) model of
the class (:mod:`enumerator.vibrations.model`) and fills in its constants:

* for a real composition (``composition=`` given, a metal and a charge) from
  the additive ligand-effect band model (:mod:`enumerator.vibrations.additive`,
  after J. A. Timney, *Inorg. Chem.* 18 (1979) 2502; parameters fitted in
  ``rules/bandmodel.toml``): per-set stretching constants and per-pair
  interactions (carried as ``pair_weights`` on the model, kc and kt being
  their means), each band with ``sigma`` from the model's cross-validation,
  widened where a ligand falls back to its group or to the generic value
  (the notes name the ligand);
* for the abstract letters, or a class the band model has no parameters for,
  from the generic constants of ``rules/forcefields.toml`` (a note says so).

User overrides replace these values (``k`` every stretching constant; an
explicit ``kc`` or ``kt`` applies to every cis or trans pair alike, as in
Cotton–Kraihanzel).  The model is solved by Wilson's GF method with
bond-dipole intensities (:mod:`enumerator.vibrations.solver`), and notes a
chemist should read are added: bands allowed by symmetry that the bond-dipole
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
from dataclasses import replace
from typing import Any

import numpy as np

from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.isomers.enumeration import Isomer
from enumerator.model.composition import Composition
from enumerator.rules.bandmodel import load_bandmodel
from enumerator.rules.ruleset import RuleSet
from enumerator.vibrations.additive import build_design, category, centre_of, coverage, f_matrix
from enumerator.vibrations.model import Model, build_model
from enumerator.vibrations.solver import Band, Mode, solve_modes

__all__ = ["BandPattern", "band_pattern", "predict_bands", "parse_constants"]


@frozen_dataclass
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
    #: 'additive' (the fitted ligand-effect model) or 'generic' (the constants of forcefields.toml)
    model_name: str = "generic"
    #: ligands without fitted parameters of their own (they fell back to their group or the generic value)
    fallbacks: tuple[str, ...] = ()

    @property
    def ir_bands(self) -> tuple[Band, ...]:
        """The bands with non-zero bond-dipole intensity."""
        return tuple(b for b in self.bands if b.ir_active)

    def shifted_constants(self, dk: float) -> dict[str, float]:
        """The constants with every stretching constant moved by ``dk`` (mdyn/Å).

        With per-pair interactions (the additive model) kc and kt are left out, so that
        passing the result back to :func:`band_pattern` keeps those interactions.
        """
        vals = dict(self.constants)
        for s in self.model.sets:
            vals[s.name] = vals[s.name] + dk
        if self.model.pair_weights:
            vals.pop("kc", None)
            vals.pop("kt", None)
        return vals

    def to_dict(self) -> dict[str, Any]:
        """The pattern's JSON object (rounded for byte-stable output)."""
        return {
            "reporter_class": self.reporter_class,
            "model": self.model_name,
            "fallbacks": list(self.fallbacks),
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


def _pattern_notes(model: Model, modes: Sequence[Mode], note: str | None, fitted: bool = False) -> tuple[str, ...]:
    notes = [note] if note else []
    quiet = [m.band.name for m in modes if m.band.dipole_forbidden]
    if quiet:
        notes.append(
            f"{', '.join(quiet)}: IR-allowed by symmetry but of zero intensity in the bond-dipole model "
            "(trans oscillators moving in phase): expect weak band(s)"
        )
    lo, hi = model.field.range
    out = [m.band for m in modes if m.band.ir_active and not lo <= m.band.wavenumber <= hi]
    if out and fitted:
        # the fitted model put them there from the metal, charge and ligands (e.g. [Ti(CO)6]2- near 1750):
        # say so, without blaming constants nobody typed
        notes.append(
            f"{len(out)} IR band(s) predicted outside the usual {model.field.name} range {lo:.0f}-{hi:.0f} cm-1, "
            "as the band model's charge and ligand terms place them"
        )
    elif out:
        notes.append(
            f"{len(out)} IR band(s) fall outside the usual {model.field.name} range {lo:.0f}-{hi:.0f} cm-1: "
            "check the constants"
        )
    return tuple(notes)


_GENERIC_NOTE = {
    "abstract": "abstract letters have no metal or charge: positions from the generic constants of forcefields.toml",
    "none": "no composition given: positions from the generic constants of forcefields.toml",
}


@frozen_dataclass
class _Additive:
    """The additive model's values for one pattern: the model with pair weights, defaults, sigma per band, notes."""

    model: Model
    sigma: float
    notes: tuple[str, ...]
    fallbacks: tuple[str, ...]


def _mean(values: list[float], default: float) -> float:
    return float(np.mean(values)) if values else default


def _additive(isomer: Isomer, base: Model, composition: Composition) -> _Additive | str:
    """The additive model of ``base``'s class, or the note saying why the generic constants are used."""
    centre = centre_of(composition)
    if centre is None:
        return _GENERIC_NOTE["abstract"]
    bm = load_bandmodel()
    design = build_design(
        isomer, centre, base.reporter_class, groups=bm.groups, families=bm.families, substituents=bm.substituents
    )
    cov = coverage(design, bm)
    if not cov.usable:
        return f"{cov.notes[0]}: positions from the generic constants of forcefields.toml"
    f = f_matrix(design, bm.parameters, bm.reference_k(design.pclass))
    pos = {site: k for k, site in enumerate(design.sites)}
    defaults = dict(base.defaults)
    for st in base.sets:
        defaults[st.name] = _mean([float(f[pos[x], pos[x]]) for x in st.sites], defaults[st.name])
    by_rel: dict[str, list[tuple[int, int, float]]] = {"cis": [], "trans": []}
    for i, j, rel in base.relations:
        by_rel[rel].append((i, j, float(f[i, j])))
    weights = []
    for rel, name in (("cis", "kc"), ("trans", "kt")):
        mean = _mean([v for _, _, v in by_rel[rel]], defaults[name])
        defaults[name] = mean
        if by_rel[rel] and abs(mean) > 1e-6:
            weights += [(i, j, v / mean) for i, j, v in by_rel[rel]]
    model = replace(
        base, defaults=tuple((n, float(defaults[n])) for n in base.parameter_names), pair_weights=tuple(sorted(weights))
    )
    cat = category(design.pclass, centre.charge)
    notes = list(cov.notes)
    base_sigma = bm.sigma.get(cat)
    if base_sigma is None:
        base_sigma = bm.sigma["pooled"]
        notes.append(f"too few measured {cat} bands for a sigma of their own: the pooled value is used")
    return _Additive(model, base_sigma * cov.widen, tuple(notes), cov.group + cov.generic)


def band_pattern(
    isomer: Isomer,
    reporter_class: str,
    params: Mapping[str, float] | None = None,
    *,
    rules: RuleSet | None = None,
    composition: Composition | None = None,
    band_model: str = "auto",
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
        stretching constant; an explicit ``kc``/``kt`` makes every cis/trans
        interaction that value).  With overrides the bands carry no sigma.
    rules : RuleSet, optional
        Where the generic defaults come from (default: the built-in rules).
    composition : Composition, optional
        The isomer's composition: with a real metal the additive band model
        gives the constants (default: the generic constants, with a note).
    band_model : str
        'auto' (the additive model where it applies) or 'generic' (always the
        constants of ``forcefields.toml``).

    Returns
    -------
    BandPattern

    Raises
    ------
    InputError
        For an unknown class, an isomer without it, an unknown constant name,
        an unknown ``band_model`` or constants that give an imaginary frequency.
    """
    if band_model not in ("auto", "generic"):
        raise InputError(f"unknown band model '{band_model}'", "use 'auto' or 'generic'")
    base = build_model(isomer, reporter_class, rules)
    add: _Additive | str | None = None
    if band_model == "auto":
        add = _additive(isomer, base, composition) if composition is not None else _GENERIC_NOTE["none"]
    model = add.model if isinstance(add, _Additive) else base
    if params and model.pair_weights and ("kc" in params or "kt" in params):
        drop = {"cis" if n == "kc" else "trans" for n in ("kc", "kt") if n in params}
        rel = {(i, j): r for i, j, r in model.relations}
        model = replace(model, pair_weights=tuple(w for w in model.pair_weights if rel[(w[0], w[1])] not in drop))
    values = model.resolve(params)
    solution = solve_modes(model, isomer, values)
    fitted = isinstance(add, _Additive) and not params
    notes = list(_pattern_notes(model, solution.modes, solution.note, fitted))
    bands = solution.bands
    if isinstance(add, _Additive):
        notes += add.notes
        if not params:
            bands = tuple(replace(b, sigma=add.sigma) for b in bands)
        else:
            notes.append("user constants replace the band model's: no uncertainty is given")
    elif isinstance(add, str) and add != _GENERIC_NOTE["none"]:
        notes.append(add)
    return BandPattern(
        isomer_id=isomer.id,
        reporter_class=model.reporter_class,
        model=model,
        constants=tuple((k, float(values[k])) for k in model.parameter_names),
        bands=bands,
        species=solution.species,
        notes=tuple(notes),
        model_name="additive" if isinstance(add, _Additive) else "generic",
        fallbacks=add.fallbacks if isinstance(add, _Additive) else (),
    )


def predict_bands(
    isomer: Isomer,
    reporter_class: str,
    params: Mapping[str, float] | None = None,
    *,
    rules: RuleSet | None = None,
    composition: Composition | None = None,
) -> tuple[Band, ...]:
    """The predicted bands alone, highest wavenumber first.

    Parameters are those of :func:`band_pattern`.

    Returns
    -------
    tuple[Band, ...]
    """
    return band_pattern(isomer, reporter_class, params, rules=rules, composition=composition).bands


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
