"""The additive band model against measured spectra, its data set, its loaders and its fallbacks.

Check values are those of the measured set (rules/measured), each named with the source the set gives for it.
Tolerances are the model's own cross-validated sigma (rules/bandmodel.toml [sigma]): a prediction is held to within
two sigma; where it lands within one that is said beside the check.
"""

from __future__ import annotations

import pytest

from enumerator.errors import RuleError
from enumerator.rules.bandmodel import load_bandmodel, load_groups
from enumerator.rules.measured import load_measured
from enumerator.workflow.bands import predict_spectra
from enumerator.workflow.pipeline import Request


def _pattern(formula, cls="CO", isomer=None, **kw):
    r = predict_spectra(Request(formula, **kw), reporter_class=cls)
    entries = {e.isomer_id: e for e in r.isomers}
    e = entries[isomer] if isomer else r.isomers[0]
    return e.patterns[0].pattern


def _ir(p):
    return [b for b in p.bands if b.ir_active]


# ---------------------------------------------------------------- the data set and the loaders


def test_measured_set_loads_with_provenance():
    rows = load_measured()
    assert len(rows) >= 160
    assert all(r.source and r.confirmed for r in rows)
    assert sum(r.from_memory for r in rows) > 0


def test_every_catalogue_ligand_has_a_group():
    import tomllib

    from enumerator.rules.ruleset import BUILTIN_RULES

    names = [lig["name"] for lig in tomllib.loads((BUILTIN_RULES / "ligands.toml").read_text())["ligand"]]
    groups, _ = load_groups()
    assert [n for n in names if n not in groups] == []


def test_rows_resolve_or_say_why():
    from enumerator.vibrations.calibrate import resolved_dataset

    samples, excluded = resolved_dataset()
    fit_rows = {r.key for r in load_measured() if r.fit}
    bad = {k: why for k, why in excluded if k in fit_rows}
    # the rows the model cannot take, each for a stated reason (no one-site geometry; isomers not written)
    assert set(bad) <= {"carbonyls.toml#68", "nitrosyls.toml#11"}, bad
    assert all(why for why in bad.values())
    assert len({s.complex_key for s in samples if s.row.fit}) >= 110


def test_group_families_load_and_a_bad_family_is_refused(tmp_path):
    from enumerator.rules.bandmodel import GROUPS_FILE, load_families

    fam = load_families()
    # chemical judgement written in rules/bandgroups.toml (donor type, common practice)
    assert fam["halide"] == fam["O-anion"] == "anionic-donor"
    assert fam["imine"] == fam["O-donor"] == "neutral-donor"
    assert "CO" not in fam and "eta-ring" not in fam
    bad = GROUPS_FILE.read_text().replace('family = "phosphorus"', "family = 3", 1)
    (tmp_path / "g.toml").write_text(bad)
    with pytest.raises(RuleError, match="family"):
        load_families(tmp_path / "g.toml")


def test_phosphorus_ligands_split_into_substituents(tmp_path):
    from enumerator.rules.bandmodel import GROUPS_FILE, load_substituents

    # C. A. Tolman, Chem. Rev. 77 (1977) 313: substituent contributions are additive
    subs = load_substituents()
    assert subs["PClPh2"] == (("Cl", 1), ("Ph", 2))
    assert all(sum(n for _, n in v) == 3 for v in subs.values() if v[0][0] != "ring-alkyl")
    assert subs["Cp*"] == (("ring-alkyl", 5),)  # rules/bandgroups.toml [ring_alkyls]: Cp* = Cp + five methyls
    bad = GROUPS_FILE.read_text().replace('"PClPh2" = { Cl = 1, Ph = 2 }', '"PClPh2" = { Cl = 1, Ph = 1 }')
    (tmp_path / "g.toml").write_text(bad)
    with pytest.raises(RuleError, match="PClPh2"):
        load_substituents(tmp_path / "g.toml")


def test_d_count_sensitivity_is_relative_to_d6():
    from enumerator.isomers.enumeration import enumerate_isomers
    from enumerator.vibrations.additive import REFERENCE_D, build_design, centre_of
    from enumerator.workflow.pipeline import prepare

    assert REFERENCE_D == 6
    scales = {}
    for f in ("[Cr(CO)6]", "[Ni(CO)4]"):
        comp, geo, _ = prepare(Request(f))
        iso = enumerate_isomers(comp, geo).isomers[0]
        scales[f] = build_design(iso, centre_of(comp), "CO").scale
    assert scales == {"[Cr(CO)6]": None, "[Ni(CO)4]": "sd:CO:10"}


def test_measured_row_without_source_is_refused(tmp_path):
    (tmp_path / "x.toml").write_text(
        '[[complex]]\ncompound = "x"\nformula = "[Cr(CO)6]"\nisomer = ""\ngeometry = ""\nphase = "hexane"\n'
        'source = ""\nconfirmed = "from memory"\nnote = ""\n'
        'bands = [ { cm1 = 1985.0, class = "CO", technique = "IR" } ]\n'
    )
    with pytest.raises(RuleError, match="source"):
        load_measured(tmp_path)


def test_measured_row_with_a_misspelt_medium_is_refused(tmp_path):
    # the band model gives gas and matrix rows terms of their own: 'gass' must not pass as a condensed phase
    # (common practice: a data set's controlled vocabulary is checked at load)
    (tmp_path / "x.toml").write_text(
        '[[complex]]\ncompound = "x"\nformula = "[Cr(CO)6]"\nisomer = ""\ngeometry = ""\nphase = "gass"\n'
        'source = "s"\nconfirmed = "from memory"\nnote = ""\n'
        'bands = [ { cm1 = 2000.0, class = "CO", technique = "IR" } ]\n'
    )
    with pytest.raises(RuleError, match="phase 'gass'"):
        load_measured(tmp_path)


def test_band_model_file_with_unknown_parameter_kind_is_refused(tmp_path):
    from enumerator.rules.bandmodel import BANDMODEL_FILE

    text = BANDMODEL_FILE.read_text().replace("[parameters]", '[parameters]\n"zz:CO" = 1.0')
    (tmp_path / "bm.toml").write_text(text)
    with pytest.raises(RuleError, match="zz:CO"):
        load_bandmodel(tmp_path / "bm.toml")


def test_calibration_is_deterministic():
    from enumerator.vibrations.calibrate import calibrate

    assert calibrate("2000-01-01", cv=False) == calibrate("2000-01-01", cv=False)


# ---------------------------------------------------------------- predictions against measured bands


def _sigma(p):
    return _ir(p)[0].sigma


def test_isoelectronic_hexacarbonyls_rise_with_charge():
    # C. E. Housecroft, A. G. Sharpe, Inorganic Chemistry, 4th ed. (2012), nu(CO) T1u of the d6 series
    # (from memory, as in rules/measured/additions.toml): 1748, 1859, 2000 (hexane ~1985, Braterman 1975), 2090
    got = {}
    for f, want in (("[Ti(CO)6]2-", 1748.0), ("[V(CO)6]-", 1859.0), ("[Cr(CO)6]", 1985.0), ("[Mn(CO)6]+", 2090.0)):
        p = _pattern(f)
        assert p.model_name == "additive"
        (t1u,) = _ir(p)
        assert t1u.species == "T1u"
        assert abs(t1u.wavenumber - want) <= 2 * t1u.sigma, (f, t1u.wavenumber, t1u.sigma)
        got[f] = t1u.wavenumber
    v = list(got.values())
    assert v == sorted(v)
    # V, Cr and Mn land within one sigma; [Ti(CO)6]2- (about 30 cm-1 low) only within two
    assert abs(got["[V(CO)6]-"] - 1859.0) <= _sigma(_pattern("[V(CO)6]-"))


def test_nitroprusside_no_band():
    # Wikipedia, "Sodium nitroprusside" (as in rules/measured/nitrosyls.toml): nu(NO) about 1945 cm-1
    p = _pattern("[Fe(CN)5(NO)]2-", "NO")
    (b,) = _ir(p)
    assert abs(b.wavenumber - 1945.0) <= b.sigma


def test_nitrosyl_sigma_is_not_borrowed_from_the_carbonyls():
    # the validation's own figure (rules/bandmodel.toml [cv]): too few clean NO bands for a sigma of their own,
    # so the band carries the RMS of every cross-validated NO band, far above the pooled (carbonyl-led) value
    bm = load_bandmodel()
    (b,) = _ir(_pattern("[Fe(CN)5(NO)]2-", "NO"))
    assert b.sigma >= bm.cv["additive"]["NO linear"]["rms"] - 0.05 > bm.sigma["pooled"]


def test_axial_fe_co4_pph3_has_e_lowest():
    # P. S. Braterman, Metal Carbonyl Spectra (1975), axial Fe(CO)4(PPh3): 2052 (A1), 1979 (A1), 1947 (E)
    # (from memory, rules/measured/additions.toml)
    r = predict_spectra(Request("[Fe(CO)4(PPh3)]"), reporter_class="CO")
    p = next(e.patterns[0].pattern for e in r.isomers if e.point_group == "C3v")
    ir = _ir(p)
    assert [b.species for b in ir] == ["A1", "A1", "E"]
    # held to two sigma, this file's standard: the 2026-12-03 fit (with the seen Ru(CO)5 hexane row, sigma 16) puts
    # the axial A1 18 cm-1 low, with or without that day's model changes (15 to 21 low in the trial fits); the
    # d8 trigonal bipyramids' bands are predicted too close together (Fe/Ru/Os(CO)5 alike), which is not yet fixed
    for b, want in zip(ir, (2052.0, 1979.0, 1947.0)):
        assert abs(b.wavenumber - want) <= 2 * b.sigma
    assert abs(ir[0].wavenumber - 2052.0) <= ir[0].sigma and abs(ir[2].wavenumber - 1947.0) <= ir[2].sigma


def test_fac_re_co3_bpy_cl():
    # fac-[Re(CO)3(bpy)Cl]: 2022, 1917, 1899 cm-1 (rules/measured/carbonyls.toml; M. W. George et al.,
    # J. Chem. Soc., Dalton Trans. (1993) 2977, from memory)
    r = predict_spectra(Request("[Re(CO)3(bpy)Cl]"), reporter_class="CO")
    p = next(e.patterns[0].pattern for e in r.isomers if "fac" in (e.descriptor or ""))
    ir = sorted((b.wavenumber for b in _ir(p)), reverse=True)
    for got, want in zip(ir, (2022.0, 1917.0, 1899.0)):
        assert abs(got - want) <= 2 * _sigma(p)


def test_held_out_complexes():
    """[V(CO)6]- and axial [Fe(CO)4(PPh3)] predicted by a model fitted without them (values as above)."""
    import numpy as np

    from enumerator.rules.bandmodel import load_bandmodel
    from enumerator.vibrations.calibrate import Problem, _residuals, fit, resolved_dataset

    samples, _ = resolved_dataset()
    fit_s = [s for s in samples if s.row.fit]
    problem = Problem(fit_s)
    held = [k for k, s in enumerate(fit_s) if s.row.formula in ("[V(CO)6]-", "[Fe(CO)4(PPh3)]")]
    assert len(held) == 2
    rest = [k for k in range(len(fit_s)) if k not in held]
    seen = set().union(*(problem.touched(k) for k in rest))
    start = problem.mu.copy()
    q = fit(problem, start, rest)
    assert all(i in seen or q[i] == problem.mu[i] for i in range(len(q)))
    sigma = load_bandmodel().sigma
    for k in held:
        res = _residuals(problem, q, k)
        assert res
        for cat, m, pr in res:
            assert abs(pr - m) <= 2 * sigma.get(cat, sigma["pooled"]), (fit_s[k].row.formula, m, pr)
    fe = next(k for k in held if fit_s[k].row.formula == "[Fe(CO)4(PPh3)]")
    pred = sorted(pr for _, _, pr in _residuals(problem, q, fe))
    assert np.isclose(pred[0], min(pred))


# ---------------------------------------------------------------- fallbacks, abstract letters, overrides


def test_abstract_letters_keep_generic_constants_and_say_so():
    p = _pattern("Ma6", reporters=(("a", "CO"),))
    assert p.model_name == "generic"
    assert all(b.sigma is None for b in p.bands)
    assert any("abstract letters" in n for n in p.notes)
    assert round(_ir(p)[0].wavenumber) == 1978  # the generic constants (rules/forcefields.toml), unchanged


def test_ligand_without_parameters_falls_back_visibly():
    bm = load_bandmodel()
    assert "la:CO:SbPh3" not in bm.parameters
    p = _pattern("[Cr(CO)5(SbPh3)]")
    assert "SbPh3" in p.fallbacks
    assert any("SbPh3" in n for n in p.notes)
    plain = _pattern("[Cr(CO)6]")
    assert _sigma(p) > _sigma(plain)


def test_ligand_of_an_unfitted_group_falls_back_to_its_family_visibly():
    bm = load_bandmodel()
    assert "ea:CO:nitrile" not in bm.parameters and "fa:CO:neutral-donor" in bm.parameters
    p = _pattern("[W(CO)5(MeCN)]")
    assert p.model_name == "additive" and "MeCN" in p.fallbacks
    assert any("MeCN" in n and "family" in n for n in p.notes)
    assert _sigma(p) >= bm.widen["generic"] * bm.sigma["CO neutral"] - 1e-9


def test_user_kc_makes_interactions_uniform_and_shift_keeps_them():
    from enumerator.vibrations.pattern import band_pattern

    r = predict_spectra(Request("[Fe(CO)4(PPh3)]"), reporter_class="CO")
    iso = next(i for i in r.isomers if i.point_group == "C3v")
    p = iso.patterns[0].pattern
    assert p.model.pair_weights
    shifted = p.shifted_constants(0.0)
    assert "kc" not in shifted
    from enumerator.isomers.enumeration import enumerate_isomers
    from enumerator.workflow.pipeline import prepare

    comp, geo, _ = prepare(Request("[Fe(CO)4(PPh3)]"))
    isomer = next(i for i in enumerate_isomers(comp, geo).isomers if i.point_group == "C3v")
    again = band_pattern(isomer, "CO", shifted, composition=comp)
    assert [round(b.wavenumber, 6) for b in again.bands] == [round(b.wavenumber, 6) for b in p.bands]
    uniform = band_pattern(isomer, "CO", {"kc": 0.3}, composition=comp)
    assert all(
        rel != "cis"
        for i, j, rel in uniform.model.relations
        if (i, j) in {(a, b) for a, b, _ in uniform.model.pair_weights}
    )
    assert all(b.sigma is None for b in uniform.bands)


def test_measured_readme_counts_are_computed():
    # the size, count and coverage block of rules/measured/README.md is written by
    # `python -m enumerator.vibrations.calibrate --summary`; it must equal what the data say today
    from enumerator.rules.measured import MEASURED_FOLDER, file_counts
    from enumerator.vibrations.calibrate import SUMMARY_BEGIN, SUMMARY_END, summary

    text = (MEASURED_FOLDER / "README.md").read_text(encoding="utf-8")
    a, b = text.index(SUMMARY_BEGIN), text.index(SUMMARY_END) + len(SUMMARY_END) + 1
    assert text[a:b] == summary(), "rerun python -m enumerator.vibrations.calibrate --summary into the README"
    total = file_counts()[-1]
    assert total.file == "total" and total.rows == len(load_measured())
    assert total.bands == sum(len(r.bands) for r in load_measured())
