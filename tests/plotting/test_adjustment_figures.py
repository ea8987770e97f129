"""Figures of the Rossby-wave adjustment draw without warnings and show what they claim."""

import warnings

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
import pytest  # noqa: E402
import xarray as xr  # noqa: E402

from sverdrup_kit import plotting  # noqa: E402
from sverdrup_kit.physics.adjustment import long_wave_response  # noqa: E402
from sverdrup_kit.physics.sverdrup import sverdrup_transport  # noqa: E402
from sverdrup_kit.pipeline import diagnose  # noqa: E402
from sverdrup_kit.synthetic import load_world, world_basins  # noqa: E402


@pytest.fixture(scope="module")
def res():
    world = load_world()
    return diagnose(world, basins=world_basins(world)).compute()


@pytest.fixture
def strict():
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        yield
    plt.close("all")


def test_crossing_time_figure_draws_every_time_scale(strict, tmp_path, res):
    fig, axes = plotting.plot_crossing_time(res, width="page")
    assert [a.get_title(loc="left") for a in axes] == ["halcyon", "lissom", "skerrow_passage"]
    notes = [t.get_text() for t in axes[0].texts]
    assert notes == ["monthly (30 d)", "seasonal (3 mo)", "annual (12 mo)"]
    assert axes[0].get_yscale() == "log"
    fig.savefig(tmp_path / "c.png", dpi=80)
    with pytest.raises(ValueError, match="basins: expected names among"):
        plotting.plot_crossing_time(res, basins=["nowhere"])
    with pytest.raises(TypeError, match="data: expected a Dataset with basin_crossing_time"):
        plotting.plot_crossing_time(res[["interior_transport"]])


def test_latitude_time_marks_the_rows_that_did_not_adjust(strict, res):
    flags = res.sverdrup_adjusted.sel(time_scale="annual")
    fig, axes = plotting.plot_latitude_time(res.interior_transport_by_time, adjusted=flags,
                                            width="page")
    labels = [t.get_text() for t in fig.legends[0].get_texts()]
    assert "adjusted within the time step" in labels
    assert "not adjusted (Rossby waves still crossing)" in labels
    # One strip segment per run of equal flags in the Halcyon Ocean (adjusted near the
    # equator, not elsewhere): count them from the flags themselves.
    h = flags.sel(basin="halcyon").values
    runs = sum(np.count_nonzero(np.diff(np.r_[0, (h == v).astype(int), 0]) == 1) for v in (0, 1))
    assert len(axes[0].patches) == runs


def test_lagged_transport_figure(strict, tmp_path):
    lat = np.arange(10.5, 50.0, 1.0)
    lon = np.arange(0.5, 61.0, 1.0)
    ocean = (lon[None] > 2) & (lon[None] < 58) & (lat[:, None] > 12) & (lat[:, None] < 48)
    time = pd.date_range("2001-07-01", periods=8, freq="YS-JUL")
    ramp = np.linspace(1.0, 1.3, time.size)
    tx = np.where(ocean, -0.1 * np.cos(np.pi * (lat[:, None] - 12) / 36), np.nan)
    taux = xr.DataArray(tx[None] * ramp[:, None, None], dims=("time", "lat", "lon"),
                        coords={"time": time, "lat": lat, "lon": lon}, attrs={"units": "Pa"})
    sv = sverdrup_transport(taux, 0 * taux)
    resp = long_wave_response(taux, 0 * taux, sv.isel(time=0), initial="steady")
    fig, axes = plotting.plot_lagged_transport(resp, sv.interior_transport, basin="basin_0",
                                               lats=[20, 40], anomaly=True)
    assert axes[0].get_ylabel() == "change (Sv)"
    lines = axes[1].get_lines()
    assert lines[0].get_ydata()[0] == 0.0  # the zero line
    np.testing.assert_allclose(lines[2].get_ydata()[0], 0.0)
    fig.savefig(tmp_path / "l.png", dpi=80)
    with pytest.raises(ValueError, match="basin: expected one of"):
        plotting.plot_lagged_transport(resp, sv.interior_transport, basin="x", lats=[20])
