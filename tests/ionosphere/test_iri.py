"""The PyIRI wrapper: shapes, interpolation and physical ranges."""

import numpy as np
import pytest

from planpack.ionosphere import iri, muf


@pytest.fixture(scope="module")
def jan():
    lat = np.array([50.0, 35.0, -30.0, 60.0])
    lon = np.array([10.0, -100.0, 140.0, 25.0])
    return {r: iri.monthly_ionosphere(lat, lon, 2025, 1, r) for r in (10.0, 100.0)}


def test_shapes(jan):
    m = jan[10.0]
    assert m.foF2_mhz.shape == (4, 24) and m.fH_mhz.shape == (4,)


def test_ionosphere_spans_50_to_400_km(jan):
    # common practice, no source: the ionosphere spans roughly 50 to 400 km
    for m in jan.values():
        hr = muf.reflection_height_km(m.m3000f2)
        assert np.all((m.hmF2_km > 150) & (m.hmF2_km < 450))
        assert np.all((hr > 150) & (hr < 450))


def test_foF2_rises_with_solar_activity_by_day(jan):
    # source: CCIR maps (P.1239) - foF2 grows with the solar index
    noon = slice(10, 14)
    assert np.all(jan[100.0].foF2_mhz[0, noon] > jan[10.0].foF2_mhz[0, noon])


def test_gyrofrequency_range(jan):
    # source: IGRF-13 - 22..65 uT at the surface, so fH at 300 km is roughly 0.6..1.7 MHz
    assert np.all((jan[10.0].fH_mhz > 0.5) & (jan[10.0].fH_mhz < 1.8))


def test_wrapper_foE_agrees_with_p1239_at_noon(jan):
    # source: ITU-R P.1239 foE formula vs PyIRI foE (NeQuick form) through the wrapper,
    # daytime points with chi < 80 deg; tolerance 12 % (two different published fits)
    from planpack.ionosphere import sun

    m = jan[100.0]
    lat = np.array([50.0, 35.0, -30.0, 60.0])
    decl, _ = sun.declination_and_equation_of_time(sun.julian_day(2025, 1, 15, 12.0))
    day = m.solar_zenith_deg < 80
    ref = muf.foE_p1239_mhz(lat[:, None], m.solar_zenith_deg, decl, muf.phi_from_r12(100.0))
    assert day.sum() > 10
    np.testing.assert_allclose(m.foE_mhz[day], ref[day], rtol=0.12)


def test_f107_round_trip():
    # source: ITU-R P.1239 eq. 1 and its inverse in PyIRI
    assert iri.r12_from_f107(iri.f107_from_r12(80.0)) == pytest.approx(80.0, abs=1e-6)


def test_bad_inputs_are_clear():
    with pytest.raises(ValueError, match="month"):
        iri.monthly_ionosphere([0.0], [0.0], 2025, 13, 10)
    with pytest.raises(ValueError, match="R12"):
        iri.monthly_ionosphere([0.0], [0.0], 2025, 1, -5)
