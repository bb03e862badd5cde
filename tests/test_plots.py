"""Plots: Figures without pyplot, drawing into a given ax, deterministic SVG, PNG at a chosen resolution."""

import struct

import numpy as np
import pytest

from enumerator.errors import InputError
from enumerator.render.plots import lorentzian_trace, picture, spectra_figure, stick_spectrum
from enumerator.vibrations.solver import Band

BANDS = (Band(2045.0, 0.4, "A1"), Band(1980.0, 1.0, "E"))


def test_returns_a_figure_with_axes_units_and_legend():
    fig = stick_spectrum(BANDS, measured=[2040.0], title="[Cr(CO)5(PPh3)] OC-6")
    ax = fig.axes[0]
    assert ax.get_xlabel() == "wavenumber / cm$^{-1}$" and ax.get_ylabel() == "rel. IR intensity"
    labels = [t.get_text() for t in ax.get_legend().get_texts()]
    assert "predicted band" in labels and "measured" in labels
    assert ax.get_title(loc="left") == "[Cr(CO)5(PPh3)] OC-6"
    assert ax.get_xlim()[0] > ax.get_xlim()[1]  # wavenumbers fall to the right, as IR spectra are drawn (common)


def test_draws_into_a_given_ax_and_leaves_the_backend_alone():
    import matplotlib

    backend = matplotlib.get_backend()
    from matplotlib.figure import Figure

    fig = Figure()
    ax1, ax2 = fig.subplots(1, 2)
    out = stick_spectrum(BANDS, ax=ax2)
    assert out is fig and ax2.lines and not ax1.lines
    assert spectra_figure([("a", BANDS), ("b", BANDS[:1])], axes=[ax1, ax2]) is fig
    assert matplotlib.get_backend() == backend


def test_dollar_signs_in_titles_are_text():
    fig = stick_spectrum(BANDS, title="$\\alpha$ cost $5")
    picture(fig)  # the math parser would raise on an unbalanced '$'
    assert fig.axes[0].get_title(loc="left") == "\\$\\alpha\\$ cost \\$5"


def test_svg_deterministic():
    a = picture(stick_spectrum(BANDS, measured=[2040.0, 1975.0]))
    b = picture(stick_spectrum(BANDS, measured=[2040.0, 1975.0]))
    assert a == b and a.startswith(b"<?xml")


def test_png_and_its_resolution():
    lo, hi = picture(stick_spectrum(BANDS), "png", dpi=72), picture(stick_spectrum(BANDS), "png", dpi=300)
    assert lo[:8] == b"\x89PNG\r\n\x1a\n"  # PNG signature (PNG specification, ISO/IEC 15948)
    # the IHDR chunk holds the width as a 4-byte big-endian integer at offset 16 (PNG specification)
    assert struct.unpack(">I", hi[16:20])[0] == pytest.approx(struct.unpack(">I", lo[16:20])[0] * 300 / 72, rel=0.02)
    with pytest.raises(InputError):
        picture(stick_spectrum(BANDS), "png", dpi=5)
    with pytest.raises(InputError):
        picture(stick_spectrum(BANDS), "pdf")


def test_lorentzian_peak_height():
    # a Lorentzian reaches its full height at its centre and half at +-FWHM/2 (definition of FWHM)
    x = np.array([1980.0, 1985.0])
    y = lorentzian_trace([Band(1980.0, 1.0, "E")], x, 10.0)
    assert abs(y[0] - 1.0) < 1e-12 and abs(y[1] - 0.5) < 1e-12
