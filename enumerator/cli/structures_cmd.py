"""``isosieve structures``: XYZ / SDF starting structures for each isomer."""

from __future__ import annotations

from pathlib import Path

import click

from enumerator.cli.common import parse_pairs, rules_of
from enumerator.cli.output import write_files


@click.command("structures")
@click.argument("formula")
@click.option(
    "--out",
    "out_dir",
    required=True,
    type=click.Path(file_okay=False),
    help="Folder for the files (created if missing).",
)
@click.option(
    "--format",
    "fmt",
    type=click.Choice(["xyz", "sdf"]),
    default="xyz",
    show_default=True,
    help="xyz: one file per isomer; sdf: one SD file with a record per isomer.",
)
@click.option(
    "-g", "--geometry", metavar="SYMBOL", help="Polyhedral symbol, e.g. OC-6 (default: chosen from the formula)."
)
@click.option(
    "--span", "spans", multiple=True, metavar="LIGAND=SPAN", help="Chelate span: edge, cis, trans or any; repeatable."
)
@click.option(
    "--arrangement",
    "arrangements",
    multiple=True,
    metavar="LIGAND=fac|mer",
    help="Limit a tridentate to fac, mer or 'fac,mer'.",
)
@click.option("--limit", type=click.IntRange(min=1), help="Stop after this many stereoisomers.")
@click.pass_context
def structures(
    ctx: click.Context,
    formula: str,
    out_dir: str,
    fmt: str,
    geometry: str | None,
    spans: tuple[str, ...],
    arrangements: tuple[str, ...],
    limit: int | None,
) -> None:
    """Write starting structures of every isomer of FORMULA into --out.

    The metal sits at the origin, donors on the ideal site vectors at the
    sum of covalent radii.  With catalogue ligands (SMILES known) the full
    ligands are built by RDKit with the donor positions fixed; otherwise
    only the donor atoms are written and the title line starts with
    DONOR-ONLY CORE.  These are starting geometries for an optimisation.
    The files are written all or nothing.

    On Linux the 3D embeddings run in worker processes, one per CPU, when
    there are two or more; the coordinates are the same as in one process,
    which ISOSIEVE_EMBED_PROCESSES=1 in the environment forces.

    \b
    Examples:
      isosieve structures "[RuCl2(CO)2(PPh3)2]" --out ru
      isosieve structures "[Mo(CO)3(PMe3)3]" --out mo --format sdf
      isosieve structures Ma2b2c2 --out core
    """
    from enumerator.cli.progress import bar
    from enumerator.render.structures import structure_files, structure_listing
    from enumerator.workflow.queries import formula_structures

    with bar("structures") as progress:
        built = formula_structures(
            formula,
            geometry=geometry,
            spans=parse_pairs(spans, "--span", "AA=trans"),
            arrangements=parse_pairs(arrangements, "--arrangement", "AAA=fac"),
            limit=limit,
            rules=rules_of(ctx),
            progress=progress,
        )
    folder = Path(out_dir)
    write_files([(folder / name, text) for name, text in structure_files(built, fmt)], folder=folder)
    click.echo(structure_listing(built, fmt, folder))
