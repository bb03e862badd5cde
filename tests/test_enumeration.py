"""Isomer counts against counts made outside the enumerator.

1. Burnside's lemma (W. Burnside, Theory of Groups of Finite Order, 1897;
   in the form of Pólya's theorem, Acta Math. 68 (1937) 145) implemented
   from scratch in tests/support/oracles.py, without calling the enumerator:
   for every composition of monodentate ligands on every geometry up to CN 8,
   and selected CN-12 ones.  Chelate compositions are counted by Burnside
   over decorations listed by brute force.
2. The classic counts as textbooks give them.
"""

from __future__ import annotations

import itertools
import re

import pytest
from support.oracles import (  # tests/ is on sys.path under pytest
    burnside_count,
    letters_formula,
    orbits_by_burnside,
    partitions,
)

from enumerator.errors import InputError
from enumerator.isomers.counting import burnside_counts
from enumerator.isomers.enumeration import enumerate_isomers, generate
from enumerator.parse.abstract import parse_abstract

SMALL = [
    "TP-3",
    "TS-3",
    "T-4",
    "SP-4",
    "SS-4",
    "TBPY-5",
    "SPY-5",
    "OC-6",
    "TPR-6",
    "HP-6",
    "PBPY-7",
    "OCF-7",
    "TPRS-7",
    "CU-8",
    "SAPR-8",
    "HBPY-8",
    "DD-8",
]


@pytest.mark.parametrize("symbol", SMALL)
def test_every_monodentate_composition_matches_burnside(rules, symbol):
    g = rules.geometry(symbol)
    n = g.coordination_number
    for parts in partitions(n):
        if symbol in ("CU-8", "SAPR-8", "HBPY-8", "DD-8") and len(parts) == 8:
            continue  # all-different CN 8 is covered below with the cycle index only
        comp = parse_abstract(letters_formula(parts))
        s = enumerate_isomers(comp, g)
        geo = burnside_count(g.operations, parts)
        stereo = burnside_count(g.proper_operations, parts)
        assert (s.geometric_isomers, s.stereoisomers) == (geo, stereo), letters_formula(parts)


@pytest.mark.parametrize("symbol", ["CU-8", "SAPR-8", "HBPY-8", "DD-8"])
def test_all_different_cn8(rules, symbol):
    g = rules.geometry(symbol)
    parts = (1,) * 8
    comp = parse_abstract(letters_formula(parts))
    stereo = sum(1 for _ in generate(comp, g))
    assert stereo == burnside_count(g.proper_operations, parts)


@pytest.mark.parametrize("formula", ["Ma10b2", "Ma9b3", "Ma6b6", "Ma4b4c4", "Ma3b3c3d3", "Ma8b2c2", "Ma6b3c3"])
def test_icosahedral_compositions(rules, formula):
    g = rules.geometry("IC-12")
    comp = parse_abstract(formula)
    counts = tuple(n for _, n in comp.parts)
    s = enumerate_isomers(comp, g)
    assert s.geometric_isomers == burnside_count(g.operations, counts)
    assert s.stereoisomers == burnside_count(g.proper_operations, counts)


def test_library_burnside_agrees(rules):
    # the library's up-front count (used before long runs) against this file's
    g = rules.geometry("IC-12")
    for parts in [(3, 3, 3, 3), (6, 6), (1,) * 12]:
        comp = parse_abstract(letters_formula(parts))
        assert burnside_counts(comp, g) == (
            burnside_count(g.operations, parts),
            burnside_count(g.proper_operations, parts),
        )


# --- chelates: Burnside over decorations listed by brute force ------------------


CHELATE_CASES = [
    # formula, geometry, kinds as (donors, count, span, ring, arrangements), options
    ("M(AA)3", "OC-6", [("AA", 3, "edge", False, ())], {}),
    ("M(AA)2b2", "OC-6", [("AA", 2, "edge", False, ()), ("b", 2, "edge", False, ())], {}),
    ("M(AB)3", "OC-6", [("AB", 3, "edge", False, ())], {}),
    ("M(AB)2b2", "OC-6", [("AB", 2, "edge", False, ()), ("b", 2, "edge", False, ())], {}),
    ("M(AB)2bc", "OC-6", [("AB", 2, "edge", False, ()), ("b", 1, "edge", False, ()), ("c", 1, "edge", False, ())], {}),
    ("M(AA)b2c2", "OC-6", [("AA", 1, "edge", False, ()), ("b", 2, "edge", False, ()), ("c", 2, "edge", False, ())], {}),
    ("M(AAA)b3", "OC-6", [("AAA", 1, "edge", False, ()), ("b", 3, "edge", False, ())], {}),
    (
        "M(ABA)bcd",
        "OC-6",
        [
            ("ABA", 1, "edge", False, ()),
            ("b", 1, "edge", False, ()),
            ("c", 1, "edge", False, ()),
            ("d", 1, "edge", False, ()),
        ],
        {},
    ),
    ("M(ABC)2", "OC-6", [("ABC", 2, "edge", False, ())], {}),
    ("M(AAA)2", "OC-6", [("AAA", 2, "edge", False, ("fac",))], {"arrangements": [("AAA", "fac")]}),
    (
        "M(ring)a2b",
        "T-4",
        [("R", 1, "edge", True, ()), ("a", 2, "edge", False, ()), ("b", 1, "edge", False, ())],
        {},
    ),
    ("M(AA)b4", "OC-6", [("AA", 1, "trans", False, ()), ("b", 4, "edge", False, ())], {"spans": [("AA", "trans")]}),
    (
        "M(AA)b2c",
        "TBPY-5",
        [("AA", 1, "edge", False, ()), ("b", 2, "edge", False, ()), ("c", 1, "edge", False, ())],
        {},
    ),
    ("M(AB)b2c", "SPY-5", [("AB", 1, "edge", False, ()), ("b", 2, "edge", False, ()), ("c", 1, "edge", False, ())], {}),
    ("M(AB)2", "SP-4", [("AB", 2, "edge", False, ())], {}),
    ("M(AB)ab", "T-4", [("AB", 1, "edge", False, ()), ("a", 1, "edge", False, ()), ("b", 1, "edge", False, ())], {}),
    ("M(AA)3", "TPR-6", [("AA", 3, "edge", False, ())], {}),
    (
        "M(AB)a3b2",
        "PBPY-7",
        [("AB", 1, "edge", False, ()), ("a", 3, "edge", False, ()), ("b", 2, "edge", False, ())],
        {},
    ),
    ("M(AA)4", "SAPR-8", [("AA", 4, "edge", False, ())], {}),
    (
        "M(AB)2a2b2",
        "CU-8",
        [("AB", 2, "edge", False, ()), ("a", 2, "edge", False, ()), ("b", 2, "edge", False, ())],
        {},
    ),
]


@pytest.mark.parametrize("formula,symbol,kinds,opts", CHELATE_CASES, ids=[f"{c[0]}@{c[1]}" for c in CHELATE_CASES])
def test_chelate_counts_match_burnside(rules, formula, symbol, kinds, opts):
    from enumerator.workflow.pipeline import apply_settings

    g = rules.geometry(symbol)
    comp = apply_settings(parse_abstract(formula), opts.get("spans", ()), opts.get("arrangements", ()))
    s = enumerate_isomers(comp, g)
    assert s.geometric_isomers == orbits_by_burnside(g, kinds, g.operations)
    assert s.stereoisomers == orbits_by_burnside(g, kinds, g.proper_operations)


# --- tripods and eta-rings on every geometry: Burnside over brute-force decorations ---

#: (formula, geometry): a tripod takes the three sites of a triangular face (faces from scipy's convex hull in
#: the oracle), an eta-ring one site of the largest site stabiliser.
TOPOLOGY_CASES = [
    ("M(ring)a", "L-2"),
    ("M(ring)2", "L-2"),
    ("M(ring)a2", "TPY-3"),
    ("M(ring)ab", "TPY-3"),
    ("M{AAA}", "TPY-3"),
    ("M(ring)ab", "TP-3"),
    ("M(ring)ab", "TS-3"),
    ("M(ring)a3", "T-4"),
    ("M(ring)abc", "T-4"),
    ("M(ring)2ab", "T-4"),
    ("M{AAA}b", "T-4"),
    ("M{ABC}d", "T-4"),
    ("M(ring)a2b", "SP-4"),
    ("M(ring)2ab", "SS-4"),
    ("M(ring)a4", "SPY-5"),
    ("M(ring)a2bc", "SPY-5"),
    ("M(ring)(AA)bc", "SPY-5"),
    ("M{AAA}bc", "SPY-5"),
    ("M(ring)a2b2", "TBPY-5"),
    ("M(ring)2abc", "TBPY-5"),
    ("M{AAA}b2", "TBPY-5"),
    ("M{ABB}cd", "TBPY-5"),
    ("M{AAA}b3", "OC-6"),
    ("M{ABB}c3", "OC-6"),
    ("M{ABC}d3", "OC-6"),
    ("M{AAA}bcd", "OC-6"),
    ("M{AAA}2", "OC-6"),
    ("M{ABB}2", "OC-6"),
    ("M{AAA}(AA)b", "OC-6"),
    ("M(ring){AAA}ab", "OC-6"),
    ("M(ring)2a2b2", "OC-6"),
    ("M{AAA}b3", "TPR-6"),
    ("M(ring)a2b3", "HP-6"),
    ("M{AAA}b2c2", "PBPY-7"),
    ("M(ring)a2b2c2", "PBPY-7"),
    ("M{AAA}bcde", "OCF-7"),
    ("M(ring)abcdef", "TPRS-7"),
    ("M(ring)a3b2c2", "CU-8"),
    ("M{AAA}b3c2", "SAPR-8"),
    ("M(ring)2a3b3", "SAPR-8"),
    ("M{ABB}c3d2", "DD-8"),
    ("M{AAA}(ring)a2b2", "HBPY-8"),
    # no triangular face: the tripod cannot be placed
    ("M{AAA}b", "SP-4"),
    ("M{AAA}b3", "HP-6"),
    ("M{AAA}b5", "CU-8"),
]
_TOKEN = re.compile(r"\{([A-Z]{3})\}(\d*)|\((ring)\)(\d*)|\(([A-Z]+)\)(\d*)|([a-z])(\d*)")


def _kinds(formula: str) -> list[tuple[str, int, str, bool | str, tuple[str, ...]]]:
    """The oracle's kind specs of a letter formula, read by a regular expression here (not by the library)."""
    out = []
    for tripod, nt, ring, nr, chain, nc, mono, nm in _TOKEN.findall(formula[1:]):
        if tripod:
            out.append((tripod, int(nt or 1), "edge", "tripod", ()))
        elif ring:
            out.append(("R", int(nr or 1), "edge", True, ()))
        elif chain:
            out.append((chain, int(nc or 1), "edge", False, ()))
        else:
            out.append((mono, int(nm or 1), "edge", False, ()))
    return out


@pytest.mark.parametrize("formula,symbol", TOPOLOGY_CASES, ids=[f"{f}@{g}" for f, g in TOPOLOGY_CASES])
def test_tripod_and_ring_counts_match_burnside(rules, formula, symbol):
    g = rules.geometry(symbol)
    kinds = _kinds(formula)
    geo = orbits_by_burnside(g, kinds, g.operations)
    stereo = orbits_by_burnside(g, kinds, g.proper_operations)
    comp = parse_abstract(formula)
    if geo == 0:  # no brute-force decoration: the enumerator refuses, the up-front count is (0, 0)
        with pytest.raises(InputError):
            enumerate_isomers(comp, g)
        assert burnside_counts(comp, g) == (0, 0)
        return
    s = enumerate_isomers(comp, g)
    assert (s.geometric_isomers, s.stereoisomers) == (geo, stereo)
    assert burnside_counts(comp, g) == (geo, stereo)


def test_oracle_faces_are_those_of_the_textbook_polyhedra(rules):
    # an octahedron has 8 triangular faces, a tetrahedron 4, a trigonal bipyramid 6, a trigonal prism 2
    # triangular and 3 square faces, a cube none (common practice)
    from support.oracles import hull_faces

    counts = {sym: len(hull_faces(rules.geometry(sym))) for sym in ("OC-6", "T-4", "TBPY-5", "TPR-6", "CU-8", "SP-4")}
    assert counts == {"OC-6": 8, "T-4": 4, "TBPY-5": 6, "TPR-6": 2, "CU-8": 0, "SP-4": 0}


# --- the classic counts ---------------------------------------------------------

CLASSIC = [
    # formula, geometry, geometric isomers, stereoisomers, source
    (
        "Ma4b2",
        "OC-6",
        2,
        2,
        "cis/trans; Miessler, Fischer & Tarr, Inorganic Chemistry, 5th ed., sec. 9.3 (from memory)",
    ),
    ("Ma3b3", "OC-6", 2, 2, "fac/mer; Miessler, Fischer & Tarr, sec. 9.3 (from memory)"),
    ("Ma2b2c2", "OC-6", 5, 6, "Miessler, Fischer & Tarr, sec. 9.3, isomer table (from memory)"),
    ("Mabcdef", "OC-6", 15, 30, "Miessler, Fischer & Tarr, sec. 9.3, isomer table (from memory)"),
    ("M(AA)3", "OC-6", 1, 2, "Delta/Lambda tris-chelates; Miessler, Fischer & Tarr, sec. 9.3 (from memory)"),
    ("M(AA)2b2", "OC-6", 2, 3, "trans plus the cis enantiomers, as in [Co(en)2Cl2]+ (Werner 1911; from memory)"),
    ("Ma2b2", "SP-4", 2, 2, "cis/trans-platin type (common practice)"),
    ("Ma2b2", "T-4", 1, 1, "tetrahedral Ma2b2 has no isomers (common practice)"),
    ("Mabcd", "T-4", 1, 2, "a stereogenic tetrahedral centre (common practice)"),
    ("Ma3b2", "TBPY-5", 3, 3, "b axial-axial, axial-equatorial, equatorial-equatorial (common practice)"),
]


@pytest.mark.parametrize("formula,symbol,geo,stereo,source", CLASSIC)
def test_classic_counts(rules, formula, symbol, geo, stereo, source):
    s = enumerate_isomers(parse_abstract(formula), rules.geometry(symbol))
    assert (s.geometric_isomers, s.stereoisomers) == (geo, stereo), source


def test_werner_ma4b2_polyhedra(rules):
    # Werner's argument: octahedral, trigonal-prismatic and hexagonal-planar
    # Ma4b2 would give 2, 3 and 3 isomers (Greenwood & Earnshaw, Chemistry of
    # the Elements, 2nd ed., ch. 19; from memory)
    counts = {
        sym: enumerate_isomers(parse_abstract("Ma4b2"), rules.geometry(sym)).geometric_isomers
        for sym in ("OC-6", "TPR-6", "HP-6")
    }
    assert counts == {"OC-6": 2, "TPR-6": 3, "HP-6": 3}


def test_dicarba_dodecaborane_isomers(rules):
    # closo-C2B10H12 exists as 1,2- (ortho), 1,7- (meta) and 1,12- (para) isomers
    # (Greenwood & Earnshaw, Chemistry of the Elements, 2nd ed., ch. 6; from memory)
    s = enumerate_isomers(parse_abstract("Ma10b2"), rules.geometry("IC-12"))
    assert s.geometric_isomers == 3 and s.stereoisomers == 3
    # para is D5d, ortho and meta C2v (Greenwood & Earnshaw; from memory)
    assert sorted(i.point_group for i in s.isomers) == ["C2v", "C2v", "D5d"]


def test_ids_are_stable_and_enantiomers_paired(rules):
    g = rules.geometry("OC-6")
    comp = parse_abstract("M(AB)2b2")
    a = [(i.id, i.point_group, i.sites) for i in generate(comp, g)]
    b = [(i.id, i.point_group, i.sites) for i in generate(comp, g)]
    assert a == b
    s = enumerate_isomers(comp, g)
    for iso in s.isomers:
        if iso.chiral:
            other = s.get(iso.enantiomer)
            assert other.enantiomer == iso.id and other.point_group == iso.point_group
            assert other.number == iso.number
        else:
            assert iso.enantiomer is None


def test_limit_streams(rules):
    g = rules.geometry("IC-12")
    comp = parse_abstract("Mabcdefghijkl")  # 7,983,360 stereoisomers: must stream
    first = list(itertools.islice(generate(comp, g), 5))
    assert len(first) == 5 and all(i.point_group == "C1" for i in first)
    s = enumerate_isomers(comp, g, limit=3)
    assert not s.complete and len(s.isomers) == 3
