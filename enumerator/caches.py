"""Every memo cache of the package, and one way to empty them all.

A cache here is a pure function memoised by value with
:func:`functools.lru_cache`.  The package's rule is that a cache is keyed by
the full value its answer depends on (a ligand kind compares its catalogue
data too, a rule set the files it reads) and hands out immutable data
(tuples, frozensets, frozen dataclasses, read-only mappings and arrays), so a
cached answer is never stale and never changed by a caller.

Each module memoises through :func:`cached`, which registers the cache here;
:func:`clear` empties every registered cache, for a long-running process that
wants its memory back or a test that wants a cold start.  Nothing else needs
it: a changed rule file or ligand definition is a different key.

>>> from enumerator.caches import cached, clear, registered
>>> @cached(maxsize=None)
... def square(x: int) -> int:
...     return x * x
>>> square(3), square.cache_info().currsize
(9, 1)
>>> square in registered()
True
>>> clear()
>>> square.cache_info().currsize
0
"""

from __future__ import annotations

import functools
from collections.abc import Callable
from typing import Any, Protocol, TypeVar

__all__ = ["cached", "clear", "clear_caches", "register", "registered"]

T = TypeVar("T")


class Clearable(Protocol):
    """Anything with a ``cache_clear()`` method, as :func:`functools.lru_cache` makes."""

    def cache_clear(self) -> None: ...


#: The caches registered so far, in registration order.  Only :func:`register`
#: adds to it and nothing removes from it; the cached values themselves live in
#: the caches, not here.
_REGISTRY: list[Clearable] = []


def register(cache: Clearable) -> Clearable:
    """Register a cache so that :func:`clear` empties it.

    Parameters
    ----------
    cache : object with ``cache_clear()``
        E.g. a function wrapped by :func:`functools.lru_cache`.

    Returns
    -------
    object
        ``cache`` itself, so that ``register`` can be used as a decorator.
    """
    if not any(c is cache for c in _REGISTRY):
        _REGISTRY.append(cache)
    return cache


def cached(maxsize: int | None = 128) -> Callable[[Callable[..., T]], functools._lru_cache_wrapper[T]]:
    """:func:`functools.lru_cache` that registers the cache for :func:`clear`.

    Parameters
    ----------
    maxsize : int or None, optional
        The most answers kept (least recently used go first); None keeps every answer.

    Returns
    -------
    callable
        A decorator; the decorated function keeps ``cache_info()`` and ``cache_clear()``.
    """

    def wrap(func: Callable[..., T]) -> functools._lru_cache_wrapper[T]:
        wrapper = functools.lru_cache(maxsize=maxsize)(func)
        register(wrapper)
        return wrapper

    return wrap


def registered() -> tuple[Any, ...]:
    """The caches registered so far (those of the modules imported up to now).

    Returns
    -------
    tuple
        The registered caches, in registration order.
    """
    return tuple(_REGISTRY)


def clear() -> None:
    """Empty every registered cache.

    Answers do not change: the next call recomputes what the cleared cache held.
    """
    for cache in _REGISTRY:
        cache.cache_clear()


#: The name the package root exports (``enumerator.clear_caches()``).
clear_caches = clear
