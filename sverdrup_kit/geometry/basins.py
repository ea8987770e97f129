"""Ocean basins, islands and coasts on a latitude-longitude grid.

Everything here depends only on the grid and the land mask, never on the winds, so it is worked
out once per call in NumPy and shared by every time step. It answers the questions the westward
integral of the Sverdrup relation needs settled before it starts:

* which land is a *small island* (integrated across), a *large island* (ends one segment of a
  row and starts another at its western coast) or part of a *continent*;
* which ocean cells form each basin: connected regions of the mask (automatic), the Atlantic,
  Pacific and Indian Oceans of the real Earth divided along documented lines (``"earth"``), or
  the user's own masks or polygons;
* in each basin row, which runs of ocean cells make up the open basin, which are marginal seas
  behind a peninsula, and whether the row has an eastern and a western coast at all.

Connectivity: ocean cells connect through faces (4 neighbours), land cells also through corners
(8 neighbours), so a diagonal chain of land cells is a wall and a diagonal chain of ocean cells
is not a passage. Longitude wraps when the grid is periodic.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np
import xarray as xr
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components

from .. import _validate
from .coords import GridError, matching_positions, to_canonical
from .grid import SphericalGrid

__all__ = [
    "basin_ids",
    "EARTH_DIVIDING_LINES",
    "EARTH_BASIN_SEEDS",
    "EARTH_COASTAL_LINES",
    "ISLAND_MIN_AREA",
    "CONTINENT_MIN_AREA",
    "MIN_WIDTH",
    "SEPARATE_OCEAN_AREA",
]

#: Land bodies smaller than this (km2) are small islands: the westward integral runs across them
#: with stress filled in from the surrounding ocean. About the size of Iceland or Cuba, so that
#: Hawaii, the Canaries or Taiwan are crossed and New Zealand, Japan or Madagascar are not
#: (our choice; on a 2 degree grid one cell at 30N is about 4.3e4 km2).
ISLAND_MIN_AREA = 1.0e5

#: Land bodies at least this large (km2) are continents: seas behind them in a row are marginal.
#: Australia (7.7e6 km2) is the smallest continent, Greenland (2.2e6 km2) the largest island.
CONTINENT_MIN_AREA = 5.0e6

#: Rows whose basin interior is narrower than this (km) are left empty: the Sverdrup interior
#: needs a basin much wider than its western boundary layer (tens to a hundred km; our choice).
MIN_WIDTH = 500.0

#: Automatic basins: where oceans meet beyond a continent's tip, branches larger than this (km2)
#: are basins of their own; smaller ones are marginal seas of the basin they open into. The
#: largest marginal seas (South China Sea, Caribbean, Mediterranean) are 2.5e6 to 3.5e6 km2, the
#: smallest ocean (Arctic) about 1.4e7 km2.
SEPARATE_OCEAN_AREA = 1.0e7

#: Lines (lon, lat vertices in degrees_east 0..360, degrees_north) along which ``basins="earth"``
#: cuts the global ocean. A cut removes every link between two neighbouring cell centres that
#: crosses a line; each line ends inside land so that coarse grids cannot leak round its ends.
EARTH_DIVIDING_LINES = {
    # Atlantic | Indian: the meridian of Cape Agulhas (34.8S, 20.0E), from Antarctica into
    # South Africa.
    "agulhas_20E": [(20.0, -90.0), (20.0, -30.0)],
    # Indian | Pacific south of Australia: 147E from Antarctica to Tasmania's South East Cape
    # (43.6S), then on across Tasmania and Bass Strait into Victoria.
    "tasmania_147E": [(147.0, -90.0), (147.0, -43.6)],
    "bass_strait": [(147.0, -43.6), (147.0, -36.0)],
    # Pacific | Atlantic: the meridian of Cape Horn (56.0S, 67.3W), 68W, south to Antarctica;
    # then along 70W across Tierra del Fuego and the Strait of Magellan into Patagonia.
    "drake_68W": [(292.0, -90.0), (292.0, -55.5)],
    "magellan": [(292.0, -55.5), (290.0, -55.5), (290.0, -40.0)],
    # Indian | Pacific through the Indonesian passages: across the Strait of Malacca, Sunda
    # Strait and the Lesser Sunda chain (Lombok, Ombai and Timor passages join the Pacific side
    # to the Indian side), then across the Timor Sea to Australia near Darwin. The Andaman Sea,
    # Strait of Malacca and Timor Sea are Indian; the South China, Java, Banda and Arafura Seas
    # are Pacific (our choice, close to the usual hydrographic one).
    "indonesia": [
        (99.0, 15.0), (100.5, 5.5), (101.5, 0.5), (105.5, -5.0), (106.5, -6.5),
        (114.5, -8.0), (116.3, -8.6), (118.0, -8.6), (121.0, -8.6), (124.5, -9.5),
        (126.0, -8.8), (131.5, -12.8), (134.0, -20.0),
    ],
    # Pacific | Gulf of Mexico and Caribbean along Central America, from central Mexico across
    # the Isthmus of Tehuantepec and the Isthmus of Panama into Colombia, for grids coarse
    # enough to open either (a 2 degree ship-based mask joins the oceans at 95-97W).
    "central_america": [(255.0, 24.0), (262.0, 19.5), (268.0, 17.0), (276.0, 12.0),
                        (279.5, 9.0), (282.0, 8.8), (283.0, 8.0), (285.0, 6.0)],
    # The Arctic Ocean and the Nordic Seas are left out: the parallel 65.5N crosses Bering
    # Strait (65.8N), Davis Strait, Denmark Strait and the Iceland-Norway gap at once.
    "arctic_65.5N": [(0.0, 65.5), (360.0, 65.5)],
    # The Mediterranean and Black Sea are left out: Strait of Gibraltar (5.6W) and Suez.
    "gibraltar": [(354.4, 38.0), (354.4, 34.0)],
    "suez": [(28.0, 30.5), (38.0, 30.5)],
}

#: Dividing lines that stand for land or a shallow strait the grid may miss: a basin row that
#: ends on one of them ends on a coast. A row that ends on any other line (Agulhas, south of
#: Tasmania, Drake Passage, the Arctic parallel) opens on another ocean and has no coast there.
EARTH_COASTAL_LINES = ("bass_strait", "magellan", "indonesia", "central_america", "gibraltar",
                       "suez")

#: Points (lon 0..360, lat) that name the pieces of the divided ocean. A basin may have several.
EARTH_BASIN_SEEDS = {
    "atlantic": [(325.0, 30.0), (335.0, -25.0)],
    "pacific": [(200.0, 20.0), (240.0, -20.0)],
    "indian": [(75.0, -20.0)],
}

# Land classes.
OCEAN, SMALL_ISLAND, LARGE_ISLAND, CONTINENT = 0, 1, 2, 3


# --------------------------------------------------------------------------------------------
# Connected components on the grid graph
# --------------------------------------------------------------------------------------------


def label_cells(mask, *, periodic, diagonal=False, cut_east=None, cut_north=None):
    """Connected components of the True cells of ``mask`` (ny, nx).

    Parameters
    ----------
    mask : ndarray of bool (ny, nx)
    periodic : bool
        Longitude wraps: the last column neighbours the first.
    diagonal : bool
        Also connect cells that share only a corner (used for land).
    cut_east, cut_north : ndarray of bool (ny, nx), optional
        Links removed: between (j, i) and (j, i+1) resp. (j, i) and (j+1, i).

    Returns
    -------
    labels : ndarray of int (ny, nx)
        0..n-1 on True cells, -1 elsewhere.
    n : int
    """
    mask = np.asarray(mask, dtype=bool)
    ny, nx = mask.shape
    ids = np.arange(ny * nx).reshape(ny, nx)
    rows, cols = [], []

    def link(a_sl, b_sl, keep):
        ok = mask[a_sl] & mask[b_sl] & keep
        rows.append(ids[a_sl][ok])
        cols.append(ids[b_sl][ok])

    full = np.ones((ny, nx), dtype=bool)
    ce = ~cut_east if cut_east is not None else full
    cn = ~cut_north if cut_north is not None else full
    link((slice(None), slice(0, nx - 1)), (slice(None), slice(1, nx)), ce[:, : nx - 1])
    if periodic:
        link((slice(None), slice(nx - 1, nx)), (slice(None), slice(0, 1)), ce[:, nx - 1 :])
    link((slice(0, ny - 1), slice(None)), (slice(1, ny), slice(None)), cn[: ny - 1])
    if diagonal:
        shifted = np.roll(mask, -1, axis=1)
        sid = np.roll(ids, -1, axis=1)
        for dj in (1, -1):
            a = slice(0, ny - 1) if dj == 1 else slice(1, ny)
            b = slice(1, ny) if dj == 1 else slice(0, ny - 1)
            ok = mask[a] & shifted[b]
            if not periodic:
                ok[:, -1] = False
            rows.append(ids[a][ok])
            cols.append(sid[b][ok])
    r = np.concatenate(rows)
    c = np.concatenate(cols)
    graph = coo_matrix((np.ones(r.size, dtype=np.int8), (r, c)), shape=(ny * nx, ny * nx))
    _, comp = connected_components(graph, directed=False)
    comp = comp.reshape(ny, nx)
    labels = np.full((ny, nx), -1, dtype=np.int64)
    uniq, inv = np.unique(comp[mask], return_inverse=True)
    labels[mask] = inv
    return labels, int(uniq.size)


# --------------------------------------------------------------------------------------------
# Land: small islands, large islands, continents
# --------------------------------------------------------------------------------------------


def classify_land(ocean, grid: SphericalGrid, *, island_min_area_km2, continent_min_area_km2):
    """Class of every cell: OCEAN, SMALL_ISLAND, LARGE_ISLAND or CONTINENT, and land labels.

    Areas are exact spherical cell areas summed over 8-connected land bodies. A land body that
    touches the edge of a regional grid (not the poles) is cut by the edge, its size unknown: it
    is taken as a continent.
    """
    land = ~ocean
    labels, n = label_cells(land, periodic=grid.periodic, diagonal=True)
    area_km2 = np.bincount(labels[land], weights=grid.cell_area[land] / 1e6, minlength=n)
    edge = np.zeros(n, dtype=bool)
    if not grid.periodic:
        edge[labels[:, 0][labels[:, 0] >= 0]] = True
        edge[labels[:, -1][labels[:, -1] >= 0]] = True
    if grid.lat_edges[0] > -90.0 + 1e-6:
        edge[labels[0][labels[0] >= 0]] = True
    if grid.lat_edges[-1] < 90.0 - 1e-6:
        edge[labels[-1][labels[-1] >= 0]] = True
    body = np.where(
        edge | (area_km2 >= continent_min_area_km2),
        CONTINENT,
        np.where(area_km2 < island_min_area_km2, SMALL_ISLAND, LARGE_ISLAND),
    )
    cls = np.full(ocean.shape, OCEAN, dtype=np.int8)
    cls[land] = body[labels[land]]
    return cls, labels


# --------------------------------------------------------------------------------------------
# Basins
# --------------------------------------------------------------------------------------------


def _line_cuts(grid: SphericalGrid, lines):
    """Links between neighbouring cell centres that cross any of ``lines`` (lon, lat vertices)."""
    ny, nx = grid.shape
    lat, lon = grid.lat, grid.lon
    cut_e = np.zeros((ny, nx), dtype=bool)
    cut_n = np.zeros((ny, nx), dtype=bool)
    lon_next = np.empty(nx)
    lon_next[:-1] = lon[1:]
    lon_next[-1] = lon[0] + 360.0 if grid.periodic else np.inf
    for verts in lines:
        v = np.asarray(verts, dtype=np.float64)
        for (x1, y1), (x2, y2) in zip(v[:-1], v[1:]):
            for shift in (-720.0, -360.0, 0.0, 360.0, 720.0):
                xa, xb = x1 + shift, x2 + shift
                if y1 != y2:
                    lo, hi = min(y1, y2), max(y1, y2)
                    rows = np.flatnonzero((lat >= lo) & (lat < hi))
                    xc = xa + (lat[rows] - y1) * (xb - xa) / (y2 - y1)
                    for j, x in zip(rows, xc):
                        hit = (lon <= x) & (x < lon_next)
                        cut_e[j, hit] = True
                if xa != xb:
                    lo, hi = min(xa, xb), max(xa, xb)
                    cols = np.flatnonzero((lon >= lo) & (lon < hi))
                    yc = y1 + (lon[cols] - xa) * (y2 - y1) / (xb - xa)
                    for i, y in zip(cols, yc):
                        hit = np.flatnonzero((lat[:-1] <= y) & (y < lat[1:]))
                        cut_n[hit, i] = True
    return cut_e, cut_n


def _nearest_water(water, grid, lon0, lat0, max_cells=3):
    j = int(np.argmin(np.abs(grid.lat - lat0)))
    dlon = (grid.lon - lon0 + 180.0) % 360.0 - 180.0
    i = int(np.argmin(np.abs(dlon)))
    ny, nx = water.shape
    best = None
    for dj in range(-max_cells, max_cells + 1):
        for di in range(-max_cells, max_cells + 1):
            jj, ii = j + dj, i + di
            if grid.periodic:
                ii %= nx
            if 0 <= jj < ny and 0 <= ii < nx and water[jj, ii]:
                d = dj * dj + di * di
                if best is None or d < best[0]:
                    best = (d, jj, ii)
    return None if best is None else best[1:]


def _earth_basins(water, grid):
    if not grid.periodic:
        raise GridError(
            "basins: 'earth' needs a global grid whose longitudes close the circle, found "
            f"{grid!r}. Fix: pass a global field, or give your own basins as masks or polygons."
        )
    cut_e, cut_n = _line_cuts(grid, EARTH_DIVIDING_LINES.values())
    coast_e, _ = _line_cuts(grid, [EARTH_DIVIDING_LINES[k] for k in EARTH_COASTAL_LINES])
    labels, _ = label_cells(water, periodic=True, cut_east=cut_e, cut_north=cut_n)
    names = list(EARTH_BASIN_SEEDS)
    comp_of = {}
    for name, seeds in EARTH_BASIN_SEEDS.items():
        comps = set()
        for lon0, lat0 in seeds:
            hit = _nearest_water(water, grid, lon0, lat0)
            if hit is None:
                raise GridError(
                    f"basins: 'earth' found land around ({lon0:g}E, {lat0:g}N), which should "
                    f"lie in the {name.title()} Ocean. Fix: check that the mask is the real "
                    "Earth's (ocean True), or give your own basins."
                )
            comps.add(int(labels[hit]))
        comp_of[name] = comps
    for a in names:
        for b in names:
            if a < b and comp_of[a] & comp_of[b]:
                raise GridError(
                    f"basins: the 'earth' dividing lines do not separate the {a} and {b} Oceans "
                    "on this grid (an ocean passage stays open round a line's end). Fix: pass "
                    "a topographic ocean_mask, or give your own basins as masks or polygons."
                )
    out = np.full(water.shape, -1, dtype=np.int64)
    for k, name in enumerate(names):
        out[np.isin(labels, list(comp_of[name]))] = k
    return out, names, coast_e


def _polygon_inside(grid, verts):
    from matplotlib.path import Path

    v = np.asarray(verts, dtype=np.float64)
    if v.ndim != 2 or v.shape[1] != 2 or v.shape[0] < 3:
        raise ValueError(
            "basins: expected each polygon as a list of at least 3 (lon, lat) vertices, found "
            f"an array of shape {v.shape}. Fix: e.g. {{'box': [(0, 10), (60, 10), (60, 50), "
            "(0, 50)]}."
        )
    path = Path(v)
    lon2, lat2 = np.meshgrid(grid.lon, grid.lat)
    inside = np.zeros(lon2.shape, dtype=bool)
    for shift in (-720.0, -360.0, 0.0, 360.0, 720.0):
        pts = np.column_stack([(lon2 - shift).ravel(), lat2.ravel()])
        inside |= path.contains_points(pts).reshape(lon2.shape)
    return inside


def _mask_on_grid(da, ref, layout, argname):
    """Values of a (lat, lon) DataArray ``da`` on the canonical grid of ``ref``."""
    if not isinstance(da, xr.DataArray):
        raise TypeError(
            f"{argname}: expected an xarray.DataArray on the stress grid, found "
            f"{type(da).__name__}. Fix: wrap it with the same lat/lon coordinates as taux."
        )
    lat_name, lon_name = layout.lat_name, layout.lon_name
    if set(da.dims) != {lat_name, lon_name}:
        raise GridError(
            f"{argname}: expected dimensions ({lat_name}, {lon_name}) like taux, found "
            f"{da.dims}. Fix: select one field, e.g. {argname}.isel(time=0), or rename."
        )
    for name, period in ((lat_name, None), (lon_name, 360.0)):
        a, b = np.asarray(da[name].values, float), np.asarray(ref[name].values, float)
        take = matching_positions(a, b, period)
        if take is None:
            raise GridError(
                f"{argname}: expected the same '{name}' points as taux ({b.size} values "
                f"{b.min():g}..{b.max():g}), found {a.size} values {a.min():g}..{a.max():g}"
                + (" (compared modulo 360)" if period else "")
                + f". Fix: build the mask on taux's grid, e.g. {argname}.reindex_like(taux, "
                "method='nearest') when the grids are the same but for a few points."
            )
        # The same points in another order or longitude convention: put them in taux's.
        da = da.isel({name: take}).assign_coords({name: ref[name].values})
    return np.asarray(to_canonical(da, layout).transpose(lat_name, lon_name).values)


def _as_bool(vals, argname):
    """True/1 where set; False, 0 and NaN where not (the one mask rule, in _validate)."""
    return _validate.mask(vals, argname)


def _user_basins(basins, water, grid, layout, ref):
    if isinstance(basins, xr.DataArray):
        vals = _mask_on_grid(basins, ref, layout, "basins")
        if not (np.issubdtype(vals.dtype, np.integer) or np.issubdtype(vals.dtype, np.floating)):
            raise TypeError(
                f"basins: expected integer basin numbers (-1 or NaN outside), found dtype "
                f"{vals.dtype}. Fix: basins.astype(int)."
            )
        v = np.where(np.isfinite(vals), vals, -1).astype(np.int64)
        present = np.unique(v[v >= 0])
        meanings = str(basins.attrs.get("flag_meanings", "")).split()
        flags = basins.attrs.get("flag_values")
        if meanings and flags is not None and len(np.atleast_1d(flags)) == len(meanings):
            flags = [int(f) for f in np.atleast_1d(flags)]
            names_of = dict(zip(flags, meanings))
        else:
            names_of = {}
        out = np.full(water.shape, -1, dtype=np.int64)
        names = []
        for k, val in enumerate(present):
            out[v == val] = k
            names.append(names_of.get(int(val), f"basin_{int(val)}"))
        return np.where(water, out, -1), names
    if isinstance(basins, Mapping):
        if not basins:
            raise ValueError("basins: expected at least one basin, found an empty mapping.")
        out = np.full(water.shape, -1, dtype=np.int64)
        names = []
        for k, (name, spec) in enumerate(basins.items()):
            if isinstance(spec, xr.DataArray):
                m = _as_bool(_mask_on_grid(spec, ref, layout, f"basins[{name!r}]"),
                             f"basins[{name!r}]")
                clash = m & water & (out >= 0)
                if clash.any():
                    other = names[int(out[clash][0])]
                    raise ValueError(
                        f"basins: masks '{other}' and '{name}' overlap in {int(clash.sum())} "
                        "ocean cells; expected each cell in at most one basin. Fix: remove the "
                        f"overlap, e.g. basins['{name}'] & ~basins['{other}']."
                    )
            else:
                # Polygons listed earlier win shared edges.
                m = _polygon_inside(grid, spec) & (out < 0)
            out[m & water] = k
            names.append(str(name))
        return out, names
    raise TypeError(
        "basins: expected None (connected regions of the mask), 'earth', a DataArray of basin "
        "numbers, or a dict name -> boolean DataArray or name -> [(lon, lat), ...] polygon, "
        f"found {type(basins).__name__}."
    )


def _islands_join_basins(basin, cls, land_labels, periodic):
    """Give a small island the basin of the water around it when that water is one basin."""
    small = cls == SMALL_ISLAND
    unassigned = small & (basin < 0)
    if not unassigned.any():
        return basin
    out = basin.copy()
    for lab in np.unique(land_labels[unassigned]):
        cells = land_labels == lab
        nb = np.zeros_like(cells)
        for axis, k in ((0, 1), (0, -1), (1, 1), (1, -1)):
            sh = np.roll(cells, k, axis=axis)
            if axis == 0:
                sh[0 if k == 1 else -1] = False
            elif not periodic:
                sh[:, 0 if k == 1 else -1] = False
            nb |= sh
        around = np.unique(basin[nb & ~cells & (cls == OCEAN)])
        around = around[around >= 0]
        if around.size == 1:
            out[cells] = around[0]
    return out


def assign_basins(basins, water, grid, layout, ref, cls, land_labels, *, min_area):
    """Basin numbers (ny, nx), -1 outside, basin names, and coast-like links.

    The last is a boolean (ny, nx) array, True where the link from (j, i) to (j, i+1) crosses
    a line that stands for a coast (``basins="earth"`` only).
    """
    coast_e = np.zeros(water.shape, dtype=bool)
    if basins is None:
        bid, names = _auto_basins(water, grid, cls, land_labels, min_area=min_area)
    elif isinstance(basins, str):
        if basins.lower() != "earth":
            raise ValueError(
                f"basins: expected None, 'earth', masks or polygons, found the string "
                f"{basins!r}. Fix: basins='earth' for the Atlantic, Pacific and Indian Oceans."
            )
        bid, names, coast_e = _earth_basins(water, grid)
    else:
        bid, names = _user_basins(basins, water, grid, layout, ref)
    bid = _islands_join_basins(bid, cls, land_labels, grid.periodic)
    if not (bid >= 0).any():
        raise ValueError(
            "basins: no ocean cell lies in any basin. Fix: check that the basin masks or "
            "polygons overlap the ocean (longitudes in degrees_east, polygons as (lon, lat))."
        )
    return bid, names, coast_e


# --------------------------------------------------------------------------------------------
# Rows: runs of ocean, eastern and western coasts, marginal seas
# --------------------------------------------------------------------------------------------

#: row_status values and their meanings (CF flag_values / flag_meanings).
ROW_STATUS = {
    0: ("valid", "interior transport computed"),
    1: ("equatorial_band", "within the equatorial band, where V = curl/(rho0 beta) stays "
        "finite but the Ekman and geostrophic parts (both as 1/f) lose their meaning and "
        "equatorial dynamics (undercurrents, nonlinearity, friction) break the Sverdrup "
        "balance"),
    2: ("no_eastern_coast", "the basin's ocean in this row has no eastern coast: it wraps all "
        "the way round (a circumpolar band), or its eastern end is open to another basin or "
        "the edge of the grid"),
    3: ("too_narrow", "the basin interior in this row is narrower than min_width"),
    4: ("no_ocean", "the basin has no ocean in this row"),
    5: ("no_western_coast", "the basin's ocean in this row ends in the west on open water "
        "(another basin or the edge of the grid), so no western boundary current closes it"),
}

#: integration_class values and meanings.
CELL_CLASS = {
    0: ("not_integrated", "land, ocean outside every basin, or a row left empty"),
    1: ("interior", "counted in the basin's interior transport"),
    2: ("marginal_sea", "a sea cut off from the open basin in this row by a continent; it has "
        "its own streamfunction from its own eastern coast but is not counted"),
    3: ("uncounted_row", "streamfunction from the eastern coast, but the row has no western "
        "coast or is too narrow, so no interior transport is reported"),
}


@dataclass
class RowPlan:
    """The westward integral of one call, worked out from grid and mask alone.

    ``cells``/``run_starts``: the runs to integrate, each from its eastern cell westward (flat
    indices j * nx + i), in ascending row order. ``group_runs``/``group_starts``/
    ``group_slot``: which runs add up to the interior transport of (basin, row) slot
    ``b * ny + j``.
    """

    cells: np.ndarray
    run_starts: np.ndarray
    group_runs: np.ndarray
    group_starts: np.ndarray
    group_slot: np.ndarray
    row_status: np.ndarray
    east_lon: np.ndarray
    west_lon: np.ndarray
    cell_class: np.ndarray


def _runs(m, periodic):
    """Runs of True in a row: (list of (west, length), circular)."""
    nx = m.size
    if not m.any():
        return [], False
    if m.all():
        return [(0, nx)], periodic
    shift = int(np.flatnonzero(~m)[0]) if periodic else 0
    mm = np.roll(m, -shift)
    d = np.diff(np.concatenate([[False], mm, [False]]).astype(np.int8))
    starts = np.flatnonzero(d == 1)
    ends = np.flatnonzero(d == -1)
    return [(int((s + shift) % nx), int(e - s)) for s, e in zip(starts, ends)], False


@dataclass
class RowGroup:
    """Runs of one row joined across large islands only, listed from east to west."""

    runs: list
    circular: bool
    east: tuple  # (kind, land body): kind 'edge', 'water' or a land class
    west: tuple

    def width(self, dx_row, nx):
        return sum(float(dx_row[(w + np.arange(n)) % nx].sum()) for w, n in self.runs)


def row_groups(m, cls_row, land_row, periodic, coast_row=None):
    """Split the True cells of one row into groups of runs joined across large islands.

    Two neighbouring runs are joined when the cells between them are all land of one large
    island. A group that closes the circle (a periodic row of water and large islands only) is
    ``circular`` and has no ends. ``coast_row[i]`` True makes the link from i to i+1 a coast.
    """
    nx = m.size
    runs, circular = _runs(m, periodic)
    if not runs:
        return []
    if circular:
        return [RowGroup(runs, True, ("water", -1), ("water", -1))]

    def kind(i):
        if i < 0 or i >= nx:
            if not periodic:
                return ("edge", -1)
            i %= nx
        c = int(cls_row[i])
        if c == OCEAN or c == SMALL_ISLAND:
            return ("water", -1)
        return (c, int(land_row[i]))

    runs.sort(key=lambda r: r[0])
    nr = len(runs)
    joined_west = []  # run k joined to run k-1 (its western neighbour)
    for k, (w, n) in enumerate(runs):
        if k == 0 and not periodic:
            joined_west.append(False)
            continue
        pw, pn = runs[k - 1]
        stop = w if w >= pw + pn else w + nx
        kinds = {kind(i % nx) for i in range(pw + pn, stop)}
        joined_west.append(len(kinds) == 1 and next(iter(kinds))[0] == LARGE_ISLAND)
    if periodic and nr > 1 and all(joined_west):
        return [RowGroup(runs[::-1], True, ("water", -1), ("water", -1))]
    if periodic and nr == 1 and joined_west[0]:
        return [RowGroup(runs, True, ("water", -1), ("water", -1))]
    # Start from a run not joined to its western neighbour and walk east.
    start = next(k for k in range(nr) if not joined_west[k])
    groups, cur = [], []
    for step in range(nr):
        k = (start + step) % nr
        if cur and not joined_west[k]:
            groups.append(cur)
            cur = []
        cur.append(runs[k])
    groups.append(cur)
    def end(i, link):
        if coast_row is not None and coast_row[link % nx]:
            return (CONTINENT, -1)
        return kind(i)

    out = []
    for g in groups:
        (ww, _), (ew, en) = g[0], g[-1]
        out.append(RowGroup(g[::-1], False, end(ew + en, ew + en - 1), end(ww - 1, ww - 1)))
    return out


def _components(n, pairs):
    graph = coo_matrix(
        (np.ones(len(pairs), dtype=np.int8), (pairs[:, 0], pairs[:, 1])), shape=(n, n)
    )
    return connected_components(graph, directed=False)[1]


def _auto_basins(water, grid, cls, land_labels, *, min_area):
    """Connected ocean regions, split where two oceans meet south (or north) of a continent.

    The rows of water are cut into row groups (runs joined across large islands); groups in
    neighbouring rows that share a cell face are linked. Where one group (a *junction*, e.g.
    the row just south of a continent's tip) links to two or more groups on the same side
    that are not otherwise connected, and at least two of those branches are larger than
    :data:`SEPARATE_OCEAN_AREA`, each large branch becomes a basin of its own; smaller
    branches (a gulf behind a peninsula) stay with the junction and are treated as marginal
    seas row by row.
    """
    ny, nx = water.shape
    node_of = np.full((ny, nx), -1, dtype=np.int64)
    n_nodes = 0
    for j in range(ny):
        for g in row_groups(water[j], cls[j], land_labels[j], grid.periodic):
            for w, n in g.runs:
                node_of[j, (w + np.arange(n)) % nx] = n_nodes
            n_nodes += 1
    if n_nodes == 0:
        return np.full(water.shape, -1, dtype=np.int64), []
    node_area = np.bincount(node_of[water], weights=grid.cell_area[water] / 1e6,
                            minlength=n_nodes)
    a, b = node_of[:-1], node_of[1:]
    link = (a >= 0) & (b >= 0)
    pairs = np.unique(np.column_stack([a[link], b[link]]), axis=0).reshape(-1, 2)
    up = [[] for _ in range(n_nodes)]
    down = [[] for _ in range(n_nodes)]
    for p, q in pairs:
        up[p].append(q)
        down[q].append(p)
    cut = set()
    for p in range(n_nodes):
        for nbrs in (up[p], down[p]):
            if len(nbrs) < 2:
                continue
            keep = (pairs[:, 0] != p) & (pairs[:, 1] != p)
            comp = _components(n_nodes, pairs[keep])
            area = np.bincount(comp, weights=node_area)
            branches = {int(comp[q]) for q in nbrs}
            big = {c for c in branches if area[c] >= SEPARATE_OCEAN_AREA}
            if len(branches) >= 2 and len(big) >= 2:
                cut.update((min(p, q), max(p, q)) for q in nbrs if int(comp[q]) in big)
    keep = np.array([(min(p, q), max(p, q)) not in cut for p, q in pairs], dtype=bool)
    comp = _components(n_nodes, pairs[keep] if pairs.size else pairs)
    labels = np.where(node_of >= 0, comp[np.maximum(node_of, 0)], -1)
    n = int(comp.max()) + 1
    area = np.bincount(labels[water], weights=grid.cell_area[water] / 1e6, minlength=n)
    keep_b = np.flatnonzero(area >= min_area)
    keep_b = keep_b[np.argsort(-area[keep_b], kind="stable")]
    out = np.full(water.shape, -1, dtype=np.int64)
    for k, lab in enumerate(keep_b):
        out[labels == lab] = k
    return out, [f"basin_{k}" for k in range(keep_b.size)]


def plan_rows(bid, cls, land_labels, grid, *, n_basins, equatorial, min_width_km, coast_e=None):
    """Work out runs, groups, row status and coasts for every basin row."""
    ny, nx = bid.shape
    periodic = grid.periodic
    edges = grid.lon_edges
    cells, run_starts = [], []
    g_runs, g_starts, g_slot = [], [], []
    status = np.full((n_basins, ny), 4, dtype=np.int8)
    east_lon = np.full((n_basins, ny), np.nan)
    west_lon = np.full((n_basins, ny), np.nan)
    cell_class = np.zeros((ny, nx), dtype=np.int8)
    n_cells = 0

    def add_run(j, w, length):
        nonlocal n_cells
        idx = (w + length - 1 - np.arange(length)) % nx
        run_starts.append(n_cells)
        cells.append(j * nx + idx)
        n_cells += length
        return len(run_starts) - 1

    for b in range(n_basins):
        for j in range(ny):
            groups = row_groups(bid[j] == b, cls[j], land_labels[j], periodic,
                                None if coast_e is None else coast_e[j])
            if not groups:
                continue
            if equatorial[j]:
                status[b, j] = 1
                continue
            widths = [g.width(grid.dx[j], nx) for g in groups]
            main = groups[int(np.argmax(widths))]
            if main.circular or main.east[0] in ("edge", "water"):
                status[b, j] = 2
                continue
            if main.west[0] in ("edge", "water"):
                st = 5
            elif max(widths) < min_width_km * 1e3:
                st = 3
            else:
                st = 0
            status[b, j] = st
            (ew, en), (ww, _) = main.runs[0], main.runs[-1]
            east_lon[b, j] = _face(edges, ew + en, nx, periodic)
            west_lon[b, j] = _face(edges, ww, nx, periodic)
            members = []
            for w, n in main.runs:
                members.append(add_run(j, w, n))
                cell_class[j, (w + np.arange(n)) % nx] = 1 if st == 0 else 3
            if st == 0:
                g_starts.append(len(g_runs))
                g_runs.extend(members)
                g_slot.append(b * ny + j)
            for g in groups:
                if g is main or g.circular or g.east[0] in ("edge", "water"):
                    continue
                for w, n in g.runs:
                    add_run(j, w, n)
                    cell_class[j, (w + np.arange(n)) % nx] = 2
    # Runs in ascending row order, so that a kernel can scan each row while it is in cache.
    run_row = _ints([c[0] // nx for c in cells])
    order = np.argsort(run_row, kind="stable")
    new_index = np.empty(order.size, dtype=np.int64)
    new_index[order] = np.arange(order.size)
    cells = [cells[k] for k in order]
    lengths = _ints([c.size for c in cells])
    return RowPlan(
        cells=np.concatenate(cells).astype(np.int64) if cells else _ints([]),
        run_starts=np.concatenate([[0], np.cumsum(lengths)[:-1]]).astype(np.int64)
        if cells else _ints([]),
        group_runs=new_index[_ints(g_runs)] if g_runs else _ints([]),
        group_starts=_ints(g_starts),
        group_slot=_ints(g_slot),
        row_status=status,
        east_lon=east_lon,
        west_lon=west_lon,
        cell_class=cell_class,
    )


def _ints(x):
    return np.asarray(x, dtype=np.int64)


def _face(edges, i, nx, periodic):
    """Longitude of the western face of column i (i may run past the last column)."""
    if 0 <= i <= nx:
        return float(edges[i])
    if periodic:
        return float(edges[i % nx] + 360.0 * (i // nx))
    return float(edges[min(max(i, 0), nx)])


# --------------------------------------------------------------------------------------------
# Public helper
# --------------------------------------------------------------------------------------------


def basin_ids(
    ocean_mask,
    *,
    basins=None,
    island_min_area_km2: float = ISLAND_MIN_AREA,
    continent_min_area_km2: float = CONTINENT_MIN_AREA,
) -> xr.DataArray:
    """Basin numbers of every cell of a land-sea mask, as :func:`~sverdrup_kit.sverdrup_transport` uses them.

    Parameters
    ----------
    ocean_mask : xarray.DataArray (lat, lon)
        True (or 1) for ocean, False/0/NaN for land; any latitude order and longitude convention.
    basins : None, "earth", DataArray or dict, optional
        As in :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport`.
    island_min_area_km2, continent_min_area_km2 : float, optional
        Land bodies below ``island_min_area_km2`` km2 are small islands and join the basin around
        them; see :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport`.

    Returns
    -------
    xarray.DataArray (lat, lon)
        ``basin_id``: int, -1 on land and outside every basin, with CF ``flag_values`` and
        ``flag_meanings`` naming the basins; on the grid and in the order of ``ocean_mask``.
    """
    from .coords import from_canonical, require_dataarray

    ocean_mask = require_dataarray(ocean_mask, "ocean_mask")
    island_min_area_km2 = _validate.number(island_min_area_km2, "island_min_area_km2",
                                           sign="non-negative", units="km2", example=1e5)
    continent_min_area_km2 = _validate.number(continent_min_area_km2, "continent_min_area_km2",
                                              sign="non-negative", units="km2", example=5e6)
    grid = SphericalGrid.from_data(ocean_mask, argname="ocean_mask")
    lay = grid.layout
    can = to_canonical(ocean_mask, lay).transpose(lay.lat_name, lay.lon_name)
    ocean = _as_bool(np.asarray(can.values), "ocean_mask")
    cls, land_labels = classify_land(
        ocean, grid, island_min_area_km2=island_min_area_km2, continent_min_area_km2=continent_min_area_km2
    )
    water = cls <= SMALL_ISLAND
    bid, names, _ = assign_basins(basins, water, grid, lay, ocean_mask, cls, land_labels,
                                  min_area=island_min_area_km2)
    out = xr.DataArray(bid.astype(np.int32), coords=can.coords, dims=can.dims)
    out = from_canonical(out, lay, ocean_mask)
    return out.rename("basin_id").assign_attrs(basin_id_attrs(names))


def basin_id_attrs(names):
    return {
        "long_name": "ocean basin number",
        "flag_values": np.arange(len(names), dtype=np.int32),
        "flag_meanings": " ".join(n.replace(" ", "_") for n in names),
        "comment": "-1 on land and in ocean outside every basin; small islands take the basin "
        "of the water around them",
    }
