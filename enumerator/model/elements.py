"""Element data: one periodic-table helper for the whole package.

The symbols and atomic numbers are held here (:data:`SYMBOLS`, the same as
RDKit's periodic table); weights, isotope masses and radii come from RDKit's
periodic table, imported on first use; the IUPAC group and block follow from
the atomic number by the shape of the periodic table.

>>> atomic_number("Ru"), atomic_number("M"), atomic_number("ru")
(44, 0, 0)
>>> group_of(44), group_of(26), group_of(58)
((8, 'd'), (8, 'd'), (None, 'f'))
>>> is_metal("Fe"), is_metal("P"), is_metal("Xx")
(True, False, False)
"""

from __future__ import annotations

from collections.abc import Mapping
from types import MappingProxyType

from enumerator.caches import cached
from enumerator.errors import InputError

__all__ = [
    "element_symbols",
    "atomic_number",
    "is_element",
    "is_metal",
    "group_of",
    "atomic_weight",
    "isotope_mass",
    "covalent_radius",
    "vdw_radius",
    "NONMETALS",
]

#: Atomic numbers of the non-metals and metalloids a formula's head may not be
#: (H, He, B, C, N, O, F, Ne, Si, P, S, Cl, Ar, As, Se, Br, Kr, Te, I, Xe, At, Rn,
#: Ts, Og); common practice.
NONMETALS = frozenset({1, 2, 5, 6, 7, 8, 9, 10, 14, 15, 16, 17, 18, 33, 34, 35, 36, 52, 53, 54, 85, 86, 117, 118})

#: Atomic numbers that close each period (0 for the start).
_NOBLE = (0, 2, 10, 18, 36, 54, 86, 118)


def _table():
    from rdkit import Chem

    return Chem.GetPeriodicTable()


#: The element symbols by atomic number 1-118 (IUPAC periodic table, 2016 names for 113-118; the same as
#: RDKit's periodic table, checked in tests/test_lazy_rules.py).  Held here so that reading a formula or a
#: ligand entry does not import RDKit; masses and radii still come from RDKit's table.
SYMBOLS = tuple(
    (  # noqa: SIM905 - one line per period reads better than a list of 118 strings
        "H He Li Be B C N O F Ne Na Mg Al Si P S Cl Ar K Ca Sc Ti V Cr Mn Fe Co Ni Cu Zn Ga Ge As Se Br Kr "
        "Rb Sr Y Zr Nb Mo Tc Ru Rh Pd Ag Cd In Sn Sb Te I Xe Cs Ba La Ce Pr Nd Pm Sm Eu Gd Tb Dy Ho Er Tm Yb Lu "
        "Hf Ta W Re Os Ir Pt Au Hg Tl Pb Bi Po At Rn Fr Ra Ac Th Pa U Np Pu Am Cm Bk Cf Es Fm Md No Lr "
        "Rf Db Sg Bh Hs Mt Ds Rg Cn Nh Fl Mc Lv Ts Og"
    ).split()
)


@cached(maxsize=None)
def element_symbols() -> Mapping[str, int]:
    """Every element symbol and its atomic number.

    Returns
    -------
    Mapping[str, int]
        Symbol -> atomic number for elements 1-118 (read-only).
    """
    return MappingProxyType({sym: z for z, sym in enumerate(SYMBOLS, start=1)})


def atomic_number(symbol: str) -> int:
    """The atomic number of an element symbol.

    Parameters
    ----------
    symbol : str
        Exact case ('Ru', not 'ru').

    Returns
    -------
    int
        0 when ``symbol`` is not an element symbol ('M', letters).
    """
    return element_symbols().get(symbol, 0)


def is_element(label: str) -> bool:
    """Whether ``label`` is an element symbol, exact case ('M' and letters are not).

    Parameters
    ----------
    label : str

    Returns
    -------
    bool
    """
    return atomic_number(label) > 0


def is_metal(symbol: str) -> bool:
    """Whether ``symbol`` is an element outside :data:`NONMETALS`.

    Parameters
    ----------
    symbol : str

    Returns
    -------
    bool
    """
    z = atomic_number(symbol)
    return z > 0 and z not in NONMETALS


def group_of(z: int) -> tuple[int | None, str]:
    """The IUPAC group and block of an element, from the shape of the periodic table.

    Parameters
    ----------
    z : int
        Atomic number, 1-118.

    Returns
    -------
    (int or None, str)
        Group 1-18 (None in the f-block) and the block letter; La and Ac are group 3.

    Raises
    ------
    InputError
        ``z`` is outside 1-118.
    """
    if not 1 <= z <= 118:
        raise InputError(f"atomic number {z} is out of range", "use an element 1-118")
    period = next(p for p in range(1, 8) if z <= _NOBLE[p])
    off = z - _NOBLE[period - 1]
    if period == 1:
        return (1, "s") if z == 1 else (18, "p")
    if period <= 3:
        return (off, "s") if off <= 2 else (off + 10, "p")
    if period <= 5:
        if off <= 2:
            return off, "s"
        return (off, "d") if off <= 12 else (off, "p")
    # periods 6 and 7: the f-block sits between groups 3 and 4
    if off <= 2:
        return off, "s"
    if off == 3:
        return 3, "d"  # La, Ac
    if off <= 17:
        return None, "f"
    g = off - 14
    return (g, "d") if g <= 12 else (g, "p")


@cached(maxsize=None)
def atomic_weight(z: int) -> float:
    """The standard atomic weight of an element (RDKit's table).

    Parameters
    ----------
    z : int
        Atomic number.

    Returns
    -------
    float
        In u, rounded to 4 decimals.
    """
    return round(float(_table().GetAtomicWeight(z)), 4)


@cached(maxsize=None)
def isotope_mass(symbol: str, isotope: int = 0) -> float | None:
    """The mass of an isotope (RDKit's table).

    Parameters
    ----------
    symbol : str
        Element symbol.
    isotope : int, optional
        Mass number; 0 for the most common isotope.

    Returns
    -------
    float or None
        In u; None when the symbol or the isotope is unknown.
    """
    z = atomic_number(symbol)
    if z <= 0:
        return None
    from rdkit import rdBase

    pt = _table()
    with rdBase.BlockLogs():  # an unknown isotope is an answer here (None), not a line of RDKit's log
        m = pt.GetMassForIsotope(z, isotope) if isotope else pt.GetMostCommonIsotopeMass(z)
    return float(m) if m and m > 0 else None


@cached(maxsize=None)
def covalent_radius(symbol: str) -> float:
    """RDKit's covalent radius of an element.

    Parameters
    ----------
    symbol : str
        Element symbol.

    Returns
    -------
    float
        In Å.
    """
    return float(_table().GetRcovalent(symbol))


@cached(maxsize=None)
def vdw_radius(z: int) -> float:
    """RDKit's van der Waals radius of an element.

    Parameters
    ----------
    z : int
        Atomic number.

    Returns
    -------
    float
        In Å.
    """
    return float(_table().GetRvdw(z))
