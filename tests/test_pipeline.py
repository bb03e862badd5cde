"""Formulas whose metal symbol starts like the abstract 'M' notation."""

from enumerator.pipeline import analyse


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
