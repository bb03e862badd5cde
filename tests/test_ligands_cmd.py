"""The ligand catalogue view: one result object, drawn as a table, CSV or JSON."""

from __future__ import annotations

import json

from _cli import cli

from enumerator.render.ligands import HEADER, render_ligands
from enumerator.workflow.queries import ligand_catalogue


def test_catalogue_view_and_one_entry():
    cat = ligand_catalogue()
    assert cat.name is None and len(cat.entries) > 100  # the built-in catalogue holds over 200 entries
    assert [e.denticity for e in cat.entries] == sorted(e.denticity for e in cat.entries)
    one = ligand_catalogue(name="carbonyl")  # an alias
    assert one.to_dict()["name"] == "CO" and isinstance(cat.to_dict(), list)
    assert render_ligands(cat, "csv").splitlines()[0].split(",") == list(HEADER)


def test_command_prints_what_the_library_renders():
    code, out, _ = cli(["ligands", "PPh3", "--json"])
    assert code == 0 and json.loads(out) == ligand_catalogue(name="PPh3").to_dict()
    code, out, _ = cli(["ligands", "Cp"])
    assert code == 0 and out == render_ligands(ligand_catalogue(name="Cp"), "table")
    code, _, err = cli(["ligands", "PPh4"])
    assert code == 2 and "did you mean PPh3" in err and err.count("\n") == 1
