"""Substitution rule sets: ``rules/substitution/*.toml`` (plus any user
``substitution/*.toml`` given with ``--rules DIR``), loaded and checked once
per rule set.

A rule set says which site of a complex is replaced when one ligand enters:

* ``labilises = "trans"``: the ligand trans to a site decides its lability
  (the trans effect of square-planar substitution);
* ``labilises = "cis"``: the ligands cis to it decide (cis-labilisation of
  octahedral carbonyls);
* ``labilises = "none"``: every site alike (the statistical default).

``series`` ranks the labilising ligands, strongest first (an inner list is one
rank); ``ties`` says what happens when the best sites give different products.
Every key is validated at load and a problem raises a
:class:`~enumerator.errors.RuleError` naming the file, the key and the fix.

>>> from enumerator.rules.ruleset import load_rules
>>> sets = load_substitution_rules(load_rules())
>>> sorted(sets)
['cis-labilisation', 'statistical', 'trans-effect']
>>> te = sets["trans-effect"]
>>> te.labilises, te.rank("Cl") < te.rank("NH3")
('trans', True)
>>> te.rank("nitro") == te.rank("NO2")   # any catalogued spelling
True
>>> rule, why = choose_rule_set(sets, "SP-4", ["Cl", "NH3"], ["Cl"])
>>> rule.name
'trans-effect'
>>> why
'trans-effect: applies to SP-4 and ranks every ligand here (cis-labilisation applies to OC-6, not SP-4)'
"""

from __future__ import annotations

import re
from collections.abc import Iterable, Mapping
from dataclasses import field, replace
from functools import cached_property
from pathlib import Path
from types import MappingProxyType
from typing import Any

from enumerator.caches import cached
from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.rules.checks import check_keys, closest_names, read_toml, rule_error
from enumerator.rules.ligands import all_spellings
from enumerator.rules.ruleset import RuleSet

__all__ = [
    "SubstitutionRules",
    "LABILISES",
    "TIES",
    "load_substitution_rules",
    "choose_rule_set",
    "choose_rule_set_for_step",
]

#: Which ligands decide a site's lability: those trans to it, those cis to it, or none (statistical).
LABILISES = ("trans", "cis", "none")
#: What a tie between sites that give different products means.
TIES = ("statistical", "undecided")

_NAME = re.compile(r"^[A-Za-z0-9][A-Za-z0-9_.+-]*$")


@frozen_dataclass
class SubstitutionRules:
    """One substitution rule set (one TOML file under ``substitution/``).

    Attributes
    ----------
    name, title, source : str
        The set's name (``--rule-set NAME``), a one-line title and its
        bibliographic source.
    geometries : tuple of str
        Polyhedral symbols the set applies to, or ``("*",)`` for all.
    labilises : str
        'trans' (the ligand trans to the site: trans effect), 'cis' (the
        ligands cis to it: cis-labilisation) or 'none' (every site alike:
        statistical).
    series : tuple of tuple of str
        Ligand names strongest first, one tuple per rank.
    ties : str
        'statistical' (the product given by most of the tied sites is the
        major one; equal counts leave the step undecided) or 'undecided'.
    leaving : tuple of str
        If not empty, the rule covers only steps in which one of these
        ligands leaves.
    priority : int
        Higher wins when several rule sets apply.
    note : str
        A caveat shown with every route planned under the set.
    path : str
        The file the set was read from.
    aliases : tuple of (str, str)
        Other spellings of catalogued ligands -> catalogue name, so that a
        series entry matches under any spelling (part of equality, since the
        ranks depend on it).
    """

    name: str
    title: str
    source: str
    geometries: tuple[str, ...]
    labilises: str
    series: tuple[tuple[str, ...], ...]
    ties: str
    leaving: tuple[str, ...] = ()
    priority: int = 0
    note: str = ""
    path: str = ""
    aliases: tuple[tuple[str, str], ...] = field(default=(), repr=False)

    @property
    def statistical(self) -> bool:
        """True for a rule set in which every site is alike (``labilises = 'none'``)."""
        return self.labilises == "none"

    def rank(self, ligand: str) -> int | None:
        """The rank of a ligand in the series.

        Parameters
        ----------
        ligand : str
            A ligand name; a catalogued ligand matches under any of its spellings.

        Returns
        -------
        int or None
            0 for the strongest rank; None when the series does not list it.
        """
        table = self._ranks
        if ligand in table:
            return table[ligand]
        return table.get(dict(self.aliases).get(ligand, ligand))

    @cached_property
    def _ranks(self) -> Mapping[str, int]:
        spell = dict(self.aliases)
        out: dict[str, int] = {}
        for k, rank in enumerate(self.series):
            for x in rank:
                out.setdefault(x, k)
                out.setdefault(spell.get(x, x), k)
        return MappingProxyType(out)

    def covers_geometry(self, symbol: str) -> bool:
        """Whether the set applies to the geometry with this polyhedral symbol.

        Parameters
        ----------
        symbol : str
            E.g. 'SP-4'.

        Returns
        -------
        bool
        """
        return "*" in self.geometries or symbol in self.geometries

    def unranked(self, ligands: Iterable[str]) -> list[str]:
        """The ligands this rule needs ranked but does not list.

        Parameters
        ----------
        ligands : iterable of str
            Ligand names, any catalogued spelling.

        Returns
        -------
        list of str
            Sorted; always empty for a statistical set.
        """
        if self.statistical:
            return []
        return sorted({n for n in ligands if self.rank(n) is None})

    def applies(self, geometry: str, ligands: Iterable[str], leaving: Iterable[str]) -> tuple[bool, str]:
        """Whether the rule set can decide steps among these ligands, and why not.

        Parameters
        ----------
        geometry : str
            Polyhedral symbol of the centre.
        ligands : iterable of str
            Every ligand of start and target.
        leaving : iterable of str
            The ligands that may leave.

        Returns
        -------
        (bool, str)
            True and '' when it applies, else False and the reason in words.
        """
        if not self.covers_geometry(geometry):
            return False, f"{self.name} applies to {', '.join(self.geometries)}, not {geometry}"
        if self.leaving:
            bad = sorted(set(leaving) - set(self.leaving))
            if bad:
                return False, f"{self.name} only covers the loss of {', '.join(self.leaving)}, not {', '.join(bad)}"
        missing = self.unranked(ligands)
        if missing:
            return False, f"{self.name} does not rank {', '.join(missing)}"
        return True, ""

    def to_dict(self) -> dict[str, Any]:
        """The rule set as it appears in JSON output.

        Returns
        -------
        dict
            The value of the key ``rule_set``.
        """
        return {
            "name": self.name,
            "title": self.title,
            "source": self.source,
            "geometries": list(self.geometries),
            "labilises": self.labilises,
            "ties": self.ties,
            "series": [list(r) for r in self.series],
            "leaving": list(self.leaving),
            "file": self.path,
        }


# ---------------------------------------------------------------- reading one file


def _string_list(value: Any, where: str, key: str, example: str) -> tuple[str, ...]:
    if not isinstance(value, list) or not all(isinstance(x, str) and x.strip() for x in value):
        raise rule_error(where, f"'{key}' must be a list of names", f"write e.g. {key} = {example}")
    return tuple(x.strip() for x in value)


def _check_name(data: Mapping[str, Any], where: str) -> str:
    name = data["name"]
    if not isinstance(name, str) or not _NAME.match(name):
        raise rule_error(
            where,
            f"name {name!r} is not a plain name",
            "use letters, digits, '-', '_' or '.', e.g. name = \"trans-effect\"",
        )
    for key in ("title", "source"):
        if not isinstance(data[key], str) or not data[key].strip():
            raise rule_error(
                where, f"'{key}' must be a non-empty string", f'give {key} = "..." (the source: book or paper)'
            )
    return name


def _geometries(value: Any, where: str, known: Iterable[str]) -> tuple[str, ...]:
    geos = _string_list(value, where, "geometries", '["SP-4"] or ["*"]')
    if not geos:
        raise rule_error(where, "'geometries' is empty", 'list the polyhedral symbols, e.g. ["OC-6"], or ["*"] for all')
    symbols = sorted(known)
    for g in geos:
        if g != "*" and g not in symbols:
            near = closest_names(g, symbols)
            raise rule_error(
                where,
                f"geometries: unknown polyhedral symbol '{g}'",
                f"did you mean {' or '.join(near)}?" if near else f"known: {', '.join(symbols)}",
            )
    return geos


def _labilises_and_ties(data: Mapping[str, Any], where: str) -> tuple[str, str]:
    lab = data["labilises"]
    if lab not in LABILISES:
        raise rule_error(
            where,
            f"labilises = {lab!r} is not one of {', '.join(LABILISES)}",
            "use 'trans' (trans effect), 'cis' (cis-labilisation) or 'none' (statistical)",
        )
    ties = data["ties"]
    if ties not in TIES:
        raise rule_error(where, f"ties = {ties!r} is not one of {', '.join(TIES)}", "use 'statistical' or 'undecided'")
    return lab, ties


def _series(raw: Any, where: str) -> tuple[tuple[str, ...], ...]:
    if not isinstance(raw, list):
        raise rule_error(
            where, "'series' must be a list", 'write series = ["CN", ["Cl", "Br"], "NH3"] (strongest first)'
        )
    series: list[tuple[str, ...]] = []
    seen: set[str] = set()
    for k, entry in enumerate(raw):
        names = (entry,) if isinstance(entry, str) else entry
        if (
            not isinstance(names, (list, tuple))
            or not names
            or not all(isinstance(x, str) and x.strip() for x in names)
        ):
            raise rule_error(where, f"series[{k}] is {entry!r}", "give a ligand name or a list of names of equal rank")
        rank = tuple(x.strip() for x in names)
        for x in rank:
            if x in seen:
                raise rule_error(where, f"series: ligand '{x}' is listed twice", "keep each ligand at one rank")
            seen.add(x)
        series.append(rank)
    return tuple(series)


def _one_spelling_each(rules: SubstitutionRules, path: Path) -> None:
    """Refuse a series that lists one catalogued ligand twice under two spellings (Cl and chlorido)."""
    spell = dict(rules.aliases)
    first: dict[str, tuple[str, int]] = {}
    for k, rank in enumerate(rules.series):
        for x in rank:
            ligand = spell.get(x, x)
            if ligand in first and first[ligand][0] != x:
                y, j = first[ligand]
                raise rule_error(
                    path,
                    f"series: '{y}' (series[{j}]) and '{x}' (series[{k}]) are the same ligand, {ligand}",
                    "list each ligand once, under one spelling",
                )
            first.setdefault(ligand, (x, k))


def _check_series_fits(labilises: str, series: tuple[tuple[str, ...], ...], where: str) -> None:
    if labilises == "none" and series:
        raise rule_error(
            where,
            "a statistical rule set (labilises = 'none') has no series",
            "remove 'series' or set labilises = 'trans' or 'cis'",
        )
    if labilises != "none" and not series:
        raise rule_error(
            where, f"labilises = '{labilises}' needs a series of ligands", 'add series = ["strongest", ..., "weakest"]'
        )


def _priority_and_note(data: Mapping[str, Any], where: str) -> tuple[int, str]:
    prio = data.get("priority", 0)
    if not isinstance(prio, int) or isinstance(prio, bool):
        raise rule_error(
            where,
            f"priority {prio!r} is not an integer",
            "write e.g. priority = 20 (higher wins when several rule sets apply)",
        )
    note = data.get("note", "")
    if not isinstance(note, str):
        raise rule_error(where, "'note' must be a string", "quote it")
    return prio, note


def _parse_rule_file(path: Path, data: Mapping[str, Any], geometries: Iterable[str]) -> SubstitutionRules:
    """One validated rule set from the parsed TOML of ``path`` (checks in file-key order)."""
    where = str(path)
    check_keys(
        data,
        where,
        required=("name", "title", "source", "geometries", "labilises", "ties"),
        optional=("series", "leaving", "priority", "note"),
    )
    name = _check_name(data, where)
    geos = _geometries(data["geometries"], where, geometries)
    lab, ties = _labilises_and_ties(data, where)
    series = _series(data.get("series", []), where)
    _check_series_fits(lab, series, where)
    leaving = _string_list(data.get("leaving", []), where, "leaving", '["CO"]')
    prio, note = _priority_and_note(data, where)
    return SubstitutionRules(
        name=name,
        title=data["title"].strip(),
        source=data["source"].strip(),
        geometries=geos,
        labilises=lab,
        series=series,
        ties=ties,
        leaving=leaving,
        priority=prio,
        note=note,
        path=str(path),
    )


# ---------------------------------------------------------------- every file in force


@cached(maxsize=16)
def load_substitution_rules(ruleset: RuleSet) -> Mapping[str, SubstitutionRules]:
    """Every substitution rule set in force, by name.

    Built-in files come first, then each ``--rules`` folder in order; a later
    file with the same ``name`` replaces an earlier one, but two files of one
    folder may not share a name.  Series entries match catalogued ligands under
    every spelling of the ligand catalogue (a broken catalogue raises its own
    RuleError here).

    Parameters
    ----------
    ruleset : RuleSet
        The rule folders in force (the cache key).

    Returns
    -------
    Mapping[str, SubstitutionRules]
        Read-only mapping from rule-set name to rule set.

    Raises
    ------
    RuleError
        A file is malformed (the message names file, key and fix), two files
        of one folder share a name, or no rule set is found at all.
    """
    out: dict[str, SubstitutionRules] = {}
    origin: dict[str, Path] = {}
    geos = tuple(ruleset.geometries)
    aliases = tuple(sorted(all_spellings(ruleset).items()))
    for path in ruleset.files("substitution/*.toml"):
        r = replace(_parse_rule_file(path, read_toml(path), geos), aliases=aliases)
        _one_spelling_each(r, path)
        if r.name in origin and origin[r.name].parent == path.parent:
            raise rule_error(
                path, f"rule set name '{r.name}' is also used by {origin[r.name]}", "give each file its own name"
            )
        out[r.name] = r
        origin[r.name] = path
    if not out:
        raise rule_error(
            ", ".join(str(f / "substitution") for f in ruleset.folders),
            "no substitution rule sets found (rules/substitution/*.toml)",
            "reinstall the package or add one with --rules DIR",
        )
    return MappingProxyType(out)


def _by_priority(available: Mapping[str, SubstitutionRules]) -> list[SubstitutionRules]:
    return sorted(available.values(), key=lambda r: (-r.priority, r.name))


def _named(
    available: Mapping[str, SubstitutionRules], name: str, geometry: str, ligands: list[str], leaving: list[str]
) -> SubstitutionRules:
    if name not in available:
        near = closest_names(name, available)
        raise InputError(
            f"no substitution rule set '{name}'",
            f"did you mean {' or '.join(near)}?" if near else f"known: {', '.join(sorted(available))}",
        )
    r = available[name]
    ok, why = r.applies(geometry, ligands, leaving)
    if not ok:
        raise InputError(
            f"rule set '{name}' cannot decide this case ({why})",
            "add the missing entries in a rule file of your own (--rules DIR, substitution/*.toml)"
            " or choose another --rule-set",
        )
    return r


def choose_rule_set(
    available: Mapping[str, SubstitutionRules],
    geometry: str,
    ligands: Iterable[str],
    leaving: Iterable[str],
    name: str | None = None,
) -> tuple[SubstitutionRules, str]:
    """The rule set to use and why.

    Parameters
    ----------
    available : Mapping[str, SubstitutionRules]
        The rule sets in force (:func:`load_substitution_rules`).
    geometry : str
        Polyhedral symbol of the centre.
    ligands : iterable of str
        Every ligand of start and target.
    leaving : iterable of str
        The ligands that may leave.
    name : str, optional
        A rule set asked for by name (``--rule-set``).

    Returns
    -------
    (SubstitutionRules, str)
        The one named, else the applicable one of highest priority (ties by
        name), and the reason in words, naming the selective sets passed over.

    Raises
    ------
    InputError
        The named set does not exist or cannot decide this case, or no set applies.
    """
    ligs = sorted(set(ligands))
    leav = sorted(set(leaving))
    if name:
        return _named(available, name, geometry, ligs, leav), f"{name} as requested"
    passed: list[str] = []
    for r in _by_priority(available):
        ok, why = r.applies(geometry, ligs, leav)
        if ok:
            if r.statistical:
                reason = f"{r.name}: the statistical default"
            else:
                reason = f"{r.name}: applies to {geometry} and ranks every ligand here"
            if passed:
                reason += " (" + "; ".join(passed) + ")"
            return r, reason
        if not r.statistical:
            passed.append(why)
    raise InputError(f"no substitution rule set applies to {geometry}", "add one under substitution/ with --rules DIR")


def choose_rule_set_for_step(
    available: Mapping[str, SubstitutionRules],
    geometry: str,
    ligands: Iterable[str],
    present: Iterable[str],
    name: str | None = None,
) -> tuple[SubstitutionRules, str]:
    """The rule set for one step when the caller has not said which ligand leaves.

    A set that names its leaving ligands applies when one of them is present;
    a set without a ``leaving`` list applies when only one ligand could leave,
    or when it is statistical.  Otherwise the choice is
    :func:`choose_rule_set` over every ligand present.

    Parameters
    ----------
    available : Mapping[str, SubstitutionRules]
        The rule sets in force.
    geometry : str
        Polyhedral symbol of the centre.
    ligands : iterable of str
        Every ligand of the start plus the entering one.
    present : iterable of str
        The monodentate ligands of the start other than the entering one.
    name : str, optional
        A rule set asked for by name.

    Returns
    -------
    (SubstitutionRules, str)
        The rule set and the reason in words.

    Raises
    ------
    InputError
        As :func:`choose_rule_set`.
    """
    ligs = list(ligands)
    here = list(present)
    if name:
        return choose_rule_set(available, geometry, ligs, [], name)
    for r in _by_priority(available):
        leav = [n for n in here if n in r.leaving] if r.leaving else here
        if not leav:
            continue
        ok, _ = r.applies(geometry, ligs, leav)
        if ok and (r.leaving or len(here) == 1 or r.statistical):
            return choose_rule_set(available, geometry, ligs, leav, None)
    return choose_rule_set(available, geometry, ligs, here, None)
