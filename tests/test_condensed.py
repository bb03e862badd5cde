"""The condensed-formula parser."""

from __future__ import annotations

import pytest

from enumerator.errors import InputError
from enumerator.parse.condensed import parse_condensed
from enumerator.rules.ruleset import load_rules

RS = load_rules()


def parts(text):
    c = parse_condensed(text, RS)
    return c.metal, c.charge, [(k.name, n) for k, n in c.parts]


@pytest.mark.parametrize(
    "text, want",
    [
        ("[Fe(CN)5(NO)]2-", ("Fe", -2, [("CN", 5), ("NO", 1)])),
        ("[Co(NH3)4Cl2]+", ("Co", 1, [("NH3", 4), ("Cl", 2)])),
        ("[RuCl2(CO)2(PPh3)2]", ("Ru", 0, [("Cl", 2), ("CO", 2), ("PPh3", 2)])),
        ("Ni(CO)4", ("Ni", 0, [("CO", 4)])),
        ("[CpMn(CO)3]", ("Mn", 0, [("Cp", 1), ("CO", 3)])),
        ("[(η5-C5H5)Mn(CO)3]", ("Mn", 0, [("Cp", 1), ("CO", 3)])),
        ("[(eta5-Cp)Mn(CO)3]", ("Mn", 0, [("Cp", 1), ("CO", 3)])),
        ("[(h5-Cp*)Rh(CO)2]", ("Rh", 0, [("Cp*", 1), ("CO", 2)])),
        ("[Cr(η⁶-C6H6)(CO)3]", ("Cr", 0, [("C6H6", 1), ("CO", 3)])),
        ("[IrCl(CO)(PPh3)2]", ("Ir", 0, [("Cl", 1), ("CO", 1), ("PPh3", 2)])),
        ("[Mo(CO)3(P(OMe)3)3]", ("Mo", 0, [("CO", 3), ("P(OMe)3", 3)])),
        ("[Fe(CO)5]−", ("Fe", -1, [("CO", 5)])),
        ("[Co(en)2Cl2]+", ("Co", 1, [("en", 2), ("Cl", 2)])),
        ("[Mn(CO)5(13CO)]+", ("Mn", 1, [("CO", 5), ("13CO", 1)])),
        ("[Fe(CO)2(NO)2]", ("Fe", 0, [("CO", 2), ("NO", 2)])),
        ("[Co(NH3)5(NO2)]2+", ("Co", 2, [("NH3", 5), ("NO2", 1)])),  # nitro, N-bound
        ("[PtCl2(η2-C2H4)(NH3)]", ("Pt", 0, [("Cl", 2), ("C2H4", 1), ("NH3", 1)])),
        ("[Ru(NH3)5(N2)]2+", ("Ru", 2, [("NH3", 5), ("N2", 1)])),
        ("[W(CO)5(CNtBu)]", ("W", 0, [("CO", 5), ("CNtBu", 1)])),
        ("[Co(NH3)3Cl3]", ("Co", 0, [("NH3", 3), ("Cl", 3)])),
        ("[Cr(CO)2(CO)4]", ("Cr", 0, [("CO", 6)])),  # repeated ligands merge
    ],
)
def test_parse(text, want):
    assert parts(text) == want


def test_ring_sites():
    c = parse_condensed("[CpMn(CO)3]", RS)
    assert c.donor_count == 4 and c.kinds[0].ring  # the ring holds one site (piano-stool idealisation)


@pytest.mark.parametrize(
    "text, pos, words",
    [
        ("[RuCl2(CO)2(PPh4)2]", 13, "unknown ligand 'PPh4'"),
        ("[RuCl2(CO)2(PPh3)2", 1, "never closed"),
        ("K4[Fe(CN)6]", 1, "text before '['"),
        ("[Fe(CN)6]4x", 10, "charge"),
        ("[FeRu(CO)9]", 4, "second metal"),
        ("[(CO)4]", None, "no metal"),
        ("[Fe(CO)0]", 8, "count of 0"),
        ("[η3-CpMn(CO)3]", 2, "η3-Cp"),
        ("[Fe(CO)5", 1, "never closed"),
        ("[Fe(CO5]", 4, "never closed"),
    ],
)
def test_errors_point_at_character(text, pos, words):
    with pytest.raises(InputError) as exc:
        parse_condensed(text, RS)
    line = exc.value.line()
    assert words in line
    if pos is not None:
        assert f"at position {pos}" in line


def test_unknown_suggests():
    with pytest.raises(InputError) as exc:
        parse_condensed("[RuCl2(CO)2(PPh4)2]", RS)
    assert "PPh3" in exc.value.fix
