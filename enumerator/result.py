"""The plain data every renderer reads.

A :class:`Result` is what one request (one formula with its options)
produces.  Analyses added by later stages (stretch modes, descriptors,
centre chemistry, ...) hang off it as further fields with defaults, so
renderers can show whatever is present.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from .composition import Composition
from .geometry import Geometry
from .isomers import IsomerSet

__all__ = ["Result", "SCHEMA_VERSION"]

#: Bumped only when a key is removed or changes meaning; new keys do not bump it.
SCHEMA_VERSION = 1


@dataclass(frozen=True)
class Result:
    """One formula's answer."""

    composition: Composition
    geometry: Geometry
    geometry_reason: str
    isomer_set: IsomerSet
    notes: tuple[str, ...] = ()
    extras: dict[str, Any] = field(default_factory=dict, compare=False)

    @property
    def isomers(self):
        return self.isomer_set.isomers
