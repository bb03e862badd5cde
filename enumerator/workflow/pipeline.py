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

from enumerator.errors import InputError
from enumerator.isomers.enumeration import Isomer, IsomerSet, enumerate_isomers, generate
from enumerator.model.composition import Composition
from enumerator.model.geometry import Geometry
from enumerator.parse.abstract import looks_abstract, parse_abstract
from enumerator.rules.ruleset import RuleSet, load_rules
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
    "enumerator.analyses.centre:stage",
    "enumerator.analyses.safety:stage",
    "enumerator.analyses.descriptors:descriptor_stage",
    "enumerator.analyses.stretch:stage",
)


#: Element symbols that begin like the abstract notation's 'M' + a letter.
_M_ELEMENTS = frozenset({"Mn", "Mo", "Mg", "Mt", "Md", "Mc"})
#: Of those, the ones a real formula is likely to start with.
_COMMON_M_ELEMENTS = frozenset({"Mn", "Mo", "Mg"})


def parse_formula(text: str, rules: RuleSet) -> Composition:
    """Parse the abstract letter notation or a condensed formula."""
    if not text or not text.strip():
        raise InputError("empty formula", "give a formula such as Ma4b2 or [RuCl2(CO)2(PPh3)2]")
    if looks_abstract(text):
        # 'Mn', 'Mo', 'Mg', ... also start like the abstract notation
        # ("Mo(CO)6" reads as M + o + a chelate (CO)): a text that the ligand
        # catalogue reads as a real formula is taken as one; otherwise it is
        # the letter notation.
        head = text.strip().lstrip("[")[:2]
        from enumerator.parse.condensed import parse_condensed

        if head in _M_ELEMENTS:
            try:
                return parse_condensed(text, rules, suggest=False)
            except InputError:
                pass
        try:
            return parse_abstract(text)
        except InputError as abstract_error:
            if head in _COMMON_M_ELEMENTS:
                # neither reading works: for Mn/Mo/Mg the real formula is the
                # likely intent, so its error (with suggestions) is the useful one
                return parse_condensed(text, rules)
            try:
                return parse_condensed(text, rules, suggest=False)
            except InputError:
                raise abstract_error from None
    try:
        from enumerator.parse.condensed import parse_condensed  # real formulas (ligand catalogue)
    except ImportError:  # pragma: no cover - until the catalogue lands
        raise InputError(
            f"'{text}' is not in the abstract notation (M followed by ligand letters)",
            "write e.g. Ma2b2c2 or M(AA)2b2",
        ) from None
    return parse_condensed(text, rules)


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


def choose_geometry(comp: Composition, rules: RuleSet, symbol: str | None) -> tuple[str, str]:
    """The geometry symbol and the reason for it."""
    if comp.metal != "M":  # a real centre: from the coordination number and the d-electron count
        from enumerator.analyses.centre import choose_geometry as centre_choice

        return centre_choice(comp, rules, symbol)
    if symbol:
        g = rules.geometry(symbol)
        return g.symbol, f"{g.symbol} as requested"
    g = rules.default_geometry(comp.donor_count)
    return g.symbol, (
        f"{g.symbol}: the default {g.name} for coordination number {comp.donor_count} "
        "(an abstract centre has no d-electron count; use --geometry to choose another)"
    )


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
