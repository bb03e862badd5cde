"""Stored command outputs that must regenerate byte for byte.

Each entry names a file in ``tests/support/golden/`` and the ``isosieve``
arguments that print it.  If an output changes on purpose, refresh the file
with ``python -m enumerator <args> > tests/support/golden/<file>`` and say why
in the commit.
"""

from __future__ import annotations

from pathlib import Path

__all__ = ["GOLDEN", "GOLDEN_DIR"]

GOLDEN_DIR = Path(__file__).resolve().parent / "golden"

#: file name -> command-line arguments
GOLDEN = {
    "chartable_D4h.txt": ("chartable", "D4h"),
    "chartable_Ih.json": ("chartable", "Ih", "--json"),
    "chartable_Ma2b2c2_isomer_2.txt": ("chartable", "Ma2b2c2", "--isomer", "2"),
    "chartable_MAA2b2.json": ("chartable", "M(AA)2b2", "--json"),
    "count_MAAb4_span_trans.json": ("count", "M(AA)b4", "--span", "AA=trans", "--json"),
    "count_Mabcdefghijkl_IC-12.txt": ("count", "Mabcdefghijkl", "-g", "IC-12"),
}
