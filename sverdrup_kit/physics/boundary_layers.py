"""Closed-form western boundary layers: Stommel (1948) and Munk (1950).

These are the analytic solutions that close the Sverdrup interior. They serve as teaching
examples and as outside references for the numerical solver in :mod:`sverdrup_kit.physics.barotropic`.

Conventions used throughout the toolkit:

* ``psi`` is the streamfunction of the depth-integrated flow, with northward transport per unit
  width ``V = dpsi/dx`` and eastward ``U = -dpsi/dy`` (m2 s-1); ``psi`` is written in
  1e6 m3 s-1. Depth-mean velocities are ``U/depth`` and ``V/depth`` (m s-1).
* The Stommel width is ``delta_S = r / beta`` and the Munk width ``delta_M = (A_H / beta)**(1/3)``,
  with no factor pi (some texts multiply the Munk width by pi; we do not).
"""

from __future__ import annotations

import numpy as np
import xarray as xr

from .. import _validate, constants

__all__ = [
    "stommel_width",
    "munk_width",
    "stommel_basin",
    "munk_boundary_layer",
    "munk_peak_distance",
    "munk_edge_distance",
]

_BOUNDARIES = ("no-slip", "free-slip")


def stommel_width(r, beta):
    r"""Width of the Stommel western boundary layer, :math:`\delta_S = r/\beta`, in m.

    Parameters
    ----------
    r : float or array_like
        Linear bottom-friction coefficient acting on the depth-integrated flow, s-1 (> 0).
    beta : float or array_like
        Meridional gradient of the Coriolis parameter, m-1 s-1 (> 0).

    Returns
    -------
    float or ndarray
        e-folding width of the boundary current in m (50 km for r = 1e-6 s-1 at 30N).

    References
    ----------
    Stommel, H. (1948). The westward intensification of wind-driven ocean currents. Transactions,
    American Geophysical Union, 29, 202-206.
    """
    r = _validate.numbers_array(r, "r", units="s-1", example=1e-6)
    beta = _validate.numbers_array(beta, "beta", units="m-1 s-1", example=2e-11)
    return r / beta


def munk_width(A_H, beta):
    r"""Width of the Munk western boundary layer, :math:`\delta_M = (A_H/\beta)^{1/3}`, in m.

    Parameters
    ----------
    A_H : float or array_like
        Lateral (horizontal) eddy viscosity, m2 s-1 (> 0).
    beta : float or array_like
        Meridional gradient of the Coriolis parameter, m-1 s-1 (> 0).

    Returns
    -------
    float or ndarray
        Munk width in m, without a factor pi (36.9 km for A_H = 1e3 m2 s-1 at 30N).

    Notes
    -----
    The no-slip layer's northward flow peaks at :math:`2\pi/(3\sqrt3)\,\delta_M \approx
    1.209\,\delta_M` and first reverses at :math:`2\pi/\sqrt3\,\delta_M \approx 3.628\,\delta_M`
    (see :func:`munk_boundary_layer`). Texts that quote ``pi * delta_M`` as the width use
    another convention.

    References
    ----------
    Munk, W. H. (1950). On the wind-driven ocean circulation. Journal of Meteorology, 7, 79-93.
    """
    A_H = _validate.numbers_array(A_H, "A_H", units="m2 s-1", example=1e3)
    beta = _validate.numbers_array(beta, "beta", units="m-1 s-1", example=2e-11)
    return np.cbrt(A_H / beta)


def munk_peak_distance(*, boundary: str = "no-slip") -> float:
    r"""Distance from the wall of the peak northward flow of the Munk layer, in units of delta_M.

    ``2 pi / (3 sqrt 3) = 1.2092`` for no-slip; 0 (at the wall) for free-slip. Derived from the
    layer solution in :func:`munk_boundary_layer`.
    """
    _check_boundary(boundary)
    return 2 * np.pi / (3 * np.sqrt(3)) if boundary == "no-slip" else 0.0


def munk_edge_distance(*, boundary: str = "no-slip") -> float:
    r"""Distance from the wall where the Munk layer's northward flow first reverses, in delta_M.

    ``2 pi / sqrt 3 = 3.6276`` for no-slip, ``4 pi / (3 sqrt 3) = 2.4184`` for free-slip
    (derived from the layer solution in :func:`munk_boundary_layer`).
    """
    _check_boundary(boundary)
    return 2 * np.pi / np.sqrt(3) if boundary == "no-slip" else 4 * np.pi / (3 * np.sqrt(3))


def _check_boundary(boundary: str) -> None:
    if boundary not in _BOUNDARIES:
        raise ValueError(
            f"boundary: expected one of {_BOUNDARIES}, found {boundary!r}. Fix: pass "
            "boundary='no-slip' (velocity vanishes at the wall) or 'free-slip' (no stress)."
        )


def munk_boundary_layer(
    x,
    interior_streamfunction=1.0,
    *,
    A_H: float = 1.0e3,
    beta: float = 1.9825e-11,
    boundary: str = "no-slip",
    depth: float = 4000.0,
) -> xr.Dataset:
    r"""The Munk (1950) western boundary layer that closes a Sverdrup interior.

    Parameters
    ----------
    x : array_like, shape (nx,)
        Distance east of the western wall, m (x >= 0).
    interior_streamfunction : float or xarray.DataArray
        Streamfunction of the interior just outside the layer, 1e6 m3 s-1 (positive for a
        subtropical gyre in the Northern Hemisphere). A DataArray (e.g. over ``y``) broadcasts
        against ``x``.
    A_H : float, optional
        Lateral eddy viscosity, m2 s-1.
    beta : float, optional
        Meridional gradient of the Coriolis parameter, m-1 s-1 (default: 30N).
    boundary : {"no-slip", "free-slip"}
        Condition at the wall: ``dpsi/dx = 0`` or ``d2psi/dx2 = 0``.
    depth : float, optional
        Depth of the flat-bottomed ocean in m; only converts transport to depth-mean speed.

    Returns
    -------
    xarray.Dataset
        ``barotropic_streamfunction`` (1e6 m3 s-1), ``barotropic_northward_transport`` per unit width (m2 s-1) and
        ``barotropic_northward_velocity`` (m s-1) on ``x``; ``delta_M`` and the parameters in attrs.

    Notes
    -----
    The layer balances :math:`\beta\,\partial_x\psi = A_H\,\partial_x^4\psi` with
    :math:`\psi \to \psi_I` far from the wall. With :math:`s = x/\delta_M`,
    :math:`\delta_M = (A_H/\beta)^{1/3}` and :math:`\omega = \sqrt3/2`:

    .. math:: \psi = \psi_I\left[1 - e^{-s/2}\left(\cos\omega s \pm
       \frac{\sin\omega s}{\sqrt3}\right)\right]

    with + for no-slip (:math:`\psi = \psi_x = 0` at the wall) and - for free-slip
    (:math:`\psi = \psi_{xx} = 0`). The no-slip northward transport is
    :math:`\psi_I (2/\sqrt3)\, e^{-s/2}\sin\omega s / \delta_M`: it peaks at
    :math:`s = 2\pi/(3\sqrt3) = 1.209` and first reverses at :math:`s = 2\pi/\sqrt3 = 3.628`.

    References
    ----------
    Munk, W. H. (1950). On the wind-driven ocean circulation. Journal of Meteorology, 7, 79-93.
    Pedlosky, J. (1996). Ocean Circulation Theory, Springer, section 5.
    """
    _check_boundary(boundary)
    A_H = _validate.number(A_H, "A_H", units="m2 s-1", example=1e3)
    beta = _validate.number(beta, "beta", units="m-1 s-1", example=2e-11)
    depth = _validate.number(depth, "depth", units="m", example=4000.0)
    x = np.asarray(x, dtype=np.float64)
    if x.ndim != 1 or np.any(x < 0):
        raise ValueError(
            "x: expected a 1-D array of distances east of the wall (m, >= 0), found shape "
            f"{x.shape} with minimum {np.min(x) if x.size else 'n/a'}. Fix: measure x from the wall."
        )
    delta = float(munk_width(A_H, beta))
    s = x / delta
    w = np.sqrt(3.0) / 2.0
    sign = 1.0 if boundary == "no-slip" else -1.0
    shape = 1.0 - np.exp(-s / 2) * (np.cos(w * s) + sign * np.sin(w * s) / np.sqrt(3.0))
    if boundary == "no-slip":
        dshape = (2.0 / np.sqrt(3.0)) * np.exp(-s / 2) * np.sin(w * s) / delta
    else:
        dshape = np.exp(-s / 2) * (np.cos(w * s) + np.sin(w * s) / np.sqrt(3.0)) / delta
    xc = xr.DataArray(x, dims="x", attrs=dict(units="m", long_name="distance east of the wall"))
    shape = xr.DataArray(shape, coords={"x": xc}, dims="x")
    dshape = xr.DataArray(dshape, coords={"x": xc}, dims="x")
    psi_i = interior_streamfunction
    psi = (psi_i * shape).rename("barotropic_streamfunction")
    vt = (psi_i * constants.SVERDRUP_IN_M3_S * dshape).rename("barotropic_northward_transport")
    ds = xr.Dataset(
        {
            "barotropic_streamfunction": psi.assign_attrs(_PSI_ATTRS),
            "barotropic_northward_transport": vt.assign_attrs(_VT_ATTRS),
            "barotropic_northward_velocity": (vt / depth).assign_attrs(_VV_ATTRS),
        }
    )
    return ds.assign_attrs(
        title="Munk (1950) western boundary layer",
        boundary=boundary,
        A_H=A_H,
        beta=beta,
        depth=depth,
        delta_M=delta,
        delta_M_convention="delta_M = (A_H/beta)**(1/3), no factor pi; lengths in m",
    )


_PSI_ATTRS = dict(
    standard_name="ocean_barotropic_streamfunction",
    long_name="streamfunction of the depth-integrated flow (northward transport = d psi/dx)",
    units="1e6 m3 s-1",
)
_UT_ATTRS = dict(long_name="depth-integrated eastward transport per unit width", units="m2 s-1")
_VT_ATTRS = dict(long_name="depth-integrated northward transport per unit width", units="m2 s-1")
_UV_ATTRS = dict(long_name="depth-mean eastward velocity", units="m s-1")
_VV_ATTRS = dict(long_name="depth-mean northward velocity", units="m s-1")


def stommel_basin(
    x,
    y,
    *,
    stress_amplitude: float = 0.1,
    r: float = 1.0e-6,
    beta: float = 1.9825e-11,
    zonal_extent: float | None = None,
    meridional_extent: float | None = None,
    rho0: float = constants.RHO0,
    depth: float = 4000.0,
) -> xr.Dataset:
    r"""Exact Stommel (1948) circulation in a rectangular beta-plane basin.

    Parameters
    ----------
    x, y : array_like, shapes (nx,) and (ny,)
        Eastward and northward distances in m from the south-western corner, within the basin
        ``0 <= x <= L`` and ``0 <= y <= b``.
    stress_amplitude : float, optional
        F in Pa: the wind stress is ``tau_x = -F cos(pi y / b)``, ``tau_y = 0`` (easterlies in
        the south, westerlies in the north: one anticyclonic gyre).
    r : float, optional
        Linear bottom-friction coefficient on the depth-integrated flow, s-1 (> 0).
    beta : float, optional
        Meridional gradient of f, m-1 s-1 (>= 0; 0 gives the symmetric gyre of a non-rotating
        or uniformly rotating basin). Default: 30N.
    zonal_extent, meridional_extent : float, optional
        L and b in m; default ``max(x)`` and ``max(y)``.
    rho0 : float, optional
        Reference density, kg m-3.
    depth : float, optional
        Depth of the flat-bottomed basin, m; only converts transports to depth-mean speeds.

    Returns
    -------
    xarray.Dataset on (y, x)
        ``barotropic_streamfunction`` (1e6 m3 s-1), ``barotropic_eastward_transport``/``barotropic_northward_transport`` per
        unit width (m2 s-1), ``barotropic_eastward_velocity``/``barotropic_northward_velocity`` (m s-1), the forcing
        ``eastward_wind_stress`` (Pa) and ``wind_stress_curl`` (N m-3); ``delta_S`` and the
        parameters in attrs.

    Notes
    -----
    Solves :math:`r\nabla^2\psi + \beta\psi_x = \operatorname{curl}\tau/\rho_0` with
    :math:`\psi = 0` on the walls. With :math:`\alpha = \beta/r`, :math:`k = \pi/b`:

    .. math:: \psi = \frac{F b}{\pi\rho_0 r}\sin(k y)\left(1 - p e^{A x} - q e^{B x}\right),
       \quad A, B = -\frac{\alpha}{2} \mp \sqrt{\frac{\alpha^2}{4} + k^2},

    :math:`p = (1 - e^{BL})/(e^{AL} - e^{BL})`, :math:`q = 1 - p`. The exponentials are
    evaluated in a form that neither overflows nor underflows to a wrong answer for any r.

    References
    ----------
    Stommel, H. (1948). The westward intensification of wind-driven ocean currents. Transactions,
    American Geophysical Union, 29, 202-206.
    """
    r = _validate.number(r, "r", units="s-1", example=1e-6)
    # beta is positive in both hemispheres; 0 gives a non-rotating or uniformly rotating basin.
    beta = _validate.number(beta, "beta", sign="non-negative", units="m-1 s-1", example=2e-11)
    stress_amplitude = _validate.number(stress_amplitude, "stress_amplitude", sign="any",
                                        units="Pa", example=0.1)
    rho0 = _validate.number(rho0, "rho0", units="kg m-3", example=1025.0)
    depth = _validate.number(depth, "depth", units="m", example=4000.0)
    x = np.asarray(x, dtype=np.float64)
    y = np.asarray(y, dtype=np.float64)
    L = float(np.max(x)) if zonal_extent is None else float(zonal_extent)
    b = float(np.max(y)) if meridional_extent is None else float(meridional_extent)
    for name, arr, ext in (("x", x, L), ("y", y, b)):
        if arr.ndim != 1 or ext <= 0 or np.min(arr) < 0 or np.max(arr) > ext * (1 + 1e-12):
            raise ValueError(
                f"{name}: expected a 1-D array of distances in m within [0, {ext:g}], found shape "
                f"{arr.shape} spanning {np.min(arr):g}..{np.max(arr):g}. Fix: measure {name} from "
                "the south-western corner of the basin."
            )
    k = np.pi / b
    alpha = beta / r
    root = np.sqrt(alpha**2 / 4 + k**2)
    A, B = -alpha / 2 - root, -alpha / 2 + root
    denom = np.expm1((A - B) * L)
    # p e^{Ax} and q e^{Bx}, rewritten with e^{-BL} so that nothing overflows (A < 0 < B).
    west = np.expm1(-B * L) * np.exp(A * x) / denom
    east = np.expm1(A * L) * np.exp(B * (x - L)) / denom
    X = 1.0 - west - east
    dX = -A * west - B * east
    C = stress_amplitude * b / (np.pi * rho0 * r)
    sin, cos = np.sin(k * y)[:, None], np.cos(k * y)[:, None]
    psi = C * sin * X[None, :]
    V = C * sin * dX[None, :]
    U = -C * k * cos * X[None, :]
    tau = -stress_amplitude * np.cos(k * y)
    curl = -stress_amplitude * k * np.sin(k * y)
    coords = {
        # No axis attribute: CF-aware readers take axis X/Y without a grid mapping for
        # longitude/latitude, which distances in a basin are not.
        "y": ("y", y, dict(units="m", long_name="northward distance")),
        "x": ("x", x, dict(units="m", long_name="eastward distance")),
    }
    dims = ("y", "x")
    ds = xr.Dataset(
        {
            "barotropic_streamfunction": (dims, psi / constants.SVERDRUP_IN_M3_S, _PSI_ATTRS),
            "barotropic_eastward_transport": (dims, U, _UT_ATTRS),
            "barotropic_northward_transport": (dims, V, _VT_ATTRS),
            "barotropic_eastward_velocity": (dims, U / depth, _UV_ATTRS),
            "barotropic_northward_velocity": (dims, V / depth, _VV_ATTRS),
            "eastward_wind_stress": (
                "y",
                tau,
                dict(standard_name="surface_downward_eastward_stress", units="Pa"),
            ),
            "wind_stress_curl": ("y", curl, dict(long_name="wind stress curl", units="N m-3")),
        },
        coords=coords,
    )
    return ds.assign_attrs(
        title="Stommel (1948) circulation in a rectangular beta-plane basin (exact)",
        r=r,
        beta=beta,
        stress_amplitude=stress_amplitude,
        zonal_extent=L,
        meridional_extent=b,
        rho0=rho0,
        depth=depth,
        delta_S=float(stommel_width(r, beta)) if beta > 0 else np.inf,
        equation="r lap(psi) + beta dpsi/dx = curl(tau)/rho0, psi = 0 on the walls",
    )
