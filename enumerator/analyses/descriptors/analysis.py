"""The descriptor stage: every isomer's descriptor and IUPAC name, for a result.

:func:`descriptor_stage` (listed in :data:`enumerator.workflow.pipeline.STAGES`)
returns a :class:`DescriptorAnalysis`: the descriptors by isomer id, the basis
of the priorities, whether priming was applied, the descriptors shared by
several diastereomers (polyhedra without an index rule), the chiral isomers
left without a symbol, and the additive names (IR-9.2,
:mod:`enumerator.analyses.names`) of a real formula.  With the request option
``pick`` it checks that some isomer matches; :func:`select_isomers` then cuts
the result down to them.

>>> from enumerator.workflow.pipeline import analyse
>>> r = analyse("[Co(NH3)3(NO2)3]")
>>> a = r.analysis(DescriptorAnalysis)
>>> [d.text for _, d in a.descriptors], a.names[0][1]
(['OC-6-22', 'OC-6-21'], '(OC-6-22)-triamminetrinitrito-κN-cobalt(III)')
>>> [i.id for i in select_isomers(r, "mer").isomers]
['2']
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import replace
from functools import cached_property
from typing import Any, TypeVar

from enumerator.analyses.cip import uses_letters
from enumerator.analyses.descriptors.describe import Descriptor, describe_set
from enumerator.analyses.descriptors.select import picked_ids
from enumerator.analyses.names import additive_name
from enumerator.analyses.views import RequestView, ResultView
from enumerator.errors import IsosieveError
from enumerator.frozen import frozen_dataclass
from enumerator.isomers.enumeration import IsomerSet
from enumerator.rules.ruleset import load_rules

__all__ = ["DescriptorAnalysis", "descriptor_analysis", "descriptor_stage", "select_isomers"]

#: The JSON ``descriptor_rules.source``.
SOURCE = "IUPAC Nomenclature of Inorganic Chemistry (2005), IR-9.3"
#: Above this many sharing isomers the per-isomer ``shared_with`` list is left out for a bare polyhedral symbol.
SHARED_LIST_MAX = 50


@frozen_dataclass
class DescriptorAnalysis:
    """Per-isomer IUPAC descriptors and names of a result; adds JSON ``descriptor``, ``priorities``,
    ``descriptor_detail`` and ``name`` per isomer and ``descriptor_rules`` at the top."""

    descriptors: tuple[tuple[str, Descriptor], ...]
    basis: str
    primed: bool
    shared: tuple[tuple[str, tuple[str, ...]], ...] = ()
    error: str | None = None
    #: chiral isomers for which no chirality symbol could be decided
    no_symbol: tuple[str, ...] = ()
    #: IUPAC additive names by isomer id (real formulas), or why there are none
    names: tuple[tuple[str, str], ...] = ()
    name_note: str | None = None

    @cached_property
    def _by_id(self) -> Mapping[str, Descriptor]:
        # the first descriptor listed under each id, as the scan it replaces found it
        out: dict[str, Descriptor] = {}
        for k, d in self.descriptors:
            out.setdefault(k, d)
        return out

    @cached_property
    def _shared_by_key(self) -> Mapping[str, tuple[tuple[str, ...], frozenset[str]]]:
        return {k: (ids, frozenset(ids)) for k, ids in self.shared}

    @cached_property
    def _names_by_id(self) -> Mapping[str, str]:
        return dict(self.names)

    def get(self, isomer_id: str) -> Descriptor | None:
        """The descriptor of one isomer, or None."""
        return self._by_id.get(isomer_id)

    def _detail(self, isomer_id: str, d: Descriptor) -> dict[str, Any]:
        detail: dict[str, Any] = {
            "polyhedral_symbol": d.polyhedral_symbol,
            "configuration_index": d.configuration_index,
            "chirality": d.chirality,
            "C/A": d.ca,
            "skew_lines": d.skew,
            "R/S": d.rs,
            "prefix": d.prefix,
            "primed": d.primed,
            "rule": d.rule,
        }
        group = self._shared_by_key.get(d.stereo_free)
        if group and group[0]:
            shared, members = group
            # ids are distinct within a group (they are isomer ids), so the
            # others number one fewer when this isomer is among them
            count = len(shared) - (1 if isomer_id in members else 0)
            detail["shared_count"] = count
            # the list is linear per isomer (quadratic overall): build it only
            # where it is written, not when every isomer shares a bare
            # polyhedral symbol
            if d.configuration_index is not None or count <= SHARED_LIST_MAX:
                detail["shared_with"] = [i for i in shared if i != isomer_id]
        return detail

    def isomer_json(self, isomer_id: str) -> Mapping[str, Any]:
        """``descriptor``, ``priorities`` (site number -> priority as written), ``descriptor_detail``, ``name``."""
        d = self.get(isomer_id)
        if d is None:
            return {"descriptor": None, "priorities": None}
        return {
            "descriptor": d.text,
            "priorities": {str(i + 1): p for i, p in d.priority_pairs},
            "descriptor_detail": self._detail(isomer_id, d),
            "name": self._names_by_id.get(isomer_id),
        }

    def top_json(self) -> Mapping[str, Any]:
        """``descriptor_rules``: source, basis of the priorities, priming; error, symbol-less chiral isomers
        and why names are missing, where they apply."""
        rules: dict[str, Any] = {"source": SOURCE, "priorities": self.basis, "priming": self.primed}
        if self.error:
            rules["error"] = self.error
        if self.no_symbol:
            rules["chiral_without_symbol"] = list(self.no_symbol)
        if self.name_note:
            rules["names"] = self.name_note
        return {"descriptor_rules": rules}


def descriptor_analysis(isomer_set: IsomerSet) -> DescriptorAnalysis:
    """The descriptors of every isomer of a set (no names).

    Parameters
    ----------
    isomer_set : IsomerSet
        The isomers listed.

    Returns
    -------
    DescriptorAnalysis
        With ``error`` set (and no descriptors) where they cannot be assigned, e.g. a ligand without SMILES.
    """
    comp = isomer_set.composition
    basis = "the letter order a > b > c (abstract ligands)" if uses_letters(comp) else "the CIP rules (ligand SMILES)"
    try:
        ds = describe_set(isomer_set)
    except IsosieveError as exc:
        return DescriptorAnalysis((), basis, False, (), exc.line())
    by: dict[str, set[int]] = {}
    ids: dict[str, list[str]] = {}
    for iso in isomer_set.isomers:
        key = ds[iso.id].stereo_free
        by.setdefault(key, set()).add(iso.number)
        ids.setdefault(key, []).append(iso.id)
    shared = tuple((k, tuple(ids[k])) for k in sorted(by) if len(by[k]) > 1)
    primed = any(d.primed for d in ds.values())
    no_symbol = tuple(i.id for i in isomer_set.isomers if i.chiral and ds[i.id].chirality is None)
    return DescriptorAnalysis(
        tuple((i.id, ds[i.id]) for i in isomer_set.isomers), basis, primed, shared, None, no_symbol
    )


def _with_names(a: DescriptorAnalysis, res: ResultView, req: RequestView) -> DescriptorAnalysis:
    """Add the additive names (real formulas only)."""
    comp = res.composition
    if comp.metal == "M" or a.error or not a.descriptors:
        return a
    rules = load_rules(req.rules)
    several = res.isomer_set.stereoisomers > 1
    names = []
    for k, d in a.descriptors:
        n = additive_name(comp, rules, d.text if several else None)
        if n.name is None:
            return replace(a, name_note=n.reason)
        names.append((k, n.name))
    return replace(a, names=tuple(names))


def descriptor_stage(res: ResultView, req: RequestView) -> DescriptorAnalysis:
    """Pipeline stage: descriptors and names for every isomer.

    Raises
    ------
    InputError
        With the request option ``pick``, when no isomer matches it (the message lists the descriptors present).

    Parameters
    ----------
    res : Result
        The result so far.
    req : Request
        Its request (rule folders; option ``pick``).

    Returns
    -------
    DescriptorAnalysis
    """
    a = _with_names(descriptor_analysis(res.isomer_set), res, req)
    pick = req.pick
    if pick:
        picked_ids(a.descriptors, pick, res.composition.formula, a.error)
    return a


R = TypeVar("R", bound=ResultView)


def select_isomers(res: R, text: str) -> R:
    """The result cut down to the isomers whose descriptor matches ``text``, with a note saying so.

    Parameters
    ----------
    res : Result
        An analysed formula (its descriptor analysis is used, or computed).
    text : str
        A descriptor, part of one, or a prefix (:func:`~enumerator.analyses.descriptors.select.matches`).

    Returns
    -------
    Result
        The same result with only the matching isomers and one more note.

    Raises
    ------
    InputError
        Nothing matches (the message lists the descriptors present).
    """
    a = res.analysis(DescriptorAnalysis) or descriptor_analysis(res.isomer_set)
    keep = set(picked_ids(a.descriptors, text, res.composition.formula, a.error))
    iso = res.isomer_set
    chosen = tuple(i for i in iso.isomers if i.id in keep)
    note = f"--pick {text}: {len(chosen)} of {iso.stereoisomers} stereoisomer(s) shown"
    return replace(res, isomer_set=replace(iso, isomers=chosen), notes=res.notes + (note,))
