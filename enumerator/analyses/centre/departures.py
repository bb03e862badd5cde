"""Departures from the electron-count rules, on their own line.

:func:`check_count` judges a centre's valence-electron count against the
18-electron rule and its usual exceptions (R. H. Crabtree, *The
Organometallic Chemistry of the Transition Metals*, Wiley, ch. 2, "the
18-electron rule" and its exceptions; C. E. Housecroft, A. G. Sharpe,
*Inorganic Chemistry*, Pearson, the 18-electron rule section; both from
memory) and says, for a count no usual exception covers, what most likely
went wrong, with the nearest formulas that count 18.

The rule is judged only where it is a reliable guide: on a centre carrying a
pi-acceptor or organometallic ligand (a carbonyl, thiocarbonyl, isocyanide,
nitrosyl or dinitrogen reporter, an η-bonded hydrocarbon, a carbon or
hydride donor other than cyanide).  With only sigma- and pi-donor ligands
(amines, water, halides, cyanide, phosphines with halides, ...) the count
follows the d count ([Cr(NH3)6]3+ counts 15, [Ni(H2O)6]2+ 20) and nothing is
flagged; a note says so.

The usual counts (:data:`USUAL_COUNTS`, first match wins):

* 18: the rule obeyed;
* 16 for d8 centres of groups 9-11 (square-planar Rh(I), Ir(I), Ni(II),
  Pd(II), Pt(II), Au(III); tetrahedral Ni(II) halides count the same);
* 14 for two-coordinate d10 centres (linear Cu(I), Ag(I), Au(I), Pd(0)L2);
* 16 for three-coordinate d10 centres ([Pt(PPh3)3]);
* below 18 for early transition-metal d0-d2 centres ([Cp2TiCl2] 16, [WMe6] 12);
* 15-20 for sandwich complexes of two η-rings and nothing else (vanadocene 15
  ... nickelocene 20);
* 17: a metal-centred radical ([V(CO)6] is stable; [Mn(CO)5] and
  [Co(CN)5]3- dimerise): noted, not flagged.

Anything else is a departure: a ``warning:`` line with the likely cause (a
typo in a ligand count, a missing or wrong charge, a ligand that dissociates,
a bent nitrosyl written as linear NO, an odd-electron radical) and the
formulas one ligand count, one nitrosyl binding or one charge away that
count 18 (each parsed back and recounted before it is offered).

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.condensed import parse_condensed
>>> from enumerator.analyses.centre.electrons import count_electrons
>>> rs = load_rules()
>>> comp = parse_condensed("[Ni(CO)5]", rs)
>>> chk = check_count(comp, count_electrons(comp), rs)
>>> chk.verdict, chk.comment, [s.formula for s in chk.suggestions]
('departure', '+2 from 18', ['[Ni(CO)4]'])
>>> comp = parse_condensed("[V(CO)6]", rs)
>>> chk = check_count(comp, count_electrons(comp), rs)
>>> chk.verdict, chk.warnings
('radical', ())
"""

from __future__ import annotations

import re
from collections.abc import Callable, Sequence
from dataclasses import replace
from typing import Any

from enumerator.analyses.centre.electrons import ElectronCount, count_electrons
from enumerator.errors import IsosieveError
from enumerator.frozen import frozen_dataclass
from enumerator.model.composition import Composition
from enumerator.parse.formula import parse_formula
from enumerator.rules.ligands import load_ligands
from enumerator.rules.ruleset import RuleSet

__all__ = ["Suggestion", "CountCheck", "UsualCount", "USUAL_COUNTS", "PI_ACCEPTOR_CLASSES", "check_count"]

#: Reporter classes whose ligands are pi acceptors of the kind the 18-electron rule was drawn from
#: (Crabtree, ch. 2; from memory).  Cyanide is left out: cyanometallates often depart
#: ([Cr(CN)6]3- counts 15, [Fe(CN)6]3- 17).
PI_ACCEPTOR_CLASSES = frozenset({"CO", "CS", "CNR", "NO", "NObent", "N2"})

_CRABTREE = (
    "R. H. Crabtree, The Organometallic Chemistry of the Transition Metals (Wiley), ch. 2, "
    "the 18-electron rule and its exceptions; from memory"
)
_HS = "C. E. Housecroft, A. G. Sharpe, Inorganic Chemistry (Pearson), the 18-electron rule; from memory"
#: How far a suggested ligand count may move, and how far a suggested charge.
_MAX_COUNT_STEP = 4
_MAX_CHARGE_STEP = 2
#: At most this many suggestions are offered.
_MAX_SUGGESTIONS = 3


@frozen_dataclass
class Suggestion:
    """A formula one change away that counts 18, and the change in words ('CO 5 -> 4')."""

    formula: str
    change: str

    def to_dict(self) -> dict[str, str]:
        """``{"formula": ..., "change": ...}``."""
        return {"formula": self.formula, "change": self.change}


@frozen_dataclass
class CountCheck:
    """The verdict on one centre's valence-electron count.

    ``verdict`` is 'obeyed' (18), 'usual' (a usual exception), 'radical' (a
    17-electron centre), 'not judged' (no pi-acceptor or organometallic
    ligand, or no count) or 'departure'; ``expected`` the count the rule that
    applies expects (None where none is judged); ``comment`` the words shown
    after the count; ``rule`` the rule or exception applied; ``source`` where
    it comes from.  ``warnings`` are the departure lines, ``notes`` the lines
    for counts that are explained, ``suggestions`` the formulas that count 18.
    """

    valence_electrons: int | None
    verdict: str
    expected: int | None
    comment: str
    rule: str
    source: str
    warnings: tuple[str, ...] = ()
    notes: tuple[str, ...] = ()
    suggestions: tuple[Suggestion, ...] = ()

    def to_dict(self) -> dict[str, Any]:
        """The JSON object ``centre.count_check``."""
        return {
            "valence_electrons": self.valence_electrons,
            "verdict": self.verdict,
            "expected": self.expected,
            "departure": None
            if self.valence_electrons is None or self.expected is None
            else self.valence_electrons - self.expected,
            "comment": self.comment,
            "rule": self.rule,
            "source": self.source,
            "suggestions": [s.to_dict() for s in self.suggestions],
        }


@frozen_dataclass
class _Centre:
    """What the usual counts are judged on."""

    ve: int
    d: int
    group: int
    sites: int
    sandwich: bool


@frozen_dataclass
class UsualCount:
    """One usual count: when it applies, the count it expects, the words and the source."""

    name: str
    applies: Callable[[_Centre], bool]
    expected: Callable[[_Centre], int]
    verdict: str
    comment: str
    source: str


#: The 18-electron rule and its usual exceptions, first match wins (sources in each entry).
USUAL_COUNTS: tuple[UsualCount, ...] = (
    UsualCount(
        "18-electron rule",
        lambda c: c.ve == 18,
        lambda c: 18,
        "obeyed",
        "18-electron rule obeyed",
        _CRABTREE,
    ),
    UsualCount(
        "16-electron d8 (four-coordinate, groups 9-11)",
        lambda c: c.d == 8 and c.ve == 16 and 9 <= c.group <= 11,
        lambda c: 16,
        "usual",
        "16 electrons: usual for four-coordinate d8, as Rh(I), Ir(I), Ni(II), Pd(II), Pt(II), Au(III)",
        _CRABTREE,
    ),
    UsualCount(
        "14-electron two-coordinate d10",
        lambda c: c.d == 10 and c.sites == 2 and c.ve == 14,
        lambda c: 14,
        "usual",
        "14 electrons: usual for two-coordinate d10, as linear Cu(I), Ag(I), Au(I) and Pd(0), Pt(0) with two ligands",
        _CRABTREE,
    ),
    UsualCount(
        "16-electron three-coordinate d10",
        lambda c: c.d == 10 and c.sites == 3 and c.ve == 16,
        lambda c: 16,
        "usual",
        "16 electrons: usual for three-coordinate d10, as [Pt(PPh3)3]",
        _CRABTREE,
    ),
    UsualCount(
        "early transition metal d0-d2 below 18",
        lambda c: c.d <= 2 and c.ve < 18,
        lambda c: c.ve,
        "usual",
        "usual for an early transition-metal d0-d2 centre, as [Cp2TiCl2] 16 and [WMe6] 12",
        _CRABTREE,
    ),
    UsualCount(
        "sandwich complexes 15-20",
        lambda c: c.sandwich and 15 <= c.ve <= 20,
        lambda c: c.ve,
        "usual",
        "metallocenes span 15-20 electrons: V 15, Cr 16, Mn 17, Fe 18, Co 19, Ni 20",
        "Crabtree, The Organometallic Chemistry of the Transition Metals (Wiley), metallocenes; from memory",
    ),
    UsualCount(
        "17-electron radical",
        lambda c: c.ve == 17,
        lambda c: 17,
        "radical",
        "17 electrons: a metal-centred radical",
        _HS,
    ),
)


def _judged(comp: Composition) -> bool:
    """Whether the centre carries a ligand of the kind the 18-electron rule was drawn from:
    a pi-acceptor reporter, an η-bonded hydrocarbon, or a carbon or hydride donor other than cyanide."""
    for k in comp.kinds:
        if k.reporter in PI_ACCEPTOR_CLASSES or k.ring or k.info("hapticity") or k.info("nitrosyl"):
            return True
        if k.reporter != "CN" and set(k.donors) & {"C", "H"}:
            return True
    return False


def _sandwich(comp: Composition) -> bool:
    return len(comp.parts) >= 1 and all(k.ring for k in comp.kinds) and sum(n for _, n in comp.parts) == 2


def _charge_text(q: int) -> str:
    if q == 0:
        return ""
    return (str(abs(q)) if abs(q) != 1 else "") + ("+" if q > 0 else "-")


def _charge_words(q: int) -> str:
    return "0" if q == 0 else f"{abs(q)}{'+' if q > 0 else '-'}"


_ELEMENT_LIKE = re.compile(r"[A-Z][a-z]?")


def _formula(metal: str, parts: Sequence[tuple[str, int]], charge: int) -> str:
    """A condensed formula: element-like names bare ('Cl3'), the others in parentheses ('(CO)2')."""
    out = []
    for i, (name, n) in enumerate(parts):
        bare = bool(_ELEMENT_LIKE.fullmatch(name))
        nxt = parts[i + 1][0] if i + 1 < len(parts) else ""
        if bare and n == 1 and _ELEMENT_LIKE.fullmatch(nxt or "-"):
            bare = False  # 'OCl' would read as one run; write '(O)Cl'
        token = name if bare else f"({name})"
        out.append(token + (str(n) if n > 1 else ""))
    return f"[{metal}{''.join(out)}]{_charge_text(charge)}"


def _counts_18(text: str, names: Sequence[tuple[str, int]], rules: RuleSet, sites: frozenset[int]) -> bool:
    """The formula parses back to these ligands, counts 18 and has a geometry for its site count."""
    try:
        comp = parse_formula(text, rules)
        ec = count_electrons(comp)
    except IsosieveError:
        return False
    got = sorted((k.name, n) for k, n in comp.parts)
    return got == sorted(names) and ec.valence_electrons == 18 and comp.donor_count in sites


def _bent_nitrosyl(rules: RuleSet) -> str | None:
    """The catalogue's bent nitrosyl (the shortest name, so not an isotopologue), if it has one."""
    bent = sorted((len(n), n) for n, e in load_ligands(rules).items() if e.nitrosyl == "bent")
    return bent[0][1] if bent else None


#: A formula one change away: (units changed, the change in words, ligand counts, charge).
_Candidate = tuple[int, str, list[tuple[str, int]], int]


def _count_changes(comp: Composition, ve: int) -> list[_Candidate]:
    """One ligand's count moved so that the count is 18 (a typo in a count, a missing or extra ligand)."""
    parts = [(k.name, n) for k, n in comp.parts]
    out = []
    for i, (kind, n) in enumerate(comp.parts):
        ec = int(kind.info("electrons_covalent", 0))
        if ec <= 0 or (18 - ve) % ec:
            continue
        step = (18 - ve) // ec
        if not step or abs(step) > _MAX_COUNT_STEP or n + step < 0 or (n + step == 0 and len(parts) == 1):
            continue
        new = [(nm, m + step if j == i else m) for j, (nm, m) in enumerate(parts)]
        out.append((abs(step), f"{kind.name} {n} -> {n + step}", [(nm, m) for nm, m in new if m > 0], comp.charge))
    return out


def _nitrosyl_changes(comp: Composition, ve: int, rules: RuleSet) -> list[_Candidate]:
    """Linear nitrosyls written bent, where that makes 18 (each bent NO counts two fewer)."""
    bent = _bent_nitrosyl(rules)
    out = []
    for kind, n in comp.parts:
        if kind.info("nitrosyl") == "linear" and bent and ve - 2 * n == 18 and kind.name != bent:
            new = [(bent if k.name == kind.name else k.name, m) for k, m in comp.parts]
            out.append((1, f"{kind.name} -> {bent} (bent nitrosyl)", new, comp.charge))
    return out


def _charge_change(comp: Composition, c: ElectronCount, ve: int) -> list[_Candidate]:
    """The charge that makes 18, if it is near the written one and leaves a d count."""
    dq = ve - 18
    if not dq or abs(dq) > _MAX_CHARGE_STEP or c.d_electrons is None or c.d_electrons - dq < 0:
        return []
    change = f"charge {_charge_words(comp.charge)} -> {_charge_words(comp.charge + dq)}"
    return [(abs(dq), change, [(k.name, n) for k, n in comp.parts], comp.charge + dq)]


def _candidates(comp: Composition, c: ElectronCount, rules: RuleSet) -> list[_Candidate]:
    """The formulas one change away: a ligand count, a nitrosyl's binding, or the charge."""
    ve = c.valence_electrons or 0
    return _count_changes(comp, ve) + _nitrosyl_changes(comp, ve, rules) + _charge_change(comp, c, ve)


def _suggestions(comp: Composition, c: ElectronCount, rules: RuleSet) -> tuple[Suggestion, ...]:
    """The formulas nearest to this one (fewest units changed) that count 18, each checked by parsing it back."""
    sites = frozenset(g.coordination_number for g in rules.geometries.values())
    found: list[tuple[int, Suggestion]] = []
    for dist, change, parts, charge in sorted(_candidates(comp, c, rules), key=lambda x: x[0]):
        text = _formula(comp.metal, parts, charge)
        if found and dist > found[0][0]:
            break
        if _counts_18(text, parts, rules, sites):
            found.append((dist, Suggestion(text, change)))
    return tuple(s for _, s in found[:_MAX_SUGGESTIONS])


def _offer(suggestions: Sequence[Suggestion]) -> str:
    return "; counts 18: " + ", ".join(f"{s.formula} ({s.change})" for s in suggestions) if suggestions else ""


def _cause(c: ElectronCount, comp: Composition) -> str:
    ve = c.valence_electrons or 0
    linear_no = any(k.info("nitrosyl") == "linear" for k in comp.kinds)
    if ve % 2:
        return "an odd count: a radical, or more likely a wrong charge or a typo in a ligand count"
    if ve > 18:
        extra = " or a bent nitrosyl written as linear NO" if linear_no else ""
        return f"likely a typo in a ligand count, a ligand that dissociates, or a wrong charge{extra}"
    return (
        "likely a missing ligand, a typo in a ligand count or a wrong charge "
        "(an unsaturated centre is rarely isolable without bulky ligands or agostic bonds)"
    )


def _departure(comp: Composition, c: ElectronCount, rules: RuleSet) -> CountCheck:
    ve = c.valence_electrons or 0
    sug = _suggestions(comp, c, rules)
    side = "above" if ve > 18 else "below"
    line = (
        f"{ve} valence electrons, {abs(ve - 18)} {side} 18, and no usual exception covers {c.label} "
        f"with these ligands: {_cause(c, comp)}{_offer(sug)}"
    )
    return CountCheck(ve, "departure", 18, f"{ve - 18:+d} from 18", "18-electron rule", _CRABTREE, (line,), (), sug)


def _radical(comp: Composition, c: ElectronCount, rule: UsualCount, rules: RuleSet) -> CountCheck:
    sug = _suggestions(comp, c, rules)
    neighbour = (
        "; if a closed-shell complex was meant: " + ", ".join(f"{s.formula} ({s.change})" for s in sug) if sug else ""
    )
    note = (
        f"{c.valence_electrons} valence electrons: an odd-electron (paramagnetic) metal-centred radical, "
        f"as [V(CO)6] (stable) or [Mn(CO)5] and [Co(CN)5]3- (which dimerise){neighbour}"
    )
    return CountCheck(c.valence_electrons, "radical", 17, rule.comment, rule.name, rule.source, (), (note,), sug)


def _not_judged(c: ElectronCount) -> CountCheck:
    ve = c.valence_electrons or 0
    note = (
        "no pi-acceptor or organometallic ligand (CO, CS, isocyanide, NO, N2, η-hydrocarbon, alkyl, hydride) "
        "here: the 18-electron rule is a weak guide for such complexes, whose count follows the d count "
        "(Crabtree, ch. 2), so no departure is flagged"
        + ("; an odd count means a paramagnetic centre" if ve % 2 else "")
    )
    return CountCheck(
        ve, "not judged", None, f"{ve - 18:+d} from 18", "none (no pi-acceptor ligand)", _CRABTREE, (), (note,)
    )


def check_count(comp: Composition, c: ElectronCount, rules: RuleSet) -> CountCheck:
    """Judge a centre's count against the 18-electron rule and its usual exceptions.

    Parameters
    ----------
    comp : Composition
        The real composition (catalogue ligands).
    c : ElectronCount
        Its electron count (:func:`~enumerator.analyses.centre.electrons.count_electrons`).
    rules : RuleSet
        The rule folders in force (suggested formulas are parsed back through their catalogue).

    Returns
    -------
    CountCheck
        The usual count that explains it; else, on a centre with a pi-acceptor or organometallic
        ligand, 'departure' with a warning line and the nearest formulas that count 18; else
        'not judged' with a note.
    """
    ve, d = c.valence_electrons, c.d_electrons
    if ve is None or d is None or c.group is None:
        return CountCheck(ve, "not judged", None, "", "none (no count)", "")
    judged = _judged(comp)
    centre = _Centre(ve, d, c.group, comp.donor_count, _sandwich(comp))
    for rule in USUAL_COUNTS:
        if not rule.applies(centre):
            continue
        if rule.verdict == "radical":
            if judged:
                return _radical(comp, c, rule, rules)
            return replace(_not_judged(c), comment=rule.comment)
        return CountCheck(ve, rule.verdict, rule.expected(centre), rule.comment, rule.name, rule.source)
    return _departure(comp, c, rules) if judged else _not_judged(c)
