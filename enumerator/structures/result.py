"""The structures of every isomer of a result, as one value for the renderers.

:func:`structure_set` builds a :class:`StructureSet`: one
:class:`~enumerator.structures.structure.Structure` per listed isomer, each
title carrying the isomer's IUPAC descriptor when the descriptor stage gave
one.  Writing the files is the renderer's job
(:mod:`enumerator.render.structures`).

>>> from enumerator.workflow.pipeline import analyse
>>> ss = structure_set(analyse("Ma4b2", geometry="OC-6"))
>>> ss.formula, [s.isomer_id for s in ss.structures], ss.structures[0].note
('Ma4b2', ['1', '2'], "metal 'M' is not an element")
>>> "(C2v, OC-6-22)" in ss.structures[0].title  # the descriptor beside the point group
True
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

from enumerator.analyses.descriptors import DescriptorAnalysis
from enumerator.analyses.views import ResultView
from enumerator.structures.build import structures_for
from enumerator.structures.pool import EmbedAhead
from enumerator.structures.structure import Structure

__all__ = ["StructureSet", "structure_set", "descriptor_labels"]


@dataclass(frozen=True)
class StructureSet:
    """The starting structures of one formula's isomers, in listing order."""

    formula: str
    structures: tuple[Structure, ...]

    def to_dict(self) -> dict[str, Any]:
        """A summary per structure: isomer id, kind ('full' or 'core'), note, atom count and title."""
        return {
            "formula": self.formula,
            "structures": [
                {"isomer": s.isomer_id, "kind": s.kind, "note": s.note, "atoms": len(s.symbols), "title": s.title}
                for s in self.structures
            ],
        }


def descriptor_labels(result: ResultView) -> dict[str, str]:
    """Isomer id -> IUPAC descriptor text, where the descriptor stage ran and assigned one.

    Parameters
    ----------
    result : Result
        An analysed formula.

    Returns
    -------
    dict[str, str]
    """
    a = result.analysis(DescriptorAnalysis)
    if a is None:
        return {}
    return {k: d.text for k, d in a.descriptors if d.text}


def structure_set(
    result: ResultView, progress: Callable[[str, int, int], None] | None = None, ahead: EmbedAhead | None = None
) -> StructureSet:
    """Starting structures of every listed isomer of a result, descriptors in the titles.

    Parameters
    ----------
    result : Result
        An analysed formula.
    progress : callable, optional
        Called as ``progress(isomer id, done, total)`` after each structure (a progress bar).
    ahead : EmbedAhead, optional
        Embeddings worked out ahead for several results (:func:`.build.embed_ahead`); default: this result's.

    Returns
    -------
    StructureSet
    """
    labels = descriptor_labels(result)
    return StructureSet(result.composition.formula, structures_for(result, labels, progress, ahead))
