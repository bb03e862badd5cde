import numpy as np

from enumerator.render.plots import lorentzian_trace, stick_spectrum
from enumerator.vibrations.solver import Band

BANDS = (Band(2045.0, 0.4, "A1"), Band(1980.0, 1.0, "E"))


def test_svg_deterministic():
    a = stick_spectrum(BANDS, measured=[2040.0, 1975.0])
    b = stick_spectrum(BANDS, measured=[2040.0, 1975.0])
    assert a == b and a.startswith(b"<?xml")


def test_png():
    assert stick_spectrum(BANDS, fmt="png")[:8] == b"\x89PNG\r\n\x1a\n"  # PNG signature (PNG specification)


def test_lorentzian_peak_height():
    # a Lorentzian reaches its full height at its centre and half at +-FWHM/2 (definition of FWHM)
    x = np.array([1980.0, 1985.0])
    y = lorentzian_trace([Band(1980.0, 1.0, "E")], x, 10.0)
    assert abs(y[0] - 1.0) < 1e-12 and abs(y[1] - 0.5) < 1e-12
