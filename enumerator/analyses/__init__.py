"""Analyses of an isomer set: centre chemistry, safety, stretch species and
NMR environments, IUPAC descriptors and names."""
