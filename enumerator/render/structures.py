"""Structure files and the listing the ``structures`` command prints.

:func:`structure_files` names and writes out a
:class:`~enumerator.structures.result.StructureSet`: one XYZ file per isomer
(``<formula>_<isomer>.xyz``) or one SD file with a record per isomer
(``<formula>.sdf``), the formula reduced to letters, digits and ``_``.
:func:`structure_listing` gives one line per isomer: the file, the isomer,
and whether full ligands or only the donor core were built (and why, or
what clash remains).

>>> from enumerator.workflow.pipeline import analyse
>>> from enumerator.structures.result import structure_set
>>> ss = structure_set(analyse("Ma4b2", geometry="OC-6"))
>>> [name for name, _ in structure_files(ss, "xyz")]
['Ma4b2_1.xyz', 'Ma4b2_2.xyz']
"""

from __future__ import annotations

import re
from pathlib import Path

from enumerator.structures.formats import to_sdf, to_xyz
from enumerator.structures.result import StructureSet
from enumerator.structures.structure import Structure

__all__ = ["FORMATS", "file_stem", "structure_files", "structure_listing", "describe_structure"]

#: File formats: one XYZ file per isomer, or one SD file for all.
FORMATS = ("xyz", "sdf")


def file_stem(text: str) -> str:
    """A file-name-safe form of a formula or id: letters, digits, '-', '_' only.

    >>> file_stem("[RuCl2(CO)2(PPh3)2]")
    'RuCl2_CO_2_PPh3_2'

    Parameters
    ----------
    text : str

    Returns
    -------
    str
    """
    s = re.sub(r"[^A-Za-z0-9]+", "_", text).strip("_")
    return s or "complex"


def _file_names(ss: StructureSet, fmt: str) -> list[str]:
    """The file each structure goes to, in order."""
    stem = file_stem(ss.formula)
    if fmt == "sdf":
        return [f"{stem}.sdf"] * len(ss.structures)
    return [f"{stem}_{file_stem(s.isomer_id)}.xyz" for s in ss.structures]


def structure_files(ss: StructureSet, fmt: str) -> list[tuple[str, str]]:
    """(file name, text) of every file to write.

    Parameters
    ----------
    ss : StructureSet
        The structures.
    fmt : str
        'xyz' (one file per isomer) or 'sdf' (one file).

    Returns
    -------
    list of (str, str)
    """
    if fmt == "sdf":
        return [(f"{file_stem(ss.formula)}.sdf", to_sdf(ss.structures))]
    return [(name, to_xyz(s)) for name, s in zip(_file_names(ss, fmt), ss.structures)]


def describe_structure(s: Structure) -> str:
    """'full ligands' (with a remaining clash) or 'DONOR-ONLY CORE (why)'.

    Parameters
    ----------
    s : Structure

    Returns
    -------
    str
    """
    if s.kind == "full":
        return "full ligands" + (f" - WARNING {s.note}" if s.note else "")
    return f"DONOR-ONLY CORE ({s.note})"


def structure_listing(ss: StructureSet, fmt: str, folder: Path) -> str:
    """One line per isomer: the file written in ``folder``, the isomer id and what was built.

    Parameters
    ----------
    ss : StructureSet
        The structures written.
    fmt : str
        'xyz' or 'sdf'.
    folder : pathlib.Path
        Where the files were written.

    Returns
    -------
    str
        Lines without a final newline.
    """
    return "\n".join(
        f"{folder / name}  isomer {s.isomer_id}: {describe_structure(s)}"
        for name, s in zip(_file_names(ss, fmt), ss.structures)
    )
