"""Huge requests and repeatability: byte-identical JSON, --limit, the size
guard, rule folders that cannot corrupt the defaults, and Ctrl-C.

The exit statuses checked here are the command line's (README, "Exit status
and errors"; common practice for command-line tools: 130 after SIGINT, 128 +
signal 2).
"""

from __future__ import annotations

import io
import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from enumerator.cli.isomers_cmd import PROGRESS_MIN, want_progress
from enumerator.errors import CapacityError, RuleError
from enumerator.isomers.counting import check_size
from enumerator.parse.abstract import parse_abstract
from enumerator.rules.ruleset import load_rules
from enumerator.workflow.pipeline import Request, run

CMD = [sys.executable, "-m", "enumerator"]


from _cli import cli  # noqa: E402  (tests/ is on sys.path under pytest)
from support.bad_inputs import make_fixtures, matches, table_rows  # noqa: E402

# --------------------------------------------------------------------------- determinism


@pytest.mark.parametrize("formula", ["M(AA)2b2", "Mabcdef", "M(AB)3"])
def test_json_is_byte_identical_across_runs_in_one_process(formula):
    a = cli(["isomers", formula, "--json"])
    b = cli(["isomers", formula, "--json"])
    assert a[0] == 0 and a[1] == b[1]


def test_json_is_byte_identical_across_processes_and_hash_seeds():
    # different PYTHONHASHSEED values change set/dict-of-str iteration order: output must not
    outs = []
    for seed in ("1", "2"):
        env = dict(os.environ, PYTHONHASHSEED=seed)
        p = subprocess.run(CMD + ["isomers", "M(AB)2b2", "--json"], capture_output=True, env=env, timeout=60)
        assert p.returncode == 0, p.stderr
        outs.append(p.stdout)
    assert outs[0] == outs[1]


# --------------------------------------------------------------------------- --limit and the size guard


def test_limit_lists_the_first_n_and_says_incomplete():
    code, out, _ = cli(["isomers", "Mabcdef", "--limit", "4", "--json"])
    doc = json.loads(out)
    assert code == 0 and len(doc["isomers"]) == 4 and doc["complete"] is False
    assert any("--limit" in n for n in doc["notes"])
    full = json.loads(cli(["isomers", "Mabcdef", "--json"])[1])
    # the first four of the full list, in the same order (stable ids)
    assert [i["id"] for i in doc["isomers"]] == [i["id"] for i in full["isomers"][:4]]
    assert (
        full["complete"] is True and full["stereoisomers"] == 30
    )  # Mabcdef: 30 stereoisomers (Miessler & Tarr; from memory)


def test_limit_above_the_count_is_complete():
    doc = json.loads(cli(["isomers", "Ma4b2", "--limit", "50", "--json"])[1])
    assert doc["complete"] is True and doc["stereoisomers"] == 2  # [Ma4b2] cis/trans (from memory)


def test_size_guard_refuses_huge_requests_without_limit():
    # 12!/60 = 7,983,360 stereoisomers of Mabcdefghijkl on IC-12 (Burnside's lemma by hand)
    code, out, err = cli(["isomers", "Mabcdefghijkl", "--geometry", "IC-12"])
    assert code == 2 and out == ""
    assert len(err.strip().splitlines()) == 1 and "7,983,360" in err and "--limit" in err
    code, out, _ = cli(["isomers", "Mabcdefghijkl", "--geometry", "IC-12", "--limit", "3", "--json"])
    assert code == 0 and len(json.loads(out)["isomers"]) == 3


def test_size_guard_and_progress_rules():
    ic = load_rules().geometry("IC-12")
    big = parse_abstract("Mabcdefghijkl")  # 12!/60 = 7,983,360 stereoisomers (Burnside's lemma by hand)
    with pytest.raises(CapacityError):
        check_size(big, ic)
    assert check_size(big, ic, limit=10) is None  # a limit lifts the guard
    with pytest.raises(CapacityError):
        check_size(parse_abstract("Ma6"), load_rules().geometry("OC-6"), cap=0)
    assert check_size(parse_abstract("Ma6"), load_rules().geometry("TPR-6")) is None  # small: decided by the bound

    class Tty(io.StringIO):
        def isatty(self):
            return True

    assert want_progress(PROGRESS_MIN + 1, Tty()) and not want_progress(PROGRESS_MIN + 1, io.StringIO())
    assert not want_progress(10, Tty()) and not want_progress(None, Tty())


def test_on_isomer_sees_every_isomer_in_order():
    seen = []
    res = run(Request(formula="M(AB)3"), on_isomer=seen.append)
    assert [i.id for i in seen] == [i.id for i in res.isomer_set.isomers]
    assert res.isomer_set.stereoisomers == 4  # fac/mer, each a Delta/Lambda pair (Housecroft & Sharpe; from memory)


# --------------------------------------------------------------------------- rule folders


def _folder(tmp_path: Path, name: str, files: dict[str, str]) -> Path:
    d = tmp_path / name
    for rel, text in files.items():
        p = d / rel
        p.parent.mkdir(parents=True, exist_ok=True)
        p.write_text(text, encoding="utf-8")
    return d


def _summary(res):
    return [(i.id, i.point_group, i.chiral) for i in res.isomer_set.isomers]


def test_broken_user_rules_never_corrupt_the_defaults(tmp_path):
    before = _summary(run(Request(formula="Ma3b3")))
    symbols = sorted(load_rules().geometries)
    # a broken file that even claims the built-in OC-6 symbol
    bad = _folder(
        tmp_path, "bad", {"geometries/OC-6.toml": "symbol = 'OC-6'\nname = 'broken'\nsites = [[0, 0, 1], 'x']\n"}
    )
    with pytest.raises(RuleError) as info:
        run(Request(formula="Ma3b3", rules=(str(bad),)))
    assert "OC-6.toml" in info.value.line() and "sites[1]" in info.value.line()
    assert _summary(run(Request(formula="Ma3b3"))) == before  # fac C3v, mer C2v (from memory)
    assert sorted(load_rules().geometries) == symbols
    # a valid user file replaces a built-in geometry for that run only
    good = _folder(
        tmp_path,
        "good",
        {
            "geometries/OC-6.toml": (
                "symbol = 'OC-6'\nname = 'user octahedron'\ndefault_for_abstract = true\n"
                "sites = [[0,0,1],[1,0,0],[0,1,0],[-1,0,0],[0,-1,0],[0,0,-1]]\n"
            )
        },
    )
    assert run(Request(formula="Ma3b3", rules=(str(good),))).geometry.name == "user octahedron"
    assert run(Request(formula="Ma3b3")).geometry.name == "octahedron"


def test_broken_user_rules_through_the_cli(tmp_path):
    bad = _folder(
        tmp_path,
        "bad",
        {"geometries/x.toml": "symbol = 'XX-3'\nname = 'x'\nsites = [[0,0,1],[1,0,0],[0,1,0]]\nsides = 3\n"},
    )
    code, _, err = cli(["--rules", str(bad), "isomers", "Ma6"])
    assert code == 2 and len(err.strip().splitlines()) == 1
    assert "x.toml" in err and "unknown key 'sides'" in err
    code, out, _ = cli(["isomers", "Ma6", "--json"])
    assert code == 0 and json.loads(out)["geometry"] == "OC-6"
    code, _, err = cli(["--rules", str(tmp_path / "missing"), "isomers", "Ma6"])
    assert code == 2 and "does not exist" in err


# --------------------------------------------------------------------------- Ctrl-C

LONG = ["isomers", "Ma2b2c2d2e2f2", "--geometry", "IC-12", "--json"]  # 124,920 stereoisomers: tens of seconds


# The analysis stages run on the isomers found before the interruption; their
# cost (the pair table is quadratic in the isomer count) is not what is under
# test here, so the child runs the command with no stages.
# The child touches the file named by ISOSIEVE_TEST_READY once it is about to run the command, so that on a
# loaded machine the interrupt never lands while Python is still importing (that would end it by the signal).
NO_STAGES = [
    sys.executable,
    "-c",
    "import os, sys, enumerator.workflow.pipeline as p; p.STAGES = (); from enumerator.cli import main; "
    "import enumerator.cli.isomers_cmd; open(os.environ['ISOSIEVE_TEST_READY'], 'w').close(); main(sys.argv[1:])",
]


def _interrupt(args, wait: float = 2.0):
    ready = Path(os.environ.get("TMPDIR", "/tmp")) / f"isosieve-ready-{os.getpid()}-{time.monotonic_ns()}"
    p = subprocess.Popen(
        NO_STAGES + args,
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        env=dict(os.environ, ISOSIEVE_TEST_READY=str(ready)),
        preexec_fn=lambda: signal.signal(signal.SIGINT, signal.SIG_DFL),
    )
    deadline = time.monotonic() + 120
    while not ready.exists() and p.poll() is None and time.monotonic() < deadline:
        time.sleep(0.05)
    ready.unlink(missing_ok=True)
    time.sleep(wait)
    assert p.poll() is None, "the enumeration finished before it could be interrupted"
    p.send_signal(signal.SIGINT)
    try:
        out, err = p.communicate(timeout=120)
    except subprocess.TimeoutExpired:
        p.kill()
        p.communicate()
        raise
    return p.returncode, out, err.decode()


@pytest.mark.skipif(sys.platform == "win32", reason="SIGINT delivery by signal is POSIX")
def test_ctrl_c_exits_130_with_one_line_and_writes_nothing(tmp_path):
    target = tmp_path / "out.json"
    code, out, err = _interrupt(LONG + ["--out", str(target)])
    assert code == 130 and out == b""
    assert len(err.strip().splitlines()) == 1 and "interrupted" in err and "Traceback" not in err
    assert not target.exists() and not list(tmp_path.iterdir())  # no half-written or temporary file


@pytest.mark.skipif(sys.platform == "win32", reason="SIGINT delivery by signal is POSIX")
def test_ctrl_c_with_partial_writes_what_was_found(tmp_path):
    target = tmp_path / "out.json"
    code, out, err = _interrupt(LONG + ["--partial", "--out", str(target)])
    assert code == 130 and len(err.strip().splitlines()) == 1 and "interrupted" in err
    doc = json.loads(target.read_text(encoding="utf-8"))
    assert doc["complete"] is False and 0 < doc["stereoisomers"] < 124920
    assert len(doc["isomers"]) == doc["stereoisomers"]
    assert any("interrupted" in n for n in doc["notes"])


# --------------------------------------------------------------------------- the bad-input table


DEVELOPERS = Path(__file__).resolve().parent.parent / "DEVELOPERS.md"
_ROWS = table_rows(DEVELOPERS.read_text(encoding="utf-8"))


@pytest.fixture(scope="module")
def fixtures(tmp_path_factory):
    return make_fixtures(tmp_path_factory.mktemp("bad-inputs"))


def test_the_table_has_its_rows():
    # every class of the robustness section has rows; a table cut short by an edit would pass silently otherwise
    assert len(_ROWS) >= 60
    assert {code for _a, _e, code in _ROWS} == {2}


@pytest.mark.parametrize(("args", "expected", "status"), _ROWS, ids=[" ".join(r[0])[:60] for r in _ROWS])
def test_bad_input_table(fixtures, monkeypatch, args, expected, status):
    # DEVELOPERS.md, "Robustness": each row is the one line and the status the command gives (common practice
    # for command-line tools: 2 for a usage or input error, one line on stderr)
    monkeypatch.chdir(fixtures)
    code, _out, err = cli(args)
    lines = err.strip().splitlines()
    assert code == status, (args, code, err)
    assert len(lines) == 1, (args, err)
    assert matches(expected, lines[0]), (args, lines[0])
