"""CF NetCDF writing: whole or nothing, input untouched; the observation table."""

import numpy as np
import pytest
import xarray as xr

from sverdrup_kit import boundary_current_observations, write_netcdf


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
    # Values as listed in REFERENCES.md (Florida Current cable 31.3 +- 3.2 Sv; Agulhas 69.7 Sv
    # southward, Bryden et al. 2005).
    obs = boundary_current_observations()
    assert float(obs.transport.sel(current="Florida Current")) == 31.3
    assert float(obs.transport.sel(current="Agulhas Current")) == -69.7
    assert set(boundary_current_observations("pacific").basin.values) == {"pacific"}
    with pytest.raises(ValueError, match="basin"):
        boundary_current_observations("arctic")
