"""Formula libraries for batch benchmarks: many formulas over few composition patterns.

Both are deterministic (``random.Random`` with a fixed number), so two runs
screen the same rows.

>>> lib = abstract_library(1000, distinct=40)
>>> len(lib), len(set(lib)) <= 200, distinct_patterns(lib) <= 40
(1000, True, True)
>>> condensed_library(3)
['[Rh(NH3)6]', '[IrI6]', '[MnCl4(py)2]']
"""

from __future__ import annotations

import contextlib
import random
from collections.abc import Iterable

__all__ = ["abstract_library", "condensed_library", "distinct_patterns", "parse_only"]

_METALS6 = ("Cr", "W", "Mn", "Re", "Fe", "Ru", "Os", "Co", "Rh", "Ir")
_MONO = ("CO", "Cl", "Br", "I", "NH3", "PPh3", "PMe3", "CN", "py", "MeCN", "H2O")


def abstract_library(size: int, distinct: int = 400, rng: random.Random | None = None) -> list[str]:
    """``size`` abstract formulas built from ``distinct`` compositions (CN 4-6) with varied charges,
    so most rows repeat a composition pattern."""
    rng = rng or random.Random(20240)
    pool: list[str] = []
    letters = "abcdef"
    seen: set[str] = set()
    while len(pool) < distinct:
        cn = rng.choice((4, 5, 6))
        k = rng.randint(1, min(cn, 4))
        cuts = sorted(rng.sample(range(1, cn), k - 1))
        parts = [b - a for a, b in zip([0] + cuts, cuts + [cn])]
        chosen = rng.sample(letters, k)
        body = "".join(c + (str(n) if n > 1 else "") for c, n in zip(chosen, parts))
        if rng.random() < 0.25 and cn == 6:
            body = "(AA)" + body[:-1] if body[-1].isalpha() else body
        f = "M" + body
        if f in seen:
            continue
        seen.add(f)
        pool.append(f)
    charges = ("", "+", "-", "2+", "2-")
    out = []
    for _ in range(size):
        f = rng.choice(pool)
        q = rng.choice(charges)
        out.append(f"[{f}]{q}" if q else f)
    return out


def condensed_library(size: int, rng: random.Random | None = None) -> list[str]:
    """``size`` real octahedral formulas such as ``[Ru(CO)2Cl2(PPh3)2]``."""
    rng = rng or random.Random(31337)
    out = []
    for _ in range(size):
        metal = rng.choice(_METALS6)
        k = rng.randint(1, 3)
        ligs = rng.sample(_MONO, k)
        cuts = sorted(rng.sample(range(1, 6), k - 1))
        parts = [b - a for a, b in zip([0] + cuts, cuts + [6])]
        body = "".join(
            (f"({lig})" if len(lig) > 2 or lig in ("CO", "CN", "py") else lig) + (str(n) if n > 1 else "")
            for lig, n in zip(ligs, parts)
        )
        out.append(f"[{metal}{body}]")
    return out


def distinct_patterns(formulas: Iterable[str]) -> int:
    """How many composition patterns (what decides the isomers) the readable formulas have."""
    from enumerator.errors import IsosieveError
    from enumerator.parse.formula import parse_formula
    from enumerator.rules.ruleset import load_rules

    rules = load_rules()
    out = set()
    for f in set(formulas):
        with contextlib.suppress(IsosieveError):
            out.add(parse_formula(f, rules).pattern)
    return len(out)


def parse_only(formulas: Iterable[str]) -> int:
    """Parse every formula and choose its geometry, nothing more: the floor a fully cached screen can reach.

    Returns the number of formulas read without an error.
    """
    from enumerator.analyses.centre import choose_geometry
    from enumerator.errors import IsosieveError
    from enumerator.parse.formula import parse_formula
    from enumerator.rules.ruleset import load_rules

    rules = load_rules()
    ok = 0
    for f in formulas:
        try:
            choose_geometry(parse_formula(f, rules), rules, None)
            ok += 1
        except IsosieveError:
            pass
    return ok
