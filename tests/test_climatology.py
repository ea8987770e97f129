"""Records to climatologies and anomalies: analytic records, calendars, laziness."""

from __future__ import annotations

import dask
import numpy as np
import pytest
import xarray as xr

from sverdrup_kit.climatology import anomalies, climatology
from sverdrup_kit.errors import InputError

from ._dask_guard import CountingScheduler

YEARS = 5


def record(calendar="standard"):
    """An annual cycle A cos(2 pi (m-1)/12) plus year offsets that sum to zero (derived)."""
    t = xr.date_range("2001-01-01", periods=12 * YEARS, freq="MS", calendar=calendar,
                      use_cftime=calendar != "standard")
    month = np.tile(np.arange(12), YEARS)
    year = np.repeat(np.arange(YEARS), 12)
    offsets = np.array([-2.0, -1.0, 0.0, 1.0, 2.0])[year]
    cycle = 3.0 * np.cos(2 * np.pi * month / 12)
    lat = np.array([-10.0, 10.0])
    vals = (cycle + offsets)[:, None] * np.array([1.0, 2.0])[None, :]
    return xr.DataArray(vals, coords={"time": t, "lat": lat}, dims=("time", "lat"),
                        attrs={"units": "m s-1", "long_name": "eastward wind"})


def test_monthly_climatology_recovers_the_annual_cycle():
    clim = climatology(record())
    expected = 3.0 * np.cos(2 * np.pi * np.arange(12) / 12)
    np.testing.assert_allclose(clim.sel(lat=-10.0).values, expected, atol=1e-12)
    np.testing.assert_allclose(clim.sel(lat=10.0).values, 2 * expected, atol=1e-12)
    assert list(clim.month.values) == list(range(1, 13))
    assert clim.attrs["units"] == "m s-1" and "mean over years" in clim.attrs["cell_methods"]


def test_anomalies_are_the_year_offsets():
    anom = anomalies(record())
    offsets = np.repeat([-2.0, -1.0, 0.0, 1.0, 2.0], 12)
    np.testing.assert_allclose(anom.sel(lat=-10.0).values, offsets, atol=1e-12)
    assert anom.sizes["time"] == 12 * YEARS


@pytest.mark.parametrize("calendar", ["standard", "noleap", "360_day"])
def test_seasonal_means_weight_months_by_their_length(calendar):
    clim = climatology(record(calendar), period="season")
    assert list(clim.season.values) == ["DJF", "MAM", "JJA", "SON"]
    # DJF by hand (derived): sum of days x value over every Dec, Jan, Feb of 2001-2005,
    # divided by their days; February has 28 days (29 in 2004) in the standard calendar,
    # 28 in 'noleap', 30 in '360_day' (CF conventions 1.10, section 4.4.1).
    cycle = 3.0 * np.cos(2 * np.pi * np.arange(12) / 12)
    offsets = [-2.0, -1.0, 0.0, 1.0, 2.0]
    num = den = 0.0
    for y, off in enumerate(offsets):
        for m in (11, 0, 1):
            if calendar == "360_day":
                d = 30
            elif m == 1:
                d = 29 if (calendar == "standard" and 2001 + y == 2004) else 28
            else:
                d = 31
            num += d * (cycle[m] + off)
            den += d
    np.testing.assert_allclose(clim.sel(season="DJF", lat=-10.0).item(), num / den, rtol=1e-12)


def test_climatology_of_a_dataset_and_of_an_undecoded_twelve_month_axis():
    rec = record().isel(time=slice(0, 12))
    raw = rec.assign_coords(time=np.arange(12.0), month=("time", np.arange(1, 13)))
    clim = climatology(xr.Dataset({"u": raw}))
    np.testing.assert_allclose(clim.u.values, rec.values)
    with pytest.raises(InputError, match="period: 'season' needs decoded dates"):
        climatology(raw, period="season")


def test_nothing_is_computed_before_asked():
    rec = record().chunk({"time": 12})
    counter = CountingScheduler()
    with dask.config.set(scheduler=counter):
        clim = climatology(rec)
        seas = climatology(rec, period="season")
        anom = anomalies(rec)
        assert counter.calls == 0
        np.testing.assert_allclose(clim.values, climatology(record()).values)
        np.testing.assert_allclose(seas.values, climatology(record(), period="season").values)
        np.testing.assert_allclose(anom.values, anomalies(record()).values)


def test_bad_input_is_named():
    with pytest.raises(InputError, match="period: expected one of"):
        climatology(record(), period="year")
    with pytest.raises(InputError, match="expected a 'time' dimension"):
        climatology(record().isel(time=0))
