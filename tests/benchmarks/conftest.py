"""Benchmarks run only when asked for::

    python3 -m pytest tests/benchmarks --benchmark-only

(pytest-benchmark, from the test extras).  A plain ``python3 -m pytest``
collects them and skips them, so the suite's time is unchanged.  Add
``--benchmark-json FILE`` to keep every figure, including the ``extra_info``
each benchmark records (first-run times and peak RSS of fresh processes,
ratios to the naive enumerator, formulas per second).
"""

from __future__ import annotations

from pathlib import Path

import pytest

HERE = Path(__file__).resolve().parent
RUN = "python3 -m pytest tests/benchmarks --benchmark-only"


def pytest_collection_modifyitems(config: pytest.Config, items: list[pytest.Item]) -> None:
    if config.getoption("benchmark_only", default=False):
        return
    skip = pytest.mark.skip(reason=f"a benchmark: run with {RUN}")
    for item in items:
        if HERE in Path(str(item.fspath)).resolve().parents:
            item.add_marker(skip)
