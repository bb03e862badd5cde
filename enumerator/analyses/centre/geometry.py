"""Which polyhedron a centre takes by default, and why.

A real centre's default follows its coordination number and d-electron
count (:func:`default_geometry`, the usual shapes of textbook inorganic
chemistry; common practice): four-coordinate d8 square planar, d10
tetrahedral, five-coordinate the trigonal bipyramid, six-coordinate the
octahedron, ...; each choice names its alternative.  An abstract centre
(``M``) has no d-count and takes the rule files' default for its
coordination number.  :func:`choose_geometry` honours a requested geometry
and says how it relates to the default.

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.condensed import parse_condensed
>>> rs = load_rules()
>>> choose_geometry(parse_condensed("[PtCl2(NH3)2]", rs), rs, None)[0]
'SP-4'
>>> default_geometry(parse_condensed("[Ni(CO)4]", rs), rs)[2]
('SP-4',)
"""

from __future__ import annotations

from collections.abc import Mapping
from types import MappingProxyType

from enumerator.analyses.centre.electrons import ElectronCount, count_electrons
from enumerator.model.composition import Composition
from enumerator.rules.ruleset import RuleSet

__all__ = ["default_geometry", "choose_geometry", "USUAL_SHAPES"]

_ANY = "any"
#: (coordination number, d-electron count or 'any') -> (symbol, why, alternatives): the usual shapes.
USUAL_SHAPES: Mapping[tuple[int, int | str], tuple[str, str, tuple[str, ...]]] = MappingProxyType(
    {
        (4, 8): (
            "SP-4",
            "four-coordinate d8 centres (Rh(I), Ir(I), Ni(II), Pd(II), Pt(II), Au(III)) are usually square planar; "
            "T-4 is the alternative (e.g. [NiCl4]2- with weak-field ligands)",
            ("T-4",),
        ),
        (4, 10): ("T-4", "four-coordinate d10 centres are tetrahedral (e.g. [Ni(CO)4])", ("SP-4",)),
        (4, 9): (
            "T-4",
            "d9 (e.g. Cu(II)) is often square planar or flattened, so check SP-4 (--geometry SP-4)",
            ("SP-4",),
        ),
        (4, _ANY): ("T-4", "tetrahedral is the usual four-coordinate shape away from d8", ("SP-4",)),
        (5, _ANY): (
            "TBPY-5",
            "five-coordinate centres default to the trigonal bipyramid; "
            "SPY-5 is the alternative (--geometry SPY-5) and the two often interconvert (Berry pseudorotation)",
            ("SPY-5",),
        ),
        (6, _ANY): ("OC-6", "six-coordinate centres are octahedral; TPR-6 is the rare alternative", ("TPR-6",)),
        (2, _ANY): ("L-2", "two-coordinate centres (e.g. d10 Ag(I), Au(I)) are linear", ()),
        (3, _ANY): (
            "TP-3",
            "three-coordinate centres default to the trigonal plane; "
            "TS-3 (T-shape, e.g. 14-electron d8 fragments) is the alternative (--geometry TS-3)",
            ("TS-3",),
        ),
    }
)


def _site_note(comp: Composition) -> str:
    rings = [k.name for k in comp.kinds if k.ring]
    if not rings:
        return ""
    return (
        f"; each η-ring ({', '.join(rings)}) counts as a facial triad of three sites (piano-stool idealisation), "
        f"so the site count is {comp.donor_count}"
    )


def default_geometry(
    comp: Composition, rules: RuleSet, ec: ElectronCount | None = None
) -> tuple[str, str, tuple[str, ...]]:
    """The default geometry of a real centre.

    Parameters
    ----------
    comp : Composition
        A composition whose metal is an element.
    rules : RuleSet
        The geometries in force (for coordination numbers without a usual shape).
    ec : ElectronCount, optional
        Its electron count, if already made.

    Returns
    -------
    (str, str, tuple of str)
        The polyhedral symbol, the reason in words, and the alternatives.

    Raises
    ------
    InputError
        The metal is not an element symbol, or no geometry has the coordination number.
    """
    ec = ec or count_electrons(comp)
    cn = comp.donor_count
    d = ec.d_electrons
    where = f"{cn}-coordinate {ec.label}" + ("" if d is not None else " (no d-count)")
    note = _site_note(comp)
    usual = USUAL_SHAPES.get((cn, d if d is not None else _ANY)) or USUAL_SHAPES.get((cn, _ANY))
    if usual:
        sym, why, alts = usual
        return sym, f"{sym}: {where}; {why}{note}", alts
    g = rules.default_geometry(cn)
    reason = f"{g.symbol}: the default {g.name} for coordination number {cn}"
    alts = tuple(sorted(s for s, geo in rules.geometries.items() if geo.coordination_number == cn and s != g.symbol))
    return g.symbol, reason + f" ({ec.label}){note}; alternatives: {', '.join(alts) or 'none'}", alts


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
        The requested symbol is not a known geometry.
    """
    if comp.metal == "M":
        if symbol:
            g = rules.geometry(symbol)
            return g.symbol, f"{g.symbol} as requested"
        g = rules.default_geometry(comp.donor_count)
        return g.symbol, (
            f"{g.symbol}: the default {g.name} for coordination number {comp.donor_count} "
            "(an abstract centre has no d-electron count; use --geometry to choose another)"
        )
    sym, reason, _ = default_geometry(comp, rules)
    if symbol:
        g = rules.geometry(symbol)
        if g.symbol == sym:
            return g.symbol, f"{g.symbol} as requested (also the default: {reason.partition(': ')[2]})"
        return g.symbol, f"{g.symbol} as requested (the default would be {sym})"
    return sym, reason
