"""The pipeline's stretch stage, apart from the band commands so that a formula without a reporter
does not import the band model.

:func:`stretch_stage` is listed in :data:`enumerator.workflow.pipeline.STAGES`
(messages call it the 'bands' stage, as when it lived in
:mod:`enumerator.workflow.bands`, which still exports it): the counts of
:func:`enumerator.analyses.stretch.analysis.stage` plus every isomer's
predicted IR bands, so the pair verdicts get their IR pattern tier.  The band
model (:mod:`enumerator.vibrations`) is imported only when a reporter class is
present.
"""

from __future__ import annotations

from enumerator.analyses.stretch.analysis import PATTERN_MAX_ISOMERS, StretchAnalysis, with_patterns
from enumerator.analyses.stretch.analysis import stage as count_stage
from enumerator.analyses.stretch.likelihood import PredictedBand
from enumerator.analyses.stretch.modes import stretch_modes
from enumerator.analyses.views import RequestView, ResultView
from enumerator.errors import IsosieveError
from enumerator.rules.ruleset import load_rules

__all__ = ["stretch_stage"]


def stretch_stage(res: ResultView, req: RequestView) -> StretchAnalysis:
    """Pipeline stage: the stretch counts, with every isomer's predicted IR bands for the pattern tier.

    Parameters
    ----------
    res : Result
        The result so far.
    req : Request
        Its request (rule folders).

    Returns
    -------
    StretchAnalysis
        From :func:`enumerator.analyses.stretch.analysis.stage`, with the
        patterns of :func:`enumerator.vibrations.matching.predicted_bands`
        attached (none above :data:`~enumerator.analyses.stretch.analysis.PATTERN_MAX_ISOMERS`
        isomers, and none for an isomer the band model cannot predict, said in
        the analysis's pattern status).

    Raises
    ------
    InputError
        What :func:`~enumerator.analyses.stretch.analysis.stage` raises.
    """
    a = count_stage(res, req)
    if not a.classes:
        return a
    if len(a.ids) > PATTERN_MAX_ISOMERS:
        return with_patterns(
            a,
            None,
            f"IR patterns not judged: more than {PATTERN_MAX_ISOMERS} isomers (use --limit or --pick to judge fewer)",
        )
    from enumerator.vibrations.matching import pattern_for, predicted_bands  # only when a class is present

    rules = load_rules(req.rules)
    patterns: list[tuple[tuple[PredictedBand, ...], ...] | None] = []
    failed: list[str] = []
    for iso in res.isomers:
        try:
            patterns.append(
                tuple(
                    predicted_bands(
                        pattern_for(iso, c, rules=rules, composition=res.composition), stretch_modes(iso, c)
                    )
                    for c in a.classes
                )
            )
        except IsosieveError as exc:
            failed.append(f"{iso.id}: {exc.what}")
            patterns.append(None)
    note = f"IR patterns not judged for some isomers ({'; '.join(failed[:3])})" if failed else None
    return with_patterns(a, patterns, note)
