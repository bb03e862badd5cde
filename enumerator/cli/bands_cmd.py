"""``isosieve bands``: predicted stretching bands; optional force-constant fit."""

from __future__ import annotations

import math

import click

from enumerator.cli.common import emit, parse_pairs, rules_of, write_atomic_bytes
from enumerator.errors import InputError


@click.command("bands")
@click.argument("formula")
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
    "--class", "klass", metavar="CLASS", help="Reporter class to predict (CO, CN, NO); default: every class present."
)
@click.option("--isomer", "isomer_id", metavar="ID", help="Only this isomer (e.g. 2 or 3a).")
@click.option(
    "--constants",
    metavar="NAME=VALUE,...",
    help="Override constants in mdyn/Å: k (every stretching constant), k1, k2, ..., kc, kt.",
)
@click.option(
    "--fit",
    "fit",
    metavar="CM-1,...",
    help="Fit the constants to these measured bands (optionally 1980:B1 to assign one); needs --isomer if several.",
)
@click.option(
    "--fix", "fixes", multiple=True, metavar="NAME=VALUE", help="Hold a constant during --fit, e.g. kt=0.6; repeatable."
)
@click.option("--ck", is_flag=True, help="During --fit tie kt = 2 kc (the Cotton-Kraihanzel approximation).")
@click.option(
    "--window",
    metavar="LOW:HIGH",
    help="Accept --fit bands in this window (cm-1) instead of the class's usual one; widen it on purpose only.",
)
@click.option(
    "--plot", type=click.Path(dir_okay=False), help="Write stick spectra (one panel per isomer) to this .svg or .png."
)
@click.option(
    "--width",
    type=click.FloatRange(min=0.1, max=500.0),
    default=10.0,
    show_default=True,
    help="Lorentzian full width at half maximum for --plot, cm-1.",
)
@click.option("--json", "as_json", is_flag=True, help="Print one JSON document.")
@click.option("--out", type=click.Path(dir_okay=False), help="Write the text or JSON to this file (atomically).")
@click.option(
    "--dpi", type=click.IntRange(10, 2400), default=150, show_default=True, help="Resolution of a .png --plot."
)
@click.pass_context
def bands(
    ctx,
    formula,
    geometry,
    reporters,
    klass,
    isomer_id,
    constants,
    fit,
    fixes,
    ck,
    window,
    plot,
    width,
    dpi,
    as_json,
    out,
):
    """Predict the stretching bands of every isomer of FORMULA from an
    energy-factored (Cotton-Kraihanzel) force field, with relative IR
    intensities (bond-dipole model, ideal angles), symmetry species and
    position uncertainties; optionally fit the constants.

    \b
    Examples:
      isosieve bands "[Cr(CO)6]"
      isosieve bands Ma4b2 --reporter a=CO
      isosieve bands "[Mo(CO)4(PPh3)2]" --constants k=15.8,kc=0.3,kt=0.6
      isosieve bands Ma4b2 --reporter a=CO --isomer 1 --fit 2030,1940,1915,1890 --ck
      isosieve bands "[Cr(CO)5(13CO)]" --plot spectra.svg
    """
    from enumerator.cli.match_cmd import parse_window
    from enumerator.render.bands import bands_plot, bands_text
    from enumerator.render.jsonout import dumps
    from enumerator.vibrations.pattern import parse_constants
    from enumerator.workflow.bands import predict_spectra
    from enumerator.workflow.pipeline import Request

    request = Request(
        formula=formula,
        geometry=geometry,
        reporters=parse_pairs(reporters, "--reporter", "a=CO"),
        rules=rules_of(ctx),
    )
    from enumerator.cli.progress import bar

    with bar("bands --fit" if fit else "bands") as progress:
        result = predict_spectra(
            request,
            reporter_class=klass,
            isomer_id=isomer_id,
            constants=parse_constants(constants) if constants else None,
            measured=_fit_bands(fit),
            fixed=_fixed(fixes) if fit else None,
            tie_ck=ck,
            window=parse_window(window),
            progress=progress,
        )
    if plot:
        from enumerator.render.plots import format_for  # only a plot needs it (and matplotlib)

        write_atomic_bytes(plot, bands_plot(result, format_for(plot), width, dpi))
    emit(dumps(result.to_dict()) if as_json else bands_text(result), out)


def _fixed(fixes: tuple[str, ...]) -> dict[str, float]:
    """--fix NAME=VALUE options as constants (mdyn/Å)."""
    out = {}
    for name, value in parse_pairs(fixes, "--fix", "kt=0.6"):
        try:
            number = float(value)
        except ValueError:
            number = math.nan
        if not math.isfinite(number):
            raise InputError(f"--fix '{name}={value}' is not NAME=NUMBER", "write e.g. --fix kt=0.6 (mdyn/Å)")
        out[name] = number
    return out


def _fit_bands(fit: str | None):
    """The ``--fit`` bands read (None without the option; the fitting module is imported only then)."""
    if not fit:
        return None
    from enumerator.vibrations.fitting import parse_bands

    return parse_bands(fit, "--fit")
