"""Pair verdicts as every output shows them: the terminal matrix with its IRp code and legend, the JSON pairs
(keys only ever added), the tally, and the report's pair grid.  The chemistry behind the verdicts is held in
tests/test_spectroscopy.py; here the outputs are held to one another."""

from collections import Counter

from enumerator.analyses.stretch import StretchAnalysis
from enumerator.render.report import pair_grid_html
from enumerator.render.sections import pair_matrix_text
from enumerator.workflow.pipeline import analyse


def test_json_pairs_keep_their_keys_and_add_the_pattern_tier():
    # JSON keys are only ever added (README, JSON schema)
    doc = analyse("[RuCl2(CO)2(PPh3)2]").to_dict()
    for p in doc["pairs"]:
        assert list(p)[:6] == ["a", "b", "ir_distinct", "raman_distinct", "nmr_distinct", "cheapest"]
        assert {"ir_bond_dipole_distinct", "ir_pattern_distinct", "cheapest_qualifier"} <= set(p)
        assert p["cheapest_qualifier"] in (None, "counts", "pattern")
        assert (p["cheapest"] is None) == (p["cheapest_qualifier"] is None)
    assert "pair_verdict_rule" in doc and "pair_pattern_status" in doc


def test_matrix_cells_are_the_pair_codes():
    a = analyse("[RuCl2(CO)2(PPh3)2]").analysis(StretchAnalysis)
    text = pair_matrix_text(a)
    rows = {line.split()[0]: line.split()[1:] for line in text.splitlines()[1:7]}
    ids = list(a.ids)
    for p in a.pairs():
        assert rows[p.a][ids.index(p.b)] == p.code and rows[p.b][ids.index(p.a)] == p.code
    assert "IRp = IR told apart by the band pattern" in text
    assert "IR counts differ only by bands predicted weak: 2/5" in text


def test_tally_counts_the_pattern_tier():
    a = analyse("[RuCl2(CO)2(PPh3)2]").analysis(StretchAnalysis)
    assert a.pair_tally() == dict(sorted(Counter(p.tally_key for p in a.pairs()).items()))
    assert set(a.pair_tally()) <= {"IR", "IR (pattern)", "Raman", "NMR", "--", "en"}


def test_report_grid_names_the_pattern_tier_and_drops_weak_only_counts():
    doc = analyse("[RuCl2(CO)2(PPh3)2]").to_dict()
    html = pair_grid_html([i["id"] for i in doc["isomers"]], doc["pairs"])
    assert "IR (pattern)" in html
    # 2/5: IR counts differ only by the predicted-weak A1, so the grid names Raman (and NMR if it differs), not IR
    p25 = next(p for p in doc["pairs"] if (p["a"], p["b"]) == ("2", "5"))
    cell = html.split("<tr><th>2</th>", 1)[1].split("</tr>", 1)[0].split("<td")[6]
    assert p25["ir_distinct"] and not p25["ir_bond_dipole_distinct"]
    assert "Raman" in cell and "IR" not in cell.replace("IR (pattern)", "")
    # an older document without the new keys still reads as before
    old = [{"a": "1", "b": "2", "ir_distinct": True, "raman_distinct": False, "nmr_distinct": False}]
    assert ">IR<" in pair_grid_html(["1", "2"], old)
