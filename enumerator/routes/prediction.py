"""Predicting one substitution step: which site is replaced, and what forms.

A step replaces one monodentate ligand by another, and the entering ligand
takes the vacated site (no rearrangement of an intermediate is modelled).

1. Every site of every ligand allowed to leave is a candidate.
2. The product of each candidate is found by writing the new decoration and
   matching it, up to the rotations of the polyhedron, with one isomer of the
   product composition (:mod:`enumerator.routes.keys`).  The number of sites
   that give a product is its statistical weight and its share is weight /
   replaceable sites, an exact fraction.
3. The rule set (:class:`~enumerator.rules.substitution.SubstitutionRules`)
   scores each candidate by the ranks of the ligands in its ``labilises``
   relation, strongest first, and picks the best-scored sites.
4. Ties between picked sites that give different products are settled by
   the rule set's ``ties``.

>>> from enumerator.parse.abstract import parse_abstract
>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.rules.substitution import load_substitution_rules
>>> from enumerator.routes.keys import enumerate_isomers_cached
>>> rs = load_rules()
>>> start = parse_abstract("Ma5b")
>>> iso = enumerate_isomers_cached(start, rs.geometry("OC-6")).isomers[0]
>>> p = predict(iso, start, "b", load_substitution_rules(rs)["statistical"], leaving=("a",))
>>> [(prod.prefix, str(share)) for prod, share in p.by_geometric_isomer()]
[('cis', '4/5'), ('trans', '1/5')]
>>> p.decided_by, p.major.label()
('statistics', 'cis-Ma4b2 (isomer 1, C2v)')
>>> predict_step("[PtCl3(NH3)]-", "NH3", leaving=["Cl"]).reason
'trans-effect: replaces any Cl trans to Cl (sites 1, 3): Cl > NH3 in the trans-effect series'
"""

from __future__ import annotations

import re
from collections import Counter
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import replace
from fractions import Fraction
from typing import Any

from enumerator.analyses.centre import choose_geometry
from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.isomers.enumeration import Isomer
from enumerator.model.composition import Composition, LigandKind
from enumerator.model.geometry import Geometry
from enumerator.parse.formula import parse_formula
from enumerator.routes.keys import canonical_key, decoration, enumerate_isomers_cached, isomer_index, replace_site
from enumerator.routes.naming import name_isomer, parse_species, resolve_species
from enumerator.routes.space import Space, Species, is_abstract, safety_lines
from enumerator.rules.ligands import find_ligand
from enumerator.rules.ruleset import RuleSet, load_rules
from enumerator.rules.substitution import (
    SubstitutionRules,
    choose_rule_set,
    choose_rule_set_for_step,
    load_substitution_rules,
)

__all__ = [
    "Product",
    "SiteChoice",
    "Prediction",
    "product_of",
    "predict_in_space",
    "predict",
    "predict_step",
]

_MONODENTATE_ONLY = "only one-for-one replacement of monodentate ligands is modelled"


# ---------------------------------------------------------------- value objects


@frozen_dataclass
class Product:
    """One isomer met along a route: a step's start or one of its products."""

    formula: str
    isomer: str
    number: int
    point_group: str
    chiral: bool
    prefix: str | None
    descriptor: str | None

    def label(self) -> str:
        """'cis-[PtCl2(NH3)2] (isomer 1, C2v)': prefix, formula, geometric isomer and point group."""
        tag = f"{self.prefix}-" if self.prefix else ""
        return f"{tag}{self.formula} (isomer {self.number}, {self.point_group})"

    def to_dict(self) -> dict[str, Any]:
        """The isomer as it appears in JSON output."""
        return {
            "formula": self.formula,
            "isomer": self.isomer,
            "geometric_isomer": self.number,
            "point_group": self.point_group,
            "chiral": self.chiral,
            "prefix": self.prefix,
            "descriptor": self.descriptor,
        }

    def same_geometric_isomer(self, other: Product) -> bool:
        """Whether two products are the same geometric isomer (enantiomers count as one)."""
        return (self.formula, self.number) == (other.formula, other.number)


def product_of(species: Species, isomer_id: str) -> Product:
    """The :class:`Product` for one isomer of a species, named by :func:`~enumerator.routes.naming.name_isomer`.

    Parameters
    ----------
    species : Species
    isomer_id : str
        E.g. '1', '3a'.

    Returns
    -------
    Product
    """
    iso = species.isomer_set.get(isomer_id)
    prefix, desc = name_isomer(iso, species.composition)
    return Product(species.formula, iso.id, iso.number, iso.point_group, iso.chiral, prefix, desc)


@frozen_dataclass
class SiteChoice:
    """One replaceable site of the starting isomer: what leaves, which
    ligands decide its lability under the rule (strongest first), the
    product, and whether the rule picks it."""

    site: int
    leaving: str
    labilisers: tuple[str, ...]
    product: Product
    selected: bool


def _share_dicts(shares: Iterable[tuple[Product, Fraction]]) -> list[dict[str, Any]]:
    return [dict(prod.to_dict(), share=str(s)) for prod, s in shares]


@frozen_dataclass
class Prediction:
    """The outcome of adding ``entering`` to one isomer under one rule set.

    ``statistical`` gives each product's share over every replaceable site
    (exact fractions); ``selected`` the shares among the sites the rule
    picks (equal to ``statistical`` for the statistical rule set).  ``major``
    is the major product (its geometric isomer; None when the step is
    undecided) and ``decided_by`` one of 'single' (every site gives it),
    'rule', 'statistics' or 'undecided'; ``reason`` says why in words.
    ``rules_reason`` says why the rule set was chosen and ``safety`` holds the
    cautions for the ligands involved (both filled by :func:`predict_step`).
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
        """Shares summed over enantiomers, largest first (ties by formula and number).

        Parameters
        ----------
        which : str
            'selected' (among the sites the rule picks) or 'statistical' (every site).

        Returns
        -------
        list of (Product, Fraction)
        """
        return _by_geometric(self.selected if which == "selected" else self.statistical)

    @property
    def major_sites(self) -> tuple[SiteChoice, ...]:
        """The picked sites whose replacement gives the major product (empty when undecided)."""
        major = self.major
        if major is None:
            return ()
        return tuple(c for c in self.sites if c.selected and c.product.same_geometric_isomer(major))

    def to_dict(self) -> dict[str, Any]:
        """The JSON document of ``isosieve route --add`` (keys listed in the README)."""
        return {
            "start": self.start.to_dict(),
            "entering": self.entering,
            "rule_set": dict(self.rules.to_dict(), reason=self.rules_reason),
            "safety": list(self.safety),
            "decided_by": self.decided_by,
            "reason": self.reason,
            "major": self.major.to_dict() if self.major else None,
            "shares": _share_dicts(self.selected),
            "statistical_shares": _share_dicts(self.statistical),
            "sites": [
                {
                    "site": c.site + 1,
                    "leaving": c.leaving,
                    "labilisers": list(c.labilisers),
                    "product": c.product.isomer,
                    "product_formula": c.product.formula,
                    "selected": c.selected,
                }
                for c in self.sites
            ],
        }

    def step_dict(self) -> dict[str, Any]:
        """The parts of one route step's JSON that come from the prediction."""
        chosen = self.major_sites
        return {
            "leaving": chosen[0].leaving if chosen else None,
            "from": self.start.to_dict(),
            "to": self.major.to_dict() if self.major else None,
            "replaced_sites": sorted(c.site + 1 for c in chosen),
            "decided_by": self.decided_by,
            "reason": self.reason,
            "shares": _share_dicts(self.selected),
        }


def _by_geometric(shares: Iterable[tuple[Product, Fraction]]) -> list[tuple[Product, Fraction]]:
    acc: dict[tuple[str, int], tuple[Product, Fraction]] = {}
    for prod, share in shares:
        key = (prod.formula, prod.number)
        if key in acc:
            acc[key] = (acc[key][0], acc[key][1] + share)
        else:
            acc[key] = (prod, share)
    return sorted(acc.values(), key=lambda x: (-x[1], x[0].formula, x[0].number))


def _shares(choices: Sequence[SiteChoice]) -> tuple[tuple[Product, Fraction], ...]:
    """Statistical weights: each product's count of sites over all sites, as an exact fraction."""
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


# ---------------------------------------------------------------- steps 1-3: candidates and scores


def _require_monodentate(kind: LigandKind, role: str) -> None:
    if kind.denticity != 1 or kind.ring:
        raise InputError(f"{role} ligand '{kind.name}' is not monodentate", _MONODENTATE_ONLY)


def _labilisers(rules: SubstitutionRules, geo: Geometry, site_ligand: Mapping[int, str], site: int) -> tuple[str, ...]:
    """The ligands that decide the lability of ``site``, strongest first.

    Trans effect (``labilises = 'trans'``): the ligand trans to the site
    (Basolo & Pearson, *Mechanisms of Inorganic Reactions*, 2nd edn, Wiley
    (1967), ch. 5).  Cis-labilisation (``labilises = 'cis'``): the ligands cis
    to it (Atwood & Brown, J. Am. Chem. Soc. 98 (1976) 3160; Lichtenberger &
    Brown, J. Am. Chem. Soc. 100 (1978) 366).  None for a statistical set.
    """
    if rules.statistical:
        return ()

    def strength(n: str) -> tuple[int, str]:
        r = rules.rank(n)
        return (r if r is not None else len(rules.series), n)

    labs = tuple(
        sorted(
            (site_ligand[j] for j in site_ligand if j != site and geo.relation(site, j) == rules.labilises),
            key=strength,
        )
    )
    missing = rules.unranked(labs)
    if missing:
        raise InputError(
            f"rule set '{rules.name}' ({rules.path}) does not rank ligand '{missing[0]}'",
            "add it to 'series' in a rule file of your own (--rules DIR, substitution/*.toml)"
            " or use --rule-set statistical",
        )
    return labs


def _candidates(
    space: Space, sp: Species, iso: Isomer, entering: str, leaving: Sequence[str], rules: SubstitutionRules
) -> list[SiteChoice]:
    """Steps 1-2: every replaceable site with its labilisers and its product (none picked yet)."""
    geo = space.geometry
    counts = space.counts(sp.composition)
    deco = decoration(iso)
    site_ligand = {s.index: s.ligand for s in iso.sites}
    kinds = dict(space.kinds)
    choices: list[SiteChoice] = []
    for name in leaving:
        kind = space.kinds.get(name)
        if kind is None or counts.get(name, 0) == 0:
            continue
        _require_monodentate(kind, "leaving")
        new_counts = dict(counts)
        new_counts[name] -= 1
        new_counts[entering] = new_counts.get(entering, 0) + 1
        product_sp = space.species(new_counts)
        index = isomer_index(product_sp.composition, geo)
        for s in iso.sites_of(name):
            pid = index.get(canonical_key(replace_site(deco, s, name, entering), geo, kinds))
            if pid is None:  # pragma: no cover - every decoration is one of the enumerated isomers
                raise RuntimeError(
                    f"product of replacing site {s + 1} not found among the isomers of {product_sp.formula}"
                )
            labs = _labilisers(rules, geo, site_ligand, s)
            choices.append(SiteChoice(s, name, labs, product_of(product_sp, pid), False))
    return choices


def _scores(choices: Sequence[SiteChoice], rules: SubstitutionRules) -> list[tuple[int, ...]]:
    """Step 3: each site's labiliser ranks, strongest first, padded with the
    weakest rank so that sites with fewer labilisers compare position by position."""
    raw = [tuple(r for r in (rules.rank(n) for n in c.labilisers) if r is not None) for c in choices]
    width = max(len(v) for v in raw)
    weakest = len(rules.series)
    return [v + (weakest,) * (width - len(v)) for v in raw]


# ---------------------------------------------------------------- step 4: the decision


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


def _rule_reason(
    rules: SubstitutionRules, final: Sequence[SiteChoice], scores: Sequence[tuple[int, ...]], best: tuple[int, ...]
) -> str:
    """Words for a decision of the rule: the picked site and the first rank at which it beats the runner-up."""
    picked = [c for c in final if c.selected]
    first = picked[0]
    article = "the" if len(picked) == 1 else "any"
    where = f"{article} {first.leaving} {rules.labilises} to {_list_names(first.labilisers)}"
    runner = min(v for v in scores if v != best)
    pos = next(i for i, (a, b) in enumerate(zip(best, runner)) if a != b)
    strong = _name_at(first.labilisers, best[pos], rules) or rules.series[best[pos]][0]
    k_runner = next(k for k, v in enumerate(scores) if v == runner)
    weak = _name_at(final[k_runner].labilisers, runner[pos], rules) or "no ligand"
    if rules.labilises == "trans":
        cmp = f"{strong} > {weak} in the trans-effect series"
    else:
        cmp = f"{strong} > {weak} in the {rules.labilises}-labilising series"
    return f"{rules.name}: replaces {where} ({_sites_text(c.site for c in picked)}): {cmp}"


def _tie_decision(rules: SubstitutionRules, picked: Sequence[SiteChoice]) -> tuple[Product | None, str, str]:
    """Picked sites that give different geometric isomers: the rule set's ``ties`` decides."""
    by_geo = _by_geometric(_shares(picked))
    top = by_geo[0][1]
    leaders = [p for p, s in by_geo if s == top]
    tied_sites = _sites_text(c.site for c in picked)
    if rules.ties == "statistical" and len(leaders) == 1:
        major = by_geo[0][0]
        n_major = sum(1 for c in picked if c.product.same_geometric_isomer(major))
        if rules.statistical:
            leaving = "/".join(sorted({c.leaving for c in picked}))
            reason = f"statistical: {n_major} of {len(picked)} replaceable {leaving} sites give this product"
        else:
            reason = (
                f"{rules.name}: {tied_sites} tie under the rule and give different products; "
                f"resolved statistically ({n_major} of {len(picked)} tied sites give this product)"
            )
        return major, "statistics", reason
    if rules.statistical or rules.ties == "statistical":
        reason = f"{rules.name}: {len(leaders)} products have the same largest share ({top}); no single major product"
    else:
        reason = (
            f"{rules.name}: {tied_sites} tie under the rule and give different products;"
            " the rule set leaves ties undecided"
        )
    return None, "undecided", reason


def _decide(
    rules: SubstitutionRules, final: Sequence[SiteChoice], scores: Sequence[tuple[int, ...]], best: tuple[int, ...]
) -> tuple[Product | None, str, str]:
    """Step 4: the major product, how it was decided ('single', 'rule', 'statistics', 'undecided') and why."""
    picked = [c for c in final if c.selected]
    if len({(c.product.formula, c.product.number) for c in final}) == 1:
        leaving = "/".join(sorted({c.leaving for c in final}))
        return picked[0].product, "single", f"every replaceable {leaving} site gives the same product"
    if len({(c.product.formula, c.product.number) for c in picked}) == 1 and not rules.statistical:
        return picked[0].product, "rule", _rule_reason(rules, final, scores, best)
    return _tie_decision(rules, picked)


def predict_in_space(
    space: Space, species: Species, isomer: Isomer, entering: str, leaving: Sequence[str], rules: SubstitutionRules
) -> Prediction:
    """Predict one step inside a :class:`~enumerator.routes.space.Space` (steps 1-4 of the module guide).

    Parameters
    ----------
    space : Space
        The formula space; it knows every ligand kind involved.
    species : Species
        The species of ``isomer``.
    isomer : Isomer
        The starting isomer.
    entering : str
        Name of the entering ligand (a kind known to ``space``).
    leaving : sequence of str
        Names of the ligands that may leave.
    rules : SubstitutionRules
        The rule set that picks the site.

    Returns
    -------
    Prediction

    Raises
    ------
    InputError
        The entering or a leaving ligand is unknown or not monodentate, none
        of the leaving ligands is present, or the rule set does not rank a
        labiliser.
    """
    if entering not in space.kinds:
        raise InputError(f"unknown entering ligand '{entering}'", f"ligands here: {', '.join(space.order)}")
    _require_monodentate(space.kinds[entering], "entering")
    choices = _candidates(space, species, isomer, entering, leaving, rules)
    start = product_of(species, isomer.id)
    if not choices:
        raise InputError(
            f"{species.formula} has none of {', '.join(leaving) or 'the leaving ligands'} to replace",
            "check the leaving ligand",
        )
    scores = _scores(choices, rules)
    best = min(scores)
    final = tuple(replace(c, selected=scores[k] == best) for k, c in enumerate(choices))
    selected = _shares([c for c in final if c.selected])
    major, how, reason = _decide(rules, final, scores, best)
    return Prediction(start, entering, rules, final, _shares(final), selected, major, how, reason)


# ---------------------------------------------------------------- public entry points


def _default_leaving(composition: Composition, entering: str, rules: SubstitutionRules) -> list[str]:
    present = [k.name for k in composition.kinds if k.name != entering and k.denticity == 1 and not k.ring]
    return [n for n in present if n in rules.leaving] if rules.leaving else present


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

    Under the statistical rule set the shares are exact fractions of the
    replaceable sites; under a selective one the major product is the one the
    rule picks, with the reason.

    Parameters
    ----------
    isomer : Isomer
        The starting isomer.
    composition : Composition
        Its composition.
    entering : str or LigandKind
        A ligand kind, or the name of one already present, a letter of the
        abstract notation or a catalogued ligand.
    rules : SubstitutionRules
        The rule set.
    leaving : sequence of str, optional
        The ligands that may leave (default: the rule set's ``leaving`` list,
        else every monodentate ligand other than the entering one).
    ruleset : RuleSet, optional
        Rule folders (default: the built-in rules).

    Returns
    -------
    Prediction

    Raises
    ------
    InputError
        As :func:`predict_in_space`, or the entering ligand is unknown.
    """
    rs = ruleset or load_rules()
    ek = entering if isinstance(entering, LigandKind) else _entering_kind(entering, composition, rs)
    space = Space(composition, isomer.geometry, rs, kinds=(ek,))
    sp = space.species(space.counts(composition))
    if leaving is None:
        leaving = _default_leaving(composition, ek.name, rules)
    return predict_in_space(space, sp, isomer, ek.name, tuple(leaving), rules)


def _entering_kind(name: str, composition: Composition, ruleset: RuleSet) -> LigandKind:
    """The ligand kind of an entering ligand: one already present, a letter
    of the abstract notation, or a catalogued ligand."""
    for k in composition.kinds:
        if k.name == name:
            return k
    if is_abstract(composition):
        if re.fullmatch(r"[a-z]", name):
            return LigandKind(name=name, donors=(name,))
        raise InputError(
            f"entering ligand '{name}' is not a letter of the abstract notation",
            "write one lowercase letter, e.g. --add b",
        )
    return find_ligand(ruleset, name).kind()


def _require_known_leaving(
    available: Mapping[str, SubstitutionRules], comp: Composition, geometry: str, present: Sequence[str]
) -> None:
    """Without --leaving or --rule-set, several possible leaving ligands need a rule set that names its own."""
    selective = [
        r for r in available.values() if r.leaving and r.covers_geometry(geometry) and set(r.leaving) & set(present)
    ]
    if not selective:
        raise InputError(
            f"{comp.formula} has more than one ligand that could leave ({', '.join(present)})",
            "say which with --leaving LIGAND",
        )


def predict_step(
    start_text: str,
    entering: str,
    *,
    leaving: Sequence[str] | None = None,
    geometry: str | None = None,
    rule_set: str | None = None,
    rules: Sequence[str] = (),
) -> Prediction:
    """:func:`predict` from text, as ``isosieve route --add`` runs it.

    Parameters
    ----------
    start_text : str
        A formula, with a descriptor when it has several isomers.
    entering : str
        The entering ligand (catalogue name or alias, or a letter).
    leaving : sequence of str, optional
        The ligands that may leave; when not given, a rule set that names its
        leaving ligands decides, else the only other monodentate ligand.
    geometry : str, optional
        Polyhedral symbol (default: chosen from the formula).
    rule_set : str, optional
        The rule set by name (default: the applicable one of highest priority).
    rules : sequence of str
        User rule folders (``--rules DIR``).

    Returns
    -------
    Prediction
        With ``rules_reason`` and ``safety`` filled in.

    Raises
    ------
    InputError
        The formula, descriptor, ligand or rule set cannot be used, or the
        leaving ligand must be named.
    """
    ruleset = load_rules(rules)
    formula, desc = parse_species(start_text)
    comp = parse_formula(formula, ruleset)
    symbol, _ = choose_geometry(comp, ruleset, geometry)
    geo = ruleset.geometry(symbol)
    isos = resolve_species(enumerate_isomers_cached(comp, geo), comp, desc, role="start")
    ek = _entering_kind(entering, comp, ruleset)
    available = load_substitution_rules(ruleset)
    ligands = [k.name for k in comp.kinds] + [ek.name]
    if leaving is None:
        present = [k.name for k in comp.kinds if k.name != ek.name and k.denticity == 1 and not k.ring]
        if len(present) > 1 and rule_set is None:
            _require_known_leaving(available, comp, geo.symbol, present)
        chosen, reason = choose_rule_set_for_step(available, geo.symbol, ligands, present, rule_set)
    else:
        chosen, reason = choose_rule_set(available, geo.symbol, ligands, list(leaving), rule_set)
    p = predict(isos[0], comp, ek, chosen, leaving=leaving, ruleset=ruleset)
    return replace(p, rules_reason=reason, safety=safety_lines((*comp.kinds, ek)))
