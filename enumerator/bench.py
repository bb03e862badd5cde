"""Benchmarks, run as a script (never as timed tests)::

    python -m enumerator.bench            # the full set (a few minutes)
    python -m enumerator.bench --quick    # small repeats and library (seconds)
    python -m enumerator.bench --json     # one JSON document instead of tables

What is measured, always against something measured in the same run
(machines here are noisy, so only medians and ratios are quoted):

* **enumeration + point-group classification** of large cases (IC-12 with
  a3b3c3d3, CN 8 with eight different ligands, ...): each repeat is a fresh
  subprocess pinned to one core; it reports the wall time of its first
  enumeration (group derivation included), the median of warm repeats and
  its peak resident memory (``ru_maxrss``);
* a **naive baseline** in this process: every permutation of the labelling
  (all n! of them), its canonical form by brute force (the least image over
  the rotation group), then each orbit's stabiliser and point group without
  any cache.  Run only where it fits a time budget; its counts must agree
  with the enumerator's;
* **batch screening** over a generated library of formulas (abstract letters
  and condensed real formulas): formulas per second on a first pass and on a
  repeat pass, where every composition pattern is already cached;
* **CLI cold start** of ``isosieve --help`` (median of N subprocesses,
  against ``python -c pass``), and which heavy libraries it imports
  (``python -X importtime``).

The module is not imported by the library or the CLI; it has no effect on
start-up time.
"""

from __future__ import annotations

import argparse
import itertools
import json
import math
import os
import platform
import random
import resource
import shutil
import statistics
import subprocess
import sys
import time
from collections.abc import Callable, Iterable, Iterator
from typing import Any

__all__ = [
    "ENUMERATION_CASES",
    "BASELINE_CASES",
    "naive_isomers",
    "measure_case",
    "abstract_library",
    "condensed_library",
    "screen_library",
    "cold_start",
    "machine",
    "run_all",
    "main",
]

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
    ("IC-12", "M(ring)a3b3c3"),
)
QUICK_CASES: tuple[tuple[str, str], ...] = (("IC-12", "Ma3b3c3d3"), ("OC-6", "Mabcdef"), ("CU-8", "Ma2b2c2d2"))

#: Cases where the naive baseline is also run (if it fits the budget).
BASELINE_CASES: tuple[tuple[str, str], ...] = (
    ("OC-6", "Mabcdef"),
    ("CU-8", "Ma2b2c2d2"),
    ("SAPR-8", "Ma2b2c2d2"),
    ("CU-8", "Mabcdefgh"),
    ("SAPR-8", "Mabcdefgh"),
    ("IC-12", "Ma3b3c3d3"),
)
#: Skip the baseline when n! x |rotations| exceeds this many image tuples.
BASELINE_BUDGET = 3_000_000


# --------------------------------------------------------------------------- naive baseline


def _labels(formula: str) -> list[str]:
    from enumerator.parse.abstract import parse_abstract

    comp = parse_abstract(formula)
    if any(k.denticity != 1 for k in comp.kinds):
        raise ValueError("the naive baseline handles monodentate letters only")
    return [k.name for k, n in comp.parts for _ in range(n)]


def naive_isomers(formula: str, symbol: str) -> dict[str, Any]:
    """Brute force: all n! permutations of the labelling, canonical form as
    the least image under the rotations, then the stabiliser and point
    group of each orbit representative without caching."""
    from enumerator.rules.ruleset import load_rules
    from enumerator.symmetry.operations import schoenflies

    geo = load_rules().geometry(symbol)
    ops = geo.operations
    labels = _labels(formula)
    n = len(labels)
    perms = [op.perm for op in ops]
    proper = [op.perm for op in ops if op.proper]

    def image(lab: tuple[str, ...], perm: tuple[int, ...]) -> tuple[str, ...]:
        out = [""] * n
        for i, p in enumerate(perm):
            out[p] = lab[i]
        return tuple(out)

    stereo: set[tuple[str, ...]] = set()
    for lab in itertools.permutations(labels):
        stereo.add(min(image(lab, p) for p in proper))
    geometric: set[tuple[str, ...]] = set()
    groups: list[str] = []
    for lab in sorted(stereo):
        geometric.add(min(image(lab, p) for p in perms))
        stab = [op.array for op in ops if image(lab, op.perm) == lab]
        groups.append(schoenflies(stab))
    return {"stereoisomers": len(stereo), "geometric_isomers": len(geometric), "point_groups": sorted(groups)}


def baseline_work(formula: str, symbol: str) -> int:
    """n! x |rotations|: the image tuples the naive baseline builds."""
    from enumerator.rules.ruleset import load_rules

    geo = load_rules().geometry(symbol)
    return math.factorial(geo.coordination_number) * len(geo.proper_operations)


# --------------------------------------------------------------------------- enumeration (child process)


def _worker(symbol: str, formula: str, warm: int) -> dict[str, Any]:
    """Run inside a fresh subprocess: one core, cold then warm timings, peak RSS."""
    if hasattr(os, "sched_setaffinity"):
        try:
            os.sched_setaffinity(0, {sorted(os.sched_getaffinity(0))[0]})
        except OSError:
            pass
    t0 = time.perf_counter()
    from enumerator.isomers.counting import burnside_counts
    from enumerator.isomers.enumeration import enumerate_isomers
    from enumerator.parse.abstract import parse_abstract
    from enumerator.rules.ruleset import load_rules

    geo = load_rules().geometry(symbol)
    comp = parse_abstract(formula)
    t1 = time.perf_counter()
    iso = enumerate_isomers(comp, geo)  # first run: derives the group tables too
    t2 = time.perf_counter()
    warm_times = []
    for _ in range(warm):
        s = time.perf_counter()
        enumerate_isomers(comp, geo)
        warm_times.append(time.perf_counter() - s)
    t3 = time.perf_counter()
    counts = burnside_counts(comp, geo)
    t4 = time.perf_counter()
    return {
        "import_and_load_s": t1 - t0,
        "first_s": t2 - t1,
        "warm_median_s": statistics.median(warm_times) if warm_times else None,
        "burnside_s": t4 - t3,
        "stereoisomers": iso.stereoisomers,
        "geometric_isomers": iso.geometric_isomers,
        "point_groups": sorted(i.point_group for i in iso.isomers),
        "burnside": list(counts) if counts else None,
        "peak_rss_mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0,
    }


def measure_case(symbol: str, formula: str, repeats: int, warm: int) -> dict[str, Any]:
    """Median over ``repeats`` fresh subprocesses of the first enumeration,
    the median warm time and the largest peak RSS."""
    runs = []
    for _ in range(repeats):
        out = subprocess.run(
            [sys.executable, "-m", "enumerator.bench", "--worker", symbol, formula, str(warm)],
            capture_output=True,
            text=True,
            check=True,
        )
        runs.append(json.loads(out.stdout))
    first = statistics.median(r["first_s"] for r in runs)
    warm_med = [r["warm_median_s"] for r in runs if r["warm_median_s"] is not None]
    last = runs[-1]
    return {
        "geometry": symbol,
        "formula": formula,
        "repeats": repeats,
        "stereoisomers": last["stereoisomers"],
        "geometric_isomers": last["geometric_isomers"],
        "burnside_agrees": last["burnside"] == [last["geometric_isomers"], last["stereoisomers"]],
        "import_and_load_s": statistics.median(r["import_and_load_s"] for r in runs),
        "first_median_s": first,
        "warm_median_s": statistics.median(warm_med) if warm_med else None,
        "isomers_per_s": last["stereoisomers"] / first if first else None,
        "burnside_s": statistics.median(r["burnside_s"] for r in runs),
        "peak_rss_mb": max(r["peak_rss_mb"] for r in runs),
        "point_groups": last["point_groups"],
    }


def measure_baseline(symbol: str, formula: str, enumerated: dict[str, Any] | None) -> dict[str, Any]:
    work = baseline_work(formula, symbol)
    row: dict[str, Any] = {"geometry": symbol, "formula": formula, "work": work}
    if work > BASELINE_BUDGET:
        row["skipped"] = f"n! x |rotations| = {work:,} image tuples, over the budget of {BASELINE_BUDGET:,}"
        return row
    t = time.perf_counter()
    got = naive_isomers(formula, symbol)
    row["naive_s"] = time.perf_counter() - t
    if enumerated:
        row["agrees"] = (
            got["stereoisomers"] == enumerated["stereoisomers"]
            and got["geometric_isomers"] == enumerated["geometric_isomers"]
            and got["point_groups"] == enumerated["point_groups"]
        )
        row["ratio_to_first"] = row["naive_s"] / enumerated["first_median_s"]
        if enumerated.get("warm_median_s"):
            row["ratio_to_warm"] = row["naive_s"] / enumerated["warm_median_s"]
    return row


# --------------------------------------------------------------------------- batch screening


def abstract_library(size: int, distinct: int = 400, rng: random.Random | None = None) -> list[str]:
    """``size`` abstract formulas built from ``distinct`` compositions (CN 4-6)
    with varied charges, so most rows repeat a composition pattern."""
    rng = rng or random.Random(20240)
    pool: list[str] = []
    letters = "abcdef"
    seen: set[str] = set()
    while len(pool) < distinct:
        cn = rng.choice((4, 5, 6))
        k = rng.randint(1, min(cn, 4))
        cuts = sorted(rng.sample(range(1, cn), k - 1))
        parts = [b - a for a, b in zip([0] + cuts, cuts + [cn])]
        chosen = rng.sample(letters, k)
        body = "".join(c + (str(n) if n > 1 else "") for c, n in zip(chosen, parts))
        if rng.random() < 0.25 and cn == 6:
            body = "(AA)" + body[:-1] if body[-1].isalpha() else body
        f = "M" + body
        if f in seen:
            continue
        seen.add(f)
        pool.append(f)
    charges = ("", "+", "-", "2+", "2-")
    out = []
    for _ in range(size):
        f = rng.choice(pool)
        q = rng.choice(charges)
        out.append(f"[{f}]{q}" if q else f)
    return out


_METALS6 = ("Cr", "W", "Mn", "Re", "Fe", "Ru", "Os", "Co", "Rh", "Ir")
_MONO = ("CO", "Cl", "Br", "I", "NH3", "PPh3", "PMe3", "CN", "py", "MeCN", "H2O")


def condensed_library(size: int, rng: random.Random | None = None) -> list[str]:
    """``size`` real octahedral formulas such as [Ru(CO)2Cl2(PPh3)2]."""
    rng = rng or random.Random(31337)
    out = []
    for _ in range(size):
        metal = rng.choice(_METALS6)
        k = rng.randint(1, 3)
        ligs = rng.sample(_MONO, k)
        cuts = sorted(rng.sample(range(1, 6), k - 1))
        parts = [b - a for a, b in zip([0] + cuts, cuts + [6])]
        body = "".join(
            (f"({l})" if len(l) > 2 or l in ("CO", "CN", "py") else l) + (str(n) if n > 1 else "")
            for l, n in zip(ligs, parts)
        )
        out.append(f"[{metal}{body}]")
    return out


def _own_screen(formulas: Iterable[str], cache: dict | None = None) -> Iterator[tuple[str, Any]]:
    """Fallback screen with a cache by composition pattern + geometry."""
    from enumerator.analyses.centre import choose_geometry
    from enumerator.errors import IsosieveError
    from enumerator.isomers.enumeration import enumerate_isomers
    from enumerator.parse.formula import parse_formula
    from enumerator.rules.ruleset import load_rules

    rules = load_rules()
    cache = {} if cache is None else cache
    for f in formulas:
        try:
            comp = parse_formula(f, rules)
            symbol, _ = choose_geometry(comp, rules, None)
            key = (comp.pattern, symbol)
            hit = cache.get(key)
            if hit is None:
                s = enumerate_isomers(comp, rules.geometry(symbol))
                hit = cache[key] = (s.geometric_isomers, s.stereoisomers, tuple(i.point_group for i in s.isomers))
            yield f, hit
        except IsosieveError as exc:
            yield f, exc.line()


def _screen_function() -> tuple[Callable[..., Iterable[Any]], str]:
    try:
        from enumerator.workflow.batch import screen  # contract 5 (issue-4 engineer)
    except ImportError:
        shared: dict = {}
        return (
            lambda formulas, workers=1: _own_screen(formulas, shared)
        ), "own pattern cache (enumerator.workflow.batch not present)"
    return screen, "enumerator.workflow.batch.screen"


def _parse_only(formulas: list[str]) -> float:
    """Seconds to parse every formula and choose its geometry: the floor a
    fully cached screen can reach."""
    from enumerator.analyses.centre import choose_geometry
    from enumerator.errors import IsosieveError
    from enumerator.parse.formula import parse_formula
    from enumerator.rules.ruleset import load_rules

    rules = load_rules()
    t = time.perf_counter()
    for f in formulas:
        try:
            choose_geometry(parse_formula(f, rules), rules, None)
        except IsosieveError:
            pass
    return time.perf_counter() - t


def _patterns(formulas: list[str]) -> int:
    from enumerator.errors import IsosieveError
    from enumerator.parse.formula import parse_formula
    from enumerator.rules.ruleset import load_rules

    rules = load_rules()
    out = set()
    for f in set(formulas):
        try:
            out.add(parse_formula(f, rules).pattern)
        except IsosieveError:
            pass
    return len(out)


def screen_library(formulas: list[str], workers: int = 1) -> dict[str, Any]:
    """Formulas/s on a first pass (every new composition pattern enumerated
    once, every repeat a cache hit) and on a repeat pass (all hits), with the
    parse-only time of the same rows as the floor: a cached row costs its
    parse and nothing more."""
    screen, how = _screen_function()
    kwargs = {"workers": workers} if workers != 1 else {}
    t = time.perf_counter()
    rows = list(screen(formulas, **kwargs))
    first = time.perf_counter() - t
    t = time.perf_counter()
    rows2 = list(screen(formulas, **kwargs))
    second = time.perf_counter() - t
    parse = _parse_only(formulas)
    errors = sum(1 for r in rows if _is_error(r))
    n = len(formulas)
    return {
        "via": how,
        "workers": workers,
        "formulas": n,
        "distinct_formulas": len(set(formulas)),
        "distinct_patterns": _patterns(formulas),
        "errors": errors,
        "first_pass_s": first,
        "first_pass_per_s": n / first if first else None,
        "repeat_pass_s": second,
        "repeat_pass_per_s": n / second if second else None,
        "parse_only_s": parse,
        "parse_only_per_s": n / parse if parse else None,
        "repeat_over_parse": second / parse if parse else None,
        "same_rows": _rows_key(rows) == _rows_key(rows2),
    }


def _is_error(row: Any) -> bool:
    if isinstance(row, tuple):
        return isinstance(row[1], str)
    return bool(getattr(row, "error", None))


def _rows_key(rows: list[Any]) -> list[str]:
    return [repr(r) for r in rows]


# --------------------------------------------------------------------------- cold start


def _isosieve_cmd() -> list[str]:
    exe = shutil.which("isosieve")
    return [exe] if exe else [sys.executable, "-m", "enumerator"]


def cold_start(runs: int) -> dict[str, Any]:
    """Median wall time of ``isosieve --help`` against ``python -c pass``."""

    def median_of(cmd: list[str]) -> float:
        times = []
        for _ in range(runs):
            t = time.perf_counter()
            subprocess.run(cmd, capture_output=True, check=True)
            times.append(time.perf_counter() - t)
        return statistics.median(times)

    floor = median_of([sys.executable, "-c", "pass"])
    helptime = median_of(_isosieve_cmd() + ["--help"])
    trace = subprocess.run(
        [sys.executable, "-X", "importtime", "-m", "enumerator", "--help"], capture_output=True, text=True, check=True
    ).stderr
    mods = set()
    for line in trace.splitlines():
        if "|" in line and line.startswith("import time:"):
            mods.add(line.rsplit("|", 1)[1].strip().split(".")[0])
    heavy = {m: (m in mods) for m in ("rdkit", "matplotlib", "networkx", "numpy", "scipy", "pymatgen", "phonopy")}
    return {
        "runs": runs,
        "help_median_s": helptime,
        "python_pass_median_s": floor,
        "ratio_to_python": helptime / floor if floor else None,
        "under_0_3_s": helptime < 0.3,
        "heavy_imports": heavy,
    }


# --------------------------------------------------------------------------- machine + driver


def machine() -> dict[str, Any]:
    model = ""
    try:
        with open("/proc/cpuinfo", encoding="utf-8") as fh:
            for line in fh:
                if line.startswith("model name"):
                    model = line.split(":", 1)[1].strip()
                    break
    except OSError:
        pass
    return {
        "nproc": os.cpu_count(),
        "cpu": model or platform.processor(),
        "python": platform.python_version(),
        "platform": platform.platform(),
    }


def run_all(quick: bool = False, log: Callable[[str], None] = lambda s: None) -> dict[str, Any]:
    """Every benchmark; ``quick`` for a smoke run (tiny repeats and library)."""
    cases = QUICK_CASES if quick else ENUMERATION_CASES
    repeats, warm = (1, 1) if quick else (5, 3)
    doc: dict[str, Any] = {"machine": machine(), "quick": quick}
    enum_rows = []
    for sym, f in cases:
        log(f"enumerate {f} on {sym}")
        enum_rows.append(measure_case(sym, f, repeats, warm))
    doc["enumeration"] = enum_rows
    by_case = {(r["geometry"], r["formula"]): r for r in enum_rows}
    base_rows = []
    for sym, f in BASELINE_CASES if not quick else (("OC-6", "Mabcdef"),):
        log(f"naive baseline {f} on {sym}")
        enumerated = by_case.get((sym, f)) or measure_case(sym, f, 1 if quick else 3, warm)
        base_rows.append(measure_baseline(sym, f, enumerated))
    doc["baseline"] = base_rows
    size = 5_000 if quick else 100_000
    log(f"batch: abstract library of {size}")
    doc["batch_abstract"] = screen_library(abstract_library(size))
    log(f"batch: condensed library of {size // 10 if quick else size}")
    try:
        doc["batch_condensed"] = screen_library(condensed_library(size // 10 if quick else size))
    except Exception as exc:  # the condensed parser may be mid-development
        doc["batch_condensed"] = {"skipped": f"{type(exc).__name__}: {exc}"}
    screen, how = _screen_function()
    if how == "enumerator.workflow.batch.screen" and (os.cpu_count() or 1) > 1 and not quick:
        log("batch: parallel")
        doc["batch_parallel"] = screen_library(abstract_library(size), workers=min(4, os.cpu_count() or 1))
    log("cold start")
    doc["cold_start"] = cold_start(3 if quick else 15)
    return doc


def _f(x: Any, digits: int = 3) -> str:
    if x is None:
        return "-"
    if isinstance(x, bool):
        return "yes" if x else "NO"
    if isinstance(x, float):
        return f"{x:.{digits}f}"
    if isinstance(x, int):
        return f"{x:,}"
    return str(x)


def render(doc: dict[str, Any]) -> str:
    """Markdown tables of a :func:`run_all` document."""
    m = doc["machine"]
    out = [f"machine: {m['nproc']} CPUs, {m['cpu']}, Python {m['python']}{' (quick run)' if doc['quick'] else ''}", ""]
    out.append(
        "| geometry | formula | stereo | geometric | first run, median (s) | warm median (s) | isomers/s | import+load (s) | peak RSS (MB) | Burnside agrees |"
    )
    out.append("|---|---|---|---|---|---|---|---|---|---|")
    for r in doc["enumeration"]:
        out.append(
            f"| {r['geometry']} | {r['formula']} | {_f(r['stereoisomers'])} | {_f(r['geometric_isomers'])} | {_f(r['first_median_s'])} | "
            f"{_f(r['warm_median_s'])} | {_f(r['isomers_per_s'], 0)} | {_f(r['import_and_load_s'])} | {_f(r['peak_rss_mb'], 1)} | {_f(r['burnside_agrees'])} |"
        )
    out += [
        "",
        "| geometry | formula | naive (s) | ratio naive/first | ratio naive/warm | same isomers and point groups |",
        "|---|---|---|---|---|---|",
    ]
    for r in doc["baseline"]:
        if "skipped" in r:
            out.append(f"| {r['geometry']} | {r['formula']} | skipped: {r['skipped']} | - | - | - |")
        else:
            out.append(
                f"| {r['geometry']} | {r['formula']} | {_f(r['naive_s'])} | {_f(r.get('ratio_to_first'), 1)} | {_f(r.get('ratio_to_warm'), 1)} | {_f(r.get('agrees'))} |"
            )
    out += [
        "",
        "| library | via | workers | formulas | distinct formulas | distinct patterns | errors | first pass (formulas/s) | repeat pass, all cached (formulas/s) | parse only (formulas/s) | repeat / parse time | same rows |",
        "|---|---|---|---|---|---|---|---|---|---|---|---|",
    ]
    for key in ("batch_abstract", "batch_condensed", "batch_parallel"):
        r = doc.get(key)
        if not r:
            continue
        if "skipped" in r:
            out.append(f"| {key} | skipped: {r['skipped']} |" + " |" * 10)
            continue
        out.append(
            f"| {key} | {r['via']} | {r['workers']} | {_f(r['formulas'])} | {_f(r['distinct_formulas'])} | {_f(r['distinct_patterns'])} | {_f(r['errors'])} | "
            f"{_f(r['first_pass_per_s'], 0)} | {_f(r['repeat_pass_per_s'], 0)} | {_f(r['parse_only_per_s'], 0)} | {_f(r['repeat_over_parse'], 2)} | {_f(r['same_rows'])} |"
        )
    cs = doc["cold_start"]
    heavy = ", ".join(f"{k}: {'imported' if v else 'not imported'}" for k, v in cs["heavy_imports"].items())
    out += [
        "",
        f"cold start: isosieve --help median {cs['help_median_s']:.3f} s over {cs['runs']} runs "
        f"(python -c pass {cs['python_pass_median_s']:.3f} s; ratio {cs['ratio_to_python']:.2f}); under 0.3 s: {_f(cs['under_0_3_s'])}",
        f"imports at --help: {heavy}",
    ]
    return "\n".join(out) + "\n"


def main(argv: list[str] | None = None) -> int:
    args = list(sys.argv[1:] if argv is None else argv)
    if args[:1] == ["--worker"]:
        symbol, formula, warm = args[1], args[2], int(args[3])
        print(json.dumps(_worker(symbol, formula, warm)))
        return 0
    p = argparse.ArgumentParser(prog="python -m enumerator.bench", description=__doc__.split("\n\n")[0])
    p.add_argument("--quick", action="store_true", help="tiny repeats and library: checks that the benchmarks run")
    p.add_argument("--json", action="store_true", help="print one JSON document")
    p.add_argument("--quiet", action="store_true", help="no progress lines on stderr")
    ns = p.parse_args(args)
    log = (lambda s: None) if ns.quiet else (lambda s: print(f"bench: {s}", file=sys.stderr, flush=True))
    doc = run_all(quick=ns.quick, log=log)
    if ns.json:
        for r in doc["enumeration"]:
            r.pop("point_groups", None)
        print(json.dumps(doc, indent=2, sort_keys=True))
    else:
        print(render(doc), end="")
    return 0


if __name__ == "__main__":
    sys.exit(main())
