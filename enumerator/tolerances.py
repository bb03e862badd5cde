"""Numeric tolerances of the symmetry and geometry code, in one place, with units.

Site directions are unit vectors and symmetry operations are orthogonal
matrices, so most tolerances below are dimensionless: a difference of
components of unit vectors, of matrix elements, or a distance measured in
units of the (unit) length of a site vector.  Angles carry their unit in the
name.  Each constant says what it decides; change one only with the tests of
:mod:`enumerator.symmetry` and :mod:`enumerator.model.geometry` at hand.

Geometry files should give their vectors to 10 or more significant figures:
the loosest tolerance that decides whether an operation exists is
:data:`OPERATION_MATCH_TOL` (1e-5).  Vectors typed with fewer figures are
symmetrised when a user file is read (:data:`SITE_SNAP_TOL`,
:mod:`enumerator.rules.snapping`).

>>> OPERATION_MATCH_TOL > VECTOR_TOL
True
>>> TRANS_ANGLE_DEG
179.0
"""

from __future__ import annotations

__all__ = [
    "VECTOR_TOL",
    "OPERATION_MATCH_TOL",
    "ELEMENT_TOL",
    "ANGLE_TOL",
    "TURN_FRACTION_TOL",
    "MAX_ROTATION_ORDER",
    "TRANS_ANGLE_DEG",
    "FACE_TOL",
    "DEGENERATE_FACE_TOL",
    "NOISE_FLOOR",
    "KEY_DECIMALS",
    "AXIS_KEY_DECIMALS",
    "FINE_DECIMALS",
    "PERPENDICULAR_PART_MIN",
    "CHARACTER_TOL",
    "EXACT_VALUE_TOL",
    "EIGENVALUE_GAP_TOL",
    "DIXON_RESIDUAL_TOL",
    "PROJECTION_TOL",
    "SITE_SNAP_TOL",
    "SITE_AMBIGUITY_TOL",
]

# --- vectors and operations -------------------------------------------------

#: Unit-vector components and orthogonal-matrix elements, dimensionless.  Decides
#: whether two unit vectors are parallel or perpendicular (dot products), whether
#: site vectors are collinear (matrix rank), which component of an axis counts as
#: its first non-zero one (sign convention), and whether a matrix is the inversion
#: (trace -3).
VECTOR_TOL = 1e-6

#: Distance between a mapped site tip and a site tip, in site-vector lengths
#: (dimensionless).  An orthogonal map is a symmetry operation of a geometry only
#: if it sends every site tip within this distance of a site tip; products of
#: operations are matched to the same resolution when the multiplication table
#: is built.
OPERATION_MATCH_TOL = 1e-5

#: Distance of a site tip from a symmetry element, in site-vector lengths, and
#: the matching deviation of an axis component from 0 or 1 (dimensionless).
#: Decides whether a site lies on a rotation axis or in a mirror plane, whether an
#: axis lies along a frame axis, and whether two axes are perpendicular, when the
#: axis rule chooses x, y, z and when classes and species are labelled.
ELEMENT_TOL = 1e-5

#: Rotation angle in radians below which a proper (or the rotation part of an
#: improper) operation counts as no rotation at all: the identity (or a pure
#: reflection).  The smallest true angle recognised is 2 pi / MAX_ROTATION_ORDER.
ANGLE_TOL = 1e-4

#: Deviation, in units of k, of an operation's angle theta from k/n of a full
#: turn (k = theta n / 2 pi, dimensionless).  Decides the order n and power k of
#: C_n^k and S_n^k.
TURN_FRACTION_TOL = 1e-4

#: The largest rotation order n tried when an angle is written as k/n of a turn.
MAX_ROTATION_ORDER = 60

#: Angle between two sites, in degrees, at or above which they are trans (below
#: it, cis).
TRANS_ANGLE_DEG = 179.0

# --- polyhedra ----------------------------------------------------------------

#: Distance of a site tip from a candidate face plane, in site-vector lengths
#: (dimensionless).  Tips closer than this lie on the face; a plane is a face of
#: the convex hull when every tip lies on one side within this distance.
FACE_TOL = 1e-6

#: Length of the cross product of two tip-difference vectors (twice a triangle's
#: area, in squared site-vector lengths) below which three tips are taken as
#: collinear and span no face plane.
DEGENERATE_FACE_TOL = 1e-9

#: Matrix elements smaller than this in magnitude (dimensionless) are stored as
#: an exact 0.0 in a derived operation, so that float noise (1e-17, -0.0) never
#: reaches a cache key or a printed matrix.
NOISE_FLOOR = 1e-12

#: Decimal places kept when a matrix or an axis is used as a key by value
#: (operation de-duplication, group closure, Schoenflies cache, axis keys).
KEY_DECIMALS = 6

#: Decimal places kept when rotation axes are grouped by direction to find each
#: axis's highest-order rotation (axis rule).
AXIS_KEY_DECIMALS = 5

#: Decimal places kept when matrices given by a caller are stored as a cache key,
#: and when a table's frame axes are stored: finer than any tolerance above,
#: coarse enough to merge float noise.
FINE_DECIMALS = 9

#: Length of the part of a lab axis perpendicular to z (dimensionless) below which
#: that lab axis is too close to z to serve as the default x direction.
PERPENDICULAR_PART_MIN = 1e-3

# --- characters ---------------------------------------------------------------

#: Deviation of a character value from an exact value, dimensionless.  Decides
#: which exact algebraic value a computed character is (integers, sqrt2, sqrt3,
#: 2cos(2 pi k/n)), whether a character is real or one of a complex-conjugate
#: pair, and whether a reduction gave a whole multiplicity.
CHARACTER_TOL = 1e-6

#: Deviation of a tabulated exact character value from the nearest integer below
#: which it is written as that integer (dimensionless).
EXACT_VALUE_TOL = 1e-9

#: Smallest separation of two eigenvalues of the combined class matrix for which
#: the Burnside-Dixon diagonalisation is accepted (dimensionless); closer
#: eigenvalues mean the combination was not generic and other weights are tried.
EIGENVALUE_GAP_TOL = 1e-7

#: Largest residual of the class-matrix eigen-equations A_j w = omega_j w
#: (dimensionless) for which the common eigenvectors are accepted.
DIXON_RESIDUAL_TOL = 1e-6

#: Residual, dimensionless, below which a function lies in the image of a
#: species' projector, a set of functions is linearly independent (matrix rank),
#: and a set of partner functions spans an invariant subspace.
PROJECTION_TOL = 1e-7

# --- typed-in geometries ------------------------------------------------------

#: Distance, in site-vector lengths (dimensionless; 0.01 is about 0.57 degrees), within which a user
#: geometry's sites are taken to have a symmetry they nearly have: an orthogonal map that sends every tip
#: this close to a tip is a symmetry operation, and the vectors are moved (snapped) onto the exactly
#: symmetric set.  Vectors typed to three significant figures ([-0.5, 0.866, 0]) are off by about 1e-3,
#: two figures by up to about 9e-3.
SITE_SNAP_TOL = 1e-2

#: A looser distance (about 1.7 degrees) at which more symmetry must NOT appear: sites that are within
#: :data:`SITE_SNAP_TOL` of one group but within this of a larger one are ambiguous (neither clearly that
#: symmetric nor clearly distorted) and the geometry file is refused.
SITE_AMBIGUITY_TOL = 3e-2
