"""Differential operators on the sphere, coast-aware: the wind-stress curl."""

from __future__ import annotations

import xarray as xr

from .. import _validate, constants
from .._apply import apply_grid_kernel
from .._compiled.dispatch import curl_kernel
from ..geometry.coords import check_same_grid, from_canonical, require_dataarray, to_canonical
from ..geometry.curvilinear import is_curvilinear
from ..geometry.grid import SphericalGrid

__all__ = ["wind_stress_curl", "curl_on_sphere"]


def curl_on_sphere(u, v, *, grid: SphericalGrid | None = None, names=("u", "v")) -> xr.DataArray:
    """Vertical component of the curl of any horizontal vector field (u, v) on the sphere.

    The engine behind :func:`wind_stress_curl` and the Ekman pumping; no unit handling, the
    result is in units of ``u`` per metre. ``grid`` may be passed to reuse geometry.
    """
    u = require_dataarray(u, names[0])
    v = require_dataarray(v, names[1])
    check_same_grid(u, v, names)
    grid = SphericalGrid.from_data(u, argname=names[0]) if grid is None else grid
    lay = grid.layout
    cu, cv = to_canonical(u, lay), to_canonical(v, lay)
    out = apply_grid_kernel(
        curl_kernel,
        cu,
        cv,
        dims=(lay.lat_name, lay.lon_name),
        kwargs=dict(phi=grid.phi, lam=grid.lam, periodic=grid.periodic, radius=grid.radius),
    )
    return from_canonical(out, lay, u)


def wind_stress_curl(taux, tauy, *, radius: float = constants.EARTH_RADIUS) -> xr.DataArray:
    r"""Wind-stress curl on the sphere, N m-3, second-order accurate and coast-aware.

    Parameters
    ----------
    taux, tauy : xarray.DataArray (..., lat, lon)
        Eastward and northward surface stress on the same latitude-longitude grid, in Pa
        (N m-2 and dyn cm-2 are converted; no units attribute is read as Pa). Any latitude order
        and longitude convention; missing values are land. Leading dimensions pass through.
    radius : float, optional
        Earth radius in m.

    Returns
    -------
    xarray.DataArray
        ``wind_stress_curl`` in N m-3 on the input grid and in the input order, float64,
        missing on land and at the poles.

    Notes
    -----
    .. math:: \operatorname{curl}\boldsymbol\tau = \frac{1}{R\cos\phi}\left(
       \frac{\partial\tau_y}{\partial\lambda} - \frac{\partial(\tau_x\cos\phi)}{\partial\phi}\right)

    Derivatives are centred three-point differences on the (possibly non-uniform, e.g. Gaussian)
    grid; next to land or at the edge of a regional grid they are one-sided and still
    second-order where two ocean cells are available, first-order where only one is, so every
    ocean cell next to a coast gets a value. Along an axis with no ocean neighbour on either side
    (a one-cell channel) that derivative is taken as zero. Longitude is periodic when the grid
    closes the circle (see :class:`~sverdrup_kit.geometry.grid.SphericalGrid`).

    References
    ----------
    Gill, A. E. (1982). Atmosphere-Ocean Dynamics, Academic Press, appendix on spherical
    coordinates.
    """
    taux = require_dataarray(taux, "taux")
    if is_curvilinear(taux):
        from .model_grid import model_grid_curl

        return model_grid_curl(taux, require_dataarray(tauy, "tauy"), radius=radius)
    tauy = require_dataarray(tauy, "tauy")
    check_same_grid(taux, tauy, ("taux", "tauy"))
    grid = SphericalGrid.from_data(taux, argname="taux", radius=radius)
    radius = _validate.number(radius, "radius", units="m", example=constants.EARTH_RADIUS)
    tx = _validate.field(taux, "taux", "stress", default_units="Pa")
    ty = _validate.field(tauy, "tauy", "stress", default_units="Pa")
    curl = curl_on_sphere(tx, ty, grid=grid, names=("taux", "tauy"))
    return curl.rename("wind_stress_curl").assign_attrs(
        long_name="wind stress curl",
        units="N m-3",
        comment=(
            "vertical component of curl of surface stress on the sphere; centred differences, "
            "one-sided next to land; missing on land"
        ),
    )
