"""Spread across products and drag laws: the same numbers as separate calls, grids aligned."""

from __future__ import annotations

import warnings

import numpy as np
import pytest
import xarray as xr

import sverdrup_kit as sk
from sverdrup_kit.errors import InputError
from sverdrup_kit.spread import spread_table, transport_spread

LAWS = ("large-pond-1981", "large-yeager-2009")


def basin_stress(step):
    """The invented closed basin of sverdrup_transport's docstring example (0-60E, 15-55N),
    under easterlies turning to westerlies, on a grid of ``step`` degrees."""
    lat = np.arange(-90 + step / 2, 90, step)
    lon = np.arange(step / 2, 360, step)
    ocean = (lon < 60) & (lat[:, None] > 15) & (lat[:, None] < 55)
    tau = -0.1 * np.cos(np.deg2rad(4.5 * (lat[:, None] - 15))) * np.ones(lon.size)
    taux = xr.DataArray(np.where(ocean, tau, np.nan), coords={"lat": lat, "lon": lon},
                        dims=("lat", "lon"), attrs={"units": "Pa"})
    return xr.Dataset({"taux": taux, "tauy": 0 * taux})


def test_products_on_different_grids_are_averaged_onto_the_coarsest():
    coarse, fine = basin_stress(2.0), basin_stress(1.0)
    res = transport_spread({"coarse": coarse, "fine": fine}, drag_laws=("given",),
                           basins=None, ocean_mask="data")
    assert "'fine'" in res.attrs["common_grid"] and "coarsest" in res.attrs["common_grid"]
    assert res.sizes["lat"] == 90  # the 2 degree grid
    t = res.interior_transport.sel(basin="basin_0", lat=31.0).squeeze()
    # -19.8 Sv at 31N on the 2 degree grid (sverdrup_transport docstring, derived from
    # V = curl tau / (rho0 beta)); the 1 degree stress averaged by area onto the same cells
    # gives the same interior transport within 2% (the averaged cosine differs at O(dlat^2)).
    assert float(t.sel(product="coarse")) == pytest.approx(-19.8, abs=0.05)
    assert float(t.sel(product="fine")) == pytest.approx(float(t.sel(product="coarse")),
                                                         rel=0.02)
    row = res.sel(basin="basin_0", lat=31.0)
    assert float(row.transport_range) == pytest.approx(
        abs(float(t.sel(product="fine")) - float(t.sel(product="coarse"))), abs=1e-12)


@pytest.mark.realdata
def test_spread_on_coads_returns_the_range_of_separate_calls(marine_climatology):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        coads = sk.open_winds(marine_climatology)
        res = transport_spread([coads], drag_laws=LAWS, names=["coads"]).compute()
        single = [sk.diagnose(coads, drag_law=law, use_wind_speed=False, ocean_mask="earth",
                              basins="earth")["interior_transport"].compute() for law in LAWS]
    for law, one in zip(LAWS, single):
        got = res.interior_transport.sel(product="coads", drag_law=law, mean_speed="vector")
        xr.testing.assert_allclose(got.drop_vars(["product", "drag_law", "mean_speed"]),
                                   one.drop_vars([c for c in one.coords if c not in one.dims]))
    lo = np.fmin(single[0], single[1])
    hi = np.fmax(single[0], single[1])
    np.testing.assert_allclose(res.transport_range.values, (hi - lo).values, atol=1e-9)
    rows = spread_table(res, [26.5])
    atl = next(r for r in rows if r["basin"] == "atlantic")
    assert atl["observed"] == "Florida Current" and atl["count"] == 2
    # the two drag laws differ by a few percent at trade-wind speeds (Large & Pond 1981 vs
    # Large & Yeager 2009 coefficients at 5-8 m/s: REFERENCES), so the range is small but > 0
    assert 0 < atl["max"] - atl["min"] < 0.3 * abs(atl["mean"])


def test_bad_input_is_named():
    with pytest.raises(InputError, match="sources: expected a list"):
        transport_spread("one_file.nc")
    with pytest.raises(InputError, match="mean_speeds: expected"):
        transport_spread([basin_stress(2.0)], mean_speeds=("median",))
    res = transport_spread([basin_stress(4.0)], drag_laws=("given",), basins=None,
                           ocean_mask="data")
    with pytest.raises(InputError, match="latitudes: expected"):
        spread_table(res, [95.0])
