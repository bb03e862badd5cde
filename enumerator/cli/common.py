"""Options and helpers shared by several commands."""

from __future__ import annotations

import contextlib
import os
import tempfile
from pathlib import Path

import click

from enumerator.errors import InputError

__all__ = ["parse_pairs", "emit", "write_atomic", "write_atomic_bytes", "rules_of"]


def parse_pairs(values: tuple[str, ...], option: str, example: str) -> tuple[tuple[str, str], ...]:
    """'NAME=VALUE' strings as (name, value) pairs, with a clear error for a bad one.

    Parameters
    ----------
    values : tuple of str
        What the repeatable option collected.
    option : str
        The option's flag, for the message (``--span``).
    example : str
        A correct value, for the message (``AA=trans``).

    Returns
    -------
    tuple of (str, str)

    Raises
    ------
    InputError
        A value without '=' or with an empty side.
    """
    out = []
    for v in values:
        name, sep, val = v.partition("=")
        if not sep or not name.strip() or not val.strip():
            raise InputError(f"{option} '{v}' is not NAME=VALUE", f"write e.g. {option} {example}")
        out.append((name.strip(), val.strip()))
    return tuple(out)


def rules_of(ctx: click.Context) -> tuple[str, ...]:
    """The rule folders given to the root command (``isosieve --rules DIR ...``).

    Parameters
    ----------
    ctx : click.Context
        Any command's context.

    Returns
    -------
    tuple of str
    """
    return tuple((ctx.find_root().obj or {}).get("rules", ()))


def write_atomic(path: str | os.PathLike[str], text: str) -> None:
    """Write a whole text file or nothing (UTF-8, newline '\\n').

    Parameters
    ----------
    path : str or os.PathLike
    text : str

    Raises
    ------
    InputError
        The folder does not exist.
    """
    write_atomic_bytes(path, text.encode("utf-8"))


def write_atomic_bytes(path: str | os.PathLike[str], data: bytes) -> None:
    """Write a whole file or nothing: a temporary file beside it, then a rename.

    Parameters
    ----------
    path : str or os.PathLike
    data : bytes

    Raises
    ------
    InputError
        The folder does not exist.
    """
    p = Path(path)
    if p.parent and not p.parent.exists():
        raise InputError(f"folder '{p.parent}' does not exist", "create it first or choose another --out")
    fd, tmp = tempfile.mkstemp(prefix=f".{p.name}.", dir=p.parent or ".")
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
        os.replace(tmp, p)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(tmp)
        raise


def emit(text: str, out: str | None) -> None:
    """Print to standard output, or write atomically to --out.

    Parameters
    ----------
    text : str
    out : str, optional
        The file of ``--out``; standard output when None.
    """
    if out:
        write_atomic(out, text)
    else:
        click.echo(text, nl=False)
