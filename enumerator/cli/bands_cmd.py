"""``isosieve bands``: predicted stretching bands; optional force-constant fit."""

from __future__ import annotations

import click

from enumerator.cli.common import emit, parse_pairs, rules_of


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
    "--plot", type=click.Path(dir_okay=False), help="Write stick spectra (one panel per isomer) to this .svg or .png."
)
@click.option(
    "--width",
    type=click.FloatRange(min=0.1),
    default=10.0,
    show_default=True,
    help="Lorentzian full width at half maximum for --plot, cm-1.",
)
@click.option("--json", "as_json", is_flag=True, help="Print one JSON document.")
@click.option("--out", type=click.Path(dir_okay=False), help="Write the text or JSON to this file (atomically).")
@click.pass_context
def bands(ctx, formula, geometry, reporters, klass, isomer_id, constants, fit, fixes, ck, plot, width, as_json, out):
    """Predict the stretching bands of every isomer of FORMULA from an
    energy-factored (Cotton-Kraihanzel) force field, with relative IR
    intensities and symmetry species; optionally fit the constants.

    \b
    Examples:
      isosieve bands "[Cr(CO)6]"
      isosieve bands Ma4b2 --reporter a=CO
      isosieve bands "[Mo(CO)4(PPh3)2]" --constants k=15.8,kc=0.3,kt=0.6
      isosieve bands Ma4b2 --reporter a=CO --isomer 1 --fit 2030,1940,1915,1890 --ck
      isosieve bands "[Cr(CO)5(13CO)]" --plot spectra.svg
    """
    from enumerator.cli import _bands_common as bc
    from enumerator.errors import InputError
    from enumerator.render.jsonout import dumps
    from enumerator.render.text import table
    from enumerator.vibrations import band_pattern, parse_constants, reporter_classes

    comp, iso_set, reason = bc.load_set(formula, geometry, parse_pairs(reporters, "--reporter", "a=CO"), rules_of(ctx))
    from enumerator.rules.ruleset import load_rules

    rules = load_rules(rules_of(ctx))
    params = parse_constants(constants) if constants else None
    chosen = (
        [iso_set.get(isomer_id)] if isomer_id else [i for i in iso_set.isomers if not (i.chiral and i.id.endswith("b"))]
    )
    classes = sorted({c for i in chosen for c in reporter_classes(i)})
    if klass:
        classes = [klass]
    if not classes:
        raise InputError(f"{comp.formula} has no stretch reporter", "mark one, e.g. --reporter a=CO")
    desc = bc.descriptors(comp, iso_set)
    doc = {"formula": comp.formula, "geometry": iso_set.geometry.symbol, "geometry_reason": reason, "isomers": []}
    lines = [f"{comp.formula} on {iso_set.geometry.symbol}", f"geometry: {reason}", ""]
    panels = []
    for iso in chosen:
        name = iso.id + (f"/{iso.enantiomer}" if iso.enantiomer and not isomer_id else "")
        entry = {"id": iso.id, "point_group": iso.point_group, "descriptor": desc.get(iso.id), "patterns": []}
        for c in classes:
            use = params
            if params and not isomer_id:
                # set names k1, k2, ... differ between isomers: apply those this isomer has
                from enumerator.vibrations.model import build_model

                names = set(build_model(iso, c, rules).parameter_names) | {"k", "kc", "kt"}
                use = {n: v for n, v in params.items() if n in names or not (n[:1] == "k" and n[1:].isdigit())}
            pat = band_pattern(iso, c, use, rules=rules)
            pj = pat.to_dict()
            lines.append(
                f"isomer {name} ({', '.join(x for x in (desc.get(iso.id), iso.point_group) if x)}), {c}: {pat.species or 'species not given'}"
            )
            lines.append("  constants (mdyn/Å): " + ", ".join(f"{k} = {v:.3f}" for k, v in pat.constants))
            for s in pat.model.sets:
                lines.append(f"    {s.name}: {s.describe(c)}")
            rows = [
                [
                    f"{b.wavenumber:.1f}",
                    b.species or "-",
                    str(b.degeneracy),
                    f"{b.intensity:.3f}",
                    "IR" if b.ir_active else ("IR (weak: bond dipoles cancel)" if b.dipole_forbidden else "-"),
                    "R" if b.raman_allowed else "-",
                ]
                for b in pat.bands
            ]
            lines.append(table(["cm-1", "species", "deg", "rel. int.", "IR", "Raman"], rows, indent="  "))
            for n in pat.notes:
                lines.append(f"  note: {n}")
            panels.append((f"isomer {name} ({iso.point_group}) {c}", pat.bands))
            if fit:
                from enumerator.vibrations.fitting import fit_constants, parse_bands

                if not isomer_id and len(chosen) > 1:
                    raise InputError(
                        "--fit needs one isomer", f"add --isomer, one of {', '.join(i.id for i in chosen)}"
                    )
                fixed = {k: float(v) for k, v in parse_pairs(fixes, "--fix", "kt=0.6")}
                fr = fit_constants(iso, c, parse_bands(fit, "--fit"), fixed=fixed, tie_ck=ck, start=params, rules=rules)
                pj["fit"] = fr.to_dict()
                lines.append("  fit:")
                for n_, v, s, how in fr.constants:
                    lines.append(f"    {n_} = {v:.3f}" + (f" ± {s:.3f}" if s is not None else "") + f" ({how})")
                for m, b, cc, r in fr.assignment:
                    lines.append(f"    {m:.1f} -> {b}: calc {cc:.1f}, residual {r:+.1f}")
                lines.append(f"    RMS {fr.rms:.2f} cm-1, {fr.dof} degree(s) of freedom")
                for n in fr.notes:
                    lines.append(f"    note: {n}")
            entry["patterns"].append(pj)
            lines.append("")
        doc["isomers"].append(entry)
    safety = list(bc.cautions(comp))
    doc["safety"] = safety
    if safety:
        lines.append("Safety")
        lines += [f"- {s}" for s in safety]
    if plot:
        meas = None
        if fit:
            from enumerator.vibrations.fitting import parse_bands

            meas = [o.wavenumber for o in parse_bands(fit, "--fit")]
        bc.write_plot(plot, panels, meas, width)
    emit(dumps(doc) if as_json else "\n".join(lines).rstrip() + "\n", out)
