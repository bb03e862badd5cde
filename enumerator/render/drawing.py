"""Structure drawings for the report: a 3D starting structure in ball-and-stick, coloured by element.

:func:`molecule_scene` lays out one :class:`~enumerator.structures.structure.Structure`
(the model ``isosieve structures`` writes) as a :class:`~enumerator.render.scene.Scene`:
an oblique view of the same frame as the polyhedron drawings (turned 32
degrees about z, tilted 20 degrees), bonds from the model's SD record (so an
eta-ring is drawn as the ring it is), atoms in the Jmol element colours
(:data:`JMOL_COLOURS`; the common CPK-derived convention of Jmol, as pymatgen
ships it in ``pymatgen/vis/ElementColorSchemes.yaml``), far atoms first,
hydrogen atoms left out, a row of element keys, and one label per ligand
(typeset: counts as subscripts) placed outward from its donor and pushed
apart until no two labels overlap.  The report draws the scene as inline SVG
(:func:`~enumerator.render.scene.scene_svg`); :func:`molecule_figure` draws
the same scene with matplotlib, and :func:`figure_svg` turns any figure into
deterministic SVG text.

The figures are bare :class:`matplotlib.figure.Figure` objects (no pyplot, so
no global backend is touched).  Every text is drawn as text with matplotlib's
math parser off for it (a ``$`` in a ligand name stays a dollar sign).

>>> from enumerator.workflow.pipeline import analyse
>>> from enumerator.structures.result import structure_set
>>> s = structure_set(analyse("[CpFe(CO)2Cl]")).structures[0]
>>> fig = molecule_figure(s, [("Cp", (1, 2, 3, 4, 5))])
>>> sorted(t.get_text() for t in fig.legends[0].get_texts())
['C', 'Cl', 'Fe', 'O']
"""

from __future__ import annotations

import io
import math
from collections.abc import Mapping, Sequence
from types import MappingProxyType
from typing import TYPE_CHECKING

from enumerator.caches import cached
from enumerator.render.scene import Disc, Item, Key, Label, Line, Panel, Runs, Scene, runs, scene_figure
from enumerator.structures.structure import Structure

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

__all__ = [
    "JMOL_COLOURS",
    "element_colour",
    "project",
    "molecule_scene",
    "molecule_figure",
    "figure_svg",
    "plain_text",
    "mpl_formula",
    "donor_atoms",
]

#: Element -> colour of Jmol's table (H to Rn), as pymatgen ships it (ElementColorSchemes.yaml, "Jmol").
JMOL_COLOURS: Mapping[str, str] = MappingProxyType(
    {
        "H": "#FFFFFF",
        "He": "#D9FFFF",
        "Li": "#CC80FF",
        "Be": "#C2FF00",
        "B": "#FFB5B5",
        "C": "#909090",
        "N": "#3050F8",
        "O": "#FF0D0D",
        "F": "#90E050",
        "Ne": "#B3E3F5",
        "Na": "#AB5CF2",
        "Mg": "#8AFF00",
        "Al": "#BFA6A6",
        "Si": "#F0C8A0",
        "P": "#FF8000",
        "S": "#FFFF30",
        "Cl": "#1FF01F",
        "Ar": "#80D1E3",
        "K": "#8F40D4",
        "Ca": "#3DFF00",
        "Sc": "#E6E6E6",
        "Ti": "#BFC2C7",
        "V": "#A6A6AB",
        "Cr": "#8A99C7",
        "Mn": "#9C7AC7",
        "Fe": "#E06633",
        "Co": "#F090A0",
        "Ni": "#50D050",
        "Cu": "#C88033",
        "Zn": "#7D80B0",
        "Ga": "#C28F8F",
        "Ge": "#668F8F",
        "As": "#BD80E3",
        "Se": "#FFA100",
        "Br": "#A62929",
        "Kr": "#5CB8D1",
        "Rb": "#702EB0",
        "Sr": "#00FF00",
        "Y": "#94FFFF",
        "Zr": "#94E0E0",
        "Nb": "#73C2C9",
        "Mo": "#54B5B5",
        "Tc": "#3B9E9E",
        "Ru": "#248F8F",
        "Rh": "#0A7D8C",
        "Pd": "#006985",
        "Ag": "#C0C0C0",
        "Cd": "#FFD98F",
        "In": "#A67573",
        "Sn": "#668080",
        "Sb": "#9E63B5",
        "Te": "#D47A00",
        "I": "#940094",
        "Xe": "#429EB0",
        "Cs": "#57178F",
        "Ba": "#00C900",
        "La": "#70D4FF",
        "Ce": "#FFFFC7",
        "Pr": "#D9FFC7",
        "Nd": "#C7FFC7",
        "Pm": "#A3FFC7",
        "Sm": "#8FFFC7",
        "Eu": "#61FFC7",
        "Gd": "#45FFC7",
        "Tb": "#30FFC7",
        "Dy": "#1FFFC7",
        "Ho": "#00FF9C",
        "Er": "#00E675",
        "Tm": "#00D452",
        "Yb": "#00BF38",
        "Lu": "#00AB24",
        "Hf": "#4DC2FF",
        "Ta": "#4DA6FF",
        "W": "#2194D6",
        "Re": "#267DAB",
        "Os": "#266696",
        "Ir": "#175487",
        "Pt": "#D0D0E0",
        "Au": "#FFD123",
        "Hg": "#B8B8D0",
        "Tl": "#A6544D",
        "Pb": "#575961",
        "Bi": "#9E4FB5",
        "Po": "#AB5C00",
        "At": "#754F45",
        "Rn": "#428296",
    }
)

_ROT_Z = math.radians(-32.0)
_TILT = math.radians(20.0)


def element_colour(symbol: str) -> str:
    """The Jmol colour of an element (grey for a symbol that is no element, such as a letter ligand).

    Parameters
    ----------
    symbol : str

    Returns
    -------
    str
        '#RRGGBB'.
    """
    return JMOL_COLOURS.get(symbol, "#B0B0B0")


def project(v: Sequence[float]) -> tuple[float, float, float]:
    """The oblique view of the drawings: (screen x, screen y upwards, depth; larger depth = farther).

    Parameters
    ----------
    v : sequence of float
        A point in the model's frame (angstrom).

    Returns
    -------
    (float, float, float)
    """
    x, y, z = (float(c) for c in v)
    cz, sz = math.cos(_ROT_Z), math.sin(_ROT_Z)
    x, y = cz * x - sz * y, sz * x + cz * y
    ct, st = math.cos(_TILT), math.sin(_TILT)
    y, z = ct * y - st * z, st * y + ct * z
    return x, z, y


def plain_text(text: str) -> str:
    """Text that matplotlib draws as written (its math parser reads ``$...$``).

    Parameters
    ----------
    text : str

    Returns
    -------
    str
    """
    return text.replace("$", "\\$")


def _bonds(s: Structure) -> tuple[tuple[int, int], ...]:
    return _sd_bonds(s.molblock, len(s.symbols))


@cached(maxsize=64)
def _sd_bonds(molblock: str, atoms: int) -> tuple[tuple[int, int], ...]:
    """The bonds of an SD record (read once per record: the drawing and the donor search both ask)."""
    from rdkit import Chem

    mol = Chem.MolFromMolBlock(molblock + "\n", sanitize=False, removeHs=False)
    if mol is None:
        return tuple((0, k) for k in range(1, atoms))
    return tuple((b.GetBeginAtomIdx(), b.GetEndAtomIdx()) for b in mol.GetBonds())


def _components(n: int, bonds: Sequence[tuple[int, int]]) -> dict[int, tuple[int, ...]]:
    """Atom -> the atoms of its ligand (connected without the metal, atom 0)."""
    adj: dict[int, set[int]] = {k: set() for k in range(n)}
    for a, b in bonds:
        if 0 not in (a, b):
            adj[a].add(b)
            adj[b].add(a)
    out: dict[int, tuple[int, ...]] = {}
    for k in range(1, n):
        if k in out:
            continue
        seen, todo = {k}, [k]
        while todo:
            for j in adj[todo.pop()] - seen:
                seen.add(j)
                todo.append(j)
        comp = tuple(sorted(seen))
        out.update(dict.fromkeys(comp, comp))
    return out


def _hapto_groups(s: Structure, bonds: Sequence[tuple[int, int]]) -> list[set[int]]:
    """Sets of two or more metal-bound atoms bonded to each other (an eta-ring, an eta2-alkene)."""
    bound = {b if a == 0 else a for a, b in bonds if 0 in (a, b)}
    groups: list[set[int]] = []
    for a, b in bonds:
        if a in bound and b in bound and 0 not in (a, b):
            hit = [g for g in groups if a in g or b in g]
            merged = {a, b}.union(*hit)
            groups = [g for g in groups if g not in hit] + [merged]
    return groups


def _place_labels(
    anchors: Sequence[tuple[float, float, float, str]], centre: tuple[float, float]
) -> list[tuple[float, float, str]]:
    """Label positions just beyond each ligand's reach from the metal, then pushed apart until no two boxes
    overlap (at most 200 rounds of pairwise pushes; boxes estimated from the text length, angstrom units)."""
    xy: list[list[float]] = []
    texts = [t for *_, t in anchors]
    for x, y, reach, _ in anchors:
        dx, dy = x - centre[0], y - centre[1]
        n = math.hypot(dx, dy) or 1.0
        xy.append([centre[0] + (reach + 0.7) * dx / n, centre[1] + (reach + 0.7) * dy / n])
    for _ in range(200):
        moved = False
        for i in range(len(xy)):
            for j in range(i + 1, len(xy)):
                a, b = xy[i], xy[j]
                ox = 0.26 * (len(texts[i]) + len(texts[j])) + 0.3 - abs(a[0] - b[0])
                oy = 0.84 - abs(a[1] - b[1])
                if ox > 0 and oy > 0:
                    moved = True
                    axis, gap = (1, oy) if oy < ox else (0, ox)
                    sgn = 1.0 if a[axis] >= b[axis] else -1.0
                    a[axis] += sgn * (gap / 2 + 0.01)
                    b[axis] -= sgn * (gap / 2 + 0.01)
        if not moved:
            break
    return [(p[0], p[1], t) for p, t in zip(xy, texts)]


#: The picture of a structure: 3.3 x 3.5 inches (points), the drawing a square above a row of element keys.
_SIZE = (3.3 * 72, 3.5 * 72)
_SIDE = 0.78 * _SIZE[1]
_RECT = ((1 - _SIDE / _SIZE[0]) / 2, 0.16, _SIDE / _SIZE[0], 0.78)


def molecule_scene(s: Structure, ligand_atoms: Sequence[tuple[str, Sequence[int]]] = (), *, title: str = "") -> Scene:
    """The drawing of one structure as plain geometry: bonds, atoms, ligand labels, element keys.

    Parameters
    ----------
    s : Structure
        A starting structure (metal first).
    ligand_atoms : sequence of (str, sequence of int)
        A label and the atoms (0-based) it names, per ligand; the label goes beside their centre, outward.
    title : str
        Drawn above the structure.

    Returns
    -------
    Scene
        Draw it with :func:`~enumerator.render.scene.scene_svg` or
        :func:`~enumerator.render.scene.scene_figure`.
    """
    shown = [k for k, e in enumerate(s.symbols) if e != "H"]
    pts = {k: project(s.coords[k]) for k in shown}
    bonds = _bonds(s)
    items: list[Item] = _bond_lines(pts, bonds, _hapto_groups(s, bonds))
    items += _atom_discs(s, pts)
    labels = _labels(pts, ligand_atoms, _components(len(s.symbols), bonds))
    items += labels
    xs = [p[0] for p in pts.values()] + [t.x + sgn * 0.14 * _chars(t.text) for t in labels for sgn in (-1, 1)]
    ys = [p[1] for p in pts.values()] + [t.y + sgn * 0.45 for t in labels for sgn in (-1, 1)]
    half = max(max(xs) - min(xs), max(ys) - min(ys)) / 2 + 0.6
    mx, my = (max(xs) + min(xs)) / 2, (max(ys) + min(ys)) / 2
    metal = s.symbols[0]
    elements = sorted({s.symbols[k] for k in shown}, key=lambda e: (e != metal, e))
    panel = Panel(
        _RECT,
        (mx - half, mx + half),
        (my - half, my + half),
        tuple(items),
        title=runs(title) if title else (),
        title_size=8.0,
        title_left=False,
    )
    keys = tuple(Key(runs(e), "disc", element_colour(e)) for e in elements)
    return Scene(
        _SIZE[0], _SIZE[1], (panel,), keys, 7.0, f"structure of {s.isomer_id}" + (f": {title}" if title else "")
    )


def molecule_figure(
    s: Structure,
    ligand_atoms: Sequence[tuple[str, Sequence[int]]] = (),
    *,
    ax: Axes | None = None,
    title: str = "",
) -> Figure:
    """One structure in ball-and-stick, coloured by element, with an element legend and ligand labels.

    The drawing of :func:`molecule_scene`, drawn with matplotlib.

    Parameters
    ----------
    s : Structure
        A starting structure (metal first).
    ligand_atoms : sequence of (str, sequence of int)
        A label and the atoms (0-based) it names, per ligand; the label goes beside their centre, outward.
    ax : matplotlib Axes, optional
        Draw into these axes (default: a new figure of its own, with the element legend below).
    title : str
        Drawn above the structure.

    Returns
    -------
    matplotlib.figure.Figure
        The figure the drawing is in.
    """
    return scene_figure(molecule_scene(s, ligand_atoms, title=title), None if ax is None else [ax])


Points = Mapping[int, tuple[float, float, float]]


def _bond_lines(pts: Points, bonds: Sequence[tuple[int, int]], hapto: Sequence[set[int]]) -> list[Item]:
    """Bonds as lines, far ones underneath; an eta-bound group through one dashed line to its centroid."""
    bound = set().union(*hapto)
    out: list[Item] = []
    for a, b in bonds:
        if a not in pts or b not in pts or (0 in (a, b) and (a or b) in bound):
            continue
        (x1, y1, d1), (x2, y2, d2) = pts[a], pts[b]
        out.append(Line(((x1, y1), (x2, y2)), "#444444", 1.6, z=10 - (d1 + d2) / 2, round_cap=True))
    for group in hapto:
        cx, cy = (sum(pts[a][i] for a in group) / len(group) for i in (0, 1))
        out.append(Line(((pts[0][0], pts[0][1]), (cx, cy)), "#444444", 1.2, (3.0, 2.0), z=9))
    return out


def _atom_discs(s: Structure, pts: Points) -> list[Item]:
    """Atoms as element-coloured discs, far ones first; the metal larger, with its symbol."""
    out: list[Item] = []
    for k in sorted(pts, key=lambda k: -pts[k][2]):
        x, y, d = pts[k]
        out.append(Disc(x, y, 0.5 if k == 0 else 0.3, element_colour(s.symbols[k]), z=20 - d))
    out.append(Label(pts[0][0], pts[0][1], runs(s.symbols[0]), 7.0, z=40))
    return out


def _chars(text: Runs) -> int:
    return sum(len(t) for _, t in text)


def _labels(
    pts: Points, ligand_atoms: Sequence[tuple[str, Sequence[int]]], parts: Mapping[int, tuple[int, ...]]
) -> list[Label]:
    """One label per ligand, just beyond its atoms as seen from the metal, none overlapping another."""
    from enumerator.render.typeset import formula_parts

    anchors = []
    for label, atoms in ligand_atoms:
        body = sorted({k for a in atoms for k in parts.get(a, (a,)) if k in pts})
        if not body:
            continue
        cx = sum(pts[a][0] for a in body) / len(body)
        cy = sum(pts[a][1] for a in body) / len(body)
        reach = max(math.hypot(pts[a][0] - pts[0][0], pts[a][1] - pts[0][1]) for a in body)
        anchors.append((cx, cy, reach, label))
    placed = _place_labels(anchors, (pts[0][0], pts[0][1]))
    return [Label(x, y, formula_parts(text), 7.5, box=True, z=50) for x, y, text in placed]


def mpl_formula(text: str) -> str:
    """A ligand or formula label for matplotlib: counts as subscripts, mass numbers raised, the rest as text.

    Parameters
    ----------
    text : str

    Returns
    -------
    str

    >>> mpl_formula("PPh3"), mpl_formula("13CO")
    ('PPh$_{3}$', '$^{13}$CO')
    """
    from enumerator.render.typeset import formula_parts

    out = []
    for kind, t in formula_parts(text):
        out.append(plain_text(t) if kind == "text" else (f"$_{{{t}}}$" if kind == "sub" else f"$^{{{t}}}$"))
    return "".join(out)


def figure_svg(fig: Figure) -> bytes:
    """A figure as deterministic SVG (text kept as text, fixed ids, no date).

    Parameters
    ----------
    fig : matplotlib.figure.Figure

    Returns
    -------
    bytes
    """
    import matplotlib

    buf = io.BytesIO()
    with matplotlib.rc_context({"svg.hashsalt": "isosieve", "svg.fonttype": "none"}):
        fig.savefig(buf, format="svg", metadata={"Date": None})
    return buf.getvalue()


def donor_atoms(s: Structure, directions: Sequence[Sequence[float]]) -> tuple[int, ...]:
    """For each site direction, the atom bonded to the metal that lies closest to it (by angle).

    Parameters
    ----------
    s : Structure
    directions : sequence of 3-vectors
        The site vectors of the isomer (the model's frame).

    Returns
    -------
    tuple of int
        One atom index per direction.
    """
    bonds = _bonds(s)
    bonded = [b for a, b in bonds if a == 0] + [a for a, b in bonds if b == 0]
    cands = [k for k in bonded if s.symbols[k] != "H"] or list(range(1, len(s.symbols)))
    out = []
    for d in directions:
        n = math.sqrt(sum(c * c for c in d)) or 1.0

        def cos(k: int, d: Sequence[float] = d, n: float = n) -> float:
            v = s.coords[k]
            m = math.sqrt(sum(c * c for c in v)) or 1.0
            return sum(a * b for a, b in zip(v, d)) / (m * n)

        out.append(max(cands, key=lambda k: (cos(k), -k)))
    return tuple(out)
