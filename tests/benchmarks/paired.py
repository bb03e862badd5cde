"""Same-run measurement helpers: the host calibration, a baseline tree, commands timed in fresh processes.

Figures from a shared machine are only comparable within one run, so every
benchmark that quotes a ratio measures both sides here, interleaved round by
round:

* :func:`calibration` times ``python -c "sum(i*i for i in range(3_000_000))"``
  (median of five), the yardstick the targets are scaled by (the README's
  targets assume 0.15 s);
* :func:`baseline_tree` extracts :data:`BASELINE_COMMIT` (the code before the
  speed work, main at the time) with ``git archive`` into a temporary folder,
  so that the old code runs in the same session as the new;
* :func:`run_command` runs one ``isosieve`` command of a tree in a fresh
  process (``run_cli.py``) and returns its wall time, peak RSS and output size.

Both trees get their bytecode compiled first (an installed package has it;
a checkout run with ``PYTHONDONTWRITEBYTECODE`` would otherwise compile every
module on every start), and a tree with :mod:`enumerator.frozen` its
dataclasses' kept method code (``python -m enumerator.frozen``), which a first
run writes where bytecode may be written.
"""

from __future__ import annotations

import compileall
import os
import shutil
import statistics
import subprocess
import sys
import tarfile
import tempfile
import time
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from functools import cache
from pathlib import Path

#: The code before the speed work (main when it began), run beside the new code.
BASELINE_COMMIT = "3adce03a3331d437eafefee079a5f8603f239235"
#: The calibration the README's targets assume (seconds).
REFERENCE_CALIBRATION_S = 0.15

HERE = Path(__file__).resolve().parent
ROOT = HERE.parent.parent
RUNNER = HERE / "run_cli.py"


@cache
def calibration() -> float:
    """Median seconds of five runs of ``python -c "sum(i*i for i in range(3_000_000))"``."""
    times = []
    for _ in range(5):
        t = time.perf_counter()
        subprocess.run([sys.executable, "-c", "sum(i*i for i in range(3_000_000))"], check=True)
        times.append(time.perf_counter() - t)
    return statistics.median(times)


def _compile(tree: Path) -> None:
    compileall.compile_dir(str(tree / "enumerator"), quiet=1, workers=1)
    if (tree / "enumerator" / "frozen.py").exists():  # the dataclasses' kept method code, as bytecode
        env = dict(os.environ, PYTHONPATH=str(tree))
        subprocess.run([sys.executable, "-m", "enumerator.frozen"], cwd=tree, env=env, check=True, capture_output=True)


@cache
def current_tree() -> Path:
    """This checkout, its bytecode compiled."""
    _compile(ROOT)
    return ROOT


@cache
def baseline_tree() -> Path | None:
    """:data:`BASELINE_COMMIT` extracted to a temporary folder (None without git or the commit)."""
    git = shutil.which("git")
    if git is None:
        return None
    dest = Path(tempfile.mkdtemp(prefix="isosieve-baseline-"))
    archive = dest / "tree.tar"
    try:
        with open(archive, "wb") as fh:
            subprocess.run([git, "-C", str(ROOT), "archive", BASELINE_COMMIT], stdout=fh, check=True)
    except subprocess.CalledProcessError:
        return None
    with tarfile.open(archive) as tar:
        tar.extractall(dest, filter="tar")
    archive.unlink()
    _compile(dest)
    return dest


@dataclass(frozen=True)
class Run:
    """One command in a fresh process."""

    seconds: float
    peak_rss_mb: float
    output_bytes: int
    status: int
    #: user + system CPU seconds of the process and every process it waited for (its worker processes)
    cpu_seconds: float = float("nan")


def run_command(tree: Path, args: Sequence[str]) -> Run:
    """Run ``isosieve ARGS`` from ``tree`` in a fresh process (standard output to a file).

    Parameters
    ----------
    tree : Path
        A checkout (its ``enumerator`` package is imported).
    args : sequence of str
        The command line after ``isosieve``.

    Returns
    -------
    Run
    """
    env = dict(os.environ, PYTHONPATH=str(tree))
    with tempfile.TemporaryDirectory() as tmp:
        out, rss = Path(tmp) / "out", Path(tmp) / "rss"
        with open(out, "wb") as fh:
            before = _children_cpu()
            t = time.perf_counter()
            p = subprocess.run(
                [sys.executable, str(RUNNER), str(rss), *args], stdout=fh, stderr=subprocess.DEVNULL, cwd=tree, env=env
            )
            seconds = time.perf_counter() - t
            cpu = _children_cpu() - before
        peak = float(rss.read_text()) if rss.exists() else float("nan")
        return Run(seconds, peak, out.stat().st_size, p.returncode, cpu)


def _children_cpu() -> float:
    """User + system CPU seconds of the waited-for child processes so far (their own children included)."""
    import resource

    use = resource.getrusage(resource.RUSAGE_CHILDREN)
    return use.ru_utime + use.ru_stime


def interleaved(variants: dict[str, Callable[[], Run]], rounds: int) -> dict[str, list[Run]]:
    """Each variant once per round, in turn, so that a busy spell of the machine hits them all alike."""
    out: dict[str, list[Run]] = {k: [] for k in variants}
    for _ in range(rounds):
        for name, fn in variants.items():
            out[name].append(fn())
    return out


def median_s(runs: Sequence[Run]) -> float:
    """The median wall time of some runs."""
    return statistics.median(r.seconds for r in runs)


def median_cpu_s(runs: Sequence[Run]) -> float:
    """The median CPU time (user + system, worker processes included) of some runs."""
    return statistics.median(r.cpu_seconds for r in runs)


def scaled(figure_per_s: float, calib_s: float) -> float:
    """A rate measured here, scaled to the reference host (calibration :data:`REFERENCE_CALIBRATION_S`)."""
    return figure_per_s * calib_s / REFERENCE_CALIBRATION_S
