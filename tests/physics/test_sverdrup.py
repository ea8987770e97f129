"""Sverdrup transport against analytic solutions, hand-checked worlds and observations."""

import warnings

import dask
import dask.array as da
import numpy as np
import pytest
import xarray as xr

from sverdrup_kit.constants import EARTH_RADIUS as R
from sverdrup_kit.constants import OMEGA, RHO0
from sverdrup_kit.physics.ekman import DEFAULT_EQUATORIAL_HALF_WIDTH
from sverdrup_kit.physics.sverdrup import sverdrup_transport

from .._dask_guard import CountingScheduler

# ------------------------------------------------------------------------------------------
# Small invented worlds on a global grid
# ------------------------------------------------------------------------------------------


def grid(d=2.0):
    return np.arange(-90 + d / 2, 90, d), np.arange(d / 2, 360, d)


def box(lat, lon, lon0, lon1, lat0, lat1):
    la, lo = np.meshgrid(lat, lon, indexing="ij")
    return (lo > lon0) & (lo < lon1) & (la > lat0) & (la < lat1)


def field(values, lat, lon, units="Pa"):
    return xr.DataArray(values, coords={"lat": lat, "lon": lon}, dims=("lat", "lon"),
                        attrs={"units": units})


# A zonal stress linear in latitude, tau_x = A + B lat (lat in degrees), tau_y = 0.
A, B = -0.15, 0.005


def linear_stress(ocean, lat, lon):
    tx = np.where(ocean, A + B * lat[:, None] + 0 * lon[None, :], np.nan)
    ty = np.where(ocean, 0.0, np.nan)
    return field(tx, lat, lon), field(ty, lat, lon)


def v_linear(lat):
    """Sverdrup V (m2 s-1) of the linear stress, derived by hand.

    curl tau = -(1 / (R cos phi)) d(tau_x cos phi)/d phi = -(B' - tau_x tan phi) / R with
    B' = B * 180 / pi per radian; V = curl tau / (rho0 beta), beta = 2 Omega cos phi / R.
    """
    phi = np.deg2rad(lat)
    curl = -(B * 180 / np.pi - (A + B * lat) * np.tan(phi)) / R
    return curl / (RHO0 * 2 * OMEGA * np.cos(phi) / R)


def dx(lat, d=2.0):
    return R * np.cos(np.deg2rad(lat)) * np.deg2rad(d)


def row(ds, lat, basin=0):
    return ds.isel(basin=basin).sel(lat=lat)


# ------------------------------------------------------------------------------------------
# Closed form
# ------------------------------------------------------------------------------------------


def test_closed_basin_matches_the_sverdrup_relation_within_one_percent():
    # Derived from the Sverdrup relation: for tau_x = -tau0 cos(pi (phi - phi_s)/(phi_n - phi_s))
    # and tau_y = 0 on the sphere, curl tau = -(1/(R cos phi)) d(tau_x cos phi)/d phi
    #   = -(tau0 / (R cos phi)) [k sin(k (phi - phi_s)) cos phi + cos(k (phi - phi_s)) sin phi],
    # k = pi / (phi_n - phi_s); the interior transport is curl tau / (rho0 beta) times the
    # width R cos phi (lambda_e - lambda_w) of a basin between two meridians.
    lat, lon = grid(0.5)
    ocean = box(lat, lon, 0, 60, 15, 55)
    tau0, ps, pn = 0.1, np.deg2rad(15), np.deg2rad(55)
    k = np.pi / (pn - ps)
    phi = np.deg2rad(lat)
    tx = np.where(ocean, -tau0 * np.cos(k * (phi - ps))[:, None] + 0 * lon, np.nan)
    ds = sverdrup_transport(field(tx, lat, lon), field(np.where(ocean, 0.0, np.nan), lat, lon))
    curl = -(tau0 / (R * np.cos(phi))) * (
        k * np.sin(k * (phi - ps)) * np.cos(phi) + np.cos(k * (phi - ps)) * np.sin(phi)
    )
    exact = curl / (RHO0 * 2 * OMEGA * np.cos(phi) / R) * R * np.cos(phi) * np.deg2rad(60) / 1e6
    inside = (lat > 15) & (lat < 55)
    got = ds.interior_transport.isel(basin=0).values[inside]
    scale = np.abs(exact[inside]).max()
    assert np.all(np.isfinite(got))
    np.testing.assert_allclose(got, exact[inside], atol=0.01 * scale)
    # The eastern coast is the meridian 60E, the western boundary 0E.
    assert np.allclose(ds.eastern_coast_lon.isel(basin=0).values[inside], 60.0)
    assert np.allclose(ds.western_coast_lon.isel(basin=0).values[inside] % 360, 0.0)
    # The interior transport changes sign where curl tau = 0 (derived: k tan(k (phi - phi_s))
    # = -tan(phi)), found here by bisection.
    def f(p):
        return k * np.sin(k * (p - ps)) * np.cos(p) + np.cos(k * (p - ps)) * np.sin(p)

    lo_, hi_ = np.deg2rad(40), np.deg2rad(54.9)
    for _ in range(60):
        mid = 0.5 * (lo_ + hi_)
        lo_, hi_ = (mid, hi_) if f(mid) * f(lo_) > 0 else (lo_, mid)
    gyre = ds.gyre_boundary_lat.isel(basin=0).values
    assert int(ds.gyre_boundary_count.isel(basin=0)) == 1
    assert gyre[0] == pytest.approx(np.rad2deg(lo_), abs=0.1)


def test_reference_value_sverdrup_transport_at_30n():
    # Derived from Sverdrup (1947), PNAS 33, 318-326, V = curl/(rho0 beta): curl = 1e-7 N/m3
    # at 30N gives 4.92 m2/s, about 24.6 Sv per 5000 km.
    # A field tau_y = a * lambda has curl a / (R cos phi) and tau_x = 0.
    lat = np.arange(20.0, 40.1, 1.0)
    lon = np.arange(0.5, 60, 1.0)
    a = 1e-7 * R * np.cos(np.deg2rad(30.0))
    ty = field(a * np.deg2rad(lon)[None, :] * np.ones((lat.size, 1)), lat, lon)
    # A regional grid: land columns at both ends give the basin its coasts.
    ty[:, [0, -1]] = np.nan
    ds = sverdrup_transport(0 * ty, ty, min_width_km=0)
    v = ds.sverdrup_northward_transport.sel(lat=30.0).isel(lon=slice(2, -2))
    assert float(v.mean()) == pytest.approx(4.92, rel=2e-3)
    width = float(R * np.cos(np.deg2rad(30)) * np.deg2rad(58))
    assert float(row(ds, 30.0).interior_transport) == pytest.approx(4.92 * width / 1e6, rel=3e-3)


# ------------------------------------------------------------------------------------------
# Conservation and the discretisation of the streamfunction
# ------------------------------------------------------------------------------------------


@pytest.fixture(scope="module")
def world():
    """Two basins and a gulf behind a peninsula, north of a circumpolar channel."""
    lat, lon = grid()
    ocean = (
        box(lat, lon, 0, 80, -40, 60)
        | box(lat, lon, 150, 230, -40, 60)
        | box(lat, lon, -1, 361, -60, -40)
    )
    ocean &= ~box(lat, lon, 20, 26, 20, 40)  # peninsula
    ocean &= ~box(lat, lon, 0, 26, 36, 40)  # its neck
    ocean &= ~box(lat, lon, 180, 190, 10, 30)  # a large island
    ocean &= ~box(lat, lon, 210, 212, 44, 46)  # a small island
    rng = np.random.default_rng(1)
    la = lat[:, None] + 0 * lon
    tx = -0.1 * np.cos(np.deg2rad(3 * la)) + 0.01 * rng.standard_normal(la.shape)
    ty = 0.01 * rng.standard_normal(la.shape)
    ocean_da = field(ocean, lat, lon, units="1")
    return (field(np.where(ocean, tx, np.nan), lat, lon),
            field(np.where(ocean, ty, np.nan), lat, lon), ocean_da)


def test_interior_transport_and_western_faces_match_the_analytic_zonal_integral(world):
    # The interior transport against an independent zonal integral of the analytic curl
    # (v_linear, derived by hand above) over the cells each basin row counts, and the
    # streamfunction at the western face of each run against minus that run's integral, and at
    # its eastern face against zero (Sverdrup 1947, the relation in the module notes). The
    # world has two basins, a gulf behind a peninsula (a marginal sea), a large island that
    # splits rows into runs, a small island crossed by the integral and a circumpolar channel.
    lat, lon = grid()
    ocean = world[2].values.astype(bool)
    # The scan itself: without island constants every run starts at zero on its eastern face
    # (with them, see tests/physics/test_island_rule.py).
    ds = sverdrup_transport(*linear_stress(ocean, lat, lon), island_rule=False)
    psi = ds.sverdrup_streamfunction.values
    checked = runs_checked = 0
    for b in range(ds.sizes["basin"]):
        for j in np.flatnonzero(ds.row_status.values[b] == 0):
            counted = (ds.basin_id.values[j] == b) & (ds.integration_class.values[j] == 1)
            cells = np.flatnonzero(counted)
            v, d = v_linear(lat[j]), dx(lat[j])
            expected = v * d * cells.size / 1e6
            # A quarter of one cell's transport (measured: 0.15 at most, from one-sided
            # differences of the curl beside southern and northern coasts), so a cell too many
            # or too few, or a face off by half a cell, fails.
            tol = 0.25 * max(abs(v_linear(lat[j] + s)) for s in (-2, 0, 2)) * d / 1e6
            assert float(ds.interior_transport[b, j]) == pytest.approx(expected, abs=tol)
            checked += 1
            for run in np.split(cells, np.flatnonzero(np.diff(cells) > 1) + 1):
                e, w = run[-1], run[0]
                assert psi[j, e] + v * d / 2 / 1e6 == pytest.approx(0, abs=tol)
                assert psi[j, w] - v * d / 2 / 1e6 == pytest.approx(-v * d * run.size / 1e6,
                                                                   abs=tol)
                runs_checked += 1
    assert checked > 50 and runs_checked > checked


# ------------------------------------------------------------------------------------------
# Coast logic, each in a small world with a hand-checked answer
# ------------------------------------------------------------------------------------------


def test_large_island_splits_the_row_and_small_island_is_crossed():
    lat, lon = grid()
    ocean = box(lat, lon, 0, 80, 10, 60)
    ocean &= ~box(lat, lon, 30, 40, 26, 36)  # 5 x 5 cells, about 1.1e6 km2: a large island
    ocean &= ~box(lat, lon, 60, 62, 44, 46)  # 1 cell, about 3.5e4 km2: a small island
    ds = sverdrup_transport(*linear_stress(ocean, lat, lon), island_rule=False)
    assert ds.sizes["basin"] == 1
    # Hand count: 40 cells across the basin; the large island takes 5 of them at 31N; the
    # small island at 45N is crossed with interpolated stress (exact for a stress linear in
    # latitude, whose four-neighbour mean is its own value), so all 40 count there.
    for la, n_cells in ((31.0, 35), (45.0, 40), (21.0, 40)):
        expected = v_linear(la) * dx(la) * n_cells / 1e6
        assert float(row(ds, la).interior_transport) == pytest.approx(expected, rel=5e-3)
        assert int(row(ds, la).row_status) == 0
    # Without the island rule the streamfunction restarts at zero on the island's western
    # coast (face at 30E).
    r = ds.sel(lat=31.0)
    v29 = float(r.sverdrup_northward_transport.sel(lon=29.0))
    assert float(r.sverdrup_streamfunction.sel(lon=29.0)) == pytest.approx(-v29 * dx(31.0) / 2 / 1e6,
                                                                  rel=1e-12)
    assert np.all(r.integration_class.sel(lon=slice(30, 40)).values == 0)
    assert int(ds.integration_class.sel(lat=45.0, lon=61.0)) == 1
    assert np.isfinite(float(ds.sverdrup_northward_transport.sel(lat=45.0, lon=61.0)))


def test_gulf_behind_a_peninsula_is_marginal_and_not_counted():
    lat, lon = grid()
    ocean = box(lat, lon, 0, 80, 10, 60)
    ocean &= ~box(lat, lon, 20, 26, 20, 40)  # peninsula, 20-26E from 20N
    ocean &= ~box(lat, lon, 0, 26, 36, 40)  # joined to the western continent at 36-40N
    ds = sverdrup_transport(*linear_stress(ocean, lat, lon))
    assert ds.sizes["basin"] == 1  # the gulf (about 3.6e6 km2) is a marginal sea
    # Hand count: the open basin at 21-35N is 26-80E, 27 cells; the gulf 0-20E is excluded.
    for la in (21.0, 27.0, 35.0):
        expected = v_linear(la) * dx(la) * 27 / 1e6
        assert float(row(ds, la).interior_transport) == pytest.approx(expected, rel=5e-3)
        assert float(row(ds, la).western_coast_lon) == pytest.approx(26.0)
        assert np.all(ds.integration_class.sel(lat=la, lon=slice(0, 20)).values == 2)
    # South of the peninsula the row is open from 80E to 0E: 40 cells.
    assert float(row(ds, 15.0).interior_transport) == pytest.approx(
        v_linear(15.0) * dx(15.0) * 40 / 1e6, rel=5e-3)
    # The gulf has its own streamfunction from its own eastern coast, the peninsula at 20E.
    g = ds.sel(lat=27.0)
    assert float(g.sverdrup_streamfunction.sel(lon=19.0)) == pytest.approx(
        -float(g.sverdrup_northward_transport.sel(lon=19.0)) * dx(27.0) / 2 / 1e6, rel=1e-12)


def test_circumpolar_channel_rows_have_no_eastern_coast():
    lat, lon = grid()
    ocean = box(lat, lon, -1, 361, -60, -40) | box(lat, lon, 0, 80, -40, -10)
    ds = sverdrup_transport(*linear_stress(ocean, lat, lon))
    chan = (lat > -60) & (lat < -40)
    status = ds.row_status.values
    rows_with_channel = status[:, chan]
    # Every basin that holds the channel flags its rows; none reports a number there.
    assert np.all((rows_with_channel == 2) | (rows_with_channel == 4))
    assert np.any(rows_with_channel == 2)
    assert np.all(np.isnan(ds.interior_transport.values[:, chan]))
    assert np.all(np.isnan(ds.sverdrup_streamfunction.values[chan]))
    assert "no_eastern_coast" in ds.row_status.attrs["flag_meanings"].split()
    basin_rows = (lat > -40) & (lat < -10)
    b = int(np.flatnonzero((status[:, basin_rows] == 0).any(axis=1))[0])
    expected = v_linear(-25.0) * dx(-25.0) * 40 / 1e6
    assert float(row(ds, -25.0, b).interior_transport) == pytest.approx(expected, rel=5e-3)


def test_two_oceans_joined_south_of_their_continents_are_separate_basins(world):
    ds = sverdrup_transport(world[0], world[1])
    bid = ds.basin_id
    west = int(bid.sel(lat=21.0, lon=51.0))
    east = int(bid.sel(lat=21.0, lon=201.0))
    assert west >= 0 and east >= 0 and west != east
    # The gulf (0-20E, 20-36N) stays with the western ocean as a marginal sea.
    assert int(bid.sel(lat=27.0, lon=11.0)) == west
    assert int(ds.integration_class.sel(lat=27.0, lon=11.0)) == 2


def test_equatorial_band_rows_are_left_empty_with_the_reason():
    lat, lon = grid()
    ocean = box(lat, lon, 0, 80, -20, 20)
    ds = sverdrup_transport(*linear_stress(ocean, lat, lon))
    assert DEFAULT_EQUATORIAL_HALF_WIDTH == 3.0  # one default with ekman
    band = np.abs(lat) < 3.0
    assert np.all(ds.row_status.values[0, band] == 1)
    assert np.all(np.isnan(ds.interior_transport.values[0, band]))
    assert np.all(np.isnan(ds.sverdrup_northward_transport.values[band]))
    assert np.all(ds.row_status.values[0, (np.abs(lat) > 3) & (np.abs(lat) < 20)] == 0)
    assert "equatorial_band" in ds.interior_transport.attrs["comment"]


def test_too_narrow_rows_are_left_empty():
    lat, lon = grid()
    ocean = box(lat, lon, 0, 80, 10, 40) | box(lat, lon, 0, 4, 40, 50)  # a 2-cell strait
    ds = sverdrup_transport(*linear_stress(ocean, lat, lon))
    assert int(row(ds, 45.0).row_status) == 3
    assert np.isnan(float(row(ds, 45.0).interior_transport))


def test_open_western_end_is_flagged_for_user_basins():
    lat, lon = grid()
    ocean = box(lat, lon, 0, 80, 10, 40)
    tx, ty = linear_stress(ocean, lat, lon)
    basins = {"east": [(40, 0), (90, 0), (90, 50), (40, 50)],
              "west": [(-10, 0), (40, 0), (40, 50), (-10, 50)]}
    ds = sverdrup_transport(tx, ty, basins=basins)
    assert list(ds.basin.values) == ["east", "west"]
    # The east basin ends at 40E on the west basin's water: no western coast.
    assert np.all(ds.row_status.sel(basin="east", lat=slice(11, 39)).values == 5)
    # The west basin starts at 40E on the east basin's water: no eastern coast.
    assert np.all(ds.row_status.sel(basin="west", lat=slice(11, 39)).values == 2)


# ------------------------------------------------------------------------------------------
# Gaps in the stress and masks from topography
# ------------------------------------------------------------------------------------------


def test_stress_gap_on_the_eastern_coast_is_filled_from_a_topographic_mask():
    lat, lon = grid()
    ocean = box(lat, lon, 0, 60, 10, 50)
    tx, ty = linear_stress(ocean, lat, lon)
    ship = ocean & ~box(lat, lon, 56, 60, 10, 50)  # the coastal column was never observed
    tx_s, ty_s = tx.where(ship), ty.where(ship)
    mask = field(ocean, lat, lon, units="1")
    ds = sverdrup_transport(tx_s, ty_s, ocean_mask=mask)
    # The coast is the mask's (60E), the stress of the gap extrapolated from the west
    # (common practice for ship-based climatologies); 30 cells count.
    assert float(row(ds, 31.0).eastern_coast_lon) == pytest.approx(60.0)
    exp = v_linear(31.0) * dx(31.0) * 30 / 1e6
    assert float(row(ds, 31.0).interior_transport) == pytest.approx(exp, rel=5e-3)
    # Without the mask the coast moves one cell west.
    ds2 = sverdrup_transport(tx_s, ty_s)
    assert float(row(ds2, 31.0).eastern_coast_lon) == pytest.approx(56.0)
    # With fill_gaps=False the gap stays missing and spoils its rows.
    ds3 = sverdrup_transport(tx_s, ty_s, ocean_mask=mask, fill_gaps=False)
    assert np.isnan(float(row(ds3, 31.0).interior_transport))


def test_a_month_with_a_missing_cell_is_filled():
    lat, lon = grid()
    ocean = box(lat, lon, 0, 60, 10, 50)
    tx, ty = linear_stress(ocean, lat, lon)
    tx3 = xr.concat([tx, tx, tx], dim="time")
    ty3 = xr.concat([ty, ty, ty], dim="time")
    tx3[1, 40, 10] = np.nan  # 31N, 21E unobserved in one month
    ds = sverdrup_transport(tx3, ty3)
    full = sverdrup_transport(tx, ty)
    # Exact for a stress linear in latitude (four-neighbour mean = own value).
    np.testing.assert_allclose(ds.interior_transport.isel(time=1), full.interior_transport,
                               rtol=1e-12, equal_nan=True)


# ------------------------------------------------------------------------------------------
# Longitude conventions, latitude order, leading dimensions, chunks, laziness
# ------------------------------------------------------------------------------------------


def _to_convention(obj, kind):
    lon = obj.lon.values
    if kind == "0..360":
        return obj
    if kind == "-180..180":
        return obj.assign_coords(lon=((lon + 180) % 360) - 180).sortby("lon")
    if kind == "20..380":
        return obj.assign_coords(lon=np.where(lon < 20, lon + 360, lon)).sortby("lon")
    if kind == "descending lat":
        return obj.isel(lat=slice(None, None, -1))
    if kind == "descending lon":
        return obj.isel(lon=slice(None, None, -1))
    raise ValueError(kind)


@pytest.mark.parametrize("kind", ["-180..180", "20..380", "descending lat", "descending lon"])
def test_same_answers_for_every_longitude_convention_and_latitude_order(world, kind):
    ref = sverdrup_transport(world[0], world[1])
    tx, ty = (_to_convention(a, kind) for a in world[:2])
    ds = sverdrup_transport(tx, ty)
    assert list(ds.lon.values) == list(tx.lon.values)
    assert list(ds.lat.values) == list(tx.lat.values)
    got = ds.sortby("lat")
    np.testing.assert_allclose(got.interior_transport, ref.interior_transport, rtol=1e-12,
                               atol=1e-12, equal_nan=True)
    np.testing.assert_array_equal(got.row_status, ref.row_status)
    for name in ("eastern_coast_lon", "western_coast_lon"):
        a, b = got[name].values % 360, ref[name].values % 360
        np.testing.assert_allclose(a, b, atol=1e-9, equal_nan=True)
    back = got.assign_coords(lon=got.lon.values % 360).sortby("lon")
    np.testing.assert_allclose(back.sverdrup_streamfunction, ref.sverdrup_streamfunction, rtol=1e-12,
                               atol=1e-12, equal_nan=True)
    np.testing.assert_array_equal(back.basin_id, ref.basin_id)


def _stack_time(a, n=4):
    scale = xr.DataArray(np.linspace(0.5, 1.5, n), dims="time")
    return (a * scale).transpose("time", "lat", "lon").assign_attrs(units="Pa")


def test_dask_chunks_over_time_and_longitude_give_the_same_answers_lazily(world):
    tx, ty, mask = world
    tx4, ty4 = _stack_time(tx), _stack_time(ty)
    ref = sverdrup_transport(tx4, ty4, ocean_mask=mask)
    counter = CountingScheduler()
    with dask.config.set(scheduler=counter):
        lazy = sverdrup_transport(tx4.chunk({"time": 1, "lon": 45}), ty4.chunk({"time": 3, "lon": 30}),
                        ocean_mask=mask)
        assert counter.calls == 0
        for name in ("sverdrup_streamfunction", "interior_transport", "gyre_boundary_lat"):
            assert isinstance(lazy[name].data, da.Array)
        got = lazy.compute()
    assert counter.calls > 0
    for name in ("sverdrup_northward_transport", "sverdrup_streamfunction", "interior_transport",
                 "boundary_current_transport", "gyre_boundary_lat", "wind_stress_curl"):
        np.testing.assert_allclose(got[name], ref[name], rtol=1e-12, atol=1e-15,
                                   equal_nan=True)
    # Linear in the stress: each time step is the scaled single-field answer.
    single = sverdrup_transport(tx, ty, ocean_mask=mask)
    np.testing.assert_allclose(got.interior_transport.isel(time=0),
                               0.5 * single.interior_transport, rtol=1e-12, equal_nan=True)


def test_leading_member_dimension_passes_through(world):
    tx, ty, mask = world
    txm = xr.concat([tx, 2 * tx], dim="member").assign_attrs(units="Pa")
    tym = xr.concat([ty, 2 * ty], dim="member").assign_attrs(units="Pa")
    ds = sverdrup_transport(txm, tym, ocean_mask=mask)
    assert ds.interior_transport.dims == ("member", "basin", "lat")
    assert ds.sverdrup_streamfunction.dims == ("member", "lat", "lon")
    np.testing.assert_allclose(ds.interior_transport.isel(member=1),
                               2 * ds.interior_transport.isel(member=0), equal_nan=True)


def test_stress_in_dyn_cm2_is_converted(world):
    tx, ty, mask = world
    a = sverdrup_transport(tx, ty)
    b = sverdrup_transport((tx * 10).assign_attrs(units="dyn/cm2"), (ty * 10).assign_attrs(units="dyn/cm2"))
    np.testing.assert_allclose(a.interior_transport, b.interior_transport, rtol=1e-12,
                               equal_nan=True)


def test_inputs_are_not_modified_and_metadata_is_complete(world):
    tx, ty, mask = world
    before = tx.copy(deep=True)
    ds = sverdrup_transport(tx, ty)
    xr.testing.assert_identical(tx, before)
    assert ds.sverdrup_streamfunction.attrs["units"] == "1e6 m3 s-1"
    assert ds.interior_transport.attrs["units"] == "1e6 m3 s-1"
    assert ds.sverdrup_northward_transport.attrs["units"] == "m2 s-1"
    assert ds.wind_stress_curl.attrs["units"] == "N m-3"
    for name, var in ds.data_vars.items():
        assert "long_name" in var.attrs, name
    assert list(ds.row_status.attrs["flag_values"]) == list(range(12))


# ------------------------------------------------------------------------------------------
# User-supplied basins and bad input
# ------------------------------------------------------------------------------------------


def test_masks_polygons_and_basin_numbers_agree_with_automatic_basins(world):
    tx, ty, _ = world
    auto = sverdrup_transport(tx, ty)
    names = list(auto.basin.values)
    masks = {n: auto.basin_id == k for k, n in enumerate(names)}
    by_mask = sverdrup_transport(tx, ty, basins=masks)
    by_ids = sverdrup_transport(tx, ty, basins=auto.basin_id)
    assert list(by_ids.basin.values) == names
    for ds in (by_mask, by_ids):
        np.testing.assert_allclose(ds.interior_transport, auto.interior_transport,
                                   equal_nan=True)
    west = int(auto.basin_id.sel(lat=21.0, lon=51.0))
    poly = {"w": [(-10, -41), (100, -41), (100, 70), (-10, 70)]}
    ds = sverdrup_transport(tx, ty, basins=poly)
    np.testing.assert_allclose(ds.interior_transport.sel(basin="w", lat=slice(-39, 59)),
                               auto.interior_transport.isel(basin=west).sel(lat=slice(-39, 59)),
                               equal_nan=True)
    # The same polygon in -180..180 longitudes on a -180..180 grid.
    ds2 = sverdrup_transport(_to_convention(tx, "-180..180"), _to_convention(ty, "-180..180"),
                   basins=poly)
    np.testing.assert_allclose(ds2.interior_transport, ds.interior_transport, equal_nan=True)
    # Basin numbers on 0..360 applied to stress on -180..180 (and descending latitude): the
    # mask is matched point by point modulo 360, not rejected or interpolated.
    moved = [_to_convention(f, "-180..180").isel(lat=slice(None, None, -1)) for f in (tx, ty)]
    ds3 = sverdrup_transport(*moved, basins=auto.basin_id)
    np.testing.assert_allclose(ds3.interior_transport.sortby("lat"), auto.interior_transport,
                               equal_nan=True)
    with pytest.raises(ValueError, match="reindex_like"):
        sverdrup_transport(tx, ty, basins=auto.basin_id.assign_coords(lon=auto.lon + 0.5))


def test_bad_input_raises_errors_that_name_the_argument(world):
    tx, ty, mask = world
    with pytest.raises(ValueError, match="basins"):
        sverdrup_transport(tx, ty, basins="atlantis")
    with pytest.raises(TypeError, match="basins"):
        sverdrup_transport(tx, ty, basins=42)
    with pytest.raises(ValueError, match="rho0"):
        sverdrup_transport(tx, ty, rho0=-1.0)
    with pytest.raises(ValueError, match="continent_min_area"):
        sverdrup_transport(tx, ty, island_min_area_km2=1e6, continent_min_area_km2=1e5)
    with pytest.raises(ValueError, match="ocean_mask"):
        sverdrup_transport(tx, ty, ocean_mask=mask.isel(lon=slice(0, 10)))
    with pytest.raises(ValueError, match="overlap"):
        sverdrup_transport(tx, ty, basins={"a": mask.astype(bool), "b": mask.astype(bool)})
    with pytest.raises(ValueError, match="polygon"):
        sverdrup_transport(tx, ty, basins={"a": [(0, 0), (1, 1)]})
    with pytest.raises(TypeError, match="taux"):
        sverdrup_transport(tx.values, ty)


# ------------------------------------------------------------------------------------------
# Real data: the COADS climatology
# ------------------------------------------------------------------------------------------


def _etopo_mask_on(grid_da, etopo_path):
    """Ocean where more than half of the four 1-degree ETOPO60 cells in a 2-degree cell lie
    below sea level (common practice: majority rule; a tie is land so that one-column
    peninsulas such as Florida survive)."""
    e = xr.open_dataset(etopo_path)
    rose = e[list(e.data_vars)[0]]
    rose = rose.sortby(rose.dims[0])
    frac = (rose.values < 0).reshape(90, 2, 180, 2).mean(axis=(1, 3))
    assert np.allclose(rose[rose.dims[1]].values[::2] + 0.5, grid_da.lon.values)
    return xr.DataArray(frac > 0.5, dims=("lat", "lon"),
                        coords={"lat": grid_da.lat, "lon": grid_da.lon})


def _gyre_boundary(t, lat):
    """The subtropical-subpolar boundary: north of the subtropical minimum (15-40N), the first
    latitude where the three-row running mean of the interior transport turns positive."""
    sm = np.convolve(t, np.ones(3) / 3, mode="same")
    sub = (lat > 15) & (lat < 40)
    j0 = np.flatnonzero(sub)[np.argmin(t[sub])]
    for j in range(j0, lat.size - 1):
        if sm[j] < 0 <= sm[j + 1]:
            return lat[j] + (lat[j + 1] - lat[j]) * sm[j] / (sm[j] - sm[j + 1])
    return np.nan


def _coads_sverdrup(path, etopo_path, *, use_wind_speed):
    from sverdrup_kit.io.readers import open_winds
    from sverdrup_kit.physics.stress import wind_stress

    with warnings.catch_warnings():
        # The year-0 time axis and the monthly-mean-wind bias warn; the bias is part of the
        # tolerance below.
        warnings.simplefilter("ignore")
        w = open_winds(path)
        speed = w["wind_speed"] if use_wind_speed else None
        st = wind_stress(w["u"], w["v"], drag_law="large-pond-1981", wind_speed=speed)
        mean = st.mean("time")
    mask = _etopo_mask_on(mean, etopo_path)
    return sverdrup_transport(mean["taux"], mean["tauy"], basins="earth", ocean_mask=mask).compute()


@pytest.mark.realdata
@pytest.mark.slow
@pytest.mark.parametrize("use_wind_speed", [False, True], ids=["vector-mean", "scalar-speed"])
def test_coads_sverdrup_transport_in_the_northern_subtropical_gyres(marine_climatology,
                                                                    etopo60, use_wind_speed):
    # Stress of the annual cycle: Large & Pond (1981) on each month's mean wind, either
    # |u| u from the monthly vector mean or |U| u with the monthly scalar-mean speed U.
    ds = _coads_sverdrup(marine_climatology, etopo60, use_wind_speed=use_wind_speed)
    assert list(ds.basin.values) == ["atlantic", "pacific", "indian"]
    atl = ds.interior_transport.sel(basin="atlantic")
    pac = ds.interior_transport.sel(basin="pacific")
    # 26.5N lies between the 25N and 27N rows of the 2 degree grid: interpolate linearly.
    atl_26 = float(atl.interp(lat=26.5))
    # RAPID array 26.5N 2004-22 means (RAPID-MOCHA public time series): upper mid-ocean
    # -18.1 Sv; Schmitz & Richardson (1991), Deep-Sea Res. 38: about 13 Sv of the Florida
    # Current is overturning return flow, so the wind-driven part of the
    # Florida Current 31.3 - ~13 = ~18 Sv. The Sverdrup interior should be southward and of
    # that size. Tolerance +-50% (9 to 27 Sv): monthly-mean winds underestimate the stress by
    # up to ~20% (Rosen & Ponte 2003), an effective Cd is good to ~10% (Trenberth et al.
    # 1989), RAPID's own spread is +-3.5 Sv, and a 2 degree ship-based climatology smooths
    # the curl near the coasts. Measured: -13.6 Sv (vector mean), -16.6 Sv (scalar speed).
    assert -27.0 < atl_26 < -9.0
    # The North Pacific subtropical gyre carries more than the Atlantic's (memory; Kuroshio
    # 42 Sv net, Imawaki et al. 2001, GRL; Florida Current 31 Sv, RAPID/Florida Current cable).
    # Measured at 25-29N: -21.4 vs
    # -13.0 Sv (vector mean), -29.2 vs -16.6 Sv (scalar speed).
    rows = [25.0, 27.0, 29.0]
    assert float(pac.sel(lat=rows).mean()) < float(atl.sel(lat=rows).mean()) < 0
    assert float(pac.sel(lat=rows).mean()) < -15.0
    # Common practice, from memory: the subtropical/subpolar zero lies roughly between 40N and 55N
    # in both northern basins; wide tolerance. Measured: 49.8N and 43.7N (vector mean),
    # 49.7N and 43.4N (scalar speed).
    lat = ds.lat.values
    for t in (atl, pac):
        y = _gyre_boundary(t.values, lat)
        assert 40.0 <= y <= 55.0, y
    # Those rows start on the real eastern coasts: Africa/Europe (18W..10E) and North
    # America (125W..105W), and the Atlantic's western boundary lies in the Americas.
    for la in rows:
        assert 340 <= float(ds.eastern_coast_lon.sel(basin="atlantic", lat=la)) % 360 <= 370
        assert 235 <= float(ds.eastern_coast_lon.sel(basin="pacific", lat=la)) % 360 <= 255
        assert 260 <= float(ds.western_coast_lon.sel(basin="atlantic", lat=la)) % 360 <= 285
    # The circumpolar band has no eastern coast in any basin.
    drake = ds.row_status.sel(lat=[-59.0, -57.0])
    assert np.all(drake.values == 2)


@pytest.mark.realdata
@pytest.mark.slow
def test_coads_scalar_speed_stress_drives_a_stronger_gyre(marine_climatology, etopo60):
    # Stress is quadratic in the wind, so the stress of monthly vector-mean winds
    # underestimates it (up to about 20%, Rosen & Ponte 2003, J. Climate); the scalar mean
    # speed restores part of it and the subtropical interior transport grows.
    vec = _coads_sverdrup(marine_climatology, etopo60, use_wind_speed=False)
    spd = _coads_sverdrup(marine_climatology, etopo60, use_wind_speed=True)
    for basin in ("atlantic", "pacific"):
        a = float(vec.interior_transport.sel(basin=basin, lat=[25.0, 27.0, 29.0]).mean())
        b = float(spd.interior_transport.sel(basin=basin, lat=[25.0, 27.0, 29.0]).mean())
        assert b < a < 0
        assert 1.05 < b / a < 1.6


def test_coordinates_named_like_an_old_analysis_file(world):
    # Axis names such as COADSY/COADSX with CF units, as in the classic climatology files.
    tx, ty, _ = world

    def rename(a):
        out = a.rename(lat="COADSY", lon="COADSX")
        out["COADSY"].attrs["units"] = "degrees_north"
        out["COADSX"].attrs["units"] = "degrees_east"
        return out

    ref = sverdrup_transport(tx, ty)
    ds = sverdrup_transport(rename(tx), rename(ty))
    assert ds.interior_transport.dims == ("basin", "COADSY")
    np.testing.assert_array_equal(ds.interior_transport.values, ref.interior_transport.values)


def test_without_a_mask_dask_input_is_read_once_for_the_land_mask(world):
    # Documented: the land mask comes from the stress itself, one pass at call time.
    tx, ty, _ = world
    tx4, ty4 = _stack_time(tx).chunk({"time": 2}), _stack_time(ty).chunk({"time": 2})
    counter = CountingScheduler()
    with dask.config.set(scheduler=counter):
        lazy = sverdrup_transport(tx4, ty4)
        assert counter.calls == 1
    ref = sverdrup_transport(tx4.compute(), ty4.compute())
    np.testing.assert_allclose(lazy.interior_transport, ref.interior_transport, equal_nan=True)


def test_same_numbers_on_a_distributed_cluster(world):
    distributed = pytest.importorskip("distributed")
    tx, ty, mask = world
    tx4, ty4 = _stack_time(tx), _stack_time(ty)
    ref = sverdrup_transport(tx4, ty4, ocean_mask=mask)
    with distributed.Client(processes=False, n_workers=1, threads_per_worker=2,
                            dashboard_address=None):
        got = sverdrup_transport(tx4.chunk({"time": 1}), ty4.chunk({"time": 1}),
                       ocean_mask=mask).compute()
    np.testing.assert_allclose(got.sverdrup_streamfunction, ref.sverdrup_streamfunction, rtol=1e-12,
                               equal_nan=True)
    np.testing.assert_allclose(got.interior_transport, ref.interior_transport, rtol=1e-12,
                               equal_nan=True)


def test_basin_masks_with_missing_values_count_as_outside(world):
    tx, ty, mask = world
    auto = sverdrup_transport(tx, ty)
    m = (auto.basin_id == 0).astype(float).where(auto.basin_id == 0)  # 1 inside, NaN outside
    ds = sverdrup_transport(tx, ty, basins={"b0": m})
    np.testing.assert_allclose(ds.interior_transport.isel(basin=0),
                               auto.interior_transport.isel(basin=0), equal_nan=True)


def test_longitude_before_latitude_in_the_dimension_order(world):
    tx, ty, mask = world
    ref = sverdrup_transport(tx, ty, ocean_mask=mask)
    ds = sverdrup_transport(tx.T, ty.T, ocean_mask=mask.T)
    assert ds.sverdrup_streamfunction.dims == ("lon", "lat")
    np.testing.assert_array_equal(ds.sverdrup_streamfunction.T.values, ref.sverdrup_streamfunction.values)
    np.testing.assert_array_equal(ds.interior_transport.values, ref.interior_transport.values)


# ------------------------------------------------------------------------------------------
# Defaults that cannot mislead (issue 10): invented worlds
# ------------------------------------------------------------------------------------------


def _walled_world():
    """Two pole-to-pole walls (120-130E and 300-310E) and a continent at 60-70E between 30S and
    70N: south of its tip one ocean row joins the oceans on either side of it."""
    lat, lon = grid()
    land = box(lat, lon, 120, 130, -90, 90) | box(lat, lon, 300, 310, -90, 90)
    land |= box(lat, lon, 60, 70, -30, 70) | (np.abs(lat)[:, None] > 76) & (lon >= 0)
    ocean = ~land
    tx, ty = linear_stress(ocean, lat, lon)
    return tx, ty, field(ocean, lat, lon, units="1")


def test_rows_joining_two_oceans_south_of_a_continent_are_never_valid():
    # Before issue 10 the automatic basins made the band south of the continent a basin of
    # its own whose rows, from one wall to the other past the continent's tip, were valid.
    tx, ty, mask = _walled_world()
    ds = sverdrup_transport(tx, ty, ocean_mask=mask)
    st = ds.row_status
    passing = st.where(st == 7).notnull().any("basin")
    # The rows from 31S south to the polar land, and from 71N north to it, pass the
    # continent (derived from the map).
    assert passing.sel(lat=slice(-75, -31)).all() and passing.sel(lat=slice(71, 75)).all()
    assert not passing.sel(lat=slice(-29, 69)).any()
    assert np.isnan(ds.interior_transport.where(st == 7)).all()


def test_rows_spanning_more_than_half_the_globe_are_never_valid():
    # One narrow continent and polar land: every row runs from the continent's western
    # coast westward round the globe to its eastern coast, 340 degrees (derived).
    lat, lon = grid()
    land = box(lat, lon, 0, 20, -60, 60) | (np.abs(lat)[:, None] > 70) & (lon >= 0)
    tx, ty = linear_stress(~land, lat, lon)
    ds = sverdrup_transport(tx, ty, ocean_mask=field(~land, lat, lon, units="1"))
    st = ds.row_status.isel(basin=0)
    rows = st.sel(lat=slice(-59, 59)).values
    band = np.abs(st.sel(lat=slice(-59, 59)).lat.values) < DEFAULT_EQUATORIAL_HALF_WIDTH
    assert np.all(rows[~band] == 6)
    assert not (ds.row_status == 0).any()


def test_gyre_boundaries_need_the_threshold_on_both_sides():
    from sverdrup_kit._compiled.scan import gyre_boundaries

    lat = np.arange(10.0, 20.0)
    # Hand-made: a wiggle about zero (3 raw crossings between 11N and 14N) between -5 and +5.
    t = np.array([[-5.0, -0.3, 0.2, -0.1, 0.4, 5.0, 6.0, 7.0, 6.0, 5.0]])
    valid = np.ones_like(t, dtype=bool)
    y, n = gyre_boundaries(t, valid, lat=lat, max_gyre_boundaries=4, threshold=2.0)
    yr, nr = gyre_boundaries(t, valid, lat=lat, max_gyre_boundaries=4, threshold=0.0)
    assert (int(n[0]), int(nr[0])) == (1, 3)
    # The boundary is the middle one of the raw crossings between 10N and 15N (derived by
    # linear interpolation: zeros at 11.6, 12.667 and 13.2).
    np.testing.assert_allclose(yr[0, :3], [11 + 0.3 / 0.5, 12 + 0.2 / 0.3, 13 + 0.1 / 0.5],
                               rtol=1e-12)
    assert y[0, 0] == yr[0, 1] and np.isnan(y[0, 1:]).all()
    # Never bridged across a row that is not valid.
    valid[0, 3] = False
    y, n = gyre_boundaries(t, valid, lat=lat, max_gyre_boundaries=4, threshold=2.0)
    assert int(n[0]) == 0


def test_pole_rows_carry_no_curl():
    # Ocean at the North Pole: before issue 10 the pole row carried the curl of a one-sided
    # difference divided by cos(89 degrees).
    lat, lon = grid()
    ocean = (lat[:, None] > 40) & (lon >= 0)
    ocean &= ~box(lat, lon, 0, 40, 40, 80)
    tx, ty = linear_stress(ocean, lat, lon)
    ds = sverdrup_transport(tx, ty)
    assert ds.wind_stress_curl.sel(lat=89.0).isnull().all()
    assert ds.wind_stress_curl.sel(lat=87.0).notnull().any()


def test_rows_mostly_filled_are_flagged_with_their_observed_fraction(world):
    tx, ty, mask = world
    # Remove the stress from most of the western basin's row at 31N: its counted cells are
    # the 27 east of the peninsula (26-80E); 15 of them (26-56E) lose their stress.
    gone = (tx.lat == 31.0) & (tx.lon > 0) & (tx.lon < 56.5)
    ds = sverdrup_transport(tx.where(~gone), ty.where(~gone), ocean_mask=mask)
    b = int(ds.basin_id.sel(lat=31.0, lon=41.0))
    counted = (ds.integration_class.sel(lat=31.0) == 1) & (ds.basin_id.sel(lat=31.0) == b)
    assert int(counted.sum()) == 27 and int((counted & gone.sel(lat=31.0)).sum()) == 15
    frac = float(ds.observed_fraction.isel(basin=b).sel(lat=31.0))
    assert frac == pytest.approx(12 / 27, abs=1e-12)
    assert frac < 0.5
    assert int(ds.row_status.isel(basin=b).sel(lat=31.0)) == 10
    assert np.isfinite(float(ds.interior_transport.isel(basin=b).sel(lat=31.0)))
    assert float(ds.observed_fraction.isel(basin=b).sel(lat=41.0)) == 1.0


def test_cautions_poleward_of_the_circumpolar_band_and_over_shelves():
    # A circumpolar channel (50S-60S) with a closed basin south of it (60S-76S), and a
    # shallow shelf over the northern half of a basin north of it.
    lat, lon = grid()
    ocean = box(lat, lon, -1, 361, -60, -50) | box(lat, lon, 0, 100, -76, -50)
    ocean |= box(lat, lon, 0, 100, -50, -20)
    tx, ty = linear_stress(ocean, lat, lon)
    relief = np.where(ocean, -4000.0, 500.0)
    relief[(lat[:, None] > -36) & (lon[None, :] < 100)] = -300.0
    ds = sverdrup_transport(tx, ty, ocean_mask=field(ocean, lat, lon, units="1"),
                            relief=field(relief, lat, lon, units="m"))
    st = ds.row_status.isel(basin=0)
    assert np.all(st.sel(lat=slice(-75, -61)) == 8)
    assert np.all(st.sel(lat=slice(-59, -51)) == 2)
    assert np.all(st.sel(lat=slice(-35, -21)) == 9)
    assert np.all(st.sel(lat=slice(-49, -37)) == 0)
    assert np.isfinite(ds.interior_transport.isel(basin=0).sel(lat=slice(-75, -61))).all()
    # The same relief on a grid twice as fine, as relief usually comes: averaged onto the
    # stress cells (each holds four equal values), the same cautions.
    step = float(lat[1] - lat[0])
    fine_lat = (lat[:, None] + np.array([-0.25, 0.25]) * step).ravel()
    fine_lon = (lon[:, None] + np.array([-0.25, 0.25]) * step).ravel()
    fine = np.repeat(np.repeat(relief, 2, axis=0), 2, axis=1)
    ds2 = sverdrup_transport(tx, ty, ocean_mask=field(ocean, lat, lon, units="1"),
                             relief=field(fine, fine_lat, fine_lon, units="m"))
    xr.testing.assert_identical(ds2.row_status, ds.row_status)


def test_same_results_with_and_without_the_cache_in_memory_and_chunked(world):
    from sverdrup_kit.geometry.integral import clear_geometry_cache, sverdrup_geometry

    tx, ty, mask = world
    tx4, ty4 = _stack_time(tx), _stack_time(ty)
    clear_geometry_cache()
    fresh = sverdrup_transport(tx4, ty4, ocean_mask=mask)
    cached = sverdrup_transport(tx4, ty4, ocean_mask=mask)
    given = sverdrup_transport(tx4, ty4, geometry=sverdrup_geometry(mask))
    chunked = sverdrup_transport(tx4.chunk({"time": 1}), ty4.chunk({"time": 2}),
                                 ocean_mask=mask).compute()
    for other in (cached, given, chunked):
        xr.testing.assert_identical(other, fresh)
    with pytest.raises(ValueError, match="geometry: expected a geometry built on the grid"):
        sverdrup_transport(tx4.isel(lat=slice(1, None)), ty4.isel(lat=slice(1, None)),
                           geometry=sverdrup_geometry(mask))


# ------------------------------------------------------------------------------------------
# The real Earth (issue 10): the COADS climatology on the 2 degree relief mask, defaults
# ------------------------------------------------------------------------------------------


@pytest.fixture(scope="module")
def coads_mean_stress(marine_climatology):
    from sverdrup_kit.io.readers import open_winds
    from sverdrup_kit.physics.stress import wind_stress

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        w = open_winds(marine_climatology)
        return wind_stress(w["u"], w["v"], drag_law="large-pond-1981").mean("time").compute()


@pytest.fixture(scope="module")
def coads_default(coads_mean_stress, etopo60):
    from sverdrup_kit.geometry import integral

    mean = coads_mean_stress
    mask = _etopo_mask_on(mean, etopo60)
    integral._NOTICE_GIVEN = False
    with pytest.warns(integral.EarthBasinsNotice, match="Earth basins are used"):
        ds = sverdrup_transport(mean["taux"], mean["tauy"], ocean_mask=mask)
    return ds.compute()


@pytest.mark.realdata
def test_coads_rows_over_the_bering_shelf_get_the_caution(coads_mean_stress, etopo60):
    # The relief on its own 1 degree grid (ETOPO60), averaged onto the 2 degree stress grid.
    # Most of the Bering Sea north of 58N lies on the shelf, shallower than 200 m (Coachman
    # 1986, Cont. Shelf Res. 5, 23-108; from memory), so the Pacific rows there are cautioned;
    # the open subtropical rows are deep and stay valid.
    relief = xr.open_dataset(etopo60)
    relief = relief[list(relief.data_vars)[0]]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        ds = sverdrup_transport(coads_mean_stress["taux"], coads_mean_stress["tauy"],
                                relief=relief, basins="earth")
    st = ds.row_status.sel(basin="pacific")
    assert (st.sel(lat=slice(58, 64)) == 9).all()
    assert (st.sel(lat=slice(15, 45)) == 0).all()
    assert (ds.row_status.sel(basin="atlantic", lat=slice(15, 45)) == 0).all()
    # Without relief there is no caution: the status comes from the relief alone.
    plain = sverdrup_transport(coads_mean_stress["taux"], coads_mean_stress["tauy"],
                               basins="earth", island_rule=False)
    assert not (plain.row_status == 9).any()


@pytest.mark.realdata
def test_coads_default_basins_are_the_earth_basins(coads_default):
    ds = coads_default
    assert list(ds.basin.values) == ["atlantic", "pacific", "indian"]
    assert ds.attrs["basins"] == "earth (detected)"


@pytest.mark.realdata
def test_coads_no_valid_row_spans_two_oceans_or_half_the_globe(coads_default):
    # Before issue 10 the default basins ran rows at 39-55S from Chile westward round the
    # globe to Argentina and called them valid (-147.5 Sv at 55S).
    ds = coads_default
    valid = ds.row_status == 0
    span = (ds.eastern_coast_lon - ds.western_coast_lon) % 360
    assert float(span.where(valid).max()) <= 180.0
    # Each valid row's counted cells lie in its own basin only (the basins are the oceans).
    # South of the capes (45S-61S) no basin row has both coasts.
    assert not valid.sel(lat=slice(-61, -45)).any()


@pytest.mark.realdata
def test_coads_marginal_seas_and_sub_basins(coads_default):
    # Times Atlas of the World / common practice: the Bay of Bengal and the Labrador Sea are
    # counted in the Indian and Atlantic interiors; the Persian Gulf, the South China Sea and
    # the Sea of Japan are seas of their own, not counted.
    ic = coads_default.integration_class
    assert int(ic.sel(lat=15.0, lon=89.0)) == 1   # Bay of Bengal
    assert int(ic.sel(lat=15.0, lon=65.0)) == 1   # Arabian Sea
    assert int(ic.sel(lat=59.0, lon=305.0)) == 1  # Labrador Sea
    assert int(ic.sel(lat=27.0, lon=51.0)) != 1   # Persian Gulf
    assert int(ic.sel(lat=15.0, lon=115.0)) == 2  # South China Sea: own streamfunction
    assert int(ic.sel(lat=41.0, lon=135.0)) == 2  # Sea of Japan
    seas = coads_default.crossed_seas
    assert "bay_of_bengal" in seas.sel(basin="indian", lat=15.0).item()
    assert "labrador_sea" in seas.sel(basin="atlantic", lat=59.0).item()
    ends = coads_default.ending_seas
    assert "caribbean" in ends.sel(basin="atlantic", lat=15.0).item()
    assert "south_china_sea" in ends.sel(basin="pacific", lat=17.0).item()


@pytest.mark.realdata
def test_coads_pacific_interior_ends_on_the_philippines(coads_default):
    # Common practice: between 9N and 17N the Pacific interior ends on the Philippines'
    # Pacific coast, where the Mindanao Current and the Kuroshio's source flow (Luzon
    # 121.5-122.5E, Samar and Mindanao 125-126.5E; Times Atlas of the World).
    w = coads_default.western_coast_lon.sel(basin="pacific", lat=slice(9, 17)) % 360
    assert np.all((w >= 121.0) & (w <= 127.0)), w.values
    assert np.all(coads_default.row_status.sel(basin="pacific", lat=slice(9, 17)) == 0)


@pytest.mark.realdata
def test_coads_northern_indian_ocean_has_at_most_one_gyre_boundary(coads_default):
    g = coads_default.gyre_boundary_lat.sel(basin="indian")
    assert int((g > 0).sum()) <= 1
    assert coads_default.attrs["gyre_threshold_sv"] == 2.0
