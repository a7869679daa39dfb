"""The band sweep: Sommerfeld-Norton at anchors, the reflection-coefficient ground corrected between them.

The reference is NEC-2's own Sommerfeld-Norton ground (nec2++ through PyNEC)
solved at every frequency, as the antennas were solved before the sweep.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from planpack.antennas import analysis, bandsweep, geometry, pattern, solver
from planpack.antennas.design import AntennaDesign, GroundSpec
from planpack.antennas.layout import builder, layout
from planpack.antennas.trim import TOLERANCE_M, _bracketed, trim_to_resonance
from planpack.antennas.trust import physical_mask
from planpack.bandgrid import grid_khz

GRID = grid_khz()
STEP = math.log(GRID[1] / GRID[0])
CHANNELS = (2300.0, 3200.0, 5400.0, 6900.0)
ELEVATIONS = (50, 70, 90)

# Three antennas whose grounds matter: an inverted-v whose leg ends hang low (NEC-2 fails at its lowest
# frequencies), a reflector 2 m over the soil, and a dipole 9 m over wet ground.
CASES = {
    "inverted-v": (AntennaDesign("inverted-v", 3400.0, 13.0, apex_deg=120.0, matching="feedpoint-coupler"),
                   GroundSpec("medium-dry", "none")),
    "dipole-reflector": (AntennaDesign("dipole-reflector", 4466.0, 12.0, matching="feedpoint-coupler"),
                         GroundSpec("medium-dry", "none")),
    "dipole": (AntennaDesign("dipole", 4600.0, 9.0, matching="feedpoint-coupler"), GroundSpec("wet", "none")),
}


def test_anchors_hold_every_exact_frequency_and_leave_no_wider_gap():
    got = bandsweep.anchors(CHANNELS + (4466.0,), GRID, steps=3)
    assert set(CHANNELS) <= set(got) and GRID[0] in got and GRID[-1] in got
    gaps = np.diff(np.log(got))
    assert gaps.max() <= 3 * STEP * (1 + 1e-9)
    # channels stand in for grid points: fewer grid anchors than with no channels at all
    bare = bandsweep.anchors((), GRID, steps=3)
    assert len(bare) == 15  # grid points 0, 3, ..., 39 and the last
    assert len(set(got) - set(CHANNELS) - {4466.0}) < len(bare)
    assert bandsweep.anchors(CHANNELS, GRID) == bandsweep.anchors(tuple(reversed(CHANNELS)), GRID)


def test_anchors_keep_a_channel_below_the_grid():
    got = bandsweep.anchors((1200.0,), GRID, steps=3)
    assert got[0] == 1200.0 and got[1] == GRID[0]


@pytest.fixture(scope="module")
def swept():
    """Each case: its analysis, and NEC's Sommerfeld-Norton solution at every grid point."""
    out = {}
    for name, (d, g) in CASES.items():
        a = analysis.analyse_antenna(d, g, CHANNELS)
        model = analysis.solved_model(d, g, CHANNELS)
        z, gains = solver.solve(model, g.soil, GRID, pattern=True)
        out[name] = (a, model, z, gains)
    return out


@pytest.mark.parametrize("name", sorted(CASES))
def test_the_sweep_agrees_with_sommerfeld_norton_at_every_grid_point(swept, name):
    # Reference: NEC-2 Sommerfeld-Norton (GN 2) at every grid point up to 12 MHz.  Tolerance: the gain
    # less the losses from the set, at 50, 70 and 90 degrees elevation, within 0.2 dB at the 95th
    # percentile and 0.3 dB at worst (measured: 0.14 and 0.18 dB for the inverted-v).
    a, _, z, gains = swept[name]
    grid = np.asarray(GRID)
    ok = physical_mask(z)
    exact = pattern.summary(gains)["table_dbi"] - a.chain(np.where(ok, z, np.nan + 0j), grid).total_db[:, None]
    mine = a.grid_system_gain_table_dbi
    use = ok & (grid <= 12000.0)
    assert use.sum() >= 20
    err = np.abs(mine[use][:, ELEVATIONS] - exact[use][:, ELEVATIONS])
    assert np.percentile(err, 95) <= 0.2
    assert err.max() <= 0.3


@pytest.mark.parametrize("name", sorted(CASES))
def test_the_sweep_keeps_the_zones_where_nec_fails(swept, name):
    a, _, z, _ = swept[name]
    mine = a.solved_trusted[np.isin(a.solved_khz, GRID)]
    assert np.array_equal(mine, physical_mask(z))
    if name == "inverted-v":
        # its leg ends 2.5 m up: NEC-2's Sommerfeld ground fails at 1.7-2.0 MHz, and so must the sweep
        assert not mine.all() and mine[0]


def test_the_sweep_solves_sommerfeld_norton_at_under_half_the_frequencies():
    d, g = CASES["dipole"]
    s = bandsweep.sweep(analysis.solved_model(d, g, CHANNELS), g.soil, CHANNELS + (4600.0,), GRID)
    assert all(s.sommerfeld[s.freqs_khz.index(f)] for f in CHANNELS)
    assert s.sommerfeld.sum() < len(s.freqs_khz) / 2


def test_a_reflector_is_solved_in_full_around_its_resonance():
    d, g = CASES["dipole-reflector"]
    lo, hi = analysis._parasitic_bands(d, d.design_khz)[0]
    s = bandsweep.sweep(analysis.solved_model(d, g, CHANNELS), g.soil, CHANNELS + (d.design_khz,), GRID,
                        dense_khz=((lo, hi),))
    inside = [i for i, f in enumerate(s.freqs_khz) if lo <= f <= hi]
    assert len(inside) >= 3 and all(s.sommerfeld[i] for i in inside)


@pytest.mark.parametrize("soil, bonded", [("perfect", False), ("free-space", False), ("medium-dry", True)])
def test_grounds_without_sommerfeld_tables_are_solved_directly(soil, bonded):
    model = geometry.dipole(30.0, 8.0, 0.001, 1.0) if not bonded else geometry.whip(3.0, 0.0, 0.005, 0.3)
    s = bandsweep.sweep(model, soil, (3000.0,), GRID[:5], bonded_vertical=bonded)
    assert s.sommerfeld.all()
    z, _ = solver.solve(model, soil, s.freqs_khz, bonded_vertical=bonded)
    assert np.allclose(s.impedance_ohm, z)


def test_a_coarse_pattern_is_exact_at_its_own_points_and_interpolates_power_between():
    g = np.full((1, solver.COARSE_N_THETA, solver.COARSE_N_PHI), 3.0)
    g[0, 1, 0] = 0.0           # theta 2 deg, phi 0
    g[0, -1, :] = -999.99      # NEC's floor at the horizon
    full = solver.expand_coarse(g)
    assert full.shape == (1, solver.N_THETA, solver.N_PHI)
    assert full[0, 2, 0] == pytest.approx(0.0) and full[0, 0, 0] == pytest.approx(3.0)
    # theta 1 deg, phi 0: halfway in power between 3 dB and 0 dB
    assert full[0, 1, 0] == pytest.approx(10 * math.log10((10 ** 0.3 + 1.0) / 2))
    assert (full[0, -1, :] <= solver.NEC_FLOOR_DB).all()
    assert full[0, -2, 0] == pytest.approx(10 * math.log10(10 ** 0.3 / 2))  # half the power of its neighbour


@pytest.mark.parametrize("name", ["dipole", "inverted-v", "dipole-reflector"])
def test_the_seeded_trim_finds_brents_length_in_fewer_solves(name):
    d, g = CASES[name]
    lay = layout(d, g)
    seg = analysis._segment_m(d, CHANNELS)
    build = builder(d, seg, lay.radius_m, lay.apex_deg, lay.spacing_m, lay.resistor_ohm, lay.reflector_height_m)
    rule = lay.trim.length_m
    seeded = trim_to_resonance(build, g.soil, d.design_khz, rule * 1.03)
    brent = _bracketed(build, g.soil, d.design_khz, rule * 1.03, False, float("inf"), {})
    assert seeded.resonant and brent.resonant
    assert abs(seeded.length_m - brent.length_m) <= 2 * TOLERANCE_M
    assert seeded.solves <= 3 < brent.solves


def _dipole_over_wet():
    d, g = CASES["dipole"]
    return analysis.solved_model(d, g, CHANNELS), g.soil


def test_when_the_cheap_ground_fails_sommerfeld_norton_solves_every_frequency(monkeypatch):
    model, soil = _dipole_over_wet()
    real = bandsweep.solve

    def failing(*args, reflection_ground=False, **kwargs):
        if reflection_ground:
            raise solver.AntennaSolveError("NEC failed")
        return real(*args, **kwargs)

    monkeypatch.setattr(bandsweep, "solve", failing)
    s = bandsweep.sweep(model, soil, CHANNELS, GRID)
    assert s.sommerfeld.all()
    z, _ = real(model, soil, s.freqs_khz)
    assert np.allclose(s.impedance_ohm, z)


def test_a_corrected_impedance_that_is_not_physical_is_solved_instead(monkeypatch):
    model, soil = _dipole_over_wet()
    real = bandsweep.solve
    broken = GRID[10]  # not an anchor: between channels and grid anchors

    def cheap_goes_wrong(m, s, freqs, *args, reflection_ground=False, **kwargs):
        z, g = real(m, s, freqs, *args, reflection_ground=reflection_ground, **kwargs)
        if reflection_ground:
            z = np.array(z)
            z[list(freqs).index(broken)] = -500.0 + 0j
        return z, g

    monkeypatch.setattr(bandsweep, "solve", cheap_goes_wrong)
    s = bandsweep.sweep(model, soil, CHANNELS, GRID)
    i = s.freqs_khz.index(broken)
    assert s.sommerfeld[i] and s.impedance_ohm[i].real > 0
    assert np.isclose(s.impedance_ohm[i], real(model, soil, (broken,))[0][0])
