"""Options and helpers shared by several commands.

Writing files lives in :mod:`enumerator.cli.output`; ``emit``, ``write_atomic``
and ``write_atomic_bytes`` are kept here under their old names for the
commands that import them from this module.
"""

from __future__ import annotations

import contextlib
import os
from collections.abc import Callable, Iterator

import click

from enumerator.cli.output import emit, write_bytes, write_text
from enumerator.errors import InputError

__all__ = ["parse_pairs", "emit", "write_atomic", "write_atomic_bytes", "rules_of", "progress_callback"]


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
    """Write a whole text file or nothing (UTF-8): :func:`enumerator.cli.output.write_text`.

    Parameters
    ----------
    path : str or os.PathLike
    text : str

    Raises
    ------
    InputError
        The file cannot be written (one line: which file, why, and the fix).
    """
    write_text(path, text)


def write_atomic_bytes(path: str | os.PathLike[str], data: bytes) -> None:
    """Write a whole file or nothing: :func:`enumerator.cli.output.write_bytes`.

    Parameters
    ----------
    path : str or os.PathLike
    data : bytes

    Raises
    ------
    InputError
        The file cannot be written (one line: which file, why, and the fix).
    """
    write_bytes(path, data)


@contextlib.contextmanager
def progress_callback(label: str, delay: float = 1.0) -> Iterator[Callable[[int, int], None]]:
    """A ``progress(done, total)`` callback that shows a bar on a terminal once the work has taken ``delay`` s
    (:func:`enumerator.cli.progress.bar`, for library calls that report counts without a name).

    Parameters
    ----------
    label : str
        The bar's label ('counting').
    delay : float
        Seconds before a bar appears.

    Yields
    ------
    callable
        To be called with (done, total) as the work goes on.
    """
    from enumerator.cli.progress import bar

    with bar(label, delay=delay) as progress:
        yield lambda done, total: progress("", done, total)
