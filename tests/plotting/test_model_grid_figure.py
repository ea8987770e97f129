"""The model-versus-Sverdrup figure draws from model_circulation's output."""

from __future__ import annotations

import matplotlib

matplotlib.use("Agg")

import numpy as np  # noqa: E402
import pytest  # noqa: E402

from sverdrup_kit import model_circulation  # noqa: E402
from sverdrup_kit.plotting import plot_model_vs_sverdrup  # noqa: E402
from sverdrup_kit.synthetic_grids import as_field, rotated_pole_grid  # noqa: E402


def test_figure_has_one_panel_per_basin_and_three_curves(tmp_path):
    lat, lon, _, _ = rotated_pole_grid(2.0, pole_lat=60.0, pole_lon=200.0)
    lo = np.mod(lon, 360)
    ocean = ((lo > 0.5) & (lo < 60) | (lo > 100) & (lo < 200)) & (lat > 10) & (lat < 55)
    tau = np.where(ocean, -0.1 * np.cos(np.deg2rad(4.5 * (lat - 15))), np.nan)
    v = as_field(np.where(ocean, 1.0, np.nan), lat, lon, units="m2 s-1")
    tx = as_field(tau, lat, lon)
    ds = model_circulation(0 * v, v, taux=tx, tauy=0 * tx)
    fig = plot_model_vs_sverdrup(ds)
    assert len(fig.axes) == ds.sizes["basin"] == 2
    assert all(len(ax.get_lines()) == 4 for ax in fig.axes)  # three curves and the zero line
    fig.savefig(tmp_path / "model.png", dpi=80)
    with pytest.raises(KeyError, match="model_circulation"):
        plot_model_vs_sverdrup(ds.drop_vars("interior_transport"))
