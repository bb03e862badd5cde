"""The README's Python examples run as written, its order holds, and the claims it makes about outputs are true."""

from __future__ import annotations

import doctest
import json
import re
from pathlib import Path

import pandas as pd
import pytest
from _cli import cli

ROOT = Path(__file__).resolve().parent.parent
README = ROOT / "README.md"
DEVELOPERS = ROOT / "DEVELOPERS.md"

# the two commands at the top: the first a newcomer runs, the second is what CI runs (.ci/run)
EXAMPLE_COMMAND = "python3 -m pip install -e . && isosieve job examples/ruthenium/ru_dicarbonyl.toml"
TEST_COMMAND = 'python3 -m pip install -q -e ".[test]" && python3 -m pytest'

# the order a newcomer reads: overview and use first, then the reference
ORDER = [
    "## Installing",
    "## A quick tour",
    "## Concepts",
    "## Python",
    "## Reference",
    "## Commands at a glance",
    "## JSON schema (`--json`)",
    "### The axis rule (used for every label that depends on the axes)",
    "## IUPAC stereodescriptors (IR-9.3)",
    "## Band patterns: prediction, fitting, matching",
    "## Substitution routes and networks",
    "## Reports for supporting information, and structure files",
    "## Output formats, batch and job files",
    "### Batch",
    "### Job files",
    "## Exit status and errors",
]
CONCEPTS = [
    "### Formulas: condensed formulas and abstract letters",
    "### The abstract notation",
    "### Geometries",
    "### What a pair verdict means",
    "### What an IR band means",
]


@pytest.fixture(scope="module")
def text():
    return README.read_text(encoding="utf-8")


def _headings(text):
    return [line for line in text.splitlines() if line.startswith("#")]


def test_readme_python_section_runs():
    result = doctest.testfile(str(README), module_relative=False, optionflags=doctest.ELLIPSIS, verbose=False)
    assert result.attempted >= 6
    assert result.failed == 0


def test_opening_comes_in_order(text):
    # the job paragraph, the two commands, what they do, the safety note, then the first section
    head = text.split("\n## ", 1)[0]
    job = head.index("Chemists who replace ligands")
    commands = head.index("```\n" + EXAMPLE_COMMAND + "\n" + TEST_COMMAND + "\n```")
    safety = head.index("> **Safety.**")
    assert job < commands < safety
    assert text.split("\n## ", 1)[1].startswith("Installing\n")


def test_ci_runs_the_readme_test_command():
    ci = (ROOT / ".ci" / "run").read_text(encoding="utf-8").strip().splitlines()
    assert ci[-1] == TEST_COMMAND


def test_headings_come_in_the_required_order(text):
    heads = _headings(text)
    at = [heads.index(h) for h in ORDER]
    assert at == sorted(at), [h for h, _ in sorted(zip(ORDER, at), key=lambda x: x[1])]
    concepts, python = heads.index("## Concepts"), heads.index("## Python")
    assert all(concepts < heads.index(h) < python for h in CONCEPTS)


def test_install_note_matches_the_package(text):
    pyproject = (ROOT / "pyproject.toml").read_text(encoding="utf-8")
    assert 'requires-python = ">=3.11"' in pyproject and "Python 3.11 or newer" in text
    assert "python3 -m venv .venv && . .venv/bin/activate" in text
    assert "PEP 668" in text and "pipx install ." in text


def test_contributor_material_lives_in_developers():
    readme, dev = README.read_text(encoding="utf-8"), DEVELOPERS.read_text(encoding="utf-8")
    for heading in (
        "### Benchmarks (`python3 -m pytest tests/benchmarks --benchmark-only`)",
        "### Limits found by these benchmarks, and what was done",
        "### Bad inputs tried and what each gets",
    ):
        assert heading not in readme and heading in dev
    assert "Fixed on the way" not in readme and "Fixed on the way" in dev


def test_benchmark_command_is_the_one_the_benchmarks_answer_to(text):
    conftest = (ROOT / "tests" / "benchmarks" / "conftest.py").read_text(encoding="utf-8")
    run = re.search(r'RUN = "([^"]+)"', conftest).group(1)
    assert run in text and "### Headline figures" in text


def test_pandas_recipe_reads_one_row_per_isomer(tmp_path, text):
    # README, Output formats: pandas.read_csv with no options; the cautions go to the sidecar
    assert 'pandas.read_csv("x.csv")` needs no options' in text
    out = tmp_path / "x.csv"
    code, _, err = cli(["isomers", "[RuCl2(CO)2(PPh3)2]", "--format", "csv", "--out", str(out)])
    assert code == 0, err
    df = pd.read_csv(out)
    # five geometric isomers, one of them chiral: 6 stereoisomers (Housecroft & Sharpe, Inorganic Chemistry,
    # 4th ed., ch. 19, stereoisomers of octahedral MX2Y2Z2; from memory)
    assert len(df) == 6 and list(df["isomer"]) == ["1a", "1b", "2", "3", "4", "5"]
    assert list(df.columns[:6]) == ["formula", "geometry", "isomer", "point group", "chiral", "enantiomer"]
    assert df.columns[-1] == "sites"
    raw = out.read_bytes()
    assert b"\r\n" in raw and not raw.startswith(b"\xef\xbb\xbf") and b"# safety" not in raw
    meta = json.loads((tmp_path / "x.csv-metadata.json").read_text(encoding="utf-8"))
    assert any("Carbon monoxide" in c for c in meta["safety"])


def test_csv_on_stdout_sends_the_cautions_to_stderr():
    code, out, err = cli(["isomers", "[RuCl2(CO)2(PPh3)2]", "--format", "csv"])
    assert code == 0 and "safety" not in out and "isosieve: safety: Carbon monoxide" in err


@pytest.mark.parametrize(
    ("args", "symbol", "typeset"),
    [
        (["[RuCl2(CO)2(PPh3)2]"], "$C_{2v}$", "$C_{2v}$"),
        (["[RuCl2(CO)2(PPh3)2]"], "[RuCl$_{2}$(CO)$_{2}$(PPh$_{3}$)$_{2}$]", "[RuCl$_{2}$(CO)$_{2}$(PPh$_{3}$)$_{2}$]"),
        # CO stretches of octahedral M(CO)6, Oh: A1g + Eg + T1u (Cotton, Chemical Applications of Group Theory)
        (["Ma6", "--reporter", "a=CO"], "$A_{1g}$", "$A_{1g}$ + $E_{g}$ + $T_{1u}$"),
        # CO stretches of a trigonal prism M(CO)6, D3h: A1' + E' + A2'' + E'' (common practice)
        (["Ma6", "-g", "TPR-6", "--reporter", "a=CO"], "$E''$", "$E''$"),
        # linear trans-M(CO)2, D-infinity-h: Sigma_g+ + Sigma_u+ (Cotton, Chemical Applications of Group Theory)
        (["Ma2", "-g", "L-2", "--reporter", "a=CO"], "$D_{\\infty h}$", "$D_{\\infty h}$"),
        (["Ma2", "-g", "L-2", "--reporter", "a=CO"], "$\\Sigma_{g}^{+}$", "$\\Sigma_{g}^{+}$ + $\\Sigma_{u}^{+}$"),
    ],
)
def test_latex_typesets_what_the_readme_says(args, symbol, typeset, text):
    code, out, err = cli(["isomers", *args, "--format", "latex"])
    assert code == 0, err
    assert symbol in text and typeset in out


def test_latex_preamble_and_layout(text):
    code, out, _ = cli(["isomers", "[RuCl2(CO)2(PPh3)2]", "--format", "latex"])
    preamble = "\\usepackage{booktabs,longtable,array,pdflscape}"
    assert code == 0 and out.splitlines()[0].endswith(preamble) and preamble in text
    assert out.count("\\begin{longtable}") == 2 and "\\caption{" in out and "\\toprule" in out
    assert "\\footnotesize\\textbf{Safety.}" in out


def test_markdown_point_groups_use_sub(text):
    code, out, _ = cli(["isomers", "[RuCl2(CO)2(PPh3)2]", "--format", "markdown"])
    assert code == 0 and "C<sub>2v</sub>" in out and "C<sub>2v</sub>" in text
    assert "```text" in out and "> **Safety.**" in out
