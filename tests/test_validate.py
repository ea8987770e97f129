"""Bad input at every public entry point meets one rule (sverdrup_kit._validate).

Each case here was accepted, or refused with an unhelpful error, before the validation layer:
numbers given as text, zero or negative parameters, masks holding -1 or 0.7, infinite values,
undeclared fill values and physically implausible winds, stresses and curls.
"""

import warnings

import dask
import numpy as np
import pytest
import xarray as xr

from sverdrup_kit import (
    basin_ids,
    ekman,
    munk_boundary_layer,
    munk_width,
    open_winds,
    solve_barotropic,
    solve_basin,
    stommel_basin,
    stommel_width,
    sverdrup_transport,
    wind_stress,
    wind_stress_curl,
)
from sverdrup_kit.errors import InputError, UndeclaredFillValueWarning
from sverdrup_kit.limits import PLAUSIBLE_LIMITS

from ._dask_guard import CountingScheduler

# ------------------------------------------------------------------------------------------
# A small invented ocean: one rectangular basin on a 4-degree global grid
# ------------------------------------------------------------------------------------------

LAT = np.arange(-88.0, 90.0, 4.0)
LON = np.arange(2.0, 360.0, 4.0)


def _ocean():
    la, lo = np.meshgrid(LAT, LON, indexing="ij")
    return (lo > 150) & (lo < 250) & (np.abs(la) < 50)


def _da(values, units):
    return xr.DataArray(values, coords={"lat": LAT, "lon": LON}, dims=("lat", "lon"),
                        attrs={"units": units})


def stress():
    ocean = _ocean()
    tx = np.where(ocean, -0.1 * np.cos(np.deg2rad(3 * LAT))[:, None] + 0 * LON, np.nan)
    ty = np.where(ocean, 0.0, np.nan)
    return _da(tx, "Pa"), _da(ty, "Pa")


def winds():
    ocean = _ocean()
    u = np.where(ocean, 7.0 * np.cos(np.deg2rad(3 * LAT))[:, None] + 0 * LON, np.nan)
    v = np.where(ocean, 1.0, np.nan)
    return _da(u, "m s-1"), _da(v, "m s-1")


def ocean_mask(values=None):
    m = _ocean() if values is None else values
    return xr.DataArray(m, coords={"lat": LAT, "lon": LON}, dims=("lat", "lon"))


def curl():
    tx, ty = stress()
    return wind_stress_curl(tx, ty)


def basin_case():
    x = np.linspace(0, 2e6, 21)
    y = np.linspace(0, 2e6, 21)
    c = np.broadcast_to(-1e-7 * np.sin(np.pi * y / 2e6)[:, None], (21, 21)).copy()
    return x, y, c


# ------------------------------------------------------------------------------------------
# Numbers: one rule, and text is refused with the fix
# ------------------------------------------------------------------------------------------


@pytest.mark.parametrize("call, name", [
    (lambda: sverdrup_transport(*stress(), rho0="1025"), "rho0"),
    (lambda: ekman(*stress(), rho0="1025"), "rho0"),
    (lambda: solve_basin(*basin_case(), r=1e-6, beta="2e-11"), "beta"),
    (lambda: solve_barotropic(curl(), r="1e-6"), "r"),
    (lambda: stommel_basin(np.linspace(0, 1e6, 5), np.linspace(0, 1e6, 5), beta="2e-11"),
     "beta"),
    (lambda: munk_boundary_layer(np.linspace(0, 1e5, 5), A_H="1e3"), "A_H"),
    (lambda: wind_stress(*winds(), air_density="1.22"), "air_density"),
])
def test_numbers_given_as_text_are_refused_with_the_fix(call, name):
    with pytest.raises(InputError) as err:
        call()
    msg = str(err.value)
    assert msg.startswith(f"{name}:") and "text" in msg and "Fix:" in msg


@pytest.mark.parametrize("kw, name", [
    (dict(rho0=0.0), "rho0"),
    (dict(depth=0.0), "depth"),
    (dict(beta=-2e-11), "beta"),
    (dict(rho0=np.nan), "rho0"),
])
def test_solve_basin_refuses_zero_density_zero_depth_and_negative_beta(kw, name):
    x, y, c = basin_case()
    with pytest.raises(InputError, match=f"^{name}:"):
        solve_basin(x, y, c, r=1e-6, **{"beta": 2e-11, **kw})


def test_solve_basin_refuses_an_all_land_basin():
    x, y, c = basin_case()
    with pytest.raises(InputError, match="^curl: .*no ocean"):
        solve_basin(x, y, np.full_like(c, np.nan), r=1e-6, beta=2e-11)
    with pytest.raises(InputError, match="^ocean_mask: .*no ocean"):
        solve_basin(x, y, c, r=1e-6, beta=2e-11, ocean_mask=np.zeros(c.shape, bool))


@pytest.mark.parametrize("call, name", [
    (lambda: stommel_width(-1e-6, 2e-11), "r"),
    (lambda: stommel_width(1e-6, 0.0), "beta"),
    (lambda: stommel_width(np.array([1e-6, -1e-6]), 2e-11), "r"),
    (lambda: munk_width(0.0, 2e-11), "A_H"),
    (lambda: munk_width(1e3, -2e-11), "beta"),
])
def test_boundary_layer_widths_refuse_zero_and_negative_inputs(call, name):
    with pytest.raises(InputError, match=f"^{name}:"):
        call()


def test_zero_is_refused_alike_for_density_everywhere():
    # One rule: before, rho0=0 was refused by sverdrup_transport but accepted by solve_basin.
    x, y, c = basin_case()
    for call in (lambda: sverdrup_transport(*stress(), rho0=0.0),
                 lambda: ekman(*stress(), rho0=0.0),
                 lambda: solve_barotropic(curl(), r=1e-6, rho0=0.0),
                 lambda: solve_basin(x, y, c, r=1e-6, rho0=0.0)):
        with pytest.raises(InputError, match="^rho0: expected a finite number > 0"):
            call()


# ------------------------------------------------------------------------------------------
# Masks: booleans or 0/1, nothing else
# ------------------------------------------------------------------------------------------


@pytest.mark.parametrize("bad", [-1.0, 0.7, 2.0])
def test_masks_with_other_values_than_0_1_are_refused_everywhere(bad):
    m = np.where(_ocean(), 1.0, 0.0)
    m[0, 0] = bad
    om = ocean_mask(m)
    x, y, c = basin_case()
    bm = np.ones(c.shape)
    bm[3, 3] = bad
    from sverdrup_kit.plotting import map_field

    for call in (lambda: sverdrup_transport(*stress(), ocean_mask=om),
                 lambda: solve_barotropic(curl(), r=1e-6, ocean_mask=om),
                 lambda: solve_basin(x, y, c, r=1e-6, beta=2e-11, ocean_mask=bm),
                 lambda: basin_ids(om),
                 lambda: map_field(curl(), ocean_mask=om)):
        with pytest.raises(InputError, match="ocean_mask: expected a mask of booleans or 0/1"):
            call()


def test_masks_as_0_1_numbers_give_the_same_result_as_booleans():
    a = sverdrup_transport(*stress(), ocean_mask=ocean_mask())
    b = sverdrup_transport(*stress(), ocean_mask=ocean_mask(_ocean().astype("int8")))
    xr.testing.assert_identical(a, b)


def test_solver_does_not_ask_for_the_mask_it_was_given():
    c = curl()
    om = ocean_mask(np.isfinite(c.values))
    holed = c.copy()
    holed[10, 45] = np.nan if np.isfinite(c[10, 45]) else holed[10, 45]
    holed = holed.where(~((holed.lat == LAT[20]) & (holed.lon == LON[45])))
    with pytest.raises(InputError) as err:
        solve_barotropic(holed, r=1e-6, ocean_mask=om)
    msg = str(err.value)
    assert "pass ocean_mask" not in msg and "mark those points as land" in msg


# ------------------------------------------------------------------------------------------
# Infinite values: refused at every entry point, with a count and a place
# ------------------------------------------------------------------------------------------


def _with(da, value, at=(20, 45)):
    out = da.copy()
    out[at] = value
    return out


@pytest.mark.parametrize("call, name", [
    (lambda: sverdrup_transport(_with(stress()[0], np.inf), stress()[1]), "taux"),
    (lambda: ekman(stress()[0], _with(stress()[1], -np.inf)), "tauy"),
    (lambda: wind_stress_curl(_with(stress()[0], np.inf), stress()[1]), "taux"),
    (lambda: wind_stress(_with(winds()[0], np.inf), winds()[1]), "u"),
    (lambda: solve_barotropic(_with(curl(), np.inf), r=1e-6), "curl"),
    (lambda: solve_basin(*basin_case()[:2], _with(xr.DataArray(basin_case()[2]), np.inf,
                                                   (5, 5)), r=1e-6), "curl"),
])
def test_infinite_values_are_refused_with_count_and_place(call, name):
    with pytest.raises(InputError) as err:
        call()
    msg = str(err.value)
    assert msg.startswith(f"{name}:") and "1 infinite cell" in msg and " at " in msg


# ------------------------------------------------------------------------------------------
# Plausibility and undeclared fill values
# ------------------------------------------------------------------------------------------


def test_implausible_wind_is_refused_naming_variable_count_and_example():
    # 1e6 m s-1 is beyond any measured wind (limit and its source in sverdrup_kit.limits).
    u, v = winds()
    with pytest.raises(InputError) as err:
        wind_stress(_with(u, 1e6), v)
    msg = str(err.value)
    assert msg.startswith("u:") and "1 cell(s) beyond" in msg and "1e+06" in msg
    assert "lat=" in msg and "lon=" in msg


def test_implausible_wind_in_knots_is_judged_after_conversion():
    u, v = winds()
    fast = _with(u, 250.0).assign_attrs(units="knots")  # 129 m s-1: within the limit
    wind_stress(fast, v.assign_attrs(units="knots"))
    with pytest.raises(InputError, match="^u: .*found 1 cell"):
        wind_stress(_with(u, 400.0).assign_attrs(units="knots"), v.assign_attrs(units="knots"))


@pytest.mark.parametrize("value", [1e3, -3.6e5])
def test_implausible_stress_is_refused(value):
    tx, ty = stress()
    for call in (sverdrup_transport, ekman, wind_stress_curl):
        with pytest.raises(InputError, match="^taux: expected wind stresses of magnitude"):
            call(_with(tx, value), ty)


def test_implausible_curl_is_refused_by_both_solvers():
    limit = PLAUSIBLE_LIMITS["curl"][0]
    with pytest.raises(InputError, match="^curl: expected wind-stress curls"):
        solve_barotropic(_with(curl(), 10 * limit), r=1e-6)
    x, y, c = basin_case()
    c[4, 4] = -10 * limit
    with pytest.raises(InputError, match="^curl: expected wind-stress curls"):
        solve_basin(x, y, c, r=1e-6, beta=2e-11)


@pytest.mark.parametrize("fill", [-9999.0, -999.0, 1e20, -1e34, np.float32(9.96921e36)])
def test_undeclared_fill_values_warn_and_count_as_missing(fill):
    u, v = winds()
    u = u.astype(np.float32) if isinstance(fill, np.float32) else u
    bad = _with(u, fill)
    with pytest.warns(UndeclaredFillValueWarning, match="^u: found 1 cell"):
        out = wind_stress(bad, v)
    assert np.isnan(out.taux[20, 45]) and np.isfinite(out.taux).sum() == np.isfinite(u).sum() - 1
    assert bad[20, 45] == fill  # the input is not modified


def test_undeclared_fill_in_a_file_warns_and_reads_as_missing(tmp_path):
    u, v = winds()
    path = tmp_path / "w.nc"
    xr.Dataset({"u": _with(u, -9999.0), "v": v}).to_netcdf(
        path, encoding={"u": {"_FillValue": None}, "v": {"_FillValue": None}})
    with pytest.warns(UndeclaredFillValueWarning, match="-9999"):
        ds = open_winds(path).load()
    assert np.isnan(ds.u.sel(lat=LAT[20], lon=LON[45]))


def test_sverdrup_transport_never_returns_inf_transports_from_a_fill():
    tx, ty = stress()
    with pytest.warns(UndeclaredFillValueWarning):
        out = sverdrup_transport(_with(tx, 1e20), ty, ocean_mask=ocean_mask())
    assert not np.isinf(out.interior_transport).any()
    assert float(np.abs(out.interior_transport).max()) < 1e3


# ------------------------------------------------------------------------------------------
# Dask: checks stay lazy and fire at compute time
# ------------------------------------------------------------------------------------------


def test_field_checks_on_dask_input_stay_lazy_and_raise_at_compute():
    u, v = winds()
    bad = _with(u, 1e6).expand_dims(time=3).chunk({"time": 1})
    vv = v.expand_dims(time=3).chunk({"time": 1})
    sched = CountingScheduler()
    with dask.config.set(scheduler=sched):
        out = wind_stress(bad, vv)
        assert sched.calls == 0
        with pytest.raises(InputError, match="^u: .*beyond"):
            out.compute()


def test_fill_on_dask_input_warns_at_compute():
    u, v = winds()
    bad = _with(u, -9999.0).expand_dims(time=2).chunk({"time": 1})
    vv = v.expand_dims(time=2).chunk({"time": 1})
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        out = wind_stress(bad, vv)  # no warning at call time: nothing is read yet
    with pytest.warns(UndeclaredFillValueWarning):
        with dask.config.set(scheduler="synchronous"):
            res = out.compute()
    assert np.isnan(res.taux[:, 20, 45]).all()


# ------------------------------------------------------------------------------------------
# Curvilinear model grids take the same checks (the public functions dispatch to them)
# ------------------------------------------------------------------------------------------


def model_stress():
    from sverdrup_kit.synthetic_grids import as_field, rotated_pole_grid, smooth_winds, with_bounds

    lat, lon, clat, clon = rotated_pole_grid(6.0, pole_lat=40.0, pole_lon=-30.0)
    tx, ty, _ = smooth_winds(lat, lon)
    ds = xr.Dataset({"taux": as_field(0.1 * tx, lat, lon), "tauy": as_field(0.1 * ty, lat, lon)})
    ds = with_bounds(ds, clat, clon)
    return ds.taux, ds.tauy


@pytest.mark.parametrize("call, match", [
    (lambda tx, ty: sverdrup_transport(tx, ty, rho0="1025"), "^rho0: .*text"),
    (lambda tx, ty: ekman(tx, ty, rho0=0.0), "^rho0: expected a finite number > 0"),
    (lambda tx, ty: wind_stress_curl(_with(tx, np.inf, (3, 3)), ty), "^taux: .*infinite"),
    (lambda tx, ty: sverdrup_transport(tx, _with(ty, 500.0, (3, 3))), "^tauy: .*beyond"),
    (lambda tx, ty: sverdrup_transport(tx, ty, ocean_mask=xr.full_like(tx, -1.0)),
     "^ocean_mask: expected a mask of booleans or 0/1"),
])
def test_model_grid_paths_follow_the_same_rules(call, match):
    tx, ty = model_stress()
    with pytest.raises(InputError, match=match):
        call(tx, ty)
