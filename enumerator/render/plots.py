"""Predicted stick spectra with Lorentzian broadening.

:func:`spectra_scene` lays the spectra out once as a
:class:`~enumerator.render.scene.Scene` (one panel per isomer: envelope,
sticks labelled with their species, measured bands as dashed vertical lines,
ticks as matplotlib's ``MaxNLocator`` picks them, axis labels with units, a
legend); the report draws it as inline SVG, and :func:`stick_spectrum` (one
band list) and :func:`spectra_figure` (one panel per isomer) draw it with
matplotlib.  Wavenumbers run from high to low, as chemists draw IR spectra.

Both return a bare :class:`matplotlib.figure.Figure` (not through pyplot, so no
global backend or figure list is touched; a notebook shows it inline) and draw
into given axes when asked (``ax=`` / ``axes=``); :func:`picture` writes a figure
as SVG (deterministic: ``svg.hashsalt`` fixed, no date, text kept as text) or
PNG at a chosen resolution.  Each panel has axes with units, a legend
(predicted bands, envelope, measured bands) and its title.

>>> from enumerator.vibrations.solver import Band
>>> fig = stick_spectrum([Band(2045.0, 0.4, "A1"), Band(1980.0, 1.0, "E")], title="[Cr(CO)5(PPh3)] C4v")
>>> fig.axes[0].get_xlabel(), picture(fig)[:5]
('wavenumber / cm$^{-1}$', b'<?xml')
"""

from __future__ import annotations

import io
from collections.abc import Sequence
from os import PathLike
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np

from enumerator.errors import InputError
from enumerator.render.scene import Item, Key, Label, Line, Panel, Scene, nice_ticks, runs, scene_figure
from enumerator.vibrations.solver import Band

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

__all__ = ["spectra_scene", "stick_spectrum", "spectra_figure", "picture", "lorentzian_trace", "format_for"]


def format_for(path: str | PathLike[str], option: str = "--plot") -> str:
    """The picture format a file name asks for.

    Parameters
    ----------
    path : str or os.PathLike
        The file to write; its suffix decides ('.svg' or '.png', any case).
    option : str
        The option that named the file, for the error.

    Returns
    -------
    str
        'svg' or 'png'.

    Raises
    ------
    InputError
        For any other suffix.

    >>> format_for("spectra.SVG")
    'svg'
    """
    fmt = Path(path).suffix.lower().lstrip(".")
    if fmt not in ("svg", "png"):
        raise InputError(f"{option} '{path}' is not .svg or .png", "name the file e.g. spectra.svg")
    return fmt


def lorentzian_trace(bands: Sequence[Band], x: np.ndarray, width_cm1: float) -> np.ndarray:
    """Sum of Lorentzians, one per band, peak height = relative intensity.

    Parameters
    ----------
    bands : Sequence[Band]
        Bands with ``wavenumber`` (cm-1) and relative ``intensity``.
    x : numpy.ndarray
        Wavenumbers (cm-1) to evaluate at.
    width_cm1 : float
        Full width at half maximum, cm-1.

    Returns
    -------
    numpy.ndarray
        The trace at ``x``.
    """
    hw = width_cm1 / 2.0
    y = np.zeros_like(x)
    for b in bands:
        y += b.intensity * hw**2 / ((x - b.wavenumber) ** 2 + hw**2)
    return y


#: Picture width and the height of each panel's slot (points): 6 x 1.9 inches.
_WIDTH, _SLOT = 6.0 * 72, 1.9 * 72
#: Margins (points) around each panel's axes: left (tick labels and the y label), right, top (the title),
#: bottom of an inner panel, bottom of the last one (tick labels and the x label).
_LEFT, _RIGHT, _TOP, _INNER, _LAST = 50.0, 16.0, 16.0, 8.0, 34.0
_BLUE, _RED = "#1f77b4", "#d62728"  # matplotlib's tab:blue and tab:red
_WAVENUMBER = (("text", "wavenumber / cm"), ("sup", "-1"))


def _panel_items(bands: Sequence[Band], x: np.ndarray, measured: Sequence[float], width_cm1: float) -> list[Item]:
    trace = lorentzian_trace(bands, x, width_cm1)
    items: list[Item] = [Line(tuple(zip(x.tolist(), trace.tolist())), "#000000", 1.0)]
    items += [Line(((b.wavenumber, 0.0), (b.wavenumber, b.intensity)), _BLUE, 1.5) for b in bands]
    items += [
        Label(b.wavenumber, b.intensity + 0.03, runs(b.species), 7.0, valign="bottom")
        for b in bands
        if b.intensity > 0 and b.species
    ]
    items += [Line(((m, 0.0), (m, 1.25)), _RED, 0.8, (3.7, 1.6)) for m in measured]
    return items


def _legend(measured: Sequence[float], width_cm1: float) -> tuple[Key, ...]:
    keys = [
        Key((("text", f"envelope (FWHM {width_cm1:g} cm"), ("sup", "-1"), ("text", ")")), "line", "#000000", 1.0),
        Key(runs("predicted band"), "line", _BLUE, 1.5),
    ]
    if measured:
        keys.append(Key(runs("measured"), "dashed", _RED, 0.8))
    return tuple(keys)


def _range(panels: Sequence[tuple[str, Sequence[Band]]], measured: Sequence[float]) -> tuple[float, float]:
    pos = [b.wavenumber for _, bands in panels for b in bands] + list(measured)
    return (min(pos) - 60, max(pos) + 60) if pos else (1800.0, 2200.0)


def spectra_scene(
    panels: Sequence[tuple[str, Sequence[Band]]], *, measured: Sequence[float] | None = None, width_cm1: float = 10.0
) -> Scene:
    """Stick spectra as plain geometry: one panel per (title, bands), one wavenumber axis (high to low, cm-1).

    Each panel: the Lorentzian envelope, the predicted bands as sticks labelled with their species, the
    measured bands as red dashed lines, axes with ticks, units and a legend; the wavenumber labels under the
    last panel only.

    Parameters
    ----------
    panels : Sequence[tuple[str, Sequence[Band]]]
        A title and the bands of each panel, top to bottom.
    measured : Sequence[float], optional
        Measured wavenumbers (cm-1), drawn in every panel.
    width_cm1 : float
        Lorentzian full width at half maximum, cm-1.

    Returns
    -------
    Scene
    """
    measured = list(measured or [])
    lo, hi = _range(panels, measured)
    x = np.linspace(lo, hi, 2000)
    n = max(1, len(panels))
    height = _SLOT * n
    xticks = nice_ticks(lo, hi, 9)
    yticks = nice_ticks(0.0, 1.25, 3)
    out = []
    for k, (title, bands) in enumerate(panels or [("", [])]):
        last = k == n - 1
        bottom = (n - 1 - k) * _SLOT + (_LAST if last else _INNER)
        rect = (
            _LEFT / _WIDTH,
            bottom / height,
            1 - (_LEFT + _RIGHT) / _WIDTH,
            (_SLOT - _TOP - (_LAST if last else _INNER)) / height,
        )
        out.append(
            Panel(
                rect,
                (hi, lo),
                (0.0, 1.25),
                tuple(_panel_items(bands, x, measured, width_cm1)),
                frame=True,
                xticks=xticks if last else tuple((v, "") for v, _ in xticks),
                yticks=yticks,
                xlabel=_WAVENUMBER if last else (),
                ylabel=runs("rel. IR intensity"),
                title=runs(title) if title else (),
                legend=_legend(measured, width_cm1),
            )
        )
    titles = "; ".join(t for t, _ in panels if t)
    return Scene(_WIDTH, height, tuple(out), description="predicted stick spectrum" + (f": {titles}" if titles else ""))


def spectra_figure(
    panels: Sequence[tuple[str, Sequence[Band]]],
    *,
    measured: Sequence[float] | None = None,
    width_cm1: float = 10.0,
    axes: Sequence[Axes] | None = None,
) -> Figure:
    """Stick spectra, one panel per (title, bands), on a shared wavenumber axis (high to low, cm-1).

    The drawing of :func:`spectra_scene`, drawn with matplotlib.

    Parameters
    ----------
    panels : Sequence[tuple[str, Sequence[Band]]]
        A title and the bands of each panel, top to bottom.
    measured : Sequence[float], optional
        Measured wavenumbers (cm-1), drawn as red dashed lines in every panel.
    width_cm1 : float
        Lorentzian full width at half maximum, cm-1.
    axes : sequence of matplotlib Axes, optional
        Draw into these (one per panel) instead of a new figure.

    Returns
    -------
    matplotlib.figure.Figure
        A bare Figure (no pyplot): show it in a notebook, or write it with :func:`picture`.
    """
    return scene_figure(spectra_scene(panels, measured=measured, width_cm1=width_cm1), axes)


def stick_spectrum(
    bands: Sequence[Band],
    *,
    measured: Sequence[float] | None = None,
    width_cm1: float = 10.0,
    title: str = "",
    ax: Axes | None = None,
) -> Figure:
    """One stick spectrum: :func:`spectra_figure` with a single panel, drawn into ``ax`` when given.

    Parameters
    ----------
    bands : Sequence[Band]
        Bands with ``wavenumber``, ``intensity`` and ``species``.
    measured : Sequence[float], optional
        Measured wavenumbers (cm-1), drawn as red dashed lines.
    width_cm1 : float
        Lorentzian full width at half maximum, cm-1.
    title : str
        Panel title (the formula and the isomer's descriptor, as the report and the CLI write it).
    ax : matplotlib Axes, optional
        Draw here instead of a new figure.

    Returns
    -------
    matplotlib.figure.Figure
    """
    return spectra_figure(
        [(title, list(bands))], measured=measured, width_cm1=width_cm1, axes=None if ax is None else [ax]
    )


def picture(fig: Figure, fmt: str = "svg", dpi: int = 150) -> bytes:
    """A figure as an SVG or PNG file (SVG byte-deterministic: fixed ids, no date, text kept as text).

    Parameters
    ----------
    fig : matplotlib.figure.Figure
    fmt : str
        'svg' or 'png'.
    dpi : int
        Resolution of a PNG (dots per inch).

    Returns
    -------
    bytes

    Raises
    ------
    InputError
        For a format other than svg or png, or a resolution below 10 or above 2400 dpi.
    """
    if fmt not in ("svg", "png"):
        raise InputError(f"plot format '{fmt}' is not svg or png", "name the file .svg or .png")
    if not 10 <= dpi <= 2400:
        raise InputError(f"--dpi {dpi} is outside 10-2400", "give e.g. --dpi 300")
    import matplotlib

    buf = io.BytesIO()
    with matplotlib.rc_context({"svg.hashsalt": "isosieve", "svg.fonttype": "none"}):
        meta = {"Date": None} if fmt == "svg" else {"Software": None}
        fig.savefig(buf, format=fmt, metadata=meta, dpi=dpi)
    return buf.getvalue()
