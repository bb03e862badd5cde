"""``isosieve route``: orders of ligand addition that reach a target isomer,
and single-step product prediction (``--add``)."""

from __future__ import annotations

import click

from enumerator.cli.common import emit, rules_of


@click.command("route")
@click.argument("start")
@click.option(
    "-t",
    "--target",
    metavar="TARGET",
    help='Target formula with a descriptor: cis-/trans-/fac-/mer- or a configuration index, e.g. "cis-[PtCl2(NH3)2]" or "(OC-6-22)-Ma4b2".',
)
@click.option(
    "--add", "add", metavar="LIGAND", help="Instead of planning: predict the products of adding one LIGAND to START."
)
@click.option(
    "--leaving",
    "leaving",
    multiple=True,
    metavar="LIGAND",
    help="With --add: the ligand(s) that may leave (default: the rule set's, else every other one).",
)
@click.option(
    "-g", "--geometry", metavar="SYMBOL", help="Polyhedral symbol, e.g. SP-4, OC-6 (default: chosen from the formula)."
)
@click.option(
    "--rule-set",
    "rule_set",
    metavar="NAME",
    help="Substitution rule set by name (default: the applicable one of highest priority).",
)
@click.option("--json", "as_json", is_flag=True, help="Print one JSON document (keys in the README).")
@click.option(
    "--out", type=click.Path(dir_okay=False), help="Write to this file (atomically) instead of standard output."
)
@click.pass_context
def route(ctx, start, target, add, leaving, geometry, rule_set, as_json, out):
    """Plan the orders of ligand addition from START that give TARGET.

    START is a formula (with a descriptor if it has several isomers).  Each
    order of adding the missing ligands is followed through the predicted
    major product of every step under a substitution rule set (trans effect
    on SP-4, cis-labilisation of octahedral carbonyls, statistical default,
    or your own from --rules DIR/substitution/*.toml); every order that ends
    on the target is shown step by step with the reasons.

    \b
    Examples:
      isosieve route "[PtCl4]2-" --target "cis-[PtCl2(NH3)2]"
      isosieve route "[Pt(NH3)4]2+" --target "trans-[PtCl2(NH3)2]" --json
      isosieve route "[PtCl4]2-" --target "trans-[PtCl2(NH3)(NO2)]-"
      isosieve route "[Cr(CO)5(PPh3)]" --add PPh3 --rule-set statistical
      isosieve --rules myrules route Ma4 --target cis-Ma2b2 --geometry SP-4
    """
    from enumerator.errors import InputError

    if bool(target) == bool(add):
        raise InputError(
            "give either --target TARGET (plan routes) or --add LIGAND (one step)", 'e.g. --target "cis-[PtCl2(NH3)2]"'
        )
    if leaving and not add:
        raise InputError("--leaving goes with --add", "drop --leaving, or use --add LIGAND")
    if add:
        from enumerator.routes.core import predict_step

        p = predict_step(start, add, leaving=leaving or None, geometry=geometry, rule_set=rule_set, rules=rules_of(ctx))
        if as_json:
            from enumerator.render.jsonout import dumps
            from enumerator.routes.core import prediction_json

            emit(dumps(prediction_json(p)), out)
        else:
            emit(_prediction_text(p), out)
        return
    from enumerator.routes.core import plan_routes

    plan = plan_routes(start, target, geometry=geometry, rule_set=rule_set, rules=rules_of(ctx))
    if as_json:
        from enumerator.render.jsonout import dumps
        from enumerator.routes.core import route_json

        emit(dumps(route_json(plan)), out)
    else:
        emit(_plan_text(plan), out)


def _head(rules, reason: str) -> list[str]:
    return [
        f"Rule set:  {rules.name} - {rules.title}",
        f"           source: {rules.source}",
        f"           chosen: {reason}",
        f"           ties: {rules.ties}",
    ]


def _prediction_text(p) -> str:
    from enumerator.render.text import table

    lines = [f"Start:     {p.start.label()}", f"Entering:  {p.entering}", *_head(p.rules, p.rules_reason)]
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


def _safety(lines) -> list[str]:
    return (["", "Safety:"] + [f"- {x}" for x in lines]) if lines else []


def _plan_text(plan) -> str:
    lines = [
        f"Start:     {plan.start.label()}",
        f"Target:    {plan.target.label()}" + (f" {plan.target.descriptor}" if plan.target.descriptor else ""),
        f"Geometry:  {plan.geometry_reason}",
        *_head(plan.rules, plan.rules_reason),
        "Adds "
        + ", ".join(f"{n} {k}" for k, n in plan.entering)
        + "; removes "
        + ", ".join(f"{n} {k}" for k, n in plan.leaving)
        + f"; {len(plan.routes)} order{'s' if len(plan.routes) != 1 else ''} of addition searched.",
        "",
    ]
    reaching = plan.reaching
    if not reaching:
        lines.append(f"No order of addition reaches {plan.target.label()} under the rule set '{plan.rules.name}'.")
        lines.append("")
    for k, r in enumerate(reaching, start=1):
        lines.append(f"Route {k}: " + ", ".join(f"+{e}" for e in r.order) + " -> reaches the target")
        lines.extend(_steps(r))
        lines.append("")
    others = [r for r in plan.routes if not r.reaches_target]
    if others:
        lines.append("Orders that do not reach the target:")
        for r in others:
            lines.append("  " + ", ".join(f"+{e}" for e in r.order) + f": {r.outcome}")
            lines.extend("  " + s for s in _steps(r))
        lines.append("")
    for n in plan.notes:
        lines.append(f"Note: {n}")
    lines.extend(_safety(plan.safety))
    return "\n".join(lines).rstrip("\n") + "\n"


def _steps(r) -> list[str]:
    out = []
    for s in r.steps:
        p = s.prediction
        if p.major is None:
            out.append(f"  {s.number}. +{s.entering}: no single major product; {p.reason}")
            continue
        chosen = sorted(
            c.site + 1
            for c in p.sites
            if c.selected and c.product.formula == p.major.formula and c.product.number == p.major.number
        )
        leaving = next(
            c.leaving
            for c in p.sites
            if c.selected and c.product.formula == p.major.formula and c.product.number == p.major.number
        )
        where = f"site {chosen[0]}" if len(chosen) == 1 else "any of sites " + ", ".join(map(str, chosen))
        out.append(f"  {s.number}. +{s.entering} replaces {leaving} at {where} -> {p.major.label()}; {p.reason}")
    return out
