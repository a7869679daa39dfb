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


# --- combination with deciles (P.372 §8) -------------------------------------------------------

def monte_carlo_sum(fa, du, dl, n=200_000, seed=3):
    """Median and deciles of a sum of independent two-piece log-normal noises, by simulation."""
    rng = np.random.default_rng(seed)
    total = 0.0
    for f, u, lo in zip(fa, du, dl):
        z = rng.standard_normal(n)
        total = total + 10 ** ((f + np.where(z > 0, u, lo) / noise.DECILE_Z * z) / 10)
    db = 10 * np.log10(total)
    med = np.median(db)
    return med, np.quantile(db, 0.9) - med, med - np.quantile(db, 0.1)


COMPARABLE = [  # (medians, upper deciles, lower deciles): man-made rural/residential/city + atmospheric + galactic
    ([50.0, 50.0], [9.2, 9.0], [4.6, 7.0]),
    ([50.0, 53.0], [10.6, 10.0], [5.3, 7.0]),
    ([50.0, 47.0, 45.0], [11.0, 9.5], [6.7, 7.0]),
    ([60.0, 60.0], [10.0, 10.0], [5.0, 5.0]),
    ([50.0, 56.0, 45.0], [9.2, 11.0, 2.0], [4.6, 8.0, 2.0]),
    ([70.0, 60.0, 55.0], [11.0, 9.2, 2.0], [8.0, 4.6, 2.0]),
]


@pytest.mark.parametrize("fa, du, dl", COMPARABLE)
def test_combination_of_comparable_sources_against_monte_carlo(fa, du, dl):
    # source: Monte Carlo sum of the same two-piece log-normal sources (200 000 draws), the
    # distribution P.372 §8 approximates; sources within 10 dB of each other: within 2.5 dB
    # (the moment-matching of P.372 §8 tends to put the median 0.5-1 dB low, up to 3 dB)
    du = (du + [2.0])[:len(fa)]
    dl = (dl + [2.0])[:len(fa)]
    got = noise.combine_noise_deciles(fa, du, dl)
    ref = monte_carlo_sum(fa, du, dl)
    np.testing.assert_allclose(np.array(got, float), np.array(ref), atol=2.5)


def test_combination_with_one_dominant_source_against_monte_carlo():
    # source: as above; one source 20 dB above the rest: within 0.75 dB
    fa, du, dl = [70.0, 50.0, 45.0], [11.0, 9.2, 2.0], [8.0, 4.6, 2.0]
    np.testing.assert_allclose(np.array(noise.combine_noise_deciles(fa, du, dl), float),
                               np.array(monte_carlo_sum(fa, du, dl)), atol=0.75)


def test_combination_of_one_source_is_itself_and_absent_sources_drop_out():
    # source: ITU-R P.372 §8 - the method reduces to the source itself
    fa, up, lo = noise.combine_noise_deciles([55.0, -np.inf], [9.0, 2.0], [6.0, 2.0])
    assert (float(fa), float(up), float(lo)) == pytest.approx((55.0, 9.0, 6.0), abs=1e-9)
    fa, up, lo = noise.combine_noise_deciles([-np.inf], [2.0], [2.0])
    assert np.isneginf(fa) and up == 0 and lo == 0


def test_combined_median_and_deciles_respect_the_bounds_of_any_power_sum():
    # source: for independent non-negative powers every quantile of the sum is at least the same
    # quantile of each term
    rng = np.random.default_rng(11)
    fa = rng.uniform(20, 80, (3, 500))
    du, dl = rng.uniform(1, 13, (3, 500)), rng.uniform(1, 10, (3, 500))
    med, up, lo = noise.combine_noise_deciles(list(fa), list(du), list(dl))
    assert np.all(med >= fa.max(axis=0) - 1e-9)
    assert np.all(med + up >= (fa + du).max(axis=0) - 1e-9)
    assert np.all(med - lo >= (fa - dl).max(axis=0) - 1e-9)
    assert np.all(up >= 0) and np.all(lo >= 0)
    assert np.all(med <= 10 * np.log10(np.sum(10 ** (fa / 10), axis=0)) + 6.0)   # not wildly above


def test_combination_broadcasts():
    med, up, lo = noise.combine_noise_deciles([np.zeros((4, 1)) + 50, np.zeros((1, 3)) + 40], [9.0, 8.0], [5.0, 6.0])
    assert med.shape == up.shape == lo.shape == (4, 3)


def test_combination_refuses_mismatched_lists():
    with pytest.raises(ValueError):
        noise.combine_noise_deciles([50.0, 40.0], [9.0], [5.0, 6.0])


def test_external_noise_without_atmospherics_is_man_made_plus_galactic():
    # source: ITU-R P.372 §6: rural 39.5 dB and galactic 29.0 dB at 10 MHz; power sum 39.87 dB,
    # the deciles add only a little: within 0.3 dB
    fa, up, lo = noise.external_noise_db(10.0, 67.2, 27.7, 9.2, 4.6, foF2_mhz=5.0)
    assert float(fa) == pytest.approx(39.87, abs=0.3)
    fa_screened, up_s, lo_s = noise.external_noise_db(10.0, 67.2, 27.7, 9.2, 4.6, foF2_mhz=12.0)
    assert float(fa_screened) == pytest.approx(39.5, abs=1e-9) and float(up_s) == pytest.approx(9.2)


def test_external_noise_with_dominant_atmospherics():
    fa, up, lo = noise.external_noise_db(3.2, 67.2, 27.7, 9.2, 4.6, foF2_mhz=6.0, atmospheric=(78.0, 8.0, 6.5))
    assert float(fa) == pytest.approx(78.0, abs=0.3) and float(up) == pytest.approx(8.0, abs=0.5)
