"""3D starting structures of isomers, and their file formats."""
