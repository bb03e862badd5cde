"""Coordination geometries from rule files: one ``geometries/<SYMBOL>.toml`` per polyhedron.

A file gives the IUPAC polyhedral symbol (or, for a shape IUPAC does not
list, a lower-case name of the tool's own such as ``hexplane-6``), a name
and the site directions (normalised here); optionally the coordination
number (checked against the sites, as is the number that ends the symbol),
the span a chelate link takes by default, whether the shape is
fluxional, a note, and whether it is the default for abstract formulas of
its coordination number.  The symmetry operations are derived from the
vectors at load, so a degenerate site set fails here, naming the file.

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
from pathlib import Path
from types import MappingProxyType
from typing import Any

from enumerator.model.geometry import SPANS, Geometry
from enumerator.rules.checks import check_keys, read_toml, rule_error
from enumerator.symmetry.derive import Vec

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


def parse_geometry(path: str | Path, data: Mapping[str, Any]) -> Geometry:
    """One validated geometry from the parsed TOML of a geometry file.

    Parameters
    ----------
    path : str or Path
        The file (named in errors and kept as ``Geometry.source``).
    data : Mapping[str, Any]
        Its parsed TOML.

    Returns
    -------
    Geometry
        With unit site vectors; its symmetry operations are derived once here.

    Raises
    ------
    RuleError
        A key is missing, unknown or malformed, or the sites are degenerate.
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
    geo = Geometry(
        symbol=sym,
        name=data["name"],
        vectors=vecs,
        default_span=span,
        fluxional=data.get("fluxional", False),
        note=note,
        default_for_abstract=data.get("default_for_abstract", False),
        source=where,
    )
    if not geo.linear and len(vecs) >= 2:
        _ = geo.operations  # derive once now so that a degenerate set fails at load
    return geo


def load_geometries(paths: Iterable[Path]) -> Mapping[str, Geometry]:
    """Every geometry of the given files; a later file with the same symbol replaces an earlier one.

    Parameters
    ----------
    paths : iterable of Path
        Geometry files, built-in first (``RuleSet.files("geometries/*.toml")``).

    Returns
    -------
    Mapping[str, Geometry]
        Read-only, by polyhedral symbol.

    Raises
    ------
    RuleError
        A file is malformed, or two geometries of one coordination number are
        both marked ``default_for_abstract``.
    """
    geos: dict[str, Geometry] = {}
    for path in paths:
        g = parse_geometry(path, read_toml(path))
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
