"""``isosieve match``: rank candidate isomers against measured bands."""

from __future__ import annotations

import click

from enumerator.cli.common import emit, parse_pairs, rules_of, write_atomic_bytes
from enumerator.errors import InputError


@click.command("match")
@click.argument("formula")
@click.option(
    "--bands",
    "bands_text",
    required=True,
    metavar="CM-1,...",
    help="Measured bands, optionally with intensities as written in a paper: 2045,1980,1932 or "
    '"2045 (s), 1980 (vs), 1932 (m)" (vs s m w vw sh br, or a number).',
)
@click.option(
    "--tolerance",
    type=click.FloatRange(min=0.1),
    default=10.0,
    show_default=True,
    help="Bands closer than this (cm-1) count as coincident; a match within it as good.",
)
@click.option(
    "--weak",
    type=click.FloatRange(min=0.0, max=0.99),
    default=0.05,
    show_default=True,
    help="Predicted bands below this relative intensity may go unseen.",
)
@click.option(
    "-g", "--geometry", metavar="SYMBOL", help="Polyhedral symbol, e.g. OC-6 (default: chosen from the formula)."
)
@click.option(
    "--reporter",
    "reporters",
    multiple=True,
    metavar="LETTER=CLASS",
    help="Treat a ligand as a stretch reporter, e.g. a=CO; repeatable.",
)
@click.option(
    "--class", "klass", metavar="CLASS", help="Reporter class the bands belong to (needed when several are present)."
)
@click.option(
    "--plot",
    type=click.Path(dir_okay=False),
    help="Write each candidate's shifted prediction over the measured bands (.svg or .png).",
)
@click.option("--json", "as_json", is_flag=True, help="Print one JSON document.")
@click.option("--out", type=click.Path(dir_okay=False), help="Write the text or JSON to this file (atomically).")
@click.option(
    "--dpi", type=click.IntRange(10, 2400), default=150, show_default=True, help="Resolution of a .png --plot."
)
@click.pass_context
def match(ctx, formula, bands_text, tolerance, weak, geometry, reporters, klass, plot, dpi, as_json, out):
    """Rank the isomers of FORMULA by how well they explain measured
    stretching bands: band count (allowing weak or coincident bands) and
    pattern fit after one common shift of the stretching constants, and,
    when the bands carry intensities, how well the relative intensities agree.

    \b
    Examples:
      isosieve match "[Mo(CO)3(PPh3)3]" --bands 1950,1860,1840
      isosieve match Ma3b3 --reporter a=CO --bands 2050,1975,1947 --json
      isosieve match Ma4b2 --reporter a=CO --bands 2030,1940,1915 --tolerance 15 --plot match.svg
      isosieve match "[Mo(CO)3(PPh3)3]" --bands "1950 (m), 1860 (vs), 1840 (s)"
    """
    from enumerator.render.bands import match_plot, match_text
    from enumerator.render.jsonout import dumps
    from enumerator.vibrations.matching import parse_measured
    from enumerator.workflow.bands import match_spectrum
    from enumerator.workflow.pipeline import Request

    if ":" in bands_text:
        raise InputError("match does not take species labels", "give plain wavenumbers, e.g. --bands 2045,1980,1932")
    obs = parse_measured(bands_text, "--bands")
    request = Request(
        formula=formula,
        geometry=geometry,
        reporters=parse_pairs(reporters, "--reporter", "a=CO"),
        rules=rules_of(ctx),
    )
    report = match_spectrum(
        request,
        [v for v, _ in obs],
        [x for _, x in obs],
        reporter_class=klass,
        tolerance=tolerance,
        weak=weak,
    )
    if plot:
        from enumerator.render.plots import format_for  # only a plot needs it (and matplotlib)

        write_atomic_bytes(plot, match_plot(report, format_for(plot), dpi))
    emit(dumps(report.to_dict()) if as_json else match_text(report), out)
