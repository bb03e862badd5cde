"""Computed character tables against outside sources.

* The 32 crystallographic point groups: irreducible characters and Mulliken
  labels against phonopy's character tables (phonopy.phonon.character_table,
  a library from PyPI; its tables cite the Wikipedia list of character
  tables of chemically important point groups).
* Non-crystallographic groups the geometries reach (C5v, D5h, D5d, D4d, S8,
  Ih): handbook tables (F. A. Cotton, Chemical Applications of Group Theory,
  3rd ed., Wiley 1990, Appendix IIA), typed here from memory of that book.
* Orthogonality for every stabiliser that occurs across many compositions on
  every geometry (the great orthogonality theorem: a fact of group theory).
* The steps one by one (classes, a joined complex pair, the axis rule, named
  groups) on small groups whose tables are common practice, and the command's
  output against stored files (tests/support/golden).
"""

from __future__ import annotations

import itertools
import math

import numpy as np
import pytest
from _cli import cli  # tests/ is on sys.path under pytest
from support.golden import GOLDEN, GOLDEN_DIR

from enumerator.errors import InputError
from enumerator.isomers.enumeration import enumerate_isomers
from enumerator.isomers.tables import table_for_isomer
from enumerator.parse.abstract import parse_abstract
from enumerator.rules.ruleset import load_rules
from enumerator.symmetry.chartable import (
    character_table,
    format_character,
    named_table,
    table_from_matrices,
)
from enumerator.symmetry.dixon import burnside_dixon, conjugacy_classes, multiplication_table, real_species
from enumerator.symmetry.frames import choose_frame
from enumerator.symmetry.groups import close_group, group_generators, group_matrices
from enumerator.symmetry.operations import describe_exact
from enumerator.workflow.queries import character_tables

# --------------------------------------------------------------------------
# phonopy: the 32 crystallographic point groups

# Hermann-Mauguin symbol (phonopy's key) -> Schoenflies symbol (International
# Tables for Crystallography Vol. A, Table 10.1.2.2 - common practice).
HM_TO_SCHOENFLIES = {
    "1": "C1",
    "-1": "Ci",
    "2": "C2",
    "m": "Cs",
    "2/m": "C2h",
    "222": "D2",
    "mm2": "C2v",
    "mmm": "D2h",
    "4": "C4",
    "-4": "S4",
    "4/m": "C4h",
    "422": "D4",
    "4mm": "C4v",
    "-42m": "D2d",
    "4/mmm": "D4h",
    "3": "C3",
    "-3": "S6",
    "32": "D3",
    "3m": "C3v",
    "-3m": "D3d",
    "6": "C6",
    "-6": "C3h",
    "6/m": "C6h",
    "622": "D6",
    "6mm": "C6v",
    "-6m2": "D3h",
    "6/mmm": "D6h",
    "23": "T",
    "m-3": "Th",
    "432": "O",
    "-43m": "Td",
    "m-3m": "Oh",
}

_HEX = np.array([[1.0, -0.5, 0.0], [0.0, math.sqrt(3) / 2, 0.0], [0.0, 0.0, 1.0]])  # lattice vectors as columns


# Convention difference: in phonopy's 6mm table the sigma_v planes are the ones
# perpendicular to the lattice a1 axis (normals along x); our rule, with no
# donor sites to count, calls sigma_v the class of the plane containing the
# x axis.  Turning the group by 90 degrees about z maps phonopy's sigma_v onto
# planes containing x, after which both conventions name the same planes
# sigma_v and the labels B1/B2 can be compared.
CONVENTION_TURN = {"6mm": np.array([[0.0, -1.0, 0.0], [1.0, 0.0, 0.0], [0.0, 0.0, 1.0]])}


def _cartesian(rot, lattice):
    """phonopy's mapping tables act on lattice (fractional) coordinates;
    the Cartesian matrix is A R A^-1 with A the lattice vectors as columns."""
    r = np.array(rot, dtype=float)
    return lattice @ r @ np.linalg.inv(lattice)


def _phonopy_entries():
    from phonopy.phonon.character_table import character_table as pt

    for hm, entries in pt.items():
        for k, entry in enumerate(entries):
            yield pytest.param(hm, entry, id=f"{hm}#{k}")


def test_phonopy_lists_all_32_groups():
    from phonopy.phonon.character_table import character_table as pt

    assert set(pt) == set(HM_TO_SCHOENFLIES)  # the 32 crystallographic point groups (International Tables)


@pytest.mark.parametrize("hm, entry", list(_phonopy_entries()))
def test_crystallographic_group_against_phonopy(hm, entry):
    mapping = entry["mapping_table"]
    rots = [r for name in mapping for r in mapping[name]]
    lattice = np.eye(3)
    if any(not np.allclose(np.array(r) @ np.array(r).T, np.eye(3)) for r in rots):
        lattice = _HEX  # trigonal and hexagonal groups are given in the hexagonal lattice basis
    mats = [_cartesian(r, lattice) for r in rots]
    if hm in CONVENTION_TURN:
        t = CONVENTION_TURN[hm]
        mats = [t @ m @ t.T for m in mats]
    for m in mats:
        assert np.allclose(m @ m.T, np.eye(3))
    table = table_from_matrices(mats)
    assert table.group == HM_TO_SCHOENFLIES[hm]
    assert table.order == len(mats)
    # where each of phonopy's classes sits in ours (phonopy lumps C3 with C3^2
    # etc. in groups with complex pairs; its E there is the joined real pair,
    # as in ours, so the characters agree operation by operation)
    index = 0
    pos = {}
    for name in mapping:
        for _ in mapping[name]:
            pos.setdefault(name, []).append(index)
            index += 1
    names = list(entry["rotation_list"]) if isinstance(entry["rotation_list"], tuple) else [entry["rotation_list"]]
    ours = {i.label: i for i in table.irreps}
    assert set(ours) == set(entry["character_table"])  # same Mulliken labels
    for label, chars in entry["character_table"].items():
        chars = chars if isinstance(chars, tuple) else (chars,)
        for cname, value in zip(names, chars):
            for op in pos[cname]:
                got = ours[label].characters[table.class_of[op]]
                assert abs(got - value) < 1e-9, (hm, label, cname, got, value)


# --------------------------------------------------------------------------
# handbook tables (Cotton, Appendix IIA; from memory)

C72, C144 = 2 * math.cos(math.radians(72)), 2 * math.cos(math.radians(144))
PHI = (1 + math.sqrt(5)) / 2
R2 = math.sqrt(2)

HANDBOOK = {
    # Cotton, Chemical Applications of Group Theory, 3rd ed., Appendix IIA (from memory)
    "C5v": (
        ["E", "2C5", "2C5^2", "5sigma_v"],
        {"A1": [1, 1, 1, 1], "A2": [1, 1, 1, -1], "E1": [2, C72, C144, 0], "E2": [2, C144, C72, 0]},
        {"A1": "z", "E1": "x", "E2": "xy"},
    ),
    # Cotton, Appendix IIA, D5h (from memory)
    "D5h": (
        ["E", "2C5", "2C5^2", "5C2", "sigma_h", "2S5", "2S5^3", "5sigma_v"],
        {
            "A1'": [1, 1, 1, 1, 1, 1, 1, 1],
            "A2'": [1, 1, 1, -1, 1, 1, 1, -1],
            "E1'": [2, C72, C144, 0, 2, C72, C144, 0],
            "E2'": [2, C144, C72, 0, 2, C144, C72, 0],
            "A1''": [1, 1, 1, 1, -1, -1, -1, -1],
            "A2''": [1, 1, 1, -1, -1, -1, -1, 1],
            "E1''": [2, C72, C144, 0, -2, -C72, -C144, 0],
            "E2''": [2, C144, C72, 0, -2, -C144, -C72, 0],
        },
        {"E1'": "x", "A2''": "z", "E2'": "xy", "E1''": "xz"},
    ),
    # Cotton, Appendix IIA, D5d (from memory)
    "D5d": (
        ["E", "2C5", "2C5^2", "5C2", "i", "2S10^3", "2S10", "5sigma_d"],
        {
            "A1g": [1, 1, 1, 1, 1, 1, 1, 1],
            "A2g": [1, 1, 1, -1, 1, 1, 1, -1],
            "E1g": [2, C72, C144, 0, 2, C72, C144, 0],
            "E2g": [2, C144, C72, 0, 2, C144, C72, 0],
            "A1u": [1, 1, 1, 1, -1, -1, -1, -1],
            "A2u": [1, 1, 1, -1, -1, -1, -1, 1],
            "E1u": [2, C72, C144, 0, -2, -C72, -C144, 0],
            "E2u": [2, C144, C72, 0, -2, -C144, -C72, 0],
        },
        {"A2u": "z", "E1u": "x", "E1g": "xz", "E2g": "xy"},
    ),
    # Cotton, Appendix IIA, D4d (from memory)
    "D4d": (
        ["E", "2S8", "2C4", "2S8^3", "C2", "4C2'", "4sigma_d"],
        {
            "A1": [1, 1, 1, 1, 1, 1, 1],
            "A2": [1, 1, 1, 1, 1, -1, -1],
            "B1": [1, -1, 1, -1, 1, 1, -1],
            "B2": [1, -1, 1, -1, 1, -1, 1],
            "E1": [2, R2, 0, -R2, -2, 0, 0],
            "E2": [2, 0, -2, 0, 2, 0, 0],
            "E3": [2, -R2, 0, R2, -2, 0, 0],
        },
        {"B2": "z", "E1": "x", "E2": "xy", "E3": "xz"},
    ),
    # Cotton, Appendix IIA, S8 (from memory); E1..E3 are the joined complex pairs
    "S8": (
        ["E", "S8", "C4", "S8^3", "C2", "S8^5", "C4^3", "S8^7"],
        {
            "A": [1] * 8,
            "B": [1, -1, 1, -1, 1, -1, 1, -1],
            "E1": [2, R2, 0, -R2, -2, -R2, 0, R2],
            "E2": [2, 0, -2, 0, 2, 0, -2, 0],
            "E3": [2, -R2, 0, R2, -2, R2, 0, -R2],
        },
        {"B": "z", "E1": "x", "E2": "xy", "E3": "xz"},
    ),
    # Cotton, Appendix IIA, Ih (from memory)
    "Ih": (
        ["E", "12C5", "12C5^2", "20C3", "15C2", "i", "12S10", "12S10^3", "20S6", "15sigma"],
        {
            "Ag": [1] * 10,
            "T1g": [3, PHI, 1 - PHI, 0, -1, 3, 1 - PHI, PHI, 0, -1],
            "T2g": [3, 1 - PHI, PHI, 0, -1, 3, PHI, 1 - PHI, 0, -1],
            "Gg": [4, -1, -1, 1, 0, 4, -1, -1, 1, 0],
            "Hg": [5, 0, 0, -1, 1, 5, 0, 0, -1, 1],
            "Au": [1, 1, 1, 1, 1, -1, -1, -1, -1, -1],
            "T1u": [3, PHI, 1 - PHI, 0, -1, -3, PHI - 1, -PHI, 0, 1],
            "T2u": [3, 1 - PHI, PHI, 0, -1, -3, -PHI, PHI - 1, 0, 1],
            "Gu": [4, -1, -1, 1, 0, -4, 1, 1, -1, 0],
            "Hu": [5, 0, 0, -1, 1, -5, 0, 0, 1, -1],
        },
        {"T1u": "x", "T1g": "Rx", "Hg": "xy", "Ag": "x2+y2+z2"},
    ),
}


def _check_handbook(table, name):
    cls, rows, funcs = HANDBOOK[name]
    assert table.group == name
    labels = [c.label for c in table.classes]
    assert sorted(labels) == sorted(cls)
    assert {i.label for i in table.irreps} == set(rows)
    for irr in table.irreps:
        got = dict(zip(labels, irr.characters))
        for c, want in zip(cls, rows[irr.label]):
            assert abs(got[c] - want) < 1e-9, (name, irr.label, c)
    for label, f in funcs.items():
        assert f in table.irrep(label).functions, (name, label, f)


@pytest.mark.parametrize("name", sorted(HANDBOOK))
def test_handbook_table_from_generators(name):
    _check_handbook(named_table(name), name)


@pytest.mark.parametrize(
    "geo, formula, group",
    [
        ("PBPY-7", "Ma7", "D5h"),  # the bare pentagonal bipyramid
        ("PBPY-7", "Ma6b", "C5v"),  # one axial b (Ma6b has an axial and an equatorial isomer)
        ("SAPR-8", "Ma8", "D4d"),  # square antiprism
        ("IC-12", "Ma12", "Ih"),  # icosahedron
        ("IC-12", "Ma10b2", "D5d"),  # trans (antipodal) b2
        ("IC-12", "Ma11b", "C5v"),
    ],
)
def test_handbook_table_from_geometry(geo, formula, group):
    g = load_rules().geometry(geo)
    isos = [i for i in enumerate_isomers(parse_abstract(formula), g).isomers if i.point_group == group]
    assert isos, (geo, formula, group)
    _check_handbook(table_for_isomer(isos[0]), group)


def test_s8_reached_as_a_stabiliser():
    # S8 occurs on the square antiprism: a4 on alternate... search every Ma4b4 isomer
    g = load_rules().geometry("SAPR-8")
    groups = {i.point_group: i for i in enumerate_isomers(parse_abstract("Ma4b4"), g).isomers}
    if "S8" in groups:
        _check_handbook(table_for_isomer(groups["S8"]), "S8")
    else:
        pytest.skip("no S8 stabiliser among Ma4b4 on SAPR-8")


# --------------------------------------------------------------------------
# orthogonality of every table that occurs


def _compositions(n):
    """Monodentate patterns with up to four kinds, plus all-different up to n = 6."""
    letters = "abcdefghijkl"
    out = []
    for parts in range(1, 5):
        for combo in itertools.combinations_with_replacement(range(1, n + 1), parts):
            if sum(combo) == n:
                for perm in set(itertools.permutations(combo)):
                    out.append("M" + "".join(f"{letters[k]}{c if c > 1 else ''}" for k, c in enumerate(perm)))
    if n <= 6:
        out.append("M" + letters[:n])
    return sorted(set(out))


def _orthogonal(t):
    g = t.order
    h = [c.size for c in t.classes]
    assert sum(h) == g
    assert sum(i.parts for i in t.irreps) == len(t.classes)  # number of (complex) irreps = number of classes
    assert sum(i.dimension**2 / i.parts for i in t.irreps) == pytest.approx(g)
    for a in t.irreps:
        for b in t.irreps:
            s = sum(hc * x * y for hc, x, y in zip(h, a.characters, b.characters))
            assert s == pytest.approx(g * a.parts if a is b else 0, abs=1e-8), (t.group, a.label, b.label)
    # the vector representation reduces onto the species that carry x, y, z
    assert len({i.label for i in t.irreps}) == len(t.irreps)


def test_orthogonality_of_every_stabiliser_table():
    rules = load_rules()
    seen = set()
    groups = set()
    for geo in rules.geometries.values():
        if geo.linear:
            continue
        for f in _compositions(geo.coordination_number):
            iset = enumerate_isomers(parse_abstract(f), geo, limit=300)
            for iso in iset.isomers:
                key = (geo.symbol, iso.stabiliser)
                if key in seen:
                    continue
                seen.add(key)
                t = table_for_isomer(iso)
                assert t.group == iso.point_group
                _orthogonal(t)
                # x, y, z: the trace of each operation reduces to the species holding x, y, z
                ops = geo.operations
                vec = t.reduce({k: float(np.trace(ops[k].array)) for k in iso.stabiliser})
                assert sum(n * t.irrep(lab).dimension for lab, n in vec.items()) == 3
                assert all(
                    "x" in t.irrep(lab).functions or "y" in t.irrep(lab).functions or "z" in t.irrep(lab).functions
                    for lab in vec
                )
                groups.add(t.group)
    # the geometries reach a broad set of groups (check values: the ones named in the handbook tests)
    assert {
        "Oh",
        "D4h",
        "C4v",
        "C2v",
        "C3v",
        "D3h",
        "Td",
        "D5h",
        "C5v",
        "D4d",
        "Ih",
        "D5d",
        "D6h",
        "Cs",
        "C1",
    } <= groups


# --------------------------------------------------------------------------
# labels that depend on the axis rule


def test_d4h_functions_standard_axes():
    # Cotton, Appendix IIA, D4h: x2-y2 in B1g, xy in B2g, x2+y2 and z2 in A1g (C2' through the ligands)
    t = named_table("D4h")
    assert t.irrep("B1g").functions == ("x2-y2",)
    assert t.irrep("B2g").functions == ("xy",)
    assert set(t.irrep("A1g").functions) == {"x2+y2", "z2"}
    assert t.irrep("Eu").function_sets == (("x", "y"),)


def test_d4h_from_trans_octahedron_puts_c2prime_through_ligands():
    g = load_rules().geometry("OC-6")
    iso = [i for i in enumerate_isomers(parse_abstract("Ma4b2"), g).isomers if i.point_group == "D4h"][0]
    t = table_for_isomer(iso)
    x = np.array(t.frame[0])
    assert any(np.allclose(np.abs(x), np.abs(v)) for v in g.vectors)  # x lies along an M-L bond (the rule)
    assert "C2'" in t.axes_note


def test_c2v_sigma_v_holds_most_sites():
    # the documented rule: sigma_v(xz) is the vertical plane holding the most donor sites
    g = load_rules().geometry("OC-6")
    iso = [i for i in enumerate_isomers(parse_abstract("Ma4b2"), g).isomers if i.point_group == "C2v"][0]
    t = table_for_isomer(iso)
    y = np.array(t.frame[1])
    in_xz = sum(1 for v in g.vectors if abs(np.dot(v, y)) < 1e-6)
    assert in_xz == 4
    assert "sigma_v(xz)" in [c.label for c in t.classes]


def test_linear_centre_has_no_finite_table():
    g = load_rules().geometry("L-2")
    with pytest.raises(InputError):
        character_table(g, tuple(range(len(g.operations))))
    with pytest.raises(InputError):
        named_table("Dinfh")


def test_format_character_is_exact():
    assert format_character(math.sqrt(2)) == "sqrt2"  # exact text, not a rounded decimal (common practice)
    assert format_character(C72) == "2cos72"
    assert format_character(PHI, golden=True) == "(1+sqrt5)/2"
    assert format_character(-1.0) == "-1"


def _run(args):
    from enumerator.cli import main

    try:
        main(args)
    except SystemExit as e:
        return e.code or 0
    return 0


# --------------------------------------------------------------------------
# the steps one by one


def test_classes_of_c3v():
    # C3v has classes E, 2C3, 3sigma_v (common practice)
    mats = group_matrices("C3v")
    mult, inv, ident = multiplication_table(mats)
    assert sorted(len(c) for c in conjugacy_classes(mult, inv, ident)) == [1, 2, 3]


def test_complex_pair_joined_into_one_e():
    # C3: A and a separably degenerate E with characters 2, -1, -1 (common practice)
    mats = group_matrices("C3")
    mult, inv, ident = multiplication_table(mats)
    classes = conjugacy_classes(mult, inv, ident)
    species = real_species(burnside_dixon(mult, inv, classes))
    assert sorted((parts, tuple(float(x) for x in ch)) for ch, parts in species) == [
        (1, (1.0, 1.0, 1.0)),
        (2, (2.0, -1.0, -1.0)),
    ]
    t = named_table("C3")
    assert [(i.label, i.parts) for i in t.irreps] == [("A", 1), ("E", 2)]
    # x, y, z span A + E in C3, and the joined E counts once (common practice)
    assert t.reduce([float(np.trace(m)) for m in mats]) == {"A": 1, "E": 1}


def test_axis_rule_puts_z_on_the_principal_axis():
    # a C4v group turned so that its C4 lies along x: the rule must bring z back onto it
    turn = np.array([[0.0, 0.0, 1.0], [0.0, 1.0, 0.0], [-1.0, 0.0, 0.0]])
    mats = [turn @ m @ turn.T for m in group_matrices("C4v")]
    frame = choose_frame(describe_exact(mats), np.zeros((0, 3)), None)
    assert frame.kind == "axial"
    assert np.allclose(np.abs(frame.axes[2]), [1.0, 0.0, 0.0])


def test_named_groups_close_and_refuse_second_names():
    assert len(close_group(group_generators("Oh"))) == 48  # order of Oh (common practice)
    with pytest.raises(InputError, match="it is Ci"):
        named_table("S2")  # S2 is the same group as Ci (common practice)
    with pytest.raises(InputError, match="not a point-group name"):
        group_generators("Q7")


def test_any_object_with_site_vectors_gives_the_same_table(rules):
    from dataclasses import dataclass

    @dataclass(frozen=True)
    class Sites:
        symbol: str
        linear: bool
        vectors: tuple

    oc = rules.geometry("OC-6")
    ops = tuple(range(len(oc.operations)))
    assert character_table(Sites("OC-6", False, oc.vectors), ops) == character_table(oc, ops)


def test_formula_tables_json_is_the_isomers_tables(rules):
    res = character_tables("Ma2b2c2", isomer_id="2")
    iso = enumerate_isomers(parse_abstract("Ma2b2c2"), rules.geometry("OC-6")).get("2")
    assert res.to_dict() == {"isomer": "2", **table_for_isomer(iso).to_dict()}
    every = character_tables("Ma2b2c2", geometry="OC-6").to_dict()
    assert isinstance(every, list) and [d["isomer"] for d in every] == ["1a", "1b", "2", "3", "4", "5"]


_GOLDEN_CHARTABLE = [name for name in GOLDEN if name.startswith("chartable_")]


@pytest.mark.parametrize("name", _GOLDEN_CHARTABLE)
def test_chartable_output_is_byte_identical(name):
    code, out, err = cli(GOLDEN[name])
    assert code == 0, err
    assert out.encode("utf-8") == (GOLDEN_DIR / name).read_bytes()


def test_chartable_command(capsys):
    assert _run(["chartable", "D4h"]) == 0
    out = capsys.readouterr().out
    assert "B1g" in out and "x2-y2" in out and "C2'" in out
    assert _run(["chartable", "Ma2b2c2", "--isomer", "2", "--json"]) == 0
    assert '"axes"' in capsys.readouterr().out
    assert _run(["chartable", "Q7x"]) == 2
