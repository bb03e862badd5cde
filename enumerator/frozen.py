"""``@frozen_dataclass``: the standard library's frozen dataclass, its generated methods' bytecode kept.

:func:`dataclasses.dataclass` writes the source of each method it generates (``__init__``,
``__repr__``, ``__eq__``, ``__setattr__``, ``__delattr__``, ``__hash__``) and compiles it with
``exec`` every time the class is defined: for the ~100 frozen dataclasses a small command imports
(about 530 texts), 55-100 ms of its start-up on Python 3.11, spent compiling the same texts in every
process.
Compiling them together as Python 3.13 does saves little (the compile time goes with the length of
the text), so this decorator keeps the compiled code instead, as Python keeps a module's bytecode
in ``__pycache__``:

- the class goes through :func:`dataclasses.dataclass` itself (``frozen=True``, the given ``eq``),
  so fields, defaults, ``default_factory``, ``__match_args__``, ``dataclasses.fields``,
  ``dataclasses.replace``, ``asdict``, pickling and the frozen errors are the library's own;
- only the library's ``exec`` of a method source is intercepted (while this decorator runs, in
  this thread): the code object is looked up by the exact source text, compiled as the library
  compiles it (no inherited ``__future__`` flags) when it is not there, and run with the library's
  globals and namespace.  Same text, same flags: the same code object, so the methods are the
  library's (``tests/test_frozen_dataclass.py`` compares every decorated class of the package with
  :func:`dataclasses.dataclass` on the same class body).

The kept code is a file beside this module's bytecode,
``__pycache__/frozen_methods.<cache tag>.opt<level>.marshal`` (one per interpreter version and
``-O`` level, checked against :data:`importlib.util.MAGIC_NUMBER`), read on first use; texts
compiled afresh are added to it at exit, unless writing bytecode is off (``PYTHONDONTWRITEBYTECODE``)
or the directory is not writable, when the methods are simply compiled each time as the library
does; ``python -m enumerator.frozen`` writes it for every class of the package regardless.  A text no longer
generated is dropped when the file is rewritten from a process that saw more than
:data:`MAX_KEPT` texts.
"""

from __future__ import annotations

import atexit
import builtins
import dataclasses
import functools
import importlib.util
import marshal
import os
import sys
import threading
import types
from collections.abc import Callable
from pathlib import Path
from typing import Any, TypeVar, dataclass_transform, overload

from enumerator.caches import register

__all__ = ["frozen_dataclass", "MAX_KEPT", "cache_path", "CodeStore"]

T = TypeVar("T")

#: The most method texts the kept-code file holds (the whole package generates about 600).
MAX_KEPT = 4000

_LOCK = threading.RLock()


def cache_path() -> Path:
    """Where the compiled methods are kept for this interpreter.

    Returns
    -------
    pathlib.Path
        ``enumerator/__pycache__/frozen_methods.<cache tag>.opt<optimisation level>.marshal``.
    """
    tag = f"{sys.implementation.cache_tag or 'none'}.opt{sys.flags.optimize}"
    return Path(__file__).resolve().parent / "__pycache__" / f"frozen_methods.{tag}.marshal"


def _compile(source: str) -> types.CodeType:
    """``source`` compiled as :mod:`dataclasses` compiles it (no ``__future__`` flags inherited from here)."""
    return compile(source, "<string>", "exec", dont_inherit=True)


class CodeStore:
    """Compiled method sources by their exact text; read from and written to one file.

    Parameters
    ----------
    path : pathlib.Path or None
        The file; None keeps nothing between processes.
    """

    def __init__(self, path: Path | None) -> None:
        self.path = path
        self._codes: dict[str, types.CodeType] | None = None
        self._used: set[str] = set()
        self._new = False
        self._hits = self._misses = 0

    def _load(self) -> dict[str, types.CodeType]:
        if self._codes is None:
            self._codes = {}
            if self.path is not None:
                try:
                    data = self.path.read_bytes()
                    magic = importlib.util.MAGIC_NUMBER
                    if data[: len(magic)] == magic:
                        loaded = marshal.loads(data[len(magic) :])
                        if isinstance(loaded, dict):
                            self._codes = {
                                k: v for k, v in loaded.items() if isinstance(k, str) and isinstance(v, types.CodeType)
                            }
                except (OSError, ValueError, EOFError, TypeError):
                    self._codes = {}
        return self._codes

    def code(self, source: str) -> types.CodeType:
        """The code object of ``source``, compiled now if it is not kept.

        Parameters
        ----------
        source : str
            A method source as :mod:`dataclasses` writes it.

        Returns
        -------
        types.CodeType
            What ``compile(source, "<string>", "exec", dont_inherit=True)`` gives.
        """
        codes = self._load()
        self._used.add(source)
        found = codes.get(source)
        self._hits += found is not None
        self._misses += found is None
        if found is None:
            found = codes[source] = _compile(source)
            if not self._new:
                self._new = True
                atexit.register(self.save)
        return found

    def save(self, force: bool = False) -> bool:
        """Write the kept code when texts were compiled afresh (no error if that is not possible).

        Parameters
        ----------
        force : bool
            Write even when bytecode writing is off (``python -m enumerator.frozen``).

        Returns
        -------
        bool
            True when the file was written.
        """
        if not (self._new or force) or self.path is None or self._codes is None:
            return False
        if sys.dont_write_bytecode and not force:
            return False
        codes = self._codes
        if len(codes) > MAX_KEPT:
            codes = {k: v for k, v in codes.items() if k in self._used}
        tmp = self.path.with_name(f"{self.path.name}.{os.getpid()}.tmp")
        try:
            self.path.parent.mkdir(exist_ok=True)
            tmp.write_bytes(importlib.util.MAGIC_NUMBER + marshal.dumps(codes))
            os.replace(tmp, self.path)
        except (OSError, ValueError):
            tmp.unlink(missing_ok=True)
            return False
        self._new = False
        return True

    def cache_info(self) -> functools._CacheInfo:
        """Hits, misses, the most kept and the texts held now, as :func:`functools.lru_cache` reports them.

        Returns
        -------
        functools._CacheInfo
            ``(hits, misses, maxsize, currsize)``.
        """
        return functools._CacheInfo(self._hits, self._misses, MAX_KEPT, len(self._codes or ()))

    def cache_clear(self) -> None:
        """Forget the code read (the file stays); the next use reads it again."""
        self._codes = None
        self._used = set()
        self._hits = self._misses = 0


#: The package's kept method code (read on first use).
STORE = CodeStore(cache_path())


register(STORE)


def _intercepting(store: CodeStore) -> Callable[..., None]:
    """The stand-in for ``exec`` inside :mod:`dataclasses`, for this thread and this store."""
    thread = threading.get_ident()

    def exec_(source: Any, globals_: Any = None, namespace: Any = None, /) -> None:
        if threading.get_ident() != thread or not isinstance(source, str):
            if isinstance(source, str):
                source = _compile(source)
            builtins.exec(source, globals_, namespace)
            return
        builtins.exec(store.code(source), globals_, namespace)

    return exec_


def _decorate(cls: type[T], eq: bool, store: CodeStore) -> type[T]:
    plain = dataclasses.dataclass(frozen=True, eq=eq)
    module = vars(dataclasses)
    with _LOCK:
        if "exec" in module:  # not the library this was written against: leave it alone
            return plain(cls)
        module["exec"] = _intercepting(store)
        try:
            return plain(cls)
        finally:
            del module["exec"]


@overload
def frozen_dataclass(cls: type[T], /) -> type[T]: ...
@overload
def frozen_dataclass(*, eq: bool = True, store: CodeStore | None = None) -> Callable[[type[T]], type[T]]: ...


@dataclass_transform(frozen_default=True, field_specifiers=(dataclasses.field, dataclasses.Field))
def frozen_dataclass(cls: type[T] | None = None, /, *, eq: bool = True, store: CodeStore | None = None) -> Any:
    """``@dataclass(frozen=True)`` (or ``@dataclass(frozen=True, eq=False)``), its methods' code kept.

    Parameters
    ----------
    cls : type, optional
        The class, when used without arguments (``@frozen_dataclass``).
    eq : bool
        Generate ``__eq__`` (and, frozen, ``__hash__``), as for :func:`dataclasses.dataclass`.
    store : CodeStore, optional
        Where compiled methods are kept; the package's :data:`STORE` by default.

    Returns
    -------
    type or callable
        The dataclass, or the decorator that makes it.

    Examples
    --------
    >>> import dataclasses
    >>> @frozen_dataclass
    ... class Point:
    ...     x: int
    ...     y: int = 0
    >>> Point(1), Point(1) == Point(1, 0), dataclasses.replace(Point(1), y=2)
    (Point(x=1, y=0), True, Point(x=1, y=2))
    """
    chosen = STORE if store is None else store
    if cls is None:
        return lambda c: _decorate(c, eq, chosen)
    return _decorate(cls, eq, chosen)


def warm() -> bool:
    """Import every module of the package and write the kept code of all its dataclasses.

    As ``python -m compileall`` does for bytecode: after installing into a place later runs
    cannot write to, or for a checkout run with ``PYTHONDONTWRITEBYTECODE``.

    Returns
    -------
    bool
        True when the file was written.
    """
    import importlib
    import pkgutil

    import enumerator

    for info in pkgutil.walk_packages(enumerator.__path__, "enumerator."):
        if info.name in ("enumerator.__main__", __name__):
            continue
        try:
            importlib.import_module(info.name)
        except ImportError:  # an optional dependency missing: its classes are compiled when it is there
            continue
    return STORE.save(force=True)


if __name__ == "__main__":  # pragma: no cover
    from enumerator.frozen import warm as _warm  # the package's module, whose store the classes used

    ok = _warm()
    print(cache_path() if ok else "the kept dataclass code could not be written", file=sys.stderr)
    sys.exit(0 if ok else 1)
