"""Curl, Sverdrup transport and the model's own circulation on curvilinear model grids.

Grids are built by sverdrup_kit.synthetic_grids: a rotated-pole grid, a displaced-pole
grid (its north pole on an invented continent) and a tripolar grid. The winds are an invented
field that is smooth on the whole sphere, with its curl derived in closed form.
"""

from __future__ import annotations

import numpy as np
import pytest
import xarray as xr

import sverdrup_kit as sk
from sverdrup_kit.geometry.curvilinear import CurvilinearGrid, _unit
from sverdrup_kit.physics.model_grid import (
    model_circulation,
    model_grid_curl,
    model_grid_sverdrup,
    rotate_to_geographic,
    rotate_to_grid,
)

from sverdrup_kit.synthetic_grids import (
    as_field,
    rotated_pole_grid,
    smooth_winds,
    tripolar_grid,
    with_bounds,
)

R = 6.371e6


def _grid(lat, lon, clat, clon):
    ds = with_bounds(as_field(np.zeros(lat.shape), lat, lon).to_dataset(name="z"), clat, clon)
    return CurvilinearGrid.from_data(ds)


def _interior(grid, ocean):
    ok = ocean.astype(float)
    inner = ocean.copy()
    for side in "EWNS":
        inner &= grid.neighbour(ok, side) == 1.0
    return inner


def _away_from(grid, points, degrees):
    far = np.ones(grid.shape, dtype=bool)
    for lat, lon in points:
        ang = np.rad2deg(np.arccos(np.clip(grid.xyz @ _unit(lat, lon), -1, 1)))
        far &= ang > degrees
    return far


GRIDS = {
    # name: (builder kwargs, land points to keep the grid's own poles on land)
    "rotated_pole": (lambda: rotated_pole_grid(1.0, pole_lat=40.0, pole_lon=-30.0), []),
    "displaced_pole": (lambda: rotated_pole_grid(1.0, pole_lat=75.0, pole_lon=-40.0,
                                                 lat_limit=84.0), []),
    "tripolar": (lambda: tripolar_grid(1.0, join_lat=60.0, lon0=80.0),
                 [(60.0, 80.0), (60.0, 260.0)]),
}


@pytest.mark.parametrize("name", sorted(GRIDS))
def test_curl_matches_the_analytic_curl_within_one_percent(name):
    # Source: the closed-form curl of the invented field (derived in sverdrup_kit/synthetic_grids.py by
    # Stokes' theorem); the 1% bound is issue 14's target for grids of 1 degree or finer.
    build, poles = GRIDS[name]
    lat, lon, clat, clon = build()
    grid = _grid(lat, lon, clat, clon)
    tx, ty, ref = smooth_winds(grid.lat, grid.lon)
    # An invented continent round each pole of the grid (where a model puts its poles).
    ocean = _away_from(grid, poles, 6.0)
    tx, ty = np.where(ocean, tx, np.nan), np.where(ocean, ty, np.nan)
    curl = model_grid_curl(as_field(tx, grid.lat, grid.lon), as_field(ty, grid.lat, grid.lon),
                           grid=grid).values
    inner = _interior(grid, ocean)
    inner[0] = inner[-1] & grid.north_fold
    err = np.abs(curl - ref)[inner] / np.abs(ref).max()
    assert err.max() < 0.01, f"{name}: {err.max():.2e}"
    # Coastal cells get a value too (first-order there).
    assert np.all(np.isfinite(curl[ocean]))


def test_tripolar_grid_is_found_periodic_and_folded():
    lat, lon, clat, clon = tripolar_grid(2.0)
    grid = _grid(lat, lon, clat, clon)
    assert grid.periodic and grid.north_fold and grid.corners_from == "bounds"
    # Area of the whole grid against the spherical cap it covers (derived: 2 pi R^2 (1 - sin));
    # cells are taken as bounded by great-circle arcs, which cut the latitude circles of the
    # southern rows by a relative 1e-6 at 2 degrees.
    cap = 2 * np.pi * R**2 * (1 - np.sin(np.deg2rad(-78.0)))
    assert grid.cell_area.sum() == pytest.approx(cap, rel=1e-5)


def test_regular_grid_as_model_grid_gives_todays_curl():
    # Source: the toolkit's regular-grid curl (centred differences of the flux form); the
    # Stokes form is the same centred difference, so they agree to the truncation error.
    lat = np.arange(-79.0, 80.0, 2.0)
    lon = np.arange(1.0, 360.0, 2.0)
    la, lo = np.meshgrid(lat, lon, indexing="ij")
    tx, ty, _ = smooth_winds(la, lo)
    reg = sk.wind_stress_curl(
        xr.DataArray(tx, coords={"lat": lat, "lon": lon}, dims=("lat", "lon"), attrs={"units": "Pa"}),
        xr.DataArray(ty, coords={"lat": lat, "lon": lon}, dims=("lat", "lon"), attrs={"units": "Pa"}))
    cur = sk.wind_stress_curl(as_field(tx, la, lo), as_field(ty, la, lo))
    inner = slice(1, -1)
    scale = np.abs(reg.values).max()
    np.testing.assert_allclose(cur.values[inner], reg.values[inner], atol=2e-3 * scale)


def test_rotation_there_and_back_is_the_identity():
    rng = np.random.default_rng(3)
    u, v, a = rng.normal(size=(3, 50))
    e, n = rotate_to_geographic(u, v, a)
    u2, v2 = rotate_to_grid(e, n, a)
    np.testing.assert_allclose(u2, u, atol=1e-14)
    np.testing.assert_allclose(v2, v, atol=1e-14)
    # Rotation keeps the speed (common practice: a rotation is orthogonal).
    np.testing.assert_allclose(np.hypot(e, n), np.hypot(u, v), rtol=1e-14)


def test_grid_angle_points_along_the_grid_lines():
    # Independent check of the computed angle: a unit vector along +x rotated to east/north
    # must point from each centre to its eastern neighbour (finite difference of positions).
    lat, lon, clat, clon = rotated_pole_grid(1.0, pole_lat=40.0, pole_lon=-30.0)
    grid = _grid(lat, lon, clat, clon)
    e, n = rotate_to_geographic(np.ones(grid.shape), np.zeros(grid.shape), grid.angle)
    step = np.roll(grid.xyz, -1, axis=1) - np.roll(grid.xyz, 1, axis=1)
    de = np.einsum("...i,...i", step, grid.east)
    dn = np.einsum("...i,...i", step, grid.north)
    ang = np.arctan2(dn, de) - np.arctan2(n, e)
    ang = np.angle(np.exp(1j * ang))
    assert np.abs(ang[5:-5]).max() < np.deg2rad(0.5)


def _basin(lat, lon):
    lon = np.mod(lon, 360)
    return (lon > 0.5) & (lon < 60) & (lat > 15) & (lat < 55)


def _gyre_wind(lat):
    return -0.1 * np.cos(np.deg2rad(4.5 * (lat - 15)))


@pytest.fixture(scope="module")
def regular_reference():
    lat = np.arange(-89.5, 90, 1.0)
    lon = np.arange(0.5, 360, 1.0)
    la, lo = np.meshgrid(lat, lon, indexing="ij")
    tx = xr.DataArray(np.where(_basin(la, lo), _gyre_wind(la), np.nan),
                      coords={"lat": lat, "lon": lon}, dims=("lat", "lon"), attrs={"units": "Pa"})
    return sk.sverdrup_transport(tx, 0 * tx).interior_transport.isel(basin=0)


@pytest.mark.parametrize("name", ["rotated_pole", "tripolar"])
def test_interior_transport_per_band_matches_the_regular_grid(name, regular_reference):
    # Source: the toolkit's regular-grid Sverdrup integral on the same invented basin and
    # winds; issue 14's target is 2% per band.
    if name == "rotated_pole":
        lat, lon, clat, clon = rotated_pole_grid(0.5, pole_lat=60.0, pole_lon=200.0)
    else:
        lat, lon, clat, clon = tripolar_grid(0.5, join_lat=58.0, lon0=80.0)
    grid = _grid(lat, lon, clat, clon)
    ocean = _basin(grid.lat, grid.lon)
    tx = as_field(np.where(ocean, _gyre_wind(grid.lat), np.nan), grid.lat, grid.lon)
    got = model_grid_sverdrup(tx, 0 * tx, grid=grid, band_width=1.0).interior_transport
    got = got.isel(basin=0)
    for band in (20.5, 25.5, 30.5, 35.5, 40.5, 45.5):
        ref = float(regular_reference.sel(lat=band))
        assert float(got.sel(lat=band)) == pytest.approx(ref, rel=0.02), band


def test_sverdrup_transport_dispatches_to_the_model_grid():
    lat, lon, clat, clon = rotated_pole_grid(2.0, pole_lat=60.0, pole_lon=200.0)
    ocean = _basin(lat, lon)
    tx = as_field(np.where(ocean, _gyre_wind(lat), np.nan), lat, lon)
    ds = sk.sverdrup_transport(tx, 0 * tx)
    assert ds.sverdrup_streamfunction.dims == ("y", "x")
    assert set(ds.interior_transport.dims) == {"basin", "lat"}
    assert "curvilinear" in ds.attrs["method"]
    # Lazy when the input is dask-backed, with the same numbers.
    lazy = sk.sverdrup_transport(tx.chunk({"y": 10}), 0 * tx.chunk({"y": 10}))
    assert lazy.interior_transport.chunks is not None
    np.testing.assert_allclose(lazy.interior_transport.values, ds.interior_transport.values,
                               rtol=1e-12, equal_nan=True)


def _psi(lat, lon):
    # An invented closed-basin streamfunction, zero on the basin's edges, in m3 s-1.
    x = (np.mod(lon, 360) - 0.5) / 59.5
    y = (lat - 15) / 40
    return 30e6 * np.sin(np.pi * x) * np.sin(np.pi * y) ** 2


def _psi_velocities(lat, lon):
    # Derived: U = -(1/R) dpsi/dphi, V = (1/(R cos phi)) dpsi/dlambda (per unit width, m2 s-1).
    x = (np.mod(lon, 360) - 0.5) / 59.5
    y = (lat - 15) / 40
    dpsi_dphi = 30e6 * np.sin(np.pi * x) * 2 * np.sin(np.pi * y) * np.cos(np.pi * y) * np.pi / np.deg2rad(40)
    dpsi_dlam = 30e6 * np.pi * np.cos(np.pi * x) * np.sin(np.pi * y) ** 2 / np.deg2rad(59.5)
    return -dpsi_dphi / R, dpsi_dlam / (R * np.cos(np.deg2rad(lat)))


@pytest.mark.parametrize("components", ["geographic", "grid"])
def test_velocities_from_a_known_streamfunction_return_it(components):
    # Conservation (issue 14): depth-integrated velocities built from a known streamfunction
    # on the model grid give back that streamfunction and no net transport across a latitude
    # of the closed basin.
    lat, lon, clat, clon = rotated_pole_grid(0.5, pole_lat=60.0, pole_lon=200.0)
    grid = _grid(lat, lon, clat, clon)
    ocean = _basin(grid.lat, grid.lon)
    U, V = _psi_velocities(grid.lat, grid.lon)
    if components == "grid":
        U, V = rotate_to_grid(U, V, grid.angle)
    u = as_field(np.where(ocean, U, np.nan), grid.lat, grid.lon, units="m2 s-1")
    v = as_field(np.where(ocean, V, np.nan), grid.lat, grid.lon, units="m2 s-1")
    # Bands as wide as the grid spacing (the default): the streamfunction is a band mean, off
    # the cell's own latitude by up to half a band (derived: error ~ dpsi/dy * band / 2).
    ds = model_circulation(u, v, grid=grid, components=components)
    psi = ds.model_streamfunction.values * 1e6
    ref = _psi(grid.lat, grid.lon)
    core = ocean & (grid.lat > 17) & (grid.lat < 53)
    assert np.abs(psi - ref)[core].max() < 0.03 * np.abs(ref).max()
    # No net transport across a latitude of a closed basin; the staircase coast of the rotated
    # grid cuts cells whose analytic flow does cross it, so allow a few percent (derived: about
    # V dx of one coastal cell, 0.7 Sv here).
    net = ds.model_interior_transport.isel(basin=0).sel(lat=slice(20, 50))
    assert np.abs(net).max() < 0.04 * np.abs(ref).max() / 1e6


def test_model_circulation_beside_sverdrup_of_its_own_stress():
    # A model in exact Sverdrup balance: its V is curl(tau)/(rho0 beta) of the same stress
    # (the curl computed independently, in closed form), so the difference is small.
    lat, lon, clat, clon = rotated_pole_grid(1.0, pole_lat=60.0, pole_lon=200.0)
    grid = _grid(lat, lon, clat, clon)
    ocean = _basin(grid.lat, grid.lon)
    phi = np.deg2rad(grid.lat)
    tau = _gyre_wind(grid.lat)
    # d(tau_x cos phi)/dphi for tau_x = -0.1 cos(4.5 (lat - 15) degrees), derived:
    k = 4.5
    dtau = 0.1 * k * np.sin(np.deg2rad(k * (grid.lat - 15)))
    curl = -(dtau * np.cos(phi) - tau * np.sin(phi)) / (R * np.cos(phi))
    V = curl / (1025.0 * sk.beta_parameter(grid.lat))
    tx = as_field(np.where(ocean, tau, np.nan), grid.lat, grid.lon)
    v = as_field(np.where(ocean, V, np.nan), grid.lat, grid.lon, units="m2 s-1")
    ds = model_circulation(0 * v, v, taux=tx, tauy=0 * tx, grid=grid, band_width=1.0)
    diff = ds.transport_difference.isel(basin=0).sel(lat=slice(20, 50))
    sv = ds.interior_transport.isel(basin=0).sel(lat=slice(20, 50))
    assert np.abs(diff).max() < 0.02 * np.abs(sv).max()


def test_open_winds_reads_a_model_grid_file_and_rotates_grid_components(tmp_path):
    lat, lon, clat, clon = rotated_pole_grid(2.0, pole_lat=50.0, pole_lon=160.0)
    grid = _grid(lat, lon, clat, clon)
    ue, un = 3.0 + np.cos(np.deg2rad(grid.lat)), np.sin(np.deg2rad(grid.lon))
    ux, uy = rotate_to_grid(ue, un, grid.angle)
    ds = xr.Dataset(
        {"uas": (("y", "x"), ux, {"units": "m s-1", "standard_name": "x_wind"}),
         "vas": (("y", "x"), uy, {"units": "m s-1", "standard_name": "y_wind"}),
         "angle": (("y", "x"), np.rad2deg(grid.angle), {"units": "degrees"})},
        coords={"lat": (("y", "x"), lat, {"units": "degrees_north"}),
                "lon": (("y", "x"), lon, {"units": "degrees_east"})})
    ds = with_bounds(ds, clat, clon)
    path = tmp_path / "model_winds.nc"
    ds.to_netcdf(path)
    got = sk.open_winds(str(path))
    np.testing.assert_allclose(got.u.values, ue, atol=1e-12)
    np.testing.assert_allclose(got.v.values, un, atol=1e-12)
    assert "lat_bounds" in got and "rotated" in got.attrs["normalisation"]
    assert CurvilinearGrid.from_data(got).corners_from == "bounds"


def _wrap_pad(da):
    """One column of the other end on each side, so that interpolation works across the seam."""
    lon = da["lon"]
    return xr.concat([da.isel(lon=[-1]).assign_coords(lon=lon[-1:] - 360.0), da,
                      da.isel(lon=[0]).assign_coords(lon=lon[:1] + 360.0)], "lon")


@pytest.mark.realdata
def test_marine_climatology_on_a_rotated_model_grid(marine_climatology):
    # Source: the toolkit's regular-grid result on the recipe's COADS climatology (Woodruff et
    # al. 1987); issue 14 asks for the Atlantic and Pacific interior transports per band within
    # 2 Sv between 20N and 40N. The stress is sampled bilinearly onto a 1-degree rotated-pole
    # grid (gaps next to coasts filled from the nearest observed cell), the land-sea mask by
    # nearest neighbours; the model grid finds its own Earth basins, land classes and seas.
    # The same sampling onto a regular 1-degree grid gives the regular-grid result for the
    # same winds.
    from scipy.spatial import cKDTree

    with pytest.warns(sk.TimeDecodingWarning):
        winds = sk.open_winds(str(marine_climatology))
    st = sk.wind_stress(winds.u, winds.v, drag_law="large-pond-1981", wind_speed=winds.wind_speed)
    tx, ty = st.taux.mean("time").compute(), st.tauy.mean("time").compute()
    lon0 = float(tx.lon.min())
    seen = tx.notnull() & ty.notnull()
    la, lo = np.meshgrid(tx.lat.values, tx.lon.values, indexing="ij")
    obs = seen.values

    def sampled(lat, lon):
        at = dict(lat=xr.DataArray(lat, dims=("y", "x")),
                  lon=xr.DataArray(lon0 + np.mod(lon - lon0, 360.0), dims=("y", "x")))
        ocean = _wrap_pad(seen).sel(**at, method="nearest").values
        txc = _wrap_pad(tx).interp(**at).values
        tyc = _wrap_pad(ty).interp(**at).values
        gap = ocean & ~(np.isfinite(txc) & np.isfinite(tyc))
        _, k = cKDTree(_unit(la[obs], lo[obs])).query(_unit(lat[gap], lon[gap]))
        txc[gap], tyc[gap] = tx.values[obs][k], ty.values[obs][k]
        return txc, tyc, ocean

    # Godfrey's island rule (on by default on regular grids, not available on model grids)
    # changes the streamfunction west of islands but not the interior transport: on this
    # climatology the two interior transports are identical (checked when this was written),
    # so the scan alone is the reference.
    reg = sk.sverdrup_transport(tx, ty, basins="earth", island_rule=False).compute()
    lat1, lon1 = np.arange(-79.5, 80.0, 1.0), np.arange(0.5, 360.0, 1.0)
    t1x, t1y, ocean1 = sampled(*np.meshgrid(lat1, lon1, indexing="ij"))
    coords = {"lat": ("lat", lat1, {"units": "degrees_north"}),
              "lon": ("lon", lon1, {"units": "degrees_east"})}
    reg1 = sk.sverdrup_transport(
        *(xr.DataArray(a, dims=("lat", "lon"), coords=coords, attrs={"units": "Pa"})
          for a in (t1x, t1y)),
        ocean_mask=xr.DataArray(ocean1, dims=("lat", "lon"), coords=coords),
        basins="earth", island_rule=False)
    lat, lon, _, _ = rotated_pole_grid(1.0, pole_lat=50.0, pole_lon=160.0)
    txc, tyc, ocean = sampled(lat, lon)
    cv = sk.sverdrup_transport(as_field(txc, lat, lon), as_field(tyc, lat, lon),
                               basins="earth", ocean_mask=ocean)
    assert list(cv.basin.values) == ["atlantic", "pacific", "indian"]
    # The same rows are valid on both grids from 60S to 64N (issue 10's rules on the model
    # grid): south of the capes neither has a valid row, and both count the same seas.
    span = dict(lat=slice(-60.0, 64.0))
    both = reg1.row_status.sel(**span) == 0
    np.testing.assert_array_equal(both.values, (cv.row_status.sel(**span) == 0).values)
    # The regular 1-degree grid stops at 80N, cutting Greenland: still a (large) island, so
    # the Atlantic rows south of it are valid; the Mediterranean and Black Sea, which this
    # coarse mask brings within a cell of the Red Sea at Suez, are not counted (common
    # practice, as on regular grids in issue 10).
    assert bool(both.sel(basin="atlantic", lat=slice(56, 62)).all())
    assert not bool(both.sel(basin="indian", lat=slice(31, 48)).any())
    bands = np.arange(20.5, 40.0, 1.0)
    for name in ("atlantic", "pacific"):
        got = cv.interior_transport.sel(basin=name, lat=bands).values
        assert np.all(cv.row_status.sel(basin=name, lat=bands) == 0)
        # The same winds on a regular grid: full width, 20N-40N, within 2 Sv.
        same = reg1.interior_transport.sel(basin=name, lat=bands).values
        assert np.all(reg1.row_status.sel(basin=name, lat=bands) == 0)
        assert np.abs(got - same).max() < 2.0, (name, bands[np.argmax(np.abs(got - same))])
        # The climatology's own 2-degree grid: within 2 Sv but for the Pacific at 27-28N
        # (2.4 Sv), where the regular result itself moves by 2.3 Sv between the 2-degree field
        # and its 1-degree sampling (the one-sided curl of the coarse China-coast cells).
        native = reg.interior_transport.sel(basin=name).interp(lat=bands).values
        diff = np.abs(got - native)
        coastal = (name == "pacific") & (bands == 27.5)
        assert diff[~coastal].max() < 2.0, (name, bands[np.argmax(diff)], diff.max())
        assert diff[coastal].max(initial=0.0) < 2.5
        if name == "pacific":
            assert np.abs(same - native)[coastal].max() > 2.0

    # A tripolar 1-degree grid (poles over Siberia and Canada), regular south of 60N: the same
    # valid rows as the regular grid from 60S to 64N, the same transports south of 60N, and in
    # the folded cap, where a band takes cells of several tilted rows, the Atlantic within
    # 4 Sv (before bands took the cells overlapping them, not only those centred in them, a
    # stretch with no centre in the 61-62N band cut it at 34W: 15 Sv off).
    lat, lon, _, _ = tripolar_grid(1.0, lon0=80.0, south=-78.0)
    txc, tyc, ocean = sampled(lat, lon)
    tri = sk.sverdrup_transport(as_field(txc, lat, lon), as_field(tyc, lat, lon),
                                basins="earth", ocean_mask=ocean)
    np.testing.assert_array_equal((tri.row_status.sel(**span) == 0).values, both.values)
    t_tri, t_reg = tri.interior_transport.sel(**span), reg1.interior_transport.sel(**span)
    d = np.abs(t_tri - t_reg).where(both)
    assert float(d.sel(lat=slice(-60, 60)).max()) < 0.1
    assert float(d.sel(basin="atlantic", lat=slice(60, 64)).max()) < 4.0
    # Gyre boundaries (issue 10's 2 Sv threshold) on the model grid: south of 60N those of the
    # regular grid (the scan is the same there).
    for b in ("atlantic", "pacific", "indian"):
        g_tri = tri.gyre_boundary_lat.sel(basin=b).values
        g_reg = reg1.gyre_boundary_lat.sel(basin=b).values
        g_tri, g_reg = (g[np.isfinite(g) & (g < 60)] for g in (g_tri, g_reg))
        assert g_reg.size >= 2
        np.testing.assert_allclose(g_tri, g_reg, atol=0.1)


def test_ekman_pumping_on_a_regular_grid_as_model_grid():
    # Source: the toolkit's regular-grid Ekman pumping, curl(tau / (rho0 f)); the same centred
    # flux-form difference on the model grid agrees to truncation error.
    lat = np.arange(-79.0, 80.0, 2.0)
    lon = np.arange(1.0, 360.0, 2.0)
    la, lo = np.meshgrid(lat, lon, indexing="ij")
    tx, ty, _ = smooth_winds(la, lo)
    coords = {"lat": lat, "lon": lon}
    reg = sk.ekman(xr.DataArray(tx, coords=coords, dims=("lat", "lon"), attrs={"units": "Pa"}),
                   xr.DataArray(ty, coords=coords, dims=("lat", "lon"), attrs={"units": "Pa"}))
    cur = sk.ekman(as_field(tx, la, lo), as_field(ty, la, lo))
    inner = (np.abs(la) > 6) & (np.abs(la) < 76)
    scale = np.nanmax(np.abs(reg.ekman_pumping.values[inner]))
    np.testing.assert_allclose(cur.ekman_pumping.values[inner], reg.ekman_pumping.values[inner],
                               atol=5e-3 * scale)
    np.testing.assert_allclose(cur.ekman_northward_transport.values[inner],
                               reg.ekman_northward_transport.values[inner], rtol=1e-12)


def test_a_band_split_by_continents_integrates_each_run_from_its_own_coast():
    # Two invented continents in one connected ocean: each band between them holds two runs.
    # Source: the toolkit's regular-grid integral on the same field and basins (issue 10's
    # rule: a run cut off from the widest by a continent is a marginal sea, not counted).
    lat = np.arange(-79.0, 80.0, 2.0)
    lon = np.arange(1.0, 360.0, 2.0)
    la, lo = np.meshgrid(lat, lon, indexing="ij")
    # The wide ocean spans 160 degrees: rows wider than half the globe are never valid.
    land = (((lo > 100) & (lo < 140)) | ((lo > 280) & (lo < 300))) & (la > -40) & (la < 70)
    tau = np.where(land, np.nan, -0.1 * np.cos(np.deg2rad(3.0 * la)))
    coords = {"lat": lat, "lon": lon}
    tx = xr.DataArray(tau, coords=coords, dims=("lat", "lon"), attrs={"units": "Pa"})
    model_tx, model_ty = as_field(tau, la, lo), as_field(0 * tau, la, lo)
    oceans = {"narrow": [(140, -38), (280, -38), (280, 68), (140, 68)],
              "wide": [(-60, -38), (100, -38), (100, 68), (-60, 68)]}
    reg = sk.sverdrup_transport(tx, 0 * tx, basins=oceans, island_rule=False)
    cur = sk.sverdrup_transport(model_tx, model_ty, basins=oceans)
    for name in oceans:
        for b in (-29.0, -19.0, 21.0, 31.0, 41.0):
            want = float(reg.interior_transport.sel(basin=name, lat=b))
            got = float(cur.interior_transport.sel(basin=name, lat=b))
            assert got == pytest.approx(want, rel=0.01), (name, b)
    # One basin holding both: the narrow run is a marginal sea, on both grids.
    one = xr.DataArray(np.where(land, -1, 0), coords=coords, dims=("lat", "lon"))
    reg1 = sk.sverdrup_transport(tx, 0 * tx, basins=one, island_rule=False)
    cur1 = sk.sverdrup_transport(model_tx, model_ty)
    assert cur1.sizes["basin"] == 1
    for b in (-29.0, 21.0, 41.0):
        assert float(cur1.interior_transport.isel(basin=0).sel(lat=b)) == pytest.approx(
            float(reg1.interior_transport.isel(basin=0).sel(lat=b)), rel=0.01)
    row = int(np.argmin(np.abs(lat - 31)))
    np.testing.assert_array_equal(cur1.integration_class.values[row],
                                  reg1.integration_class.values[row])
    # Each run starts at zero on its own eastern coast: just west of each continent.
    psi = cur.sverdrup_streamfunction.isel(y=row)
    for coast in (99.0, 279.0):
        edge = float(psi.isel(x=int(np.argmin(np.abs(lon - coast)))))
        assert abs(edge) < 0.05 * float(np.abs(psi).max())


@pytest.mark.realdata
def test_earth_basins_reach_the_model_grid(etopo60):
    # basins="earth" on a model grid: the regular-grid Earth basins carried to the model's
    # cells. Geography (common practice): at 30N the Atlantic with the Gulf of Mexico lies
    # between about 98W and 10W,
    # the Pacific between about 120E and 115W.
    relief = xr.open_dataset(etopo60)["ROSE"].load()
    lat, lon, _, _ = rotated_pole_grid(2.0, pole_lat=50.0, pole_lon=160.0)
    rl = relief.rename({relief.dims[0]: "lat", relief.dims[1]: "lon"})
    lon0 = float(rl.lon.min())
    at = dict(lat=xr.DataArray(lat, dims=("y", "x")),
              lon=xr.DataArray(lon0 + np.mod(lon - lon0, 360.0), dims=("y", "x")))
    ocean = (rl.sel(**at, method="nearest") < 0).values
    tx = as_field(np.where(ocean, -0.05, np.nan), lat, lon)
    ds = sk.sverdrup_transport(tx, 0 * tx, basins="earth", ocean_mask=ocean)
    names = list(ds.basin.values)
    assert {"atlantic", "pacific", "indian"} <= set(names)
    bid = ds.basin_id.values
    row = np.abs(lat - 30) < 1.5
    lo = np.mod(lon, 360)
    atl = row & (bid == names.index("atlantic"))
    pac = row & (bid == names.index("pacific"))
    assert np.all((lo[atl] > 260) & (lo[atl] < 355))
    assert np.all((lo[pac] > 115) & (lo[pac] < 250))


# --- land classes and the band integral on model grids (issue 14 with issue 10's rules) ----


def _land(lat, lon):
    """Invented land: a continent west of 0E (a 40-degree-wide block from 10N to 60N), a
    large island (6 x 6 degrees at 33-39N, 30-36E: 3.7e5 km2, derived R^2 dlon (sin - sin))
    and a small island (2 x 2 degrees at 24-26N, 40-42E: 4.5e4 km2)."""
    lo = np.mod(lon, 360)
    cont = (lo > 300) & (lat > 10) & (lat < 60)
    big = (lo > 30) & (lo < 36) & (lat > 33) & (lat < 39)
    small = (lo > 40) & (lo < 42) & (lat > 24) & (lat < 26)
    outside = (lat < 10) | (lat > 60) | ((lo > 60) & (lo < 300))
    return cont | big | small | outside


def test_land_classes_on_a_rotated_grid_match_the_regular_grid():
    # Source: the regular-grid island table of the same invented land (issue 10), and the
    # derived areas of its boxes; cells of the model grid are 0.5 degree, so areas of the
    # rasterised boxes agree within a few percent.
    from sverdrup_kit.geometry.land import land_bodies

    lat, lon, clat, clon = rotated_pole_grid(0.5, pole_lat=60.0, pole_lon=200.0)
    grid = _grid(lat, lon, clat, clon)
    land = _land(grid.lat, grid.lon)
    lb = land_bodies(~land, grid, earth=False)
    rl = np.arange(-89.75, 90, 0.5)
    ro = np.arange(0.25, 360, 0.5)
    rla, rlo = np.meshgrid(rl, ro, indexing="ij")
    table = sk.island_table(xr.DataArray(~_land(rla, rlo), coords={"lat": rl, "lon": ro},
                                         dims=("lat", "lon")))
    for lat0, lon0, want_area in ((36.0, 33.0, 3.7e5), (25.0, 41.0, 4.5e4)):
        j, i = grid.cell_of_point(lon0, lat0)
        body = int(lb.labels[j, i])
        reg = int(table.land_label.sel(lat=lat0 + 0.25, lon=lon0 + 0.25))
        assert int(lb.body_class[body]) == int(table.land_class[reg])
        assert lb.area_km2[body] == pytest.approx(float(table.area_km2[reg]), rel=0.05)
        assert lb.area_km2[body] == pytest.approx(want_area, rel=0.1)
    assert int(lb.body_class[lb.labels[grid.cell_of_point(33.0, 36.0)]]) == 2
    assert int(lb.body_class[lb.labels[grid.cell_of_point(41.0, 25.0)]]) == 1


def test_island_table_on_a_model_grid_mask_matches_the_regular_table():
    # Source: the regular-grid island table of the same invented land (issue 10) and the
    # derived box areas; 0.5 degree cells, so areas within 5%, centroids and tips within a
    # cell or two.
    lat, lon, _, _ = rotated_pole_grid(0.5, pole_lat=60.0, pole_lon=200.0)
    land = _land(lat, lon)
    got = sk.island_table(as_field(~land, lat, lon, units="1"), earth_names=False)
    rl, ro = np.arange(-89.75, 90, 0.5), np.arange(0.25, 360, 0.5)
    rla, rlo = np.meshgrid(rl, ro, indexing="ij")
    want = sk.island_table(xr.DataArray(~_land(rla, rlo), coords={"lat": rl, "lon": ro},
                                        dims=("lat", "lon")), earth_names=False)
    assert got.sizes["island"] == want.sizes["island"]
    assert got.land_label.dims == ("y", "x")
    for k in range(want.sizes["island"]):
        g, w = got.isel(island=k), want.isel(island=k)
        assert int(g.land_class) == int(w.land_class)
        if int(w.land_class) == 3:
            continue  # the frame round the invented ocean: the rotated grid ends at 80 degrees
        assert float(g.area_km2) == pytest.approx(float(w.area_km2), rel=0.05)
        for name in ("centroid_lat", "north_lat", "south_lat"):
            assert abs(float(g[name]) - float(w[name])) < 1.0, name
        for name in ("centroid_lon", "west_lon", "east_lon"):
            d = (float(g[name]) - float(w[name]) + 180.0) % 360.0 - 180.0
            assert abs(d) < 1.0, name


def test_small_island_crossed_large_island_starts_a_new_run():
    # Source: the toolkit's regular-grid integral on the same invented land and winds
    # (issue 10's rules); 2% per band as for issue 14's other band checks.
    lat, lon, clat, clon = rotated_pole_grid(0.5, pole_lat=60.0, pole_lon=200.0)
    grid = _grid(lat, lon, clat, clon)
    land = _land(grid.lat, grid.lon)
    tau = -0.1 * np.cos(np.deg2rad(4.0 * (grid.lat - 15)))
    tx = as_field(np.where(land, np.nan, tau), grid.lat, grid.lon)
    ds = model_grid_sverdrup(tx, 0 * tx, grid=grid, band_width=1.0)
    rl, ro = np.arange(-89.5, 90, 1.0), np.arange(0.5, 360, 1.0)
    rla, rlo = np.meshgrid(rl, ro, indexing="ij")
    rtau = -0.1 * np.cos(np.deg2rad(4.0 * (rla - 15)))
    rtx = xr.DataArray(np.where(_land(rla, rlo), np.nan, rtau), coords={"lat": rl, "lon": ro},
                       dims=("lat", "lon"), attrs={"units": "Pa"})
    reg = sk.sverdrup_transport(rtx, 0 * rtx, island_rule=False)
    got, want = ds.interior_transport.isel(basin=0), reg.interior_transport.isel(basin=0)
    for band in (25.5, 35.5, 45.5):
        assert float(got.sel(lat=band)) == pytest.approx(float(want.sel(lat=band)), rel=0.02)
    # The small island is crossed: its cells are counted and carry V.
    small = ds.land_class.values == 1
    assert small.any() and np.all(ds.integration_class.values[small] == 1)
    assert np.all(np.isfinite(ds.sverdrup_northward_transport.values[small]))
    # The large island starts a new run: the streamfunction just west of it is near zero,
    # while the run east of it (to 60E) has gathered several Sv.
    row = np.abs(grid.lat - 36.0) < 0.3
    lo = np.mod(grid.lon, 360)
    psi = ds.sverdrup_streamfunction.values
    west = row & (lo > 28.5) & (lo < 30)
    east = row & (lo > 36) & (lo < 37.5)
    assert np.nanmax(np.abs(psi[west])) < 0.1 * np.nanmax(np.abs(psi[east]))
    assert int(ds.row_status.isel(basin=0).sel(lat=35.5)) == 0


@pytest.fixture(scope="module")
def earth_on_a_rotated_grid(etopo60):
    relief = xr.open_dataset(etopo60)["ROSE"].load()
    rl = relief.rename({relief.dims[0]: "lat", relief.dims[1]: "lon"})
    lat, lon, clat, clon = rotated_pole_grid(1.0, pole_lat=50.0, pole_lon=160.0)
    grid = _grid(lat, lon, clat, clon)
    lon0 = float(rl.lon.min())
    at = dict(lat=xr.DataArray(lat, dims=("y", "x")),
              lon=xr.DataArray(lon0 + np.mod(lon - lon0, 360.0), dims=("y", "x")))
    ocean = (rl.sel(**at, method="nearest") < 0).values
    tx = as_field(np.where(ocean, -0.05 * np.cos(np.deg2rad(3 * lat)), np.nan), lat, lon)
    return grid, ocean, sk.sverdrup_transport(tx, 0 * tx, basins="earth", ocean_mask=ocean)


@pytest.mark.realdata
def test_earth_islands_on_a_rotated_grid(earth_on_a_rotated_grid):
    # Times Atlas of the World (from memory), as on regular grids (issue 10): Luzon, Taiwan,
    # Sumatra and Great Britain are islands, and Greenland is not part of North America.
    from sverdrup_kit.geometry.land import land_bodies

    grid, ocean, _ = earth_on_a_rotated_grid
    lb = land_bodies(ocean, grid)
    body = {n: int(lb.labels[grid.cell_of_point(*p)])
            for n, p in sk.geometry.earth.EARTH_LANDMARKS.items()
            if grid.cell_of_point(*p) is not None}
    for name in ("Luzon", "Taiwan", "Sumatra", "Great Britain"):
        assert body[name] >= 0 and body[name] != body["Eurasia"], name
        assert int(lb.body_class[body[name]]) in (1, 2), name
    assert body["Greenland"] != body["North America"]
    assert int(lb.body_class[body["Greenland"]]) == 2
    assert "Greenland" in lb.names[body["Greenland"]]


@pytest.mark.realdata
def test_earth_seas_on_a_rotated_grid(earth_on_a_rotated_grid):
    # Times Atlas of the World / common practice, as on regular grids (issue 10): the Bay of
    # Bengal and the Labrador Sea are counted in the Indian and Atlantic interiors, the
    # Persian Gulf is not.
    grid, _, ds = earth_on_a_rotated_grid
    ic = ds.integration_class.values
    for lon0, lat0, counted in ((89.0, 15.0, True), (305.0, 59.0, True), (51.0, 27.0, False)):
        j, i = grid.cell_of_point(lon0, lat0)
        assert (ic[j, i] == 1) == counted, (lon0, lat0, ic[j, i])
    assert "bay_of_bengal" in ds.crossed_seas.sel(basin="indian", lat=15.5).item()
    assert "labrador_sea" in ds.crossed_seas.sel(basin="atlantic", lat=59.5).item()
    assert ds.attrs["basins"] == "earth"


@pytest.mark.realdata
def test_no_valid_band_spans_two_oceans_on_a_rotated_grid(earth_on_a_rotated_grid):
    # Issue 10's first rule, on a model grid: south of the capes a band of a basin ends on an
    # open dividing line (the meridians of Cape Agulhas, Tasmania and Cape Horn), so it has no
    # eastern or no western coast and is never valid (common practice: the Atlantic, Pacific
    # and Indian basins end at those capes, Times Atlas of the World). Before, the land far
    # along the gap (South America seen from the Atlantic's eastern end) counted as a coast
    # and the bands at 45-61S were valid (-80 Sv in the Indian Ocean at 60S).
    _, _, ds = earth_on_a_rotated_grid
    valid = ds.row_status == 0
    assert int(valid.sum()) > 100  # not vacuous
    assert not valid.sel(lat=slice(-61, -45)).any()
    span = (ds.eastern_coast_lon - ds.western_coast_lon) % 360
    assert float(span.where(valid).max()) <= 180.0
    assert set(np.unique(ds.row_status.sel(lat=slice(-61, -45)).values)) <= {2, 5, 8}


def test_model_grid_result_keeps_its_coordinates_and_refuses_regular_only_options():
    # The band coordinate 'lat' and the model grid's own two-dimensional latitude live in one
    # Dataset: the latter is renamed grid_lat/grid_lon (CF finds them by standard name), not
    # dropped. Options built for regular grids are refused in one clear message, not ignored.
    lat, lon, clat, clon = rotated_pole_grid(4.0, pole_lat=60.0, pole_lon=200.0)
    land = _land(lat, lon)
    tx = as_field(np.where(land, np.nan, -0.1 * np.cos(np.deg2rad(4.0 * (lat - 15)))), lat,
                  lon)
    ds = sk.sverdrup_transport(tx, 0 * tx)
    assert ds["grid_lat"].dims == ("y", "x") and ds["grid_lat"].attrs["units"] == "degrees_north"
    np.testing.assert_array_equal(ds["grid_lat"].values, lat)
    assert ds["lat"].dims == ("lat",) and float(ds["lat"].max()) < 90.0
    assert "not applied" in ds.attrs["island_rule"]
    with pytest.raises(sk.errors.InputError, match="relief: expected None on a model grid"):
        sk.sverdrup_transport(tx, 0 * tx, relief=tx)
    with pytest.raises(sk.errors.InputError, match="gyre_threshold_sv"):
        sk.sverdrup_transport(tx, 0 * tx, gyre_threshold_sv="2")
    assert ds.gyre_boundary_lat.dims == ("basin", "gyre_boundary")
