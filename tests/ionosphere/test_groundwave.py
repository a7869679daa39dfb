"""Norton ground wave against the published attenuation function values."""

import numpy as np
import pytest

from planpack.ionosphere import groundwave as gw

# Sommerfeld-Norton |F(p)| for real numerical distance p (phase b = 0):
# K. A. Norton, Proc. IRE 25 (1937), Fig. of |A| vs p; as quoted in the check list.
NORTON_TABLE = [(0.1, 0.958), (1.0, 0.656), (3.0, 0.303), (10.0, 0.0608), (100.0, 0.00508)]


@pytest.mark.parametrize("p, expected", NORTON_TABLE)
def test_norton_attenuation_table(p, expected):
    # source: Norton (1937) attenuation function; tolerance 0.5 % (table rounding)
    assert abs(gw.norton_attenuation(p)) == pytest.approx(expected, rel=0.005)


def test_norton_large_p_asymptote():
    # source: Norton (1936) - |F| -> 1/(2p) for large p; tolerance 0.5 % at p = 1e3, 1e4
    for p in (1e3, 1e4):
        assert abs(gw.norton_attenuation(p)) == pytest.approx(1 / (2 * p), rel=0.005)


def test_numerical_distance_matches_terman_for_conducting_ground():
    # source: Terman, Radio Engineers' Handbook (1943) §10: p = (pi d / lambda) cos b / x for
    # vertical polarisation, x = 60 sigma lambda; tolerance 2 %
    d, f, eps, sig = 10.0, 3.0, 15.0, 0.01
    lam = 299.792458 / f
    x = 60 * sig * lam
    b = np.arctan((eps + 1) / x)
    p = np.pi * d * 1000 / lam * np.cos(b) / x
    assert abs(gw.numerical_distance(d, f, eps, sig, True)) == pytest.approx(p, rel=0.02)


def test_p368_reference_field_on_perfect_ground():
    # source: ITU-R P.368 §1 - 1 kW from a short vertical monopole on perfect ground gives
    # 300 mV/m (109.5 dBuV/m) at 1 km; sea water at 2 MHz is close to perfect; tolerance 0.5 dB
    e = gw.ground_wave_field_dbuv_m(1000.0, gw.SHORT_MONOPOLE_GAIN_DBI, 1.0, 2.0, 70.0, 5.0, True)
    assert float(e) == pytest.approx(20 * np.log10(0.3e6), abs=0.5)


def test_ground_order_sea_beats_dry_and_vertical_beats_horizontal():
    # common practice, no source: ground wave carries far over sea, little over dry ground,
    # and hardly at all with horizontal polarisation
    sea = gw.ground_wave_loss_db(40.0, 4.0, *gw.GROUND_CONSTANTS["sea"], True)
    dry = gw.ground_wave_loss_db(40.0, 4.0, *gw.GROUND_CONSTANTS["very_dry_ground"], True)
    horiz = gw.ground_wave_loss_db(40.0, 4.0, *gw.GROUND_CONSTANTS["sea"], False)
    assert sea < dry < horiz


def test_beyond_flat_earth_limit_no_ground_wave():
    # source: Terman (1943) flat-earth validity about 80 / f^(1/3) km (from memory)
    assert np.isinf(gw.ground_wave_loss_db(100.0, 8.0, 70.0, 5.0, True))
