"""One isomer's starting structure as plain data."""

from __future__ import annotations

from dataclasses import dataclass

from enumerator.structures.placement import Vec

__all__ = ["Structure"]


@dataclass(frozen=True)
class Structure:
    """One isomer's starting structure.

    ``kind`` is 'full' or 'core'; ``title`` is the one-line description
    written as the XYZ comment and the SDF title; ``symbols``/``coords`` are
    the atoms (metal first) in angstrom; ``molblock`` the SDF record (without
    the ``$$$$`` terminator); ``note`` says why a core was written, or what
    clash remains in a full structure.
    """

    isomer_id: str
    kind: str
    title: str
    symbols: tuple[str, ...]
    coords: tuple[Vec, ...]
    charge: int
    note: str
    molblock: str
