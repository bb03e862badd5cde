"""Predicted stick spectra with Lorentzian broadening (matplotlib).

:func:`stick_spectrum` draws one band list; :func:`spectra_figure` draws one
panel per isomer.  Measured bands, when given, are drawn as dashed vertical
lines.  Wavenumbers run from high to low, as chemists draw IR spectra.

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
from enumerator.render.drawing import plain_text
from enumerator.vibrations.solver import Band

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

__all__ = ["stick_spectrum", "spectra_figure", "picture", "lorentzian_trace", "format_for"]


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


def _panel(
    ax: Axes, title: str, bands: Sequence[Band], x: np.ndarray, measured: Sequence[float], width_cm1: float
) -> None:
    ax.plot(
        x,
        lorentzian_trace(bands, x, width_cm1),
        color="black",
        lw=1.0,
        label=f"envelope (FWHM {width_cm1:g} cm$^{{-1}}$)",
    )
    if bands:
        pos, height = [b.wavenumber for b in bands], [b.intensity for b in bands]
        ax.vlines(pos, 0, height, color="tab:blue", lw=1.5, label="predicted band")
    for b in bands:
        if b.intensity > 0 and b.species:
            ax.text(b.wavenumber, b.intensity + 0.03, plain_text(b.species), ha="center", va="bottom", fontsize=7)
    for k, m in enumerate(measured):
        ax.axvline(m, color="tab:red", ls="--", lw=0.8, label="measured" if k == 0 else None)
    ax.set_title(plain_text(title), fontsize=9, loc="left")
    ax.set_ylim(0, 1.25)
    ax.set_ylabel("rel. IR intensity")
    ax.legend(fontsize=6.5, loc="upper left", frameon=False)


def _range(panels: Sequence[tuple[str, Sequence[Band]]], measured: Sequence[float]) -> tuple[float, float]:
    pos = [b.wavenumber for _, bands in panels for b in bands] + list(measured)
    return (min(pos) - 60, max(pos) + 60) if pos else (1800.0, 2200.0)


def spectra_figure(
    panels: Sequence[tuple[str, Sequence[Band]]],
    *,
    measured: Sequence[float] | None = None,
    width_cm1: float = 10.0,
    axes: Sequence[Axes] | None = None,
) -> Figure:
    """Stick spectra, one panel per (title, bands), on a shared wavenumber axis (high to low, cm-1).

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
    from matplotlib.figure import Figure

    lo, hi = _range(panels, measured or [])
    x = np.linspace(lo, hi, 2000)
    if axes is None:
        fig = Figure(figsize=(6.0, 1.9 * max(1, len(panels))), layout="tight")
        grid = fig.subplots(len(panels) or 1, 1, squeeze=False, sharex=True)
        axes = list(grid[:, 0])
    else:
        fig = axes[0].get_figure()  # type: ignore[assignment]
    for ax, (title, bands) in zip(axes, panels):
        _panel(ax, title, bands, x, measured or [], width_cm1)
    for ax in axes:
        ax.set_xlim(hi, lo)
    axes[-1].set_xlabel("wavenumber / cm$^{-1}$")
    return fig


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
