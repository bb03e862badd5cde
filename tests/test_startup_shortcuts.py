"""Answers a small command now gives without RDKit or the CIP digraph equal the full computation.

Reference: the full hierarchical-digraph ranking of :mod:`enumerator.analyses.cip`
(CIP rules, Prelog & Helmchen 1982, through RDKit's reading of each SMILES),
which the existing CIP tests hold against IUPAC 2005 IR-9.3.5 examples; here
every shortcut answer is compared with it over the built-in catalogue.
"""

from __future__ import annotations

import itertools

import pytest

from enumerator.analyses.cip import _digraph_priorities, by_donor_element, donor_priorities
from enumerator.model.composition import Composition, LigandKind
from enumerator.parse.formula import parse_formula
from enumerator.rules.ligands import load_ligands
from enumerator.rules.ruleset import load_rules


def _kinds() -> list[LigandKind]:
    return [e.kind() for _, e in sorted(load_ligands(load_rules()).items())]


def test_first_sphere_shortcut_equals_the_digraph_over_catalogue_pairs():
    # every pair and a sample of triples of built-in ligands whose ligating atoms' elements differ
    kinds = _kinds()
    checked = 0
    combos = list(itertools.combinations(kinds, 2)) + list(itertools.combinations(kinds[::7], 3))
    for combo in combos:
        comp = Composition("test", tuple((k, 1) for k in combo), "Pt")
        quick = by_donor_element(comp)
        if quick is None:
            continue
        assert quick == _digraph_priorities(comp), [k.name for k in combo]
        checked += 1
    assert checked > 1000


@pytest.mark.parametrize(
    ("formula", "uses_shortcut"),
    [
        ("[RuCl2(CO)2(PPh3)2]", True),  # Cl > P > C, first sphere (IUPAC 2005 IR-9.3.5: rule 1a)
        ("[Mo(CO)3(PPh3)3]", True),
        ("[PtCl2(NH3)2]", True),
        ("[Co(en)2Cl2]+", False),  # two N of each en: the digraph decides
        ("[Cr(CO)5(13CO)]", False),  # two C donors: mass (rule 2) decides
    ],
)
def test_shortcut_taken_only_where_the_first_sphere_decides(formula, uses_shortcut):
    comp = parse_formula(formula, load_rules())
    assert (by_donor_element(comp) is not None) is uses_shortcut
    assert donor_priorities(comp) == dict(_digraph_priorities(comp))


def test_shortcut_refuses_a_smiles_whose_mapped_atom_is_not_the_donor():
    kind = LigandKind("x", ("N",), meta=(("smiles", "[Cl-:1]"),))
    other = LigandKind("y", ("P",), meta=(("smiles", "[PH3:1]"),))
    assert by_donor_element(Composition("t", ((kind, 1), (other, 1)), "Pt")) is None


def test_shortcut_keeps_the_missing_smiles_error():
    from enumerator.errors import InputError

    bare = LigandKind("x", ("N",), meta=(("charge", 0),))
    cl = LigandKind("Cl", ("Cl",), meta=(("smiles", "[Cl-:1]"),))
    with pytest.raises(InputError, match="no SMILES"):
        donor_priorities(Composition("t", ((bare, 1), (cl, 1)), "Pt"))


# --------------------------------------------------------------------------
# masses and the kept SMILES graphs, against RDKit (the reference library)


def test_builtin_mass_table_is_what_its_writer_gives_from_rdkit():
    """rules/isotopes.toml is written from RDKit's periodic table (reference library), not typed:
    ``python -m enumerator.rules.masses`` gives the same element tables (the header names the RDKit version)."""
    from enumerator.rules.masses import TABLE_NAME, build_table
    from enumerator.rules.ruleset import BUILTIN_RULES

    def body(text: str) -> str:
        return text[text.index("\n[element.") :]

    assert body((BUILTIN_RULES / TABLE_NAME).read_text(encoding="utf-8")) == body(build_table())


def test_every_mass_in_the_builtin_table_is_rdkits():
    from rdkit import Chem

    from enumerator.rules.masses import table

    pt = Chem.GetPeriodicTable()
    rows = table()
    assert len(rows) == 118
    for symbol, (weight, common, common_mass, isotopes) in rows.items():
        z = pt.GetAtomicNumber(symbol)
        assert weight == pt.GetAtomicWeight(z), symbol
        assert common == pt.GetMostCommonIsotope(z), symbol
        assert common_mass == pt.GetMostCommonIsotopeMass(z), symbol
        for a, m in isotopes.items():
            assert m == pt.GetMassForIsotope(z, a), (symbol, a)


@pytest.mark.parametrize(("symbol", "isotope"), [("C", 0), ("C", 13), ("O", 18), ("N", 15), ("H", 2), ("Tc", 99)])
def test_mass_of_is_what_the_rdkit_path_gives(symbol, isotope):
    from enumerator.model.elements import isotope_mass
    from enumerator.rules.masses import mass_of

    assert mass_of(symbol, isotope) == isotope_mass(symbol, isotope)


def _rdkit_graph(smiles: str):
    from rdkit import Chem

    mol = Chem.MolFromSmiles(smiles, sanitize=False)
    atoms = [(a.GetSymbol(), a.GetIsotope(), a.GetAtomMapNum(), a.GetIsAromatic()) for a in mol.GetAtoms()]
    bonds = sorted(
        (
            min(b.GetBeginAtomIdx(), b.GetEndAtomIdx()),
            max(b.GetBeginAtomIdx(), b.GetEndAtomIdx()),
            b.GetBondTypeAsDouble(),
        )
        for b in mol.GetBonds()
    )
    return atoms, bonds


def _graph(smiles: str):
    from enumerator.rules.parsed import smiles_graph

    g = smiles_graph(smiles)
    if g is None:
        return None
    atoms = [(a.symbol, a.isotope, a.map_number, a.aromatic) for a in g.atoms]
    return atoms, sorted((min(a, b), max(a, b), o) for a, b, o in g.bonds)


def test_kept_graphs_cover_every_builtin_smiles_and_equal_rdkits():
    """The graphs written with the twin are RDKit's reading (reference library), for every catalogue SMILES."""
    import json

    from enumerator.rules.parsed import GRAPHS_NAME, build_graphs
    from enumerator.rules.ruleset import BUILTIN_RULES

    kept = json.loads((BUILTIN_RULES / GRAPHS_NAME).read_text(encoding="utf-8"))
    assert (BUILTIN_RULES / GRAPHS_NAME).read_text(encoding="utf-8") == build_graphs(BUILTIN_RULES), (
        "rewrite it: python -m enumerator.rules.parsed"
    )
    for name, e in load_ligands(load_rules()).items():
        assert e.smiles in kept, (name, e.smiles)
        assert _graph(e.smiles) == _rdkit_graph(e.smiles), (name, e.smiles)


@pytest.mark.parametrize("smiles", ["c1ccccc1", "C%12CC%12", "[2H]C([2H])([2H])[C:1]#[N:2]", "[Cl-].[Na+]"])
def test_a_smiles_not_kept_is_read_by_rdkit(smiles):
    assert _graph(smiles) == _rdkit_graph(smiles)


@pytest.mark.parametrize("smiles", ["C1CC", "C((C)", "[Xx]", ""])
def test_a_smiles_rdkit_cannot_read_has_no_graph(smiles):
    from enumerator.rules.parsed import smiles_graph

    assert smiles_graph(smiles) is None


def test_oscillator_masses_without_rdkit_equal_rdkits_for_every_catalogue_donor():
    from enumerator.rules.parsed import smiles_graph
    from enumerator.vibrations.model import _graph_oscillator, _rdkit_oscillator

    for name, e in load_ligands(load_rules()).items():
        graph = smiles_graph(e.smiles)
        for k in range(1, e.bound_atoms + 1):
            assert _graph_oscillator(graph, k) == _rdkit_oscillator(e.smiles, k), (name, k)


def test_distinct_element_counts_imply_distinct_molecules_over_catalogue_pairs():
    from enumerator.vibrations.model import _distinct_molecules, _isotope_free

    smiles = sorted({e.smiles for e in load_ligands(load_rules()).values()})
    told = 0
    for a, b in itertools.combinations(smiles, 2):
        if _distinct_molecules([a, b]):
            assert _isotope_free(a) != _isotope_free(b), (a, b)
            told += 1
    assert told > 1000
    # isotopologues share their element counts, so they go to RDKit's canonical SMILES
    assert not _distinct_molecules(["[C-:1]#[O+]", "[13C-:1]#[O+]"])


# --------------------------------------------------------------------------
# group tables and operation descriptions


def test_multiplication_table_from_permutations_equals_matrix_products():
    # reference: the product of the operation matrices (the definition of the group's multiplication)
    import numpy as np

    from enumerator.isomers.enumeration import _mult_by_matrices, _mult_by_perms, group_tables
    from enumerator.model.geometry import derive_operations

    faithful = 0
    for sym, geo in load_rules().geometries.items():
        ops = derive_operations(geo.vectors)
        slow = _mult_by_matrices(ops)
        assert (group_tables(geo).mult == slow).all(), sym
        if len({op.perm for op in ops}) == len(ops):
            assert (_mult_by_perms(np.array([op.perm for op in ops], dtype=np.int32)) == slow).all(), sym
            faithful += 1
    assert faithful >= 10


def test_describe_is_the_same_for_an_equal_matrix_however_it_is_given():
    import numpy as np

    from enumerator.symmetry.operations import describe

    c4 = [[0.0, -1.0, 0.0], [1.0, 0.0, 0.0], [0.0, 0.0, 1.0]]  # C4 about z, common practice
    assert describe(c4) == describe(np.array(c4)) == describe(np.asfortranarray(c4))
    assert (describe(c4).kind, describe(c4).order, describe(c4).power) == ("C", 4, 1)


#: What each small command must not import: the heavy libraries (RDKit, the TOML parser, hashlib) and
#: every part of the package it does not use (the band fit, the route planner, the structures and the
#: report), and modules only an error, another output or a type checker needs (difflib: the nearest
#: names of a misspelling; csv: CSV output; numpy.typing: annotations).  Common practice: import what
#: the command runs, nothing else.
_NOT_FOR_ANY = {
    "rdkit",
    "tomllib",
    "hashlib",
    "difflib",
    "csv",
    "numpy.typing",
    "matplotlib",
    "pandas",
    "scipy",
    "networkx",
    "enumerator.structures",
    "enumerator.workflow.report",
    "enumerator.workflow.job",
    "enumerator.render.report",
}
_SMALL_COMMANDS = {
    "isomers Ma6": (["isomers", "Ma6"], {"enumerator.vibrations", "enumerator.routes", "enumerator.workflow.bands"}),
    "isomers Ru": (
        ["isomers", "[RuCl2(CO)2(PPh3)2]"],
        {"enumerator.vibrations.fitting", "enumerator.routes", "enumerator.workflow.bands"},
    ),
    "bands": (["bands", "[Cr(CO)6]"], {"enumerator.vibrations.fitting", "enumerator.routes"}),
    "match": (["match", "[Mo(CO)3(PPh3)3]", "--bands", "1950,1860,1840"], {"enumerator.routes"}),
    "route": (
        ["route", "[PtCl4]2-", "--target", "cis-[PtCl2(NH3)2]"],
        {"enumerator.vibrations", "enumerator.workflow.bands", "enumerator.workflow.pipeline"},
    ),
}


@pytest.mark.parametrize("name", list(_SMALL_COMMANDS))
def test_small_commands_import_only_what_they_use(name, tmp_path):
    """Per command: none of its forbidden modules (or their submodules) is imported, and with the kept
    dataclass code written once (:mod:`enumerator.frozen`) no dataclass method is compiled afresh."""
    import os
    import subprocess
    import sys
    from pathlib import Path

    args, not_here = _SMALL_COMMANDS[name]
    root = Path(__file__).resolve().parent.parent
    code = (
        "import sys, io, contextlib\n"
        "from pathlib import Path\n"
        "import enumerator.frozen as kept\n"
        f"kept.STORE.path = Path({str(tmp_path / 'kept.marshal')!r})\n"
        "from enumerator.cli import main\n"
        "with contextlib.redirect_stdout(io.StringIO()):\n"
        "    try:\n"
        f"        main({args!r})\n"
        "    except SystemExit as e:\n"
        "        assert not e.code, e.code\n"
        "kept.STORE.save(force=True)\n"
        "print(kept.STORE.cache_info().misses)\n"
        "print(' '.join(sorted(sys.modules)))\n"
    )
    env = dict(os.environ, PYTHONPATH=str(root))
    runs = [
        subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, env=env, cwd=root, check=True)
        for _ in range(2)
    ]
    misses, loaded = runs[1].stdout.splitlines()
    assert int(runs[0].stdout.splitlines()[0]) > 0  # the first run compiled the methods and kept them
    assert misses == "0", runs[1].stderr
    forbidden = _NOT_FOR_ANY | not_here
    found = sorted(m for m in loaded.split() if m in forbidden or any(m.startswith(f + ".") for f in forbidden))
    assert not found, found
