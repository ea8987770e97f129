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

Connectivity: ocean cells connect through faces (4 neighbours); land cells connect through
faces too by default (see :mod:`.land`). Longitude wraps when the grid is periodic. Land
classes live in :mod:`.land`, the rows of the westward integral in :mod:`.rows`, the Earth's
tables in :mod:`.earth`.
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np
import xarray as xr
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components

from .. import _validate
from .coords import GridError, matching_positions, to_canonical
from .earth import COUNTED, EARTH_SEAS, EXCLUDED
from .grid import SphericalGrid
from .land import (  # noqa: F401  (re-exported: the land classes used with basins)
    CONTINENT,
    CONTINENT_MIN_AREA,
    ISLAND_MIN_AREA,
    LARGE_ISLAND,
    OCEAN,
    SMALL_ISLAND,
    land_bodies,
)
from .lines import label_cells, line_cuts
from .rows import (  # noqa: F401  (re-exported for the wrappers)
    CELL_CLASS,
    ROW_STATUS,
    RowPlan,
    find_groups,
    plan_rows,
)

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
    # are Pacific (our choice, close to the usual hydrographic one). The line starts in
    # Thailand at 18N, north of the Kra Isthmus, so that masks whose coarse coastal cells
    # join the Andaman Sea and the Gulf of Thailand cannot leak round its end.
    "indonesia": [
        (98.8, 18.0), (99.0, 15.0), (100.5, 5.5), (101.5, 0.5), (105.5, -5.0), (106.5, -6.5),
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
    # The Mediterranean and Black Sea are left out: Strait of Gibraltar (5.6W) and Suez. The
    # Suez line runs at 30.0N, between the Gulf of Suez (29.9N) and the coast at Port Said
    # (31.2N): coarse masks whose Mediterranean cells reach down to 30.5N and Red Sea cells up
    # to 29.5N still meet across it.
    "gibraltar": [(354.4, 38.0), (354.4, 34.0)],
    "suez": [(28.0, 30.0), (38.0, 30.0)],
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



def classify_land(ocean, grid: SphericalGrid, *, island_min_area_km2=ISLAND_MIN_AREA,
                  continent_min_area_km2=CONTINENT_MIN_AREA, connectivity=4,
                  land_classes=None, earth=None):
    """Class of every cell (OCEAN, SMALL_ISLAND, LARGE_ISLAND or CONTINENT) and land labels.

    A thin view of :func:`~sverdrup_kit.geometry.land.land_bodies`.
    """
    lb = land_bodies(ocean, grid, island_min_area_km2=island_min_area_km2,
                     continent_min_area_km2=continent_min_area_km2, connectivity=connectivity,
                     land_classes=land_classes, earth=earth)
    return lb.cls, lb.labels


# --------------------------------------------------------------------------------------------
# Basins
# --------------------------------------------------------------------------------------------


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


def _nearest_water_on_model_grid(water, grid, lon0, lat0, max_cells=3):
    """The water cell nearest to (lon0, lat0) within ``max_cells`` nominal cells, or None."""
    from .curvilinear import _unit

    k = min(water.size, (2 * max_cells + 1) ** 2)
    d, idx = grid._tree.query(_unit(lat0, lon0), k=k)
    near = np.atleast_1d(idx)[np.atleast_1d(d) <= max_cells * np.deg2rad(grid.nominal_spacing)]
    wet = near[water.ravel()[near]]
    return None if wet.size == 0 else np.unravel_index(int(wet[0]), water.shape)


def _earth_basins(water, grid):
    """Basin numbers of the Earth basins on ``water`` (ny, nx), the names, and the links that
    stand for a coast: (ny, nx) ``coast_e`` on a regular grid, ``{"E": ..., "N": ...}`` on a
    model grid (whose water is labelled through the grid's own neighbours)."""
    if not grid.periodic:
        raise GridError(
            "basins: 'earth' needs a global grid whose longitudes close the circle, found "
            f"{grid!r}. Fix: pass a global field, or give your own basins as masks or polygons."
        )
    coastal = [EARTH_DIVIDING_LINES[k] for k in EARTH_COASTAL_LINES]
    if np.ndim(grid.lat) == 2:
        cuts = grid.link_cuts(EARTH_DIVIDING_LINES.values())
        coast_e = grid.link_cuts(coastal)
        labels, _ = grid.components(water, cut=cuts)
        nearest = _nearest_water_on_model_grid
    else:
        cut_e, cut_n = line_cuts(grid, EARTH_DIVIDING_LINES.values())
        coast_e, _ = line_cuts(grid, coastal)
        labels, _ = label_cells(water, periodic=True, cut_east=cut_e, cut_north=cut_n)
        nearest = _nearest_water
    names = list(EARTH_BASIN_SEEDS)
    comp_of = {}
    for name, seeds in EARTH_BASIN_SEEDS.items():
        comps = set()
        for lon0, lat0 in seeds:
            hit = nearest(water, grid, lon0, lat0)
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
        if np.array_equal(a, b):
            continue
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


def _islands_join_basins(basin, cls, land_labels, grid):
    """Give a small island the basin of the water around it when that water is one basin."""
    small = cls == SMALL_ISLAND
    if not (small & (basin < 0)).any():
        return basin
    pairs = []
    model = np.ndim(grid.lat) == 2
    for axis, k in ((0, 1), (0, -1), (1, 1), (1, -1)):
        if model:
            side = {(0, 1): "S", (0, -1): "N", (1, 1): "W", (1, -1): "E"}[(axis, k)]
            nb = grid.neighbour(np.where(cls == OCEAN, basin, -2), side)
            nb_ocean = np.isfinite(nb) & (nb != -2)
            nb_basin = np.where(nb_ocean, nb, -1).astype(np.int64)
        else:
            nb_basin = np.roll(basin, k, axis=axis)
            nb_ocean = np.roll(cls == OCEAN, k, axis=axis)
            if axis == 0:
                nb_ocean[0 if k == 1 else -1] = False
            elif not grid.periodic:
                nb_ocean[:, 0 if k == 1 else -1] = False
        ok = small & nb_ocean
        pairs.append(np.column_stack([land_labels[ok], nb_basin[ok]]))
    p = np.concatenate(pairs)
    p = p[p[:, 1] >= 0]  # ocean in no basin does not count
    n = int(land_labels.max()) + 1
    nb = int(max(basin.max(), 0)) + 1
    key = np.unique(p[:, 0] * nb + p[:, 1])
    p = np.column_stack([key // nb, key % nb])
    n_basins_round = np.bincount(p[:, 0], minlength=n)
    only = np.full(n, -1, dtype=np.int64)
    single = p[n_basins_round[p[:, 0]] == 1]
    only[single[:, 0]] = single[:, 1]
    take = small & (basin < 0) & (only[np.maximum(land_labels, 0)] >= 0)
    out = basin.copy()
    out[take] = only[land_labels[take]]
    return out


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
    G = find_groups(water, cls, land_labels, grid.dx, periodic=grid.periodic)
    n_nodes = G.row.size
    if n_nodes == 0:
        return np.full(water.shape, -1, dtype=np.int64), []
    node_of = np.full(ny * nx, -1, dtype=np.int64)
    cells, _ = G.run_cells(nx)
    node_of[cells] = np.repeat(G.run_group, G.run_k1 - G.run_k0)
    node_of = node_of.reshape(ny, nx)
    node_area = np.bincount(node_of[water], weights=grid.cell_area[water] / 1e6,
                            minlength=n_nodes)
    a, b = node_of[:-1], node_of[1:]
    link = (a >= 0) & (b >= 0)
    # Neighbouring columns mostly repeat a pair: drop repeats before the (1-D) unique.
    key = np.where(link, a * n_nodes + b, -1)
    rep = np.zeros_like(link)
    rep[:, 1:] = key[:, 1:] == key[:, :-1]
    key = np.unique(key[link & ~rep])
    pairs = np.column_stack([key // n_nodes, key % n_nodes]).reshape(-1, 2)
    # Candidate junctions: nodes with two or more neighbours on one side.
    n_up = np.bincount(pairs[:, 0], minlength=n_nodes)
    n_down = np.bincount(pairs[:, 1], minlength=n_nodes)
    cut = set()
    total = float(node_area.sum())
    for p in np.flatnonzero((n_up >= 2) | (n_down >= 2)):
        for side, other in ((0, 1), (1, 0)):
            nbrs = pairs[pairs[:, side] == p, other]
            if nbrs.size < 2:
                continue
            keep = (pairs[:, 0] != p) & (pairs[:, 1] != p)
            comp = _components(n_nodes, pairs[keep])
            area = np.bincount(comp, weights=node_area)
            branches = {int(comp[q]) for q in nbrs}
            big = {c for c in branches if area[c] >= SEPARATE_OCEAN_AREA}
            if len(branches) >= 2 and len(big) >= 2 and total >= 2 * SEPARATE_OCEAN_AREA:
                cut.update((min(p, q), max(p, q)) for q in nbrs if int(comp[q]) in big)
    keep = np.array([(min(p, q), max(p, q)) not in cut for p, q in pairs], dtype=bool)
    comp = _components(n_nodes, pairs[keep] if pairs.size else pairs)
    labels = np.where(node_of >= 0, comp[np.maximum(node_of, 0)], -1)
    n = int(comp.max()) + 1
    area = np.bincount(labels[water], weights=grid.cell_area[water] / 1e6, minlength=n)
    keep_b = np.flatnonzero(area >= min_area)
    keep_b = keep_b[np.argsort(-area[keep_b], kind="stable")]
    remap = np.full(n, -1, dtype=np.int64)
    remap[keep_b] = np.arange(keep_b.size)
    out = np.where(labels >= 0, remap[np.maximum(labels, 0)], -1)
    return out, [f"basin_{k}" for k in range(keep_b.size)]


def _components(n, pairs):
    graph = coo_matrix(
        (np.ones(len(pairs), dtype=np.int8), (pairs[:, 0], pairs[:, 1])), shape=(n, n)
    )
    return connected_components(graph, directed=False)[1]


def _polygon_cells(grid, verts):
    """Cells whose centres lie inside a (lon, lat) polygon, checked only in its bounding box
    (on a regular or a model grid)."""
    from matplotlib.path import Path

    v = np.asarray(verts, dtype=np.float64)
    path = Path(v)
    lat, lon = grid.lat, grid.lon
    if lat.ndim == 2:
        inside = np.zeros(lat.shape, dtype=bool)
        lon = np.mod(lon, 360.0)
        near = (lat >= v[:, 1].min()) & (lat <= v[:, 1].max())
        for shift in (-360.0, 0.0, 360.0):
            pick = near & (lon + shift >= v[:, 0].min()) & (lon + shift <= v[:, 0].max())
            if pick.any():
                pts = np.column_stack([lon[pick] + shift, lat[pick]])
                inside[pick] |= path.contains_points(pts)
        return inside
    rows = np.flatnonzero((lat >= v[:, 1].min()) & (lat <= v[:, 1].max()))
    inside = np.zeros(grid.shape, dtype=bool)
    if rows.size == 0:
        return inside
    lo, hi = v[:, 0].min(), v[:, 0].max()
    for shift in (-720.0, -360.0, 0.0, 360.0, 720.0):
        cols = np.flatnonzero((lon - shift >= lo) & (lon - shift <= hi))
        if cols.size == 0:
            continue
        lo2, la2 = np.meshgrid(lon[cols] - shift, lat[rows])
        hit = path.contains_points(np.column_stack([lo2.ravel(), la2.ravel()]))
        inside[np.ix_(rows, cols)] |= hit.reshape(lo2.shape)
    return inside


def earth_seas(bid, names, grid, *, seas=None):
    """Marginal seas and sub-basins of the Earth basins: sea number per cell and policies.

    Returns ``sea_id`` (ny, nx; -1 outside every sea), the sea names, ``excluded`` and
    ``counted`` (ny, nx) masks. ``seas`` maps sea names to ``"counted"`` or ``"excluded"``,
    overriding :data:`~sverdrup_kit.geometry.earth.EARTH_SEAS`.
    """
    seas = dict(seas or {})
    unknown = [k for k in seas if k not in EARTH_SEAS]
    if unknown:
        raise KeyError(
            f"seas: expected names from {sorted(EARTH_SEAS)}, found {unknown}. Fix: e.g. "
            "seas={'caribbean': 'counted'}."
        )
    for k, v in seas.items():
        if v not in (COUNTED, EXCLUDED):
            raise ValueError(
                f"seas[{k!r}]: expected 'counted' or 'excluded', found {v!r}. "
                "Fix: seas={'caribbean': 'counted'}."
            )
    sea_id = np.full(grid.shape, -1, dtype=np.int64)
    excluded = np.zeros(grid.shape, dtype=bool)
    counted = np.zeros(grid.shape, dtype=bool)
    sea_names = list(EARTH_SEAS)
    for k, (name, spec) in enumerate(EARTH_SEAS.items()):
        if spec["basin"] not in names:
            continue
        b = names.index(spec["basin"])
        m = _polygon_cells(grid, spec["polygon"]) & (bid == b) & (sea_id < 0)
        sea_id[m] = k
        if seas.get(name, spec["policy"]) == EXCLUDED:
            excluded |= m
        else:
            counted |= m
    return sea_id, sea_names, excluded, counted


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
    bid = _islands_join_basins(bid, cls, land_labels, grid)
    if not (bid >= 0).any():
        raise ValueError(
            "basins: no ocean cell lies in any basin. Fix: check that the basin masks or "
            "polygons overlap the ocean (longitudes in degrees_east, polygons as (lon, lat))."
        )
    return bid, names, coast_e


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
