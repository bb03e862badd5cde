"""Run one ``isosieve`` command in this process and record its peak resident memory.

Run as ``python run_cli.py RSS_FILE ARGS...`` with the tree to measure first on
``PYTHONPATH``: the command runs as the console entry point runs it, and at exit
the process's peak resident memory (``VmHWM`` of ``/proc/self/status``, in MB;
``ru_maxrss`` where there is no ``/proc``) is written to RSS_FILE.
"""

from __future__ import annotations

import atexit
import resource
import sys


def peak_rss_mb() -> float:
    """The peak resident memory of this process, in MB."""
    try:
        with open("/proc/self/status", encoding="ascii") as fh:
            for line in fh:
                if line.startswith("VmHWM:"):
                    return int(line.split()[1]) / 1024.0
    except OSError:
        pass
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0


def _record(path: str) -> None:
    with open(path, "w", encoding="ascii") as fh:
        fh.write(f"{peak_rss_mb():.1f}\n")


if __name__ == "__main__":
    atexit.register(_record, sys.argv[1])
    from enumerator.cli import main

    main(sys.argv[2:])
