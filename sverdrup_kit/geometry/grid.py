"""Geometry of a latitude-longitude grid on the sphere.

One object, :class:`SphericalGrid`, owns everything that depends only on the grid: cell centres
and edges, widths in metres, the Coriolis parameter and its meridional gradient, and whether the
longitudes close the circle. Operators ask it and never recompute geometry themselves, so the
work is done once per grid, not once per time step.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property

import numpy as np
import xarray as xr

from .. import constants
from .coords import GridLayout, grid_layout

__all__ = ["SphericalGrid", "coriolis_parameter", "beta_parameter"]


def coriolis_parameter(lat, *, omega: float = constants.OMEGA):
    r"""Coriolis parameter :math:`f = 2\Omega\sin\phi` in s-1.

    Parameters
    ----------
    lat : array_like or xarray.DataArray
        Latitude in degrees_north.
    omega : float, optional
        Rotation rate in rad s-1 (default: sidereal, Groten 2004).

    Returns
    -------
    same type as ``lat``
        f in s-1; an xarray input gives a DataArray with CF attributes.
    """
    f = 2.0 * omega * np.sin(np.deg2rad(lat))
    if isinstance(f, xr.DataArray):
        f = f.rename("f").assign_attrs(
            standard_name="coriolis_parameter", long_name="Coriolis parameter", units="s-1"
        )
    return f


def beta_parameter(lat, *, omega: float = constants.OMEGA, radius: float = constants.EARTH_RADIUS):
    r"""Meridional gradient of the Coriolis parameter :math:`\beta = 2\Omega\cos\phi / R`, m-1 s-1.

    Parameters
    ----------
    lat : array_like or xarray.DataArray
        Latitude in degrees_north.
    omega, radius : float, optional
        Rotation rate (rad s-1) and Earth radius (m).
    """
    b = 2.0 * omega * np.cos(np.deg2rad(lat)) / radius
    if isinstance(b, xr.DataArray):
        b = b.rename("beta").assign_attrs(
            long_name="meridional gradient of the Coriolis parameter", units="m-1 s-1"
        )
    return b


def cell_edges(centres: np.ndarray) -> np.ndarray:
    """Cell edges half-way between centres, with end cells as wide as their neighbours."""
    mid = 0.5 * (centres[1:] + centres[:-1])
    first = centres[0] - (mid[0] - centres[0])
    last = centres[-1] + (centres[-1] - mid[-1])
    return np.concatenate([[first], mid, [last]])


@dataclass(frozen=True, eq=False)
class SphericalGrid:
    """A latitude-longitude grid on a sphere: the single owner of geometry.

    Parameters
    ----------
    lat : ndarray, shape (ny,)
        Strictly ascending cell-centre latitudes, degrees_north.
    lon : ndarray, shape (nx,)
        Strictly increasing cell-centre longitudes, degrees_east (any convention).
    periodic : bool
        True when the longitudes close the circle (the cell east of the last is the first).
    radius, omega : float
        Sphere radius (m) and rotation rate (rad s-1).

    Notes
    -----
    Cell edges lie half-way between centres; latitude edges are clipped to +-90. Widths are
    those of the cells on the sphere: ``dx = R cos(phi) dlambda`` and ``dy = R dphi``.
    """

    lat: np.ndarray
    lon: np.ndarray
    periodic: bool
    radius: float = constants.EARTH_RADIUS
    omega: float = constants.OMEGA
    layout: GridLayout | None = field(default=None, repr=False)

    @classmethod
    def from_data(
        cls,
        obj: xr.DataArray | xr.Dataset,
        *,
        argname: str = "data",
        radius: float = constants.EARTH_RADIUS,
        omega: float = constants.OMEGA,
    ) -> "SphericalGrid":
        """Build the grid of an xarray object (any latitude order, any longitude convention)."""
        layout = grid_layout(obj, argname=argname)
        return cls(layout.lat, layout.lon, layout.periodic, radius, omega, layout)

    @classmethod
    def regular(cls, dlat: float, dlon: float | None = None, **kw) -> "SphericalGrid":
        """A global grid with cells of ``dlat`` by ``dlon`` degrees, centres off the poles."""
        dlon = dlat if dlon is None else dlon
        lat = np.arange(-90 + dlat / 2, 90, dlat)
        lon = np.arange(dlon / 2, 360, dlon)
        return cls(lat, lon, True, **kw)

    @property
    def shape(self) -> tuple[int, int]:
        return (self.lat.size, self.lon.size)

    @cached_property
    def phi(self) -> np.ndarray:
        """Latitude in radians, shape (ny,)."""
        return np.deg2rad(self.lat)

    @cached_property
    def lam(self) -> np.ndarray:
        """Longitude in radians, shape (nx,)."""
        return np.deg2rad(self.lon)

    @cached_property
    def lat_edges(self) -> np.ndarray:
        return np.clip(cell_edges(self.lat), -90.0, 90.0)

    @cached_property
    def lon_edges(self) -> np.ndarray:
        if self.periodic:
            d = (self.lon[-1] - self.lon[0]) / (self.lon.size - 1)
            return np.concatenate([self.lon - d / 2, [self.lon[-1] + d / 2]])
        return cell_edges(self.lon)

    @cached_property
    def coslat(self) -> np.ndarray:
        return np.cos(self.phi)

    @cached_property
    def f(self) -> np.ndarray:
        """Coriolis parameter at cell centres, s-1, shape (ny,)."""
        return coriolis_parameter(self.lat, omega=self.omega)

    @cached_property
    def beta(self) -> np.ndarray:
        """df/dy at cell centres, m-1 s-1, shape (ny,)."""
        return beta_parameter(self.lat, omega=self.omega, radius=self.radius)

    @cached_property
    def dlon_rad(self) -> np.ndarray:
        """Zonal cell widths in radians, shape (nx,)."""
        return np.deg2rad(np.diff(self.lon_edges))

    @cached_property
    def dx(self) -> np.ndarray:
        """Zonal cell widths in metres at cell-centre latitude, shape (ny, nx)."""
        return self.radius * self.coslat[:, None] * self.dlon_rad[None, :]

    @cached_property
    def dy(self) -> np.ndarray:
        """Meridional cell heights in metres, shape (ny,)."""
        return self.radius * np.deg2rad(np.diff(self.lat_edges))

    @cached_property
    def cell_area(self) -> np.ndarray:
        """Exact spherical cell areas in m2, shape (ny, nx)."""
        band = np.diff(np.sin(np.deg2rad(self.lat_edges)))
        return self.radius**2 * band[:, None] * self.dlon_rad[None, :]

    def cell_of_point(self, lon0: float, lat0: float):
        """(j, i) of the cell whose centre lies nearest to (lon0, lat0), or None off the grid."""
        from .earth import cell_of_point

        return cell_of_point(self.lat, self.lon, lon0, lat0)

    def equatorial_mask(self, half_width: float) -> np.ndarray:
        """Boolean (ny,) mask of rows within ``half_width`` degrees of the equator."""
        return np.abs(self.lat) < half_width

    def __repr__(self) -> str:
        return (
            f"SphericalGrid({self.lat.size} lat {self.lat[0]:g}..{self.lat[-1]:g}, "
            f"{self.lon.size} lon {self.lon[0]:g}..{self.lon[-1]:g}, periodic={self.periodic})"
        )
