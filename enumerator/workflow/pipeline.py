"""From request to :class:`~enumerator.workflow.result.Result`: the one place that
strings the stages together.  The CLI calls this; so may any script.

>>> r = analyse("Ma4b2", geometry="OC-6")
>>> r.isomer_set.geometric_isomers
2
"""

from __future__ import annotations

import importlib
from collections.abc import Callable, Sequence
from dataclasses import dataclass, replace

from enumerator.analyses.centre import choose_geometry
from enumerator.isomers.enumeration import Isomer, IsomerSet, enumerate_isomers, generate
from enumerator.model.composition import Composition
from enumerator.model.geometry import Geometry
from enumerator.parse.formula import parse_formula
from enumerator.rules.ruleset import load_rules
from enumerator.workflow.result import Result

__all__ = ["Request", "STAGES", "analyse", "run", "prepare", "parse_formula", "apply_settings", "choose_geometry"]


@dataclass(frozen=True)
class Request:
    """Everything one analysis needs, as plain values (hashable)."""

    formula: str
    geometry: str | None = None
    spans: tuple[tuple[str, str], ...] = ()
    arrangements: tuple[tuple[str, str], ...] = ()
    reporters: tuple[tuple[str, str], ...] = ()
    limit: int | None = None
    rules: tuple[str, ...] = ()
    #: further stage options as (name, value) pairs, e.g. ("ring_size", "5")
    options: tuple[tuple[str, str], ...] = ()

    def option(self, name: str, default: str | None = None) -> str | None:
        for k, v in self.options:
            if k == name:
                return v
        return default


#: The analysis stages, in order: "module:function".  Each function takes
#: (Result, Request) and returns an Analysis (or None to add nothing).
#: A stage sees the analyses of the stages before it in ``result.analyses``.
STAGES: tuple[str, ...] = (
    "enumerator.analyses.centre.analysis:stage",
    "enumerator.analyses.safety:stage",
    "enumerator.analyses.descriptors.analysis:descriptor_stage",
    "enumerator.analyses.stretch.analysis:stage",
)


def apply_settings(
    comp: Composition,
    spans: Sequence[tuple[str, str]] = (),
    arrangements: Sequence[tuple[str, str]] = (),
    reporters: Sequence[tuple[str, str]] = (),
) -> Composition:
    """Per-ligand settings from the command line or a job file."""
    from dataclasses import replace

    for name, span in spans:
        comp = comp.replace_kind(name, comp.kind(name).with_span(span))
    for name, arr in arrangements:
        comp = comp.replace_kind(name, comp.kind(name).with_arrangements(arr.split(",")))
    for name, cls in reporters:
        comp = comp.replace_kind(name, replace(comp.kind(name), reporter=cls))
    return comp


def analyse(formula: str, geometry: str | None = None, **options) -> Result:
    """Run the whole analysis for one formula; options as in :class:`Request`."""
    return run(Request(formula=formula, geometry=geometry, **options))


def prepare(req: Request) -> tuple[Composition, Geometry, str]:
    """The composition (settings applied), the geometry and the reason for
    it: everything :func:`run` decides before enumerating.  Callers use it
    to count up front (:mod:`enumerator.isomers.counting`) before a long run."""
    rules = load_rules(req.rules)
    comp = parse_formula(req.formula, rules)
    comp = apply_settings(comp, req.spans, req.arrangements, req.reporters)
    symbol, reason = choose_geometry(comp, rules, req.geometry)
    return comp, rules.geometry(symbol), reason


def _enumerate(comp: Composition, geo: Geometry, limit: int | None, on_isomer: Callable[[Isomer], None]) -> IsomerSet:
    found = []
    complete = True
    for k, iso in enumerate(generate(comp, geo, limit=None if limit is None else limit + 1)):
        if limit is not None and k >= limit:
            complete = False
            break
        on_isomer(iso)
        found.append(iso)
    if not found:
        return enumerate_isomers(comp, geo, limit=1)  # raises its own "cannot be placed" error
    return IsomerSet(comp, geo, tuple(found), complete)


def run(
    req: Request,
    *,
    on_isomer: Callable[[Isomer], None] | None = None,
    isomers: IsomerSet | None = None,
) -> Result:
    """Enumerate and run every stage.

    ``on_isomer`` is called with each stereoisomer as the lazy enumeration
    yields it (a progress bar, or a caller that keeps what was found so far
    if it is interrupted).  ``isomers`` skips enumeration and analyses the
    given, possibly incomplete, set instead (e.g. the part found before an
    interruption); its composition and geometry must come from
    :func:`prepare` of the same request.
    """
    comp, geo, reason = prepare(req)
    if isomers is not None:
        iso = isomers
    elif on_isomer is not None:
        iso = _enumerate(comp, geo, req.limit, on_isomer)
    else:
        iso = enumerate_isomers(comp, geo, limit=req.limit)
    notes = []
    if not iso.complete:
        if req.limit is not None and len(iso.isomers) >= req.limit:
            notes.append(f"only the first {len(iso.isomers)} stereoisomers are listed (--limit)")
        else:
            notes.append(
                f"only the first {len(iso.isomers)} stereoisomers are listed (the enumeration was interrupted)"
            )
    res = Result(composition=comp, geometry=geo, geometry_reason=reason, isomer_set=iso, notes=tuple(notes))
    for stage in STAGES:
        module, _, func = stage.partition(":")
        step = getattr(importlib.import_module(module), func)
        added = step(res, req)
        if added is not None:
            res = replace(res, analyses=res.analyses + (added,))
    return res
