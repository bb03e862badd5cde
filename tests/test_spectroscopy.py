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
    assert "CO species" in text and "IR < IRp < Raman < NMR" in text and "sigma_v(xz)" in text


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
        brute = Counter(p.tally_key for p in a.pairs())
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


# ---------------------------------------------------------------- bands predicted weak: one meaning everywhere

WEAK_CASES = [
    ("Ma6", "OC-6"),
    ("Ma5b", "OC-6"),
    ("Ma4b2", "OC-6"),
    ("Ma3b3", "OC-6"),
    ("Ma2b4", "OC-6"),
    ("Ma4bc", "OC-6"),
    ("Ma2b2c2", "OC-6"),
    ("Ma2b2cd", "OC-6"),
    ("Ma2bc", "SP-4"),
    ("Ma2b2", "SP-4"),
    ("Ma4b", "TBPY-5"),
    ("Ma3b2", "TBPY-5"),
    ("Ma4b", "SPY-5"),
    ("Ma4b2", "TPR-6"),
    ("Ma2", "L-2"),
    ("Mab", "L-2"),
]


@pytest.mark.parametrize("formula,geometry", WEAK_CASES)
def test_predicted_weak_species_are_the_bond_dipole_zeros(formula, geometry):
    # bond-dipole model (Braterman, Metal Carbonyl Spectra, 1975, from memory): a species whose oscillator
    # combinations move only trans pairs in phase has zero intensity whatever the force constants; the
    # symmetry-only count agrees with the GF solution for two different sets of constants
    from enumerator.vibrations.pattern import band_pattern

    for iso in analyse(formula, geometry=geometry, reporters=(("a", "CO"),)).isomers:
        m = stretch_modes(iso, "CO")
        for consts in ({"k": 16.0, "kc": 0.3, "kt": 0.6}, {"k": 15.2, "kc": 0.45, "kt": 0.2}):
            bands = band_pattern(iso, "CO", consts).bands
            zero = [b for b in bands if b.dipole_forbidden]
            assert {b.species for b in zero} == set(m.weak_species), (formula, iso.id)
            assert len(zero) == m.ir_weak and m.ir_dipole == sum(1 for b in bands if b.ir_active)


def test_trans_dicarbonyl_counts_agree_in_every_output():
    # [RuCl2(CO)2(PPh3)2] with trans CO groups (C2v): A1 + B2 are IR-allowed (Cotton 10.2), the A1 moves the
    # trans pair in phase and has zero bond-dipole intensity (Braterman, from memory): counted as 2 IR bands,
    # 1 of them predicted weak, in isomers (table and JSON), bands, match and the pair verdicts
    from enumerator.render.text import render
    from enumerator.workflow.bands import match_spectrum, predict_spectra
    from enumerator.workflow.pipeline import Request

    r = analyse("[RuCl2(CO)2(PPh3)2]")
    trans = next(i for i in r.isomers if i.id == "2")
    m = stretch_modes(trans, "CO")
    assert (m.ir, m.ir_weak, m.weak_species, m.ir_text()) == (2, 1, ("A1",), "2 (1 predicted weak)")
    doc = r.to_dict()
    modes = next(x for x in doc["isomers"] if x["id"] == "2")["modes"]["CO"]
    assert (modes["ir"], modes["ir_predicted_weak"], modes["ir_bond_dipole"]) == (2, 1, 1)
    # the isomer table (text, CSV, LaTeX, Markdown and the DataFrame share one model) keeps integer counts and
    # gives the predicted-weak bands a column of their own right after the IR count
    df = r.to_dataframe().set_index("isomer")
    assert (df.loc["2", "CO IR"], df.loc["2", "CO IR predicted weak"]) == (2, 1)
    assert "CO IR predicted weak" in render(r)
    bands = predict_spectra(Request("[RuCl2(CO)2(PPh3)2]"), isomer_id="2").to_dict()
    pat = bands["isomers"][0]["patterns"][0]
    assert (pat["ir_count"], pat["ir_predicted_weak"]) == (2, 1)
    assert [b["predicted_weak"] for b in pat["bands"]] == [True, False]
    match = match_spectrum(Request("[RuCl2(CO)2(PPh3)2]"), [2000.0]).to_dict()
    cand = next(c for c in match["candidates"] if c["isomers"] == ["2"])
    assert cand["ir_count"] == 2 and cand["ir_predicted_weak"] == 1
    assert [p["predicted_weak"] for p in cand["predicted"]] == [True, False]
    assert "1 with bond-dipole intensity, 1 predicted weak" in cand["explanation"]


def test_pair_verdicts_read_the_ir_pattern():
    # [RuCl2(CO)2(PPh3)2]: the trans-CO isomer shows one strong band, the cis-CO isomers two (bond-dipole
    # model; Braterman, from memory), so IR tells them apart by the pattern although both count 2 allowed
    # bands; against all-trans (one IR band, B2u) the count differs only by the predicted-weak A1, so IR
    # does not decide and Raman does (A1 + B2 vs Ag: 2 vs 1 Raman bands, Cotton 10.2)
    a = analyse("[RuCl2(CO)2(PPh3)2]").analysis(StretchAnalysis)
    by = {(p.a, p.b): p for p in a.pairs()}
    p23 = by[("2", "3")]
    assert (p23.ir, p23.ir_pattern, p23.cheapest, p23.code) == (False, True, "IR", "IRp")
    assert p23.to_dict()["cheapest_qualifier"] == "pattern" and p23.to_dict()["ir_pattern_distinct"] is True
    p25 = by[("2", "5")]
    assert p25.ir and not p25.ir_dipole and p25.code == "Ra"
    p35 = by[("3", "5")]
    assert p35.code == "IR" and p35.to_dict()["cheapest_qualifier"] == "counts"
    assert p35.to_dict()["ir_pattern_distinct"] is None  # not judged: the counts decide
    assert by[("3", "4")].code == "--"  # same generic pattern, same counts
    assert a.pair_tally()["IR (pattern)"] == 4


def test_fac_and_mer_bromide_tricarbonyl_are_told_apart_by_ir_pattern():
    # fac- and mer-[MnBr(CO)3(bpy)] both have three IR bands (2A' + A'', Cs; Cotton 10.2), yet IR tells them
    # apart every day: mer shows one weak band high above two strong ones, fac three of similar strength
    # (common practice; from memory)
    r = analyse("[MnBr(CO)3(bpy)]")
    # judged on the additive band model's predictions, each band with the model's own sigma
    assert all(not b.sigma_default for p in r.analysis(StretchAnalysis).patterns for ps in p for b in ps)
    (pair,) = r.analysis(StretchAnalysis).pairs()
    assert not pair.ir and pair.ir_pattern is True and pair.code == "IRp"
    d = r.to_dict()["pairs"][0]
    assert d["cheapest"] == "IR" and d["cheapest_qualifier"] == "pattern" and d["ir_distinct"] is False
    from enumerator.render.text import render

    assert " IRp" in render(r) and "IRp = IR told apart by the band pattern" in render(r)


def test_pattern_tier_has_a_size_limit_and_says_so():
    # the pattern tier compares pairs (quadratic; common practice to bound it): above the limit it is not
    # judged, the pairs say null and the status says why
    from enumerator.analyses.stretch.analysis import PATTERN_MAX_ISOMERS

    r = analyse("Ma2b2c2d2e2f2", geometry="IC-12", reporters=(("a", "CO"),), limit=PATTERN_MAX_ISOMERS + 10)
    a = r.analysis(StretchAnalysis)
    assert a.patterns is None and "not judged" in a.pattern_status()
    assert all(p.ir_pattern is None for p in a.pairs()[:50])
    assert "not judged" in r.to_dict()["pair_pattern_status"]
