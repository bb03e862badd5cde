"""Band model: force field, GF solver, band patterns, fitting and matching of measured bands.

The modules follow the data: :mod:`~enumerator.vibrations.model` builds the
energy-factored (Cotton–Kraihanzel) force field of one reporter class on one
isomer; :mod:`~enumerator.vibrations.solver` solves it by Wilson's GF method
per symmetry block, with bond-dipole intensities;
:mod:`~enumerator.vibrations.pattern` turns that into a band pattern with
notes; :mod:`~enumerator.vibrations.fitting` fits the constants to measured
bands (Levenberg–Marquardt); :mod:`~enumerator.vibrations.matching` ranks the
isomers of a formula against a measured spectrum.  The default constants are
read by :mod:`enumerator.rules.forcefields`.

>>> from enumerator.vibrations import predict_bands
>>> from enumerator.workflow.pipeline import analyse
>>> iso = analyse("[Cr(CO)6]").isomers[0]
>>> [(b.species, round(b.wavenumber)) for b in predict_bands(iso, "CO") if b.ir_active]
[('T1u', 1978)]
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from enumerator.lazy import lazy_names

if TYPE_CHECKING:
    from enumerator.vibrations.fitting import FitResult, Observation, fit_constants, parse_bands
    from enumerator.vibrations.matching import Candidate, MatchResult, match_bands, parse_measured
    from enumerator.vibrations.model import Model, Oscillator, StretchSet, build_model, reporter_classes
    from enumerator.vibrations.pattern import BandPattern, band_pattern, parse_constants, predict_bands
    from enumerator.vibrations.solver import WAVENUMBER_FACTOR, Band, solve

#: public name -> the submodule that defines it; each submodule is imported on first use, so that a
#: command needing one part of the band model (the isomer table's patterns) skips the others (the fit).
_LAZY = {
    "Band": "solver",
    "BandPattern": "pattern",
    "Candidate": "matching",
    "FitResult": "fitting",
    "MatchResult": "matching",
    "Model": "model",
    "Observation": "fitting",
    "Oscillator": "model",
    "StretchSet": "model",
    "WAVENUMBER_FACTOR": "solver",
    "band_pattern": "pattern",
    "build_model": "model",
    "fit_constants": "fitting",
    "match_bands": "matching",
    "parse_bands": "fitting",
    "parse_constants": "pattern",
    "parse_measured": "matching",
    "predict_bands": "pattern",
    "reporter_classes": "model",
    "solve": "solver",
}

__all__ = [
    "WAVENUMBER_FACTOR",
    "Band",
    "BandPattern",
    "Candidate",
    "FitResult",
    "MatchResult",
    "Model",
    "Observation",
    "Oscillator",
    "StretchSet",
    "band_pattern",
    "build_model",
    "fit_constants",
    "match_bands",
    "parse_bands",
    "parse_constants",
    "parse_measured",
    "predict_bands",
    "reporter_classes",
    "solve",
]


__getattr__, __dir__ = lazy_names(__name__, _LAZY, globals())
