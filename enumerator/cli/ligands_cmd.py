"""``isosieve ligands``: the ligand catalogue in force."""

from __future__ import annotations

import click

from enumerator.cli.common import emit, rules_of


@click.command("ligands")
@click.argument("name", required=False)
@click.option("--json", "as_json", is_flag=True, help="Print JSON instead of a table.")
@click.option("--format", "fmt", type=click.Choice(["table", "csv", "json"]), default="table", show_default=True)
@click.pass_context
def ligands(ctx, name, as_json, fmt):
    """List the ligand catalogue, or show one ligand NAME (name or alias;
    exact first, then a unique case-insensitive match).

    \b
    Examples:
      isosieve ligands
      isosieve ligands Cp
      isosieve ligands --format csv
      isosieve --rules my_rules ligands
    """
    from enumerator.rules.ligands import find_ligand, load_ligands
    from enumerator.rules.ruleset import load_rules

    rs = load_rules(rules_of(ctx))
    entries = (
        [find_ligand(rs, name)]
        if name
        else sorted(load_ligands(rs).values(), key=lambda e: (e.denticity, e.name.lower()))
    )

    def doc(e):
        return {
            "name": e.name,
            "aliases": list(e.aliases),
            "label": e.label,
            "smiles": e.smiles,
            "donors": list(e.donors),
            "denticity": e.denticity,
            "hapticity": e.hapticity,
            "ring": e.ring,
            "charge": e.charge,
            "electrons_covalent": e.electrons_covalent,
            "electrons_ionic": e.electrons_ionic,
            "reporter": e.reporter,
            "spans": list(e.spans),
            "arrangements": list(e.arrangements),
            "nitrosyl": e.nitrosyl,
            "note": e.note,
            "source": e.source,
        }

    if as_json or fmt == "json":
        from enumerator.render.jsonout import dumps

        emit(dumps(doc(entries[0]) if name else [doc(e) for e in entries]), None)
        return
    header = ["name", "donors", "sites", "η", "charge", "e cov", "e ion", "reporter", "placement", "aliases", "SMILES"]
    rows = []
    for e in entries:
        place = (
            "ring (facial)"
            if e.ring
            else ",".join(e.arrangements) or ",".join(e.spans) or ("-" if e.denticity == 1 else "edge")
        )
        rows.append(
            [
                e.name,
                "".join(e.donors) if e.ring else "-".join(e.donors),
                str(e.denticity),
                str(e.hapticity or ""),
                f"{e.charge:+d}" if e.charge else "0",
                str(e.electrons_covalent),
                str(e.electrons_ionic),
                e.reporter or "",
                place,
                ", ".join(e.aliases),
                e.smiles,
            ]
        )
    if fmt == "csv":
        from enumerator.render.tables import write_csv

        emit(write_csv(header, rows), None)
        return
    from enumerator.render.text import table

    text = table(header, rows)
    if name and entries[0].note:
        text += f"\nnote: {entries[0].note}"
    emit(text + "\n", None)
