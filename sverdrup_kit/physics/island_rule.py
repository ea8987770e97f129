r"""Godfrey's island rule: the circulation round large islands and through open passages.

The Sverdrup integral from an eastern coast gives the transport *across* a basin but not the
streamfunction constant of an island inside it: west of the island the integral restarts at an
unknown value. Godfrey (1989) closed the problem with the depth-integrated momentum balance
integrated round a path that avoids the frictional western boundary layers.

The path (clockwise on a map): east along the latitude :math:`y_N` of the island's northern
tip to the eastern coast of its basin, south along that coast, west along the latitude
:math:`y_S` of the southern tip back to the island, and north along the island's *western*
coast (its eastern side carries the island's own western boundary current, where friction
acts). Pressure integrates to zero round any closed path; there is no flow through the coasts;
friction and nonlinearity are neglected along the path. With :math:`\mathbf U` the
depth-integrated transport and :math:`f\hat k\times\mathbf U\cdot d\mathbf l = f\,\mathbf U\cdot
\hat n\,dl` (:math:`\hat n` pointing out of the region for an anticlockwise path), what remains is
the Coriolis force on the flux across the two zonal legs, where mass conservation makes the
flux the same transport :math:`T` at both. For the clockwise path:

.. math:: T = \frac{\oint_{\rm cw}\boldsymbol\tau\cdot d\mathbf l}{\rho_0\,(f_S - f_N)},

positive northward between the island and the eastern coast (the anticlockwise path has
:math:`f_N - f_S` below: the same number). The island's streamfunction, with
:math:`\psi = 0` on the eastern coast and :math:`V = \partial_x\psi`, is :math:`\psi_I = -T`.

Discretisation
--------------
The path runs on cell faces (the coasts of a cell-centred land mask): the tips are the northern
face of the island's northernmost cell and the southern face of its southernmost cell; the
eastern coast in each row is the western face of the first land east of the island that is not
another large island (a continent, or a dividing line that stands for a coast); the western leg
follows the western faces of the island's westernmost cells. On each face the stress is the
mean of the two cells beside it; on land, where the stress is missing, both components are
carried in from the nearest ocean cell of the same row, so that a zonal face takes the stress
of its latitude and a meridional face on a coast the stress of the water beside it.

Several islands: the rule is applied island by island. A leg that meets another large island
crosses it as if it were water (with the stress carried in from the ocean), so the other
island's own circulation is ignored; the result is flagged. Islands near the equator: a zonal
leg within the equatorial band lies where friction and nonlinearity are not small; the value is
computed and flagged. An eastern coast reached across a basin boundary (the water east of the
island belongs to another basin, or the coast is another basin's) is used as it is, flagged.

References
----------
Godfrey, J. S. (1989). A Sverdrup model of the depth-integrated flow for the world ocean allowing
for island circulations. Geophysical and Astrophysical Fluid Dynamics, 45, 89-112.
Wajsowicz, R. C. (1993). The circulation of the depth-integrated flow around an island with
application to the Indonesian Throughflow. Journal of Physical Oceanography, 23, 1470-1484.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp
import xarray as xr

from .. import constants
from .._apply import whole_fields
from .._compiled.dispatch import fill_from_neighbours
from ..errors import InputError
from ..geometry.basins import (
    EARTH_COASTAL_LINES,
    EARTH_DIVIDING_LINES,
    MIN_WIDTH,
    _as_bool,
    _mask_on_grid,
)
from ..geometry.coords import (
    GridLayout,
    check_same_grid,
    matching_positions,
    require_dataarray,
    to_canonical,
)
from ..geometry.earth import EARTH_LANDMARKS
from ..geometry.grid import SphericalGrid, coriolis_parameter
from ..geometry.integral import SverdrupGeometry, build_geometry
from ..geometry.land import (
    CONTINENT,
    CONTINENT_MIN_AREA,
    ISLAND_MIN_AREA,
    LARGE_ISLAND,
    SMALL_ISLAND,
)
from ..geometry.lines import line_cuts
from ..io.units import to_si
from .ekman import DEFAULT_EQUATORIAL_HALF_WIDTH

__all__ = [
    "EARTH_RULE_ISLANDS",
    "ISLAND_RULE_STATUS",
    "PASSAGES",
    "island_rule",
    "passage_transport",
]

SV_UNITS = "1e6 m3 s-1"

#: Islands of the real Earth that the rule needs although the land classes call them
#: continents or split them at shallow straits: name -> landmarks of
#: :data:`~sverdrup_kit.geometry.earth.EARTH_LANDMARKS` whose land bodies form one island.
#: Australia with New Guinea and Tasmania is Godfrey's (1989) island for the Indonesian
#: throughflow (Torres and Bass Straits are shallow; from memory).
EARTH_RULE_ISLANDS = {
    "Australia with New Guinea": ("Australia", "New Guinea", "Tasmania"),
}

#: Landmarks of parts of continents that a coarse grid cuts off through a one-cell neck: land
#: bodies, not islands, so the rule leaves them out by default.
EARTH_CONTINENT_PARTS = ("Malay Peninsula", "Central America")

#: Passages whose throughflow is an island transport: the island, the basin the flow leaves
#: and the basin it enters. Positive from ``from`` to ``to``.
PASSAGES = {
    "indonesian": {
        "island": "Australia with New Guinea",
        "from": "pacific",
        "to": "indian",
        "comment": "Indonesian throughflow, positive from the Pacific into the Indian Ocean: "
        "the island transport of Australia with New Guinea and Tasmania (Godfrey 1989), with "
        "the Bering Strait closed so that the Americas and Eurasia share one streamfunction "
        "value; the Pacific-Arctic flow through the strait (about 1 Sv, from memory) is left "
        "out",
    },
}

#: Bits of ``island_rule_status`` (CF flag_masks).
ISLAND_RULE_STATUS = {
    1: ("equatorial_leg", "a zonal leg lies within the equatorial band, where friction and "
        "nonlinearity along the leg are not small; the value is computed"),
    2: ("eastern_coast_in_other_basin", "the water east of the island, or the eastern coast, "
        "belongs to another basin; the rule uses the coast as it is"),
    4: ("open_coast_leg", "the eastern-coast leg passes from one land body to another: a "
        "passage opens there, and its flow is missing from the rule"),
    8: ("crosses_other_island", "a leg crosses another large island as if it were water (the "
        "rule applied island by island)"),
    16: ("no_eastern_coast", "in some row of the island the water east of it wraps round the "
         "globe or ends at the edge of the grid: no rule (NaN)"),
    32: ("no_tip", "the island reaches the edge of the grid: no rule (NaN)"),
}

#: Attributes shared by every output of the rule (island_rule and sverdrup_transport).
_TRANSPORT_ATTRS = {
    "long_name": "northward transport between the island and the eastern coast of its basin "
    "from Godfrey's island rule",
    "units": SV_UNITS,
}
_STATUS_ATTRS = {
    "long_name": "quality of the island rule",
    "flag_masks": np.array(list(ISLAND_RULE_STATUS), dtype=np.int8),
    "flag_meanings": " ".join(n for n, _ in ISLAND_RULE_STATUS.values()),
    "comment": "; ".join(f"{k} {n}: {w}" for k, (n, w) in ISLAND_RULE_STATUS.items()),
}

LEGS = ("north", "east", "south", "west")
# Path variants: the base path, then each tip moved by one grid row.
_VARIANTS = ((0, 0), (1, 0), (-1, 0), (0, 1), (0, -1))  # (north shift, south shift)


# --------------------------------------------------------------------------------------------
# Geometry shared with sverdrup_transport
# --------------------------------------------------------------------------------------------


@dataclass
class LandGeometry:
    """The land and basins of one call, on the canonical grid (from grid and mask alone).

    ``coast_e`` (ny, nx): True where the link from (j, i) to (j, i+1) crosses a dividing line
    that stands for a coast (Earth basins); ``names_of_land``: name of each land body.
    """

    grid: SphericalGrid
    layout: GridLayout
    water: np.ndarray
    cls: np.ndarray
    land_labels: np.ndarray
    bid: np.ndarray
    names: list
    coast_e: np.ndarray
    earth: bool
    names_of_land: tuple


def land_geometry_from(geometry: SverdrupGeometry, layout: GridLayout) -> LandGeometry:
    """The island rule's view of a :class:`~sverdrup_kit.geometry.integral.SverdrupGeometry`."""
    g = geometry.grid
    earth = geometry.basins_used.startswith("earth")
    if earth:
        coast_e, _ = line_cuts(g, [EARTH_DIVIDING_LINES[k] for k in EARTH_COASTAL_LINES])
    else:
        coast_e = np.zeros(g.shape, dtype=bool)
    cls = geometry.land.cls
    return LandGeometry(g, layout, cls <= SMALL_ISLAND, cls, geometry.land.labels,
                        geometry.basin_id, list(geometry.names), coast_e, earth,
                        geometry.land.names)


def land_geometry(taux, tauy, *, ocean_mask, basins, island_min_area_km2,
                  continent_min_area_km2, land_connectivity, land_classes, equatorial_half_width,
                  radius, omega) -> LandGeometry:
    """Grid, land classes and basins of a stress field, as :func:`sverdrup_transport` uses them
    (the same cached geometry)."""
    grid0 = SphericalGrid.from_data(taux, argname="taux", radius=radius, omega=omega)
    lay = grid0.layout
    lat, lon = lay.lat_name, lay.lon_name
    if ocean_mask is not None:
        ocean = _as_bool(_mask_on_grid(ocean_mask, taux, lay, "ocean_mask"), "ocean_mask")
    else:
        seen = taux.notnull() & tauy.notnull()
        lead = [d for d in seen.dims if d not in (lat, lon)]
        if lead:
            seen = seen.any(lead)
        ocean = np.asarray(to_canonical(seen, lay).transpose(lat, lon).values, dtype=bool)
    ident = GridLayout(lat, lon, lay.lat, lay.lon, np.arange(lay.lat.size),
                       np.arange(lay.lon.size), lay.periodic)
    grid = SphericalGrid(lay.lat, lay.lon, lay.periodic, radius, omega, ident)
    geometry = build_geometry(
        ocean, grid, basins=basins, layout=lay, ref=taux,
        island_min_area_km2=island_min_area_km2, continent_min_area_km2=continent_min_area_km2,
        min_width_km=MIN_WIDTH, equatorial_half_width=equatorial_half_width,
        land_connectivity=land_connectivity, land_classes=land_classes)
    return land_geometry_from(geometry, lay)


# --------------------------------------------------------------------------------------------
# Which islands
# --------------------------------------------------------------------------------------------


def _body_at(geo: LandGeometry, lon0, lat0, argname, required=True):
    """Land label under the point (lon0, lat0), or of the nearest land cell within two cells.

    Not ``required``: -1 when there is none (a part of a composite island that the grid
    leaves under water)."""
    g = geo.grid
    j = int(np.argmin(np.abs(g.lat - lat0)))
    i = int(np.argmin(np.abs((g.lon - lon0 + 180.0) % 360.0 - 180.0)))
    ny, nx = g.shape
    best = None
    for dj in range(-2, 3):
        for di in range(-2, 3):
            jj, ii = j + dj, i + di
            if g.periodic:
                ii %= nx
            if 0 <= jj < ny and 0 <= ii < nx and geo.land_labels[jj, ii] >= 0:
                d = dj * dj + di * di
                if best is None or d < best[0]:
                    best = (d, int(geo.land_labels[jj, ii]))
    if best is None and not required:
        return -1
    if best is None:
        raise InputError(
            f"{argname}: expected a point on land, found only ocean within two cells of "
            f"({lon0:g}E, {lat0:g}N). Fix: give (lon, lat) of a point inside the island."
        )
    return best[1]


def default_islands(geo: LandGeometry) -> dict:
    """Name -> set of land labels: every large island (named as in
    :func:`~sverdrup_kit.geometry.land.island_table`), plus :data:`EARTH_RULE_ISLANDS` on the
    Earth."""
    out = {}
    used = set()
    if geo.earth:
        for name, marks in EARTH_RULE_ISLANDS.items():
            first, rest = marks[0], marks[1:]
            labs = {_body_at(geo, *EARTH_LANDMARKS[first], "islands")}
            labs |= {_body_at(geo, *EARTH_LANDMARKS[m], "islands", required=False)
                     for m in rest}
            labs.discard(-1)
            out[name] = labs
            used |= labs
    large = np.unique(geo.land_labels[geo.cls == LARGE_ISLAND])
    for lab in sorted(int(k) for k in large):  # bodies are numbered by decreasing area
        name = geo.names_of_land[lab]
        if lab not in used and not (geo.earth and name in EARTH_CONTINENT_PARTS):
            out[name] = {lab}
    return out


def select_islands(geo: LandGeometry, islands) -> dict:
    """Resolve the ``islands`` argument to name -> set of land labels."""
    table = default_islands(geo)
    if islands is None:
        return table
    if isinstance(islands, str) or (isinstance(islands, tuple) and len(islands) == 2
                                    and not isinstance(islands[0], (str, tuple, list))):
        islands = [islands]
    items = islands.items() if isinstance(islands, dict) else [(None, s) for s in islands]
    bodies = {n: {k} for k, n in enumerate(geo.names_of_land)}
    out = {}
    for name, spec in items:
        if isinstance(spec, str):
            labs = table.get(spec, bodies.get(spec))
            if labs is None:
                raise InputError(
                    f"islands: expected names of land bodies, found {spec!r}; the large islands "
                    f"here are {sorted(table)}. Fix: pass one of those names, a name from "
                    "island_table(ocean_mask), or a (lon, lat) point inside the island."
                )
            out[name or spec] = labs
            continue
        pts = np.asarray(spec, dtype=np.float64)
        if pts.ndim == 1:
            pts = pts[None, :]
        if pts.ndim != 2 or pts.shape[1] != 2:
            raise InputError(
                "islands: expected a name, a (lon, lat) point or a list of points per island, "
                f"found {spec!r}. Fix: e.g. islands=[(47.0, -19.0)] or "
                "{'my island': [(47.0, -19.0), (49.0, -13.0)]}."
            )
        labs = {_body_at(geo, lo, la, "islands") for lo, la in pts}
        if name is None:
            name = next((k for k, v in table.items() if v == labs), None) or " with ".join(
                geo.names_of_land[k] for k in sorted(labs))
        out[str(name)] = labs
    return out


# --------------------------------------------------------------------------------------------
# Paths
# --------------------------------------------------------------------------------------------


@dataclass
class IslandPath:
    """One island's path and its variants, as weights on the stress of every cell."""

    name: str
    labels: set
    status: int
    rows: tuple  # (jb, jt): southernmost and northernmost island rows
    corners: np.ndarray  # base path, (n, 2) corners (J, I) with unwrapped I
    legs: np.ndarray  # leg (0 north, 1 east, 2 south, 3 west) of each step between corners
    weights: list  # per variant: (Wx, Wy) sparse (4 legs, ny*nx)
    dfs: np.ndarray  # per variant: f_S - f_N
    basin: str
    coast_basin: str


def land_cells(geo: LandGeometry) -> dict:
    """Land label -> flat indices of its cells, worked out once per land geometry (one sort
    instead of one pass over the grid per island)."""
    cache = geo.__dict__.setdefault("_island_cache", {})
    if "cells" not in cache:
        flat = geo.land_labels.ravel()
        land = np.flatnonzero(flat >= 0)
        order = land[np.argsort(flat[land], kind="stable")]
        labs, starts = np.unique(flat[order], return_index=True)
        cache["cells"] = dict(zip(labs.tolist(), np.split(order, starts[1:])))
    return cache["cells"]


def _island_cells(geo: LandGeometry, labs) -> np.ndarray:
    cells = land_cells(geo)
    return np.sort(np.concatenate([cells[k] for k in labs if k in cells] or [np.zeros(0, int)]))


def _unwrap_columns(cols, nx, periodic):
    """First column of the island's span: the column after the widest gap of columns without
    island cells, so that an island across the periodic seam has contiguous columns. None when
    the island occupies every column."""
    if not periodic:
        return 0
    occ = np.zeros(nx, dtype=bool)
    occ[np.unique(cols)] = True
    if occ.all():
        return None
    start = int(np.flatnonzero(occ)[0])
    free = np.roll(~occ, -start)  # begins on an island column, so no gap wraps round
    d = np.diff(np.concatenate([[0], free.astype(np.int8), [0]]))
    a, b = np.flatnonzero(d == 1), np.flatnonzero(d == -1)
    k = int(np.argmax(b - a))
    return int((b[k] + start) % nx)


def _island_profile(rows, ucols, J):
    """Westernmost and easternmost unwrapped columns of the island in each row of ``J``.

    ``rows``, ``ucols``: row and unwrapped column of each island cell. Rows beyond the island,
    or between the pieces of a composite island, take the profile of the nearest island row
    (the southern one of two at the same distance).
    """
    occ = np.unique(rows)
    lo = np.full(occ.size, np.iinfo(np.int64).max)
    hi = np.full(occ.size, np.iinfo(np.int64).min)
    k = np.searchsorted(occ, rows)
    np.minimum.at(lo, k, ucols)
    np.maximum.at(hi, k, ucols)
    s = np.clip(np.searchsorted(occ, J), 1, max(occ.size - 1, 1))
    below = np.clip(s - 1, 0, occ.size - 1)
    above = np.clip(s, 0, occ.size - 1)
    near = np.where(np.abs(J - occ[below]) <= np.abs(occ[above] - J), below, above)
    return lo[near], hi[near]


def _eastern_coasts(geo, labs, J, start, span_end):
    """Per row of ``J``: unwrapped column of the first coast cell east of ``start``, flags and
    coast body (-1 and flag 16 where there is none).

    Scans east from ``start`` over at most one turn of the globe. A coast is a continent, or a
    dividing line that stands for a coast -- which counts only east of the island's whole span
    (``span_end``, its easternmost unwrapped column in any row): a strait inside a composite
    island (Bass Strait inside Australia with Tasmania) is not its eastern coast (body -2).
    Meeting the island itself again (round the globe) or the edge of the grid is no coast;
    another large island on the way sets flag 8.
    """
    g = geo.grid
    nx = g.shape[1]
    labs = np.fromiter(labs, dtype=np.int64)
    n = J.size
    col = np.full(n, -1, dtype=np.int64)
    body = np.full(n, -1, dtype=np.int64)
    flags = np.zeros(n, dtype=np.int64)
    gate = np.maximum(start, span_end + 1)
    todo = np.arange(n)
    # Most rows meet a coast within a few cells: scan in growing blocks of columns.
    t0, width = 0, 32
    while todo.size and t0 <= nx:
        t = np.arange(t0, min(t0 + width, nx + 1))
        i = start[todo, None] + t
        j = J[todo, None]
        c = i % nx
        lab = geo.land_labels[j, c]
        own = np.isin(lab, labs)
        edge = (i >= nx) if not g.periodic else np.zeros(i.shape, dtype=bool)
        line = (i > gate[todo, None]) & geo.coast_e[j, (i - 1) % nx]
        back = own & (i > start[todo, None])
        k = geo.cls[j, c]
        cont = ~own & (k == CONTINENT)
        event = edge | line | back | cont
        hit = event.any(axis=1)
        first = np.where(hit, event.argmax(axis=1), t.size)
        before = t[None, :] - t0 < first[:, None]
        flags[todo] |= np.where(((k == LARGE_ISLAND) & ~own & before).any(axis=1), 8, 0)
        r = np.flatnonzero(hit)
        q = first[r]
        e, li, bk = edge[r, q], line[r, q], back[r, q]
        rows = todo[r]
        # In the order the checks apply at one cell: grid edge, coastal line, the island
        # itself, a continent.
        flags[rows[e | (~li & bk)]] |= 16
        at_line = ~e & li
        at_cont = ~e & ~li & ~bk
        col[rows[at_line | at_cont]] = i[r, q][at_line | at_cont]
        body[rows[at_line]] = -2
        body[rows[at_cont]] = lab[r, q][at_cont]
        todo = todo[~hit]
        t0, width = t0 + t.size, 4 * width
    flags[todo] |= 16
    return col, flags, body


def _segments(J, a, b):
    """Corners (J, I) of straight runs along fixed J from ``a`` to ``b`` (both included)."""
    n = np.abs(b - a) + 1
    step = np.where(b > a, 1, -1)
    k = np.arange(n.sum()) - np.repeat(np.cumsum(n) - n, n)
    return np.repeat(J, n), np.repeat(a, n) + np.repeat(step, n) * k


def _path_corners(W, C, j_lo, j_hi):
    """Clockwise corners (J, I): north leg, eastern coast, south leg, western coast.

    ``W``, ``C``: westernmost island column and eastern-coast column of rows j_lo..j_hi.
    Returns the corners (n, 2) and the leg of each of the n - 1 steps.
    """
    rows = np.arange(j_lo, j_hi + 1)
    # North: from the island's north-western corner east to the coast.
    nJ, nI = _segments(np.array([j_hi + 1]), W[-1:], C[-1:])
    # East: down the coast row by row, then (last row) west to the island: the south leg.
    eJ, eI = _segments(rows[::-1], C[::-1], np.concatenate([C[::-1][1:], W[:1]]))
    # West: up the island's western coast back to the first corner.
    wJ, wI = _segments(rows + 1, W, np.concatenate([W[1:], W[-1:]]))
    J = np.concatenate([nJ, eJ, wJ])
    I = np.concatenate([nI, eI, wI])
    south = eJ.size - 1 - np.abs(C[0] - W[0])  # first corner of the south leg in eJ
    legs = np.concatenate([np.zeros(nJ.size - 1, np.int8), np.ones(south + 1, np.int8),
                           np.full(eJ.size - 1 - south, 2, np.int8),
                           np.full(wJ.size, 3, np.int8)])
    return np.column_stack([J, I]), legs


def _weights(geo, pts, legs):
    """Sparse (4 legs, ny*nx) weights on taux and tauy: the clockwise line integral.

    Each step between two corners is a cell face; it takes the mean of the cells beside it
    (one where the other lies beyond the grid) times its signed length.
    """
    g = geo.grid
    ny, nx = g.shape
    R = g.radius
    lat_e = np.deg2rad(g.lat_edges)
    pts = np.asarray(pts, dtype=np.int64)
    legs = np.asarray(legs, dtype=np.int64)
    (J0, I0), (J1, I1) = pts[:-1].T, pts[1:].T
    zonal = J0 == J1
    out = []
    for sel, is_zonal in ((zonal, True), (~zonal, False)):
        j0, i0, j1, i1, leg = J0[sel], I0[sel], J1[sel], I1[sel], legs[sel]
        if is_zonal:  # edge between cells (J-1, I) and (J, I)
            i = np.minimum(i0, i1) % nx
            s = np.where(i1 > i0, 1.0, -1.0)
            length = R * np.cos(lat_e[j0]) * g.dlon_rad[i]
            ca = np.stack([j0 - 1, j0], axis=1), np.stack([i, i], axis=1)
        else:  # edge between cells (J, I-1) and (J, I)
            j = np.minimum(j0, j1)
            s = np.where(j1 > j0, 1.0, -1.0)
            length = R * (lat_e[j + 1] - lat_e[j])
            ca = np.stack([j, j], axis=1), np.stack([(i0 - 1) % nx, i0 % nx], axis=1)
        rows, cols = ca
        use = (rows >= 0) & (rows < ny)
        w = (s * length / use.sum(axis=1))[:, None] * np.ones((1, 2))
        out.append(sp.csr_matrix(
            (w[use], (np.repeat(leg[:, None], 2, axis=1)[use], (rows * nx + cols)[use])),
            shape=(len(LEGS), ny * nx)))
    return tuple(out)


def island_paths(geo: LandGeometry, selection: dict, equatorial_half_width,
                 variants=_VARIANTS) -> list:
    """Paths of the island rule for each selected island (geometry only).

    ``variants``: the (north shift, south shift) of the tips for which weights are made; the
    base path ``(0, 0)`` must be first (it sets the status).
    """
    g = geo.grid
    ny, nx = g.shape
    f_e = coriolis_parameter(g.lat_edges, omega=g.omega)
    out = []
    for name, labs in selection.items():
        cells = _island_cells(geo, labs)
        rows_c, cols_c = cells // nx, cells % nx
        cols = np.unique(cols_c)
        shift = _unwrap_columns(cols, nx, g.periodic)
        status = 0
        jb, jt = int(rows_c[0]), int(rows_c[-1])
        if shift is None or jb == 0 or jt == ny - 1 or (not g.periodic and (
                cols[0] == 0 or cols[-1] == nx - 1)):
            status |= 32
        basin = coast_basin = ""
        weights, dfs = [None] * len(variants), np.full(len(variants), np.nan)
        corners, corner_legs = np.zeros((0, 2), np.int64), np.zeros(0, np.int8)
        if not status & 32:
            # Every variant's rows lie within one row of the island's: profile and coasts
            # worked out once for those rows.
            lo, hi = max(jb - 1, 1), min(jt + 1, ny - 2)
            J = np.arange(lo, hi + 1)
            ucols = (cols_c - shift) % nx + shift
            W, E = _island_profile(rows_c, ucols, J)
            C, fl, body = _eastern_coasts(geo, labs, J, E + 1, int(ucols.max()))
            for v, (dn, ds) in enumerate(variants):
                j_lo, j_hi = jb - ds, jt + dn
                if not (j_lo <= j_hi and j_lo >= 1 and j_hi <= ny - 2):
                    continue
                part = slice(j_lo - lo, j_hi - lo + 1)
                flags = int(np.bitwise_or.reduce(fl[part]))
                if flags & 16:
                    if (dn, ds) == (0, 0):
                        status |= 16
                    continue
                pts, legs = _path_corners(W[part], C[part], j_lo, j_hi)
                weights[v] = _weights(geo, pts, legs)
                dfs[v] = float(f_e[j_lo] - f_e[j_hi + 1])
                if (dn, ds) == (0, 0):
                    corners, corner_legs = pts, legs
                    status |= flags
                    if np.unique(body[part]).size > 1:
                        status |= 4
                    band = equatorial_half_width
                    if min(abs(g.lat_edges[j_lo]), abs(g.lat_edges[j_hi + 1])) < band:
                        status |= 1
                    jm = (jb + jt) // 2 - lo
                    e_next = (E[jm] + 1) % nx
                    c_last = (C[jm] - 1) % nx
                    b1, b2 = int(geo.bid[J[jm], e_next]), int(geo.bid[J[jm], c_last])
                    basin = geo.names[b1] if b1 >= 0 else ""
                    coast_basin = geo.names[b2] if b2 >= 0 else ""
                    if b1 != b2:
                        status |= 2
        if status & 32:
            weights, dfs = [None] * len(variants), np.full(len(variants), np.nan)
        out.append(IslandPath(name, labs, status, (jb, jt), corners, corner_legs, weights,
                              dfs, basin, coast_basin))
    return out


# --------------------------------------------------------------------------------------------
# Kernel: stress on land carried in from the ocean, then the line integrals
# --------------------------------------------------------------------------------------------


def _carry_along(a, axis, periodic):
    """Fill NaN from the nearest finite value along ``axis`` (ties go to the lower index)."""
    a = np.moveaxis(a, axis, -1)
    n = a.shape[-1]
    if periodic:
        a3 = np.concatenate([a, a, a], axis=-1)
    else:
        a3 = a
    m = a3.shape[-1]
    idx = np.arange(m)
    ok = np.isfinite(a3)
    left = np.where(ok, idx, -10 * m)
    left = np.maximum.accumulate(left, axis=-1)
    right = np.where(ok, idx, 10 * m)
    right = np.flip(np.minimum.accumulate(np.flip(right, -1), axis=-1), -1)
    take = np.where(idx - left <= right - idx, left, right)
    valid = (take >= 0) & (take < m)
    out = np.take_along_axis(a3, np.clip(take, 0, m - 1), axis=-1)
    out = np.where(valid, out, np.nan)
    if periodic:
        out = out[..., n:2 * n]
    return np.moveaxis(out, -1, axis)


@dataclass
class LineIntegrals:
    """Clockwise line integrals of the stress as sparse weights, ready for many fields.

    ``Wx``, ``Wy`` (rows, ny*nx): weights on the stress of every cell, a cell on land taking
    the stress carried in along its row (:func:`_carry_along`). Where the stress is present in
    every water cell of the rows the paths touch -- every field, once gaps are filled -- a land
    cell's carried stress is that of the nearest water cell of its row, which the grid and mask
    alone decide: ``Mx``, ``My`` (rows, m) are the same weights moved onto those water cells,
    ``source`` (m,) their flat indices, and ``dry`` (rows,) marks a path through a row with no
    water at all (NaN).
    """

    Wx: sp.csr_matrix
    Wy: sp.csr_matrix
    touched: np.ndarray  # grid rows the paths touch
    source: np.ndarray
    Mx: sp.csr_matrix
    My: sp.csr_matrix
    dry: np.ndarray


def line_integrals(Wx, Wy, water, periodic) -> LineIntegrals:
    """Precompute :class:`LineIntegrals` from stacked weights and the water mask (ny, nx)."""
    ny, nx = water.shape
    Wx, Wy = Wx.tocsr(), Wy.tocsr()
    cells = np.unique(np.concatenate([Wx.indices, Wy.indices]))
    touched = np.unique(cells // nx)
    flat = np.arange(ny * nx, dtype=np.float64).reshape(ny, nx)[touched]
    nearest = _carry_along(np.where(water[touched], flat, np.nan), -1, periodic)
    pos = np.full(ny, -1, dtype=np.int64)
    pos[touched] = np.arange(touched.size)
    near = nearest[pos[cells // nx], cells % nx]
    wet = np.isfinite(near)
    source = np.unique(near[wet].astype(np.int64))
    col = np.full(ny * nx, -1, dtype=np.int64)
    col[cells[wet]] = np.searchsorted(source, near[wet].astype(np.int64))
    dry = np.zeros(Wx.shape[0], dtype=bool)
    moved = []
    for W in (Wx, Wy):
        coo = W.tocoo()
        c = col[coo.col]
        dry[coo.row[c < 0]] = True
        keep = c >= 0
        moved.append(sp.csr_matrix((coo.data[keep], (coo.row[keep], c[keep])),
                                   shape=(W.shape[0], source.size)))
    return LineIntegrals(Wx, Wy, touched, source, moved[0], moved[1], dry)


def _prepare(tx, ty, *, water, fill_gaps, periodic):
    """Both components missing where either is and outside ``water``; gaps inside the water
    filled (``fill_gaps``) as for the integral."""
    missing = ~(np.isfinite(tx) & np.isfinite(ty)) | ~water
    tx, ty = np.where(missing, np.nan, tx), np.where(missing, np.nan, ty)
    if fill_gaps:
        tx = fill_from_neighbours(tx, target=water, periodic=periodic)
        ty = fill_from_neighbours(ty, target=water, periodic=periodic)
    return tx, ty


def _circulation(tx, ty, lines: LineIntegrals, periodic):
    """Line integrals (k, rows) of stress fields (k, ny, nx) that are NaN outside the water.

    Fields with stress in every water cell the paths need take the precomputed weights (a
    gather and one sparse product); the others (a region left without stress) carry the
    stress along each touched row first, and a path through a cell that still has none gives
    NaN.
    """
    k, ny, nx = tx.shape
    fx, fy = tx.reshape(k, ny * nx), ty.reshape(k, ny * nx)
    sx, sy = fx[:, lines.source], fy[:, lines.source]
    full = np.isfinite(sx).all(axis=1) & np.isfinite(sy).all(axis=1)
    out = np.empty((k, lines.Wx.shape[0]))
    if full.any():
        fast = (lines.Mx @ sx[full].T + lines.My @ sy[full].T).T
        out[full] = np.where(lines.dry, np.nan, fast)
    if not full.all():
        rows = lines.touched
        gx, gy = tx[~full], ty[~full]
        gx[:, rows, :] = _carry_along(gx[:, rows, :], -1, periodic)
        gy[:, rows, :] = _carry_along(gy[:, rows, :], -1, periodic)
        gx, gy = gx.reshape(-1, ny * nx), gy.reshape(-1, ny * nx)
        Wx, Wy = lines.Wx, lines.Wy
        slow = (Wx @ np.nan_to_num(gx.T, nan=0.0)).T + (Wy @ np.nan_to_num(gy.T, nan=0.0)).T
        bad = ((abs(Wx) @ np.isnan(gx).T.astype(float)).T
               + (abs(Wy) @ np.isnan(gy).T.astype(float)).T)
        out[~full] = np.where(bad > 0, np.nan, slow)
    return out


def _circulation_kernel(tx, ty, *, water, fill_gaps, periodic, lines):
    """Leg circulations (..., rows) of raw stress (..., ny, nx): gaps filled, then the lines."""
    tx, ty = _prepare(np.asarray(tx, dtype=np.float64), np.asarray(ty, dtype=np.float64),
                      water=water, fill_gaps=fill_gaps, periodic=periodic)
    lead = tx.shape[:-2]
    shape = (-1,) + tx.shape[-2:]
    out = _circulation(tx.reshape(shape), ty.reshape(shape), lines, periodic)
    return out.reshape(lead + (out.shape[-1],))


def _stack(paths, ny, nx):
    """One (rows, ny*nx) matrix pair for all islands, variants and legs, and the row table."""
    blocks_x, blocks_y, meta = [], [], []
    empty = sp.csr_matrix((len(LEGS), ny * nx))
    for p in paths:
        for w in p.weights:
            blocks_x.append(w[0] if w is not None else empty)
            blocks_y.append(w[1] if w is not None else empty)
            meta.append(w is not None)
    return sp.vstack(blocks_x).tocsr(), sp.vstack(blocks_y).tocsr(), np.asarray(meta)


def rule_transport(tx, ty, paths, geo, *, rho0, fill_gaps):
    """Leg transports (..., island, variant, leg) in 1e6 m3 s-1 from canonical SI stress."""
    g = geo.grid
    ny, nx = g.shape
    lat, lon = geo.layout.lat_name, geo.layout.lon_name
    Wx, Wy, has = _stack(paths, ny, nx)
    lines = line_integrals(Wx, Wy, geo.water, g.periodic)
    nv, nl = len(paths[0].weights), len(LEGS)
    circ = xr.apply_ufunc(
        _circulation_kernel,
        whole_fields(tx, (lat, lon)), whole_fields(ty, (lat, lon)),
        input_core_dims=[[lat, lon], [lat, lon]],
        output_core_dims=[["_row"]],
        dask="parallelized",
        output_dtypes=[np.float64],
        dask_gufunc_kwargs={"output_sizes": {"_row": Wx.shape[0]}},
        kwargs=dict(water=geo.water, fill_gaps=fill_gaps, periodic=g.periodic, lines=lines),
    )
    lead = [d for d in circ.dims if d != "_row"]
    shape = [circ.sizes[d] for d in lead]
    data = circ.data.reshape(shape + [len(paths), nv, nl])
    circ = xr.DataArray(data, dims=lead + ["island", "variant", "leg"],
                        coords={d: circ[d] for d in lead if d in circ.coords})
    dfs = np.array([p.dfs for p in paths]).reshape(len(paths), nv)
    has = has.reshape(len(paths), nv)
    denom = np.where(has, rho0 * dfs, np.nan)
    scale = xr.DataArray(1.0 / (denom * constants.SVERDRUP_IN_M3_S), dims=("island", "variant"))
    return circ * scale


# --------------------------------------------------------------------------------------------
# Public functions
# --------------------------------------------------------------------------------------------


def _check_rho0(rho0):
    if not (np.isfinite(rho0) and rho0 > 0):
        raise InputError(f"rho0: expected a finite positive density in kg m-3, found {rho0!r}. "
                         "Fix: e.g. rho0=1025.0.")


def island_rule(
    taux,
    tauy,
    *,
    ocean_mask=None,
    basins=None,
    islands=None,
    rho0: float = constants.RHO0,
    equatorial_half_width: float = DEFAULT_EQUATORIAL_HALF_WIDTH,
    island_min_area_km2: float = ISLAND_MIN_AREA,
    continent_min_area_km2: float = CONTINENT_MIN_AREA,
    land_connectivity: int = 4,
    land_classes=None,
    fill_gaps: bool = True,
    radius: float = constants.EARTH_RADIUS,
    omega: float = constants.OMEGA,
) -> xr.Dataset:
    r"""Transport between each large island and the eastern coast of its basin (Godfrey 1989).

    Parameters
    ----------
    taux, tauy : xarray.DataArray (..., lat, lon)
        Eastward and northward surface stress in Pa, missing on land, as for
        :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport`. Any latitude order and
        longitude convention; leading dimensions pass through; dask-backed input stays lazy.
    ocean_mask : xarray.DataArray (lat, lon), optional
        True for ocean; default: where the stress is present in at least one step.
    basins : None, "earth", xarray.DataArray or dict, optional
        As for :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport`; names the basin of
        each island and, with ``"earth"``, treats the coastal dividing lines as coasts, adds
        :data:`EARTH_RULE_ISLANDS` (Australia with New Guinea) and the passages of
        :data:`PASSAGES` (``passage_transport``).
    islands : None, str, list or dict, optional
        ``None``: every large island of the land classes (land bodies between
        ``island_min_area_km2`` and ``continent_min_area_km2``), named as in
        :func:`~sverdrup_kit.geometry.land.island_table` (``Madagascar`` on the Earth,
        ``land_3`` elsewhere), plus :data:`EARTH_RULE_ISLANDS` on the Earth. Otherwise names
        of land bodies, (lon, lat) points inside islands (the convention of
        ``land_classes``), or a dict name -> point or list of points (the land bodies under
        several points form one island, e.g. an island and its neighbour across a shallow
        strait).
    rho0 : float, optional
        Reference density, kg m-3.
    equatorial_half_width : float, optional
        Degrees; a zonal leg within this distance of the equator is flagged.
    island_min_area_km2, continent_min_area_km2, land_connectivity, land_classes : optional
        Land classes, as for :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport` (the
        same cached geometry).
    fill_gaps : bool, optional
        Fill stress missing in single steps inside the ocean before the line integral.
    radius, omega : float, optional
        Earth radius (m) and rotation rate (rad s-1).

    Returns
    -------
    xarray.Dataset
        Per ``island`` (and the leading dimensions of the stress):

        - ``island_transport`` (1e6 m3 s-1): northward transport between the island and the
          eastern coast, :math:`T`;
        - ``island_streamfunction`` (1e6 m3 s-1): :math:`-T`, the island's constant with zero
          on the eastern coast;
        - ``leg_transport`` (..., island, leg): the share of each leg (north, east, south,
          west) in :math:`T`; they add up to it;
        - ``tip_sensitivity`` (..., island, tip, shift): the change of :math:`T` when the
          northern or southern leg moves by -1 or +1 grid row (NaN where the island is one
          row high or the moved path has no coast);
        - ``north_tip_lat``, ``south_tip_lat`` (degrees_north), ``island_area``
          (km2), ``island_basin`` and ``eastern_coast_basin`` (names), ``island_rule_status``
          (CF flag_masks, :data:`ISLAND_RULE_STATUS`), and the path as ``path_lat`` and
          ``path_lon`` (island, path_point), NaN-padded, in the user's longitude convention;
        - with ``basins="earth"``: ``passage_transport`` (..., passage), positive from the
          passage's ``from`` basin into its ``to`` basin.

    Notes
    -----
    For the clockwise path of the module notes,

    .. math:: T = \frac{\oint_{\rm cw}\boldsymbol\tau\cdot d\mathbf l}{\rho_0 (f_S - f_N)},

    :math:`f` at the tip latitudes from the grid. Assumptions: a flat bottom (no topographic
    torque along the path), friction only in the western boundary layers (none along the
    legs or the island's western coast), no flow through the island's shelf (the coast is a
    streamline), steady linear dynamics. The rule fails where a leg runs through a boundary
    current or the equatorial band, where the bottom is not flat under the legs (a ridge east
    of the island), and for islands close to another land mass, whose own circulation the
    rule applied island by island ignores.

    Examples
    --------
    An invented closed basin between 0E and 60E, 15N to 55N, with an island from 20E to 30E
    and 30N to 40N, under easterlies that turn to westerlies:

    >>> import numpy as np, xarray as xr
    >>> lat, lon = np.arange(-89.0, 90.0, 2.0), np.arange(1.0, 360.0, 2.0)
    >>> la = lat[:, None] + 0 * lon
    >>> ocean = (lon < 60) & (la > 15) & (la < 55)
    >>> ocean &= ~((lon > 20) & (lon < 30) & (la > 30) & (la < 40))
    >>> tau = -0.1 * np.cos(np.deg2rad(4.5 * (la - 15)))
    >>> taux = xr.DataArray(np.where(ocean, tau, np.nan), coords={"lat": lat, "lon": lon},
    ...                     dims=("lat", "lon"), attrs={"units": "Pa"})
    >>> ds = island_rule(taux, 0 * taux)
    >>> ds.island_transport.round(1).values.tolist(), ds.north_tip_lat.values.tolist()
    ([-13.0], [40.0])

    References
    ----------
    Godfrey, J. S. (1989). A Sverdrup model of the depth-integrated flow for the world ocean
    allowing for island circulations. Geophys. Astrophys. Fluid Dyn. 45, 89-112.
    """
    taux = require_dataarray(taux, "taux")
    tauy = require_dataarray(tauy, "tauy")
    check_same_grid(taux, tauy, ("taux", "tauy"))
    _check_rho0(rho0)
    geo = land_geometry(taux, tauy, ocean_mask=ocean_mask, basins=basins,
                        island_min_area_km2=island_min_area_km2,
                        continent_min_area_km2=continent_min_area_km2,
                        land_connectivity=land_connectivity, land_classes=land_classes,
                        equatorial_half_width=equatorial_half_width, radius=radius,
                        omega=omega)
    selection = select_islands(geo, islands)
    if not selection:
        raise InputError(
            "islands: expected at least one island, found no large island on this mask. Fix: "
            "lower island_min_area_km2, or name islands by (lon, lat) points."
        )
    paths = island_paths(geo, selection, equatorial_half_width)
    lay = geo.layout
    tx = to_canonical(to_si(taux, "stress", argname="taux", default="Pa"), lay)
    ty = to_canonical(to_si(tauy, "stress", argname="tauy", default="Pa"), lay)
    legs = rule_transport(tx, ty, paths, geo, rho0=rho0, fill_gaps=fill_gaps)
    return _assemble(legs, paths, geo, taux, rho0=rho0, band=equatorial_half_width)


def _assemble(legs, paths, geo, original, *, rho0, band):
    g = geo.grid
    names = [p.name for p in paths]
    total = legs.sum("leg", skipna=False)
    base = total.isel(variant=0)
    refused = xr.DataArray([bool(p.status & 48) for p in paths], dims="island")
    base = base.where(~refused)
    sens = xr.concat(
        [xr.concat([total.isel(variant=2) - base, total.isel(variant=1) - base], "shift"),
         xr.concat([total.isel(variant=4) - base, total.isel(variant=3) - base], "shift")],
        "tip",
    )
    # Variants (see _VARIANTS): north tip -1 row is 2, +1 is 1; south tip -1 is 4, +1 is 3.
    sens = sens.transpose(..., "island", "tip", "shift")
    user_lon = np.asarray(original[geo.layout.lon_name].values, float)
    lo = float(np.min(user_lon))
    d = float(np.min(np.abs(np.diff(user_lon)))) if user_lon.size > 1 else 0.0
    npts = max([len(p.corners) for p in paths] + [1])
    plat = np.full((len(paths), npts), np.nan)
    plon = np.full((len(paths), npts), np.nan)
    nlat = np.full(len(paths), np.nan)
    slat = np.full(len(paths), np.nan)
    area = np.zeros(len(paths))
    edges_lon = g.lon_edges
    nx = g.shape[1]
    for k, p in enumerate(paths):
        area[k] = g.cell_area.ravel()[_island_cells(geo, p.labels)].sum() / 1e6
        if p.status & 48:
            continue
        nlat[k] = g.lat_edges[p.rows[1] + 1]
        slat[k] = g.lat_edges[p.rows[0]]
        J, I = p.corners.T
        x = edges_lon[I % nx] + 360.0 * (I // nx) if g.periodic else edges_lon[np.clip(I, 0, nx)]
        base_lon = lo - d / 2.0
        x0 = base_lon + np.mod(x[0] - base_lon, 360.0)
        plat[k, : J.size] = g.lat_edges[J]
        plon[k, : J.size] = x - x[0] + x0  # unwrapped along the path, so a line plots whole
    island = xr.DataArray(np.array(names, dtype=object), dims="island", name="island",
                          attrs={"long_name": "island"})
    ds = xr.Dataset(
        {
            "island_transport": base.assign_attrs(
                **_TRANSPORT_ATTRS,
                comment="T = (clockwise line integral of the stress) / (rho0 (f_S - f_N)); "
                "NaN where island_rule_status has no_eastern_coast or no_tip"),
            "island_streamfunction": (-base).assign_attrs(
                long_name="streamfunction on the island from Godfrey's island rule",
                units=SV_UNITS, comment="-island_transport: zero on the eastern coast"),
            "leg_transport": legs.isel(variant=0).where(~refused).assign_attrs(
                long_name="share of each leg of the path in the island transport",
                units=SV_UNITS, comment="north: east along the northern tip; east: south along "
                "the eastern coast; south: west along the southern tip; west: north along the "
                "island's western coast. Their sum is island_transport"),
            "tip_sensitivity": sens.where(~refused).assign_attrs(
                long_name="change of the island transport when a tip moves by one grid row",
                units=SV_UNITS, comment="shift +1: the leg one row further from the island "
                "(north for the northern tip, south for the southern); -1: one row into it"),
            "north_tip_lat": ("island", nlat, {"long_name": "latitude of the northern leg",
                                               "units": "degrees_north",
                                               "comment": "northern face of the island's "
                                               "northernmost cell"}),
            "south_tip_lat": ("island", slat, {"long_name": "latitude of the southern leg",
                                               "units": "degrees_north",
                                               "comment": "southern face of the island's "
                                               "southernmost cell"}),
            "island_area": ("island", area, {"long_name": "area of the island", "units": "km2"}),
            "island_basin": ("island", np.array([p.basin for p in paths], dtype=object),
                             {"long_name": "basin of the water east of the island"}),
            "eastern_coast_basin": ("island", np.array([p.coast_basin for p in paths],
                                                       dtype=object),
                                    {"long_name": "basin of the water at the eastern coast"}),
            "island_rule_status": ("island", np.array([p.status for p in paths], np.int8),
                                   _STATUS_ATTRS),
            "path_lat": (("island", "path_point"), plat,
                         {"long_name": "latitude of the island rule's path", "units":
                          "degrees_north", "comment": "cell faces, clockwise from the "
                          "western end of the northern leg; NaN-padded"}),
            "path_lon": (("island", "path_point"), plon,
                         {"long_name": "longitude of the island rule's path", "units":
                          "degrees_east", "comment": "unwrapped along the path (may pass 360)"}),
        },
        coords={"island": island, "leg": ("leg", list(LEGS)),
                "tip": ("tip", ["north", "south"]), "shift": ("shift", [-1, 1])},
    )
    through = _passages(base.variable, names) if geo.earth else None
    if through is not None:
        ds = ds.assign_coords(passage=through[1])
        ds["passage_transport"] = through[0]
    ds.attrs.update(
        rho0=rho0, equatorial_half_width=band,
        method="Godfrey (1989) island rule, applied island by island; path on cell faces, "
        "clockwise: east along the northern tip, south along the eastern coast, west along the "
        "southern tip, north along the island's western coast",
        assumptions="flat bottom; friction only in western boundary layers; no flow through "
        "the island's shelf; steady linear dynamics",
        references="Godfrey, J. S. (1989), Geophys. Astrophys. Fluid Dyn. 45, 89-112",
    )
    return ds


def _passages(base, names):
    """The island transports that are passage throughflows: (Variable (..., passage), names)
    or None. ``base``: Variable (..., island)."""
    keep = [k for k, spec in PASSAGES.items() if spec["island"] in names]
    if not keep:
        return None
    at = [names.index(PASSAGES[k]["island"]) for k in keep]
    v = base.isel(island=at)
    attrs = {
        "long_name": "throughflow of an open passage from Godfrey's island rule",
        "units": SV_UNITS,
        "comment": "; ".join(f"{k}: {PASSAGES[k]['comment']}" for k in keep),
        "passage_from": " ".join(PASSAGES[k]["from"] for k in keep),
        "passage_to": " ".join(PASSAGES[k]["to"] for k in keep),
    }
    dims = tuple("passage" if d == "island" else d for d in v.dims)
    return xr.Variable(dims, v.data, attrs), keep


def passage_transport(taux, tauy, *, passage="indonesian", ocean_mask=None,
                      rho0: float = constants.RHO0, **kwargs) -> xr.DataArray:
    r"""Throughflow of an open passage between the Earth's basins from Godfrey's island rule.

    Parameters
    ----------
    taux, tauy : xarray.DataArray (..., lat, lon)
        Surface stress on a global grid of the real Earth, Pa.
    passage : str or list of str, optional
        Names from :data:`PASSAGES`; ``"indonesian"``: the Indonesian throughflow, positive
        from the Pacific into the Indian Ocean.
    ocean_mask : xarray.DataArray (lat, lon), optional
        True for ocean (a topographic mask gives the coasts better than missing stress).
    rho0 : float, optional
        Reference density, kg m-3.
    **kwargs
        Passed to :func:`island_rule` (``equatorial_half_width``, ``fill_gaps``, ...).

    Returns
    -------
    xarray.DataArray (..., passage)
        ``passage_transport``, 1e6 m3 s-1, with ``passage_from``/``passage_to`` in the
        attributes.

    Notes
    -----
    The Indonesian throughflow is the island transport of Australia with New Guinea and
    Tasmania: with the Bering Strait closed the Americas and Eurasia share one streamfunction
    value, so the flow round the island from the Pacific into the Indian Ocean equals the
    northward transport between the island and South America (Godfrey 1989). Observed: about
    15 Sv (Sprintall et al. 2009, J. Geophys. Res. 114, C07001, INSTANT 2004-06).

    References
    ----------
    Godfrey, J. S. (1989). Geophys. Astrophys. Fluid Dyn. 45, 89-112.
    """
    wanted = [passage] if isinstance(passage, str) else list(passage)
    for p in wanted:
        if p not in PASSAGES:
            raise InputError(f"passage: expected one of {sorted(PASSAGES)}, found {p!r}. Fix: "
                             "passage='indonesian'.")
    islands = sorted({PASSAGES[p]["island"] for p in wanted})
    ds = island_rule(taux, tauy, ocean_mask=ocean_mask, basins="earth", islands=islands,
                     rho0=rho0, **kwargs)
    out = ds.passage_transport.sel(passage=wanted)
    return out.rename("passage_transport")


# --------------------------------------------------------------------------------------------
# Island constants for the Sverdrup streamfunction (called by sverdrup_transport)
# --------------------------------------------------------------------------------------------


@dataclass
class _RunTable:
    """What sets the constant of each run of the westward integral, resolved once per grid,
    mask and options so that a field needs only gathers and sparse products.

    A run starting on an island's western coast takes the island's constant; a run starting on
    open water continues the water east of it: the value at the western face of the cell
    across (``across``) plus that run's own constant, and so on along the chain of passages
    until a run with an island's constant or none.
    """

    const_runs: np.ndarray  # runs that carry a constant
    const_island: np.ndarray  # per const run: island at the end of its chain, -1 none
    chain: sp.csr_matrix  # (const runs, across cells): the faces summed along the chain
    across_cells: np.ndarray  # flat cells whose western-face value a chain adds
    const_cells: np.ndarray  # flat cells of the const runs
    const_of_cell: np.ndarray  # const run (position in const_runs) of each of those cells
    bc_cells: np.ndarray  # western cell of each run whose boundary current is reported
    bc_land: np.ndarray  # island west of that run (-1 none: column n_islands of a padded table)
    basin_slot: np.ndarray  # b * ny + j of the bc runs that are a valid row's main run, -1 none
    island_sum: sp.csr_matrix  # (n_islands * ny, bc runs): the other bc runs summed per island row
    island_seen: np.ndarray  # (n_islands * ny,): rows of each island with such a run
    affected: np.ndarray  # (n_basins * ny,): a main run of the row has a constant or an island


def _run_table(plan, geo, paths):
    g = geo.grid
    ny, nx = g.shape
    n_runs = plan.run_starts.size
    n_isl = len(paths)
    lengths = np.diff(np.concatenate([plan.run_starts, [plan.cells.size]])).astype(np.int64)
    east = plan.cells[plan.run_starts]
    west = plan.cells[plan.run_starts + lengths - 1]
    row = east // nx
    ie, iw = east % nx, west % nx
    run_of = np.full(ny * nx, -1, dtype=np.int64)
    run_of[plan.cells] = np.repeat(np.arange(n_runs), lengths)
    # Land label -> island index (refused islands carry no constant); the last entry is for
    # label -1 (water).
    island_of = np.full(geo.land_labels.max() + 2, -1, dtype=np.int64)
    for k, p in enumerate(paths):
        if not p.status & 48:
            island_of[list(p.labels)] = k
    lab = geo.land_labels
    if geo.earth:
        cut, _ = line_cuts(g, [EARTH_DIVIDING_LINES["indonesia"]])
    else:
        cut = np.zeros((ny, nx), dtype=bool)
    kind = np.zeros(n_runs, dtype=np.int8)  # 0 none (continent: zero), 1 island, 2 passage
    source = np.full(n_runs, -1, dtype=np.int64)
    qe = ie + 1
    has_e = (qe < nx) | g.periodic
    qe %= nx
    # A run that ends on open water (the Indonesian line, or the edge of a marginal sea that
    # the Earth basins leave out) continues the water east of it; the other coastal lines
    # stand for land the grid misses (Central America, Bass Strait).
    opens = cut[row, ie] | ~geo.coast_e[row, ie]
    east_run = run_of[row * nx + qe]
    passage = has_e & opens & geo.water[row, qe] & (east_run >= 0)
    kind[passage], source[passage] = 2, east_run[passage]
    isl_e = island_of[lab[row, qe]]
    on_island = has_e & ~passage & (isl_e >= 0)
    kind[on_island], source[on_island] = 1, isl_e[on_island]
    qw = iw - 1
    has_w = (qw >= 0) | g.periodic
    west_island = np.where(has_w, island_of[lab[row, qw % nx]], -1)
    # Chains of passages: follow each to a run that is not a passage. A chain that never gets
    # there goes round a loop of passages, where no constant can be carried: none.
    k2 = np.flatnonzero(kind == 2)
    reaches = np.zeros(n_runs, dtype=bool)
    reaches[k2] = kind[source[k2]] != 2
    while True:
        more = reaches[k2] | reaches[source[k2]]
        if np.array_equal(more, reaches[k2]):
            break
        reaches[k2] = more
    kind[k2[~reaches[k2]]] = 0
    const_runs = np.flatnonzero(kind != 0)
    pos = np.full(n_runs, -1, dtype=np.int64)
    pos[const_runs] = np.arange(const_runs.size)
    end = const_runs.copy()
    owners, faces = [], []
    live = np.flatnonzero(kind[end] == 2)
    while live.size:
        owners.append(live)
        faces.append(row[end[live]] * nx + qe[end[live]])
        end[live] = source[end[live]]
        live = live[kind[end[live]] == 2]
    const_island = np.where(kind[end] == 1, source[end], -1)
    owners = np.concatenate(owners or [np.zeros(0, np.int64)])
    faces = np.concatenate(faces or [np.zeros(0, np.int64)])
    across_cells, col = np.unique(faces, return_inverse=True)
    chain = sp.csr_matrix((np.ones(owners.size), (owners, col)),
                          shape=(const_runs.size, across_cells.size))
    in_const = pos[np.repeat(np.arange(n_runs), lengths)]
    const_cells = plan.cells[in_const >= 0]
    const_of_cell = in_const[in_const >= 0]
    # The westernmost main run of each valid basin row, and the runs against an island.
    b = geo.bid[row, iw]
    valid_row = (b >= 0) & (plan.cell_class[row, iw] == 1)
    valid_row[valid_row] = plan.row_status[b[valid_row], row[valid_row]] == 0
    slot = b * ny + row
    affected = np.zeros(len(geo.names) * ny, dtype=bool)
    affected[slot[valid_row & ((kind != 0) | (west_island >= 0))]] = True
    d = np.full(n_runs, np.inf)
    d[valid_row] = (g.lon_edges[iw[valid_row]] - plan.west_lon[b[valid_row],
                                                                 row[valid_row]]) % 360.0
    main = valid_row & (np.minimum(d, 360.0 - d) < 1e-6)
    other = (west_island >= 0) & ~main
    bc_runs = np.flatnonzero(main | other)
    basin_slot = np.where(main[bc_runs], slot[bc_runs], -1)
    sel = other[bc_runs]
    target = west_island[bc_runs[sel]] * ny + row[bc_runs[sel]]
    island_sum = sp.csr_matrix((np.ones(target.size), (target, np.flatnonzero(sel))),
                               shape=(n_isl * ny, bc_runs.size))
    island_seen = np.zeros(n_isl * ny, dtype=bool)
    island_seen[target] = True
    return _RunTable(const_runs, const_island, chain, across_cells, const_cells, const_of_cell,
                     west[bc_runs], west_island[bc_runs], basin_slot, island_sum, island_seen,
                     affected)


def _constants_kernel(tx, ty, psi, v, transport, *, lines, scale, table, dx_half, water,
                      periodic, prepared, fill_gaps, n_basins):
    """Island transports from the rule, then the island and passage constants added to the
    scanned streamfunction, and the boundary currents; one pass for every field.

    ``prepared``: the stress is already NaN outside the water and gap-filled as ``fill_gaps``
    asks (the filled stress of the integral).
    """
    shape = psi.shape
    ny, nx = shape[-2:]
    k = int(np.prod(shape[:-2], dtype=np.int64))
    tx = np.asarray(tx, dtype=np.float64).reshape(k, ny, nx)
    ty = np.asarray(ty, dtype=np.float64).reshape(k, ny, nx)
    if not prepared and scale.size:
        tx, ty = _prepare(tx, ty, water=water, fill_gaps=fill_gaps, periodic=periodic)
    n_isl = scale.size
    if n_isl:
        circ = _circulation(tx, ty, lines, periodic).reshape(k, n_isl, len(LEGS))
        T = (circ * scale[:, None]).sum(axis=-1)
    else:
        T = np.zeros((k, 0))
    island_psi = np.where(np.isnan(T), 0.0, -T)
    P = np.asarray(psi, dtype=np.float64).reshape(k, ny * nx)
    V = np.asarray(v, dtype=np.float64).reshape(k, ny * nx)
    # Each chain adds the value at the western face of the cells across its passages, before
    # any constant (the constants themselves are summed along the chain).
    q = table.across_cells
    face = P[:, q] - V[:, q] * dx_half[q]
    Ipad = np.concatenate([island_psi, np.zeros((k, 1))], axis=1)  # column -1: no island
    off = Ipad[:, table.const_island] + (table.chain @ face.T).T
    # psi is the scan's own new array, used by nothing else: the constants go in in place,
    # which saves a whole-grid allocation per field.
    out = P if P.flags.writeable else P.copy()
    out[:, table.const_cells] += off[:, table.const_of_cell]
    # Boundary currents: the western face of a run minus the constant of the land west of it.
    w = table.bc_cells
    bc = out[:, w] - V[:, w] * dx_half[w] - Ipad[:, table.bc_land]
    basin_bc = np.full((k, n_basins * ny), np.nan)
    main = table.basin_slot >= 0
    basin_bc[:, table.basin_slot[main]] = bc[:, main]
    # Rows without constants or islands keep the exact return flow of the interior.
    Tb = np.asarray(transport, dtype=np.float64).reshape(k, n_basins * ny)
    basin_bc = np.where(table.affected, basin_bc, -Tb)
    island_bc = (table.island_sum @ bc.T).T
    island_bc[:, ~table.island_seen] = np.nan
    lead = shape[:-2]
    return (out.reshape(shape), basin_bc.reshape(lead + (n_basins, ny)),
            island_bc.reshape(lead + (n_isl, ny)), T.reshape(lead + (n_isl,)))


def _island_setup(geo: LandGeometry, plan, equatorial_half_width):
    """Paths (base variant only), their line integrals and the run table: grid, mask and
    options alone decide them, so they are kept on the (cached) land geometry and a loop over
    fields works them out once."""
    cache = geo.__dict__.setdefault("_island_cache", {})
    key = ("constants", id(plan), float(equatorial_half_width))
    if key not in cache:
        g = geo.grid
        selection = default_islands(geo)
        paths = (island_paths(geo, selection, equatorial_half_width, variants=_VARIANTS[:1])
                 if selection else [])
        lines = None
        if paths:
            Wx, Wy, _ = _stack(paths, *g.shape)
            lines = line_integrals(Wx, Wy, geo.water, g.periodic)
        cache[key] = (paths, lines, _run_table(plan, geo, paths))
    return cache[key]


def sverdrup_island_constants(tx, ty, psi, v, transport, *, geo: LandGeometry, plan, rho0,
                              fill_gaps, equatorial_half_width, prepared=False):
    """The post-scan step of :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport`.

    Each run of the westward integral that starts on the western coast of a large island
    (or of an island of :data:`EARTH_RULE_ISLANDS`) gets the island's constant from the rule;
    a run that starts on open water (the Indonesian dividing line, or the edge of a marginal
    sea the Earth basins leave out) continues the streamfunction of the water east of it.

    ``tx``, ``ty``: canonical SI stress; ``prepared``: already NaN outside the water and
    gap-filled as ``fill_gaps`` asks. ``psi`` must be the scan's own array, which nothing else
    reads: the constants are added to it in place. Returns the new streamfunction, the
    boundary current against each basin row's western coast (..., basin, lat), and the island
    variables (name -> Variable, canonical latitude order; None without islands).
    """
    lat, lon = geo.layout.lat_name, geo.layout.lon_name
    paths, lines, table = _island_setup(geo, plan, equatorial_half_width)
    n_isl = len(paths)
    g = geo.grid
    scale = np.zeros(0)
    if paths:
        has = np.array([p.weights[0] is not None for p in paths])
        denom = np.where(has, rho0 * np.array([p.dfs[0] for p in paths]), np.nan)
        scale = 1.0 / (denom * constants.SVERDRUP_IN_M3_S)
    new_psi, basin_bc, island_bc, T = xr.apply_ufunc(
        _constants_kernel,
        whole_fields(tx, (lat, lon)), whole_fields(ty, (lat, lon)),
        whole_fields(psi, (lat, lon)), whole_fields(v, (lat, lon)), transport,
        input_core_dims=[[lat, lon]] * 4 + [["basin", lat]],
        output_core_dims=[[lat, lon], ["basin", lat], ["island", lat], ["island"]],
        dask="parallelized",
        output_dtypes=[np.float64] * 4,
        dask_gufunc_kwargs={"output_sizes": {"basin": len(geo.names), "island": n_isl}},
        kwargs=dict(lines=lines, scale=scale, table=table,
                    dx_half=(0.5 * g.dx / constants.SVERDRUP_IN_M3_S).ravel(),
                    water=geo.water, periodic=g.periodic, prepared=prepared,
                    fill_gaps=fill_gaps, n_basins=len(geo.names)),
    )
    new_psi = new_psi.transpose(*psi.dims)
    if not paths:
        return new_psi, basin_bc, None
    status = np.array([p.status for p in paths], dtype=np.int8)
    names = np.array([p.name for p in paths], dtype=object)
    # Plain variables (canonical latitude order), joined to the result in one update.
    extra = {
        "island": xr.Variable("island", names, {"long_name": "island"}),
        "island_transport": xr.Variable(T.dims, T.data, {
            **_TRANSPORT_ATTRS,
            "comment": "see sverdrup_kit.island_rule; NaN where the rule is refused "
            "(island_rule_status), and the island's constant is then zero"}),
        "island_boundary_current_transport": xr.Variable(island_bc.dims, island_bc.data, {
            "long_name": "western boundary current against the eastern coast of each island",
            "units": SV_UNITS,
            "comment": "northward, per row: streamfunction at the western face of the water "
            "east of the island minus the island's constant; NaN in rows where the island "
            "has no such water. An island that is the western coast of a basin row (Australia "
            "in the Pacific) has that current in boundary_current_transport instead"}),
        "island_rule_status": xr.Variable("island", status, _STATUS_ATTRS),
        "north_tip_lat": xr.Variable("island", [g.lat_edges[p.rows[1] + 1] if not p.status & 32
                                                else np.nan for p in paths],
                                     {"long_name": "latitude of the northern leg",
                                      "units": "degrees_north"}),
        "south_tip_lat": xr.Variable("island", [g.lat_edges[p.rows[0]] if not p.status & 32
                                                else np.nan for p in paths],
                                     {"long_name": "latitude of the southern leg",
                                      "units": "degrees_north"}),
    }
    through = _passages(extra["island_transport"], list(names)) if geo.earth else None
    if through is not None:
        extra["passage_transport"] = through[0]
        extra["passage"] = xr.Variable("passage", through[1])
    return new_psi, basin_bc, extra


def add_island_variables(ds, basin_bc, islands, lat):
    """Put the island rule's results into a Sverdrup result (in the user's latitude order).

    ``islands``: name -> Variable from :func:`sverdrup_island_constants`. The new variables go
    in as plain variables on the result's own coordinates, so that the coordinates keep their
    attributes; all in one update of the result.
    """
    order = ds[lat].values
    canonical = basin_bc[lat].values
    take = None if np.array_equal(canonical, order) else matching_positions(canonical, order)

    def on_ds(v):
        return v.isel({lat: take}) if take is not None and lat in v.dims else v

    ds = ds.copy()
    bc = on_ds(basin_bc.transpose(*ds.boundary_current_transport.dims).variable)
    bc = xr.Variable(bc.dims, bc.data, {
        "long_name": "western boundary current against the western coast of the basin",
        "units": SV_UNITS,
        "comment": "northward: streamfunction at the western face of the westernmost interior "
        "cell minus the constant of the western coast (zero on a continent). With islands "
        "it is minus the interior transport plus the constant of the row's eastern coast "
        "minus the island boundary currents (island_boundary_current_transport); NaN in "
        "rows left empty (row_status)",
    })
    new = {"boundary_current_transport": bc}
    ds.sverdrup_streamfunction.attrs["comment"] = (
        ds.sverdrup_streamfunction.attrs["comment"].replace(
            "restarts at zero west of each large island", "west of a large island it starts "
            "from the island's constant from Godfrey's island rule (island_transport)"))
    if islands is not None:
        new.update({name: on_ds(v) for name, v in islands.items()})
    ds.update(new)
    ds.attrs["island_rule"] = ("Godfrey (1989): island constants of the streamfunction from "
                               "the island rule, applied island by island")
    return ds
