import json

from click.testing import CliRunner

from enumerator.cli import cli
from enumerator.isomers.enumeration import enumerate_isomers
from enumerator.parse.abstract import parse_abstract
from enumerator.rules.ruleset import load_rules
from enumerator.vibrations.matching import match_bands
from enumerator.vibrations.pattern import predict_bands
from enumerator.workflow.pipeline import apply_settings


def _set(formula):
    comp = apply_settings(parse_abstract(formula), reporters=[("a", "CO")])
    return enumerate_isomers(comp, load_rules().geometry("OC-6"))


def test_synthetic_mer_spectrum_picks_mer():
    # synthetic bands of mer-Ma3b3 (3 IR bands) against fac (2 IR bands: A1 + E; fac/mer band counts are a
    # textbook fact, Cotton, Chemical Applications of Group Theory)
    s = _set("Ma3b3")
    mer = next(i for i in s.isomers if i.point_group == "C2v")
    bands = [
        b.wavenumber for b in predict_bands(mer, "CO", {"k1": 15.3, "k2": 15.9, "kc": 0.3, "kt": 0.6}) if b.ir_active
    ]
    m = match_bands(s, "CO", bands)
    assert m.candidates[0].point_group == "C2v" and m.candidates[0].problems == 0
    assert m.candidates[1].problems == 1
    assert "Count: consistent" in m.candidates[0].explanation


def test_trans_single_band():
    # trans-M(CO)4L2 (D4h) shows one IR band (Eu); cis (C2v) four (common practice / group theory)
    s = _set("Ma4b2")
    m = match_bands(s, "CO", [1950.0])
    assert m.candidates[0].point_group == "D4h"


def test_cli_json_and_errors():
    r = CliRunner().invoke(cli, ["match", "Ma3b3", "--reporter", "a=CO", "--bands", "2050,1975,1947", "--json"])
    assert r.exit_code == 0, r.output
    doc = json.loads(r.output)
    assert doc["candidates"][0]["rank"] == 1 and doc["candidates"][0]["explanation"]
    r2 = CliRunner().invoke(cli, ["match", "Ma3b3", "--reporter", "a=CO", "--bands", "2050,1975,1947", "--json"])
    assert r.output == r2.output  # deterministic
    r3 = CliRunner().invoke(cli, ["bands", "Ma4b2", "--reporter", "a=CO", "--json"])
    assert r3.exit_code == 0, r3.output
    assert json.loads(r3.output)["isomers"][0]["patterns"][0]["bands"]


def test_parse_measured_as_written_in_papers():
    # intensity words of IR tables (common practice): vs > s > m > w > vw; sh, br qualifiers
    from enumerator.errors import InputError
    from enumerator.vibrations.matching import parse_measured

    assert parse_measured("2045 (s), 1980 (vs), 1932 (m, br), 1900 (sh), 1850") == (
        (2045.0, 0.75),
        (1980.0, 1.0),
        (1932.0, 0.5),
        (1900.0, 0.25),
        (1850.0, None),
    )
    assert parse_measured("2045(0.8);1980 w") == ((2045.0, 0.8), (1980.0, 0.25))
    for bad in ("2045 (q)", "2045 (0.5 s)", "abc", "2045 (-1)", ""):
        try:
            parse_measured(bad)
        except InputError as exc:
            assert exc.line().startswith("--bands")
        else:
            raise AssertionError(bad)


def test_cis_dicarbonyl_intensities():
    # bond-dipole model: for cis-M(CO)2 at 90 degrees the A1 and B bands have
    # equal intensity, I(B)/I(A1) = tan^2(45 deg) = 1 (Braterman, Metal Carbonyl
    # Spectra, 1975, from memory); trans-M(CO)2 shows one band (group theory)
    s = _set("Ma2b4")
    m = match_bands(s, "CO", [2000.0, 1920.0], intensities=[0.9, 0.9])
    top = m.candidates[0]
    assert top.point_group == "C2v" and top.intensity_misfit is not None and top.intensity_misfit < 0.02
    assert "Relative intensities" in top.explanation
    skew = match_bands(s, "CO", [2000.0, 1920.0], intensities=[1.0, 0.1])
    assert abs(skew.candidates[0].intensity_misfit - 0.45) < 1e-9  # (0 + 0.9) / 2; still first (count)
    # without intensities nothing changes in the ranking rule
    plain = match_bands(s, "CO", [2000.0, 1920.0])
    assert plain.candidates[0].intensity_misfit is None
    assert [c.isomers for c in plain.candidates] == [c.isomers for c in m.candidates]


def test_intensities_break_a_position_tie():
    # synthetic self-consistency (not an outside check): the predicted
    # positions and intensities of one Ma3b2c isomer, positions blurred
    # towards another candidate, are matched best by the true isomer once
    # intensities are given
    s = _set("Ma3b2c")
    from enumerator.vibrations.pattern import band_pattern

    pats = {i.number: [b for b in band_pattern(i, "CO").bands if b.ir_active] for i in s.isomers}
    true, other = sorted(n for n, p in pats.items() if len(p) == 3)[:2]
    mix = [0.5 * (a.wavenumber + b.wavenumber) for a, b in zip(pats[true], pats[other])]
    inten = [b.intensity for b in pats[true]]
    plain = match_bands(s, "CO", mix)
    assert abs(plain.candidates[0].score - plain.candidates[1].score) < 0.5  # positions alone: a near tie
    assert "may decide" in " ".join(plain.notes)
    with_i = match_bands(s, "CO", mix, intensities=inten)
    first, second = with_i.candidates[:2]
    assert str(true) in "".join(first.isomers)
    assert first.intensity_misfit < 0.05 and second.score - first.score > 1.0
