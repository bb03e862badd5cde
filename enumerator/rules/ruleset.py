"""Rule files: load and validate the data under ``rules/`` (and any user
folders given with ``--rules DIR``) once, into typed objects.

A user folder mirrors the built-in layout::

    DIR/geometries/*.toml     one coordination geometry per file
    DIR/ligands.toml          extra ligands (see enumerator.rules.ligands)
    DIR/reporters.toml        extra reporter classes
    DIR/substitution/*.toml   extra substitution rule sets

A user file is validated in full before it is used; an entry with the same
name as a built-in one replaces it for that run only.  Every problem is
reported as a :class:`~enumerator.errors.RuleError` naming the file, the key
and the fix.

>>> rs = load_rules()
>>> rs.geometry("TBPY-5").coordination_number
5
"""

from __future__ import annotations

import math
import os
import re
import tomllib
from dataclasses import dataclass
from functools import cached_property, lru_cache
from pathlib import Path
from typing import Any, Iterable, Mapping

from enumerator.errors import InputError, RuleError
from enumerator.model.geometry import SPANS, Geometry

__all__ = [
    "BUILTIN_RULES",
    "RuleSet",
    "load_rules",
    "read_toml",
    "check_keys",
    "closest_names",
]

#: The rules folder shipped with the package.
#: In the source tree ``enumerator/builtin_rules`` is a link to the top-level
#: ``rules/``; a wheel carries the files themselves there (pyproject package-data).
#: The package's own copy comes first, so a stray ``rules`` folder beside an
#: installed package is never read.
BUILTIN_RULES = (Path(__file__).resolve().parent.parent / "builtin_rules").resolve()
if not BUILTIN_RULES.is_dir():  # a checkout where the link did not survive (e.g. no symlinks)
    BUILTIN_RULES = Path(__file__).resolve().parent.parent.parent / "rules"

_SYMBOL = re.compile(r"^[A-Z]{1,5}-\d{1,2}$")


def read_toml(path: Path) -> dict[str, Any]:
    """Parse one TOML file, turning syntax errors into a RuleError with the line."""
    try:
        with open(path, "rb") as fh:
            return tomllib.load(fh)
    except tomllib.TOMLDecodeError as exc:
        raise RuleError(f"{path}: TOML syntax error ({exc})", "fix the file at that line and column") from None
    except OSError as exc:
        raise RuleError(f"{path}: cannot read ({exc.strerror})", "check the path and permissions") from None


def check_keys(table: Mapping[str, Any], where: str, required: Iterable[str], optional: Iterable[str] = ()) -> None:
    """Raise a RuleError for a missing or unknown key."""
    req = list(required)
    allowed = set(req) | set(optional)
    for key in req:
        if key not in table:
            raise RuleError(f"{where}: missing key '{key}'", f"add '{key} = ...'")
    for key in table:
        if key not in allowed:
            near = closest_names(key, sorted(allowed))
            hint = f"did you mean '{near[0]}'?" if near else f"allowed keys: {', '.join(sorted(allowed))}"
            raise RuleError(f"{where}: unknown key '{key}'", hint)


def closest_names(name: str, names: Iterable[str], n: int = 3) -> list[str]:
    """The nearest known names (case-insensitive), for 'did you mean' hints."""
    import difflib

    pool = list(names)
    lower = {p.lower(): p for p in pool}
    hits = difflib.get_close_matches(name.lower(), list(lower), n=n, cutoff=0.5)
    return [lower[h] for h in hits]


def _expect(cond: bool, where: str, what: str, fix: str) -> None:
    if not cond:
        raise RuleError(f"{where}: {what}", fix)


def _parse_geometry(path: Path, data: dict[str, Any]) -> Geometry:
    where = str(path)
    check_keys(
        data,
        where,
        required=("symbol", "name", "sites"),
        optional=("coordination_number", "default_span", "fluxional", "note", "default_for_abstract", "source"),
    )
    sym = data["symbol"]
    _expect(isinstance(sym, str) and bool(_SYMBOL.match(sym)), where, f"symbol {sym!r} is not a polyhedral symbol", "write it like 'OC-6' (letters, hyphen, coordination number)")
    _expect(isinstance(data["name"], str) and data["name"].strip() != "", where, "name must be a non-empty string", "give e.g. name = \"octahedron\"")
    sites = data["sites"]
    _expect(isinstance(sites, list) and len(sites) >= 1, where, "sites must be a list of [x, y, z] directions", "give sites = [[0, 0, 1], ...]")
    vecs = []
    for k, s in enumerate(sites):
        ok = isinstance(s, list) and len(s) == 3 and all(isinstance(x, (int, float)) and not isinstance(x, bool) and math.isfinite(x) for x in s)
        _expect(ok, where, f"sites[{k}] is {s!r}, not three finite numbers", "give each site as [x, y, z]")
        norm = math.hypot(*(float(x) for x in s))  # hypot: no overflow for huge components
        _expect(norm > 1e-9, where, f"sites[{k}] is the zero vector", "give a direction from the metal")
        vecs.append(tuple(float(x) / norm for x in s))
    for a in range(len(vecs)):
        for b in range(a):
            d = math.dist(vecs[a], vecs[b])
            _expect(d > 1e-3, where, f"sites[{b}] and sites[{a}] point the same way", "remove the duplicate")
    cn = data.get("coordination_number", len(vecs))
    _expect(cn == len(vecs), where, f"coordination_number is {cn} but {len(vecs)} sites are listed", "make them agree")
    span = data.get("default_span", "edge")
    _expect(span in SPANS, where, f"default_span {span!r} is not one of {', '.join(SPANS)}", "use 'edge' for chelates along polyhedron edges")
    for key in ("fluxional", "default_for_abstract"):
        _expect(isinstance(data.get(key, False), bool), where, f"{key} must be true or false", f"write {key} = true")
    note = data.get("note", "")
    _expect(isinstance(note, str), where, "note must be a string", "quote it")
    geo = Geometry(
        symbol=sym,
        name=data["name"],
        vectors=tuple(vecs),  # type: ignore[arg-type]
        default_span=span,
        fluxional=data.get("fluxional", False),
        note=note,
        default_for_abstract=data.get("default_for_abstract", False),
        source=str(path),
    )
    if not geo.linear and len(vecs) >= 2:
        _ = geo.operations  # derive once now so that a degenerate set fails at load
    return geo


@dataclass(frozen=True)
class RuleSet:
    """Every rule folder in force, built-in first.  Sections load lazily and
    are validated in full on first use."""

    folders: tuple[Path, ...]

    def files(self, relative: str) -> list[Path]:
        """All files at ``relative`` (a file name or a glob under a folder),
        built-in first, then each user folder in order."""
        out: list[Path] = []
        for folder in self.folders:
            if any(ch in relative for ch in "*?["):
                out.extend(sorted(folder.glob(relative)))
            else:
                p = folder / relative
                if p.is_file():
                    out.append(p)
        return out

    @cached_property
    def geometries(self) -> dict[str, Geometry]:
        geos: dict[str, Geometry] = {}
        for path in self.files("geometries/*.toml"):
            g = _parse_geometry(path, read_toml(path))
            geos[g.symbol] = g
        for cn in sorted({g.coordination_number for g in geos.values()}):
            marked = [g.symbol for g in geos.values() if g.coordination_number == cn and g.default_for_abstract]
            if len(marked) > 1:
                raise RuleError(f"geometries {', '.join(marked)} are all marked default_for_abstract for CN {cn}", "mark only one")
        return geos

    def geometry(self, symbol: str) -> Geometry:
        """A geometry by its polyhedral symbol (case-insensitive)."""
        geos = self.geometries
        for sym, g in geos.items():
            if sym.lower() == symbol.strip().lower():
                return g
        near = closest_names(symbol, geos)
        hint = f"did you mean {' or '.join(near)}?" if near else f"known: {', '.join(sorted(geos))}"
        raise InputError(f"unknown geometry '{symbol}'", hint + " (or add rules/geometries/<SYMBOL>.toml via --rules DIR)")

    def default_geometry(self, cn: int) -> Geometry:
        """The geometry an abstract formula of coordination number ``cn`` gets."""
        for g in sorted(self.geometries.values(), key=lambda g: g.symbol):
            if g.coordination_number == cn and g.default_for_abstract:
                return g
        same = sorted(g.symbol for g in self.geometries.values() if g.coordination_number == cn)
        if same:
            return self.geometry(same[0])
        raise InputError(
            f"no geometry with coordination number {cn}",
            "check the formula's donor count or add a geometry file with --rules DIR",
        )


def load_rules(user_folders: Iterable[str | os.PathLike[str]] = ()) -> RuleSet:
    """The rule set for the built-in rules plus the given user folders."""
    folders = []
    for f in user_folders:
        p = Path(f).expanduser().resolve()
        if not p.is_dir():
            raise InputError(f"--rules folder '{f}' does not exist", "give a folder that holds geometries/, ligands.toml, ...")
        folders.append(p)
    return _load(tuple([BUILTIN_RULES] + folders))


@lru_cache(maxsize=16)
def _load(folders: tuple[Path, ...]) -> RuleSet:
    return RuleSet(folders)
