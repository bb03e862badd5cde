"""Batch screening: order, pattern cache, bad rows, workers, CLI."""

from __future__ import annotations

import json
import subprocess
import sys

from enumerator.parse.condensed import parse_condensed
from enumerator.rules.ruleset import load_rules
from enumerator.workflow.batch import pattern_key, screen

FORMULAS = [
    "[RuCl2(CO)2(PPh3)2]",
    "[Co(NH3)4Cl2]+",
    "[Xx(CO)6]",
    "[OsBr2(CO)2(PMe3)2]",
    "Ma4b2",
    "[Fe(CN)5(NO)]2-",
    "[Co(en)2Cl2]+",
]


def test_order_errors_and_cache():
    rows = list(screen(FORMULAS))
    assert [r.formula for r in rows] == FORMULAS
    assert rows[2].error and "Xx" in rows[2].error and rows[3].error is None
    # same pattern (MA2B2C2 with distinct reporters) -> served from the cache, identical answer
    assert rows[3].cached and rows[3].point_groups == rows[0].point_groups
    assert (rows[0].geometric_isomers, rows[0].stereoisomers) == (5, 6)  # from memory: MA2B2C2
    assert rows[4].cached  # Ma4b2 shares the pattern of [Co(NH3)4Cl2]+
    assert (rows[6].geometric_isomers, rows[6].stereoisomers) == (2, 3)  # Werner: cis pair + trans


def test_workers_same_output():
    one = list(screen(FORMULAS, workers=1))
    two = list(screen(FORMULAS, workers=2))
    assert one == two


def test_pattern_key_ignores_names_not_shape():
    rs = load_rules()
    a = pattern_key(parse_condensed("[RuCl2(CO)2(PPh3)2]", rs), "OC-6")
    b = pattern_key(parse_condensed("[OsBr2(CO)2(PMe3)2]", rs), "OC-6")
    c = pattern_key(parse_condensed("[RuCl2(CO)2(dppe)]", rs), "OC-6")
    assert a == b and a != c


def test_cli_csv_input(tmp_path):
    src = tmp_path / "in.csv"
    src.write_text("label,formula\nA,[Co(NH3)4Cl2]+\nB,[Fe(CO)99\nC,Ni(CO)4\n", encoding="utf-8")
    out = tmp_path / "out.json"
    p = subprocess.run(
        [sys.executable, "-m", "enumerator", "batch", str(src), "--format", "json", "--out", str(out)],
        capture_output=True,
        text=True,
    )
    assert p.returncode == 2 and "1 of 3 rows" in p.stderr and "Traceback" not in p.stderr
    doc = json.loads(out.read_text(encoding="utf-8"))
    assert [r["label"] for r in doc["rows"]] == ["A", "B", "C"]
    assert doc["rows"][1]["error"] and doc["rows"][2]["geometry"] == "T-4"


def test_batch_result_reads_counts_from_the_result():
    from enumerator.workflow.batch import run_batch
    from enumerator.workflow.pipeline import analyse

    result = run_batch(["[Fe(CN)4(CO)2]2-", "[Xx(CO)6]"])
    assert [r.index for r in result.failed] == [1]
    row = result.rows[0]
    doc = analyse("[Fe(CN)4(CO)2]2-").to_dict()
    # the same counts the isomer listing's JSON gives, read from the Result instead of from that JSON
    assert (row.geometric_isomers, row.stereoisomers) == (doc["geometric_isomers"], doc["stereoisomers"])
    assert row.point_groups == tuple((i["id"], i["point_group"]) for i in doc["isomers"])
    assert row.ir_bands == tuple(
        (i["id"], cls, m["ir"]) for i in doc["isomers"] for cls, m in sorted(i["modes"].items())
    )
    assert result.to_dict() == {"rows": [r.to_dict() for r in result.rows]}


def test_rows_built_field_by_field_cover_every_field():
    # the screen builds rows positionally for speed: the field order it relies on must hold
    from dataclasses import fields

    from enumerator.workflow.batch import BatchRow

    names = [f.name for f in fields(BatchRow)]
    assert names == [
        "index", "formula", "label", "error", "metal", "charge", "oxidation_state", "d_electrons",
        "valence_electrons", "geometry", "geometry_reason", "geometric_isomers", "stereoisomers", "complete",
        "point_groups", "ir_bands", "safety", "cached",
    ]  # fmt: skip


def test_a_repeated_formula_gives_the_first_rows_answer_with_its_own_place_and_label():
    from enumerator.workflow.batch import screen

    rows = list(screen([("Ma4b2", "one"), ("Ma5b", "two"), ("Ma4b2", "three")]))
    assert [(r.index, r.label, r.cached) for r in rows] == [(0, "one", False), (1, "two", False), (2, "three", True)]
    assert rows[2].point_groups == rows[0].point_groups and rows[2].geometry == rows[0].geometry


#: Repeats across the chunk boundaries, refused rows (an unknown metal, a broken formula, a refused label), a
#: pattern beyond the size cap (Mabcdefghijkl: 12 different ligands) and labels.
POOL_INPUT = [
    "Ma4b2",
    "[Xx(CO)6]",
    ("[Co(NH3)4Cl2]+", "bad\x01label"),
    ("[RuCl2(CO)2(PPh3)2]", "Ru"),
    "Ma4b2",
    "[OsBr2(CO)2(PMe3)2]",
    "[Fe(CO)99",
    "Mabcdefghijkl",
] * 3


def test_pooled_chunks_give_the_rows_of_one_process(monkeypatch):
    # common practice: the pool must not change the answer; every row, its 'cached' flag across chunk
    # boundaries included, and every rendered format are the same as with one process
    import enumerator.workflow.batch as batch_mod
    from enumerator.render.batch import render_batch

    monkeypatch.setattr(batch_mod, "POOL_MIN_ROWS", 1)
    one = batch_mod.run_batch(POOL_INPUT)
    for workers in (2, 3):
        seen: list[tuple[int, int]] = []
        pooled = batch_mod.run_batch(POOL_INPUT, workers=workers, progress=lambda f, d, t, s=seen: s.append((d, t)))
        assert pooled == one
        assert all(render_batch(pooled, fmt) == render_batch(one, fmt) for fmt in ("csv", "json", "table"))
        assert seen[-1] == (len(POOL_INPUT), len(POOL_INPUT))
    assert one.rows[8].cached and one.rows[8].formula == "Ma4b2"  # first of its chunk, seen in an earlier one
    assert "--limit N" in (one.rows[7].error or "")  # the size-cap refusal stays that row's error


def test_small_inputs_stay_in_one_process(monkeypatch):
    import enumerator.workflow.batch as batch_mod

    def no_pool(*args, **kwargs):
        raise AssertionError("a small input must not start processes")

    monkeypatch.setattr(batch_mod, "_pooled", no_pool)
    assert len(list(batch_mod.screen(FORMULAS, workers=4))) == len(FORMULAS)


def test_a_dead_worker_fails_its_chunk_rows_only(monkeypatch):
    from concurrent.futures import Future

    import enumerator.workflow.batch as batch_mod

    dead: Future = Future()
    dead.set_exception(RuntimeError("killed"))
    table, refs = batch_mod._collect(dead, [(4, "Ma4b2", "x"), (5, "Ma5b", "")])
    assert refs == [0, 1] and all(key is None and "worker process failed" in (row.error or "") for row, key in table)
