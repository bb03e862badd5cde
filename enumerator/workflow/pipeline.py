"""From request to :class:`~enumerator.workflow.result.Result`: the one place that strings the stages together.

:func:`run` takes a :class:`~enumerator.parse.request.Request`: it reads the
rules, parses the formula, applies the per-ligand settings, chooses the
geometry (:func:`prepare`), enumerates the isomers and runs every analysis
stage of :data:`STAGES` in order; with ``pick`` it then keeps only the
isomers whose descriptor matches.  The command line calls it; so may any
script.

For a notebook, :func:`analyse` is the same in one call with keyword options
(checked against the option table, :data:`enumerator.parse.request.OPTIONS`),
and :func:`iter_isomers` yields the isomers one by one, for cases too large
to hold or analyse at once.

>>> r = analyse("Ma4b2", geometry="OC-6", reporters={"a": "CO"})
>>> [(i.id, i.point_group) for i in r.isomers]
[('1', 'C2v'), ('2', 'D4h')]
>>> [i.point_group for i in iter_isomers("Mabcdef", limit=2)]
['C1', 'C1']
"""

from __future__ import annotations

import importlib
from collections.abc import Callable, Iterator, Mapping, Sequence
from dataclasses import replace
from os import PathLike
from typing import Any

from enumerator.analyses.centre import choose_geometry
from enumerator.analyses.descriptors import describe_isomer, select_isomers
from enumerator.analyses.descriptors.select import matches, picked_ids
from enumerator.isomers.counting import check_size
from enumerator.isomers.enumeration import Isomer, IsomerSet, enumerate_isomers, generate
from enumerator.model.composition import Composition
from enumerator.model.geometry import Geometry
from enumerator.parse.formula import parse_formula
from enumerator.parse.request import Request, make_request, unknown_option
from enumerator.rules.ruleset import load_rules
from enumerator.workflow.result import Result

__all__ = [
    "Request",
    "STAGES",
    "analyse",
    "iter_isomers",
    "run",
    "run_partial",
    "stage_name",
    "without_analyses",
    "prepare",
    "parse_formula",
    "apply_settings",
    "choose_geometry",
]

#: Per-ligand settings as the one-call API takes them: a mapping or (ligand, value) pairs.
Settings = Mapping[str, str] | Sequence[tuple[str, str]]


#: The analysis stages, in order: "module:function".  Each function takes
#: (Result, Request) and returns an Analysis (or None to add nothing).
#: A stage sees the analyses of the stages before it in ``result.analyses``.
STAGES: tuple[str, ...] = (
    "enumerator.analyses.centre.analysis:stage",
    "enumerator.analyses.safety:stage",
    "enumerator.analyses.descriptors.analysis:descriptor_stage",
    "enumerator.workflow.bands_stage:stretch_stage",
)


def apply_settings(
    comp: Composition,
    spans: Sequence[tuple[str, str]] = (),
    arrangements: Sequence[tuple[str, str]] = (),
    reporters: Sequence[tuple[str, str]] = (),
) -> Composition:
    """The composition with per-ligand settings from the command line or a job file.

    Parameters
    ----------
    comp : Composition
        The parsed formula.
    spans : sequence of (ligand, span)
        Chelate link spans: edge, cis, trans or any.
    arrangements : sequence of (ligand, 'fac' | 'mer' | 'fac,mer')
        Limits of tridentate chains.
    reporters : sequence of (ligand, class)
        Stretch reporter classes.

    Returns
    -------
    Composition

    Raises
    ------
    InputError
        A ligand not in the formula, or a setting that does not apply to it.
    """
    for name, span in spans:
        comp = comp.replace_kind(name, comp.kind(name).with_span(span))
    for name, arr in arrangements:
        comp = comp.replace_kind(name, comp.kind(name).with_arrangements(arr.split(",")))
    for name, cls in reporters:
        comp = comp.replace_kind(name, replace(comp.kind(name), reporter=cls))
    return comp


def prepare(
    req: Request, *, size_check: bool = True, progress: Callable[[int, int], None] | None = None
) -> tuple[Composition, Geometry, str]:
    """Everything :func:`run` decides before enumerating, and the size guard.

    Unless ``req.limit`` is given, a composition with more stereoisomers than
    :data:`enumerator.limits.SIZE_CAP` is refused here, before anything is
    enumerated (:func:`enumerator.isomers.counting.check_size`: cheap bounds
    first, the exact Burnside count only when they do not decide).  Every
    caller that enumerates after ``prepare`` -- the pipeline, batch rows,
    job entries, character tables, band predictions and matches -- is guarded
    so; a caller that only counts, or streams the isomers one by one, passes
    ``size_check=False``.

    Parameters
    ----------
    req : Request
    size_check : bool
        Refuse an oversized composition (default); False for a caller that does not enumerate all at once.
    progress : callable, optional
        Called as ``progress(done, total)`` while the exact count is summed, when the guard needs it.

    Returns
    -------
    (Composition, Geometry, str)
        The composition (settings applied), the geometry and the reason it was chosen.

    Raises
    ------
    InputError
        A formula that cannot be read, a setting that does not apply, an unknown geometry.
    RuleError
        A rule folder that cannot be read.
    CapacityError
        More stereoisomers than the cap and no ``req.limit``.
    """
    rules = load_rules(req.rules)
    comp = parse_formula(req.formula, rules)
    comp = apply_settings(comp, req.spans, req.arrangements, req.reporters)
    symbol, reason = choose_geometry(comp, rules, req.geometry)
    geo = rules.geometry(symbol)
    if size_check:
        check_size(comp, geo, req.limit, progress=progress)
    return comp, geo, reason


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


def _notes(req: Request, iso: IsomerSet) -> tuple[str, ...]:
    if iso.complete:
        return ()
    if req.limit is not None and len(iso.isomers) >= req.limit:
        return (f"only the first {len(iso.isomers)} stereoisomers are listed (--limit)",)
    return (f"only the first {len(iso.isomers)} stereoisomers are listed (the enumeration was interrupted)",)


def run(
    req: Request,
    *,
    on_isomer: Callable[[Isomer], None] | None = None,
    isomers: IsomerSet | None = None,
    progress: Callable[[str, int, int], None] | None = None,
) -> Result:
    """Enumerate and run every stage; with ``req.pick``, keep only the isomers it matches.

    Parameters
    ----------
    req : Request
        The formula and its options.
    on_isomer : callable, optional
        Called with each stereoisomer as the lazy enumeration yields it (a progress bar, or a caller that
        keeps what was found so far if it is interrupted).
    isomers : IsomerSet, optional
        Skip enumeration and analyse this, possibly incomplete, set instead (e.g. the part found before an
        interruption); its composition and geometry must come from :func:`prepare` of the same request.
    progress : callable, optional
        Called as ``progress(stage, done, total)`` after each analysis stage (a progress bar).

    Returns
    -------
    Result

    Raises
    ------
    InputError
        As :func:`prepare`; a composition that cannot be placed on the geometry; ``pick`` matching nothing.
    CapacityError
        More stereoisomers than :data:`enumerator.limits.SIZE_CAP` and no ``req.limit``.
    """
    comp, geo, reason = prepare(req, size_check=isomers is None)
    if isomers is not None:
        iso = isomers
    elif on_isomer is not None:
        iso = _enumerate(comp, geo, req.limit, on_isomer)
    else:
        iso = enumerate_isomers(comp, geo, limit=req.limit)
    res, _ = _analyse(req, _result(req, comp, geo, reason, iso), partial=False, progress=progress)
    return _pick(req, res)


def _result(req: Request, comp: Composition, geo: Geometry, reason: str, iso: IsomerSet) -> Result:
    rules = load_rules(req.rules)
    pointer = rules.geometry_note(req.geometry)  # an old spelling of a geometry symbol
    notes = ((pointer,) if pointer else ()) + ((geo.adjusted,) if geo.adjusted else ()) + _notes(req, iso)
    return Result(composition=comp, geometry=geo, geometry_reason=reason, isomer_set=iso, notes=notes)


def stage_name(stage: str) -> str:
    """A stage of :data:`STAGES` as messages name it: 'enumerator.analyses.centre.analysis:stage' -> 'centre',
    'enumerator.workflow.bands_stage:stretch_stage' -> 'bands'.

    Parameters
    ----------
    stage : str

    Returns
    -------
    str
    """
    module = stage.partition(":")[0]
    parts = module.split(".")
    return parts[2] if len(parts) > 2 and parts[1] == "analyses" else parts[-1].removesuffix("_stage")


def _analyse(
    req: Request, res: Result, partial: bool, progress: Callable[[str, int, int], None] | None = None
) -> tuple[Result, str | None]:
    """Every stage in order; with ``partial``, Ctrl-C in a stage keeps the stages before it (and says so).

    ``progress(stage, done, total)`` is called after each stage ('centre', 'stretch', ...)."""
    for k, stage in enumerate(STAGES):
        module, _, func = stage.partition(":")
        step = getattr(importlib.import_module(module), func)
        try:
            added = step(res, req)
        except KeyboardInterrupt:
            if not partial:
                raise
            left = [stage_name(s) for s in STAGES[k:]]
            done = [stage_name(s) for s in STAGES[:k]]
            note = (
                f"interrupted during the {left[0]} analysis: its results"
                + (f" and those of {', '.join(left[1:])}" if left[1:] else "")
                + " are left out"
                + (f" (kept: {', '.join(done)})" if done else "")
            )
            return replace(res, notes=res.notes + (note,)), note
        if added is not None:
            res = replace(res, analyses=res.analyses + (added,))
        if progress is not None:
            progress(stage_name(stage), k + 1, len(STAGES))
    return res, None


def _pick(req: Request, res: Result) -> Result:
    return select_isomers(res, req.pick) if req.pick else res


def run_partial(
    req: Request,
    *,
    on_isomer: Callable[[Isomer], None] | None = None,
    progress: Callable[[str, int, int], None] | None = None,
) -> tuple[Result, str | None]:
    """:func:`run`, keeping what was done when it is interrupted (Ctrl-C) in any stage.

    Interrupted while enumerating, the stereoisomers found so far are kept
    (the set marked incomplete, with a note) and every analysis stage runs on
    them; interrupted in an analysis stage (the first interruption, or a
    second one after an interrupted enumeration), the stages before it are
    kept and the result says which were left out.  An interruption before the
    first isomer is found, or while ``pick`` selects, still raises
    :class:`KeyboardInterrupt` (there is nothing sound to keep).

    Parameters
    ----------
    req : Request
    on_isomer, progress : callable, optional
        As for :func:`run`.

    Returns
    -------
    (Result, str or None)
        The result and, when it was interrupted, the note saying what was kept (also in ``Result.notes``).
    """
    comp, geo, reason = prepare(req)
    found: list[Isomer] = []

    def keep(iso: Isomer) -> None:
        found.append(iso)
        if on_isomer is not None:
            on_isomer(iso)

    stopped: str | None = None
    try:
        iso = _enumerate(comp, geo, req.limit, keep)
    except KeyboardInterrupt:
        if not found:
            raise
        iso = IsomerSet(comp, geo, tuple(found), complete=False)
        stopped = f"interrupted during the enumeration: the first {len(found)} stereoisomers are kept"
    res, in_stage = _analyse(req, _result(req, comp, geo, reason, iso), partial=True, progress=progress)
    res = _pick(req, res)
    return res, "; ".join(n for n in (stopped, in_stage) if n) or None


def without_analyses(res: Result, why: str) -> Result:
    """The result with its analyses dropped and a note saying why (a cheap fallback to write).

    Parameters
    ----------
    res : Result
    why : str
        The note to add.

    Returns
    -------
    Result
    """
    return replace(res, analyses=(), notes=res.notes + (why,))


def _request(formula: str, unknown: Mapping[str, Any], **options: Any) -> Request:
    if unknown:
        raise unknown_option(next(iter(unknown)))
    return make_request(formula, **options)


def analyse(
    formula: str,
    *,
    geometry: str | None = None,
    reporters: Settings | None = None,
    spans: Settings | None = None,
    arrangements: Settings | None = None,
    limit: int | None = None,
    rules: Sequence[str | PathLike[str]] = (),
    pick: str | None = None,
    **unknown: Any,
) -> Result:
    """Every isomer of one formula with every analysis, in one call.

    Parameters
    ----------
    formula : str
        Abstract (``"Ma2b2c2"``, ``"M(AA)2b2"``) or condensed (``"[RuCl2(CO)2(PPh3)2]"``) formula.
    geometry : str, optional
        Polyhedral symbol (``"OC-6"``, ``"TBPY-5"`` ...); default: chosen from the formula.
    reporters : mapping or sequence of pairs, optional
        Stretch reporter class per ligand, e.g. ``{"a": "CO"}``.
    spans : mapping or sequence of pairs, optional
        Chelate span per ligand: edge, cis, trans or any, e.g. ``{"AA": "trans"}``.
    arrangements : mapping or sequence of pairs, optional
        fac, mer or 'fac,mer' per tridentate chain.
    limit : int, optional
        Stop after this many stereoisomers (the result is then marked incomplete).
    rules : sequence of str or path
        Rule folders besides the built-in rules.
    pick : str, optional
        Keep only the isomers whose IUPAC descriptor matches (OC-6-32-C, OC-6-32, 32, cis, fac ...).
    **unknown
        Any other keyword is refused with the nearest option names.

    Returns
    -------
    Result
        ``to_dict()`` gives the JSON document of ``isosieve isomers --json``.

    Raises
    ------
    InputError
        An unknown option or a value the option table does not allow, a formula that cannot be read or
        placed, an unknown geometry or reporter class, ``pick`` matching nothing.
    RuleError
        A rule folder that cannot be read.

    Examples
    --------
    >>> analyse("Ma3b3", geometry="OC-6").to_dict()["geometric_isomers"]
    2
    """
    return run(
        _request(
            formula,
            unknown,
            geometry=geometry,
            reporters=reporters,
            spans=spans,
            arrangements=arrangements,
            limit=limit,
            rules=rules,
            pick=pick,
        )
    )


def _picked(req: Request, comp: Composition, found: Iterator[Isomer]) -> Iterator[Isomer]:
    assert req.pick is not None
    seen = []
    shown = 0
    for iso in found:
        d = describe_isomer(iso, comp)
        seen.append((iso.id, d))
        if matches(d, req.pick):
            shown += 1
            yield iso
    if not shown:
        picked_ids(seen, req.pick, comp.formula)  # raises: nothing matches, with the descriptors present


def iter_isomers(
    formula: str,
    *,
    geometry: str | None = None,
    reporters: Settings | None = None,
    spans: Settings | None = None,
    arrangements: Settings | None = None,
    limit: int | None = None,
    rules: Sequence[str | PathLike[str]] = (),
    pick: str | None = None,
    **unknown: Any,
) -> Iterator[Isomer]:
    """The isomers of one formula, one at a time, each with its point group; no analysis stage runs.

    For compositions with very many stereoisomers: nothing is held but what the enumeration needs, and the
    first isomer comes at once.  ``isosieve count`` (:func:`enumerator.workflow.queries.count_formula`)
    tells how many there are before a long run.

    Parameters
    ----------
    formula : str
        Abstract or condensed formula.
    geometry, reporters, spans, arrangements, limit, rules
        As for :func:`analyse`.
    pick : str, optional
        Yield only the isomers whose IUPAC descriptor matches; each is described as it comes.
    **unknown
        Any other keyword is refused with the nearest option names.

    Yields
    ------
    Isomer
        In the order of ``isosieve isomers``; enantiomers as pairs ('3a', '3b').

    Raises
    ------
    InputError
        As for :func:`analyse` (raised on the first ``next()``); with ``pick``, after the last isomer when
        none matched.
    RuleError
        A rule folder that cannot be read.

    Examples
    --------
    >>> [(i.id, i.point_group) for i in iter_isomers("Ma3b3", pick="mer")]
    [('2', 'C2v')]
    """
    req = _request(
        formula,
        unknown,
        geometry=geometry,
        reporters=reporters,
        spans=spans,
        arrangements=arrangements,
        limit=limit,
        rules=rules,
        pick=pick,
    )
    comp, geo, _ = prepare(req, size_check=False)  # one at a time: nothing is held, so no size cap
    found = generate(comp, geo, limit=req.limit)
    if req.pick:
        yield from _picked(req, comp, found)
    else:
        yield from found
