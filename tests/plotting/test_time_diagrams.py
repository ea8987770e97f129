"""Latitude-time diagrams: climatologies and records of any length read without overlap."""

import re

import matplotlib

matplotlib.use("Agg")

import numpy as np  # noqa: E402
import pytest  # noqa: E402
import xarray as xr  # noqa: E402

from sverdrup_kit import plotting  # noqa: E402

from ._results import colorbar_label, overlapping_texts, save  # noqa: E402


def test_latitude_time_of_a_zonal_mean_and_of_basins(strict, tmp_path, world, result):
    fig, ax = plotting.plot_latitude_time(world.u)
    assert colorbar_label(fig).startswith("zonal mean eastward wind")
    assert [t.get_text() for t in ax.get_xticklabels()] == list("JFMAMJJASOND")
    save(fig, tmp_path, "hov_u")
    fig, axes = plotting.plot_latitude_time(result.interior_transport_by_time,
                                        row_status=result.row_status, width="page")
    assert len(axes) == 3  # the passage has no values
    assert colorbar_label(fig) == "Sverdrup interior transport (Sv)"
    save(fig, tmp_path, "hov_T")
    fig, ax = plotting.plot_latitude_time(result.interior_transport_by_time, basin="Halcyon Ocean",
                                      row_status=result.row_status)
    save(fig, tmp_path, "hov_T1")


def long_record(result, years=11):
    """A record of 12 * years months: the stand-in's 12 months tiled, with an invented trend of
    2 % a year, stamped mid-month from January 2000."""
    monthly = result.interior_transport_by_time
    tiled = xr.concat([monthly * (1 + 0.02 * k) for k in range(years)], dim="time")
    time = xr.date_range("2000-01-01", periods=12 * years, freq="MS") + np.timedelta64(14, "D")
    return tiled.assign_coords(time=time).assign_attrs(monthly.attrs)


@pytest.mark.parametrize("width", ["column", "page"])
def test_a_132_month_record_shows_years_without_overlap(strict, tmp_path, result, width):
    record = long_record(result)
    assert record.sizes["time"] == 132
    fig, axes = plotting.plot_latitude_time(record, row_status=result.row_status, width=width)
    assert [t.get_text() for t in fig.texts] == ["year"]
    for ax in axes:
        labels = [t.get_text() for t in ax.get_xticklabels()]
        assert all(re.fullmatch(r"20[01]\d", s) for s in labels), labels
        # 2000 to 2011 in steps of 1, 2 or 5 years: at least two labels, at most one a year.
        years = [int(s) for s in labels]
        assert 2 <= len(years) <= 12 and len(set(np.diff(years))) == 1
    assert overlapping_texts(fig) == []
    save(fig, tmp_path, f"record_{width}")


def test_a_climatology_shows_its_months(strict, result):
    fig, ax = plotting.plot_latitude_time(result.interior_transport_by_time,
                                          basin="Halcyon Ocean", width="page")
    assert [t.get_text() for t in ax.get_xticklabels()] == [
        "Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"]
    assert [t.get_text() for t in fig.texts] == ["month"]
    assert overlapping_texts(fig) == []


def test_a_groupby_climatology_and_seasons(strict, result):
    record = long_record(result, years=3)
    by_month = record.groupby("time.month").mean()
    fig, ax = plotting.plot_latitude_time(by_month, basin="Lissom Ocean")
    assert [t.get_text() for t in ax.get_xticklabels()] == list("JFMAMJJASOND")
    by_season = record.groupby("time.season").mean()
    fig, ax = plotting.plot_latitude_time(by_season, basin="Lissom Ocean")
    assert sorted(t.get_text() for t in ax.get_xticklabels()) == ["DJF", "JJA", "MAM", "SON"]
    assert overlapping_texts(fig) == []


def test_a_record_of_eighteen_months_names_months_and_years(strict, result):
    record = long_record(result, years=2).isel(time=slice(3, 21))  # April 2000 to September 2001
    fig, ax = plotting.plot_latitude_time(record, basin="Halcyon Ocean", width="page")
    labels = [t.get_text() for t in ax.get_xticklabels()]
    assert set(labels) <= {"Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct",
                           "Nov", "Dec"} and len(labels) >= 4
    assert [t.get_text() for t in fig.texts] == ["month of 2000\u20132001"]
    assert overlapping_texts(fig) == []
