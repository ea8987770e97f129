"""The balance figure (sverdrup_kit.plotting.balance)."""

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pytest  # noqa: E402

from sverdrup_kit import balance_check, balance_section_observations  # noqa: E402
from sverdrup_kit.plotting import plot_balance  # noqa: E402
from tests.ocean.test_hydrography import EOS, TS_LON, fake_sverdrup, make_ts  # noqa: E402


@pytest.fixture(scope="module")
def check():
    temp, salt = make_ts()
    sv = fake_sverdrup()
    taux = (0 * sv.sverdrup_northward_transport - 0.08).assign_attrs(units="Pa")
    return balance_check(sv, temp, salt, taux, reference_pressure=[1000.0, 1500.0],
                         western_limit=TS_LON[0], equation_of_state=EOS)


def test_plot_balance_draws_the_spread_across_reference_levels(check, tmp_path):
    fig, axes = plot_balance(check, width="column")
    labels = [t.get_text() for t in fig.legends[0].get_texts()]
    assert "range over 1000, 1500 dbar" in labels
    assert {"Sverdrup", "geostrophic + Ekman", "Ekman", "residual"} <= set(labels)
    # The band spans the two reference levels at every latitude.
    band = [c for c in axes[0].collections if c.get_label().startswith("range")][0]
    ys = band.get_paths()[0].vertices[:, 1]
    gpe = check.geostrophic_plus_ekman.sel(basin="invented")
    assert ys.min() == pytest.approx(float(gpe.min()))
    assert ys.max() == pytest.approx(float(gpe.max()))
    fig.savefig(tmp_path / "balance.png")
    plt.close(fig)


def test_plot_balance_places_observations_in_their_basin(check):
    obs = balance_section_observations("atlantic").assign(
        basin=("observation", ["invented"] * 3))
    fig, axes = plot_balance(check, observations=obs)
    labels = [t.get_text() for t in fig.legends[0].get_texts()]
    assert "observed geostrophic" in labels and "observed geostrophic + Ekman" in labels
    # The RAPID interior point and its sum with the Ekman entry (-18.1 + 3.8 Sv).
    points = [c for c in axes[0].containers]
    ys = sorted(float(np.ravel(c.lines[0].get_ydata())[0]) for c in points)
    assert ys == pytest.approx([-18.1, -14.3])
    plt.close(fig)


def test_plot_balance_refuses_other_input(check):
    with pytest.raises(TypeError, match="check: expected the Dataset from"):
        plot_balance(check[["residual"]])
    with pytest.raises(ValueError, match="basins: expected names among"):
        plot_balance(check, basins=["atlantis"])
