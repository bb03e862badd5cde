"""The matcher (enumerator.vibrations.matching) and its likelihood (enumerator.analyses.stretch.likelihood):
textbook spectra rank the right isomer first, typed values are bounded, and the ranking says when it cannot
decide or cannot be trusted.

Measured values and their sources are named beside each check.  Braterman = P. S. Braterman, Metal Carbonyl
Spectra, Academic Press 1975; Cotton = F. A. Cotton, Chemical Applications of Group Theory, 3rd ed. (Wiley
1990), ch. 10.  Values recalled rather than looked up say 'from memory'.
"""

import json
import math

import numpy as np
import pytest
from _cli import cli as run_cli
from click.testing import CliRunner

from enumerator.analyses.stretch import likelihood as lk
from enumerator.analyses.stretch.likelihood import Observed, PredictedBand, score_pattern
from enumerator.cli import cli
from enumerator.errors import InputError
from enumerator.isomers.enumeration import enumerate_isomers
from enumerator.parse.abstract import parse_abstract
from enumerator.rules.ruleset import load_rules
from enumerator.vibrations.fitting import dicarbonyl_angle
from enumerator.vibrations.matching import match_bands, parse_measured
from enumerator.vibrations.pattern import band_pattern, predict_bands
from enumerator.workflow.bands import match_spectrum, predict_spectra
from enumerator.workflow.pipeline import Request, apply_settings


def _set(formula, geometry="OC-6"):
    comp = apply_settings(parse_abstract(formula), reporters=[("a", "CO")])
    return enumerate_isomers(comp, load_rules().geometry(geometry))


def _top(formula, bands):
    """The first candidate of ``isosieve match FORMULA --bands BANDS`` and the whole report."""
    obs = parse_measured(bands)
    rep = match_spectrum(Request(formula), [v for v, _ in obs], [x for _, x in obs])
    # the textbook cases are judged on the additive band model's absolute predictions and its sigma
    assert all(c.band_model == "additive" and not c.sigma_default for c in rep.match.candidates)
    return rep.match.candidates[0], rep.match


# ---------------------------------------------------------------- textbook spectra rank right


def test_axial_fe_co4_pph3_ranks_axial_first():
    # axial [Fe(CO)4(PPh3)] (C3v): 2052 m, 1979 m, 1947 vs, the E band lowest and strongest
    # (Braterman, Metal Carbonyl Spectra; from memory)
    top, res = _top("[Fe(CO)4(PPh3)]", "2052 (m), 1979 (m), 1947 (vs)")
    assert top.point_group == "C3v", res.to_dict()["match_notes"]
    assert top.probability > 0.5


def test_fac_re_co3_bpy_cl_ranks_fac_first():
    # fac-[Re(CO)3(bpy)Cl]: 2022 vs, 1917 s, 1899 s, three bands of similar strength (from memory)
    top, res = _top("[Re(CO)3(bpy)Cl]", "2022 (vs), 1917 (s), 1899 (s)")
    assert (top.descriptor or "").startswith("fac"), top.explanation
    assert res.decision in ("strong", "favoured")


def test_cis_and_trans_mo_co4_pph3_2():
    # cis-[Mo(CO)4(PPh3)2]: four bands about 2023 m, 1929 s, 1912 vs, 1895 s; trans: one strong band about
    # 1890 (Eu) (from memory; the counts are Cotton's, 10.2)
    top, res = _top("[Mo(CO)4(PPh3)2]", "2023 (m), 1929 (s), 1912 (vs), 1895 (s)")
    assert (top.descriptor or "").startswith("cis") and res.decision == "strong"
    top, res = _top("[Mo(CO)4(PPh3)2]", "1890 (vs)")
    assert (top.descriptor or "").startswith("trans") and res.decision == "strong"
    # without intensities the counts alone still decide both
    assert _top("[Mo(CO)4(PPh3)2]", "2023, 1929, 1912, 1895")[0].descriptor.startswith("cis")
    assert _top("[Mo(CO)4(PPh3)2]", "1890")[0].descriptor.startswith("trans")


def test_fac_mo_co3_pme3_3_ranks_fac_first():
    # fac-[Mo(CO)3(PMe3)3]: 1945, 1854 (A1 + E; from memory)
    top, _ = _top("[Mo(CO)3(PMe3)3]", "1945, 1854")
    assert (top.descriptor or "").startswith("fac"), top.explanation


def test_mer_pattern_rule_ranks_mer_first():
    # the pattern rule for mer-M(CO)3L3 (Braterman; from memory): one weak band high above two strong ones
    # (2A1 + B1: the high A1 moves the trans pair in phase and gains intensity only by mixing).  Positions at
    # the level of fac-[Mo(CO)3(PMe3)3] (1945, 1854, from memory): a weak band near 2000, strong near 1915, 1890
    top, res = _top("[Mo(CO)3(PMe3)3]", "2000 (w), 1915 (vs), 1890 (s)")
    assert (top.descriptor or "").startswith("mer") and res.decision in ("strong", "favoured")
    assert _top("[Mo(CO)3(PMe3)3]", "2000, 1915, 1890")[0].descriptor.startswith("mer")


def test_synthetic_mer_spectrum_picks_mer():
    # synthetic bands of mer-Ma3b3 (3 IR bands) against fac (2 IR bands: A1 + E; fac/mer band counts are a
    # textbook fact, Cotton 10.2)
    s = _set("Ma3b3")
    mer = next(i for i in s.isomers if i.point_group == "C2v")
    bands = [
        b.wavenumber for b in predict_bands(mer, "CO", {"k1": 15.3, "k2": 15.9, "kc": 0.3, "kt": 0.6}) if b.ir_active
    ]
    m = match_bands(s, "CO", bands)
    assert m.candidates[0].point_group == "C2v" and m.candidates[0].problems == 0
    assert m.candidates[1].problems == 1
    assert "Count: consistent" in m.candidates[0].explanation
    assert math.isclose(sum(c.probability for c in m.candidates), 1.0, abs_tol=1e-9)


def test_trans_single_band():
    # trans-M(CO)4L2 (D4h) shows one IR band (Eu); cis (C2v) four (Cotton 10.2)
    s = _set("Ma4b2")
    m = match_bands(s, "CO", [1950.0])
    assert m.candidates[0].point_group == "D4h"


# ---------------------------------------------------------------- the shift, the window, the typed values


def test_a_shift_far_outside_the_model_is_reported():
    # cis-[Mo(CO)4(PPh3)2] bands (from memory) moved up by 230 cm-1: no isomer of this formula absorbs there
    # with its constants, so the ranking is marked unreliable (common practice: a 4-sigma offset is not noise)
    bands = [2023.0 + 230, 1929.0 + 230, 1912.0 + 230, 1895.0 + 230]
    rep = match_spectrum(Request("[Mo(CO)4(PPh3)2]"), bands, window=(1800.0, 2300.0))
    res = rep.match
    assert not res.reliable and res.looks_like_none
    assert "does not look like any candidate" in res.notes[0]
    doc = rep.to_dict()
    assert doc["reliable"] is False and doc["looks_like_no_candidate"] is True
    assert all(c["shift_z"] is None or c["shift_z"] > 3 for c in doc["candidates"])
    # within the model's uncertainty it is not
    ok = match_spectrum(Request("[Mo(CO)4(PPh3)2]"), [2023.0, 1929.0, 1912.0, 1895.0]).match
    assert ok.reliable and not ok.looks_like_none and ok.candidates[0].shift_z < 3


def test_bands_outside_the_window_are_refused_in_one_line():
    # CO window 1850-2125 cm-1 (rules/reporters.toml, Nakamoto; from memory); a band at 1748 cm-1 is no
    # [Cr(CO)6] band (its T1u band lies near 1985-2000; from memory), so it needs the window widened on purpose
    for args, words in (
        (["match", "[Cr(CO)6]", "--bands", "19500"], "19500 cm-1 is outside the CO window 1850-2125"),
        (["match", "[Cr(CO)6]", "--bands", "1748"], "--window 1700:2125"),
        (["match", "[Cr(CO)6]", "--bands", "2000", "--window", "5:9"], "not a range inside 100-4000"),
        (["match", "[Cr(CO)6]", "--bands", "2000", "--window", "abc"], "is not LOW:HIGH"),
        (["match", "[Cr(CO)6]", "--bands", "2000 (500)"], "(0, 100]"),
        (["bands", "[Cr(CO)6]", "--constants", "k=1e308"], "physical range of a stretching constant, from 2 to 30"),
        (["bands", "[Cr(CO)6]", "--constants", "kc=5"], "physical range of an interaction constant"),
        (
            ["bands", "Ma4b2", "--reporter", "a=CO", "--isomer", "1", "--fit", "2030,1940,1915,1890", "--fix", "kt=9"],
            "--fix: kt = 9",
        ),
        (["bands", "Ma4b2", "--reporter", "a=CO", "--isomer", "1", "--fit", "2030,1940,1915,19000"], "--fit: 19000"),
    ):
        code, out, err = run_cli(args)
        assert code == 2 and out == "" and words in err and err.count("\n") == 1, (args, err)
    code, out, err = run_cli(["match", "[Ti(CO)6]2-", "--bands", "1748", "--window", "1700:2125", "--json"])
    assert code == 0, err
    assert json.loads(out)["window_source"] == "widened on purpose with --window"


def test_the_window_reaches_the_band_model_s_prediction_for_the_formula():
    # [Ti(CO)6]2- absorbs near 1748 cm-1 and [V(CO)6]- near 1859 (T1u; from memory), below the usual CO window
    # 1850-2125: the band model predicts them there, so the window reaches out to its predictions ± 4 sigma
    # and says so; the generic constants of an abstract formula never widen it
    for formula, band in (("[Ti(CO)6]2-", "1748"), ("[V(CO)6]-", "1859")):
        code, out, err = run_cli(["match", formula, "--bands", band, "--json"])
        assert code == 0, err
        doc = json.loads(out)
        c = doc["candidates"][0]
        assert c["band_model"] == "additive" and c["shift_z"] < 3 and doc["reliable"]
        assert doc["window_cm1"][0] < float(band)
        assert "widened to the predicted bands" in doc["window_source"]
    m = match_spectrum(Request("Ma6", reporters=(("a", "CO"),)), [2000.0])
    assert m.match.window == (1850.0, 2125.0) and "widened" not in m.match.window_source
    assert m.match.candidates[0].band_model == "generic" and m.match.candidates[0].sigma_default


def test_candidates_say_which_model_predicted_them():
    # a real complex is predicted by the additive band model (sigma from its cross-validation); the JSON says
    # which model and which ligands fell back; an abstract formula uses the generic constants, said as such
    doc = match_spectrum(Request("[Mo(CO)4(PPh3)2]"), [1890.0]).match.to_dict()
    for c in doc["candidates"]:
        assert c["band_model"] in ("additive", "generic") and isinstance(c["fallbacks"], list)
        assert isinstance(c["model_notes"], list)
        assert c["sigma_default"] == (c["band_model"] == "generic")
    doc = match_spectrum(Request("Ma4b2", reporters=(("a", "CO"),)), [1950.0]).match.to_dict()
    assert {c["band_model"] for c in doc["candidates"]} == {"generic"}
    assert any("default 30 cm-1 for CO" in n and "generic constants" in n for n in doc["match_notes"])


def test_a_ligand_the_band_model_lacks_is_named_and_its_sigma_widened():
    # the band model's coverage (rules/bandmodel.toml) decides which ligands fall back; bands and match must say
    # the same, and a fallback widens the sigma the matcher uses (the model's widening factor)
    formula = "[Cr(CO)5(NH3)]"
    pat = predict_spectra(Request(formula)).to_dict()["isomers"][0]["patterns"][0]
    c = match_spectrum(Request(formula), [2070.0, 1940.0, 1915.0]).match.candidates[0]
    assert c.band_model == pat["model"] == "additive" and list(c.fallbacks) == pat["fallbacks"]
    base = match_spectrum(Request("[Cr(CO)5(PPh3)]"), [2070.0, 1940.0, 1915.0]).match.candidates[0]
    if c.fallbacks:
        assert c.shift_sigma > base.shift_sigma and "widened for " + c.fallbacks[0] in c.explanation
        assert any(c.fallbacks[0] in n for n in c.model_notes)
        assert any(c.fallbacks[0] in n for n in pat["notes"])


def test_cli_json_and_errors():
    r = CliRunner().invoke(cli, ["match", "Ma3b3", "--reporter", "a=CO", "--bands", "2050,1975,1947", "--json"])
    assert r.exit_code == 0, r.output
    doc = json.loads(r.output)
    assert doc["candidates"][0]["rank"] == 1 and doc["candidates"][0]["explanation"]
    # the keys of the earlier matcher are all still there (JSON keys are only ever added)
    old = {"rank", "isomers", "point_group", "descriptor", "species", "ir_count", "predicted", "shift_k", "rms"}
    old |= {"max_residual", "assignment", "extra_measured", "missing", "excused", "count_problems", "fit"}
    old |= {"fit_note", "intensity_misfit", "intensities", "score", "explanation"}
    assert old <= set(doc["candidates"][0])
    assert {"reporter_class", "measured", "tolerance", "weak_threshold", "measured_intensity", "match_notes"} <= set(
        doc
    )
    r2 = CliRunner().invoke(cli, ["match", "Ma3b3", "--reporter", "a=CO", "--bands", "2050,1975,1947", "--json"])
    assert r.output == r2.output  # deterministic
    r3 = CliRunner().invoke(cli, ["bands", "Ma4b2", "--reporter", "a=CO", "--json"])
    assert r3.exit_code == 0, r3.output
    assert json.loads(r3.output)["isomers"][0]["patterns"][0]["bands"]


def test_parse_measured_as_written_in_papers():
    # intensity words of IR tables (common practice): vs > s > m > w > vw; sh, br qualifiers
    assert parse_measured("2045 (s), 1980 (vs), 1932 (m, br), 1900 (sh), 1850") == (
        (2045.0, 0.75),
        (1980.0, 1.0),
        (1932.0, 0.5),
        (1900.0, 0.25),
        (1850.0, None),
    )
    assert parse_measured("2045(0.8);1980 w") == ((2045.0, 0.8), (1980.0, 0.25))
    assert parse_measured("2045 (80)") == ((2045.0, 80.0),)  # per cent of the strongest
    for bad in ("2045 (q)", "2045 (0.5 s)", "abc", "2045 (-1)", "", "2045 (101)"):
        try:
            parse_measured(bad)
        except InputError as exc:
            assert exc.line().startswith("--bands")
        else:
            raise AssertionError(bad)


# ---------------------------------------------------------------- intensities and the OC-M-CO angle


def test_cis_dicarbonyl_intensities():
    # bond-dipole model: for cis-M(CO)2 at 90 degrees the A1 and B bands have
    # equal intensity, I(B)/I(A1) = tan^2(45 deg) = 1 (Braterman, from memory); trans-M(CO)2 shows one band
    # (group theory, Cotton 10.2)
    s = _set("Ma2b4")
    m = match_bands(s, "CO", [2000.0, 1920.0], intensities=[0.9, 0.9])
    top = m.candidates[0]
    assert top.point_group == "C2v" and top.intensity_misfit is not None and top.intensity_misfit < 0.02
    assert "Relative intensities" in top.explanation
    assert top.oc_angle == pytest.approx(90.0)  # equal intensities: 2 theta = 90 degrees
    skew = match_bands(s, "CO", [2000.0, 1920.0], intensities=[1.0, 0.1])
    assert abs(skew.candidates[0].intensity_misfit - 0.45) < 1e-9  # (0 + 0.9) / 2
    plain = match_bands(s, "CO", [2000.0, 1920.0])
    assert plain.candidates[0].intensity_misfit is None and plain.candidates[0].oc_angle is None
    assert [c.isomers for c in plain.candidates] == [c.isomers for c in m.candidates]


@pytest.mark.parametrize(
    "geometry,formula,angle",
    [("OC-6", "Ma2b4", 90.0), ("TBPY-5", "Ma2b3", 120.0), ("T-4", "Ma2b2", math.degrees(math.acos(-1 / 3)))],
)
def test_angle_from_the_intensity_ratio_inverts_the_bond_dipole_relation(geometry, formula, angle):
    # I_sym / I_asym = cot^2(theta), 2 theta the OC-M-CO angle (bond-dipole model; Braterman, from memory):
    # the angle read back from the predicted intensities is the polyhedron's
    for iso in _set(formula, geometry).isomers:
        a = [s.index for s in iso.sites if s.reporter == "CO"]
        if abs(iso.geometry.angles[a[0], a[1]] - angle) > 1e-3:
            continue
        bands = band_pattern(iso, "CO", {"k": 16.0, "kc": 0.3, "kt": 0.6}).bands
        sym, asym = max(bands, key=lambda b: b.wavenumber), min(bands, key=lambda b: b.wavenumber)
        assert dicarbonyl_angle(sym.raw_intensity, asym.raw_intensity) == pytest.approx(angle, abs=1e-6)
        break
    else:
        pytest.fail("no isomer with that angle")


def test_match_reads_the_angle_of_a_cis_dicarbonyl():
    # cis-[RuCl2(CO)2(PPh3)2] bands 2061 vs, 1998 s (from memory): 2 theta = 2 atan(sqrt(0.75)) = 81.8 degrees
    # by the bond-dipole relation (Braterman, from memory)
    rep = match_spectrum(Request("[RuCl2(CO)2(PPh3)2]"), [2061.0, 1998.0], [1.0, 0.75])
    cis = [c for c in rep.match.candidates if c.oc_angle is not None]
    assert cis and all(c.oc_angle == pytest.approx(math.degrees(2 * math.atan(math.sqrt(0.75)))) for c in cis)
    assert "OC-M-CO angle from the intensity ratio" in cis[0].explanation


def test_intensities_break_a_position_tie():
    # synthetic self-consistency (not an outside check): the predicted positions and intensities of one
    # Ma3b2c isomer, positions blurred towards another candidate, are matched best by the true isomer once
    # intensities are given
    s = _set("Ma3b2c")
    pats = {i.number: [b for b in band_pattern(i, "CO").bands if b.ir_active] for i in s.isomers}
    true, other = sorted(n for n, p in pats.items() if len(p) == 3)[:2]
    mix = [0.5 * (a.wavenumber + b.wavenumber) for a, b in zip(pats[true], pats[other])]
    inten = [b.intensity for b in pats[true]]
    plain = match_bands(s, "CO", mix)
    assert plain.decision == "undecided" and "cannot decide" in " ".join(plain.notes)
    with_i = match_bands(s, "CO", mix, intensities=inten)
    first = with_i.candidates[0]
    assert str(true) in "".join(first.isomers) and first.probability > plain.candidates[0].probability


# ---------------------------------------------------------------- the likelihood's rules


def _b(name, nu, i, sigma=30.0, weak=False):
    return PredictedBand(name, nu, i, sigma, True, weak)


def test_the_strongest_band_is_never_excused_as_coincident():
    # rule of the matcher (common practice: the strongest band of a pattern is always seen): with only the
    # weaker band's position measured, the strongest band is 'missing', never 'hidden'
    pat = [_b("B2(1)", 1978.0, 1.0), _b("B1(1)", 1971.0, 0.75)]
    s = score_pattern(Observed((1971.0,)), pat, window_width=275.0)
    reasons = {pat[k].name: why for k, why, _ in s.best.unobserved}
    assert s.best.pairs == ((0, 0),) or reasons.get("B2(1)") != "hidden"
    for k, why, q in s.best.unobserved:
        if pat[k].name == "B2(1)":
            assert why == "missing" and q == lk.Q_MIN
    # two equally strong bands never hide each other
    pair = [_b("A1(1)", 1978.0, 1.0), _b("B1(1)", 1940.0, 1.0)]
    one = score_pattern(Observed((1978.0,)), pair, window_width=275.0).best
    assert [why for _, why, _ in one.unobserved] == ["missing"]


def test_near_degenerate_bands_swap_when_the_intensities_say_so():
    # axial Fe(CO)4L pattern with the generic constants (E above the second A1) against the measured order
    # (E lowest and strongest; Braterman, from memory): the intensities pair 1947 vs with E
    pat = [_b("A1(1)", 2040.0, 0.05), _b("E(1)", 1971.0, 1.0), _b("A1(2)", 1946.0, 0.29)]
    best = score_pattern(Observed((2052.0, 1979.0, 1947.0), (0.5, 0.5, 1.0)), pat, window_width=275.0).best
    assert [pat[k].name for _, k in best.pairs] == ["A1(1)", "A1(2)", "E(1)"] and best.swapped
    plain = score_pattern(Observed((2052.0, 1979.0, 1947.0)), pat, window_width=275.0).best
    assert not plain.swapped  # without intensities the positions keep the predicted order


def test_a_predicted_weak_band_may_go_unseen_a_strong_one_hardly():
    # rule of the matcher: bands the bond-dipole model makes silent go unseen with Q_MAX, strong ones with Q_MIN
    pat = [_b("A1(1)", 2051.0, 0.0, weak=True), _b("B2(1)", 1978.0, 1.0)]
    best = score_pattern(Observed((1978.0,)), pat, window_width=275.0).best
    assert best.unobserved == ((0, "predicted weak", lk.Q_MAX),)


def test_vectorised_likelihood_equals_the_assignment_read_out():
    # self-consistency (not an outside check): every assignment's total from the table equals the one the
    # best-assignment read-out computes term by term
    rng = np.random.default_rng(7)
    pat = [_b("A(1)", 2058.0, 0.03), _b("A(2)", 1978.0, 1.0), _b("A(3)", 1952.0, 0.47, weak=False)]
    for n in (1, 2, 3, 4):
        m = tuple(sorted(rng.uniform(1880, 2100, n), reverse=True))
        obs = Observed(m, tuple(rng.choice([0.1, 0.5, 1.0]) for _ in range(n)))
        st = lk._setup(pat, 5.0, 0.05)
        table, _ = lk._assignments(obs, pat, st)
        extra = math.log(lk.SPURIOUS_PROBABILITY / 275.0)
        tot = lk._totals(obs, pat, st, table, extra)
        for row, t in zip(table, tot):
            assert lk._interpret(obs, pat, st, [int(x) for x in row], extra).terms.total == pytest.approx(t)


def test_undecided_and_probabilities_are_said_plainly():
    # two cis-dicarbonyl isomers of [RuCl2(CO)2(PPh3)2] have the same generic pattern: the data cannot decide
    # (Kass & Raftery, J. Am. Stat. Assoc. 90 (1995) 773: odds below 3 are not worth more than a mention)
    rep = match_spectrum(Request("[RuCl2(CO)2(PPh3)2]"), [2061.0, 1998.0], [1.0, 0.75])
    assert rep.match.decision == "undecided"
    assert any("cannot decide" in n for n in rep.match.notes)
    doc = rep.to_dict()
    assert doc["decision"] == "undecided" and math.isclose(
        sum(c["probability"] for c in doc["candidates"]), 1, abs_tol=1e-3
    )
    assert any("predicted intensities are idealised" in n for n in doc["match_notes"])
    # the notes say which position uncertainty was used: the class default (30 cm-1 for CO, a tool convention)
    # only where the band model gives no sigma
    defaulted = any(c["sigma_default"] for c in doc["candidates"])
    assert any("default 30 cm-1 for CO" in n for n in doc["match_notes"]) == defaulted
