r"""An invented temperature and salinity field in Sverdrup balance with given winds.

A reduced-gravity ("1.5-layer") thermocline for the synthetic world, generated on the fly, so
that the hydrographic test of Sverdrup balance (:func:`~sverdrup_kit.balance_check`) closes by
construction and its residual measures the error of the method alone.

The model
---------
A warm upper layer of thickness :math:`h(x, y)` over a deep layer at rest, density contrast
:math:`\Delta\rho`, reduced gravity :math:`g' = g\Delta\rho/\rho_0`. The northward geostrophic
transport per unit width of the upper layer is :math:`V_g = \frac{g'}{2f}\partial_x h^2`, and
Sverdrup balance asks :math:`V_g = V - V_E` with :math:`V` the Sverdrup transport and
:math:`V_E = -\tau_x/(\rho_0 f)` the Ekman transport. Integrated westward from the eastern coast,
where the layer has the thickness :math:`h_E`,

.. math:: h^2(x) = h_E^2 - \frac{2f}{g'}\int_x^{x_E} \left(V - V_E\right) dx'

(Parsons 1969 and Veronis 1973 used the same layer model for the subtropical gyre). Where the
right side falls below :data:`MIN_THICKNESS` squared the layer would outcrop; it is held there
and the column is flagged in ``outcrop``.

Temperature and salinity change smoothly across the interface (a logistic profile of width
:data:`INTERFACE_WIDTH`), and the fields obey :data:`SYNTHETIC_EOS`, a linear equation of state,
so that :math:`\int_0^{z_r} z\,\sigma\,dz = h^2/2 + \pi^2 w^2/6` and the dynamic method returns
exactly :math:`\frac{g'}{2f}\Delta(h^2)` between two columns, to within the error of the
vertical levels. The grid is 1 degree, finer than the world's 2 degree winds, with the land of
the world's ocean mask; each 1 degree row takes the Sverdrup and Ekman transports of the 2 degree
row that contains it, as :func:`~sverdrup_kit.balance_check` does.

The method's error
------------------
On the default :data:`LEVELS` (25 m apart down to 2000 m) the balance check recovers the
construction to better than 0.01 Sv on the synthetic world: the only departure is the surface
cutting the logistic profile where the layer is thinnest, of order :math:`w^2 e^{-h/w}` in
:math:`h^2/2` (derived), 0.003 Sv at most with these constants (measured). On the 20 standard
levels of the Levitus (1982) climatology the 80 m interface is poorly resolved, and the residual
grows to up to 5 Sv (rms about 1 Sv) for a 2000 dbar reference (measured): the vertical-resolution
error of a dynamic-method estimate from such a climatology, pessimistic because the real
thermocline is broader.

References
----------
Parsons, A. T. (1969). A two-layer model of Gulf Stream separation. J. Fluid Mech. 39, 511-528.
Veronis, G. (1973). Model of world ocean circulation: I. Wind-driven, two-layer. J. Mar. Res.
31, 228-288.
"""

from __future__ import annotations

import numpy as np
import xarray as xr

from . import constants
from .errors import InputError
from .geometry.coords import grid_layout
from .geometry.grid import SphericalGrid, cell_edges
from .ocean.hydrography import (
    LinearEquationOfState,
    _cell_overlap_integral,
    _check_sverdrup_result,
)

__all__ = [
    "make_hydrography",
    "SYNTHETIC_EOS",
    "EASTERN_THICKNESS",
    "MIN_THICKNESS",
    "INTERFACE_WIDTH",
    "LEVELS",
]

#: The linear equation of state the invented fields obey.
SYNTHETIC_EOS = LinearEquationOfState(rho0=constants.RHO0, alpha=2.0e-4, beta=7.6e-4, t0=10.0,
                                      s0=35.0)
#: Upper-layer and deep temperature (degC) and salinity.
T_UPPER, T_DEEP, S_UPPER, S_DEEP = 20.0, 5.0, 35.5, 34.9
#: Thickness of the upper layer at each eastern coast, m.
EASTERN_THICKNESS = 900.0
#: The thinnest upper layer, m; thinner would outcrop.
MIN_THICKNESS = 150.0
#: Width w of the logistic interface, m.
INTERFACE_WIDTH = 80.0
#: Depth levels, m: every 25 m to 2000 m, then every 500 m to 5000 m (a flat bottom).
LEVELS = np.concatenate([np.arange(0.0, 2000.0, 25.0), np.arange(2000.0, 5000.1, 500.0)])


def reduced_gravity() -> float:
    """g' of the invented layers, m s-2: g (alpha dT - beta dS)."""
    e = SYNTHETIC_EOS
    return e.gravity * (e.alpha * (T_UPPER - T_DEEP) - e.beta * (S_UPPER - S_DEEP))


def make_hydrography(sverdrup_result: xr.Dataset, taux: xr.DataArray, *,
                     ocean_mask: xr.DataArray | None = None, levels=LEVELS,
                     rho0: float | None = None,
                     omega: float = constants.OMEGA,
                     radius: float = constants.EARTH_RADIUS) -> xr.Dataset:
    r"""Temperature and salinity of a reduced-gravity thermocline in Sverdrup balance.

    Parameters
    ----------
    sverdrup_result : xarray.Dataset
        :func:`~sverdrup_kit.sverdrup_transport` of the winds (no leading dimensions).
    taux : xarray.DataArray (lat, lon)
        The eastward stress the Sverdrup transport was computed from, Pa.
    ocean_mask : xarray.DataArray (lat, lon), optional
        Ocean (True) on the grid of ``taux``; default: where ``taux`` is present.
    levels : array_like, optional
        Depths of the levels, m, increasing from 0; default :data:`LEVELS`. Coarser levels
        (e.g. the 20 standard levels of a climatology) show the vertical-resolution error of
        the dynamic method.
    rho0 : float, optional
        kg m-3; default the ``rho0`` attribute of ``sverdrup_result``.
    omega, radius : float, optional
        Rotation rate (rad s-1) and Earth radius (m).

    Returns
    -------
    xarray.Dataset
        On a 1 degree grid (lat 180, lon 360) and ``levels`` (default 87):
        ``temperature`` (degC) and ``salinity`` (1), missing on land; ``thermocline_depth``
        (lat, lon), m; ``outcrop`` (lat, lon), 1 where the layer was held at
        :data:`MIN_THICKNESS`. Use ``equation_of_state=SYNTHETIC_EOS`` with them.

    Notes
    -----
    See the module docstring. Rows whose Sverdrup row is left empty (equatorial band, no
    coast) keep :data:`EASTERN_THICKNESS` everywhere: no flow.
    """
    lay = _check_sverdrup_result(sverdrup_result, "sverdrup_result")
    levels = np.asarray(levels, dtype=np.float64)
    if levels.ndim != 1 or levels.size < 2 or levels[0] != 0 or np.any(np.diff(levels) <= 0):
        raise InputError(
            f"levels: expected increasing depths in m starting at 0, found {levels!r}. Fix: "
            "e.g. levels=[0, 10, 20, 30, 50, 75, 100, ...]."
        )
    tl = grid_layout(taux, argname="taux")
    if tl.lat.shape != lay.lat.shape or not np.allclose(tl.lat, lay.lat):
        raise InputError(
            "taux: expected the grid of sverdrup_result, found another grid. Fix: pass the "
            "stress the Sverdrup transport was computed from."
        )
    if rho0 is None:
        rho0 = float(sverdrup_result.attrs.get("rho0", constants.RHO0))
    sv_grid = SphericalGrid(lay.lat, lay.lon, lay.periodic, radius, omega)
    lat = np.arange(-89.5, 90.0, 1.0)
    lon = np.arange(0.5, 360.0, 1.0)

    def canon(da, names):
        a = np.asarray(da.transpose(*names).values, dtype=np.float64)
        return a[lay.lat_order][:, lay.lon_order]

    names = (lay.lat_name, lay.lon_name)
    v = canon(sverdrup_result["sverdrup_northward_transport"], names)
    tx = canon(taux, (tl.lat_name, tl.lon_name))
    if ocean_mask is not None:
        ocean_sv = canon(ocean_mask.astype(float), names) > 0.5
    else:
        ocean_sv = np.isfinite(tx)
    east = np.asarray(sverdrup_result["eastern_coast_lon"].transpose("basin", names[0]).values,
                      float)[:, lay.lat_order]
    west = np.asarray(sverdrup_result["western_coast_lon"].transpose("basin", names[0]).values,
                      float)[:, lay.lat_order]
    status = np.asarray(sverdrup_result["row_status"].transpose("basin", names[0]).values
                        )[:, lay.lat_order]

    # Each 1 degree cell takes the 2 degree (or any) cell that contains its centre.
    lat_edges = np.clip(cell_edges(lay.lat), -90, 90)
    row = np.clip(np.searchsorted(lat_edges, lat, side="right") - 1, 0, lay.lat.size - 1)
    rel = np.mod(lon[None, :] - sv_grid.lon_edges[0], 360.0)
    col = np.clip(np.searchsorted(sv_grid.lon_edges - sv_grid.lon_edges[0], rel[0],
                                  side="right") - 1, 0, lay.lon.size - 1)
    ocean = ocean_sv[row][:, col]

    g_prime = reduced_gravity()
    h2 = np.full((lat.size, lon.size), EASTERN_THICKNESS**2)
    lon_lo, lon_hi = sv_grid.lon_edges[:-1], sv_grid.lon_edges[1:]
    f = 2.0 * omega * np.sin(np.deg2rad(lat))
    m_per_deg = radius * np.cos(np.deg2rad(lat)) * np.pi / 180.0
    for j in range(lat.size):
        k = row[j]
        for b in range(east.shape[0]):
            if status[b, k] != 0 or not np.isfinite(east[b, k]):
                continue
            dist = np.mod(east[b, k] - lon, 360.0)
            span = (dist > 0) & (dist < np.mod(east[b, k] - west[b, k], 360.0))
            if not span.any():
                continue
            d = dist[span]
            # Missing values count as no flow, separately: on small islands the Sverdrup
            # transport is present and the stress is not.
            integral = (_cell_overlap_integral(v[k], lon_lo, lon_hi, east[b, k], d)
                        + _cell_overlap_integral(tx[k] / (rho0 * f[j]), lon_lo, lon_hi,
                                                 east[b, k], d)) * m_per_deg[j]
            h2[j, span] = EASTERN_THICKNESS**2 - 2.0 * f[j] / g_prime * integral
    outcrop = h2 < MIN_THICKNESS**2
    h = np.sqrt(np.maximum(h2, MIN_THICKNESS**2))

    z = levels[:, None, None]
    sigma = 1.0 / (1.0 + np.exp(-(h[None] - z) / INTERFACE_WIDTH))
    temp = T_DEEP + (T_UPPER - T_DEEP) * sigma
    salt = S_DEEP + (S_UPPER - S_DEEP) * sigma
    land = ~ocean[None]
    temp = np.where(land, np.nan, temp)
    salt = np.where(land, np.nan, salt)
    coords = {
        "depth": ("depth", levels, {"standard_name": "depth", "units": "m", "positive": "down",
                                    "axis": "Z"}),
        "lat": ("lat", lat, {"standard_name": "latitude", "units": "degrees_north"}),
        "lon": ("lon", lon, {"standard_name": "longitude", "units": "degrees_east"}),
    }
    dims = ("depth", "lat", "lon")
    return xr.Dataset(
        {
            "temperature": (dims, temp, {"long_name": "invented sea water temperature",
                                         "units": "degC"}),
            "salinity": (dims, salt, {"long_name": "invented sea water salinity",
                                      "units": "1"}),
            "thermocline_depth": (("lat", "lon"), np.where(ocean, h, np.nan), {
                "long_name": "depth of the interface between the layers", "units": "m"}),
            "outcrop": (("lat", "lon"), (outcrop & ocean).astype(np.int8), {
                "long_name": "upper layer held at its minimum thickness",
                "flag_values": np.array([0, 1], dtype=np.int8),
                "flag_meanings": "no yes"}),
        },
        coords=coords,
        attrs={
            "title": "invented temperature and salinity of a reduced-gravity thermocline in "
                     "Sverdrup balance with the given winds",
            "comment": "not real data; obeys sverdrup_kit.synthetic_ocean.SYNTHETIC_EOS",
            "reduced_gravity_m_s-2": g_prime,
            "eastern_thickness_m": EASTERN_THICKNESS,
            "interface_width_m": INTERFACE_WIDTH,
            "equation_of_state": repr(SYNTHETIC_EOS),
        },
    )
