"""Names of a package imported on first use (PEP 562 module ``__getattr__`` and ``__dir__``).

A package lists its public names with the submodule that defines each; :func:`lazy_names` gives the two
module-level functions that import a submodule only when one of its names is first asked for, so that
``import enumerator`` or ``import enumerator.vibrations`` costs nothing beyond what the caller uses.

>>> getattr_, dir_ = lazy_names("json", {"JSONDecoder": "decoder"}, {})
>>> getattr_("JSONDecoder").__name__, "JSONDecoder" in dir_()
('JSONDecoder', True)
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from typing import Any

__all__ = ["lazy_names"]


def lazy_names(
    package: str, table: Mapping[str, str], namespace: Mapping[str, Any]
) -> tuple[Callable[[str], Any], Callable[[], list[str]]]:
    """The ``__getattr__`` and ``__dir__`` of a package whose names are imported on first use.

    Parameters
    ----------
    package : str
        The package's ``__name__``.
    table : Mapping[str, str]
        Public name -> the submodule (relative to the package) that defines it.
    namespace : Mapping[str, Any]
        The package's ``globals()`` (for ``__dir__``).

    Returns
    -------
    (callable, callable)
        ``__getattr__(name)`` (AttributeError for a name not in the table) and ``__dir__()``.
    """

    def getattr_(name: str) -> Any:
        if name in table:
            import importlib

            return getattr(importlib.import_module(f".{table[name]}", package), name)
        raise AttributeError(f"module {package!r} has no attribute {name!r}")

    def dir_() -> list[str]:
        return sorted(set(namespace) | set(table))

    return getattr_, dir_
