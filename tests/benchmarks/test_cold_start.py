"""Cold start of the command line: ``isosieve --help`` against ``python -c pass``, one group.

The command imports its commands lazily, so ``--help`` should cost little
more than the interpreter (the guide's target: under 0.3 s).  Which heavy
libraries ``--help`` imports is checked in the normal suite
(tests/test_bench_smoke.py).
"""

from __future__ import annotations

import shutil
import subprocess
import sys

import pytest

pytest.importorskip("pytest_benchmark")

ROUNDS = 15


def _isosieve() -> list[str]:
    exe = shutil.which("isosieve")
    return [exe] if exe else [sys.executable, "-m", "enumerator"]


def _run(cmd: list[str]) -> None:
    subprocess.run(cmd, capture_output=True, check=True)


def test_isosieve_help(benchmark):
    benchmark.group = "cold start"
    benchmark.pedantic(_run, args=(_isosieve() + ["--help"],), rounds=ROUNDS, warmup_rounds=1)
    benchmark.extra_info["under_0_3_s"] = benchmark.stats.stats.median < 0.3


def test_python_pass(benchmark):
    benchmark.group = "cold start"
    benchmark.pedantic(_run, args=([sys.executable, "-c", "pass"],), rounds=ROUNDS, warmup_rounds=1)
