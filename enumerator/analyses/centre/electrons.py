"""Electron counts of a mononuclear centre: oxidation state, d-electron
count, valence-electron count (the 18-electron rule) and, for nitrosyls, the
Enemark–Feltham number.

Both textbook electron counts are made from the catalogue data of each
ligand (see ``rules/ligands.toml``):

* ionic count: oxidation state = overall charge - sum of ligand charges;
  d-electron count = group number - oxidation state; valence electrons =
  d-count + electrons donated in the ionic model;
* covalent (neutral-ligand) count: valence electrons = group number -
  overall charge + electrons donated in the covalent model.

The two must agree (the catalogue checks ionic - covalent = -charge for
every ligand).  A linear nitrosyl is NO+ (3 electrons, covalent), a bent one
NO- (1 electron); write ``NO`` or ``NObent``.  Nitrosyl complexes also get
the Enemark–Feltham notation {MNO}n, where n is the number of metal d
electrons plus NO π* electrons, i.e. the d-count with every NO taken as
NO+ (J. H. Enemark, R. D. Feltham, *Coord. Chem. Rev.* 13 (1974) 339).

The group number and the block come from the atomic number (RDKit's
periodic table); nothing per element is typed in.

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.condensed import parse_condensed
>>> ec = count_electrons(parse_condensed("[Fe(CN)5(NO)]2-", load_rules()))
>>> ec.oxidation_state, ec.d_electrons, ec.valence_electrons, ec.enemark_feltham, ec.label
(2, 6, 18, '{FeNO}6', 'Fe(II), d6')
"""

from __future__ import annotations

from typing import NamedTuple

from enumerator.caches import cached
from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.model.composition import Composition
from enumerator.model.elements import atomic_number, group_of

__all__ = ["ElectronCount", "LigandCount", "NitrosylBinding", "count_electrons", "roman", "MAX_D_ELECTRONS"]

#: A d shell holds ten electrons: a d count above this means the charge or the ligands are wrong.
MAX_D_ELECTRONS = 10


#: Roman numerals of the digits of each decimal place, ones first (the standard subtractive forms).
_ROMAN_PLACES = (
    ("", "I", "II", "III", "IV", "V", "VI", "VII", "VIII", "IX"),
    ("", "X", "XX", "XXX", "XL", "L", "LX", "LXX", "LXXX", "XC"),
    ("", "C", "CC", "CCC", "CD", "D", "DC", "DCC", "DCCC", "CM"),
    ("", "M", "MM", "MMM"),
)


def roman(n: int) -> str:
    """Oxidation state as the Stock number: 2 -> 'II', 0 -> '0', -1 -> '-I'.

    One table look-up per decimal place, so the time does not grow with ``n``;
    beyond the Roman numerals (|n| > 3999) the number is written in Arabic
    digits with its sign.

    >>> roman(2), roman(0), roman(-1), roman(8), roman(1994), roman(10**12)
    ('II', '0', '-I', 'VIII', 'MCMXCIV', '+1000000000000')

    Parameters
    ----------
    n : int
        The oxidation state.

    Returns
    -------
    str
    """
    if n == 0:
        return "0"
    k = abs(n)
    if k > 3999:
        return f"{n:+d}"
    digits = (k % 10, k // 10 % 10, k // 100 % 10, k // 1000)
    out = "".join(_ROMAN_PLACES[p][d] for p, d in reversed(list(enumerate(digits))))
    return ("-" if n < 0 else "") + out


class LigandCount(NamedTuple):
    """One ligand's share of the count: catalogue charge and electrons donated in each model."""

    ligand: str
    number: int
    charge: int
    electrons_covalent: int
    electrons_ionic: int
    hapticity: int | None


class NitrosylBinding(NamedTuple):
    """A nitrosyl ligand and its binding, 'linear' (NO+) or 'bent' (NO-)."""

    ligand: str
    number: int
    binding: str


@frozen_dataclass
class ElectronCount:
    """Both electron counts of one mononuclear centre (None where a count does not apply)."""

    metal: str
    atomic_number: int
    group: int | None
    block: str
    charge: int
    oxidation_state: int | None
    d_electrons: int | None
    valence_electrons: int | None  # covalent count (equals the ionic count)
    valence_electrons_ionic: int | None
    ligands: tuple[LigandCount, ...]
    nitrosyls: tuple[NitrosylBinding, ...] = ()
    enemark_feltham: str | None = None
    notes: tuple[str, ...] = ()

    @property
    def label(self) -> str:
        """E.g. 'Ru(II), d6'."""
        if self.oxidation_state is None:
            return self.metal
        s = f"{self.metal}({roman(self.oxidation_state)})"
        if self.d_electrons is not None:
            s += f", d{self.d_electrons}"
        return s


def _enemark_feltham(metal: str, d: int, nitrosyls: tuple[NitrosylBinding, ...]) -> str:
    """{MNO}n or {M(NO)x}n: n = d-count with every NO taken as NO+."""
    bent = sum(n for _, n, b in nitrosyls if b == "bent")
    total = sum(n for _, n, _ in nitrosyls)
    nef = d + 2 * bent
    return f"{{{metal}NO}}{nef}" if total == 1 else f"{{{metal}(NO){total}}}{nef}"


def _ligand_counts(comp: Composition) -> tuple[tuple[LigandCount, ...], tuple[NitrosylBinding, ...], bool]:
    """The ligands' counts, the nitrosyls, and whether every ligand carries catalogue data."""
    rows = []
    nitrosyls = []
    known = True
    for kind, n in comp.parts:
        m = kind.info_dict()
        if "charge" not in m:
            known = False
            continue
        rows.append(
            LigandCount(
                kind.name,
                n,
                int(m["charge"]),
                int(m["electrons_covalent"]),
                int(m["electrons_ionic"]),
                m.get("hapticity"),
            )
        )
        if m.get("nitrosyl"):
            nitrosyls.append(NitrosylBinding(kind.name, n, str(m["nitrosyl"])))
    return tuple(rows), tuple(nitrosyls), known


@cached(maxsize=1024)
def count_electrons(comp: Composition) -> ElectronCount:
    """Oxidation state, d-count and valence electrons of a real composition.

    Parameters
    ----------
    comp : Composition
        A composition whose metal is an element; catalogue ligands carry their charges and electrons.

    Returns
    -------
    ElectronCount
        Counts left as None, with a note, where a ligand has no catalogue data, the oxidation state
        exceeds the group number or would leave more than ten d electrons, or the metal is not a d-block
        element.

    Raises
    ------
    InputError
        The metal is not an element symbol.
    """
    z = atomic_number(comp.metal) or None
    if z is None:
        raise InputError(
            f"'{comp.metal}' is not an element symbol", "write the metal as in the periodic table, e.g. Ru"
        )
    group, block = group_of(z)
    rows, nitrosyls, known = _ligand_counts(comp)
    if not known:
        return ElectronCount(
            comp.metal,
            z,
            group,
            block,
            comp.charge,
            None,
            None,
            None,
            None,
            rows,
            notes=("some ligands carry no catalogue data, so the centre is not counted",),
        )
    os_ = comp.charge - sum(q * n for _, n, q, _, _, _ in rows)
    d = ve = ve_ion = None
    ef = None
    notes: list[str] = []
    if block != "d" or group is None:
        notes.append(f"{comp.metal} is a {block}-block element: no d-electron count or 18-electron rule is applied")
    elif group - os_ < 0:
        notes.append(
            f"oxidation state {os_:+d} exceeds the group number {group}: check the overall charge and the ligand choice"
        )
    elif group - os_ > MAX_D_ELECTRONS:
        notes.append(
            f"oxidation state {os_:+d} would leave d{group - os_}, more than the {MAX_D_ELECTRONS} electrons a d shell "
            "holds: check the overall charge and the ligand choice"
        )
    else:
        d = group - os_
        ve = group - comp.charge + sum(ec * n for _, n, _, ec, _, _ in rows)
        ve_ion = d + sum(ei * n for _, n, _, _, ei, _ in rows)
        if nitrosyls:
            ef = _enemark_feltham(comp.metal, d, nitrosyls)
    return ElectronCount(
        comp.metal, z, group, block, comp.charge, os_, d, ve, ve_ion, rows, nitrosyls, ef, tuple(notes)
    )
