"""3D starting structures of isomers, and their file formats.

One job per module:

* :mod:`.placement`: the ideal polyhedron scaled to bond lengths (metal,
  donors, η-rings);
* :mod:`.embed`: the full complex as one RDKit molecule, embedded with the
  donors held;
* :mod:`.relax`: relieving close contacts between ligands (rotor search,
  UFF) and reporting what is left;
* :mod:`.mirror`: one enantiomer's coordinates as the mirror image of the other's;
* :mod:`.build`: one isomer's :class:`Structure`, full or donor-only core;
* :mod:`.formats`: XYZ and SDF text;
* :mod:`.result`: the structures of a whole result (:class:`StructureSet`).
"""

from enumerator.structures.build import build_structure, structures_for
from enumerator.structures.formats import to_sdf, to_xyz
from enumerator.structures.placement import DUMMY_DISTANCE, RING_BOND, bond_length, element_or_none
from enumerator.structures.relax import CLASH_FRACTION, closest_contact
from enumerator.structures.result import StructureSet, structure_set
from enumerator.structures.structure import Structure

__all__ = [
    "Structure",
    "StructureSet",
    "build_structure",
    "structures_for",
    "structure_set",
    "to_xyz",
    "to_sdf",
    "bond_length",
    "element_or_none",
    "closest_contact",
    "DUMMY_DISTANCE",
    "RING_BOND",
    "CLASH_FRACTION",
]
