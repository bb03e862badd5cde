"""Coordination geometries from rule files: one ``geometries/<SYMBOL>.toml`` per polyhedron.

A file gives the IUPAC polyhedral symbol (or, for a shape IUPAC does not
list, a lower-case name of the tool's own such as ``hexplane-6``), a name
and the site directions (normalised here); optionally the coordination
number (checked against the sites, as is the number that ends the symbol),
the span a chelate link takes by default, whether the shape is
fluxional, a note, and whether it is the default for abstract formulas of
its coordination number.  The symmetry operations of a user's geometry are
derived from the vectors at load, so a degenerate site set fails here,
naming the file; those of the built-in geometries (checked by the test
suite) are derived on first use, so a command pays only for the geometries
it touches.

>>> from enumerator.rules.ruleset import load_rules
>>> geos = load_geometries(load_rules().files("geometries/*.toml"))
>>> geos["OC-6"].name, geos["OC-6"].coordination_number
('octahedron', 6)
>>> parse_geometry("mine.toml", {"symbol": "XX-2", "name": "pair", "sites": [[0, 0, 1], [0, 0, 2]]})
Traceback (most recent call last):
...
enumerator.errors.RuleError: mine.toml: sites[0] and sites[1] point the same way; remove the duplicate
"""

from __future__ import annotations

import math
import re
from collections.abc import Iterable, Mapping
from dataclasses import replace
from pathlib import Path
from types import MappingProxyType
from typing import Any

from enumerator.limits import MAX_SITES
from enumerator.model.geometry import SPANS, Geometry
from enumerator.rules.checks import check_keys, read_toml, rule_error
from enumerator.rules.derived import install as install_stored_symmetry
from enumerator.rules.snapping import Ambiguous, Snap, snap_sites
from enumerator.symmetry.derive import Vec
from enumerator.symmetry.operations import GroupIdentificationError
from enumerator.tolerances import SITE_AMBIGUITY_TOL, SITE_SNAP_TOL

__all__ = ["parse_geometry", "load_geometries"]

#: An IUPAC polyhedral symbol (IR-9.3.2.1: capitals, hyphen, coordination number), or a name of the
#: tool's own for a shape IUPAC does not list: a lower-case word, hyphen, coordination number
#: ('hexplane-6'), which cannot pass for an IUPAC symbol.
_SYMBOL = re.compile(r"^(?:[A-Z]{1,5}|[a-z]{3,12})-([0-9]{1,2})$")
_OPTIONAL = ("coordination_number", "default_span", "fluxional", "note", "default_for_abstract", "source")
#: Two site directions closer than this (unit vectors, Euclidean distance) are the same site.
_SAME_SITE = 1e-3
#: A site vector shorter than this is the zero vector.
_ZERO = 1e-9


def _expect(cond: bool, where: str, what: str, fix: str) -> None:
    if not cond:
        raise rule_error(where, what, fix)


def _site_vectors(sites: Any, where: str) -> tuple[Vec, ...]:
    """The site directions as unit vectors, each checked to be three finite numbers, non-zero and distinct."""
    _expect(
        isinstance(sites, list) and len(sites) >= 1,
        where,
        "sites must be a list of [x, y, z] directions",
        "give sites = [[0, 0, 1], ...]",
    )
    _expect(
        len(sites) <= MAX_SITES,
        where,
        f"{len(sites)} sites are listed, more than the {MAX_SITES} a geometry may have",
        f"give at most {MAX_SITES} sites",
    )
    vecs: list[Vec] = []
    for k, s in enumerate(sites):
        ok = isinstance(s, list) and len(s) == 3
        ok = ok and all(isinstance(x, (int, float)) and not isinstance(x, bool) and math.isfinite(x) for x in s)
        _expect(ok, where, f"sites[{k}] is {s!r}, not three finite numbers", "give each site as [x, y, z]")
        norm = math.hypot(*(float(x) for x in s))  # hypot: no overflow for huge components
        _expect(norm > _ZERO, where, f"sites[{k}] is the zero vector", "give a direction from the metal")
        vecs.append((float(s[0]) / norm, float(s[1]) / norm, float(s[2]) / norm))
    for a in range(len(vecs)):
        for b in range(a):
            d = math.dist(vecs[a], vecs[b])
            _expect(d > _SAME_SITE, where, f"sites[{b}] and sites[{a}] point the same way", "remove the duplicate")
    return tuple(vecs)


def parse_geometry(path: str | Path, data: Mapping[str, Any], snap: bool = False, derive: bool = True) -> Geometry:
    """One validated geometry from the parsed TOML of a geometry file.

    Parameters
    ----------
    path : str or Path
        The file (named in errors and kept as ``Geometry.source``).
    data : Mapping[str, Any]
        Its parsed TOML.
    snap : bool
        Symmetrise vectors typed with few figures (:mod:`enumerator.rules.snapping`); done for user files,
        whose ``Geometry.adjusted`` then says which group was found and how far each site moved.
    derive : bool, optional
        Derive the symmetry operations now, so that a degenerate site set
        fails here (default); False leaves them to the first use.

    Returns
    -------
    Geometry
        With unit site vectors.

    Raises
    ------
    RuleError
        A key is missing, unknown or malformed, there are more than :data:`~enumerator.limits.MAX_SITES`
        sites, the sites are degenerate, their near-symmetry is ambiguous, or their group cannot be named.
    """
    where = str(path)
    check_keys(data, where, required=("symbol", "name", "sites"), optional=_OPTIONAL)
    sym = data["symbol"]
    _expect(
        isinstance(sym, str) and bool(_SYMBOL.match(sym)),
        where,
        f"symbol {sym!r} is not a polyhedral symbol",
        "write it like 'OC-6' (IUPAC: capitals, hyphen, coordination number), or for a shape IUPAC does not "
        "list a lower-case name of your own like 'hexplane-6'",
    )
    _expect(
        isinstance(data["name"], str) and data["name"].strip() != "",
        where,
        "name must be a non-empty string",
        'give e.g. name = "octahedron"',
    )
    vecs = _site_vectors(data["sites"], where)
    cn = data.get("coordination_number", len(vecs))
    _expect(cn == len(vecs), where, f"coordination_number is {cn} but {len(vecs)} sites are listed", "make them agree")
    m = _SYMBOL.match(sym)
    _expect(
        m is not None and int(m.group(1)) == len(vecs),
        where,
        f"symbol {sym!r} ends in {m.group(1) if m else '?'} but {len(vecs)} sites are listed",
        "end the symbol with the coordination number",
    )
    span = data.get("default_span", "edge")
    _expect(
        span in SPANS,
        where,
        f"default_span {span!r} is not one of {', '.join(SPANS)}",
        "use 'edge' for chelates along polyhedron edges",
    )
    for key in ("fluxional", "default_for_abstract"):
        _expect(isinstance(data.get(key, False), bool), where, f"{key} must be true or false", f"write {key} = true")
    note = data.get("note", "")
    _expect(isinstance(note, str), where, "note must be a string", "quote it")
    snapped = _snap(vecs, where) if snap else None
    geo = Geometry(
        symbol=sym,
        name=data["name"],
        vectors=snapped.vectors if snapped is not None and snapped.moved else vecs,
        default_span=span,
        fluxional=data.get("fluxional", False),
        note=note,
        default_for_abstract=data.get("default_for_abstract", False),
        source=where,
    )
    if derive and not geo.linear and len(vecs) >= 2:
        try:  # derive once now so that a degenerate set fails at load (and, for a user file, name its group)
            _ = (geo.operations, geo.point_group) if snap else geo.operations
        except GroupIdentificationError as exc:
            raise rule_error(where, f"the symmetry group of these sites cannot be named ({exc})", _GROUP_FIX) from None
    if snapped is not None and snapped.moved:
        geo = replace(geo, adjusted=_adjusted(geo, snapped))
    return geo


_GROUP_FIX = (
    "the tool names point groups with rotation axes of order up to 60; use fewer sites or a less symmetric shape"
)


def _snap(vecs: tuple[Vec, ...], where: str) -> Snap:
    try:
        return snap_sites(vecs)
    except Ambiguous as exc:
        raise rule_error(
            where,
            f"the sites are near more than one symmetry: {exc}",
            f"give the vectors to 6 or more significant figures if the shape is meant to be symmetric, or make a "
            f"distortion clear (more than {SITE_AMBIGUITY_TOL:g} from the symmetric shape, about 1.7 degrees)",
        ) from None


def _adjusted(geo: Geometry, snapped: Snap) -> str:
    """The note of a snapped geometry: the group found and how far each site moved."""
    moves = ", ".join(f"{k + 1}: {m:.1e}" for k, m in enumerate(snapped.moves) if m > 1e-12)
    return (
        f"{geo.symbol} ({geo.source}): the sites as typed are within {SITE_SNAP_TOL:g} of {geo.point_group} "
        f"symmetry ({snapped.order} operations; {snapped.exact_order} as typed) and were symmetrised to it; "
        f"sites moved (unit-vector lengths) {moves}"
    )


def load_geometries(paths: Iterable[Path], builtin: Path | None = None) -> Mapping[str, Geometry]:
    """Every geometry of the given files; a user file may replace a built-in geometry of the same shape.

    Parameters
    ----------
    paths : iterable of Path
        Geometry files, built-in first (``RuleSet.files("geometries/*.toml")``).
    builtin : Path, optional
        The built-in rules folder: its files are read as they are, every other file is a user file, whose
        vectors are symmetrised (:func:`parse_geometry` with ``snap``) and their operations derived at
        load; the built-in geometries' operations are derived on first use.

    Returns
    -------
    Mapping[str, Geometry]
        Read-only, by polyhedral symbol.

    Raises
    ------
    RuleError
        A file is malformed; two user files share a symbol (in any case); a user file gives a built-in
        symbol to another shape (other site count or point group), which the naming rules of that symbol
        would misread; two geometries of one coordination number are both marked ``default_for_abstract``.
    """
    install_stored_symmetry()  # the built-in geometries' operations and tables, read on first use
    geos: dict[str, Geometry] = {}
    builtins: dict[str, Geometry] = {}
    users: dict[str, Geometry] = {}
    for path in paths:
        user = builtin is None or not Path(path).resolve().is_relative_to(builtin)
        g = parse_geometry(path, read_toml(path), snap=user and builtin is not None, derive=user)
        key = g.symbol.lower()
        if not user:
            builtins[key] = g
        elif key in users:
            raise rule_error(
                g.source,
                f"symbol '{g.symbol}' is also given by {users[key].source}",
                "give each geometry file its own symbol, or remove one of the files",
            )
        else:
            _same_shape(g, builtins.get(key))
            users[key] = g
        for old in [s for s in geos if s.lower() == key]:
            del geos[old]
        geos[g.symbol] = g
    for cn in sorted({g.coordination_number for g in geos.values()}):
        marked = [g for g in geos.values() if g.coordination_number == cn and g.default_for_abstract]
        if len(marked) > 1:
            raise rule_error(
                ", ".join(g.source for g in marked),
                f"geometries {', '.join(g.symbol for g in marked)} are all marked default_for_abstract for CN {cn}",
                "mark only one",
            )
    return MappingProxyType(geos)


def _same_shape(user: Geometry, builtin: Geometry | None) -> None:
    """Refuse a user file that gives a built-in symbol to another shape."""
    if builtin is None:
        return
    if user.coordination_number != builtin.coordination_number or user.point_group != builtin.point_group:
        raise rule_error(
            user.source,
            f"symbol '{user.symbol}' names the built-in {builtin.name} ({builtin.point_group}, "
            f"{builtin.coordination_number} sites), but these {user.coordination_number} sites have "
            f"{user.point_group} symmetry",
            "give your shape a symbol of its own (a lower-case name such as 'mytet-4' cannot pass for an "
            "IUPAC symbol), or give the built-in shape's sites",
        )
