"""One format of many: the dispatch every per-command renderer shares.

>>> write_in({"text": str.upper}, "text", "ab", "use --format text")
'AB'
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from typing import TypeVar

from enumerator.errors import InputError

__all__ = ["write_in"]

T = TypeVar("T")


def write_in(writers: Mapping[str, Callable[[T], str]], fmt: str, value: T, fix: str) -> str:
    """The text of ``value`` written by the writer of ``fmt``.

    Parameters
    ----------
    writers : Mapping[str, callable]
        Format name -> writer, in the order the command lists them.
    fmt : str
        The format asked for.
    value : object
        What to write.
    fix : str
        The hint of the one-line refusal of an unknown format ('use --format table').

    Returns
    -------
    str

    Raises
    ------
    InputError
        An unknown format.
    """
    if fmt not in writers:
        raise InputError(f"format '{fmt}' is not one of {', '.join(writers)}", fix)
    return writers[fmt](value)
