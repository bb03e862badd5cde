"""Point groups of enumerated isomers against pymatgen's PointGroupAnalyzer
(pymatgen.symmetry.analyzer; a general-purpose library from the package
registry, used here as a test dependency only).

Each isomer is built as a 3-D model: the metal at the origin, each donor
along its site vector as an element (and at a bond length) that stands for
its ligand and donor label, and one backbone atom outside the midpoint of every chelate or
tripod link, so that the model's symmetry is that of the decorated site set
with its connectivity.  A tripod also gets a cap atom on the axis through the
centroid of its face (its C3 axis when its donors are alike); an η-ring is one
atom on its site, a stand-in with the axial symmetry the piano-stool
idealisation gives the ring.  pymatgen finds the group from the coordinates
alone.
"""

from __future__ import annotations

import numpy as np
import pytest
from support.oracles import brute_stabiliser  # tests/ is on sys.path under pytest

from enumerator.isomers.enumeration import enumerate_isomers
from enumerator.parse.abstract import parse_abstract
from enumerator.workflow.pipeline import apply_settings

pytest.importorskip("pymatgen")
from pymatgen.core import Molecule  # noqa: E402
from pymatgen.symmetry.analyzer import PointGroupAnalyzer  # noqa: E402

# widely spread masses and bond lengths keep the models clear of accidental
# degeneracy of the principal moments of inertia, which misleads an
# inertia-based analyser such as pymatgen's (common practice)
DONOR_ELEMENTS = ["C", "Br", "Na", "I", "F", "Xe", "P", "Rb", "S", "Cs", "Cl", "Ba", "K"]
LINK_ELEMENTS = ["Li", "Kr", "B", "Sn", "Mg", "Sb", "Al", "Te"]
CAP_ELEMENTS = ["Ge", "Se", "Ga"]


def model(iso):
    labels: dict[tuple[str, str], str] = {}
    links: dict[str, str] = {}
    species, coords = ["He"], [[0.0, 0.0, 0.0]]
    for s in iso.sites:
        key = (s.ligand, s.donor)
        if key not in labels:
            labels[key] = DONOR_ELEMENTS[len(labels)]
        species.append(labels[key])
        k = list(labels).index(key)
        coords.append(list((1.5 + 0.37 * k) * np.array(s.position)))
    for a, b, lig in iso.links():
        if lig not in links:
            links[lig] = LINK_ELEMENTS[len(links)]
        mid = (np.array(iso.geometry.vectors[a]) + np.array(iso.geometry.vectors[b])) / 2
        species.append(links[lig])
        coords.append(list(mid / np.linalg.norm(mid) * 2.6))
    caps: dict[str, str] = {}
    for kind, piece in iso.placements:
        if not kind.tripod:
            continue
        for t in piece:
            caps.setdefault(kind.name, CAP_ELEMENTS[len(caps)])
            axis = sum(np.array(iso.geometry.vectors[x]) for x in t)
            species.append(caps[kind.name])
            coords.append(list(axis / np.linalg.norm(axis) * 3.3))
    return Molecule(species, coords)


def pymatgen_group(iso) -> str:
    # the models are exact, so a tight eigenvalue tolerance is right; pymatgen's
    # default (0.01) merges nearly equal moments and then misses operations
    sym = PointGroupAnalyzer(model(iso), tolerance=0.1, eigen_tolerance=0.001).sch_symbol
    return {"D*h": "Dinfh", "C*v": "Cinfv"}.get(sym, sym)


CASES = [
    # monodentate patterns on every geometry
    *[(f, "SP-4", {}) for f in ["Ma4", "Ma3b", "Ma2b2", "Ma2bc", "Mabcd"]],
    *[(f, "T-4", {}) for f in ["Ma3b", "Ma2b2", "Ma2bc", "Mabcd"]],
    *[(f, "TP-3", {}) for f in ["Ma2b", "Mabc"]],
    *[(f, "TS-3", {}) for f in ["Ma3", "Ma2b", "Mabc"]],
    *[(f, "SS-4", {}) for f in ["Ma4", "Ma3b", "Ma2b2", "Ma2bc", "Mabcd", "M(AA)b2", "M(AB)2"]],
    *[(f, "L-2", {}) for f in ["Ma2", "Mab"]],
    *[(f, "TBPY-5", {}) for f in ["Ma5", "Ma4b", "Ma3b2", "Ma3bc", "Ma2b2c", "Mabcde"]],
    *[(f, "SPY-5", {}) for f in ["Ma4b", "Ma3b2", "Ma2b2c", "Ma2bcd"]],
    *[
        (f, "OC-6", {})
        for f in ["Ma6", "Ma5b", "Ma4b2", "Ma3b3", "Ma4bc", "Ma3b2c", "Ma2b2c2", "Ma3bcd", "Ma2b2cd", "Mabcdef"]
    ],
    *[(f, "TPR-6", {}) for f in ["Ma4b2", "Ma3b3", "Ma2b2c2"]],
    *[(f, "HP-6", {}) for f in ["Ma4b2", "Ma3b3", "Ma2b2c2"]],
    *[(f, "PBPY-7", {}) for f in ["Ma5b2", "Ma4b3", "Ma3b2c2"]],
    *[(f, sym, {}) for f in ["Ma5b2", "Ma4b3", "Ma3b2c2", "M(AA)a5"] for sym in ("OCF-7", "TPRS-7")],
    *[(f, sym, {}) for f in ["Ma6b2", "Ma4b4", "Ma4b2c2"] for sym in ("CU-8", "SAPR-8", "HBPY-8", "DD-8")],
    ("M(AA)4", "DD-8", {}),
    *[(f, "IC-12", {}) for f in ["Ma10b2", "Ma9b3", "Ma6b6"]],
    # chelates and rings
    *[
        (f, "OC-6", {})
        for f in [
            "M(AA)3",
            "M(AA)2b2",
            "M(AA)2bc",
            "M(AB)3",
            "M(AB)2b2",
            "M(AA)b4",
            "M(AA)b2c2",
            "M(AB)b2c2",
            "M(AAA)b3",
            "M(ABA)b3",
            "M(ABC)b3",
            "M(AAA)2",
            "M(ABA)2",
            "M(AA)(BB)c2",
            "M(AB)(AA)b2",
        ]
    ],
    # tripods on a face
    *[
        (f, "OC-6", {})
        for f in ["M{AAA}b3", "M{ABB}c3", "M{ABC}d3", "M{AAA}b2c", "M{AAA}bcd", "M{AAA}2", "M{ABB}2", "M{AAA}(AA)b"]
    ],
    *[(f, "TBPY-5", {}) for f in ["M{AAA}b2", "M{AAA}bc", "M{ABB}c2"]],
    *[(f, "T-4", {}) for f in ["M{AAA}b", "M{ABB}c"]],
    ("M{AAA}b3", "TPR-6", {}),
    ("M{AAA}", "TPY-3", {}),
    # eta-rings on one site: piano stools, metallocenes
    *[(f, "TPY-3", {}) for f in ["M(ring)a2", "M(ring)ab", "M(ring)(AA)"]],
    *[(f, "T-4", {}) for f in ["M(ring)a3", "M(ring)a2b", "M(ring)abc", "M(ring)2a2", "M(ring)2ab", "M(ring)(AA)b"]],
    *[(f, "SPY-5", {}) for f in ["M(ring)a4", "M(ring)a3b", "M(ring)a2b2", "M(ring)a2bc", "M(ring)(AA)b2"]],
    *[(f, "L-2", {}) for f in ["M(ring)2", "M(ring)a"]],
    *[(f, "OC-6", {}) for f in ["M(ring)a5", "M(ring){AAA}b2", "M(ring)2a2b2"]],
    ("M(ring)a2b2", "TBPY-5", {}),
    *[(f, "SP-4", {}) for f in ["M(AA)b2", "M(AB)b2", "M(AB)2", "M(AB)bc"]],
    *[(f, "T-4", {}) for f in ["M(AA)b2", "M(AB)2", "M(AB)bc"]],
    *[(f, "TBPY-5", {}) for f in ["M(AA)b3", "M(AB)b3", "M(AA)b2c"]],
    *[(f, "SPY-5", {}) for f in ["M(AA)b3", "M(AB)bcd"]],
    ("M(AA)3", "TPR-6", {}),
    ("M(AA)4", "SAPR-8", {}),
    ("M(AA)4", "CU-8", {}),
    ("M(AAA)b3", "OC-6", {"arrangements": [("AAA", "mer")]}),
]


@pytest.mark.parametrize("formula,symbol,opts", CASES, ids=[f"{c[0]}@{c[1]}" for c in CASES])
def test_point_groups_match_pymatgen(rules, formula, symbol, opts):
    comp = apply_settings(parse_abstract(formula), opts.get("spans", ()), opts.get("arrangements", ()))
    s = enumerate_isomers(comp, rules.geometry(symbol))
    for iso in s.isomers:
        assert iso.point_group == pymatgen_group(iso), (formula, symbol, iso.id)


def test_chirality_agrees_with_pymatgen(rules):
    # a model is chiral exactly when pymatgen finds no improper operation
    for formula in ["M(AA)3", "M(AA)2b2", "M(AB)3", "Ma2b2c2", "Mabcdef", "M(ABC)2"]:
        for iso in enumerate_isomers(parse_abstract(formula), rules.geometry("OC-6")).isomers:
            pga = PointGroupAnalyzer(model(iso), tolerance=0.1, eigen_tolerance=0.001)
            improper = any(np.linalg.det(op.rotation_matrix) < 0 for op in pga.get_symmetry_operations())
            assert iso.chiral == (not improper), (formula, iso.id)


def test_stabilisers_match_brute_force(rules):
    """The stabiliser found during the orbit walk equals the set of geometry
    operations that preserve every site label and every link, checked by
    trying each operation (common practice)."""
    for formula, symbol in [
        ("M(AB)2b2", "OC-6"),
        ("M(ring)a2b", "T-4"),
        ("M(ring)a2bc", "SPY-5"),
        ("M{ABB}c3", "OC-6"),
        ("M{ABC}de", "TBPY-5"),
        ("Ma3b3c3d3", "IC-12"),
        ("M(AA)2b", "TBPY-5"),
        ("M(ABA)bc", "SPY-5"),
    ]:
        g = rules.geometry(symbol)
        for iso in enumerate_isomers(parse_abstract(formula), g, limit=400).isomers:
            assert brute_stabiliser(g, iso) == iso.stabiliser, (formula, iso.id)


REAL_STOOLS_AND_TRIPODS = [
    "[TpMn(CO)3]",
    "[W(CO)3(tacn)]",
    "[Cr(CO)3(triphos)]",
    "[CpCo(CO)2]",
    "[CpMn(CO)3]",
    "[CpFe(CO)(PPh3)(Me)]",
    "[CpW(CO)3Me]",
    "[CpW(CO)2(PPh3)Me]",
    "[Cp2ZrCl2]",
    "[Cp2Fe]",
    "[(C6H6)Cr(CO)3]",
]


@pytest.mark.parametrize("formula", REAL_STOOLS_AND_TRIPODS)
def test_real_stools_and_tripods_match_pymatgen(formula):
    """The catalogue complexes on the frame the geometry rules choose: each ring one stand-in atom on its site,
    each tripod a cap atom on its face's axis (the models of this file)."""
    from enumerator.workflow.pipeline import analyse

    for iso in analyse(formula).isomers:
        assert iso.point_group == pymatgen_group(iso), (formula, iso.id)
