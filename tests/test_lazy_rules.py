"""Start-up does only the work a command needs, and a user's rule files are still checked in full at load.

The built-in geometries' symmetry operations are derived on first use and the built-in catalogue's
SMILES are not parsed at load; these tests hold what load time no longer checks for the built-in files
(every geometry derives its group, every SMILES agrees with its entry), and that a user's file still
fails at once.  The element symbols are checked against RDKit's periodic table (reference library).
"""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

from enumerator.errors import RuleError
from enumerator.model.elements import SYMBOLS
from enumerator.rules.ligands import check_smiles, load_ligands
from enumerator.rules.ruleset import load_rules

ROOT = Path(__file__).resolve().parent.parent


def test_element_symbols_are_rdkits():
    from rdkit import Chem

    pt = Chem.GetPeriodicTable()
    assert tuple(pt.GetElementSymbol(z) for z in range(1, 119)) == SYMBOLS


def test_every_builtin_smiles_agrees_with_its_entry():
    entries = load_ligands(load_rules())
    assert len(entries) > 100
    for name, e in entries.items():
        check_smiles(e, f"built-in ligand {name}")  # raises RuleError on a mismatch


def test_every_builtin_geometry_derives_its_group():
    for sym, g in load_rules().geometries.items():
        if g.linear:
            assert g.point_group == "Dinfh"
            continue
        ops = g.operations
        assert ops and ops[0].perm == tuple(range(g.coordination_number)), sym
        assert g.point_group


def test_a_users_bad_smiles_fails_at_load(tmp_path):
    (tmp_path / "ligands.toml").write_text(
        '[[ligand]]\nname = "Xq"\nlabel = "Xq"\nsmiles = "[Cl-:1"\ndonors = ["Cl"]\ndenticity = 1\n'
        "charge = -1\nelectrons_covalent = 1\nelectrons_ionic = 2\n"
    )
    with pytest.raises(RuleError, match="SMILES"):
        load_ligands(load_rules([tmp_path]))


def test_a_users_degenerate_geometry_fails_at_load(tmp_path):
    d = tmp_path / "geometries"
    d.mkdir()
    (d / "XX-3.toml").write_text('symbol = "XX-3"\nname = "x"\nsites = [[1,0,0],[0,1,0],[0,1,0.0000001]]\n')
    with pytest.raises(RuleError, match="XX-3.toml"):
        _ = load_rules([tmp_path]).geometries


@pytest.mark.parametrize("args", [["isomers", "Ma6"], ["count", "Ma4b2"]])
def test_an_abstract_formula_imports_no_rdkit(args):
    # a real formula needs RDKit for the CIP priorities of its ligands; an abstract one never does
    trace = subprocess.run(
        [sys.executable, "-X", "importtime", "-m", "enumerator", *args],
        capture_output=True,
        text=True,
        check=True,
        cwd=ROOT,
    ).stderr
    loaded = {line.rsplit("|", 1)[1].strip().split(".")[0] for line in trace.splitlines() if "|" in line}
    assert "rdkit" not in loaded


def test_builtin_entries_sharing_a_spelling_are_one_molecule():
    from enumerator.rules.ligands import _hill_formula, split_hapto

    entries = load_ligands(load_rules())
    by_spelling: dict[str, set[str]] = {}
    for e in entries.values():
        for s in (e.name, *e.aliases):
            by_spelling.setdefault(s[split_hapto(s)[1] :], set()).add(e.name)
    shared = {k: v for k, v in by_spelling.items() if len(v) > 1}
    assert shared  # the eta-ring entries share spellings (e.g. Cp at several hapticities)
    for spelling, names in shared.items():
        assert len({_hill_formula(entries[n].smiles) for n in names}) == 1, spelling


def test_group_tables_by_permutations_equal_those_by_matrices():
    # a geometry whose sites span space: composing site permutations gives the same table as
    # multiplying the matrices (a linear map is fixed by the images of a spanning set; common practice)
    import numpy as np

    from enumerator.symmetry.dixon import multiplication_table

    checked = 0
    for g in load_rules().geometries.values():
        if g.linear or np.linalg.matrix_rank(np.array(g.vectors)) < 3:
            continue
        mats = [op.array for op in g.operations]
        by_perm = multiplication_table(mats, [op.perm for op in g.operations])
        by_matrix = multiplication_table(mats)
        assert all(np.array_equal(x, y) for x, y in zip(by_perm[:2], by_matrix[:2])), g.symbol
        assert by_perm[2] == by_matrix[2]
        checked += 1
    assert checked >= 15


@pytest.mark.parametrize(
    "formula, options",
    [
        ("Ma6", {}),
        ("Ma2b2c2", {}),
        ("Ma3b3", {"reporters": (("a", "CO"),)}),
        ("M(AA)2b2", {}),
        ("[RuCl2(CO)2(PPh3)2]", {}),
        ("[Fe(CN)5(NO)]2-", {}),
        ("[Co(NH3)3(NO2)3]", {}),
        ("Ma4b", {"geometry": "TBPY-5", "reporters": (("a", "CO"),)}),
    ],
)
def test_the_terminal_table_without_pandas_reads_as_the_dataframe_does(formula, options):
    # the text table skips pandas where the DataFrame hands the values back unchanged (start-up)
    from enumerator.render.text import _plain_rows
    from enumerator.workflow.pipeline import analyse

    res = analyse(formula, **options)
    for wide in (False, True):
        plain = _plain_rows(res, wide)
        df = res.to_dataframe(wide)
        cols = [c for c in df.columns if c not in ("formula", "geometry")]
        rows = [["-" if v in ("", None) else str(v) for v in r] for r in df[cols].itertuples(index=False, name=None)]
        assert plain is None or plain == (cols, rows)
