"""Rossby-wave adjustment: vertical modes, crossing times and the long-wave model.

Outside references: closed forms of the vertical-mode problem (Gill 1982, Atmosphere-Ocean
Dynamics, section 6.11, from memory; derived here), the forced long Rossby-wave equation
(Anderson & Gill 1975, Deep-Sea Res. 22, 583; Meyers 1979, J. Phys. Oceanogr. 9, 663; from
memory) solved in closed form in the tests, the toolkit's independent Sverdrup integral, and
published magnitudes (Chelton et al. 1998, J. Phys. Oceanogr. 28, 433-460, from memory).
"""

import dask
import dask.array as dsa
import numpy as np
import pandas as pd
import pytest
import xarray as xr

from sverdrup_kit.constants import EARTH_RADIUS as R
from sverdrup_kit.constants import OMEGA
from sverdrup_kit.physics.adjustment import (
    TIME_SCALES,
    adjustment_flags,
    averaging_period,
    default_n_squared,
    first_mode_speed,
    first_mode_speed_from_ts,
    long_wave_response,
    rossby_adjustment,
)
from sverdrup_kit.physics.sverdrup import sverdrup_transport

from .._dask_guard import CountingScheduler

DAY = 86400.0
YEAR = 365.25 * DAY


def n2_profile(values, edges):
    edges = np.asarray(edges, float)
    centres = 0.5 * (edges[1:] + edges[:-1])
    return xr.DataArray(np.asarray(values, float), dims="depth",
                        coords={"depth": ("depth", centres, {"units": "m", "positive": "down"})},
                        attrs={"units": "s-2"})


# ------------------------------------------------------------------------------------------
# Vertical modes
# ------------------------------------------------------------------------------------------


@pytest.mark.parametrize("n, depth", [(2e-3, 4000.0), (5e-3, 1000.0), (1e-3, 5500.0)])
def test_constant_n_gives_nh_over_pi(n, depth):
    # Gill (1982), section 6.11 (from memory): W'' + N^2 W / c^2 = 0, W(0) = W(-H) = 0 with
    # constant N has W = sin(pi z / H) and c1 = N H / pi (derived).
    edges = np.linspace(0.0, depth, 41)
    c1 = float(first_mode_speed(n2_profile(np.full(40, n**2), edges)))
    assert c1 == pytest.approx(n * depth / np.pi, rel=5e-3)


@pytest.mark.parametrize("g, h1, h2", [(0.02, 500.0, 3500.0), (0.01, 150.0, 4850.0),
                                       (0.03, 1000.0, 1000.0)])
def test_two_layers_give_sqrt_g_h1_h2_over_h(g, h1, h2):
    # Two layers (Gill 1982, section 6.11, from memory): c1^2 = g' h1 h2 / (h1 + h2)
    # (derived). The density jump is one 1 m thick layer of N^2 = g' / 1 m.
    edges = [0.0, h1, h1 + 1.0, h1 + h2]
    c1 = float(first_mode_speed(n2_profile([0.0, g / 1.0, 0.0], edges), depth_edges=edges))
    assert c1 == pytest.approx(np.sqrt(g * h1 * h2 / (h1 + h2)), rel=5e-3)


def test_mode_speed_per_column_any_vertical_convention():
    # Columns of different depth (NaN below the bottom) and a z coordinate positive up give
    # the constant-N answer of each column (derived: c1 = N H / pi).
    z = -np.arange(50.0, 4000.0, 100.0)  # centres of 100 m layers, positive up
    n2 = np.full((2, z.size), 4e-6)
    n2[1, 20:] = np.nan  # the second column ends at 2000 m
    da = xr.DataArray(n2, dims=("station", "z"),
                      coords={"z": ("z", z, {"units": "m", "positive": "up"})},
                      attrs={"units": "s-2"})
    c1 = first_mode_speed(da).values
    np.testing.assert_allclose(c1, [2e-3 * 4000 / np.pi, 2e-3 * 2000 / np.pi], rtol=5e-3)
    assert np.isnan(da.values[1, 20:]).all()  # input untouched


def test_mode_speed_stays_lazy_and_matches_eager():
    # Common practice (cf_xarray habit): a dask-backed input is not computed early.
    n2 = xr.DataArray(dsa.from_array(np.full((6, 40), 4e-6), chunks=(2, 40)),
                      dims=("station", "depth"),
                      coords={"depth": np.arange(50.0, 4000.0, 100.0)}, attrs={"units": "s-2"})
    sched = CountingScheduler()
    with dask.config.set(scheduler=sched):
        lazy = first_mode_speed(n2)
    assert sched.calls == 0 and lazy.chunks is not None
    np.testing.assert_allclose(lazy.values, first_mode_speed(n2.compute()).values, rtol=1e-12)


def test_mode_speed_errors_name_argument_and_fix():
    n2 = n2_profile([1e-5, 1e-5], [0, 10, 20]).assign_attrs(units="1/m")
    with pytest.raises(ValueError, match="n_squared: expected units s-2.*Fix"):
        first_mode_speed(n2)
    bad = xr.DataArray([1e-5, 1e-5], dims="x", attrs={"units": "s-2"})
    with pytest.raises(ValueError, match="n_squared: expected one vertical dimension.*depth_dim"):
        first_mode_speed(bad)
    with pytest.raises(ValueError, match="depth_edges: expected 3 increasing"):
        first_mode_speed(n2_profile([1e-5, 1e-5], [0, 10, 20]), depth_edges=[0, 10])


# ------------------------------------------------------------------------------------------
# A box ocean on a regional grid: closed basin, zonally uniform winds
# ------------------------------------------------------------------------------------------

LON_WEST, LON_EAST = 2.0, 58.0  # faces of the ocean


def box_record(amplitude, *, n_steps, step_days, dlon=1.0, dlat=1.0, zonal=False):
    """tau_x = -0.1 cos(pi (lat - 12) / 36) a(t) Pa in a closed box 12-48N, 2-58E.

    With ``zonal``, tau_x is modulated along the row by 1 + 0.5 sin(2 pi lon / 28) and a
    tau_y = 0.03 cos(2 pi lon / 14) a(t) Pa is added, so the pumping varies from cell to cell.
    """
    lat = np.arange(10.0 + dlat / 2, 50.0, dlat)
    lon = np.arange(dlon / 2, 61.0, dlon)
    ocean = ((lon[None] > LON_WEST) & (lon[None] < LON_EAST)
             & (lat[:, None] > 12) & (lat[:, None] < 48))
    profile = -0.1 * np.cos(np.pi * (lat - 12.0) / 36.0)[:, None] * np.ones(lon.size)
    t = np.arange(n_steps) * step_days * DAY
    time = pd.Timestamp("2000-01-01") + pd.to_timedelta(t, "s")
    merid = np.zeros_like(profile)
    if zonal:
        profile = profile * (1 + 0.5 * np.sin(2 * np.pi * lon / 28.0))[None]
        merid = 0.03 * np.cos(2 * np.pi * lon / 14.0)[None] * np.ones((lat.size, 1))
    a = amplitude(t)[:, None, None]
    dims, coords = ("time", "lat", "lon"), {"time": time, "lat": lat, "lon": lon}
    taux = xr.DataArray(np.where(ocean, profile, np.nan)[None] * a, dims=dims, coords=coords,
                        attrs={"units": "Pa"})
    tauy = xr.DataArray(np.where(ocean, merid, np.nan)[None] * a, dims=dims, coords=coords,
                        attrs={"units": "Pa"})
    return taux, tauy


def long_wave_speed(lat, c1):
    """c_R = beta c1^2 / f^2 from the constants (derived; Groten 2004 Omega, IUGG radius)."""
    phi = np.deg2rad(lat)
    return (2 * OMEGA * np.cos(phi) / R) * c1**2 / (2 * OMEGA * np.sin(phi)) ** 2


def test_crossing_time_is_distance_over_long_wave_speed():
    taux, tauy = box_record(lambda t: np.ones_like(t), n_steps=2, step_days=30)
    sv = sverdrup_transport(taux.isel(time=0), tauy.isel(time=0))
    before = sv.copy(deep=True)
    adj = rossby_adjustment(sv, first_mode_speed=2.5)
    xr.testing.assert_identical(sv, before)
    for lat in (20.5, 30.5, 40.5):
        # The waves start where the Sverdrup integral starts.
        assert float(sv.eastern_coast_lon.sel(basin="basin_0", lat=lat)) == LON_EAST
        width = R * np.cos(np.deg2rad(lat)) * np.deg2rad(LON_EAST - LON_WEST)
        expected = width / long_wave_speed(lat, 2.5) / DAY
        assert float(adj.basin_crossing_time.sel(basin="basin_0", lat=lat)) == pytest.approx(
            expected, rel=1e-9)
        # Cell centres: half a cell (1 degree) west of the coast for the first one.
        row = adj.rossby_crossing_time.sel(lat=lat)
        first = R * np.cos(np.deg2rad(lat)) * np.deg2rad(0.5) / long_wave_speed(lat, 2.5) / DAY
        assert float(row.sel(lon=57.5)) == pytest.approx(first, rel=1e-9)
    rd = adj.first_mode_rossby_radius.sel(lat=30.5, lon=30.5)
    assert float(rd) == pytest.approx(2.5 / (2 * OMEGA * np.sin(np.deg2rad(30.5))), rel=1e-12)


def test_default_stratification_published_magnitudes():
    # Chelton et al. (1998), J. Phys. Oceanogr. 28, 433-460 (from memory): the first
    # baroclinic Rossby radius is about 30-50 km at 30 degrees and 10-20 km at 60; long
    # first-mode waves at 30 degrees run at a few cm/s (1-5 cm/s; Chelton & Schlax 1996,
    # Science 272, 234, report observed speeds up to about twice linear theory). Wide
    # tolerance (5 km either side) because the ranges are from memory; the default
    # (Garrett-Munk) stratification sits at the low end (about 30 km at 30 degrees).
    c1 = float(first_mode_speed(default_n_squared()))
    lat = np.arange(-79.0, 80.0, 2.0)
    lon = np.arange(1.0, 360.0, 2.0)
    ocean = (lon[None] > 10) & (lon[None] < 100) & (np.abs(lat[:, None]) < 70)
    tx = xr.DataArray(np.where(ocean, 0.05, np.nan), dims=("lat", "lon"),
                      coords={"lat": lat, "lon": lon}, attrs={"units": "Pa"})
    adj = rossby_adjustment(sverdrup_transport(tx, 0 * tx))
    assert float(adj.first_mode_gravity_wave_speed.sel(lat=31, lon=51)) == pytest.approx(c1)
    assert 25e3 <= float(adj.first_mode_rossby_radius.sel(lat=31, lon=51)) <= 55e3
    assert 5e3 <= float(adj.first_mode_rossby_radius.sel(lat=59, lon=51)) <= 25e3
    assert 0.01 <= float(adj.long_rossby_wave_speed.sel(lat=31, lon=51)) <= 0.05
    # Shared notes, derived from c = beta Rd^2: crossing 6000 km at 30N takes years
    # (4-6 years for Rd = 40-50 km; a smaller Rd takes longer).
    years = 6.0e6 / float(adj.long_rossby_wave_speed.sel(lat=31, lon=51)) / YEAR
    assert 4.0 <= years <= 12.0


def wave_front_distance(h_t, dist):
    """Distance from the coast where h_t first reaches half its local (unadjusted) value."""
    ratio = h_t / h_t[-1]
    k = int(np.argmax(ratio > 0.5))
    return np.interp(0.5, ratio[k - 1:k + 1], dist[k - 1:k + 1])


def test_wave_front_travels_at_long_wave_speed():
    # Steady wind switched on at t = 0 over an ocean at rest: along a characteristic
    # x = x_E - c_R (t - t0) the anomaly grows as -w_E t until the front from the eastern
    # coast, at c_R t (Anderson & Gill 1975, from memory), has passed; then it is steady.
    c1, step = 2.5, 5.0
    taux, tauy = box_record(lambda t: np.ones_like(t), n_steps=6 * 73 + 1, step_days=step,
                            dlon=0.25, dlat=2.0)
    sv = sverdrup_transport(taux.isel(time=0), tauy.isel(time=0))
    res = long_wave_response(taux, tauy, sv, first_mode_speed=c1)
    checked = 0
    for lat in (21.0, 31.0):
        h = res.thermocline_anomaly.sel(lat=lat)
        lon = h.lon.values
        ocean = np.isfinite(h.isel(time=0).values)
        dist = (LON_EAST - lon[ocean])[::-1]
        dist_m = R * np.cos(np.deg2rad(lat)) * np.deg2rad(dist)
        c_r = long_wave_speed(lat, c1)
        for years in (1.0, 2.0, 3.0):
            k = int(round(years * 365.25 / step))
            if c_r * k * step * DAY > 0.9 * dist_m[-1]:
                continue
            h_t = (h.isel(time=k + 1) - h.isel(time=k)).values[ocean][::-1]
            front = wave_front_distance(h_t, dist_m)
            t_mid = (k + 0.5) * step * DAY
            assert front == pytest.approx(c_r * t_mid, rel=0.01)
            checked += 1
    assert checked >= 4


@pytest.mark.parametrize("zonal", [False, True])
def test_steady_wind_reaches_the_toolkit_sverdrup_transport_after_the_crossing(zonal):
    # After the crossing time the long-wave model's interior transport, (c1^2/f) h_x plus
    # the Ekman part, integrated from h marched along the characteristics, must equal the
    # toolkit's westward Sverdrup integral of curl(tau) / (rho0 beta) within 1% (derived:
    # steady h_x = w_E / c_R gives V = f w_E / beta - tau_x / (rho0 f) = curl / (rho0 beta)).
    # With zonal=True the wind varies along the rows, so the march meets a different pumping
    # in every cell. With a wind uniform along the rows the transport approaches Sverdrup
    # monotonically, and before half the crossing it must still be away from it, in rows
    # where the geostrophic part (zero at t = 0, when only the Ekman part is there) is more
    # than a fifth of the transport.
    taux, tauy = box_record(lambda t: np.ones_like(t), n_steps=15 * 12 + 1,
                            step_days=365.25 / 12, zonal=zonal)
    sv = sverdrup_transport(taux.isel(time=0), tauy.isel(time=0))
    adj = rossby_adjustment(sv, first_mode_speed=2.5)
    res = long_wave_response(taux, tauy, sv, first_mode_speed=2.5)
    days = (res.time - res.time[0]).dt.days.values
    checked = 0
    for lat in sv.lat.values:
        ref = float(sv.interior_transport.sel(basin="basin_0", lat=lat))
        cross = float(adj.basin_crossing_time.sel(basin="basin_0", lat=lat))
        if not np.isfinite(ref) or abs(ref) < 2.0:
            continue
        lw = res.long_wave_interior_transport.sel(basin="basin_0", lat=lat).values
        after = days > cross + 31
        if after.any():
            np.testing.assert_allclose(lw[after], ref, rtol=0.01)
            checked += 1
        if not zonal and abs(lw[0] - ref) > 0.2 * abs(ref):
            early = days < 0.5 * cross
            assert np.all(np.abs(lw[early] - ref) > 0.05 * abs(ref))
    assert checked >= 20


def test_steady_initial_state_is_sverdrup_and_inputs_untouched():
    taux, tauy = box_record(lambda t: np.ones_like(t), n_steps=13, step_days=365.25 / 12)
    sv = sverdrup_transport(taux.isel(time=0), tauy.isel(time=0))
    before = taux.copy(deep=True)
    res = long_wave_response(taux, tauy, sv, first_mode_speed=2.5, initial="steady")
    xr.testing.assert_identical(taux, before)
    ref = sv.interior_transport.sel(basin="basin_0")
    ok = np.abs(ref) > 2.0
    for k in (0, 12):
        lw = res.long_wave_interior_transport.sel(basin="basin_0").isel(time=k)
        np.testing.assert_allclose(lw.values[ok.values], ref.values[ok.values], rtol=0.01)


@pytest.mark.parametrize("damping_days", [None, 2 * 365.25])
def test_periodic_forcing_against_the_closed_form(damping_days):
    # The forced long-wave equation h_t - c_R h_x + r h = -w_E (Anderson & Gill 1975;
    # Meyers 1979, J. Phys. Oceanogr. 9, 663-674; both from memory), h = 0 at the eastern
    # coast x_E, with w_E = Re(W e^{i omega t}) uniform along the row. In the travel-time
    # coordinate s = (x_E - x) / c_R it reads h_t + h_s + r h = -w_E, whose periodic solution
    # (derived here) is the locally forced part plus the free wave radiated from the coast:
    #     h = Re( -W e^{i omega t} (1 - e^{-(r + i omega) s}) / (r + i omega) ).
    n, period = 48, 365.25 * DAY
    omega = 2 * np.pi / period
    taux, tauy = box_record(lambda t: np.cos(omega * t), n_steps=n, step_days=365.25 / n)
    sv = sverdrup_transport(taux.isel(time=0), tauy.isel(time=0))
    adj = rossby_adjustment(sv, first_mode_speed=2.5)
    res = long_wave_response(taux, tauy, sv, first_mode_speed=2.5, periodic=True,
                             damping_time=damping_days)
    r = 0.0 if damping_days is None else 1.0 / (damping_days * DAY)
    t = (res.time - res.time[0]).values.astype("timedelta64[ns]").astype(float) / 1e9
    phase = np.exp(-1j * omega * t)[:, None]
    for lat in (20.5, 30.5, 40.5):
        h = res.thermocline_anomaly.sel(lat=lat).values
        ocean = np.isfinite(h[0])
        w = res.ekman_pumping.sel(lat=lat).values[:, ocean]
        w_amp = 2 * (w * phase).mean(axis=0)
        assert np.ptp(np.abs(w_amp)) < 1e-9 * np.abs(w_amp).max()  # uniform along the row
        s = adj.rossby_crossing_time.sel(lat=lat).values[ocean] * DAY
        expected = -w_amp * (1 - np.exp(-(r + 1j * omega) * s)) / (r + 1j * omega)
        got = 2 * (h[:, ocean] * phase).mean(axis=0)
        # Amplitude and phase: the complex amplitude to 1% of the largest (the record is
        # sampled 48 times a period and taken as linear between samples, which alone
        # damps the annual harmonic by 0.14%).
        assert np.max(np.abs(got - expected)) < 0.01 * np.max(np.abs(expected))
        big = np.abs(expected) > 0.3 * np.abs(expected).max()
        np.testing.assert_allclose(np.abs(got[big]), np.abs(expected[big]), rtol=0.01)
        np.testing.assert_allclose(np.angle(got[big] / expected[big]), 0.0, atol=0.01)


def test_island_rows_restart_at_each_eastern_coast():
    # A large island (10 x 10 degrees, about 1e6 km2: above the 1e5 km2 island threshold,
    # below the continent one) splits rows 25-35N into two runs; each starts at its own
    # eastern coast (Godfrey 1989's island geometry as the Sverdrup integral treats it), so the
    # row's crossing time is the longer run's (derived), and after it the long-wave model
    # carries the toolkit's Sverdrup transport on those rows too.
    taux, tauy = box_record(lambda t: np.ones_like(t), n_steps=12 * 12 + 1,
                            step_days=365.25 / 12)
    island = ((taux.lon > 20) & (taux.lon < 30) & (taux.lat > 25) & (taux.lat < 35))
    taux, tauy = taux.where(~island), tauy.where(~island)
    sv = sverdrup_transport(taux.isel(time=0), tauy.isel(time=0))
    assert int(sv.row_status.sel(basin="basin_0", lat=30.5)) == 0
    adj = rossby_adjustment(sv, first_mode_speed=2.5)
    lat = 30.5
    longer = R * np.cos(np.deg2rad(lat)) * np.deg2rad(LON_EAST - 30.0)
    assert float(adj.basin_crossing_time.sel(basin="basin_0", lat=lat)) == pytest.approx(
        longer / long_wave_speed(lat, 2.5) / DAY, rel=1e-9)
    west_edge = R * np.cos(np.deg2rad(lat)) * np.deg2rad(0.5)
    assert float(adj.rossby_crossing_time.sel(lat=lat, lon=19.5)) == pytest.approx(
        west_edge / long_wave_speed(lat, 2.5) / DAY, rel=1e-9)
    res = long_wave_response(taux, tauy, sv, first_mode_speed=2.5)
    days = (res.time - res.time[0]).dt.days.values
    for la in (26.5, 30.5, 34.5):
        ref = float(sv.interior_transport.sel(basin="basin_0", lat=la))
        cross = float(adj.basin_crossing_time.sel(basin="basin_0", lat=la))
        lw = res.long_wave_interior_transport.sel(basin="basin_0", lat=la).values
        assert (days > cross + 31).any()
        np.testing.assert_allclose(lw[days > cross + 31], ref, rtol=0.01)


def test_lagged_response_in_any_longitude_convention():
    # STYLE habit 8 (gsw's lonshift fixture, common practice): the same basin written on
    # -180..180 gives the same crossing times and the same lagged transport.
    taux, tauy = box_record(lambda t: 1 + 0.5 * np.sin(2 * np.pi * t / YEAR), n_steps=25,
                            step_days=365.25 / 12, dlon=1.0)
    shifted = taux.assign_coords(lon=taux.lon - 30.0)
    a = long_wave_response(taux, tauy, sverdrup_transport(taux.mean("time"), tauy.isel(time=0)),
                           first_mode_speed=2.5)
    b = long_wave_response(shifted, 0 * shifted,
                           sverdrup_transport(shifted.mean("time"), 0 * shifted.isel(time=0)),
                           first_mode_speed=2.5)
    np.testing.assert_allclose(a.long_wave_interior_transport.values,
                               b.long_wave_interior_transport.values, rtol=1e-10)


# ------------------------------------------------------------------------------------------
# Flags
# ------------------------------------------------------------------------------------------


def test_flags_compare_crossing_time_with_each_time_scale():
    ct = xr.DataArray([[10.0, 200.0, 2000.0, np.nan]], dims=("basin", "lat"),
                      coords={"basin": ["b"], "lat": [5.0, 15.0, 30.0, 60.0]})
    time = xr.DataArray(pd.date_range("2001-01-16", periods=36, freq="MS")
                        + pd.Timedelta("15D"), dims="time")
    assert averaging_period(time)[0] == "monthly"
    flags = adjustment_flags(ct, time=time)
    assert list(flags.time_scale.values) == ["monthly", "seasonal", "annual", "record"]
    # record: 36 months of 365.25/12 days (common practice: record length = steps x step).
    assert float(flags.time_scale_length.sel(time_scale="record")) == pytest.approx(
        36 * TIME_SCALES["monthly"])
    np.testing.assert_array_equal(flags.sel(basin="b").values,
                                  [[1, 0, 0, 2], [1, 0, 0, 2], [1, 1, 0, 2], [1, 1, 0, 2]])
    annual = xr.DataArray(pd.date_range("2001-07-01", periods=5, freq="YS-JUL"), dims="time")
    assert averaging_period(annual)[0] == "annual"


def test_errors_name_argument_and_fix():
    taux, tauy = box_record(lambda t: np.ones_like(t), n_steps=3, step_days=30)
    sv = sverdrup_transport(taux.isel(time=0), tauy.isel(time=0))
    with pytest.raises(TypeError, match="sverdrup_result: expected the Dataset.*Fix"):
        rossby_adjustment(sv[["interior_transport"]])
    with pytest.raises(ValueError, match="first_mode_speed: expected a positive speed"):
        rossby_adjustment(sv, first_mode_speed=-1.0)
    with pytest.raises(ValueError, match="taux: expected a 'time' dimension"):
        long_wave_response(taux.isel(time=0), tauy.isel(time=0), sv)
    with pytest.raises(ValueError, match="initial: expected 'rest' or 'steady'"):
        long_wave_response(taux, tauy, sv, initial="cold")
    other = taux.isel(lon=slice(0, 40))
    with pytest.raises(ValueError, match="taux and sverdrup_result: expected the same grid"):
        long_wave_response(other, 0 * other, sv)


# ------------------------------------------------------------------------------------------
# Real data: the Levitus (1982) annual T/S climatology
# ------------------------------------------------------------------------------------------


@pytest.mark.realdata
def test_levitus_rossby_radius_in_published_ranges(levitus):
    # Chelton et al. (1998), J. Phys. Oceanogr. 28, 433-460, from memory: first baroclinic
    # Rossby radius 30-50 km at 30 degrees, 10-20 km at 60, over 200 km near the equator.
    # Wide tolerance: the 1-degree, 20-level climatology smooths the thermocline; medians
    # over deep-water columns (bottom below 3000 m) of one row each.
    ds = xr.open_dataset(levitus, decode_times=False)
    deep = ds.TEMP.sel(ZAXLEVITR=3000.0).notnull()
    rows = ds.sel(YAXLEVITR=[-59.5, -30.5, 2.5, 30.5, 59.5])
    c1 = first_mode_speed_from_ts(rows.TEMP, rows.SALT)
    f = np.abs(2 * OMEGA * np.sin(np.deg2rad(c1.YAXLEVITR)))
    rd = (c1 / f).where(deep.sel(YAXLEVITR=c1.YAXLEVITR))
    med = rd.median("XAXLEVITR") / 1e3
    assert 25.0 <= float(med.sel(YAXLEVITR=30.5)) <= 55.0
    assert 25.0 <= float(med.sel(YAXLEVITR=-30.5)) <= 55.0
    assert 5.0 <= float(med.sel(YAXLEVITR=59.5)) <= 25.0
    assert 5.0 <= float(med.sel(YAXLEVITR=-59.5)) <= 25.0
    assert float(med.sel(YAXLEVITR=2.5)) > 200.0


# ------------------------------------------------------------------------------------------
# The flags in the pipeline and on the command line
# ------------------------------------------------------------------------------------------


@pytest.fixture(scope="module")
def world_diagnosis():
    from sverdrup_kit.pipeline import diagnose
    from sverdrup_kit.synthetic import load_world, world_basins

    world = load_world()
    return diagnose(world, basins=world_basins(world)).compute()


def test_diagnose_flags_each_row_at_the_input_step(world_diagnosis):
    res = world_diagnosis
    by_time = res.interior_transport_by_time
    # 12 mid-month steps: the monthly scale; a record of one year adds no "record" scale.
    assert by_time.attrs["adjustment_time_scale"] == "monthly"
    assert by_time.attrs["ancillary_variables"] == "sverdrup_adjusted"
    flags = res.sverdrup_adjusted
    assert list(flags.time_scale.values) == ["monthly", "seasonal", "annual"]
    ct = res.basin_crossing_time
    has = ct.notnull().values
    for scale, days in TIME_SCALES.items():
        f = flags.sel(time_scale=scale).values
        np.testing.assert_array_equal(f[has] == 1, ct.values[has] < days)
    assert (flags.values[:, ~has] == 2).all()
    # At 31N the Halcyon Ocean is 124 degrees wide (66E-190E beside the Quillon Peninsula, the
    # world's own table in sverdrup_kit.synthetic) and takes years to adjust: derived from the
    # default c1 and c_R = beta c1^2 / f^2.
    c1 = float(first_mode_speed(default_n_squared()))
    width = R * np.cos(np.deg2rad(31.0)) * np.deg2rad(124.0)
    expected = width / long_wave_speed(31.0, c1) / DAY
    assert float(ct.sel(basin="halcyon", lat=31.0)) == pytest.approx(expected, rel=1e-9)
    assert int(flags.sel(time_scale="annual", basin="halcyon", lat=31.0)) == 0


def test_command_line_prints_crossing_times_and_adjusted_rows(tmp_path, capsys):
    from sverdrup_kit.cli import main

    code = main(["diagnose", "--synthetic", "--out", str(tmp_path), "--no-figures",
                 "--no-progress"])
    out = capsys.readouterr().out
    assert code == 0
    assert "long Rossby-wave crossing time" in out
    assert "rows where the monthly transports (interior_transport_by_time) had time" in out
    with xr.open_dataset(tmp_path / "results.nc") as ds:
        assert ds.sverdrup_adjusted.attrs["flag_meanings"] == (
            "not_adjusted adjusted no_crossing_time")
        assert ds.basin_crossing_time.attrs["units"] == "days"


def test_chunked_record_gives_the_same_response():
    # Common practice (STYLE habit 7): the same numbers in memory and chunked. The march runs
    # along the whole record, so a dask-backed record is computed when the model is called.
    taux, tauy = box_record(lambda t: 1 + 0.3 * np.sin(2 * np.pi * t / YEAR), n_steps=25,
                            step_days=365.25 / 12)
    sv = sverdrup_transport(taux.mean("time"), tauy.mean("time"))
    a = long_wave_response(taux, tauy, sv, first_mode_speed=2.5)
    b = long_wave_response(taux.chunk(time=5), tauy.chunk(time=5), sv, first_mode_speed=2.5)
    xr.testing.assert_identical(a, b)
