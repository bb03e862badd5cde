"""The house rules, checked on every run of the suite (and so in CI).

* **Layers**: import-linter's contracts in pyproject.toml (data flows forward;
  matplotlib only in the renderers; symmetry is pure mathematics).
* **Types**: mypy with ``check_untyped_defs`` reports no error.
* **Lint and format**: ruff with the rule set written down in pyproject.toml.
* **Complexity**: no function or method above cyclomatic complexity 25
  (radon's measure, McCabe 1976), so each stays readable in one sitting.

Each gate is the tool's own command line, run from the project root; a
failure prints the tool's report.
"""

from __future__ import annotations

import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
MAX_COMPLEXITY = 25


def _run(args: list[str]) -> subprocess.CompletedProcess[str]:
    return subprocess.run(args, cwd=ROOT, capture_output=True, text=True, timeout=600)


def _tool(name: str) -> str:
    exe = shutil.which(name) or str(Path(sys.executable).parent / name)
    if not Path(exe).exists():
        pytest.fail(f"{name} is not installed: install the test extras (pip install -e '.[test]')")
    return exe


def test_layer_contracts():
    r = _run([_tool("lint-imports")])
    assert r.returncode == 0, r.stdout + r.stderr


def test_types():
    r = _run([sys.executable, "-m", "mypy"])
    assert r.returncode == 0, r.stdout + r.stderr


def test_lint():
    r = _run([sys.executable, "-m", "ruff", "check", "enumerator", "tests"])
    assert r.returncode == 0, r.stdout + r.stderr


def test_format():
    r = _run([sys.executable, "-m", "ruff", "format", "--check", "enumerator", "tests"])
    assert r.returncode == 0, r.stdout + r.stderr


def _functions(blocks):
    """Every function, method and closure radon found (a class's own figure is a sum, not a function's)."""
    for block in blocks:
        if hasattr(block, "methods"):
            yield from _functions(block.methods)
            yield from _functions(getattr(block, "inner_classes", []))
        else:
            yield block
            yield from _functions(getattr(block, "closures", []))


def test_complexity():
    from radon.complexity import cc_visit

    too_complex = []
    for path in sorted((ROOT / "enumerator").rglob("*.py")):
        for block in _functions(cc_visit(path.read_text(encoding="utf-8"))):
            if block.complexity > MAX_COMPLEXITY:
                too_complex.append(f"{path.relative_to(ROOT)}:{block.lineno} {block.name} ({block.complexity})")
    assert not too_complex, "split these functions:\n" + "\n".join(too_complex)
