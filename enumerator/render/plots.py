"""Predicted stick spectra with Lorentzian broadening (matplotlib, Agg).

:func:`stick_spectrum` draws one band list; :func:`spectra_figure` draws one
panel per isomer.  Measured bands, when given, are drawn as dashed vertical
lines.  SVG output is deterministic (``svg.hashsalt`` fixed, no date, text
kept as text), so the same input gives the same bytes.  Wavenumbers run
from high to low, as chemists draw IR spectra.
"""

from __future__ import annotations

import io
from collections.abc import Sequence

import numpy as np

__all__ = ["stick_spectrum", "spectra_figure", "lorentzian_trace"]


def lorentzian_trace(bands, x: np.ndarray, width_cm1: float) -> np.ndarray:
    """Sum of Lorentzians (full width at half maximum ``width_cm1``), peak height = relative intensity."""
    hw = width_cm1 / 2.0
    y = np.zeros_like(x)
    for b in bands:
        y += b.intensity * hw**2 / ((x - b.wavenumber) ** 2 + hw**2)
    return y


def spectra_figure(
    panels: Sequence[tuple[str, Sequence]],
    *,
    measured: Sequence[float] | None = None,
    fmt: str = "svg",
    width_cm1: float = 10.0,
) -> bytes:
    """One panel per (title, bands); returns the SVG or PNG bytes."""
    if fmt not in ("svg", "png"):
        from enumerator.errors import InputError

        raise InputError(f"plot format '{fmt}' is not svg or png", "name the file .svg or .png")
    import matplotlib

    matplotlib.use("Agg", force=True)
    import matplotlib.pyplot as plt

    pos = [b.wavenumber for _, bands in panels for b in bands] + list(measured or [])
    lo, hi = (min(pos) - 60, max(pos) + 60) if pos else (1800.0, 2200.0)
    x = np.linspace(lo, hi, 2000)
    with matplotlib.rc_context({"svg.hashsalt": "isosieve", "svg.fonttype": "none", "font.size": 9}):
        fig, axes = plt.subplots(
            len(panels) or 1, 1, figsize=(6.0, 1.8 * max(1, len(panels))), squeeze=False, sharex=True
        )
        for ax, (title, bands) in zip(axes[:, 0], panels):
            ax.plot(x, lorentzian_trace(bands, x, width_cm1), color="black", lw=1.0)
            for b in bands:
                ax.vlines(b.wavenumber, 0, b.intensity, color="tab:blue", lw=1.5)
                if b.intensity > 0 and b.species:
                    ax.text(b.wavenumber, b.intensity + 0.03, b.species, ha="center", va="bottom", fontsize=7)
            for m in measured or []:
                ax.axvline(m, color="tab:red", ls="--", lw=0.8)
            ax.set_title(title, fontsize=9, loc="left")
            ax.set_ylim(0, 1.25)
            ax.set_ylabel("rel. intensity")
        axes[-1, 0].set_xlim(hi, lo)
        axes[-1, 0].set_xlabel("wavenumber / cm$^{-1}$")
        fig.tight_layout()
        buf = io.BytesIO()
        meta = {"Date": None} if fmt == "svg" else {"Software": None}
        fig.savefig(buf, format=fmt, metadata=meta, dpi=150)
        plt.close(fig)
    return buf.getvalue()


def stick_spectrum(bands, *, measured=None, fmt: str = "svg", width_cm1: float = 10.0, title: str = "") -> bytes:
    """Contract 6: one stick spectrum (bands with .wavenumber, .intensity, .species)."""
    return spectra_figure([(title, list(bands))], measured=measured, fmt=fmt, width_cm1=width_cm1)
