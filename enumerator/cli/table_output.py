"""Writing a result's table: the text to standard output or --out, and what goes beside a CSV file.

A CSV table is plain (a header, one row per isomer), so its cautions and notes
go elsewhere: beside a file written with ``--out x.csv`` into the sidecar
``x.csv-metadata.json`` (:func:`enumerator.render.tables.csv_metadata`); when the
table goes to standard output, the cautions are printed to standard error.
Every other format carries its cautions in the text itself.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING

import click

from enumerator.cli.output import STDOUT, emit, write_files

if TYPE_CHECKING:
    import pandas as pd

    from enumerator.workflow.result import Result

__all__ = ["emit_table", "emit_result"]


def emit_table(
    text: str,
    out: str | None,
    fmt: str,
    frame: pd.DataFrame | None = None,
    *,
    title: str = "",
    cautions: Sequence[str] = (),
    notes: Sequence[str] = (),
) -> None:
    """Print or write one table; for CSV, its sidecar beside the file or its cautions on standard error.

    Parameters
    ----------
    text : str
        The rendered table.
    out : str, optional
        The --out file; standard output when None.
    fmt : str
        The format the text is in.
    frame : pandas.DataFrame, optional
        The table's frame (the sidecar's column list).
    title, cautions, notes
        What the sidecar (or standard error) says besides the table.
    """
    if fmt != "csv":
        emit(text, out)
        return
    if out and out != STDOUT:
        files: list[tuple[str | Path, str]] = [(out, text)]
        if frame is not None:
            from enumerator.render.tables import csv_metadata
            from enumerator.workflow.report import version

            name = Path(out).name
            meta = csv_metadata(frame, name, title=title or name, cautions=cautions, notes=notes, version=version())
            files.append((Path(out).with_name(name + "-metadata.json"), meta))
        write_files(files)  # the table and its sidecar together, or neither
        return
    emit(text, out)
    for line in cautions:
        click.echo(f"isosieve: safety: {line}", err=True)


def emit_result(res: Result, fmt: str, out: str | None, *, text: str | None = None) -> None:
    """One result in one format (:func:`enumerator.render.result.render_result`), with its CSV sidecar.

    Parameters
    ----------
    res : Result
    fmt : str
    out : str, optional
    text : str, optional
        The rendered text when the caller has it already (e.g. a partial result's fallback).
    """
    from enumerator.render.result import render_result
    from enumerator.render.sections import safety_lines

    if text is None:
        text = render_result(res, fmt)
    frame = res.to_dataframe() if fmt == "csv" else None
    emit_table(
        text,
        out,
        fmt,
        frame,
        title=res.composition.formula,
        cautions=safety_lines(res),
        notes=[res.geometry_reason, *res.notes],
    )
