"""Configuration-index rules, one per polyhedron (Nomenclature of Inorganic
Chemistry, IUPAC Recommendations 2005, the "Red Book", IR-9.3.3), with the
C/A sequences of IR-9.3.4 read for each admissible choice.

Each rule takes the geometry and the ranks of its sites and returns one
:class:`~enumerator.analyses.descriptors.ranks.Choice` per admissible choice
of reference atoms; :mod:`enumerator.analyses.descriptors.describe` takes the
largest index key (the "highest numerical value" rule) and, among the
choices that reach it, the lowest C/A sequence.  The rules were checked
against the printed text of IR-9.3.3 and IR-9.3.4; where the book is silent
the completion used here is marked "(completion)".

* **TS-3** (IR-9.3.3.7): one digit, the atom on the stem of the T.
* **SP-4** (IR-9.3.3.3): one digit, the priority number of the atom trans
  to the priority-1 atom; where several atoms have priority 1, the largest
  such number (the "highest numerical value" rule of IR-9.3.3.4, applied
  alike).  trans-[PtCl2(NCMe)(py)] is SP-4-1.
* **SS-4** (IR-9.3.3.8): two digits, the atoms separated by the largest
  angle, the lower first.  C/A (IR-9.3.4.7): seen from the higher-priority
  atom of that pair, the turn from the higher- to the lower-priority of the
  other two through the smaller angle.
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
* **TPR-6** (IR-9.3.4.9): the preferred triangular face holds more of the
  highest-priority atoms (its sorted priority numbers are lowest: the
  tie-break is a completion); the index is derived from the atoms opposite
  it, cited in the order of the preferred-face atoms they eclipse, largest
  numbers first among ties (completion: the book prints no TPR-6 index).
* **T-4** has no index: its chirality symbol is R or S
  (:mod:`enumerator.analyses.descriptors.chirality`).
* The other polyhedra (L-2, TP-3, hexplane-6, OCF-7, TPRS-7, CU-8, SAPR-8, DD-8,
  IC-12) get their polyhedral symbol only: IR-9.3.3 gives them no
  configuration index (an IUPAC Technical Report, Pure Appl. Chem. 2007, 79,
  1779, treats CN 7-9; its rules are not implemented here).

C/A (IR-9.3.4.4 to IR-9.3.4.10): the centre is viewed along the reference
axis from its higher-priority atom (OC-6: the priority-1 atom of the index;
SPY-5: the apical atom; bipyramids: the axial atom of higher priority).
From *every* highest-priority atom of the perpendicular plane the plane is
read clockwise and anticlockwise (IR-9.3.4.8, Example 5 is A only when both
tied P atoms are tried as the start).  TPR-6: seen from above the preferred
face, the sequence round the opposite face.

A new rule is a function ``(Geometry, Mapping[int, Rank]) -> list[Choice]``
registered in :data:`RULES`, :data:`SUPPORTED` and :data:`RULE_TEXT`.

>>> from enumerator.rules.ruleset import load_rules
>>> oc6 = load_rules().geometry("OC-6")
>>> ranks = {i: (1, 0) if i < 3 else (2, 0) for i in range(6)}
>>> max(c.key for c in RULES["OC-6"](oc6, ranks))
((2, 0), (2, 0))
"""

from __future__ import annotations

import itertools
from collections.abc import Callable, Mapping

import numpy as np

from enumerator.analyses.descriptors.ranks import Choice, Rank, ring_sequences, site_vector, trans_partners
from enumerator.model.geometry import Geometry

__all__ = ["RULES", "RULE_TEXT", "SUPPORTED", "Rule"]

#: A configuration-index rule: the admissible choices for the ranks of a geometry's sites.
Rule = Callable[[Geometry, Mapping[int, Rank]], list[Choice]]
#: Polyhedra with a configuration-index rule here (T-4: R/S only).
SUPPORTED = ("TS-3", "SP-4", "SS-4", "T-4", "OC-6", "SPY-5", "TBPY-5", "PBPY-7", "HBPY-8", "TPR-6")
_BIPYRAMIDS = ("TBPY-5", "PBPY-7", "HBPY-8")


def _sp4(g: Geometry, r: Mapping[int, Rank]) -> list[Choice]:
    """IR-9.3.3.3: the atom trans to a priority-1 atom, one choice per such atom."""
    t = trans_partners(g)
    m = min(r.values())
    return [Choice((r[t[a]],)) for a in r if r[a] == m]


def _oc6(g: Geometry, r: Mapping[int, Rank]) -> list[Choice]:
    """One choice per admissible reference axis (a priority-1 atom and its
    trans partner).  The second digit is the largest number trans to any
    highest-priority atom of the plane (IR-9.3.4.8, Example 5: OC-6-24, not
    23); C/A reads the plane from every such atom (the same example is A
    only that way)."""
    t = trans_partners(g)
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
        seqs = tuple(sq for b in starts for sq in ring_sequences(g, r, site_vector(g, a), plane, b))
        out.append(Choice((r[x], second), seqs))
    return out


def _spy5(g: Geometry, r: Mapping[int, Rank]) -> list[Choice]:
    """IR-9.3.3.5: the apical atom, then the largest number trans to a highest-priority basal atom;
    C/A (IR-9.3.4.6) seen from the apex."""
    t = trans_partners(g)
    apex = next(s for s in sorted(r) if s not in t)
    basal = [s for s in sorted(r) if s != apex]
    m = min(r[s] for s in basal)
    starts = [b for b in basal if r[b] == m]
    seqs = tuple(sq for b in starts for sq in ring_sequences(g, r, site_vector(g, apex), basal, b))
    return [Choice((r[apex], max(r[t[b]] for b in starts)), seqs)]


def _axial_pair(g: Geometry, r: Mapping[int, Rank]) -> tuple[list[int], tuple[Rank, ...]] | None:
    """The two sites of the one trans pair and their priority numbers, the
    lower first (the index of bipyramids and the see-saw); None otherwise."""
    axial = sorted(trans_partners(g))
    if len(axial) != 2:
        return None
    p, q = axial
    return axial, tuple(sorted((r[p], r[q])))


def _bipyramid(g: Geometry, r: Mapping[int, Rank]) -> list[Choice]:
    """IR-9.3.3.6: the two axial numbers, lower first (then, for PBPY-7 and HBPY-8, the equatorial
    sequence the lower way round); C/A (IR-9.3.4.5, IR-9.3.4.10) seen from the higher-priority axial atom."""
    pair = _axial_pair(g, r)
    if pair is None:
        return []
    axial, key = pair
    p, q = axial
    eq = [s for s in sorted(r) if s not in axial]
    m = min(r[s] for s in eq)
    top = min(r[p], r[q])
    seqs = [
        (a, sq)
        for a in axial
        if r[a] == top
        for b in eq
        if r[b] == m
        for sq in ring_sequences(g, r, site_vector(g, a), eq, b)
    ]
    if len(eq) == 3:  # TBPY-5: the axial pair fixes the diastereomer
        return [Choice(key, tuple(sq for _, sq in seqs))]
    # PBPY-7, HBPY-8: the equatorial sequence follows the axial pair, read
    # from the highest-priority equatorial atom in the direction that is
    # lower at the first point of difference
    low = min(sq[0] for _, sq in seqs)
    return [Choice(key + low, tuple(sq for _, sq in seqs if sq[0] == low), split=2)]


def _prism_faces(g: Geometry) -> tuple[tuple[int, ...], ...]:
    """The triangular faces (three mutually adjacent sites) of a polyhedron."""
    n = g.coordination_number
    faces = [
        t
        for t in itertools.combinations(range(n), 3)
        if all((min(a, b), max(a, b)) in g.edges for a, b in itertools.combinations(t, 2))
    ]
    return tuple(faces)


def _tpr6(g: Geometry, r: Mapping[int, Rank]) -> list[Choice]:
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
        view = site_vector(g, f[0]) + site_vector(g, f[1]) + site_vector(g, f[2])
        back = [partner[s] for s in f]
        m = min(r[s] for s in back)
        seqs = tuple(sq for u in back if r[u] == m for sq in ring_sequences(g, r, view, back, u, tail=partner))
        for order in itertools.permutations(f):
            if [r[s] for s in order] != sorted(r[s] for s in f):
                continue
            out.append(Choice(tuple(r[partner[s]] for s in order), seqs))
    return out


def _ss4(g: Geometry, r: Mapping[int, Rank]) -> list[Choice]:
    """IR-9.3.3.8: the two atoms separated by the largest angle, the lower
    number first.  C/A (IR-9.3.4.7): seen from the higher-priority atom of
    that pair, the turn from the higher- to the lower-priority of the other
    two atoms through the smaller angle; no symbol where either pair ties."""
    pair = _axial_pair(g, r)
    if pair is None:
        return []
    axial, key = pair
    e1, e2 = sorted((s for s in r if s not in axial), key=lambda s: (r[s], s))
    seqs: list[tuple[tuple[Rank, ...], str]] = []
    if r[e1] != r[e2]:
        for a in axial:
            if r[a] == key[0]:
                turn = float(np.dot(site_vector(g, a), np.cross(site_vector(g, e1), site_vector(g, e2))))
                seqs.append(((), "A" if turn > 0 else "C"))
    return [Choice(key, tuple(seqs))]


def _ts3(g: Geometry, r: Mapping[int, Rank]) -> list[Choice]:
    """IR-9.3.3.7: one digit, the priority number of the atom on the stem."""
    t = trans_partners(g)
    stem = [s for s in r if s not in t]
    return [Choice((r[stem[0]],))] if len(stem) == 1 else []


#: The rule of each polyhedron, by symbol.
RULES: dict[str, Rule] = {
    "SP-4": _sp4,
    "SS-4": _ss4,
    "TS-3": _ts3,
    "OC-6": _oc6,
    "SPY-5": _spy5,
    "TPR-6": _tpr6,
    **{b: _bipyramid for b in _BIPYRAMIDS},
}


_BIPYRAMID_SEQUENCE_TEXT = (
    "IR-9.3.3.6 (bipyramids): the two axial priority numbers, lower first, then the equatorial sequence, "
    "lower way round; C/A IR-9.3.4.10"
)
#: The rule in words with its Red Book section, shown in the JSON ``rule`` key.
RULE_TEXT: dict[str, str] = {
    "SP-4": "IR-9.3.3.3 (SP-4): the atom trans to priority 1, the highest number where there is a choice",
    "OC-6": (
        "IR-9.3.3.4 (OC-6): trans to priority 1, then trans to the highest in the perpendicular plane, "
        "the highest number where there is a choice; C/A IR-9.3.4.8"
    ),
    "SPY-5": (
        "IR-9.3.3.5 (SPY-5): apical, then trans to the highest basal, the highest number where there is a choice; "
        "C/A IR-9.3.4.6"
    ),
    "TBPY-5": "IR-9.3.3.6 (bipyramids): the two axial priority numbers, lower first; C/A IR-9.3.4.5",
    "PBPY-7": _BIPYRAMID_SEQUENCE_TEXT,
    "HBPY-8": _BIPYRAMID_SEQUENCE_TEXT,
    "TPR-6": (
        "IR-9.3.4.9 (TPR-6): atoms opposite the preferred face, cited in the order of the face (order: tool completion)"
    ),
    "T-4": "IR-9.3.4.2 (T-4): R/S from the CIP priorities",
    "SS-4": "IR-9.3.3.8 (SS-4): the two atoms at the largest angle, lower first; C/A IR-9.3.4.7",
    "TS-3": "IR-9.3.3.7 (TS-3): the atom on the stem of the T",
}
