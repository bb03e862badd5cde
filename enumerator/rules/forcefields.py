"""Force-field defaults of the stretch-reporter classes (``forcefields.toml``).

Each ``[class.NAME]`` table of ``rules/forcefields.toml`` (and of a
``forcefields.toml`` in a ``--rules`` folder, which replaces a built-in class
of the same name) gives the typical constants of the energy-factored
(Cotton–Kraihanzel) force field of one reporter class: the stretching constant
of an oscillator trans to one of its own class, trans to another ligand or
with nothing trans to it, the cis and trans interaction constants ``kc`` and
``kt`` (all in mdyn/Å), the two atoms of the oscillator, the usual band range
in cm-1 and the source of the numbers.  The file is validated in full on first
use; every problem is a :class:`~enumerator.errors.RuleError` naming the file,
the table, the key and the fix.

>>> from enumerator.rules.ruleset import load_rules
>>> co = class_field("CO", load_rules())
>>> co.atoms, co.default_k("same"), co.kc
(('C', 'O'), 16.4, 0.3)
>>> round(atom_mass("13C"), 4)
13.0034
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping
from pathlib import Path
from types import MappingProxyType
from typing import Any

from enumerator.caches import cached
from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.model.elements import is_element
from enumerator.rules.checks import check_keys, closest_names, quiet_rdkit, read_toml, rule_error
from enumerator.rules.masses import mass_of
from enumerator.rules.ruleset import RuleSet, load_rules

__all__ = ["ClassField", "load_forcefields", "class_field", "atom_mass", "element_mass"]

_KEYS_REQ = ("label", "atoms", "k_trans_same", "k_trans_other", "k_no_trans", "kc", "kt", "source")
_KEYS_OPT = ("range",)
_STRETCHING = ("k_trans_same", "k_trans_other", "k_no_trans")
_INTERACTION = ("kc", "kt")
#: An atom as a rule file or a SMILES label writes it: optional mass number, then the element symbol.
_ATOM = re.compile(r"^(\d{0,3})([A-Z][a-z]?)$")


@frozen_dataclass
class ClassField:
    """Default constants of one reporter class (one ``[class.NAME]`` table).

    Stretching constants ``k_trans_same``, ``k_trans_other``, ``k_no_trans``
    and interaction constants ``kc``, ``kt`` are in mdyn/Å; ``atoms`` is
    (X, Y), X bound to the metal ("13C" for an isotope); ``range`` the usual
    band range in cm-1; ``path`` the file the class came from.
    """

    name: str
    label: str
    atoms: tuple[str, str]
    k_trans_same: float
    k_trans_other: float
    k_no_trans: float
    kc: float
    kt: float
    range: tuple[float, float]
    source: str
    path: str = ""

    def default_k(self, environment: str) -> float:
        """The default stretching constant of an oscillator.

        Parameters
        ----------
        environment : str
            What is trans to it: 'same' (an oscillator of this class),
            'other' (another ligand) or 'none' (no trans site).

        Returns
        -------
        float
            The constant in mdyn/Å.
        """
        return {"same": self.k_trans_same, "other": self.k_trans_other, "none": self.k_no_trans}[environment]


def element_mass(symbol: str, isotope: int = 0, where: str = "") -> float:
    """The mass of an isotope, or of the element's most common isotope.

    Parameters
    ----------
    symbol : str
        Element symbol ('C').
    isotope : int
        Mass number; 0 for the most common isotope.
    where : str
        What to name in an error (file and table).

    Returns
    -------
    float
        Mass in u (RDKit's periodic table, from the built-in table :mod:`enumerator.rules.masses` where it holds it).

    Raises
    ------
    RuleError
        For an unknown element or an isotope without a known mass.
    """
    if not is_element(symbol):
        raise rule_error(where, f"unknown element '{symbol}'", "use an element symbol such as C, N, O")
    m = mass_of(symbol, isotope)
    if m is None:
        raise rule_error(where, f"no mass known for isotope {isotope}{symbol}", "check the mass number")
    return m


def atom_mass(text: str, where: str = "") -> float:
    """The mass of an atom written as in a rule file: 'C', 'O', '13C', '18O'.

    Parameters
    ----------
    text : str
        Optional mass number followed by the element symbol.
    where : str
        What to name in an error (file and table).

    Returns
    -------
    float
        Mass in u.

    Raises
    ------
    RuleError
        When ``text`` is not an element symbol or names an unknown isotope.
    """
    m = _ATOM.match(text)
    if not m:
        raise rule_error(where, f"'{text}' is not an element symbol", "write e.g. C, O, 13C, 18O")
    return element_mass(m.group(2), int(m.group(1) or 0), where)


def _number(v: object) -> bool:
    return isinstance(v, (int, float)) and not isinstance(v, bool) and math.isfinite(float(v))


def _atoms(data: Mapping[str, Any], where: str) -> tuple[str, str]:
    atoms = data["atoms"]
    if not (isinstance(atoms, list) and len(atoms) == 2 and all(isinstance(a, str) and _ATOM.match(a) for a in atoms)):
        raise rule_error(
            where,
            f"atoms = {atoms!r} is not two element symbols",
            'write e.g. atoms = ["C", "O"] (an isotope as "13C")',
        )
    for a in atoms:
        atom_mass(a, where)
    return atoms[0], atoms[1]


def _constants(data: Mapping[str, Any], where: str) -> dict[str, float]:
    vals = {}
    for key in _STRETCHING:
        v = data[key]
        if not (_number(v) and float(v) > 0):
            raise rule_error(where, f"{key} = {v!r} is not a positive number", f"give {key} in mdyn/Å, e.g. 16.0")
        vals[key] = float(v)
    for key in _INTERACTION:
        v = data[key]
        if not _number(v):
            raise rule_error(where, f"{key} = {v!r} is not a number", f"give {key} in mdyn/Å, e.g. 0.3")
        vals[key] = float(v)
    return vals


def _band_range(data: Mapping[str, Any], where: str) -> tuple[float, float]:
    rng = data.get("range", [0.0, 10000.0])
    if not (isinstance(rng, list) and len(rng) == 2 and all(_number(x) for x in rng) and rng[0] < rng[1]):
        raise rule_error(where, f"range = {rng!r} is not [low, high]", "write e.g. range = [1850.0, 2125.0]")
    return float(rng[0]), float(rng[1])


def _parse_class(path: Path, name: str, data: object) -> ClassField:
    where = f"{path}: [class.{name}]"
    if not isinstance(data, dict):
        raise rule_error(where, "not a table", "write it as [class.NAME] with keys below it")
    check_keys(data, where, _KEYS_REQ, _KEYS_OPT)
    atoms = _atoms(data, where)
    vals = _constants(data, where)
    rng = _band_range(data, where)
    for key in ("label", "source"):
        if not isinstance(data[key], str) or not data[key].strip():
            raise rule_error(where, f"{key} must be a non-empty string", f'write {key} = "..."')
    return ClassField(
        name=name, label=data["label"], atoms=atoms, range=rng, source=data["source"], path=str(path), **vals
    )


@cached(maxsize=16)
def load_forcefields(rules: RuleSet) -> Mapping[str, ClassField]:
    """Every reporter class's force-field defaults.

    The built-in ``rules/forcefields.toml`` is read first, then each
    ``--rules`` folder's (a class there replaces the built-in one).

    Parameters
    ----------
    rules : RuleSet
        The rule folders in force; the answer is cached per rule set.

    Returns
    -------
    Mapping[str, ClassField]
        Read-only mapping from class name to its defaults.

    Raises
    ------
    RuleError
        For any malformed file, table or key.
    """
    out: dict[str, ClassField] = {}
    with quiet_rdkit():  # element and isotope look-ups go through RDKit's periodic table
        for path in rules.files("forcefields.toml"):
            data = read_toml(path)
            check_keys(data, str(path), (), ("class",))
            classes = data.get("class", {})
            if not isinstance(classes, dict):
                raise rule_error(path, "'class' is not a table of tables", "write [class.CO], [class.CN], ...")
            for name in sorted(classes):
                out[name] = _parse_class(path, name, classes[name])
    return MappingProxyType(out)


def class_field(reporter_class: str, rules: RuleSet | None = None) -> ClassField:
    """The defaults of one reporter class, found case-insensitively.

    Parameters
    ----------
    reporter_class : str
        Class name ('CO', 'CN', 'NO', or one from a ``--rules`` folder).
    rules : RuleSet, optional
        The rule folders in force (default: the built-in rules).

    Returns
    -------
    ClassField

    Raises
    ------
    InputError
        When no force field is known for the class (with the nearest names).
    """
    fields = load_forcefields(rules or load_rules())
    if reporter_class in fields:
        return fields[reporter_class]
    for name, cf in fields.items():
        if name.lower() == reporter_class.lower():
            return cf
    near = closest_names(reporter_class, fields)
    hint = f"did you mean {' or '.join(near)}? " if near else ""
    raise InputError(
        f"no force-field constants for reporter class '{reporter_class}'",
        f"{hint}known: {', '.join(sorted(fields))}; "
        f"add [class.{reporter_class}] to a forcefields.toml in a --rules folder",
    )
