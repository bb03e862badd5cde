"""Value objects of the chemistry: coordination geometries (site vectors and
their derived symmetry) and compositions (ligand kinds and counts)."""
