"""Which polyhedron a centre takes by default, and why.

The choice is data: the ordered rules of ``rules/geometry_choice.toml``
(:mod:`enumerator.rules.geometry_choice`), each with its reason, its
alternatives and its source.  The first rule whose conditions hold for the
centre decides: the site count and d-electron count (four-coordinate d8
square planar, d10 tetrahedral, five-coordinate the trigonal bipyramid,
six-coordinate the octahedron, ...), the textbook exceptions named by metal,
oxidation state and ligand classes ([NiCl4]2- and [NiCl2(PPh3)2] tetrahedral,
[Co(CN)5]3- square pyramidal, ...), and the piano stools.

A piano stool's η-ring is one site (the ring's own symmetry sits on that
site's axis); the frame follows the number of rings and legs: one ring with
two legs TPY-3, three legs T-4, four legs SPY-5 with the ring on the apex;
two rings L-2 (metallocene), two rings and two legs T-4 (bent metallocene).
A ring shape the rules do not tabulate gets the default for its site count,
with a note; one they refuse (Cp2MX3) is refused unless ``--geometry`` is
given.  An abstract centre (``M``) has no d-count: it takes the rule files'
default for its site count, or a rule marked for abstract centres (the piano
stools).  :func:`choose_geometry` honours a requested geometry and says how
it relates to the default.

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.condensed import parse_condensed
>>> rs = load_rules()
>>> choose_geometry(parse_condensed("[PtCl2(NH3)2]", rs), rs, None)[0]
'SP-4'
>>> default_geometry(parse_condensed("[Ni(CO)4]", rs), rs)[2]
('SP-4',)
>>> default_geometry(parse_condensed("[NiCl4]2-", rs), rs)[0]
'T-4'
>>> choose_geometry(parse_condensed("[CpCo(CO)2]", rs), rs, None)[0]
'TPY-3'
"""

from __future__ import annotations

from enumerator.analyses.centre.electrons import ElectronCount, count_electrons
from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.model.composition import Composition
from enumerator.rules.geometry_choice import CentreFacts, GeometryRule, load_geometry_choice
from enumerator.rules.ruleset import RuleSet

__all__ = ["default_geometry", "choose_geometry", "geometry_decision", "GeometryDecision", "centre_facts"]


@frozen_dataclass
class GeometryDecision:
    """The default geometry of a centre with the rule behind it.

    ``rule`` and ``source`` are empty where no rule matched (the rule files'
    default for the site count was taken)."""

    symbol: str
    reason: str
    alternatives: tuple[str, ...]
    rule: str = ""
    source: str = ""


def centre_facts(comp: Composition, ec: ElectronCount | None) -> CentreFacts:
    """What the geometry rules test about a centre.

    Parameters
    ----------
    comp : Composition
    ec : ElectronCount or None
        Its electron count; None for an abstract centre.

    Returns
    -------
    CentreFacts
    """
    return CentreFacts(
        sites=comp.donor_count,
        rings=comp.rings,
        legs=comp.legs,
        d=ec.d_electrons if ec else None,
        metal=None if ec is None else comp.metal,
        oxidation_state=ec.oxidation_state if ec else None,
        ligands=frozenset(k.name for k in comp.kinds),
        abstract=ec is None,
    )


def _site_note(comp: Composition, matched: GeometryRule | None) -> str:
    rings = [k.name for k in comp.kinds if k.ring]
    if not rings:
        return ""
    note = (
        f"; each η-ring ({', '.join(rings)}) counts as one site whose axis carries the ring's symmetry "
        f"(piano-stool idealisation), so the site count is {comp.donor_count}"
    )
    if matched is None or matched.rings is None:
        note += (
            f"; no piano-stool frame is tabulated for {comp.rings} ring(s) with {comp.legs} leg(s), so the default "
            "for the site count is used with each ring on a site of the largest site stabiliser: check the result"
        )
    return note


def _refuse(rule: GeometryRule, comp: Composition) -> InputError:
    return InputError(f"{comp.formula}: {rule.why}", rule.fix)


def geometry_decision(comp: Composition, rules: RuleSet, ec: ElectronCount | None = None) -> GeometryDecision:
    """The default geometry of a centre, with the rule that chose it.

    Parameters
    ----------
    comp : Composition
        The centre (a real metal or the abstract ``M``).
    rules : RuleSet
        The rules in force (geometries and ``geometry_choice.toml``).
    ec : ElectronCount, optional
        The electron count of a real centre, if already made.

    Returns
    -------
    GeometryDecision

    Raises
    ------
    InputError
        The metal is not an element symbol, no geometry has the site count,
        or a rule refuses the shape (e.g. a bent metallocene Cp2MX3).
    """
    abstract = comp.metal == "M"
    if not abstract:
        ec = ec or count_electrons(comp)
    facts = centre_facts(comp, None if abstract else ec)
    rule = load_geometry_choice(rules).first_match(facts)
    if rule is not None and rule.refuse:
        raise _refuse(rule, comp)
    cn = comp.donor_count
    if abstract:
        return _abstract_decision(comp, rules, rule)
    assert ec is not None
    where = f"{cn}-coordinate {ec.label}" + ("" if ec.d_electrons is not None else " (no d-count)")
    note = _site_note(comp, rule)
    if rule is not None:
        reason = f"{rule.geometry}: {where}; {rule.why}{note}"
        return GeometryDecision(rule.geometry, reason, rule.alternatives, rule.name, rule.source)
    g = rules.default_geometry(cn)
    alts = tuple(sorted(s for s, geo in rules.geometries.items() if geo.coordination_number == cn and s != g.symbol))
    reason = f"{g.symbol}: the default {g.name} for coordination number {cn} ({ec.label}){note}"
    return GeometryDecision(g.symbol, reason + f"; alternatives: {', '.join(alts) or 'none'}", alts)


def _abstract_decision(comp: Composition, rules: RuleSet, rule: GeometryRule | None) -> GeometryDecision:
    """An abstract centre: a rule for abstract centres (piano stools), else the default for the site count."""
    cn = comp.donor_count
    hint = "(an abstract centre has no d-electron count; use --geometry to choose another)"
    if rule is not None:
        reason = f"{rule.geometry}: {rule.why} {hint}{_site_note(comp, rule)}"
        return GeometryDecision(rule.geometry, reason, rule.alternatives, rule.name, rule.source)
    g = rules.default_geometry(cn)
    reason = f"{g.symbol}: the default {g.name} for coordination number {cn} {hint}{_site_note(comp, None)}"
    return GeometryDecision(g.symbol, reason, ())


def default_geometry(
    comp: Composition, rules: RuleSet, ec: ElectronCount | None = None
) -> tuple[str, str, tuple[str, ...]]:
    """The default geometry of a real centre.

    Parameters
    ----------
    comp : Composition
        A composition whose metal is an element.
    rules : RuleSet
        The geometries and geometry-choice rules in force.
    ec : ElectronCount, optional
        Its electron count, if already made.

    Returns
    -------
    (str, str, tuple of str)
        The polyhedral symbol, the reason in words, and the alternatives.

    Raises
    ------
    InputError
        The metal is not an element symbol, no geometry has the coordination
        number, or a rule refuses the shape.
    """
    d = geometry_decision(comp, rules, ec)
    return d.symbol, d.reason, d.alternatives


def choose_geometry(comp: Composition, rules: RuleSet, symbol: str | None) -> tuple[str, str]:
    """The requested geometry, else the default.

    Parameters
    ----------
    comp : Composition
        The centre (abstract ``M`` or a real metal).
    rules : RuleSet
        The geometries in force.
    symbol : str or None
        The requested polyhedral symbol (``--geometry``), if any.

    Returns
    -------
    (str, str)
        The polyhedral symbol and the reason in words.

    Raises
    ------
    InputError
        The requested symbol is not a known geometry, or no geometry was
        requested and the rules refuse the shape.
    """
    if comp.metal == "M" and symbol:
        g = rules.geometry(symbol)
        return g.symbol, f"{g.symbol} as requested"
    if not symbol:
        d = geometry_decision(comp, rules)
        return d.symbol, d.reason
    g = rules.geometry(symbol)
    try:
        d = geometry_decision(comp, rules)
    except InputError as exc:
        return g.symbol, f"{g.symbol} as requested (no default: {exc.what})"
    if g.symbol == d.symbol:
        return g.symbol, f"{g.symbol} as requested (also the default: {d.reason.partition(': ')[2]})"
    return g.symbol, f"{g.symbol} as requested (the default would be {d.symbol})"
