"""Centred-dipole geomagnetic latitude (planpack.ionosphere.geomagnetic)."""

import numpy as np
import pytest

from planpack.ionosphere import geomagnetic as gm


def test_pole_and_equator_of_the_dipole():
    # Spherical trigonometry: the dipole pole is at 90 deg, its antipode at -90, and a point
    # 90 deg of arc from the pole along its meridian at 0.  Tolerance 1e-9 deg.
    assert gm.dipole_latitude_deg(gm.DIPOLE_POLE_LAT_DEG, gm.DIPOLE_POLE_LON_DEG) == pytest.approx(90.0, abs=1e-9)
    assert gm.dipole_latitude_deg(-gm.DIPOLE_POLE_LAT_DEG, gm.DIPOLE_POLE_LON_DEG + 180.0) == pytest.approx(-90.0, abs=1e-9)
    assert gm.dipole_latitude_deg(gm.DIPOLE_POLE_LAT_DEG - 90.0, gm.DIPOLE_POLE_LON_DEG) == pytest.approx(0.0, abs=1e-9)


def test_known_sites():
    # Geomagnetic (dipole) latitudes as commonly quoted, from memory, within 1.5 deg:
    # Tromso about 67 N (under the auroral oval), Kiruna about 65 N, London about 54 N,
    # Singapore about -8 (south of the geomagnetic equator in Asia).
    sites = {(69.65, 18.96): 67.0, (67.86, 20.23): 65.0, (51.5, -0.13): 54.0, (1.35, 103.8): -8.0}
    for (lat, lon), want in sites.items():
        assert gm.dipole_latitude_deg(lat, lon) == pytest.approx(want, abs=1.5), (lat, lon)


def test_vectorised_and_zones():
    got = gm.dipole_latitude_deg(np.array([69.65, 48.2]), np.array([18.96, 16.37]))
    assert got.shape == (2,)
    assert gm.zone(got[0]) == "auroral zone" and gm.zone(got[1]) is None
    assert gm.zone(-78.0) == "polar cap" and gm.zone(59.9) is None
