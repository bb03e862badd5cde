"""The bands and match results (enumerator.workflow.bands) and their renderers (enumerator.render.bands):
the CLI prints exactly what the library computes, and the JSON shape lives in to_dict()."""

import json
import subprocess
import sys

from _cli import cli

from enumerator.render.bands import bands_text, match_text
from enumerator.render.jsonout import dumps
from enumerator.vibrations.fitting import parse_bands
from enumerator.workflow.bands import match_spectrum, predict_spectra
from enumerator.workflow.pipeline import Request

MA4B2 = Request("Ma4b2", reporters=(("a", "CO"),))


def test_bands_cli_is_the_result_rendered():
    result = predict_spectra(Request("[Cr(CO)5(PPh3)]"))
    code, out, err = cli(["bands", "[Cr(CO)5(PPh3)]", "--json"])
    assert code == 0, err
    assert out == dumps(result.to_dict())
    assert list(json.loads(out)) == ["formula", "geometry", "geometry_reason", "isomers", "notes", "safety"]
    code, out, _ = cli(["bands", "[Cr(CO)5(PPh3)]"])
    assert out == bands_text(result)


def test_bands_fit_rides_on_its_pattern():
    result = predict_spectra(MA4B2, isomer_id="1", measured=parse_bands("2030,1940,1915,1890"), tie_ck=True)
    (entry,) = result.isomers
    assert entry.label == "1" and result.measured == (2030.0, 1940.0, 1915.0, 1890.0)
    doc = entry.patterns[0].to_dict()
    assert doc["fit"]["dof"] == 1 and [c["status"] for c in doc["fit"]["constants"]][-1] == "tied"
    code, out, _ = cli(
        ["bands", "Ma4b2", "--reporter", "a=CO", "--isomer", "1", "--fit", "2030,1940,1915,1890", "--ck"]
    )
    assert code == 0 and out == bands_text(result) and "  fit:" in out


def test_bands_enantiomers_share_one_entry():
    result = predict_spectra(Request("[RuCl2(CO)2(PPh3)2]"))
    labels = [e.label for e in result.isomers]
    assert labels[0] == "1a/1b" and not any(e.isomer_id.endswith("b") for e in result.isomers)


def test_bands_refusals_are_one_line():
    for args, words in (
        (["bands", "Ma4b2", "--reporter", "a=CO", "--fit", "2030,1940,1915,1890"], "--fit needs one isomer"),
        (["bands", "Ma4b2", "--reporter", "a=CO", "--isomer", "1", "--fit", "2030", "--fix", "kt=abc"], "--fix"),
        (["bands", "Ma4b2"], "no stretch reporter"),
        (["bands", "[Cr(CO)6]", "--plot", "x.pdf"], "is not .svg or .png"),
    ):
        code, out, err = cli(args)
        assert code == 2 and out == "" and words in err and err.count("\n") == 1, (args, err)


def test_match_cli_is_the_report_rendered():
    report = match_spectrum(Request("[RuCl2(CO)2(PPh3)2]"), [2061.0, 1998.0], [1.0, 0.75])
    args = ["match", "[RuCl2(CO)2(PPh3)2]", "--bands", "2061 (vs), 1998 (s)"]
    code, out, err = cli(args + ["--json"])
    assert code == 0, err
    assert out == dumps(report.to_dict())
    keys = list(json.loads(out))
    assert keys[:4] == ["formula", "geometry", "geometry_reason", "reporter_class"] and keys[-1] == "safety"
    code, out, _ = cli(args)
    assert out == match_text(report)


def test_match_candidates_carry_their_shifted_bands():
    report = match_spectrum(MA4B2, [2030.0, 1940.0, 1915.0], tolerance=15.0)
    for c in report.match.candidates:
        assert len(c.shifted) == len(c.predicted)
        # a common shift moves every band the same way (common practice: the pattern keeps its shape)
        moved = [s.wavenumber - p.wavenumber for s, p in zip(c.shifted, c.predicted)]
        assert all(m * c.shift >= 0 for m in moved)


def test_plots_leave_pyplot_alone():
    # drawing a spectrum must not load pyplot (its global figure list and backend switch) in the caller's process
    code = (
        "import sys;"
        "from enumerator.render.plots import picture, stick_spectrum;"
        "from enumerator.vibrations.solver import Band;"
        "picture(stick_spectrum([Band(2000.0, 1.0, 'A1')])); picture(stick_spectrum([Band(2000.0, 1.0, 'A1')]), 'png');"
        "print('matplotlib.pyplot' in sys.modules)"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    assert out.split() == ["False"]


def test_bands_say_how_sure_and_how_idealised():
    # the bands answer states the position uncertainty it used (the band model's sigma, or the class default
    # when the model gives none: 30 cm-1 for CO, a tool convention) and that the intensities are the
    # bond-dipole model's on the ideal polyhedron
    result = predict_spectra(Request("[Cr(CO)5(PPh3)]"))
    doc = result.to_dict()
    pat = doc["isomers"][0]["patterns"][0]
    given = [b["sigma"] for b in pat["bands"] if "sigma" in b]
    if pat["position_sigma_default"]:
        assert not given and pat["position_sigma_cm1"] == 30.0
        assert any("class default" in n for n in doc["notes"])
    else:
        assert pat["position_sigma_cm1"] == max(given)
        assert not any("class default" in n for n in doc["notes"])
    assert pat["ir_count"] == 3 and pat["ir_predicted_weak"] == 0  # 2A1 + E (Cotton 10.2)
    assert any("idealised" in n for n in doc["notes"])
    text = bands_text(result)
    assert "± cm-1" in text and f"IR: 3; position uncertainty ± {pat['position_sigma_cm1']:.0f} cm-1" in text


def test_match_text_says_the_ranking_and_its_decision():
    report = match_spectrum(MA4B2, [2030.0, 1940.0, 1915.0, 1890.0])
    text = match_text(report)
    assert text.splitlines()[2].startswith("ranking: 1 1.00") and "strong evidence" in text.splitlines()[2]
    assert "measurement term ± 5 cm-1" in text


def test_fit_bands_may_lie_where_the_band_model_predicts_them():
    # [Ti(CO)6]2- T1u near 1748 cm-1 (from memory), below the usual CO window 1850-2125 (rules/reporters.toml):
    # the additive model predicts it there, so --fit takes it; the same band typed for [Cr(CO)6] (T1u near
    # 1985-2000, from memory) is still refused in one line
    fix = ["--fix", "kc=0.5", "--fix", "kt=0.7"]
    code, out, err = cli(["bands", "[Ti(CO)6]2-", "--fit", "1748", *fix])
    assert code == 0 and "1748.0 -> T1u(1)" in out, err
    code, out, err = cli(["bands", "[Cr(CO)6]", "--fit", "1748", *fix])
    assert code == 2 and out == "" and "--fit: 1748 cm-1 is outside the CO window" in err and err.count("\n") == 1
