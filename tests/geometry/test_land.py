"""Land bodies: face connectivity, the island table, class overrides, names on the Earth."""

import numpy as np
import pytest
import xarray as xr

from sverdrup_kit.constants import EARTH_RADIUS as R
from sverdrup_kit.geometry.earth import EARTH_LANDMARKS, looks_like_earth
from sverdrup_kit.geometry.land import island_table


def grid(d=2.0):
    return np.arange(-90 + d / 2, 90, d), np.arange(d / 2, 360, d)


def box(lat, lon, lon0, lon1, lat0, lat1):
    la, lo = np.meshgrid(lat, lon, indexing="ij")
    return (lo > lon0) & (lo < lon1) & (la > lat0) & (la < lat1)


def ocean_da(ocean, lat, lon):
    return xr.DataArray(ocean, coords={"lat": lat, "lon": lon}, dims=("lat", "lon"))


def test_land_touching_only_at_a_corner_is_two_bodies_by_default():
    # Two square islands meeting at one corner leave a strait between them (common practice:
    # a grid cell of water is a strait; Davis Strait, the Dover Strait).
    lat, lon = grid()
    land = box(lat, lon, 20, 30, 20, 30) | box(lat, lon, 30, 40, 10, 20)
    t4 = island_table(ocean_da(~land, lat, lon))
    t8 = island_table(ocean_da(~land, lat, lon), land_connectivity=8)
    assert t4.sizes["island"] == 2
    assert t8.sizes["island"] == 1
    with pytest.raises(ValueError, match="land_connectivity"):
        island_table(ocean_da(~land, lat, lon), land_connectivity=6)


def test_island_table_areas_tips_centroids_and_classes():
    lat, lon = grid()
    land = box(lat, lon, 40, 60, 10, 30)            # 10 x 10 cells, 10N-30N
    land |= box(lat, lon, 357, 360, -2, 0) | box(lat, lon, 0, 2, -2, 0)  # across the seam
    t = island_table(ocean_da(~land, lat, lon))
    assert t.sizes["island"] == 2
    big = t.isel(island=0)
    # Derived: R^2 (20 degrees in radians) (sin 30 - sin 10) = 4.28e6 km2.
    want = R**2 * np.deg2rad(20) * (np.sin(np.deg2rad(30)) - np.sin(np.deg2rad(10))) / 1e6
    assert float(big.area_km2) == pytest.approx(want, rel=1e-9)
    assert (float(big.south_lat), float(big.north_lat)) == (11.0, 29.0)
    assert float(big.centroid_lon) == pytest.approx(50.0, abs=1e-9)
    # The area-weighted centroid lies south of the middle latitude (cells shrink poleward).
    assert 19.0 < float(big.centroid_lat) < 20.0
    assert int(big.land_class) == 2 and big.class_source.item() == "area"
    small = t.isel(island=1)
    # One body across the seam of the periodic grid: 2 cells at the equator, 2 x 4.94e4 km2
    # (derived), a small island; centred on 0E.
    assert int(small.n_cells) == 2 and int(small.land_class) == 1
    assert abs((float(small.centroid_lon) + 180) % 360 - 180) < 1e-6
    assert (float(small.west_lon), float(small.east_lon)) == (359.0, 1.0)
    lab = t.land_label
    assert int(lab.sel(lat=21.0, lon=51.0)) == 0 and int(lab.sel(lat=41.0, lon=51.0)) == -1


def test_class_override_by_a_point_and_clear_errors():
    lat, lon = grid()
    land = box(lat, lon, 40, 44, 10, 14)  # 2 x 2 cells: a small island
    m = ocean_da(~land, lat, lon)
    t = island_table(m, land_classes={(42.0, 12.0): "large_island"})
    assert int(t.land_class[0]) == 2 and t.class_source[0].item() == "land_classes argument"
    with pytest.raises(ValueError, match="in the ocean"):
        island_table(m, land_classes={(100.0, 12.0): "large_island"})
    with pytest.raises(KeyError, match="no land body named 'Atlantis'"):
        island_table(m, land_classes={"Atlantis": "continent"})
    with pytest.raises(ValueError, match="expected one of"):
        island_table(m, land_classes={(42.0, 12.0): "peninsula"})


def test_an_invented_world_is_not_taken_for_the_earth():
    lat, lon = grid()
    ocean = ~(box(lat, lon, 0, 60, -60, 60) | box(lat, lon, 180, 240, -60, 60))
    assert not looks_like_earth(ocean, lat, lon, periodic=True)


@pytest.fixture(scope="module")
def earth_tables(etopo60):
    e = xr.open_dataset(etopo60)
    rose = e[list(e.data_vars)[0]]
    one = island_table(rose < 0)
    # The 2 degree majority mask of the test suite (tests/physics/test_sverdrup.py).
    vals = (rose.sortby(rose.dims[0]).values < 0).reshape(90, 2, 180, 2).mean(axis=(1, 3))
    lat2 = np.arange(-89.0, 90.0, 2.0)
    lon2 = rose[rose.dims[1]].values[::2] + 0.5
    two = island_table(xr.DataArray(vals > 0.5, coords={"lat": lat2, "lon": lon2},
                                    dims=("lat", "lon")))
    return {"1 degree": one, "2 degree": two}


def _body(t, name):
    hit = [k for k, marks in enumerate(t.landmarks.values) if name in marks.split(", ")]
    assert len(hit) == 1, (name, hit)
    return t.isel(island=hit[0])


@pytest.mark.realdata
@pytest.mark.parametrize("res", ["1 degree", "2 degree"])
def test_earth_islands_are_islands(earth_tables, res):
    # Times Atlas of the World (from memory): Luzon, Taiwan, Sumatra and Great Britain are
    # islands, and Greenland is not part of North America; narrow straits (Dover, Taiwan,
    # Malacca, Nares) close on 1 and 2 degree grids, so they are split at those straits.
    t = earth_tables[res]
    eurasia = _body(t, "Eurasia")
    for name in ("Luzon", "Taiwan", "Sumatra", "Great Britain"):
        b = _body(t, name)
        assert int(b.island) != int(eurasia.island), name
        assert int(b.land_class) in (1, 2), name
    assert int(_body(t, "Greenland").island) != int(_body(t, "North America").island)
    assert int(_body(t, "Greenland").land_class) == 2
    # Australia (7.7e6 km2) is the smallest continent, Greenland (2.2e6 km2) the largest
    # island (Times Atlas of the World, from memory); within 20% on these grids.
    assert 0.8 < float(_body(t, "Greenland").area_km2) / 2.2e6 < 1.2
    assert int(_body(t, "Australia").land_class) == 3
    assert _body(t, "Madagascar").name.item() == "Madagascar"


@pytest.mark.realdata
def test_a_named_island_cut_by_the_grid_edge_stays_an_island(etopo60):
    # Many ocean products stop at 80N. Greenland (2.2e6 km2, the largest island, Times Atlas
    # of the World, from memory) is then cut by the edge: its size on the grid is a lower
    # bound, not unknown, and it is still an island; an unnamed body cut by the edge (the
    # Antarctic coast on a grid that stops at 80S) stays a continent of unknown size.
    e = xr.open_dataset(etopo60)
    rose = e[list(e.data_vars)[0]]
    lat = rose.dims[0]
    cut = rose.sortby(lat).sel({lat: slice(-80.0, 80.0)})
    t = island_table(cut < 0)
    g = _body(t, "Greenland")
    assert bool(g.cut_by_edge) and int(g.land_class) == 2
    assert "named island" in str(g.class_source.values)
    south = t.isel(island=int(np.argmin(t.south_lat.values)))
    assert bool(south.cut_by_edge) and int(south.land_class) == 3


@pytest.mark.realdata
def test_every_landmark_lies_on_land_of_the_one_degree_relief(etopo60):
    # Each landmark is a point well inside its body (Times Atlas of the World, from memory);
    # on the 1 degree relief its cell must be land.
    e = xr.open_dataset(etopo60)
    rose = e[list(e.data_vars)[0]]
    lat_name, lon_name = rose.dims
    lon = rose[lon_name].values
    for name, (lo, la) in EARTH_LANDMARKS.items():
        lo_file = lon[np.argmin(np.abs((lon - lo + 180) % 360 - 180))]
        h = float(rose.sel({lat_name: la, lon_name: lo_file}, method="nearest"))
        assert h >= 0, (name, h)
