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
