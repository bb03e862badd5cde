"""The geometries in force, as a table or a JSON document (``isosieve geometries``)."""

from __future__ import annotations

from enumerator.render.jsonout import dumps
from enumerator.render.text import table
from enumerator.workflow.queries import GeometryCatalogue

__all__ = ["render_geometries"]

_HEADER = ("symbol", "name", "CN", "group", "operations", "edges", "often fluxional")
_LINEAR_NOTE = "* a linear centre's group is infinite; its action on the sites is carried by a finite D2h subgroup."


def render_geometries(catalogue: GeometryCatalogue, as_json: bool = False) -> str:
    """The output of ``isosieve geometries``.

    Parameters
    ----------
    catalogue : GeometryCatalogue
    as_json : bool
        The JSON document instead of the table.

    Returns
    -------
    str
        Newline-terminated text.
    """
    if as_json:
        return dumps(catalogue.to_dict())
    rows = [
        [
            g.symbol,
            g.name,
            str(g.coordination_number),
            g.point_group,
            str(len(g.operations)) + ("*" if g.linear else ""),
            str(len(g.edges)),
            "yes" if g.fluxional else "no",
        ]
        for g in catalogue.geometries
    ]
    text = table(_HEADER, rows)
    if any(g.linear for g in catalogue.geometries):
        text += "\n" + _LINEAR_NOTE
    text += "".join(f"\nnote: {g.adjusted}" for g in catalogue.geometries if g.adjusted)
    return text + "\n"
