"""IUPAC stereodescriptors of coordination centres: polyhedral symbol,
configuration index and chirality symbol (Nomenclature of Inorganic
Chemistry, IUPAC Recommendations 2005, the "Red Book", section IR-9.3).

A descriptor is computed, never looked up.  :func:`describe_isomer` ranks
the ligating atoms (:mod:`enumerator.analyses.cip`: CIP rules for catalogue ligands,
letter order a > b > c ... for abstract ones), then applies the rule of the
polyhedron.  Priority numbers are written 1, 2, 3 ...; primed numbers
(1', 1'') come from the priming convention (below) and rank 1 > 1' > 1'' > 2.

Configuration index (IR-9.3.3), as applied here.  The rules were checked
against the printed text of IR-9.3.3 and IR-9.3.4; where the book is
silent the completion used here is marked "(completion)".

* **TS-3** (IR-9.3.3.7): one digit, the atom on the stem of the T.
* **SP-4** (IR-9.3.3.3): one digit, the priority number of the atom trans
  to the priority-1 atom; where several atoms have priority 1, the largest
  such number (the "highest numerical value" rule of IR-9.3.3.4, applied
  alike).  trans-[PtCl2(NCMe)(py)] is SP-4-1.
* **SS-4** (IR-9.3.3.8): two digits, the atoms separated by the largest
  angle, the lower first.
* **OC-6** (IR-9.3.3.4): two digits.  The first is the priority number of
  the atom trans to the priority-1 atom, the largest one where several
  atoms have priority 1; these two define the reference axis.  The second
  is the largest priority number trans to a highest-priority atom of the
  plane perpendicular to that axis (IR-9.3.4.8, Example 5: OC-6-24).  Where
  several axes give the same first digit, the one giving the larger second
  digit is taken (completion).  fac-[Co(NH3)3(NO2)3] is OC-6-22, mer OC-6-21.
* **SPY-5** (IR-9.3.3.5): the apical atom's priority number, then the
  largest number trans to a highest-priority basal atom.
* **TBPY-5, PBPY-7, HBPY-8** (IR-9.3.3.6): the priority numbers of the
  two atoms on the principal axis, the lower first; for PBPY-7 and HBPY-8
  a second segment, after a hyphen: the equatorial atoms from the
  lowest-numbered one round the ring in the direction giving the lower
  sequence (PBPY-7-34-12342, not 12432).
* **T-4**: no index; the chirality symbol R or S (IR-9.3.4.2) is given
  from the CIP priorities: viewed with the lowest-priority atom pointing
  away, 1 -> 2 -> 3 clockwise is R (checked against RDKit's CIP labeller).
* **TPR-6** (IR-9.3.4.9): the preferred triangular face holds more of the
  highest-priority atoms (its sorted priority numbers are lowest: the
  tie-break is a completion); the index is derived from the atoms opposite
  it, cited in the order of the preferred-face atoms they eclipse, largest
  numbers first among ties (completion: the book prints no TPR-6 index).
* The other polyhedra (L-2, TP-3, HP-6, OCF-7, TPRS-7, CU-8, SAPR-8, DD-8, IC-12) get their
  polyhedral symbol only: IR-9.3.3 gives them no configuration index (an
  IUPAC Technical Report, Pure Appl. Chem. 2007, 79, 1779, treats CN 7-9;
  its rules are not implemented here).

Chirality symbols (IR-9.3.4), as applied here:

* **C/A** (IR-9.3.4.4 to IR-9.3.4.10): the centre is viewed along the
  reference axis from its higher-priority atom (OC-6: the priority-1 atom of
  the index; SPY-5: the apical atom; bipyramids: the axial atom of higher
  priority).  From *every* highest-priority atom of the perpendicular plane
  the plane is read clockwise and anticlockwise; the direction whose
  sequence of priority numbers is lower at the first point of difference
  gives the symbol: clockwise C, anticlockwise A (IR-9.3.4.8, Example 5
  is A only when both tied P atoms are tried as the start).  TPR-6: seen
  from above the preferred face, the sequence round the opposite face.
  SS-4 (IR-9.3.4.7): seen from the higher-priority atom of the
  largest-angle pair, the turn from the higher- to the lower-priority of
  the other two through the smaller angle.  Where the lowest sequence is
  reached both ways, no C/A symbol applies.
* **Δ/Λ** (IR-9.3.4.11 to IR-9.3.4.13, the skew-lines convention): two
  chelate rings are represented by the lines joining their ligating atoms.
  When these lines are skew and not orthogonal, one defines the axis of a
  helix and the other a tangent to it at their common normal; a
  right-handed helix is Δ, a left-handed one Λ.  It is given on OC-6 only
  (IR-9.3.4.1: the convention is applied to octahedral complexes), for bis-
  and tris-chelates when every pair of rings agrees; otherwise C/A.
* The descriptor carries one symbol: R/S on T-4, else Δ/Λ where the
  skew-lines convention applies, else C/A.  All are kept in the detail.

Priming convention (IR-9.3.5.1: primes mark which donor atoms belong to one
polydentate ligand; an unprimed number outranks the primed one, 2 > 2',
IR-9.3.4.8): when identical polydentate ligands would leave two
diastereomers with the same descriptor, or a chiral isomer without a
symbol, the ligating atoms of one such ligand keep their numbers, those of
the next are primed, and so on; every assignment of primes is tried and the
index chosen as above (the detailed IR-9.3.5 priming rules were not
available to check this against).

Everyday prefixes (SP-4 and OC-6): a set of two identical ligating atoms
is cis or trans, a set of three on OC-6 fac or mer, a tridentate chelate
fac or mer; one word when all sets agree ("all-cis" for three or more
sets), else the words per ligand, e.g. ``trans(a),cis(b)``.

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.abstract import parse_abstract
>>> from enumerator.isomers.enumeration import enumerate_isomers
>>> comp = parse_abstract("Ma3b3")
>>> s = enumerate_isomers(comp, load_rules().geometry("OC-6"))
>>> [(describe_isomer(i, comp).text, describe_isomer(i, comp).prefix) for i in s.isomers]
[('OC-6-22', 'fac'), ('OC-6-21', 'mer')]
"""

from __future__ import annotations

import itertools
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, replace
from functools import lru_cache
from typing import Any

import numpy as np

from enumerator.errors import InputError, IsosieveError
from enumerator.isomers.enumeration import Isomer, IsomerSet
from enumerator.model.composition import Composition
from enumerator.model.geometry import Geometry
from enumerator.workflow.result import Result

__all__ = [
    "Descriptor",
    "DescriptorAnalysis",
    "describe_isomer",
    "describe_set",
    "find_by_descriptor",
    "select_isomers",
    "descriptor_stage",
    "skew_lines_sense",
    "rs_symbol",
    "SUPPORTED",
]

Rank = tuple[int, int]  # (priority number, primes): smaller = higher priority

#: Polyhedra with a configuration-index rule here (see the module docstring).
SUPPORTED = ("TS-3", "SP-4", "SS-4", "T-4", "OC-6", "SPY-5", "TBPY-5", "PBPY-7", "HBPY-8", "TPR-6")
_BIPYRAMIDS = ("TBPY-5", "PBPY-7", "HBPY-8")
_PREFIX_GEOMETRIES = ("SP-4", "OC-6")
_SYMBOL_TEXT = {"Delta": "Δ", "Lambda": "Λ"}
#: At most this many isomers are enumerated to decide whether priming is needed.
PRIMING_SCAN = 3000
#: At most this many prime assignments are tried.
MAX_PRIMINGS = 720


@dataclass(frozen=True)
class Descriptor:
    """The IUPAC stereodescriptor of one isomer.

    ``text`` is the full descriptor ('OC-6-32-C', 'T-4-R', 'OC-6-11-Δ');
    ``priorities`` maps site index (0-based) to its priority number as
    written ('1', '2', "1'").  ``ca``, ``skew`` and ``rs`` hold every
    chirality symbol that applies; ``chirality`` the one in ``text``."""

    polyhedral_symbol: str
    configuration_index: str | None
    chirality: str | None
    prefix: str | None
    text: str
    priority_pairs: tuple[tuple[int, str], ...]
    ca: str | None = None
    skew: str | None = None
    rs: str | None = None
    primed: bool = False
    prefixes: tuple[tuple[str, str], ...] = ()
    rule: str = ""

    @property
    def priorities(self) -> dict[int, str]:
        return dict(self.priority_pairs)

    @property
    def stereo_free(self) -> str:
        """The descriptor without its chirality symbol."""
        if self.configuration_index:
            return f"{self.polyhedral_symbol}-{self.configuration_index}"
        return self.polyhedral_symbol


@dataclass(frozen=True)
class _Choice:
    key: tuple[Rank, ...]
    seqs: tuple[tuple[tuple[Rank, ...], str], ...] = ()
    #: a hyphen goes after this many digits (0: none)
    split: int = 0


def _fmt(r: Rank) -> str:
    return f"{r[0]}" + "'" * r[1]


# ---------------------------------------------------------------- geometry helpers


def _trans(g: Geometry) -> dict[int, int]:
    n = g.coordination_number
    return {i: j for i in range(n) for j in range(n) if i != j and g.relation(i, j) == "trans"}


def _vec(g: Geometry, i: int) -> np.ndarray:
    return np.array(g.vectors[i], dtype=float)


def _round(g: Geometry, view: np.ndarray, ring: Sequence[int], start: int) -> tuple[list[int], list[int]]:
    """The ring sites from ``start``, anticlockwise and clockwise as seen
    by a viewer on ``view`` looking towards the metal."""
    w = view / np.linalg.norm(view)
    b = _vec(g, start)
    e1 = b - np.dot(b, w) * w
    e1 = e1 / np.linalg.norm(e1)
    e2 = np.cross(w, e1)

    def ang(s: int) -> float:
        v = _vec(g, s)
        a = float(np.arctan2(np.dot(v, e2), np.dot(v, e1)))
        a = a % (2 * np.pi)
        return 0.0 if a > 2 * np.pi - 1e-9 or s == start else a

    acw = sorted(ring, key=lambda s: (s != start, ang(s)))
    cw = [start] + acw[1:][::-1]
    return acw, cw


def _seqs(g: Geometry, r: Mapping[int, Rank], view: np.ndarray, ring: Sequence[int], start: int, tail=None):
    acw, cw = _round(g, view, ring, start)
    out = []
    for order, sym in ((cw, "C"), (acw, "A")):
        seq = tuple(r[s] for s in order)
        if tail is not None:
            seq += tuple(r[tail[s]] for s in order)
        out.append((seq, sym))
    return tuple(out)


# ---------------------------------------------------------------- rules per polyhedron


def _sp4(g: Geometry, r: Mapping[int, Rank]) -> list[_Choice]:
    t = _trans(g)
    m = min(r.values())
    return [_Choice((r[t[a]],)) for a in r if r[a] == m]


def _oc6(g: Geometry, r: Mapping[int, Rank]) -> list[_Choice]:
    """One choice per admissible reference axis (a priority-1 atom and its
    trans partner).  The second digit is the largest number trans to any
    highest-priority atom of the plane (IR-9.3.4.8, Example 5: OC-6-24, not
    23); C/A reads the plane from every such atom (the same example is A
    only that way)."""
    t = _trans(g)
    out = []
    m1 = min(r.values())
    for a in sorted(r):
        if r[a] != m1:
            continue
        x = t[a]
        plane = [s for s in sorted(r) if s not in (a, x)]
        m2 = min(r[s] for s in plane)
        starts = [b for b in plane if r[b] == m2]
        second = max(r[t[b]] for b in starts)
        seqs = tuple(sq for b in starts for sq in _seqs(g, r, _vec(g, a), plane, b))
        out.append(_Choice((r[x], second), seqs))
    return out


def _spy5(g: Geometry, r: Mapping[int, Rank]) -> list[_Choice]:
    t = _trans(g)
    apex = next(s for s in sorted(r) if s not in t)
    basal = [s for s in sorted(r) if s != apex]
    m = min(r[s] for s in basal)
    starts = [b for b in basal if r[b] == m]
    seqs = tuple(sq for b in starts for sq in _seqs(g, r, _vec(g, apex), basal, b))
    return [_Choice((r[apex], max(r[t[b]] for b in starts)), seqs)]


def _axial_pair(g: Geometry, r: Mapping[int, Rank]):
    """The two sites of the one trans pair and their priority numbers, the
    lower first (the index of bipyramids and the see-saw); None otherwise."""
    axial = sorted(_trans(g))
    if len(axial) != 2:
        return None
    p, q = axial
    return axial, tuple(sorted((r[p], r[q])))


def _bipyramid(g: Geometry, r: Mapping[int, Rank]) -> list[_Choice]:
    pair = _axial_pair(g, r)
    if pair is None:
        return []
    axial, key = pair
    p, q = axial
    eq = [s for s in sorted(r) if s not in axial]
    m = min(r[s] for s in eq)
    top = min(r[p], r[q])
    seqs = [(a, sq) for a in axial if r[a] == top for b in eq if r[b] == m for sq in _seqs(g, r, _vec(g, a), eq, b)]
    if len(eq) == 3:  # TBPY-5: the axial pair fixes the diastereomer
        return [_Choice(key, tuple(sq for _, sq in seqs))]
    # PBPY-7, HBPY-8: the equatorial sequence follows the axial pair, read
    # from the highest-priority equatorial atom in the direction that is
    # lower at the first point of difference
    low = min(sq[0] for _, sq in seqs)
    return [_Choice(key + low, tuple(sq for _, sq in seqs if sq[0] == low), split=2)]


def _prism_faces(g: Geometry) -> tuple[tuple[int, ...], ...]:
    n = g.coordination_number
    faces = [
        t
        for t in itertools.combinations(range(n), 3)
        if all((min(a, b), max(a, b)) in g.edges for a, b in itertools.combinations(t, 2))
    ]
    return tuple(faces)


def _tpr6(g: Geometry, r: Mapping[int, Rank]) -> list[_Choice]:
    """IR-9.3.4.9: the preferred triangular face holds more of the
    highest-priority atoms (here: its sorted priority numbers are lowest);
    the index is derived from the atoms opposite it, cited in the order of
    the preferred-face atoms they eclipse (the order is this tool's
    completion; the Red Book prints no TPR-6 index).  C/A: seen from above
    the preferred face, the direction of the priority sequence round the
    opposite face, started at its highest-priority atom (ties: the
    preferred-face partners decide)."""
    faces = _prism_faces(g)
    if len(faces) != 2:
        return []
    partner = {}
    for s in faces[0]:
        for u in faces[1]:
            if (min(s, u), max(s, u)) in g.edges:
                partner[s], partner[u] = u, s
    low = min(tuple(sorted(r[s] for s in f)) for f in faces)
    out = []
    for f in faces:
        if tuple(sorted(r[s] for s in f)) != low:
            continue
        view = sum(_vec(g, s) for s in f)
        back = [partner[s] for s in f]
        m = min(r[s] for s in back)
        seqs = tuple(sq for u in back if r[u] == m for sq in _seqs(g, r, view, back, u, tail=partner))
        for order in itertools.permutations(f):
            if [r[s] for s in order] != sorted(r[s] for s in f):
                continue
            out.append(_Choice(tuple(r[partner[s]] for s in order), seqs))
    return out


def _ss4(g: Geometry, r: Mapping[int, Rank]) -> list[_Choice]:
    """IR-9.3.3.8: the two atoms separated by the largest angle, the lower
    number first.  C/A (IR-9.3.4.7): seen from the higher-priority atom of
    that pair, the turn from the higher- to the lower-priority of the other
    two atoms through the smaller angle; no symbol where either pair ties."""
    pair = _axial_pair(g, r)
    if pair is None:
        return []
    axial, key = pair
    e1, e2 = sorted((s for s in r if s not in axial), key=lambda s: (r[s], s))
    seqs = []
    if r[e1] != r[e2]:
        for a in axial:
            if r[a] == key[0]:
                turn = float(np.dot(_vec(g, a), np.cross(_vec(g, e1), _vec(g, e2))))
                seqs.append(((), "A" if turn > 0 else "C"))
    return [_Choice(key, tuple(seqs))]


def _ts3(g: Geometry, r: Mapping[int, Rank]) -> list[_Choice]:
    """IR-9.3.3.7: one digit, the priority number of the atom on the stem."""
    t = _trans(g)
    stem = [s for s in r if s not in t]
    return [_Choice((r[stem[0]],))] if len(stem) == 1 else []


_RULES = {
    "SP-4": _sp4,
    "SS-4": _ss4,
    "TS-3": _ts3,
    "OC-6": _oc6,
    "SPY-5": _spy5,
    "TPR-6": _tpr6,
    **{b: _bipyramid for b in _BIPYRAMIDS},
}

_RULE_TEXT = {
    "SP-4": "IR-9.3.3.3 (SP-4): the atom trans to priority 1, the highest number where there is a choice",
    "OC-6": "IR-9.3.3.4 (OC-6): trans to priority 1, then trans to the highest in the perpendicular plane, the highest number where there is a choice; C/A IR-9.3.4.8",
    "SPY-5": "IR-9.3.3.5 (SPY-5): apical, then trans to the highest basal, the highest number where there is a choice; C/A IR-9.3.4.6",
    "TBPY-5": "IR-9.3.3.6 (bipyramids): the two axial priority numbers, lower first; C/A IR-9.3.4.5",
    "PBPY-7": "IR-9.3.3.6 (bipyramids): the two axial priority numbers, lower first, then the equatorial sequence, lower way round; C/A IR-9.3.4.10",
    "HBPY-8": "IR-9.3.3.6 (bipyramids): the two axial priority numbers, lower first, then the equatorial sequence, lower way round; C/A IR-9.3.4.10",
    "TPR-6": "IR-9.3.4.9 (TPR-6): atoms opposite the preferred face, cited in the order of the face (order: tool completion)",
    "T-4": "IR-9.3.4.2 (T-4): R/S from the CIP priorities",
    "SS-4": "IR-9.3.3.8 (SS-4): the two atoms at the largest angle, lower first; C/A IR-9.3.4.7",
    "TS-3": "IR-9.3.3.7 (TS-3): the atom on the stem of the T",
}


def _rs(g: Geometry, r: Mapping[int, Rank]) -> str | None:
    """R or S on a tetrahedron whose four priorities all differ."""
    if len(set(r.values())) != 4:
        return None
    s1, s2, s3, s4 = sorted(r, key=lambda s: r[s])
    return rs_symbol(*(_vec(g, s) for s in (s1, s2, s3, s4)))


def rs_symbol(v1, v2, v3, v4) -> str:
    """R or S for bond vectors (from the centre) of the priority-1..4 atoms:
    seen with atom 4 pointing away, 1 -> 2 -> 3 clockwise is R.

    >>> rs_symbol([1, 1, 1], [1, -1, -1], [-1, 1, -1], [-1, -1, 1])
    'S'
    """
    v1, v2, v3, v4 = (np.asarray(v, dtype=float) for v in (v1, v2, v3, v4))
    normal = np.cross(v2 - v1, v3 - v1)
    # the viewer sits opposite atom 4; 1->2->3 looks clockwise to it iff normal . v4 > 0
    return "R" if float(np.dot(normal, v4)) > 0 else "S"


def skew_lines_sense(p1, p2, q1, q2, tol: float = 1e-6) -> str | None:
    """'Delta' or 'Lambda' for two skew, non-orthogonal lines p1-p2 and q1-q2
    by the skew-lines convention (right-handed helix = Δ), else None.

    One line is the helix axis, the other its tangent at the common normal;
    the sense is the sign of (u1 . u2) * (d . (u1 x u2)), negative for a
    right-handed helix (d = q1 - p1).  The result is the same whichever
    line is taken as the axis.

    >>> skew_lines_sense([0, 0, -1], [0, 0, 1], [1, 0, 0], [1, 1, 1])  # tangent of a right-handed helix
    'Delta'
    """
    p1, p2, q1, q2 = (np.asarray(v, dtype=float) for v in (p1, p2, q1, q2))
    u1, u2 = p2 - p1, q2 - q1
    n = np.cross(u1, u2)
    dot = float(np.dot(u1, u2))
    off = float(np.dot(q1 - p1, n))
    scale = np.linalg.norm(u1) * np.linalg.norm(u2)
    if abs(dot) < tol * scale or abs(off) < tol * scale or np.linalg.norm(n) < tol * scale:
        return None
    return "Delta" if dot * off < 0 else "Lambda"


def _skew(isomer: Isomer) -> str | None:
    ring = {s.index for s in isomer.sites if s.ring}
    links = [(a, b) for a, b, _ in isomer.links() if a not in ring]
    senses = set()
    g = isomer.geometry
    for (a, b), (c, d) in itertools.combinations(links, 2):
        if {a, b} & {c, d}:
            continue  # rings sharing a donor meet: their lines are not skew
        # rings of one ligand count too (cis-alpha-trien: the two outer rings)
        s = skew_lines_sense(g.vectors[a], g.vectors[b], g.vectors[c], g.vectors[d])
        if s:
            senses.add(s)
    return senses.pop() if len(senses) == 1 else None


# ---------------------------------------------------------------- priorities and priming


def _base_ranks(isomer: Isomer, composition: Composition) -> dict[int, Rank]:
    from enumerator.analyses.cip import donor_priorities

    table = donor_priorities(composition)
    return {s.index: (table[(s.ligand, s.donor_index)], 0) for s in isomer.sites}


def _prime_groups(isomer: Isomer, composition: Composition, base: Mapping[int, Rank]) -> list[int]:
    """Polydentate units (unit numbers) that share a priority number with
    another polydentate unit: the ones the priming convention tells apart."""
    poly = {k.name for k in composition.kinds if k.denticity >= 2 and not k.ring}
    numbers: dict[int, set[int]] = {}
    for s in isomer.sites:
        if s.ligand in poly:
            numbers.setdefault(s.unit, set()).add(base[s.index][0])
    return sorted(u for u, ns in numbers.items() if any(ns & other for v, other in numbers.items() if v != u))


def _primed_maps(isomer: Isomer, composition: Composition, base: Mapping[int, Rank]) -> list[dict[int, Rank]]:
    units = _prime_groups(isomer, composition, base)
    if len(units) < 2:
        return [dict(base)]
    unit = {s.index: s.unit for s in isomer.sites}
    maps = []
    for perm in itertools.permutations(range(len(units))):
        level = dict(zip(units, perm))
        maps.append({i: (r[0], level.get(unit[i], 0)) for i, r in base.items()})
        if len(maps) >= MAX_PRIMINGS:
            break
    return maps


def _evaluate(isomer: Isomer, maps: Sequence[Mapping[int, Rank]]):
    """(index key, C/A symbol, R/S symbol) over all rank maps."""
    g = isomer.geometry
    sym = g.symbol
    if sym == "T-4":
        found = {_rs(g, r) for r in maps}
        return None, None, (found.pop() if len(found) == 1 and None not in found else None)
    rule = _RULES.get(sym)
    if rule is None:
        return None, None, None
    choices = [c for r in maps for c in rule(g, r)]
    if not choices:
        return None, None, None
    best = max(c.key for c in choices)
    split = next(c.split for c in choices if c.key == best)
    seqs = [s for c in choices if c.key == best for s in c.seqs]
    ca = None
    if seqs:
        low = min(s for s, _ in seqs)
        dirs = {d for s, d in seqs if s == low}
        if len(dirs) == 1:
            ca = dirs.pop()
    return (best, split), ca, None


def _prefixes(isomer: Isomer) -> tuple[tuple[str, str], ...]:
    g = isomer.geometry
    if g.symbol not in _PREFIX_GEOMETRIES:
        return ()
    groups: dict[tuple[str, str], list[int]] = {}
    order: list[tuple[str, str]] = []
    chains: dict[str, dict[int, list]] = {}
    for s in sorted(isomer.sites, key=lambda s: (s.unit, s.donor_index)):
        if s.ring:
            continue
        key = (s.ligand, s.donor)
        if key not in groups:
            groups[key] = []
            order.append(key)
        groups[key].append(s.index)
        chains.setdefault(s.ligand, {}).setdefault(s.unit, []).append(s.index)
    multi = {name for name, units in chains.items() if any(len(v) > 1 for v in units.values())}
    out = []
    for name, donor in order:
        sites = groups[(name, donor)]
        label = name if name not in multi else f"{name}/{donor}"
        word = _shape(g, sites)
        if word:
            out.append((label, word))
    for name, units in chains.items():
        shapes = {_shape(g, v) for v in units.values() if len(v) == 3}
        if len(shapes) == 1 and g.symbol == "OC-6" and all(len(v) == 3 for v in units.values()):
            out.append((name, shapes.pop()))
    return tuple(out)


def _shape(g: Geometry, sites: Sequence[int]) -> str | None:
    if len(sites) == 2:
        return g.relation(sites[0], sites[1])
    if len(sites) == 3 and g.symbol == "OC-6":
        trans = any(g.relation(a, b) == "trans" for a, b in itertools.combinations(sites, 2))
        return "mer" if trans else "fac"
    return None


def _prefix_text(words: Sequence[tuple[str, str]]) -> str | None:
    if not words:
        return None
    distinct = {w for _, w in words}
    if len(distinct) == 1:
        w = distinct.pop()
        return f"all-{w}" if len(words) >= 3 and w in ("cis", "trans") else w
    return ",".join(f"{w}({label})" for label, w in words)


def _describe(isomer: Isomer, composition: Composition, primed: bool) -> Descriptor:
    g = isomer.geometry
    base = _base_ranks(isomer, composition)
    maps = _primed_maps(isomer, composition, base) if primed else [base]
    key, ca, rs = _evaluate(isomer, maps)
    # IR-9.3.4.1: the skew-lines convention is applied to octahedral centres;
    # elsewhere C/A (or R/S) with priming where needed
    skew = _skew(isomer) if g.symbol == "OC-6" else None
    if not isomer.chiral:
        ca = rs = skew = None
    chirality = rs or skew or ca
    index = None
    if key:
        digits, split = key
        index = "".join(_fmt(k) for k in digits[:split] or digits)
        if split:
            index += "-" + "".join(_fmt(k) for k in digits[split:])
        key = digits
    text = (
        g.symbol + (f"-{index}" if index else "") + (f"-{_SYMBOL_TEXT.get(chirality, chirality)}" if chirality else "")
    )
    shown = maps[0]
    if primed and len(maps) > 1 and key is not None:
        rule = _RULES.get(g.symbol)
        for r in maps:  # show a priming that realises the chosen index
            if rule and any(c.key == key for c in rule(g, r)):
                shown = r
                break
    words = _prefixes(isomer)
    return Descriptor(
        polyhedral_symbol=g.symbol,
        configuration_index=index,
        chirality=chirality,
        prefix=_prefix_text(words),
        text=text,
        priority_pairs=tuple(sorted((i, _fmt(r)) for i, r in shown.items())),
        ca=ca,
        skew=skew,
        rs=rs,
        primed=primed and any(r[1] for r in shown.values()),
        prefixes=words,
        rule=_RULE_TEXT.get(g.symbol, f"no configuration-index rule for {g.symbol}: polyhedral symbol only"),
    )


def _has_repeated_chelate(composition: Composition) -> bool:
    """Two or more polydentate ligands whose donors share a priority number."""
    from enumerator.analyses.cip import donor_priorities

    table = donor_priorities(composition)
    seen: set[int] = set()
    for kind, n in composition.parts:
        if kind.denticity < 2 or kind.ring:
            continue
        mine = {table[(kind.name, i)] for i in range(kind.denticity)}
        if n >= 2 or mine & seen:
            return True
        seen |= mine
    return False


@lru_cache(maxsize=256)
def _needs_priming(composition: Composition, geometry: Geometry) -> bool:
    """Priming is needed where, without it, two diastereomers share a
    descriptor or a chiral isomer gets no chirality symbol."""
    if not _has_repeated_chelate(composition) or geometry.symbol not in SUPPORTED:
        return False
    from enumerator.isomers.enumeration import generate

    seen: dict[str, int] = {}
    for k, iso in enumerate(generate(composition, geometry)):
        if k >= PRIMING_SCAN:
            break
        d = _describe(iso, composition, False)
        if iso.chiral and d.chirality is None:
            return True
        if seen.setdefault(d.stereo_free, iso.number) != iso.number:
            return True
    return False


def describe_isomer(isomer: Isomer, composition: Composition) -> Descriptor:
    """The IUPAC descriptor of one isomer of ``composition`` (rules in the
    module docstring).  Raises InputError when a ligand has no SMILES."""
    return _describe(isomer, composition, _needs_priming(composition, isomer.geometry))


def describe_set(isomer_set: IsomerSet) -> dict[str, Descriptor]:
    """Descriptors of every isomer of a set, by isomer id."""
    comp = isomer_set.composition
    return {i.id: describe_isomer(i, comp) for i in isomer_set.isomers}


# ---------------------------------------------------------------- look-up by descriptor


def _normal(text: str) -> str:
    t = text.strip()
    for word, sym in (("Delta", "Δ"), ("Lambda", "Λ"), ("delta", "Δ"), ("lambda", "Λ")):
        t = t.replace(word, sym)
    return t.upper().replace("’", "'")


def _matches(d: Descriptor, text: str) -> bool:
    t = text.strip()
    low = t.lower()
    if low in ("cis", "trans", "fac", "mer", "all-cis", "all-trans"):
        word = low.removeprefix("all-")
        return bool(d.prefixes) and all(w == word for _, w in d.prefixes)
    if d.prefix and low == d.prefix.lower():
        return True
    n = _normal(t)
    if n == _normal(d.text) or n == _normal(d.stereo_free):
        return True
    if d.configuration_index and n == _normal(d.configuration_index):
        return True
    if d.chirality and n == _normal(_SYMBOL_TEXT.get(d.chirality, d.chirality)):
        return True
    if (
        d.configuration_index
        and d.chirality
        and n == _normal(f"{d.configuration_index}-{_SYMBOL_TEXT.get(d.chirality, d.chirality)}")
    ):
        return True
    return False


def find_by_descriptor(isomer_set: IsomerSet, composition: Composition, text: str) -> list[Isomer]:
    """The isomers whose descriptor matches ``text``: a full descriptor
    ('OC-6-32-C', 'OC-6-11-Delta'), one without its chirality symbol
    ('OC-6-32', both enantiomers), a bare configuration index ('32'), or a
    prefix ('cis', 'trans', 'fac', 'mer', or a combined one as shown)."""
    out = []
    for iso in isomer_set.isomers:
        if _matches(describe_isomer(iso, composition), text):
            out.append(iso)
    return out


# ---------------------------------------------------------------- the pipeline stage


@dataclass(frozen=True)
class DescriptorAnalysis:
    """Per-isomer IUPAC descriptors for a Result (pipeline stage 'descriptor')."""

    descriptors: tuple[tuple[str, Descriptor], ...]
    basis: str
    primed: bool
    shared: tuple[tuple[str, tuple[str, ...]], ...] = ()
    error: str | None = None
    #: chiral isomers for which no chirality symbol could be decided
    no_symbol: tuple[str, ...] = ()
    #: IUPAC additive names by isomer id (real formulas), or why there are none
    names: tuple[tuple[str, str], ...] = ()
    name_note: str | None = None

    def get(self, isomer_id: str) -> Descriptor | None:
        for k, d in self.descriptors:
            if k == isomer_id:
                return d
        return None

    def isomer_json(self, isomer_id: str) -> Mapping[str, Any]:
        d = self.get(isomer_id)
        if d is None:
            return {"descriptor": None, "priorities": None}
        shared = dict(self.shared).get(d.stereo_free)
        detail: dict[str, Any] = {
            "polyhedral_symbol": d.polyhedral_symbol,
            "configuration_index": d.configuration_index,
            "chirality": d.chirality,
            "C/A": d.ca,
            "skew_lines": d.skew,
            "R/S": d.rs,
            "prefix": d.prefix,
            "primed": d.primed,
            "rule": d.rule,
        }
        if shared:
            others = [i for i in shared if i != isomer_id]
            detail["shared_count"] = len(others)
            # the list is linear per isomer (quadratic overall): give it only
            # where it is informative, not when every isomer shares a bare
            # polyhedral symbol
            if d.configuration_index is not None or len(others) <= 50:
                detail["shared_with"] = others
        return {
            "descriptor": d.text,
            "priorities": {str(i + 1): p for i, p in d.priority_pairs},
            "descriptor_detail": detail,
            "name": dict(self.names).get(isomer_id),
        }

    def top_json(self) -> Mapping[str, Any]:
        doc: dict[str, Any] = {
            "descriptor_rules": {
                "source": "IUPAC Nomenclature of Inorganic Chemistry (2005), IR-9.3",
                "priorities": self.basis,
                "priming": self.primed,
            }
        }
        if self.error:
            doc["descriptor_rules"]["error"] = self.error
        if self.no_symbol:
            doc["descriptor_rules"]["chiral_without_symbol"] = list(self.no_symbol)
        if self.name_note:
            doc["descriptor_rules"]["names"] = self.name_note
        return doc

def _analysis(isomer_set: IsomerSet) -> DescriptorAnalysis:
    from enumerator.analyses.cip import uses_letters

    comp = isomer_set.composition
    basis = "the letter order a > b > c (abstract ligands)" if uses_letters(comp) else "the CIP rules (ligand SMILES)"
    try:
        ds = describe_set(isomer_set)
    except IsosieveError as exc:
        return DescriptorAnalysis((), basis, False, (), exc.line())
    by: dict[str, set[int]] = {}
    ids: dict[str, list[str]] = {}
    for iso in isomer_set.isomers:
        key = ds[iso.id].stereo_free
        by.setdefault(key, set()).add(iso.number)
        ids.setdefault(key, []).append(iso.id)
    shared = tuple((k, tuple(ids[k])) for k in sorted(by) if len(by[k]) > 1)
    primed = any(d.primed for d in ds.values())
    no_symbol = tuple(i.id for i in isomer_set.isomers if i.chiral and ds[i.id].chirality is None)
    return DescriptorAnalysis(
        tuple((i.id, ds[i.id]) for i in isomer_set.isomers), basis, primed, shared, None, no_symbol
    )


def _with_names(a: DescriptorAnalysis, res: Result, req) -> DescriptorAnalysis:
    """Add the additive names (real formulas only; see enumerator.analyses.names)."""
    from enumerator.analyses.names import additive_name
    from enumerator.rules.ruleset import load_rules

    comp = res.composition
    if comp.metal == "M" or a.error or not a.descriptors:
        return a
    rules = load_rules(getattr(req, "rules", ()) or ())
    several = res.isomer_set.stereoisomers > 1
    names = []
    for k, d in a.descriptors:
        n = additive_name(comp, rules, d.text if several else None)
        if n.name is None:
            return replace(a, name_note=n.reason)
        names.append((k, n.name))
    return replace(a, names=tuple(names))


def descriptor_stage(res: Result, req) -> DescriptorAnalysis:
    """Pipeline stage: descriptors for every isomer.  With the request
    option ``pick`` it checks that some isomer matches (InputError listing
    the descriptors present otherwise); :func:`select_isomers` then keeps them."""
    a = _with_names(_analysis(res.isomer_set), res, req)
    pick = req.option("pick") if hasattr(req, "option") else None
    if pick:
        _picked(a, res, pick)
    return a


def _picked(a: DescriptorAnalysis, res: Result, text: str) -> list[str]:
    if a.error:
        raise InputError(
            f"--pick {text}: descriptors cannot be assigned here ({a.error})", "drop --pick or give the ligands SMILES"
        )
    keep = [k for k, d in a.descriptors if _matches(d, text)]
    if not keep:
        present = sorted({d.text for _, d in a.descriptors})
        prefixes = sorted({d.prefix for _, d in a.descriptors if d.prefix})
        tail = f"; prefixes present: {' | '.join(prefixes)}" if prefixes else ""
        raise InputError(
            f"no isomer of {res.composition.formula} matches the descriptor '{text}'",
            f"descriptors present: {', '.join(present)}{tail}",
        )
    return keep


def select_isomers(res: Result, text: str) -> Result:
    """The Result cut down to the isomers matching a descriptor (see
    :func:`find_by_descriptor`), with a note saying so.  Raises InputError
    listing the descriptors present when nothing matches."""
    a = res.analysis(DescriptorAnalysis) or _analysis(res.isomer_set)
    keep = set(_picked(a, res, text))
    iso = res.isomer_set
    chosen = tuple(i for i in iso.isomers if i.id in keep)
    note = f"--pick {text}: {len(chosen)} of {iso.stereoisomers} stereoisomer(s) shown"
    return replace(res, isomer_set=replace(iso, isomers=chosen), notes=res.notes + (note,))
