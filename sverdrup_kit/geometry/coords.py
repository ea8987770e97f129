"""Finding and normalising latitude/longitude coordinates.

Every public function goes through :func:`on_canonical_grid` (or its parts) so that results do not
depend on latitude order or longitude convention: fields are put on ascending latitude and
monotonic longitude, computed there, and put back in the caller's order.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import xarray as xr

from ..errors import GridError

# Tables of criteria, kept apart from the logic (unit spellings seen in real files).
LAT_UNITS = {"degrees_north", "degree_north", "degree_n", "degrees_n", "degreen", "degreesn"}
LON_UNITS = {"degrees_east", "degree_east", "degree_e", "degrees_e", "degreee", "degreese"}
LAT_NAMES = {"lat", "latitude", "lats", "nav_lat", "yt", "y", "xlat", "g0_lat_0", "ylat"}
LON_NAMES = {"lon", "longitude", "lons", "long", "nav_lon", "xt", "x", "xlon", "g0_lon_1", "xlong"}



def _norm(s) -> str:
    return str(s).strip().lower().replace(" ", "")


def _score(var: xr.DataArray, name, kind: str) -> int:
    """How strongly a coordinate variable looks like latitude (kind='lat') or longitude."""
    units = LAT_UNITS if kind == "lat" else LON_UNITS
    names = LAT_NAMES if kind == "lat" else LON_NAMES
    std = "latitude" if kind == "lat" else "longitude"
    axis = "Y" if kind == "lat" else "X"
    a = var.attrs
    if _norm(a.get("standard_name", "")) in {std, f"grid_{std}"}:
        return 3
    if _norm(a.get("units", "")) in units:
        return 3
    if str(a.get("axis", "")).upper() == axis:
        return 2
    n = _norm(name)
    if n in names:
        return 1
    # Files written by older analysis packages name axes like "COADSY" or "FNOCX" and give
    # only units; a trailing Y/X with a degree unit is caught above, a bare name here.
    if kind == "lat" and n.startswith("lat"):
        return 1
    if kind == "lon" and (n.startswith("lon") and not n.startswith("long_name")):
        return 1
    return 0


def find_latlon(obj: xr.DataArray | xr.Dataset, *, argname: str = "data") -> tuple[str, str]:
    """Return the names of the latitude and longitude coordinates of ``obj``.

    Looks at CF attributes (standard_name, units, axis) first and common names second. Raises a
    :class:`GridError` naming ``argname`` when none or more than one candidate is found, or when
    the coordinates are two-dimensional (model grids go through
    :mod:`sverdrup_kit.physics.model_grid` instead).
    """
    found = {}
    for kind in ("lat", "lon"):
        scored = [(name, _score(obj[name], name, kind)) for name in obj.coords]
        best = max((s for _, s in scored), default=0)
        if best == 0:
            other = "degrees_north" if kind == "lat" else "degrees_east"
            raise GridError(
                f"{argname}: expected a {'latitude' if kind == 'lat' else 'longitude'} coordinate, "
                f"found none among coordinates {list(obj.coords)}. Fix: give it units='{other}' "
                f"or name it '{kind}', e.g. data.rename({{'y': '{kind}'}})."
            )
        cands = [name for name, s in scored if s == best]
        one_d = [c for c in cands if obj[c].ndim == 1 and obj[c].dims[0] == c]
        if len(cands) > 1 and len(one_d) == 1:
            cands = one_d
        if len(cands) > 1:
            raise GridError(
                f"{argname}: expected one {'latitude' if kind == 'lat' else 'longitude'} "
                f"coordinate, found several that qualify equally: {cands}. Fix: drop the ones "
                f"you do not mean, e.g. data.drop_vars({cands[1:]!r})."
            )
        name = cands[0]
        if obj[name].ndim != 1:
            raise GridError(
                f"{argname}: expected one-dimensional {kind} coordinates, found '{name}' with "
                f"dimensions {obj[name].dims}. Model grids with 2-D latitude and longitude are "
                f"handled by open_winds, open_stress, wind_stress_curl, ekman, "
                f"sverdrup_transport and model_circulation, not by this function. Fix: use one "
                f"of those, or regrid to a regular latitude-longitude grid first."
            )
        if obj[name].dims[0] != name:
            raise GridError(
                f"{argname}: {kind} coordinate '{name}' lies along dimension "
                f"'{obj[name].dims[0]}'. Fix: make it a dimension coordinate, e.g. "
                f"data.swap_dims({{'{obj[name].dims[0]}': '{name}'}})."
            )
        found[kind] = name
    if found["lat"] == found["lon"]:
        raise GridError(
            f"{argname}: the same coordinate '{found['lat']}' looks like both latitude and "
            "longitude. Fix: give each coordinate CF units (degrees_north, degrees_east)."
        )
    return found["lat"], found["lon"]


@dataclass(frozen=True)
class GridLayout:
    """How a field's grid maps onto the canonical one (ascending lat, increasing lon).

    ``lat_order``/``lon_order`` are the positions to take from the original, ``lon`` the
    canonical (unwrapped, strictly increasing) longitudes in degrees, ``periodic`` whether the
    longitudes close the circle.
    """

    lat_name: str
    lon_name: str
    lat: np.ndarray
    lon: np.ndarray
    lat_order: np.ndarray
    lon_order: np.ndarray
    periodic: bool

    @property
    def is_identity(self) -> bool:
        n_lat, n_lon = len(self.lat_order), len(self.lon_order)
        return bool(
            np.array_equal(self.lat_order, np.arange(n_lat))
            and np.array_equal(self.lon_order, np.arange(n_lon))
        )


def _check_values(values: np.ndarray, name: str, kind: str, argname: str) -> None:
    if values.size < 2:
        raise GridError(
            f"{argname}: expected at least 2 {kind} points along '{name}', found {values.size}. "
            "Fix: pass a field on a grid, not a single row or column."
        )
    if not np.all(np.isfinite(values)):
        raise GridError(
            f"{argname}: {kind} coordinate '{name}' has missing values. Fix: drop or fill them."
        )
    uniq, counts = np.unique(values, return_counts=True)
    if np.any(counts > 1):
        raise GridError(
            f"{argname}: {kind} coordinate '{name}' has duplicate values "
            f"{uniq[counts > 1][:5].tolist()}. Fix: remove duplicates, e.g. "
            f"data.drop_duplicates('{name}')."
        )


def grid_layout(obj: xr.DataArray | xr.Dataset, *, argname: str = "data") -> GridLayout:
    """Work out the canonical layout of ``obj``'s grid, raising :class:`GridError` on bad grids."""
    lat_name, lon_name = find_latlon(obj, argname=argname)
    lat = np.asarray(obj[lat_name].values, dtype=np.float64)
    lon = np.asarray(obj[lon_name].values, dtype=np.float64)
    _check_values(lat, lat_name, "latitude", argname)
    _check_values(lon, lon_name, "longitude", argname)
    if lat.min() < -90 or lat.max() > 90:
        raise GridError(
            f"{argname}: latitudes must lie within -90..90 degrees_north, found "
            f"{lat.min():g}..{lat.max():g} in '{lat_name}'. Fix: check that latitude and "
            "longitude are not swapped and that the units are degrees."
        )
    dlat = np.diff(lat)
    if np.all(dlat > 0):
        lat_order = np.arange(lat.size)
    elif np.all(dlat < 0):
        lat_order = np.arange(lat.size)[::-1]
    else:
        raise GridError(
            f"{argname}: latitude '{lat_name}' is neither ascending nor descending. Fix: sort "
            f"it, e.g. data.sortby('{lat_name}')."
        )
    lon_order, lon_canon = _unwrap_lon(lon, lon_name, argname)
    periodic = _is_periodic(lon_canon)
    return GridLayout(lat_name, lon_name, lat[lat_order], lon_canon, lat_order, lon_order, periodic)


def _unwrap_lon(lon: np.ndarray, name: str, argname: str) -> tuple[np.ndarray, np.ndarray]:
    """Return (order, strictly increasing longitudes) for a longitude axis.

    Accepts increasing axes in any convention (0..360, -180..180, 20..380), decreasing ones, and
    an increasing axis that wraps once at the date line or the meridian (e.g. 0..180,-180..0).
    """
    order = np.arange(lon.size)
    if np.all(np.diff(lon) < 0):
        order = order[::-1]
    vals = lon[order]
    d = np.diff(vals)
    jumps = np.flatnonzero(d < 0)
    if jumps.size == 1 and np.isclose(d[jumps[0]] % 360.0, np.median(d[d > 0]) % 360.0, atol=1e-6):
        vals = vals.copy()
        vals[jumps[0] + 1 :] += 360.0
        d = np.diff(vals)
    if not np.all(d > 0):
        bad = np.flatnonzero(d <= 0)[:3]
        raise GridError(
            f"{argname}: longitude '{name}' is not monotonic (it turns back after positions "
            f"{bad.tolist()}: {[float(lon[order][i]) for i in bad]} ...). Fix: sort it, e.g. "
            f"data.sortby('{name}'), or roll a periodic axis into one increasing run."
        )
    if vals[-1] - vals[0] >= 360.0:
        raise GridError(
            f"{argname}: longitude '{name}' spans {vals[-1] - vals[0]:g} degrees, more than a "
            f"full circle, so some points repeat. Fix: drop the repeated column, e.g. "
            f"data.isel({name}=slice(None, -1))."
        )
    return order, vals


def _is_periodic(lon: np.ndarray) -> bool:
    """A grid is periodic when its cells close the circle: span plus one spacing is 360."""
    d = np.diff(lon)
    if not np.allclose(d, d[0], rtol=1e-3, atol=1e-6):
        return False
    return bool(np.isclose(lon[-1] - lon[0] + d[0], 360.0, atol=1e-3 * d[0] + 1e-6))


def to_canonical(obj, layout: GridLayout):
    """Reorder ``obj`` onto the canonical grid of ``layout`` (lazy for dask-backed data)."""
    out = obj
    if not layout.is_identity:
        out = obj.isel({layout.lat_name: layout.lat_order, layout.lon_name: layout.lon_order})
    return out.assign_coords({layout.lat_name: layout.lat, layout.lon_name: layout.lon})


def from_canonical(obj, layout: GridLayout, original):
    """Undo :func:`to_canonical`: restore the caller's order and coordinate values."""
    out = obj
    if not layout.is_identity:
        inv_lat = np.argsort(layout.lat_order)
        inv_lon = np.argsort(layout.lon_order)
        out = obj.isel({layout.lat_name: inv_lat, layout.lon_name: inv_lon})
    return out.assign_coords(
        {layout.lat_name: original[layout.lat_name], layout.lon_name: original[layout.lon_name]}
    )


def matching_positions(a: np.ndarray, b: np.ndarray, period: float | None = None):
    """Positions in ``a`` of each value of ``b``, or None when the two sets of points differ.

    With ``period`` (360 for longitude) values are compared on the circle, so the same cells
    in another convention (0..360, -180..180, 20..380) or order still match.
    """
    a = np.asarray(a, dtype=np.float64)
    b = np.asarray(b, dtype=np.float64)
    if a.shape != b.shape or a.ndim != 1:
        return None
    ka = np.mod(a, period) if period else a
    kb = np.mod(b, period) if period else b
    order = np.argsort(ka)
    pos = np.searchsorted(ka[order], kb)
    # the nearest value is the one just below or just above (wrapping round the circle)
    below, above = order[(pos - 1) % a.size], order[pos % a.size]
    dist = lambda k: np.abs(ka[k] - kb) if not period else np.abs(
        (ka[k] - kb + period / 2) % period - period / 2)
    take = np.where(dist(below) <= dist(above), below, above)
    if np.max(dist(take)) > 1e-6:
        return None
    return take


def check_same_grid(a: xr.DataArray, b: xr.DataArray, names: tuple[str, str]) -> None:
    """Raise when two fields that must share a grid do not."""
    for coord in set(a.coords) & set(b.coords):
        if coord in a.dims and coord in b.dims:
            va, vb = a[coord].values, b[coord].values
            same = va.shape == vb.shape and (
                np.array_equal(va, vb)
                if not np.issubdtype(va.dtype, np.floating)
                else np.allclose(va, vb, rtol=0, atol=1e-9)
            )
            if not same:
                raise GridError(
                    f"{names[0]} and {names[1]}: expected the same grid, found different "
                    f"'{coord}' coordinates ({va.size} values from {va.flat[0]} vs {vb.size} "
                    f"values from {vb.flat[0]}). Fix: interpolate one onto the other, e.g. "
                    f"{names[1]}.interp_like({names[0]})."
                )
    if set(a.dims) != set(b.dims):
        raise GridError(
            f"{names[0]} and {names[1]}: expected the same dimensions, found {a.dims} and "
            f"{b.dims}. Fix: pass components of the same field."
        )


def require_dataarray(obj, argname: str) -> xr.DataArray:
    """Raise a clear TypeError unless ``obj`` is an xarray DataArray."""
    if not isinstance(obj, xr.DataArray):
        hint = (
            f" Fix: pick the variable, e.g. {argname}=ds['{argname}']."
            if isinstance(obj, xr.Dataset)
            else " Fix: wrap it, e.g. xr.DataArray(values, coords={'lat': lat, 'lon': lon})."
        )
        raise TypeError(
            f"{argname}: expected an xarray.DataArray with latitude and longitude coordinates, "
            f"found {type(obj).__name__}.{hint}"
        )
    return obj
