"""Small numerical helpers shared by the geometry and group modules."""

from __future__ import annotations

import numpy as np

__all__ = ["TOL", "as_matrix", "matrix_key", "normalise"]

#: Tolerance for comparing unit vectors and matrix elements.
TOL = 1e-6


def normalise(v: np.ndarray) -> np.ndarray:
    n = float(np.linalg.norm(v))
    if n < TOL:
        raise ValueError("zero-length vector")
    return v / n


def as_matrix(m: tuple[tuple[float, ...], ...]) -> np.ndarray:
    return np.array(m, dtype=float)


def matrix_key(m: np.ndarray) -> tuple[float, ...]:
    """A hashable, rounding-stable key for a 3x3 matrix (by value)."""
    r = np.round(np.asarray(m, dtype=float), 6) + 0.0
    return tuple(float(x) for x in r.ravel())
