"""Predicted stick spectra with Lorentzian broadening (matplotlib).

:func:`stick_spectrum` draws one band list; :func:`spectra_figure` draws one
panel per isomer.  Measured bands, when given, are drawn as dashed vertical
lines.  Wavenumbers run from high to low, as chemists draw IR spectra.

The figures are drawn on a bare :class:`matplotlib.figure.Figure`, not through
pyplot, so no global backend or figure list is touched.  SVG output is
deterministic (``svg.hashsalt`` fixed, no date, text kept as text), so the
same input gives the same bytes.

>>> from enumerator.vibrations.solver import Band
>>> stick_spectrum([Band(2045.0, 0.4, "A1"), Band(1980.0, 1.0, "E")])[:5]
b'<?xml'
"""

from __future__ import annotations

import io
from collections.abc import Sequence
from os import PathLike
from pathlib import Path

import numpy as np

from enumerator.errors import InputError
from enumerator.vibrations.solver import Band

__all__ = ["stick_spectrum", "spectra_figure", "lorentzian_trace", "format_for"]


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


def _panel(ax, title: str, bands: Sequence[Band], x: np.ndarray, measured: Sequence[float], width_cm1: float) -> None:
    ax.plot(x, lorentzian_trace(bands, x, width_cm1), color="black", lw=1.0)
    for b in bands:
        ax.vlines(b.wavenumber, 0, b.intensity, color="tab:blue", lw=1.5)
        if b.intensity > 0 and b.species:
            ax.text(b.wavenumber, b.intensity + 0.03, b.species, ha="center", va="bottom", fontsize=7)
    for m in measured:
        ax.axvline(m, color="tab:red", ls="--", lw=0.8)
    ax.set_title(title.replace("$", r"\$"), fontsize=9, loc="left")  # a '$' in a class name is text, not TeX
    ax.set_ylim(0, 1.25)
    ax.set_ylabel("rel. intensity")


def spectra_figure(
    panels: Sequence[tuple[str, Sequence[Band]]],
    *,
    measured: Sequence[float] | None = None,
    fmt: str = "svg",
    width_cm1: float = 10.0,
) -> bytes:
    """Stick spectra, one panel per (title, bands), on a shared wavenumber axis.

    Parameters
    ----------
    panels : Sequence[tuple[str, Sequence[Band]]]
        A title and the bands of each panel, top to bottom.
    measured : Sequence[float], optional
        Measured wavenumbers (cm-1), drawn as red dashed lines in every panel.
    fmt : str
        'svg' or 'png'.
    width_cm1 : float
        Lorentzian full width at half maximum, cm-1.

    Returns
    -------
    bytes
        The SVG or PNG file.

    Raises
    ------
    InputError
        For a format other than svg or png.
    """
    if fmt not in ("svg", "png"):
        raise InputError(f"plot format '{fmt}' is not svg or png", "name the file .svg or .png")
    import matplotlib
    from matplotlib.figure import Figure

    pos = [b.wavenumber for _, bands in panels for b in bands] + list(measured or [])
    lo, hi = (min(pos) - 60, max(pos) + 60) if pos else (1800.0, 2200.0)
    x = np.linspace(lo, hi, 2000)
    with matplotlib.rc_context({"svg.hashsalt": "isosieve", "svg.fonttype": "none", "font.size": 9}):
        fig = Figure(figsize=(6.0, 1.8 * max(1, len(panels))))
        axes = fig.subplots(len(panels) or 1, 1, squeeze=False, sharex=True)
        for ax, (title, bands) in zip(axes[:, 0], panels):
            _panel(ax, title, bands, x, measured or [], width_cm1)
        axes[-1, 0].set_xlim(hi, lo)
        axes[-1, 0].set_xlabel("wavenumber / cm$^{-1}$")
        fig.tight_layout()
        buf = io.BytesIO()
        meta = {"Date": None} if fmt == "svg" else {"Software": None}
        fig.savefig(buf, format=fmt, metadata=meta, dpi=150)
    return buf.getvalue()


def stick_spectrum(
    bands: Sequence[Band],
    *,
    measured: Sequence[float] | None = None,
    fmt: str = "svg",
    width_cm1: float = 10.0,
    title: str = "",
) -> bytes:
    """One stick spectrum: :func:`spectra_figure` with a single panel.

    Parameters
    ----------
    bands : Sequence[Band]
        Bands with ``wavenumber``, ``intensity`` and ``species``.
    measured : Sequence[float], optional
        Measured wavenumbers (cm-1), drawn as red dashed lines.
    fmt : str
        'svg' or 'png'.
    width_cm1 : float
        Lorentzian full width at half maximum, cm-1.
    title : str
        Panel title.

    Returns
    -------
    bytes
        The SVG or PNG file.
    """
    return spectra_figure([(title, list(bands))], measured=measured, fmt=fmt, width_cm1=width_cm1)
