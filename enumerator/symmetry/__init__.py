"""Symmetry: operations derived from site vectors, point-group identification
(Schoenflies) and computed character tables with Mulliken labels.

This layer knows matrices, points and permutations only; it never sees a
ligand or an isomer.
"""
