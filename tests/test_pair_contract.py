"""The pair list's contract: listed in full up to MAX_LISTED_PAIRS pairs, above that a tally and one
signature number per isomer and technique, so that no JSON output grows with the square of the isomers.

Check values: the verdicts the signatures give are compared with the full pair list computed by the
same code (:func:`enumerator.analyses.stretch.pairs.list_pairs`), and the isomer count of Mabcdef on
OC-6 (30 stereoisomers) is the textbook one (Miessler & Tarr, Inorganic Chemistry; from memory).
"""

from __future__ import annotations

import json

from enumerator.analyses.stretch import analysis as stretch
from enumerator.analyses.stretch.analysis import MAX_LISTED_PAIRS, StretchAnalysis
from enumerator.render.result import render_result
from enumerator.workflow.pipeline import analyse


def _verdicts_from_signatures(doc):
    ids = [i["id"] for i in doc["isomers"]]
    en = {i["id"]: i["enantiomer"] for i in doc["isomers"]}
    sig = doc["pair_signatures"]
    out = {}
    for x in range(len(ids)):
        for y in range(x + 1, len(ids)):
            a, b = ids[x], ids[y]
            if en[a] == b:
                out[(a, b)] = (False, False, False)
            else:
                out[(a, b)] = tuple(sig[k][x] != sig[k][y] for k in ("ir", "raman", "nmr"))
    return out


def test_signatures_decide_every_pair_as_the_list_does(monkeypatch):
    res = analyse("Mabcdef", geometry="OC-6", reporters=(("a", "CO"), ("b", "CO")))
    assert res.isomer_set.stereoisomers == 30  # Miessler & Tarr (from memory)
    listed = res.to_dict()
    assert listed["pairs_listed"] is True and "pair_signatures" not in listed
    monkeypatch.setattr(stretch, "MAX_LISTED_PAIRS", 10)
    doc = res.to_dict()
    assert doc["pairs"] == [] and doc["pairs_listed"] is False and doc["pair_tally"] == listed["pair_tally"]
    expect = {(p["a"], p["b"]): (p["ir_distinct"], p["raman_distinct"], p["nmr_distinct"]) for p in listed["pairs"]}
    assert _verdicts_from_signatures(doc) == expect


def test_above_the_cap_the_document_is_linear_in_the_isomers():
    # Mabcdefg on PBPY-7: 7!/10 = 504 stereoisomers (Burnside over the 10 rotations of D5h; common practice)
    res = analyse("Mabcdefg", geometry="PBPY-7", reporters=(("a", "CO"),))
    assert res.isomer_set.stereoisomers == 504
    n = len(res.isomers)
    assert n * (n - 1) // 2 > MAX_LISTED_PAIRS
    doc = json.loads(render_result(res, "json"))
    assert doc["pairs"] == [] and not doc["pairs_listed"]
    assert all(len(doc["pair_signatures"][k]) == n for k in ("ir", "raman", "nmr"))
    assert sum(doc["pair_tally"].values()) == n * (n - 1) // 2
    assert "pair_signatures" in render_result(res, "table")


def test_the_cap_is_two_hundred_isomers():
    assert 200 * 199 // 2 <= MAX_LISTED_PAIRS < 201 * 200 // 2
    assert StretchAnalysis.pair_tally  # the tally stays the always-present count
