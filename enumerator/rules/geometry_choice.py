"""Which polyhedron a centre takes by default: ``rules/geometry_choice.toml``, loaded and checked once.

The file is an ordered list of rules; the first whose conditions all hold
decides (:meth:`GeometryChoice.first_match`).  A rule's conditions are about
the centre as :class:`CentreFacts` describes it: the site count, the η-rings
and the other sites (legs), the d-electron count, the metal with its
oxidation state, and the ligands by named classes (halides, cyanide, ...).
Each rule names the geometry, the reason in words, the alternatives worth
checking and its source; a rule may instead refuse (no idealised frame is
known) with a fix.  A user ``geometry_choice.toml`` under ``--rules DIR`` is
tried before the built-in file; a user rule with a built-in rule's name
replaces it, and a user class replaces a built-in class of its name.

>>> from enumerator.rules.ruleset import load_rules
>>> choice = load_geometry_choice(load_rules())
>>> facts = CentreFacts(sites=4, rings=0, legs=4, d=8, metal="Ni", oxidation_state=2, ligands=frozenset({"Cl"}))
>>> rule = choice.first_match(facts)
>>> rule.name, rule.geometry, rule.alternatives
('ni-ii-halide-tetrahedral', 'T-4', ('SP-4',))
>>> choice.first_match(CentreFacts(sites=3, rings=1, legs=2, abstract=True)).geometry
'TPY-3'
"""

from __future__ import annotations

import re
from collections.abc import Mapping
from functools import cached_property
from pathlib import Path
from types import MappingProxyType
from typing import Any

from enumerator.caches import cached
from enumerator.frozen import frozen_dataclass
from enumerator.model.elements import element_symbols
from enumerator.rules.checks import check_keys, read_toml, rule_error
from enumerator.rules.ligands import all_spellings
from enumerator.rules.ruleset import RuleSet

__all__ = ["CentreFacts", "GeometryRule", "GeometryChoice", "load_geometry_choice", "parse_centre"]

#: The file every rules folder may hold.
FILE = "geometry_choice.toml"

_RULE_KEYS = ("name", "geometry", "why", "source")
_RULE_OPTIONAL = (
    "alternatives",
    "refuse",
    "fix",
    "abstract",
    "sites",
    "rings",
    "legs",
    "d",
    "centres",
    "all_ligands_in",
    "any_ligand_in",
)
_NAME = re.compile(r"^[A-Za-z0-9][A-Za-z0-9-]{0,63}$")
_CENTRE = re.compile(r"^([A-Z][a-z]?)\((-?)(0|I|II|III|IV|V|VI|VII|VIII|IX|X)\)$")
_ROMAN = {"0": 0, "I": 1, "II": 2, "III": 3, "IV": 4, "V": 5, "VI": 6, "VII": 7, "VIII": 8, "IX": 9, "X": 10}


@frozen_dataclass
class CentreFacts:
    """What a rule may test about a centre.

    ``sites`` counts an η-ring as one site; ``rings`` the η-rings and ``legs``
    the sites held by everything else; ``d`` and ``oxidation_state`` are None
    where the centre has no count (abstract letters, non-d-block metals);
    ``ligands`` holds the catalogue names of the ligands; ``abstract`` is True
    for the letter notation."""

    sites: int
    rings: int = 0
    legs: int = 0
    d: int | None = None
    metal: str | None = None
    oxidation_state: int | None = None
    ligands: frozenset[str] = frozenset()
    abstract: bool = False


@frozen_dataclass
class GeometryRule:
    """One rule of the file: its conditions (None: any) and its answer."""

    name: str
    geometry: str
    why: str
    source: str
    alternatives: tuple[str, ...] = ()
    refuse: bool = False
    fix: str = ""
    abstract: bool = False
    sites: frozenset[int] | None = None
    rings: frozenset[int] | None = None
    legs: frozenset[int] | None = None
    d: frozenset[int] | None = None
    centres: frozenset[tuple[str, int]] | None = None
    all_ligands_in: frozenset[str] | None = None
    any_ligand_in: frozenset[str] | None = None
    where: str = ""

    def matches(self, facts: CentreFacts) -> bool:
        """Whether every condition of the rule holds for the centre.

        Parameters
        ----------
        facts : CentreFacts

        Returns
        -------
        bool
            An abstract centre matches only rules marked ``abstract``.
        """
        if facts.abstract and not self.abstract:
            return False
        for allowed, value in ((self.sites, facts.sites), (self.rings, facts.rings), (self.legs, facts.legs)):
            if allowed is not None and value not in allowed:
                return False
        if self.d is not None and facts.d not in self.d:
            return False
        if self.centres is not None and (facts.metal, facts.oxidation_state) not in self.centres:
            return False
        if self.all_ligands_in is not None and not (facts.ligands and facts.ligands <= self.all_ligands_in):
            return False
        return self.any_ligand_in is None or bool(facts.ligands & self.any_ligand_in)


@frozen_dataclass
class GeometryChoice:
    """The rules in force, in the order they are tried, and the ligand classes they use."""

    rules: tuple[GeometryRule, ...]
    classes: Mapping[str, frozenset[str]]

    def first_match(self, facts: CentreFacts) -> GeometryRule | None:
        """The first rule whose conditions hold, or None.

        Parameters
        ----------
        facts : CentreFacts

        Returns
        -------
        GeometryRule or None
        """
        index, others = self._by_sites
        rules = index.get((facts.abstract, facts.sites), others[facts.abstract])
        return next((r for r in rules if r.matches(facts)), None)

    @cached_property
    def _by_sites(
        self,
    ) -> tuple[dict[tuple[bool, int], tuple[GeometryRule, ...]], dict[bool, tuple[GeometryRule, ...]]]:
        """The rules that can match a centre of each kind (abstract or not) and site count, in order.

        A rule that names site counts can match only those; an abstract
        centre only rules marked abstract.  Every other condition is still
        tested by :meth:`GeometryRule.matches`."""
        counts = sorted({n for r in self.rules if r.sites is not None for n in r.sites})

        def can(r: GeometryRule, abstract: bool, n: int | None) -> bool:
            return (r.abstract or not abstract) and (r.sites is None or (n is not None and n in r.sites))

        index = {(a, n): tuple(r for r in self.rules if can(r, a, n)) for a in (False, True) for n in counts}
        others = {a: tuple(r for r in self.rules if can(r, a, None)) for a in (False, True)}
        return index, others


def parse_centre(text: Any, where: str) -> tuple[str, int]:
    """A centre written as metal and Stock number, 'Ni(II)' -> ('Ni', 2).

    Parameters
    ----------
    text : object
        The value from the file.
    where : str
        The file and rule, for messages.

    Returns
    -------
    (str, int)

    Raises
    ------
    RuleError
        Not an element symbol followed by a Roman numeral (or 0) in parentheses.
    """
    m = _CENTRE.match(text) if isinstance(text, str) else None
    if m is None or m.group(1) not in element_symbols():
        raise rule_error(where, f"centre {text!r} is not a metal with its oxidation state", 'write e.g. "Ni(II)"')
    n = _ROMAN[m.group(3)]
    return m.group(1), -n if m.group(2) else n


def _ints(value: Any, where: str, key: str) -> frozenset[int] | None:
    if value is None:
        return None
    items = value if isinstance(value, list) else [value]
    if not items or not all(isinstance(x, int) and not isinstance(x, bool) and x >= 0 for x in items):
        raise rule_error(where, f"'{key}' must be a whole number or a list of them", f"write {key} = 4 or [4, 5]")
    return frozenset(items)


def _text(data: Mapping[str, Any], where: str, key: str, required: bool = True) -> str:
    value = data.get(key, "")
    if not isinstance(value, str) or (required and not value.strip()):
        raise rule_error(where, f"'{key}' must be a non-empty string", f'write {key} = "..."')
    return value.strip()


def _flag(data: Mapping[str, Any], where: str, key: str) -> bool:
    value = data.get(key, False)
    if not isinstance(value, bool):
        raise rule_error(where, f"'{key}' must be true or false", f"write {key} = true")
    return value


def _symbols(value: Any, where: str, key: str, known: Mapping[str, Any]) -> tuple[str, ...]:
    if not isinstance(value, list) or not all(isinstance(x, str) for x in value):
        raise rule_error(where, f"'{key}' must be a list of polyhedral symbols", f'write {key} = ["SP-4"]')
    for s in value:
        if s not in known:
            raise rule_error(where, f"'{key}' names {s!r}, which is not a geometry in force", "use e.g. 'T-4'")
    return tuple(value)


def _ligand_set(value: Any, where: str, key: str, classes: Mapping[str, frozenset[str]]) -> frozenset[str] | None:
    if value is None:
        return None
    if not isinstance(value, list) or not value or not all(isinstance(x, str) for x in value):
        raise rule_error(where, f"'{key}' must be a list of class names", f'write {key} = ["halide"]')
    out: set[str] = set()
    for name in value:
        if name not in classes:
            raise rule_error(
                where, f"'{key}' names the class {name!r}, which [classes] does not define", "define it under [classes]"
            )
        out |= classes[name]
    return frozenset(out)


def _centres(value: Any, where: str) -> frozenset[tuple[str, int]] | None:
    if value is None:
        return None
    if not isinstance(value, list) or not value:
        raise rule_error(
            where, "'centres' must be a list of metals with oxidation states", 'write centres = ["Ni(II)"]'
        )
    return frozenset(parse_centre(c, where) for c in value)


def _rule(raw: Any, where: str, rules: RuleSet, classes: Mapping[str, frozenset[str]]) -> GeometryRule:
    """One validated rule."""
    if not isinstance(raw, dict):
        raise rule_error(where, "not a table", "write each rule under [[rule]]")
    check_keys(raw, where, _RULE_KEYS, _RULE_OPTIONAL)
    name = raw["name"]
    if not isinstance(name, str) or not _NAME.match(name):
        raise rule_error(where, f"name {name!r} must be letters, digits and hyphens", 'write e.g. name = "d8-four"')
    where = f"{where} ({name})"
    geos = rules.geometries
    geometry = _symbols([raw["geometry"]], where, "geometry", geos)[0] if isinstance(raw["geometry"], str) else None
    if geometry is None:
        raise rule_error(where, "'geometry' must be a polyhedral symbol", 'write geometry = "T-4"')
    rule = GeometryRule(
        name=name,
        geometry=geometry,
        why=_text(raw, where, "why"),
        source=_text(raw, where, "source"),
        alternatives=_symbols(raw.get("alternatives", []), where, "alternatives", geos),
        refuse=_flag(raw, where, "refuse"),
        fix=_text(raw, where, "fix", required=False),
        abstract=_flag(raw, where, "abstract"),
        sites=_ints(raw.get("sites"), where, "sites"),
        rings=_ints(raw.get("rings"), where, "rings"),
        legs=_ints(raw.get("legs"), where, "legs"),
        d=_ints(raw.get("d"), where, "d"),
        centres=_centres(raw.get("centres"), where),
        all_ligands_in=_ligand_set(raw.get("all_ligands_in"), where, "all_ligands_in", classes),
        any_ligand_in=_ligand_set(raw.get("any_ligand_in"), where, "any_ligand_in", classes),
        where=where,
    )
    _check_rule(rule, where)
    return rule


def _check_rule(rule: GeometryRule, where: str) -> None:
    """The keys of one rule against each other."""
    if rule.refuse and not rule.fix:
        raise rule_error(where, "a refusing rule needs 'fix'", 'say what the user can do: fix = "give --geometry"')
    if rule.fix and not rule.refuse:
        raise rule_error(where, "'fix' is for refusing rules only", "remove 'fix' or add refuse = true")
    specific = [k for k in ("d", "centres", "all_ligands_in", "any_ligand_in") if getattr(rule, k) is not None]
    if rule.abstract and specific:
        raise rule_error(
            where,
            f"an abstract rule can test only sites, rings and legs, not {specific[0]}",
            "remove abstract = true or the condition",
        )


def _classes(data: Any, where: str, rules: RuleSet) -> dict[str, frozenset[str]]:
    """The ligand classes, each name or alias resolved to its catalogue name."""
    if not isinstance(data, dict):
        raise rule_error(where, "[classes] must be a table of lists", 'write halide = ["Cl", "Br"]')
    spellings = all_spellings(rules)
    out: dict[str, frozenset[str]] = {}
    for cls, names in data.items():
        if not isinstance(names, list) or not names or not all(isinstance(x, str) for x in names):
            raise rule_error(where, f"class {cls!r} must be a non-empty list of ligand names", 'write ["Cl", "Br"]')
        for n in names:
            if n not in spellings:
                raise rule_error(where, f"class {cls!r} names {n!r}, which is not in the ligand catalogue", "check it")
        out[cls] = frozenset(spellings[n] for n in names)
    return out


def _rules_of(path: Path, data: Mapping[str, Any], rules: RuleSet, classes: Mapping[str, frozenset[str]]):
    """The rules of one file, in file order."""
    table = data.get("rule", [])
    if not isinstance(table, list):
        raise rule_error(path, "'rule' must be an array of tables", "write each rule under [[rule]]")
    out: list[GeometryRule] = []
    for k, raw in enumerate(table):
        r = _rule(raw, f"{path} [[rule]] #{k + 1}", rules, classes)
        if any(o.name == r.name for o in out):
            raise rule_error(r.where, f"rule '{r.name}' is defined twice in this file", "keep one")
        out.append(r)
    return out


@cached(maxsize=16)
def load_geometry_choice(rules: RuleSet) -> GeometryChoice:
    """The geometry-choice rules in force: user files' rules first, then the built-in ones.

    Parameters
    ----------
    rules : RuleSet
        The rule folders in force (their geometries and ligand catalogue are used to check the names).

    Returns
    -------
    GeometryChoice
        Read-only; loaded and checked once per rule set.

    Raises
    ------
    RuleError
        A malformed file or rule: naming the file, the rule and the key, with the fix.
    """
    docs = []
    classes: dict[str, frozenset[str]] = {}
    for path in rules.files(FILE):
        data = read_toml(path)
        check_keys(data, str(path), (), ("classes", "rule"))
        classes.update(_classes(data.get("classes", {}), f"{path} [classes]", rules))
        docs.append((path, data))
    ordered: list[GeometryRule] = []
    taken: set[str] = set()
    for path, data in reversed(docs):  # the last folder's rules are tried first
        for r in _rules_of(path, data, rules, classes):
            if r.name not in taken:
                ordered.append(r)
                taken.add(r.name)
    return GeometryChoice(tuple(ordered), MappingProxyType(classes))
