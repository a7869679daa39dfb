"""Land and sea along paths, from the GLOBE land mask of the global-land-mask package."""

import numpy as np
import pytest

from geographiclib.geodesic import Geodesic

from planpack.ionosphere import atmospheric, landsea


@pytest.fixture(scope="module")
def grid():
    return landsea.sea_pixel_counts()


def test_reduced_grid_agrees_with_the_packages_own_lookup(grid):
    # source: global-land-mask 1.0.0, globe.is_ocean (the reference library's own answer) at 5000
    # random points; a 0.05 deg cell disagrees only where it straddles a coast: >= 99 % agree
    globe = pytest.importorskip("global_land_mask.globe")
    rng = np.random.default_rng(7)
    lat, lon = rng.uniform(-89.9, 89.9, 5000), rng.uniform(-180.0, 179.99, 5000)
    reference = globe.is_ocean(lat.copy(), lon.copy())
    assert np.mean(landsea.is_sea(lat, lon) == reference) >= 0.99


@pytest.mark.parametrize("place, lat, lon, sea", [
    ("mid North Atlantic", 35.0, -40.0, True), ("central Sahara", 23.0, 10.0, False),
    ("Gulf of Guinea", 2.0, 3.0, True), ("Amazon basin", -5.0, -60.0, False),
    ("Pacific at the date line", 0.0, 180.0, True), ("Pacific at the date line, west", 0.0, -180.0, True),
    ("Antarctic plateau", -85.0, 40.0, False), ("Kansas", 38.5, -98.0, False),
])
def test_known_places(grid, place, lat, lon, sea):
    # source: geography (open data: any atlas)
    assert bool(landsea.is_sea(lat, lon)) is sea, place


def test_sections_sum_to_the_great_circle_length(grid):
    # source: geographiclib's WGS84 geodesic (reference library); the mask sampling uses a
    # 6371 km sphere: lengths agree within 0.6 %
    lat1, lon1 = np.array([51.13, 6.40, 0.0, 60.0, 10.0]), np.array([1.31, 3.40, 179.9, 10.0, 20.0])
    lat2, lon2 = np.array([50.95, 4.90, 0.5, 59.8, 10.0]), np.array([1.85, 1.20, -179.5, 12.0, 20.0])
    length, sea = landsea.path_sections(lat1, lon1, lat2, lon2)
    assert length.shape == sea.shape and length.shape[0] == 5
    total = length.sum(axis=1)
    for i in range(4):
        reference = Geodesic.WGS84.Inverse(lat1[i], lon1[i], lat2[i], lon2[i])["s12"] / 1000.0
        assert total[i] == pytest.approx(reference, rel=0.006)
    assert total[4] == 0.0 or total[4] < 1e-6                       # a zero-length path
    assert np.all(length >= 0) and not np.any(sea & (length == 0))   # padding is land, length 0


def test_a_crossing_of_the_dover_strait_is_mostly_sea(grid):
    # source: geography - Dover to Calais is about 40 km, nearly all of it sea
    length, sea = landsea.path_sections([51.127], [1.313], [50.951], [1.858])
    assert length.sum() == pytest.approx(42.5, abs=1.5)
    assert length[sea].sum() / length.sum() > 0.85


def test_a_coastal_path_has_land_then_sea_sections_and_reverses(grid):
    # source: geography - from inland Ghana (Kumasi) due south to the Gulf of Guinea: land, then sea
    length, sea = landsea.path_sections([6.69], [-1.62], [3.0], [-1.62])
    runs = [(bool(s), float(x)) for s, x in zip(sea[0], length[0]) if x > 0]
    assert runs[0][0] is False and runs[-1][0] is True
    assert runs[0][1] == pytest.approx(185.0, abs=15.0)              # coast at 1.6 W: about 5.0-5.1 N
    back_len, back_sea = landsea.path_sections([3.0], [-1.62], [6.69], [-1.62])
    kept = back_len[0] > 0
    np.testing.assert_allclose(back_len[0][kept], length[0][length[0] > 0][::-1], atol=1.0)
    assert list(back_sea[0][kept]) == list(sea[0][length[0] > 0][::-1])


def test_great_circle_points_cross_the_date_line_and_poles():
    lat, lon = landsea.great_circle_points(0.0, 179.5, 0.0, -179.5, np.array([0.0, 0.5, 1.0]))
    np.testing.assert_allclose(lat, 0.0, atol=1e-9)
    assert abs(abs(lon[1]) - 180.0) < 1e-6 and lon[0] == pytest.approx(179.5) and lon[2] == pytest.approx(-179.5)
    lat, _ = landsea.great_circle_points(80.0, 0.0, 80.0, 180.0, 0.5)
    assert float(lat) == pytest.approx(90.0, abs=1e-6)


def test_bad_step_is_refused():
    with pytest.raises(ValueError, match="step_km"):
        landsea.path_sections([0.0], [0.0], [1.0], [1.0], step_km=0.0)


def test_disk_cache_round_trip_and_a_damaged_cache_is_rebuilt(tmp_path, grid, monkeypatch):
    monkeypatch.setattr(landsea, "_reduce_mask", lambda path: grid.copy())
    landsea._sea_pixel_counts.cache_clear()
    try:
        first = landsea.package_sea_pixel_counts(str(tmp_path))
        files = list(tmp_path.glob("sea-cells-*.npy"))
        assert len(files) == 1 and np.array_equal(first, grid)
        landsea._sea_pixel_counts.cache_clear()
        assert np.array_equal(landsea.package_sea_pixel_counts(str(tmp_path)), grid)
        files[0].write_bytes(b"not a numpy file")
        landsea._sea_pixel_counts.cache_clear()
        assert np.array_equal(landsea.package_sea_pixel_counts(str(tmp_path)), grid)
    finally:
        landsea._sea_pixel_counts.cache_clear()


def test_shipped_grid_is_the_packages_mask_reduced():
    # source: global-land-mask 1.0.0 (NOAA GLOBE): the grid planpack ships must be exactly a fresh
    # reduction of the package's own file, so shipping it changes nothing but the time it takes
    pytest.importorskip("global_land_mask")
    shipped = landsea._shipped_grid()
    assert shipped is not None, f"{landsea.SHIPPED_GRID} is missing or damaged"
    assert np.array_equal(shipped, landsea._reduce_mask(landsea._mask_path()))


def test_missing_package_gives_a_clear_error(monkeypatch):
    monkeypatch.setattr(landsea.importlib.util, "find_spec", lambda name: None)
    with pytest.raises(landsea.LandMaskUnavailable, match="global-land-mask"):
        landsea._mask_path()


def test_the_noise_models_coarse_land_table_matches_the_mask(grid):
    # the 5 deg table in planpack.ionosphere.atmospheric is derived from this mask: every cell
    # within one ninth
    table = np.array([[int(c) for c in row] for row in atmospheric.LAND_NINTHS_5DEG]) / 9.0
    fresh = landsea.coarse_land_fraction(5.0)
    assert table.shape == fresh.shape == (36, 72)
    assert np.max(np.abs(table - fresh)) <= 1.0 / 18.0 + 1e-9


def test_non_finite_positions_are_refused(grid):
    with pytest.raises(ValueError, match="finite"):
        landsea.is_sea(np.nan, 0.0)
    with pytest.raises(ValueError, match="finite"):
        landsea.path_sections([0.0], [0.0], [np.nan], [1.0])
