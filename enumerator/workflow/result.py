"""The plain data every renderer reads.

A :class:`Result` is what one request (one formula with its options)
produces: the composition, the geometry and why it was chosen, the isomers,
and one :class:`Analysis` per later stage (stretch modes, centre chemistry,
descriptors, ...).  Renderers know nothing of the chemistry: they ask each
analysis for its JSON keys, its table columns and its text sections.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any, Protocol, runtime_checkable

from enumerator.isomers.enumeration import IsomerSet
from enumerator.model.composition import Composition
from enumerator.model.geometry import Geometry
from enumerator.schema import SCHEMA_VERSION

__all__ = ["Result", "Analysis", "Column", "Section", "SCHEMA_VERSION"]



@dataclass(frozen=True)
class Column:
    """One extra table column: a header and a cell per isomer id.

    ``latex`` optionally gives the cells typeset for LaTeX (else they are
    escaped as plain text).  A ``wide`` column (a full name) is left out of
    the terminal table and kept in the written tables and the report."""

    header: str
    values: Mapping[str, str]
    latex: Mapping[str, str] | None = None
    wide: bool = False


@dataclass(frozen=True)
class Section:
    """A titled block of text shown after the isomer table."""

    title: str
    text: str


@runtime_checkable
class Analysis(Protocol):
    """What a stage adds to a Result.  Implementations are frozen dataclasses."""

    def isomer_json(self, isomer_id: str) -> Mapping[str, Any]:
        """Keys added to one isomer's JSON object."""
        ...

    def top_json(self) -> Mapping[str, Any]:
        """Keys added at the top level of the JSON document."""
        ...

    def columns(self) -> Sequence[Column]:
        """Extra columns for the isomer tables."""
        ...

    def sections(self) -> Sequence[Section]:
        """Text blocks for the readable output."""
        ...


@dataclass(frozen=True)
class Result:
    """One formula's answer."""

    composition: Composition
    geometry: Geometry
    geometry_reason: str
    isomer_set: IsomerSet
    notes: tuple[str, ...] = ()
    analyses: tuple[Any, ...] = field(default=())

    @property
    def isomers(self):
        return self.isomer_set.isomers

    def analysis(self, cls: type) -> Any | None:
        """The analysis of the given class, if the pipeline ran it."""
        for a in self.analyses:
            if isinstance(a, cls):
                return a
        return None
