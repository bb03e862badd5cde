"""File formats of starting structures: XYZ and SDF.

* XYZ: the atom count, the title line, then ``El x y z`` in angstrom (six
  decimals, no negative zero), one block per isomer;
* SDF (MDL V2000 molfile records, written by RDKit): one record per isomer,
  the title in the header line and data fields ``formula``, ``isomer``,
  ``point_group``, ``geometry``, ``structure``, ``charge`` and, where a clash
  remains, ``warning``.  Labels that are not elements are atomic number 0.
"""

from __future__ import annotations

from collections.abc import Iterable

from enumerator.isomers.enumeration import Isomer
from enumerator.model.composition import Composition
from enumerator.structures.structure import Structure

__all__ = ["molblock", "to_xyz", "to_sdf"]


def molblock(mol, title: str, isomer: Isomer, comp: Composition, kind: str, warning: str = "") -> str:
    """One SDF record of an RDKit molecule (with one conformer), without the ``$$$$`` terminator.

    Parameters
    ----------
    mol : rdkit.Chem.Mol
        The molecule; its ``_Name`` is set to ``title`` (at most 200 characters).
    title : str
        The header line.
    isomer : Isomer
        The isomer it shows (id, point group, geometry).
    comp : Composition
        Its composition (formula, charge).
    kind : str
        'full' or 'core'.
    warning : str, optional
        A remaining clash, written as the ``warning`` field.

    Returns
    -------
    str
    """
    from rdkit import Chem

    mol.SetProp("_Name", title[:200])
    block = Chem.MolToMolBlock(mol)
    props = [
        ("formula", comp.formula),
        ("isomer", isomer.id),
        ("point_group", isomer.point_group),
        ("geometry", isomer.geometry.symbol),
        ("structure", "full ligands" if kind == "full" else "DONOR-ONLY CORE"),
        ("charge", str(comp.charge)),
    ]
    if warning:
        props.append(("warning", warning))
    tail = "".join(f">  <{k}>\n{v}\n\n" for k, v in props)
    return block + tail


def to_xyz(structure: Structure) -> str:
    """One XYZ block: atom count, the title line, then 'El x y z' in angstrom.

    Parameters
    ----------
    structure : Structure

    Returns
    -------
    str
    """
    lines = [str(len(structure.symbols)), structure.title.replace("\n", " ")]
    for sym, (x, y, z) in zip(structure.symbols, structure.coords):
        lines.append(f"{sym:<2} {x:12.6f} {y:12.6f} {z:12.6f}".replace("-0.000000", " 0.000000"))
    return "\n".join(lines) + "\n"


def to_sdf(structures: Iterable[Structure]) -> str:
    """An SD file of the given structures, one record each.

    Parameters
    ----------
    structures : iterable of Structure

    Returns
    -------
    str
    """
    return "".join(s.molblock + "$$$$\n" for s in structures)
