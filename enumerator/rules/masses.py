"""Element and isotope masses from the built-in table ``isotopes.toml``, RDKit only for what it lacks.

The table holds RDKit's own values (its periodic table: standard atomic
weights, the most common isotope's mass, and the mass of every naturally
occurring isotope; the file names the calls), so that the band model's
oscillator masses do not import RDKit on every start.  A mass the table lacks
(a radioactive isotope, say) is asked of RDKit through
:mod:`enumerator.model.elements`, so every answer is RDKit's either way;
``tests/test_startup_shortcuts.py`` holds each entry equal to RDKit's value,
and the file equal to what :func:`build_table` writes from the installed RDKit
(rewrite it with ``python -m enumerator.rules.masses``).

>>> mass_of("C", 13)
13.00335484
>>> weight_of("O")
15.999
"""

from __future__ import annotations

from collections.abc import Mapping
from types import MappingProxyType

from enumerator.caches import cached
from enumerator.model.elements import SYMBOLS, atomic_number, atomic_weight, isotope_mass

__all__ = ["TABLE_NAME", "mass_of", "weight_of", "table", "build_table", "write_table"]

#: The table's file name in the built-in rules folder.
TABLE_NAME = "isotopes.toml"


@cached(maxsize=None)
def table() -> Mapping[str, tuple[float, int, float, Mapping[int, float]]]:
    """Element symbol -> (standard atomic weight, most common isotope, its mass, {mass number: mass}).

    Returns
    -------
    Mapping
        Read-only; empty when the built-in table is missing (every mass is then asked of RDKit).

    Raises
    ------
    RuleError
        The table is malformed (a built-in file: the test suite reads it).
    """
    from enumerator.rules.checks import read_toml, rule_error
    from enumerator.rules.ruleset import BUILTIN_RULES

    path = BUILTIN_RULES / TABLE_NAME
    if not path.is_file():
        return MappingProxyType({})
    out: dict[str, tuple[float, int, float, Mapping[int, float]]] = {}
    for symbol, row in read_toml(path).get("element", {}).items():
        try:
            isotopes = {int(a): float(m) for a, m in row.get("isotopes", {}).items()}
            out[symbol] = (float(row["weight"]), int(row["common"]), float(row["common_mass"]), isotopes)
        except (KeyError, TypeError, ValueError, AttributeError):
            raise rule_error(f"{path} [element.{symbol}]", "needs weight, common, common_mass", "rewrite it") from None
        if symbol not in SYMBOLS:
            raise rule_error(f"{path} [element.{symbol}]", "not an element symbol", "use C, N, O, ...")
    return MappingProxyType(out)


def mass_of(symbol: str, isotope: int = 0) -> float | None:
    """The mass of an isotope, or of the element's most common isotope (``isotope=0``).

    Parameters
    ----------
    symbol : str
        Element symbol.
    isotope : int, optional
        Mass number; 0 for the most common isotope.

    Returns
    -------
    float or None
        In u, as :func:`enumerator.model.elements.isotope_mass` (RDKit) gives it; None when unknown.
    """
    row = table().get(symbol)
    if row is not None:
        if not isotope or isotope == row[1]:
            return row[2]
        if isotope in row[3]:
            return row[3][isotope]
    return isotope_mass(symbol, isotope)


def weight_of(symbol: str) -> float:
    """The standard atomic weight of an element, unrounded, as RDKit's table gives it (an atom's
    ``GetMass()`` without an isotope label).

    Parameters
    ----------
    symbol : str
        Element symbol.

    Returns
    -------
    float
        In u; 0.0 for a symbol that is no element (RDKit's dummy atom).
    """
    row = table().get(symbol)
    if row is not None:
        return row[0]
    z = atomic_number(symbol)
    return atomic_weight(z) if z > 0 else 0.0


_HEADER = """# Masses of the elements and of their naturally occurring isotopes, in u.
#
# Source: RDKit {version}'s periodic table (rdkit.Chem.GetPeriodicTable()), the package's
# reference library for masses: 'weight' is GetAtomicWeight (the standard atomic weight),
# 'common' and 'common_mass' are GetMostCommonIsotope and GetMostCommonIsotopeMass, and
# 'isotopes' lists GetMassForIsotope for every isotope with a non-zero GetAbundanceForIsotope.
# Written out from those calls by `python -m enumerator.rules.masses`, not typed;
# tests/test_startup_shortcuts.py holds every entry equal to RDKit's value.  Read so that a
# command that needs a mass (the band model's oscillators) does not import RDKit; a mass not
# listed here is asked of RDKit.
"""


def build_table() -> str:
    """The text of ``isotopes.toml``, written from the installed RDKit's periodic table.

    Returns
    -------
    str
        One ``[element.X]`` table per element with a standard atomic weight (H to Og), in atomic-number order.
    """
    import rdkit
    from rdkit import Chem

    pt = Chem.GetPeriodicTable()
    parts = [_HEADER.format(version=rdkit.__version__)]
    for z in range(1, 119):
        symbol = pt.GetElementSymbol(z)
        iso = {
            a: pt.GetMassForIsotope(z, a)
            for a in range(1, 300)
            if pt.GetAbundanceForIsotope(z, a) > 0
        }
        listed = ", ".join(f"{a} = {m!r}" for a, m in iso.items())
        parts.append(
            f"\n[element.{symbol}]\nweight = {pt.GetAtomicWeight(z)!r}\ncommon = {pt.GetMostCommonIsotope(z)}\n"
            f"common_mass = {pt.GetMostCommonIsotopeMass(z)!r}\n" + (f"isotopes = {{ {listed} }}\n" if iso else "")
        )
    return "".join(parts)


def write_table() -> str:
    """Rewrite the built-in ``isotopes.toml`` from the installed RDKit; the path written.

    Returns
    -------
    str
    """
    from enumerator.rules.ruleset import BUILTIN_RULES

    path = BUILTIN_RULES / TABLE_NAME
    path.write_text(build_table(), encoding="utf-8")
    return str(path)


if __name__ == "__main__":  # pragma: no cover
    print(write_table())
