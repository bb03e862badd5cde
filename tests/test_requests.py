"""Request options: one declared table checks them in the Python API, job files and the command line;
the one-call API at the package root."""

from __future__ import annotations

import json
import subprocess
import sys
import time
from dataclasses import fields

import pytest
from _cli import cli

import enumerator
from enumerator.errors import InputError
from enumerator.parse.job import parse_job
from enumerator.parse.request import OPTIONS, Request, make_request
from enumerator.workflow.job import run_job
from enumerator.workflow.pipeline import run


def test_every_request_field_is_a_declared_option():
    declared = {o.name for o in OPTIONS}
    assert {f.name for f in fields(Request)} - {"formula"} == declared
    for o in OPTIONS:
        assert o.doc and o.kind and o.where in ("entry", "options", "caller")


@pytest.mark.parametrize(
    "options, words",
    [
        ({"pik": "cis"}, "unknown option 'pik'; did you mean 'pick'?"),
        ({"geometri": "OC-6"}, "did you mean 'geometry'?"),
        ({"reporter": {"a": "CO"}}, "did you mean 'reporters'?"),
        ({"limit": 0}, "'limit' must be a positive integer"),
        ({"limit": True}, "'limit' must be a positive integer"),
        ({"spans": {"AA": "across"}}, "span 'across' is not one of edge, cis, trans, any"),
        ({"arrangements": {"AAA": "fac,bent"}}, "arrangement 'bent' is not fac or mer"),
        ({"reporters": "a=CO"}, "'reporters' must be a table of strings"),
        ({"rules": "my_rules"}, "'rules' must be a list of folder names"),
        ({"pick": ""}, "'pick' must be a non-empty string"),
    ],
)
def test_the_api_refuses_what_the_table_does_not_allow(options, words):
    with pytest.raises(InputError) as exc:
        enumerator.analyse("M(AA)b4", **options)
    assert words in exc.value.line()


def test_mappings_and_pairs_give_the_same_request():
    a = make_request("Ma4b2", reporters={"a": "CO"}, spans=None)
    b = make_request("Ma4b2", reporters=(("a", "CO"),))
    assert a == b == Request("Ma4b2", reporters=(("a", "CO"),))
    assert hash(a) == hash(b)


def test_analyse_takes_the_command_options():
    # cis/trans-M(CO)4L2: four IR-active CO stretches for cis (C2v), one for trans (D4h)
    # (Cotton, Chemical Applications of Group Theory, 3rd ed., ch. 10; from memory)
    r = enumerator.analyse("Ma4b2", geometry="OC-6", reporters={"a": "CO"})
    doc = r.to_dict()
    assert [(i["point_group"], i["modes"]["CO"]["ir"]) for i in doc["isomers"]] == [("C2v", 4), ("D4h", 1)]


def test_pick_cuts_the_isomers_in_the_api_and_in_job_files():
    # fac- and mer-[Co(NH3)3(NO2)3] (common practice)
    api = enumerator.analyse("[Co(NH3)3(NO2)3]", pick="mer")
    job = parse_job({"complex": [{"formula": "[Co(NH3)3(NO2)3]", "options": {"pick": "mer"}}]}, "job.toml")
    via_job = run_job(job).complexes[0].result
    assert [i.point_group for i in api.isomers] == [i.point_group for i in via_job.isomers] == ["C2v"]
    assert api.notes[-1] == "--pick mer: 1 of 2 stereoisomer(s) shown"
    code, out, _ = cli(["isomers", "[Co(NH3)3(NO2)3]", "--pick", "mer", "--json"])
    assert code == 0 and json.loads(out) == api.to_dict()


def test_iter_isomers_is_lazy():
    # 7,983,360 stereoisomers of Mabcdefghijkl on IC-12 (Burnside count, isosieve count): the first comes at once
    start = time.perf_counter()
    it = enumerator.iter_isomers("Mabcdefghijkl", geometry="IC-12")
    first = next(it)
    assert first.point_group == "C1" and time.perf_counter() - start < 20
    assert [i.id for i in enumerator.iter_isomers("Ma4b2", limit=1)] == ["1"]


def test_iter_isomers_with_pick_and_nothing_matching():
    # Ma2b2c2: one chiral pair among the five geometric isomers (common practice)
    assert [i.id for i in enumerator.iter_isomers("Ma2b2c2", pick="OC-6-32")] == ["1a", "1b"]
    with pytest.raises(InputError, match="descriptors present"):
        list(enumerator.iter_isomers("Ma2b2c2", pick="OC-6-99"))
    with pytest.raises(InputError, match="did you mean 'limit'"):
        next(enumerator.iter_isomers("Ma2b2c2", limt=3))


def test_run_and_the_api_agree():
    req = Request("M(AA)2b2", reporters=(("b", "CO"),))
    assert run(req).to_dict() == enumerator.analyse("M(AA)2b2", reporters={"b": "CO"}).to_dict()


def test_root_names_load_lazily():
    code = (
        "import sys, enumerator; "
        "assert not {'numpy', 'rdkit', 'matplotlib'} & set(sys.modules), sorted(sys.modules); "
        "from enumerator import analyse, iter_isomers, load_rules, parse_abstract, enumerate_isomers, generate, "
        "Isomer, IsomerSet, Request, Result, IsosieveError, InputError, RuleError, CapacityError"
    )
    p = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    assert p.returncode == 0, p.stderr
    assert set(enumerator.__all__) <= set(dir(enumerator))
