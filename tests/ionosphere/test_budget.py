"""Link predictions: facts of the trade, monotonic behaviour, the band grid, the 90 % LUF and the public contract."""

import dataclasses
import json

import numpy as np
import pytest

from planpack import bandgrid
from planpack.ionosphere import (VIA_F2, VIA_GROUND, VIA_NAMES, ChannelSet, LinkSet, budget, grid_requirement,
                                 methods, predict_link_hours, predict_month, station_sun_times)

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
    assert "atmospheric" not in " ".join(m["not_modelled"])        # P.372 lightning noise is modelled now
    assert "P.372" in m["atmospheric_noise"] and "from memory" in m["atmospheric_noise"]
    assert m["libraries"]["PyIRI"] == "0.1.7"
    # every figure says at which reliability it holds, and how the hour is sampled
    assert "90 %" in m["luf"] and "90 %" in m["owf"] and "fixed ratios" in m["owf"]
    assert "h:00, h:30 and h+1:00" in m["whole_hours"]
    assert "linear in R12" in m["ionosphere"] and "IG12" not in m["ionosphere"]


def test_station_sun_times():
    (rise, set_), = station_sun_times([50.0], [10.0], 2025, 1)
    # source: astral-checked sun.py; January at 50 N, 10 E: sunrise about 07:10 UTC
    assert 6.8 < rise < 7.5 and 15.2 < set_ < 15.9


# --- the band grid, the 90 % LUF and the gain tables -----------------------------------------


GRID = bandgrid.GRID_MHZ


def station_links(tx_rows, rx_rows, pos, chan_tab, grid_tab=None, power_w=100.0, noise_c=67.2):
    """Directed links between stations at ``pos`` with per-station tables."""
    tx_rows, rx_rows = np.asarray(tx_rows), np.asarray(rx_rows)
    n = tx_rows.size
    pos = np.asarray(pos, float)
    return LinkSet(tx_lat_deg=pos[tx_rows, 0], tx_lon_deg=pos[tx_rows, 1], rx_lat_deg=pos[rx_rows, 0],
                   rx_lon_deg=pos[rx_rows, 1], tx_power_w=np.full(n, power_w), tx_gain_dbi=chan_tab,
                   rx_gain_dbi=chan_tab, tx_station=tx_rows, rx_station=rx_rows, tx_grid_gain_dbi=grid_tab,
                   rx_grid_gain_dbi=grid_tab, vertical=np.full(n, False), ground_eps_r=np.full(n, 15.0),
                   ground_sigma_s_m=np.full(n, 0.001), noise_c_db=np.full(n, noise_c),
                   noise_d=np.full(n, 27.7), noise_margin_db=np.zeros(n))


def test_luf_is_a_90_percent_figure():
    # source: P.533 §10 and P.372 Table 2 - with rural man-made noise (upper decile 9.2 dB) and the sky
    # signal's lower decile of 8 dB (P.842; both values from memory, as in noise.py and budget.py),
    # P(SNR >= required) = 0.9 where the median margin is sqrt(8² + 9.2²) = 12.2 dB. The LUF sits where the band grid's margin crosses 12.2 dB, and good days are about
    # 0.9 there (the MUF well above). 300 km link, 20 W, January, SSN 15, at noon (absorption sets the LUF).
    p = predict_month(links(A, (50.0, 14.2), power_w=20.0), channels(), 2025, 1, 15.0)
    need = float(np.hypot(8.0, 9.2))
    checked = 0
    for h in MIDDAY_UTC:
        luf = float(p.luf_mhz[0, h])
        assert np.isfinite(luf) and not p.luf_below_floor[0, h]
        above = int(np.searchsorted(GRID, luf))
        assert p.grid_margin_db[0, h, above - 1] < need
        assert p.grid_margin_db[0, h, above] >= need - 0.01
        assert 0.88 <= p.grid_good_days[0, h, above] and p.grid_good_days[0, h, above - 1] < 0.9
        # the median (50 %) LUF, where the margin first reaches 0, lies lower
        assert GRID[np.argmax(p.grid_margin_db[0, h] >= 0)] < luf
        checked += 1
    assert checked == 3


def test_luf_at_the_grid_floor_says_so(january_low):
    # a 100 W, 200 km link in January at SSN 15: at night the lowest grid frequency already works on
    # 90 % of days, so the LUF is "at or below 1.5 MHz", not 1.5 MHz; by day the absorption lifts it
    # off the floor (common practice, no source: a winter NVIS LUF near 2-3 MHz at noon at solar minimum)
    p = january_low
    assert np.all(p.luf_below_floor[0, NIGHT_UTC])
    np.testing.assert_allclose(p.luf_mhz[0, NIGHT_UTC], GRID[0])
    assert not p.luf_below_floor[0, MIDDAY_UTC].any()
    assert np.all((p.luf_mhz[0, MIDDAY_UTC] > 1.8) & (p.luf_mhz[0, MIDDAY_UTC] < 3.0))


def test_grid_figures_match_channels_on_the_grid_frequencies():
    # own consistency: channels placed on grid frequencies, with the same gains and requirement,
    # get exactly the grid's figures
    k = np.arange(5, 30, 4)
    f = GRID[k]
    ch = ChannelSet(f, np.full(f.size, 6.0), np.full(f.size, 3000.0))
    pattern = (-8.0 + 14.0 * np.sin(np.deg2rad(np.arange(91.0))))
    chan = np.broadcast_to(pattern, (2, f.size, 91)).copy()
    grid = np.broadcast_to(pattern, (2, GRID.size, 91)).copy()
    ls = station_links([0, 1], [1, 0], [A, B], chan, grid)
    p = predict_month(ls, ch, 2025, 4, 80.0)
    np.testing.assert_allclose(p.grid_good_days[:, :, k], p.good_days, atol=1e-6)
    np.testing.assert_allclose(p.grid_margin_db[:, :, k], p.margin_db, atol=1e-4)
    assert p.grid_good_days.shape == (2, 24, GRID.size) and p.grid_good_days.dtype == np.float32


def test_per_station_and_per_link_tables_agree():
    # own consistency: the compact per-station form gives the same numbers as per-link tables
    rng = np.random.default_rng(3)
    pos = [A, B, (49.0, 11.0)]
    chan = (-5.0 + 10 * np.sin(np.deg2rad(np.arange(91.0))) + rng.normal(0, 2, (3, FREQS.size, 1)))
    grid = (-5.0 + 10 * np.sin(np.deg2rad(np.arange(91.0))) + rng.normal(0, 2, (3, GRID.size, 1)))
    tx, rx = np.array([0, 1, 2, 1]), np.array([1, 0, 0, 2])
    st = station_links(tx, rx, pos, chan, grid)
    pl = dataclasses.replace(st, tx_station=None, rx_station=None, tx_gain_dbi=chan[tx], rx_gain_dbi=chan[rx],
                             tx_grid_gain_dbi=grid[tx], rx_grid_gain_dbi=grid[rx])
    a = predict_month(st, channels(), 2025, 7, 40.0)
    b = predict_month(pl, channels(), 2025, 7, 40.0)
    for name in ("good_days", "snr_db", "via", "grid_good_days", "grid_margin_db", "luf_mhz"):
        np.testing.assert_array_equal(getattr(a, name), getattr(b, name))


def test_grid_without_its_own_tables_uses_the_nearest_channel():
    # the fallback: no grid tables -> each grid frequency takes the table of the nearest channel (log f)
    rng = np.random.default_rng(4)
    chan = (-5.0 + 10 * np.sin(np.deg2rad(np.arange(91.0))) + rng.normal(0, 3, (2, FREQS.size, 1)))
    nearest = np.argmin(np.abs(np.log(GRID)[:, None] - np.log(FREQS)[None, :]), axis=1)
    without = station_links([0, 1], [1, 0], [A, B], chan)
    explicit = station_links([0, 1], [1, 0], [A, B], chan, chan[:, nearest])
    a = predict_month(without, channels(), 2025, 1, 15.0)
    b = predict_month(explicit, channels(), 2025, 1, 15.0)
    np.testing.assert_array_equal(a.grid_good_days, b.grid_good_days)
    np.testing.assert_array_equal(a.luf_mhz, b.luf_mhz)


def test_link_hours_reproduce_the_month_and_interpolate_gains():
    # own consistency: chosen (link, hour) pairs give the month's figures, on the channels (their own
    # tables) and on the grid (grid tables); between two grid points the gains interpolate linearly
    # in log f, so adding a gain of 0.3 dB per grid step to both antennas adds 2 x 0.3 x (j + w) dB
    rng = np.random.default_rng(5)
    pattern = -5.0 + 10 * np.sin(np.deg2rad(np.arange(91.0)))
    chan = pattern + rng.normal(0, 2, (2, FREQS.size, 1))
    grid = pattern + rng.normal(0, 2, (2, GRID.size, 1))
    ls = station_links([0, 1], [1, 0], [A, B], chan, grid)
    p = predict_month(ls, channels(), 2025, 1, 15.0)
    li, hr = np.array([0, 1, 1, 0]), np.array([2, 11, 17, 23])
    on_ch = predict_link_hours(ls, channels(), 2025, 1, 15.0, li, hr, gains="channels")
    np.testing.assert_allclose(on_ch.good_days, p.good_days[li, hr], atol=1e-6)
    np.testing.assert_allclose(on_ch.snr_db, p.snr_db[li, hr], atol=1e-4)
    np.testing.assert_allclose(on_ch.muf_mhz, p.muf_mhz[li, hr])
    req, bw = grid_requirement(channels())
    gch = ChannelSet(GRID, np.full(GRID.size, req), np.full(GRID.size, bw))
    on_grid = predict_link_hours(ls, gch, 2025, 1, 15.0, li, hr)
    np.testing.assert_allclose(on_grid.good_days, p.grid_good_days[li, hr], atol=1e-5)

    cand = np.sqrt(GRID[10:30] * GRID[11:31]) * np.array([1.0, 1.02] * 10)    # between grid points
    cs = ChannelSet(cand, np.full(cand.size, 6.0), np.full(cand.size, 3000.0))
    tilt = dataclasses.replace(ls, tx_grid_gain_dbi=grid + 0.3 * np.arange(GRID.size)[None, :, None],
                               rx_grid_gain_dbi=grid + 0.3 * np.arange(GRID.size)[None, :, None])
    paths = budget._paths(ls, 2025, 1, 15.0, np.array([2.0, 11.5, 17.0]))
    a = budget._evaluate(ls, budget._rows(ls, paths, np.array([0, 1])), budget._interpolated_block(ls, cs), 1, 15.0)
    b = budget._evaluate(tilt, budget._rows(tilt, paths, np.array([0, 1])), budget._interpolated_block(tilt, cs),
                         1, 15.0)
    j = np.log(cand / GRID[0]) / np.log(GRID[1] / GRID[0])                  # fractional grid index
    sky = (a["via"] >= budget.VIA_E) & (a["via"] == b["via"]) & (a["snr"] > -50)
    assert sky.sum() > 40
    np.testing.assert_allclose((b["snr"] - a["snr"])[sky], np.broadcast_to(0.6 * j, a["snr"].shape)[sky],
                               atol=2e-3)


def test_grid_requirement_is_the_most_demanding_channel():
    # cautious and independent of the order: the highest SNR + 10 log10(bandwidth)
    ch = ChannelSet(np.array([3.0, 5.0, 7.0]), np.array([10.0, 0.0, 6.0]), np.array([500.0, 2700.0, 3000.0]))
    assert grid_requirement(ch) == (6.0, 3000.0)


def test_normal_cdf_fast_within_its_published_error():
    # source: Bowling et al. (2009), the logistic approximation's maximum absolute error 1.4e-4;
    # reference scipy.special.ndtr; tolerance 1.5e-4
    from scipy.special import ndtr

    z = np.linspace(-12, 12, 200_001).astype(np.float32)
    assert np.abs(budget.normal_cdf_fast(z) - ndtr(z.astype(float))).max() < 1.5e-4
    assert budget.normal_cdf_fast(np.array([-np.inf, np.inf], np.float32)).tolist() == [0.0, 1.0]


def test_no_links_is_an_empty_prediction():
    p = predict_month(links(np.zeros((0, 2)), np.zeros((0, 2))), channels(), 2025, 1, 15.0)
    assert p.good_days.shape == (0, 24, len(FREQS)) and p.grid_good_days.shape == (0, 24, GRID.size)


def test_bad_tables_and_pairs_are_clear():
    chan = np.zeros((2, len(FREQS), 91))
    with pytest.raises(ValueError, match="tx_station"):
        station_links([0, 2], [1, 0], [A, B, B], chan)
    with pytest.raises(ValueError, match="tx_grid_gain_dbi"):
        station_links([0, 1], [1, 0], [A, B], chan, np.zeros((2, 40, 91)))
    good = station_links([0, 1], [1, 0], [A, B], chan)
    with pytest.raises(ValueError, match="grid"):
        predict_link_hours(good, channels(), 2025, 1, 15.0, [0], [3])
    with pytest.raises(ValueError, match="utc_hour"):
        predict_link_hours(good, channels(), 2025, 1, 15.0, [0], [24], gains="channels")
    with pytest.raises(ValueError, match="link_index"):
        predict_link_hours(good, channels(), 2025, 1, 15.0, [5], [3], gains="channels")


def test_a_subset_of_links_predicts_as_in_the_whole_set():
    # own consistency: LinkSet.subset keeps each link's own antennas, per link and per station alike
    tx = np.array([[50.0, 10.0], [50.0, 12.8], [49.0, 11.0]])
    rx = np.array([[50.0, 12.8], [49.0, 11.0], [50.0, 10.0]])
    rng = np.random.default_rng(6)
    per_link = dataclasses.replace(links(tx, rx), tx_gain_dbi=rng.normal(0, 3, (3, len(FREQS), 91)),
                                   rx_gain_dbi=rng.normal(0, 3, (3, len(FREQS), 91)))
    assert per_link.tx_gain_dbi.dtype == np.float32
    full = predict_month(per_link, channels(), 2025, 1, 15.0)
    part = predict_month(per_link.subset([2, 0]), channels(), 2025, 1, 15.0)
    np.testing.assert_array_equal(part.good_days, full.good_days[[2, 0]])
    np.testing.assert_array_equal(part.grid_margin_db, full.grid_margin_db[[2, 0]])


def test_ground_wave_for_many_frequencies_is_interpolated_within_a_tenth_of_a_db():
    # request candidates come every 25 kHz: the ground wave is then computed on a log grid across
    # them and interpolated; against the exact smooth-earth loss it stays within 0.1 dB
    from planpack.ionosphere import budget, groundwave

    f = np.arange(1.6, 30.0, 0.025)
    d = np.array([5.0, 30.0, 80.0, 145.0, 300.0, 600.0])
    for eps, sig in ((70.0, 5.0), (15.0, 1e-3), (3.0, 1e-4)):
        for vertical in (True, False):
            exact = groundwave.ground_wave_loss_db(d[:, None], f[None, :], eps, sig, vertical)
            fast = budget.ground_wave_basic_loss(d, f, np.full(6, eps), np.full(6, sig), np.full(6, vertical),
                                                 *[np.zeros(6)] * 4)
            seen = np.isfinite(exact) & (exact < 250.0)
            assert np.max(np.abs(exact - fast)[seen]) < 0.1
