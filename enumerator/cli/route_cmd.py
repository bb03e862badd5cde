"""``isosieve route``: orders of ligand addition that reach a target isomer,
and single-step product prediction (``--add``).

The command parses its options, calls :func:`enumerator.routes.planner.plan_routes`
or :func:`enumerator.routes.prediction.predict_step`, and hands the result to
:mod:`enumerator.render.routes` (text) or to its own ``to_dict()`` (``--json``).
"""

from __future__ import annotations

import click

from enumerator.cli.common import emit, rules_of


@click.command("route")
@click.argument("start")
@click.option(
    "-t",
    "--target",
    metavar="TARGET",
    help=(
        "Target formula with a descriptor: cis-/trans-/fac-/mer- or a configuration index,"
        ' e.g. "cis-[PtCl2(NH3)2]" or "(OC-6-22)-Ma4b2".'
    ),
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
    from enumerator.render.jsonout import dumps

    if bool(target) == bool(add):
        raise InputError(
            "give either --target TARGET (plan routes) or --add LIGAND (one step)", 'e.g. --target "cis-[PtCl2(NH3)2]"'
        )
    if leaving and not add:
        raise InputError("--leaving goes with --add", "drop --leaving, or use --add LIGAND")
    if add:
        from enumerator.render.routes import prediction_text
        from enumerator.routes.prediction import predict_step

        p = predict_step(start, add, leaving=leaving or None, geometry=geometry, rule_set=rule_set, rules=rules_of(ctx))
        emit(dumps(p.to_dict()) if as_json else prediction_text(p), out)
        return
    from enumerator.render.routes import plan_text
    from enumerator.routes.planner import plan_routes

    plan = plan_routes(start, target, geometry=geometry, rule_set=rule_set, rules=rules_of(ctx))
    emit(dumps(plan.to_dict()) if as_json else plan_text(plan), out)
