"""One error hierarchy, with messages written for a chemist.

Every error the library raises on purpose derives from :class:`IsosieveError`.
Input and rule errors carry a ``fix`` hint; the CLI prints them as a single
line and exits with status 2.  Anything else that escapes is an internal
error (status 1).
"""

from __future__ import annotations

__all__ = ["IsosieveError", "InputError", "RuleError", "CapacityError", "shorten", "MAX_LINE"]

#: The longest message line, in characters: a longer one keeps its head and its tail (where the fix is) and
#: says how many characters were left out between them.
MAX_LINE = 600


def shorten(text: str, limit: int = 80) -> str:
    """Text as a message echoes it: at most ``limit`` characters of it, and how many were left out.

    Parameters
    ----------
    text : str
        E.g. a formula or a file name the user gave.
    limit : int
        The most characters of ``text`` to keep (at least 10).

    Returns
    -------
    str
        ``text`` itself when short enough, else its start, an ellipsis and the count of characters left out.

    Examples
    --------
    >>> shorten("Ma4b2")
    'Ma4b2'
    >>> shorten("M" + "a" * 200, 20)
    'Maaaaaaaaaaaaaaaaaaa... (181 more characters)'
    """
    limit = max(10, limit)
    if len(text) <= limit:
        return text
    return f"{text[:limit]}... ({len(text) - limit:,} more characters)"


class IsosieveError(Exception):
    """Base of every deliberate error: ``what`` went wrong and ``fix`` says what to do."""

    exit_status = 2

    def __init__(self, what: str, fix: str = "") -> None:
        self.what = what
        self.fix = fix
        super().__init__(self.line())

    def line(self) -> str:
        """The one-line message shown to the user (control characters such as
        a line break in an echoed formula are shown escaped; a line longer than
        :data:`MAX_LINE` keeps its head and tail and counts what was left out)."""
        text = f"{self.what}; {self.fix}" if self.fix else self.what
        text = "".join(ch if ch.isprintable() else repr(ch)[1:-1] for ch in text)
        if len(text) > MAX_LINE:
            head, tail = text[: MAX_LINE * 2 // 3], text[-(MAX_LINE // 4) :]
            text = f"{head} ... ({len(text) - len(head) - len(tail):,} characters left out) ... {tail}"
        return text


class InputError(IsosieveError):
    """The user's formula, option or file cannot be used as given."""


class RuleError(IsosieveError):
    """A rule file (geometry, ligand, reporter, substitution) is malformed."""


class CapacityError(IsosieveError):
    """A request is too large to answer in the time or memory at hand."""
