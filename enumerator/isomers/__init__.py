"""Isomers: orbits of decorated site sets (enumeration) and Burnside counts."""

from enumerator.isomers.enumeration import Isomer, IsomerSet, Site, enumerate_isomers, generate

__all__ = ["Isomer", "IsomerSet", "Site", "enumerate_isomers", "generate"]
