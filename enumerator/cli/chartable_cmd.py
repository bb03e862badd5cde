"""``isosieve chartable``: the computed character table of a point group or of an isomer."""

from __future__ import annotations

import click

from enumerator.cli.common import emit, parse_pairs, rules_of


def _render(t, title: str) -> str:
    from enumerator.render.text import table
    from enumerator.symmetry.chartable import format_character

    golden = t.group in ("I", "Ih")
    header = ["", *[c.label for c in t.classes], "linear, rotations", "quadratic"]
    rows = []
    for i in t.irreps:
        lin = [s for s in i.function_sets if s[0] in ("x", "y", "z", "Rx", "Ry", "Rz")]
        quad = [s for s in i.function_sets if s not in lin]
        fmt = lambda sets: ", ".join(s[0] if len(s) == 1 else "(" + ", ".join(s) + ")" for s in sets)
        rows.append([i.label, *[format_character(c, golden) for c in i.characters], fmt(lin), fmt(quad)])
    lines = [title, f"axes: {t.axes_note}", "", table(header, rows)]
    ir = [i.label for i in t.irreps if i.ir_active]
    ra = [i.label for i in t.irreps if i.raman_active]
    lines += [
        "",
        f"IR active (x, y, z): {', '.join(ir) or 'none'}",
        f"Raman active (quadratic): {', '.join(ra) or 'none'}",
    ]
    if any(i.parts == 2 for i in t.irreps):
        lines.append(
            "E species marked by joining a complex-conjugate pair: "
            + ", ".join(i.label for i in t.irreps if i.parts == 2)
        )
    return "\n".join(lines) + "\n"


@click.command("chartable")
@click.argument("what")
@click.option("--isomer", "isomer_id", metavar="ID", help="Which isomer of the formula (default: every isomer).")
@click.option("-g", "--geometry", metavar="SYMBOL", help="Polyhedral symbol for a formula, e.g. OC-6.")
@click.option("--span", "spans", multiple=True, metavar="LIGAND=SPAN", help="Chelate span for a formula; repeatable.")
@click.option("--json", "as_json", is_flag=True, help="Print JSON.")
@click.option("--out", type=click.Path(dir_okay=False), help="Write to this file (atomically).")
@click.pass_context
def chartable(ctx, what, isomer_id, geometry, spans, as_json, out):
    """Print the computed character table of WHAT: a point-group name (C2v,
    D4h, Td, Oh, Ih, D5h, S8, ...) or a formula (then one table per isomer,
    or only --isomer ID).

    A named group is built by closing generators in the standard
    orientation (z principal axis, C2' along x, sigma_v = xz).  An isomer's
    table comes from its own stabiliser, with the axes fixed by the rule in
    the README ('axes' line).  Characters, Mulliken labels and the functions
    column are all computed.

    \b
    Examples:
      isosieve chartable D4h
      isosieve chartable Ih --json
      isosieve chartable "Ma2b2c2" --isomer 2
      isosieve chartable "M(AA)2b2" --geometry OC-6
    """
    from enumerator.isomers.tables import table_for_isomer
    from enumerator.render.jsonout import dumps
    from enumerator.symmetry.chartable import GROUP_NAME, named_table

    if GROUP_NAME.match(what) and not isomer_id and not geometry:
        t = named_table(what)
        if as_json:
            emit(dumps(t.to_dict()), out)
        else:
            emit(_render(t, f"{t.group} (order {t.order}), built from generators"), out)
        return
    if what in ("Dinfh", "Cinfv"):
        named_table(what)  # raises the explanation
    from enumerator.workflow.pipeline import Request, run

    res = run(
        Request(formula=what, geometry=geometry, spans=parse_pairs(spans, "--span", "AA=trans"), rules=rules_of(ctx))
    )
    isomers = [res.isomer_set.get(isomer_id)] if isomer_id else list(res.isomers)
    docs, texts = [], []
    for iso in isomers:
        t = table_for_isomer(iso)
        title = f"{t.group} (order {t.order}): isomer {iso.id} of {res.composition.formula} on {res.geometry.symbol}"
        if as_json:
            d = {"isomer": iso.id, **t.to_dict()}
            docs.append(d)
        else:
            texts.append(_render(t, title))
    if as_json:
        emit(dumps(docs if not isomer_id else docs[0]), out)
    else:
        emit("\n".join(texts), out)
