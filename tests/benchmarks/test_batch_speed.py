"""Batch screening throughput over generated libraries (tests/support/libraries.py).

For each library the screen itself (``enumerator.workflow.batch.screen``,
every new composition pattern enumerated once, every repeat a cache hit) and
parsing alone (the floor a fully cached screen can reach) are one benchmark
group.  ``extra_info`` gives formulas per second for the first round (a cold
process) and the median round, the library's distinct formulas and patterns,
and the error rows.
"""

from __future__ import annotations

import functools
import os

import pytest
from support.libraries import abstract_library, condensed_library, distinct_patterns, parse_only

from enumerator.workflow.batch import screen

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
    benchmark.extra_info["formulas"] = n
    benchmark.extra_info["first_round_formulas_per_s"] = n / stats.data[0]
    benchmark.extra_info["median_formulas_per_s"] = n / stats.median


@pytest.mark.parametrize("kind", ["abstract", "condensed"])
def test_screen(benchmark, kind):
    formulas = library(kind)
    benchmark.group = f"batch {kind}"
    rows = benchmark.pedantic(lambda: list(screen(formulas)), rounds=ROUNDS, warmup_rounds=0)
    _describe(benchmark, formulas)
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
def test_screen_parallel(benchmark):
    formulas = library("abstract")
    workers = min(4, os.cpu_count() or 1)
    benchmark.group = "batch abstract"
    benchmark.pedantic(lambda: list(screen(formulas, workers=workers)), rounds=ROUNDS, warmup_rounds=0)
    _describe(benchmark, formulas)
    benchmark.extra_info["workers"] = workers
