"""Land bodies of a land-sea mask: labels, areas, classes, names and the island table.

Land cells connect through faces by default (4 neighbours): two land cells that touch only at
a corner leave a strait between them, as a grid cell's worth of water does on the real Earth
(Davis Strait between Greenland and North America, the Strait of Malacca, the Dover Strait).
Longitude wraps on a global grid. Every land body gets a class by area:

* *small island* (below ``island_min_area_km2``): the westward integral of the Sverdrup
  relation runs across it, with the stress filled in from the ocean around it;
* *large island*: it ends a run; the integral restarts on its western coast and the row's
  runs on both sides count together;
* *continent* (at least ``continent_min_area_km2``, or cut by the edge of a regional grid):
  seas behind it in a row are marginal.

On a mask that shows the real Earth (:func:`~sverdrup_kit.geometry.earth.looks_like_earth`),
bodies are named by the landmark points of :data:`~sverdrup_kit.geometry.earth.EARTH_LANDMARKS`
they contain, and land joined only across a strait narrower than the grid's cells
(:data:`~sverdrup_kit.geometry.earth.EARTH_STRAITS`) is split there. Users may set the class of any body by name or by a point inside it.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np
import xarray as xr
from scipy import ndimage
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components

from .earth import EARTH_CONTINENT_NAMES, EARTH_LANDMARKS, EARTH_STRAITS, looks_like_earth
from .grid import SphericalGrid
from .lines import label_cells, line_cuts

__all__ = ["island_table", "LAND_CLASSES", "ISLAND_MIN_AREA", "CONTINENT_MIN_AREA"]

#: Land bodies smaller than this (km2) are small islands: the westward integral runs across them
#: with stress filled in from the surrounding ocean. About the size of Iceland or Cuba, so that
#: Hawaii, the Canaries or Taiwan are crossed and New Zealand, Japan or Madagascar are not
#: (our choice; on a 2 degree grid one cell at 30N is about 4.3e4 km2).
ISLAND_MIN_AREA = 1.0e5

#: Land bodies at least this large (km2) are continents: seas behind them in a row are marginal.
#: Australia (7.7e6 km2) is the smallest continent, Greenland (2.2e6 km2) the largest island.
CONTINENT_MIN_AREA = 5.0e6

OCEAN, SMALL_ISLAND, LARGE_ISLAND, CONTINENT = 0, 1, 2, 3

#: Land classes: value -> (name, how the westward integral treats it).
LAND_CLASSES = {
    SMALL_ISLAND: ("small_island", "crossed: the integral runs across it with the stress "
                   "filled in from the ocean around it"),
    LARGE_ISLAND: ("large_island", "ends a run: the integral restarts on its western coast "
                   "and the runs on both sides count together"),
    CONTINENT: ("continent", "ends a run: seas behind it in a row are marginal unless they "
                "are counted sub-basins"),
}
_CLASS_OF_NAME = {name: k for k, (name, _) in LAND_CLASSES.items()}


@dataclass(frozen=True)
class LandBodies:
    """Land bodies of one mask (internal; :func:`island_table` is the public view).

    ``labels`` (ny, nx): body number 0..n-1 on land, -1 on ocean, bodies sorted by decreasing
    area. ``cls`` (ny, nx): OCEAN, SMALL_ISLAND, LARGE_ISLAND or CONTINENT per cell.
    """

    labels: np.ndarray
    cls: np.ndarray
    area_km2: np.ndarray
    body_class: np.ndarray
    class_source: tuple
    names: tuple
    landmarks: tuple
    cut_by_edge: np.ndarray


def _check_connectivity(connectivity):
    if connectivity not in (4, 8):
        raise ValueError(
            f"land_connectivity: expected 4 (faces) or 8 (faces and corners), found "
            f"{connectivity!r}. Fix: land_connectivity=4."
        )


def label_land(land, *, periodic, connectivity=4):
    """Connected land bodies of a boolean (ny, nx) mask; labels -1 off land, and the count."""
    _check_connectivity(connectivity)
    structure = ndimage.generate_binary_structure(2, 1 if connectivity == 4 else 2)
    lab, n = ndimage.label(land, structure=structure)
    lab = lab.astype(np.int64) - 1
    if periodic and n > 1:
        a, b = lab[:, 0], lab[:, -1]
        pairs = [np.column_stack([a, b])]
        if connectivity == 8:
            pairs.append(np.column_stack([a[1:], b[:-1]]))
            pairs.append(np.column_stack([a[:-1], b[1:]]))
        p = np.concatenate(pairs)
        p = p[(p[:, 0] >= 0) & (p[:, 1] >= 0)]
        if p.size:
            g = coo_matrix((np.ones(len(p), dtype=np.int8), (p[:, 0], p[:, 1])), shape=(n, n))
            _, comp = connected_components(g, directed=False)
            uniq, comp = np.unique(comp, return_inverse=True)
            lab = np.where(lab >= 0, comp[np.maximum(lab, 0)], -1)
            n = int(uniq.size)
    return lab, int(n)


def _split_at_straits(land, labels, n, grid):
    """Relabel the bodies that a line of :data:`EARTH_STRAITS` runs through, without the links
    that cross it."""
    if _is_model_grid(grid):
        cuts = grid.link_cuts(EARTH_STRAITS.values())
        cut_e, cut_n = cuts["E"], cuts["N"]
        east = grid.neighbour(labels, "E")
        north = grid.neighbour(labels, "N")
    else:
        cut_e, cut_n = line_cuts(grid, EARTH_STRAITS.values())
        east = np.roll(labels, -1, axis=1)
        if not grid.periodic:
            east[:, -1] = -1
        north = np.full_like(labels, -1)
        north[:-1] = labels[1:]
    hit = np.concatenate([labels[cut_e & (labels >= 0) & (east == labels)],
                          labels[cut_n & (labels >= 0) & (north == labels)]])
    if hit.size == 0:
        return labels, n
    touched = np.isin(labels, np.unique(hit))
    if _is_model_grid(grid):
        sub, m = grid.components(touched, cut={"E": cut_e, "N": cut_n})
    else:
        sub, m = label_cells(touched, periodic=grid.periodic, cut_east=cut_e, cut_north=cut_n)
    # Keep the untouched bodies' numbers, give the pieces new ones, then renumber densely.
    out = np.where(touched, n + sub, labels)
    present = np.zeros(n + m, dtype=bool)
    present[out[land]] = True
    dense = np.cumsum(present) - 1
    res = np.where(land, dense[np.maximum(out, 0)], -1)
    return res, int(present.sum())


def _is_model_grid(grid) -> bool:
    """Whether ``grid`` is a curvilinear model grid (2-D centres, its own neighbours)."""
    return np.ndim(grid.lat) == 2


def _label(land, grid, connectivity):
    """Land bodies through the grid's neighbours: faces (4) or faces and corners (8)."""
    if _is_model_grid(grid):
        _check_connectivity(connectivity)
        return grid.components(land, diagonal=connectivity == 8)
    return label_land(land, periodic=grid.periodic, connectivity=connectivity)


def _edge_bodies(labels, grid, n):
    """Bodies cut by the edge of the grid (their size is unknown): regional grids' side
    columns, rows that stop short of a pole; on model grids, cells on an open edge."""
    edge = np.zeros(n, dtype=bool)
    if _is_model_grid(grid):
        at = labels[grid.boundary_cells]
        edge[at[at >= 0]] = True
        return edge
    if not grid.periodic:
        edge[labels[:, 0][labels[:, 0] >= 0]] = True
        edge[labels[:, -1][labels[:, -1] >= 0]] = True
    if grid.lat_edges[0] > -90.0 + 1e-6:
        edge[labels[0][labels[0] >= 0]] = True
    if grid.lat_edges[-1] < 90.0 - 1e-6:
        edge[labels[-1][labels[-1] >= 0]] = True
    return edge


def _resolve_key(key, bodies_names, labels, grid, argname):
    """Body numbers selected by a name or a (lon, lat) point."""
    if isinstance(key, str):
        hit = [k for k, names in enumerate(bodies_names) if key in names]
        if not hit:
            known = sorted({n for names in bodies_names for n in names})
            raise KeyError(
                f"{argname}: no land body named {key!r} on this grid. Expected one of "
                f"{known[:12]}{' ...' if len(known) > 12 else ''}, or a (lon, lat) point "
                "inside the body. Fix: use a point, e.g. {(121.0, 16.5): 'large_island'}."
            )
        return hit
    try:
        lon0, lat0 = (float(x) for x in key)
    except (TypeError, ValueError):
        raise TypeError(
            f"{argname}: expected keys that are land body names or (lon, lat) points, found "
            f"{key!r}. Fix: e.g. {{'Luzon': 'large_island'}} or {{(121.0, 16.5): "
            "'large_island'}."
        ) from None
    cell = grid.cell_of_point(lon0, lat0)
    if cell is None or labels[cell] < 0:
        raise ValueError(
            f"{argname}: the point ({lon0:g}E, {lat0:g}N) lies "
            f"{'off the grid' if cell is None else 'in the ocean'}, not inside a land body. "
            "Fix: give a point on land (the cell containing it must be land)."
        )
    return [int(labels[cell])]


def land_bodies(ocean, grid, *, island_min_area_km2=ISLAND_MIN_AREA,
                continent_min_area_km2=CONTINENT_MIN_AREA, connectivity=4,
                land_classes=None, earth=None) -> LandBodies:
    """Label, measure, name and classify the land bodies of a canonical ocean mask (ny, nx).

    ``grid``: a :class:`~sverdrup_kit.geometry.grid.SphericalGrid` or a
    :class:`~sverdrup_kit.geometry.curvilinear.CurvilinearGrid`; on a model grid the bodies
    join through the grid's own neighbours (the periodic seam and the north fold included),
    their areas are sums of the model's cell areas, and landmarks and override points find
    their cell as the nearest centre on the sphere. ``earth``: name the bodies by
    :data:`EARTH_LANDMARKS` (None: when the mask looks like the Earth's). ``land_classes``:
    mapping of a body name or a (lon, lat) point to a class name.
    """
    land = ~np.asarray(ocean, dtype=bool)
    labels, n = _label(land, grid, connectivity)
    if earth is None:
        earth = looks_like_earth(~land, grid.lat, grid.lon, periodic=grid.periodic,
                                 cell_of=grid.cell_of_point if _is_model_grid(grid) else None)
    if earth:
        labels, n = _split_at_straits(land, labels, n, grid)
    area = np.bincount(labels[land], weights=grid.cell_area[land] / 1e6, minlength=n)
    # Bodies sorted by decreasing area, so that numbers are stable and large bodies come first.
    order = np.argsort(-area, kind="stable")
    rank = np.empty(n, dtype=np.int64)
    rank[order] = np.arange(n)
    labels = np.where(labels >= 0, rank[np.maximum(labels, 0)], -1)
    area = area[order]
    edge = _edge_bodies(labels, grid, n)
    body = np.where(
        edge | (area >= continent_min_area_km2),
        CONTINENT,
        np.where(area < island_min_area_km2, SMALL_ISLAND, LARGE_ISLAND),
    ).astype(np.int8)
    source = ["edge of grid" if e else "area" for e in edge]

    names = [[] for _ in range(n)]
    if earth:
        for name, (lon0, lat0) in EARTH_LANDMARKS.items():
            cell = grid.cell_of_point(lon0, lat0)
            if cell is not None and labels[cell] >= 0:
                names[int(labels[cell])].append(name)
        # A named island cut by the grid's edge (Greenland on a grid that stops at 80N) is
        # still an island: classed by its area on the grid, a lower bound, rather than taken
        # for a continent of unknown size.
        for k in np.flatnonzero(edge):
            if names[k] and not set(names[k]) & set(EARTH_CONTINENT_NAMES):
                body[k] = (CONTINENT if area[k] >= continent_min_area_km2 else
                           SMALL_ISLAND if area[k] < island_min_area_km2 else LARGE_ISLAND)
                source[k] = "area (a named island cut by the edge of the grid)"
    if land_classes:
        if not isinstance(land_classes, Mapping):
            raise TypeError(
                f"land_classes: expected a mapping of land body names or (lon, lat) points to "
                f"class names, found {type(land_classes).__name__}. Fix: e.g. "
                "{'Luzon': 'large_island'}."
            )
        for key, cname in land_classes.items():
            if cname not in _CLASS_OF_NAME:
                raise ValueError(
                    f"land_classes[{key!r}]: expected one of {sorted(_CLASS_OF_NAME)}, found "
                    f"{cname!r}. Fix: e.g. 'large_island'."
                )
            for k in _resolve_key(key, names, labels, grid, "land_classes"):
                body[k] = _CLASS_OF_NAME[cname]
                source[k] = "land_classes argument"
    cls = np.full(land.shape, OCEAN, dtype=np.int8)
    cls[land] = body[labels[land]]
    display = tuple(nm[0] if nm else f"land_{k}" for k, nm in enumerate(names))
    return LandBodies(labels=labels, cls=cls, area_km2=area, body_class=body,
                      class_source=tuple(source), names=display,
                      landmarks=tuple(", ".join(nm) for nm in names), cut_by_edge=edge)


def _latlon_2d(grid):
    """Cell-centre latitudes and longitudes (ny, nx) of a regular or a model grid, degrees."""
    if _is_model_grid(grid):
        return grid.lat, grid.lon
    return np.broadcast_arrays(grid.lat[:, None], grid.lon[None, :])


def _lon_extent_of_values(lab, lons, n):
    """West and east ends of each body from its cells' longitudes: the complement of the
    widest gap between them on the circle (model grids, whose columns are not meridians)."""
    west = np.full(n, np.nan)
    east = np.full(n, np.nan)
    lons = np.mod(lons, 360.0)
    order = np.lexsort((lons, lab))
    lab, lons = lab[order], lons[order]
    starts = np.flatnonzero(np.r_[True, np.diff(lab) != 0])
    for a, z in zip(starts, np.r_[starts[1:], lab.size]):
        x = lons[a:z]
        gaps = np.diff(np.append(x, x[0] + 360.0))
        g = int(np.argmax(gaps))
        west[lab[a]], east[lab[a]] = x[(g + 1) % x.size], x[g]
    return west, east


def _centroids(labels, grid, n):
    """Area-weighted centroids on the sphere (mean unit vector), degrees north and east."""
    land = labels >= 0
    lat2, lon2 = _latlon_2d(grid)
    phi, lam = np.deg2rad(lat2), np.deg2rad(lon2)
    w = grid.cell_area
    vec = [np.cos(phi) * np.cos(lam), np.cos(phi) * np.sin(lam), np.sin(phi)]
    s = [np.bincount(labels[land], weights=(w * v)[land], minlength=n) for v in vec]
    lat_c = np.rad2deg(np.arctan2(s[2], np.hypot(s[0], s[1])))
    lon_c = np.rad2deg(np.arctan2(s[1], s[0])) % 360.0
    return lat_c, lon_c


def island_table(ocean_mask, *, island_min_area_km2: float = ISLAND_MIN_AREA,
                 continent_min_area_km2: float = CONTINENT_MIN_AREA,
                 land_connectivity: int = 4, land_classes=None,
                 earth_names: bool | None = None) -> xr.Dataset:
    """Every land body of a land-sea mask, with its name, size, position and class.

    Parameters
    ----------
    ocean_mask : xarray.DataArray (lat, lon), or (y, x) on a model grid
        True (or 1) for ocean, False/0/NaN for land; any latitude order and longitude
        convention. On a curvilinear model grid (two-dimensional latitude and longitude) the
        bodies are connected through the grid's own neighbours (seam and fold included) and
        measured with its cell areas.
    island_min_area_km2, continent_min_area_km2 : float, optional
        km2. Class limits, as in :func:`~sverdrup_kit.sverdrup_transport`.
    land_connectivity : {4, 8}, optional
        4: land cells connect through faces only (default), so a strait one cell wide or a
        diagonal gap separates two bodies; 8: also through corners.
    land_classes : dict, optional
        Class of chosen bodies, overriding the class by area: keys are body names (on the
        Earth) or (lon, lat) points inside a body, values ``"small_island"``,
        ``"large_island"`` or ``"continent"``.
    earth_names : bool, optional
        Name bodies by landmark points of the real Earth. Default: when the mask looks like
        the Earth's (:func:`~sverdrup_kit.geometry.earth.looks_like_earth`); other bodies are
        ``land_0``, ``land_1``, ... in order of decreasing area.

    Returns
    -------
    xarray.Dataset
        Dimension ``island`` (one entry per land body, by decreasing area) with
        ``name`` (str), ``landmarks`` (str: every landmark inside the body, comma-separated),
        ``area_km2``, ``centroid_lat``/``centroid_lon`` (area-weighted mean position on the
        sphere, degrees), ``north_lat``/``south_lat`` (centre latitudes of the body's
        northernmost and southernmost cells, degrees_north), ``west_lon``/``east_lon``
        (centre longitudes of the western- and easternmost cells, degrees_east, on the circle:
        west may exceed east when a body crosses the seam), ``n_cells``, ``land_class``
        (int8, CF flags: 1 small_island, 2 large_island, 3 continent), ``treatment`` (str:
        how the westward integral treats it), ``class_source`` (str: ``area``, ``edge of
        grid`` or ``land_classes argument``) and ``cut_by_edge`` (bool); and on the mask's
        grid ``land_label`` (lat, lon): the body's ``island`` number, -1 on ocean.

    Notes
    -----
    Areas are exact spherical cell areas, :math:`R^2\\,\\Delta\\lambda\\,(\\sin\\phi_n -
    \\sin\\phi_s)`, summed over the body's cells.

    Examples
    --------
    >>> import numpy as np, xarray as xr
    >>> lat, lon = np.arange(-89.0, 90.0, 2.0), np.arange(1.0, 360.0, 2.0)
    >>> land = (np.abs(lat[:, None] - 31) < 6) & (np.abs(lon - 61) < 6)
    >>> t = island_table(xr.DataArray(~land, coords={"lat": lat, "lon": lon},
    ...                               dims=("lat", "lon")))
    >>> t.name.values.tolist(), t.land_class.values.tolist()
    (['land_0'], [2])
    >>> t.north_lat.values.tolist(), t.south_lat.values.tolist()
    ([35.0], [27.0])
    """
    from .basins import _as_bool
    from .coords import require_dataarray, to_canonical
    from .curvilinear import CurvilinearGrid, is_curvilinear

    ocean_mask = require_dataarray(ocean_mask, "ocean_mask")
    if is_curvilinear(ocean_mask):
        # A model grid: its own cells, neighbours and areas; the table keeps its (y, x) order.
        grid = CurvilinearGrid.from_data(ocean_mask, argname="ocean_mask")
        lay, can = None, ocean_mask
    else:
        grid = SphericalGrid.from_data(ocean_mask, argname="ocean_mask")
        lay = grid.layout
        can = to_canonical(ocean_mask, lay).transpose(lay.lat_name, lay.lon_name)
    ocean = _as_bool(np.asarray(can.values), "ocean_mask")
    lb = land_bodies(ocean, grid, island_min_area_km2=island_min_area_km2,
                     continent_min_area_km2=continent_min_area_km2,
                     connectivity=land_connectivity, land_classes=land_classes,
                     earth=earth_names)
    return _table(lb, grid, can, lay, ocean_mask)


def _table(lb: LandBodies, grid, can, lay, original) -> xr.Dataset:
    from .coords import from_canonical

    n = lb.area_km2.size
    labels = lb.labels
    land = labels >= 0
    lab = labels[land]
    lat2, lon2 = _latlon_2d(grid)
    north_lat = np.full(n, -np.inf)
    south_lat = np.full(n, np.inf)
    np.maximum.at(north_lat, lab, lat2[land])
    np.minimum.at(south_lat, lab, lat2[land])
    if _is_model_grid(grid):
        west_lon, east_lon = _lon_extent_of_values(lab, lon2[land], n)
    else:
        west_lon, east_lon = _lon_extent(lab, np.nonzero(land)[1], n, grid.lon, grid.periodic)
    lat_c, lon_c = _centroids(labels, grid, n)
    ncell = np.bincount(lab, minlength=n)
    island = np.arange(n)
    ds = xr.Dataset(
        {
            "name": ("island", np.array(lb.names, dtype=object),
                     {"long_name": "name of the land body"}),
            "landmarks": ("island", np.array(lb.landmarks, dtype=object),
                          {"long_name": "named landmark points inside the body",
                           "comment": "comma-separated; empty when none"}),
            "area_km2": ("island", lb.area_km2, {"long_name": "area", "units": "km2"}),
            "centroid_lat": ("island", lat_c, {"long_name": "latitude of the area-weighted "
                                               "centroid", "units": "degrees_north"}),
            "centroid_lon": ("island", lon_c, {"long_name": "longitude of the area-weighted "
                                               "centroid", "units": "degrees_east"}),
            "north_lat": ("island", north_lat, {
                "long_name": "latitude of the northern tip", "units": "degrees_north",
                "comment": "centre of the body's northernmost cells"}),
            "south_lat": ("island", south_lat, {
                "long_name": "latitude of the southern tip", "units": "degrees_north",
                "comment": "centre of the body's southernmost cells"}),
            "west_lon": ("island", west_lon, {"long_name": "longitude of the western end",
                                              "units": "degrees_east"}),
            "east_lon": ("island", east_lon, {"long_name": "longitude of the eastern end",
                                              "units": "degrees_east"}),
            "n_cells": ("island", ncell.astype(np.int64), {"long_name": "number of cells"}),
            "land_class": ("island", lb.body_class, {
                "long_name": "land class",
                "flag_values": np.array(list(LAND_CLASSES), dtype=np.int8),
                "flag_meanings": " ".join(v[0] for v in LAND_CLASSES.values())}),
            "treatment": ("island", np.array([LAND_CLASSES[int(c)][1] for c in lb.body_class],
                                             dtype=object),
                          {"long_name": "how the westward Sverdrup integral treats the body"}),
            "class_source": ("island", np.array(lb.class_source, dtype=object),
                             {"long_name": "what set the land class"}),
            "cut_by_edge": ("island", lb.cut_by_edge, {
                "long_name": "body cut by the edge of a regional grid (size unknown)"}),
        },
        coords={"island": ("island", island, {"long_name": "land body number"})},
    )
    lab_da = xr.DataArray(labels.astype(np.int32), coords=can.coords, dims=can.dims)
    if lay is not None:
        lab_da = from_canonical(lab_da, lay, original)
    ds["land_label"] = lab_da.assign_attrs(long_name="land body number (island index)",
                                           comment="-1 on ocean")
    return ds


def _lon_extent(lab, ii, n, lon, periodic):
    """West and east ends of each body: the complement of its widest gap of columns."""
    nx = lon.size
    cols = np.zeros((n, nx), dtype=bool) if n * nx <= 5e7 else None
    west = np.full(n, np.nan)
    east = np.full(n, np.nan)
    if cols is None:
        return west, east
    cols[lab, ii] = True
    for k in range(n):
        c = np.flatnonzero(cols[k])
        if not periodic or c.size == nx:
            west[k], east[k] = lon[c[0]], lon[c[-1]]
            continue
        gaps = np.diff(np.append(c, c[0] + nx))
        g = int(np.argmax(gaps))
        west[k] = lon[c[(g + 1) % c.size]]
        east[k] = lon[c[g]]
    return west, east
