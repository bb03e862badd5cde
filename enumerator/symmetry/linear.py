"""A linear centre's symmetry by correlation.

The groups of a linear centre (D∞h, C∞v) are infinite, so no finite character
table exists.  The site permutations of a linear centre are carried by a finite
subgroup (D2h for D∞h, C2v for C∞v); stretch species found there are renamed
by the standard correlation of those subgroups' species to the linear groups'
(e.g. Herzberg, *Infrared and Raman Spectra*, correlation tables; from memory).
Only the species a set of bond stretches along the axis can span are listed.

>>> LINEAR_CORRELATION["Dinfh"]["B1u"]
'Sigma_u+'
"""

from __future__ import annotations

from types import MappingProxyType

__all__ = ["LINEAR_CORRELATION", "LINEAR_IR", "LINEAR_RAMAN"]

#: Species of the finite proxy group -> species of the linear group, per linear group.
LINEAR_CORRELATION = MappingProxyType(
    {
        "Dinfh": MappingProxyType({"Ag": "Sigma_g+", "B1u": "Sigma_u+"}),
        "Cinfv": MappingProxyType({"A1": "Sigma+"}),
    }
)
#: Linear-group stretch species that are IR active (they transform as z).
LINEAR_IR = frozenset({"Sigma_u+", "Sigma+"})
#: Linear-group stretch species that are Raman active (they transform as x2+y2 or z2).
LINEAR_RAMAN = frozenset({"Sigma_g+", "Sigma+"})
