"""Chemistry of the metal centre: oxidation state, d-electron count,
valence-electron count (the 18-electron rule) and the default geometry.

Both textbook electron counts are made from the catalogue data of each
ligand (see ``rules/ligands.toml``):

* ionic count: oxidation state = overall charge - sum of ligand charges;
  d-electron count = group number - oxidation state; valence electrons =
  d-count + electrons donated in the ionic model;
* covalent (neutral-ligand) count: valence electrons = group number -
  overall charge + electrons donated in the covalent model.

The two must agree (the catalogue checks ionic - covalent = -charge for
every ligand).  A linear nitrosyl is NO+ (3 electrons, covalent), a bent one
NO- (1 electron); write ``NO`` or ``NObent``.  Nitrosyl complexes also get
the Enemark–Feltham notation {MNO}n, where n is the number of metal d
electrons plus NO π* electrons, i.e. the d-count with every NO taken as
NO+ (J. H. Enemark, R. D. Feltham, *Coord. Chem. Rev.* 13 (1974) 339).

The group number and the block come from the atomic number (RDKit's
periodic table); nothing per element is typed in.

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.condensed import parse_condensed
>>> rs = load_rules()
>>> ec = count_electrons(parse_condensed("[Fe(CN)5(NO)]2-", rs))
>>> ec.oxidation_state, ec.d_electrons, ec.valence_electrons, ec.enemark_feltham
(2, 6, 18, '{FeNO}6')
>>> choose_geometry(parse_condensed("[PtCl2(NH3)2]", rs), rs, None)[0]
'SP-4'
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any

from enumerator.errors import InputError
from enumerator.model.composition import Composition
from enumerator.model.elements import atomic_number, group_of
from enumerator.rules.ruleset import RuleSet

__all__ = [
    "ElectronCount",
    "CentreAnalysis",
    "count_electrons",
    "choose_geometry",
    "default_geometry",
    "group_of",
    "roman",
    "stage",
]


def roman(n: int) -> str:
    """Oxidation state as the Stock number: 2 -> 'II', 0 -> '0', -1 -> '-I'."""
    if n == 0:
        return "0"
    vals = ((10, "X"), (9, "IX"), (5, "V"), (4, "IV"), (1, "I"))
    k, out = abs(n), ""
    for v, s in vals:
        while k >= v:
            out += s
            k -= v
    return ("-" if n < 0 else "") + out


@dataclass(frozen=True)
class ElectronCount:
    """Both electron counts of one mononuclear centre."""

    metal: str
    atomic_number: int
    group: int | None
    block: str
    charge: int
    oxidation_state: int | None
    d_electrons: int | None
    valence_electrons: int | None  # covalent count (equals the ionic count)
    valence_electrons_ionic: int | None
    ligands: tuple[tuple[str, int, int, int, int, int | None], ...]  # name, count, charge, e_cov, e_ion, hapticity
    nitrosyls: tuple[tuple[str, int, str], ...] = ()  # name, count, 'linear'|'bent'
    enemark_feltham: str | None = None
    notes: tuple[str, ...] = ()

    @property
    def label(self) -> str:
        """E.g. 'Ru(II), d6'."""
        if self.oxidation_state is None:
            return self.metal
        s = f"{self.metal}({roman(self.oxidation_state)})"
        if self.d_electrons is not None:
            s += f", d{self.d_electrons}"
        return s


def count_electrons(comp: Composition) -> ElectronCount:
    """Oxidation state, d-count and valence electrons of a real composition."""

    z = atomic_number(comp.metal) or None
    if z is None:
        raise InputError(
            f"'{comp.metal}' is not an element symbol", "write the metal as in the periodic table, e.g. Ru"
        )
    group, block = group_of(z)
    rows = []
    known = True
    nitrosyls = []
    for kind, n in comp.parts:
        m = kind.info_dict()
        if "charge" not in m:
            known = False
            continue
        rows.append(
            (
                kind.name,
                n,
                int(m["charge"]),
                int(m["electrons_covalent"]),
                int(m["electrons_ionic"]),
                m.get("hapticity"),
            )
        )
        if m.get("nitrosyl"):
            nitrosyls.append((kind.name, n, str(m["nitrosyl"])))
    notes: list[str] = []
    if not known:
        return ElectronCount(
            comp.metal,
            z,
            group,
            block,
            comp.charge,
            None,
            None,
            None,
            None,
            tuple(rows),
            notes=("some ligands carry no catalogue data, so the centre is not counted",),
        )
    os_ = comp.charge - sum(q * n for _, n, q, _, _, _ in rows)
    d = ve = ve_ion = None
    ef = None
    if block == "d" and group is not None:
        d = group - os_
        if d < 0:
            notes.append(
                f"oxidation state {os_:+d} exceeds the group number {group}: check the overall charge and the ligand choice"
            )
            d = None
        else:
            ve = group - comp.charge + sum(ec * n for _, n, _, ec, _, _ in rows)
            ve_ion = d + sum(ei * n for _, n, _, _, ei, _ in rows)
            if nitrosyls:
                bent = sum(n for _, n, b in nitrosyls if b == "bent")
                total = sum(n for _, n, _ in nitrosyls)
                nef = d + 2 * bent
                ef = f"{{{comp.metal}NO}}{nef}" if total == 1 else f"{{{comp.metal}(NO){total}}}{nef}"
    else:
        notes.append(f"{comp.metal} is a {block}-block element: no d-electron count or 18-electron rule is applied")
    return ElectronCount(
        comp.metal, z, group, block, comp.charge, os_, d, ve, ve_ion, tuple(rows), tuple(nitrosyls), ef, tuple(notes)
    )


def _abstract_reason(comp: Composition, rules: RuleSet) -> tuple[str, str]:
    g = rules.default_geometry(comp.donor_count)
    return g.symbol, f"{g.symbol}: the default {g.name} for coordination number {comp.donor_count}"


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
    """The default geometry for a real centre: (symbol, reason, alternatives)."""
    ec = ec or count_electrons(comp)
    cn = comp.donor_count
    d = ec.d_electrons
    where = f"{cn}-coordinate {ec.label}" + ("" if d is not None else " (no d-count)")
    note = _site_note(comp)
    have = rules.geometries
    if cn == 4:
        if d == 8:
            return (
                "SP-4",
                (
                    f"SP-4: {where}; four-coordinate d8 centres (Rh(I), Ir(I), Ni(II), Pd(II), Pt(II), Au(III)) are usually square planar; "
                    f"T-4 is the alternative (e.g. [NiCl4]2- with weak-field ligands){note}"
                ),
                ("T-4",),
            )
        if d == 10:
            return "T-4", f"T-4: {where}; four-coordinate d10 centres are tetrahedral (e.g. [Ni(CO)4]){note}", ("SP-4",)
        if d == 9:
            return (
                "T-4",
                (
                    f"T-4: {where}; d9 (e.g. Cu(II)) is often square planar or flattened, so check SP-4 (--geometry SP-4){note}"
                ),
                ("SP-4",),
            )
        return "T-4", f"T-4: {where}; tetrahedral is the usual four-coordinate shape away from d8{note}", ("SP-4",)
    if cn == 5:
        return (
            "TBPY-5",
            (
                f"TBPY-5: {where}; five-coordinate centres default to the trigonal bipyramid; "
                f"SPY-5 is the alternative (--geometry SPY-5) and the two often interconvert (Berry pseudorotation){note}"
            ),
            ("SPY-5",),
        )
    if cn == 6:
        return (
            "OC-6",
            f"OC-6: {where}; six-coordinate centres are octahedral; TPR-6 is the rare alternative{note}",
            ("TPR-6",),
        )
    if cn == 2:
        return "L-2", f"L-2: {where}; two-coordinate centres (e.g. d10 Ag(I), Au(I)) are linear{note}", ()
    if cn == 3:
        return (
            "TP-3",
            (
                f"TP-3: {where}; three-coordinate centres default to the trigonal plane; "
                f"TS-3 (T-shape, e.g. 14-electron d8 fragments) is the alternative (--geometry TS-3){note}"
            ),
            ("TS-3",),
        )
    sym, reason = _abstract_reason(comp, rules)
    alts = tuple(sorted(g for g, geo in have.items() if geo.coordination_number == cn and g != sym))
    return sym, reason + f" ({ec.label}){note}; alternatives: {', '.join(alts) or 'none'}", alts


def choose_geometry(comp: Composition, rules: RuleSet, symbol: str | None) -> tuple[str, str]:
    """(symbol, reason): the requested geometry, else the default from the
    coordination number and the d-electron count."""
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


@dataclass(frozen=True)
class CentreAnalysis:
    """The centre's electron counts and the geometry choice, for the renderers."""

    count: ElectronCount
    geometry: str
    geometry_reason: str
    alternatives: tuple[str, ...] = ()
    sites: int = 0
    notes: tuple[str, ...] = field(default=())

    def isomer_json(self, isomer_id: str) -> Mapping[str, Any]:
        return {}

    def top_json(self) -> Mapping[str, Any]:
        c = self.count
        return {
            "centre": {
                "metal": c.metal,
                "atomic_number": c.atomic_number,
                "group": c.group,
                "block": c.block,
                "charge": c.charge,
                "oxidation_state": c.oxidation_state,
                "d_electrons": c.d_electrons,
                "valence_electrons": c.valence_electrons,
                "valence_electrons_covalent": c.valence_electrons,
                "valence_electrons_ionic": c.valence_electrons_ionic,
                "electron_count": [
                    {
                        "ligand": name,
                        "count": n,
                        "charge": q,
                        "electrons_covalent": ec,
                        "electrons_ionic": ei,
                        **({"hapticity": h} if h else {}),
                    }
                    for name, n, q, ec, ei, h in c.ligands
                ],
                "nitrosyls": [{"ligand": name, "count": n, "binding": b} for name, n, b in c.nitrosyls],
                "enemark_feltham": c.enemark_feltham,
                "coordination_sites": self.sites,
                "geometry": self.geometry,
                "geometry_reason": self.geometry_reason,
                "geometry_alternatives": list(self.alternatives),
                "notes": list(self.notes),
            }
        }


def _notes(comp: Composition, c: ElectronCount, geometry: str) -> tuple[str, ...]:
    notes = list(c.notes)
    if any(k.ring for k in comp.kinds):
        notes.append(
            "point groups are those of the site idealisation (an η-ring as three facial sites); "
            "the full molecular symmetry of the ring is not represented"
        )
    linear = [name for name, _, b in c.nitrosyls if b == "linear"]
    if linear and c.enemark_feltham and geometry == "OC-6":
        n = int(c.enemark_feltham.rpartition("}")[2])
        if n >= 7 and len(c.nitrosyls) == 1:
            notes.append(
                f"Enemark–Feltham: six-coordinate {c.enemark_feltham} nitrosyls are usually bent; "
                f"if this one is, write NObent for {linear[0]} (the isomers are the same, the counts change)"
            )
    if c.valence_electrons is not None and c.valence_electrons > 18 and linear:
        notes.append(
            "more than 18 valence electrons with a linear nitrosyl: a bent NO (NObent) may be the better description"
        )
    return tuple(notes)


def stage(res, req) -> CentreAnalysis | None:
    """Pipeline stage: the centre of a real (catalogue) composition."""
    comp = res.composition
    if comp.metal == "M":
        return None
    c = count_electrons(comp)
    rules_ = None
    try:
        from enumerator.rules.ruleset import load_rules

        rules_ = load_rules(req.rules)
        _, _, alts = default_geometry(comp, rules_, c)
    except InputError:
        alts = ()
    return CentreAnalysis(
        count=c,
        geometry=res.geometry.symbol,
        geometry_reason=res.geometry_reason,
        alternatives=alts,
        sites=comp.donor_count,
        notes=_notes(comp, c, res.geometry.symbol),
    )
