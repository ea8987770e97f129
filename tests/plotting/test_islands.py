"""Figures of the island rule on the synthetic world."""

import matplotlib

matplotlib.use("Agg")

import numpy as np
import pytest
import xarray as xr

from sverdrup_kit import island_rule, sverdrup_transport, wind_stress
from sverdrup_kit.plotting import map_island_rule, plot_island_transports
from sverdrup_kit.synthetic import load_world


@pytest.fixture(scope="module")
def results():
    w = load_world()
    st = wind_stress(w.u, w.v, wind_speed=w.wind_speed).mean("time")
    return sverdrup_transport(st.taux, st.tauy), island_rule(st.taux, st.tauy)


def test_map_draws_each_path_and_writes_the_constant(results):
    ds, rule = results
    fig, ax = map_island_rule(ds, rule, width="column", coastlines="mask")
    name = str(rule.island.values[0])
    psi = float(rule.island_streamfunction.sel(island=name))
    texts = [t.get_text() for t in ax.texts]
    assert any(name in t and f"{psi:.1f} Sv" in t for t in texts)
    # The path's points reach the map in the order the rule gives them.
    ok = np.isfinite(rule.path_lat.sel(island=name).values)
    assert any(len(line.get_xdata()) == ok.sum() for line in ax.lines)
    fig.canvas.draw()


def test_transports_across_cases_one_marker_each(results):
    _, rule = results
    cases = xr.concat([rule.island_transport, 1.2 * rule.island_transport],
                      xr.DataArray(["a", "b"], dims="product", name="product"))
    _, ax = plot_island_transports(cases, reference={str(rule.island.values[0]):
                                                       (10.0, 2.0, "invented")})
    markers = [line for line in ax.lines if line.get_marker() == "o"]
    assert len(markers) == 2
    np.testing.assert_allclose(markers[1].get_xdata(), 1.2 * markers[0].get_xdata())
    with pytest.raises(ValueError, match="data: expected a dimension 'island' or 'passage'"):
        plot_island_transports(rule.island_transport.rename(island="x"))
    with pytest.raises(TypeError, match="rule: expected the Dataset"):
        map_island_rule(results[0], results[0])
