"""What users feel, each figure against its same-run baseline and the host calibration.

Every benchmark here times whole commands in fresh processes (``paired.run_command``)
or one code path in this process, and puts in ``extra_info``: the medians, the
ratio the goal is stated in, the same figure for the code before the speed
work (``paired.BASELINE_COMMIT``, run in the same session) and the host
calibration (``paired.calibration``).  The pytest-benchmark row itself is the
new command; the other variants run in its ``setup``, interleaved round by
round.  Run with::

    python3 -m pytest tests/benchmarks/test_user_speed.py --benchmark-only --benchmark-json=speed.json

Goals (README, "Speed"): JSON at most 1.5x the table and under 200 MB on IC-12
Ma3b3c3d3, growing at most as n^1.2; the CU-8 Mabcdefgh JSON at most 30 MB and
300 MB peak; small commands at most 2.5x ``python -c "import numpy, click"``;
the report at most 2x ``job`` on the same file; the IC-12 table at most 0.6x
the baseline's.
"""

from __future__ import annotations

import math
import os
import statistics
import subprocess
import sys
import time
from collections.abc import Callable, Sequence
from pathlib import Path

import pytest

from .paired import (
    Run,
    baseline_tree,
    calibration,
    current_tree,
    median_cpu_s,
    median_s,
    run_command,
)

pytest.importorskip("pytest_benchmark")

IC12_JSON = ["isomers", "Ma3b3c3d3", "-g", "IC-12", "--json"]
IC12_TABLE = ["isomers", "Ma3b3c3d3", "-g", "IC-12"]
CU8_JSON = ["isomers", "Mabcdefgh", "-g", "CU-8", "--json"]
SMALL = {
    "isomers Ma6": ["isomers", "Ma6"],
    "isomers [RuCl2(CO)2(PPh3)2]": ["isomers", "[RuCl2(CO)2(PPh3)2]"],
    "bands [Cr(CO)6]": ["bands", "[Cr(CO)6]"],
    "match [Mo(CO)3(PPh3)3]": ["match", "[Mo(CO)3(PPh3)3]", "--bands", "1950,1860,1840"],
    "route [PtCl4]2-": ["route", "[PtCl4]2-", "--target", "cis-[PtCl2(NH3)2]"],
}
RU_JOB = "examples/ruthenium/ru_dicarbonyl.toml"


def _paired(benchmark, main: Callable[[], Run], others: dict[str, Callable[[], Run]], rounds: int):
    """Time ``main`` as the benchmark, the others once before each of its rounds; all runs returned."""
    runs: dict[str, list[Run]] = {"main": [], **{k: [] for k in others}}

    def setup():
        for name, fn in others.items():
            runs[name].append(fn())

    def target():
        runs["main"].append(main())

    benchmark.pedantic(target, setup=setup, rounds=rounds, iterations=1)
    benchmark.extra_info["calibration_s"] = calibration()
    return runs


def _cmd(tree: Path | None, args: Sequence[str]) -> Callable[[], Run]:
    assert tree is not None
    return lambda: run_command(tree, args)


def _base() -> Path | None:
    return baseline_tree()


def test_json_against_table_ic12(benchmark):
    benchmark.group = "JSON: isomers Ma3b3c3d3 -g IC-12"
    new = current_tree()
    others = {"table": _cmd(new, IC12_TABLE)}
    base = _base()
    if base is not None:
        others |= {"baseline_json": _cmd(base, IC12_JSON), "baseline_table": _cmd(base, IC12_TABLE)}
    runs = _paired(benchmark, _cmd(new, IC12_JSON), others, rounds=3)
    info = benchmark.extra_info
    info["json_median_s"] = median_s(runs["main"])
    info["table_median_s"] = median_s(runs["table"])
    info["json_over_table"] = info["json_median_s"] / info["table_median_s"]
    info["json_peak_rss_mb"] = max(r.peak_rss_mb for r in runs["main"])
    info["json_bytes"] = runs["main"][-1].output_bytes
    if base is not None:
        info["baseline_json_median_s"] = median_s(runs["baseline_json"])
        info["baseline_table_median_s"] = median_s(runs["baseline_table"])
        info["baseline_json_over_table"] = info["baseline_json_median_s"] / info["baseline_table_median_s"]
        info["baseline_json_peak_rss_mb"] = max(r.peak_rss_mb for r in runs["baseline_json"])
        info["json_over_baseline_json"] = info["json_median_s"] / info["baseline_json_median_s"]
        # the enumeration goal: the table against the code before
        info["table_over_baseline_table"] = info["table_median_s"] / info["baseline_table_median_s"]


def test_pair_list_cu8(benchmark):
    benchmark.group = "JSON: isomers Mabcdefgh -g CU-8"
    new = current_tree()
    base = _base()
    # the baseline writes 233 MB and peaks near 2 GB: one run of it is enough
    others = {"baseline": _cmd(base, CU8_JSON)} if base is not None else {}
    runs = _paired(benchmark, _cmd(new, CU8_JSON), others, rounds=1)
    info = benchmark.extra_info
    info["median_s"] = median_s(runs["main"])
    info["output_mb"] = runs["main"][-1].output_bytes / 1e6
    info["peak_rss_mb"] = max(r.peak_rss_mb for r in runs["main"])
    if base is not None:
        info["baseline_s"] = median_s(runs["baseline"])
        info["baseline_output_mb"] = runs["baseline"][-1].output_bytes / 1e6
        info["baseline_peak_rss_mb"] = runs["baseline"][-1].peak_rss_mb


#: (geometry, compositions with growing isomer counts) for the JSON path's growth.
GROWTH = {
    "IC-12": ("Ma10b2", "Ma8b4", "Ma6b6", "Ma6b3c3", "Ma4b4c4", "Ma3b3c3d3"),
    "CU-8": ("Ma6b2", "Ma4b4", "Ma4b2c2", "Ma2b2c2d2", "Ma2b2c2de", "Mabcdefgh"),
    "SAPR-8": ("Ma6b2", "Ma4b4", "Ma4b2c2", "Ma2b2c2d2", "Ma2b2c2de", "Mabcdefgh"),
}


def _json_path_s(res) -> float:
    from enumerator.render.jsonout import dumps

    times = []
    for _ in range(3):
        t = time.perf_counter()
        dumps(res.to_dict())
        times.append(time.perf_counter() - t)
    return statistics.median(times)


def _exponent(points: Sequence[tuple[int, float]]) -> float:
    """The least-squares slope of log(time) against log(isomers)."""
    xs = [math.log(n) for n, _ in points]
    ys = [math.log(t) for _, t in points]
    mx, my = statistics.fmean(xs), statistics.fmean(ys)
    return sum((x - mx) * (y - my) for x, y in zip(xs, ys)) / sum((x - mx) ** 2 for x in xs)


@pytest.mark.parametrize("symbol", sorted(GROWTH))
def test_json_path_growth(benchmark, symbol):
    from enumerator.workflow.pipeline import analyse

    benchmark.group = f"JSON growth on {symbol}"
    results = [analyse(f, geometry=symbol) for f in GROWTH[symbol]]
    points = [(len(r.isomers), _json_path_s(r)) for r in results]
    benchmark.pedantic(lambda: _json_path_s(results[-1]), rounds=1, iterations=1)
    benchmark.extra_info["isomers_and_seconds"] = points
    benchmark.extra_info["fitted_exponent"] = _exponent(points)
    benchmark.extra_info["calibration_s"] = calibration()


@pytest.mark.parametrize("name", list(SMALL))
def test_small_command_start_up(benchmark, name):
    benchmark.group = f"start-up: {name}"
    new = current_tree()
    base = _base()

    def numpy_click() -> Run:
        t = time.perf_counter()
        subprocess.run([sys.executable, "-c", "import numpy, click"], check=True)
        return Run(time.perf_counter() - t, float("nan"), 0, 0)

    others = {"numpy_click": numpy_click}
    if base is not None:
        others["baseline"] = _cmd(base, SMALL[name])
    runs = _paired(benchmark, _cmd(new, SMALL[name]), others, rounds=7)
    info = benchmark.extra_info
    info["median_s"] = median_s(runs["main"])
    info["numpy_click_median_s"] = median_s(runs["numpy_click"])
    info["over_numpy_click"] = info["median_s"] / info["numpy_click_median_s"]
    assert all(r.status == 0 for r in runs["main"])
    if base is not None:
        info["baseline_median_s"] = median_s(runs["baseline"])
        info["baseline_over_numpy_click"] = info["baseline_median_s"] / info["numpy_click_median_s"]


def test_report_against_job(benchmark, tmp_path):
    benchmark.group = "report: examples/ruthenium"
    new = current_tree()
    base = _base()
    job = str(current_tree() / RU_JOB)
    others = {"job": _cmd(new, ["job", job])}
    if base is not None:
        others["baseline_report"] = _cmd(base, ["report", job, "--out", str(tmp_path / "base")])
    runs = _paired(benchmark, _cmd(new, ["report", job, "--out", str(tmp_path / "new")]), others, rounds=3)
    info = benchmark.extra_info
    info["report_median_s"] = median_s(runs["main"])
    info["job_median_s"] = median_s(runs["job"])
    info["report_over_job"] = info["report_median_s"] / info["job_median_s"]
    # the CPU seconds behind those wall times (worker processes included), and the best ratio this host's CPUs
    # allow: the report's CPU spread over every CPU without loss, against job's wall time
    info["report_cpu_s"] = median_cpu_s(runs["main"])
    info["job_cpu_s"] = median_cpu_s(runs["job"])
    info["cpus"] = len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else os.cpu_count()
    info["report_over_job_bound"] = info["report_cpu_s"] / info["cpus"] / info["job_median_s"]
    if base is not None:
        info["baseline_report_median_s"] = median_s(runs["baseline_report"])
        info["report_over_baseline_report"] = info["report_median_s"] / info["baseline_report_median_s"]
