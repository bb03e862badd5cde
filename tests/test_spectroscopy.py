"""Stretch-mode species, band counts, NMR environments and pair
distinguishability against textbook results.

Sources named beside each check value:
  Cotton = F. A. Cotton, Chemical Applications of Group Theory, 3rd ed. (Wiley 1990), ch. 10;
  Nakamoto = K. Nakamoto, Infrared and Raman Spectra of Inorganic and Coordination
             Compounds, Part B, 6th ed. (Wiley 2009), metal carbonyls / cyano complexes;
  H&S = C. E. Housecroft, A. G. Sharpe, Inorganic Chemistry, 4th ed. (Pearson 2012), ch. 4.
"""

from __future__ import annotations

import json
import time

import pytest

from enumerator.analyses.stretch import StretchAnalysis, stretch_modes
from enumerator.errors import InputError
from enumerator.rules.reporters import load_reporters
from enumerator.rules.ruleset import load_rules
from enumerator.workflow.pipeline import analyse


def _modes(formula, geometry, reporters=(("a", "CO"),), cls="CO"):
    r = analyse(formula, geometry=geometry, reporters=reporters)
    return r, [(i, stretch_modes(i, cls)) for i in r.isomers]


def _one(formula, geometry, group, **kw):
    _, ms = _modes(formula, geometry, **kw)
    hits = [m for i, m in ms if i.point_group == group]
    assert len(hits) == 1, (formula, geometry, group, [i.point_group for i, _ in ms])
    return hits[0]


@pytest.mark.parametrize(
    "formula, geometry, group, species, ir, raman, nmr",
    [
        # M(CO)6: A1g + Eg + T1u, one IR band (Cotton 10.2; Nakamoto; H&S 4.7)
        ("Ma6", "OC-6", "Oh", "A1g + Eg + T1u", 1, 2, 1),
        # M(CO)5L: 2A1 + B1 + E, three IR bands (Cotton 10.2; Nakamoto)
        ("Ma5b", "OC-6", "C4v", "2A1 + B1 + E", 3, 4, 2),
        # cis-M(CO)4L2: 2A1 + B1 + B2, four IR bands (Cotton 10.2; Nakamoto)
        ("Ma4b2", "OC-6", "C2v", "2A1 + B1 + B2", 4, 4, 2),
        # trans-M(CO)4L2: A1g + B1g + Eu, one IR band (Cotton 10.2; Nakamoto)
        ("Ma4b2", "OC-6", "D4h", "A1g + B1g + Eu", 1, 2, 1),
        # fac-M(CO)3L3: A1 + E, two IR bands (Cotton 10.2; Nakamoto)
        ("Ma3b3", "OC-6", "C3v", "A1 + E", 2, 2, 1),
        # mer-M(CO)3L3: 2A1 + B1 with sigma_v(xz) the plane of the three CO
        # (our axis rule; 2A1 + B2 with the other choice), three IR bands (Cotton 10.2; Nakamoto)
        ("Ma3b3", "OC-6", "C2v", "2A1 + B1", 3, 3, 2),
        # cis-M(CO)2L4: A1 + B1 or B2, two IR bands (Cotton 10.2; Nakamoto)
        ("Ma2b4", "OC-6", "C2v", None, 2, 2, 1),
        # trans-M(CO)2L4: A1g + A2u, one IR band, one Raman band (Cotton 10.2; Nakamoto)
        ("Ma2b4", "OC-6", "D4h", "A1g + A2u", 1, 1, 1),
        # trigonal-bipyramidal M(CO)5: 2A1' + E' + A2'', two IR bands (Cotton 10.2; H&S 4.7; Nakamoto)
        ("Ma5", "TBPY-5", "D3h", "2A1' + E' + A2''", 2, 3, 2),
        # axial M(CO)4L (C3v): 2A1 + E, three IR bands (Cotton 10.2; Nakamoto)
        ("Ma4b", "TBPY-5", "C3v", "2A1 + E", 3, 3, 2),
        # equatorial M(CO)4L (C2v): 2A1 + B1 + B2, four IR bands (Cotton 10.2; Nakamoto)
        ("Ma4b", "TBPY-5", "C2v", "2A1 + B1 + B2", 4, 4, 2),
        # see-saw M(CO)4 (C2v): 2A1 + B1 + B2, four IR bands (group theory, common
        # practice; the C2v Fe(CO)4 fragment in matrices shows four, from memory)
        ("Ma4", "SS-4", "C2v", "2A1 + B1 + B2", 4, 4, 2),
        # T-shaped M(CO)3 (C2v): 2A1 + B, three IR bands (group theory, common practice)
        ("Ma3", "TS-3", "C2v", None, 3, 3, 2),
        # tetrahedral M(CO)4: A1 + T2, one IR band (H&S 4.7; Nakamoto)
        ("Ma4", "T-4", "Td", "A1 + T2", 1, 2, 1),
        # square-pyramidal M(CO)5: 2A1 + B1 + E, three IR bands (Nakamoto; from memory)
        ("Ma5", "SPY-5", "C4v", "2A1 + B1 + E", 3, 4, 2),
        # fac-M(CO)3L3 (C3v): A1 + E (Nakamoto; Cotton 10.2)
        ("Ma3b3", "OC-6", "C3v", "A1 + E", 2, 2, 1),
        # three-legged piano stool M(ring)(CO)3, the ring on one site: A1 + E (H&S, (eta6-C6H6)Cr(CO)3)
        ("M(ring)a3", "T-4", "C3v", "A1 + E", 2, 2, 1),
        # two-legged piano stool M(ring)(CO)2 (Cs): A' + A'', two IR bands (Cotton, Cs table; from memory)
        ("M(ring)a2", "TPY-3", "Cs", "A' + A''", 2, 2, 1),
    ],
)
def test_textbook_carbonyl_stretches(formula, geometry, group, species, ir, raman, nmr):
    m = _one(formula, geometry, group)
    if species:
        assert m.species == species
    assert (m.ir, m.raman, m.nmr) == (ir, raman, nmr)


def test_square_planar_tetracyanide():
    # [M(CN)4]n- square planar: A1g + B1g + Eu, one IR band (Nakamoto, cyano complexes; H&S)
    m = _one("Ma4", "SP-4", "D4h", reporters=(("a", "CN"),), cls="CN")
    assert (m.species, m.ir, m.raman) == ("A1g + B1g + Eu", 1, 2)


def test_octacyanide_dodecahedron_and_antiprism():
    # [Mo(CN)8]4-: D2d dodecahedron 2A1 + 2B2 + 2E (4 IR, 6 Raman), D4d square
    # antiprism A1 + B2 + E1 + E2 + E3 (2 IR, 3 Raman); the classic test between
    # the two shapes (Nakamoto, Part B, octacyano complexes; from memory)
    m = _one("[Mo(CN)8]4-", "DD-8", "D2d", reporters=(), cls="CN")
    assert (m.species, m.ir, m.raman) == ("2A1 + 2B2 + 2E", 4, 6)
    m = _one("[Mo(CN)8]4-", "SAPR-8", "D4d", reporters=(), cls="CN")
    assert (m.species, m.ir, m.raman) == ("A1 + B2 + E1 + E2 + E3", 2, 3)


def test_seven_coordinate_heptacarbonyl_shapes():
    # M(CO)7 on the capped octahedron (C3v; site orbits 1 + 3 + 3): 3A1 + 2E,
    # 5 IR; on the capped trigonal prism (C2v; orbits 1 + 4 + 2): 3A1 + A2 +
    # 2B + B, 6 IR (A2 is IR-inactive), 7 Raman (group theory, common practice)
    m = _one("Ma7", "OCF-7", "C3v")
    assert (m.species, m.ir, m.raman, m.nmr) == ("3A1 + 2E", 5, 5, 3)
    m = _one("Ma7", "TPRS-7", "C2v")
    assert (m.ir, m.raman, m.nmr) == (6, 7, 3) and m.species.startswith("3A1 + A2")


def test_hexacyanide():
    # [M(CN)6]n-: A1g + Eg + T1u, one IR band (Nakamoto, cyano complexes)
    m = _one("Ma6", "OC-6", "Oh", reporters=(("a", "CN"),), cls="CN")
    assert (m.species, m.ir) == ("A1g + Eg + T1u", 1)


def test_linear_dicarbonyl():
    # linear M(CO)2 (D∞h): Sigma_g+ (Raman) + Sigma_u+ (IR) (Nakamoto; from memory)
    m = _one("Ma2", "L-2", "Dinfh")
    assert (m.species, m.ir, m.raman, m.both_species) == ("Sigma_g+ + Sigma_u+", 1, 1, ())
    m = _one("Mab", "L-2", "Cinfv")
    assert (m.species, m.ir, m.raman) == ("Sigma+", 1, 1)


def test_mutual_exclusion_with_inversion():
    # rule of mutual exclusion for centrosymmetric molecules (Cotton 10.2; Nakamoto)
    m = _one("Ma6", "OC-6", "Oh")
    assert m.both_species == ()


def test_co_window_contains_terminal_range():
    # terminal CO stretches fall at roughly 1850-2125 cm-1 (common practice)
    co = load_reporters(load_rules()).get("CO")
    assert co.window[0] <= 1850 and co.window[1] >= 2125
    assert co.nucleus == "13C"  # 13C NMR of carbonyls (common practice)
    names = set(load_reporters(load_rules()).names)
    assert {"CO", "CN", "NO"} <= names


def test_unknown_reporter_class_is_a_clear_input_error():
    with pytest.raises(InputError) as e:
        analyse("Ma4b2", geometry="OC-6", reporters=(("a", "XX"),))
    assert "CO" in e.value.line() and "XX" in e.value.line()


def test_pairs_json_and_enantiomers():
    # cis-M(AA)2b2 is chiral (Delta/Lambda; Cotton; common practice): enantiomers never distinct
    r = analyse("M(AA)2b2", geometry="OC-6", reporters=(("b", "CO"),))
    doc = r.to_dict()
    n = len(doc["isomers"])
    assert len(doc["pairs"]) == n * (n - 1) // 2
    en = [p for p in doc["pairs"] if p.get("note") == "enantiomers"]
    assert en and all(not (p["ir_distinct"] or p["raman_distinct"] or p["nmr_distinct"]) for p in en)
    # cis (C2, 2 IR) and trans (D2h, 1 IR) b2 differ by IR (Cotton 10.2)
    other = [p for p in doc["pairs"] if p.get("note") != "enantiomers"]
    assert other and all(p["ir_distinct"] and p["cheapest"] == "IR" for p in other)
    iso = doc["isomers"][0]
    assert set(iso["modes"]["CO"]) >= {"species", "ir", "raman", "nmr"}
    json.dumps(doc)


def test_nmr_environments_of_other_ligands():
    # fac-M(CO)3L3: one 31P environment; mer: two (Cotton; common practice)
    r = analyse("Ma3b3", geometry="OC-6", reporters=(("a", "CO"),))
    an = r.analysis(StretchAnalysis)
    by_group = {i.point_group: an.isomer_json(i.id)["nmr_environments"]["b"]["environments"] for i in r.isomers}
    assert by_group == {"C3v": 1, "C2v": 2}


def test_fluxional_caution_for_five_coordination():
    # five-coordinate centres are commonly fluxional (Berry pseudorotation; H&S; common practice)
    r = analyse("Ma4b", geometry="TBPY-5", reporters=(("a", "CO"),))
    notes = r.analysis(StretchAnalysis).top_json()["spectroscopy_notes"]
    assert any("fluxional" in n for n in notes)


def test_readable_output_has_pair_matrix():
    from enumerator.render.text import render

    text = render(analyse("Ma3b3", geometry="OC-6", reporters=(("a", "CO"),)))
    assert "CO species" in text and "IR < Raman < NMR" in text and "sigma_v(xz)" in text


def test_pairs_stay_fast_for_hundreds_of_isomers():
    # common practice: the pair list is quadratic; a few hundred isomers must stay quick
    r = analyse("Ma2b2c2d2e2f2", geometry="IC-12", reporters=(("a", "CO"),), limit=400)
    an = r.analysis(StretchAnalysis)
    t0 = time.perf_counter()
    pairs = an.pairs()
    dt = time.perf_counter() - t0
    n = len(an.ids)
    assert len(pairs) == n * (n - 1) // 2
    assert dt < 2.0


def test_pair_tally_equals_counting_every_pair():
    # the tally over count-signature classes must equal a pair-by-pair count
    # (common practice: plain counting)
    from collections import Counter

    from enumerator.analyses.stretch import StretchAnalysis
    from enumerator.workflow.pipeline import analyse

    for formula, geo, rep, limit in [
        ("Ma2b2c2", "OC-6", "a", None),
        ("Ma2b2c2d2e2f2", "IC-12", "a", 300),
        ("M(AB)2b2", "OC-6", "b", None),
    ]:
        a = analyse(formula, geometry=geo, reporters=((rep, "CO"),), limit=limit).analysis(StretchAnalysis)
        brute = Counter("en" if p.note else (p.cheapest or "--") for p in a.pairs())
        assert a.pair_tally() == dict(brute), formula


def test_user_reporter_file_replaces_and_is_checked(tmp_path):
    import pytest

    from enumerator.errors import RuleError

    # a later file's class replaces the built-in one of the same name
    (tmp_path / "reporters.toml").write_text(
        '[class.CO]\nname = "carbonyl"\nbond = "C-O"\nnucleus = "13C"\n'
        'ir_window_cm1 = [1700, 2150]\nwindow_source = "test value"\n',
        encoding="utf-8",
    )
    co = load_reporters(load_rules([tmp_path])).get("CO")
    assert co.window == (1700.0, 2150.0) and co.source == "test value"
    bad = tmp_path / "bad"
    bad.mkdir()
    (bad / "reporters.toml").write_text(
        '[class.XY]\nname = "x"\nbond = "X-Y"\nnucleus = "1H"\nir_window_cm1 = [2000]\nwindow_source = "x"\n',
        encoding="utf-8",
    )
    with pytest.raises(RuleError) as exc:
        load_reporters(load_rules([bad]))
    assert "reporters.toml" in exc.value.line() and "ir_window_cm1" in exc.value.line()
