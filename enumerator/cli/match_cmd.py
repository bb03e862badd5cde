"""``isosieve match``: rank candidate isomers against measured bands."""

from __future__ import annotations

import click

from enumerator.cli.common import emit, parse_pairs, rules_of, write_atomic_bytes
from enumerator.errors import InputError


def parse_window(text: str | None) -> tuple[float, float] | None:
    """--window LO:HI (cm-1) as a pair of numbers; the library checks the range."""
    if text is None:
        return None
    lo, sep, hi = text.partition(":")
    try:
        pair = (float(lo), float(hi))
    except ValueError:
        pair = None
    if not sep or pair is None:
        raise InputError(f"--window '{text}' is not LOW:HIGH in cm-1", "write e.g. --window 1500:2300")
    return pair


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
    type=click.FloatRange(min=0.1, max=50.0),
    default=5.0,
    show_default=True,
    help="Measurement term: one standard uncertainty of a measured band position, cm-1 (added to the model's).",
)
@click.option(
    "--weak",
    type=click.FloatRange(min=0.0, max=0.99),
    default=0.05,
    show_default=True,
    help="Weak scale: a predicted band of this relative intensity goes unseen with probability 1/e.",
)
@click.option(
    "--window",
    metavar="LOW:HIGH",
    help="Accept measured bands in this window (cm-1) instead of the class's usual one; widen it on purpose only.",
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
def match(ctx, formula, bands_text, tolerance, weak, window, geometry, reporters, klass, plot, dpi, as_json, out):
    """Rank the isomers of FORMULA by how probable the measured stretching
    bands are under each one's predicted pattern: positions within the band
    model's uncertainty after one bounded common shift, band counts (weak and
    coincident bands may go unseen) and, when the bands carry intensities,
    the intensity pattern.  Gives each isomer's probability (equal priors)
    and says when the data cannot decide.

    \b
    Examples:
      isosieve match "[Mo(CO)3(PMe3)3]" --bands "1945 (s), 1854 (vs)"
      isosieve match Ma3b3 --reporter a=CO --bands 2050,1975,1947 --json
      isosieve match "[Re(CO)3(bpy)Cl]" --bands "2022 (vs), 1917 (s), 1899 (s)" --plot match.svg
      isosieve match "[V(CO)6]-" --bands 1860 --window 1800:2125
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
        window=parse_window(window),
    )
    if plot:
        from enumerator.render.plots import format_for  # only a plot needs it (and matplotlib)

        write_atomic_bytes(plot, match_plot(report, format_for(plot), dpi))
    emit(dumps(report.to_dict()) if as_json else match_text(report), out)
