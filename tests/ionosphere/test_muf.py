"""MUF, foE and deciles against ITU-R P.1240 / P.533 / P.1239."""

import math

import numpy as np
import pytest

from planpack.ionosphere import muf


def test_f2_muf_at_vertical_incidence_is_foF2_plus_half_fH():
    # source: ITU-R P.1240 eq. 1 - Cd = 0 at d = 0, so MUF = foF2 + fH/2
    assert muf._cd(1.0) == pytest.approx(0.0, abs=1e-12)
    assert muf.f2_basic_muf_mhz(0.0, 7.0, 3.0, 2.33, 1.2) == pytest.approx(7.0 + 0.6, abs=1e-9)


def _hand_worked_muf(d):
    """Independent recomputation of P.1240 eqs. 1-4 step by step (own derivation)."""
    fof2, m, foe, fh = 7.0, 3.0, 2.33, 1.2
    x = fof2 / foe                                                 # 3.004
    b = m - 0.124 + (m * m - 4) * (0.0215 + 0.005 * math.sin(7.854 / x - 1.9635))   # 2.9987
    dmax = 4780 + (12610 + 2140 / x**2 - 49720 / x**4 + 688900 / x**6) * (1 / b - 0.303)  # 5182 km
    dmax = min(dmax, 4000.0)                                       # P.1240: limited to 4000 km
    def cd(z):
        return 0.74 - 0.591 * z - 0.424 * z**2 - 0.090 * z**3 + 0.088 * z**4 + 0.181 * z**5 + 0.096 * z**6
    return (1 + cd(1 - 2 * d / dmax) / cd(1 - 6000 / dmax) * (b - 1)) * fof2 + fh / 2 * (1 - d / dmax)


@pytest.mark.parametrize("d_km, expected", [(0, 7.60), (500, 9.13), (1000, 12.50), (1500, 15.76)])
def test_f2_muf_distance_formula(d_km, expected):
    # source: ITU-R P.1240-2 Annex 1 §3.1 eqs. 1-4 (= P.533 §3.5), foF2 = 7, M(3000)F2 = 3,
    # foE = 2.33, fH = 1.2 MHz; expected values recomputed from the equations (with dmax
    # limited to 4000 km) and by the hand derivation above; tolerance 0.01 MHz
    got = float(muf.f2_basic_muf_mhz(d_km, 7.0, 3.0, 2.33, 1.2))
    assert got == pytest.approx(expected, abs=0.01)
    assert got == pytest.approx(_hand_worked_muf(d_km), abs=1e-9)


def test_f2_muf_grows_with_distance():
    # source: P.1240 eqs. 1-4 - the MUF grows with hop length from about 100 km to dmax.
    # Below 100 km the published Cd polynomial is slightly negative (dCd/dZ = 0.124 at Z = 1)
    # while the fH/2 term falls, so the MUF dips by under 0.5 % there (own derivation).
    d = np.linspace(100, 4000, 79)
    assert np.all(np.diff(muf.f2_basic_muf_mhz(d, 7.0, 3.0, 2.33, 1.2)) > 0)
    near = muf.f2_basic_muf_mhz(np.linspace(0, 100, 21), 7.0, 3.0, 2.33, 1.2)
    assert np.all(np.abs(near / 7.6 - 1) < 0.005)


def test_e_muf_secant_law():
    # source: P.533 §3.3 - E MUF = foE sec i110; vertical incidence gives foE
    assert muf.e_basic_muf_mhz(0.0, 3.0) == pytest.approx(3.0, rel=1e-4)
    # common practice, no source: E layer returns signals up to about 20 MHz
    # (foE about 4 MHz at solar maximum, longest one-hop E path of 2000 km)
    assert 17.0 < muf.e_basic_muf_mhz(2000.0, 4.0) < 23.0


def test_reflection_height():
    # source: ITU-R P.533 §5.1, hr = 1490 / M(3000)F2 - 176 km; M = 3 gives 320.7 km
    assert muf.reflection_height_km(3.0) == pytest.approx(1490 / 3 - 176)


def test_foE_p1239_check_value():
    # source: ITU-R P.1239-3 §3 foE formula; latitude 50 deg, chi = 30 deg (noon, declination 20),
    # R12 = 100 -> about 3.63 MHz; tolerance 0.01 MHz
    phi = muf.phi_from_r12(100.0)
    assert phi == pytest.approx(63.7 + 72.8 + 8.9)
    assert muf.foE_p1239_mhz(50.0, 30.0, 20.0, phi) == pytest.approx(3.63, abs=0.01)


def test_pyiri_foE_agrees_with_p1239():
    # source: PyIRI 0.1.7 main_library.foE (NeQuick/Galileo formula) vs ITU-R P.1239 at
    # latitude 50, chi = 30 deg, Phi(R12 = 100), June; tolerance 5 %
    from PyIRI import main_library as ml

    phi = float(muf.phi_from_r12(100.0))
    pyiri = float(np.ravel(ml.foE(6, np.array([30.0]), np.array([50.0]), phi))[0])
    assert pyiri == pytest.approx(float(muf.foE_p1239_mhz(50.0, 30.0, 20.0, phi)), rel=0.05)


def test_foE_p1239_is_continuous_across_day_night():
    # source: P.1239 - D is continuous at chi = 73 and 90 deg by construction
    chi = np.array([72.999, 73.001, 89.999, 90.001])
    fo = muf.foE_p1239_mhz(45.0, chi, 0.0, 100.0)
    assert fo[0] == pytest.approx(fo[1], rel=1e-3)
    assert fo[2] == pytest.approx(fo[3], rel=1e-2)


def test_muf_deciles_probability():
    # source: ITU-R P.373 - the OWF is exceeded by the MUF on 90 % of days; median on 50 %
    assert muf.muf_exceedance_probability(muf.owf_mhz(10.0), 10.0) == pytest.approx(0.9, abs=1e-6)
    assert muf.muf_exceedance_probability(10.0, 10.0) == pytest.approx(0.5)
    assert muf.muf_exceedance_probability(11.5, 10.0) == pytest.approx(0.1, abs=1e-6)
