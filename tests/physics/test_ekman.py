"""Ekman transport and pumping against hand values derived from the constants."""

import numpy as np
import pytest
import xarray as xr

from sverdrup_kit import SphericalGrid
from sverdrup_kit.constants import EARTH_RADIUS as R
from sverdrup_kit.constants import OMEGA, RHO0
from sverdrup_kit.physics.ekman import ekman


def field(values, lat, lon, units="Pa"):
    return xr.DataArray(values, coords={"lat": lat, "lon": lon}, dims=("lat", "lon"),
                        attrs={"units": units})


def test_ekman_transport_hand_value_at_30n():
    # Derived from Ekman (1905), Ark. Mat. Astron. Fys. 2(11), M = tau/(rho0 f): tau = 0.1 Pa at
    # 30N gives 1.338 m2/s, to the right of the stress in the
    # northern hemisphere (Ekman 1905).
    lat = np.array([-30.0, 30.0])
    lon = np.arange(0, 360, 30.0)
    tx = field(np.full((2, lon.size), 0.1), lat, lon)
    e = ekman(tx, 0 * tx)
    assert float(e.ekman_northward_transport.sel(lat=30).mean()) == pytest.approx(-1.338, rel=1e-3)
    assert float(e.ekman_northward_transport.sel(lat=-30).mean()) == pytest.approx(1.338, rel=1e-3)
    ty = field(np.full((2, lon.size), 0.1), lat, lon)
    e2 = ekman(0 * ty, ty)
    assert float(e2.ekman_eastward_transport.sel(lat=30).mean()) == pytest.approx(1.338, rel=1e-3)


def test_ekman_pumping_hand_value_for_a_curl_at_30n():
    # Derived from Ekman (1905) and Gill (1982), Atmosphere-Ocean Dynamics, section 9.2:
    # curl = 1e-7 N/m3 at 30N gives w = curl/(rho0 f) = 1.34e-6 m/s
    # (42 m/yr). A field tauy = a*lam has curl a/(R cos phi) and no beta term (taux = 0).
    lat = np.arange(20.0, 40.1, 0.5)
    lon = np.arange(0, 360, 1.0)
    a = 1e-7 * R * np.cos(np.deg2rad(30.0))
    ty = field(a * np.deg2rad(lon)[None, :] * np.ones((lat.size, 1)), lat, lon)
    e = ekman(0 * ty, ty)
    w = e.ekman_pumping.sel(lat=30.0).isel(lon=slice(1, -1))
    assert float(w.mean()) == pytest.approx(1.338e-6, rel=2e-3)
    assert float(w.mean()) * 365.25 * 86400 == pytest.approx(42, abs=0.5)


def test_ekman_pumping_includes_the_beta_term():
    # Uniform eastward stress: w = curl(tau)/(rho0 f) + beta tau/(rho0 f^2) with
    # curl(tau) = tau tan(phi)/R (derived: curl of (tau, 0) on the sphere).
    g = SphericalGrid.regular(0.5)
    tx = field(np.full(g.shape, 0.1), g.lat, g.lon)
    w = ekman(tx, 0 * tx).ekman_pumping
    phi = np.deg2rad(g.lat)
    f = 2 * OMEGA * np.sin(phi)
    beta = 2 * OMEGA * np.cos(phi) / R
    exact = 0.1 * np.tan(phi) / (R * RHO0 * f) + beta * 0.1 / (RHO0 * f**2)
    sel = (np.abs(g.lat) > 15) & (np.abs(g.lat) < 75)
    np.testing.assert_allclose(w.values[sel, 0], exact[sel], rtol=2e-3)


def test_equatorial_band_is_masked_and_recorded():
    lat = np.arange(-10.0, 10.1, 1.0)
    lon = np.arange(0, 360, 10.0)
    tx = field(np.full((lat.size, lon.size), 0.05), lat, lon)
    e = ekman(tx, 0 * tx, equatorial_half_width=4.0)
    inside = np.abs(lat) < 4.0
    for name in e.data_vars:
        assert np.all(np.isnan(e[name].values[inside])), name
        assert e[name].attrs["equatorial_half_width"] == 4.0
        assert "equator" in e[name].attrs["comment"]
    assert np.all(np.isfinite(e.ekman_northward_transport.values[~inside]))
    with pytest.raises(ValueError, match="equatorial_half_width"):
        ekman(tx, 0 * tx, equatorial_half_width=-1.0)
    # Zero leaves no band, as in sverdrup_transport (one rule); on the equator f = 0.
    e0 = ekman(tx, 0 * tx, equatorial_half_width=0)
    assert np.isnan(e0.ekman_northward_transport.sel(lat=0.0)).all()
    assert np.isfinite(e0.ekman_northward_transport.sel(lat=1.0)).all()


def test_descending_latitude_and_dask_give_the_same_answer():
    g = SphericalGrid.regular(3.0)
    rng = np.random.default_rng(0)
    tx = field(rng.normal(0, 0.1, g.shape), g.lat, g.lon)
    ty = field(rng.normal(0, 0.1, g.shape), g.lat, g.lon)
    ref = ekman(tx, ty)
    flipped = ekman(tx.isel(lat=slice(None, None, -1)), ty.isel(lat=slice(None, None, -1)))
    xr.testing.assert_allclose(flipped.sortby("lat"), ref, rtol=1e-12)
    lazy = ekman(tx.chunk(lon=30), ty.chunk(lon=30))
    assert lazy.ekman_pumping.chunks is not None
    xr.testing.assert_allclose(lazy.compute(), ref, rtol=1e-12)
