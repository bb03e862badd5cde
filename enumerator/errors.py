"""One error hierarchy, with messages written for a chemist.

Every error the library raises on purpose derives from :class:`IsosieveError`.
Input and rule errors carry a ``fix`` hint; the CLI prints them as a single
line and exits with status 2.  Anything else that escapes is an internal
error (status 1).
"""

from __future__ import annotations

__all__ = ["IsosieveError", "InputError", "RuleError", "CapacityError"]


class IsosieveError(Exception):
    """Base of every deliberate error: ``what`` went wrong and ``fix`` says what to do."""

    exit_status = 2

    def __init__(self, what: str, fix: str = "") -> None:
        self.what = what
        self.fix = fix
        super().__init__(self.line())

    def line(self) -> str:
        """The one-line message shown to the user (control characters such as
        a line break in an echoed formula are shown escaped)."""
        text = f"{self.what}; {self.fix}" if self.fix else self.what
        return "".join(ch if ch.isprintable() else repr(ch)[1:-1] for ch in text)


class InputError(IsosieveError):
    """The user's formula, option or file cannot be used as given."""


class RuleError(IsosieveError):
    """A rule file (geometry, ligand, reporter, substitution) is malformed."""


class CapacityError(IsosieveError):
    """A request is too large to answer in the time or memory at hand."""
