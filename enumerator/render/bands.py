"""Text and plots of the ``bands`` and ``match`` results.

:func:`bands_text` and :func:`match_text` write what the terminal shows;
:func:`bands_plot` and :func:`match_plot` draw stick spectra through
:func:`enumerator.render.plots.spectra_figure` (one panel per isomer and
class, or per candidate after its common shift).  The JSON documents are the
results' own ``to_dict()``; nothing here computes chemistry.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import TYPE_CHECKING

from enumerator.render.text import table
from enumerator.vibrations.matching import MatchResult
from enumerator.vibrations.pattern import BandPattern
from enumerator.vibrations.solver import Band
from enumerator.workflow.bands import BandsResult, ClassBands, IsomerBands, MatchReport

if TYPE_CHECKING:
    from enumerator.vibrations.fitting import FitResult

__all__ = ["bands_text", "match_text", "bands_plot", "match_plot", "bands_panels", "match_panels"]

_HEADER = ["cm-1", "± cm-1", "species", "deg", "rel. int.", "IR", "Raman"]


def _ir_cell(cb: ClassBands, b: Band) -> str:
    if cb.predicted_weak(b):
        return "IR (predicted weak: bond dipoles cancel)"
    if b.ir_active:
        return "IR"
    return "IR (zero with these constants)" if b.ir_allowed else "-"


def _sigma_cell(cb: ClassBands, b: Band) -> str:
    if b.sigma is not None:
        return f"{b.sigma:.0f}"
    return f"{cb.sigma[0]:.0f}*"


def _fit_lines(fr: FitResult) -> list[str]:
    lines = ["  fit:"]
    for name, v, s, how in fr.constants:
        lines.append(f"    {name} = {v:.3f}" + (f" ± {s:.3f}" if s is not None else "") + f" ({how})")
    for m, b, cc, r in fr.assignment:
        lines.append(f"    {m:.1f} -> {b}: calc {cc:.1f}, residual {r:+.1f}")
    lines.append(f"    RMS {fr.rms:.2f} cm-1, {fr.dof} degree(s) of freedom")
    lines += [f"    note: {n}" for n in fr.notes]
    return lines


def _class_lines(entry: IsomerBands, cb: ClassBands) -> list[str]:
    pat, c = cb.pattern, cb.reporter_class
    tag = ", ".join(x for x in (entry.descriptor, entry.point_group) if x)
    lines = [
        f"isomer {entry.label} ({tag}), {c}: {pat.species or 'species not given'}",
        "  constants (mdyn/Å): " + ", ".join(f"{k} = {v:.3f}" for k, v in pat.constants),
    ]
    lines += [f"    {s.name}: {s.describe(c)}" for s in pat.model.sets]
    rows = [
        [
            f"{b.wavenumber:.1f}",
            _sigma_cell(cb, b),
            b.species or "-",
            str(b.degeneracy),
            f"{b.intensity:.3f}",
            _ir_cell(cb, b),
            "R" if b.raman_allowed else "-",
        ]
        for b in pat.bands
    ]
    lines.append(table(_HEADER, rows, indent="  "))
    ir = cb.modes.ir_text() if cb.modes is not None else str(cb.ir_allowed)
    sigma, default = cb.sigma
    lines.append(
        f"  IR: {ir}; position uncertainty ± {sigma:.0f} cm-1"
        + (f" (* the {pat.reporter_class} default: the band model gives none)" if default else _model_tag(pat))
    )
    lines += [f"  note: {n}" for n in pat.notes]
    if cb.fit is not None:
        lines += _fit_lines(cb.fit)
    lines.append("")
    return lines


def _model_tag(pat: BandPattern) -> str:
    """Which model gave the sigma shown, and the ligands it widened it for."""
    name = "additive band model" if pat.model_name == "additive" else "band model"
    return f" ({name}" + (f"; widened for {', '.join(pat.fallbacks)}" if pat.fallbacks else "") + ")"


def _safety_lines(safety: Sequence[str]) -> list[str]:
    return ["Safety"] + [f"- {s}" for s in safety] if safety else []


def bands_text(result: BandsResult) -> str:
    """The terminal text of ``isosieve bands``.

    Parameters
    ----------
    result : BandsResult

    Returns
    -------
    str
        Lines ending in a newline.
    """
    lines = [f"{result.formula} on {result.geometry}", f"geometry: {result.geometry_reason}", ""]
    for entry in result.isomers:
        for cb in entry.patterns:
            lines += _class_lines(entry, cb)
    lines += [f"note: {n}" for n in result.notes]
    if result.notes:
        lines.append("")
    lines += _safety_lines(result.safety)
    return "\n".join(lines).rstrip() + "\n"


def _measured_text(res: MatchResult) -> str:
    out = []
    for v, x in zip(res.measured, res.measured_intensity or [None] * len(res.measured)):
        out.append(f"{v:g}" + (f" ({x:g})" if x is not None else ""))
    return ", ".join(out)


_DECISION = {
    "strong": "strong evidence",
    "favoured": "favoured, not decisive",
    "undecided": "the data cannot decide",
    "single": "one candidate",
}


def match_text(report: MatchReport) -> str:
    """The terminal text of ``isosieve match``.

    Parameters
    ----------
    report : MatchReport

    Returns
    -------
    str
        Lines ending in a newline.
    """
    res = report.match
    lines = [
        f"{report.formula} on {report.geometry}: {len(res.candidates)} candidate(s) for "
        f"{res.reporter_class} bands at {_measured_text(res)} cm-1 (measurement term ± {res.tolerance:g} cm-1; "
        f"window {res.window[0]:g}-{res.window[1]:g} cm-1)",
        "",
    ]
    if "widened" in res.window_source:
        lines[-1:-1] = [f"window: {res.window_source}"]
    if not res.reliable:
        lines += ["UNRELIABLE: " + res.notes[0], ""]
    lines.append(
        "ranking: "
        + ", ".join(f"{'/'.join(c.isomers)} {c.probability:.2f}" for c in res.candidates)
        + f" ({_DECISION[res.decision]})"
    )
    lines.append("")
    for c in res.candidates:
        lines += [c.explanation, ""]
    lines += [f"note: {n}" for n in res.notes]
    if report.safety:
        lines += [""] + _safety_lines(report.safety)
    return "\n".join(lines).rstrip() + "\n"


def bands_panels(result: BandsResult) -> list[tuple[str, tuple[Band, ...]]]:
    """(title, bands) per isomer and class, as :func:`bands_plot` draws them."""
    return [
        (
            f"{result.formula} isomer {e.label} ({', '.join(x for x in (e.point_group, e.descriptor) if x)}) "
            f"{cb.reporter_class}",
            cb.pattern.bands,
        )
        for e in result.isomers
        for cb in e.patterns
    ]


def match_panels(report: MatchReport) -> list[tuple[str, tuple[Band, ...]]]:
    """(title, shifted bands) per candidate, as :func:`match_plot` draws them."""
    return [
        (
            f"{report.formula} #{c.rank} isomer {'/'.join(c.isomers)} "
            f"({', '.join(x for x in (c.point_group, c.descriptor) if x)}), p = {c.probability:.2f}, "
            f"shift {c.shift_cm1:+.0f} cm-1",
            c.shifted,
        )
        for c in report.match.candidates
    ]


def bands_plot(result: BandsResult, fmt: str = "svg", width_cm1: float = 10.0, dpi: int = 150) -> bytes:
    """Stick spectra of every isomer and class, with the fitted bands as measured lines.

    Parameters
    ----------
    result : BandsResult
    fmt : str
        'svg' or 'png'.
    width_cm1 : float
        Lorentzian full width at half maximum, cm-1.

    Returns
    -------
    bytes
        The picture (SVG byte-deterministic).
    """
    measured = list(result.measured) if result.measured else None
    from enumerator.render.plots import picture, spectra_figure  # only a plot needs matplotlib's helpers

    return picture(spectra_figure(bands_panels(result), measured=measured, width_cm1=width_cm1), fmt, dpi)


def match_plot(report: MatchReport, fmt: str = "svg", dpi: int = 150) -> bytes:
    """Each candidate's shifted prediction over the measured bands.

    The Lorentzian width is 10 cm-1 (a typical solution IR band, common practice).

    Parameters
    ----------
    report : MatchReport
    fmt : str
        'svg' or 'png'.

    Returns
    -------
    bytes
        The picture (SVG byte-deterministic).
    """
    res = report.match
    from enumerator.render.plots import picture, spectra_figure  # only a plot needs matplotlib's helpers

    return picture(spectra_figure(match_panels(report), measured=list(res.measured), width_cm1=10.0), fmt, dpi)
