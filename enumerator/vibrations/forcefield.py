"""Band positions and IR intensities of stretching reporters (CO, CN, NO)
from an energy-factored force field, solved by Wilson's GF method.

The model is the energy-factored (Cotton–Kraihanzel type) force field of
F. A. Cotton and C. S. Kraihanzel, *J. Am. Chem. Soc.* 84 (1962) 4432: only
the X–Y stretches of one reporter class are treated, each an independent
oscillator along its metal–ligand site direction.

* **Stretching constants.**  One constant per symmetry-distinct oscillator
  set: the orbits, on that class's sites, of the symmetry group of the
  isomer *with isotopic labels erased* (isotopic substitution leaves the
  force field unchanged, so a 13CO keeps the constant of the 12CO it
  replaces).  Sites in one orbit always have the same ligand trans to them,
  so no further split by the trans ligand is needed; the *default* value of
  a set's constant is chosen by what is trans to it (another oscillator of
  the same class, another ligand, or no trans site), from
  ``rules/forcefields.toml``.  Sets are named ``k1, k2, ...``: smaller sets
  first, then by lowest site number (so in M(CO)5L the axial CO is ``k1``
  and the equatorial ones ``k2``, as in Cotton & Kraihanzel).
* **Interaction constants.**  ``kc`` between any two oscillators that are
  cis (not trans) and ``kt`` between trans ones.
* **GF method** (E. B. Wilson, J. C. Decius and P. C. Cross, *Molecular
  Vibrations*, McGraw-Hill 1955).  The oscillators share no atom, so G is
  diagonal, G_ii = 1/m_X + 1/m_Y (inverse reduced mass, u^-1) with the
  masses of the bound atom X and the far atom Y.  Eigenvalues λ of GF give
  wavenumbers ν̃ = C·√λ with C = (1/2πc)·√(1 mdyn Å^-1 / 1 u) = 1302.79
  cm^-1 (computed here from the CODATA 2018 exact values of c and N_A).
  Masses of real ligands come from the isotopes in their catalogue SMILES
  (``[13C:1]#O``); abstract letters use the class's atoms.
* **Intensities** follow the bond-dipole model on the ideal geometry: each
  oscillator's dipole derivative points along its site vector e_i, so a
  mode with internal-coordinate eigenvector L has I ∝ |Σ_i L_i e_i|², with
  L = G^½·y from the symmetric eigenproblem G^½ F G^½ y = λ y.  Degenerate
  modes add their components.  Values are relative to the strongest band.
* **Species.**  The oscillator space is split first into symmetry blocks by
  projection with the isomer's character table
  (:func:`enumerator.isomers.tables.table_for_isomer`); each block is then
  diagonalised, so every band carries exactly one Mulliken label even when
  two species happen to coincide.

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.abstract import parse_abstract
>>> from enumerator.workflow.pipeline import apply_settings
>>> from enumerator.isomers.enumeration import enumerate_isomers
>>> comp = apply_settings(parse_abstract("Ma6"), reporters=[("a", "CO")])
>>> iso = enumerate_isomers(comp, load_rules().geometry("OC-6")).isomers[0]
>>> [(round(b.wavenumber), b.species, b.intensity) for b in predict_bands(iso, "CO", {"k": 16.4, "kc": 0.3, "kt": 0.6})]
[(2123, 'A1g', 0.0), (2015, 'Eg', 0.0), (1978, 'T1u', 1.0)]
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path

import numpy as np

from enumerator.errors import InputError, IsosieveError, RuleError
from enumerator.isomers.enumeration import Isomer
from enumerator.model.elements import is_element, isotope_mass
from enumerator.rules.ruleset import RuleSet, check_keys, closest_names, load_rules, read_toml

__all__ = [
    "WAVENUMBER_FACTOR",
    "ClassField",
    "Oscillator",
    "StretchSet",
    "Model",
    "Band",
    "BandPattern",
    "load_forcefields",
    "class_field",
    "build_model",
    "band_pattern",
    "predict_bands",
    "solve",
    "parse_constants",
    "reporter_classes",
]

# CODATA 2018 exact values: speed of light (m/s) and Avogadro constant (1/mol).
_C_LIGHT = 299_792_458.0
_N_A = 6.022_140_76e23
#: cm^-1 per sqrt(mdyn Å^-1 u^-1): ν̃ = WAVENUMBER_FACTOR * sqrt(λ) (= 1302.79).
WAVENUMBER_FACTOR = math.sqrt(100.0 / (1e-3 / _N_A)) / (2 * math.pi * _C_LIGHT * 100.0)

#: Relative intensity below which a band counts as zero (symmetry-forbidden).
ZERO_INTENSITY = 1e-9


# --------------------------------------------------------------------------
# rule data


@dataclass(frozen=True)
class ClassField:
    """Default constants of one reporter class (see rules/forcefields.toml)."""

    name: str
    label: str
    atoms: tuple[str, str]
    k_trans_same: float
    k_trans_other: float
    k_no_trans: float
    kc: float
    kt: float
    range: tuple[float, float]
    source: str
    path: str = ""

    def default_k(self, environment: str) -> float:
        return {"same": self.k_trans_same, "other": self.k_trans_other, "none": self.k_no_trans}[environment]


_KEYS_REQ = ("label", "atoms", "k_trans_same", "k_trans_other", "k_no_trans", "kc", "kt", "source")
_KEYS_OPT = ("range",)


def _number(v: object) -> bool:
    return isinstance(v, (int, float)) and not isinstance(v, bool) and math.isfinite(float(v))


def _parse_class(path: Path, name: str, data: object) -> ClassField:
    where = f"{path}: [class.{name}]"
    if not isinstance(data, dict):
        raise RuleError(f"{where} is not a table", "write it as [class.NAME] with keys below it")
    check_keys(data, where, _KEYS_REQ, _KEYS_OPT)
    atoms = data["atoms"]
    if not (isinstance(atoms, list) and len(atoms) == 2 and all(isinstance(a, str) and _ATOM.match(a) for a in atoms)):
        raise RuleError(
            f"{where}: atoms = {atoms!r} is not two element symbols",
            'write e.g. atoms = ["C", "O"] (an isotope as "13C")',
        )
    for a in atoms:
        _atom_mass(a, where)
    vals = {}
    for key in ("k_trans_same", "k_trans_other", "k_no_trans"):
        v = data[key]
        if not (_number(v) and float(v) > 0):
            raise RuleError(f"{where}: {key} = {v!r} is not a positive number", f"give {key} in mdyn/Å, e.g. 16.0")
        vals[key] = float(v)
    for key in ("kc", "kt"):
        v = data[key]
        if not _number(v):
            raise RuleError(f"{where}: {key} = {v!r} is not a number", f"give {key} in mdyn/Å, e.g. 0.3")
        vals[key] = float(v)
    rng = data.get("range", [0.0, 10000.0])
    if not (isinstance(rng, list) and len(rng) == 2 and all(_number(x) for x in rng) and rng[0] < rng[1]):
        raise RuleError(f"{where}: range = {rng!r} is not [low, high]", "write e.g. range = [1850.0, 2125.0]")
    for key in ("label", "source"):
        if not isinstance(data[key], str) or not data[key].strip():
            raise RuleError(f"{where}: {key} must be a non-empty string", f'write {key} = "..."')
    return ClassField(
        name=name,
        label=data["label"],
        atoms=(atoms[0], atoms[1]),
        range=(float(rng[0]), float(rng[1])),
        source=data["source"],
        path=str(path),
        **vals,
    )


@lru_cache(maxsize=16)
def load_forcefields(rules: RuleSet) -> dict[str, ClassField]:
    """Every reporter class's defaults: built-in ``rules/forcefields.toml``
    first, then each ``--rules`` folder's (a class there replaces the
    built-in one).  Validated in full; cached by rule set."""
    out: dict[str, ClassField] = {}
    for path in rules.files("forcefields.toml"):
        data = read_toml(path)
        check_keys(data, str(path), (), ("class",))
        classes = data.get("class", {})
        if not isinstance(classes, dict):
            raise RuleError(f"{path}: 'class' is not a table of tables", "write [class.CO], [class.CN], ...")
        for name in sorted(classes):
            out[name] = _parse_class(path, name, classes[name])
    return out


def reporter_classes(isomer: Isomer) -> tuple[str, ...]:
    """The reporter classes present on an isomer, sorted."""
    return tuple(sorted({s.reporter for s in isomer.sites if s.reporter}))


def class_field(reporter_class: str, rules: RuleSet | None = None) -> ClassField:
    fields = load_forcefields(rules or load_rules())
    if reporter_class in fields:
        return fields[reporter_class]
    for name, cf in fields.items():
        if name.lower() == reporter_class.lower():
            return cf
    near = closest_names(reporter_class, fields)
    hint = f"did you mean {' or '.join(near)}? " if near else ""
    raise InputError(
        f"no force-field constants for reporter class '{reporter_class}'",
        f"{hint}known: {', '.join(sorted(fields))}; add [class.{reporter_class}] to a forcefields.toml in a --rules folder",
    )


# --------------------------------------------------------------------------
# masses

_ATOM = re.compile(r"^(\d{0,3})([A-Z][a-z]?)$")


def _atom_mass(text: str, where: str = "") -> float:
    m = _ATOM.match(text)
    if not m:
        raise RuleError(f"{where}: '{text}' is not an element symbol", "write e.g. C, O, 13C, 18O")
    return _mass(m.group(2), int(m.group(1) or 0), where)


def _mass(symbol: str, isotope: int, where: str = "") -> float:
    """Mass (u) of an isotope, or of the most common isotope when 0 (RDKit's table)."""
    if not is_element(symbol):
        raise RuleError(f"{where}: unknown element '{symbol}'", "use an element symbol such as C, N, O")
    m = isotope_mass(symbol, isotope)
    if m is None:
        raise RuleError(f"{where}: no mass known for isotope {isotope}{symbol}", "check the mass number")
    return m


@lru_cache(maxsize=256)
def _smiles_oscillator(smiles: str, donor_map: int) -> tuple[str, float, str, float] | None:
    """(X label, m_X, Y label, m_Y) read from a catalogue SMILES: X is the atom
    with map number ``donor_map``, Y its neighbour by the highest bond order."""
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
    y = best[1]

    def lab(a) -> tuple[str, float]:
        iso = a.GetIsotope()
        return (f"{iso}{a.GetSymbol()}" if iso else a.GetSymbol()), _mass(a.GetSymbol(), iso)

    xl, xm = lab(donor)
    yl, ym = lab(y)
    return xl, xm, yl, ym


@lru_cache(maxsize=256)
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


def _meta(kind, key: str):
    for k, v in getattr(kind, "meta", ()) or ():
        if k == key:
            return v
    return None


# --------------------------------------------------------------------------
# the model


@dataclass(frozen=True)
class Oscillator:
    """One X–Y stretch at a coordination site (0-based ``site``)."""

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
        return f"{self.x}{self.y}"


@dataclass(frozen=True)
class StretchSet:
    """One symmetry-distinct set of oscillators sharing a stretching constant.

    ``environment`` is 'same' (trans to an oscillator of the same class),
    'other' (trans to another ligand, named in ``trans_to``) or 'none'."""

    name: str
    sites: tuple[int, ...]
    environment: str
    trans_to: str | None
    default: float

    def describe(self, reporter_class: str) -> str:
        where = ",".join(str(s + 1) for s in self.sites)
        if self.environment == "none":
            t = "no ligand trans"
        elif self.environment == "same":
            t = f"trans to {reporter_class}"
        else:
            t = f"trans to {self.trans_to}"
        return f"{reporter_class} at site{'s' if len(self.sites) > 1 else ''} {where} ({t})"


@dataclass(frozen=True)
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

    @property
    def parameter_names(self) -> tuple[str, ...]:
        return tuple(s.name for s in self.sets) + ("kc", "kt")

    @property
    def sites(self) -> tuple[int, ...]:
        return tuple(o.site for o in self.oscillators)

    def g_diag(self) -> np.ndarray:
        return np.array([o.g for o in self.oscillators])

    def derivative(self, name: str) -> np.ndarray:
        """∂F/∂p for one named constant (F is linear in the constants)."""
        n = len(self.oscillators)
        pos = {o.site: k for k, o in enumerate(self.oscillators)}
        d = np.zeros((n, n))
        if name in ("kc", "kt"):
            want = "cis" if name == "kc" else "trans"
            for i, j, rel in self.relations:
                if rel == want:
                    d[i, j] = d[j, i] = 1.0
            return d
        for s in self.sets:
            if s.name == name:
                for site in s.sites:
                    d[pos[site], pos[site]] = 1.0
                return d
        raise InputError(f"no constant '{name}' in this model", f"constants here: {', '.join(self.parameter_names)}")

    def f_matrix(self, values: Mapping[str, float]) -> np.ndarray:
        n = len(self.oscillators)
        f = np.zeros((n, n))
        for name in self.parameter_names:
            f += float(values[name]) * self.derivative(name)
        return f

    def resolve(self, overrides: Mapping[str, float] | None = None) -> dict[str, float]:
        """Default constants with user overrides: ``k`` sets every stretching
        constant, ``k1``.. one set, ``kc``/``kt`` the interactions."""
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


def _site_key(isomer: Isomer, kinds: Mapping[str, object]) -> dict[str, object]:
    """Ligand identity up to isotopic labelling, per ligand name."""
    keys: dict[str, object] = {}
    for name, kind in kinds.items():
        smi = _meta(kind, "smiles")
        keys[name] = ("smiles", _isotope_free(smi)) if isinstance(smi, str) and smi else ("name", name)
    return keys


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


def _orbits(sites: Sequence[int], ops, op_indices: Sequence[int]) -> list[tuple[int, ...]]:
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


def _kinds(isomer: Isomer) -> dict[str, object]:
    return {kind.name: kind for kind, _ in isomer.placements}


def build_model(isomer: Isomer, reporter_class: str, rules: RuleSet | None = None) -> Model:
    """The force-field model (oscillators, constant sets, defaults) of one
    reporter class on one isomer."""
    return _build_model(isomer, reporter_class, rules or load_rules())


@lru_cache(maxsize=1024)
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
    kinds = _kinds(isomer)
    where = f"forcefields [class.{cf.name}]"
    default_x = (cf.atoms[0], _atom_mass(cf.atoms[0], where))
    default_y = (cf.atoms[1], _atom_mass(cf.atoms[1], where))
    oscs = []
    for s in osc_sites:
        smi = _meta(kinds.get(s.ligand), "smiles")
        got = _smiles_oscillator(smi, s.donor_index + 1) if isinstance(smi, str) and smi else None
        if got is None:
            (xl, xm), (yl, ym) = default_x, default_y
        else:
            xl, xm, yl, ym = got
        oscs.append(Oscillator(site=s.index, ligand=s.ligand, x=xl, y=yl, mass_x=xm, mass_y=ym))
    geo = isomer.geometry
    by_site = {s.index: s for s in isomer.sites}
    rels = []
    for i in range(len(oscs)):
        for j in range(i + 1, len(oscs)):
            rels.append((i, j, geo.relation(oscs[i].site, oscs[j].site)))
    keys = _site_key(isomer, kinds)
    parent = _parent_stabiliser(isomer, keys)
    orbits = _orbits([o.site for o in oscs], geo.operations, parent)
    osc_set = {o.site for o in oscs}
    sets = []
    for k, orb in enumerate(orbits, start=1):
        s0 = orb[0]
        partner = next((t for t in range(geo.coordination_number) if t != s0 and geo.relation(s0, t) == "trans"), None)
        if partner is None or partner not in by_site:
            env, trans_to = "none", None
        elif partner in osc_set:
            env, trans_to = "same", reporter_class
        else:
            env, trans_to = "other", by_site[partner].ligand
        sets.append(StretchSet(name=f"k{k}", sites=orb, environment=env, trans_to=trans_to, default=cf.default_k(env)))
    defaults = tuple((s.name, s.default) for s in sets) + (("kc", cf.kc), ("kt", cf.kt))
    return Model(
        isomer_id=isomer.id,
        reporter_class=cf.name,
        oscillators=tuple(oscs),
        sets=tuple(sets),
        relations=tuple(rels),
        defaults=defaults,
        field=cf,
    )


# --------------------------------------------------------------------------
# symmetry blocks


@dataclass(frozen=True)
class _Block:
    label: str | None
    dimension: int  # irrep dimension
    basis: np.ndarray = field(compare=False)  # n x m orthonormal columns
    ir_allowed: bool | None = None
    raman_allowed: bool | None = None


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


def _table(isomer: Isomer):
    """(table, op index -> class position, label map, IR set, Raman set).

    A linear centre's group is infinite; its stabiliser is carried by a
    finite D2h / C2v proxy whose species are correlated to D∞h / C∞v
    (the correlation is :mod:`enumerator.symmetry.linear`)."""
    from enumerator.isomers.tables import table_for_isomer
    from enumerator.symmetry.chartable import table_from_matrices

    geo = isomer.geometry
    if not geo.linear:
        table = table_for_isomer(isomer)
        op_class = dict(zip(table.op_indices, table.class_of))
        return table, op_class, None, None, None
    from enumerator.symmetry.linear import LINEAR_CORRELATION, LINEAR_IR, LINEAR_RAMAN

    ops = geo.operations
    proxy = table_from_matrices([ops[k].array for k in isomer.stabiliser], geo.vectors)
    op_class = {k: proxy.class_of[pos] for pos, k in enumerate(isomer.stabiliser)}
    group = "Dinfh" if proxy.group == "D2h" else "Cinfv"
    return proxy, op_class, LINEAR_CORRELATION[group], LINEAR_IR, LINEAR_RAMAN


def _symmetry_blocks(isomer: Isomer, sites: tuple[int, ...]) -> tuple[tuple[_Block, ...], str | None, str | None]:
    """Split the oscillator space into one block per species; returns the
    blocks, the species string ('2A1 + B1 + B2') and a note when no labels
    could be given."""
    n = len(sites)
    try:
        table, op_class, corr, lin_ir, lin_raman = _table(isomer)
    except ImportError:
        return (
            (_Block(None, 1, np.eye(n)),),
            None,
            "symmetry species not given: the character-table module is not available",
        )
    except IsosieveError as exc:
        return (_Block(None, 1, np.eye(n)),), None, f"symmetry species not given: {exc.line()}"
    mats = _perm_matrices(isomer, sites)
    chars = {k: float(np.trace(p)) for k, p in mats.items()}
    if corr is None:
        mult = table.reduce(chars)
    else:
        mult = table.reduce([chars[k] for k in isomer.stabiliser])
    blocks = []
    labels = []
    for irrep in table.irreps:
        count = mult.get(irrep.label, 0)
        if not count:
            continue
        if corr is not None and irrep.label not in corr:
            return (
                (_Block(None, 1, np.eye(n)),),
                None,
                f"symmetry species not given: {table.group} species {irrep.label} has no unique linear partner",
            )
        proj = np.zeros((n, n))
        for k, p in mats.items():
            proj += float(irrep.characters[op_class[k]]) * p
        proj = (proj + proj.T) / 2
        w, v = np.linalg.eigh(proj)
        scale = max(1.0, float(np.max(np.abs(w))))
        cols = v[:, np.abs(w) > 1e-8 * scale]
        want = count * int(irrep.dimension)
        if cols.shape[1] != want:  # pragma: no cover - a broken table
            raise RuntimeError(f"projection onto {irrep.label} gave {cols.shape[1]} dimensions, expected {want}")
        if corr is None:
            label, ir_ok, ra_ok = irrep.label, irrep.ir_active, irrep.raman_active
        else:
            label = corr[irrep.label]
            ir_ok, ra_ok = label in lin_ir, label in lin_raman
        blocks.append(_Block(label, int(irrep.dimension), cols, ir_ok, ra_ok))
        labels.append(label if count == 1 else f"{count}{label}")
    species = table.species_string(mult) if corr is None else " + ".join(labels)
    return tuple(blocks), species, None


@lru_cache(maxsize=1024)
def _blocks_cached(isomer: Isomer, sites: tuple[int, ...]):
    return _symmetry_blocks(isomer, sites)


# --------------------------------------------------------------------------
# solving


@dataclass(frozen=True)
class Band:
    """One predicted band (a normal mode, or a degenerate set of them).

    ``wavenumber`` in cm^-1; ``intensity`` relative to the strongest band of
    the class (bond-dipole model; 0 for IR-forbidden); ``species`` the
    Mulliken label (None if no table was available); ``degeneracy`` the
    irrep dimension; ``order`` the band's rank within its species (1 =
    highest wavenumber), used to name it in fits ('A1(2)')."""

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
        return f"{self.species or 'mode'}({self.order})"


@dataclass(frozen=True)
class _Mode:
    band: Band
    vectors: np.ndarray = field(compare=False)  # y-space eigenvectors (n x d)


def _solve_modes(
    model: Model,
    isomer: Isomer,
    values: Mapping[str, float] | None,
    *,
    f: np.ndarray | None = None,
    blocks_info=None,
) -> tuple[list[_Mode], str | None, str | None]:
    """Modes for named constant ``values`` (or a ready F matrix ``f``);
    ``blocks_info`` may pass the cached symmetry blocks."""
    blocks, species, note = blocks_info if blocks_info is not None else _blocks_cached(isomer, model.sites)
    g = model.g_diag()
    gh = np.sqrt(g)
    if f is None:
        f = model.f_matrix(values)
    a = gh[:, None] * f * gh[None, :]
    e = np.array([isomer.geometry.vectors[s] for s in model.sites])
    raw: list[tuple[float, float, str | None, int, np.ndarray, _Block]] = []
    for blk in blocks:
        w = blk.basis
        sub = w.T @ a @ w
        sub = (sub + sub.T) / 2
        lam, u = np.linalg.eigh(sub)
        order = np.argsort(-lam, kind="stable")
        lam, u = lam[order], u[:, order]
        m = len(lam)
        d = blk.dimension if blk.label is not None else 1
        scale = max(1.0, float(np.max(np.abs(lam)))) if m else 1.0
        k = 0
        while k < m:
            if blk.label is not None:
                j = k + d
            else:
                j = k + 1
                while j < m and abs(lam[j] - lam[k]) < 1e-9 * scale:
                    j += 1
            y = w @ u[:, k:j]
            lval = float(np.mean(lam[k:j]))
            ell = gh[:, None] * y
            dip = e.T @ ell  # 3 x d
            inten = float(np.sum(dip**2))
            raw.append((lval, inten, blk.label, j - k, y, blk))
            k = j
    for lval, *_ in raw:
        if lval <= 0:
            raise InputError(
                "these force constants give an imaginary frequency (a negative GF eigenvalue)",
                "use positive stretching constants much larger than the interaction constants",
            )
    top = max((r[1] for r in raw), default=0.0)
    modes = []
    counters: dict[str | None, int] = {}
    for lval, inten, label, deg, y, blk in sorted(raw, key=lambda r: (-r[0], r[2] or "")):
        counters[label] = counters.get(label, 0) + 1
        rel = inten / top if top > 0 else 0.0
        if rel < ZERO_INTENSITY:
            rel = 0.0
        band = Band(
            wavenumber=WAVENUMBER_FACTOR * math.sqrt(lval),
            intensity=rel,
            species=label,
            degeneracy=deg,
            order=counters[label],
            raw_intensity=inten,
            eigenvalue=lval,
            ir_allowed=blk.ir_allowed,
            raman_allowed=blk.raman_allowed,
        )
        modes.append(_Mode(band, y))
    return modes, species, note


@dataclass(frozen=True)
class BandPattern:
    """Predicted bands of one reporter class on one isomer."""

    isomer_id: str
    reporter_class: str
    model: Model
    constants: tuple[tuple[str, float], ...]
    bands: tuple[Band, ...]
    species: str | None
    notes: tuple[str, ...] = ()

    @property
    def ir_bands(self) -> tuple[Band, ...]:
        return tuple(b for b in self.bands if b.ir_active)

    def to_json(self) -> dict:
        return {
            "reporter_class": self.reporter_class,
            "species": self.species,
            "constants": {k: round(v, 4) for k, v in self.constants},
            "constant_sets": [
                {
                    "name": s.name,
                    "sites": [x + 1 for x in s.sites],
                    "trans_to": s.trans_to,
                    "environment": s.environment,
                    "description": s.describe(self.reporter_class),
                }
                for s in self.model.sets
            ],
            "oscillators": [
                {"site": o.site + 1, "ligand": o.ligand, "atoms": o.label, "inverse_reduced_mass": round(o.g, 6)}
                for o in self.model.oscillators
            ],
            "bands": [_band_json(b) for b in self.bands],
            "ir_count": len(self.ir_bands),
            "notes": list(self.notes),
        }


def _band_json(b: Band) -> dict:
    return {
        "wavenumber": round(b.wavenumber, 1),
        "intensity": round(b.intensity, 4),
        "species": b.species,
        "degeneracy": b.degeneracy,
        "ir_active": b.ir_active,
        "ir_allowed": b.ir_allowed,
        "raman_allowed": b.raman_allowed,
    }


def solve(model: Model, isomer: Isomer, values: Mapping[str, float]) -> tuple[Band, ...]:
    """Bands for explicit constant values (every name in
    ``model.parameter_names``)."""
    modes, _, _ = _solve_modes(model, isomer, values)
    return tuple(m.band for m in modes)


def band_pattern(
    isomer: Isomer,
    reporter_class: str,
    params: Mapping[str, float] | None = None,
    *,
    rules: RuleSet | None = None,
) -> BandPattern:
    """Predict the bands of ``reporter_class`` on ``isomer``, with default
    constants from the rules, overridden by ``params`` (see
    :meth:`Model.resolve`)."""
    model = build_model(isomer, reporter_class, rules)
    values = model.resolve(params)
    modes, species, note = _solve_modes(model, isomer, values)
    notes = [note] if note else []
    quiet = [m.band.name for m in modes if m.band.dipole_forbidden]
    if quiet:
        notes.append(
            f"{', '.join(quiet)}: IR-allowed by symmetry but of zero intensity in the bond-dipole model "
            "(trans oscillators moving in phase): expect weak band(s)"
        )
    lo, hi = model.field.range
    out = [m.band for m in modes if m.band.ir_active and not lo <= m.band.wavenumber <= hi]
    if out:
        notes.append(
            f"{len(out)} IR band(s) fall outside the usual {model.field.name} range {lo:.0f}-{hi:.0f} cm-1: check the constants"
        )
    return BandPattern(
        isomer_id=isomer.id,
        reporter_class=model.reporter_class,
        model=model,
        constants=tuple((k, float(values[k])) for k in model.parameter_names),
        bands=tuple(m.band for m in modes),
        species=species,
        notes=tuple(notes),
    )


def predict_bands(
    isomer: Isomer,
    reporter_class: str,
    params: Mapping[str, float] | None = None,
    *,
    rules: RuleSet | None = None,
) -> tuple[Band, ...]:
    """The predicted bands, highest wavenumber first (contract 6)."""
    return band_pattern(isomer, reporter_class, params, rules=rules).bands


def parse_constants(text: str) -> dict[str, float]:
    """'k=16.2,kc=0.3,kt=0.6' -> {'k': 16.2, 'kc': 0.3, 'kt': 0.6}."""
    out: dict[str, float] = {}
    for part in (p.strip() for p in text.split(",")):
        if not part:
            continue
        name, sep, val = part.partition("=")
        name = name.strip()
        try:
            v = float(val)
        except ValueError:
            v = float("nan")
        if not sep or not name or not math.isfinite(v):
            raise InputError(
                f"constant '{part}' is not NAME=NUMBER", "write e.g. --constants k=16.2,kc=0.3,kt=0.6 (mdyn/Å)"
            )
        out[name] = v
    if not out:
        raise InputError("no constants given", "write e.g. --constants k=16.2,kc=0.3,kt=0.6")
    return out
