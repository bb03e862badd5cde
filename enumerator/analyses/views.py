"""What the analyses (and the layers between them and the workflow) read of
a result and a request.

A stage is a function ``(result, request) -> analysis | None`` listed in
:data:`enumerator.workflow.pipeline.STAGES`.  The workflow layer sits above
the analyses, so they do not import its ``Result`` and ``Request``; they
state here, as protocols, the little they use of them.  The workflow's
frozen dataclasses satisfy both.
"""

from __future__ import annotations

from dataclasses import Field
from typing import Any, ClassVar, Protocol

from enumerator.isomers.enumeration import Isomer, IsomerSet
from enumerator.model.composition import Composition
from enumerator.model.geometry import Geometry

__all__ = ["ResultView", "RequestView"]


class ResultView(Protocol):
    """A result (so far): composition, geometry, isomers, notes and earlier analyses; a frozen dataclass."""

    __dataclass_fields__: ClassVar[dict[str, Field[Any]]]

    @property
    def composition(self) -> Composition: ...

    @property
    def geometry(self) -> Geometry: ...

    @property
    def geometry_reason(self) -> str: ...

    @property
    def isomer_set(self) -> IsomerSet: ...

    @property
    def isomers(self) -> tuple[Isomer, ...]: ...

    @property
    def notes(self) -> tuple[str, ...]: ...

    def analysis(self, cls: type) -> Any | None: ...


class RequestView(Protocol):
    """The request's rule folders and the descriptor the isomers are picked by."""

    @property
    def rules(self) -> tuple[str, ...]: ...

    @property
    def pick(self) -> str | None: ...
