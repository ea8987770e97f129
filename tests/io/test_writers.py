"""CF NetCDF writing: whole or nothing, input untouched; the observation table."""

import numpy as np
import pytest
import xarray as xr

from sverdrup_kit import (boundary_current, boundary_current_observations, ekman,
                          solve_barotropic, solve_basin, sverdrup_transport, write_netcdf)
from sverdrup_kit.physics.boundary_layers import stommel_basin

from .._cf_check import cf_problems


def small():
    return xr.Dataset(
        {"streamfunction": (("lat", "lon"), np.arange(6.0).reshape(2, 3),
                            {"units": "1e6 m3 s-1", "long_name": "streamfunction"}),
         "ocean": (("lat", "lon"), np.ones((2, 3), bool))},
        coords={"lat": [10.0, 20.0], "lon": [0.0, 1.0, 2.0]},
        attrs={"history": "made in a test"},
    )


def test_round_trip_and_cf_globals(tmp_path):
    ds = small()
    before = ds.copy(deep=True)
    path = write_netcdf(ds, tmp_path / "r.nc")
    xr.testing.assert_identical(ds, before)
    with xr.open_dataset(path) as back:
        np.testing.assert_array_equal(back.streamfunction.values, ds.streamfunction.values)
        assert back.attrs["Conventions"] == "CF-1.8"
        assert "made in a test" in back.attrs["history"]
        assert "not for navigation" in back.attrs["purpose"]
    assert list(tmp_path.iterdir()) == [path]


def test_failed_write_leaves_nothing(tmp_path):
    ds = small()
    ds.attrs["bad"] = {"a dict": "cannot be a NetCDF attribute"}
    with pytest.raises(Exception):
        write_netcdf(ds, tmp_path / "r.nc")
    assert list(tmp_path.iterdir()) == []


def test_missing_folder_is_a_clear_error(tmp_path):
    with pytest.raises(FileNotFoundError, match="does not exist"):
        write_netcdf(small(), tmp_path / "nope" / "r.nc")


def test_observation_table():
    # Florida Current cable record 2004-22 mean, 31.3 +- 3.2 Sv (RAPID/Florida Current cable,
    # Baringer and colleagues' public series); Agulhas 69.7 Sv southward at 32S (Bryden et al.
    # 2005, J. Oceanogr. 61, 479-492).
    obs = boundary_current_observations()
    assert float(obs.transport.sel(current="Florida Current")) == 31.3
    assert float(obs.transport.sel(current="Agulhas Current")) == -69.7
    assert set(boundary_current_observations("pacific").basin.values) == {"pacific"}
    with pytest.raises(ValueError, match="basin"):
        boundary_current_observations("arctic")


def small_world(times=2):
    """A 4 degree global world with one continent and one island, stress with a time axis."""
    lat = np.arange(-78.0, 79.0, 4.0)
    lon = np.arange(2.0, 360.0, 4.0)
    la, lo = np.meshgrid(lat, lon, indexing="ij")
    land = ((np.abs(lo - 100) < 20) & (np.abs(la) < 60)) | ((np.abs(lo - 250) < 5) &
                                                           (np.abs(la - 20) < 5))
    tx = np.where(land, np.nan, -0.1 * np.cos(np.deg2rad(3 * la)))
    time = np.array(["2001-01-16", "2001-02-15"], dtype="datetime64[ns]")[:times]
    # coordinates with the CF attributes open_winds gives them
    coords = {
        "time": ("time", time, {"standard_name": "time", "axis": "T"}),
        "lat": ("lat", lat, {"standard_name": "latitude", "units": "degrees_north", "axis": "Y"}),
        "lon": ("lon", lon, {"standard_name": "longitude", "units": "degrees_east", "axis": "X"}),
    }
    taux = xr.DataArray(np.stack([tx * (1 + 0.1 * k) for k in range(times)]), coords=coords,
                        dims=("time", "lat", "lon"), attrs={"units": "Pa"})
    return taux, (0 * taux).assign_attrs(units="Pa")


def rotated_pole_stress():
    """An invented gyre basin on a 2 degree rotated-pole model grid (2-D lat and lon)."""
    from sverdrup_kit.synthetic_grids import as_field, rotated_pole_grid

    lat, lon, _, _ = rotated_pole_grid(2.0, pole_lat=60.0, pole_lon=200.0)
    ocean = (np.mod(lon, 360) > 0.5) & (np.mod(lon, 360) < 60) & (lat > 15) & (lat < 55)
    taux = as_field(np.where(ocean, -0.1 * np.cos(np.deg2rad(4.5 * (lat - 15))), np.nan),
                    lat, lon)
    return taux, 0 * taux


def test_every_result_passes_the_cf_1_8_compliance_checker(tmp_path, monkeypatch):
    # The IOOS compliance checker's cf:1.8 suite (general-purpose reference tool), offline: no
    # errors and no warnings for each kind of result the toolkit returns, written by
    # write_netcdf (the command's results.nc is checked in tests/test_cli.py).
    import warnings

    from sverdrup_kit import wind_stress_curl

    taux, tauy = small_world()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", UserWarning)  # coarse boundary layers
        curl = wind_stress_curl(taux.isel(time=0), tauy.isel(time=0))
        solution = solve_barotropic(curl, r=1e-5, A_H=1e5)
    x = np.linspace(0, 2e6, 21)
    c = np.full((21, 21), -1e-7)
    c[8:12, 8:12] = np.nan
    results = {
        "sverdrup_by_time": sverdrup_transport(taux, tauy),
        "ekman": ekman(taux, tauy),
        "solver_with_island": solution,
        "boundary_current": boundary_current(solution),
        "basin": solve_basin(x, x, c, r=1e-6, beta=2e-11),
        "stommel": stommel_basin(x, x, r=1e-6, beta=2e-11),
        "observations": boundary_current_observations(),
        "model_grid": sverdrup_transport(*rotated_pole_stress()),
    }
    assert solution.attrs["n_islands"] >= 1
    for name, ds in results.items():
        path = write_netcdf(ds, tmp_path / f"{name}.nc")
        assert cf_problems(path, monkeypatch) == [], name


def test_labels_become_an_auxiliary_coordinate_and_integers_32_bit(tmp_path):
    # CF-1.8 sections 1.3 and 6.1 (numeric coordinate variables, labels as auxiliary
    # coordinates) and 2.2 (no 64-bit integers); the Dataset passed in is not modified.
    taux, tauy = small_world()
    ds = sverdrup_transport(taux, tauy)
    before = ds.copy(deep=True)
    path = write_netcdf(ds, tmp_path / "r.nc")
    xr.testing.assert_identical(ds, before)
    with xr.open_dataset(path) as back:
        assert back.gyre_boundary_count.dtype == np.int32
        assert back.interior_transport.dims == ("basin", "time", "lat")
        named = back.swap_dims(basin="basin_name")
        for b in ds.basin.values:
            np.testing.assert_array_equal(named.interior_transport.sel(basin_name=b),
                                          ds.interior_transport.sel(basin=b).transpose("time", "lat"))
    # open_results puts the names back as the basin coordinate.
    from sverdrup_kit import open_results

    with open_results(path) as back:
        for b in ds.basin.values:
            np.testing.assert_array_equal(back.interior_transport.sel(basin=b),
                                          ds.interior_transport.sel(basin=b).transpose("time", "lat"))


def test_hydrographic_results_pass_the_cf_1_8_compliance_checker(tmp_path, monkeypatch):
    # The IOOS compliance checker's cf:1.8 suite, offline, on balance_check and
    # geostrophic_transport results written by write_netcdf; inputs carry the coordinate
    # attributes a CF file gives them.
    from sverdrup_kit import balance_check

    from ..ocean.test_hydrography import EOS, TS_LON, fake_sverdrup, make_ts

    cf = {"lat": {"standard_name": "latitude", "units": "degrees_north"},
          "lon": {"standard_name": "longitude", "units": "degrees_east"}}

    def described(da):
        for name, attrs in cf.items():
            da = da.assign_coords({name: da[name].assign_attrs(attrs)})
        return da

    temp, salt = (described(a) for a in make_ts())
    sv = fake_sverdrup(v_value=-5.0, v_west_of=320.0)
    sv = sv.assign_coords({name: sv[name].assign_attrs(attrs) for name, attrs in cf.items()})
    taux = xr.full_like(sv.sverdrup_northward_transport, -0.08).assign_attrs(units="Pa")
    out = balance_check(sv, temp, salt, taux, reference_pressure=1500.0,
                        western_limit=TS_LON[0], equation_of_state=EOS)
    path = write_netcdf(out, tmp_path / "balance.nc")
    assert cf_problems(path, monkeypatch) == []
