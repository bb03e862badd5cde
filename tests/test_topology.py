"""Tripods, piano stools and the geometry choice against textbook answers.

Tripodal ligands (Tp, tacn, triphos) cap one face with three equivalent
donors; an η-ring is one site whose axis carries the ring's symmetry, and a
piano stool's frame follows its number of legs; the default geometry of a
real centre follows the rules of ``rules/geometry_choice.toml``, textbook
exceptions included.  Each check value names its source beside it.
"""

from __future__ import annotations

import json

import pytest
from _cli import cli  # tests/ is on sys.path under pytest

from enumerator.errors import InputError, RuleError
from enumerator.model.composition import LigandKind
from enumerator.parse.abstract import parse_abstract
from enumerator.rules.geometry_choice import load_geometry_choice
from enumerator.rules.ligands import load_ligands
from enumerator.rules.ruleset import load_rules
from enumerator.workflow.pipeline import analyse


def _isomers(formula: str, **options) -> list[dict]:
    return analyse(formula, **options).to_dict()["isomers"]


def _centre(formula: str) -> dict:
    return analyse(formula).to_dict()["centre"]


# ------------------------------------------------------------------ tripods


@pytest.mark.parametrize("formula", ["[TpMn(CO)3]", "[W(CO)3(tacn)]", "[Cr(CO)3(triphos)]", "[Mo(CO)3(Me3tacn)]"])
def test_tripod_tricarbonyls_are_c3v(formula):
    # fac-M(CO)3 under a tripod: local C3v, CO stretches A1 + E, two IR bands and one 13C environment
    # (Cotton, Chemical Applications of Group Theory, 3rd ed., ch. 10, fac-L3M(CO)3; from memory)
    (iso,) = _isomers(formula)
    co = iso["modes"]["CO"]
    assert iso["point_group"] == "C3v"
    assert (co["species"], co["ir"], co["nmr"]) == ("A1 + E", 2, 1)
    assert len(co["environments"]) == 1
    # the three donors of the tripod are one environment too (C3 permutes them; common practice)
    tripod = next(k for k in iso["nmr_environments"] if k != "CO")
    assert iso["nmr_environments"][tripod]["environments"] == 1


def test_tpmn_co_one_nmr_environment():
    # [TpMn(CO)3]: one CO 13C environment (C3v; Cotton, Chemical Applications of Group Theory; from memory)
    (iso,) = _isomers("[TpMn(CO)3]")
    assert iso["nmr_environments"]["CO"]["environments"] == 1


def test_tripod_links_form_a_ring_over_a_face(rules):
    # a tripod links every pair of its donors (three links), on one triangular face (common practice)
    s = analyse("M{AAA}b3", geometry="OC-6").isomer_set
    (iso,) = s.isomers
    tri = iso.sites_of("{AAA}")
    assert [(a, b) for a, b, n in iso.links() if n == "{AAA}"] == [(tri[0], tri[1]), (tri[0], tri[2]), (tri[1], tri[2])]
    assert all(rules.geometry("OC-6").relation(a, b) == "cis" for a, b, _ in iso.links())


@pytest.mark.parametrize(
    "formula, groups, source",
    [
        ("M{AAA}b3", ["C3v"], "fac-L3 cap with three like legs: C3v (common practice)"),
        ("M(AAA)b3", ["C2v", "Cs"], "a chain stays a chain: fac (Cs) and mer (C2v) (Miessler & Tarr; from memory)"),
        ("M{ABB}c3", ["Cs"], "a mixed-donor tripod keeps its labels: one mirror through A (common practice)"),
        ("M{AAA}2", ["D3d"], "bis(tripod), as [Co(tacn)2]3+ (from memory: D3d)"),
        ("M{AAA}bcd", ["C1", "C1"], "fac-Ma3bcd is chiral (Miessler & Tarr, isomer table; from memory)"),
    ],
)
def test_tripod_versus_chain(formula, groups, source):
    assert sorted(i["point_group"] for i in _isomers(formula, geometry="OC-6")) == groups, source


# ------------------------------------------------------------------ piano stools


@pytest.mark.parametrize(
    "formula, geometry, groups, co_species, source",
    [
        (
            "[CpCo(CO)2]",
            "TPY-3",
            ["Cs"],
            "A' + A''",
            "one isomer, two equivalent CO, two IR bands (Crabtree, cyclopentadienyl complexes; from memory)",
        ),
        (
            "[CpMn(CO)3]",
            "T-4",
            ["C3v"],
            "A1 + E",
            "cymantrene: local C3v, A1 + E (Housecroft & Sharpe, Inorganic Chemistry, organometallic chapter; "
            "Cotton, Chemical Applications of Group Theory; from memory)",
        ),
        (
            "[(C6H6)Cr(CO)3]",
            "T-4",
            ["C3v"],
            "A1 + E",
            "(benzene)Cr(CO)3: C3v, A1 + E (Housecroft & Sharpe; from memory)",
        ),
        (
            "[CpFe(CO)(PPh3)(Me)]",
            "T-4",
            ["C1", "C1"],
            "A",
            "chiral at iron: one pair of enantiomers (Brunner's chiral-at-metal CpFe(CO)(L)R; from memory)",
        ),
        (
            "[CpW(CO)3Me]",
            "SPY-5",
            ["Cs"],
            "2A' + A''",
            "four-legged piano stool: one isomer, a mirror through Cp, W and Me (Crabtree; from memory)",
        ),
        (
            "[CpW(CO)2(PPh3)Me]",
            "SPY-5",
            ["C1", "C1", "Cs"],
            None,
            "cis (lateral, chiral) and trans (diagonal, Cs) CpM(CO)2LX (Crabtree; from memory)",
        ),
        ("[Cp2ZrCl2]", "T-4", ["C2v"], None, "bent metallocene, C2v (Crabtree; from memory)"),
        ("[Cp2Fe]", "L-2", ["Dinfh"], None, "ferrocene, one isomer; linear idealisation of D5d/D5h (from memory)"),
        ("[Cp*Rh(CO)2]", "TPY-3", ["Cs"], "A' + A''", "as CpCo(CO)2 (Crabtree; from memory)"),
    ],
)
def test_piano_stools(formula, geometry, groups, co_species, source):
    res = analyse(formula)
    assert res.geometry.symbol == geometry, source
    isos = res.to_dict()["isomers"]
    assert sorted(i["point_group"] for i in isos) == groups, source
    if co_species:
        assert {i["modes"]["CO"]["species"] for i in isos} == {co_species}, source


def test_cpco_dicarbonyl_co_equivalent():
    # the two CO of [CpCo(CO)2] are equivalent: one 13C environment (Crabtree; from memory)
    (iso,) = _isomers("[CpCo(CO)2]")
    assert iso["modes"]["CO"]["nmr"] == 1 and iso["nmr_environments"]["CO"]["environments"] == 1
    assert iso["modes"]["CO"]["ir"] == 2  # A' + A'': both IR active (Cotton, Cs character table)


def test_four_legged_stool_puts_the_ring_on_the_apex():
    # the ring on the apex, the four legs on the base (common practice for CpML4 four-legged stools)
    res = analyse("[CpW(CO)2(PPh3)Me]")
    g = res.geometry
    for iso in res.isomers:
        ring = next(s.index for s in iso.sites if s.ring)
        assert all(g.relation(ring, s.index) == "cis" for s in iso.sites if s.index != ring)
    cis, trans = {}, {}
    for iso in res.isomers:
        a, b = iso.sites_of("CO")
        (cis if g.relation(a, b) == "cis" else trans)[iso.id] = iso.point_group
    assert sorted(cis.values()) == ["C1", "C1"] and list(trans.values()) == ["Cs"]  # lateral chiral, diagonal Cs


def test_ring_counts_as_one_site_and_keeps_its_electrons():
    # the ring still donates its electrons (Cp 5 covalent / 6 ionic; Crabtree, ch. 2) but holds one site
    c = _centre("[CpMn(CO)3]")
    assert c["coordination_sites"] == 4 and c["valence_electrons"] == 18
    assert any("η-ring as one site" in n for n in c["notes"])  # the idealisation is said in the output


@pytest.mark.parametrize(
    "formula, geometry, groups",
    [
        ("M(ring)a3", "T-4", ["C3v"]),  # three-legged stool (common practice)
        ("M(ring)a2", "TPY-3", ["Cs"]),  # two-legged stool
        ("M(ring)a4", "SPY-5", ["C4v"]),  # four-legged stool, ring on the apex
        ("M(ring)2", "L-2", ["Dinfh"]),  # metallocene, linear idealisation
        ("M(ring)2a2", "T-4", ["C2v"]),  # bent metallocene
        ("Ma3", "TP-3", ["D3h"]),  # no ring: the abstract default for three sites is unchanged
    ],
)
def test_abstract_stools_choose_their_frame(formula, geometry, groups):
    res = analyse(formula)
    assert res.geometry.symbol == geometry
    assert sorted(i.point_group for i in res.isomers) == groups


def test_unlisted_stool_shape_uses_the_default_with_a_note():
    # 1 ring + 5 legs is not tabulated: the default for six sites, with a note saying so
    res = analyse("M(ring)a5")
    assert res.geometry.symbol == "OC-6" and "no piano-stool frame is tabulated" in res.geometry_reason


def test_bent_metallocene_with_three_legs_is_refused():
    # Cp2MX3 holds its legs between bent rings (from memory: Cp2TaH3); no idealised frame here: refuse, exit 2
    code, out, err = cli(["isomers", "[Cp2TaH3]"])
    assert code == 2 and out == "" and len(err.strip().splitlines()) == 1 and "--geometry" in err
    code, out, _ = cli(["isomers", "[Cp2TaH3]", "--geometry", "TBPY-5", "--json"])
    assert code == 0 and "no default" in json.loads(out)["geometry_reason"]


# ------------------------------------------------------------------ geometry choice


@pytest.mark.parametrize(
    "formula, geometry, alternative, words, source",
    [
        ("[NiCl4]2-", "T-4", "SP-4", "paramagnetic", "Greenwood & Earnshaw, 2nd ed., nickel; from memory"),
        ("[NiBr2(PPh3)2]", "T-4", "SP-4", "paramagnetic", "Greenwood & Earnshaw, 2nd ed., nickel; from memory"),
        ("[NiCl2(PPh3)2]", "T-4", "SP-4", "paramagnetic", "Cotton & Wilkinson, nickel; from memory"),
        ("[NiCl2(PEt3)2]", "SP-4", "T-4", "square planar", "trialkyl phosphine: planar (Cotton & Wilkinson)"),
        ("[Ni(CN)4]2-", "SP-4", "T-4", "diamagnetic", "Housecroft & Sharpe, [Ni(CN)4]2-; from memory"),
        ("[PdCl4]2-", "SP-4", "T-4", "whatever the ligands", "Housecroft & Sharpe, heavier d8; from memory"),
        ("[PtCl2(NH3)2]", "SP-4", "T-4", "square planar", "cisplatin (Housecroft & Sharpe)"),
        ("[IrCl(CO)(PPh3)2]", "SP-4", "T-4", "square planar", "Vaska's complex (Crabtree)"),
        ("[Co(CN)5]3-", "SPY-5", "TBPY-5", "square pyramidal", "Greenwood & Earnshaw, cobalt; from memory"),
        ("[Ni(CN)5]3-", "SPY-5", "TBPY-5", "both shapes", "Raymond, Corfield & Ibers 1968; from memory"),
        ("[Fe(CO)5]", "TBPY-5", "SPY-5", "trigonal bipyramidal", "Fe(CO)5 D3h (Housecroft & Sharpe)"),
        ("[Ni(CO)4]", "T-4", "SP-4", "d10", "Ni(CO)4 tetrahedral (Crabtree)"),
        ("[Pt(PPh3)3]", "TP-3", "TS-3", "trigonal planar", "Greenwood & Earnshaw, platinum; from memory"),
        ("[Ag(NH3)2]+", "L-2", None, "linear", "Housecroft & Sharpe, Ag(I); from memory"),
        ("[TiCl4]", "T-4", "SP-4", "d0", "TiCl4 tetrahedral (Housecroft & Sharpe; from memory)"),
        ("[WMe6]", "TPR-6", "OC-6", "trigonal prismatic", "Pfennig & Seppelt, Science 1996; from memory"),
        ("[CuCl4]2-", "T-4", "SP-4", "flattened", "Greenwood & Earnshaw, copper; from memory"),
        ("[Cr(CO)6]", "OC-6", "TPR-6", "octahedral", "common practice"),
    ],
)
def test_geometry_choice(formula, geometry, alternative, words, source):
    c = _centre(formula)
    assert c["geometry"] == geometry, source
    assert alternative is None or alternative in c["geometry_alternatives"], source
    assert words in c["geometry_reason"], source
    assert c["geometry_rule"] and c["geometry_source"]  # every rule names its source


def test_geometry_choice_text_shows_reason():
    code, out, _ = cli(["isomers", "[NiCl4]2-"])
    assert code == 0 and out.splitlines()[0] == "[NiCl4]2- on T-4 (tetrahedron)"
    assert out.splitlines()[1].startswith("geometry: T-4: 4-coordinate Ni(II), d8; d8 Ni(II) with weak-field halides")


def test_every_rule_has_a_source_and_the_builtin_table_survives(rules):
    choice = load_geometry_choice(rules)
    assert all(r.source for r in choice.rules)
    names = [r.name for r in choice.rules]
    assert len(names) == len(set(names))
    # the exceptions come before the general rule of their site count
    assert names.index("ni-ii-halide-tetrahedral") < names.index("d8-four-coordinate")
    assert names.index("co-ii-cyanide-square-pyramid") < names.index("five-coordinate")


def test_user_rule_replaces_a_builtin_one(tmp_path):
    (tmp_path / "geometry_choice.toml").write_text(
        '[[rule]]\nname = "ni-ii-halide-tetrahedral"\nsites = 4\ncentres = ["Ni(II)"]\ngeometry = "SP-4"\n'
        'why = "mine"\nsource = "test"\n',
        encoding="utf-8",
    )
    res = analyse("[NiCl4]2-", rules=[str(tmp_path)])
    assert res.geometry.symbol == "SP-4" and "mine" in res.geometry_reason
    assert analyse("[NiCl4]2-").geometry.symbol == "T-4"  # the built-in rules are unaffected


@pytest.mark.parametrize(
    "body, needle",
    [
        ('[[rule]]\nname = "x"\ngeometry = "XX-9"\nwhy = "w"\nsource = "s"\n', "not a geometry in force"),
        ('[[rule]]\nname = "x"\ngeometry = "T-4"\nwhy = "w"\n', "missing key 'source'"),
        ('[[rule]]\nname = "x"\ngeometry = "T-4"\nwhy = "w"\nsource = "s"\nsitse = 4\n', "did you mean 'sites'"),
        ('[classes]\nh = ["Chloride"]\n', "not in the ligand catalogue"),
        ('[[rule]]\nname = "x"\ngeometry = "T-4"\nwhy = "w"\nsource = "s"\nall_ligands_in = ["nope"]\n', "[classes]"),
        ('[[rule]]\nname = "x"\ngeometry = "T-4"\nwhy = "w"\nsource = "s"\nabstract = true\nd = 8\n', "abstract"),
        ('[[rule]]\nname = "x"\ngeometry = "T-4"\nwhy = "w"\nsource = "s"\ncentres = ["Ni2"]\n', "oxidation state"),
        ('[[rule]]\nname = "x"\ngeometry = "T-4"\nwhy = "w"\nsource = "s"\nrefuse = true\n', "needs 'fix'"),
        ('[[rule]]\nname = "x"\ngeometry = "T-4"\nwhy = "w"\nsource = "s"\nsites = "four"\n', "whole number"),
    ],
)
def test_bad_geometry_choice_files_are_named(tmp_path, body, needle):
    (tmp_path / "geometry_choice.toml").write_text(body, encoding="utf-8")
    with pytest.raises(RuleError) as exc:
        load_geometry_choice(load_rules([str(tmp_path)]))
    line = exc.value.line()
    assert "geometry_choice.toml" in line and needle in line and "\n" not in line


# ------------------------------------------------------------------ catalogue and notation


def _catalogue_error(tmp_path, entry: str) -> str:
    (tmp_path / "ligands.toml").write_text(entry, encoding="utf-8")
    with pytest.raises(RuleError) as exc:
        load_ligands(load_rules([str(tmp_path)]))
    return exc.value.line()


_TRIPOD = (
    '[[ligand]]\nname = "tp2"\nlabel = "x"\nsmiles = "[BH-](n1ccc[n:1]1)(n1ccc[n:2]1)n1ccc[n:3]1"\n'
    'donors = ["N", "N", "N"]\ndenticity = 3\ncharge = -1\nelectrons_covalent = 5\nelectrons_ionic = 6\n'
)


def test_catalogue_checks_the_topology(tmp_path):
    assert "topology 'tri'" in _catalogue_error(tmp_path, _TRIPOD + 'topology = "tri"\n')
    assert "always caps a face" in _catalogue_error(tmp_path, _TRIPOD + 'topology = "tripod"\narrangements = ["mer"]\n')
    ring = (
        '[[ligand]]\nname = "cp2"\nlabel = "x"\nsmiles = "[cH-:1]1[cH:2][cH:3][cH:4][cH:5]1"\n'
        'donors = ["C", "C", "C"]\ndenticity = 3\nhapticity = 5\nring = true\ncharge = -1\n'
        "electrons_covalent = 5\nelectrons_ionic = 6\n"
    )
    line = _catalogue_error(tmp_path, ring)
    assert "one site" in line and "denticity = 1" in line  # the old three-site form is refused with the fix
    (tmp_path / "ligands.toml").write_text(_TRIPOD + 'topology = "tripod"\n', encoding="utf-8")
    kind = load_ligands(load_rules([str(tmp_path)]))["tp2"].kind()
    assert kind.tripod and kind.denticity == 3


def test_letter_notation_for_tripods_and_rings():
    c = parse_abstract("M{ABB}c3")
    assert [(k.name, k.topology, k.donors) for k in c.kinds] == [
        ("{ABB}", "tripod", ("A", "B", "B")),
        ("c", "chain", ("c",)),
    ]
    assert parse_abstract("M(AAA)b3").kinds[0].topology == "chain"
    assert parse_abstract("M(ring)a3").donor_count == 4
    for text, needle in (("M{AA}b4", "is not a tripod"), ("M{AAAb3", "never closed")):
        with pytest.raises(InputError) as exc:
            parse_abstract(text)
        assert needle in exc.value.line()
    code, _, err = cli(["isomers", "M{AA}b4"])
    assert code == 2 and len(err.strip().splitlines()) == 1


def test_tripod_takes_no_span_or_arrangement():
    for option in ({"arrangements": {"{AAA}": "mer"}}, {"spans": {"{AAA}": "trans"}}):
        with pytest.raises(InputError):
            analyse("M{AAA}b3", **option)
    with pytest.raises(InputError):
        LigandKind("x", ("C", "C", "C"), ring=True)  # a ring holds one site
    with pytest.raises(InputError):
        LigandKind("x", ("N", "N"), topology="tripod")  # a tripod has three donors
