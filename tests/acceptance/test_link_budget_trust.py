"""End-to-end checks of the link budget on plans a planner would write: the tropics at night, a sea
path, a net assigned only high channels. Each plan is in this folder; the geography is real, the
nets are invented."""

from __future__ import annotations

import os
import re

import numpy as np
import pytest

from planpack.compile import compile_plan
from planpack.ionosphere import atmospheric
from planpack.plan import read_plan

HERE = os.path.dirname(os.path.abspath(__file__))


def _plan(name):
    result = read_plan(os.path.join(HERE, name))
    assert result.ok, [d.format() for d in result.diagnostics]
    return result.plan


def _local_hour(h):
    return int(h["local_time"][:2])


def _night_snr(data, lo_mhz=3.0, hi_mhz=3.5, night=(21, 22, 23, 0, 1, 2)):
    out = []
    for link in data["links"]:
        for h in link["hours"]:
            if _local_hour(h) in night:
                out += [c["snr_db"] for c in h["channels"] if lo_mhz <= c["freq_khz"] / 1000 <= hi_mhz]
    return float(np.median(out))


def test_tropical_night_noise_costs_at_least_15_db(monkeypatch):
    """A hub net of 150-250 km links at 5-7 N in August: ITU-R P.372's lightning noise at night there
    is roughly 20-30 dB above rural man-made noise (from memory, the issue's own figure), so the median
    night SNR at 3.0-3.5 MHz must sit at least 15 dB below the man-made-only figure, and check warns."""
    plan = _plan("tropics_august.yaml")
    with_atm = compile_plan(plan)
    quiet = lambda f, lat, lon, month, utc, *a, **k: tuple(  # noqa: E731
        np.broadcast_to(v, np.broadcast_shapes(np.shape(f), np.shape(lat), np.shape(utc))) for v in (-300.0, 1.0, 1.0))
    monkeypatch.setattr(atmospheric, "atmospheric_noise_db", quiet)
    man_made_only = compile_plan(plan)
    drop = _night_snr(man_made_only.data) - _night_snr(with_atm.data)
    assert drop >= 15.0, drop
    assert any(d.code == "atmospheric-noise" for d in with_atm.diagnostics)


def test_sea_path_keeps_its_ground_wave():
    """Two harbours 143 km apart across the English Channel, 8 m whips on base couplers over radials:
    at noon the ground wave carries 2-3 MHz on at least half the days (ITU-R P.368's sea curve stays
    close to the inverse-distance field that far at 2 MHz, from memory)."""
    data = compile_plan(_plan("sea_path.yaml")).data
    (link,) = data["links"]
    noon = next(h for h in link["hours"] if h["local_time"] == "12:00")
    low = [c for c in noon["channels"] if 2.0 <= c["freq_khz"] / 1000 <= 3.0]
    assert len(low) == 4
    for c in low:
        assert c["via"] == "ground", c
        assert c["good_days"] >= 0.5, c


def test_high_channels_only_get_a_night_window_near_3_mhz():
    """Channels 6.8-11 MHz on 130-250 km NVIS links in a mid-latitude January: the night gap's window,
    read off each station's own antennas across the band, lies within 1.5-5.5 MHz and is at least
    100 kHz wide (common practice, no source: a near-vertical net needs about 1.8-4.9 MHz at night)."""
    compiled = compile_plan(_plan("highband_january.yaml"))
    night = [g for g in compiled.data["gaps"] if any(int(t[:2]) in (0, 1, 2, 3, 4) for t in g["local_hours"])]
    assert night
    for g in night:
        assert g["window_mhz"] is not None, g["message"]
        lo, hi = g["window_mhz"]
        assert 1.5 <= lo and hi <= 5.5 and hi - lo >= 0.1, g


@pytest.mark.parametrize("name", ["tropics_august.yaml", "sea_path.yaml", "highband_january.yaml"])
def test_every_gap_message_is_a_whole_sentence(name):
    compiled = compile_plan(_plan(name))
    for g in compiled.data["gaps"]:
        text = g["message"]
        assert text.endswith("."), text
        assert not re.search(r"\bwould\.?$", text), text       # never "a channel ... would" cut short
        assert not re.search(r"between ([\d.]+) and \1 MHz", text), text


@pytest.mark.parametrize("name", ["tropics_august.yaml", "sea_path.yaml", "highband_january.yaml"])
def test_no_swr_of_999_anywhere(name):
    """SWR beyond 50:1 reads "> 50:1" in plan.json's texts and in every message; never 999."""
    compiled = compile_plan(_plan(name))
    for a in compiled.data["antennas"]:
        for c in a["channels"]:
            assert c["swr"] <= 50 and "999" not in c["swr_text"]
    assert not any(re.search(r"\b999(\.0)?:1", d.message) for d in compiled.diagnostics)


def test_dipole_with_a_feedpoint_coupler_loses_little_across_the_band():
    """The issue's figure: a 3.94 MHz dipole with a feed-point coupler was charged 23 dB at 2.31 MHz; an
    automatic coupler at the feed point matches such a wire with a decibel or two (common practice, no
    source). In the tropics plan the 3.9 MHz dipole loses at most 6 dB on every channel 0.5-2.5 f0
    away from full-wave resonance (1.8-2.2 f0)."""
    compiled = compile_plan(_plan("tropics_august.yaml"))
    (a,) = compiled.data["antennas"]
    f0 = a["design_khz"]
    band = a["band"]
    for f, loss in zip(band["freq_khz"], band["system_loss_db"]):
        r = f / f0
        if 0.5 <= r <= 2.5 and not 1.8 <= r <= 2.2:
            assert loss <= 6.0, (f, loss)


def test_auroral_zone_net_is_cautioned():
    """Tromso, Alta and Narvik lie near 67 deg geomagnetic latitude, under the auroral oval (from
    memory); the predictions leave auroral absorption out, so check must say so, once, naming them."""
    diags = compile_plan(_plan("high_latitude_january.yaml")).diagnostics
    (d,) = [d for d in diags if d.code == "high-latitude"]
    assert "auroral zone" in d.message and "polar cap" not in d.message
    assert all(name in d.message for name in ("hub (", "east (", "south ("))
    assert d.key == "stations.hub.at" and d.line > 0


def test_mid_latitude_and_tropical_nets_get_no_high_latitude_caution():
    for name in ("highband_january.yaml", "tropics_august.yaml"):
        diags = compile_plan(_plan(name), cells=False).diagnostics
        assert not [d for d in diags if d.code == "high-latitude"], name


def test_a_station_with_a_whip_and_a_wire_keeps_its_ground_wave():
    """Cebu port control has a dipole and a whip; the harbours 70-130 km away across the sea have whips.
    The station rigs its whip for the ground wave, so by day the sea paths are carried by the ground
    wave on 2-8 MHz (the English Channel check above: ITU-R P.368's sea curve, from memory), and the
    brief tells Cebu to rig the whip on the channels the ground wave carries."""
    data = compile_plan(_plan("island_mixed_antennas.yaml")).data
    for link in data["links"]:
        noon = next(h for h in link["hours"] if h["local_time"] == "12:00")
        by_ground = [c for c in noon["channels"] if c["via"] == "ground"]
        assert by_ground and max(c["good_days"] for c in by_ground) >= 0.5, link["id"]
    cebu = next(s for s in data["stations"] if s["id"] == "cebu")
    rig = {r["channel"]: r for r in cebu["brief"]["antenna_by_channel"]}
    ground_channels = {c["channel"] for link in data["links"] for h in link["hours"]
                       for c in h["channels"] if c["via"] == "ground" and c["channel"] in (h["first"], h["second"])}
    assert ground_channels
    assert any(rig[c]["antenna"] == "base-whip" and "ground wave" in rig[c]["why"] for c in ground_channels)
