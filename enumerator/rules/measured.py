"""Measured stretching bands of real complexes (``rules/measured/*.toml``).

The curated data set the band model is fitted to and validated against
(:mod:`enumerator.vibrations.calibrate`).  Each file holds ``[[complex]]``
tables: a formula as the tool reads it, the isomer ('' when the formula has one
geometric isomer; 'cis', 'fac', 'axial' ...), the medium, the bibliographic
``source`` and ``confirmed`` (how the value was checked: 'search ...' when it
was seen in a copy of the source, 'from memory ...' when it was recalled), and
the bands (cm-1, reporter class, IR or Raman, optional species and intensity).
``fit = false`` keeps a row out of the fit (unsaturated or open-shell species
isolated in matrices or the gas phase); ``weight`` (0 < w <= 1) lowers a row
the curator was less sure of.  ``rules/measured/README.md`` describes the set.

This module validates the files' structure once at load (every problem a
:class:`~enumerator.errors.RuleError` naming the file, the entry and the fix);
whether a formula parses and its isomer resolves is checked one layer up,
where formulas are read (:func:`enumerator.vibrations.calibrate.resolve_row`).

>>> rows = load_measured()
>>> len(rows) > 100, rows[0].bands[0].reporter
(True, 'CO')
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from enumerator.caches import cached
from enumerator.rules.checks import check_keys, read_toml, rule_error
from enumerator.rules.ruleset import BUILTIN_RULES

__all__ = [
    "MeasuredBand",
    "MeasuredComplex",
    "FileCounts",
    "load_measured",
    "file_counts",
    "MEASURED_FOLDER",
    "REPORTER_CLASSES",
]

#: The folder of the built-in data set.
MEASURED_FOLDER = BUILTIN_RULES / "measured"

#: Reporter classes a measured band may belong to.
REPORTER_CLASSES = ("CO", "CN", "NO", "CS", "CNR", "N2")

_REQ = ("compound", "formula", "isomer", "geometry", "phase", "source", "confirmed", "bands", "note")
_OPT = ("fit", "weight", "nitrosyl")
_BAND_REQ = ("cm1", "class", "technique")
_BAND_OPT = ("species", "intensity")


@dataclass(frozen=True)
class MeasuredBand:
    """One measured band: wavenumber (cm-1), reporter class, 'IR' or 'Raman', optional species/intensity."""

    cm1: float
    reporter: str
    technique: str
    species: str | None = None
    intensity: str | None = None


@dataclass(frozen=True)
class MeasuredComplex:
    """One ``[[complex]]`` row: a complex in one medium with its bands and provenance.

    ``key`` is 'file.toml#n' (n counting from 1); ``fit`` False keeps the row
    out of the fit; ``weight`` scales its residuals in the fit; ``nitrosyl``
    is 'linear' or 'bent' where the structure is known.
    """

    key: str
    compound: str
    formula: str
    isomer: str
    geometry: str
    phase: str
    source: str
    confirmed: str
    bands: tuple[MeasuredBand, ...]
    note: str
    fit: bool = True
    weight: float = 1.0
    nitrosyl: str | None = None

    @property
    def from_memory(self) -> bool:
        """Whether the values were recalled rather than seen in a copy of the source."""
        return self.confirmed.lower().startswith("from memory")


def _text(v: object, where: str, key: str, empty_ok: bool = True) -> str:
    if not isinstance(v, str) or (not empty_ok and not v.strip()):
        raise rule_error(where, f"'{key}' must be {'a' if empty_ok else 'a non-empty'} string", f'write {key} = "..."')
    return v


def _band(b: Any, where: str) -> MeasuredBand:
    if not isinstance(b, Mapping):
        raise rule_error(where, "a band is not a table", 'write { cm1 = 2000.0, class = "CO", technique = "IR" }')
    check_keys(b, where, _BAND_REQ, _BAND_OPT)
    cm1 = b["cm1"]
    if isinstance(cm1, bool) or not isinstance(cm1, (int, float)) or not math.isfinite(cm1) or not 0 < cm1 < 4000:
        raise rule_error(where, f"band cm1 = {cm1!r} is not a wavenumber", "give a number of cm-1 between 0 and 4000")
    cls = b["class"]
    if cls not in REPORTER_CLASSES:
        raise rule_error(
            where, f"band class '{cls}' is not a reporter class", f"use one of {', '.join(REPORTER_CLASSES)}"
        )
    if b["technique"] not in ("IR", "Raman"):
        raise rule_error(where, f"technique '{b['technique']}' is neither IR nor Raman", 'write technique = "IR"')
    species = b.get("species")
    intensity = b.get("intensity")
    for name, v in (("species", species), ("intensity", intensity)):
        if v is not None and not isinstance(v, str):
            raise rule_error(where, f"band {name} must be a string", f'write {name} = "..."')
    return MeasuredBand(float(cm1), cls, b["technique"], species, intensity)


#: The media a row may name (rules/measured/README.md, "Phase strings used"); the band model gives 'gas' and
#: 'matrix' terms of their own and treats the rest as condensed phase, so a misspelt medium must not pass silently.
PHASES = (
    "hexane",
    "heptane",
    "cyclohexane",
    "isopentane",
    "CH2Cl2",
    "CHCl3",
    "MeCN",
    "THF",
    "aqueous",
    "HSO3F",
    "liquid ethane",
    "liquid xenon",
    "supercritical methane",
    "solid",
    "Nujol",
    "gas",
    "matrix",
    "unspecified",
)


def _row(c: Any, where: str) -> MeasuredComplex:
    if not isinstance(c, Mapping):
        raise rule_error(where, "an entry is not a table", "write [[complex]] tables")
    check_keys(c, where, _REQ, _OPT)
    for key in ("formula", "source", "confirmed", "compound", "phase"):
        _text(c[key], where, key, empty_ok=False)
    for key in ("isomer", "geometry", "note"):
        _text(c[key], where, key)
    if c["phase"] not in PHASES:
        raise rule_error(
            where,
            f"phase '{c['phase']}' is not one of the media the data set uses",
            f"use one of {', '.join(PHASES)} (or add it to PHASES and to rules/measured/README.md)",
        )
    if not c["confirmed"].lower().startswith(("search", "from memory")):
        raise rule_error(
            where,
            "'confirmed' says neither how the value was seen nor that it is recalled",
            "start it with 'search ...' (where it was seen) or 'from memory'",
        )
    bands = c["bands"]
    if not isinstance(bands, list) or not bands:
        raise rule_error(where, "no bands", "give bands = [ { cm1 = ..., class = ..., technique = ... } ]")
    fit = c.get("fit", True)
    if not isinstance(fit, bool):
        raise rule_error(where, "'fit' must be true or false", "write fit = false (and say why in the note)")
    if fit is False and "fit = false" not in c["note"]:
        raise rule_error(where, "fit = false without a reason", "say 'fit = false: <why>' in the note")
    weight = c.get("weight", 1.0)
    if isinstance(weight, bool) or not isinstance(weight, (int, float)) or not 0 < weight <= 1:
        raise rule_error(where, f"weight = {weight!r} is not in (0, 1]", "write weight = 0.5 for a less certain row")
    nitrosyl = c.get("nitrosyl")
    if nitrosyl not in (None, "linear", "bent"):
        raise rule_error(where, f"nitrosyl = {nitrosyl!r}", 'write nitrosyl = "linear" or "bent"')
    return MeasuredComplex(
        key=where.rsplit("/", 1)[-1],
        compound=c["compound"],
        formula=c["formula"],
        isomer=c["isomer"],
        geometry=c["geometry"],
        phase=c["phase"],
        source=c["source"],
        confirmed=c["confirmed"],
        bands=tuple(_band(b, where) for b in bands),
        note=c["note"],
        fit=fit,
        weight=float(weight),
        nitrosyl=nitrosyl,
    )


@cached(maxsize=4)
def _load(folder: Path, stamp: tuple[tuple[str, int, int], ...]) -> tuple[MeasuredComplex, ...]:
    out: list[MeasuredComplex] = []
    for name, _, _ in stamp:
        path = folder / name
        doc = read_toml(path)
        check_keys(doc, str(path), ("complex",))
        rows = doc["complex"]
        if not isinstance(rows, list):
            raise rule_error(path, "'complex' is not a list of tables", "write [[complex]] tables")
        out.extend(_row(c, f"{path}#{n}") for n, c in enumerate(rows, start=1))
    return tuple(out)


def load_measured(folder: Path | str | None = None) -> tuple[MeasuredComplex, ...]:
    """Every measured row of a data-set folder, validated (cached by the files' names, sizes and times).

    Parameters
    ----------
    folder : Path or str, optional
        A folder of ``*.toml`` files (default: the built-in ``rules/measured``).

    Returns
    -------
    tuple[MeasuredComplex, ...]
        In file-name order, then file order.

    Raises
    ------
    RuleError
        A file that is not valid TOML, an entry without a source or bands, an
        unknown key, a band without class or technique, an unusable weight.
    """
    path = Path(folder) if folder is not None else MEASURED_FOLDER
    files = sorted(path.glob("*.toml"))
    if not files:
        raise rule_error(path, "no *.toml files", "point to the folder of the measured data set")
    stamp = tuple((f.name, f.stat().st_size, f.stat().st_mtime_ns) for f in files)
    return _load(path, stamp)


@dataclass(frozen=True)
class FileCounts:
    """Row and band counts of one data-set file (or of the whole set, ``file`` = 'total').

    ``classes`` is ((class, IR bands, Raman bands), ...) in :data:`REPORTER_CLASSES` order, classes with bands only;
    ``seen`` / ``memory`` / ``off`` are (rows, bands) seen in a source, recalled, and kept out of the fit.
    """

    file: str
    rows: int
    bands: int
    ir: int
    raman: int
    classes: tuple[tuple[str, int, int], ...]
    seen: tuple[int, int]
    memory: tuple[int, int]
    off: tuple[int, int]


def _count(name: str, rows: tuple[MeasuredComplex, ...]) -> FileCounts:
    bands = [b for r in rows for b in r.bands]
    classes = tuple(
        (
            c,
            sum(b.technique == "IR" for b in bands if b.reporter == c),
            sum(b.technique == "Raman" for b in bands if b.reporter == c),
        )
        for c in REPORTER_CLASSES
        if any(b.reporter == c for b in bands)
    )

    def rb(sel: list[MeasuredComplex]) -> tuple[int, int]:
        return len(sel), sum(len(r.bands) for r in sel)

    return FileCounts(
        name,
        len(rows),
        len(bands),
        sum(b.technique == "IR" for b in bands),
        sum(b.technique == "Raman" for b in bands),
        classes,
        rb([r for r in rows if not r.from_memory]),
        rb([r for r in rows if r.from_memory]),
        rb([r for r in rows if not r.fit]),
    )


def file_counts(folder: Path | str | None = None) -> tuple[FileCounts, ...]:
    """The counts of every file of the data set, in file-name order, then the total (``file`` = 'total').

    Parameters
    ----------
    folder : Path or str, optional
        A folder of ``*.toml`` files (default: the built-in ``rules/measured``).

    Returns
    -------
    tuple[FileCounts, ...]
        What ``rules/measured/README.md`` tabulates under 'Counts' (written by
        ``python -m enumerator.vibrations.calibrate --summary``).
    """
    rows = load_measured(folder)
    names = sorted({r.key.split("#", 1)[0] for r in rows})
    per = [_count(n, tuple(r for r in rows if r.key.split("#", 1)[0] == n)) for n in names]
    return (*per, _count("total", rows))
