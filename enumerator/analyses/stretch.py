"""Stretching modes of reporter ligands, NMR environments, and which isomer
pairs IR, Raman or NMR can tell apart.

For one isomer and one reporter class (CO, CN, NO, ...; rules/reporters.toml)
the X-Y stretch vectors of that class span a representation whose character
under each operation of the isomer's stabiliser is the number of oscillators
the operation leaves unshifted.  The reduction formula (in the isomer's
computed character table, :mod:`enumerator.symmetry.chartable`) splits it into
species; a species is IR-active if it transforms as x, y or z and
Raman-active if it transforms as a quadratic function, so the counts of
bands follow.  The symmetry-distinct environments of the class are the
orbits of the full stabiliser (proper and improper operations: enantiotopic
ligands are isochronous in an achiral solvent) on its sites: the count of
13C / 15N signals.  The same orbit count is given for every other ligand.

A linear centre's group is infinite; its stabiliser is carried by a finite
D2h (or C2v) proxy and the species of the axial stretches are correlated:
Ag -> Sigma_g+, B1u -> Sigma_u+ (D∞h), A1 -> Sigma+ (C∞v).

>>> from enumerator.workflow.pipeline import analyse
>>> r = analyse("Ma4b2", geometry="OC-6", reporters=(("a", "CO"),))
>>> sorted((i.point_group, stretch_modes(i, "CO").species) for i in r.isomers)
[('C2v', '2A1 + B1 + B2'), ('D4h', 'A1g + B1g + Eu')]
>>> sorted((stretch_modes(i, "CO").ir, stretch_modes(i, "CO").raman) for i in r.isomers)
[(1, 2), (4, 4)]
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from functools import lru_cache
from typing import Any

from enumerator.errors import InputError
from enumerator.rules.reporters import ReporterClass, Reporters, load_reporters
from enumerator.symmetry.linear import LINEAR_CORRELATION, LINEAR_IR, LINEAR_RAMAN

__all__ = [
    "ModeSet",
    "stretch_modes",
    "environments",
    "Pair",
    "StretchAnalysis",
    "stage",
    "COST_ORDER",
]

#: Techniques from cheapest to dearest (routine solution IR first; Raman needs
#: a separate instrument; 13C/15N NMR of reporters needs long runs or labelling).
COST_ORDER = ("IR", "Raman", "NMR")


# --------------------------------------------------------------------------
# one isomer


@dataclass(frozen=True)
class ModeSet:
    """The stretches of one reporter class in one isomer.

    ``reducible`` has one character per class of ``table_classes``;
    ``multiplicities`` are (label, count) in table order; ``ir`` / ``raman``
    count bands (a degenerate species is one band); ``environments`` are the
    orbits (1-based site numbers) of the stabiliser on the class's sites."""

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

    @property
    def nmr(self) -> int:
        return len(self.environments)

    def to_dict(self) -> dict[str, Any]:
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
        }


def _num(x: float):
    r = round(float(x), 6) + 0.0
    return int(r) if r == int(r) else r


def environments(isomer, sites: Sequence[int]) -> tuple[tuple[int, ...], ...]:
    """Orbits (1-based site numbers, sorted) of the full stabiliser on ``sites``."""
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


def stretch_modes(isomer, reporter_class: str) -> ModeSet:
    """The stretch species, band counts and NMR environments of the sites
    whose reporter is ``reporter_class``."""
    return _modes(isomer, reporter_class)


@lru_cache(maxsize=8192)
def _modes(isomer, reporter_class: str) -> ModeSet:
    from enumerator.isomers.tables import table_for_isomer
    from enumerator.symmetry.chartable import table_from_matrices

    sites = tuple(s.index for s in isomer.sites if s.reporter == reporter_class)
    geo = isomer.geometry
    ops = geo.operations
    chars = {k: float(sum(1 for s in sites if ops[k].perm[s] == s)) for k in isomer.stabiliser}
    if geo.linear:
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
        labs = [(corr[lab], n) for lab, n in mult.items()]
        order = ["Sigma_g+", "Sigma+", "Sigma_u+"]
        labs.sort(key=lambda t: order.index(t[0]))
        species = " + ".join(lab if n == 1 else f"{n}{lab}" for lab, n in labs) or "0"
        ir_sp = tuple(lab for lab, _ in labs if lab in LINEAR_IR)
        ra_sp = tuple(lab for lab, _ in labs if lab in LINEAR_RAMAN)
        return ModeSet(
            reporter_class,
            sites,
            group,
            tuple(c.label for c in proxy.classes),
            tuple(float(chars[isomer.stabiliser[c.members[0]]]) for c in proxy.classes),
            tuple(labs),
            species,
            ir_sp,
            ra_sp,
            tuple(x for x in ir_sp if x in ra_sp),
            sum(n for lab, n in labs if lab in LINEAR_IR),
            sum(n for lab, n in labs if lab in LINEAR_RAMAN),
            environments(isomer, sites),
            f"linear: z along the molecular axis; species by correlation from the {proxy.group} proxy ({', '.join(f'{a} -> {b}' for a, b in corr.items())})",
        )
    table = table_for_isomer(isomer)
    mult = table.reduce(chars)
    labs = tuple((i.label, mult[i.label]) for i in table.irreps if i.label in mult)
    active = {i.label: (i.ir_active, i.raman_active) for i in table.irreps}
    ir_sp = tuple(lab for lab, _ in labs if active[lab][0])
    ra_sp = tuple(lab for lab, _ in labs if active[lab][1])
    return ModeSet(
        reporter_class,
        sites,
        table.group,
        tuple(c.label for c in table.classes),
        _class_chars(table, chars),
        labs,
        table.species_string(mult),
        ir_sp,
        ra_sp,
        tuple(x for x in ir_sp if x in ra_sp),
        sum(n for lab, n in labs if active[lab][0]),
        sum(n for lab, n in labs if active[lab][1]),
        environments(isomer, sites),
        table.axes_note,
    )


def _class_chars(table, chars: Mapping[int, float]) -> tuple[float, ...]:
    return tuple(float(chars[c.members[0]]) for c in table.classes)


# --------------------------------------------------------------------------
# the analysis


#: Above this many isomer pairs the JSON gives the tally, not the list
#: (2,000,000 pairs is about 2,000 isomers and a 400 MB document).
MAX_LISTED_PAIRS = 2_000_000


@dataclass(frozen=True)
class Pair:
    a: str
    b: str
    ir: bool
    raman: bool
    nmr: bool
    note: str | None = None

    @property
    def cheapest(self) -> str | None:
        for name, flag in zip(COST_ORDER, (self.ir, self.raman, self.nmr)):
            if flag:
                return name
        return None

    def to_dict(self) -> dict[str, Any]:
        d: dict[str, Any] = {
            "a": self.a,
            "b": self.b,
            "ir_distinct": self.ir,
            "raman_distinct": self.raman,
            "nmr_distinct": self.nmr,
            "cheapest": self.cheapest,
        }
        if self.note:
            d["note"] = self.note
        return d


@dataclass(frozen=True)
class _LigandNMR:
    ligand: str
    nucleus: str | None
    environments: int
    observable: bool


@dataclass(frozen=True)
class StretchAnalysis:
    """Stretch modes per isomer and class, NMR environments per ligand, and
    the pairwise distinguishability; implements the Analysis protocol."""

    classes: tuple[str, ...]
    info: tuple[ReporterClass, ...]
    ids: tuple[str, ...]
    enantiomer: tuple[str | None, ...]
    modes: tuple[tuple[ModeSet, ...], ...]
    nmr: tuple[tuple[_LigandNMR, ...], ...]
    groups: tuple[str, ...]
    axes: tuple[str, ...]
    fluxional: bool
    geometry: str
    reporter_ligands: tuple[str, ...] = ()

    # --- pairs ---------------------------------------------------------
    def _signatures(self):
        ir = [tuple(m.ir for m in ms) for ms in self.modes]
        ra = [tuple(m.raman for m in ms) for ms in self.modes]
        nm = [tuple(x.environments for x in ls if x.observable) for ls in self.nmr]

        def ids(sigs):
            table: dict = {}
            return [table.setdefault(s, len(table)) for s in sigs]

        return ids(ir), ids(ra), ids(nm)

    def pairs(self) -> list[Pair]:
        """Every unordered pair of listed isomers, in listing order.  Each
        isomer gets one small integer per technique (its count signature),
        so a pair costs three integer comparisons."""
        ir, ra, nm = self._signatures()
        out = []
        n = len(self.ids)
        for i in range(n):
            for j in range(i + 1, n):
                if self.enantiomer[i] == self.ids[j]:
                    out.append(Pair(self.ids[i], self.ids[j], False, False, False, "enantiomers"))
                else:
                    out.append(Pair(self.ids[i], self.ids[j], ir[i] != ir[j], ra[i] != ra[j], nm[i] != nm[j]))
        return out

    # --- protocol --------------------------------------------------------
    def _index(self, isomer_id: str) -> int:
        return self.ids.index(isomer_id)

    def isomer_json(self, isomer_id: str) -> Mapping[str, Any]:
        k = self._index(isomer_id)
        return {
            "modes": {m.reporter: m.to_dict() for m in self.modes[k]},
            "nmr_environments": {
                x.ligand: {"nucleus": x.nucleus, "environments": x.environments, "counted": x.observable}
                for x in self.nmr[k]
            },
            "axes": self.axes[k],
        }

    def fluxional_note(self) -> str | None:
        """The NMR caution for a geometry marked fluxional, else None."""
        return FLUXIONAL_NOTE.format(geo=self.geometry) if self.fluxional else None

    def top_json(self) -> Mapping[str, Any]:
        flux = self.fluxional_note()
        notes = [flux, ENANTIOMER_NOTE] if flux else [ENANTIOMER_NOTE]
        return {
            **self._pairs_json(),
            "reporter_classes": {
                c.key: {
                    "name": c.name,
                    "bond": c.bond,
                    "nucleus": c.nucleus,
                    "ir_window_cm1": list(c.window),
                    "window_source": c.source,
                }
                for c in self.info
            },
            "technique_cost_order": list(COST_ORDER),
            "spectroscopy_notes": notes,
        }

    def _pairs_json(self) -> dict[str, Any]:
        n = len(self.ids)
        total = n * (n - 1) // 2
        doc: dict[str, Any] = {"pair_tally": self.pair_tally()}
        if total > MAX_LISTED_PAIRS:
            doc["pairs"] = []
            doc["pairs_listed"] = False
            doc["pairs_note"] = (
                f"{total} pairs are too many to list (more than {MAX_LISTED_PAIRS}); "
                "'pair_tally' counts them; use --limit or --pick to list the pairs of fewer isomers"
            )
        else:
            doc["pairs"] = [p.to_dict() for p in self.pairs()]
            doc["pairs_listed"] = True
        return doc

    def pair_tally(self) -> dict[str, int]:
        """How many pairs each technique tells apart first ('IR', 'Raman',
        'NMR', '--' for none, 'en' for enantiomers), counted over classes of
        isomers with equal count signatures: no pair is listed, so this stays
        cheap for thousands of isomers."""
        ir, ra, nm = self._signatures()
        classes: dict[tuple[int, int, int], int] = {}
        for t in zip(ir, ra, nm):
            classes[t] = classes.get(t, 0) + 1
        keys = sorted(classes)
        tally: dict[str, int] = {}

        def add(name: str, k: int) -> None:
            if k:
                tally[name] = tally.get(name, 0) + k

        for x, a in enumerate(keys):
            na = classes[a]
            add("--", na * (na - 1) // 2)
            for b in keys[x + 1 :]:
                name = "IR" if a[0] != b[0] else "Raman" if a[1] != b[1] else "NMR"
                add(name, na * classes[b])
        # enantiomer pairs share every signature: move them from '--' to 'en'
        pos = {i: k for k, i in enumerate(self.ids)}
        en = sum(1 for k, e in enumerate(self.enantiomer) if e is not None and pos.get(e, -1) > k)
        if en:
            tally["--"] -= en
            if not tally["--"]:
                del tally["--"]
            tally["en"] = en
        return tally


#: The NMR caution for geometries marked fluxional (``{geo}``: the polyhedral symbol).
FLUXIONAL_NOTE = (
    "{geo} centres are often fluxional (e.g. Berry pseudorotation): NMR may show averaged signals, "
    "fewer than the environments listed"
)
#: Why enantiomer pairs are never marked distinct.
ENANTIOMER_NOTE = "enantiomers have the same IR, Raman and NMR counts in achiral media; pairs of enantiomers are never marked distinct"


def _nucleus_for(kind, reporters: Reporters) -> tuple[str | None, bool]:
    """(nucleus, counted) for a ligand kind: a reporter's nucleus; a catalogue
    ligand's donor-element nucleus ([nuclei]); an abstract letter counts its
    environments with no nucleus named."""
    if kind.reporter:
        return reporters.get(kind.reporter).nucleus, True
    if not kind.info_dict():  # abstract letter
        return None, True
    for el in kind.donors:
        nuc = reporters.nucleus_of(el)
        if nuc:
            return nuc, True
    return None, False


def stage(res, req) -> StretchAnalysis:
    """Pipeline stage: validate the reporter classes and analyse every isomer."""
    from enumerator.rules.ruleset import load_rules

    reporters = load_reporters(load_rules(req.rules))
    comp = res.composition
    classes: list[str] = []
    for kind in comp.kinds:
        if kind.reporter is None:
            continue
        if kind.reporter not in reporters.names:
            raise InputError(
                f"unknown reporter class '{kind.reporter}' for ligand '{kind.name}'",
                f"known classes: {', '.join(reporters.names)} (or add one in reporters.toml via --rules DIR)",
            )
        if kind.reporter not in classes:
            classes.append(kind.reporter)
    isomers = res.isomers
    modes, nmr, axes, groups = [], [], [], []
    from enumerator.isomers.tables import table_for_isomer

    for iso in isomers:
        ms = tuple(stretch_modes(iso, c) for c in classes)
        modes.append(ms)
        ls = []
        for kind in comp.kinds:
            nuc, counted = _nucleus_for(kind, reporters)
            ls.append(_LigandNMR(kind.name, nuc, len(environments(iso, iso.sites_of(kind.name))), counted))
        nmr.append(tuple(ls))
        if iso.geometry.linear:
            axes.append(
                "linear: z along the molecular axis; D∞h / C∞v species by correlation from the finite D2h / C2v proxy"
            )
        else:
            axes.append(table_for_isomer(iso).axes_note)
        groups.append(iso.point_group)
    an = StretchAnalysis(
        classes=tuple(classes),
        info=tuple(reporters.get(c) for c in classes),
        ids=tuple(i.id for i in isomers),
        enantiomer=tuple(i.enantiomer for i in isomers),
        modes=tuple(modes),
        nmr=tuple(nmr),
        groups=tuple(groups),
        axes=tuple(axes),
        fluxional=bool(res.geometry.fluxional),
        geometry=res.geometry.symbol,
        reporter_ligands=tuple(k.name for k in comp.kinds if k.reporter),
    )
    return an
