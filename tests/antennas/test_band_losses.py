"""Losses from the set to the antenna across the band: the checks of issue 11, with their sources.

Antennas are solved on the shared band grid and on their channels; between
solved frequencies the feed impedance is interpolated and the losses are
computed at the exact frequency.
"""

import numpy as np
import pytest

from planpack.antennas import AntennaDesign, AntennaInputError, GroundSpec, analyse_antenna, matching
from planpack.bandgrid import GRID_KHZ

F0 = 3940.0  # the issue's dipole
MEDIUM = GroundSpec("medium-dry")


@pytest.fixture(scope="module")
def coupled_dipole():
    d = AntennaDesign("dipole", F0, 12.0, matching="feedpoint-coupler", feed_length_m=20.0,
                      feed_loss_db_per_100m_at_10mhz=3.5)
    return analyse_antenna(d, MEDIUM, (2310.0, 3200.0, F0, 6900.0))


def test_the_issue_dipole_is_no_longer_charged_a_cliff(coupled_dipole):
    # Issue 11 measured 23 dB at 2.31 MHz, 12.6 dB at 3.2 MHz and 14 dB at 6.9 MHz with a threshold
    # model; an automatic coupler at the feed point matches such a wire with a decibel or two of loss
    # (the issue; common practice, no source).
    loss = dict(zip(coupled_dipole.freqs_khz, coupled_dipole.system_loss_db))
    assert loss[2310.0] < 4.0 and loss[3200.0] < 2.0 and loss[6900.0] < 2.0 and loss[F0] < 1.0
    assert np.all(coupled_dipole.matched)
    assert np.all(coupled_dipole.losses.foldback_db < 1e-9)


@pytest.mark.parametrize("f0, height, soil", [(F0, 12.0, "medium-dry"), (7000.0, 8.0, "wet"),
                                               (5300.0, 10.0, "very-dry")])
def test_half_wave_dipole_with_a_feed_point_coupler_across_half_to_two_and_a_half_f0(f0, height, soil):
    # Issue 11, done-when: a centre-fed half-wave dipole with a feed-point coupler loses at most 6 dB on
    # every frequency from 0.5 to 2.5 times its design frequency except 1.8-2.2 times (full-wave
    # resonance), and a few dB typically.  Checked on 401 frequencies in 0.5 % steps, interpolated
    # between solved ones, and exactly on channels every 0.25 f0.
    ratios = np.round(np.arange(0.5, 2.5001, 0.25), 2)
    a = analyse_antenna(AntennaDesign("dipole", f0, height, matching="feedpoint-coupler"), GroundSpec(soil),
                        tuple(float(r * f0) for r in ratios))
    away = (ratios < 1.8) | (ratios > 2.2)
    assert np.all(a.system_loss_db[away] <= 6.0), a.system_loss_db
    fine = np.linspace(0.5, 2.5, 401)
    figs = a.figures_at(fine * f0)
    keep = (fine < 1.8) | (fine > 2.2)
    loss = figs.losses.total_db
    assert np.all(loss[keep] <= 6.0), loss[keep].max()
    assert np.median(loss[keep]) <= 3.0
    # continuous: no step between neighbouring frequencies
    assert np.max(np.abs(np.diff(loss))) < 0.5


def test_short_whip_with_a_base_coupler_is_inefficient_by_physics_not_by_a_cliff():
    # Issue 11: a 3 m whip with a base coupler at 2-3 MHz is inefficient because of its radiation
    # resistance and its ground loss, not because of a matching cliff.  The radiation resistance of a
    # short monopole is 40 pi^2 (h / lambda)^2 ohm (Balanis, Antenna Theory, ch. 4, short dipole over a
    # ground plane): under 0.3 ohm here; NEC's feed resistance adds copper loss.
    d = AntennaDesign("whip", None, 0.5, length_m=3.0, matching="feedpoint-coupler")
    for system, r_g in (("radials", 8.0), ("rods", 35.0)):
        a = analyse_antenna(d, GroundSpec("medium-dry", system), (2000.0, 2500.0, 3000.0))
        L = a.losses
        r = a.impedance_ohm.real
        assert np.all(r < 1.5)
        assert np.all(L.within_range)                                  # the coupler matches it
        np.testing.assert_allclose(L.foldback_db + L.set_mismatch_db, 0.0, atol=1e-6)  # no cliff
        np.testing.assert_allclose(L.ground_loss_db, 10 * np.log10((r + r_g) / r), rtol=1e-9)
        assert np.all(L.ground_loss_db > 9.0)
        assert np.all(a.system_loss_db > 14.0)
        # the rest is the coupler's coil, which must cancel a reactance of thousands of ohms
        assert np.all(np.abs(a.impedance_ohm.imag) > 1500.0)
        assert np.all(L.network_loss_db > 1.0)
        # and it falls smoothly as the frequency rises (the radiation resistance grows as f^2)
        sweep = a.figures_at(np.linspace(2000.0, 3000.0, 201)).losses.total_db
        assert np.all(np.diff(sweep) < 0) and np.max(np.abs(np.diff(sweep))) < 0.1
    assert "ground system" in a.loss_note(0) and "radiation resistance" in a.loss_note(0)


def test_a_whip_takes_every_matching_and_none_keeps_the_mismatch_alone():
    base = dict(kind="whip", design_khz=None, height_m=0.5, length_m=5.0)
    g = GroundSpec("wet", "counterpoise")
    assert AntennaDesign(**base).matching == "feedpoint-coupler"
    res = {m: analyse_antenna(AntennaDesign(**base, matching=m), g, (4000.0,)) for m in matching.MATCHING_KEYS}
    none = res["none"].losses
    assert none.network_loss_db[0] == 0.0 and none.set_mismatch_db[0] > 10.0 and not none.within_range[0]
    assert res["feedpoint-coupler"].system_loss_db[0] < res["wide-tuner"].system_loss_db[0] <= \
        res["set-tuner"].system_loss_db[0] + 1e-9 < res["none"].system_loss_db[0]


def test_set_tuner_at_the_radio_end_sees_the_line_input():
    # A wide-range tuner at the set matches what the line presents there: the line's loss with the
    # antenna's SWR on it is charged, and moving the match to the feed point saves most of it.
    kw = dict(kind="dipole", design_khz=F0, height_m=12.0, feed_length_m=40.0, feed_loss_db_per_100m_at_10mhz=6.0)
    at_set = analyse_antenna(AntennaDesign(**kw, matching="wide-tuner"), MEDIUM, (6000.0,))
    at_feed = analyse_antenna(AntennaDesign(**kw, matching="feedpoint-coupler"), MEDIUM, (6000.0,))
    assert at_set.losses.feedline_loss_db[0] > at_set.feedline_loss_db[0] + 1.0
    assert at_feed.losses.feedline_loss_db[0] == pytest.approx(at_feed.feedline_loss_db[0], abs=0.01)
    assert at_feed.system_loss_db[0] < at_set.system_loss_db[0] - 1.0


def test_band_grid_and_interpolation(coupled_dipole):
    a = coupled_dipole
    np.testing.assert_allclose(a.grid_khz, GRID_KHZ, atol=1e-3)  # bandgrid.grid_khz() rounds to 0.001 kHz
    # exact at the solved frequencies: the channels and the grid
    at_ch = a.figures_at(a.freqs_khz)
    np.testing.assert_allclose(at_ch.system_gain_table_dbi, a.system_gain_table_dbi, atol=1e-9)
    at_grid = a.figures_at(a.grid_khz)
    np.testing.assert_allclose(at_grid.system_gain_table_dbi, a.grid_system_gain_table_dbi, atol=1e-9)
    # between solved frequencies the impedance lies between its neighbours' (PCHIP: no overshoot), and
    # so does the gain
    sk, z, g = a.solved_khz, a.solved_impedance_ohm, a.solved_gain_table_dbi
    mid = np.sqrt(sk[:-1] * sk[1:])
    f = a.figures_at(mid)
    lo, hi = np.minimum(z.real[:-1], z.real[1:]), np.maximum(z.real[:-1], z.real[1:])
    assert np.all((f.impedance_ohm.real >= lo - 1e-9) & (f.impedance_ohm.real <= hi + 1e-9))
    assert np.all(f.gain_table_dbi >= np.minimum(g[:-1], g[1:]) - 1e-9)
    assert np.all(f.gain_table_dbi <= np.maximum(g[:-1], g[1:]) + 1e-9)
    with pytest.raises(AntennaInputError, match="freqs_khz"):
        a.figures_at([1000.0])
