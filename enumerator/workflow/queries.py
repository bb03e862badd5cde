"""Look-ups that need no analysis stage: character tables, the geometries in
force, and up-front isomer counts.

Each function here is the one library call behind a command (``isosieve
chartable``, ``geometries``, ``count``): it reads the rules, parses the
formula and chooses the geometry as :func:`enumerator.workflow.pipeline.prepare`
does, and returns a frozen result whose ``to_dict()`` is the command's JSON.

>>> character_tables("C2v").group
'C2v'
>>> character_tables("Ma3b3", geometry="OC-6").to_dict()[1]["group"]
'C2v'
>>> geometry_catalogue().to_dict()[0]["symbol"]
'L-2'
>>> count_formula("M(AA)2b2").to_dict()["counts"][0]["stereoisomers"]
3
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

from enumerator.errors import InputError
from enumerator.isomers.counting import CountResult, count_isomers
from enumerator.isomers.enumeration import enumerate_isomers
from enumerator.isomers.tables import IsomerTables, tables_for_isomers
from enumerator.model.geometry import Geometry
from enumerator.rules.ruleset import load_rules
from enumerator.symmetry.chartable import CharacterTable, named_table
from enumerator.symmetry.groups import GROUP_NAME
from enumerator.symmetry.operations import LINEAR_GROUPS
from enumerator.workflow.pipeline import Request, prepare

__all__ = ["character_tables", "geometry_catalogue", "GeometryCatalogue", "count_formula"]

Pairs = Sequence[tuple[str, str]]


def character_tables(
    what: str,
    *,
    geometry: str | None = None,
    isomer_id: str | None = None,
    spans: Pairs = (),
    rules: Sequence[str] = (),
) -> CharacterTable | IsomerTables:
    """The table of a named point group, or the tables of a formula's isomers.

    Parameters
    ----------
    what : str
        A point-group name (C2v, D4h, Oh, S8 ...) or a formula.  A name is
        read as a group unless ``geometry`` or ``isomer_id`` is given.
    geometry : str, optional
        Polyhedral symbol for a formula (default: chosen from the formula).
    isomer_id : str, optional
        Only this isomer of the formula.
    spans : sequence of (ligand, span)
        Chelate span settings for a formula.
    rules : sequence of str
        Rule folders (``--rules DIR``) in force.

    Returns
    -------
    CharacterTable or IsomerTables

    Raises
    ------
    InputError
        For an infinite group, a name that is no point group, a formula that
        cannot be read or placed, an unknown isomer id, or a linear centre.
    """
    if GROUP_NAME.match(what) and not isomer_id and not geometry:
        return named_table(what)
    if what in LINEAR_GROUPS:
        named_table(what)  # raises the explanation
    comp, geo, _ = prepare(Request(formula=what, geometry=geometry, spans=tuple(spans), rules=tuple(rules)))
    return tables_for_isomers(enumerate_isomers(comp, geo), isomer_id)


@dataclass(frozen=True)
class GeometryCatalogue:
    """The coordination geometries in force, by coordination number, then symbol."""

    geometries: tuple[Geometry, ...]

    def to_dict(self) -> list[dict[str, Any]]:
        """Plain data for JSON (the shape of ``isosieve geometries --json``): one entry per geometry."""
        return [
            {
                "symbol": g.symbol,
                "name": g.name,
                "coordination_number": g.coordination_number,
                "point_group": g.point_group,
                "operations": len(g.operations),
                "polyhedron_edges": len(g.edges),
                "fluxional": g.fluxional,
            }
            for g in self.geometries
        ]


def geometry_catalogue(rules: Sequence[str] = ()) -> GeometryCatalogue:
    """Every geometry of the built-in rules and the given rule folders.

    Parameters
    ----------
    rules : sequence of str
        Rule folders (``--rules DIR``) in force.

    Returns
    -------
    GeometryCatalogue
    """
    rs = load_rules(tuple(rules))
    return GeometryCatalogue(tuple(sorted(rs.geometries.values(), key=lambda g: (g.coordination_number, g.symbol))))


def count_formula(
    formula: str,
    *,
    geometry: str | None = None,
    every: bool = False,
    spans: Pairs = (),
    arrangements: Pairs = (),
    rules: Sequence[str] = (),
) -> CountResult:
    """Count a formula's isomers up front (Burnside's lemma), without listing them.

    Parameters
    ----------
    formula : str
    geometry : str, optional
        Polyhedral symbol (default: chosen from the formula).
    every : bool
        Count on every geometry with the formula's coordination number instead.
    spans, arrangements : sequence of (ligand, setting)
        Chelate spans and fac/mer limits.
    rules : sequence of str
        Rule folders (``--rules DIR``) in force.

    Returns
    -------
    CountResult

    Raises
    ------
    InputError
        For a formula that cannot be read or placed, or ``every`` together with ``geometry``.
    """
    req = Request(
        formula=formula, geometry=geometry, spans=tuple(spans), arrangements=tuple(arrangements), rules=tuple(rules)
    )
    comp, geo, reason = prepare(req)
    if not every:
        return count_isomers(comp, [geo], reason)
    if geometry:
        raise InputError("--all and --geometry both given", "give one of them")
    geos = sorted(
        (g for g in load_rules(req.rules).geometries.values() if g.coordination_number == comp.donor_count),
        key=lambda g: g.symbol,
    )
    return count_isomers(comp, geos)
