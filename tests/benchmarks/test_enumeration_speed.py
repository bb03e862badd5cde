"""Enumeration and point-group classification of large cases, against the naive enumerator.

Each case is one benchmark group (``IC-12 Ma3b3c3d3``): the enumerator's warm
time in this process (pytest-benchmark's rounds), with the figures of
:data:`FRESH_RUNS` fresh processes pinned to one core in ``extra_info``
(median first run with the group tables derived, import and rule loading,
the largest peak RSS); and, where brute force fits :data:`BASELINE_BUDGET`,
the naive enumerator of tests/support/oracles.py in the same group, so the
table's ratio column is the speed-up measured in the same run.  Machines
here are noisy: quote medians and ratios, not single times.

Add a case: append ``(symbol, formula)`` to :data:`ENUMERATION_CASES`, and
to :data:`BASELINE_CASES` if brute force fits.
"""

from __future__ import annotations

import functools
import json
import statistics
import subprocess
import sys
import time
from pathlib import Path
from typing import Any

import pytest
from support.oracles import baseline_work, naive_isomers

from enumerator.isomers.enumeration import enumerate_isomers
from enumerator.parse.abstract import parse_abstract
from enumerator.rules.ruleset import load_rules

pytest.importorskip("pytest_benchmark")

#: (geometry, formula) pairs whose enumeration + classification is timed.
ENUMERATION_CASES: tuple[tuple[str, str], ...] = (
    ("IC-12", "Ma3b3c3d3"),
    ("SAPR-8", "Mabcdefgh"),
    ("CU-8", "Mabcdefgh"),
    ("HBPY-8", "Mabcdefgh"),
    ("CU-8", "Ma2b2c2d2"),
    ("SAPR-8", "Ma2b2c2d2"),
    ("OC-6", "Mabcdef"),
    ("IC-12", "M(AA)6"),
    ("IC-12", "M{AAA}a3b3c3"),
)
#: Cases where the naive enumerator runs too (when it fits the budget).
BASELINE_CASES: tuple[tuple[str, str], ...] = (
    ("OC-6", "Mabcdef"),
    ("CU-8", "Ma2b2c2d2"),
    ("SAPR-8", "Ma2b2c2d2"),
    ("CU-8", "Mabcdefgh"),
    ("SAPR-8", "Mabcdefgh"),
    ("IC-12", "Ma3b3c3d3"),
)
#: The naive enumerator is skipped when n! x |rotations| exceeds this many image tuples.
BASELINE_BUDGET = 3_000_000
#: Fresh processes per case for the first-run time and peak RSS.
FRESH_RUNS = 5
#: Warm rounds of the enumerator in this process.
WARM_ROUNDS = 5

WORKER = Path(__file__).resolve().with_name("fresh_enumeration.py")


def _ids(cases: tuple[tuple[str, str], ...]) -> list[str]:
    return [f"{s} {f}" for s, f in cases]


@functools.cache
def fresh(symbol: str, formula: str) -> dict[str, Any]:
    """Medians over :data:`FRESH_RUNS` fresh processes (the largest peak RSS), measured once per case."""
    runs = []
    for _ in range(FRESH_RUNS):
        out = subprocess.run([sys.executable, str(WORKER), symbol, formula], capture_output=True, text=True, check=True)
        runs.append(json.loads(out.stdout))
    return {
        "fresh_runs": len(runs),
        "first_run_median_s": statistics.median(r["first_s"] for r in runs),
        "import_and_load_median_s": statistics.median(r["import_and_load_s"] for r in runs),
        "burnside_median_s": statistics.median(r["burnside_s"] for r in runs),
        "peak_rss_mb": max(r["peak_rss_mb"] for r in runs),
        "burnside": runs[-1]["burnside"],
        "stereoisomers": runs[-1]["stereoisomers"],
        "geometric_isomers": runs[-1]["geometric_isomers"],
        "point_groups": runs[-1]["point_groups"],
    }


def warm_median(symbol: str, formula: str) -> float:
    """Median seconds of :data:`WARM_ROUNDS` enumerations in this process, after one to warm up."""
    geo, comp = load_rules().geometry(symbol), parse_abstract(formula)
    enumerate_isomers(comp, geo)
    times = []
    for _ in range(WARM_ROUNDS):
        t = time.perf_counter()
        enumerate_isomers(comp, geo)
        times.append(time.perf_counter() - t)
    return statistics.median(times)


@pytest.mark.parametrize("symbol,formula", ENUMERATION_CASES, ids=_ids(ENUMERATION_CASES))
def test_enumeration(benchmark, symbol, formula):
    benchmark.group = f"{symbol} {formula}"
    geo, comp = load_rules().geometry(symbol), parse_abstract(formula)
    first = fresh(symbol, formula)
    iso = benchmark.pedantic(enumerate_isomers, args=(comp, geo), rounds=WARM_ROUNDS, warmup_rounds=1)
    median = benchmark.stats.stats.median
    benchmark.extra_info.update({k: v for k, v in first.items() if k != "point_groups"})
    benchmark.extra_info["isomers_per_s_first_run"] = iso.stereoisomers / first["first_run_median_s"]
    benchmark.extra_info["isomers_per_s_warm"] = iso.stereoisomers / median
    # the fresh process agrees with this one, and with Burnside's lemma (enumerator.isomers.counting)
    assert (first["stereoisomers"], first["geometric_isomers"]) == (iso.stereoisomers, iso.geometric_isomers)
    assert first["burnside"] == [iso.geometric_isomers, iso.stereoisomers]


@pytest.mark.parametrize("symbol,formula", BASELINE_CASES, ids=_ids(BASELINE_CASES))
def test_naive_enumerator(benchmark, symbol, formula):
    work = baseline_work(symbol)
    if work > BASELINE_BUDGET:
        pytest.skip(f"n! x |rotations| = {work:,} image tuples, over the budget of {BASELINE_BUDGET:,}")
    benchmark.group = f"{symbol} {formula}"
    got = benchmark.pedantic(naive_isomers, args=(formula, symbol), rounds=3, warmup_rounds=0)
    naive = benchmark.stats.stats.median
    first = fresh(symbol, formula)
    benchmark.extra_info["work_image_tuples"] = work
    benchmark.extra_info["ratio_to_first_run"] = naive / first["first_run_median_s"]
    benchmark.extra_info["ratio_to_warm"] = naive / warm_median(symbol, formula)
    # brute force and the enumerator find the same isomers with the same point groups
    assert got == {k: first[k] for k in ("stereoisomers", "geometric_isomers", "point_groups")}
