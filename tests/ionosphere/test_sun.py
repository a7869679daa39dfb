"""Solar position and sunrise/sunset against astral 3.2."""

import datetime as dt

import numpy as np
import pytest
from astral import Observer
from astral import sun as asun

from planpack.ionosphere import sun

UTC = dt.timezone.utc
PLACES = [(50.1, 8.7), (-33.9, 151.2), (64.1, -21.9), (1.3, 103.8), (40.7, -74.0)]
WHEN = [dt.datetime(2025, m, 15, h, 30, tzinfo=UTC) for m in (1, 4, 6, 10) for h in (0, 7, 12, 19)]


@pytest.mark.parametrize("lat, lon", PLACES)
def test_zenith_matches_astral(lat, lon):
    # source: astral 3.2 astral.sun.zenith (NOAA algorithm), no refraction; tolerance 0.05 deg
    obs = Observer(latitude=lat, longitude=lon)
    for t in WHEN:
        ref = asun.zenith(obs, t, with_refraction=False)
        got = sun.solar_zenith_deg(lat, lon, t.year, t.month, t.day, t.hour + t.minute / 60)
        assert float(got) == pytest.approx(ref, abs=0.05)


def _hours(t):
    return t.hour + t.minute / 60 + t.second / 3600


@pytest.mark.parametrize("lat, lon", PLACES)
def test_sunrise_sunset_match_astral(lat, lon):
    # source: astral 3.2 sunrise/sunset (elevation -0.833 deg); tolerance 2 minutes
    obs = Observer(latitude=lat, longitude=lon)
    for month in (1, 3, 6, 9, 12):
        date = dt.date(2025, month, 15)
        rise, set_ = sun.sunrise_sunset(lat, lon, date)
        ref_rise = _hours(asun.sunrise(obs, date, tzinfo=UTC))
        ref_set = _hours(asun.sunset(obs, date, tzinfo=UTC))
        assert abs((rise - ref_rise + 12) % 24 - 12) < 2 / 60
        assert abs((set_ - ref_set + 12) % 24 - 12) < 2 / 60


def test_polar_night_and_day_return_none():
    # source: astral raises for no sunrise; 78 N has polar night in December, midnight sun in June
    assert sun.sunrise_sunset(78.2, 15.6, dt.date(2025, 12, 15)) == (None, None)
    assert sun.sunrise_sunset(78.2, 15.6, dt.date(2025, 6, 15)) == (None, None)
    _, _, polar_day = sun.sun_times_utc(78.2, 15.6, dt.date(2025, 6, 15))
    assert bool(polar_day)


def test_vectorised_zenith_shape():
    z = sun.solar_zenith_deg(np.array([[10.0], [50.0]]), np.array([[0.0], [0.0]]), 2025, 3, 20,
                             np.arange(24.0)[None, :])
    assert z.shape == (2, 24)
    # source: equinox noon at latitude 50 deg: zenith about 50 deg (geometry)
    assert z[1, 12] == pytest.approx(50.0, abs=0.6)
