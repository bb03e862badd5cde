"""Look-ups that need no analysis stage: character tables, the geometries and
ligands in force, up-front isomer counts, and starting structures.

Each function here is the one library call behind a command (``isosieve
chartable``, ``geometries``, ``ligands``, ``count``, ``structures``): it reads
the rules, parses the formula and chooses the geometry as
:func:`enumerator.workflow.pipeline.prepare` does, and returns a frozen result
whose ``to_dict()`` is the command's JSON.

>>> character_tables("C2v").group
'C2v'
>>> character_tables("Ma3b3", geometry="OC-6").to_dict()[1]["group"]
'C2v'
>>> geometry_catalogue().to_dict()[0]["symbol"]
'L-2'
>>> count_formula("M(AA)2b2").to_dict()["counts"][0]["stereoisomers"]
3
>>> ligand_catalogue(name="carbonyl").to_dict()["name"]
'CO'
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import Any

from enumerator.errors import InputError
from enumerator.isomers.counting import CountResult, count_isomers
from enumerator.isomers.enumeration import enumerate_isomers
from enumerator.isomers.tables import IsomerTables, tables_for_isomers
from enumerator.model.geometry import Geometry
from enumerator.rules.ligands import LigandEntry, find_ligand, load_ligands
from enumerator.rules.ruleset import load_rules
from enumerator.structures.result import StructureSet, structure_set
from enumerator.symmetry.chartable import CharacterTable, named_table
from enumerator.symmetry.groups import GROUP_NAME
from enumerator.symmetry.operations import LINEAR_GROUPS
from enumerator.workflow.pipeline import Request, prepare, run

__all__ = [
    "character_tables",
    "geometry_catalogue",
    "GeometryCatalogue",
    "ligand_catalogue",
    "LigandCatalogue",
    "count_formula",
    "formula_structures",
]

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
                **({"adjusted": g.adjusted} if g.adjusted else {}),
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
    progress: Callable[[int, int], None] | None = None,
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
    progress : callable, optional
        Called as ``progress(done, total)`` while a geometry's Burnside sum is summed (a progress bar).

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
    comp, geo, reason = prepare(req, size_check=False)  # counting is what the size guard itself does
    if not every:
        return count_isomers(comp, [geo], reason, progress=progress)
    if geometry:
        raise InputError("--all and --geometry both given", "give one of them")
    geos = sorted(
        (g for g in load_rules(req.rules).geometries.values() if g.coordination_number == comp.donor_count),
        key=lambda g: g.symbol,
    )
    return count_isomers(comp, geos, progress=progress)


@dataclass(frozen=True)
class LigandCatalogue:
    """The ligand catalogue in force, or the one entry asked for (``name`` is then what was asked).

    Entries of the whole catalogue are ordered by denticity, then name (case-insensitive)."""

    entries: tuple[LigandEntry, ...]
    name: str | None = None

    @staticmethod
    def entry_to_dict(e: LigandEntry) -> dict[str, Any]:
        """The JSON object of one catalogue entry."""
        return {
            "name": e.name,
            "aliases": list(e.aliases),
            "label": e.label,
            "smiles": e.smiles,
            "donors": list(e.donors),
            "denticity": e.denticity,
            "hapticity": e.hapticity,
            "ring": e.ring,
            "topology": e.topology,
            "charge": e.charge,
            "electrons_covalent": e.electrons_covalent,
            "electrons_ionic": e.electrons_ionic,
            "reporter": e.reporter,
            "spans": list(e.spans),
            "arrangements": list(e.arrangements),
            "nitrosyl": e.nitrosyl,
            "note": e.note,
            "source": e.source,
        }

    def to_dict(self) -> dict[str, Any] | list[dict[str, Any]]:
        """The JSON of ``isosieve ligands --json``: one object for a named ligand, else a list of them."""
        if self.name is not None:
            return self.entry_to_dict(self.entries[0])
        return [self.entry_to_dict(e) for e in self.entries]


def ligand_catalogue(rules: Sequence[str] = (), name: str | None = None) -> LigandCatalogue:
    """The ligand catalogue of the built-in rules and the given rule folders, or one ligand of it.

    Parameters
    ----------
    rules : sequence of str
        Rule folders (``--rules DIR``) in force.
    name : str, optional
        A name or alias: exact first, then a unique case-insensitive match.

    Returns
    -------
    LigandCatalogue

    Raises
    ------
    InputError
        An unknown name (with the nearest names).
    """
    rs = load_rules(tuple(rules))
    if name:
        return LigandCatalogue((find_ligand(rs, name),), name)
    return LigandCatalogue(tuple(sorted(load_ligands(rs).values(), key=lambda e: (e.denticity, e.name.lower()))))


def formula_structures(
    formula: str,
    *,
    geometry: str | None = None,
    spans: Pairs = (),
    arrangements: Pairs = (),
    limit: int | None = None,
    rules: Sequence[str] = (),
    progress: Callable[[str, int, int], None] | None = None,
) -> StructureSet:
    """Starting structures (full ligands where their SMILES are known) of every isomer of a formula.

    Parameters
    ----------
    formula : str
    geometry : str, optional
        Polyhedral symbol (default: chosen from the formula).
    spans, arrangements : sequence of (ligand, setting)
        Chelate spans and fac/mer limits.
    limit : int, optional
        Stop after this many stereoisomers.
    rules : sequence of str
        Rule folders (``--rules DIR``) in force.

    progress : callable, optional
        Called as ``progress(isomer id, done, total)`` after each structure (a progress bar).

    Returns
    -------
    StructureSet

    Raises
    ------
    InputError
        For a formula that cannot be read or placed.
    """
    req = Request(
        formula=formula,
        geometry=geometry,
        spans=tuple(spans),
        arrangements=tuple(arrangements),
        limit=limit,
        rules=tuple(rules),
    )
    return structure_set(run(req), progress)
