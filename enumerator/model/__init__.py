"""Value objects of the chemistry: coordination geometries (site vectors and
their derived symmetry), compositions (ligand kinds and counts) and element
data.

:mod:`~enumerator.model.geometry` holds :class:`~enumerator.model.geometry.Geometry`,
:mod:`~enumerator.model.composition` holds
:class:`~enumerator.model.composition.LigandKind` and
:class:`~enumerator.model.composition.Composition`, and
:mod:`~enumerator.model.elements` answers periodic-table questions.
"""

from enumerator.model.composition import ARRANGEMENTS, Composition, LigandKind
from enumerator.model.geometry import SPANS, Geometry

__all__ = ["Geometry", "SPANS", "LigandKind", "Composition", "ARRANGEMENTS"]
