"""The energy-factored force field of one reporter class on one isomer.

The model is that of F. A. Cotton and C. S. Kraihanzel, *J. Am. Chem. Soc.*
84 (1962) 4432 (the Cotton–Kraihanzel force field): only the X–Y stretches of
one reporter class are treated, each an independent oscillator along its
metal–ligand site direction.

* **Oscillators.**  One per site of the class, with the masses of the bound
  atom X and the far atom Y.  Masses of real ligands come from the isotopes
  in their catalogue SMILES (``[13C:1]#O``); abstract letters use the atoms of
  the class in ``rules/forcefields.toml``
  (:mod:`enumerator.rules.forcefields`).
* **Stretching constants.**  One constant per symmetry-distinct oscillator
  set: the orbits, on that class's sites, of the symmetry group of the
  isomer *with isotopic labels erased* (isotopic substitution leaves the
  force field unchanged, so a 13CO keeps the constant of the 12CO it
  replaces).  Sites in one orbit always have the same ligand trans to them,
  so no further split by the trans ligand is needed; the *default* value of
  a set's constant is chosen by what is trans to it (another oscillator of
  the same class, another ligand, or no trans site).  Sets are named
  ``k1, k2, ...``: smaller sets first, then by lowest site number (so in
  M(CO)5L the axial CO is ``k1`` and the equatorial ones ``k2``, as in
  Cotton & Kraihanzel).
* **Interaction constants.**  ``kc`` between any two oscillators that are
  cis (not trans) and ``kt`` between trans ones.

F is linear in the constants: :meth:`Model.f_matrix` sums each constant
times :meth:`Model.derivative`, which is what the fits use.

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.abstract import parse_abstract
>>> from enumerator.workflow.pipeline import apply_settings
>>> from enumerator.isomers.enumeration import enumerate_isomers
>>> comp = apply_settings(parse_abstract("Ma5b"), reporters=[("a", "CO")])
>>> iso = enumerate_isomers(comp, load_rules().geometry("OC-6")).isomers[0]
>>> m = build_model(iso, "CO")
>>> [s.describe("CO") for s in m.sets]
['CO at site 1 (trans to b)', 'CO at sites 2,3,4,5 (trans to CO)']
>>> m.parameter_names
('k1', 'k2', 'kc', 'kt')
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any

import numpy as np

from enumerator.caches import cached
from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.isomers.enumeration import Isomer, Site
from enumerator.model.smiles import SmilesGraph, heavy_atoms
from enumerator.rules.forcefields import ClassField, atom_mass, class_field, element_mass
from enumerator.rules.masses import mass_of, weight_of
from enumerator.rules.parsed import smiles_graph
from enumerator.rules.ruleset import RuleSet, closest_names, load_rules

__all__ = ["Oscillator", "StretchSet", "Model", "build_model", "reporter_classes"]


@frozen_dataclass
class Oscillator:
    """One X–Y stretch at a coordination site (0-based ``site``); masses in u."""

    site: int
    ligand: str
    x: str
    y: str
    mass_x: float
    mass_y: float

    @property
    def g(self) -> float:
        """G-matrix element: inverse reduced mass 1/m_X + 1/m_Y (u^-1)."""
        return 1.0 / self.mass_x + 1.0 / self.mass_y

    @property
    def label(self) -> str:
        """The oscillator's atoms, e.g. 'CO' or '13CO'."""
        return f"{self.x}{self.y}"


@frozen_dataclass
class StretchSet:
    """One symmetry-distinct set of oscillators sharing a stretching constant.

    ``environment`` is 'same' (trans to an oscillator of the same class),
    'other' (trans to another ligand, named in ``trans_to``) or 'none';
    ``default`` is the constant the rules give for that environment (mdyn/Å).
    """

    name: str
    sites: tuple[int, ...]
    environment: str
    trans_to: str | None
    default: float

    def describe(self, reporter_class: str) -> str:
        """Words for the set, e.g. 'CO at sites 2,3,4,5 (trans to CO)' (sites 1-based)."""
        where = ",".join(str(s + 1) for s in self.sites)
        if self.environment == "none":
            t = "no ligand trans"
        elif self.environment == "same":
            t = f"trans to {reporter_class}"
        else:
            t = f"trans to {self.trans_to}"
        return f"{reporter_class} at site{'s' if len(self.sites) > 1 else ''} {where} ({t})"


@frozen_dataclass
class Model:
    """The energy-factored force field of one reporter class on one isomer."""

    isomer_id: str
    reporter_class: str
    oscillators: tuple[Oscillator, ...]
    sets: tuple[StretchSet, ...]
    #: 'cis' or 'trans' for each oscillator pair (i, j), i < j, in oscillator order
    relations: tuple[tuple[int, int, str], ...]
    defaults: tuple[tuple[str, float], ...]
    field: ClassField
    #: optional per-pair scale of the interaction constants, (i, j, w) for i < j in oscillator order: F_ij is
    #: kc·w (cis) or kt·w (trans).  Empty (the Cotton–Kraihanzel model) means w = 1 for every pair; the
    #: additive band model (:mod:`enumerator.vibrations.additive`) sets them so that one kc and one kt
    #: (the means) carry its angle- and constant-dependent interactions.
    pair_weights: tuple[tuple[int, int, float], ...] = ()

    @property
    def parameter_names(self) -> tuple[str, ...]:
        """The constants of this model: the stretching sets' names, then 'kc', 'kt'."""
        return tuple(s.name for s in self.sets) + ("kc", "kt")

    @property
    def sites(self) -> tuple[int, ...]:
        """The oscillators' sites (0-based), in oscillator order."""
        return tuple(o.site for o in self.oscillators)

    def g_diag(self) -> np.ndarray:
        """The diagonal of G (the oscillators share no atom, so G is diagonal), u^-1."""
        return np.array([o.g for o in self.oscillators])

    def derivative(self, name: str) -> np.ndarray:
        """∂F/∂p for one named constant (F is linear in the constants).

        Parameters
        ----------
        name : str
            A name of :attr:`parameter_names`.

        Returns
        -------
        numpy.ndarray
            n x n matrix over the oscillators.

        Raises
        ------
        InputError
            When the model has no such constant.
        """
        n = len(self.oscillators)
        pos = {o.site: k for k, o in enumerate(self.oscillators)}
        d = np.zeros((n, n))
        if name in ("kc", "kt"):
            want = "cis" if name == "kc" else "trans"
            w = {(i, j): v for i, j, v in self.pair_weights}
            for i, j, rel in self.relations:
                if rel == want:
                    d[i, j] = d[j, i] = w.get((i, j), 1.0)
            return d
        for s in self.sets:
            if s.name == name:
                for site in s.sites:
                    d[pos[site], pos[site]] = 1.0
                return d
        raise InputError(f"no constant '{name}' in this model", f"constants here: {', '.join(self.parameter_names)}")

    def f_matrix(self, values: Mapping[str, float]) -> np.ndarray:
        """The F matrix (mdyn/Å) for a value of every name in :attr:`parameter_names`."""
        n = len(self.oscillators)
        f = np.zeros((n, n))
        for name in self.parameter_names:
            f += float(values[name]) * self.derivative(name)
        return f

    def resolve(self, overrides: Mapping[str, float] | None = None) -> dict[str, float]:
        """Default constants with user overrides.

        Parameters
        ----------
        overrides : Mapping[str, float], optional
            ``k`` sets every stretching constant, ``k1``.. one set,
            ``kc``/``kt`` the interactions (mdyn/Å).

        Returns
        -------
        dict[str, float]
            A value for every name in :attr:`parameter_names` (a new dict).

        Raises
        ------
        InputError
            For a name that is not a constant of this model.
        """
        vals = dict(self.defaults)
        if not overrides:
            return vals
        allowed = ("k",) + self.parameter_names
        for name in overrides:
            if name not in allowed:
                near = closest_names(name, allowed)
                hint = f"did you mean '{near[0]}'? " if near else ""
                raise InputError(
                    f"constant '{name}' is not part of this force field",
                    f"{hint}constants here: {', '.join(allowed)} (k sets every stretching constant)",
                )
        if "k" in overrides:
            for s in self.sets:
                vals[s.name] = float(overrides["k"])
        for name, v in overrides.items():
            if name != "k":
                vals[name] = float(v)
        return vals


def reporter_classes(isomer: Isomer) -> tuple[str, ...]:
    """The reporter classes present on an isomer.

    Parameters
    ----------
    isomer : Isomer

    Returns
    -------
    tuple[str, ...]
        Sorted class names (empty when no site is a reporter).
    """
    return tuple(sorted({s.reporter for s in isomer.sites if s.reporter}))


def build_model(isomer: Isomer, reporter_class: str, rules: RuleSet | None = None) -> Model:
    """The force-field model of one reporter class on one isomer.

    Parameters
    ----------
    isomer : Isomer
    reporter_class : str
        'CO', 'CN', 'NO', ... (case-insensitive).
    rules : RuleSet, optional
        Where the class's defaults come from (default: the built-in rules).

    Returns
    -------
    Model
        Oscillators, constant sets and default values (cached by value).

    Raises
    ------
    InputError
        When the class is unknown or the isomer has no site of that class.
    """
    return _build_model(isomer, reporter_class, rules or load_rules())


# --------------------------------------------------------------------------
# oscillator masses


#: The oscillator of a SMILES RDKit cannot read, or with a mass the built-in table lacks: ask RDKit.
_ASK_RDKIT = object()


@cached(maxsize=256)
def _smiles_oscillator(smiles: str, donor_map: int) -> tuple[str, float, str, float] | None:
    """(X label, m_X, Y label, m_Y) read from a catalogue SMILES: X is the atom
    with map number ``donor_map``, Y its neighbour by the highest bond order
    (then the larger mass, then the earlier atom).  Read by
    :func:`enumerator.rules.parsed.smiles_graph` (RDKit's reading, kept for the
    built-in catalogue) with masses from the built-in table
    (:mod:`enumerator.rules.masses`), RDKit only for what that lacks; both
    give RDKit's answer (tests/test_startup_shortcuts.py)."""
    graph = smiles_graph(smiles)
    got = _graph_oscillator(graph, donor_map) if graph is not None else _ASK_RDKIT
    return _rdkit_oscillator(smiles, donor_map) if got is _ASK_RDKIT else got  # type: ignore[return-value]


def _graph_oscillator(graph: SmilesGraph, donor_map: int) -> object:
    donor = next((k for k, a in enumerate(graph.atoms) if a.map_number == donor_map), None)
    if donor is None:
        return None
    best: tuple[tuple[float, float, int], int] | None = None
    for other, order in graph.neighbours(donor):
        a = graph.atoms[other]
        mass = 0.0 if a.symbol == "*" else (mass_of(a.symbol, a.isotope) if a.isotope else weight_of(a.symbol))
        if mass is None:
            return _ASK_RDKIT
        key = (order, mass, -other)
        if best is None or key > best[0]:
            best = (key, other)
    if best is None:
        return None
    x, y = graph.atoms[donor], graph.atoms[best[1]]
    if "*" in (x.symbol, y.symbol):
        return _ASK_RDKIT
    return (
        f"{x.isotope}{x.symbol}" if x.isotope else x.symbol,
        element_mass(x.symbol, x.isotope),
        f"{y.isotope}{y.symbol}" if y.isotope else y.symbol,
        element_mass(y.symbol, y.isotope),
    )


def _rdkit_oscillator(smiles: str, donor_map: int) -> tuple[str, float, str, float] | None:
    """:func:`_smiles_oscillator` by RDKit's reading of the SMILES (unsanitised)."""
    from rdkit import Chem

    mol = Chem.MolFromSmiles(smiles, sanitize=False)
    if mol is None:
        return None
    donor = next((a for a in mol.GetAtoms() if a.GetAtomMapNum() == donor_map), None)
    if donor is None:
        return None
    best = None
    for b in donor.GetBonds():
        other = b.GetOtherAtom(donor)
        key = (b.GetBondTypeAsDouble(), other.GetMass(), -other.GetIdx())
        if best is None or key > best[0]:
            best = (key, other)
    if best is None:
        return None

    def lab(a: Any) -> tuple[str, float]:
        iso = a.GetIsotope()
        return (f"{iso}{a.GetSymbol()}" if iso else a.GetSymbol()), element_mass(a.GetSymbol(), iso)

    xl, xm = lab(donor)
    yl, ym = lab(best[1])
    return xl, xm, yl, ym


@cached(maxsize=256)
def _isotope_free(smiles: str) -> str:
    """Canonical SMILES with isotopes and atom maps removed (identity of a
    ligand up to isotopic labelling)."""
    from rdkit import Chem

    mol = Chem.MolFromSmiles(smiles, sanitize=False)
    if mol is None:
        return smiles
    for a in mol.GetAtoms():
        a.SetIsotope(0)
        a.SetAtomMapNum(0)
        a.SetNoImplicit(True)
    mol.UpdatePropertyCache(strict=False)
    return Chem.MolToSmiles(mol)


def _distinct_molecules(smiles: Sequence[str]) -> bool:
    """Whether no two of these SMILES can be one molecule up to isotopes: their element counts without
    hydrogen differ pairwise (isotopologues share them), from the kept graphs where it can; False when unsure."""
    counts = []
    for s in smiles:
        graph = smiles_graph(s)
        if graph is None:
            return False
        counts.append(heavy_atoms(graph))
    return len(set(counts)) == len(counts)


def _smiles(kind: object) -> str | None:
    """The catalogue SMILES of a ligand kind, if it has one."""
    for k, v in getattr(kind, "meta", ()) or ():
        if k == "smiles":
            return v if isinstance(v, str) and v else None
    return None


def _kinds(isomer: Isomer) -> dict[str, object]:
    return {kind.name: kind for kind, _ in isomer.placements}


def _oscillators(isomer: Isomer, cf: ClassField, osc_sites: Sequence[Site]) -> tuple[Oscillator, ...]:
    kinds = _kinds(isomer)
    where = f"forcefields [class.{cf.name}]"
    default_x = (cf.atoms[0], atom_mass(cf.atoms[0], where))
    default_y = (cf.atoms[1], atom_mass(cf.atoms[1], where))
    oscs = []
    for s in osc_sites:
        smi = _smiles(kinds.get(s.ligand))
        got = _smiles_oscillator(smi, s.donor_index + 1) if smi else None
        if got is None:
            (xl, xm), (yl, ym) = default_x, default_y
        else:
            xl, xm, yl, ym = got
        oscs.append(Oscillator(site=s.index, ligand=s.ligand, x=xl, y=yl, mass_x=xm, mass_y=ym))
    return tuple(oscs)


# --------------------------------------------------------------------------
# constant sets


def _site_key(kinds: Mapping[str, object]) -> dict[str, object]:
    """Ligand identity up to isotopic labelling, per ligand name."""
    smiles = {name: _smiles(kind) for name, kind in kinds.items()}
    written = [smi for smi in smiles.values() if smi]
    if len(written) < 2 or _distinct_molecules(written):
        # no two ligands can be one molecule: the name tells them apart as the canonical SMILES would
        return {name: ("name", name) for name in kinds}
    return {name: ("smiles", _isotope_free(smi)) if smi else ("name", name) for name, smi in smiles.items()}


def _parent_stabiliser(isomer: Isomer, keys: Mapping[str, object]) -> tuple[int, ...]:
    """Operations of the geometry that map the isomer onto itself once
    isotopic labels are erased (contains the isomer's own stabiliser)."""
    ops = isomer.geometry.operations
    n = isomer.geometry.coordination_number
    label: list[object] = [None] * n
    for s in isomer.sites:
        label[s.index] = (keys[s.ligand], s.donor, s.ring)
    links = {(a, b, keys[name]) for a, b, name in isomer.links()}
    out = []
    for k, op in enumerate(ops):
        p = op.perm
        if any(label[p[i]] != label[i] for i in range(n)):
            continue
        if {(min(p[a], p[b]), max(p[a], p[b]), key) for a, b, key in links} != links:
            continue
        out.append(k)
    return tuple(out)


def _orbits(sites: Sequence[int], ops: Sequence[Any], op_indices: Sequence[int]) -> list[tuple[int, ...]]:
    """Orbits of ``sites`` under the operations ``op_indices`` (union-find),
    smaller orbits first, then by lowest site."""
    parent = {s: s for s in sites}

    def find(x: int) -> int:
        while parent[x] != x:
            parent[x] = parent[parent[x]]
            x = parent[x]
        return x

    for k in op_indices:
        perm = ops[k].perm
        for s in sites:
            a, b = find(s), find(perm[s])
            if a != b:
                parent[max(a, b)] = min(a, b)
    groups: dict[int, list[int]] = {}
    for s in sites:
        groups.setdefault(find(s), []).append(s)
    return sorted((tuple(sorted(g)) for g in groups.values()), key=lambda g: (len(g), g))


def _stretch_sets(
    isomer: Isomer, cf: ClassField, reporter_class: str, oscs: Sequence[Oscillator]
) -> tuple[StretchSet, ...]:
    geo = isomer.geometry
    by_site = {s.index: s for s in isomer.sites}
    parent = _parent_stabiliser(isomer, _site_key(_kinds(isomer)))
    orbits = _orbits([o.site for o in oscs], geo.operations, parent)
    osc_set = {o.site for o in oscs}
    sets = []
    for k, orb in enumerate(orbits, start=1):
        s0 = orb[0]
        partner = next((t for t in range(geo.coordination_number) if t != s0 and geo.relation(s0, t) == "trans"), None)
        env: str
        trans_to: str | None
        if partner is None or partner not in by_site:
            env, trans_to = "none", None
        elif partner in osc_set:
            env, trans_to = "same", reporter_class
        else:
            env, trans_to = "other", by_site[partner].ligand
        sets.append(StretchSet(name=f"k{k}", sites=orb, environment=env, trans_to=trans_to, default=cf.default_k(env)))
    return tuple(sets)


@cached(maxsize=1024)
def _build_model(isomer: Isomer, reporter_class: str, rules: RuleSet) -> Model:
    cf = class_field(reporter_class, rules)
    osc_sites = sorted(
        (s for s in isomer.sites if s.reporter and s.reporter.lower() == cf.name.lower()), key=lambda s: s.index
    )
    if not osc_sites:
        present = reporter_classes(isomer)
        raise InputError(
            f"isomer {isomer.id} has no {cf.name} reporter",
            f"reporters here: {', '.join(present)}" if present else "mark one, e.g. --reporter a=CO",
        )
    oscs = _oscillators(isomer, cf, osc_sites)
    geo = isomer.geometry
    rels = tuple(
        (i, j, geo.relation(oscs[i].site, oscs[j].site)) for i in range(len(oscs)) for j in range(i + 1, len(oscs))
    )
    sets = _stretch_sets(isomer, cf, reporter_class, oscs)
    defaults = tuple((s.name, s.default) for s in sets) + (("kc", cf.kc), ("kt", cf.kt))
    return Model(
        isomer_id=isomer.id,
        reporter_class=cf.name,
        oscillators=oscs,
        sets=sets,
        relations=rels,
        defaults=defaults,
        field=cf,
    )
