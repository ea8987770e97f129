"""Tests of sverdrup_kit.io.readers: reading winds and stress onto the canonical grid."""

from __future__ import annotations

import copy
import warnings

import cf_units
import dask
import numpy as np
import pytest
import xarray as xr

from sverdrup_kit.errors import InputError
from sverdrup_kit.geometry.coords import GridError
from sverdrup_kit.io.readers import TimeDecodingWarning, open_stress, open_winds
from sverdrup_kit.io.units import UnitsError

from .._dask_guard import CountingScheduler

FILL = np.float32(-1e34)


def analytic_u(lat, lon):
    """A wind that differs at every point and is periodic in longitude (derived, invented)."""
    lat, lon = np.meshgrid(lat, lon, indexing="ij")
    return 8.0 * np.sin(np.deg2rad(lat)) + 3.0 * np.cos(np.deg2rad(lon)) + 0.01 * lat


def analytic_v(lat, lon):
    lat, lon = np.meshgrid(lat, lon, indexing="ij")
    return 2.0 * np.cos(np.deg2rad(lat)) * np.sin(np.deg2rad(2 * lon))


def wind_dataset(lat=None, lon=None, *, ntime=3, units="m s-1", names=("UWND", "VWND"),
                 dims=("TIME", "LATY", "LONX"), time_units="days since 1980-01-01",
                 dtype=np.float32, speed=False):
    """A small file-like Dataset in the style of older analysis packages (upper-case names)."""
    lat = np.arange(-80.0, 81.0, 20.0) if lat is None else np.asarray(lat, float)
    lon = np.arange(0.0, 360.0, 30.0) if lon is None else np.asarray(lon, float)
    t, y, x = dims
    coords = {
        y: (y, lat, {"units": "degrees_north"}),
        x: (x, lon, {"units": "degrees_east"}),
    }
    if ntime:
        coords[t] = (t, 15.0 + 30.0 * np.arange(ntime), {"units": time_units})
    shape_dims = (t, y, x) if ntime else (y, x)

    def field(values):
        if ntime:
            values = np.broadcast_to(values, (ntime, *values.shape)) * (
                1.0 + 0.1 * np.arange(ntime)[:, None, None]
            )
        return (shape_dims, values.astype(dtype), {"units": units, "long_name": "invented"})

    data = {names[0]: field(analytic_u(lat, lon)), names[1]: field(analytic_v(lat, lon))}
    if speed:
        data["WSPD"] = field(np.hypot(analytic_u(lat, lon), analytic_v(lat, lon)) + 1.0)
    return xr.Dataset(data, coords=coords)


def write(ds: xr.Dataset, path, **fill) -> str:
    encoding = {v: {"_FillValue": fill.get("fill", None)} for v in ds.data_vars}
    for c in ds.coords:
        encoding[c] = {"_FillValue": None}
    ds.to_netcdf(path, encoding=encoding)
    return str(path)


# ---------------------------------------------------------------------------------------------
# Coordinates: conventions and orders


@pytest.mark.parametrize(
    "lon",
    [
        np.arange(0.0, 360.0, 30.0),  # 0..330
        np.arange(-180.0, 180.0, 30.0),  # -180..150
        np.arange(20.0, 380.0, 30.0),  # 20..350 and past 360 as in old climatology files
    ],
    ids=["0..360", "-180..180", "20..380"],
)
def test_longitude_conventions_kept_monotonic_and_values_follow(tmp_path, lon):
    path = write(wind_dataset(lon=lon), tmp_path / "w.nc")
    ds = open_winds(path)
    assert ds.u.dims == ("time", "lat", "lon")
    np.testing.assert_array_equal(ds.lon.values, lon)  # convention kept, not rewrapped
    assert np.all(np.diff(ds.lon.values) > 0)
    assert ds.lon.attrs["units"] == "degrees_east" and ds.lon.attrs["standard_name"] == "longitude"
    # derived from the analytic field written to the file (float32 storage, so rtol 1e-6)
    np.testing.assert_allclose(ds.u.isel(time=0).values, analytic_u(ds.lat.values, lon),
                               rtol=1e-6, atol=1e-6)


def test_same_winds_whatever_the_longitude_convention(tmp_path):
    a = open_winds(write(wind_dataset(lon=np.arange(0.0, 360.0, 30.0)), tmp_path / "a.nc"))
    b = open_winds(write(wind_dataset(lon=np.arange(-180.0, 180.0, 30.0)), tmp_path / "b.nc"))
    a = a.assign_coords(lon=a.lon % 360).sortby("lon")
    b = b.assign_coords(lon=b.lon % 360).sortby("lon")
    xr.testing.assert_allclose(a.u.drop_attrs(), b.u.drop_attrs())  # derived: same field


def test_descending_latitude_becomes_ascending(tmp_path):
    lat = np.arange(80.0, -81.0, -20.0)
    ds = open_winds(write(wind_dataset(lat=lat), tmp_path / "w.nc"))
    np.testing.assert_array_equal(ds.lat.values, lat[::-1])
    np.testing.assert_allclose(ds.u.isel(time=0).values, analytic_u(lat[::-1], ds.lon.values),
                               rtol=1e-6, atol=1e-6)  # derived from the analytic field
    assert "latitude reversed to ascending" in ds.attrs["normalisation"]


def test_descending_and_wrapped_longitudes_become_increasing():
    lon_desc = np.arange(330.0, -1.0, -30.0)
    ds = open_winds(wind_dataset(lon=lon_desc))
    np.testing.assert_array_equal(ds.lon.values, lon_desc[::-1])
    # a grid stored 0..180 then -180..0 is unwrapped past 180 so it keeps increasing
    lon_wrap = np.r_[np.arange(0.0, 180.0, 30.0), np.arange(-180.0, 0.0, 30.0)]
    ds = open_winds(wind_dataset(lon=lon_wrap))
    np.testing.assert_array_equal(ds.lon.values, np.arange(0.0, 360.0, 30.0))
    np.testing.assert_allclose(ds.u.isel(time=0).values, analytic_u(ds.lat.values, ds.lon.values),
                               rtol=1e-6, atol=1e-6)  # derived: cos is 360-periodic


def test_extra_leading_dimension_passes_through():
    members = xr.concat([wind_dataset(), wind_dataset()], dim="member")
    ds = open_winds(members)
    assert ds.u.dims == ("member", "time", "lat", "lon")
    assert ds.sizes["member"] == 2


# ---------------------------------------------------------------------------------------------
# Units


@pytest.mark.parametrize("units", ["M/S", "m/s", "m s-1", "knots", "cm/s"])
def test_speed_units_converted_to_metres_per_second(units):
    ds = open_winds(wind_dataset(units=units, speed=True))
    # reference: cf-units (UDUNITS-2) conversion of the same spelling, normalised by hand
    # where UDUNITS spells it differently
    udunits = {"M/S": "m/s", "knots": "knot"}.get(units, units)
    factor = cf_units.Unit(udunits).convert(1.0, cf_units.Unit("m s-1"))
    raw = wind_dataset(units=units, speed=True)
    for name, src in (("u", "UWND"), ("v", "VWND"), ("wind_speed", "WSPD")):
        np.testing.assert_allclose(ds[name].values, raw[src].values.astype(float) * factor,
                                   rtol=1e-12)
        assert ds[name].attrs["units"] == "m s-1"
        assert cf_units.Unit(ds[name].attrs["units"]).is_convertible("m/s")
        assert ds[name].attrs["source_units"] == units
    assert ds.u.attrs["standard_name"] == "eastward_wind"
    assert ds.v.attrs["standard_name"] == "northward_wind"
    assert ds.wind_speed.attrs["standard_name"] == "wind_speed"


def test_ten_knots():
    ds = open_winds(wind_dataset(units="knots", ntime=0))
    raw = wind_dataset(units="knots", ntime=0)["UWND"].values.astype(float)
    # international knot = 1852 m per hour exactly (SI Brochure, 9th ed. 2019, table 8)
    np.testing.assert_allclose(ds.u.values, raw * 1852.0 / 3600.0, rtol=1e-14)


@pytest.mark.parametrize("units,factor", [("dyn/cm2", 0.1), ("dyn cm-2", 0.1), ("N m-2", 1.0),
                                          ("Pa", 1.0), ("N/m2", 1.0)])
def test_stress_units_converted_to_pascal(units, factor):
    src = wind_dataset(units=units, names=("taux", "tauy"))
    ds = open_stress(src)
    # 1 dyn cm-2 = 1e-5 N / 1e-4 m2 = 0.1 Pa (derived from the CGS definitions)
    np.testing.assert_allclose(ds.taux.values, src.taux.values.astype(float) * factor, rtol=1e-12)
    assert ds.taux.attrs["units"] == ds.tauy.attrs["units"] == "Pa"
    assert cf_units.Unit("Pa").is_convertible(cf_units.Unit(units.replace("dyn", "dyne")))
    assert ds.taux.attrs["standard_name"] == "surface_downward_eastward_stress"
    assert ds.tauy.attrs["standard_name"] == "surface_downward_northward_stress"


@pytest.mark.parametrize("units", ["furlongs/fortnight", "K", "MPa"])
def test_unknown_units_refused(units):
    with pytest.raises(UnitsError, match=r"open_winds: u \(variable 'UWND'\).*found '.*'.*Fix"):
        open_winds(wind_dataset(units=units))


def test_missing_units_refused():
    ds = wind_dataset()
    ds["VWND"].attrs.pop("units")
    with pytest.raises(UnitsError, match=r"v \(variable 'VWND'\).*found none.*Fix"):
        open_winds(ds)


# ---------------------------------------------------------------------------------------------
# Missing values


def test_fill_value_in_file_becomes_nan(tmp_path):
    src = wind_dataset()
    src["UWND"][:, 2, 3] = FILL
    src["VWND"][:, 2, 3] = FILL
    ds = open_winds(write(src, tmp_path / "w.nc", fill=FILL))
    assert np.isnan(ds.u.values[:, 2, 3]).all() and np.isnan(ds.v.values[:, 2, 3]).all()
    assert np.isfinite(ds.u.values).sum() == ds.u.size - 3
    assert ds.u.dtype == np.float64


def test_fill_values_left_undecoded_become_nan(tmp_path):
    src = wind_dataset()
    src["UWND"][:, 0, 0] = FILL
    src["VWND"][:, 1, 1] = np.float32(-99.9)
    path = write(src, tmp_path / "w.nc")
    raw = xr.open_dataset(path, mask_and_scale=False)
    raw["VWND"].attrs["missing_value"] = np.float32(-99.9)
    ds = open_winds(raw)  # -1e34 without any attribute: caught as a fill sentinel
    assert np.isnan(ds.u.values[:, 0, 0]).all()
    assert np.isnan(ds.v.values[:, 1, 1]).all()  # float32 -99.9 matched in its own dtype
    assert np.isfinite(ds.v.values).sum() == ds.v.size - 3


def test_all_missing_in_memory_refused():
    src = wind_dataset()
    src["UWND"][:] = FILL
    with pytest.raises(ValueError, match=r"u \(variable 'UWND'\).*every value missing.*Fix"):
        open_winds(src)


# ---------------------------------------------------------------------------------------------
# Time


def test_year_zero_climatology_warns_once_and_groups_by_month(tmp_path):
    src = wind_dataset(ntime=12, time_units="hour since 0000-01-01 00:00:00")
    # mid-month hours of a leap year 0 as in classic climatology files (derived: 730.485 h steps)
    src = src.assign_coords(TIME=("TIME", 366.0 + 730.485 * np.arange(12),
                                  {"units": "hour since 0000-01-01 00:00:00"}))
    path = write(src, tmp_path / "clim.nc")
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        ds = open_winds(path)
    ours = [w for w in caught if issubclass(w.category, TimeDecodingWarning)]
    assert len(ours) == 1, [str(w.message) for w in caught]
    assert not [w for w in caught if w not in ours], [str(w.message) for w in caught]
    assert "year 0" in str(ours[0].message) and "Fix" in str(ours[0].message)
    np.testing.assert_array_equal(ds.time.dt.month.values, np.arange(1, 13))
    assert ds.u.groupby("time.month").mean().sizes["month"] == 12
    assert "fallback calendar" in ds.attrs["normalisation"]


def test_months_since_year_zero_falls_back_to_360_day():
    src = wind_dataset(ntime=12, time_units="months since 0000-01-01")
    src = src.assign_coords(TIME=("TIME", np.arange(12) + 0.5,
                                  {"units": "months since 0000-01-01"}))
    with pytest.warns(TimeDecodingWarning, match="360_day"):
        ds = open_winds(src)
    # CF: 'months since' is only exact in a 360_day calendar (CF conventions 1.11, sec. 4.4.1)
    np.testing.assert_array_equal(ds.time.dt.month.values, np.arange(1, 13))
    assert ds.time.values[0].calendar == "360_day"


def test_undecodable_twelve_steps_get_month_coordinate():
    src = wind_dataset(ntime=12, time_units="month")
    with pytest.warns(TimeDecodingWarning, match="month"):
        ds = open_winds(src)
    np.testing.assert_array_equal(ds.month.values, np.arange(1, 13))
    assert ds.u.groupby("month").mean().sizes["month"] == 12


def test_standard_time_decodes_without_warning(tmp_path):
    path = write(wind_dataset(ntime=3), tmp_path / "w.nc")
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        ds = open_winds(path)
    assert np.issubdtype(ds.time.dtype, np.datetime64)
    assert str(ds.time.values[0])[:10] == "1980-01-16"  # 15 days after 1980-01-01


def test_several_files_combined_along_time(tmp_path):
    a = wind_dataset(ntime=2)
    b = wind_dataset(ntime=2).assign_coords(
        TIME=("TIME", [0.0, 31.0], {"units": "days since 1980-03-01"}))
    paths = [write(a, tmp_path / "a.nc"), write(b, tmp_path / "b.nc")]
    ds = open_winds(paths)
    assert ds.sizes["time"] == 4 and ds.u.chunks is not None
    assert [str(t)[:10] for t in ds.time.values] == ["1980-01-16", "1980-02-15", "1980-03-01",
                                                     "1980-04-01"]
    same = open_winds(str(tmp_path / "*.nc"))  # a glob pattern does the same
    xr.testing.assert_identical(ds.u.compute(), same.u.compute())
    xr.testing.assert_identical(open_winds(tuple(paths)).u.compute(), same.u.compute())


# ---------------------------------------------------------------------------------------------
# Finding variables


def test_found_by_standard_name_whatever_the_name():
    src = wind_dataset(names=("A", "B"))
    src["A"].attrs["standard_name"] = "eastward_wind"
    src["B"].attrs["standard_name"] = "northward_wind"
    ds = open_winds(src)
    assert ds.u.attrs["source_variable"] == "A" and ds.v.attrs["source_variable"] == "B"


@pytest.mark.parametrize("names", [("u10", "v10"), ("uwnd", "vwnd"), ("U", "V"), ("uas", "vas")])
def test_found_by_common_name(names):
    ds = open_winds(wind_dataset(names=names))
    assert ds.u.attrs["source_variable"] == names[0]
    assert "wind_speed" not in ds


def test_found_by_keyword():
    ds = open_winds(wind_dataset(names=("east", "north")), u="east", v="north")
    assert ds.u.attrs["source_variable"] == "east"


def test_ambiguous_variables_named():
    src = wind_dataset(names=("u", "v"))
    src["uwnd"] = src["u"] * 2
    with pytest.raises(ValueError, match=r"u: .*several.*\['u', 'uwnd'\].*Fix.*u='u'"):
        open_winds(src)
    assert open_winds(src, u="uwnd").u.attrs["source_variable"] == "uwnd"


def test_missing_variable_and_bad_keyword():
    with pytest.raises(ValueError, match=r"v: expected a variable .*northward_wind.*Fix"):
        open_winds(wind_dataset(names=("u", "something")))
    with pytest.raises(ValueError, match=r"u: expected the name of a variable.*'nope'.*Fix"):
        open_winds(wind_dataset(), u="nope")


def test_stress_common_names():
    ds = open_stress(wind_dataset(names=("sustr", "svstr"), units="N m-2"))
    assert list(ds.data_vars) == ["taux", "tauy"]


def test_components_as_tuple_and_dict():
    src = open_winds(wind_dataset())
    u, v = src.u, src.v
    t = open_winds((u, v))
    d = open_winds({"u": u, "v": v})
    xr.testing.assert_identical(t.u, src.u)
    xr.testing.assert_identical(d.v, src.v)
    with pytest.raises(TypeError, match="Fix"):
        open_winds((u, v), u="x")
    with pytest.raises(TypeError, match=r"source\['v'\].*found ndarray"):
        open_winds({"u": u, "v": v.values})


# ---------------------------------------------------------------------------------------------
# Bad grids


def test_mismatched_grids_of_u_and_v():
    u = open_winds(wind_dataset()).u
    v = open_winds(wind_dataset(lat=np.arange(-81.0, 80.0, 20.0))).v
    with pytest.raises(GridError, match=r"u and v: expected the same grid.*'lat'.*Fix"):
        open_winds((u, v))


def test_model_grid_coordinates_are_kept():
    # 2-D coordinates (NEMO-style nav_lat/nav_lon) stay on the model grid: nothing regridded.
    lat2d, lon2d = np.meshgrid(np.linspace(-60, 60, 5), np.linspace(0, 300, 6), indexing="ij")
    attrs = {"units": "knots"}
    ds = xr.Dataset(
        {"u": (("y", "x"), np.ones((5, 6)), attrs), "v": (("y", "x"), np.ones((5, 6)), attrs)},
        coords={"nav_lat": (("y", "x"), lat2d, {"units": "degrees_north"}),
                "nav_lon": (("y", "x"), lon2d, {"units": "degrees_east"})},
    )
    got = open_winds(ds)
    assert got.u.dims == ("y", "x") and got.nav_lat.shape == (5, 6)
    # 1 knot = 1852 m / 3600 s (the international nautical mile; common practice).
    np.testing.assert_allclose(got.u.values, 1852.0 / 3600.0)
    assert "model grid kept" in got.attrs["normalisation"]


def test_latitude_outside_range():
    with pytest.raises(GridError, match=r"u \(variable 'UWND'\).*-90\.\.90.*found.*Fix"):
        open_winds(wind_dataset(lat=np.linspace(-100, 100, 5)))


def test_non_monotonic_longitude():
    with pytest.raises(GridError, match=r"u \(variable 'UWND'\).*not monotonic.*Fix"):
        open_winds(wind_dataset(lon=[0.0, 30.0, 10.0, 60.0, 90.0]))


def test_duplicate_coordinates():
    with pytest.raises(GridError, match=r"u \(variable 'UWND'\).*duplicate.*Fix"):
        open_winds(wind_dataset(lat=[-20.0, 0.0, 0.0, 20.0]))


def test_files_on_different_grids_refused(tmp_path):
    a = write(wind_dataset(), tmp_path / "a.nc")
    later = ("TIME", [100.0, 130.0, 160.0], {"units": "days since 1980-01-01"})
    shifted = wind_dataset(lat=np.arange(-81.0, 80.0, 20.0)).assign_coords(TIME=later)
    b = write(shifted, tmp_path / "b.nc")
    with pytest.raises(GridError, match=r"source: expected files on one grid.*Fix"):
        open_winds([a, b])


def test_url_goes_to_xarray_untouched(monkeypatch):
    seen = {}

    def fake_open_dataset(target, **kwargs):
        seen.update(target=target, **kwargs)
        return wind_dataset()

    monkeypatch.setattr(xr, "open_dataset", fake_open_dataset)
    ds = open_winds("https://example.invalid/opendap/winds")  # never contacted: patched above
    assert seen["target"] == "https://example.invalid/opendap/winds"
    assert seen["decode_times"] is False
    assert ds.u.chunks is not None and ds.attrs["input"] == seen["target"]


def test_bad_sources():
    with pytest.raises(FileNotFoundError, match="source.*no file.*Fix"):
        open_winds("/nonexistent/winds.nc")
    with pytest.raises(TypeError, match="source.*found int.*Fix"):
        open_winds(3)
    with pytest.raises(TypeError, match="single DataArray.*Fix"):
        open_stress(wind_dataset().UWND)


# ---------------------------------------------------------------------------------------------
# Inputs untouched, laziness


def test_input_dataset_not_modified():
    src = wind_dataset(lat=np.arange(80.0, -81.0, -20.0), units="knots", ntime=12,
                       time_units="hour since 0000-01-01 00:00:00")
    src["UWND"][0, 0, 0] = FILL
    before = src.copy(deep=True)
    attrs = copy.deepcopy({k: dict(v.attrs) for k, v in src.variables.items()})
    with pytest.warns(TimeDecodingWarning):
        open_winds(src)
    xr.testing.assert_identical(src, before)
    assert {k: dict(v.attrs) for k, v in src.variables.items()} == attrs


def test_opening_a_file_computes_nothing_and_stays_lazy(tmp_path):
    src = wind_dataset(lat=np.arange(80.0, -81.0, -20.0), ntime=12, speed=True,
                       time_units="hour since 0000-01-01 00:00:00")
    src["UWND"].attrs["units"] = src["VWND"].attrs["units"] = "knots"
    path = write(src, tmp_path / "w.nc", fill=FILL)
    # the same numbers read as stress: enough to exercise open_stress on dask input
    stress_src = src.assign({k: src[k].assign_attrs(units="dyn/cm2") for k in ("UWND", "VWND")})
    stress_path = write(stress_src, tmp_path / "s.nc", fill=FILL)
    counter = CountingScheduler()
    with dask.config.set(scheduler=counter), pytest.warns(TimeDecodingWarning):
        ds = open_winds(path)
        chunked = xr.open_dataset(stress_path, chunks={"TIME": 4}, decode_times=False)
        stress = open_stress(chunked, taux="UWND", tauy="VWND")
        assert counter.calls == 0
        for da in (ds.u, ds.v, ds.wind_speed, stress.taux):
            assert da.chunks is not None
            assert da.chunksizes["lat"] == (da.sizes["lat"],)  # whole horizontal fields
        assert stress.taux.chunksizes["time"] == (4, 4, 4)  # the caller's chunks are kept
        ds.u.mean().compute()
    assert counter.calls > 0  # the counter does see computes


def test_same_numbers_in_memory_chunked_and_distributed(tmp_path):
    distributed = pytest.importorskip("distributed")
    src = wind_dataset(lat=np.arange(80.0, -81.0, -20.0), lon=np.arange(20.0, 380.0, 30.0),
                       ntime=6, units="knots")
    src["UWND"][1, 2, 3] = FILL
    path = write(src, tmp_path / "w.nc")
    memory = open_winds(src)
    chunked = open_winds(src.chunk({"TIME": 2, "LATY": 3}))
    assert chunked.u.chunks is not None
    # derived: the same operations on the same numbers
    xr.testing.assert_identical(memory.u, chunked.u.compute())
    with distributed.Client(processes=False, n_workers=1, threads_per_worker=2,
                            dashboard_address=None):
        on_cluster = open_winds(path).compute()
    np.testing.assert_array_equal(memory.u.values, on_cluster.u.values)
    np.testing.assert_array_equal(memory.v.values, on_cluster.v.values)


def test_in_memory_input_stays_in_memory():
    ds = open_winds(wind_dataset())
    assert ds.u.chunks is None and isinstance(ds.u.data, np.ndarray)


# ---------------------------------------------------------------------------------------------
# Real data


@pytest.mark.realdata
def test_real_coads_climatology(marine_climatology):
    with pytest.warns(TimeDecodingWarning, match="year 0"):
        ds = open_winds(marine_climatology)
    # COADS climatology on its 2 degree grid, 12 months (Woodruff et al. 1987, BAMS 68)
    assert ds.sizes == {"time": 12, "lat": 90, "lon": 180}
    np.testing.assert_array_equal(ds.lat.values, np.arange(-89.0, 90.0, 2.0))
    assert np.all(np.diff(ds.lon.values) == 2.0) and ds.lon.values[0] == 21.0
    np.testing.assert_array_equal(ds.time.dt.month.values, np.arange(1, 13))
    assert ds.u.attrs["units"] == ds.v.attrs["units"] == ds.wind_speed.attrs["units"] == "m s-1"
    assert ds.u.chunks is not None
    # ship observations only: the middle of a continent is missing (Sahara 20N 10E, Siberia 60N
    # 100E, Amazon 5S 300E: common practice, from memory of the map)
    for lat, lon in ((21, 11), (61, 101), (-5, 301)):
        point = ds.u.sel(lat=lat, lon=lon % 360 if lon % 360 >= 21 else lon + 360)
        assert point.isnull().all(), (lat, lon)
    assert 0.3 < float(ds.u.isnull().mean()) < 0.6  # land ~30% plus unobserved polar seas
    annual = ds.u.mean("time").mean("lon")
    # easterly trade winds near 15N and 15S, westerlies near 45N and 45S (common practice: the
    # textbook surface wind belts); magnitudes a few m s-1 (from memory of wind atlases)
    for lat in (-15, 15):
        assert -8.0 < float(annual.sel(lat=lat, method="nearest")) < -2.0
    for lat in (-45, 45):
        assert 1.0 < float(annual.sel(lat=lat, method="nearest")) < 10.0
    # the scalar-mean speed is at least the speed of the mean wind (derived: |mean| <= mean |.|);
    # u, v and speed were gridded and filled separately, so allow a few cells a few percent over
    # (measured: 0.8% of cells, at most 3% over)
    steadiness = (np.hypot(ds.u, ds.v) / ds.wind_speed.where(ds.wind_speed > 0)).values
    steadiness = steadiness[np.isfinite(steadiness)]
    assert np.mean(steadiness > 1.001) < 0.01 and steadiness.max() < 1.1


@pytest.mark.realdata
def test_real_navy_winds_decode_standard_time(navy_winds):
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        ds = open_winds(navy_winds)
    # 11 years of monthly means on a 2.5 degree grid including both poles (file's own axes)
    assert ds.sizes == {"time": 132, "lat": 73, "lon": 144}
    assert str(ds.time.values[0])[:7] == "1982-01"
    assert ds.lon.values[0] == 20.0 and ds.lon.values[-1] == 377.5


# ---------------------------------------------------------------------------------------------
# Damaged files: a copy cut short must not read as calm winds


@pytest.mark.parametrize("fmt, unlimited", [("NETCDF3_64BIT", ["TIME"]), ("NETCDF3_CLASSIC", None),
                                            ("NETCDF4", None)])
def test_truncated_file_is_refused_not_read_as_calm_winds(tmp_path, fmt, unlimited):
    # netCDF-C reads the missing half of a classic file as zeros (calm winds, land included).
    src = wind_dataset(ntime=6)
    whole = tmp_path / "whole.nc"
    src.to_netcdf(whole, format=fmt, unlimited_dims=unlimited)
    data = whole.read_bytes()
    cut = tmp_path / "cut.nc"
    cut.write_bytes(data[: len(data) // 2])
    with pytest.raises(InputError, match="truncated") as err:
        open_winds(cut).load()
    assert "\n" not in str(err.value)
    assert np.isfinite(open_winds(whole).u.values).any()  # the whole file still opens
