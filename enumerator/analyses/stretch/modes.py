"""Stretching modes of one reporter class in one isomer, and NMR environments.

The X-Y stretch vectors of the class span a representation whose character
under each operation of the isomer's stabiliser is the number of oscillators
the operation leaves unshifted.  The reduction formula, n(Γ) = (1/|G|)
Σ_g χ(g) χ_Γ(g)* (F. A. Cotton, *Chemical Applications of Group Theory*,
3rd edn., Wiley, 1990, ch. 4 and 10), in the isomer's computed character
table (:mod:`enumerator.symmetry.chartable`) splits it into species; a
species is IR-active if it transforms as x, y or z and Raman-active if it
transforms as a quadratic function, so the counts of bands follow (a
degenerate species is one band).

The symmetry-distinct environments of a set of sites are the orbits of the
full stabiliser (proper and improper operations: enantiotopic ligands are
isochronous in an achiral solvent): the count of NMR signals.

A linear centre's group is infinite; its stabiliser is carried by a finite
D2h (or C2v) proxy and the species of the axial stretches are correlated
(:mod:`enumerator.symmetry.linear`): Ag -> Sigma_g+, B1u -> Sigma_u+ (D∞h),
A1 -> Sigma+ (C∞v).

**Predicted weak bands.**  In the bond-dipole model (each oscillator's dipole
derivative along its site vector e_i, on the ideal polyhedron; P. S.
Braterman, *Metal Carbonyl Spectra*, Academic Press 1975, ch. 3) a mode's
dipole derivative is the image of its coordinates under the map
c -> Σ c_i e_i, which commutes with the symmetry operations.  Its image is
V = span{e_i} (a subspace of x, y, z), so an IR-allowed species Γ carries
bond-dipole intensity only if Γ occurs in V; when it does not, every band
of Γ has exactly zero bond-dipole intensity whatever the force constants
(the mode moves trans pairs in phase, and their dipoles cancel).  Those
bands are still counted in ``ir`` (symmetry allows them) and are counted
again in ``ir_weak``: "IR: 2 (1 predicted weak)".  This is the one meaning of
a predicted weak band everywhere: the isomer table, the pair verdicts,
``bands`` and ``match``.

>>> from enumerator.workflow.pipeline import analyse
>>> r = analyse("Ma4b2", geometry="OC-6", reporters=(("a", "CO"),))
>>> sorted((i.point_group, stretch_modes(i, "CO").species) for i in r.isomers)
[('C2v', '2A1 + B1 + B2'), ('D4h', 'A1g + B1g + Eu')]
>>> sorted((stretch_modes(i, "CO").ir, stretch_modes(i, "CO").raman) for i in r.isomers)
[(1, 2), (4, 4)]
>>> r = analyse("[RuCl2(CO)2(PPh3)2]")
>>> [(i.id, stretch_modes(i, "CO").ir, stretch_modes(i, "CO").weak_species) for i in r.isomers[2:4]]
[('2', 2, ('A1',)), ('3', 2, ())]
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any

import numpy as np

from enumerator.caches import cached
from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.isomers.enumeration import Isomer
from enumerator.isomers.tables import table_for_isomer
from enumerator.symmetry.chartable import table_from_matrices
from enumerator.symmetry.linear import LINEAR_CORRELATION, LINEAR_IR, LINEAR_RAMAN

__all__ = ["ModeSet", "stretch_modes", "environments"]

#: Order of the linear species in a species string.
_LINEAR_ORDER = ("Sigma_g+", "Sigma+", "Sigma_u+")


@frozen_dataclass
class ModeSet:
    """The stretches of one reporter class in one isomer.

    ``reducible`` has one character per class of ``table_classes``;
    ``multiplicities`` are (label, count) in table order; ``ir`` / ``raman``
    count bands (a degenerate species is one band); ``environments`` are the
    orbits (1-based site numbers) of the stabiliser on the class's sites;
    ``weak_species`` are the IR-allowed species with zero bond-dipole
    intensity (module docstring), whose bands ``ir_weak`` counts (they are
    included in ``ir``)."""

    reporter: str
    sites: tuple[int, ...]
    group: str
    table_classes: tuple[str, ...]
    reducible: tuple[float, ...]
    multiplicities: tuple[tuple[str, int], ...]
    species: str
    ir_species: tuple[str, ...]
    raman_species: tuple[str, ...]
    both_species: tuple[str, ...]
    ir: int
    raman: int
    environments: tuple[tuple[int, ...], ...]
    axes: str
    weak_species: tuple[str, ...] = ()

    @property
    def nmr(self) -> int:
        """The number of NMR environments (signals) of the class."""
        return len(self.environments)

    @property
    def ir_weak(self) -> int:
        """IR bands symmetry allows but the bond-dipole model predicts at zero intensity."""
        return sum(n for lab, n in self.multiplicities if lab in self.weak_species)

    @property
    def ir_dipole(self) -> int:
        """IR bands with bond-dipole intensity (``ir`` less ``ir_weak``)."""
        return self.ir - self.ir_weak

    def ir_text(self) -> str:
        """The IR count as every output writes it: '2', or '2 (1 predicted weak)'."""
        return f"{self.ir} ({self.ir_weak} predicted weak)" if self.ir_weak else str(self.ir)

    def to_dict(self) -> dict[str, Any]:
        """The JSON object of the modes (an entry of an isomer's ``modes``)."""
        return {
            "species": self.species,
            "ir": self.ir,
            "raman": self.raman,
            "nmr": self.nmr,
            "ir_species": list(self.ir_species),
            "raman_species": list(self.raman_species),
            "both_species": list(self.both_species),
            "oscillators": len(self.sites),
            "group": self.group,
            "reducible": {c: _num(x) for c, x in zip(self.table_classes, self.reducible)},
            "environments": [list(e) for e in self.environments],
            "ir_predicted_weak": self.ir_weak,
            "ir_weak_species": list(self.weak_species),
            "ir_bond_dipole": self.ir_dipole,
        }


def _num(x: float) -> int | float:
    r = round(float(x), 6) + 0.0
    return int(r) if r == int(r) else r


def environments(isomer: Isomer, sites: Sequence[int]) -> tuple[tuple[int, ...], ...]:
    """Orbits of the full stabiliser on ``sites``.

    Parameters
    ----------
    isomer : Isomer
        The isomer (its stabiliser acts on the sites).
    sites : sequence of int
        0-based site indices.

    Returns
    -------
    tuple of tuple of int
        Each orbit as sorted 1-based site numbers, orbits in order of their first site.
    """
    ops = isomer.geometry.operations
    left = set(sites)
    out = []
    for s in sorted(sites):
        if s not in left:
            continue
        orb = {ops[k].perm[s] for k in isomer.stabiliser}
        left -= orb
        out.append(tuple(sorted(x + 1 for x in orb)))
    return tuple(out)


def stretch_modes(isomer: Isomer, reporter_class: str) -> ModeSet:
    """The stretch species, band counts and NMR environments of one reporter class.

    Parameters
    ----------
    isomer : Isomer
        One stereoisomer.
    reporter_class : str
        The class of the sites analysed (``'CO'``), as the sites carry it.

    Returns
    -------
    ModeSet
        Cached per (isomer, class).

    Raises
    ------
    InputError
        A linear case whose proxy species has no unique D∞h/C∞v partner.
    """
    return _modes(isomer, reporter_class)


@cached(maxsize=8192)
def _modes(isomer: Isomer, reporter_class: str) -> ModeSet:
    sites = tuple(s.index for s in isomer.sites if s.reporter == reporter_class)
    ops = isomer.geometry.operations
    chars = {k: float(sum(1 for s in sites if ops[k].perm[s] == s)) for k in isomer.stabiliser}
    if isomer.geometry.linear:
        return _linear_modes(isomer, reporter_class, sites, chars)
    return _polyhedral_modes(isomer, reporter_class, sites, chars)


def _dipole_characters(isomer: Isomer, sites: Sequence[int]) -> dict[int, float]:
    """Characters of the stabiliser on V = span of the sites' vectors (the image of the bond-dipole map):
    tr(P_V R(g)), with P_V the orthogonal projector onto V."""
    geo = isomer.geometry
    ops = geo.operations
    if not sites:
        return {k: 0.0 for k in isomer.stabiliser}
    e = np.array([geo.vectors[s] for s in sites], dtype=float)
    _, sv, vt = np.linalg.svd(e)
    rank = int(np.sum(sv > 1e-8 * max(1.0, float(sv[0]))))
    basis = vt[:rank]
    proj = basis.T @ basis
    return {k: float(np.trace(proj @ np.asarray(ops[k].array, dtype=float))) for k in isomer.stabiliser}


def _activity(
    labs: Sequence[tuple[str, int]], ir: frozenset[str], raman: frozenset[str]
) -> tuple[tuple[str, ...], tuple[str, ...], tuple[str, ...], int, int]:
    """IR-active species, Raman-active species, those active in both, and the IR and Raman band counts
    (a degenerate species is one band)."""
    ir_sp = tuple(lab for lab, _ in labs if lab in ir)
    ra_sp = tuple(lab for lab, _ in labs if lab in raman)
    both = tuple(x for x in ir_sp if x in ra_sp)
    return ir_sp, ra_sp, both, sum(n for lab, n in labs if lab in ir), sum(n for lab, n in labs if lab in raman)


def _polyhedral_modes(
    isomer: Isomer, reporter_class: str, sites: tuple[int, ...], chars: Mapping[int, float]
) -> ModeSet:
    """The reduction in the isomer's own character table."""
    table = table_for_isomer(isomer)
    mult = table.reduce(chars)
    labs = tuple((i.label, mult[i.label]) for i in table.irreps if i.label in mult)
    ir = frozenset(i.label for i in table.irreps if i.ir_active)
    raman = frozenset(i.label for i in table.irreps if i.raman_active)
    dipole = table.reduce(_dipole_characters(isomer, sites))
    weak = tuple(lab for lab, _ in labs if lab in ir and not dipole.get(lab))
    return ModeSet(
        reporter_class,
        sites,
        table.group,
        tuple(c.label for c in table.classes),
        tuple(float(chars[c.members[0]]) for c in table.classes),
        labs,
        table.species_string(mult),
        *_activity(labs, ir, raman),
        environments(isomer, sites),
        table.axes_note,
        weak,
    )


def _linear_modes(isomer: Isomer, reporter_class: str, sites: tuple[int, ...], chars: Mapping[int, float]) -> ModeSet:
    """The reduction in the finite proxy's table, correlated to D∞h or C∞v."""
    geo = isomer.geometry
    ops = geo.operations
    proxy = table_from_matrices([ops[k].array for k in isomer.stabiliser], geo.vectors)
    mult = proxy.reduce([chars[k] for k in isomer.stabiliser])
    group = "Dinfh" if proxy.group == "D2h" else "Cinfv"
    corr = LINEAR_CORRELATION[group]
    bad = [lab for lab in mult if lab not in corr]
    if bad:
        raise InputError(
            f"species {bad[0]} of the {proxy.group} proxy has no unique D∞h/C∞v partner",
            "this linear case is not supported",
        )
    labs = sorted(((corr[lab], n) for lab, n in mult.items()), key=lambda t: _LINEAR_ORDER.index(t[0]))
    dchars = _dipole_characters(isomer, sites)
    dipole = {corr.get(lab, lab) for lab in proxy.reduce([dchars[k] for k in isomer.stabiliser])}
    weak = tuple(lab for lab, _ in labs if lab in LINEAR_IR and lab not in dipole)
    species = " + ".join(lab if n == 1 else f"{n}{lab}" for lab, n in labs) or "0"
    pairs = ", ".join(f"{a} -> {b}" for a, b in corr.items())
    return ModeSet(
        reporter_class,
        sites,
        group,
        tuple(c.label for c in proxy.classes),
        tuple(float(chars[isomer.stabiliser[c.members[0]]]) for c in proxy.classes),
        tuple(labs),
        species,
        *_activity(labs, LINEAR_IR, LINEAR_RAMAN),
        environments(isomer, sites),
        f"linear: z along the molecular axis; species by correlation from the {proxy.group} proxy ({pairs})",
        weak,
    )
