"""Energy-factored force field checked against closed forms from the literature."""

import math

import pytest

from enumerator.analyses.stretch import stretch_modes
from enumerator.isomers.enumeration import enumerate_isomers
from enumerator.parse.abstract import parse_abstract
from enumerator.rules.ruleset import load_rules
from enumerator.vibrations.fitting import fit_constants
from enumerator.vibrations.pattern import band_pattern, predict_bands
from enumerator.vibrations.solver import WAVENUMBER_FACTOR
from enumerator.workflow.pipeline import apply_settings

# 12C16O: masses of the most common isotopes (RDKit periodic table; IUPAC values 12 and 15.9949)
MU = 1 / 12.0 + 1 / 15.99491462


def isomers(formula, geometry, letters="a"):
    comp = apply_settings(parse_abstract(formula), reporters=[(x, "CO") for x in letters])
    return enumerate_isomers(comp, load_rules().geometry(geometry)).isomers


def nu(lam):
    return WAVENUMBER_FACTOR * math.sqrt(lam)


def test_conversion_factor():
    # 1302.79 cm-1 per sqrt(mdyn/Å/u): standard factor (Wilson, Decius & Cross 1955; from memory)
    assert pytest.approx(1302.79, abs=0.01) == WAVENUMBER_FACTOR


def test_hexacarbonyl_closed_forms():
    # Cotton & Kraihanzel, J. Am. Chem. Soc. 84 (1962) 4432; Cotton, Chemical Applications of Group Theory:
    # A1g = mu(k + 4kc + kt), Eg = mu(k - 2kc + kt), T1u = mu(k - kt)
    k, kc, kt = 16.4, 0.3, 0.6
    (iso,) = isomers("Ma6", "OC-6")
    bands = {b.species: b for b in predict_bands(iso, "CO", {"k": k, "kc": kc, "kt": kt})}
    assert set(bands) == {"A1g", "Eg", "T1u"}
    assert bands["A1g"].wavenumber == pytest.approx(nu(MU * (k + 4 * kc + kt)), abs=1e-6)
    assert bands["Eg"].wavenumber == pytest.approx(nu(MU * (k - 2 * kc + kt)), abs=1e-6)
    assert bands["T1u"].wavenumber == pytest.approx(nu(MU * (k - kt)), abs=1e-6)
    assert bands["T1u"].degeneracy == 3 and bands["T1u"].intensity == 1.0
    assert bands["A1g"].intensity == 0.0 and bands["Eg"].intensity == 0.0


def test_pentacarbonyl_closed_forms():
    # Cotton & Kraihanzel 1962 (same sources): M(CO)5L, k1 axial, k2 equatorial:
    # A1 block [[mu(k2 + 2kc + kt), 2 mu kc], [2 mu kc, mu k1]] (symmetrised), B1 = mu(k2 - 2kc + kt), E = mu(k2 - kt)
    k1, k2, kc, kt = 15.5, 16.2, 0.3, 0.6
    iso = isomers("Ma5b", "OC-6")[0]
    pat = band_pattern(iso, "CO", {"k1": k1, "k2": k2, "kc": kc, "kt": kt})
    assert [len(s.sites) for s in pat.model.sets] == [1, 4]  # k1 = axial (trans to b)
    got = {}
    for b in pat.bands:
        got.setdefault(b.species, []).append(b.wavenumber)
    a, d, c = MU * (k2 + 2 * kc + kt), MU * k1, 2 * MU * kc
    tr, det = a + d, a * d - c * c
    l1 = tr / 2 + math.sqrt(tr * tr / 4 - det)
    l2 = tr / 2 - math.sqrt(tr * tr / 4 - det)
    assert sorted(got["A1"], reverse=True) == pytest.approx([nu(l1), nu(l2)], abs=1e-6)
    assert got["B1"] == pytest.approx([nu(MU * (k2 - 2 * kc + kt))], abs=1e-6)
    assert got["E"] == pytest.approx([nu(MU * (k2 - kt))], abs=1e-6)


@pytest.mark.parametrize(
    "geometry,formula,angle",
    [("OC-6", "Ma2b4", 90.0), ("TBPY-5", "Ma2b3", 120.0), ("T-4", "Ma2b2", math.degrees(math.acos(-1 / 3)))],
)
def test_dicarbonyl_intensity_ratio(geometry, formula, angle):
    # I_sym / I_asym = cot^2(theta), 2 theta = OC-M-CO angle
    # (bond-dipole model; Braterman, Metal Carbonyl Spectra, from memory)
    theta = math.radians(angle / 2)
    for iso in isomers(formula, geometry):
        a = [s.index for s in iso.sites if s.reporter == "CO"]
        if abs(iso.geometry.angles[a[0], a[1]] - angle) > 1e-3:
            continue
        bands = band_pattern(iso, "CO", {"k": 16.0, "kc": 0.3, "kt": 0.6}).bands
        sym = max(bands, key=lambda b: b.wavenumber)  # in-phase is higher when kc > 0
        asym = min(bands, key=lambda b: b.wavenumber)
        assert sym.raw_intensity / asym.raw_intensity == pytest.approx(1 / math.tan(theta) ** 2, rel=1e-9)
        break
    else:
        pytest.fail("no isomer with that angle")


BROAD = [
    ("Ma6", "OC-6"),
    ("Ma5b", "OC-6"),
    ("Ma4b2", "OC-6"),
    ("Ma3b3", "OC-6"),
    ("Ma2b4", "OC-6"),
    ("Ma3bcd", "OC-6"),
    ("Ma2b2c2", "OC-6"),
    ("M(AA)a4", "OC-6"),
    ("M(AA)2a2", "OC-6"),
    ("Ma5", "TBPY-5"),
    ("Ma4b", "TBPY-5"),
    ("Ma3b2", "TBPY-5"),
    ("Ma5", "SPY-5"),
    ("Ma4b", "SPY-5"),
    ("Ma4", "T-4"),
    ("Ma3b", "T-4"),
    ("Ma4", "SP-4"),
    ("Ma3b", "SP-4"),
    ("Ma2b2", "SP-4"),
    ("Ma3", "TP-3"),
    ("Ma2b", "TP-3"),
    ("Ma6", "TPR-6"),
    ("Ma4b2", "TPR-6"),
    ("Ma7", "PBPY-7"),
    ("Ma8", "SAPR-8"),
    ("Ma2", "L-2"),
    ("Mab", "L-2"),
    ("M(ring)a3", "T-4"),
]


@pytest.mark.parametrize("formula,geometry", BROAD)
def test_intense_modes_match_symmetry_count(formula, geometry):
    # The IR-active count from the symmetry analysis (enumerator.analyses.stretch, reduction formula) equals the number
    # of bands with non-zero bond-dipole intensity, except symmetry-allowed modes that move only trans pairs in phase
    # (their bond dipoles cancel exactly; a known limit of the bond-dipole model, common practice).
    for iso in isomers(formula, geometry):
        pat = band_pattern(iso, "CO")
        intense = sum(1 for b in pat.bands if b.ir_active)
        allowed_zero = [b for b in pat.bands if b.dipole_forbidden]
        ms = stretch_modes(iso, "CO")
        assert intense + len(allowed_zero) == ms.ir, (formula, iso.id)
        assert pat.species == ms.species
        if allowed_zero:
            assert any(s.environment == "same" for s in pat.model.sets), (formula, iso.id)


def test_fit_recovers_constants():
    # synthetic bands from known constants (kt = 2 kc, the Cotton-Kraihanzel approximation) are fitted back exactly
    iso = isomers("Ma4b2", "OC-6")[0]
    assert iso.point_group == "C2v"
    true = {"k1": 15.2, "k2": 15.9, "kc": 0.28, "kt": 0.56}
    bands = [b.wavenumber for b in predict_bands(iso, "CO", true)]
    r = fit_constants(iso, "CO", bands, tie_ck=True)
    for name, value in true.items():
        assert r.value(name) == pytest.approx(value, abs=1e-5)
    assert r.rms < 1e-4 and r.dof == 0 + 1


def test_fit_uncertainties_with_noise():
    iso = isomers("Ma4b2", "OC-6")[0]
    true = {"k1": 15.2, "k2": 15.9, "kc": 0.28, "kt": 0.56}
    bands = [b.wavenumber + d for b, d in zip(predict_bands(iso, "CO", true), (0.5, -0.3, 0.2, -0.4))]
    r = fit_constants(iso, "CO", bands, tie_ck=True)
    assert all(s is not None and s > 0 for n, _, s, how in r.constants if how != "fixed")
    assert abs(r.value("k1") - 15.2) < 0.05


def test_fit_refuses_underdetermined():
    from enumerator.errors import InputError

    (iso,) = isomers("Ma6", "OC-6")
    with pytest.raises(InputError, match="cannot determine"):
        fit_constants(iso, "CO", [1985.0])
    with pytest.raises(InputError, match="one-to-one"):
        fit_constants(iso, "CO", [1985.0, 1985.5], fixed={"kc": 0.3})


def test_default_bands_in_terminal_range():
    # terminal CO bands lie about 1850-2125 cm-1 (common practice)
    for formula, geometry in BROAD:
        for iso in isomers(formula, geometry):
            for b in band_pattern(iso, "CO").bands:
                if b.ir_active:
                    assert 1850 <= b.wavenumber <= 2160, (formula, iso.id, b)


def test_isotopologue_masses_from_smiles():
    from enumerator.workflow.pipeline import Request, run

    res = run(Request(formula="[Cr(CO)5(13CO)]"))
    (iso,) = res.isomers
    pat = band_pattern(iso, "CO")
    assert len(pat.model.sets) == 1  # 13CO keeps the 12CO constant (isotopic labels erased)
    labels = sorted(o.label for o in pat.model.oscillators)
    assert labels == ["13CO", "CO", "CO", "CO", "CO", "CO"]
    low = min(b.wavenumber for b in pat.bands)
    assert low < min(b.wavenumber for b in band_pattern(run(Request(formula="[Cr(CO)6]")).isomers[0], "CO").bands)
