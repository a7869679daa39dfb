"""Path geometry against geographiclib and Davies' curved-earth geometry."""

import numpy as np
import pytest
from geographiclib.geodesic import Geodesic
from hypothesis import given, settings
from hypothesis import strategies as st

from planpack.ionosphere import geodesy

lat = st.floats(-85, 85)
lon = st.floats(-180, 180)


@settings(max_examples=150, deadline=None)
@given(lat, lon, lat, lon)
def test_inverse_matches_geographiclib(lat1, lon1, lat2, lon2):
    # source: geographiclib 2.x (Karney 2013) as reference; tolerance 1 m, 1e-5 deg
    ref = Geodesic.WGS84.Inverse(lat1, lon1, lat2, lon2)
    d, a1, a2 = geodesy.inverse(lat1, lon1, lat2, lon2)
    assert float(d) * 1000 == pytest.approx(ref["s12"], abs=1.0)
    if ref["s12"] > 1000:
        assert abs((float(a1) - ref["azi1"] + 180) % 360 - 180) < 1e-5
        assert abs((float(a2) - ref["azi2"] + 180) % 360 - 180) < 1e-5


@settings(max_examples=100, deadline=None)
@given(lat, lon, lat, lon)
def test_midpoint_matches_geographiclib(lat1, lon1, lat2, lon2):
    # source: geographiclib InverseLine(...).Position(s12/2); tolerance 0.2 m between the two points
    # (a distance, not degrees: over a pole the longitude of the midpoint is undefined)
    line = Geodesic.WGS84.InverseLine(lat1, lon1, lat2, lon2)
    ref = line.Position(line.s13 / 2)
    mlat, mlon = geodesy.midpoint(lat1, lon1, lat2, lon2)
    assert Geodesic.WGS84.Inverse(float(mlat), float(mlon), ref["lat2"], ref["lon2"])["s12"] < 0.2


def test_vectorised_and_antipodal_fallback():
    # source: geographiclib; nearly antipodal points where Vincenty's iteration fails
    lat1 = np.array([0.0, 50.0, 0.0])
    lon1 = np.array([0.0, 10.0, 0.0])
    lat2 = np.array([0.5, 48.0, 0.0])
    lon2 = np.array([179.7, 12.0, 0.0])
    d, _, _ = geodesy.inverse(lat1, lon1, lat2, lon2)
    for i in range(3):
        ref = Geodesic.WGS84.Inverse(lat1[i], lon1[i], lat2[i], lon2[i])["s12"] / 1000
        assert d[i] == pytest.approx(ref, abs=1e-3)


@pytest.mark.parametrize("hop_km, elevation", [(100, 80.1), (400, 54.8), (1500, 18.0)])
def test_elevation_for_300_km_layer(hop_km, elevation):
    # source: K. Davies, Ionospheric Radio (1990) §6.2 curved-earth geometry; tolerance 0.05 deg
    assert geodesy.elevation_angle_deg(hop_km, 300.0) == pytest.approx(elevation, abs=0.05)


def test_vertical_incidence_limits():
    # source: geometry - a zero-length hop goes straight up and back (2h) with zero incidence
    assert geodesy.elevation_angle_deg(0.0, 300.0) == pytest.approx(90.0, abs=1e-3)
    assert geodesy.slant_range_km(0.0, 300.0) == pytest.approx(600.0, rel=1e-6)
    assert geodesy.incidence_angle_deg(90.0, 300.0) == pytest.approx(0.0, abs=1e-6)


def test_e_layer_serves_to_about_2400_km():
    # common practice, no source: the E layer serves ranges up to about 2400 km;
    # geometry: 110 km layer, ray at the horizon
    assert geodesy.max_hop_km(110.0, 0.0) == pytest.approx(2400, rel=0.03)


def test_hop_count_fewest_equal_hops():
    # source: ITU-R P.533 §5.2, fewest hops that the maximum hop length allows
    assert geodesy.hop_count([10, 2000, 2001, 8000], 2000).tolist() == [1, 1, 2, 4]
