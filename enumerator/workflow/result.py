"""The plain data every renderer reads, and its JSON shape.

A :class:`Result` is what one request (one formula with its options)
produces: the composition, the geometry and why it was chosen, the isomers,
and one analysis per later stage (centre chemistry, safety, descriptors,
stretch modes, ...).  Each analysis is a frozen data object that knows the
JSON keys it adds (the :class:`Analysis` protocol) and nothing about text:
tables and text sections are drawn by :mod:`enumerator.render`.

:meth:`Result.to_dict` is the one place that defines the JSON document
(README, "JSON schema"); keys are only ever added, never renamed, and floats
are rounded so that the same input gives byte-identical output.

>>> from enumerator.workflow.pipeline import analyse
>>> doc = analyse("Ma5b", geometry="OC-6").to_dict()
>>> doc["schema_version"], doc["geometric_isomers"], doc["isomers"][0]["point_group"]
(1, 1, 'C4v')
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import field
from typing import TYPE_CHECKING, Any, Protocol, runtime_checkable

from enumerator.caches import cached
from enumerator.frozen import frozen_dataclass
from enumerator.isomers.enumeration import Isomer, IsomerSet
from enumerator.model.composition import Composition
from enumerator.model.geometry import Geometry
from enumerator.schema import SCHEMA_VERSION

if TYPE_CHECKING:
    import pandas as pd

__all__ = ["Result", "Analysis", "isomer_to_dict", "SCHEMA_VERSION"]


@runtime_checkable
class Analysis(Protocol):
    """What a stage adds to a Result: JSON keys per isomer and at the top.

    Implementations are frozen dataclasses; their table columns and text
    sections are drawn by :mod:`enumerator.render.sections`."""

    def isomer_json(self, isomer_id: str) -> Mapping[str, Any]:
        """Keys added to one isomer's JSON object."""
        ...

    def top_json(self) -> Mapping[str, Any]:
        """Keys added at the top level of the JSON document."""
        ...


def _rounded(x: float) -> float:
    v = round(float(x), 6)
    return 0.0 if v == 0 else v


@cached(maxsize=4096)
def _rounded_position(position: tuple[float, ...]) -> tuple[float, ...]:
    """A site position rounded as written (sites of one geometry share a few positions)."""
    return tuple(_rounded(c) for c in position)


def _site_dict(s: Any) -> dict[str, Any]:
    d: dict[str, Any] = {
        "position": list(_rounded_position(tuple(s.position))),
        "ligand": s.ligand,
        "donor": s.donor,
        "unit": s.unit,
        "donor_index": s.donor_index,
    }
    if s.ring:
        d["ring"] = True
    return d


def isomer_to_dict(iso: Isomer, seen: dict[int, dict[str, Any]] | None = None) -> dict[str, Any]:
    """The JSON object of one isomer before the analyses add their keys.

    Parameters
    ----------
    iso : Isomer
        One stereoisomer.
    seen : dict, optional
        The site objects already written in this document (by ``id``; the
        isomers of one listing share equal sites): each is copied, not built
        again.  Every isomer still gets dicts and lists of its own.

    Returns
    -------
    dict
        ``id``, ``number``, ``point_group``, ``chiral``, ``enantiomer`` and
        ``sites`` (position rounded to 6 decimals, ligand, donor, unit,
        donor_index, and ``ring`` for an η-ring site).
    """
    seen = {} if seen is None else seen
    sites = []
    for s in iso.sites:
        t = seen.get(id(s))
        if t is None:
            t = seen[id(s)] = _site_dict(s)
        d = dict(t)
        d["position"] = list(t["position"])
        sites.append(d)
    return {
        "id": iso.id,
        "number": iso.number,
        "point_group": iso.point_group,
        "chiral": iso.chiral,
        "enantiomer": iso.enantiomer,
        "sites": sites,
    }


@frozen_dataclass
class Result:
    """One formula's answer."""

    composition: Composition
    geometry: Geometry
    geometry_reason: str
    isomer_set: IsomerSet
    notes: tuple[str, ...] = ()
    analyses: tuple[Analysis, ...] = field(default=())

    @property
    def isomers(self) -> tuple[Isomer, ...]:
        """The listed stereoisomers, in order."""
        return self.isomer_set.isomers

    def analysis(self, cls: type) -> Any | None:
        """The analysis of the given class, if the pipeline ran it."""
        for a in self.analyses:
            if isinstance(a, cls):
                return a
        return None

    def to_dict(self) -> dict[str, Any]:
        """The JSON document of this result.

        Returns
        -------
        dict
            The fixed keys (schema version, formula, geometry, counts, the
            isomers, notes), then every analysis's keys in stage order: its
            ``isomer_json`` merged into each isomer's object and its
            ``top_json`` into the document.
        """
        iso = self.isomer_set
        seen: dict[int, dict[str, Any]] = {}  # the sites' objects stay alive (the isomers hold them)
        doc: dict[str, Any] = {
            "schema_version": SCHEMA_VERSION,
            "formula": self.composition.formula,
            "geometry": self.geometry.symbol,
            "geometry_reason": self.geometry_reason,
            "stereoisomers": iso.stereoisomers,
            "geometric_isomers": iso.geometric_isomers,
            "complete": iso.complete,
            "isomers": [isomer_to_dict(i, seen) for i in iso.isomers],
            "notes": list(self.notes),
        }
        for a in self.analyses:
            for d, i in zip(doc["isomers"], iso.isomers):
                d.update(a.isomer_json(i.id))
            doc.update(a.top_json())
        return doc

    def to_dataframe(self, wide: bool = True) -> pd.DataFrame:
        """The isomer table as a pandas DataFrame: one row per stereoisomer, the columns of every written table
        (:mod:`enumerator.workflow.table`); ``attrs["kinds"]`` says how each column is typeset.

        Parameters
        ----------
        wide : bool, optional
            Keep the wide columns (the IUPAC name).

        Returns
        -------
        pandas.DataFrame
        """
        from enumerator.workflow.table import result_frame

        return result_frame(self, wide)

    def __repr__(self) -> str:
        iso = self.isomer_set
        more = "" if iso.complete else "+"
        return (
            f"<Result {self.composition.formula} on {self.geometry.symbol}: "
            f"{iso.geometric_isomers}{more} geometric, {iso.stereoisomers}{more} stereoisomers>"
        )

    def _repr_html_(self) -> str:
        """A compact summary for a notebook: the heading, one row per isomer (id, point group, descriptor,
        band counts), the cautions."""
        import html

        iso = self.isomer_set
        df = self.to_dataframe(wide=False)
        keep = [c for c in df.columns if c not in ("formula", "geometry", "chiral", "sites", "NMR environments")]
        head = (
            f"<p><b>{html.escape(self.composition.formula)}</b> on {html.escape(self.geometry.symbol)} "
            f"({html.escape(self.geometry.name)}): {iso.geometric_isomers} geometric isomer(s), "
            f"{iso.stereoisomers} stereoisomer(s){'' if iso.complete else ' (incomplete)'}</p>"
        )
        from enumerator.analyses.safety import SafetyAnalysis

        safety = self.analysis(SafetyAnalysis)
        tail = "".join(f"<p><b>Safety:</b> {html.escape(line)}</p>" for line in (safety.lines if safety else ()))
        return head + df[keep].to_html(index=False, escape=True, na_rep="") + tail
