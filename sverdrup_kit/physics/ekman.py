"""Ekman transport and Ekman pumping from surface wind stress on the sphere."""

from __future__ import annotations

import numpy as np
import xarray as xr

from .. import _validate, constants
from ..geometry.coords import check_same_grid, require_dataarray
from ..geometry.curvilinear import is_curvilinear
from ..geometry.grid import SphericalGrid
from .operators import curl_on_sphere

__all__ = ["ekman", "DEFAULT_EQUATORIAL_HALF_WIDTH"]

#: Half-width in degrees of the band around the equator left empty (common practice: 2 to 5
#: degrees). The Ekman transport goes as 1/f there; the Sverdrup V = curl/(rho0 beta) stays
#: finite, but its split into Ekman and geostrophic parts does not, and equatorial dynamics
#: (undercurrents, nonlinearity, friction) break the balance.
DEFAULT_EQUATORIAL_HALF_WIDTH = 3.0


def _band_reason(band: float) -> str:
    return (
        f"missing within {band:g} degrees of the equator, where the Ekman transport, which "
        "goes as 1/f, has no meaning and equatorial dynamics (undercurrents, nonlinearity, "
        "friction) take over"
    )


def _bare(da: xr.DataArray) -> xr.DataArray:
    """``da`` without the attributes it inherited from the stress (its drag law, cell_methods)."""
    out = da.copy(deep=False)
    out.attrs = {}
    return out


def ekman(
    taux,
    tauy,
    *,
    rho0: float = constants.RHO0,
    equatorial_half_width: float = DEFAULT_EQUATORIAL_HALF_WIDTH,
    radius: float = constants.EARTH_RADIUS,
    omega: float = constants.OMEGA,
) -> xr.Dataset:
    r"""Ekman volume transport and Ekman pumping velocity.

    Parameters
    ----------
    taux, tauy : xarray.DataArray (..., lat, lon)
        Eastward and northward surface stress in Pa (N m-2 and dyn cm-2 are converted), on the
        same grid, missing on land. Leading dimensions pass through.
    rho0 : float, optional
        Reference sea-water density, kg m-3.
    equatorial_half_width : float, optional
        Half-width in degrees of the band around the equator that is left missing (>= 0, the
        rule of :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport` too). A row on the
        equator itself is always missing: there f = 0 and the Ekman transport is undefined.
    radius, omega : float, optional
        Earth radius (m) and rotation rate (rad s-1).

    Returns
    -------
    xarray.Dataset
        ``ekman_eastward_transport``, ``ekman_northward_transport`` (m2 s-1, volume transport
        per unit width) and ``ekman_pumping`` (m s-1, positive upward), float64, missing on land
        and within the equatorial band.

    Notes
    -----
    .. math::
        U_E = \frac{\tau_y}{\rho_0 f}, \qquad V_E = -\frac{\tau_x}{\rho_0 f}, \qquad
        w_E = \hat k\cdot\nabla\times\left(\frac{\boldsymbol\tau}{\rho_0 f}\right)
            = \frac{\operatorname{curl}\boldsymbol\tau}{\rho_0 f}
              + \frac{\beta\,\tau_x}{\rho_0 f^2}

    The pumping is computed as the curl of :math:`\boldsymbol\tau/(\rho_0 f)` with the same
    coast-aware differences as :func:`~sverdrup_kit.physics.operators.wind_stress_curl`, which keeps
    the beta term. Positive values are upwelling out of the Ekman layer.

    References
    ----------
    Ekman, V. W. (1905). On the influence of the earth's rotation on ocean-currents. Ark. Mat.
    Astron. Fys. 2(11), 1-52.
    Gill, A. E. (1982). Atmosphere-Ocean Dynamics. Academic Press, section 9.2.
    """
    taux = require_dataarray(taux, "taux")
    if is_curvilinear(taux):
        from .model_grid import model_grid_ekman

        return model_grid_ekman(taux, require_dataarray(tauy, "tauy"), rho0=rho0,
                                equatorial_half_width=equatorial_half_width, radius=radius)
    tauy = require_dataarray(tauy, "tauy")
    check_same_grid(taux, tauy, ("taux", "tauy"))
    equatorial_half_width = _validate.number(
        equatorial_half_width, "equatorial_half_width", sign="non-negative", units="degrees",
        example=3.0)
    rho0 = _validate.number(rho0, "rho0", units="kg m-3", example=1025.0)
    radius = _validate.number(radius, "radius", units="m", example=constants.EARTH_RADIUS)
    omega = _validate.number(omega, "omega", units="rad s-1", example=constants.OMEGA)
    grid = SphericalGrid.from_data(taux, argname="taux", radius=radius, omega=omega)
    lay = grid.layout
    tx = _validate.field(taux, "taux", "stress", default_units="Pa")
    ty = _validate.field(tauy, "tauy", "stress", default_units="Pa")

    # A bare copy of the latitudes: the coordinate's attributes (axis, units) must not reach
    # the transports through the arithmetic.
    lat = xr.DataArray(taux[lay.lat_name].values.astype(np.float64), dims=(lay.lat_name,),
                       coords={lay.lat_name: taux[lay.lat_name]})
    # f = 0 on an equator row even with no band: the Ekman transport is undefined there.
    f = (2.0 * omega * np.sin(np.deg2rad(lat))).where(
        (np.abs(lat) >= equatorial_half_width) & (lat != 0))
    ue = _bare(ty / (rho0 * f))
    ve = _bare(-tx / (rho0 * f))
    pump = curl_on_sphere(tx / (rho0 * f), ty / (rho0 * f), grid=grid, names=("taux", "tauy"))
    reason = _band_reason(equatorial_half_width)
    common = dict(rho0=rho0, equatorial_half_width=equatorial_half_width, comment=reason)
    out = xr.Dataset(
        {
            "ekman_eastward_transport": ue.assign_attrs(
                long_name="eastward Ekman volume transport per unit width",
                units="m2 s-1",
                **common,
            ),
            "ekman_northward_transport": ve.assign_attrs(
                long_name="northward Ekman volume transport per unit width",
                units="m2 s-1",
                **common,
            ),
            "ekman_pumping": pump.assign_attrs(
                long_name="Ekman pumping velocity (positive upward)",
                units="m s-1",
                **common,
            ),
        }
    )
    return out.assign_attrs(
        title="Ekman transport and pumping",
        equatorial_half_width=equatorial_half_width,
        rho0=rho0,
    )
