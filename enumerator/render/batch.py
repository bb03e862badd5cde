"""A batch screen as a table: terminal text, CSV, Markdown or JSON.

:func:`render_batch` draws a :class:`~enumerator.workflow.batch.BatchResult`
with the columns of :data:`HEADER`, one row per input formula (point groups
as ``id:group``, IR band counts as ``id:class=count``); JSON is the result's
``to_dict()``.

>>> from enumerator.workflow.batch import run_batch
>>> print(render_batch(run_batch(["Ma5b"]), "csv").splitlines()[1])
1,,Ma5b,,,,,OC-6,1,1,1:C4v,,
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from types import MappingProxyType
from typing import Any

from enumerator.render.formats import write_in
from enumerator.render.jsonout import dumps
from enumerator.render.tables import write_csv
from enumerator.render.text import table
from enumerator.workflow.batch import BatchResult, BatchRow

__all__ = ["HEADER", "FORMATS", "row_cells", "render_batch"]

#: Column headers of the batch table (text, CSV, Markdown).
HEADER = (
    "#",
    "label",
    "formula",
    "metal",
    "oxidation state",
    "d",
    "VE",
    "geometry",
    "geometric isomers",
    "stereoisomers",
    "point groups",
    "IR bands",
    "error",
)


def _s(x: Any) -> str:
    return "" if x is None else str(x)


def row_cells(r: BatchRow) -> list[str]:
    """The cells of one row, in the order of :data:`HEADER`.

    Parameters
    ----------
    r : BatchRow

    Returns
    -------
    list of str
    """
    return [
        str(r.index + 1),
        r.label,
        r.formula,
        _s(r.metal),
        _s(r.oxidation_state),
        _s(r.d_electrons),
        _s(r.valence_electrons),
        _s(r.geometry),
        _s(r.geometric_isomers),
        _s(r.stereoisomers),
        " ".join(f"{i}:{g}" for i, g in r.point_groups),
        " ".join(f"{i}:{c}={n}" for i, c, n in r.ir_bands),
        r.error or "",
    ]


def _json(res: BatchResult) -> str:
    return dumps(res.to_dict())


def _csv(res: BatchResult) -> str:
    return write_csv(HEADER, [row_cells(r) for r in res.rows])


def _markdown(res: BatchResult) -> str:
    out = ["| " + " | ".join(HEADER) + " |", "|" + "|".join("---" for _ in HEADER) + "|"]
    out += ["| " + " | ".join(c.replace("|", "\\|") for c in row_cells(r)) + " |" for r in res.rows]
    return "\n".join(out) + "\n"


def _table(res: BatchResult) -> str:
    return table(HEADER, [row_cells(r) for r in res.rows]) + "\n"


_WRITERS: Mapping[str, Callable[[BatchResult], str]] = MappingProxyType(
    {
        "table": _table,
        "csv": _csv,
        "json": _json,
        "markdown": _markdown,
    }
)

#: The formats of ``isosieve batch --format``.
FORMATS: tuple[str, ...] = tuple(_WRITERS)


def render_batch(res: BatchResult, fmt: str) -> str:
    """The whole screen in one format.

    Parameters
    ----------
    res : BatchResult
    fmt : str
        One of :data:`FORMATS`: table, csv, json or markdown.

    Returns
    -------
    str

    Raises
    ------
    InputError
        An unknown format.
    """
    return write_in(_WRITERS, fmt, res, "use --format table")
