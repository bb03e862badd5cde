"""Symmetry: operations derived from site vectors, point-group identification
(Schoenflies) and computed character tables with Mulliken labels.

This layer knows matrices, points and permutations only; it never sees a
ligand, an isomer or a file.  The modules, in the order the data flows:

* :mod:`~enumerator.symmetry.derive` - operations and polyhedron edges from site vectors;
* :mod:`~enumerator.symmetry.operations` - one operation described (C_n^k, S_n^k, sigma, i),
  Schoenflies identification of a group;
* :mod:`~enumerator.symmetry.groups` - named groups closed from generators;
* :mod:`~enumerator.symmetry.dixon` - classes and characters (Burnside-Dixon);
* :mod:`~enumerator.symmetry.frames` - the axis rule;
* :mod:`~enumerator.symmetry.labels` - class and Mulliken labels;
* :mod:`~enumerator.symmetry.functions` - the functions column by projection;
* :mod:`~enumerator.symmetry.chartable` - the table as a value, and its entry points;
* :mod:`~enumerator.symmetry.linear` - a linear centre's species by correlation.

>>> from enumerator.symmetry import named_table, schoenflies
>>> t = named_table("C3v")
>>> [i.label for i in t.irreps], schoenflies(group_matrices("C3v"))
(['A1', 'A2', 'E'], 'C3v')
"""

from enumerator.symmetry.chartable import (
    CharacterTable,
    ConjugacyClass,
    Irrep,
    SiteGeometry,
    character_table,
    format_character,
    named_table,
    table_from_matrices,
)
from enumerator.symmetry.derive import derive_operations, is_collinear, polyhedron_edges
from enumerator.symmetry.frames import AXIS_RULE
from enumerator.symmetry.groups import GROUP_NAME, close_group, group_generators, group_matrices
from enumerator.symmetry.linear import LINEAR_CORRELATION, LINEAR_IR, LINEAR_RAMAN
from enumerator.symmetry.operations import (
    LINEAR_GROUPS,
    GroupIdentificationError,
    OpInfo,
    SymOp,
    describe,
    schoenflies,
)

__all__ = [
    "SymOp",
    "OpInfo",
    "describe",
    "schoenflies",
    "GroupIdentificationError",
    "LINEAR_GROUPS",
    "derive_operations",
    "polyhedron_edges",
    "is_collinear",
    "GROUP_NAME",
    "group_generators",
    "close_group",
    "group_matrices",
    "AXIS_RULE",
    "CharacterTable",
    "ConjugacyClass",
    "Irrep",
    "SiteGeometry",
    "character_table",
    "table_from_matrices",
    "named_table",
    "format_character",
    "LINEAR_CORRELATION",
    "LINEAR_IR",
    "LINEAR_RAMAN",
]
