"""Formulas whose metal symbol starts like the abstract 'M' notation."""

from enumerator.workflow.pipeline import analyse


def test_molybdenum_and_manganese_are_real_formulas():
    # [Mo(CO)6] is octahedral Oh with one IR-active CO stretch, T1u
    # (Cotton, Chemical Applications of Group Theory, 3rd ed., sec. 10.7)
    r = analyse("[Mo(CO)6]")
    assert r.composition.metal == "Mo" and r.geometry.symbol == "OC-6"
    assert [i.point_group for i in r.isomers] == ["Oh"]
    # cis/trans-Mo(CO)4L2: two isomers (common practice)
    assert analyse("Mo(CO)4(PPh3)2").isomer_set.geometric_isomers == 2


def test_abstract_notation_still_wins_for_letters():
    r = analyse("Mnab")  # M + n + a + b: not a catalogue formula (common practice)
    assert r.composition.metal == "M" and r.geometry.coordination_number == 3


def test_real_formula_error_wins_for_manganese_heads():
    # a formula starting Mn/Mo/Mg that neither reading accepts gets the
    # condensed parser's error, with its suggestions, not the letter notation's
    # (common practice: report the likely intent)
    import pytest

    from enumerator.errors import InputError

    with pytest.raises(InputError) as err:
        analyse("Mn(CO)5(Xq)")
    assert "unknown ligand 'Xq'" in err.value.line() and "did you mean" in err.value.line()
    # a superheavy-element head (Md) keeps the letter-notation error
    with pytest.raises(InputError) as err:
        analyse("Mdab(")
    assert "never closed" in err.value.line()
