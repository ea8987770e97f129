"""Closed-form Stommel (1948) and Munk (1950) boundary layers against their equations."""

import numpy as np
import pytest

from sverdrup_kit.physics.boundary_layers import (
    munk_boundary_layer,
    munk_edge_distance,
    munk_peak_distance,
    munk_width,
    stommel_basin,
    stommel_width,
)

BETA_30N = 1.9825e-11  # derived: 2 Omega cos(30N)/R, Omega = 7.292115e-5 (Groten 2004), R = 6.371e6


def test_stommel_width_at_30n():
    # Stommel (1948), Trans. AGU 29, 202-206: delta_S = r/beta, 50 km for r = 1e-6 s-1 at 30N.
    assert stommel_width(1e-6, BETA_30N) == pytest.approx(50.4e3, rel=1e-3)


@pytest.mark.parametrize("A_H, km", [(1e3, 36.9), (5e3, 63.2), (1e4, 79.6)])
def test_munk_width_at_30n(A_H, km):
    # Munk (1950), J. Meteor. 7, 79-93: delta_M = (A_H/beta)^(1/3) at 30N, no factor pi
    # (values derived).
    assert munk_width(A_H, BETA_30N) / 1e3 == pytest.approx(km, abs=0.05)


def test_munk_layer_landmarks():
    # Derived from Munk's (1950, J. Meteor. 7, 79-93) no-slip layer: peak at 1.209 delta,
    # first reversal at 3.628 delta;
    # free-slip reversal at 4 pi/(3 sqrt 3) = 2.418 (derived here from the same solution).
    assert munk_peak_distance() == pytest.approx(1.209, abs=5e-4)
    assert munk_edge_distance() == pytest.approx(3.628, abs=5e-4)
    assert munk_edge_distance(boundary="free-slip") == pytest.approx(2.418, abs=5e-4)
    assert munk_peak_distance(boundary="free-slip") == 0.0


@pytest.mark.parametrize("boundary", ["no-slip", "free-slip"])
def test_munk_layer_solves_its_equation(boundary):
    # Derived from Munk (1950): beta psi_x = A_H psi_xxxx in the layer, psi -> psi_I far away,
    # psi = 0 at the wall and psi_x = 0 (no-slip) or psi_xx = 0 (free-slip) there.
    A_H, beta = 2e3, 2e-11
    d = float(munk_width(A_H, beta))
    h = d / 400
    x = np.arange(0, 12 * d, h)
    ds = munk_boundary_layer(x, 10.0, A_H=A_H, beta=beta, boundary=boundary)
    psi = ds.barotropic_streamfunction.values
    assert psi[0] == pytest.approx(0.0, abs=1e-12)
    assert psi[-1] == pytest.approx(10.0, rel=2e-2)
    d1 = np.gradient(psi, h)
    # the returned transport is the exact derivative: compare with a numerical one
    np.testing.assert_allclose(ds.barotropic_northward_transport.values[5:-5] / 1e6, d1[5:-5],
                               atol=2e-4 * np.abs(d1).max())
    d4 = (psi[4:] - 4 * psi[3:-1] + 6 * psi[2:-2] - 4 * psi[1:-3] + psi[:-4]) / h**4
    lhs, rhs = beta * d1[2:-2], A_H * d4
    assert np.max(np.abs(lhs - rhs)[10:-10]) < 1e-3 * np.max(np.abs(lhs))
    if boundary == "no-slip":
        assert ds.barotropic_northward_transport.values[0] == pytest.approx(0.0, abs=1e-9)
    else:
        assert (psi[2] - 2 * psi[1] + psi[0]) / h**2 == pytest.approx(
            0.0, abs=1e-2 * np.abs(d1).max() / d)


def test_munk_layer_peak_and_reversal_on_the_profile():
    # Derived from Munk (1950), J. Meteor. 7: 1.209 and 3.628 delta_M, found on a fine profile.
    ds = munk_boundary_layer(np.linspace(0, 5e5, 50001), A_H=1e3, beta=BETA_30N)
    d = ds.attrs["delta_M"]
    v = ds.barotropic_northward_velocity.values
    x = ds.x.values
    assert x[np.argmax(v)] / d == pytest.approx(1.209, abs=2e-3)
    assert x[np.flatnonzero(v[1:] < 0)[0] + 1] / d == pytest.approx(3.628, abs=2e-3)


def stommel_residual(ds):
    """r lap(psi) + beta psi_x - curl/rho0 by centred differences on the closed form."""
    a = ds.attrs
    psi = ds.barotropic_streamfunction.values * 1e6
    x, y = ds.x.values, ds.y.values
    hx, hy = x[1] - x[0], y[1] - y[0]
    lap = ((psi[1:-1, 2:] - 2 * psi[1:-1, 1:-1] + psi[1:-1, :-2]) / hx**2
           + (psi[2:, 1:-1] - 2 * psi[1:-1, 1:-1] + psi[:-2, 1:-1]) / hy**2)
    px = (psi[1:-1, 2:] - psi[1:-1, :-2]) / (2 * hx)
    forcing = ds.wind_stress_curl.values[1:-1, None] / a["rho0"]
    return a["r"] * lap + a["beta"] * px - forcing, forcing


def test_stommel_closed_form_solves_the_stommel_equation():
    # Stommel (1948), Trans. AGU 29, 202-206, r lap(psi) + beta psi_x = curl/rho0: residual
    # of centred differences on a fine
    # grid is second-order small, and psi vanishes on all four walls.
    x = np.linspace(0, 2e6, 2001)
    y = np.linspace(0, 2e6, 401)
    ds = stommel_basin(x, y, r=1e-6, beta=2e-11)
    res, forcing = stommel_residual(ds)
    assert np.max(np.abs(res)) < 5e-3 * np.max(np.abs(forcing))
    psi = ds.barotropic_streamfunction.values
    for edge in (psi[0], psi[-1], psi[:, 0], psi[:, -1]):
        assert np.max(np.abs(edge)) < 1e-9 * np.max(psi)


def test_stommel_gyre_is_anticyclonic_and_western_intensified():
    # Stommel (1948) fig. 3: with tau_x = -F cos(pi y/b) the Northern Hemisphere gyre turns
    # clockwise (psi > 0), the northward return flow is squeezed against the western wall.
    x = np.linspace(0, 5e6, 501)
    y = np.linspace(0, 3e6, 61)
    ds = stommel_basin(x, y, r=1e-6, beta=2e-11)
    mid = ds.isel(y=30)
    assert float(ds.barotropic_streamfunction.min()) >= -1e-12
    assert x[np.argmax(mid.barotropic_streamfunction.values)] < 0.1 * 5e6
    assert float(mid.barotropic_northward_velocity.isel(x=1)) > 0 > float(mid.barotropic_northward_velocity.isel(x=250))


def test_stommel_symmetric_without_beta():
    # Stommel (1948) cases 1 and 2: without beta the gyre is symmetric east-west.
    x = np.linspace(0, 2e6, 201)
    y = np.linspace(0, 1e6, 51)
    psi = stommel_basin(x, y, r=1e-6, beta=0.0).barotropic_streamfunction.values
    np.testing.assert_allclose(psi, psi[:, ::-1], atol=1e-12 * psi.max())


def test_stommel_weak_friction_tends_to_sverdrup_interior():
    # Sverdrup (1947) interior: psi = -(1/(rho0 beta)) int_x^L curl dx' (derived for this wind:
    # (L - x) F pi/(b rho0 beta) sin(pi y/b)). No overflow for a tiny r.
    x = np.linspace(0, 5e6, 101)
    y = np.linspace(0, 3e6, 61)
    F, beta, rho0 = 0.1, 2e-11, 1025.0
    ds = stommel_basin(x, y, r=1e-9, beta=beta, stress_amplitude=F)
    assert np.all(np.isfinite(ds.barotropic_streamfunction.values))
    sv = (5e6 - x) * F * np.pi / (3e6 * rho0 * beta) * np.sin(np.pi * y / 3e6)[:, None] / 1e6
    np.testing.assert_allclose(ds.barotropic_streamfunction.values[:, 5:], sv[:, 5:], atol=0.01 * sv.max())


def test_bad_input_names_the_argument():
    with pytest.raises(ValueError, match="r: expected"):
        stommel_basin(np.linspace(0, 1e6, 11), np.linspace(0, 1e6, 11), r=-1.0)
    with pytest.raises(ValueError, match="boundary: expected"):
        munk_boundary_layer(np.linspace(0, 1e5, 11), boundary="sticky")
    with pytest.raises(ValueError, match="x: expected"):
        munk_boundary_layer(np.array([-1.0, 0.0, 1.0]))
