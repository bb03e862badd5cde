import json

from click.testing import CliRunner

from enumerator.cli import cli
from enumerator.forcefield import predict_bands
from enumerator.formula import parse_abstract
from enumerator.isomers import enumerate_isomers
from enumerator.matching import match_bands
from enumerator.pipeline import apply_settings
from enumerator.rules import load_rules


def _set(formula):
    comp = apply_settings(parse_abstract(formula), reporters=[("a", "CO")])
    return enumerate_isomers(comp, load_rules().geometry("OC-6"))


def test_synthetic_mer_spectrum_picks_mer():
    # synthetic bands of mer-Ma3b3 (3 IR bands) against fac (2 IR bands: A1 + E; fac/mer band counts are a
    # textbook fact, Cotton, Chemical Applications of Group Theory)
    s = _set("Ma3b3")
    mer = next(i for i in s.isomers if i.point_group == "C2v")
    bands = [b.wavenumber for b in predict_bands(mer, "CO", {"k1": 15.3, "k2": 15.9, "kc": 0.3, "kt": 0.6}) if b.ir_active]
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
