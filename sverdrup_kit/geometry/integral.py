"""The geometry of the westward Sverdrup integral, built once per grid, mask and options.

:func:`build_geometry` classifies land, assigns basins (detecting the real Earth when no
basins are given), marks the Earth's marginal seas and plans every row. The result depends only
on the grid, the ocean mask and the options, so it is kept in a small in-memory cache keyed on
them: a loop over fields, months or products on one grid pays for it once.
:func:`sverdrup_geometry` returns the same object for users who want to hold on to it and pass
it back with ``geometry=``.
"""

from __future__ import annotations

import hashlib
import warnings
from collections import OrderedDict
from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np
import xarray as xr

from ..errors import GridError
from .basins import assign_basins, earth_seas
from .earth import looks_like_earth
from .grid import SphericalGrid
from .land import SMALL_ISLAND, LandBodies, land_bodies
from .rows import RowPlan, plan_rows

__all__ = ["SverdrupGeometry", "sverdrup_geometry", "clear_geometry_cache",
           "EarthBasinsNotice"]

#: Geometries kept in memory (each holds a few arrays of the grid's size).
CACHE_SIZE = 8
_CACHE: OrderedDict = OrderedDict()
_NOTICE_GIVEN = False


class EarthBasinsNotice(UserWarning):
    """``basins=None`` on a mask that shows the Earth's continents: the Earth basins are used."""


@dataclass(frozen=True, eq=False)
class SverdrupGeometry:
    """Everything the westward integral needs that does not depend on the stress.

    Attributes
    ----------
    grid : SphericalGrid
        The canonical grid (ascending latitude, longitude from its western edge).
    ocean : ndarray of bool (ny, nx)
    land : LandBodies
        Labels, classes and names of the land bodies.
    basin_id : ndarray of int (ny, nx)
    names : list of str
        Basin names.
    plan : RowPlan
    equatorial : ndarray of bool (ny,)
        Rows left empty for the equatorial band.
    basins_used : str
        How basins were chosen (``earth``, ``earth (detected)``, ``automatic``, ``user``).
    sea_names : list of str
    options : dict
    """

    grid: SphericalGrid
    ocean: np.ndarray
    land: LandBodies
    basin_id: np.ndarray
    names: list
    plan: RowPlan
    equatorial: np.ndarray
    basins_used: str
    sea_names: list
    options: dict


def clear_geometry_cache() -> None:
    """Forget every cached geometry (the next call builds its geometry again)."""
    _CACHE.clear()


def _digest(*arrays) -> str:
    h = hashlib.blake2b(digest_size=16)
    for a in arrays:
        a = np.ascontiguousarray(a)
        h.update(str((a.dtype.str, a.shape)).encode())
        h.update(a.view(np.uint8).reshape(-1).data if a.size else b"")
    return h.hexdigest()


def _hashable(obj):
    if obj is None or isinstance(obj, (str, int, float, bool)):
        return obj
    if isinstance(obj, Mapping):
        return tuple(sorted((repr(k), _hashable(v)) for k, v in obj.items()))
    if isinstance(obj, (list, tuple)):
        return tuple(_hashable(x) for x in obj)
    if isinstance(obj, np.ndarray):
        return _digest(obj)
    raise TypeError


def _key(ocean, grid, basins, options, depth):
    try:
        opts = _hashable(options)
        b = _hashable(basins)
    except TypeError:
        # DataArray basins and other objects are not cached: their content is the key.
        return None
    names = (grid.layout.lat_name, grid.layout.lon_name) if grid.layout is not None else None
    return (_digest(ocean, grid.lat, grid.lon, *(() if depth is None else (depth,))),
            grid.periodic, grid.radius, grid.omega, names, b, opts)


def build_geometry(ocean, grid: SphericalGrid, *, basins=None, layout=None, ref=None,
                   island_min_area_km2, continent_min_area_km2, min_width_km,
                   equatorial_half_width, land_connectivity=4, land_classes=None, seas=None,
                   depth=None, shelf_depth_m=1000.0, use_cache=True) -> SverdrupGeometry:
    """The geometry for one canonical mask (ny, nx) and set of options, from the cache if
    an identical one was built before (``use_cache=False`` builds afresh and keeps nothing)."""
    options = dict(island_min_area_km2=float(island_min_area_km2),
                   continent_min_area_km2=float(continent_min_area_km2),
                   min_width_km=float(min_width_km),
                   equatorial_half_width=float(equatorial_half_width),
                   land_connectivity=land_connectivity, land_classes=land_classes, seas=seas,
                   shelf_depth_m=float(shelf_depth_m))
    key = _key(ocean, grid, basins, options, depth) if use_cache else None
    if key is not None and key in _CACHE:
        _CACHE.move_to_end(key)
        return _CACHE[key]
    earth = looks_like_earth(ocean, grid.lat, grid.lon, periodic=grid.periodic)
    lb = land_bodies(ocean, grid, island_min_area_km2=island_min_area_km2,
                     continent_min_area_km2=continent_min_area_km2,
                     connectivity=land_connectivity, land_classes=land_classes, earth=earth)
    cls, labels = lb.cls, lb.labels
    water = cls <= SMALL_ISLAND
    used = "user"
    if basins is None and earth:
        basins, used = "earth", "earth (detected)"
        _notice()
    elif basins is None:
        used = "automatic"
    elif isinstance(basins, str):
        used = "earth"
    bid, names, coast_e = assign_basins(basins, water, grid, layout, ref, cls, labels,
                                        min_area=island_min_area_km2)
    excluded = counted = sea_id = None
    sea_names = []
    if used.startswith("earth"):
        sea_id, sea_names, excluded, counted = earth_seas(bid, names, grid, seas=seas)
    elif seas:
        raise ValueError(
            "seas: the Earth's marginal seas apply only with the Earth basins (basins='earth', "
            f"or a mask that shows the Earth's continents), found basins={basins!r}. "
            "Fix: drop seas=, or pass basins='earth'."
        )
    band = (grid.equatorial_mask(equatorial_half_width) if equatorial_half_width > 0
            else np.zeros(grid.lat.size, dtype=bool))
    plan = plan_rows(bid, cls, labels, grid, n_basins=len(names), equatorial=band,
                     min_width_km=min_width_km, coast_e=coast_e, excluded=excluded,
                     counted_sea=counted, sea_id=sea_id, sea_names=sea_names, depth=depth,
                     shelf_depth_m=shelf_depth_m)
    for a in (ocean, cls, labels, bid, plan.cells, plan.cell_class, plan.row_status):
        a.flags.writeable = False
    geom = SverdrupGeometry(grid=grid, ocean=ocean, land=lb, basin_id=bid, names=names,
                            plan=plan, equatorial=band, basins_used=used,
                            sea_names=sea_names, options=options)
    if key is not None:
        _CACHE[key] = geom
        while len(_CACHE) > CACHE_SIZE:
            _CACHE.popitem(last=False)
    return geom


def _notice():
    global _NOTICE_GIVEN
    if _NOTICE_GIVEN:
        return
    _NOTICE_GIVEN = True
    warnings.warn(
        "basins=None: the ocean mask shows the Earth's continents, so the Earth basins are "
        "used (Atlantic, Pacific, Indian; marginal seas as in sverdrup_kit.geometry.earth."
        "EARTH_SEAS). Pass basins='earth' to silence this notice, or your own basins.",
        EarthBasinsNotice, stacklevel=4,
    )


def sverdrup_geometry(ocean_mask, *, basins=None, island_min_area_km2=None,
                      continent_min_area_km2=None, min_width_km=None,
                      equatorial_half_width=None, land_connectivity=4, land_classes=None,
                      seas=None, relief=None, shelf_depth_m=1000.0, radius=None, omega=None):
    """The reusable geometry of :func:`~sverdrup_kit.sverdrup_transport` for one mask.

    Pass the result back as ``sverdrup_transport(taux, tauy, geometry=...)`` in a loop over
    fields on the grid of ``ocean_mask``; the options are those of
    :func:`~sverdrup_kit.sverdrup_transport` (its defaults where None).

    Returns
    -------
    SverdrupGeometry
    """
    from .. import constants
    from ..physics.ekman import DEFAULT_EQUATORIAL_HALF_WIDTH
    from .basins import MIN_WIDTH, _as_bool
    from .coords import GridLayout, require_dataarray, to_canonical
    from .land import CONTINENT_MIN_AREA, ISLAND_MIN_AREA

    ocean_mask = require_dataarray(ocean_mask, "ocean_mask")
    grid0 = SphericalGrid.from_data(ocean_mask, argname="ocean_mask",
                                    radius=radius or constants.EARTH_RADIUS,
                                    omega=omega or constants.OMEGA)
    lay = grid0.layout
    can = to_canonical(ocean_mask, lay).transpose(lay.lat_name, lay.lon_name)
    ocean = _as_bool(np.asarray(can.values), "ocean_mask")
    ident = GridLayout(lay.lat_name, lay.lon_name, lay.lat, lay.lon, np.arange(lay.lat.size),
                       np.arange(lay.lon.size), lay.periodic)
    grid = SphericalGrid(lay.lat, lay.lon, lay.periodic, grid0.radius, grid0.omega, ident)
    depth = relief_depth(relief, ocean_mask, lay) if relief is not None else None
    return build_geometry(
        ocean, grid, basins=basins, layout=lay, ref=ocean_mask,
        island_min_area_km2=ISLAND_MIN_AREA if island_min_area_km2 is None
        else island_min_area_km2,
        continent_min_area_km2=CONTINENT_MIN_AREA if continent_min_area_km2 is None
        else continent_min_area_km2,
        min_width_km=MIN_WIDTH if min_width_km is None else min_width_km,
        equatorial_half_width=DEFAULT_EQUATORIAL_HALF_WIDTH if equatorial_half_width is None
        else equatorial_half_width,
        land_connectivity=land_connectivity, land_classes=land_classes, seas=seas,
        depth=depth, shelf_depth_m=shelf_depth_m,
    )


def relief_depth(relief, ref, layout):
    """Ocean depth (m, positive down) on the canonical grid from a relief DataArray (m, up)."""
    from .basins import _mask_on_grid

    if not isinstance(relief, xr.DataArray):
        raise TypeError(
            f"relief: expected an xarray.DataArray of surface height in m (negative below sea "
            f"level) on a latitude-longitude grid, found {type(relief).__name__}. Fix: wrap it with the "
            "same lat/lon coordinates as taux."
        )
    try:
        vals = _mask_on_grid(relief, ref, layout, "relief")
    except GridError:
        # Relief comes on a grid of its own, usually finer than the stress.
        vals = _mask_on_grid(_relief_on(relief, ref), ref, layout, "relief")
    vals = np.asarray(vals, dtype=np.float64)
    return np.where(np.isfinite(vals), -vals, 0.0)


def _relief_on(relief, ref):
    """Relief on a grid of its own (any resolution), as the mean height of the part of each
    stress cell that lies below sea level (NaN where none does), on the stress grid."""
    from .regrid import area_weighted_average

    if relief.ndim != 2:
        raise GridError(
            f"relief: expected one (lat, lon) field of surface height in m, found dimensions "
            f"{relief.dims}. Fix: select one field, e.g. relief.isel(time=0)."
        )
    below = relief.where(relief < 0)
    return area_weighted_average(below, ref, min_coverage=1e-9, argname="relief")
