"""The files the bad-input table of DEVELOPERS.md ("Robustness") names, and a reader for that table.

:func:`make_fixtures` writes every rule folder, job file and batch file the
table's commands use into one folder (the tests run each command there);
:func:`table_rows` reads the table back as (command, expected stderr, exit
status).  A command is written as a shell would take it, with two additions
for text a table cannot hold: ``{X*N}`` stands for X repeated N times, and
``\\xHH`` / ``\\uHHHH`` for a character by its code point.  In the expected
line ``...`` matches any text (paths of the test's temporary folder, elided
parts of long messages).
"""

from __future__ import annotations

import math
import re
import shlex
from pathlib import Path

__all__ = ["make_fixtures", "table_rows", "expand", "matches", "BEGIN", "END"]

BEGIN = "<!-- bad-inputs: every row is run by tests/test_robustness.py -->"
END = "<!-- /bad-inputs -->"

_TBPY = "[[0, 0, 1], [1, 0, 0], [-0.5, 0.866, 0], [-0.5, -0.866, 0], [0, 0, -1]]"
_JOB = '[[complex]]\nformula = "Ma4b2"\n'


def _ring(n: int) -> str:
    return (
        "["
        + ", ".join(f"[{math.cos(2 * math.pi * k / n)!r}, {math.sin(2 * math.pi * k / n)!r}, 0]" for k in range(n))
        + "]"
    )


#: relative path -> text (str) or bytes
FILES: dict[str, str | bytes] = {
    "sides/geometries/x.toml": "symbol = 'XX-3'\nname = 'x'\nsites = [[0,0,1],[1,0,0],[0,1,0]]\nsides = 3\n",
    "syntax/geometries/y.toml": "symbol = \n",
    "zero/geometries/bad.toml": "symbol = 'Q-2'\nname = 'x'\nsites = [[0, 0, 1e-320], [1, 0, 0]]\n",
    "sp4/geometries/sp.toml": (
        "symbol = 'SP-4'\nname = 'tetrahedron'\nsites = [[1,1,1],[1,-1,-1],[-1,1,-1],[-1,-1,1]]\n"
    ),
    "twice/geometries/a.toml": f"symbol = 'XTB-5'\nname = 'typed'\nsites = {_TBPY}\n",
    "twice/geometries/b.toml": f"symbol = 'xtb-5'\nname = 'typed again'\nsites = {_TBPY}\n",
    "typed/geometries/tb.toml": f"symbol = 'XTB-5'\nname = 'typed bipyramid'\nsites = {_TBPY}\n",
    "near/geometries/d.toml": (
        "symbol = 'XO-6'\nname = 'tilted by 1 degree'\n"
        "sites = [[0, 0.017, 1], [1, 0, 0], [0, 1, 0], [-1, 0, 0], [0, -1, 0], [0, 0, -1]]\n"
    ),
    "many/geometries/p.toml": f"symbol = 'XP-25'\nname = 'ring'\nsites = {_ring(25)}\n",
    "deep/ligands.toml": "a = " + "[" * 5000 + "]" * 5000 + "\n",
    "latin1/reporters.toml": b'[class.CO]\nname = "caf\xe9"\n',
    "class5/reporters.toml": "class = 5\n",
    "smiles/ligands.toml": (
        '[[ligand]]\nname = "Zq"\nlabel = "ring"\nsmiles = "[CH2:1]1' + "C" * 500 + 'C1"\ndonors = ["C"]\n'
        "denticity = 1\ncharge = 0\nelectrons_covalent = 2\nelectrons_ionic = 2\n"
    ),
    "series/substitution/mine.toml": (
        'name = "mine"\ntitle = "x"\nsource = "x"\ngeometries = ["SP-4"]\nlabilises = "trans"\n'
        'series = ["CN", "Cl", "chlorido", "NH3"]\nties = "statistical"\npriority = 30\n'
    ),
    "afile": "",
    "self.toml": _JOB + '[[output]]\nformat = "json"\nfile = "self.toml"\n',
    "dot.toml": _JOB + '[[output]]\nformat = "json"\nfile = "."\n',
    "twice.toml": _JOB
    + '[[output]]\nformat = "json"\nfile = "x.json"\n[[output]]\nformat = "csv"\nfile = "./x.json"\n',
    "nul.toml": _JOB + '[[output]]\nformat = "json"\nfile = "a\\u0000b"\n',
    "label.toml": '[[complex]]\nformula = "Ma4b2"\nlabel = "x\\n\\\\input{/etc/passwd}"\n',
    "title.toml": 'title = "a\\u001bb"\n' + _JOB,
    "deep.toml": "a = " + "[" * 5000 + "]" * 5000 + "\n",
    "latin1.toml": b'title = "caf\xe9"\n' + _JOB.encode(),
    "latin1.txt": b"Ma4b2\n[Fe(CO)5]\xff\n",
    "screen.txt": "Ma4b2\n" + "".join(f"Ma{k + 25}\n" for k in range(30)),
    "labels.csv": "formula,label\nMa4b2,ok\nMa3b3,x\x1bq\nMa5b,fine\n",
    "controls.txt": "Ma4b2\n[Cr(CO)5\x1bCl]\nMa3\x0bb3\n",
}


def make_fixtures(folder: Path) -> Path:
    """Write every file of :data:`FILES` under ``folder``; returns ``folder``."""
    for rel, data in FILES.items():
        p = folder / rel
        p.parent.mkdir(parents=True, exist_ok=True)
        if isinstance(data, bytes):
            p.write_bytes(data)
        else:
            p.write_text(data, encoding="utf-8")
    return folder


def expand(arg: str) -> str:
    """``{X*N}`` repeated, ``\\xHH`` and ``\\uHHHH`` as characters."""
    arg = re.sub(r"\{(.+?)\*(\d+)\}", lambda m: m.group(1) * int(m.group(2)), arg)
    return re.sub(r"\\x([0-9a-fA-F]{2})|\\u([0-9a-fA-F]{4})", lambda m: chr(int(m.group(1) or m.group(2), 16)), arg)


def matches(expected: str, line: str) -> bool:
    """Whether ``line`` is ``expected`` with each ``...`` standing for any text."""
    pattern = ".*".join(re.escape(part) for part in expected.split("..."))
    return re.fullmatch(pattern, line) is not None


def _cells(row: str) -> list[str]:
    cells = re.split(r"(?<!\\)\|", row.strip().strip("|"))
    return [c.strip().replace("\\|", "|") for c in cells]


def table_rows(text: str) -> list[tuple[list[str], str, int]]:
    """(argv after 'isosieve', expected stderr line, exit status) for each row of the table in ``text``."""
    body = text[text.index(BEGIN) + len(BEGIN) : text.index(END)]
    rows = []
    for line in body.strip().splitlines():
        if not line.startswith("|") or set(line) <= set("|- "):
            continue
        cmd, err, code = _cells(line)
        if cmd == "command":
            continue
        cmd = cmd.strip("`")
        err = err.strip("`")
        argv = [expand(a) for a in shlex.split(cmd)]
        assert argv[0] == "isosieve", cmd
        rows.append((argv[1:], err, int(code)))
    return rows
