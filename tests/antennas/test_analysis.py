"""The analysis as the compiler uses it: contract, cache, warnings, errors."""

import json

import numpy as np
import pytest

import os
import pickle

from planpack.antennas import (AntennaDesign, AntennaGeometryError, AntennaInputError, AntennaSolveError,
                               GroundSpec, analyse_antenna, analyse_antennas, analysis, cache_info,
                               clear_cache, isotropic_default_gain_dbi, station_exposure)
from planpack.antennas.analysis import physical_mask
from planpack.bandgrid import GRID_KHZ

GROUND = GroundSpec("medium-dry", "rods")
CHANNELS = (3500.0, 5000.0, 7200.0)


def test_cache_hit_returns_the_same_read_only_result():
    clear_cache()
    d = AntennaDesign("dipole", 5000.0, 10.0)
    a = analyse_antenna(d, GROUND, CHANNELS)
    b = analyse_antenna(AntennaDesign("dipole", 5000.0, 10.0), GroundSpec("medium-dry", "rods"),
                        list(CHANNELS))
    assert a is b
    info = cache_info()
    assert info["hits"] == 1 and info["misses"] == 1 and info["trimmed"] == 1
    with pytest.raises(ValueError):
        a.gain_table_dbi[0, 0] = 0.0
    # A new channel set reuses the trim but solves again.
    analyse_antenna(d, GROUND, (5000.0,))
    assert cache_info() | {} == {"hits": 1, "misses": 2, "size": 2, "trimmed": 1}


def test_batch_in_processes_matches_serial():
    d1 = AntennaDesign("inverted-v", 7000.0, 9.0, apex_deg=120.0)
    d2 = AntennaDesign("whip", None, 0.5, length_m=5.0)
    clear_cache()
    serial = [analyse_antenna(d, GROUND, CHANNELS).to_dict() for d in (d1, d2)]
    clear_cache()
    batch = analyse_antennas([(d1, GROUND, CHANNELS), (d2, GROUND, CHANNELS),
                              (d1, GROUND, CHANNELS)], workers=2)
    assert batch[0] is batch[2]
    assert [a.to_dict() for a in batch[:2]] == serial


def test_to_dict_contract_and_json():
    a = analyse_antenna(AntennaDesign("dipole", 5000.0, 10.0, feed_length_m=20.0,
                                      feed_loss_db_per_100m_at_10mhz=4.5), GROUND, CHANNELS)
    d = a.to_dict(["C1", "C2", "C3"])
    json.dumps(d, allow_nan=False)
    for key in ("kind", "cut", "channels", "pattern", "height_wavelengths", "nvis_window",
                "warnings", "matching", "band"):
        assert key in d
    for key in ("total_m", "leg_m", "rule_of_thumb_total_m", "reflector_m",
                "reflector_below_m"):
        assert key in d["cut"]
    assert d["cut"]["reflector_m"] is None and d["cut"]["reflector_below_m"] is None
    ch = d["channels"][1]
    assert ch["channel"] == "C2" and ch["freq_khz"] == 5000.0
    assert set(ch) >= {"impedance_ohm", "swr", "swr_text", "swr_class", "mismatch_loss_db",
                       "feedline_loss_db", "feedline_loss_with_swr_db", "foldback_db", "set_mismatch_db",
                       "network_loss_db", "ground_loss_db", "system_loss_db", "swr_at_set", "matched",
                       "usable", "loss_note", "pattern"}
    assert len(ch["impedance_ohm"]) == 2 and len(ch["elevation_gain_dbi"]) == 91
    assert set(d["pattern"]) >= {"peak_gain_dbi", "zenith_gain_dbi", "fraction_above_60deg"}
    # Resonant on its design channel; 3:1 and worse on the others, beyond the set's tuner's range.
    assert ch["swr_class"] == "fine"
    assert d["channels"][0]["swr_class"] == "poor" and not d["channels"][0]["matched"]
    # 4.5 dB / 100 m at 10 MHz, 20 m, sqrt(5/10): 0.636 dB.
    assert ch["feedline_loss_db"] == pytest.approx(0.64, abs=0.01)
    # the breakdown adds up to the total
    for c in d["channels"]:
        parts = sum(c[k] for k in ("foldback_db", "set_mismatch_db", "network_loss_db",
                                   "feedline_loss_with_swr_db", "ground_loss_db"))
        assert parts == pytest.approx(c["system_loss_db"], abs=0.03)
        assert c["loss_note"].endswith(".") and f"{c['freq_khz']:g} kHz" in c["loss_note"]
    codes = [(w["code"], w.get("channels")) for w in d["warnings"]]
    assert ("loss-high", ["C1", "C3"]) in codes
    assert d["nvis_window"]["inside"] is True   # 10 m at 5 MHz is 0.167 wavelength
    band = d["band"]
    assert len(band["freq_khz"]) == len(GRID_KHZ) == len(band["system_loss_db"]) == len(band["swr"])
    assert d["matching"]["kind"] == "set-tuner" and d["matching"]["max_swr"] == 3.0


def test_system_gain_subtracts_the_losses():
    a = analyse_antenna(AntennaDesign("dipole", 5000.0, 10.0), GROUND, CHANNELS)
    np.testing.assert_allclose(a.system_gain_table_dbi,
                               a.gain_table_dbi - a.system_loss_db[:, None])
    np.testing.assert_allclose(a.grid_system_gain_table_dbi,
                               a.grid_gain_table_dbi - a.grid_losses.total_db[:, None])
    assert a.gain_table_dbi.shape == (3, 91)
    assert a.grid_gain_table_dbi.shape == (len(GRID_KHZ), 91)


def test_a_badly_cut_antenna_shows_in_the_link_gain():
    good = analyse_antenna(AntennaDesign("dipole", 5000.0, 10.0), GROUND, (5000.0,))
    bad = analyse_antenna(AntennaDesign("dipole", 7000.0, 10.0), GROUND, (5000.0,))
    at_70deg = 70
    assert bad.swr[0] > 3.0
    assert (good.system_gain_table_dbi[0, at_70deg]
            - bad.system_gain_table_dbi[0, at_70deg]) > 3.0


def test_hung_too_high_is_flagged():
    a = analyse_antenna(AntennaDesign("dipole", 7000.0, 15.0), GROUND, (7000.0,))
    assert a.nvis_window["inside"] is False
    assert "outside-nvis-window" in [w["code"] for w in a.warnings]


def test_inverted_v_ends_stay_at_the_minimum_whatever_the_soil():
    # Ends at 2.05 m by the rule of thumb: trimming may not take them lower, over any soil.
    for soil in ("wet", "medium-dry", "sea", "very-dry"):
        a = analyse_antenna(AntennaDesign("inverted-v", 5000.0, 10.3, apex_deg=110.0), GroundSpec(soil), (5000.0,))
        c = a.cut
        drop = (c["total_m"] - 0.3) / 2 * np.cos(np.radians(55.0))
        assert c["end_height_m"] == pytest.approx(10.3 - drop, abs=0.01)
        assert c["end_height_m"] >= 2.0 - 1e-6, soil


@pytest.mark.parametrize("height, apex", [(9.0, 110.0), (8.0, 90.0), (2.17, 170.0), (3.0, 120.0)])
def test_inverted_v_below_the_minimum_is_refused_before_nec(height, apex):
    # Issue 12: legs ending below 2 m (or below ground) are an error, decided from the design alone.
    with pytest.raises(AntennaGeometryError) as err:
        AntennaDesign("inverted-v", 3500.0 if height != 9.0 else 5000.0, height, apex_deg=apex)
    assert err.value.field == "AntennaDesign.height_m"
    text = str(err.value)
    assert "raise the apex to at least" in text and text.endswith(".")


def test_low_dipole_ends_are_a_warning():
    a = analyse_antenna(AntennaDesign("dipole", 7000.0, 1.6), GroundSpec("medium-dry"), (7000.0,))
    w = [w for w in a.warnings if w["code"] == "wire-ends-low"]
    assert w and w[0]["end_height_m"] == pytest.approx(1.6)
    assert w[0]["message"].endswith(".")


def test_errors_survive_a_trip_through_a_worker_process():
    for exc in (AntennaInputError("AntennaDesign.height_m", "a height", 3.0),
                AntennaGeometryError("AntennaDesign.height_m", "It cannot be hung.", 3.0),
                AntennaSolveError("NEC failed")):
        back = pickle.loads(pickle.dumps(exc))
        assert type(back) is type(exc) and str(back) == str(exc)


def _crash_on_whips(design, ground, freqs):
    if design.kind == "whip":
        os._exit(3)  # a crash inside NEC: the process dies with no exception
    return _REAL_ANALYSE(design, ground, freqs)


_REAL_ANALYSE = analysis._analyse_uncached


def test_a_crashing_worker_is_pinned_on_its_antenna(monkeypatch):
    # Worker processes are forked from this one, so the patched solver is theirs too.
    monkeypatch.setattr(analysis, "_analyse_uncached", _crash_on_whips)
    clear_cache()
    whip = AntennaDesign("whip", None, 0.5, length_m=4.5)
    dip = AntennaDesign("dipole", 5100.0, 10.0)
    jobs = [(dip, GROUND, (5100.0,)), (whip, GROUND, (5100.0,)), (dip, GroundSpec("wet"), (5100.0,))]
    out = analyse_antennas(jobs, workers=2, return_exceptions=True)
    assert isinstance(out[1], AntennaSolveError) and "whip" in str(out[1]) and "stopped" in str(out[1])
    assert out[0].kind == "dipole" and out[2].ground.soil == "wet"
    with pytest.raises(AntennaSolveError):
        analyse_antennas(jobs[1:2], isolate=True)


def test_physical_mask_drops_nec_failures_and_their_edges():
    r = np.array([10.0, 10.5, 11.0, 2.0, -20.0, -25.0, 1.5, 13.0, 13.5, 14.0])
    ok = physical_mask(r + 1j)
    assert list(np.flatnonzero(~ok)) == [3, 4, 5, 6]
    smooth = np.geomspace(0.3, 3000.0, 41)  # a whip's or a dipole's R rising steeply is not a failure
    assert physical_mask(smooth + 0j).all()
    # nor are the wide swings of a long wire high in the band, resonances the grid samples coarsely
    swings = np.array([3542.2, 445.2, 135.4, 142.3, 412.0, 2529.8, 723.1, 135.6, 308.9])
    assert physical_mask(swings + 0j).all()


def test_folded_terminated_is_broadband():
    # A terminated folded dipole trades gain for a low SWR across HF
    # (common practice, no source): under 3:1 from 2 to 30 MHz with the
    # 27 m / 800 ohm / 16:1 defaults.
    f = (2000.0, 4000.0, 8000.0, 15000.0, 29000.0)
    a = analyse_antenna(AntennaDesign("folded-terminated", None, 10.0), GROUND, f)
    assert np.all(a.swr < 3.0)
    assert a.cut["leg_m"] is None and a.cut["total_m"] == 27.0
    assert len(a.assumptions) == 4
    # Much of the power goes into the resistor at the low end.
    assert a.peak_gain_dbi[0] < a.peak_gain_dbi[-1] - 10.0


def test_whip_ground_system_and_pattern():
    # Ground-system loss model (ground.py): radials lose less than a rod.
    d = AntennaDesign("whip", None, 0.0, length_m=3.0)
    rods = analyse_antenna(d, GroundSpec("medium-dry", "rods"), (4000.0, 8000.0))
    radials = analyse_antenna(d, GroundSpec("medium-dry", "radials"), (4000.0, 8000.0))
    assert np.all(radials.system_loss_db < rods.system_loss_db)
    # A short whip loses more at the low end, where its radiation resistance is tiny.
    assert rods.system_loss_db[0] > rods.system_loss_db[1]
    # A vertical sends almost nothing straight up: no NVIS antenna.
    assert np.all(rods.zenith_gain_dbi < -30.0)
    assert np.all(rods.fraction_above_60deg < 0.1)
    d2 = rods.to_dict()
    assert d2["matching"]["kind"] == "feedpoint-coupler"  # a whip's default: a coupler at its base
    assert d2["channels"][0]["ground_loss_db"] > 0 and d2["channels"][0]["matched"] is True
    assert "Brown" in d2["ground"]["whip_loss_model"]["model"]
    assert d2["nvis_window"]["applies"] is False


def test_station_exposure_uses_the_worst_channel():
    a = analyse_antenna(AntennaDesign("dipole", 5000.0, 10.0), GROUND, CHANNELS)
    e = station_exposure(a, 100.0, 0.5)
    assert e["general_public_m"] > e["occupational_m"] > 0
    assert "far-field estimate" in e["basis"]


@pytest.mark.parametrize("kwargs, field", [
    (dict(kind="yagi"), "AntennaDesign.kind"),
    (dict(design_khz=None), "AntennaDesign.design_khz"),
    (dict(height_m=-2.0), "AntennaDesign.height_m"),
    (dict(wire_mm=0.0), "AntennaDesign.wire_mm"),
    (dict(transformer_ratio=0.0), "AntennaDesign.transformer_ratio"),
])
def test_bad_design_names_the_field(kwargs, field):
    args = dict(kind="dipole", design_khz=5000.0, height_m=10.0) | kwargs
    with pytest.raises(AntennaInputError) as err:
        AntennaDesign(**args)
    assert err.value.field == field
    assert "expected" in str(err.value)


def test_bad_ground_and_frequencies():
    with pytest.raises(AntennaInputError, match="GroundSpec.soil"):
        GroundSpec("clay", "rods")
    with pytest.raises(AntennaInputError, match=r"freqs_khz\.\[1\]"):
        analyse_antenna(AntennaDesign("dipole", 5000.0, 10.0), GROUND, (5000.0, 45000.0))


def test_isotropic_defaults():
    assert isotropic_default_gain_dbi("dipole") == 0.0
    assert isotropic_default_gain_dbi("whip") < isotropic_default_gain_dbi("folded-terminated")
    with pytest.raises(AntennaInputError):
        isotropic_default_gain_dbi("loop")


def test_nonphysical_nec_solution_is_flagged_not_trusted():
    """NEC-2 (nec2++) returns a negative feed resistance for an inverted-V whose ends come near the ground
    well below its design frequency (measured: about -24 ohm at 2.94 MHz for this one; the thin-wire
    Sommerfeld solution fails for wires low in wavelengths). It must be flagged and counted unusable."""
    r = analyse_antenna(AntennaDesign("inverted-v", 5342, 9.62, apex_deg=110), GroundSpec("medium-dry", "none"),
                        (2900.0, 5342.0))
    flagged = {w["freq_khz"] for w in r.warnings if w["code"] == "solver-unreliable"}
    assert flagged == {2900.0}
    assert r.system_gain_table_dbi[0].max() < -100  # counted as unusable in the link budget
    d = r.to_dict(["A", "B"])
    c0 = d["channels"][0]
    assert c0["usable"] is False and c0["swr_text"] == "not solved" and c0["swr_class"] == "poor"
    assert c0["swr"] == 50.0 and c0["system_loss_db"] == 200.0  # numbers stay numbers for the renderers
    json.dumps(d, allow_nan=False)
