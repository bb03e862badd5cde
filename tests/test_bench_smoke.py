"""The benchmarks under tests/benchmarks still run, and what they rely on holds.

No timing is asserted: timings are figures for the README, never pass/fail.
"""

from __future__ import annotations

import json
import pathlib
import subprocess
import sys

from support.libraries import abstract_library, condensed_library, distinct_patterns
from support.oracles import naive_isomers

ROOT = pathlib.Path(__file__).resolve().parent.parent


def test_naive_enumerator_agrees_with_the_textbook_on_mabcdef():
    # Mabcdef on OC-6: 15 geometric / 30 stereoisomers (Miessler & Tarr, Inorganic Chemistry; from memory)
    got = naive_isomers("Mabcdef", "OC-6")
    assert (got["geometric_isomers"], got["stereoisomers"]) == (15, 30)
    assert set(got["point_groups"]) == {"C1"}  # six different ligands: no symmetry left (common practice)


def test_libraries_have_the_requested_size_and_repeat_patterns():
    lib = abstract_library(3000, distinct=50)
    assert len(lib) == 3000 and distinct_patterns(lib) <= 50
    assert len(condensed_library(100)) == 100


def test_help_imports_no_heavy_library():
    # `isosieve --help` must start fast: the commands and their libraries load on first use
    trace = subprocess.run(
        [sys.executable, "-X", "importtime", "-m", "enumerator", "--help"],
        capture_output=True,
        text=True,
        check=True,
        cwd=ROOT,
    ).stderr
    loaded = {line.rsplit("|", 1)[1].strip().split(".")[0] for line in trace.splitlines() if "|" in line}
    assert not loaded & {"rdkit", "matplotlib", "networkx", "numpy", "scipy", "pymatgen", "phonopy"}


def test_one_benchmark_group_runs_on_request(tmp_path):
    out = tmp_path / "bench.json"
    subprocess.run(
        [
            sys.executable,
            "-m",
            "pytest",
            "tests/benchmarks",
            "--benchmark-only",
            "-k",
            "OC-6 and Mabcdef",
            f"--benchmark-json={out}",
            "-p",
            "no:cacheprovider",
            "-o",
            "addopts=",
            "-q",
        ],
        capture_output=True,
        text=True,
        timeout=300,
        check=True,
        cwd=ROOT,
    )
    runs = json.loads(out.read_text())["benchmarks"]
    assert {b["group"] for b in runs} == {"OC-6 Mabcdef"}
    by_name = {b["name"].split("[")[0]: b for b in runs}
    enum, naive = by_name["test_enumeration"], by_name["test_naive_enumerator"]
    assert enum["extra_info"]["peak_rss_mb"] > 0 and enum["extra_info"]["first_run_median_s"] > 0
    assert naive["extra_info"]["ratio_to_warm"] > 0 and naive["extra_info"]["ratio_to_first_run"] > 0
