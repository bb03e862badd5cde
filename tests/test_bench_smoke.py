"""The benchmark script runs (quick mode, no timing assertions: timings are
for the README, never for pass/fail)."""

from __future__ import annotations

import json
import subprocess
import sys

from enumerator import bench


def test_naive_baseline_agrees_with_the_enumerator_on_mabcdef():
    # Mabcdef on OC-6: 15 geometric / 30 stereoisomers (Miessler & Tarr, Inorganic Chemistry; from memory)
    got = bench.naive_isomers("Mabcdef", "OC-6")
    assert (got["geometric_isomers"], got["stereoisomers"]) == (15, 30)
    assert set(got["point_groups"]) == {"C1"}  # six different ligands: no symmetry left (common practice)


def test_libraries_have_the_requested_size_and_repeat_patterns():
    lib = bench.abstract_library(3000, distinct=50)
    assert len(lib) == 3000 and bench._patterns(lib) <= 50
    assert len(bench.condensed_library(100)) == 100


def test_quick_run_produces_a_complete_document():
    out = subprocess.run(
        [sys.executable, "-m", "enumerator.bench", "--quick", "--json", "--quiet"],
        capture_output=True,
        text=True,
        timeout=120,
        check=True,
    )
    doc = json.loads(out.stdout)
    for key in ("machine", "enumeration", "baseline", "batch_abstract", "batch_condensed", "cold_start"):
        assert key in doc
    ic = next(r for r in doc["enumeration"] if r["geometry"] == "IC-12")
    # a3b3c3d3 on IC-12: the enumerator must agree with Burnside's lemma (independent count in enumerator.isomers.counting)
    assert ic["burnside_agrees"] is True
    assert all(r.get("agrees", True) for r in doc["baseline"])
    assert doc["cold_start"]["heavy_imports"]["rdkit"] is False
    assert doc["cold_start"]["heavy_imports"]["matplotlib"] is False
    assert bench.render(doc).count("|") > 20
