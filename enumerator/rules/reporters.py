"""Stretch-reporter classes: ``rules/reporters.toml`` (plus any user
``reporters.toml`` given with ``--rules DIR``), loaded and checked once per
set of files.

A reporter class (CO, CN, NO, ...) names the bond whose stretch is read in
IR and Raman, the nucleus whose NMR signals count its environments, and the
typical wavenumber window with its source.  The ``[nuclei]`` table maps the
donor element of the other ligands to the nucleus usually observed for them.
A later file's entry replaces an earlier one of the same name.

>>> from enumerator.rules.ruleset import load_rules
>>> rep = load_reporters(load_rules())
>>> rep.get("CO").bond, rep.get("CO").nucleus
('C-O', '13C')
>>> rep.nucleus_of("P")
'31P'
"""

from __future__ import annotations

from collections.abc import Mapping
from pathlib import Path
from typing import Any

from enumerator.caches import cached
from enumerator.frozen import frozen_dataclass
from enumerator.rules.checks import check_keys, read_toml, rule_error
from enumerator.rules.ruleset import RuleSet

__all__ = ["ReporterClass", "Reporters", "load_reporters"]

_REQUIRED = ("name", "bond", "nucleus", "ir_window_cm1", "window_source")


@frozen_dataclass
class ReporterClass:
    """One reporter class from a ``reporters.toml``.

    ``key`` is the class name used by ligands and ``--reporter`` (``'CO'``);
    ``window`` the typical stretch range in cm-1 (low, high); ``source`` where
    the window comes from."""

    key: str
    name: str
    bond: str
    nucleus: str
    window: tuple[float, float]
    source: str
    caution: str = ""


@frozen_dataclass
class Reporters:
    """Every reporter class in force (sorted by key) and the donor-element nuclei."""

    classes: tuple[ReporterClass, ...]
    nuclei: tuple[tuple[str, str], ...]

    def get(self, key: str) -> ReporterClass:
        """The class called ``key``.

        Parameters
        ----------
        key : str
            E.g. 'CO'.

        Returns
        -------
        ReporterClass

        Raises
        ------
        KeyError
            When no class has that name.
        """
        for c in self.classes:
            if c.key == key:
                return c
        raise KeyError(key)

    @property
    def names(self) -> tuple[str, ...]:
        """The class keys, sorted."""
        return tuple(c.key for c in self.classes)

    def nucleus_of(self, element: str) -> str | None:
        """The nucleus usually observed for a donor element.

        Parameters
        ----------
        element : str
            A donor element symbol, e.g. 'P'.

        Returns
        -------
        str or None
            E.g. '31P'; None when the ``[nuclei]`` table does not list the element.
        """
        return dict(self.nuclei).get(element)


def load_reporters(ruleset: RuleSet) -> Reporters:
    """The reporter classes of a rule set.

    Parameters
    ----------
    ruleset : RuleSet
        The rule folders in force (built-in first).

    Returns
    -------
    Reporters
        Validated once per set of files and cached.

    Raises
    ------
    RuleError
        A key is missing, unknown or of the wrong type; the message names the file and the entry.
    """
    return _load_reporters(ruleset)


def _window(where: str, w: Any) -> tuple[float, float]:
    ok = (
        isinstance(w, list)
        and len(w) == 2
        and all(isinstance(x, (int, float)) and not isinstance(x, bool) for x in w)
        and 0 < w[0] < w[1] < 5000
    )
    if not ok:
        raise rule_error(
            where, f"ir_window_cm1 = {w!r} is not [low, high] in cm-1", "write e.g. ir_window_cm1 = [1850, 2125]"
        )
    return float(w[0]), float(w[1])


def _reporter_class(key: str, entry: Any, where: str) -> ReporterClass:
    if not isinstance(entry, dict):
        raise rule_error(
            where, "not a table", "write [class.NAME] with name, bond, nucleus, ir_window_cm1, window_source"
        )
    check_keys(entry, where, _REQUIRED, ("caution",))
    if not isinstance(entry.get("caution", ""), str):
        raise rule_error(where, f"caution = {entry['caution']!r} is not a string", 'write caution = "..."')
    window = _window(where, entry["ir_window_cm1"])
    for k in ("name", "bond", "nucleus", "window_source"):
        if not isinstance(entry[k], str) or not entry[k].strip():
            raise rule_error(where, f"{k} must be a non-empty string", f'write {k} = "..."')
    return ReporterClass(
        key,
        entry["name"],
        entry["bond"],
        entry["nucleus"],
        window,
        entry["window_source"],
        str(entry.get("caution", "")),
    )


def _nuclei(path: Path, table: Mapping[str, Any]) -> dict[str, str]:
    for el, nuc in table.items():
        if not isinstance(nuc, str):
            raise rule_error(path, f'[nuclei] {el} must be a string such as "31P"', "quote the nucleus")
    return dict(table)


@cached(maxsize=16)
def _load_reporters(ruleset: RuleSet) -> Reporters:
    classes: dict[str, ReporterClass] = {}
    nuclei: dict[str, str] = {}
    for path in ruleset.files("reporters.toml"):
        data = read_toml(path)
        check_keys(data, str(path), (), ("class", "nuclei"))
        for table in ("class", "nuclei"):
            if not isinstance(data.get(table, {}), dict):
                raise rule_error(
                    path,
                    f"'{table}' is {data[table]!r}, not a table",
                    "write [class.CO] with its keys below it" if table == "class" else 'write [nuclei] with P = "31P"',
                )
        for key, entry in data.get("class", {}).items():
            classes[key] = _reporter_class(key, entry, f"{path}: [class.{key}]")
        nuclei.update(_nuclei(path, data.get("nuclei", {})))
    return Reporters(tuple(classes[k] for k in sorted(classes)), tuple(sorted(nuclei.items())))
