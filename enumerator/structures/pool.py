"""The full-complex embeddings of many isomers worked out ahead, in worker processes when that pays.

RDKit's ETKDG embedding (:func:`.embed.embed`) is most of the time of a report or of ``isosieve structures``
on a real complex (a tenth to a fifth of a second per structure of some 75 atoms).  :class:`EmbedAhead` takes
the isomers whose structures are about to be built, works out the distinct embedding keys
(:func:`.embed.embed_key`: a complex and its ``13CO`` label share one), and, with at least
:data:`POOL_MIN_EMBEDDINGS` of them and more than one CPU available to this process, submits them to a
``concurrent.futures.ProcessPoolExecutor``; the builder then asks for each isomer's answers in listing order
(:meth:`EmbedAhead.ready`), so a progress bar moves as the structures come in.

The coordinates are those of one process: a worker runs the same function on the same key (RDKit's binary
form of the molecule and the held positions), and ETKDG with the fixed random-number start
(:data:`.embed.RNG_START`) gives the same numbers for the same molecule whichever process runs it
(tests/test_structures.py compares the files byte for byte).  A failure is sent back as its message and
raised where the structure is built, so the donor-only core says the same as before.  A worker that dies (a
broken pool) costs nothing but time: the isomers it held are embedded again in this process.  On Ctrl-C the
workers, which ignore SIGINT, are told to stop and the unstarted embeddings are cancelled.

The workers are forked, on Linux only (``spawn`` would import the caller's script again in each worker, and
macOS does not fork safely); elsewhere everything runs in one process.  ``ISOSIEVE_EMBED_PROCESSES=1`` in the
environment keeps one process (to check that a result does not depend on the pool); a larger number caps
the worker count.
"""

from __future__ import annotations

import os
import sys
from collections.abc import Iterable, Mapping
from concurrent.futures import Future
from types import MappingProxyType, TracebackType
from typing import TYPE_CHECKING

from enumerator.errors import InputError, shorten
from enumerator.structures.embed import (
    Embedded,
    EmbedFailed,
    EmbedKey,
    assemble,
    embed_key,
    embed_or_message,
    ligand_units,
)

if TYPE_CHECKING:
    from concurrent.futures import ProcessPoolExecutor

    from enumerator.isomers.enumeration import Isomer
    from enumerator.model.composition import Composition

__all__ = ["EmbedAhead", "POOL_MIN_EMBEDDINGS", "ENV_PROCESSES", "available_processes"]

#: Fewer distinct embeddings than this are worked out in this process (starting workers and sending the
#: molecules would cost more than it saves for one; two already pay: measured on [RuCl2(CO)2(PMe2Ph)2], see
#: DEVELOPERS.md, "How the structures are built").
POOL_MIN_EMBEDDINGS = 2
#: The environment variable that caps the processes (``1``: no workers).
ENV_PROCESSES = "ISOSIEVE_EMBED_PROCESSES"

_NONE: Mapping[EmbedKey, Embedded] = MappingProxyType({})


def available_processes() -> int:
    """The processes the embeddings may use: on Linux the CPUs this process may run on
    (``os.sched_getaffinity``), capped by ``ISOSIEVE_EMBED_PROCESSES``; elsewhere one.

    Returns
    -------
    int
        At least 1.

    Raises
    ------
    InputError
        ``ISOSIEVE_EMBED_PROCESSES`` is set but is not a whole number of at least 1.
    """
    if not sys.platform.startswith("linux"):
        # workers are forked (no re-import of the caller's script, as 'spawn' would do); only Linux forks safely
        return 1
    cpus = len(os.sched_getaffinity(0))
    text = os.environ.get(ENV_PROCESSES, "").strip()
    if not text:
        return max(cpus, 1)
    if not text.isdigit() or int(text) < 1:
        raise InputError(
            f"environment variable {ENV_PROCESSES}={shorten(text, 40)!r} is not a whole number of processes",
            "set it to 1 (one process, no workers) or more, or unset it",
        )
    return max(min(cpus, int(text)), 1)


def _key(isomer: Isomer, comp: Composition) -> EmbedKey | None:
    """The embedding key of the whole complex, or None when it cannot be assembled (the builder says why)."""
    try:
        mol, fixed, _, _ = assemble(ligand_units(isomer), comp)
    except (EmbedFailed, KeyError, ValueError):
        return None
    return embed_key(mol, fixed)


def _quiet_worker() -> None:
    """Worker start: Ctrl-C is the parent's to handle (it cancels the pool); a worker ignores SIGINT."""
    import signal

    signal.signal(signal.SIGINT, signal.SIG_IGN)


class EmbedAhead:
    """A context manager: the whole-complex embeddings of the given isomers, worked out ahead.

    Isomers come in when it is opened (``items``) or later, a result at a time (:meth:`add`: a report hands
    each complex over as soon as it is analysed, so the workers embed while the next one is analysed and the
    tables are written).

    Parameters
    ----------
    items : iterable of (Isomer, Composition), optional
        The isomers whose full structures will be built (only those that can have one: an element as metal
        and a SMILES for every ligand), with their compositions.
    processes : int, optional
        The most processes (default: :func:`available_processes`); with 1, or fewer than
        :data:`POOL_MIN_EMBEDDINGS` distinct embeddings in all, nothing is worked out ahead and :meth:`ready`
        answers an empty mapping (the builder embeds in this process, as without it).  Isomers given at once
        get as many workers as distinct embeddings, up to this; isomers fed by :meth:`add` get this many.
    """

    def __init__(self, items: Iterable[tuple[Isomer, Composition]] = (), processes: int | None = None) -> None:
        self._keys: dict[tuple[int, str], EmbedKey | None] = {}
        self._items = list(items)
        self._processes = available_processes() if processes is None else processes
        self._futures: dict[EmbedKey, Future[Embedded]] = {}
        # distinct keys not yet submitted (fewer than POOL_MIN_EMBEDDINGS so far), in order
        self._waiting: dict[EmbedKey, None] = {}
        self._pool: ProcessPoolExecutor | None = None
        self._open = False
        # given all at once: as many workers as distinct embeddings (up to the processes); fed by add(): all
        self._all_at_once = bool(self._items)

    def __enter__(self) -> EmbedAhead:
        self._open = True
        items, self._items = self._items, []
        self.add(items)
        return self

    def add(self, items: Iterable[tuple[Isomer, Composition]]) -> None:
        """Hand over more isomers (while open): their distinct new embeddings go to the workers.

        Parameters
        ----------
        items : iterable of (Isomer, Composition)
            As for the constructor.
        """
        if not self._open or self._processes < 2:
            return
        for i, c in items:
            key = _key(i, c)
            self._keys[(id(c), i.id)] = key
            if key is not None and key not in self._futures and key not in self._waiting:
                self._waiting[key] = None
        if self._pool is None and len(self._waiting) < POOL_MIN_EMBEDDINGS:
            return
        if self._pool is None:
            import multiprocessing
            from concurrent.futures import ProcessPoolExecutor

            self._pool = ProcessPoolExecutor(
                max_workers=min(self._processes, len(self._waiting)) if self._all_at_once else self._processes,
                mp_context=multiprocessing.get_context("fork"),
                initializer=_quiet_worker,
            )
        for k in self._waiting:
            self._futures[k] = self._pool.submit(embed_or_message, *k)
        self._waiting = {}

    def __exit__(self, kind: type[BaseException] | None, exc: BaseException | None, tb: TracebackType | None) -> None:
        self._open = False
        if self._pool is not None:
            self._pool.shutdown(wait=kind is None, cancel_futures=True)
            self._pool = None

    def ready(self, isomer: Isomer, comp: Composition) -> Mapping[EmbedKey, Embedded]:
        """The embedding of one isomer's whole complex once its worker has it (waits for it).

        Parameters
        ----------
        isomer : Isomer
            One of the isomers given.
        comp : Composition
            Its composition (the same object as given).

        Returns
        -------
        Mapping
            Its embedding key -> positions or failure message; empty when it was not worked out ahead or its
            worker died (the builder then embeds it in this process).
        """
        key = self._keys.get((id(comp), isomer.id))
        if key is None or key not in self._futures:
            return _NONE
        future = self._futures[key]
        try:
            done = future.result()
        except Exception:  # a dead worker (BrokenProcessPool) or a lost result: embed it here instead
            return _NONE
        if not isinstance(done, str):
            done.setflags(write=False)
        return MappingProxyType({key: done})
