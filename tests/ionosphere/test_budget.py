"""Link predictions: facts of the trade, monotonic behaviour and the public contract."""

import dataclasses
import json

import numpy as np
import pytest

from planpack.ionosphere import (VIA_F2, VIA_GROUND, VIA_NAMES, ChannelSet, LinkSet, methods,
                                 predict_month, station_sun_times)

FREQS = np.array([1.9, 2.8, 3.6, 4.6, 5.4, 7.1, 9.0, 12.0, 18.0])
NIGHT_UTC = [0, 1, 2, 3, 22, 23]          # central Europe, local time about UTC+1
MIDDAY_UTC = [10, 11, 12]


def channels(freqs=FREQS):
    c = len(freqs)
    return ChannelSet(freq_mhz=freqs, required_snr_db=np.full(c, 6.0), bandwidth_hz=np.full(c, 3000.0))


def links(tx, rx, power_w=100.0, gain_dbi=0.0, vertical=False, noise_c=67.2, noise_d=27.7,
          ground=(15.0, 0.001), c=len(FREQS)):
    tx, rx = np.atleast_2d(tx), np.atleast_2d(rx)
    n = len(tx)
    g = np.full((n, c, 91), gain_dbi, dtype=float)
    return LinkSet(tx_lat_deg=tx[:, 0], tx_lon_deg=tx[:, 1], rx_lat_deg=rx[:, 0], rx_lon_deg=rx[:, 1],
                   tx_power_w=np.full(n, power_w), tx_gain_dbi=g, rx_gain_dbi=g,
                   vertical=np.full(n, vertical), ground_eps_r=np.full(n, ground[0]),
                   ground_sigma_s_m=np.full(n, ground[1]), noise_c_db=np.full(n, noise_c),
                   noise_d=np.full(n, noise_d), noise_margin_db=np.zeros(n))


# A synthetic 200 km link in central Europe (about 50 N, 10-12.8 E).
A, B = (50.0, 10.0), (50.0, 12.8)


@pytest.fixture(scope="module")
def january_low():
    return predict_month(links(A, B), channels(), 2025, 1, 15.0)


def test_shapes_and_codes(january_low):
    p = january_low
    assert p.distance_km.shape == (1,) and p.muf_mhz.shape == (1, 24)
    assert p.snr_db.shape == p.good_days.shape == p.via.shape == p.skip.shape == (1, 24, len(FREQS))
    assert set(np.unique(p.via)) <= set(VIA_NAMES)
    assert np.all((p.good_days >= 0) & (p.good_days <= 1))
    assert p.distance_km[0] == pytest.approx(200.5, abs=1.0)   # geographiclib: 200.5 km
    np.testing.assert_allclose(p.margin_db, p.snr_db - 6.0, atol=1e-4)


def test_nvis_night_and_day_owf_at_low_solar_activity(january_low):
    # common practice, no source: a mid-latitude NVIS net works roughly 1.8-4.9 MHz at night
    # and 5-8 MHz by day (200 km link, January, SSN 15)
    owf = january_low.owf_mhz[0]
    assert np.all((owf[NIGHT_UTC] >= 1.8) & (owf[NIGHT_UTC] <= 4.9))
    assert np.all((owf[MIDDAY_UTC] >= 5.0) & (owf[MIDDAY_UTC] <= 8.0))


def test_nvis_by_day_near_solar_maximum_up_to_about_12_mhz():
    # common practice, no source: up to about 12 MHz by day near the peak of the solar cycle
    best = max(predict_month(links(A, B), channels(), 2025, m, 150.0).owf_mhz[0, MIDDAY_UTC].max()
               for m in (3, 11))
    assert 9.0 <= best <= 13.0


def test_night_low_day_high_channels_carry(january_low):
    # common practice, no source: low channels at night, higher channels by day
    p = january_low
    f = FREQS
    night_best = f[np.argmax(p.good_days[0, 2])]
    day_best = f[np.argmax(np.where(p.good_days[0, 11] > 0.85, f, 0))]
    assert night_best < 4.0 < day_best


def test_nvis_footprint_has_no_skip_zone():
    # common practice, no source: the NVIS footprint is roughly 0-800 km with no skip zone when
    # frequency and antenna suit: below foF2 every distance is served, none is skipped
    dist_deg = np.array([0.05, 0.5, 1.5, 3.0, 5.0, 7.0]) * 1.0   # up to about 780 km at 50 N
    tx = np.column_stack([np.full(6, 50.0), np.full(6, 10.0)])
    rx = np.column_stack([np.full(6, 50.0), 10.0 + dist_deg * 1.55])
    p = predict_month(links(tx, rx, power_w=100.0, c=1), channels(np.array([2.5])), 2025, 1, 15.0)
    assert p.distance_km.max() < 820
    night = NIGHT_UTC
    assert not p.skip[:, night, 0].any()
    assert np.all(p.good_days[:, night, 0] > 0.5)


def test_skip_zone_above_the_muf_far_beyond_ground_wave(january_low):
    # source: P.533 - above the path MUF and beyond ground-wave range nothing arrives
    p = january_low
    k18 = list(FREQS).index(18.0)
    assert p.skip[0, 2, k18] and p.good_days[0, 2, k18] < 0.01


def test_more_power_never_lowers_snr(january_low):
    # common practice, no source (link budget is linear in dBW)
    hi = predict_month(links(A, B, power_w=400.0), channels(), 2025, 1, 15.0)
    assert np.all(hi.snr_db >= january_low.snr_db - 1e-4)
    assert np.all(hi.good_days >= january_low.good_days - 1e-6)


def test_city_receiver_never_beats_quiet_rural():
    # source: ITU-R P.372 - city man-made noise exceeds quiet rural at every HF frequency
    city = predict_month(links(A, B, noise_c=76.8, noise_d=27.7), channels(), 2025, 7, 60.0)
    quiet = predict_month(links(A, B, noise_c=53.6, noise_d=28.6), channels(), 2025, 7, 60.0)
    assert np.all(city.snr_db <= quiet.snr_db + 1e-4)
    assert np.all(city.good_days <= quiet.good_days + 1e-6)


def test_short_link_whips_over_wet_ground_go_by_ground_wave():
    # common practice, no source: a few km with vertical whips is a ground-wave link
    p = predict_month(links(A, (50.0, 10.07), vertical=True, ground=(30.0, 0.01)),
                      channels(), 2025, 1, 15.0)
    assert p.distance_km[0] < 6
    assert np.all(p.via[0, :, 0] == VIA_GROUND)


def test_e_layer_carries_1500_km_by_day_in_summer():
    # common practice, no source: the E layer serves ranges up to about 2400 km by day
    p = predict_month(links(A, (41.0, 25.0)), channels(), 2025, 6, 100.0)
    assert 1300 < p.distance_km[0] < 1800
    assert 8.0 < p.muf_e_mhz[0, 11] < 20.0
    assert np.all(p.elevation_e_deg[0] > 0)


def test_luf_below_owf_at_night(january_low):
    # common practice, no source: with 100 W the usable window at night is open (LUF < OWF)
    p = january_low
    assert np.all(p.luf_mhz[0, NIGHT_UTC] < p.owf_mhz[0, NIGHT_UTC])


def test_regional_multihop_counts_hops():
    # source: P.533 §5.2 - fewest equal hops; a 5000 km path needs two F2 hops
    p = predict_month(links(A, (20.0, 60.0)), channels(), 2025, 3, 80.0)
    assert p.distance_km[0] > 5000 and p.n_hops[0] >= 2
    assert np.all(p.elevation_deg[0] >= 2.99)


def test_bad_inputs_are_clear():
    good = links(A, B)
    with pytest.raises(ValueError, match="tx_gain_dbi"):
        dataclasses.replace(good, tx_gain_dbi=np.zeros((1, len(FREQS), 90)))
    with pytest.raises(ValueError, match="tx_power_w"):
        dataclasses.replace(good, tx_power_w=np.array([0.0]))
    with pytest.raises(ValueError, match="channels"):
        predict_month(good, channels(FREQS[:3]), 2025, 1, 10)
    with pytest.raises(ValueError, match="ssn"):
        predict_month(good, channels(), 2025, 1, -1)
    with pytest.raises(ValueError, match="freq_mhz"):
        ChannelSet(np.array([0.5]), np.array([6.0]), np.array([3000.0]))


def test_methods_are_plain_json():
    m = methods()
    json.dumps(m)
    assert "atmospheric" in " ".join(m["not_modelled"])
    assert m["libraries"]["PyIRI"] == "0.1.7"


def test_station_sun_times():
    (rise, set_), = station_sun_times([50.0], [10.0], 2025, 1)
    # source: astral-checked sun.py; January at 50 N, 10 E: sunrise about 07:10 UTC
    assert 6.8 < rise < 7.5 and 15.2 < set_ < 15.9
