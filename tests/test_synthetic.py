"""Tests of the bundled synthetic world: reproduction, geography, winds and their analytic forms."""

import os
import subprocess
import sys

import numpy as np
import pytest
import xarray as xr
from scipy import ndimage, special, stats

from sverdrup_kit import synthetic
from sverdrup_kit.physics.operators import wind_stress_curl

from ._cf_check import cf_problems

# Coefficients as documented in the module docstring of sverdrup_kit.synthetic, written out
# again here so that a silent change of the generator shows up as a failure.
A_COS = (-0.1, -2.6, -5.8, 0.7, 3.1)
B_SIN = (-0.4, -0.4, 0.8)
V_AMP = 1.2
D_RAD = np.deg2rad(4.0)


def documented_u(lat_deg, delta):
    p = np.deg2rad(lat_deg) - delta
    u = sum(a * np.cos(2 * k * p) for k, a in enumerate(A_COS))
    return u + sum(b * np.sin((2 * j + 1) * p) for j, b in enumerate(B_SIN))


def documented_shift(month):
    return D_RAD * np.sin(2 * np.pi * ((month + 0.5) / 12 - 0.25))


@pytest.fixture(scope="module")
def world():
    return synthetic.load_world()


def ocean_runs(row_ocean, lon, dlon=2.0):
    """Widths in degrees of the runs of ocean along a periodic row (sorted)."""
    if row_ocean.all():
        return [360.0]
    start = int(np.argmin(row_ocean))  # a land cell: start there so no run crosses the seam
    r = np.roll(row_ocean, -start)
    widths, n = [], 0
    for is_ocean in r:
        if is_ocean:
            n += 1
        elif n:
            widths.append(n * dlon)
            n = 0
    if n:
        widths.append(n * dlon)
    return sorted(widths)


# --- reproduction -------------------------------------------------------------------------------


def assert_same_dataset(a: xr.Dataset, b: xr.Dataset):
    assert set(a.variables) == set(b.variables)
    for name in a.variables:
        assert a[name].dtype == b[name].dtype, name
        assert a[name].dims == b[name].dims, name
        np.testing.assert_array_equal(a[name].values, b[name].values, err_msg=name)
        assert a[name].attrs.keys() == b[name].attrs.keys(), name
        for key in a[name].attrs:
            np.testing.assert_equal(a[name].attrs[key], b[name].attrs[key],
                                    err_msg=f"{name}.{key}")
    assert a.attrs.keys() == b.attrs.keys()
    for key in a.attrs:
        np.testing.assert_equal(a.attrs[key], b.attrs[key], err_msg=key)


def test_generator_reproduces_bundled_file_bit_for_bit(world):
    assert_same_dataset(synthetic.make_world(), world)


def test_command_line_writes_an_identical_copy(tmp_path, world):
    out = tmp_path / "copy.nc"
    subprocess.run(
        [sys.executable, "-m", "sverdrup_kit.synthetic", "--write", str(out)],
        check=True, capture_output=True,
    )
    with xr.open_dataset(out) as fresh:
        assert_same_dataset(fresh.load(), world)
    assert sorted(os.listdir(tmp_path)) == ["copy.nc"]


def test_failed_write_leaves_nothing(tmp_path, monkeypatch):
    def broken(self, path, **kw):
        with open(path, "wb") as fh:
            fh.write(b"half a file")
        raise OSError("disk full")

    monkeypatch.setattr(xr.Dataset, "to_netcdf", broken)
    with pytest.raises(OSError, match="disk full"):
        synthetic.write_world(tmp_path / "world.nc")
    assert os.listdir(tmp_path) == []


def test_bundled_file_passes_the_cf_compliance_checker_for_its_conventions(monkeypatch):
    # The IOOS compliance checker (general-purpose reference tool), offline, for the CF
    # version the file declares: no errors and no warnings.
    path = os.path.join(os.path.dirname(synthetic.__file__), "data", "synthetic_world.nc")
    with xr.open_dataset(path) as ds:
        assert ds.attrs["Conventions"] == "CF-1.10"
    assert cf_problems(path, monkeypatch, suite="cf:1.10") == []


def test_bundled_file_is_small():
    path = os.path.join(os.path.dirname(synthetic.__file__), "data", "synthetic_world.nc")
    assert os.path.getsize(path) < 3e6


def test_load_world_chunked_is_lazy_and_equal(world):
    lazy = synthetic.load_world(chunks={"time": 3})
    assert lazy.u.chunks is not None
    xr.testing.assert_identical(lazy.compute(), world)


def test_bad_arguments_name_themselves():
    with pytest.raises(TypeError, match="noise"):
        synthetic.make_world(noise="yes")
    with pytest.raises(ValueError, match="month"):
        synthetic.analytic_winds(10.0, month=12)


# --- CF metadata --------------------------------------------------------------------------------


def test_cf_metadata(world):
    cf_units = pytest.importorskip("cf_units")
    assert world.u.attrs["standard_name"] == "eastward_wind"
    assert world.v.attrs["standard_name"] == "northward_wind"
    assert world.wind_speed.attrs["standard_name"] == "wind_speed"
    for name in ("u", "v", "wind_speed", "weather_wind_std"):
        assert cf_units.Unit(world[name].attrs["units"]) == cf_units.Unit("m/s")
    assert world.lat.attrs["units"] == "degrees_north"
    assert world.lon.attrs["units"] == "degrees_east"
    assert world.ocean_mask.dtype == np.int8
    assert set(np.unique(world.ocean_mask.values)) == {0, 1}
    months = world.time.dt.month.values
    np.testing.assert_array_equal(months, np.arange(1, 13))
    assert "climatology" in world.time.attrs["comment"]
    np.testing.assert_array_equal(world.lat.values, np.arange(-89, 90, 2))
    np.testing.assert_array_equal(world.lon.values, np.arange(1, 360, 2))


def test_land_is_nan_exactly_where_the_mask_says(world):
    ocean = world.ocean_mask.values.astype(bool)
    for name in ("u", "v", "wind_speed"):
        finite = np.isfinite(world[name].values)
        assert (finite == ocean[None]).all(), name


# --- geography ----------------------------------------------------------------------------------


def row(world, lat):
    return world.ocean_mask.sel(lat=lat).values.astype(bool)


def test_two_basins_of_different_widths(world):
    # Documented widths: Halcyon 130 degrees, Lissom 60 degrees, north of 10N.
    assert ocean_runs(row(world, 41), world.lon.values) == [60.0, 130.0]
    assert ocean_runs(row(world, 11), world.lon.values) == [60.0, 130.0]


def test_peninsula_and_gulf(world):
    lon = world.lon.values
    # Row 25N: gulf 40E-60E (20 degrees), peninsula 60E-66E, Halcyon from 66E to 190E (124).
    assert ocean_runs(row(world, 25), lon) == [20.0, 60.0, 124.0]
    peninsula = ~row(world, 25) & (lon > 60) & (lon < 66)
    assert peninsula.sum() == 3
    # The gulf is closed to the north and west and opens south-east through the strait at
    # 16N-20N, where the row runs unbroken from Aurelia's coast at 40E to Cendra's at 190E.
    assert not row(world, 33)[(lon > 40) & (lon < 66)].any()
    assert ocean_runs(row(world, 17), lon) == [60.0, 150.0]
    gulf_rows = world.ocean_mask.sel(lat=slice(16, 32), lon=slice(40, 60)).values
    assert gulf_rows.all()


def test_islands(world):
    land = ~world.ocean_mask.values.astype(bool)
    labels, n = ndimage.label(land)
    sizes = np.bincount(labels.ravel())[1:]
    small = sorted(int(s) for s in sizes if s < 100)
    assert small == [2, 30]  # Tiel Island 2 x 1, Isle of Brenn 5 x 6 (documented)
    brenn = labels == (np.flatnonzero(sizes == 30)[0] + 1)
    rows, cols = np.nonzero(brenn)
    assert np.ptp(cols) + 1 == 5 and np.ptp(rows) + 1 == 6
    lat = world.lat.values[rows]
    lon = world.lon.values[cols]
    assert -30 < lat.min() and lat.max() < -18 and 150 < lon.min() and lon.max() < 160


def test_circumpolar_channel_has_no_land(world):
    band = world.ocean_mask.sel(lat=slice(-66, -46))
    assert band.sizes["lat"] == 10
    assert band.values.all()
    # Just outside the band there is land (the Austral Cap and the tip of Cendra).
    assert not world.ocean_mask.sel(lat=-67).values.any()
    assert not world.ocean_mask.sel(lat=-45).values.all()


# --- winds --------------------------------------------------------------------------------------


def test_annual_zonal_mean_matches_bessel_weighted_profile(world):
    # Derived in the module docstring: the mean over the 12 shifted months multiplies each
    # term of wavenumber n by J0(n D). The noise has zero ocean mean in each row, so only
    # float32 rounding (spacing 9.5e-7 m s-1 at 10 m s-1) separates the file from it.
    lat = world.lat.values
    phi = np.deg2rad(lat)
    expected = sum(a * special.j0(2 * k * D_RAD) * np.cos(2 * k * phi)
                   for k, a in enumerate(A_COS))
    expected = expected + sum(b * special.j0((2 * j + 1) * D_RAD) * np.sin((2 * j + 1) * phi)
                              for j, b in enumerate(B_SIN))
    got = world.u.astype(np.float64).mean(("time", "lon")).values
    has_ocean = np.isfinite(got)
    assert has_ocean.sum() == 68
    np.testing.assert_allclose(got[has_ocean], expected[has_ocean], rtol=0, atol=5e-6)
    np.testing.assert_allclose(synthetic.analytic_winds(lat)[0], expected, rtol=0, atol=1e-12)


def test_bessel_identity_against_direct_monthly_average():
    # Checks the docstring's J0 claim itself, by averaging the 12 documented months directly.
    lat = np.linspace(-89, 89, 179)
    direct = np.mean([documented_u(lat, documented_shift(m)) for m in range(12)], axis=0)
    np.testing.assert_allclose(synthetic.analytic_winds(lat)[0], direct, rtol=0, atol=1e-12)
    v_direct = np.mean([-V_AMP * np.sin(6 * (np.deg2rad(lat) - documented_shift(m)))
                        for m in range(12)], axis=0)
    np.testing.assert_allclose(synthetic.analytic_winds(lat)[1], v_direct, rtol=0, atol=1e-12)


def test_noise_statistics(world):
    # Documented: zero ocean mean per row and month, std 1.0 (u) and 0.7 (v) m s-1 over the ocean.
    lat = world.lat.values
    for name, std in (("u", 1.0), ("v", 0.7)):
        noise = []
        for m in range(12):
            u0, v0 = synthetic.analytic_winds(lat, month=m)
            ref = u0 if name == "u" else v0
            noise.append(world[name].isel(time=m).values.astype(np.float64) - ref[:, None])
        noise = np.array(noise)
        has_ocean = world.ocean_mask.values.any(axis=-1)
        row_means = np.nanmean(noise[:, has_ocean], axis=-1)
        np.testing.assert_allclose(row_means, 0, atol=5e-6)
        assert np.sqrt(np.nanmean(noise**2)) == pytest.approx(std, rel=1e-5)


def test_monthly_profile_follows_documented_formula_and_shifts_north_in_july(world):
    lat = world.lat.values
    for m in (0, 6):
        got = world.u.isel(time=m).astype(np.float64).mean("lon").values
        ok = np.isfinite(got)
        np.testing.assert_allclose(got[ok], documented_u(lat, documented_shift(m))[ok], atol=5e-6)
    # The trade-to-westerly zero crossing near 30N lies further north in July than in January.
    fine = np.linspace(20, 40, 20001)
    jan = fine[np.argmin(np.abs(documented_u(fine, documented_shift(0))))]
    jul = fine[np.argmin(np.abs(documented_u(fine, documented_shift(6))))]
    assert 7.0 < jul - jan < 8.0  # 2 D sin(75 deg) = 7.73 degrees (derived)


def test_wind_belts_are_earth_like():
    # Common practice (zonal-mean surface winds over the oceans): trades of -5 to -8 m s-1 near
    # 15 degrees, westerlies of 7-11 m s-1 near 45-50 degrees and stronger in the south, polar
    # easterlies poleward of about 65 degrees.
    lat = np.arange(-80.0, 80.5, 0.5)
    u = synthetic.analytic_winds(lat)[0]
    north_trades = u[(lat > 0) & (lat < 30)].min()
    assert -8 < north_trades < -5
    nh = lat[(lat > 30) & (lat < 70)][np.argmax(u[(lat > 30) & (lat < 70)])]
    sh = lat[(lat < -30) & (lat > -70)][np.argmax(u[(lat < -30) & (lat > -70)])]
    assert 40 < nh < 50 and -52 < sh < -42
    assert u.max() == u[(lat < -30) & (lat > -70)].max() > 8
    assert u[np.abs(lat - 75) < 0.3][0] < 0 and u[np.abs(lat + 72) < 0.3][0] < 0


def test_wind_speed_is_the_rice_mean(world):
    # Reference library: scipy.stats.rice (mean of the speed of an isotropic 2-D Gaussian about a
    # mean vector of length nu, std s per component: b = nu / s, scale = s).
    s = world.weather_wind_std.values.astype(np.float64)[None, :, None]
    nu = np.hypot(world.u.values.astype(np.float64), world.v.values.astype(np.float64))
    ocean = np.isfinite(nu)
    s_b = np.broadcast_to(s, nu.shape)[ocean]
    expected = stats.rice.mean(nu[ocean] / s_b, scale=s_b)
    np.testing.assert_allclose(world.wind_speed.values[ocean], expected, rtol=2e-6)
    assert (world.wind_speed.values[ocean] > nu[ocean]).all()
    # Documented weather spread: 2 + 4 sin^2(2 lat).
    lat = world.lat.values
    np.testing.assert_allclose(world.weather_wind_std.values,
                               2 + 4 * np.sin(2 * np.deg2rad(lat)) ** 2, rtol=1e-7)


def test_wind_speed_monte_carlo_at_one_point():
    # A second outside check: sample the weather directly (common practice).
    rng = np.random.default_rng(5)
    s, u, v = 6.0, 8.0, 1.0
    samples = np.hypot(u + s * rng.standard_normal(400_000), v + s * rng.standard_normal(400_000))
    got = synthetic._rice_mean(np.hypot(u, v), s)
    assert got == pytest.approx(samples.mean(), rel=3e-3)


# --- analytic curl ------------------------------------------------------------------------------


def test_analytic_curl_against_fine_finite_differences():
    # Derived: curl = -(1/(R cos phi)) d/dphi(rho_a Cd S u cos phi), differenced numerically on a
    # 0.001 degree grid from the documented winds (independent of the analytic derivative).
    R, rho_a, cd = 6.371e6, 1.22, 1.3e-3
    lat = np.arange(-70, 70.0005, 0.001)
    for m in (2, 9):
        u0, v0 = synthetic.analytic_winds(lat, month=m)
        flux = rho_a * cd * np.hypot(u0, v0) * u0 * np.cos(np.deg2rad(lat))
        numeric = -np.gradient(flux, np.deg2rad(lat)) / (R * np.cos(np.deg2rad(lat)))
        exact = synthetic.analytic_stress_curl(lat, m, drag_coefficient=cd, air_density=rho_a)
        inner = slice(1, -1)
        np.testing.assert_allclose(exact[inner], numeric[inner], rtol=0,
                                   atol=1e-6 * np.abs(exact).max())


def test_analytic_curl_against_toolkit_operator():
    # The coast-aware finite-difference operator on the noise-free world should reproduce the
    # analytic curl away from coasts to second order: (2 degrees)^2 errors of a few percent.
    # Where u0 crosses zero the stress S u0 bends sharply on the grid scale (S is small), so
    # those rows (|u0| < 1 m s-1) are left out (derived from the Taylor error term).
    w = synthetic.make_world(noise=False)
    cd, rho_a = 1.2e-3, 1.22
    speed = np.hypot(w.u.astype("f8"), w.v.astype("f8"))
    taux = (rho_a * cd * speed * w.u.astype("f8")).assign_attrs(units="Pa")
    tauy = (rho_a * cd * speed * w.v.astype("f8")).assign_attrs(units="Pa")
    curl = wind_stress_curl(taux, tauy)
    lat = w.lat.values
    ocean = w.ocean_mask.values.astype(bool)
    inner = ocean.copy()
    for k in (1, 2):
        inner[k:] &= ocean[:-k]
        inner[:-k] &= ocean[k:]
    for m in (0, 6):
        exact = synthetic.analytic_stress_curl(lat, m, drag_coefficient=cd, air_density=rho_a)
        got = curl.isel(time=m).values
        u0 = synthetic.analytic_winds(lat, m)[0]
        keep = inner & (np.abs(u0) > 1.0)[:, None]
        assert keep.sum() > 0.8 * inner.sum()
        err = np.abs(got - exact[:, None])[keep]
        assert err.max() < 0.03 * np.abs(exact[np.abs(lat) < 70]).max()
    annual = synthetic.analytic_stress_curl(lat, drag_coefficient=cd, air_density=rho_a)
    monthly = synthetic.analytic_stress_curl(lat, np.arange(12), drag_coefficient=cd,
                                             air_density=rho_a)
    np.testing.assert_allclose(annual, monthly.mean(axis=0), rtol=1e-12)


def test_world_basins_are_named_and_carry_the_documented_oceans():
    # Widths from the documented geography (module docstring): the Halcyon Ocean spans
    # 60E-190E (130 degrees) and the Lissom Ocean 260E-320E (60 degrees) north of 10N.
    from sverdrup_kit.synthetic import world_basins

    world = synthetic.load_world()
    ids = world_basins(world)
    assert ids.attrs["flag_meanings"].split() == ["halcyon", "lissom", "skerrow_passage"]
    row = ids.sel(lat=41.0)
    assert int((row == 0).sum()) * 2 == 130
    assert int((row == 1).sum()) * 2 == 60
    assert int((ids.sel(lat=-41.0) == 2).sum()) > 0
    # Land is outside every basin except the small Tiel Island (2 x 1 cells, documented), which
    # takes the basin of the water around it.
    land_in_basin = ids.values[world.ocean_mask.values == 0] >= 0
    assert int(land_in_basin.sum()) == 2


def test_world_basins_in_another_longitude_convention():
    # The same geography on -180..180 must give the same named basins (gsw's habit of
    # shifting longitudes by 360 and expecting the same answers).
    from sverdrup_kit.synthetic import world_basins

    world = synthetic.load_world()
    ref = world_basins(world)
    moved = world.assign_coords(lon=(world.lon + 180) % 360 - 180).sortby("lon")
    ids = world_basins(moved)
    assert ids.attrs["flag_meanings"] == ref.attrs["flag_meanings"]
    back = ids.assign_coords(lon=ids.lon % 360).sortby("lon")
    np.testing.assert_array_equal(back.values, ref.values)
