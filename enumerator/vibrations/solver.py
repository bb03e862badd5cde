"""Normal modes of a force-field model: Wilson's GF method per symmetry block.

* **GF method** (E. B. Wilson, J. C. Decius and P. C. Cross, *Molecular
  Vibrations*, McGraw-Hill 1955).  The oscillators share no atom, so G is
  diagonal, G_ii = 1/m_X + 1/m_Y (inverse reduced mass, u^-1).  Eigenvalues
  λ of GF come from the symmetric problem G^½ F G^½ y = λ y and give
  wavenumbers ν̃ = C·√λ with C = (1/2πc)·√(1 mdyn Å^-1 / 1 u) = 1302.79
  cm^-1 (:data:`WAVENUMBER_FACTOR`, from the CODATA 2018 exact values of c
  and N_A).
* **Species.**  The oscillator space is first split into one block per
  symmetry species by projection with the isomer's character table
  (:func:`symmetry_blocks`; the table is
  :func:`enumerator.isomers.tables.table_for_isomer`, and a linear centre's
  species are correlated from a finite proxy group by
  :mod:`enumerator.symmetry.linear`).  Each block is diagonalised on its own,
  so every band carries exactly one Mulliken label even when two species
  happen to coincide.
* **Intensities** follow the bond-dipole model on the ideal geometry: each
  oscillator's dipole derivative points along its site vector e_i, so a mode
  with internal-coordinate eigenvector L = G^½·y has I ∝ |Σ_i L_i e_i|².
  Degenerate modes add their components.  Values are relative to the
  strongest band of the class.

:func:`solve_modes` gives the modes with their eigenvectors (what the fits
need for their Jacobians); :func:`solve` only the bands.

>>> round(WAVENUMBER_FACTOR, 2)
1302.79
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import field
from typing import Any

import numpy as np

from enumerator.caches import cached
from enumerator.errors import InputError, IsosieveError
from enumerator.frozen import frozen_dataclass
from enumerator.isomers.enumeration import Isomer
from enumerator.vibrations.model import Model

__all__ = [
    "WAVENUMBER_FACTOR",
    "ZERO_INTENSITY",
    "Band",
    "Mode",
    "NormalModes",
    "SymmetryBlock",
    "SymmetryBlocks",
    "symmetry_blocks",
    "solve_modes",
    "solve",
]

# CODATA 2018 exact values: speed of light (m/s) and Avogadro constant (1/mol).
_C_LIGHT = 299_792_458.0
_N_A = 6.022_140_76e23
#: cm^-1 per sqrt(mdyn Å^-1 u^-1): ν̃ = WAVENUMBER_FACTOR * sqrt(λ) (= 1302.79).
WAVENUMBER_FACTOR = math.sqrt(100.0 / (1e-3 / _N_A)) / (2 * math.pi * _C_LIGHT * 100.0)

#: Relative intensity below which a band counts as zero (symmetry-forbidden).
ZERO_INTENSITY = 1e-9


def _frozen(a: np.ndarray) -> np.ndarray:
    """A read-only copy, safe to hand out from a cache."""
    out = np.array(a, dtype=float)
    out.setflags(write=False)
    return out


# --------------------------------------------------------------------------
# symmetry blocks


@frozen_dataclass
class SymmetryBlock:
    """The oscillator subspace of one symmetry species.

    ``label`` is the Mulliken label (None without a character table);
    ``dimension`` the irrep dimension; ``basis`` n x m orthonormal columns
    (read-only); ``ir_allowed`` / ``raman_allowed`` the selection rules of the
    species (None without a table).
    """

    label: str | None
    dimension: int
    basis: np.ndarray = field(compare=False)
    ir_allowed: bool | None = None
    raman_allowed: bool | None = None


@frozen_dataclass
class SymmetryBlocks:
    """The split of an oscillator space into species.

    ``species`` is the representation as a string ('2A1 + B1 + B2'), or None
    with ``note`` saying why no labels could be given (then one unlabelled
    block holds the whole space).
    """

    blocks: tuple[SymmetryBlock, ...]
    species: str | None
    note: str | None = None


def _perm_matrices(isomer: Isomer, sites: Sequence[int]) -> dict[int, np.ndarray]:
    pos = {s: k for k, s in enumerate(sites)}
    ops = isomer.geometry.operations
    out = {}
    for k in isomer.stabiliser:
        perm = ops[k].perm
        p = np.zeros((len(sites), len(sites)))
        for s in sites:
            p[pos[perm[s]], pos[s]] = 1.0
        out[k] = p
    return out


def _table(isomer: Isomer) -> tuple[Any, dict[int, int], Mapping[str, str] | None, Any, Any]:
    """(table, op index -> class position, label map, IR set, Raman set).

    A linear centre's group is infinite; its stabiliser is carried by a
    finite D2h / C2v proxy whose species are correlated to D∞h / C∞v
    (the correlation is :mod:`enumerator.symmetry.linear`)."""
    from enumerator.isomers.tables import table_for_isomer
    from enumerator.symmetry.chartable import table_from_matrices
    from enumerator.symmetry.linear import LINEAR_CORRELATION, LINEAR_IR, LINEAR_RAMAN

    geo = isomer.geometry
    if not geo.linear:
        table = table_for_isomer(isomer)
        op_class = dict(zip(table.op_indices, table.class_of))
        return table, op_class, None, None, None
    ops = geo.operations
    proxy = table_from_matrices([ops[k].array for k in isomer.stabiliser], geo.vectors)
    op_class = {k: proxy.class_of[pos] for pos, k in enumerate(isomer.stabiliser)}
    group = "Dinfh" if proxy.group == "D2h" else "Cinfv"
    return proxy, op_class, LINEAR_CORRELATION[group], LINEAR_IR, LINEAR_RAMAN


def _unlabelled(n: int, note: str) -> SymmetryBlocks:
    return SymmetryBlocks((SymmetryBlock(None, 1, _frozen(np.eye(n))),), None, note)


def _projected(irrep: Any, mats: Mapping[int, np.ndarray], op_class: Mapping[int, int], want: int) -> np.ndarray:
    """Orthonormal basis of the image of the projection operator of ``irrep``."""
    n = next(iter(mats.values())).shape[0]
    proj = np.zeros((n, n))
    for k, p in mats.items():
        proj += float(irrep.characters[op_class[k]]) * p
    proj = (proj + proj.T) / 2
    w, v = np.linalg.eigh(proj)
    scale = max(1.0, float(np.max(np.abs(w))))
    cols = v[:, np.abs(w) > 1e-8 * scale]
    if cols.shape[1] != want:  # pragma: no cover - a broken table
        raise RuntimeError(f"projection onto {irrep.label} gave {cols.shape[1]} dimensions, expected {want}")
    return cols


def _split(isomer: Isomer, sites: tuple[int, ...]) -> SymmetryBlocks:
    n = len(sites)
    try:
        table, op_class, corr, lin_ir, lin_raman = _table(isomer)
    except IsosieveError as exc:
        return _unlabelled(n, f"symmetry species not given: {exc.line()}")
    mats = _perm_matrices(isomer, sites)
    chars = {k: float(np.trace(p)) for k, p in mats.items()}
    mult = table.reduce(chars) if corr is None else table.reduce([chars[k] for k in isomer.stabiliser])
    blocks = []
    labels = []
    for irrep in table.irreps:
        count = mult.get(irrep.label, 0)
        if not count:
            continue
        if corr is not None and irrep.label not in corr:
            return _unlabelled(
                n, f"symmetry species not given: {table.group} species {irrep.label} has no unique linear partner"
            )
        cols = _projected(irrep, mats, op_class, count * int(irrep.dimension))
        if corr is None:
            label, ir_ok, ra_ok = irrep.label, irrep.ir_active, irrep.raman_active
        else:
            label = corr[irrep.label]
            ir_ok, ra_ok = label in lin_ir, label in lin_raman
        blocks.append(SymmetryBlock(label, int(irrep.dimension), _frozen(cols), ir_ok, ra_ok))
        labels.append(label if count == 1 else f"{count}{label}")
    species = table.species_string(mult) if corr is None else " + ".join(labels)
    return SymmetryBlocks(tuple(blocks), species, None)


@cached(maxsize=1024)
def symmetry_blocks(isomer: Isomer, sites: tuple[int, ...]) -> SymmetryBlocks:
    """Split the oscillator space on ``sites`` into one block per symmetry species.

    Parameters
    ----------
    isomer : Isomer
        Its stabiliser gives the operations and the character table.
    sites : tuple[int, ...]
        The oscillators' sites (0-based), in oscillator order.

    Returns
    -------
    SymmetryBlocks
        The blocks (read-only bases), the species string, and a note when no
        labels could be given.  Cached by value.
    """
    return _split(isomer, sites)


# --------------------------------------------------------------------------
# solving


@frozen_dataclass
class Band:
    """One predicted band (a normal mode, or a degenerate set of them).

    ``wavenumber`` in cm^-1; ``intensity`` relative to the strongest band of
    the class (bond-dipole model; 0 for IR-forbidden); ``species`` the
    Mulliken label (None if no table was available); ``degeneracy`` the
    irrep dimension; ``order`` the band's rank within its species (1 =
    highest wavenumber), used to name it in fits ('A1(2)').
    """

    wavenumber: float
    intensity: float
    species: str | None
    degeneracy: int = 1
    order: int = 1
    raw_intensity: float = field(default=0.0, compare=False)
    eigenvalue: float = field(default=0.0, compare=False)
    #: IR / Raman allowed by the species (None without a character table)
    ir_allowed: bool | None = None
    raman_allowed: bool | None = None
    #: one standard uncertainty of ``wavenumber`` (cm^-1) from the band model's validation, when it has one
    sigma: float | None = field(default=None, compare=False)

    @property
    def ir_active(self) -> bool:
        """Non-zero intensity in the bond-dipole model."""
        return self.intensity > ZERO_INTENSITY

    @property
    def dipole_forbidden(self) -> bool:
        """Allowed by symmetry, yet of zero intensity in the bond-dipole
        model: the mode moves only trans pairs of oscillators in phase, so
        their bond dipoles cancel (a locally centrosymmetric unit).  Expect it
        weak in a real spectrum."""
        return bool(self.ir_allowed) and not self.ir_active

    @property
    def name(self) -> str:
        """Species and rank within it, e.g. 'A1(2)' ('mode(1)' without a label)."""
        return f"{self.species or 'mode'}({self.order})"

    @property
    def key(self) -> tuple[str | None, int]:
        """(species, order): what identifies a band while the constants move."""
        return (self.species, self.order)

    def to_dict(self) -> dict[str, Any]:
        """The band's JSON object (rounded for byte-stable output)."""
        return {
            "wavenumber": round(self.wavenumber, 1),
            "intensity": round(self.intensity, 4),
            "species": self.species,
            "degeneracy": self.degeneracy,
            "ir_active": self.ir_active,
            "ir_allowed": self.ir_allowed,
            "raman_allowed": self.raman_allowed,
            **({"sigma": round(self.sigma, 1)} if self.sigma is not None else {}),
        }


@frozen_dataclass
class Mode:
    """A band with its eigenvectors in y-space (n x d, read-only; d = degeneracy)."""

    band: Band
    vectors: np.ndarray = field(compare=False)


@frozen_dataclass
class NormalModes:
    """The solution of one GF problem: modes highest first, with the species
    string and the note of :class:`SymmetryBlocks`."""

    modes: tuple[Mode, ...]
    species: str | None
    note: str | None = None

    @property
    def bands(self) -> tuple[Band, ...]:
        """The bands, highest wavenumber first."""
        return tuple(m.band for m in self.modes)


def _block_modes(
    blk: SymmetryBlock, a: np.ndarray, gh: np.ndarray, e: np.ndarray
) -> list[tuple[float, float, int, np.ndarray]]:
    """(λ, raw intensity, degeneracy, y vectors) of each mode of one block."""
    w = blk.basis
    sub = w.T @ a @ w
    sub = (sub + sub.T) / 2
    lam, u = np.linalg.eigh(sub)
    order = np.argsort(-lam, kind="stable")
    lam, u = lam[order], u[:, order]
    m = len(lam)
    d = blk.dimension if blk.label is not None else 1
    scale = max(1.0, float(np.max(np.abs(lam)))) if m else 1.0
    out = []
    k = 0
    while k < m:
        if blk.label is not None:
            j = k + d
        else:
            j = k + 1
            while j < m and abs(lam[j] - lam[k]) < 1e-9 * scale:
                j += 1
        y = w @ u[:, k:j]
        dip = e.T @ (gh[:, None] * y)  # 3 x d: Σ_i L_i e_i with L = G^½ y
        out.append((float(np.mean(lam[k:j])), float(np.sum(dip**2)), j - k, y))
        k = j
    return out


def solve_modes(
    model: Model,
    isomer: Isomer,
    values: Mapping[str, float] | None = None,
    *,
    f: np.ndarray | None = None,
    blocks: SymmetryBlocks | None = None,
) -> NormalModes:
    """Solve the GF problem of ``model`` block by block (Wilson's GF method).

    Parameters
    ----------
    model : Model
        The oscillators and constant sets.
    isomer : Isomer
        The isomer the model belongs to (geometry and symmetry).
    values : Mapping[str, float], optional
        A value for every name in ``model.parameter_names`` (mdyn/Å).
    f : numpy.ndarray, optional
        A ready F matrix instead of ``values`` (what the fits pass).
    blocks : SymmetryBlocks, optional
        The symmetry blocks if the caller holds them already
        (default: :func:`symmetry_blocks` of the model's sites).

    Returns
    -------
    NormalModes
        Modes sorted by falling wavenumber, intensities relative to the
        strongest (bond-dipole model), each band ranked within its species.

    Raises
    ------
    InputError
        When the constants give a negative GF eigenvalue (an imaginary frequency).
    """
    if blocks is None:
        blocks = symmetry_blocks(isomer, model.sites)
    if f is None:
        if values is None:
            raise ValueError("solve_modes needs either values or f")
        f = model.f_matrix(values)
    gh = np.sqrt(model.g_diag())
    a = gh[:, None] * f * gh[None, :]
    e = np.array([isomer.geometry.vectors[s] for s in model.sites])
    raw = [(lam, inten, blk, deg, y) for blk in blocks.blocks for lam, inten, deg, y in _block_modes(blk, a, gh, e)]
    if any(r[0] <= 0 for r in raw):
        raise InputError(
            "these force constants give an imaginary frequency (a negative GF eigenvalue)",
            "use positive stretching constants much larger than the interaction constants",
        )
    top = max((r[1] for r in raw), default=0.0)
    modes = []
    counters: dict[str | None, int] = {}
    for lam, inten, blk, deg, y in sorted(raw, key=lambda r: (-r[0], r[2].label or "")):
        counters[blk.label] = counters.get(blk.label, 0) + 1
        rel = inten / top if top > 0 else 0.0
        band = Band(
            wavenumber=WAVENUMBER_FACTOR * math.sqrt(lam),
            intensity=0.0 if rel < ZERO_INTENSITY else rel,
            species=blk.label,
            degeneracy=deg,
            order=counters[blk.label],
            raw_intensity=inten,
            eigenvalue=lam,
            ir_allowed=blk.ir_allowed,
            raman_allowed=blk.raman_allowed,
        )
        modes.append(Mode(band, _frozen(y)))
    return NormalModes(tuple(modes), blocks.species, blocks.note)


def solve(model: Model, isomer: Isomer, values: Mapping[str, float]) -> tuple[Band, ...]:
    """Bands for explicit constant values.

    Parameters
    ----------
    model : Model
    isomer : Isomer
    values : Mapping[str, float]
        A value for every name in ``model.parameter_names`` (mdyn/Å).

    Returns
    -------
    tuple[Band, ...]
        Highest wavenumber first.
    """
    return solve_modes(model, isomer, values).bands
