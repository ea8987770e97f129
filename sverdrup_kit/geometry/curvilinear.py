"""Geometry of curvilinear ocean-model grids: rotated-pole, displaced-pole and tripolar.

:class:`CurvilinearGrid` is the curvilinear twin of
:class:`~sverdrup_kit.geometry.grid.SphericalGrid`: the one owner of everything that depends
only on the grid. Cells are quadrilaterals on the sphere given by their four corners; edge
lengths are great-circle arcs between corners and areas are those of the spherical
quadrilaterals, so nothing assumes that the grid lines follow latitude and longitude.

Corners come from the CF ``bounds`` of the coordinates when the file has them and are
otherwise placed half-way between the centres (the mean of the four surrounding centres on
the sphere, the outermost ones extrapolated by half a cell); the grid says which in
:attr:`CurvilinearGrid.corners_from`.

Neighbours: the first grid index is ``y`` (rows), the second ``x`` (columns). Columns wrap
round when the grid closes the circle; a tripolar (or any bipolar-cap) grid folds its last row
onto itself, column ``i`` meeting column ``nx - 1 - i`` (``north_fold=True``).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np
import xarray as xr

from .. import constants
from ..errors import GridError
from .grid import beta_parameter, coriolis_parameter

__all__ = ["CurvilinearGrid", "find_curvilinear_coords", "is_curvilinear"]

_LAT_NAMES = ("lat", "latitude", "nav_lat", "tlat", "ulat", "geolat", "lat_rho", "yt_ocean")
_LON_NAMES = ("lon", "longitude", "nav_lon", "tlong", "tlon", "ulong", "geolon", "lon_rho",
              "xt_ocean")


def _is_lat(var, name) -> bool:
    a = var.attrs
    if a.get("standard_name") == "latitude":
        return True
    if str(a.get("units", "")).lower() in ("degrees_north", "degree_north", "degrees_n"):
        return True
    return name.lower() in _LAT_NAMES


def _is_lon(var, name) -> bool:
    a = var.attrs
    if a.get("standard_name") == "longitude":
        return True
    if str(a.get("units", "")).lower() in ("degrees_east", "degree_east", "degrees_e"):
        return True
    return name.lower() in _LON_NAMES


def find_curvilinear_coords(obj, *, argname: str = "data") -> tuple[str, str] | None:
    """Names of two-dimensional latitude and longitude coordinates of ``obj``, or None.

    Looks at the CF ``coordinates`` attribute first, then at CF attributes (standard_name,
    units) and common model names (``nav_lat``, ``TLAT``, ``geolat``, ...) of 2-D coordinates.
    """
    cands = {}
    names = list(obj.coords)
    if isinstance(obj, xr.DataArray) and "coordinates" in obj.encoding:
        names = obj.encoding["coordinates"].split() + names
    if "coordinates" in obj.attrs:
        names = str(obj.attrs["coordinates"]).split() + names
    for name in names:
        if name not in obj.coords or obj[name].ndim != 2:
            continue
        var = obj[name]
        if "lat" not in cands and _is_lat(var, name):
            cands["lat"] = name
        elif "lon" not in cands and _is_lon(var, name):
            cands["lon"] = name
    if "lat" in cands and "lon" in cands:
        if obj[cands["lat"]].dims != obj[cands["lon"]].dims:
            raise GridError(
                f"{argname}: expected 2-D latitude and longitude on the same dimensions, found "
                f"'{cands['lat']}' on {obj[cands['lat']].dims} and '{cands['lon']}' on "
                f"{obj[cands['lon']].dims}. Fix: transpose one of them."
            )
        return cands["lat"], cands["lon"]
    return None


def is_curvilinear(obj) -> bool:
    """Whether ``obj`` lives on a grid with two-dimensional latitude and longitude."""
    return find_curvilinear_coords(obj) is not None


def _unit(lat, lon):
    """Unit vectors (..., 3) of points given in degrees."""
    p, q = np.deg2rad(lat), np.deg2rad(lon)
    return np.stack([np.cos(p) * np.cos(q), np.cos(p) * np.sin(q), np.sin(p)], axis=-1)


def _normalise(v):
    return v / np.linalg.norm(v, axis=-1, keepdims=True)


def _to_latlon(v):
    lat = np.rad2deg(np.arcsin(np.clip(v[..., 2], -1.0, 1.0)))
    lon = np.rad2deg(np.arctan2(v[..., 1], v[..., 0]))
    return lat, lon


def _triangle_area(a, b, c):
    """Solid angle of the spherical triangle abc (unit vectors), Van Oosterom & Strackee (1983)."""
    num = np.abs(np.einsum("...i,...i", a, np.cross(b, c)))
    den = 1.0 + np.einsum("...i,...i", a, b) + np.einsum("...i,...i", b, c) + np.einsum(
        "...i,...i", c, a)
    return 2.0 * np.arctan2(num, den)


def _segments_cross(xa, ya, xb, yb, x1, y1, x2, y2):
    """Whether segments (xa, ya)-(xb, yb) (arrays) properly cross segment (x1, y1)-(x2, y2),
    in the plane; a link that ends exactly on the line counts on one side only."""
    def side(px, py, qx, qy, rx, ry):
        return (qx - px) * (ry - py) - (qy - py) * (rx - px)

    box = ((np.minimum(xa, xb) <= max(x1, x2)) & (np.maximum(xa, xb) >= min(x1, x2))
           & (np.minimum(ya, yb) <= max(y1, y2)) & (np.maximum(ya, yb) >= min(y1, y2)))
    out = np.zeros(xa.shape, dtype=bool)
    if not box.any():
        return out
    a, b, c, d = xa[box], ya[box], xb[box], yb[box]
    d1 = side(x1, y1, x2, y2, a, b)
    d2 = side(x1, y1, x2, y2, c, d)
    d3 = side(a, b, c, d, x1, y1)
    d4 = side(a, b, c, d, x2, y2)
    out[box] = ((d1 > 0) != (d2 > 0)) & ((d3 > 0) != (d4 > 0))
    return out


def _corners_from_bounds(blat, blon):
    """(ny, nx, 4) CF vertices (anticlockwise from the south-west) -> (ny+1, nx+1) corners."""
    ny, nx = blat.shape[:2]
    clat = np.empty((ny + 1, nx + 1))
    clon = np.empty((ny + 1, nx + 1))
    clat[:-1, :-1], clon[:-1, :-1] = blat[..., 0], blon[..., 0]
    clat[:-1, -1], clon[:-1, -1] = blat[:, -1, 1], blon[:, -1, 1]
    clat[-1, :-1], clon[-1, :-1] = blat[-1, :, 3], blon[-1, :, 3]
    clat[-1, -1], clon[-1, -1] = blat[-1, -1, 2], blon[-1, -1, 2]
    return clat, clon


def _corners_from_centres(xyz, periodic):
    """Corners half-way between centres on the sphere (unit vectors (ny+1, nx+1, 3))."""
    ny, nx = xyz.shape[:2]
    # Ghost rows and columns by linear extrapolation on the sphere, then the mean of four.
    g = np.empty((ny + 2, nx + 2, 3))
    g[1:-1, 1:-1] = xyz
    if periodic:
        g[1:-1, 0], g[1:-1, -1] = xyz[:, -1], xyz[:, 0]
    else:
        g[1:-1, 0] = 2 * xyz[:, 0] - xyz[:, min(1, nx - 1)]
        g[1:-1, -1] = 2 * xyz[:, -1] - xyz[:, max(nx - 2, 0)]
    g[0] = 2 * g[1] - g[min(2, ny)]
    g[-1] = 2 * g[-2] - g[max(ny - 1, 1)]
    g = _normalise(g)
    c = 0.25 * (g[:-1, :-1] + g[1:, :-1] + g[:-1, 1:] + g[1:, 1:])
    return _normalise(c)


#: Grids built by :meth:`CurvilinearGrid.from_data`, by a hash of their coordinates: a loop over
#: the fields of one model reuses the geometry (areas, chords, plans) instead of rebuilding it.
_GRIDS: dict = {}
_GRID_CACHE_SIZE = 8


def _grid_key(*parts) -> tuple:
    import hashlib

    h = hashlib.sha1()
    for p in parts:
        if isinstance(p, np.ndarray):
            h.update(np.ascontiguousarray(p).view(np.uint8))
        else:
            h.update(repr(p).encode())
    return (h.hexdigest(),)


@dataclass(frozen=True, eq=False)
class CurvilinearGrid:
    """A curvilinear grid of quadrilateral cells on the sphere: the single owner of geometry.

    Parameters
    ----------
    lat, lon : ndarray, shape (ny, nx)
        Cell-centre latitudes and longitudes, degrees (any longitude convention).
    corner_lat, corner_lon : ndarray, shape (ny + 1, nx + 1), optional
        Cell corners, degrees; placed half-way between the centres when not given.
    periodic : bool, optional
        Whether the columns close the circle (the column east of the last is the first).
        Found from the corners when not given.
    north_fold : bool, optional
        Whether the last row folds onto itself (tripolar and bipolar-cap grids): the northern
        neighbour of cell ``(ny - 1, i)`` is ``(ny - 1, nx - 1 - i)``.
    radius, omega : float, optional
        Sphere radius (m) and rotation rate (rad s-1).
    dims : tuple of str, optional
        Names of the (row, column) dimensions.
    """

    lat: np.ndarray
    lon: np.ndarray
    corner_lat: np.ndarray | None = None
    corner_lon: np.ndarray | None = None
    periodic: bool | None = None
    north_fold: bool = False
    radius: float = constants.EARTH_RADIUS
    omega: float = constants.OMEGA
    dims: tuple = ("y", "x")

    def __post_init__(self):
        lat = np.asarray(self.lat, dtype=np.float64)
        lon = np.asarray(self.lon, dtype=np.float64)
        if lat.ndim != 2 or lat.shape != lon.shape:
            raise GridError(
                f"lat, lon: expected two 2-D arrays of one shape, found {lat.shape} and "
                f"{lon.shape}. Fix: pass the cell-centre coordinates of the model grid."
            )
        if not (np.all(np.isfinite(lat)) and np.all(np.isfinite(lon))):
            raise GridError(
                "lat, lon: expected finite coordinates at every cell, found missing values. "
                "Fix: fill the coordinates of land cells (model files usually have them)."
            )
        if np.any(np.abs(lat) > 90.0):
            raise GridError(
                f"lat: expected values within -90..90, found {np.abs(lat).max():g}. Fix: check "
                "that latitude and longitude are not swapped."
            )
        object.__setattr__(self, "lat", lat)
        object.__setattr__(self, "lon", lon)
        given = self.corner_lat is not None
        if given:
            clat = np.asarray(self.corner_lat, dtype=np.float64)
            clon = np.asarray(self.corner_lon, dtype=np.float64)
            if clat.shape != (lat.shape[0] + 1, lat.shape[1] + 1) or clon.shape != clat.shape:
                raise GridError(
                    f"corner_lat, corner_lon: expected shape {(lat.shape[0] + 1, lat.shape[1] + 1)}"
                    f", found {clat.shape} and {clon.shape}. Fix: pass (ny+1, nx+1) corners."
                )
            object.__setattr__(self, "corner_lat", clat)
            object.__setattr__(self, "corner_lon", clon)
        if self.periodic is None:
            object.__setattr__(self, "periodic", self._looks_periodic())
        object.__setattr__(self, "_given_corners", given)

    def _looks_periodic(self) -> bool:
        xyz = self.xyz
        step = np.linalg.norm(xyz[:, 1:] - xyz[:, :-1], axis=-1)
        wrap = np.linalg.norm(xyz[:, 0] - xyz[:, -1], axis=-1)
        return bool(np.all(wrap < 1.5 * np.median(step, axis=1)))

    # --- construction from data ------------------------------------------------------------

    @classmethod
    def from_data(cls, obj, *, argname: str = "data", radius=constants.EARTH_RADIUS,
                  omega=constants.OMEGA, north_fold: bool | None = None) -> "CurvilinearGrid":
        """The grid of an xarray object with 2-D latitude and longitude coordinates.

        Corners come from the coordinates' CF ``bounds`` variables when ``obj`` is a Dataset
        that holds them, or from ``lat_bounds``/``lon_bounds`` coordinates; otherwise from
        the centres. A north fold is assumed when the last row's mirror columns coincide.
        """
        names = find_curvilinear_coords(obj, argname=argname)
        if names is None:
            raise GridError(
                f"{argname}: expected two-dimensional latitude and longitude coordinates, found "
                f"coordinates {list(obj.coords)}. Fix: attach the model grid's 2-D coordinates, "
                "e.g. data.assign_coords(lat=(('y', 'x'), lat2d), lon=(('y', 'x'), lon2d))."
            )
        la, lo = names
        lat = np.asarray(obj[la].values, dtype=np.float64)
        lon = np.asarray(obj[lo].values, dtype=np.float64)
        clat = clon = None
        bl, bo = obj[la].attrs.get("bounds"), obj[lo].attrs.get("bounds")
        pool = obj.coords if isinstance(obj, xr.DataArray) else obj.variables
        for cand_l, cand_o in ((bl, bo), ("lat_bounds", "lon_bounds"), ("lat_bnds", "lon_bnds")):
            if cand_l in pool and cand_o in pool:
                vl, vo = np.asarray(pool[cand_l]), np.asarray(pool[cand_o])
                if vl.shape == lat.shape + (4,) and vo.shape == vl.shape:
                    clat, clon = _corners_from_bounds(vl, vo)
                    break
        key = _grid_key(lat, lon, clat, clon, north_fold, radius, omega, tuple(obj[la].dims))
        if key in _GRIDS:
            return _GRIDS[key]
        grid = cls(lat, lon, clat, clon, None, bool(north_fold), radius, omega,
                   tuple(obj[la].dims))
        if north_fold is None and grid._mirror_matches():
            grid = cls(lat, lon, clat, clon, grid.periodic, True, radius, omega,
                       tuple(obj[la].dims))
        if len(_GRIDS) >= _GRID_CACHE_SIZE:
            _GRIDS.pop(next(iter(_GRIDS)))
        _GRIDS[key] = grid
        return grid

    def _mirror_matches(self) -> bool:
        top = self.corners_xyz[-1]
        if self.periodic and np.allclose(top, top[::-1], atol=1e-6):
            return True
        if not self.periodic or self._given_corners or self.shape[0] < 2:
            return False
        # Without bounds: a folded last row faces its mirror image across the fold, one row
        # spacing away, as it faces the row below.
        last = self.xyz[-1]
        across = np.linalg.norm(last - last[::-1], axis=-1)
        below = np.linalg.norm(last - self.xyz[-2], axis=-1)
        return bool(np.all(across < 1.5 * np.median(below)))

    # --- geometry ---------------------------------------------------------------------------

    @property
    def shape(self) -> tuple[int, int]:
        return self.lat.shape

    @property
    def corners_from(self) -> str:
        """``"bounds"`` when the corners were given, ``"centres"`` when they were placed."""
        return "bounds" if self._given_corners else "centres"

    @cached_property
    def xyz(self) -> np.ndarray:
        """Unit vectors of the cell centres, (ny, nx, 3)."""
        return _unit(self.lat, self.lon)

    @cached_property
    def corners_xyz(self) -> np.ndarray:
        """Unit vectors of the cell corners, (ny + 1, nx + 1, 3)."""
        if self._given_corners:
            return _unit(self.corner_lat, self.corner_lon)
        return _corners_from_centres(self.xyz, self.periodic)

    @cached_property
    def corners_latlon(self) -> tuple[np.ndarray, np.ndarray]:
        """Corner latitudes and longitudes in degrees, (ny + 1, nx + 1) each."""
        return _to_latlon(self.corners_xyz)

    @cached_property
    def east(self) -> np.ndarray:
        """Local eastward unit vectors at the centres, (ny, nx, 3)."""
        q = np.deg2rad(self.lon)
        return np.stack([-np.sin(q), np.cos(q), np.zeros_like(q)], axis=-1)

    @cached_property
    def north(self) -> np.ndarray:
        """Local northward unit vectors at the centres, (ny, nx, 3)."""
        return np.cross(self.xyz, self.east)

    @cached_property
    def angle(self) -> np.ndarray:
        """Angle (radians, anticlockwise) from east to the grid's x direction at the centres.

        Computed from the coordinates: the direction from the western to the eastern face
        centre of each cell.
        """
        c = self.corners_xyz
        west = c[:-1, :-1] + c[1:, :-1]
        east = c[:-1, 1:] + c[1:, 1:]
        d = east - west
        return np.arctan2(np.einsum("...i,...i", d, self.north),
                          np.einsum("...i,...i", d, self.east))

    @cached_property
    def cell_area(self) -> np.ndarray:
        """Areas of the spherical quadrilaterals in m2, (ny, nx)."""
        c = self.corners_xyz
        sw, se, ne, nw = c[:-1, :-1], c[:-1, 1:], c[1:, 1:], c[1:, :-1]
        return self.radius**2 * (_triangle_area(sw, se, ne) + _triangle_area(sw, ne, nw))

    @cached_property
    def orientation(self) -> float:
        """+1 when x, y, up form a right-handed frame (rows run northward), else -1."""
        c = self.corners_xyz
        d1 = c[:-1, 1:] - c[:-1, :-1]
        d2 = c[1:, :-1] - c[:-1, :-1]
        s = np.einsum("...i,...i", np.cross(d1, d2), self.xyz)
        return 1.0 if np.nanmedian(s) > 0 else -1.0

    @cached_property
    def stokes_geometry(self) -> dict:
        """Edge chords and interpolation weights for the Stokes curl, once per grid."""
        from .._compiled.stokes import stokes_geometry

        return stokes_geometry(self.east, self.north, self.corners_xyz, self.neighbour)

    @cached_property
    def f(self) -> np.ndarray:
        """Coriolis parameter at the centres, s-1, (ny, nx)."""
        return coriolis_parameter(self.lat, omega=self.omega)

    @cached_property
    def beta(self) -> np.ndarray:
        """df/dy at the centres, m-1 s-1, (ny, nx)."""
        return beta_parameter(self.lat, omega=self.omega, radius=self.radius)

    @cached_property
    def nominal_spacing(self) -> float:
        """Median distance between neighbouring rows, in degrees of arc (the nominal
        latitude spacing of the grid: ``dlat`` on a regular grid)."""
        xyz = self.xyz
        d = np.linalg.norm(xyz[1:] - xyz[:-1], axis=-1)
        return float(np.rad2deg(2 * np.arcsin(np.median(d) / 2)))

    # --- neighbours -------------------------------------------------------------------------

    def neighbour(self, a: np.ndarray, side: str) -> np.ndarray:
        """Values of ``a`` (..., ny, nx) at each cell's neighbour on ``side`` (E, W, N, S).

        NaN beyond the grid; columns wrap when periodic, the last row folds when
        ``north_fold``.
        """
        a = np.asarray(a, dtype=np.float64)
        out = np.full_like(a, np.nan)
        if side == "E":
            out[..., :-1] = a[..., 1:]
            if self.periodic:
                out[..., -1] = a[..., 0]
        elif side == "W":
            out[..., 1:] = a[..., :-1]
            if self.periodic:
                out[..., 0] = a[..., -1]
        elif side == "N":
            out[..., :-1, :] = a[..., 1:, :]
            if self.north_fold:
                out[..., -1, :] = a[..., -1, ::-1]
        elif side == "S":
            out[..., 1:, :] = a[..., :-1, :]
        else:
            raise ValueError(f"side: expected one of 'E', 'W', 'N', 'S', found {side!r}.")
        return out

    def components(self, mask, *, cut=None, diagonal=False):
        """Connected components of the True cells of ``mask`` (ny, nx) through the grid's own
        neighbours (faces, the periodic seam and the north fold).

        ``cut``: dict side (``"E"``, ``"N"``) -> (ny, nx) bool, links removed between a cell
        and its neighbour on that side (:meth:`link_cuts`). ``diagonal``: also join cells that
        share only a corner (the north-eastern and north-western neighbours). Returns labels
        (0..n-1 on True cells, -1 elsewhere) and n.
        """
        from scipy.sparse import coo_matrix
        from scipy.sparse.csgraph import connected_components

        mask = np.asarray(mask, dtype=bool)
        n = mask.size
        index = np.arange(n, dtype=np.float64).reshape(mask.shape)
        wet = np.where(mask, index, np.nan)
        cut = cut or {}
        steps = [(("E",), cut.get("E")), (("N",), cut.get("N"))]
        if diagonal:
            steps += [(("N", "E"), None), (("N", "W"), None)]
        src, dst = [], []
        for sides, removed in steps:
            other = wet
            for side in sides:
                other = self.neighbour(other, side)
            link = mask & np.isfinite(other)
            if removed is not None:
                link &= ~removed
            src.append(index[link].astype(np.int64))
            dst.append(other[link].astype(np.int64))
        src, dst = np.concatenate(src), np.concatenate(dst)
        graph = coo_matrix((np.ones(src.size, dtype=np.int8), (src, dst)), shape=(n, n))
        _, comp = connected_components(graph, directed=False)
        uniq, inv = np.unique(comp[mask.ravel()], return_inverse=True)
        labels = np.full(n, -1, dtype=np.int64)
        labels[mask.ravel()] = inv
        return labels.reshape(mask.shape), int(uniq.size)

    def link_cuts(self, lines) -> dict:
        """Links between neighbouring cell centres that cross any of ``lines``.

        ``lines``: iterable of (lon, lat) vertex lists in degrees (longitudes may run past
        360). Returns ``{"E": cut_e, "N": cut_n}``, (ny, nx) bool each: True where the link
        from a cell to its eastern (northern) neighbour crosses a line. Links and lines are
        taken as straight segments in longitude and latitude, as on regular grids.
        """
        lat, lon = self.lat, self.lon
        out = {}
        for side in ("E", "N"):
            lat2 = self.neighbour(lat, side)
            lon2 = self.neighbour(lon, side)
            ok = np.isfinite(lat2)
            ya, xa = lat[ok], np.mod(lon[ok], 360.0)
            yb = lat2[ok]
            xb = xa + (np.mod(lon2[ok] - lon[ok] + 180.0, 360.0) - 180.0)
            hit = np.zeros(ya.size, dtype=bool)
            for verts in lines:
                v = np.asarray(verts, dtype=np.float64)
                for (x1, y1), (x2, y2) in zip(v[:-1], v[1:]):
                    for shift in (-720.0, -360.0, 0.0, 360.0):
                        hit |= _segments_cross(xa, ya, xb, yb, x1 + shift, y1, x2 + shift, y2)
            cut = np.zeros(self.shape, dtype=bool)
            cut[ok] = hit
            out[side] = cut
        return out

    @cached_property
    def boundary_cells(self) -> np.ndarray:
        """(ny, nx) bool: cells on an open edge of the grid (the first row, the last row
        unless folded, the first and last columns unless periodic)."""
        edge = np.zeros(self.shape, dtype=bool)
        edge[0] = True
        if not self.north_fold:
            edge[-1] = True
        if not self.periodic:
            edge[:, 0] = edge[:, -1] = True
        return edge

    @cached_property
    def _tree(self):
        from scipy.spatial import cKDTree

        return cKDTree(self.xyz.reshape(-1, 3))

    def cell_of_point(self, lon0: float, lat0: float):
        """(j, i) of the cell whose centre lies nearest to (lon0, lat0), or None when the
        point lies farther than two nominal cell sizes from every centre (off the grid)."""
        d, k = self._tree.query(_unit(lat0, lon0))
        if d > 2.0 * np.deg2rad(self.nominal_spacing):
            return None
        return tuple(int(x) for x in np.unravel_index(int(k), self.shape))

    @cached_property
    def lon_extent(self) -> np.ndarray:
        """Longitude extent of each cell, degrees east (ny, nx): the spread of its corners'
        longitudes round its centre's."""
        _, clon = self.corners_latlon
        corners = np.stack([clon[:-1, :-1], clon[:-1, 1:], clon[1:, 1:], clon[1:, :-1]])
        rel = np.mod(corners - self.lon[None] + 180.0, 360.0) - 180.0
        return rel.max(axis=0) - rel.min(axis=0)

    def __repr__(self) -> str:
        return (f"CurvilinearGrid({self.shape[0]} x {self.shape[1]}, periodic={self.periodic}, "
                f"north_fold={self.north_fold}, corners from {self.corners_from})")
