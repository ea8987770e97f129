"""Wind-stress curl on the sphere: analytic fields, conventions, coasts, MetPy, dask."""

import dask
import dask.array as dsa
import numpy as np
import pytest
import xarray as xr

from sverdrup_kit import SphericalGrid, wind_stress_curl
from sverdrup_kit.constants import EARTH_RADIUS as R

from .._dask_guard import CountingScheduler


def analytic(lat, lon):
    """taux = cos(2 lam) cos^2(phi), tauy = sin(lam) cos(phi) and their exact curl.

    Derived by hand from curl = [d(tauy)/dlam - d(taux cos phi)/dphi] / (R cos phi):
    curl = [cos(lam) cos(phi) + 3 cos(2 lam) cos^2(phi) sin(phi)] / (R cos(phi)).
    """
    phi = np.deg2rad(np.asarray(lat))[:, None]
    lam = np.deg2rad(np.asarray(lon))[None, :]
    tx = 0.1 * np.cos(2 * lam) * np.cos(phi) ** 2
    ty = 0.1 * np.sin(lam) * np.cos(phi)
    curl = 0.1 * (np.cos(lam) * np.cos(phi) + 3 * np.cos(2 * lam) * np.cos(phi) ** 2 * np.sin(phi))
    return tx, ty, curl / (R * np.cos(phi))


def as_da(values, lat, lon, units="Pa"):
    return xr.DataArray(
        values, coords={"lat": lat, "lon": lon}, dims=("lat", "lon"), attrs={"units": units}
    )


def curl_error(dlat):
    g = SphericalGrid.regular(dlat)
    tx, ty, exact = analytic(g.lat, g.lon)
    c = wind_stress_curl(as_da(tx, g.lat, g.lon), as_da(ty, g.lat, g.lon))
    inner = np.abs(g.lat) < 70
    return np.max(np.abs(c.values - exact)[inner]) / np.max(np.abs(exact)[inner])


def test_curl_converges_at_second_order():
    # Analytic field (derived above): halving the spacing must cut the error about fourfold.
    errors = [curl_error(d) for d in (4.0, 2.0, 1.0)]
    orders = np.log2(np.array(errors[:-1]) / np.array(errors[1:]))
    assert errors[-1] < 1e-3
    assert np.all(orders > 1.8), orders


def test_curl_of_solid_body_rotation_is_twice_the_rate():
    # Solid-body rotation u = W R cos(phi) has vorticity 2 W sin(phi) (common practice,
    # textbook kinematics on the sphere).
    g = SphericalGrid.regular(2.0)
    w = 1e-8
    tx = w * R * np.cos(np.deg2rad(g.lat))[:, None] * np.ones(g.lon.size)
    c = wind_stress_curl(as_da(tx, g.lat, g.lon), as_da(0 * tx, g.lat, g.lon))
    expected = 2 * w * np.sin(np.deg2rad(g.lat))[:, None]
    np.testing.assert_allclose(c.values[1:-1], np.broadcast_to(expected, c.shape)[1:-1],
                               rtol=2e-3, atol=1e-14)


@pytest.mark.parametrize("shift", [0.0, -180.0, 20.0, -360.0, 360.0])
def test_same_answer_for_every_longitude_convention(shift):
    # Longitudes 0..360, -180..180 and 20..380 describe the same field (gsw's test habit of
    # shifting longitudes by -360/0/+360).
    g = SphericalGrid.regular(3.0)
    tx, ty, _ = analytic(g.lat, g.lon)
    ref = wind_stress_curl(as_da(tx, g.lat, g.lon), as_da(ty, g.lat, g.lon))
    lon = g.lon + shift
    rolled = as_da(tx, g.lat, lon), as_da(ty, g.lat, lon)
    out = wind_stress_curl(*rolled)
    np.testing.assert_allclose(out.values, ref.values, rtol=1e-12, atol=1e-20)
    np.testing.assert_array_equal(out.lon.values, lon)


def test_wrapped_longitudes_and_descending_latitude():
    # An axis 0..180,-180..0 (rolled at the date line) and north-to-south latitudes must give
    # the same curl in the caller's order.
    g = SphericalGrid.regular(3.0)
    tx, ty, _ = analytic(g.lat, g.lon)
    ref = wind_stress_curl(as_da(tx, g.lat, g.lon), as_da(ty, g.lat, g.lon))
    lon = np.where(g.lon > 180, g.lon - 360, g.lon)
    a = as_da(tx, g.lat, lon).isel(lat=slice(None, None, -1))
    b = as_da(ty, g.lat, lon).isel(lat=slice(None, None, -1))
    out = wind_stress_curl(a, b)
    assert out.dims == ("lat", "lon")
    np.testing.assert_array_equal(out.lat.values, g.lat[::-1])
    np.testing.assert_array_equal(out.lon.values, lon)
    np.testing.assert_allclose(out.values, ref.values[::-1], rtol=1e-12, atol=1e-20)


def test_gaussian_latitudes():
    # Gauss-Legendre latitudes (non-uniform spacing) keep second-order accuracy: the analytic
    # field above on a T42-like Gaussian grid (numpy's leggauss nodes).
    errs = []
    for n in (32, 64, 128):
        x, _ = np.polynomial.legendre.leggauss(n)
        lat = np.rad2deg(np.arcsin(x))
        lon = np.arange(0, 360, 360 / (2 * n))
        tx, ty, exact = analytic(lat, lon)
        c = wind_stress_curl(as_da(tx, lat, lon), as_da(ty, lat, lon))
        inner = np.abs(lat) < 70
        errs.append(np.max(np.abs(c.values - exact)[inner]) / np.max(np.abs(exact)[inner]))
    assert np.all(np.log2(np.array(errs[:-1]) / np.array(errs[1:])) > 1.8), errs


def test_agrees_with_metpy_vorticity():
    # MetPy's vorticity on a latitude-longitude grid (metpy.calc.vorticity, MetPy 1.x) is the
    # same operator; both are second-order, so they agree to the truncation error.
    mpcalc = pytest.importorskip("metpy.calc")
    lat = np.arange(-80, 81, 1.0)
    lon = np.arange(0, 360, 1.0)
    tx, ty, _ = analytic(lat, lon)
    crs = dict(grid_mapping_name="latitude_longitude", earth_radius=R)
    u = as_da(tx * 100, lat, lon, "m/s").metpy.assign_crs(**crs)
    v = as_da(ty * 100, lat, lon, "m/s").metpy.assign_crs(**crs)
    ref = mpcalc.vorticity(u, v).metpy.dequantify() / 100
    ours = wind_stress_curl(as_da(tx, lat, lon), as_da(ty, lat, lon))
    inner = dict(lat=slice(1, -1), lon=slice(1, -1))
    scale = float(np.abs(ours).max())
    assert float(np.abs(ref - ours).isel(**inner).max()) < 1e-3 * scale


def test_coast_cells_get_one_sided_values_and_land_stays_missing():
    # A linear field has an exact derivative with any consistent stencil, so the curl next to
    # coasts must equal the analytic value (derived: tauy = a*lam gives curl = a/(R cos phi)).
    lat = np.arange(-60, 61, 2.0)
    lon = np.arange(0, 100, 2.0)
    a = 0.05
    ty = a * np.deg2rad(lon)[None, :] * np.ones((lat.size, 1))
    tx = np.zeros_like(ty)
    land = np.zeros_like(ty, dtype=bool)
    land[10:20, 20:30] = True  # a continent
    land[30, 5] = True  # a one-cell island
    tx[land] = np.nan
    ty[land] = np.nan
    c = wind_stress_curl(as_da(tx, lat, lon), as_da(ty, lat, lon))
    expected = a / (R * np.cos(np.deg2rad(lat)))[:, None] * np.ones(lon.size)
    assert np.all(np.isnan(c.values[land]))
    np.testing.assert_allclose(c.values[~land], expected[~land], rtol=1e-10)


def test_non_periodic_regional_grid_uses_one_sided_edges():
    # A regional grid (not closing the circle) must not wrap: a quadratic field
    # tauy = lam^2 differentiated with 3-point one-sided stencils is exact (common practice).
    lat = np.array([-10.0, 0.0, 10.0])
    lon = np.arange(100, 140, 1.0)
    lam = np.deg2rad(lon)
    ty = np.ones((3, 1)) * lam**2
    c = wind_stress_curl(as_da(0 * ty, lat, lon), as_da(ty, lat, lon))
    expected = (2 * lam)[None, :] / (R * np.cos(np.deg2rad(lat)))[:, None]
    np.testing.assert_allclose(c.values, expected, rtol=1e-9)


def test_units_are_converted_and_attrs_set():
    # 1 dyn cm-2 = 0.1 Pa (definition of the dyne and the pascal).
    g = SphericalGrid.regular(6.0)
    tx, ty, _ = analytic(g.lat, g.lon)
    pa = wind_stress_curl(as_da(tx, g.lat, g.lon), as_da(ty, g.lat, g.lon))
    dyn = wind_stress_curl(as_da(tx * 10, g.lat, g.lon, "dyn/cm2"),
                           as_da(ty * 10, g.lat, g.lon, "dyne cm-2"))
    np.testing.assert_allclose(dyn.values, pa.values, rtol=1e-12)
    assert pa.attrs["units"] == "N m-3"
    assert pa.name == "wind_stress_curl"


def test_leading_dimensions_pass_through_and_input_untouched():
    g = SphericalGrid.regular(6.0)
    tx, ty, _ = analytic(g.lat, g.lon)
    stack = np.stack([tx, 2 * tx, 3 * tx])
    a = xr.DataArray(stack, coords={"member": [1, 2, 3], "lat": g.lat, "lon": g.lon},
                     dims=("member", "lat", "lon"), attrs={"units": "Pa"})
    b = a * 0 + ty
    b.attrs["units"] = "Pa"
    before = a.copy(deep=True)
    c = wind_stress_curl(a, b)
    assert c.dims == ("member", "lat", "lon")
    # curl is linear in taux: member 3 minus member 1 equals the curl of 2*taux (derived)
    lin = wind_stress_curl(2 * a.isel(member=0), 0 * b.isel(member=0))
    np.testing.assert_allclose((c.isel(member=2) - c.isel(member=0)).values, lin.values,
                               rtol=1e-9, atol=1e-18)
    xr.testing.assert_identical(a, before)


def test_dask_stays_lazy_and_matches_numpy():
    g = SphericalGrid.regular(4.0)
    tx, ty, _ = analytic(g.lat, g.lon)
    tx = np.stack([tx, 2 * tx, tx * 0.5, tx])
    ty = np.stack([ty] * 4)
    coords = {"time": np.arange(4), "lat": g.lat, "lon": g.lon}
    a = xr.DataArray(tx, coords=coords, dims=("time", "lat", "lon"), attrs={"units": "Pa"})
    b = xr.DataArray(ty, coords=coords, dims=("time", "lat", "lon"), attrs={"units": "Pa"})
    ref = wind_stress_curl(a, b)
    counter = CountingScheduler()
    with dask.config.set(scheduler=counter):
        lazy = wind_stress_curl(a.chunk(time=1, lon=30), b.chunk(time=1, lon=30))
        assert counter.calls == 0
        assert isinstance(lazy.data, dsa.Array)
        result = lazy.compute()
    assert counter.calls == 1
    np.testing.assert_array_equal(result.values, ref.values)


@pytest.mark.parametrize(
    "make, match",
    [
        (lambda a, b: (a, b.isel(lat=slice(1, None))), "same grid"),
        (lambda a, b: (a.assign_attrs(units="furlongs"), b), "furlongs"),
        (lambda a, b: (a.values, b), "expected an xarray.DataArray"),
        (lambda a, b: (a.assign_coords(lat=a.lat * 2), b.assign_coords(lat=b.lat * 2)),
         "within -90..90"),
        (lambda a, b: (a.isel(lon=[0, 2, 1, 3]), b.isel(lon=[0, 2, 1, 3])), "not monotonic"),
        (lambda a, b: (a.isel(lat=[0, 1, 1, 2]), b.isel(lat=[0, 1, 1, 2])), "duplicate"),
    ],
)
def test_bad_input_gets_a_clear_error(make, match):
    g = SphericalGrid.regular(10.0)
    tx, ty, _ = analytic(g.lat, g.lon)
    a, b = make(as_da(tx, g.lat, g.lon), as_da(ty, g.lat, g.lon))
    with pytest.raises((ValueError, TypeError), match=match) as info:
        wind_stress_curl(a, b)
    assert "Fix" in str(info.value) or "fix" in str(info.value)


def test_model_grids_go_to_the_model_grid_curl():
    # 2-D coordinates are no longer refused: wind_stress_curl hands them to the Stokes curl
    # of sverdrup_kit.physics.model_grid (tested against closed forms in test_model_grid.py).
    y, x = np.mgrid[0:5, 0:6]
    lat2d = xr.DataArray(10.0 + y + 0.1 * x, dims=("y", "x"), attrs={"units": "degrees_north"})
    lon2d = xr.DataArray(100.0 + x + 0.1 * y, dims=("y", "x"), attrs={"units": "degrees_east"})
    a = xr.DataArray(np.ones((5, 6)), dims=("y", "x"), coords={"nav_lat": lat2d, "nav_lon": lon2d},
                     attrs={"units": "Pa"})
    curl = wind_stress_curl(a, a)
    assert curl.dims == ("y", "x") and curl.attrs["units"] == "N m-3"
    # A uniform eastward-and-northward stress on a small patch has a curl of order
    # tau tan(phi) / R only (the metric term; derived): tiny against tau / dx.
    assert np.nanmax(np.abs(curl.values)) < 1e-7


def test_coordinates_keep_their_cf_attributes():
    # CF: latitude and longitude carry units (CF conventions, section 4.1-4.2); a result
    # written to NetCDF must keep them.
    g = SphericalGrid.regular(10.0)
    tx, ty, _ = analytic(g.lat, g.lon)
    a = as_da(tx, g.lat, g.lon)
    a.lat.attrs.update(units="degrees_north", standard_name="latitude")
    a.lon.attrs.update(units="degrees_east", standard_name="longitude")
    c = wind_stress_curl(a, as_da(ty, g.lat, g.lon).assign_coords(lat=a.lat, lon=a.lon))
    assert c.lat.attrs["units"] == "degrees_north"
    assert c.lon.attrs["standard_name"] == "longitude"
    assert c.attrs["units"] == "N m-3"
