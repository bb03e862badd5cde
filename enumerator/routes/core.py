"""Substitution networks, product prediction and route planning.

A substitution step replaces one monodentate ligand by another and the
entering ligand takes the vacated site.  Starting from one isomer, the
product of replacing site ``s`` is found by writing the new decoration and
matching it, up to the rotations of the polyhedron, to one isomer of the
product composition (:func:`canonical_key`).  Counting the leaving sites
that give each product gives the statistical weights (sites related by the
starting isomer's symmetry always give the same product).

Which site is replaced is decided by a *substitution rule set*, data under
``rules/substitution/*.toml``: the trans effect on the square plane,
cis-labilisation in octahedral carbonyls and the statistical default ship
with the package; users add their own with ``--rules DIR``.

>>> from enumerator.parse.abstract import parse_abstract
>>> from enumerator.rules.ruleset import load_rules
>>> rs = load_rules()
>>> oc = rs.geometry("OC-6")
>>> start = parse_abstract("Ma5b")
>>> iso = enumerate_isomers_cached(start, oc).isomers[0]
>>> p = predict(iso, start, "b", load_substitution_rules(rs)["statistical"], leaving=("a",))
>>> [(prod.prefix, str(share)) for prod, share in p.by_geometric_isomer()]
[('cis', '4/5'), ('trans', '1/5')]

The network holds every isomer of every composition between a start and a
target, with one weighted edge per replacement (:func:`build_network`); the
planner (:func:`plan_routes`) follows the predicted major product through
every order of addition and keeps the orders that end on the target.
"""

from __future__ import annotations

import itertools
import re
from collections import Counter
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field, replace
from fractions import Fraction
from functools import cached_property, lru_cache
from pathlib import Path
from typing import Any

from enumerator.errors import CapacityError, InputError, IsosieveError, RuleError
from enumerator.isomers.enumeration import Isomer, IsomerSet, canonical_placement, enumerate_isomers, group_tables
from enumerator.model.composition import Composition, LigandKind
from enumerator.model.geometry import Geometry
from enumerator.rules.ruleset import RuleSet, check_keys, closest_names, load_rules, read_toml

__all__ = [
    "SubstitutionRules",
    "load_substitution_rules",
    "choose_rule_set",
    "canonical_key",
    "everyday_prefix",
    "enumerate_isomers_cached",
    "Species",
    "Product",
    "SiteChoice",
    "Prediction",
    "predict",
    "predict_step",
    "safety_lines",
    "Space",
    "Network",
    "build_network",
    "network_graph",
    "network_json",
    "network_graphml",
    "network_picture",
    "Step",
    "Route",
    "RoutePlan",
    "plan_routes",
    "parse_species",
    "resolve_species",
    "route_json",
    "prediction_json",
    "MAX_ROUTES",
]

#: The planner stops with a CapacityError beyond this many orders of addition.
MAX_ROUTES = 20000

_LABILISES = ("trans", "cis", "none")
_TIES = ("statistical", "undecided")
_NAME = re.compile(r"^[A-Za-z0-9][A-Za-z0-9_.+-]*$")


# --------------------------------------------------------------------------
# rule sets as data


@dataclass(frozen=True)
class SubstitutionRules:
    """One substitution rule set (one TOML file under ``substitution/``).

    ``labilises`` says which ligands decide a site's lability: 'trans' (the
    ligand trans to the site, the trans effect), 'cis' (the ligands cis to
    it, cis-labilisation) or 'none' (every site alike: statistical).
    ``series`` lists ligand names strongest first, one tuple per rank.
    ``ties`` says what happens when the best sites give different products:
    'statistical' (the product given by most of the tied sites is the major
    one; equal counts leave the step undecided) or 'undecided'.
    ``leaving`` (if not empty) limits the rule to steps in which one of
    these ligands leaves.  ``geometries`` holds polyhedral symbols or '*'.
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
    #: other spellings of catalogued ligands -> catalogue name (from the ligand catalogue)
    aliases: tuple[tuple[str, str], ...] = field(default=(), compare=False, repr=False)

    @property
    def statistical(self) -> bool:
        return self.labilises == "none"

    def rank(self, ligand: str) -> int | None:
        """0 for the strongest rank of the series; None when not listed.
        A catalogued ligand matches under any of its spellings."""
        table = self._ranks
        if ligand in table:
            return table[ligand]
        return table.get(dict(self.aliases).get(ligand, ligand))

    @cached_property
    def _ranks(self) -> dict[str, int]:
        spell = dict(self.aliases)
        out: dict[str, int] = {}
        for k, rank in enumerate(self.series):
            for x in rank:
                out.setdefault(x, k)
                out.setdefault(spell.get(x, x), k)
        return out

    def covers_geometry(self, symbol: str) -> bool:
        return "*" in self.geometries or symbol in self.geometries

    def unranked(self, ligands: Iterable[str]) -> list[str]:
        """The ligands this rule needs ranked but does not list."""
        if self.statistical:
            return []
        return sorted({n for n in ligands if self.rank(n) is None})

    def applies(self, geometry: str, ligands: Iterable[str], leaving: Iterable[str]) -> tuple[bool, str]:
        """Whether the rule set can decide steps among these ligands, and why not."""
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

    def describe(self) -> dict[str, Any]:
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


def _rule_error(where: str, what: str, fix: str) -> RuleError:
    return RuleError(f"{where}: {what}", fix)


def _string_list(value: Any, where: str, key: str, example: str) -> tuple[str, ...]:
    if not isinstance(value, list) or not all(isinstance(x, str) and x.strip() for x in value):
        raise _rule_error(where, f"'{key}' must be a list of names", f"write e.g. {key} = {example}")
    return tuple(x.strip() for x in value)


def _parse_rule_file(path: Path, data: Mapping[str, Any], geometries: Iterable[str]) -> SubstitutionRules:
    where = str(path)
    check_keys(
        data,
        where,
        required=("name", "title", "source", "geometries", "labilises", "ties"),
        optional=("series", "leaving", "priority", "note"),
    )
    name = data["name"]
    if not isinstance(name, str) or not _NAME.match(name):
        raise _rule_error(
            where,
            f"name {name!r} is not a plain name",
            "use letters, digits, '-', '_' or '.', e.g. name = \"trans-effect\"",
        )
    for key in ("title", "source"):
        if not isinstance(data[key], str) or not data[key].strip():
            raise _rule_error(
                where, f"'{key}' must be a non-empty string", f'give {key} = "..." (the source: book or paper)'
            )
    geos = _string_list(data["geometries"], where, "geometries", '["SP-4"] or ["*"]')
    if not geos:
        raise _rule_error(
            where, "'geometries' is empty", 'list the polyhedral symbols, e.g. ["OC-6"], or ["*"] for all'
        )
    known = sorted(geometries)
    for g in geos:
        if g != "*" and g not in known:
            near = closest_names(g, known)
            raise _rule_error(
                where,
                f"geometries: unknown polyhedral symbol '{g}'",
                f"did you mean {' or '.join(near)}?" if near else f"known: {', '.join(known)}",
            )
    lab = data["labilises"]
    if lab not in _LABILISES:
        raise _rule_error(
            where,
            f"labilises = {lab!r} is not one of {', '.join(_LABILISES)}",
            "use 'trans' (trans effect), 'cis' (cis-labilisation) or 'none' (statistical)",
        )
    ties = data["ties"]
    if ties not in _TIES:
        raise _rule_error(
            where, f"ties = {ties!r} is not one of {', '.join(_TIES)}", "use 'statistical' or 'undecided'"
        )
    raw = data.get("series", [])
    if not isinstance(raw, list):
        raise _rule_error(
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
            raise _rule_error(where, f"series[{k}] is {entry!r}", "give a ligand name or a list of names of equal rank")
        rank = tuple(x.strip() for x in names)
        for x in rank:
            if x in seen:
                raise _rule_error(where, f"series: ligand '{x}' is listed twice", "keep each ligand at one rank")
            seen.add(x)
        series.append(rank)
    if lab == "none" and series:
        raise _rule_error(
            where,
            "a statistical rule set (labilises = 'none') has no series",
            "remove 'series' or set labilises = 'trans' or 'cis'",
        )
    if lab != "none" and not series:
        raise _rule_error(
            where, f"labilises = '{lab}' needs a series of ligands", 'add series = ["strongest", ..., "weakest"]'
        )
    leaving = _string_list(data.get("leaving", []), where, "leaving", '["CO"]')
    prio = data.get("priority", 0)
    if not isinstance(prio, int) or isinstance(prio, bool):
        raise _rule_error(
            where,
            f"priority {prio!r} is not an integer",
            "write e.g. priority = 20 (higher wins when several rule sets apply)",
        )
    note = data.get("note", "")
    if not isinstance(note, str):
        raise _rule_error(where, "'note' must be a string", "quote it")
    return SubstitutionRules(
        name=name,
        title=data["title"].strip(),
        source=data["source"].strip(),
        geometries=geos,
        labilises=lab,
        series=tuple(series),
        ties=ties,
        leaving=leaving,
        priority=prio,
        note=note,
        path=str(path),
    )


def _catalogue_spellings(ruleset: RuleSet) -> tuple[tuple[str, str], ...]:
    """Spelling -> catalogue name for every catalogued ligand (empty without a catalogue)."""
    try:
        from enumerator.rules.ligands import all_spellings

        return tuple(sorted(all_spellings(ruleset).items()))
    except (ImportError, IsosieveError):  # no catalogue, or a broken one: names must then match exactly
        return ()


@lru_cache(maxsize=16)
def load_substitution_rules(ruleset: RuleSet) -> dict[str, SubstitutionRules]:
    """Every substitution rule set in force, by name (built-in first; a user
    file with the same name replaces the built-in one).  Validated in full;
    a problem raises a RuleError naming file, key and fix."""
    out: dict[str, SubstitutionRules] = {}
    origin: dict[str, Path] = {}
    geos = tuple(ruleset.geometries)
    aliases = _catalogue_spellings(ruleset)
    for path in ruleset.files("substitution/*.toml"):
        r = _parse_rule_file(path, read_toml(path), geos)
        r = replace(r, aliases=aliases)
        if r.name in origin and origin[r.name].parent == path.parent:
            raise RuleError(
                f"{path}: rule set name '{r.name}' is also used by {origin[r.name]}", "give each file its own name"
            )
        out[r.name] = r
        origin[r.name] = path
    if not out:
        raise RuleError(
            "no substitution rule sets found (rules/substitution/*.toml)",
            "reinstall the package or add one with --rules DIR",
        )
    return out


def choose_rule_set(
    available: Mapping[str, SubstitutionRules],
    geometry: str,
    ligands: Iterable[str],
    leaving: Iterable[str],
    name: str | None = None,
) -> tuple[SubstitutionRules, str]:
    """The rule set to use and why: the one named, else the applicable one
    of highest priority (ties by name)."""
    ligs = sorted(set(ligands))
    leav = sorted(set(leaving))
    if name:
        if name not in available:
            near = closest_names(name, available)
            raise InputError(
                f"no substitution rule set '{name}'",
                f"did you mean {' or '.join(near)}?" if near else f"known: {', '.join(sorted(available))}",
            )
        r = available[name]
        ok, why = r.applies(geometry, ligs, leav)
        if not ok:
            raise InputError(
                f"rule set '{name}' cannot decide this case ({why})",
                "add the missing entries in a rule file of your own (--rules DIR, substitution/*.toml) or choose another --rule-set",
            )
        return r, f"{name} as requested"
    passed: list[str] = []
    for r in sorted(available.values(), key=lambda r: (-r.priority, r.name)):
        ok, why = r.applies(geometry, ligs, leav)
        if ok:
            reason = (
                f"{r.name}: applies to {geometry} and ranks every ligand here"
                if not r.statistical
                else f"{r.name}: the statistical default"
            )
            if passed:
                reason += " (" + "; ".join(passed) + ")"
            return r, reason
        if not r.statistical:
            passed.append(why)
    raise InputError(f"no substitution rule set applies to {geometry}", "add one under substitution/ with --rules DIR")


# --------------------------------------------------------------------------
# decorations and canonical keys

Placement = tuple[int, ...]
Decoration = tuple[tuple[str, tuple[Placement, ...]], ...]


_canon = canonical_placement


def _decoration(iso: Isomer) -> Decoration:
    by: dict[str, list[Placement]] = {}
    for kind, piece in iso.placements:
        by.setdefault(kind.name, []).extend(_canon(kind, t) for t in piece)
    return tuple((n, tuple(sorted(by[n]))) for n in sorted(by))


def _image(deco: Decoration, kinds: Mapping[str, LigandKind], perm) -> Decoration:
    return tuple(
        (n, tuple(sorted(_canon(kinds[n], tuple(int(perm[x]) for x in t)) for t in piece))) for n, piece in deco
    )


def canonical_key(
    deco: Decoration | Isomer, geometry: Geometry, kinds: Mapping[str, LigandKind] | None = None, *, proper: bool = True
) -> Decoration:
    """The smallest image of a decoration under the rotations of the
    geometry (``proper=True``: tells enantiomers apart) or under the full
    group (``proper=False``: one key per geometric isomer).

    A decoration is ``((ligand name, (placement, ...)), ...)`` sorted by
    name, each placement a tuple of site indices in chain order.
    """
    if isinstance(deco, Isomer):
        kinds = {k.name: k for k, _ in deco.placements}
        deco = _decoration(deco)
    assert kinds is not None
    tab = group_tables(geometry)
    best = None
    for k, perm in enumerate(tab.perms):
        if proper and not tab.proper[k]:
            continue
        img = _image(deco, kinds, perm)
        if best is None or img < best:
            best = img
    return best  # type: ignore[return-value]


def _replace_site(deco: Decoration, site: int, leaving: str, entering: str) -> Decoration:
    d = {n: list(p) for n, p in deco}
    d[leaving].remove((site,))
    if not d[leaving]:
        del d[leaving]
    d.setdefault(entering, []).append((site,))
    return tuple((n, tuple(sorted(d[n]))) for n in sorted(d))


@lru_cache(maxsize=256)
def enumerate_isomers_cached(comp: Composition, geometry: Geometry) -> IsomerSet:
    """:func:`enumerate_isomers`, cached by value."""
    return enumerate_isomers(comp, geometry)


@lru_cache(maxsize=256)
def _index(comp: Composition, geometry: Geometry) -> dict[Decoration, str]:
    iset = enumerate_isomers_cached(comp, geometry)
    out: dict[Decoration, str] = {}
    for iso in iset.isomers:
        out[canonical_key(iso, geometry)] = iso.id
    return out


def everyday_prefix(iso: Isomer, comp: Composition) -> str | None:
    """cis/trans/fac/mer from site relations, when every monodentate ligand
    present twice (cis/trans) or three times on six sites (fac/mer) agrees,
    or, failing those, how the only two single ligands sit (Ma4bc); None
    otherwise.  (Full IUPAC descriptors come from enumerator.analyses.descriptors.)"""
    geo = iso.geometry
    labels: set[str] = set()
    singles: list[int] = []
    for kind, n in comp.parts:
        if kind.denticity != 1:
            continue
        sites = iso.sites_of(kind.name)
        if n == 1:
            singles.extend(sites)
        elif n == 2 and geo.coordination_number >= 4:
            labels.add(geo.relation(sites[0], sites[1]))
        elif n == 3 and geo.coordination_number == 6:
            trans = any(geo.relation(a, b) == "trans" for a, b in itertools.combinations(sites, 2))
            labels.add("mer" if trans else "fac")
    if not labels and len(singles) == 2 and geo.coordination_number >= 4:
        # Ma4bc, Ma2bc: the everyday prefix tells how the two odd ligands sit
        labels.add(geo.relation(singles[0], singles[1]))
    if len(labels) == 1:
        return labels.pop()
    return None


def _descriptor_text(iso: Isomer, comp: Composition) -> tuple[str | None, str | None]:
    """(prefix, full IUPAC descriptor) of an isomer; the descriptor needs enumerator.analyses.descriptors."""
    try:
        from enumerator.analyses.descriptors import describe_isomer
    except ImportError:
        return everyday_prefix(iso, comp), None
    try:
        d = describe_isomer(iso, comp)
    except Exception:  # nomenclature cannot name this one: fall back to site relations
        return everyday_prefix(iso, comp), None
    return (d.prefix or everyday_prefix(iso, comp)), d.text


def safety_lines(kinds: Iterable[LigandKind]) -> tuple[str, ...]:
    """The usual cautions (enumerator.analyses.safety) for every ligand met on the way."""
    try:
        from enumerator.analyses.safety import cautions
    except ImportError:  # pragma: no cover - the safety module ships with the package
        return ()
    uniq = {k.name: k for k in kinds}
    return cautions(Composition(formula="", parts=tuple((uniq[n], 1) for n in sorted(uniq))))


# --------------------------------------------------------------------------
# compositions between a start and a target


def _charge_text(q: int) -> str:
    if q == 0:
        return ""
    sign = "+" if q > 0 else "-"
    return (str(abs(q)) if abs(q) != 1 else "") + sign


def _ligand_charge(kind: LigandKind) -> int:
    v = dict(kind.meta).get("charge", 0)
    return int(v) if isinstance(v, (int, float)) else 0


def _abstract_formula(parts: Sequence[tuple[LigandKind, int]], charge: int) -> str:
    body = "M" + "".join(
        (k.name if k.denticity == 1 and not k.ring else f"({k.name})") + (str(n) if n > 1 else "") for k, n in parts
    )
    return f"[{body}]{_charge_text(charge)}" if charge else body


def _condensed_formula(metal: str, parts: Sequence[tuple[LigandKind, int]], charge: int) -> str:
    out = []
    for k, n in sorted(parts, key=lambda p: p[0].name):
        simple = bool(re.fullmatch(r"[A-Z][a-z]?", k.name))
        tok = k.name if simple and n == 1 else (f"{k.name}{n}" if simple else f"({k.name})" + (str(n) if n > 1 else ""))
        out.append(tok)
    return f"[{metal}{''.join(out)}]{_charge_text(charge)}"


@dataclass(frozen=True)
class Species:
    """A composition with its isomers on the chosen geometry."""

    composition: Composition
    isomer_set: IsomerSet

    @property
    def formula(self) -> str:
        return self.composition.formula


class Space:
    """The compositions reachable from ``start`` by replacing ligands, with a
    formula and isomer set for each (built lazily and kept).

    Compositions are keyed by their ligand counts (name -> count).  A formula
    for an intermediate is written in the start's notation and parsed back
    so that its isomer numbering is the one ``isosieve isomers`` prints.
    """

    def __init__(
        self,
        start: Composition,
        geometry: Geometry,
        ruleset: RuleSet,
        extra: Iterable[Composition] = (),
        kinds: Iterable[LigandKind] = (),
    ):
        self.geometry = geometry
        self.ruleset = ruleset
        self.start = start
        self.abstract = _is_abstract(start)
        self.kinds: dict[str, LigandKind] = {}
        self.order: list[str] = []
        self._species: dict[tuple, Species] = {}
        for comp in (start, *extra):
            self._learn(comp.kinds)
        self._learn(kinds)
        for comp in (start, *extra):
            self._species[self.signature(comp)] = Species(comp, enumerate_isomers_cached(comp, geometry))

    def _learn(self, kinds: Iterable[LigandKind]) -> None:
        for k in kinds:
            if k.name in self.kinds:
                if self.kinds[k.name] != k:
                    raise InputError(
                        f"ligand '{k.name}' is read two different ways in start and target",
                        "write it the same way in both formulas",
                    )
                continue
            self.kinds[k.name] = k
            self.order.append(k.name)

    @staticmethod
    def signature(comp: Composition) -> tuple[tuple[str, int], ...]:
        c: Counter[str] = Counter()
        for k, n in comp.parts:
            c[k.name] += n
        return tuple(sorted(c.items()))

    def species(self, counts: Mapping[str, int]) -> Species:
        sig = tuple(sorted((n, c) for n, c in counts.items() if c > 0))
        if sig in self._species:
            return self._species[sig]
        parts = [(self.kinds[n], counts[n]) for n in self.order if counts.get(n, 0) > 0]
        before = dict(self.signature(self.start))
        charge = self.start.charge + sum(
            _ligand_charge(self.kinds[n]) * (counts.get(n, 0) - before.get(n, 0)) for n in self.order
        )
        if self.abstract:
            text = _abstract_formula(parts, charge)
        else:
            text = _condensed_formula(self.start.metal, parts, charge)
        comp = Composition(formula=text, parts=tuple(parts), metal=self.start.metal, charge=charge)
        try:
            from enumerator.parse.formula import parse_formula

            parsed = parse_formula(text, self.ruleset)
            if self.signature(parsed) == sig and all(self.kinds.get(k.name) == k for k in parsed.kinds):
                comp = parsed
        except InputError:
            pass
        sp = Species(comp, enumerate_isomers_cached(comp, self.geometry))
        self._species[sig] = sp
        return sp

    def counts(self, comp: Composition) -> dict[str, int]:
        return dict(self.signature(comp))


def _is_abstract(comp: Composition) -> bool:
    from enumerator.parse.abstract import looks_abstract

    return comp.metal == "M" and looks_abstract(comp.formula)


# --------------------------------------------------------------------------
# one step


@dataclass(frozen=True)
class Product:
    """One product isomer of a step."""

    formula: str
    isomer: str
    number: int
    point_group: str
    chiral: bool
    prefix: str | None
    descriptor: str | None

    def label(self) -> str:
        tag = f"{self.prefix}-" if self.prefix else ""
        return f"{tag}{self.formula} (isomer {self.number}, {self.point_group})"

    def json(self) -> dict[str, Any]:
        return {
            "formula": self.formula,
            "isomer": self.isomer,
            "geometric_isomer": self.number,
            "point_group": self.point_group,
            "chiral": self.chiral,
            "prefix": self.prefix,
            "descriptor": self.descriptor,
        }


def _product(sp: Species, iso_id: str) -> Product:
    iso = sp.isomer_set.get(iso_id)
    prefix, desc = _descriptor_text(iso, sp.composition)
    return Product(sp.formula, iso.id, iso.number, iso.point_group, iso.chiral, prefix, desc)


@dataclass(frozen=True)
class SiteChoice:
    """One replaceable site of the starting isomer: what leaves, which
    ligands decide its lability under the rule, and the product."""

    site: int
    leaving: str
    labilisers: tuple[str, ...]
    product: Product
    selected: bool


@dataclass(frozen=True)
class Prediction:
    """The outcome of adding ``entering`` to one isomer under one rule set.

    ``statistical`` gives each product's share over every replaceable site
    (exact fractions); ``selected`` the shares among the sites the rule
    picks (equal to ``statistical`` for the statistical rule set).  ``major``
    is the major product (its geometric isomer; None when the step is
    undecided) and ``decided_by`` one of 'single' (every site gives it),
    'rule', 'statistics' or 'undecided'; ``reason`` says why in words.
    """

    start: Product
    entering: str
    rules: SubstitutionRules
    sites: tuple[SiteChoice, ...]
    statistical: tuple[tuple[Product, Fraction], ...]
    selected: tuple[tuple[Product, Fraction], ...]
    major: Product | None
    decided_by: str
    reason: str
    rules_reason: str = ""
    safety: tuple[str, ...] = ()

    def by_geometric_isomer(self, which: str = "selected") -> list[tuple[Product, Fraction]]:
        """Shares summed over enantiomers, largest first (ties by formula and number)."""
        return _by_geometric(self.selected if which == "selected" else self.statistical)


def _by_geometric(shares: Iterable[tuple[Product, Fraction]]) -> list[tuple[Product, Fraction]]:
    acc: dict[tuple[str, int], list] = {}
    for prod, share in shares:
        key = (prod.formula, prod.number)
        if key in acc:
            acc[key][1] += share
        else:
            acc[key] = [prod, share]
    return sorted(((p, s) for p, s in acc.values()), key=lambda x: (-x[1], x[0].formula, x[0].number))


def _shares(choices: Sequence[SiteChoice]) -> tuple[tuple[Product, Fraction], ...]:
    c: Counter[tuple[str, str]] = Counter()
    prods: dict[tuple[str, str], Product] = {}
    for ch in choices:
        key = (ch.product.formula, ch.product.isomer)
        c[key] += 1
        prods[key] = ch.product
    total = sum(c.values())
    return tuple(
        sorted(
            ((prods[k], Fraction(v, total)) for k, v in c.items()),
            key=lambda x: (-x[1], x[0].formula, x[0].number, x[0].isomer),
        )
    )


def _sites_text(sites: Iterable[int]) -> str:
    s = sorted(x + 1 for x in sites)
    return ("site " if len(s) == 1 else "sites ") + ", ".join(map(str, s))


def _predict(
    space: Space, sp: Species, iso: Isomer, entering: str, leaving: Sequence[str], rules: SubstitutionRules
) -> Prediction:
    geo = space.geometry
    if entering not in space.kinds:
        raise InputError(f"unknown entering ligand '{entering}'", f"ligands here: {', '.join(space.order)}")
    ek = space.kinds[entering]
    if ek.denticity != 1 or ek.ring:
        raise InputError(
            f"entering ligand '{entering}' is not monodentate",
            "only one-for-one replacement of monodentate ligands is modelled",
        )
    counts = space.counts(sp.composition)
    deco = _decoration(iso)
    site_lig = {s.index: s.ligand for s in iso.sites}
    choices: list[SiteChoice] = []
    scores: dict[int, tuple[int, ...]] = {}
    for L in leaving:
        lk = space.kinds.get(L)
        if lk is None or counts.get(L, 0) == 0:
            continue
        if lk.denticity != 1 or lk.ring:
            raise InputError(
                f"leaving ligand '{L}' is not monodentate",
                "only one-for-one replacement of monodentate ligands is modelled",
            )
        new_counts = dict(counts)
        new_counts[L] -= 1
        new_counts[entering] = new_counts.get(entering, 0) + 1
        product_sp = space.species(new_counts)
        index = _index(product_sp.composition, geo)
        kinds = dict(space.kinds)
        for s in iso.sites_of(L):
            new = _replace_site(deco, s, L, entering)
            pid = index.get(canonical_key(new, geo, kinds))
            if pid is None:  # pragma: no cover - every decoration is one of the enumerated isomers
                raise RuntimeError(
                    f"product of replacing site {s + 1} not found among the isomers of {product_sp.formula}"
                )
            if rules.statistical:
                labs: tuple[str, ...] = ()
            else:
                labs = tuple(
                    sorted(
                        (site_lig[j] for j in site_lig if j != s and geo.relation(s, j) == rules.labilises),
                        key=lambda n: (rules.rank(n) if rules.rank(n) is not None else len(rules.series), n),
                    )
                )
                missing = rules.unranked(labs)
                if missing:
                    raise InputError(
                        f"rule set '{rules.name}' ({rules.path}) does not rank ligand '{missing[0]}'",
                        "add it to 'series' in a rule file of your own (--rules DIR, substitution/*.toml) or use --rule-set statistical",
                    )
            scores[len(choices)] = tuple(rules.rank(n) for n in labs)  # type: ignore[misc]
            choices.append(SiteChoice(s, L, labs, _product(product_sp, pid), False))
    start = _product(sp, iso.id)
    if not choices:
        raise InputError(
            f"{sp.formula} has none of {', '.join(leaving) or 'the leaving ligands'} to replace",
            "check the leaving ligand",
        )
    width = max(len(v) for v in scores.values())
    weakest = len(rules.series)
    padded = {k: v + (weakest,) * (width - len(v)) for k, v in scores.items()}
    best = min(padded.values())
    chosen = [k for k, v in padded.items() if v == best]
    final = tuple(SiteChoice(c.site, c.leaving, c.labilisers, c.product, k in chosen) for k, c in enumerate(choices))
    statistical = _shares(final)
    picked = [c for c in final if c.selected]
    selected = _shares(picked)
    geo_products = {(c.product.formula, c.product.number) for c in picked}
    all_products = {(c.product.formula, c.product.number) for c in final}
    by_geo = _by_geometric(selected)
    leaving_names = sorted({c.leaving for c in picked})
    if len(all_products) == 1:
        major, how = picked[0].product, "single"
        reason = f"every replaceable {'/'.join(sorted({c.leaving for c in final}))} site gives the same product"
    elif len(geo_products) == 1 and not rules.statistical:
        major, how = picked[0].product, "rule"
        reason = _rule_reason(rules, picked, final, padded, chosen)
    else:
        top = by_geo[0][1]
        leaders = [p for p, s in by_geo if s == top]
        tied_sites = _sites_text(c.site for c in picked)
        if rules.ties == "statistical" and len(leaders) == 1:
            major, how = by_geo[0][0], "statistics"
            n_major = sum(1 for c in picked if (c.product.formula, c.product.number) == (major.formula, major.number))
            if rules.statistical:
                reason = f"statistical: {n_major} of {len(picked)} replaceable {'/'.join(leaving_names)} sites give this product"
            else:
                reason = (
                    f"{rules.name}: {tied_sites} tie under the rule and give different products; "
                    f"resolved statistically ({n_major} of {len(picked)} tied sites give this product)"
                )
        else:
            major, how = None, "undecided"
            if rules.statistical or rules.ties == "statistical":
                reason = f"{rules.name}: {len(leaders)} products have the same largest share ({top}); no single major product"
            else:
                reason = f"{rules.name}: {tied_sites} tie under the rule and give different products; the rule set leaves ties undecided"
    return Prediction(start, entering, rules, final, statistical, selected, major, how, reason)


def _rule_reason(rules: SubstitutionRules, picked, final, padded, chosen) -> str:
    """Words for a decision of the rule: the picked site and the first rank at which it beats the runner-up."""
    first = picked[0]
    article = "the" if len(picked) == 1 else "any"
    where = f"{article} {first.leaving} {rules.labilises} to {_list_names(first.labilisers)}"
    others = [k for k in padded if k not in chosen]
    runner = min(padded[k] for k in others)
    best = padded[chosen[0]]
    pos = next(i for i, (a, b) in enumerate(zip(best, runner)) if a != b)
    strong = _name_at(first.labilisers, best[pos], rules) or rules.series[best[pos]][0]
    k_runner = next(k for k in others if padded[k] == runner)
    weak = _name_at(final[k_runner].labilisers, runner[pos], rules) or "no ligand"
    if rules.labilises == "trans":
        cmp = f"{strong} > {weak} in the trans-effect series"
    else:
        cmp = f"{strong} > {weak} in the {rules.labilises}-labilising series"
    return f"{rules.name}: replaces {where} ({_sites_text(c.site for c in picked)}): {cmp}"


def _name_at(labilisers: tuple[str, ...], rank: int, rules: SubstitutionRules) -> str | None:
    for n in labilisers:
        if rules.rank(n) == rank:
            return n
    return None


def _list_names(names: tuple[str, ...]) -> str:
    if not names:
        return "no ligand"
    c = Counter(names)
    return " and ".join(f"{v} {n}" if v > 1 else n for n, v in c.items())


def predict(
    isomer: Isomer,
    composition: Composition,
    entering: str | LigandKind,
    rules: SubstitutionRules,
    *,
    leaving: Sequence[str] | None = None,
    ruleset: RuleSet | None = None,
) -> Prediction:
    """The products of replacing one ligand of ``isomer`` by ``entering``.

    ``entering`` is a ligand kind (or the name of one already present);
    ``leaving`` names the ligands that may leave (default: the rule set's
    ``leaving`` list, else every monodentate ligand other than the entering
    one).  Under the statistical rule set the shares are exact fractions of
    the replaceable sites; under a selective one the major product is the
    one the rule picks, with the reason.
    """
    rs = ruleset or load_rules()
    ek = entering if isinstance(entering, LigandKind) else _entering_kind(entering, composition, rs)
    name = ek.name
    space = Space(composition, isomer.geometry, rs, kinds=(ek,))
    sp = space.species(space.counts(composition))
    if leaving is None:
        present = [k.name for k in composition.kinds if k.name != name and k.denticity == 1 and not k.ring]
        leaving = [n for n in present if n in rules.leaving] if rules.leaving else present
    return _predict(space, sp, isomer, name, tuple(leaving), rules)


def _entering_kind(name: str, composition: Composition, ruleset: RuleSet) -> LigandKind:
    """The ligand kind of an entering ligand: one already present, a letter
    of the abstract notation, or a catalogued ligand."""
    for k in composition.kinds:
        if k.name == name:
            return k
    if _is_abstract(composition):
        if re.fullmatch(r"[a-z]", name):
            return LigandKind(name=name, donors=(name,))
        raise InputError(
            f"entering ligand '{name}' is not a letter of the abstract notation",
            "write one lowercase letter, e.g. --add b",
        )
    from enumerator.rules.ligands import find_ligand

    return find_ligand(ruleset, name).kind()


def predict_step(
    start_text: str,
    entering: str,
    *,
    leaving: Sequence[str] | None = None,
    geometry: str | None = None,
    rule_set: str | None = None,
    rules: Sequence[str] = (),
) -> Prediction:
    """:func:`predict` from text: START (a formula, with a descriptor when it
    has several isomers) plus one entering ligand, under the named rule set
    or the applicable one of highest priority."""
    from enumerator.analyses.centre import choose_geometry
    from enumerator.parse.formula import parse_formula

    ruleset = load_rules(rules)
    formula, desc = parse_species(start_text)
    comp = parse_formula(formula, ruleset)
    symbol, _ = choose_geometry(comp, ruleset, geometry)
    geo = ruleset.geometry(symbol)
    isos = resolve_species(enumerate_isomers_cached(comp, geo), comp, desc, role="start")
    ek = _entering_kind(entering, comp, ruleset)
    available = load_substitution_rules(ruleset)
    if leaving is None:
        present = [k.name for k in comp.kinds if k.name != ek.name and k.denticity == 1 and not k.ring]
        if len(present) > 1 and rule_set is None:
            selective = [
                r
                for r in available.values()
                if r.leaving and r.covers_geometry(geo.symbol) and set(r.leaving) & set(present)
            ]
            if not selective:
                raise InputError(
                    f"{comp.formula} has more than one ligand that could leave ({', '.join(present)})",
                    "say which with --leaving LIGAND",
                )
        leav_guess = present
    else:
        leav_guess = list(leaving)
    ligands = [k.name for k in comp.kinds] + [ek.name]
    chosen, reason = (
        choose_rule_set(available, geo.symbol, ligands, [n for n in leav_guess], rule_set)
        if leaving is not None
        else _choose_for_step(available, geo.symbol, ligands, leav_guess, rule_set)
    )
    p = predict(isos[0], comp, ek, chosen, leaving=leaving, ruleset=ruleset)
    return replace(p, rules_reason=reason, safety=safety_lines((*comp.kinds, ek)))


def _choose_for_step(available, geometry: str, ligands, present, name):
    """Rule choice when the leaving ligand is not given: a rule set that
    names its leaving ligands applies if one of them is present."""
    if name:
        return choose_rule_set(available, geometry, ligands, [], name)
    for r in sorted(available.values(), key=lambda r: (-r.priority, r.name)):
        leav = [n for n in present if n in r.leaving] if r.leaving else present
        if not leav:
            continue
        ok, _ = r.applies(geometry, ligands, leav)
        if ok and (r.leaving or len(present) == 1 or r.statistical):
            return choose_rule_set(available, geometry, ligands, leav, None)
    return choose_rule_set(available, geometry, ligands, present, None)


def prediction_json(p: Prediction) -> dict[str, Any]:
    return {
        "start": p.start.json(),
        "entering": p.entering,
        "rule_set": dict(p.rules.describe(), reason=p.rules_reason),
        "safety": list(p.safety),
        "decided_by": p.decided_by,
        "reason": p.reason,
        "major": p.major.json() if p.major else None,
        "shares": [dict(prod.json(), share=str(s)) for prod, s in p.selected],
        "statistical_shares": [dict(prod.json(), share=str(s)) for prod, s in p.statistical],
        "sites": [
            {
                "site": c.site + 1,
                "leaving": c.leaving,
                "labilisers": list(c.labilisers),
                "product": c.product.isomer,
                "product_formula": c.product.formula,
                "selected": c.selected,
            }
            for c in p.sites
        ],
    }


# --------------------------------------------------------------------------
# formulas with descriptors


_PREFIX = re.compile(r"^\s*(cis|trans|fac|mer)\s*-\s*(.+)$", re.IGNORECASE)
_PAREN = re.compile(r"^\s*\(([A-Za-z]{1,5}-\d{1,2}(?:-[0-9A-Za-z]+)*|\d+(?:-[A-Za-z]+)?)\)\s*-?\s*(.+)$")


def parse_species(text: str) -> tuple[str, str | None]:
    """Split 'cis-[PtCl2(NH3)2]', '(OC-6-22)-Ma4b2' or '(2)-Ma2b2' into the
    formula and the descriptor (None when there is none).

    >>> parse_species("cis-[PtCl2(NH3)2]")
    ('[PtCl2(NH3)2]', 'cis')
    >>> parse_species("(OC-6-22)-Ma4b2")
    ('Ma4b2', 'OC-6-22')
    """
    m = _PREFIX.match(text)
    if m:
        return m.group(2).strip(), m.group(1).lower()
    m = _PAREN.match(text)
    if m:
        return m.group(2).strip(), m.group(1)
    return text.strip(), None


def resolve_species(iset: IsomerSet, comp: Composition, descriptor: str | None, *, role: str) -> list[Isomer]:
    """The isomers (all of one geometric isomer) a descriptor names."""
    if descriptor is None:
        if iset.geometric_isomers == 1:
            return list(iset.isomers)
        ids = ", ".join(i.id for i in iset.isomers)
        raise InputError(
            f"{comp.formula} has {iset.geometric_isomers} geometric isomers; the {role} needs a descriptor",
            f'write e.g. cis-{comp.formula}, trans-..., fac-/mer- or a configuration index as in ({iset.geometry.symbol}-<index>)-{comp.formula} (see `isosieve isomers "{comp.formula}"`)',
        )
    found: list[Isomer] | None = None
    try:
        from enumerator.analyses.descriptors import find_by_descriptor
    except ImportError:
        find_by_descriptor = None  # type: ignore[assignment]
    if find_by_descriptor is not None:
        found = list(find_by_descriptor(iset, comp, descriptor))
    if not found and descriptor in ("cis", "trans", "fac", "mer"):
        found = [i for i in iset.isomers if everyday_prefix(i, comp) == descriptor]
    elif find_by_descriptor is None:
        raise InputError(
            f"cannot read the descriptor '{descriptor}' without the nomenclature module", "use cis/trans/fac/mer"
        )
    if not found:
        raise InputError(
            f"no isomer of {comp.formula} is '{descriptor}'",
            f'see `isosieve isomers "{comp.formula}"` for the isomers and their descriptors',
        )
    if len({i.number for i in found}) > 1:
        raise InputError(
            f"'{descriptor}' fits {len({i.number for i in found})} geometric isomers of {comp.formula}",
            "give the configuration index instead, e.g. (OC-6-22)-FORMULA",
        )
    return found


# --------------------------------------------------------------------------
# the network


@dataclass(frozen=True)
class Network:
    """Every isomer of every composition between a start and a target, and
    one edge per single replacement.

    ``nodes``: (node id, attributes); ``edges``: (from, to, attributes), the
    attributes holding 'entering', 'leaving', 'weight' (the number of
    leaving sites giving that product: statistical weight) and 'sites'.
    """

    geometry: str
    start: str
    target: str
    nodes: tuple[tuple[str, tuple[tuple[str, Any], ...]], ...]
    edges: tuple[tuple[str, str, tuple[tuple[str, Any], ...]], ...]
    compositions: tuple[tuple[str, int], ...]  # formula -> number of stereoisomers
    safety: tuple[str, ...] = ()


def _node_id(formula: str, iso_id: str) -> str:
    return f"{formula} #{iso_id}"


def _prepare(start_text: str, target_text: str, geometry: str | None, ruleset: RuleSet):
    from enumerator.analyses.centre import choose_geometry
    from enumerator.parse.formula import parse_formula

    s_formula, s_desc = parse_species(start_text)
    t_formula, t_desc = parse_species(target_text)
    start = parse_formula(s_formula, ruleset)
    target = parse_formula(t_formula, ruleset)
    symbol, reason = choose_geometry(start, ruleset, geometry)
    geo = ruleset.geometry(symbol)
    if target.donor_count != start.donor_count:
        raise InputError(
            f"{target.formula} has {target.donor_count} donor atoms but {start.formula} has {start.donor_count}",
            "one-for-one replacement keeps the coordination number: check the formulas",
        )
    if _is_abstract(start) != _is_abstract(target) or start.metal != target.metal:
        raise InputError(
            f"start {start.formula} and target {target.formula} are not on the same metal or notation",
            "write both in the same notation with the same metal",
        )
    space = Space(start, geo, ruleset, extra=(target,))
    sc, tc = space.counts(start), space.counts(target)
    names = sorted(set(sc) | set(tc))
    leaving = {n: sc.get(n, 0) - tc.get(n, 0) for n in names if sc.get(n, 0) > tc.get(n, 0)}
    entering = {n: tc.get(n, 0) - sc.get(n, 0) for n in names if tc.get(n, 0) > sc.get(n, 0)}
    for n in list(leaving) + list(entering):
        k = space.kinds[n]
        if k.denticity != 1 or k.ring:
            raise InputError(
                f"ligand '{n}' would have to enter or leave, but it is not monodentate",
                "only one-for-one replacement of monodentate ligands is modelled",
            )
    if not entering:
        raise InputError(
            f"{start.formula} and {target.formula} have the same ligands", "give a target that differs from the start"
        )
    return space, geo, reason, start, s_desc, target, t_desc, sc, tc, leaving, entering


def build_network(
    start_text: str, target_text: str, *, geometry: str | None = None, rules: Sequence[str] = ()
) -> Network:
    """The substitution network from the start's composition to the target's.

    Every composition on the way (each leaving ligand's count between its
    start and target values, likewise each entering ligand's) contributes
    all its stereoisomers as nodes; descriptors on the formulas are ignored
    here.  From every node, replacing one leaving ligand by one entering
    ligand gives one edge per distinct product, weighted by the number of
    leaving sites that give it, so the weights out of a node for one
    (entering, leaving) pair sum to the number of sites the leaving ligand
    holds.
    """
    ruleset = load_rules(rules)
    space, geo, _, start, _, target, _, sc, tc, leaving, entering = _prepare(start_text, target_text, geometry, ruleset)
    lev_names, ent_names = sorted(leaving), sorted(entering)
    # every intermediate: remove x_L of each leaving ligand, add y_E of each entering one, sum x = sum y
    levels: dict[int, list[dict[str, int]]] = {}
    for xs in itertools.product(*[range(leaving[n] + 1) for n in lev_names]):
        for ys in itertools.product(*[range(entering[n] + 1) for n in ent_names]):
            if sum(xs) != sum(ys):
                continue
            c = dict(sc)
            for n, x in zip(lev_names, xs):
                c[n] -= x
            for n, y in zip(ent_names, ys):
                c[n] = c.get(n, 0) + y
            levels.setdefault(sum(xs), []).append(c)
    from enumerator.isomers.occupancy import occupancy

    nodes: list[tuple[str, tuple[tuple[str, Any], ...]]] = []
    edges: list[tuple[str, str, tuple[tuple[str, Any], ...]]] = []
    comps: list[tuple[str, int]] = []
    stat = SubstitutionRules("statistical", "", "", ("*",), "none", (), "statistical")
    for level in sorted(levels):
        for counts in sorted(levels[level], key=lambda c: sorted(c.items())):
            sp = space.species(counts)
            comps.append((sp.formula, sp.isomer_set.stereoisomers))
            for iso in sp.isomer_set.isomers:
                prefix, desc = _descriptor_text(iso, sp.composition)
                nodes.append(
                    (
                        _node_id(sp.formula, iso.id),
                        (
                            ("formula", sp.formula),
                            ("isomer", iso.id),
                            ("geometric_isomer", iso.number),
                            ("point_group", iso.point_group),
                            ("chiral", iso.chiral),
                            ("prefix", prefix or ""),
                            ("descriptor", desc or ""),
                            ("level", level),
                            ("sites", occupancy(iso)),
                        ),
                    )
                )
                if level == max(levels):
                    continue
                for E in ent_names:
                    if counts.get(E, 0) >= tc.get(E, 0):
                        continue
                    for L in lev_names:
                        if counts.get(L, 0) <= tc.get(L, 0):
                            continue
                        p = _predict(space, sp, iso, E, (L,), stat)
                        per: dict[str, list[int]] = {}
                        for ch in p.sites:
                            per.setdefault(ch.product.isomer, []).append(ch.site)
                        pform = p.sites[0].product.formula
                        for pid in sorted(per, key=lambda x: (len(x), x)):
                            edges.append(
                                (
                                    _node_id(sp.formula, iso.id),
                                    _node_id(pform, pid),
                                    (
                                        ("entering", E),
                                        ("leaving", L),
                                        ("weight", len(per[pid])),
                                        ("share", str(Fraction(len(per[pid]), len(p.sites)))),
                                        ("sites", ",".join(str(s + 1) for s in sorted(per[pid]))),
                                    ),
                                )
                            )
    return Network(
        geo.symbol,
        start.formula,
        target.formula,
        tuple(nodes),
        tuple(edges),
        tuple(comps),
        safety_lines(space.kinds.values()),
    )


def network_graph(net: Network):
    """The network as a networkx DiGraph (node and edge attributes as in :class:`Network`)."""
    import networkx as nx

    g = nx.DiGraph(geometry=net.geometry, start=net.start, target=net.target)
    for nid, attrs in net.nodes:
        g.add_node(nid, **dict(attrs))
    for a, b, attrs in net.edges:
        g.add_edge(a, b, **dict(attrs))
    return g


def network_json(net: Network) -> dict[str, Any]:
    """networkx node-link data (keys 'nodes' and 'edges') plus the compositions."""
    import networkx as nx

    doc = nx.node_link_data(network_graph(net), edges="edges")
    doc["compositions"] = [{"formula": f, "stereoisomers": n} for f, n in net.compositions]
    doc["safety"] = list(net.safety)
    return doc


def network_graphml(net: Network) -> str:
    """GraphML text of the network (networkx writer)."""
    import networkx as nx

    return "\n".join(nx.generate_graphml(network_graph(net))) + "\n"


def network_picture(net: Network, fmt: str = "svg") -> bytes:
    """A layered drawing (one column per step) as SVG or PNG bytes;
    deterministic (fixed SVG hash salt, no date)."""
    import io

    import matplotlib

    matplotlib.use("Agg", force=False)
    from matplotlib.figure import Figure

    cols: dict[int, list[tuple[str, dict[str, Any]]]] = {}
    for nid, attrs in net.nodes:
        a = dict(attrs)
        cols.setdefault(int(a["level"]), []).append((nid, a))
    pos: dict[str, tuple[float, float]] = {}
    tall = max(len(v) for v in cols.values())
    for lv, items in cols.items():
        for k, (nid, _) in enumerate(items):
            pos[nid] = (lv * 3.0, (len(items) - 1) / 2.0 - k)
    with matplotlib.rc_context({"svg.hashsalt": "isosieve", "svg.fonttype": "none"}):
        fig = Figure(figsize=(3.0 + 2.6 * len(cols), 1.0 + 0.9 * tall))
        ax = fig.add_subplot(1, 1, 1)
        ax.set_axis_off()
        for a, b, attrs in net.edges:
            e = dict(attrs)
            (x0, y0), (x1, y1) = pos[a], pos[b]
            ax.annotate(
                "",
                xy=(x1 - 0.55, y1),
                xytext=(x0 + 0.55, y0),
                arrowprops={"arrowstyle": "->", "lw": 0.3 + 0.4 * e["weight"], "color": "0.45"},
            )
            ax.text((x0 + x1) / 2, (y0 + y1) / 2, str(e["weight"]), fontsize=6, ha="center", va="center", color="0.2")
        for nid, attrs in net.nodes:
            a = dict(attrs)
            x, y = pos[nid]
            tag = f"{a['prefix']}-" if a["prefix"] else ""
            ax.text(
                x,
                y,
                f"{tag}{a['formula']}\n#{a['isomer']} {a['point_group']}",
                fontsize=7,
                ha="center",
                va="center",
                bbox={"boxstyle": "round", "fc": "white", "ec": "0.3", "lw": 0.6},
            )
        ax.set_xlim(-1.2, 3.0 * max(cols) + 1.2)
        ax.set_ylim(-tall / 2.0 - 0.3, tall / 2.0 + 0.3)
        ax.set_title(f"{net.start} -> {net.target} on {net.geometry} (edge labels: statistical weights)", fontsize=8)
        buf = io.BytesIO()
        meta = {"Date": None} if fmt == "svg" else {}
        fig.savefig(buf, format=fmt, metadata=meta, dpi=150)
    return buf.getvalue()


# --------------------------------------------------------------------------
# the planner


@dataclass(frozen=True)
class Step:
    """One addition of a route: the prediction and what it led to."""

    number: int
    entering: str
    prediction: Prediction

    @property
    def product(self) -> Product | None:
        return self.prediction.major


@dataclass(frozen=True)
class Route:
    """One order of addition followed through the predicted major products."""

    order: tuple[str, ...]
    steps: tuple[Step, ...]
    reaches_target: bool
    outcome: str


@dataclass(frozen=True)
class RoutePlan:
    """Every order of addition from the start isomer, and which of them end
    on the target isomer under the rule set."""

    geometry: str
    geometry_reason: str
    rules: SubstitutionRules
    rules_reason: str
    start: Product
    target: Product
    target_isomers: tuple[str, ...]
    entering: tuple[tuple[str, int], ...]
    leaving: tuple[tuple[str, int], ...]
    routes: tuple[Route, ...]
    notes: tuple[str, ...] = ()
    safety: tuple[str, ...] = ()

    @property
    def reaching(self) -> tuple[Route, ...]:
        return tuple(r for r in self.routes if r.reaches_target)


def _orders(entering: Mapping[str, int], names: Sequence[str]) -> Iterable[tuple[str, ...]]:
    """Distinct orders of a multiset, lexicographic by ``names`` order."""
    left = dict(entering)
    total = sum(left.values())
    acc: list[str] = []

    def rec():
        if len(acc) == total:
            yield tuple(acc)
            return
        for n in names:
            if left.get(n, 0) > 0:
                left[n] -= 1
                acc.append(n)
                yield from rec()
                acc.pop()
                left[n] += 1

    yield from rec()


def plan_routes(
    start_text: str,
    target_text: str,
    *,
    geometry: str | None = None,
    rule_set: str | None = None,
    rules: Sequence[str] = (),
) -> RoutePlan:
    """Follow every order of addition from START to TARGET's composition.

    START is a formula, with a descriptor when its composition has more
    than one isomer; TARGET a formula with a descriptor (cis/trans/fac/mer
    or a configuration index).  At each step the ligands still in excess of
    the target may leave; the rule set picks the site and the predicted
    major product is carried on.  A route reaches the target when its last
    major product is the target's geometric isomer.
    """
    ruleset = load_rules(rules)
    space, geo, geo_reason, start, s_desc, target, t_desc, sc, tc, leaving, entering = _prepare(
        start_text, target_text, geometry, ruleset
    )
    if t_desc is None:
        t_iset = enumerate_isomers_cached(target, geo)
        if t_iset.geometric_isomers > 1:
            resolve_species(t_iset, target, None, role="target")
    s_sp = space.species(sc)
    t_sp = space.species(tc)
    s_isos = resolve_species(s_sp.isomer_set, start, s_desc, role="start")
    t_isos = resolve_species(t_sp.isomer_set, target, t_desc, role="target")
    s_iso = s_isos[0]
    notes: list[str] = []
    if len(s_isos) > 1:
        notes.append(
            f"the start is chiral; routes are followed from enantiomer {s_iso.id} (the other gives the mirror-image results)"
        )
    if geo.fluxional:
        notes.append(f"{geo.symbol} is fluxional: site-selective predictions on it are doubtful")
    available = load_substitution_rules(ruleset)
    ligands = sorted(set(sc) | set(tc))
    rules_obj, rules_reason = choose_rule_set(available, geo.symbol, ligands, leaving, rule_set)
    if rules_obj.note:
        notes.append(rules_obj.note)
    names = [n for n in space.order if n in entering]
    target_number = t_isos[0].number
    memo: dict[tuple, Prediction] = {}
    routes: list[Route] = []
    for order in _orders(entering, names):
        if len(routes) >= MAX_ROUTES:
            raise CapacityError(
                f"more than {MAX_ROUTES} orders of addition", "plan a shorter sequence (fewer ligands to add at once)"
            )
        counts = dict(sc)
        sp, iso = s_sp, s_iso
        steps: list[Step] = []
        outcome = ""
        for k, E in enumerate(order, start=1):
            leav = tuple(n for n in sorted(leaving) if counts.get(n, 0) > tc.get(n, 0))
            key = (Space.signature(sp.composition), iso.id, E, leav)
            if key not in memo:
                memo[key] = _predict(space, sp, iso, E, leav, rules_obj)
            p = memo[key]
            steps.append(Step(k, E, p))
            if p.major is None:
                outcome = f"step {k} (+{E}) has no single major product"
                break
            nxt = next(
                c
                for c in p.sites
                if c.selected and c.product.formula == p.major.formula and c.product.number == p.major.number
            )
            counts[nxt.leaving] -= 1
            counts[E] = counts.get(E, 0) + 1
            sp = space.species(counts)
            iso = sp.isomer_set.get(p.major.isomer)
        reached = (
            not outcome
            and iso.number == target_number
            and Space.signature(sp.composition) == Space.signature(t_sp.composition)
        )
        if not outcome:
            outcome = "reaches the target" if reached else f"ends on {steps[-1].product.label()}, not the target"  # type: ignore[union-attr]
        routes.append(Route(order, tuple(steps), reached, outcome))
        if any(st.product is not None and st.product.chiral for st in steps) and not any(
            "racemate" in n for n in notes
        ):
            notes.append(
                "a chiral product formed from an achiral precursor is the racemate; routes follow one enantiomer (the other mirrors it)"
            )
    start_p = _product(s_sp, s_iso.id)
    target_p = _product(t_sp, t_isos[0].id)
    return RoutePlan(
        geometry=geo.symbol,
        geometry_reason=geo_reason,
        rules=rules_obj,
        rules_reason=rules_reason,
        start=start_p,
        target=target_p,
        target_isomers=tuple(i.id for i in t_isos),
        entering=tuple(sorted(entering.items())),
        leaving=tuple(sorted(leaving.items())),
        routes=tuple(routes),
        notes=tuple(notes),
        safety=safety_lines(space.kinds.values()),
    )


def _step_json(s: Step) -> dict[str, Any]:
    p = s.prediction
    chosen = [
        c
        for c in p.sites
        if c.selected and p.major and c.product.formula == p.major.formula and c.product.number == p.major.number
    ]
    return {
        "step": s.number,
        "entering": s.entering,
        "leaving": chosen[0].leaving if chosen else None,
        "from": p.start.json(),
        "to": p.major.json() if p.major else None,
        "replaced_sites": sorted(c.site + 1 for c in chosen),
        "decided_by": p.decided_by,
        "reason": p.reason,
        "shares": [dict(prod.json(), share=str(v)) for prod, v in p.selected],
    }


def route_json(plan: RoutePlan) -> dict[str, Any]:
    """The JSON document of ``isosieve route`` (keys listed in the README)."""
    from enumerator.schema import SCHEMA_VERSION

    def route(r: Route) -> dict[str, Any]:
        return {
            "order": list(r.order),
            "reaches_target": r.reaches_target,
            "outcome": r.outcome,
            "steps": [_step_json(s) for s in r.steps],
        }

    return {
        "schema_version": SCHEMA_VERSION,
        "geometry": plan.geometry,
        "geometry_reason": plan.geometry_reason,
        "rule_set": dict(plan.rules.describe(), reason=plan.rules_reason),
        "start": plan.start.json(),
        "target": dict(plan.target.json(), isomers=list(plan.target_isomers)),
        "entering": dict(plan.entering),
        "leaving": dict(plan.leaving),
        "orders_searched": len(plan.routes),
        "reached": bool(plan.reaching),
        "routes": [route(r) for r in plan.reaching],
        "other_orders": [route(r) for r in plan.routes if not r.reaches_target],
        "notes": list(plan.notes),
        "safety": list(plan.safety),
    }
