"""Caches never answer for a different value.

A user's ``ligands.toml`` may redefine a built-in ligand under the same name
(other SMILES, other charge); a user file may be edited between two calls of
one process.  Every answer given in one long process must equal the answer a
fresh process gives for the same rules: the fresh process is the check value
(it has nothing cached).
"""

from __future__ import annotations

import ast
import json
import pathlib
import subprocess
import sys

import numpy as np
import pytest

from enumerator import caches
from enumerator.isomers.enumeration import group_tables
from enumerator.model.composition import LigandKind
from enumerator.rules.ligands import load_ligands
from enumerator.rules.ruleset import load_rules

ROOT = pathlib.Path(__file__).resolve().parent.parent

# PMe3 redefined as P(CF3)3: other substituents, so other CIP priorities (the descriptor changes) and no
# IUPAC name; NH3 redefined as amide NH2-: other charge, so another oxidation state and electron count.
USER_LIGANDS = """
[[ligand]]
name = "PMe3"
label = "tris(trifluoromethyl)phosphine, under a built-in name"
smiles = "FC(F)(F)[P:1](C(F)(F)F)C(F)(F)F"
donors = ["P"]
denticity = 1
charge = 0
electrons_covalent = 2
electrons_ionic = 2

[[ligand]]
name = "NH3"
label = "amide, under a built-in name"
smiles = "[NH2-:1]"
donors = ["N"]
denticity = 1
charge = -1
electrons_covalent = 1
electrons_ionic = 2
"""

# CO redefined as 13CO: a heavier oscillator, so lower predicted wavenumbers.
USER_CARBONYL = """
[[ligand]]
name = "CO"
label = "carbonyl, carbon-13, under the built-in name"
smiles = "[13C-:1]#[O+]"
donors = ["C"]
denticity = 1
charge = 0
electrons_covalent = 2
electrons_ionic = 2
reporter = "CO"
"""

#: What is compared: every answer of the analysis, and the predicted bands of a carbonyl.
ANSWERS = """
import json, sys
from enumerator.workflow.bands import predict_spectra
from enumerator.workflow.pipeline import Request, run

def answers(rules):
    doc = run(Request("[PtCl(PPh3)(PMe3)(NH3)]+", rules=rules)).to_dict()
    bands = predict_spectra(Request("[Mo(CO)5(PPh3)]", rules=rules)).to_dict()
    return {
        "descriptors": [i["descriptor"] for i in doc["isomers"]],
        "point_groups": [i["point_group"] for i in doc["isomers"]],
        "names": [i.get("name") for i in doc["isomers"]],
        "centre": doc["centre"],
        "analysis": doc,
        "bands": bands,
    }
"""


def _answers_here(rules: tuple[str, ...]) -> dict:
    space: dict = {}
    exec(ANSWERS, space)  # the same code as the fresh process runs
    return json.loads(json.dumps(space["answers"](rules)))


def _answers_fresh(rules: tuple[str, ...]) -> dict:
    code = ANSWERS + f"\nprint(json.dumps(answers({rules!r})))\n"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True, cwd=ROOT)
    return json.loads(out.stdout)


def _same(got: dict, want: dict) -> None:
    for key in ("descriptors", "point_groups", "names", "centre", "bands", "analysis"):
        assert got[key] == want[key], key


def test_built_in_then_user_then_built_in_rules_match_fresh_processes(tmp_path):
    (tmp_path / "ligands.toml").write_text(USER_LIGANDS + USER_CARBONYL, encoding="utf-8")
    user = (str(tmp_path),)
    first = _answers_here(())
    mine = _answers_here(user)
    again = _answers_here(())
    fresh_builtin, fresh_user = _answers_fresh(()), _answers_fresh(user)
    _same(first, fresh_builtin)
    _same(mine, fresh_user)
    _same(again, fresh_builtin)
    # the user's definitions do change the answers, so the comparison above can fail
    assert mine["descriptors"] != first["descriptors"]
    assert mine["centre"]["oxidation_state"] != first["centre"]["oxidation_state"]
    assert mine["bands"] != first["bands"]


def test_an_edited_user_file_is_read_again(tmp_path):
    path = tmp_path / "ligands.toml"
    path.write_text(USER_CARBONYL, encoding="utf-8")
    user = (str(tmp_path),)
    before, fresh_before = _answers_here(user), _answers_fresh(user)
    path.write_text(USER_LIGANDS, encoding="utf-8")  # another size, so another stamp whatever the clock
    after, fresh_after = _answers_here(user), _answers_fresh(user)
    _same(before, fresh_before)
    _same(after, fresh_after)
    assert before["descriptors"] != after["descriptors"]


def test_catalogue_data_is_part_of_a_ligand_kinds_value():
    built_in = load_ligands(load_rules())["PMe3"].kind()
    other = LigandKind("PMe3", ("P",), meta=(("smiles", "FC(F)(F)[P:1](C(F)(F)F)C(F)(F)F"),))
    assert built_in != other
    assert len({built_in, other}) == 2


def test_cached_answers_cannot_be_changed_by_a_caller(rules):
    tab = group_tables(rules.geometry("OC-6"))
    with pytest.raises(ValueError):
        tab.perms[0, 0] = 5
    with pytest.raises(ValueError):
        rules.geometry("OC-6").angles[0, 1] = 0.0
    with pytest.raises(TypeError):
        rules.geometries["XX-1"] = rules.geometry("OC-6")  # type: ignore[index]
    with pytest.raises(TypeError):
        load_ligands(rules)["CO"] = load_ligands(rules)["CN"]  # type: ignore[index]
    assert isinstance(np.asarray(tab.mult), np.ndarray) and not tab.mult.flags.writeable


def test_clear_empties_every_registered_cache(rules):
    from enumerator.workflow.pipeline import analyse

    analyse("[RuCl2(CO)2(PPh3)2]")
    assert any(c.cache_info().currsize for c in caches.registered())
    caches.clear()
    assert not any(c.cache_info().currsize for c in caches.registered())
    assert analyse("Ma4b2").isomer_set.geometric_isomers == 2  # answers come back after clearing


def _decorators(tree: ast.AST) -> list[str]:
    out = []
    for node in ast.walk(tree):
        if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)):
            out.extend(ast.unparse(d) for d in node.decorator_list)
    return out


FUNCTOOLS_CACHES = {"lru_cache", "cache", "functools.lru_cache", "functools.cache"}


def test_every_memo_cache_of_the_package_is_registered():
    # functools caches that bypass enumerator.caches would escape caches.clear()
    for path in sorted((ROOT / "enumerator").rglob("*.py")):
        if path.name == "caches.py":
            continue
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for d in _decorators(tree):
            assert d.split("(")[0] not in FUNCTOOLS_CACHES, f"{path}: @{d}"
