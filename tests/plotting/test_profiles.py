"""Transports against latitude: panels, observations, shaded bands, bad input."""

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import pytest  # noqa: E402
import xarray as xr  # noqa: E402

from sverdrup_kit import plotting  # noqa: E402

from ._results import OBS, save  # noqa: E402


def test_plot_interior_transport_with_observations(strict, tmp_path, result):
    fig, axes = plotting.plot_interior_transport(result, observations=OBS, width="column")
    # The Skerrow Passage has no valid row, so by default it gets no (empty) panel.
    assert [a.get_title(loc="left") for a in axes] == ["Halcyon Ocean", "Lissom Ocean",
                                                      "Gulf of Maren"]
    assert axes[0].get_ylabel() == "northward transport (Sv)"
    names = {t.get_text() for t in fig.legends[0].get_texts()}
    assert {"Sverdrup interior", "western boundary current", "observed (\u00b1 spread)",
            "equatorial band (Ekman ~ 1/f, equatorial dynamics)"} <= names
    save(fig, tmp_path, "transport")
    fig, axes = plotting.plot_interior_transport(result, basins=["Skerrow Passage"])
    assert "no eastern coast" in {t.get_text() for t in fig.legends[0].get_texts()}
    save(fig, tmp_path, "transport_channel")


def test_plot_interior_transport_accepts_the_observation_table(strict, tmp_path, result):
    obs = xr.Dataset(
        {"transport": ("current", [30.0]), "spread": ("current", [3.0]),
         "lat": ("current", [27.0]), "basin": ("current", ["Halcyon Ocean"])},
        coords={"current": ["Brenn Current"]})
    fig, axes = plotting.plot_interior_transport(result, basins=["Halcyon Ocean"], observations=obs,
                                        width="page")
    assert len(axes) == 1
    save(fig, tmp_path, "transport_one")


def test_plot_interior_transport_accepts_a_dataframe(strict, tmp_path, result):
    pd = pytest.importorskip("pandas")
    fig, axes = plotting.plot_interior_transport(result, observations=pd.DataFrame(OBS))
    names = {t.get_text() for a in axes for t in a.texts}
    assert names == {"Brenn Current", "Quillon Jet", "Austral Drift"}
    save(fig, tmp_path, "transport_df")


def test_plot_interior_transport_bad_observations(result):
    with pytest.raises(ValueError, match="observations"):
        plotting.plot_interior_transport(result, observations=[{"lat": 20, "transport": 3}])
    with pytest.raises(ValueError, match="basins"):
        plotting.plot_interior_transport(result, basins=["Atlantis"])
    with pytest.raises(ValueError, match="observations"):
        plotting.plot_interior_transport(result, observations=[dict(OBS[0], basin="Atlantis")])
    plt.close("all")
