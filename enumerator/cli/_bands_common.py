"""Shared helpers of the bands and match commands."""

from __future__ import annotations

from enumerator.errors import InputError


def load_set(formula, geometry, reporters, rules):
    from enumerator.isomers.enumeration import enumerate_isomers
    from enumerator.workflow.pipeline import Request, prepare

    req = Request(formula=formula, geometry=geometry, reporters=reporters, rules=rules)
    comp, geo, reason = prepare(req)
    return comp, enumerate_isomers(comp, geo), reason


def descriptors(comp, iso_set):
    try:
        from enumerator.analyses.descriptors import describe_isomer
    except ImportError:  # pragma: no cover
        return {}
    out = {}
    for i in iso_set.isomers:
        try:
            d = describe_isomer(i, comp)
            out[i.id] = " ".join(x for x in (d.prefix, d.text) if x)
        except Exception:  # noqa: BLE001 - a name is a courtesy here
            pass
    return out


def cautions(comp):
    try:
        from enumerator.analyses.safety import cautions as c
    except ImportError:  # pragma: no cover
        return ()
    return c(comp)


def write_plot(path, panels, measured, width):
    from pathlib import Path

    from enumerator.render.plots import spectra_figure

    fmt = Path(path).suffix.lower().lstrip(".")
    if fmt not in ("svg", "png"):
        raise InputError(f"--plot '{path}' is not .svg or .png", "name the file e.g. spectra.svg")
    data = spectra_figure(panels, measured=measured, fmt=fmt, width_cm1=width)
    from enumerator.cli.common import write_atomic_bytes

    write_atomic_bytes(path, data)
