"""Batch screening throughput over generated libraries (tests/support/libraries.py).

For each library the screen itself (``enumerator.workflow.batch.screen``,
every new composition pattern enumerated once, every repeat a cache hit) and
parsing alone (the floor a fully cached screen can reach) are one benchmark
group.  ``extra_info`` gives formulas per second for the first round (a cold
process) and the median round, the same scaled to the reference host by the
calibration (``paired.calibration``; the goal, 20,000 formulas/s per core,
assumes 0.15 s), the library's distinct formulas and patterns, the error
rows, and the code before the speed work on the same library in the same
session (``paired.BASELINE_COMMIT``, in a fresh process).  The screen runs
pinned to one core (per-core figures).  The pool is measured against one
process on the same library, interleaved, as a paired ratio.
"""

from __future__ import annotations

import contextlib
import functools
import json
import os
import statistics
import subprocess
import sys
import time
from pathlib import Path

import pytest
from support.libraries import abstract_library, condensed_library, distinct_patterns, parse_only

from enumerator.workflow.batch import screen

from .paired import baseline_tree, calibration, scaled

pytest.importorskip("pytest_benchmark")

#: Formulas per library.
LIBRARY_SIZE = 100_000
ROUNDS = 3


@functools.cache
def library(kind: str) -> tuple[str, ...]:
    make = {"abstract": abstract_library, "condensed": condensed_library}[kind]
    return tuple(make(LIBRARY_SIZE))


def _describe(benchmark, formulas: tuple[str, ...]) -> None:
    stats = benchmark.stats.stats
    n = len(formulas)
    calib = calibration()
    info = benchmark.extra_info
    info["formulas"] = n
    info["first_round_formulas_per_s"] = n / stats.data[0]
    info["median_formulas_per_s"] = n / stats.median
    info["calibration_s"] = calib
    info["first_round_per_s_scaled_to_0_15_s_host"] = scaled(n / stats.data[0], calib)
    info["median_per_s_scaled_to_0_15_s_host"] = scaled(n / stats.median, calib)


@contextlib.contextmanager
def one_core():
    """Pin this process to one core for the block (per-core figures), where the system allows it."""
    if not hasattr(os, "sched_setaffinity"):
        yield
        return
    before = os.sched_getaffinity(0)
    try:
        os.sched_setaffinity(0, {min(before)})
    except OSError:
        before = None
    try:
        yield
    finally:
        if before is not None:
            os.sched_setaffinity(0, before)


_BASELINE_SCRIPT = """
import json, os, sys, time
sys.path.insert(0, sys.argv[2])
if hasattr(os, "sched_setaffinity"):
    os.sched_setaffinity(0, {min(os.sched_getaffinity(0))})
from support.libraries import abstract_library, condensed_library
from enumerator.workflow.batch import screen
lib = {"abstract": abstract_library, "condensed": condensed_library}[sys.argv[1]](int(sys.argv[3]))
t = time.perf_counter()
rows = list(screen(lib))
print(json.dumps({"seconds": time.perf_counter() - t, "rows": len(rows)}))
"""


def baseline_rate(kind: str) -> float | None:
    """Formulas per second of the code before the speed work on the same library (a fresh process)."""
    base = baseline_tree()
    if base is None:
        return None
    tests = str(Path(__file__).resolve().parent.parent)
    out = subprocess.run(
        [sys.executable, "-c", _BASELINE_SCRIPT, kind, tests, str(LIBRARY_SIZE)],
        capture_output=True,
        text=True,
        check=True,
        env=dict(os.environ, PYTHONPATH=str(base)),
    )
    doc = json.loads(out.stdout)
    return doc["rows"] / doc["seconds"]


@pytest.mark.parametrize("kind", ["abstract", "condensed"])
def test_screen(benchmark, kind):
    formulas = library(kind)
    benchmark.group = f"batch {kind}"
    with one_core():
        rows = benchmark.pedantic(lambda: list(screen(formulas)), rounds=ROUNDS, warmup_rounds=0)
    _describe(benchmark, formulas)
    rate = baseline_rate(kind)
    if rate is not None:
        benchmark.extra_info["baseline_formulas_per_s"] = rate
        benchmark.extra_info["median_over_baseline"] = benchmark.extra_info["median_formulas_per_s"] / rate
    benchmark.extra_info["distinct_formulas"] = len(set(formulas))
    benchmark.extra_info["distinct_patterns"] = distinct_patterns(formulas)
    benchmark.extra_info["errors"] = sum(1 for r in rows if r.error)
    assert rows == list(screen(formulas))  # a repeated screen gives the same rows


@pytest.mark.parametrize("kind", ["abstract", "condensed"])
def test_parse_only(benchmark, kind):
    formulas = library(kind)
    benchmark.group = f"batch {kind}"
    benchmark.pedantic(parse_only, args=(formulas,), rounds=ROUNDS, warmup_rounds=0)
    _describe(benchmark, formulas)


@pytest.mark.skipif((os.cpu_count() or 1) < 2, reason="one CPU: nothing to share out")
@pytest.mark.parametrize("kind", ["abstract", "condensed"])
def test_screen_parallel(benchmark, kind):
    formulas = library(kind)
    workers = min(4, os.cpu_count() or 1)
    benchmark.group = f"batch {kind}"
    serial: list[float] = []

    def setup():
        t = time.perf_counter()
        list(screen(formulas))
        serial.append(time.perf_counter() - t)

    benchmark.pedantic(lambda: list(screen(formulas, workers=workers)), setup=setup, rounds=ROUNDS, iterations=1)
    _describe(benchmark, formulas)
    benchmark.extra_info["workers"] = workers
    # paired: the same library in one process, run before each pooled round
    benchmark.extra_info["serial_median_s"] = statistics.median(serial)
    benchmark.extra_info["pool_over_serial_time"] = benchmark.stats.stats.median / statistics.median(serial)
