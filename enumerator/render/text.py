"""Tables for people: plain monospaced text for the terminal.

:func:`render` writes one result: the heading, the isomer table (every
analysis's columns except the wide ones), every analysis's sections, and the
notes.  :func:`table` is the column layout shared by every command.

>>> print(table(["isomer", "point group"], [["1", "C2v"], ["2", "D4h"]]))
isomer  point group
------  -----------
1       C2v
2       D4h
"""

from __future__ import annotations

from collections.abc import Sequence

from enumerator.render.sections import result_sections
from enumerator.workflow.result import Result

__all__ = ["table", "isomer_table", "isomer_rows", "render"]


def table(header: Sequence[str], rows: Sequence[Sequence[str]], indent: str = "") -> str:
    """Left-aligned columns separated by two spaces, with a rule under the header.

    Parameters
    ----------
    header : sequence of str
        The column titles.
    rows : sequence of sequence of str
        The cells, one row per entry.
    indent : str, optional
        Put in front of every line.

    Returns
    -------
    str
        The table without a final newline; trailing blanks are stripped.
    """
    widths = [len(h) for h in header]
    for r in rows:
        for k, cell in enumerate(r):
            widths[k] = max(widths[k], len(cell))

    def line(cells: Sequence[str]) -> str:
        return indent + "  ".join(c.ljust(w) for c, w in zip(cells, widths)).rstrip()

    out = [line(header), indent + "  ".join("-" * w for w in widths)]
    out += [line(r) for r in rows]
    return "\n".join(out)


def isomer_rows(res: Result, wide: bool = True) -> tuple[list[str], list[list[str]]]:
    """Header and rows of the isomer table (the result's DataFrame without formula and geometry, which the
    heading gives); ``wide=False`` leaves out the wide columns (full names), for the terminal.

    Parameters
    ----------
    res : Result
        The analysed formula.
    wide : bool, optional
        Keep the wide columns.

    Returns
    -------
    (list of str, list of list of str)
        The header and one row of cells per isomer.
    """
    plain = _plain_rows(res, wide)
    if plain is not None:
        return plain
    df = res.to_dataframe(wide)
    cols = [c for c in df.columns if c not in ("formula", "geometry")]
    rows = [["-" if v in ("", None) else str(v) for v in r] for r in df[cols].itertuples(index=False, name=None)]
    return cols, rows


def _plain_rows(res: Result, wide: bool) -> tuple[list[str], list[list[str]]] | None:
    """:func:`isomer_rows` without pandas, where the DataFrame would hand back the values unchanged.

    A column of text and whole numbers (and of text with gaps) keeps its values in a DataFrame; only a
    column where numbers meet gaps (turned into floats and NaN) or other types would read differently, and
    such a table goes through the DataFrame.  Importing pandas was most of a small command's start-up."""
    from enumerator.workflow.table import table_columns

    ids = [i.id for i in res.isomers]
    cols = [c for c in table_columns(res, wide) if c.header not in ("formula", "geometry")]
    columns = []
    for c in cols:
        vals = [c.values.get(i, None) for i in ids]
        kinds = {type(v) for v in vals}
        if not kinds <= {str, int, type(None)} or (int in kinds and type(None) in kinds):
            return None
        columns.append(["-" if v in ("", None) else str(v) for v in vals])
    return [c.header for c in cols], [list(r) for r in zip(*columns)] if columns else [[] for _ in ids]


def isomer_table(res: Result) -> str:
    """The terminal isomer table (wide columns left out).

    Parameters
    ----------
    res : Result
        The analysed formula.

    Returns
    -------
    str
    """
    return table(*isomer_rows(res, wide=False))


def render(res: Result) -> str:
    """The terminal text of one result: heading, isomer table, sections, notes.

    Parameters
    ----------
    res : Result
        The analysed formula.

    Returns
    -------
    str
        Text ending in a newline.
    """
    iso = res.isomer_set
    head = [
        f"{res.composition.formula} on {res.geometry.symbol} ({res.geometry.name})",
        f"geometry: {res.geometry_reason}",
        f"{iso.geometric_isomers} geometric isomer(s), {iso.stereoisomers} stereoisomer(s)"
        + ("" if iso.complete else " listed so far (--limit reached)"),
        "",
        isomer_table(res),
    ]
    for sec in result_sections(res):
        head += ["", sec.title, sec.text]
    for n in res.notes:
        head.append(f"note: {n}")
    return "\n".join(head) + "\n"
