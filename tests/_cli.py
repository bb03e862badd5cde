"""Run the console entry point in process, for tests of its exit statuses (0 done, 2 input error, 1 internal)."""

from __future__ import annotations

import io
from contextlib import redirect_stderr, redirect_stdout

from enumerator.cli import main


def cli(args):
    """(exit status, stdout, stderr) of the console entry point, in process."""
    out, err = io.StringIO(), io.StringIO()
    code = 0
    with redirect_stdout(out), redirect_stderr(err):
        try:
            main(list(args))
        except SystemExit as exc:
            code = exc.code if isinstance(exc.code, int) else (0 if exc.code is None else 1)
    return code, out.getvalue(), err.getvalue()
