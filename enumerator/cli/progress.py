"""Progress bars for the commands, drawn with click's progress bar on standard error.

The library reports progress through optional callbacks ``progress(what, done,
total)`` (:func:`enumerator.workflow.pipeline.run`, ``build_report``,
``structure_set``, ``run_batch``, ``predict_spectra``); a command passes the
callback :func:`bar` yields.  The bar is drawn only when standard error is a
terminal, so redirected or piped output never carries it; elsewhere the callback
does nothing.
"""

from __future__ import annotations

import sys
import time
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from typing import Any

import click

__all__ = ["Progress", "bar", "on_terminal"]

#: The callback the library calls: (what is being done, steps done, steps in all).
Progress = Callable[[str, int, int], None]


def on_terminal(stream: Any = None) -> bool:
    """Whether a bar may be drawn: the stream (standard error by default) is a terminal.

    Parameters
    ----------
    stream : file-like, optional

    Returns
    -------
    bool
    """
    isatty = getattr(stream if stream is not None else sys.stderr, "isatty", None)
    return bool(isatty and isatty())


@contextmanager
def bar(label: str, stream: Any = None, delay: float = 0.0) -> Iterator[Progress]:
    """A progress callback that draws one bar, started on its first call (when the total is known).

    Parameters
    ----------
    label : str
        Shown in front of the bar, e.g. 'report'.
    stream : file-like, optional
        Where to draw (standard error by default); nothing is drawn unless it is a terminal.
    delay : float, optional
        Seconds of work before a bar appears (quick work shows nothing).

    Yields
    ------
    callable
        ``progress(what, done, total)``.
    """
    out = stream if stream is not None else sys.stderr
    if not on_terminal(out):
        yield lambda what, done, total: None
        return
    state: dict[str, Any] = {}
    start = time.monotonic()

    def progress(what: str, done: int, total: int) -> None:
        if delay and "bar" not in state and time.monotonic() - start < delay:
            return
        b = state.get("bar")
        if b is None or state.get("total") != total or done <= state.get("done", 0):
            if b is not None:
                b.render_finish()
            b = click.progressbar(length=max(total, 1), label=label, file=out, show_pos=True)
            b.render_progress()
            state.update(bar=b, total=total, done=0)
        b.label = (f"{label}: {what}" if what else label)[:60]
        b.update(max(done - state["done"], 0))
        state["done"] = done

    try:
        yield progress
    finally:
        if state.get("bar") is not None:
            state["bar"].render_finish()
