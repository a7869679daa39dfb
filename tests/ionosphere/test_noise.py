"""Receiver noise against ITU-R P.372."""

import numpy as np
import pytest

from planpack.ionosphere import noise

# ITU-R P.372-16 §6, Table 1 / Fig. 10: median Fam at 10 MHz [dB above kT0b].
P372_AT_10MHZ = {
    "city": 49.1,
    "residential": 44.8,
    "rural": 39.5,
    "quiet_rural": 25.0,
    "galactic": 29.0,
}


@pytest.mark.parametrize("name, expected", sorted(P372_AT_10MHZ.items()))
def test_man_made_noise_at_10_mhz_matches_p372(name, expected):
    cat = noise.CATEGORIES[name]
    # source: ITU-R P.372 Table 1 (c - d log10 f); tolerance 0.05 dB (rounding)
    assert noise.man_made_noise_db(10.0, cat.c_db, cat.d) == pytest.approx(expected, abs=0.05)


def test_galactic_noise_is_screened_below_foF2():
    # source: ITU-R P.372 §5 - galactic noise reaches the ground only above foF2
    assert np.isneginf(noise.galactic_noise_db(5.0, foF2_mhz=6.0))
    assert noise.galactic_noise_db(10.0, foF2_mhz=6.0) == pytest.approx(29.0, abs=0.05)


def test_noise_power_in_bandwidth():
    # source: ITU-R P.372 §2, Pn = Fa + 10 log b - 204 dBW; 3 kHz, Fa = 40 dB
    assert noise.noise_power_dbw(40.0, 3000.0) == pytest.approx(40 + 34.771 - 204, abs=0.01)


def test_power_sum_of_equal_sources_adds_3_db():
    # source: ITU-R P.372 §9, medians add as powers; 10 log10 2 = 3.01 dB
    assert noise.combine_noise_db(30.0, 30.0) == pytest.approx(33.01, abs=0.01)
    assert noise.combine_noise_db(30.0, -np.inf) == pytest.approx(30.0)


def test_city_noise_never_below_quiet_rural():
    # common practice, no source: a city is never quieter than quiet rural (P.372 curves do not cross in HF)
    f = np.geomspace(1.5, 30, 50)
    city = noise.man_made_noise_db(f, 76.8, 27.7)
    quiet = noise.man_made_noise_db(f, 53.6, 28.6)
    assert np.all(city > quiet)


def test_deciles_pick_the_nearest_environment():
    # source: ITU-R P.372 Table 2 (from memory): city 11.0 / 6.7 dB
    up, lo = noise.man_made_deciles_db(np.array([76.8, 67.2]))
    assert up.tolist() == [11.0, 9.2] and lo.tolist() == [6.7, 4.6]
