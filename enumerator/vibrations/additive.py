"""The additive ligand-effect force field: stretching constants from the metal, the charge and the ligands.

The method is that of J. A. Timney, *Inorg. Chem.* 18 (1979) 2502, for
energy-factored CO force constants: the constant of a carbonyl is that of an
isolated M–CO unit with the metal's d count, plus one additive effect
ε_L(θ) for every other ligand L at angle θ to it, plus a term for the charge;
the interaction constant of two carbonyls follows from an empirical relation
with the angle between them and their stretching constants.  Here it is
extended to every reporter class (terminal CN, linear and bent NO, CS, CNR,
N2), each with parameters of its own, and written for one oscillator a of
class c on a centre of charge z and d count d:

    k_a = k0[c] + d[c, d] + q[c]·z + q2[c]·z² + qd[c, d]·z + ox[c]·(oxidation state) + row[c, 4|5]
          + phase[c, medium] + Σ_{b ≠ a, reporter} ε_b(θ_ab) + (1 + sd[c, d]) · Σ_{b ≠ a, other} ε_b(θ_ab)

    ε_b(θ) = fa[c, F_b] + fb[c, F_b]·cos θ + ea[c, G_b] + eb[c, G_b]·cos θ + la[c, L_b] + lb[c, L_b]·cos θ

    F_ab = ia[c] + ib[c]·cos θ_ab + ir[c, 4|5] + iq[c]·z + io[c]·(oxidation state) + ig[c]·(k_ref[c] − (k_a + k_b)/2)

where the sum runs over every other occupied site b (a chelate counts once per
donor site, an η-ring once), L_b is the ligand there, G_b its group and F_b
the group's family (``rules/bandgroups.toml``; a reporter ligand's group is
its own class, and it has no family). The linear-in-cos θ form of ε_L(θ) takes
Timney's cis and trans effects as its values at 90° and 180° and interpolates
between them (120° of a trigonal bipyramid, 109.5° of a tetrahedron). ``row``
is an offset for 4d and 5d metals (``ir`` its counterpart in the
interactions), ``io`` a term of the interaction constants in the metal's
oxidation state (the band spread of the oxidised carbonyl halides M(CO)5X,
[M(CO)2I2]-, CpFe(CO)2X and fac-M(CO)3(bpy)X was predicted too narrow with
the charge alone: their top band low, their lowest high; leave-one-complex-out
MAE of neutral carbonyls 13.8 -> 13.0 cm-1, charged 23.2 -> 22.5, cyanides
12.1 -> 12.4, measured 2026-12-03), ``qd`` lets the charge act differently on each d count (the d10
and d6 isoelectronic series are not spaced alike), ``ox`` is a term in the
metal's oxidation state (a neutral Au(I) carbonyl behaves like the cationic
Cu(I) one, not like Ni(0)), ``phase`` an offset for gas-phase and matrix
spectra (the model predicts condensed-phase, solution values); ``sd`` is the
sensitivity of a d count to the ligands, relative to d6 (:data:`REFERENCE_D`,
sd = 0 by definition; a d6 metal passes a ligand's donor/acceptor character on
to its carbonyls more strongly than a d10 one: the fac-Mo(CO)3L3 series spans
220 cm-1 where the Ni(CO)3L series spans 55); it scales the effects of the
substituent ligands, not the reporters' effect on one another
(:func:`is_ligand_term`). The ligand terms la, lb are
fitted with ridge regularisation toward zero, i.e. toward the ligand's group,
the group terms ea, eb toward the family: a ligand without fitted terms of its
own falls back to its group, a group never fitted for a class to its family,
and a family never fitted to no effect (the generic value). The parameters are
data: ``rules/bandmodel.toml``, fitted by
:mod:`enumerator.vibrations.calibrate` on the measured set ``rules/measured``.

:func:`build_design` turns an isomer into the linear description of its
stretching constants (cached by value); :func:`f_matrix` gives F for any
parameter values; :func:`coverage` says which ligands fall back.

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.formula import parse_formula
>>> from enumerator.isomers.enumeration import enumerate_isomers
>>> rules = load_rules()
>>> comp = parse_formula("[Cr(CO)6]", rules)
>>> iso = enumerate_isomers(comp, rules.geometry("OC-6")).isomers[0]
>>> d = build_design(iso, centre_of(comp), "CO")
>>> d.pclass, len(d.sites), [n for n, _ in d.terms[0][:3]]
('CO', 6, ['k0:CO', 'd:CO:6', 'ea:CO:CO'])
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np

from enumerator.analyses.centre.electrons import count_electrons
from enumerator.caches import cached
from enumerator.errors import IsosieveError
from enumerator.frozen import frozen_dataclass
from enumerator.isomers.enumeration import Isomer
from enumerator.model.composition import Composition
from enumerator.model.elements import atomic_number
from enumerator.rules.bandmodel import RING_ALKYL, BandModelRules, load_families, load_groups, load_substituents

__all__ = [
    "Centre",
    "Design",
    "Coverage",
    "centre_of",
    "parameter_class",
    "build_design",
    "stretching_constants",
    "f_matrix",
    "coverage",
    "category",
    "CONDENSED",
]

#: A band category with fewer cross-validated bands than this keeps the generic constants (too little data).
MIN_CLASS_BANDS = 5

#: Media whose spectra the model predicts without a phase term (solutions, mulls, solids, liquefied gases).
CONDENSED = "condensed"
_PHASES = {"gas": "gas", "matrix": "matrix"}


@frozen_dataclass
class Centre:
    """What the model needs of the metal: symbol, complex charge, d count (None when unknown), row 3/4/5."""

    metal: str
    charge: int
    d: int | None
    row: int
    oxidation_state: int | None = None


def centre_of(comp: Composition) -> Centre | None:
    """The centre of a real composition, or None for the abstract letters (metal 'M').

    Parameters
    ----------
    comp : Composition

    Returns
    -------
    Centre or None
    """
    if comp.metal == "M":
        return None
    return _centre(comp)


@cached(maxsize=512)
def _centre(comp: Composition) -> Centre | None:
    try:
        z = atomic_number(comp.metal)
    except IsosieveError:
        return None
    try:
        ec = count_electrons(comp)
        d, ox = ec.d_electrons, ec.oxidation_state
    except IsosieveError:
        d, ox = None, None
    row = 3 if z <= 30 else (4 if z <= 48 else 5)
    return Centre(comp.metal, comp.charge, d, row, ox)


def parameter_class(reporter_class: str, ligand: str, nitrosyl: str | None = None) -> str:
    """The parameter class of an oscillator: its reporter class, with nitrosyls split into linear and bent.

    Parameters
    ----------
    reporter_class : str
        The solver's class ('CO', 'NO', 'NObent', ...).
    ligand : str
        The catalogue ligand at the site.
    nitrosyl : str, optional
        'bent' or 'linear' when the structure is known (a measured row's
        ``nitrosyl``); otherwise the catalogue ligand decides (NObent is bent).

    Returns
    -------
    str
    """
    if reporter_class in ("NO", "NObent"):
        if nitrosyl == "bent" or (nitrosyl is None and (ligand == "NObent" or reporter_class == "NObent")):
            return "NObent"
        return "NO"
    return reporter_class


def category(pclass: str, charge: int) -> str:
    """The band category of the validation figures and of sigma: 'CO neutral', 'CO charged', 'NO linear', ...

    Parameters
    ----------
    pclass : str
        Parameter class.
    charge : int
        Charge of the complex.

    Returns
    -------
    str
    """
    if pclass == "CO":
        return "CO neutral" if charge == 0 else "CO charged"
    if pclass == "NO":
        return "NO linear"
    if pclass == "NObent":
        return "NO bent"
    return pclass


@frozen_dataclass
class Design:
    """The stretching constants of one reporter class on one isomer as a linear function of the parameters.

    ``sites`` are the oscillators' sites (0-based, ascending, the order of the
    solver's model); ``terms[a]`` the (parameter name, coefficient) pairs whose
    sum is k_a; ``pairs`` (a, b, cos θ_ab) for a < b; ``neighbours`` the
    (ligand, group) of every non-reporter ligand on the other sites, sorted.
    """

    reporter_class: str
    pclass: str
    charge: int
    sites: tuple[int, ...]
    terms: tuple[tuple[tuple[str, float], ...], ...]
    pairs: tuple[tuple[int, int, float], ...]
    neighbours: tuple[tuple[str, str | None], ...]
    #: (parameter name, coefficient) terms added to every pair's interaction (row and charge terms)
    pair_terms: tuple[tuple[str, float], ...] = ()
    #: the parameter s whose (1 + s) multiplies every ligand effect (one per class and d count), or None
    scale: str | None = None

    @property
    def names(self) -> tuple[str, ...]:
        """Every parameter name the design uses, sorted."""
        out = {n for t in self.terms for n, _ in t}
        c = self.pclass
        if self.pairs:
            out |= {f"ia:{c}", f"ib:{c}", f"ig:{c}"} | {n for n, _ in self.pair_terms}
        if self.scale:
            out.add(self.scale)
        return tuple(sorted(out))


#: The d count whose sensitivity to the ligands is 1 by definition (the octahedral d6 carbonyls and cyanides, the
#: best-covered); the ligand effects are in its units, and a d count without a fitted sensitivity falls back to it.
REFERENCE_D = 6

#: Parameter kinds of the ligand effects, the part of k_a that the sensitivity (1 + s[c, d]) multiplies.
LIGAND_KINDS = frozenset({"ea", "eb", "la", "lb", "fa", "fb", "sa", "sb"})

#: The parameter classes; as a neighbour each is a group of its own (``ea:CO:CO`` is a carbonyl's effect on a
#: carbonyl), and that group's effect is not scaled by the sensitivity (see :func:`is_ligand_term`).
PARAMETER_CLASSES = frozenset({"CO", "CN", "NO", "NObent", "CS", "CNR", "N2"})


def is_ligand_term(name: str) -> bool:
    """Whether a parameter name is a ligand effect scaled by the sensitivity (1 + sd) of the class and d count.

    Every ligand effect is, except the effect of a reporter ligand (``ea``/``eb`` of a group that is a parameter
    class: CO on CO, CN on NO ...).  The sensitivity says how strongly a d count passes a *substituent's* donor /
    acceptor character on to the reporters; the reporters' effect on one another is the frame the substituents
    are measured against (Timney's effects are changes on replacing a carbonyl), and scaling it too would tie the
    sensitivity to the coordination number of the homoleptic ions (two to six carbonyls on d10 centres) instead of
    to the substituents.  Measured by leave-one-complex-out validation on 2026-12-03: MAE of neutral carbonyls
    13.9 -> 13.6 cm-1, cyanides 12.9 -> 12.1, charged carbonyls unchanged (22.9).
    """
    kind, _, rest = name.partition(":")
    if kind in ("ea", "eb") and rest.split(":")[-1] in PARAMETER_CLASSES:
        return False
    return kind in LIGAND_KINDS


def _site_pclass(site: object, nitrosyls: Mapping[str, str]) -> str | None:
    rep = getattr(site, "reporter", None)
    if not rep:
        return None
    lig = getattr(site, "ligand", "")
    return parameter_class(rep, lig, nitrosyls.get(lig))


def build_design(
    isomer: Isomer,
    centre: Centre,
    reporter_class: str,
    *,
    nitrosyl: str | None = None,
    phase: str = CONDENSED,
    groups: Mapping[str, str] | None = None,
    families: Mapping[str, str] | None = None,
    substituents: Mapping[str, tuple[tuple[str, int], ...]] | None = None,
) -> Design:
    """The additive description of one reporter class's stretching constants on one isomer.

    Parameters
    ----------
    isomer : Isomer
    centre : Centre
        Metal, charge, d count and row (:func:`centre_of`).
    reporter_class : str
        The class as the solver names it ('CO', 'NO', ...).
    nitrosyl : str, optional
        'linear' or 'bent' for the NO ligands of a complex whose nitrosyl
        structure is known (default: the catalogue ligand decides).
    phase : str
        'gas', 'matrix' or :data:`CONDENSED` (default).
    groups : Mapping[str, str], optional
        Ligand -> group (default: ``rules/bandgroups.toml``).
    families : Mapping[str, str], optional
        Group -> family (default: ``rules/bandgroups.toml``).
    substituents : Mapping, optional
        Phosphorus ligand -> ((substituent, count), ...) (default: ``rules/bandgroups.toml``).

    Returns
    -------
    Design
        Cached by value.
    """
    g = groups if groups is not None else load_groups()[0]
    f = families if families is not None else load_families()
    sub = substituents if substituents is not None else load_substituents()
    return _design(
        isomer,
        centre,
        reporter_class,
        nitrosyl,
        phase,
        tuple(sorted(g.items())),
        tuple(sorted(f.items())),
        tuple(sorted(sub.items())),
    )


def _oscillator_terms(centre: Centre, c: str, phase: str) -> list[tuple[str, float]]:
    t: list[tuple[str, float]] = [(f"k0:{c}", 1.0)]
    if centre.d is not None:
        t.append((f"d:{c}:{centre.d}", 1.0))
    z = float(centre.charge)
    if z:
        t += [(f"q:{c}", z), (f"q2:{c}", z * z)]
        if centre.d is not None:
            t.append((f"qd:{c}:{centre.d}", z))
    if centre.oxidation_state:
        t.append((f"ox:{c}", float(centre.oxidation_state)))
    if centre.row > 3:
        t.append((f"row:{c}:{centre.row}", 1.0))
    if phase in _PHASES:
        t.append((f"phase:{c}:{_PHASES[phase]}", 1.0))
    return t


@cached(maxsize=2048)
def _design(
    isomer: Isomer,
    centre: Centre,
    reporter_class: str,
    nitrosyl: str | None,
    phase: str,
    group_items: tuple[tuple[str, str], ...],
    family_items: tuple[tuple[str, str], ...] = (),
    substituent_items: tuple[tuple[str, tuple[tuple[str, int], ...]], ...] = (),
) -> Design:
    groups = dict(group_items)
    families = dict(family_items)
    subs = dict(substituent_items)
    nitro = {s.ligand: nitrosyl for s in isomer.sites if nitrosyl and s.reporter in ("NO", "NObent")}
    want = reporter_class.lower()
    osc = sorted((s for s in isomer.sites if s.reporter and s.reporter.lower() == want), key=lambda s: s.index)
    vec = {s.index: np.array(isomer.geometry.vectors[s.index], dtype=float) for s in isomer.sites}
    pclass = _site_pclass(osc[0], nitro) if osc else reporter_class
    c = pclass or reporter_class
    terms = []
    for s in osc:
        t = _oscillator_terms(centre, c, phase)
        for o in sorted(isomer.sites, key=lambda x: x.index):
            if o.index == s.index:
                continue
            cos = float(np.dot(vec[s.index], vec[o.index]))
            cos = round(cos, 12) + 0.0
            t += _neighbour_terms(c, o.ligand, _site_pclass(o, nitro), cos, groups, families, subs)
        terms.append(tuple(_merge(t)))
    pairs = tuple(
        (a, b, round(float(np.dot(vec[osc[a].index], vec[osc[b].index])), 12) + 0.0)
        for a in range(len(osc))
        for b in range(a + 1, len(osc))
    )
    neighbours = tuple(sorted({(s.ligand, groups.get(s.ligand)) for s in isomer.sites if not s.reporter}, key=str))
    pair_terms = _pair_terms(centre, c) if pairs else []
    return Design(
        reporter_class,
        c,
        centre.charge,
        tuple(s.index for s in osc),
        tuple(terms),
        pairs,
        neighbours,
        tuple(pair_terms),
        f"sd:{c}:{centre.d}" if centre.d is not None and centre.d != REFERENCE_D else None,
    )


def _neighbour_terms(
    c: str,
    ligand: str,
    other: str | None,
    cos: float,
    groups: Mapping[str, str],
    families: Mapping[str, str],
    subs: Mapping[str, tuple[tuple[str, int], ...]],
) -> list[tuple[str, float]]:
    """ε of one neighbour at cos θ: its group's (a reporter's class) terms, its family's, its own, its substituents'.

    A phosphorus ligand's substituents enter with weight count/3 (Tolman's additivity); the alkyl groups of an
    η-ring with weight count (Cp* = Cp + 5 alkyls).
    """
    t: list[tuple[str, float]] = []
    grp = other if other is not None else groups.get(ligand)
    if grp is not None:
        t += [(f"ea:{c}:{grp}", 1.0), (f"eb:{c}:{grp}", cos)]
        if other is None and grp in families:
            t += [(f"fa:{c}:{families[grp]}", 1.0), (f"fb:{c}:{families[grp]}", cos)]
    if other is None:
        t += [(f"la:{c}:{ligand}", 1.0), (f"lb:{c}:{ligand}", cos)]
        for x, n in subs.get(ligand, ()):
            w = float(n) if x == RING_ALKYL else n / 3.0  # a ring's alkyls each count once; P's three share
            t += [(f"sa:{c}:{x}", w), (f"sb:{c}:{x}", w * cos)]
    return t


def _pair_terms(centre: Centre, c: str) -> list[tuple[str, float]]:
    """The terms every interaction constant of class ``c`` shares: a 4d/5d row offset, one linear in charge and
    one linear in the metal's oxidation state (``io``, see the module guide)."""
    out: list[tuple[str, float]] = []
    if centre.row > 3:
        out.append((f"ir:{c}:{centre.row}", 1.0))
    if centre.charge:
        out.append((f"iq:{c}", float(centre.charge)))
    if centre.oxidation_state:
        out.append((f"io:{c}", float(centre.oxidation_state)))
    return out


def _merge(terms: list[tuple[str, float]]) -> list[tuple[str, float]]:
    """Add up the coefficients of repeated names, keeping first-seen order."""
    out: dict[str, float] = {}
    for n, v in terms:
        out[n] = out.get(n, 0.0) + v
    return list(out.items())


def stretching_constants(design: Design, values: Mapping[str, float]) -> np.ndarray:
    """The stretching constants k_a (mdyn/Å); a name without a value counts as 0 (see :func:`coverage`).

    Parameters
    ----------
    design : Design
    values : Mapping[str, float]
        Parameter name -> value.

    Returns
    -------
    numpy.ndarray
    """
    g = 1.0 + float(values.get(design.scale, 0.0)) if design.scale else 1.0
    return np.array(
        [sum(v * float(values.get(n, 0.0)) * (g if is_ligand_term(n) else 1.0) for n, v in t) for t in design.terms]
    )


def f_matrix(design: Design, values: Mapping[str, float], k_ref: float) -> np.ndarray:
    """The F matrix (mdyn/Å) over the design's oscillators.

    Parameters
    ----------
    design : Design
    values : Mapping[str, float]
        Parameter name -> value (missing names count as 0).
    k_ref : float
        The class's reference stretching constant (the interaction relation's centre).

    Returns
    -------
    numpy.ndarray
    """
    k = stretching_constants(design, values)
    f = np.diag(k)
    c = design.pclass
    ia, ib, ig = (float(values.get(f"{x}:{c}", 0.0)) for x in ("ia", "ib", "ig"))
    extra = sum(v * float(values.get(n, 0.0)) for n, v in design.pair_terms)
    for a, b, cos in design.pairs:
        f[a, b] = f[b, a] = ia + ib * cos + extra + ig * (k_ref - 0.5 * (k[a] + k[b]))
    return f


@frozen_dataclass
class Coverage:
    """Which parts of a design have fitted parameters.

    ``usable`` is False when the class itself was never fitted (then the
    generic constants apply); ``group`` lists the ligands that fall back to
    their group, ``generic`` those with no fitted effect at all; ``notes``
    says so in words; ``widen`` is the factor for sigma.
    """

    usable: bool
    group: tuple[str, ...]
    generic: tuple[str, ...]
    notes: tuple[str, ...]
    widen: float


def _neighbour_levels(design: Design, rules: BandModelRules) -> tuple[list[str], list[str], list[str]]:
    """The neighbour ligands that fall back to their group, to their family, or to no effect at all."""
    p, c = rules.parameters, design.pclass
    group, family, generic = [], [], []
    for lig, grp in design.neighbours:
        if f"la:{c}:{lig}" in p:
            continue
        if grp is not None and f"ea:{c}:{grp}" in p:
            group.append(lig)
        elif grp is not None and f"fa:{c}:{rules.families.get(grp)}" in p:
            family.append(lig)
        else:
            generic.append(lig)
    neighbour_groups = {grp for _, grp in design.neighbours}
    for n in design.names:
        if n.startswith("ea:") and n not in p and n.split(":")[2] not in neighbour_groups:
            generic.append(n.split(":")[2])  # another reporter class next to this one
    return group, family, generic


def coverage(design: Design, rules: BandModelRules) -> Coverage:
    """Which ligands of a design fall back, with the notes and the sigma factor.

    Parameters
    ----------
    design : Design
    rules : BandModelRules
        The fitted parameters and widening factors.

    Returns
    -------
    Coverage
    """
    p = rules.parameters
    c = design.pclass
    if f"k0:{c}" not in p:
        return Coverage(False, (), (), (f"the band model has no fitted {c} parameters",), 1.0)
    cat = category(c, design.charge)
    n_cv = int(rules.cv.get("additive", {}).get(cat, {}).get("n", 0))
    if n_cv < MIN_CLASS_BANDS:
        return Coverage(
            False, (), (), (f"only {n_cv} cross-validated {cat} band(s), too few to use the band model",), 1.0
        )
    names = set(design.names)
    group, family, generic = _neighbour_levels(design, rules)
    notes = []
    if group:
        notes.append(
            f"{', '.join(group)}: no {c} parameters of its own in the band model; "
            f"its group's values (and its substituents', where fitted) are used "
            f"(sigma widened x{rules.widen['group']:.2g})"
        )
    if family:
        notes.append(
            f"{', '.join(family)}: neither it nor its group has fitted {c} parameters; its ligand family's "
            f"values are used (sigma widened x{rules.widen['generic']:.2g})"
        )
    if generic:
        notes.append(
            f"{', '.join(sorted(set(generic)))}: neither it nor its group has fitted {c} parameters; "
            f"no ligand effect is added (generic value, sigma widened x{rules.widen['generic']:.2g})"
        )
    generic += family
    for kind, what in (("d", "d count"), ("row", "metal row")):
        missing = [n for n in names if n.startswith(f"{kind}:") and n not in p]
        if missing:
            notes.append(f"no fitted {c} term for this {what} ({missing[0].rsplit(':', 1)[1]}): the base value is used")
            generic.append(f"{what} {missing[0].rsplit(':', 1)[1]}")
    widen = rules.widen["generic"] if generic else (rules.widen["group"] if group else 1.0)
    return Coverage(True, tuple(group), tuple(sorted(set(generic))), tuple(notes), widen)
