"""One result in any format of ``isosieve isomers --format``.

:func:`render_result` picks the writer: the terminal text
(:func:`enumerator.render.text.render`), the Markdown, CSV or LaTeX table
(:mod:`enumerator.render.tables`), or the JSON document
(:meth:`enumerator.workflow.result.Result.to_dict` written by
:func:`enumerator.render.jsonout.dumps`).

>>> from enumerator.workflow.pipeline import analyse
>>> render_result(analyse("Ma5b", geometry="OC-6"), "csv").splitlines()[0]
'formula,geometry,isomer,point group,chiral,enantiomer,descriptor,NMR environments,sites'
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from types import MappingProxyType

from enumerator.render import tables
from enumerator.render.formats import write_in
from enumerator.render.jsonout import dumps, gc_paused
from enumerator.render.text import render
from enumerator.workflow.result import Result

__all__ = ["FORMATS", "render_result"]


def _json(res: Result) -> str:
    # a document of a few million plain dicts, lists and strings, none in a cycle: reference counting frees
    # them, and the cyclic collector's passes over them (while they are built) cost as much as building them
    with gc_paused():
        return dumps(res.to_dict())


_WRITERS: Mapping[str, Callable[[Result], str]] = MappingProxyType(
    {
        "table": render,
        "markdown": tables.markdown,
        "csv": tables.csv,
        "latex": tables.latex,
        "json": _json,
    }
)

#: The formats, in the order the command lists them.
FORMATS: tuple[str, ...] = tuple(_WRITERS)


def render_result(res: Result, fmt: str) -> str:
    """The text of one result in one format.

    Parameters
    ----------
    res : Result
        The analysed formula.
    fmt : str
        One of :data:`FORMATS`: table, markdown, csv, latex or json.

    Returns
    -------
    str

    Raises
    ------
    InputError
        An unknown format.
    """
    return write_in(_WRITERS, fmt, res, "use --format table")
