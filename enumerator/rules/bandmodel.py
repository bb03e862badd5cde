"""The fitted additive band model (``rules/bandmodel.toml``) and its ligand groups (``rules/bandgroups.toml``).

``bandmodel.toml`` is written by ``python -m enumerator.vibrations.calibrate``
(never by hand): a ``[model]`` header saying how, when and on which data the
parameters were fitted, ``[sigma]`` (one standard uncertainty per band
category, cm-1, from the leave-one-complex-out cross-validation),
``[widen]`` (the factors by which sigma grows when a ligand falls back to its
group or to the generic value), ``[cv]`` (the validation figures) and
``[parameters]`` (name = value; the names are those of
:mod:`enumerator.vibrations.additive`).  ``bandgroups.toml`` is written by
hand: ``[group.NAME]`` tables with a ``label`` and the catalogue ``ligands``
in the group.  Both are validated in full on first use; a problem is a
:class:`~enumerator.errors.RuleError` naming the file, the table and the fix.

>>> bm = load_bandmodel()
>>> bm.parameters["k0:CO"] > 10, bm.group_of("PPh3")
(True, 'arylphosphine')
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping
from dataclasses import field
from pathlib import Path
from types import MappingProxyType
from typing import Any

from enumerator.caches import cached
from enumerator.frozen import frozen_dataclass
from enumerator.rules.checks import check_keys, read_toml, rule_error
from enumerator.rules.ruleset import BUILTIN_RULES

__all__ = [
    "BandModelRules",
    "load_bandmodel",
    "load_groups",
    "load_families",
    "load_substituents",
    "RING_ALKYL",
    "PARAMETER_KINDS",
    "BANDMODEL_FILE",
    "GROUPS_FILE",
]

BANDMODEL_FILE = BUILTIN_RULES / "bandmodel.toml"
GROUPS_FILE = BUILTIN_RULES / "bandgroups.toml"

#: Kinds of parameter name (the part before the first colon) and how many colon-separated parts follow.
PARAMETER_KINDS = MappingProxyType(
    {
        "k0": 1,
        "d": 2,
        "q": 1,
        "q2": 1,
        "qd": 2,
        "ox": 1,
        "row": 2,
        "phase": 2,
        "sd": 2,
        "sa": 2,
        "sb": 2,
        "fa": 2,
        "fb": 2,
        "ea": 2,
        "eb": 2,
        "la": 2,
        "lb": 2,
        "ia": 1,
        "ib": 1,
        "ig": 1,
        "ir": 2,
        "iq": 1,
        "io": 1,
    }
)
_NAME = re.compile(r"^[^:\s]+(:[^:\s]+)+$")
_MODEL_KEYS = ("name", "method", "dataset", "fitted", "command", "reference_k", "ridge")


@frozen_dataclass
class BandModelRules:
    """The fitted parameters, their validation and the ligand groups (read-only mappings).

    ``header`` holds the ``[model]`` table; ``sigma`` one standard uncertainty
    (cm-1) per band category ('CO neutral', 'CO charged', 'CN', 'NO linear',
    'NO bent', 'CS', 'CNR', 'N2', 'pooled'); ``widen`` the factors 'group' and
    'generic'; ``cv`` the validation figures as written; ``groups`` ligand ->
    group; ``group_labels`` group -> words; ``families`` group -> family;
    ``substituents`` phosphorus ligand -> its substituents.
    """

    header: Mapping[str, Any]
    parameters: Mapping[str, float]
    sigma: Mapping[str, float]
    widen: Mapping[str, float]
    cv: Mapping[str, Any]
    groups: Mapping[str, str]
    group_labels: Mapping[str, str]
    path: str = ""
    families: Mapping[str, str] = field(default_factory=lambda: MappingProxyType({}))
    substituents: Substituents = field(default_factory=lambda: MappingProxyType({}))

    def group_of(self, ligand: str) -> str | None:
        """The group of a catalogue ligand, or None when it is in none."""
        return self.groups.get(ligand)

    def reference_k(self, pclass: str) -> float:
        """The reference stretching constant of a parameter class (mdyn/Å): the start and prior centre of its k0."""
        return float(self.header["reference_k"][pclass])


def _number(v: object) -> bool:
    return isinstance(v, (int, float)) and not isinstance(v, bool) and math.isfinite(float(v))


Substituents = Mapping[str, tuple[tuple[str, int], ...]]
#: The substituent name of an alkyl group on an eta-bound ring ([ring_alkyls] of rules/bandgroups.toml).
RING_ALKYL = "ring-alkyl"


def _read_substituents(table: Any, where: str, groups: Mapping[str, str]) -> dict[str, tuple[tuple[str, int], ...]]:
    if not isinstance(table, Mapping):
        raise rule_error(where, "not a table", 'write "PClPh2" = { Cl = 1, Ph = 2 }')
    out = {}
    for lig, subs in table.items():
        if lig not in groups:
            raise rule_error(where, f"'{lig}' is in no group", "add it to a [group.NAME] first")
        ok = isinstance(subs, Mapping) and subs and all(isinstance(n, int) and n > 0 for n in subs.values())
        if not ok or sum(subs.values()) != 3:
            raise rule_error(where, f"'{lig}' = {subs!r} is not three substituents", f'write "{lig}" = {{ Ph = 3 }}')
        out[str(lig)] = tuple(sorted((str(k), int(n)) for k, n in subs.items()))
    return out


def _read_ring_alkyls(table: Any, where: str, groups: Mapping[str, str]) -> dict[str, tuple[tuple[str, int], ...]]:
    if not isinstance(table, Mapping):
        raise rule_error(where, "not a table", 'write "Cp*" = 5')
    out: dict[str, tuple[tuple[str, int], ...]] = {}
    for lig, n in table.items():
        if groups.get(lig) != "eta-ring":
            raise rule_error(where, f"'{lig}' is not in group eta-ring", "list ring ligands only")
        if not isinstance(n, int) or isinstance(n, bool) or n <= 0:
            raise rule_error(where, f"'{lig}' = {n!r} is not a positive count", f'write "{lig}" = 5')
        out[str(lig)] = ((RING_ALKYL, n),)
    return out


def _read_groups(
    path: Path,
) -> tuple[dict[str, str], dict[str, str], dict[str, str], dict[str, tuple[tuple[str, int], ...]]]:
    doc = read_toml(path)
    check_keys(doc, str(path), ("group",), ("substituents", "ring_alkyls"))
    groups: dict[str, str] = {}
    labels: dict[str, str] = {}
    families: dict[str, str] = {}
    for name, table in doc["group"].items():
        where = f"{path} [group.{name}]"
        if not isinstance(table, Mapping):
            raise rule_error(where, "not a table", "write [group.NAME] with label and ligands")
        check_keys(table, where, ("label", "ligands"), ("family",))
        if "family" in table:
            if not isinstance(table["family"], str) or not _NAME.match(f"x:{table['family']}"):
                raise rule_error(where, f"family {table['family']!r} is not a name", 'write family = "phosphorus"')
            families[name] = table["family"]
        ligs = table["ligands"]
        if not isinstance(ligs, list) or not all(isinstance(x, str) and x for x in ligs):
            raise rule_error(where, "'ligands' must be a list of catalogue names", 'write ligands = ["PPh3", ...]')
        labels[name] = str(table["label"])
        for lig in ligs:
            if lig in groups:
                raise rule_error(where, f"ligand '{lig}' is also in group '{groups[lig]}'", "put it in one group only")
            groups[lig] = name
    subs = _read_substituents(doc.get("substituents", {}), f"{path} [substituents]", groups)
    subs.update(_read_ring_alkyls(doc.get("ring_alkyls", {}), f"{path} [ring_alkyls]", groups))
    return groups, labels, families, subs


@cached(maxsize=4)
def _load_group_file(
    path: Path, stamp: tuple[int, int]
) -> tuple[Mapping[str, str], Mapping[str, str], Mapping[str, str], Substituents]:
    groups, labels, families, subs = _read_groups(path)
    return MappingProxyType(groups), MappingProxyType(labels), MappingProxyType(families), MappingProxyType(subs)


def _stamped(path: Path | str | None) -> tuple[Mapping[str, str], Mapping[str, str], Mapping[str, str], Substituents]:
    p = Path(path) if path is not None else GROUPS_FILE
    st = p.stat() if p.exists() else None
    return _load_group_file(p, (st.st_size, st.st_mtime_ns) if st else (0, 0))


def load_families(path: Path | str | None = None) -> Mapping[str, str]:
    """The ligand families: group -> family (the level a group's effects are regularised toward), read-only.

    Parameters
    ----------
    path : Path or str, optional
        A groups file (default: the built-in ``rules/bandgroups.toml``).

    Returns
    -------
    Mapping[str, str]
        Groups without a family (the reporter classes) are absent.
    """
    return _stamped(path)[2]


def load_substituents(path: Path | str | None = None) -> Substituents:
    """Phosphorus ligands split into their three substituents (Tolman's additivity), read-only.

    C. A. Tolman, *Chem. Rev.* 77 (1977) 313: the A1 band of Ni(CO)3(PX1X2X3)
    is 2056.1 + Σ χ_i, one contribution per substituent.  The band model uses
    the same additivity for the effect of a phosphorus ligand.

    Parameters
    ----------
    path : Path or str, optional
        A groups file (default: the built-in ``rules/bandgroups.toml``).

    Alkylated η-rings are listed too, as ((:data:`RING_ALKYL`, number of
    alkyl groups),): Cp* is Cp with five alkyl donors.

    Returns
    -------
    Mapping[str, tuple[tuple[str, int], ...]]
        Ligand -> ((substituent, count), ...); a phosphorus ligand's counts add up to 3.
    """
    return _stamped(path)[3]


def load_groups(path: Path | str | None = None) -> tuple[Mapping[str, str], Mapping[str, str]]:
    """The ligand groups: (ligand -> group, group -> label), read-only.

    Parameters
    ----------
    path : Path or str, optional
        A groups file (default: the built-in ``rules/bandgroups.toml``).

    Returns
    -------
    (Mapping[str, str], Mapping[str, str])

    Raises
    ------
    RuleError
        A missing key, a ligand in two groups, a malformed list.
    """
    groups, labels, _, _ = _stamped(path)
    return groups, labels


def _floats(table: Any, where: str, positive: bool = False) -> dict[str, float]:
    if not isinstance(table, Mapping):
        raise rule_error(where, "not a table", "regenerate the file with python -m enumerator.vibrations.calibrate")
    out = {}
    for k, v in table.items():
        if not _number(v) or (positive and float(v) <= 0):
            raise rule_error(where, f"'{k}' = {v!r} is not a {'positive ' if positive else ''}number", "give a number")
        out[str(k)] = float(v)
    return out


def _check_names(params: Mapping[str, float], where: str) -> None:
    for name in params:
        kind = name.split(":", 1)[0]
        if not _NAME.match(name) or kind not in PARAMETER_KINDS or name.count(":") != PARAMETER_KINDS[kind]:
            raise rule_error(
                where,
                f"parameter name '{name}' is not KIND:CLASS[:WHAT]",
                f"kinds: {', '.join(f'{k} ({n} part(s) after it)' for k, n in PARAMETER_KINDS.items())}",
            )


def _read_bandmodel(path: Path, groups_path: Path) -> BandModelRules:
    doc = read_toml(path)
    check_keys(doc, str(path), ("model", "sigma", "widen", "cv", "parameters"))
    header = doc["model"]
    check_keys(header, f"{path} [model]", _MODEL_KEYS)
    refk = _floats(header["reference_k"], f"{path} [model] reference_k", positive=True)
    params = _floats(doc["parameters"], f"{path} [parameters]")
    _check_names(params, f"{path} [parameters]")
    for name in params:
        if name.startswith("k0:") and name[3:] not in refk:
            raise rule_error(f"{path} [model]", f"no reference_k for class '{name[3:]}'", "regenerate the file")
    sigma = _floats(doc["sigma"], f"{path} [sigma]", positive=True)
    if "pooled" not in sigma:
        raise rule_error(f"{path} [sigma]", "no 'pooled' sigma", "regenerate the file")
    widen = _floats(doc["widen"], f"{path} [widen]", positive=True)
    for key in ("group", "generic"):
        if widen.get(key, 0.0) < 1.0:
            raise rule_error(f"{path} [widen]", f"'{key}' must be a factor >= 1", "regenerate the file")
    groups, labels, families, subs = _stamped(groups_path)
    hdr = dict(header)
    hdr["reference_k"] = MappingProxyType(refk)
    return BandModelRules(
        header=MappingProxyType(hdr),
        parameters=MappingProxyType(params),
        sigma=MappingProxyType(sigma),
        widen=MappingProxyType(widen),
        cv=MappingProxyType(dict(doc["cv"])),
        groups=groups,
        group_labels=labels,
        families=families,
        substituents=subs,
        path=str(path),
    )


@cached(maxsize=4)
def _load_bandmodel(path: Path, groups_path: Path, stamp: tuple[int, int, int, int]) -> BandModelRules:
    return _read_bandmodel(path, groups_path)


def load_bandmodel(path: Path | str | None = None, groups: Path | str | None = None) -> BandModelRules:
    """The fitted band model, validated once (cached by the files' sizes and modification times).

    Parameters
    ----------
    path : Path or str, optional
        A band-model file (default: the built-in ``rules/bandmodel.toml``).
    groups : Path or str, optional
        A groups file (default: the built-in ``rules/bandgroups.toml``).

    Returns
    -------
    BandModelRules

    Raises
    ------
    RuleError
        A missing table or key, a parameter name of no known kind, a
        non-numeric value, a sigma that is not positive, a widening factor below 1.
    """
    p = Path(path) if path is not None else BANDMODEL_FILE
    g = Path(groups) if groups is not None else GROUPS_FILE
    if not p.exists():
        raise rule_error(p, "no band-model file", "run python -m enumerator.vibrations.calibrate to write it")
    s1, s2 = p.stat(), g.stat() if g.exists() else None
    stamp = (s1.st_size, s1.st_mtime_ns, s2.st_size if s2 else 0, s2.st_mtime_ns if s2 else 0)
    return _load_bandmodel(p, g, stamp)
