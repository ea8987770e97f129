"""Wind and stress products in the conventions real files use, read without options.

Each test writes a small file the way a product writes it (variable and coordinate names,
attributes, packing, latitude order, longitude convention, one file per variable) and checks
that ``open_winds``/``open_stress`` return the same canonical fields. Conventions are those of
the CF standard name table (v84; ``eastward_wind``, ``surface_downward_eastward_stress``,
``surface_upward_eastward_stress``), the CMIP6 data request (``uas``/``vas``, ``tauu``/``tauv``
with standard_name surface_downward_*_stress, ``tauuo``/``tauvo``) and reanalysis NetCDF files
(``u10``/``v10``, ``valid_time``, descending latitude, packed int16): common practice.
"""

from __future__ import annotations

import dask
import numpy as np
import pandas as pd
import pytest
import xarray as xr

from sverdrup_kit.errors import GridError
from sverdrup_kit.io.readers import open_stress, open_winds

from .._dask_guard import CountingScheduler

LAT = np.arange(-60.0, 61.0, 15.0)
LON = np.arange(0.0, 360.0, 30.0)
TIME = pd.date_range("2001-01-01", periods=4, freq="MS")


def field(seed: float, lat=LAT, lon=LON, ntime=4):
    """An invented field that differs at every point and step (derived, no physics)."""
    t = np.arange(ntime)[:, None, None]
    y, x = np.meshgrid(lat, lon, indexing="ij")
    return seed * (1.0 + 0.1 * t) * np.cos(np.deg2rad(y)) + 0.01 * x + 0.001 * t


def canonical(var, name="u"):
    return var.sel(lat=LAT, lon=LON).values


def write(ds, path):
    ds.to_netcdf(path)
    return str(path)


def test_cf_standard_names_for_wind(tmp_path):
    ds = xr.Dataset(
        {"a": (("time", "lat", "lon"), field(5.0), {"standard_name": "eastward_wind",
                                                      "units": "m s-1"}),
         "b": (("time", "lat", "lon"), field(-2.0), {"standard_name": "northward_wind",
                                                       "units": "m s-1"})},
        coords={"time": TIME, "lat": LAT, "lon": LON},
    )
    w = open_winds(write(ds, tmp_path / "w.nc"))
    np.testing.assert_allclose(w.u.values, field(5.0))
    np.testing.assert_allclose(w.v.values, field(-2.0))


@pytest.mark.parametrize("direction,sign", [("downward", 1.0), ("upward", -1.0)])
def test_cf_stress_downward_and_upward(tmp_path, direction, sign):
    # CF: surface_downward_eastward_stress is the stress of the air on the sea; the upward
    # stress is its opposite (CF standard name table, v84).
    ds = xr.Dataset(
        {"sx": (("time", "lat", "lon"), field(0.1),
                {"standard_name": f"surface_{direction}_eastward_stress", "units": "N m-2"}),
         "sy": (("time", "lat", "lon"), field(0.02),
                {"standard_name": f"surface_{direction}_northward_stress", "units": "N m-2"})},
        coords={"time": TIME, "lat": LAT, "lon": LON},
    )
    s = open_stress(write(ds, tmp_path / "s.nc"))
    np.testing.assert_allclose(s.taux.values, sign * field(0.1))
    np.testing.assert_allclose(s.tauy.values, sign * field(0.02))
    assert s.taux.attrs["standard_name"] == "surface_downward_eastward_stress"
    if sign < 0:
        assert "sign flipped" in s.attrs["normalisation"]


def test_reanalysis_u10_packed_descending_valid_time_separate_files(tmp_path):
    """u10 and v10 in two files, int16 packed, latitude 90..-90, longitude 0..360, valid_time."""
    lat = LAT[::-1]
    paths = []
    for name, seed in (("u10", 7.0), ("v10", -3.0)):
        vals = field(seed)[:, ::-1, :]
        scale, offset = 0.001, 0.5
        packed = np.round((vals - offset) / scale).astype(np.int16)
        da = xr.DataArray(packed, dims=("valid_time", "latitude", "longitude"),
                          coords={"valid_time": TIME, "latitude": lat, "longitude": LON},
                          attrs={"units": "m s**-1", "long_name": f"10 metre {name[0].upper()} "
                                 "wind component", "scale_factor": scale, "add_offset": offset})
        ds = da.to_dataset(name=name)
        ds["expver"] = ("valid_time", np.array(["0001"] * 4))
        # Written as raw integers with the packing attributes, as the product stores them.
        ds[name].encoding = {"dtype": "int16"}
        paths.append(write(ds, tmp_path / f"{name}.nc"))
    w = open_winds(paths)
    assert w.u.chunks is not None  # opened lazily as one record
    assert list(w.lat.values) == sorted(LAT)
    # packing resolution 0.001 m/s
    np.testing.assert_allclose(w.u.values, field(7.0), atol=6e-4)
    np.testing.assert_allclose(w.v.values, field(-3.0), atol=6e-4)
    assert w.time.size == 4


def test_cmip_uas_vas_with_bounds_and_fill(tmp_path):
    lon = LON - 180.0  # -180..150
    vals = field(6.0, lon=lon)
    vals[0, 0, 0] = 1e20  # CMIP fill value
    ds = xr.Dataset(
        {"uas": (("time", "lat", "lon"), vals.astype("f4"),
                 {"standard_name": "eastward_wind", "units": "m s-1"}),
         "vas": (("time", "lat", "lon"), field(1.0, lon=lon).astype("f4"),
                 {"standard_name": "northward_wind", "units": "m s-1"}),
         "lat_bnds": (("lat", "bnds"), np.stack([LAT - 7.5, LAT + 7.5], 1)),
         "time_bnds": (("time", "bnds"), np.zeros((4, 2)))},
        coords={"time": TIME, "lat": LAT, "lon": lon},
    )
    ds["uas"].encoding["_FillValue"] = np.float32(1e20)
    w = open_winds(write(ds, tmp_path / "uas_Amon.nc"))
    assert np.isnan(w.u.values[0, 0, 0])
    np.testing.assert_allclose(w.v.values, field(1.0, lon=lon), rtol=1e-6)


@pytest.mark.parametrize("names", [("tauu", "tauv"), ("tauuo", "tauvo")])
def test_cmip_stress_names_without_standard_name_are_downward(tmp_path, names):
    # CMIP6 Amon tauu/tauv and Omon tauuo/tauvo are surface_downward_*_stress (CMIP6 data
    # request tables; from memory).
    ds = xr.Dataset(
        {names[0]: (("time", "lat", "lon"), field(0.1), {"units": "N m-2"}),
         names[1]: (("time", "lat", "lon"), field(0.05), {"units": "N m-2"})},
        coords={"time": TIME, "lat": LAT, "lon": LON},
    )
    s = open_stress(write(ds, tmp_path / "tau.nc"))
    np.testing.assert_allclose(s.taux.values, field(0.1))
    np.testing.assert_allclose(s.tauy.values, field(0.05))


def test_longitude_conventions_give_the_same_fields(tmp_path):
    base = xr.Dataset(
        {"u": (("time", "lat", "lon"), field(4.0)), "v": (("time", "lat", "lon"), field(1.0))},
        coords={"time": TIME, "lat": LAT, "lon": LON},
    )
    for v in ("u", "v"):
        base[v].attrs["units"] = "m/s"
    shifted = base.assign_coords(lon=((base.lon + 180) % 360) - 180).sortby("lon")
    a = open_winds(write(base, tmp_path / "a.nc"))
    b = open_winds(write(shifted, tmp_path / "b.nc"))
    np.testing.assert_allclose(a.u.values, b.u.roll(lon=6, roll_coords=True).values)
    assert float(b.lon.min()) == -180.0


def test_momentum_flux_without_sign_is_refused_in_one_line(tmp_path):
    ds = xr.Dataset(
        {"uflx": (("time", "lat", "lon"), field(0.1), {"units": "N/m^2",
                                                        "long_name": "momentum flux, u"}),
         "vflx": (("time", "lat", "lon"), field(0.1), {"units": "N/m^2",
                                                        "long_name": "momentum flux, v"})},
        coords={"time": TIME, "lat": LAT, "lon": LON},
    )
    path = write(ds, tmp_path / "flux.nc")
    with pytest.raises(ValueError, match="stress_sign") as err:
        open_stress(path)
    assert "\n" not in str(err.value) and "uflx" in str(err.value)
    s = open_stress(path, stress_sign="upward")
    np.testing.assert_allclose(s.taux.values, -field(0.1))


def test_conflicting_sign_attributes_are_refused(tmp_path):
    ds = xr.Dataset(
        {"taux": (("lat", "lon"), field(0.1)[0], {
            "units": "Pa", "standard_name": "surface_downward_eastward_stress",
            "long_name": "upward momentum flux"}),
         "tauy": (("lat", "lon"), field(0.1)[0], {"units": "Pa"})},
        coords={"lat": LAT, "lon": LON},
    )
    with pytest.raises(ValueError, match="long_name upward"):
        open_stress(write(ds, tmp_path / "c.nc"))


def test_zarr_store_opens_lazily(tmp_path):
    pytest.importorskip("zarr")
    ds = xr.Dataset(
        {"u10": (("time", "lat", "lon"), field(3.0), {"units": "m s-1"}),
         "v10": (("time", "lat", "lon"), field(2.0), {"units": "m s-1"})},
        coords={"time": TIME, "lat": LAT, "lon": LON},
    )
    store = tmp_path / "winds.zarr"
    ds.chunk({"time": 1}).to_zarr(store, consolidated=False)
    counter = CountingScheduler()
    with dask.config.set(scheduler=counter):
        w = open_winds(str(store))
        assert counter.calls == 0
        assert w.u.chunks is not None
        np.testing.assert_allclose(w.u.values, field(3.0))


def test_patterns_in_a_list_and_one_record_over_years(tmp_path):
    for year in (2001, 2002):
        t = pd.date_range(f"{year}-01-01", periods=4, freq="MS")
        for name, seed in (("uwnd", 1.0), ("vwnd", 2.0)):
            xr.Dataset({name: (("time", "lat", "lon"), field(seed), {"units": "m/s"})},
                       coords={"time": t, "lat": LAT, "lon": LON}).to_netcdf(
                tmp_path / f"{name}.{year}.nc")
    w = open_winds([str(tmp_path / "uwnd.*.nc"), str(tmp_path / "vwnd.*.nc")])
    assert w.time.size == 8 and w.u.chunks is not None
    np.testing.assert_allclose(w.v.values[4:], field(2.0))


def test_files_on_different_grids_are_refused(tmp_path):
    for name, lon in (("u", LON), ("v", LON + 1.0)):
        xr.Dataset({name: (("time", "lat", "lon"), field(1.0, lon=lon), {"units": "m/s"})},
                   coords={"time": TIME, "lat": LAT, "lon": lon}).to_netcdf(tmp_path / f"{name}.nc")
    with pytest.raises(GridError, match="one grid") as err:
        open_winds([str(tmp_path / "u.nc"), str(tmp_path / "v.nc")])
    assert "Fix:" in str(err.value)


def test_files_on_different_calendars_are_refused(tmp_path):
    for year, cal in ((2001, "noleap"), (2002, "standard")):
        days = np.arange(4) * 30.0
        ds = xr.Dataset(
            {"u": (("time", "lat", "lon"), field(1.0), {"units": "m/s"}),
             "v": (("time", "lat", "lon"), field(1.0), {"units": "m/s"})},
            coords={"time": ("time", days + 365 * (year - 2001),
                             {"units": "days since 2001-01-01", "calendar": cal}),
                    "lat": LAT, "lon": LON},
        )
        ds.to_netcdf(tmp_path / f"w{year}.nc")
    with pytest.raises(GridError, match="one calendar") as err:
        open_winds(str(tmp_path / "w*.nc"))
    msg = str(err.value)
    assert "'noleap'" in msg and "'standard'" in msg and "Fix:" in msg
