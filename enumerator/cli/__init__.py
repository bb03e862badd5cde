"""The ``isosieve`` command line: thin click commands over the library.

Each command lives in its own module and is imported only when run, so
``isosieve --help`` stays fast.  Errors in the user's input print one line
and exit with status 2; internal errors exit with status 1; ``--debug``
shows the traceback.
"""

from __future__ import annotations

import importlib
import os
import sys

import click

__all__ = ["cli", "main", "COMMANDS"]

#: command name -> (module, function, one-line help).  Add a command here.
COMMANDS: dict[str, tuple[str, str, str]] = {
    "isomers": (
        "enumerator.cli.isomers_cmd",
        "isomers",
        "List every isomer of a formula with its point group and analyses.",
    ),
    "geometries": (
        "enumerator.cli.geometries_cmd",
        "geometries",
        "List the coordination geometries and their symmetry groups.",
    ),
    "chartable": (
        "enumerator.cli.chartable_cmd",
        "chartable",
        "Print the computed character table of a point group or an isomer.",
    ),
    "ligands": ("enumerator.cli.ligands_cmd", "ligands", "List the ligand catalogue."),
    "batch": ("enumerator.cli.batch_cmd", "batch", "Screen many formulas from a file, one result row each."),
    "job": ("enumerator.cli.job_cmd", "job", "Run a TOML job file of several complexes."),
    "match": ("enumerator.cli.match_cmd", "match", "Rank candidate isomers against measured stretching bands."),
    "bands": ("enumerator.cli.bands_cmd", "bands", "Predict stretching bands and intensities; fit force constants."),
    "route": ("enumerator.cli.route_cmd", "route", "Plan orders of ligand addition that reach a target isomer."),
    "network": ("enumerator.cli.network_cmd", "network", "Build the substitution network between two compositions."),
    "report": ("enumerator.cli.report_cmd", "report", "Write an HTML report with structures, spectra and tables."),
    "structures": (
        "enumerator.cli.structures_cmd",
        "structures",
        "Write XYZ / SDF starting structures for each isomer.",
    ),
    "count": ("enumerator.cli.count_cmd", "count", "Count isomers up front (Burnside) without listing them."),
}


class LazyGroup(click.Group):
    """A click group whose sub-commands are imported on first use."""

    def list_commands(self, ctx: click.Context) -> list[str]:
        """Every command of :data:`COMMANDS`, sorted."""
        return sorted(COMMANDS)

    def get_command(self, ctx: click.Context, name: str) -> click.Command | None:
        """The command, its module imported now (None for an unknown name)."""
        if name not in COMMANDS:
            return None
        module, attr, _ = COMMANDS[name]
        return getattr(importlib.import_module(module), attr)

    def format_commands(self, ctx: click.Context, formatter: click.HelpFormatter) -> None:
        """The help's command list, from the one-line helps of :data:`COMMANDS` (no module imported)."""
        rows = [(name, COMMANDS[name][2]) for name in self.list_commands(ctx)]
        with formatter.section("Commands"):
            formatter.write_dl(rows)


@click.group(cls=LazyGroup, context_settings={"help_option_names": ["-h", "--help"], "max_content_width": 100})
@click.version_option(package_name="isosieve", prog_name="isosieve")
@click.option(
    "--rules",
    "rules",
    multiple=True,
    type=click.Path(file_okay=False),
    metavar="DIR",
    help="Extra rule folder (geometries/, ligands.toml, ...); repeatable.",
)
@click.option("--debug", is_flag=True, help="Show the full traceback of any error.")
@click.pass_context
def cli(ctx: click.Context, rules: tuple[str, ...], debug: bool) -> None:
    """isosieve: which isomers a ligand substitution can give, their point
    groups, and which of them IR, Raman or NMR can tell apart.

    \b
    Examples:
      isosieve isomers Ma2b2c2
      isosieve isomers "M(AA)2b2" --json
      isosieve geometries
    """
    ctx.ensure_object(dict)
    ctx.obj["rules"] = rules
    ctx.obj["debug"] = debug


def main(argv: list[str] | None = None) -> None:
    """Console entry point: 0 on success, 2 for the user's input (one line) or for running out of memory,
    1 for an internal error, 130 when interrupted, 143 on SIGTERM (after cleaning up files being written);
    ``--debug`` (or ISOSIEVE_DEBUG=1) shows the traceback instead.

    Parameters
    ----------
    argv : list of str, optional
        The arguments (default: ``sys.argv[1:]``).
    """
    from enumerator.errors import IsosieveError, shorten

    args = list(sys.argv[1:] if argv is None else argv)
    debug = "--debug" in args or os.environ.get("ISOSIEVE_DEBUG") == "1"
    previous = _terminate_cleanly()
    try:
        cli.main(args=args, prog_name="isosieve", standalone_mode=False)
    except click.exceptions.Exit as exc:
        sys.exit(exc.exit_code)
    except click.ClickException as exc:
        if debug:
            raise
        hint = ""
        if isinstance(exc, click.UsageError):
            cmd = exc.ctx.command_path if exc.ctx is not None else "isosieve"
            hint = f"; see '{cmd} --help'"
        click.echo(f"isosieve: error: {exc.format_message().rstrip('.')}{hint}", err=True)
        sys.exit(exc.exit_code)
    except click.Abort:
        click.echo("isosieve: interrupted", err=True)
        sys.exit(130)
    except KeyboardInterrupt:
        click.echo("isosieve: interrupted", err=True)
        sys.exit(130)
    except IsosieveError as exc:
        if debug:
            raise
        click.echo(f"isosieve: error: {exc.line()}", err=True)
        sys.exit(exc.exit_status)
    except BrokenPipeError:
        sys.exit(0)
    except MemoryError:
        if debug:
            raise
        click.echo("isosieve: error: out of memory; give --limit N, a smaller formula, or fewer rows at once", err=True)
        sys.exit(2)
    except Exception as exc:  # internal error
        if debug:
            raise
        msg = str(exc).splitlines()[0] if str(exc) else ""
        click.echo(
            f"isosieve: internal error: {type(exc).__name__}: {shorten(msg, 300)} "
            "(rerun with --debug for the traceback, and please report it)",
            err=True,
        )
        sys.exit(1)
    finally:
        _restore(previous)


def _terminate_cleanly() -> object:
    """Turn SIGTERM into an exit through Python (status 143), so that files being written are cleaned up.

    Returns
    -------
    object
        What :func:`_restore` needs: None when nothing was installed (not the main thread, or no SIGTERM),
        else a one-element tuple holding the handler before.
    """
    import signal
    import threading

    if not hasattr(signal, "SIGTERM") or threading.current_thread() is not threading.main_thread():
        return None

    def terminated(signum: int, frame: object) -> None:
        click.echo("isosieve: terminated", err=True)
        sys.exit(143)

    before = signal.getsignal(signal.SIGTERM)
    signal.signal(signal.SIGTERM, terminated)
    return (before,)


def _restore(previous: object) -> None:
    import signal

    if isinstance(previous, tuple):
        handler = previous[0] if previous[0] is not None else signal.SIG_DFL
        signal.signal(signal.SIGTERM, handler)
