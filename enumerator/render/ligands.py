"""The ligand catalogue as a table: terminal text, CSV or JSON.

:func:`render_ligands` draws a :class:`~enumerator.workflow.queries.LigandCatalogue`:
one row per ligand with its donors, sites, hapticity, charge, electron counts
(covalent and ionic models), reporter class, placement limits, aliases and
SMILES; a single ligand asked for by name is followed by its note.

>>> from enumerator.workflow.queries import ligand_catalogue
>>> print(render_ligands(ligand_catalogue(name="CO"), "csv").splitlines()[1])
CO,C,1,,0,2,2,CO,-,carbonyl,[C-:1]#[O+]
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from types import MappingProxyType

from enumerator.render.formats import write_in
from enumerator.render.jsonout import dumps
from enumerator.render.tables import write_csv
from enumerator.render.text import table
from enumerator.rules.ligands import LigandEntry
from enumerator.workflow.queries import LigandCatalogue

__all__ = ["HEADER", "FORMATS", "ligand_cells", "render_ligands"]

#: Column headers of the catalogue table.
HEADER = ("name", "donors", "sites", "η", "charge", "e cov", "e ion", "reporter", "placement", "aliases", "SMILES")


def _placement(e: LigandEntry) -> str:
    if e.ring:
        return "η-ring (one site)"
    if e.topology == "tripod":
        return "tripod (facial)"
    return ",".join(e.arrangements) or ",".join(e.spans) or ("-" if e.denticity == 1 else "edge")


def ligand_cells(e: LigandEntry) -> list[str]:
    """The cells of one ligand, in the order of :data:`HEADER`.

    Parameters
    ----------
    e : LigandEntry

    Returns
    -------
    list of str
    """
    return [
        e.name,
        "".join(e.donors) if e.ring else "-".join(e.donors),
        str(e.denticity),
        str(e.hapticity or ""),
        f"{e.charge:+d}" if e.charge else "0",
        str(e.electrons_covalent),
        str(e.electrons_ionic),
        e.reporter or "",
        _placement(e),
        ", ".join(e.aliases),
        e.smiles,
    ]


def _json(cat: LigandCatalogue) -> str:
    return dumps(cat.to_dict())


def _csv(cat: LigandCatalogue) -> str:
    return write_csv(HEADER, [ligand_cells(e) for e in cat.entries])


def _table(cat: LigandCatalogue) -> str:
    text = table(HEADER, [ligand_cells(e) for e in cat.entries])
    if cat.name is not None and cat.entries[0].note:
        text += f"\nnote: {cat.entries[0].note}"
    return text + "\n"


_WRITERS: Mapping[str, Callable[[LigandCatalogue], str]] = MappingProxyType(
    {"table": _table, "csv": _csv, "json": _json}
)

#: The formats of ``isosieve ligands --format``.
FORMATS: tuple[str, ...] = tuple(_WRITERS)


def render_ligands(cat: LigandCatalogue, fmt: str) -> str:
    """The catalogue (or one ligand) in one format.

    Parameters
    ----------
    cat : LigandCatalogue
    fmt : str
        One of :data:`FORMATS`: table, csv or json.

    Returns
    -------
    str

    Raises
    ------
    InputError
        An unknown format.
    """
    return write_in(_WRITERS, fmt, cat, "use --format table")
