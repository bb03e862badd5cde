"""CIP priority numbers for the ligating atoms round one metal centre.

The IUPAC stereodescriptors of a coordination centre (Nomenclature of
Inorganic Chemistry, IUPAC Recommendations 2005, IR-9.3.5) rank the
ligating atoms by the Cahn-Ingold-Prelog sequence rules (R. S. Cahn,
C. K. Ingold, V. Prelog, *Angew. Chem. Int. Ed. Engl.* 5 (1966) 385;
V. Prelog, G. Helmchen, *Angew. Chem. Int. Ed. Engl.* 21 (1982) 567).
The metal is the stereocentre; each ligating atom is the root of one branch
of the hierarchical digraph, which this module builds from the ligand's
SMILES (RDKit reads it):

* sphere 1 is the ligating atom itself, compared by atomic number;
* each further sphere holds the substituents of the atoms of the previous
  one, explored from the higher-ranked atoms first; a set of substituents
  is compared as its atomic numbers in decreasing order (phantom atoms,
  atomic number 0, fill the sets to equal length);
* a double or triple bond adds one or two *duplicate* atoms at each end; a
  path that comes back to an atom already on it (a ring, or a chelate ring
  closing at the metal) ends in a duplicate of that atom; duplicates carry
  phantom substituents only;
* Rule 1a (atomic number) is applied through the whole digraph first, then
  Rule 2 (mass number: the isotope's mass number where the SMILES gives
  one, else the standard atomic weight), so that ``13CO`` ranks above
  ``CO``.

Simplifications, stated here so that no one relies on more: aromatic rings
are kekulized (one Kekulé structure, RDKit's, instead of the averaged
duplicate atoms of the 2013 recommendations); Rule 1b and the stereo rules
3-5 are not applied (ligating atoms of one centre rarely need them); the
digraph is explored to :data:`MAX_SPHERES` spheres, and donors still tied
there share a priority number ("as far as the rules go").  An η-bonded ring
ligand is one pseudo-atom whose atomic number is the sum of those of its
ligating atoms (from memory of the convention the Red Book follows for
η-ligands, e.g. 30 for η5-C5H5).

Priority numbers are dense: the highest-ranked ligating atoms get 1, the
next distinct rank 2, and so on (IR-9.3.5).

**Abstract letter ligands** (``Ma2b2c2``, ``M(AB)2c2``) have no structure,
so a convention stands in for the CIP rules: priority follows the alphabet,
a > b > c ..., case-insensitive; a chelate's donor letter ranks just above
the monodentate ligand of the same letter (A > a > B > b); the donors of a
chelate ``(AB)`` are ranked by the same letter order.  This is the textbook
habit (common practice), not an IUPAC rule.

>>> rank_smiles(["[NH3:1]", "O=[N:1][O-]", "[Cl-:1]"])
(3, 2, 1)
>>> rank_smiles(["[C:1]#O", "[13C:1]#O"])
(2, 1)
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence
from types import MappingProxyType

from enumerator.caches import cached
from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.model.composition import Composition, LigandKind
from enumerator.model.elements import atomic_number, atomic_weight
from enumerator.rules.parsed import smiles_graph

__all__ = [
    "MAX_SPHERES",
    "BranchKey",
    "branch_key",
    "ring_key",
    "letter_key",
    "rank_smiles",
    "dense_ranks",
    "donor_priorities",
    "uses_letters",
    "by_donor_element",
]

#: Spheres of the hierarchical digraph explored from each ligating atom.
MAX_SPHERES = 10
#: Stop growing the digraph past this many nodes (large ligands): fewer spheres are compared.
MAX_NODES = 60000
#: Fixed width of a substituent set (phantom atoms pad it).
_WIDTH = 6


@frozen_dataclass
class BranchKey:
    """The comparable value of one branch: larger = higher CIP priority.

    ``rule1`` holds the atomic numbers sphere by sphere, ``rule2`` the mass
    numbers in the same hierarchical order; they are compared in that
    order, ``rule1`` exhausted first.  Each is a pair (best, worst) over
    the ligand's resonance structures, so that the two O atoms of acac or
    the N of pyridine do not depend on one arbitrary Kekulé structure (a
    stand-in for the averaged duplicate atoms of the 2013 CIP rules).
    ``spheres`` is how deep the digraph was built."""

    rule1: tuple
    rule2: tuple
    spheres: int = MAX_SPHERES

    def value(self) -> tuple:
        """The key to compare.

        Returns
        -------
        tuple
            (rule1, rule2), compared in that order.
        """
        return (self.rule1, self.rule2)


class _Node:
    __slots__ = ("z", "m", "children")

    def __init__(self, z: int, m: float):
        self.z = z
        self.m = m
        self.children: list[_Node] = []


def _element(symbol: str) -> tuple[int, float]:
    z = atomic_number(symbol)
    if z <= 0:  # the abstract metal 'M': no element
        return 0, 0.0
    return z, atomic_weight(z)


def _lenient(smiles: str):
    """Read a ligand SMILES leniently: catalogue SMILES such as '[C:1]#O'
    are valence-formal, not charge-separated, so valences are not enforced."""
    from rdkit import Chem

    mol = Chem.MolFromSmiles(smiles, sanitize=False)
    if mol is None:
        raise InputError(
            f"cannot read the ligand SMILES '{smiles}'", "fix the 'smiles' entry of the ligand in ligands.toml"
        )
    try:
        mol.UpdatePropertyCache(strict=False)
        Chem.SanitizeMol(
            mol,
            Chem.SanitizeFlags.SANITIZE_ALL
            ^ Chem.SanitizeFlags.SANITIZE_PROPERTIES
            ^ Chem.SanitizeFlags.SANITIZE_KEKULIZE,
        )
        Chem.Kekulize(mol, clearAromaticFlags=True)
    except Exception:
        raise InputError(
            f"cannot kekulize the ligand SMILES '{smiles}'", "write the ring with explicit single and double bonds"
        ) from None
    return mol


#: At most this many resonance structures are compared per ligand.
MAX_RESONANCE = 12


def _structures(smiles: str) -> tuple:
    """The Kekulé/resonance structures RDKit enumerates for a ligand (one
    structure when the SMILES does not sanitize strictly)."""
    from rdkit import Chem, rdBase

    with rdBase.BlockLogs():  # a valence-formal SMILES is read leniently below, not reported
        strict = Chem.MolFromSmiles(smiles)
    if strict is None:
        return (_lenient(smiles),)
    out = []
    try:
        sup = Chem.ResonanceMolSupplier(strict, Chem.KEKULE_ALL)
        for k in range(min(len(sup), MAX_RESONANCE)):
            m = sup[k]
            if m is not None:
                m = Chem.Mol(m)
                Chem.Kekulize(m, clearAromaticFlags=True)
                out.append(m)
    except Exception:
        out = []
    return tuple(out) if out else (_lenient(smiles),)


#: A ligand's graph: atoms (z, mass, hydrogens), neighbours with bond orders, mapped donors, by atom index.
_Graph = tuple[Mapping[int, tuple[int, float, int]], Mapping[int, tuple[tuple[int, int], ...]], Mapping[int, int]]


@cached(maxsize=1024)
def _graphs(smiles: str, metal: str) -> tuple[_Graph, ...]:
    """The graph of every resonance structure of a ligand, read-only (cached by SMILES and metal)."""
    return tuple(_graph(m, metal) for m in _structures(smiles))


def _graph(mol, metal: str) -> _Graph:
    """Atoms (z, mass, hydrogens), bonds with orders, and the mapped donors;
    the metal is atom index -1, bonded to every mapped donor."""
    atoms: dict[int, tuple[int, float, int]] = {}
    nbrs: dict[int, list[tuple[int, int]]] = {}
    donors: dict[int, int] = {}
    for a in mol.GetAtoms():
        iso = a.GetIsotope()
        mass = float(iso) if iso else round(float(a.GetMass()), 4)
        atoms[a.GetIdx()] = (a.GetAtomicNum(), mass, a.GetTotalNumHs())
        nbrs[a.GetIdx()] = []
        if a.GetAtomMapNum():
            donors[a.GetAtomMapNum()] = a.GetIdx()
    for b in mol.GetBonds():
        order = b.GetBondTypeAsDouble()
        order = 1 if order not in (2.0, 3.0) else int(order)
        i, j = b.GetBeginAtomIdx(), b.GetEndAtomIdx()
        nbrs[i].append((j, order))
        nbrs[j].append((i, order))
    mz, mm = _element(metal)
    atoms[-1] = (mz, mm, 0)
    nbrs[-1] = [(d, 1) for d in donors.values()]
    for d in donors.values():
        nbrs[d].append((-1, 1))
    return (
        MappingProxyType(atoms),
        MappingProxyType({k: tuple(v) for k, v in nbrs.items()}),
        MappingProxyType(donors),
    )


def _build(atoms, nbrs, root: int, spheres: int) -> tuple[_Node, int]:
    """The hierarchical digraph of the branch rooted at ``root`` (the metal
    is its parent), breadth first, to ``spheres`` spheres or MAX_NODES;
    with the number of spheres built in full."""
    z, m, _ = atoms[root]
    top = _Node(z, m)
    frontier = [(top, root, -1, frozenset((-1, root)))]
    count = 1
    reached = spheres
    for level in range(spheres - 1):
        nxt: list[tuple[_Node, int, int, frozenset[int]]] = []
        for node, atom, parent, path in frontier:
            for other, order in nbrs[atom]:
                oz, om, _ = atoms[other]
                if other == parent:
                    node.children.extend(_Node(oz, om) for _ in range(order - 1))
                elif other in path:
                    node.children.extend(_Node(oz, om) for _ in range(order))
                else:
                    child = _Node(oz, om)
                    node.children.append(child)
                    node.children.extend(_Node(oz, om) for _ in range(order - 1))
                    nxt.append((child, other, atom, path | {other}))
            hz, hm = 1, 1.008
            node.children.extend(_Node(hz, hm) for _ in range(atoms[atom][2]))
            count += len(node.children)
        frontier = nxt
        if not frontier:
            break
        if count > MAX_NODES:
            reached = level + 2
            break
    return top, reached


def _levels(node: _Node, depth: int, attr: str, memo: dict, order_memo: dict | None) -> tuple:
    """Sphere-by-sphere values of ``attr`` below ``node`` (hierarchical
    order: children sorted by their own keys, larger first)."""
    key = (id(node), depth, attr)
    if key in memo:
        return memo[key]
    out = [getattr(node, attr)]
    frontier = [node]
    for k in range(1, depth + 1):
        sets = []
        nxt: list[_Node] = []
        for n in frontier:
            ch = _ordered(n, depth - k, attr, memo, order_memo)
            vals = tuple(getattr(c, attr) for c in ch)
            sets.append(vals + (0,) * max(0, _WIDTH - len(vals)))
            nxt.extend(c for c in ch if c.children)
        out.append(tuple(sets))
        frontier = nxt
    res = tuple(out)
    memo[key] = res
    return res


def _ordered(n: _Node, depth: int, attr: str, memo: dict, order_memo: dict | None) -> list[_Node]:
    if attr == "z":
        return sorted(n.children, key=lambda c: _levels(c, depth, "z", memo, None), reverse=True)
    # Rule 2 explores in the order Rule 1 already fixed, then by mass
    return sorted(
        n.children,
        key=lambda c: (_levels(c, depth, "z", memo, None), _levels(c, depth, "m", memo, order_memo)),
        reverse=True,
    )


@cached(maxsize=4096)
def branch_key(smiles: str, donor: int, metal: str = "M", spheres: int = MAX_SPHERES) -> BranchKey:
    """The CIP value of the branch from the metal through the ligating atom
    with atom-map number ``donor`` in ``smiles`` (cached by value).

    Parameters
    ----------
    smiles : str
        The ligand's SMILES, ligating atoms mapped :1, :2, ...
    donor : int
        The map number of the ligating atom.
    metal : str, optional
        The metal's symbol (its duplicate closes chelate rings); 'M' for none.
    spheres : int, optional
        How deep to build the digraph.

    Returns
    -------
    BranchKey

    Raises
    ------
    InputError
        The SMILES cannot be read, or has no atom with that map number.
    """
    graphs = _graphs(smiles, metal)
    if donor not in graphs[0][2]:
        raise InputError(
            f"ligand SMILES '{smiles}' has no atom with map number {donor}",
            "mark the ligating atoms :1, :2, ... in chain order, e.g. [NH2:1]CC[NH2:2]",
        )
    keys = []
    built = spheres
    for atoms, nbrs, donors in graphs:
        tree, reached = _build(atoms, nbrs, donors[donor], spheres)
        built = min(built, reached)
        memo: dict = {}
        keys.append((_levels(tree, spheres, "z", memo, None), _levels(tree, spheres, "m", memo, {})))
    best, worst = max(keys), min(keys)
    return BranchKey((best[0], worst[0]), (best[1], worst[1]), built)


def ring_key(z_sum: int, mass_sum: float) -> BranchKey:
    """An η-bonded ring as one pseudo-atom (sum of its ligating atoms' atomic numbers).

    Parameters
    ----------
    z_sum : int
        Sum of the atomic numbers of the ring's ligating atoms.
    mass_sum : float
        Sum of their masses.

    Returns
    -------
    BranchKey
    """
    return BranchKey(((z_sum,), (z_sum,)), ((mass_sum,), (mass_sum,)))


def letter_key(letter: str, chelate: bool, chain_neighbours: int = 0) -> tuple:
    """Sort key of an abstract ligand letter: smaller = higher priority
    (a > b > ...; a chelate's A just above the monodentate a; within one
    letter of a chelate chain, a donor with two chain neighbours above a
    terminal one, as CIP ranks the NH of dien above its NH2).

    Parameters
    ----------
    letter : str
        The donor letter.
    chelate : bool
        Whether the donor belongs to a chelate.
    chain_neighbours : int, optional
        Its neighbours along the chelate chain (0, 1 or 2).

    Returns
    -------
    tuple
        Compared in ascending order.
    """
    return (letter.lower(), 0 if chelate else 1, -chain_neighbours)


def _chain_neighbours(kind: LigandKind, i: int) -> int:
    """Chain neighbours of donor i of an abstract chelate (donors in chain
    order; a ring ligand has none that matter, every donor of a tripod two)."""
    if kind.denticity < 2 or kind.ring:
        return 0
    if kind.tripod:
        return 2
    return (i > 0) + (i < kind.denticity - 1)


def dense_ranks(values: Sequence, *, larger_first: bool = True) -> tuple[int, ...]:
    """Dense priority numbers (1 = highest) for comparable values.

    >>> dense_ranks([5, 9, 5, 1])
    (2, 1, 2, 3)

    Parameters
    ----------
    values : sequence
        Comparable values.
    larger_first : bool, optional
        Whether the largest value ranks 1.

    Returns
    -------
    tuple of int
        One rank per value, in input order.
    """
    distinct = sorted(set(values), reverse=larger_first)
    pos = {v: k + 1 for k, v in enumerate(distinct)}
    return tuple(pos[v] for v in values)


def _pad(key: BranchKey, n: int) -> tuple:
    """Keys compare on the spheres every branch explored fully (at most n)."""
    return (tuple(k[: n + 1] for k in key.rule1), tuple(k[: n + 1] for k in key.rule2))


def rank_smiles(donors: Iterable[str | tuple[str, int]], metal: str = "M") -> tuple[int, ...]:
    """Priority numbers of ligating atoms given as SMILES (map number 1 on
    the donor) or (SMILES, map number) pairs, in input order.

    Parameters
    ----------
    donors : iterable of str or (str, int)
        Ligand SMILES (donor mapped :1), or (SMILES, map number).
    metal : str, optional
        The metal's symbol.

    Returns
    -------
    tuple of int
        Dense priority numbers, 1 = highest.
    """
    items = [(d, 1) if isinstance(d, str) else (d[0], int(d[1])) for d in donors]
    keys = [branch_key(s, k, metal) for s, k in items]
    n = min(k.spheres for k in keys)
    return dense_ranks([_pad(k, n) for k in keys])


def uses_letters(composition: Composition) -> bool:
    """True when the ligands are abstract letters (no SMILES in their meta).

    Parameters
    ----------
    composition : Composition

    Returns
    -------
    bool
    """
    return not any(k.info("smiles") is not None for k in composition.kinds)


def _kind_keys(kind: LigandKind, metal: str) -> list[BranchKey]:
    smiles = kind.info("smiles")
    if not isinstance(smiles, str) or not smiles:
        raise InputError(
            f"ligand '{kind.name}' has no SMILES, so its CIP priority cannot be computed",
            'add smiles = "..." with the ligating atoms mapped :1, :2, ... to its ligands.toml entry',
        )
    if kind.ring:
        atoms, _, donors = _graphs(smiles, metal)[0]
        hap = int(kind.info("hapticity", len(donors) or kind.denticity))
        if len(donors) >= 2:
            zs = [atoms[i][0] for i in donors.values()]
            ms = [atoms[i][1] for i in donors.values()]
        else:
            z, m = _element(kind.donors[0])
            zs, ms = [z] * hap, [m] * hap
        key = ring_key(sum(zs), round(sum(ms), 4))
        return [key] * kind.denticity
    return [branch_key(smiles, i + 1, metal) for i in range(kind.denticity)]


def donor_priorities(composition: Composition) -> dict[tuple[str, int], int]:
    """Priority number of every ligating atom, keyed by (ligand name, donor
    index): CIP for catalogue ligands, the letter convention for abstract ones.

    >>> from enumerator.parse.abstract import parse_abstract
    >>> sorted(donor_priorities(parse_abstract("M(AB)2c2")).items())
    [(('AB', 0), 1), (('AB', 1), 2), (('c', 0), 3)]

    Parameters
    ----------
    composition : Composition
        The ligands on the centre.

    Returns
    -------
    dict
        (ligand name, donor index) -> dense priority number, 1 = highest; cached by the composition and its
        ligands' catalogue data.

    Raises
    ------
    InputError
        A catalogue ligand has no SMILES, or it cannot be read.
    """
    return dict(_donor_priorities(composition))


#: A bracket atom with an atom-map number: isotope, element symbol (aromatic in lower case), map number.
def _mapped_elements(smiles: str) -> dict[int, int] | None:
    """Atom-map number -> atomic number of the mapped atoms of a SMILES as RDKit reads it (kept for the built-in
    catalogue, :func:`enumerator.rules.parsed.smiles_graph`); a number mapped twice or an unknown symbol gives 0;
    None when RDKit cannot read the SMILES."""
    graph = smiles_graph(smiles)
    if graph is None:
        return None
    out: dict[int, int] = {}
    for a in graph.atoms:
        if a.map_number:
            out[a.map_number] = max(atomic_number(a.symbol), 0) if a.map_number not in out else 0
    return out


def by_donor_element(composition: Composition) -> tuple[tuple[tuple[str, int], int], ...] | None:
    """The priority numbers from the ligating atoms' atomic numbers alone, when those differ pairwise.

    Rule 1a compares the first sphere (the ligating atom) before anything
    else, so when no two ligating atoms of the centre share an element the
    ranking is settled there and the digraph (and RDKit) is not needed.  Used
    only when every ligand is a chain ligand with a SMILES and no hapticity,
    and each SMILES's mapped atom ``:k`` is the element ``donors[k-1]`` names;
    otherwise None, and :func:`donor_priorities` builds the digraph.

    >>> from enumerator.parse.formula import parse_formula
    >>> from enumerator.rules.ruleset import load_rules
    >>> by_donor_element(parse_formula("[PtCl2(NH3)2]", load_rules()))
    ((('Cl', 0), 1), (('NH3', 0), 2))

    Parameters
    ----------
    composition : Composition

    Returns
    -------
    tuple or None
        ((ligand name, donor index), priority number) pairs in the order of the composition's kinds,
        as :func:`donor_priorities` gives them; None when the first sphere does not decide.
    """
    labels: list[tuple[str, int]] = []
    zs: list[int] = []
    for kind in composition.kinds:
        smiles = kind.info("smiles")
        if not isinstance(smiles, str) or not kind.chain or kind.info("hapticity") is not None:
            return None
        mapped = _mapped_elements(smiles)
        if mapped is None or sorted(mapped) != list(range(1, kind.denticity + 1)):
            return None
        for i, d in enumerate(kind.donors):
            z = atomic_number(d)
            if z <= 0 or mapped[i + 1] != z:
                return None
            labels.append((kind.name, i))
            zs.append(z)
    if not zs or len(set(zs)) != len(zs):
        return None
    return tuple(zip(labels, dense_ranks(zs)))


@cached(maxsize=1024)
def _donor_priorities(composition: Composition) -> tuple[tuple[tuple[str, int], int], ...]:
    # keyed by the composition, whose ligand kinds compare their SMILES and other catalogue data too
    if not uses_letters(composition):
        quick = by_donor_element(composition)
        if quick is not None:
            return quick
    return _digraph_priorities(composition)


def _digraph_priorities(composition: Composition) -> tuple[tuple[tuple[str, int], int], ...]:
    """:func:`donor_priorities` by the letter convention or the full digraph (no shortcut)."""
    labels: list[tuple[str, int]] = []
    values: list = []
    if uses_letters(composition):
        for kind in composition.kinds:
            for i, d in enumerate(kind.donors):
                labels.append((kind.name, i))
                values.append(letter_key(d, kind.denticity > 1, _chain_neighbours(kind, i)))
        ranks = dense_ranks(values, larger_first=False)
    else:
        keys: list[BranchKey] = []
        for kind in composition.kinds:
            for i, k in enumerate(_kind_keys(kind, composition.metal)):
                labels.append((kind.name, i))
                keys.append(k)
        n = min(k.spheres for k in keys)
        ranks = dense_ranks([_pad(k, n) for k in keys])
    return tuple(zip(labels, ranks))


def priorities_by_site(composition: Composition, sites: Iterable) -> Mapping[int, int]:
    """{site index: priority number} for an isomer's sites.

    Parameters
    ----------
    composition : Composition
        The ligands on the centre.
    sites : iterable of Site
        An isomer's sites.

    Returns
    -------
    Mapping[int, int]
    """
    table = donor_priorities(composition)
    return {s.index: table[(s.ligand, s.donor_index)] for s in sites}
