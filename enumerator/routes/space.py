"""The formula space between a start and a target.

Replacing ligands one for one moves a complex through compositions keyed by
their ligand counts (name -> count).  :class:`Space` holds, for each count
vector met, a formula and the isomers on the chosen geometry
(:class:`Species`).  An intermediate's formula is written in the start's
notation (abstract: start order, new ligands appended; condensed: ligands in
alphabetical order, as in ``[PtCl3(NH3)]-``), its charge follows from the
catalogue's ionic charges, and it is parsed back so that its isomer ids are
exactly the ones ``isosieve isomers`` prints.

:func:`prepare_endpoints` reads a start and a target into one space, with the
ligands that must leave and enter.

>>> from enumerator.rules.ruleset import load_rules
>>> ends = prepare_endpoints("[PtCl4]2-", "cis-[PtCl2(NH3)2]", None, load_rules())
>>> ends.geometry.symbol, dict(ends.leaving), dict(ends.entering)
('SP-4', {'Cl': 2}, {'NH3': 2})
>>> ends.space.species({"Cl": 3, "NH3": 1}).formula
'[PtCl3(NH3)]-'
"""

from __future__ import annotations

import re
from collections import Counter
from collections.abc import Iterable, Mapping, Sequence
from types import MappingProxyType

from enumerator.analyses.centre import choose_geometry
from enumerator.analyses.safety import cautions
from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.isomers.enumeration import IsomerSet
from enumerator.model.composition import Composition, LigandKind
from enumerator.model.geometry import Geometry
from enumerator.parse.abstract import looks_abstract
from enumerator.parse.formula import parse_formula
from enumerator.routes.keys import enumerate_isomers_cached
from enumerator.routes.naming import parse_species
from enumerator.rules.ruleset import RuleSet

__all__ = [
    "Counts",
    "Species",
    "Space",
    "Endpoints",
    "prepare_endpoints",
    "is_abstract",
    "safety_lines",
]

#: Ligand counts of a composition as sorted (name, count) pairs.
Counts = tuple[tuple[str, int], ...]


def is_abstract(comp: Composition) -> bool:
    """Whether a composition is written in the abstract letter notation (``Ma4b2``)."""
    return comp.metal == "M" and looks_abstract(comp.formula)


def safety_lines(kinds: Iterable[LigandKind]) -> tuple[str, ...]:
    """The usual cautions (:func:`enumerator.analyses.safety.cautions`) for every ligand met on the way.

    Parameters
    ----------
    kinds : iterable of LigandKind
        Every ligand of the start, the target and the entering ligands.

    Returns
    -------
    tuple of str
        The caution lines; empty when no ligand carries a hazard.
    """
    uniq = {k.name: k for k in kinds}
    return cautions(Composition(formula="", parts=tuple((uniq[n], 1) for n in sorted(uniq))))


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


@frozen_dataclass
class Species:
    """A composition with its isomers on the chosen geometry."""

    composition: Composition
    isomer_set: IsomerSet

    @property
    def formula(self) -> str:
        """The composition's formula as written."""
        return self.composition.formula


class Space:
    """The compositions reachable from ``start`` by replacing ligands, with a
    formula and isomer set for each, built on first use and kept for the
    life of the object (one planning or network call).

    Parameters
    ----------
    start : Composition
        The starting composition; its notation is the one intermediates are written in.
    geometry : Geometry
        The polyhedron every species is enumerated on.
    ruleset : RuleSet
        Rule folders, for parsing intermediate formulas back.
    extra : iterable of Composition
        Compositions known already (the target), kept as given.
    kinds : iterable of LigandKind
        Further ligands that may enter.

    Raises
    ------
    InputError
        One ligand name is read as two different ligands.
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
        self.abstract = is_abstract(start)
        self.kinds: dict[str, LigandKind] = {}
        self.order: list[str] = []
        self._species: dict[Counts, Species] = {}
        known = (start, *extra)
        for comp in known:
            self._learn(comp.kinds)
        self._learn(kinds)
        for comp in known:
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
    def signature(comp: Composition) -> Counts:
        """The ligand counts of a composition as sorted (name, count) pairs."""
        c: Counter[str] = Counter()
        for k, n in comp.parts:
            c[k.name] += n
        return tuple(sorted(c.items()))

    def counts(self, comp: Composition) -> dict[str, int]:
        """The ligand counts of a composition, name -> count."""
        return dict(self.signature(comp))

    def species(self, counts: Mapping[str, int]) -> Species:
        """The species with these ligand counts (name -> count; zero counts are ignored).

        Parameters
        ----------
        counts : Mapping[str, int]

        Returns
        -------
        Species
            Its formula in the start's notation and its isomers.
        """
        sig = tuple(sorted((n, c) for n, c in counts.items() if c > 0))
        if sig not in self._species:
            self._species[sig] = self._new_species(counts, sig)
        return self._species[sig]

    def _new_species(self, counts: Mapping[str, int], sig: Counts) -> Species:
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
            parsed = parse_formula(text, self.ruleset)
        except InputError:  # the parser reads it differently: keep the direct construction
            parsed = None
        if (
            parsed is not None
            and self.signature(parsed) == sig
            and all(self.kinds.get(k.name) == k for k in parsed.kinds)
        ):
            comp = parsed
        return Species(comp, enumerate_isomers_cached(comp, self.geometry))


@frozen_dataclass
class Endpoints:
    """A start and a target read into one :class:`Space`.

    ``leaving`` and ``entering`` give how many of each ligand must leave and
    enter; ``start_counts`` and ``target_counts`` the ligand counts of the two
    compositions.  The descriptors are those written in front of the formulas.
    """

    space: Space
    geometry: Geometry
    geometry_reason: str
    start: Composition
    start_descriptor: str | None
    target: Composition
    target_descriptor: str | None
    start_counts: Mapping[str, int]
    target_counts: Mapping[str, int]
    leaving: Mapping[str, int]
    entering: Mapping[str, int]


def _check_compatible(start: Composition, target: Composition) -> None:
    if is_abstract(start) != is_abstract(target):
        raise InputError(
            f"start {start.formula} and target {target.formula} are not written in the same notation",
            "write both as letters (Ma4b2) or both as real formulas ([PtCl2(NH3)2])",
        )
    if start.metal != target.metal:
        raise InputError(
            f"target metal {target.metal} cannot arise from {start.formula} ({start.metal}): "
            "substitution keeps the metal",
            f"write the target on {start.metal}",
        )
    if target.donor_count != start.donor_count:
        raise InputError(
            f"{target.formula} has {target.donor_count} donor atoms but {start.formula} has {start.donor_count}",
            "one-for-one replacement keeps the coordination number: check the formulas",
        )


def _ligand_words(kind: LigandKind, n: int) -> str:
    """'Cl-', '2 Cl-', 'NH3', 'CO3 (2-)': a ligand with its ionic charge, for a message."""
    q = _ligand_charge(kind)
    if q == 0:
        text = kind.name
    elif abs(q) == 1 and kind.name[-1:].isalpha():
        text = kind.name + ("+" if q > 0 else "-")
    else:
        text = f"{kind.name} ({_charge_words(q)})"
    return f"{n} {text}" if n > 1 else text


def _charge_words(q: int) -> str:
    return "0" if q == 0 else f"{abs(q)}{'+' if q > 0 else '-'}"


def _check_charge(
    space: Space,
    target: Composition,
    target_descriptor: str | None,
    leaving: Mapping[str, int],
    entering: Mapping[str, int],
) -> None:
    """The target's charge must be the start's plus what the entering ligands bring and the leaving take
    away (catalogue ionic charges); abstract letters carry no charges and are not checked."""
    start = space.start
    if space.abstract:
        return
    expected = start.charge + sum(_ligand_charge(space.kinds[n]) * k for n, k in entering.items())
    expected -= sum(_ligand_charge(space.kinds[n]) * k for n, k in leaving.items())
    if target.charge == expected:
        return
    out = ", ".join(_ligand_words(space.kinds[n], k) for n, k in sorted(leaving.items())) or "nothing"
    into = ", ".join(_ligand_words(space.kinds[n], k) for n, k in sorted(entering.items()))
    parts = [(space.kinds[n], k) for n, k in Space.signature(target)]
    fixed = _condensed_formula(target.metal, parts, expected)
    raise InputError(
        f"target charge {_charge_words(target.charge)} cannot arise from {start.formula} by replacing "
        f"{out} with {into}: expected {_charge_words(expected)}",
        f"write the target as {target_descriptor + '-' if target_descriptor else ''}{fixed}"
        " (ligands replace ligands one for one; the charge follows from their ionic charges)",
    )


def prepare_endpoints(start_text: str, target_text: str, geometry: str | None, ruleset: RuleSet) -> Endpoints:
    """Read a start and a target (formulas, each with an optional descriptor) into one space.

    Parameters
    ----------
    start_text, target_text : str
        Formulas, e.g. '[PtCl4]2-' and 'cis-[PtCl2(NH3)2]'.
    geometry : str or None
        A polyhedral symbol; None chooses one from the start
        (:func:`enumerator.analyses.centre.choose_geometry`).
    ruleset : RuleSet
        Rule folders in force.

    Returns
    -------
    Endpoints

    Raises
    ------
    InputError
        The formulas differ in donor count, metal or notation; a ligand that
        must enter or leave is not monodentate; nothing enters; or the
        target's charge cannot arise from the start's by the replacements
        (catalogue ionic charges; not checked for abstract letters).
    """
    s_formula, s_desc = parse_species(start_text)
    t_formula, t_desc = parse_species(target_text)
    start = parse_formula(s_formula, ruleset)
    target = parse_formula(t_formula, ruleset)
    symbol, reason = choose_geometry(start, ruleset, geometry)
    geo = ruleset.geometry(symbol)
    _check_compatible(start, target)
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
    _check_charge(space, target, t_desc, leaving, entering)
    return Endpoints(
        space,
        geo,
        reason,
        start,
        s_desc,
        target,
        t_desc,
        MappingProxyType(sc),
        MappingProxyType(tc),
        MappingProxyType(leaving),
        MappingProxyType(entering),
    )
