"""One enumeration in a fresh process, pinned to one core: what a user's first call costs.

Run as ``python fresh_enumeration.py SYMBOL FORMULA``; prints one JSON object:
the time to import the package and load the rules, the first enumeration
(deriving the group tables included), the Burnside count and its time, the
isomer counts and point groups, and the process's peak resident memory in
MB.  The peak is ``VmHWM`` of ``/proc/self/status``, which starts afresh when
the process runs this script: on Linux ``ru_maxrss`` keeps the peak of the
process that started it (across fork and exec), so it is only the fallback
where there is no ``/proc``.
"""

from __future__ import annotations

import contextlib
import json
import os
import resource
import sys
import time
from typing import Any


def peak_rss_mb() -> float:
    """The peak resident memory of this process since it started this program, in MB."""
    try:
        with open("/proc/self/status", encoding="ascii") as fh:
            for line in fh:
                if line.startswith("VmHWM:"):
                    return int(line.split()[1]) / 1024.0
    except OSError:
        pass
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0


def measure(symbol: str, formula: str) -> dict[str, Any]:
    """Figures of the first enumeration of ``formula`` on ``symbol`` in this process."""
    if hasattr(os, "sched_setaffinity"):
        with contextlib.suppress(OSError):
            os.sched_setaffinity(0, {sorted(os.sched_getaffinity(0))[0]})
    t0 = time.perf_counter()
    from enumerator.isomers.counting import burnside_counts
    from enumerator.isomers.enumeration import enumerate_isomers
    from enumerator.parse.abstract import parse_abstract
    from enumerator.rules.ruleset import load_rules

    geo = load_rules().geometry(symbol)
    comp = parse_abstract(formula)
    t1 = time.perf_counter()
    iso = enumerate_isomers(comp, geo)
    t2 = time.perf_counter()
    counts = burnside_counts(comp, geo)
    t3 = time.perf_counter()
    return {
        "import_and_load_s": t1 - t0,
        "first_s": t2 - t1,
        "burnside_s": t3 - t2,
        "stereoisomers": iso.stereoisomers,
        "geometric_isomers": iso.geometric_isomers,
        "point_groups": sorted(i.point_group for i in iso.isomers),
        "burnside": list(counts) if counts else None,
        "peak_rss_mb": peak_rss_mb(),
    }


if __name__ == "__main__":
    print(json.dumps(measure(sys.argv[1], sys.argv[2])))
