"""``isosieve match``: rank candidate isomers against measured bands."""

from __future__ import annotations

import click

from enumerator.cli.common import emit, parse_pairs, rules_of


@click.command("match")
@click.argument("formula")
@click.option(
    "--bands",
    "bands_text",
    required=True,
    metavar="CM-1,...",
    help='Measured bands, optionally with intensities as written in a paper: 2045,1980,1932 or "2045 (s), 1980 (vs), 1932 (m)" (vs s m w vw sh br, or a number).',
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
@click.pass_context
def match(ctx, formula, bands_text, tolerance, weak, geometry, reporters, klass, plot, as_json, out):
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
    from enumerator.cli import _bands_common as bc
    from enumerator.errors import InputError
    from enumerator.render.jsonout import dumps
    from enumerator.rules.ruleset import load_rules
    from enumerator.vibrations.matching import match_bands, parse_measured

    if ":" in bands_text:
        raise InputError("match does not take species labels", "give plain wavenumbers, e.g. --bands 2045,1980,1932")
    obs = parse_measured(bands_text, "--bands")
    comp, iso_set, reason = bc.load_set(formula, geometry, parse_pairs(reporters, "--reporter", "a=CO"), rules_of(ctx))
    rules = load_rules(rules_of(ctx))
    desc = bc.descriptors(comp, iso_set)
    res = match_bands(
        iso_set,
        klass,
        [v for v, _ in obs],
        tolerance=tolerance,
        weak=weak,
        rules=rules,
        descriptors=desc,
        intensities=[x for _, x in obs],
    )
    safety = list(bc.cautions(comp))
    if plot:
        from enumerator.vibrations.pattern import band_pattern

        panels = []
        for c in res.candidates:
            iso = iso_set.get(c.isomers[0])
            pat = band_pattern(iso, res.reporter_class, rules=rules)
            vals = dict(pat.constants)
            for s in pat.model.sets:
                vals[s.name] += c.shift
            shifted = band_pattern(iso, res.reporter_class, vals, rules=rules).bands
            panels.append(
                (f"#{c.rank} isomer {'/'.join(c.isomers)} ({c.point_group}), shift {c.shift:+.2f} mdyn/Å", shifted)
            )
        bc.write_plot(plot, panels, list(res.measured), tolerance)
    if as_json:
        doc = {"formula": comp.formula, "geometry": iso_set.geometry.symbol, "geometry_reason": reason}
        doc.update(res.to_dict())
        doc["safety"] = safety
        emit(dumps(doc), out)
        return
    lines = [
        f"{comp.formula} on {iso_set.geometry.symbol}: {len(res.candidates)} candidate(s) for "
        f"{res.reporter_class} bands at {_bands_text(res)} cm-1 (tolerance {tolerance:g} cm-1)",
        "",
    ]
    for c in res.candidates:
        lines.append(c.explanation)
        lines.append("")
    lines += [f"note: {n}" for n in res.notes]
    if safety:
        lines += ["", "Safety"] + [f"- {s}" for s in safety]
    emit("\n".join(lines).rstrip() + "\n", out)


def _bands_text(res) -> str:
    out = []
    for v, x in zip(res.measured, res.measured_intensity or [None] * len(res.measured)):
        out.append(f"{v:g}" + (f" ({x:g})" if x is not None else ""))
    return ", ".join(out)
