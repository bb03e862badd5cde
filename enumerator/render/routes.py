"""Route plans and single-step predictions as terminal text.

:func:`plan_text` renders a :class:`~enumerator.routes.planner.RoutePlan`
(``isosieve route --target``), :func:`prediction_text` a
:class:`~enumerator.routes.prediction.Prediction` (``isosieve route --add``).
Both read the result objects only; their JSON documents are the results'
own ``to_dict()``.

>>> from enumerator.routes.planner import plan_routes
>>> text = plan_text(plan_routes("[PtCl4]2-", "cis-[PtCl2(NH3)2]"))
>>> [line for line in text.splitlines() if line.startswith("Route")]
['Route 1: +NH3, +NH3 -> reaches the target']
"""

from __future__ import annotations

from collections.abc import Sequence

from enumerator.render.text import table
from enumerator.routes.planner import Route, RoutePlan
from enumerator.routes.prediction import Prediction
from enumerator.rules.substitution import SubstitutionRules

__all__ = ["plan_text", "prediction_text"]


def _rule_head(rules: SubstitutionRules, reason: str) -> list[str]:
    return [
        f"Rule set:  {rules.name} - {rules.title}",
        f"           source: {rules.source}",
        f"           chosen: {reason}",
        f"           ties: {rules.ties}",
    ]


def _safety(lines: Sequence[str]) -> list[str]:
    return (["", "Safety:"] + [f"- {x}" for x in lines]) if lines else []


def prediction_text(p: Prediction) -> str:
    """One step: statistical shares, every replaceable site and the major product with the reason.

    Parameters
    ----------
    p : Prediction

    Returns
    -------
    str
        Lines ending in a newline.
    """
    lines = [f"Start:     {p.start.label()}", f"Entering:  {p.entering}", *_rule_head(p.rules, p.rules_reason)]
    lines.append("")
    rows = [[prod.label(), prod.descriptor or "-", str(share)] for prod, share in p.by_geometric_isomer("statistical")]
    lines.append("Statistical shares (every replaceable site alike):")
    lines.append(table(["product", "descriptor", "share"], rows, indent="  "))
    lines.append("")
    rows = [
        [
            str(c.site + 1),
            c.leaving,
            ", ".join(c.labilisers) or "-",
            f"{c.product.formula} #{c.product.isomer}",
            "yes" if c.selected else "",
        ]
        for c in p.sites
    ]
    lines.append("Replaceable sites:")
    lines.append(table(["site", "leaving", "decided by ligands", "product", "picked"], rows, indent="  "))
    lines.append("")
    if p.major is not None:
        lines.append(f"Major product: {p.major.label()}")
    else:
        lines.append("Major product: none (the step is undecided under this rule set)")
    lines.append(f"Why: {p.reason}")
    lines.extend(_safety(p.safety))
    return "\n".join(lines) + "\n"


def _steps(r: Route) -> list[str]:
    out = []
    for s in r.steps:
        p = s.prediction
        if p.major is None:
            out.append(f"  {s.number}. +{s.entering}: no single major product; {p.reason}")
            continue
        chosen = p.major_sites
        sites = sorted(c.site + 1 for c in chosen)
        where = f"site {sites[0]}" if len(sites) == 1 else "any of sites " + ", ".join(map(str, sites))
        out.append(
            f"  {s.number}. +{s.entering} replaces {chosen[0].leaving} at {where} -> {p.major.label()}; {p.reason}"
        )
    return out


def _order(r: Route) -> str:
    return ", ".join(f"+{e}" for e in r.order)


def _plan_head(plan: RoutePlan) -> list[str]:
    searched = len(plan.routes)
    return [
        f"Start:     {plan.start.label()}",
        f"Target:    {plan.target.label()}" + (f" {plan.target.descriptor}" if plan.target.descriptor else ""),
        f"Geometry:  {plan.geometry_reason}",
        *_rule_head(plan.rules, plan.rules_reason),
        "Adds "
        + ", ".join(f"{n} {k}" for k, n in plan.entering)
        + "; removes "
        + ", ".join(f"{n} {k}" for k, n in plan.leaving)
        + f"; {searched} order{'s' if searched != 1 else ''} of addition searched.",
        "",
    ]


def plan_text(plan: RoutePlan) -> str:
    """Every order of addition that reaches the target, step by step, then the others, notes and cautions.

    Parameters
    ----------
    plan : RoutePlan

    Returns
    -------
    str
        Lines ending in a newline.
    """
    lines = _plan_head(plan)
    reaching = plan.reaching
    if not reaching:
        lines.append(f"No order of addition reaches {plan.target.label()} under the rule set '{plan.rules.name}'.")
        lines.append("")
    for k, r in enumerate(reaching, start=1):
        lines.append(f"Route {k}: {_order(r)} -> reaches the target")
        lines.extend(_steps(r))
        lines.append("")
    others = [r for r in plan.routes if not r.reaches_target]
    if others:
        lines.append("Orders that do not reach the target:")
        for r in others:
            lines.append(f"  {_order(r)}: {r.outcome}")
            lines.extend("  " + s for s in _steps(r))
        lines.append("")
    for n in plan.notes:
        lines.append(f"Note: {n}")
    lines.extend(_safety(plan.safety))
    return "\n".join(lines).rstrip("\n") + "\n"
