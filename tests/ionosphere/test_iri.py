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


def test_foF2_and_m3000_are_linear_in_r12_and_saturate():
    # source: ITU-R P.1239-3 §2 - the maps for R12 = 0 and 100, linear in R12 between and beyond them,
    # held at R12 = 160 above it (saturation level from memory); tolerance 1e-9 relative
    lat, lon, hours = [50.0, -20.0], [10.0, 30.0], [0.0, 6.5, 12.0]
    at = {r: iri.monthly_ionosphere(lat, lon, 2025, 4, r, utc_hours=hours) for r in (0.0, 40.0, 100.0, 160.0, 250.0)}
    for name in ("foF2_mhz", "m3000f2"):
        lo, hi = getattr(at[0.0], name), getattr(at[100.0], name)
        np.testing.assert_allclose(getattr(at[40.0], name), 0.6 * lo + 0.4 * hi, rtol=1e-9)
        np.testing.assert_allclose(getattr(at[160.0], name), lo + 1.6 * (hi - lo), rtol=1e-9)
        np.testing.assert_allclose(getattr(at[250.0], name), getattr(at[160.0], name), rtol=1e-12)
    assert iri.solar_weight(250.0) == iri.solar_weight(160.0) == pytest.approx(1.6)


def test_hmF2_is_pyiri_bse1979():
    # source: PyIRI 0.1.7 hm_IRI (IRI's BSE-1979 option) at its own two solar levels; tolerance 1e-9
    from PyIRI import main_library as ml

    m3000 = np.array([[[3.1, 2.9], [2.6, 2.4]]])                 # (time, point, solar level)
    foF2 = np.array([[[5.0, 8.0], [3.0, 12.0]]])
    foE = np.array([[[2.5, 3.2], [0.6, 3.9]]])
    modip = np.array([55.0, -10.0])
    hm, _, _ = ml.hm_IRI(m3000, foE, foF2, modip, np.array([0.0, 100.0]))
    for k, ig in enumerate((0.0, 100.0)):
        r12 = float(ml.IG12_2_R12(ig))
        got = iri.hmF2_bse1979_km(m3000[..., k], foF2[..., k], foE[..., k], modip, r12)
        np.testing.assert_allclose(got, hm[..., k], rtol=1e-9)


def test_foE_follows_the_sample_time_and_the_solar_flux():
    # source: PyIRI 0.1.7 foE (NeQuick form) at the same effective zenith angle and flux Phi(R12)
    # (P.1239 eq. 1 as PyIRI R12_2_F107); tolerance 1e-9
    from PyIRI import main_library as ml

    from planpack.ionosphere import sun

    hours = np.array([6.0, 6.5, 7.0, 12.0])
    m = iri.monthly_ionosphere([45.0], [10.0], 2025, 1, 120.0, utc_hours=hours)
    chi = sun.solar_zenith_deg(45.0, 10.0, 2025, 1, 15, hours)
    ref = ml.foE(1, ml.solzen_effective(chi), np.array([45.0]), float(ml.R12_2_F107(120.0)))
    np.testing.assert_allclose(m.foE_mhz[0], np.ravel(ref), rtol=1e-9)
    np.testing.assert_allclose(m.solar_zenith_deg[0], chi)
    assert m.foE_mhz[0, 2] > m.foE_mhz[0, 0]          # the E layer grows through the dawn hour
