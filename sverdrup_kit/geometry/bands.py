"""The geometry of the Sverdrup integral on a curvilinear model grid, by latitude band.

The model grid's rows need not follow latitude circles, so the westward integral runs along
*bands*: the cells that overlap one band of latitude by at least :data:`MEMBER_SHARE` of their
latitude extent (their centres may lie in the next band where rows tilt), in order of
longitude. Everything the regular-grid geometry decides row by row (:mod:`.rows`) is decided
here band by band, from
the same land classes (:func:`.land.land_bodies`, labelled through the model grid's own
neighbours), basins (:func:`.basins._earth_basins` on the model grid, or the user's) and Earth
seas (:func:`.basins.earth_seas`):

* a band of a basin splits into *runs* of the basin's water (ocean and the small islands it
  surrounds) wherever other cells -- land, another basin's water, an excluded sea -- lie
  between two of its cells that are farther apart in longitude than ``gap_factor`` times their
  mean longitude extent (so that the staircase of a coast that cuts a band obliquely does not
  split it);
* runs on either side of a gap holding one large island only join into a *group*; the widest
  group is the open basin, groups cut off by anything else are marginal seas, and groups that
  are mostly a counted sea (:data:`.earth.EARTH_SEAS`) with coasts at both ends count too;
* band status, coasts, crossed and ending seas follow the regular-grid rules and use its
  table (:data:`.rows.ROW_STATUS`).

Cells straddle band edges on rotated grids: a cell adds to every band its latitude extent
overlaps, by the share of the extent in that band, and joins there the run of its own kind
whose longitude span holds it (or the nearest run east of it).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .land import CONTINENT, LARGE_ISLAND, SMALL_ISLAND, LandBodies

__all__ = ["BandPlan", "ModelGeometry", "band_edges", "plan_bands"]

#: Share of its latitude extent by which a cell must overlap a band to shape the band's runs.
MEMBER_SHARE = 0.45

# What a cell is to the runs of one basin in one band.
_MEMBER, _ISLAND, _COAST, _WATER = 0, 1, 2, 3
# The kind of a gap between two runs (or beyond the last one on a regional grid).
_JOIN, _END_COAST, _END_WATER, _END_EDGE = 0, 1, 2, 3


@dataclass
class BandPlan:
    """The westward integral of one model grid and mask, band by band.

    Scan triplets (one per cell and band it overlaps, in runs, each from its eastern coast
    westward): ``cell`` (flat index), ``weight`` (m: the cell's share of the band,
    ``A frac / (R dphi)``), ``share`` (its fraction of latitude extent in the band) and
    ``starts`` (n_runs + 1). Sum triplets (the counted ones): ``sum_cell``, ``sum_slot``
    (``basin * n_bands + band``), ``sum_weight``.
    """

    band_lat: np.ndarray
    band_edges: np.ndarray
    status: np.ndarray            # (n_basins, nb) int8, ROW_STATUS codes
    east_lon: np.ndarray          # (n_basins, nb)
    west_lon: np.ndarray          # (n_basins, nb)
    crossed_seas: np.ndarray      # (n_basins, nb) str
    ending_seas: np.ndarray       # (n_basins, nb) str
    cell_class: np.ndarray        # (ny, nx) int8, CELL_CLASS codes
    cell: np.ndarray
    weight: np.ndarray
    share: np.ndarray
    starts: np.ndarray
    sum_cell: np.ndarray
    sum_slot: np.ndarray
    sum_weight: np.ndarray
    n_cells: int


@dataclass(frozen=True, eq=False)
class ModelGeometry:
    """Land, basins, seas and the band plan of one model grid, mask and set of options."""

    ocean: np.ndarray
    land: LandBodies
    basin_id: np.ndarray
    names: list
    basins_used: str
    sea_names: list
    plan: BandPlan


def band_edges(grid, band_width):
    """Band edges from 90S, ``band_width`` degrees apart (default: the grid's nominal
    spacing to three significant figures, so that a 1-degree grid gets 1-degree bands)."""
    from ..errors import InputError

    if band_width is None:
        band_width = float(f"{grid.nominal_spacing:.3g}")
    if not (np.isfinite(band_width) and band_width > 0):
        raise InputError(
            f"band_width: expected a positive number of degrees, found {band_width!r}. "
            "Fix: e.g. band_width=1.0."
        )
    n = int(np.ceil(180.0 / band_width - 1e-9))
    # The last band ends at the pole: narrower when the width does not divide 180 degrees.
    return np.minimum(-90.0 + band_width * np.arange(n + 1), 90.0)


@dataclass
class _Runs:
    """Runs of one member set in one band: member positions in the band's sequence, and per
    run its first and last member (west and east ends), its group and its end kinds."""

    first: np.ndarray
    last: np.ndarray
    group: np.ndarray
    east_kind: np.ndarray
    west_kind: np.ndarray
    east_gap: list
    west_gap: list
    circular: bool


def _gap_kind(codes, labels, ends_coastal):
    if codes.size == 0:
        return _END_EDGE
    if np.all(codes == _ISLAND) and np.unique(labels).size == 1:
        return _JOIN
    if np.any(codes != _WATER) or ends_coastal:
        return _END_COAST
    return _END_WATER


def _runs(lon, ext, member, code, label, coastal, periodic, gap_factor):
    """Runs and groups of the ``member`` cells of one band (cells sorted by longitude)."""
    pos = np.flatnonzero(member)
    n, m = lon.size, pos.size
    nxt = np.roll(pos, -1)
    dl = lon[nxt] - lon[pos]
    dl[-1] += 360.0
    between = nxt - pos - 1
    between[-1] = n - 1 - pos[-1] + pos[0]
    gap = (between > 0) & (dl > gap_factor * 0.5 * (ext[pos] + ext[nxt]))
    if not periodic:
        gap[-1] = True
    where = np.flatnonzero(gap)
    if where.size == 0:
        z = np.zeros(1, dtype=np.int64)
        return _Runs(z, z + m - 1, z, z + _END_WATER, z + _END_WATER, [[]], [[]], True)
    kinds_w, kinds_e, cells = [], [], []
    for k in where:
        if k == m - 1:
            inside = np.r_[np.arange(pos[-1] + 1, n), np.arange(0, pos[0])]
        else:
            inside = np.arange(pos[k] + 1, nxt[k])
        if not periodic and k == m - 1:
            # A regional grid: the band's two ends are the ends of the grid or coasts.
            kind = (_gap_kind(code[inside], label[inside], False) if inside.size
                    else _END_EDGE)
            kind = _END_COAST if kind == _JOIN else kind
            kinds_w.append(kind)
            kinds_e.append(kind)
        elif _gap_kind(code[inside], label[inside], False) == _JOIN:
            kinds_w.append(_JOIN)
            kinds_e.append(_JOIN)
        else:
            # Each end of a gap is what lies next to the run there: land within a cell or
            # two (the staircase of a coast crossing the band), or a coastal dividing line,
            # is a coast; another basin's water across an open dividing line is not, however
            # much land lies farther along the gap (South America seen from the Atlantic's
            # eastern end at 50S, round the globe).
            reach_w = gap_factor * ext[pos[k]]
            reach_e = gap_factor * ext[nxt[k]]
            near_w = inside[np.mod(lon[inside] - lon[pos[k]], 360.0) <= reach_w]
            near_e = inside[np.mod(lon[nxt[k]] - lon[inside], 360.0) <= reach_e]
            near_w = near_w if near_w.size else inside[:1]
            near_e = near_e if near_e.size else inside[-1:]
            # A coastal line may be flagged on either cell of the link it cuts.
            kinds_w.append(_END_COAST if (np.any(code[near_w] != _WATER) or coastal[pos[k]]
                                          or np.any(coastal[near_w])) else _END_WATER)
            kinds_e.append(_END_COAST if (np.any(code[near_e] != _WATER) or coastal[nxt[k]]
                                          or np.any(coastal[near_e])) else _END_WATER)
        cells.append(inside)
    kinds_w, kinds_e = np.asarray(kinds_w), np.asarray(kinds_e)
    # Run r: members after gap r-1 up to gap r (cyclic); its east gap is gap r.
    last = where
    first = (np.roll(where, 1) + 1) % m
    nr = where.size
    east_kind = kinds_w
    west_kind = np.roll(kinds_e, 1)
    join = kinds_w == _JOIN
    if join.all():
        z = np.zeros(1, dtype=np.int64)
        return _Runs(np.array([0]), np.array([m - 1]), z, z + _END_WATER, z + _END_WATER,
                     [[]], [[]], True)
    # Groups: runs joined eastward across large islands; start from a run whose west gap ends.
    group = np.empty(nr, dtype=np.int64)
    start = int(np.flatnonzero(~np.roll(join, 1))[0])
    g = -1
    for s in range(nr):
        r = (start + s) % nr
        if s == 0 or not join[(r - 1) % nr]:
            g += 1
        group[r] = g
    return _Runs(first, last, group, east_kind, west_kind,
                 [cells[r] for r in range(nr)], [cells[(r - 1) % nr] for r in range(nr)], False)


def _continent_arcs(land: LandBodies, lat, lon, band_of):
    """Each continent's western end and extent in longitude, and its southern and northern
    bands; continents that wrap round the globe are left out."""
    arcs = []
    cont = np.flatnonzero(land.body_class == CONTINENT)
    labels = land.labels.ravel()
    for k in cont:
        here = labels == k
        lo = np.sort(lon[here])
        gaps = np.diff(np.r_[lo, lo[0] + 360.0])
        g = int(np.argmax(gaps))
        if gaps[g] < 1e-6:
            continue
        west = lo[(g + 1) % lo.size]
        arcs.append((west, 360.0 - gaps[g], band_of[here].min(), band_of[here].max()))
    return arcs


def plan_bands(grid, land: LandBodies, bid, n_basins, *, band_width=None,
               equatorial_half_width=3.0, min_width_km=500.0, excluded=None,
               counted_sea=None, sea_id=None, sea_names=(), coast_cells=None,
               gap_factor=1.25) -> BandPlan:
    """Runs, groups, band status, coasts and seas of every basin band, and the triplets of
    the westward integral (see the module docstring and :class:`BandPlan`).

    ``bid`` (ny, nx): basin of every water cell (ocean and small islands), -1 elsewhere.
    ``excluded``/``counted_sea``/``sea_id``: Earth seas (:func:`.basins.earth_seas`).
    ``coast_cells``: cells with a link across a dividing line that stands for a coast.
    """
    ny, nx = grid.shape
    shape = (ny, nx)
    excluded = np.zeros(shape, bool) if excluded is None else excluded
    counted_sea = np.zeros(shape, bool) if counted_sea is None else counted_sea
    sea_id = np.full(shape, -1, np.int64) if sea_id is None else sea_id
    coast_cells = np.zeros(shape, bool) if coast_cells is None else coast_cells
    edges = band_edges(grid, band_width)
    nb = edges.size - 1
    centres = 0.5 * (edges[1:] + edges[:-1])
    dphi = np.deg2rad(np.diff(edges))
    lat = grid.lat.ravel()
    lon = np.mod(grid.lon.ravel(), 360.0)
    ext = grid.lon_extent.ravel()
    band_of = np.clip(np.searchsorted(edges, lat, side="right") - 1, 0, nb - 1)
    cls = land.cls.ravel()
    labels = land.labels.ravel()
    b_of = np.asarray(bid).ravel()
    water = cls <= SMALL_ISLAND
    excl = excluded.ravel() & water
    cseas = counted_sea.ravel()
    seas = sea_id.ravel()
    coastal = coast_cells.ravel()
    area = grid.cell_area.ravel()
    equatorial = np.abs(centres) < equatorial_half_width

    # The cells of a band: every cell whose latitude extent overlaps it, not only those whose
    # centres lie in it. Where the grid's rows tilt across band edges (a tripolar cap, a
    # rotated grid) the centres skip a band over whole stretches of longitude, and a band
    # built from centres alone would end there as if on a coast.
    clat, _ = grid.corners_latlon
    corners = np.stack([clat[:-1, :-1], clat[:-1, 1:], clat[1:, 1:], clat[1:, :-1]])
    lo, hi = corners.min(axis=0).ravel(), corners.max(axis=0).ravel()
    # Every band each cell's latitude extent overlaps, at all (the sums below) ...
    over_lo = np.clip(np.searchsorted(edges, lo, side="right") - 1, 0, nb - 1)
    over_hi = np.clip(np.searchsorted(edges, hi, side="left") - 1, 0, nb - 1)
    # ... and the bands whose runs it shapes: those it overlaps by at least MEMBER_SHARE of
    # its latitude extent (the round-off overlap of cells whose edges are the band's edges
    # does not count).
    ext_lat = np.maximum(hi - lo, 1e-12)
    lo_in = np.minimum(edges[np.minimum(over_lo + 1, nb)], hi) - lo >= MEMBER_SHARE * ext_lat
    hi_in = hi - np.maximum(edges[over_hi], lo) >= MEMBER_SHARE * ext_lat
    lo_band = np.where(lo_in | (over_lo == band_of), over_lo, over_lo + 1)
    hi_band = np.where(hi_in | (over_hi == band_of), over_hi, over_hi - 1)
    n_over = np.maximum(hi_band, band_of) - np.minimum(lo_band, band_of) + 1
    cell_of = np.repeat(np.arange(lat.size), n_over)
    band_all = np.repeat(np.minimum(lo_band, band_of), n_over) + (
        np.arange(cell_of.size) - np.repeat(np.cumsum(n_over) - n_over, n_over))
    # Circumpolar bands: the water of all basins wraps round with no land between.
    order = np.lexsort((lon[cell_of], band_all))
    seg = np.r_[0, np.flatnonzero(np.diff(band_all[order])) + 1, order.size]
    circ = np.zeros(nb, dtype=bool)
    per_band = {}
    for a, z in zip(seg[:-1], seg[1:]):
        idx = cell_of[order[a:z]]
        j = int(band_all[order[a]])
        per_band[j] = idx
        w = water[idx]
        if grid.periodic and w.any():
            code = np.where(w, _MEMBER, _COAST)
            circ[j] = _runs(lon[idx], ext[idx], w, code, labels[idx], coastal[idx], True,
                            gap_factor).circular
    poleward = np.zeros(nb, dtype=bool)
    south = np.flatnonzero(circ & (centres < 0))
    north = np.flatnonzero(circ & (centres > 0))
    if south.size:
        poleward[: south[0]] = True
    if north.size:
        poleward[north[-1] + 1:] = True
    arcs = _continent_arcs(land, lat, lon, band_of)

    status = np.full((n_basins, nb), 4, dtype=np.int8)
    east_lon = np.full((n_basins, nb), np.nan)
    west_lon = np.full((n_basins, nb), np.nan)
    crossed = np.full((n_basins, nb), "", dtype=object)
    ending = np.full((n_basins, nb), "", dtype=object)
    cell_class = np.zeros(ny * nx, dtype=np.int8)
    # Runs: basin, band, kind (0 basin water, 1 excluded sea), east lon, extent, slot, class.
    runs = {k: [] for k in ("b", "j", "kind", "e", "ext", "slot", "cls")}
    cell_run = np.full(ny * nx, -1, dtype=np.int64)
    spans = {}  # (b, j) -> (west lon, extent) of the counted span, for continent checks

    for j, idx in sorted(per_band.items()):
        bl, be, bb = lon[idx], ext[idx], b_of[idx]
        bw, bc, blab = water[idx], cls[idx], labels[idx]
        width = area[idx] / (grid.radius * dphi[j])
        for b in np.unique(bb[(bb >= 0) & bw]):
            b = int(b)
            mine = (bb == b) & bw
            member = mine & ~excl[idx]
            sea_member = mine & excl[idx]
            # Large islands may join runs; land, excluded seas and small islands between
            # basins end them like a coast; another basin's water ends them in open water.
            code = np.where(bc == LARGE_ISLAND, _ISLAND,
                            np.where(~bw | mine | (bb < 0) & (bc == SMALL_ISLAND), _COAST,
                                     _WATER))
            if member.any():
                _, runs_, ends = _basin_band(
                    j, b, bl, be, member, code, blab, coastal[idx], width, cseas[idx],
                    grid.periodic, gap_factor, min_width_km, equatorial[j], poleward[j],
                    status, east_lon, west_lon, spans)
                pos = np.flatnonzero(member)
                for f, last, cls_val in runs_:
                    p = pos[f:last + 1] if f <= last else np.r_[pos[f:], pos[:last + 1]]
                    slot = b * nb + j if cls_val == 1 else -1
                    k = _add_run(runs, b, j, 0, bl, be, p, slot, cls_val)
                    cells = idx[p]
                    own = cells[band_of[cells] == j]
                    cell_run[own] = k
                    cell_class[own] = cls_val
                    if slot >= 0:
                        for q in np.unique(seas[cells][seas[cells] >= 0]):
                            if sea_names[q] not in crossed[b, j].split():
                                crossed[b, j] = (crossed[b, j] + " " + sea_names[q]).strip()
                for gap_cells in ends:
                    hit = idx[gap_cells]
                    for q in np.unique(seas[hit][excl[hit] & (b_of[hit] == b)
                                                 & (seas[hit] >= 0)]):
                        if sea_names[q] not in ending[b, j].split():
                            ending[b, j] = (ending[b, j] + " " + sea_names[q]).strip()
            if sea_member.any() and not equatorial[j]:
                # Excluded seas: their own runs from their own eastern edge, never counted.
                code_s = np.where(bc == LARGE_ISLAND, _ISLAND,
                                  np.where(bw & ~mine, _WATER, _COAST))
                rs = _runs(bl, be, sea_member, code_s, blab, coastal[idx], grid.periodic,
                           gap_factor)
                if rs.circular:
                    continue
                pos = np.flatnonzero(sea_member)
                for r in np.flatnonzero(rs.east_kind == _END_COAST):
                    f, last = rs.first[r], rs.last[r]
                    p = pos[f:last + 1] if f <= last else np.r_[pos[f:], pos[:last + 1]]
                    k = _add_run(runs, b, j, 1, bl, be, p, -1, 2)
                    own = idx[p][band_of[idx[p]] == j]
                    cell_run[own] = k
                    cell_class[own] = 2

    # Continents passed whole by a band's counted span (spans_two_oceans).
    for b in range(n_basins):
        for west, length, s_band, n_band in arcs:
            for rng in (range(s_band - 1, -1, -1), range(n_band + 1, nb)):
                for j in rng:
                    sp = spans.get((b, j))
                    if sp is None or status[b, j] not in (0, 3, 8, 6):
                        break
                    if np.mod(west - sp[0], 360.0) + length > sp[1]:
                        break
                    if status[b, j] in (0, 3, 8):
                        status[b, j] = 7
    R_b, R_j, R_kind, R_slot = (np.asarray(runs[k], dtype=np.int64)
                                for k in ("b", "j", "kind", "slot"))
    R_e, R_ext = np.asarray(runs["e"], dtype=float), np.asarray(runs["ext"], dtype=float)
    # Bands found to pass a whole continent: integrated, but not counted.
    dropped = (R_slot >= 0) & (status[R_b, R_j] == 7)
    for k in np.flatnonzero(dropped):
        cell_class[cell_run == k] = 3
    R_slot[dropped] = -1
    kind_of = np.where(excl, 1, 0)

    # Triplets: every integrated cell in every band its latitude extent overlaps.
    span = np.maximum(hi - lo, 1e-12)
    has_run = cell_run >= 0
    run_key = {}
    for k in range(R_b.size):
        run_key.setdefault((int(R_b[k]), int(R_j[k]), int(R_kind[k])), []).append(k)
    run_key = {key: np.asarray(v) for key, v in run_key.items()}
    c_all, r_all, w_all, f_all, d_all = [], [], [], [], []
    cand = np.flatnonzero(has_run | (water & (b_of >= 0)))
    for off in range(int((over_hi - over_lo).max()) + 1 if cand.size else 0):
        jj = over_lo[cand] + off
        use = jj <= over_hi[cand]
        c, jj = cand[use], jj[use]
        frac = (np.minimum(hi[c], edges[jj + 1]) - np.maximum(lo[c], edges[jj])) / span[c]
        keep = frac > 0
        c, jj, frac = c[keep], jj[keep], frac[keep]
        run = np.full(c.size, -1, dtype=np.int64)
        own = (jj == band_of[c]) & has_run[c]
        run[own] = cell_run[c[own]]
        other = np.flatnonzero(~own & (b_of[c] >= 0))
        if other.size:
            keys = b_of[c[other]] * (2 * nb) + jj[other] * 2 + kind_of[c[other]]
            for key in np.unique(keys):
                t = other[keys == key]
                b, rest = divmod(int(key), 2 * nb)
                j, kind = divmod(rest, 2)
                ks = run_key.get((b, j, kind))
                if ks is None:
                    continue
                d = np.mod(R_e[ks][None, :] - lon[c[t]][:, None], 360.0)
                inside = d <= R_ext[ks][None, :] + 1e-9
                pick = np.where(inside.any(axis=1), np.argmax(inside, axis=1),
                                np.argmin(d, axis=1))
                run[t] = ks[pick]
        ok = run >= 0
        c, jj, frac, run = c[ok], jj[ok], frac[ok], run[ok]
        c_all.append(c)
        r_all.append(run)
        w_all.append(frac * area[c] / (grid.radius * dphi[jj]))
        f_all.append(frac)
        d_all.append(np.mod(R_e[run] - lon[c], 360.0))
    if c_all:
        c, run, w, fr, dist = (np.concatenate(x) for x in (c_all, r_all, w_all, f_all, d_all))
    else:
        c, run, w, fr, dist = (np.zeros(0, dt) for dt in (int, int, float, float, float))
    o = np.lexsort((dist, run))
    c, run, w, fr = c[o], run[o], w[o], fr[o]
    starts = np.r_[0, np.flatnonzero(np.diff(run)) + 1, run.size].astype(np.int64)
    slot = R_slot[run] if run.size else np.zeros(0, np.int64)
    counted = slot >= 0
    return BandPlan(
        band_lat=centres, band_edges=edges, status=status, east_lon=east_lon,
        west_lon=west_lon, crossed_seas=crossed, ending_seas=ending,
        cell_class=cell_class.reshape(shape), cell=c.astype(np.int64), weight=w, share=fr,
        starts=starts, sum_cell=c[counted].astype(np.int64), sum_slot=slot[counted],
        sum_weight=w[counted], n_cells=ny * nx)


def _add_run(runs, b, j, kind, lon, ext, p, slot, cls_val):
    """Record one run (members ``p`` of a band, west to east); returns its number."""
    e = lon[p[-1]] + 0.5 * ext[p[-1]]
    w = lon[p[0]] - 0.5 * ext[p[0]]
    for key, val in (("b", b), ("j", j), ("kind", kind), ("e", e),
                     ("ext", np.mod(e - w, 360.0) or 360.0), ("slot", slot), ("cls", cls_val)):
        runs[key].append(val)
    return len(runs["b"]) - 1


def _basin_band(j, b, lon, ext, member, code, label, coastal, width, cseas, periodic,
                gap_factor, min_width_km, equatorial, poleward, status, east_lon, west_lon,
                spans):
    """Status, coasts and runs of basin ``b`` in band ``j``: the integrated runs as (first
    member, last member, integration class 1 counted, 2 marginal, 3 uncounted band), and the
    gap cells at the ends of the counted groups (for the seas that end them)."""
    rs = _runs(lon, ext, member, code, label, coastal, periodic, gap_factor)
    pos = np.flatnonzero(member)
    m = pos.size
    mem_w = width[pos]
    cum = np.r_[0.0, np.cumsum(mem_w)]

    def run_sum(f, last, arr_cum):
        return arr_cum[last + 1] - arr_cum[f] if f <= last else (
            arr_cum[m] - arr_cum[f] + arr_cum[last + 1])

    if rs.circular:
        status[b, j] = 1 if equatorial else 2
        return int(status[b, j]), [], []
    ng = int(rs.group.max()) + 1
    gw = np.zeros(ng)
    gcs = np.zeros(ng)
    gn = np.zeros(ng)
    ccum = np.r_[0.0, np.cumsum(cseas[pos].astype(float))]
    ncum = np.arange(m + 1, dtype=float)
    g_east = np.full(ng, _END_COAST)
    g_west = np.full(ng, _END_COAST)
    g_east_run = np.full(ng, -1)
    g_west_run = np.full(ng, -1)
    for r in range(rs.first.size):
        g = rs.group[r]
        gw[g] += run_sum(rs.first[r], rs.last[r], cum)
        gcs[g] += run_sum(rs.first[r], rs.last[r], ccum)
        gn[g] += run_sum(rs.first[r], rs.last[r], ncum)
        if rs.east_kind[r] != _JOIN:
            g_east[g], g_east_run[g] = rs.east_kind[r], r
        if rs.west_kind[r] != _JOIN:
            g_west[g], g_west_run[g] = rs.west_kind[r], r
    main = int(np.argmax(gw))
    counted = np.zeros(ng, dtype=bool)
    counted[main] = True
    counted |= (gcs > 0.5 * gn) & (g_east == _END_COAST) & (g_west == _END_COAST)
    st = 0
    if gw[counted].sum() < min_width_km * 1e3:
        st = 3
    if g_west[main] != _END_COAST:
        st = 5
    # The counted span: from the western end of the westernmost counted group to the eastern
    # end of the easternmost, on the circle (the shortest arc holding them all).
    e_lon = np.array([lon[pos[rs.last[g_east_run[g]]]] + 0.5 * ext[pos[rs.last[g_east_run[g]]]]
                      for g in range(ng)])
    w_lon = np.array([lon[pos[rs.first[g_west_run[g]]]] - 0.5 * ext[pos[rs.first[g_west_run[g]]]]
                      for g in range(ng)])
    cg = np.flatnonzero(counted)
    west, extent = _span(w_lon[cg], e_lon[cg])
    if st in (0, 3) and extent > 180.0:
        st = 6
    if g_east[main] != _END_COAST:
        st = 2
    if equatorial:
        st = 1
    if st == 0 and poleward:
        st = 8
    status[b, j] = st
    if st in (0, 3, 5, 6, 8):
        east_lon[b, j] = west + extent
        west_lon[b, j] = west
        spans[(b, j)] = (west, extent)
    out, ends = [], []
    for r in range(rs.first.size):
        g = rs.group[r]
        if counted[g] and st in (0, 3, 5, 6, 8):
            out.append((rs.first[r], rs.last[r], 1 if st in (0, 8) else 3))
        elif (not counted[g]) and g_east[g] == _END_COAST and st != 1:
            out.append((rs.first[r], rs.last[r], 2))
    for g in cg:
        ends.append(rs.east_gap[g_east_run[g]])
        ends.append(rs.west_gap[g_west_run[g]])
    return st, out, ends


def _span(west, east):
    """Shortest arc (west end, extent in degrees) holding the arcs [west_k, east_k]."""
    if west.size == 1:
        return float(west[0]), float(np.mod(east[0] - west[0], 360.0) or 360.0)
    o = np.argsort(np.mod(west, 360.0))
    w, e = np.mod(west[o], 360.0), np.mod(east[o], 360.0)
    gaps = np.mod(np.roll(w, -1) - e, 360.0)
    k = int(np.argmax(gaps))
    start = w[(k + 1) % w.size]
    return float(start), float(360.0 - gaps[k])


# --------------------------------------------------------------------------------------------
# Land, basins and seas of a model grid, and the cache
# --------------------------------------------------------------------------------------------

_CACHE: dict = {}
_CACHE_SIZE = 8


def _connected_basins(water, grid, min_area_km2):
    """Connected water regions through the grid's own neighbours, largest first; regions
    under ``min_area_km2`` belong to no basin."""
    lab, n = grid.components(water)
    area = np.bincount(lab[water], weights=grid.cell_area[water] / 1e6, minlength=n)
    keep = np.flatnonzero(area >= min_area_km2)
    keep = keep[np.argsort(-area[keep], kind="stable")]
    remap = np.full(n, -1, dtype=np.int64)
    remap[keep] = np.arange(keep.size)
    return np.where(lab >= 0, remap[np.maximum(lab, 0)], -1), [f"basin_{k}" for k in
                                                               range(keep.size)]


def _assign(basins, water, grid, min_area_km2, earth):
    """Basin numbers of the water cells, names, how they were chosen and coast-like links."""
    import xarray as xr

    from ..errors import GridError, InputError
    from .basins import _earth_basins, _polygon_cells

    coast = None
    if basins is None and earth:
        bid, names, coast = _earth_basins(water, grid)
        return bid, names, "earth (detected)", coast
    if basins is None:
        bid, names = _connected_basins(water, grid, min_area_km2)
        return bid, names, "automatic", coast
    if isinstance(basins, str):
        if basins != "earth":
            raise InputError(
                f"basins: expected None, 'earth', a DataArray of basin numbers on the model grid "
                f"or a dict of polygons, found '{basins}'. Fix: basins='earth'."
            )
        bid, names, coast = _earth_basins(water, grid)
        return bid, names, "earth", coast
    if isinstance(basins, dict):
        bid = np.full(water.shape, -1, dtype=np.int64)
        names = list(basins)
        for k, name in enumerate(names):
            verts = np.asarray(basins[name], dtype=np.float64)
            if verts.ndim != 2 or verts.shape[1] != 2:
                raise InputError(
                    f"basins['{name}']: expected a list of (lon, lat) vertices, found an array "
                    f"of shape {verts.shape}. Fix: e.g. [(280, 10), (350, 10), (350, 45), "
                    "(280, 45)]."
                )
            bid[_polygon_cells(grid, verts) & water & (bid < 0)] = k
        return bid, names, "user", coast
    if isinstance(basins, xr.DataArray):
        if basins.shape != water.shape:
            raise GridError(
                f"basins: expected basin numbers on the model grid {water.shape}, found shape "
                f"{basins.shape}. Fix: compute them on the same grid."
            )
        vals = np.asarray(basins.values, dtype=np.float64)
        bid = np.where(np.isfinite(vals), vals, -1).astype(np.int64)
        meanings = str(basins.attrs.get("flag_meanings", "")).split()
        n = int(bid.max()) + 1 if bid.max() >= 0 else 0
        names = meanings if len(meanings) >= n else [f"basin_{k}" for k in range(n)]
        return np.where(water, bid, -1), names[:max(n, len(names))], "user", coast
    raise InputError(
        f"basins: expected None, 'earth', a DataArray or a dict, found "
        f"{type(basins).__name__}. Fix: basins='earth'."
    )


def model_geometry(grid, ocean, *, basins=None, island_min_area_km2, continent_min_area_km2,
                   min_width_km, equatorial_half_width, band_width=None, land_connectivity=4,
                   land_classes=None, seas=None, min_basin_area_km2=None) -> ModelGeometry:
    """Land classes, basins, Earth seas and the band plan of one model grid and mask, from an
    in-memory cache when the same grid, mask and options were seen before."""
    from .basins import _islands_join_basins, earth_seas
    from .curvilinear import _grid_key
    from .earth import looks_like_earth
    from .integral import _hashable
    from .land import land_bodies

    ocean = np.asarray(ocean, dtype=bool)
    try:
        key = _grid_key(grid.lat, grid.lon, grid.corners_xyz, grid.periodic, grid.north_fold,
                        grid.radius, ocean, _hashable(basins), island_min_area_km2,
                        continent_min_area_km2, min_width_km, equatorial_half_width,
                        band_width, land_connectivity, _hashable(land_classes),
                        _hashable(seas), min_basin_area_km2)
    except TypeError:
        # DataArray basins are not cached: their content is the key (as on regular grids).
        key = None
    if key is not None and key in _CACHE:
        return _CACHE[key]
    earth = looks_like_earth(ocean, grid.lat, grid.lon, periodic=grid.periodic,
                             cell_of=grid.cell_of_point)
    land = land_bodies(ocean, grid, island_min_area_km2=island_min_area_km2,
                       continent_min_area_km2=continent_min_area_km2,
                       connectivity=land_connectivity, land_classes=land_classes, earth=earth)
    water = land.cls <= SMALL_ISLAND
    min_area = island_min_area_km2 if min_basin_area_km2 is None else min_basin_area_km2
    bid, names, used, coast = _assign(basins, water, grid, min_area, earth)
    bid = _islands_join_basins(bid, land.cls, land.labels, grid)
    excluded = counted = sea_id = coast_cells = None
    sea_names = []
    if used.startswith("earth"):
        sea_id, sea_names, excluded, counted = earth_seas(bid, names, grid, seas=seas)
        coast_cells = np.zeros(ocean.shape, dtype=bool)
        for side, opposite in (("E", "W"), ("N", "S")):
            coast_cells |= coast[side]
            coast_cells |= grid.neighbour(coast[side].astype(float), opposite) == 1.0
    elif seas:
        raise ValueError(
            "seas: the Earth's marginal seas apply only with the Earth basins (basins='earth', "
            f"or a mask that shows the Earth's continents), found basins={basins!r}. "
            "Fix: drop seas=, or pass basins='earth'."
        )
    plan = plan_bands(grid, land, bid, len(names), band_width=band_width,
                      equatorial_half_width=equatorial_half_width, min_width_km=min_width_km,
                      excluded=excluded, counted_sea=counted, sea_id=sea_id,
                      sea_names=sea_names, coast_cells=coast_cells)
    geom = ModelGeometry(ocean=ocean, land=land, basin_id=bid, names=names, basins_used=used,
                         sea_names=sea_names, plan=plan)
    if key is not None:
        if len(_CACHE) >= _CACHE_SIZE:
            _CACHE.pop(next(iter(_CACHE)))
        _CACHE[key] = geom
    return geom
