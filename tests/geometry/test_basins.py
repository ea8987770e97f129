"""Basins, islands and coasts: labelling, land classes, Earth's dividing lines, row groups."""

import numpy as np
import pytest
import xarray as xr

from sverdrup_kit.constants import EARTH_RADIUS as R
from sverdrup_kit.geometry.basins import (
    CONTINENT,
    LARGE_ISLAND,
    OCEAN,
    SMALL_ISLAND,
    basin_ids,
    classify_land,
)
from sverdrup_kit.geometry.grid import SphericalGrid
from sverdrup_kit.geometry.lines import label_cells
from sverdrup_kit.geometry.rows import END_COAST, find_groups


def grid(d=2.0):
    return np.arange(-90 + d / 2, 90, d), np.arange(d / 2, 360, d)


def box(lat, lon, lon0, lon1, lat0, lat1):
    la, lo = np.meshgrid(lat, lon, indexing="ij")
    return (lo > lon0) & (lo < lon1) & (la > lat0) & (la < lat1)


def mask_da(ocean, lat, lon):
    return xr.DataArray(ocean, coords={"lat": lat, "lon": lon}, dims=("lat", "lon"))


def test_labels_wrap_across_the_seam_of_a_periodic_grid():
    m = np.zeros((4, 10), dtype=bool)
    m[1:3, :2] = True
    m[1:3, -2:] = True
    _, n_periodic = label_cells(m, periodic=True)
    _, n_regional = label_cells(m, periodic=False)
    assert (n_periodic, n_regional) == (1, 2)


def test_face_and_corner_connectivity():
    # A diagonal pair of cells: two pieces through faces, one through corners.
    m = np.array([[True, False], [False, True]])
    assert label_cells(m, periodic=False)[1] == 2
    assert label_cells(m, periodic=False, diagonal=True)[1] == 1


def test_cut_links_split_components():
    m = np.ones((3, 8), dtype=bool)
    cut = np.zeros_like(m)
    cut[:, 3] = True  # links 3 -> 4
    assert label_cells(m, periodic=True, cut_east=cut)[1] == 1  # still joined round the seam
    cut[:, 7] = True  # links 7 -> 0
    assert label_cells(m, periodic=True, cut_east=cut)[1] == 2


def test_land_classes_by_area():
    lat, lon = grid()
    ocean = box(lat, lon, 0, 100, -50, 50)
    ocean &= ~box(lat, lon, 10, 12, 0, 2)  # one cell at 1N
    ocean &= ~box(lat, lon, 40, 60, 10, 30)  # 10 x 10 cells
    g = SphericalGrid(lat, lon, True)
    cls, _ = classify_land(ocean, g, island_min_area_km2=1e5, continent_min_area_km2=5e6)
    # Derived: a 2 x 2 degree cell at the equator is R^2 dlambda (sin 2 - sin 0) = 4.94e4 km2.
    one = R**2 * np.deg2rad(2) * np.sin(np.deg2rad(2)) / 1e6
    assert one == pytest.approx(4.94e4, rel=1e-3)
    assert cls[np.argmin(abs(lat - 1)), np.argmin(abs(lon - 11))] == SMALL_ISLAND
    # 20 x 20 degrees between 10N and 30N: R^2 (20 deg) (sin 30 - sin 10) = 4.28e6 km2 < 5e6.
    assert cls[np.argmin(abs(lat - 21)), np.argmin(abs(lon - 51))] == LARGE_ISLAND
    assert cls[0, 0] == CONTINENT
    assert cls[np.argmin(abs(lat - 21)), np.argmin(abs(lon - 31))] == OCEAN
    cls2, _ = classify_land(ocean, g, island_min_area_km2=1e5, continent_min_area_km2=4e6)
    assert cls2[np.argmin(abs(lat - 21)), np.argmin(abs(lon - 51))] == CONTINENT


def test_land_cut_by_the_edge_of_a_regional_grid_is_a_continent():
    lat = np.arange(10.5, 40, 1.0)
    lon = np.arange(0.5, 40, 1.0)
    ocean = np.ones((lat.size, lon.size), dtype=bool)
    ocean[:, -1] = False  # one column of land along the eastern edge: tiny, but cut off
    g = SphericalGrid(lat, lon, False)
    cls, _ = classify_land(ocean, g, island_min_area_km2=1e5, continent_min_area_km2=5e6)
    assert np.all(cls[:, -1] == CONTINENT)


def _groups(cls, land, periodic):
    cls = np.asarray(cls)[None, :]
    land = np.asarray(land)[None, :]
    return find_groups(cls == OCEAN, cls, land, np.ones(cls.shape), periodic=periodic)


def test_row_groups_join_runs_across_large_islands_only():
    #            0 1 2 3 4 5 6 7 8 9
    # row:       C w w L w w C w w C      (C continent, L large island, w water)
    cls = np.array([3, 0, 0, 2, 0, 0, 3, 0, 0, 3])
    land = np.array([0, -1, -1, 1, -1, -1, 0, -1, -1, 0])
    g = _groups(cls, land, periodic=False)
    assert g.row.size == 2
    assert g.run_group.tolist() == [0, 0, 1]
    assert (g.k0.tolist(), g.k1.tolist()) == ([1, 7], [6, 9])
    assert g.width.tolist() == [4.0, 2.0]  # water cells only
    assert np.all(g.east == END_COAST) and np.all(g.west == END_COAST)


def test_row_of_water_and_islands_all_round_is_circular():
    cls = np.array([0, 0, 2, 0, 0, 0])
    land = np.array([-1, -1, 0, -1, -1, -1])
    g = _groups(cls, land, periodic=True)
    assert g.row.size == 1 and bool(g.circular[0])


def test_basin_ids_names_and_round_trip():
    lat, lon = grid()
    ocean = box(lat, lon, 0, 60, -40, 60) | box(lat, lon, 150, 230, -40, 60)
    b = basin_ids(mask_da(ocean, lat, lon))
    assert b.attrs["flag_meanings"].split() == ["basin_0", "basin_1"]
    # basin_0 is the larger (80 degrees wide against 60).
    assert int(b.sel(lat=1.0, lon=181.0)) == 0
    assert int(b.sel(lat=1.0, lon=31.0)) == 1
    assert int(b.sel(lat=1.0, lon=101.0)) == -1
    # Another convention gives the same labels.
    lon2 = ((lon + 180) % 360) - 180
    b2 = basin_ids(mask_da(ocean, lat, lon2).sortby("lon"))
    b2 = b2.assign_coords(lon=b2.lon % 360).sortby("lon")
    np.testing.assert_array_equal(b2.values, b.values)


def test_small_island_joins_the_basin_around_it_in_user_masks():
    lat, lon = grid()
    ocean = box(lat, lon, 0, 60, 10, 50)
    ocean &= ~box(lat, lon, 30, 32, 30, 32)
    m = mask_da(ocean, lat, lon)
    b = basin_ids(m, basins={"only": m})
    assert int(b.sel(lat=31.0, lon=31.0)) == 0


@pytest.mark.realdata
def test_earth_basins_on_etopo60(etopo60):
    e = xr.open_dataset(etopo60)
    rose = e[list(e.data_vars)[0]]
    ocean = rose < 0
    b = basin_ids(ocean, basins="earth")
    names = b.attrs["flag_meanings"].split()
    assert names == ["atlantic", "pacific", "indian"]
    lat_name, lon_name = rose.dims

    def at(lon, lat):
        return names[int(b.sel({lon_name: lon, lat_name: lat}, method="nearest"))] if int(
            b.sel({lon_name: lon, lat_name: lat}, method="nearest")) >= 0 else None

    # Points whose ocean everyone agrees on (common knowledge of geography); longitudes are in
    # the file's 20..380 convention.
    assert at(330.5, 26.5) == "atlantic"  # subtropical North Atlantic
    assert at(340.5, -30.5) == "atlantic"
    assert at(200.5, 25.5) == "pacific"  # north of Hawaii
    assert at(260.5, -30.5) == "pacific"
    assert at(80.5, -20.5) == "indian"
    assert at(88.5, 15.5) == "indian"  # Bay of Bengal
    assert at(115.5, 12.5) == "pacific"  # South China Sea
    assert at(125.5, -5.5) == "pacific"  # Banda Sea
    assert at(20.5, 35.5) is None  # Mediterranean (Ionian Sea)
    assert at(0.5 + 360, 80.5) is None  # Arctic
    # The dividing meridians south of the capes.
    assert at(19.5 + 360, -45.5) == "atlantic" and at(20.5, -45.5) == "indian"
    assert at(146.5, -50.5) == "indian" and at(147.5, -50.5) == "pacific"
    assert at(291.5, -60.5) == "pacific" and at(292.5, -60.5) == "atlantic"


def test_row_plan_runs_lie_in_one_row_in_ascending_order():
    # The compiled fused kernel scans row by row (sverdrup_kit._compiled.jit.runs_by_row checks this).
    from sverdrup_kit.geometry.basins import assign_basins, plan_rows

    lat, lon = grid()
    ocean = box(lat, lon, 0, 60, -40, 60) | box(lat, lon, 150, 230, -40, 60)
    ocean |= box(lat, lon, -1, 361, -60, -40)
    ocean &= ~box(lat, lon, 180, 190, 10, 30)
    g = SphericalGrid(lat, lon, True)
    cls, land = classify_land(ocean, g, island_min_area_km2=1e5, continent_min_area_km2=5e6)
    water = cls <= SMALL_ISLAND
    bid, names, coast = assign_basins(None, water, g, None, None, cls, land, min_area=1e5)
    plan = plan_rows(bid, cls, land, g, n_basins=len(names), equatorial=np.abs(lat) < 3,
                     min_width_km=500, coast_e=coast)
    nx = lon.size
    rows = plan.cells // nx
    starts = plan.run_starts
    run_of_cell = np.repeat(np.arange(starts.size), np.diff(np.append(starts, plan.cells.size)))
    assert np.all(rows == rows[starts][run_of_cell])
    assert np.all(np.diff(rows[starts]) >= 0)
    # Each group of runs (a basin row) lies in one row too.
    for k, s0 in enumerate(plan.group_starts):
        s1 = plan.group_starts[k + 1] if k + 1 < plan.group_starts.size else plan.group_runs.size
        assert np.unique(rows[starts[plan.group_runs[s0:s1]]]).size == 1
        assert rows[starts[plan.group_runs[s0]]] == plan.group_slot[k] % lat.size


@pytest.mark.parametrize("step, offset", [(1.0, 0.5), (1.0, 0.0), (2.0, 1.0), (0.5, 0.25)])
def test_dividing_lines_close_at_corners_on_grids_with_centres_on_them(step, offset):
    # Geometry of the grid graph (no outside source needed): two lines that meet at a corner,
    # one down a meridian and one along a parallel and then up another meridian (the
    # Drake-Magellan pair of the Earth basins), divide open water into two pieces on every grid,
    # also where cell centres lie exactly on the lines (centres at x.5 meet 55.5S; at x.0 meet
    # 292E and 290E). Before the lines were moved off the centres, such a grid left a passage
    # at the corner and joined the Atlantic and the Pacific.
    from sverdrup_kit.geometry.grid import SphericalGrid
    from sverdrup_kit.geometry.lines import label_cells, line_cuts

    lat = np.arange(-80.0 + offset, -30.0, step)
    lon = np.arange(offset, 360.0, step)
    grid = SphericalGrid(lat, lon, True, 6.371e6, 7.292e-5, None)
    lines = [[(292.0, -90.0), (292.0, -55.5)],
             [(292.0, -55.5), (290.0, -55.5), (290.0, -40.0)],
             [(250.0, -90.0), (250.0, -40.0)], [(0.0, -40.0), (360.0, -40.0)]]
    cut_e, cut_n = line_cuts(grid, lines)
    water = np.ones((lat.size, lon.size), dtype=bool)
    labels, n = label_cells(water, periodic=True, cut_east=cut_e, cut_north=cut_n)
    j_s = np.argmin(np.abs(lat + 70.0))
    j_n = np.argmin(np.abs(lat + 50.0))
    west = labels[j_s, np.argmin(np.abs(lon - 270.0))]   # between the two meridians, south
    east = labels[j_s, np.argmin(np.abs(lon - 320.0))]   # east of Drake
    assert west != east
    # North of the corner the piece between 250E and 290E is the western one, and the strip
    # between 290E and 292E belongs to the east.
    assert labels[j_n, np.argmin(np.abs(lon - 270.0))] == west
    assert labels[j_n, np.argmin(np.abs(lon - 300.0))] == east
