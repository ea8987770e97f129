"""Rows of a basin: runs of ocean, groups joined across large islands, coasts, and the plan of
the westward integral -- all rows of all basins at once, in NumPy without Python loops over
cells or rows.

Each row is rotated so that it starts on a *hard* cell (neither a member of the set nor a
large island); runs and gaps then never wrap, and prefix sums along the rotated rows tell
whether the gap between two neighbouring runs is one large island (the runs join), whether a
link is a coast, and how wide a group is.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .._compiled.dispatch import row_groups
from .._compiled.geometry import END_COAST, END_EDGE, END_WATER  # noqa: F401
from .land import CONTINENT


@dataclass
class Groups:
    """Groups of runs of one boolean set, listed by row (ascending) and west to east.

    Run arrays (n_runs,): ``run_row``, ``run_k0``/``run_k1`` (rotated columns, end
    exclusive), ``run_group``. Group arrays (n_groups,): ``row``, ``k0``/``k1`` (rotated span),
    ``width`` (m, water cells only), ``east``/``west`` (END_* kinds), ``circular``.
    ``shift`` (ny,): rotation of each row (rotated column k is column ``(k + shift) % nx``).
    """

    shift: np.ndarray
    run_row: np.ndarray
    run_k0: np.ndarray
    run_k1: np.ndarray
    run_group: np.ndarray
    row: np.ndarray
    k0: np.ndarray
    k1: np.ndarray
    width: np.ndarray
    east: np.ndarray
    west: np.ndarray
    circular: np.ndarray

    def run_cells(self, nx, runs=None):
        """Flat indices of the cells of ``runs``, each run from its eastern cell westward;
        and the offset of each run's first cell."""
        runs = np.arange(self.run_row.size) if runs is None else np.asarray(runs, np.int64)
        k0, k1, row = self.run_k0[runs], self.run_k1[runs], self.run_row[runs]
        n = k1 - k0
        starts = np.concatenate([[0], np.cumsum(n)[:-1]]).astype(np.int64)
        total = int(n.sum())
        rep = np.repeat(np.arange(runs.size), n)
        k = k1[rep] - 1 - (np.arange(total) - starts[rep])
        col = (k + self.shift[row[rep]]) % nx
        return row[rep] * nx + col, starts


def _prefix(a):
    """Prefix sums along the last axis with a leading zero: P[..., k] = sum(a[..., :k])."""
    out = np.zeros(a.shape[:-1] + (a.shape[-1] + 1,), dtype=np.float64)
    np.cumsum(a, axis=-1, out=out[..., 1:])
    return out


def find_groups(member, cls, land_labels, dx, *, periodic, coast_link=None) -> Groups:
    """Runs of ``member`` (ny, nx) in every row, joined into groups across large islands.

    Two neighbouring runs join when every cell between them is land of one large island and
    no link between them is a coast (``coast_link[j, i]``: the link from (j, i) to (j, i+1)
    stands for a coast). A periodic row of members and large islands only is circular. See
    :func:`sverdrup_kit._compiled.geometry.row_groups_numpy`.
    """
    member = np.asarray(member, dtype=bool)
    link = np.zeros(member.shape, bool) if coast_link is None else coast_link
    return Groups(*row_groups(member, cls, land_labels, dx, periodic=periodic, coast_link=link))


def per_row_argmax(row, value, ny):
    """Index of the largest ``value`` in each row (-1 where a row has none)."""
    out = np.full(ny, -1, dtype=np.int64)
    if row.size == 0:
        return out
    order = np.lexsort((-value, row))
    r = row[order]
    firsts = np.flatnonzero(np.r_[True, r[1:] != r[:-1]])
    out[r[firsts]] = order[firsts]
    return out


def continent_arcs(cls, land_labels, periodic):
    """Each continent's columns and tips: rows of (start column, number of columns, southern
    row, northern row); the columns run eastward on the circle."""
    ny, nx = cls.shape
    cont = cls == CONTINENT
    labs = np.unique(land_labels[cont])
    arcs = []
    for lab in labs:
        here = land_labels == lab
        cols = np.flatnonzero(here.any(axis=0))
        rows = np.flatnonzero(here.any(axis=1))
        if cols.size == nx:
            continue
        if periodic:
            gaps = np.diff(np.append(cols, cols[0] + nx))
            g = int(np.argmax(gaps))
            start = int(cols[(g + 1) % cols.size])
            arcs.append((start, nx - int(gaps[g]) + 1, rows[0], rows[-1]))
        else:
            arcs.append((int(cols[0]), int(cols[-1] - cols[0] + 1), rows[0], rows[-1]))
    return np.asarray(arcs, dtype=np.int64).reshape(-1, 4)


def passes_continent(arcs, kmin, kmax, shift, has, nx):
    """Rows whose span [kmin, kmax) (rotated columns) holds a whole continent's columns, in an
    unbroken run of such rows starting next to the continent's northern or southern tip."""
    ny = kmin.size
    out = np.zeros(ny, dtype=bool)
    for start, n, south, north in arcs:
        for rows in (range(south - 1, -1, -1), range(north + 1, ny)):
            for j in rows:
                if not has[j]:
                    break
                rs = (start - shift[j]) % nx
                if not (rs >= kmin[j] and rs + n <= kmax[j]):
                    break
                out[j] = True
    return out


# --------------------------------------------------------------------------------------------
# The plan of the westward integral
# --------------------------------------------------------------------------------------------

#: row_status values: (name, meaning). 0 is valid; 8 to 10 are cautions (the transport is
#: given, but the row is not valid); every other value leaves the row empty (NaN).
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
    6: ("spans_half_globe", "the counted ocean spans more than half the globe in longitude: "
        "it runs round a continent and joins two oceans"),
    7: ("spans_two_oceans", "the counted ocean passes north or south of a whole continent, "
        "joining the oceans on either side of it"),
    8: ("poleward_of_circumpolar", "caution: poleward of a latitude band where the ocean "
        "wraps round the globe; the row is closed only by the continent beyond the band "
        "(transport given)"),
    9: ("over_shelf", "caution: most of the counted ocean is shallower than shelf_depth_m, "
        "where the depth-integrated flow follows the topography (transport given)"),
    10: ("mostly_filled", "caution: fewer than half the counted cells had observed stress; "
         "the rest was filled from neighbours (transport given)"),
    11: ("pole_row", "a row of cells touching the pole, where the curl on the sphere is "
         "singular"),
}
VALID, MOSTLY_FILLED = 0, 10
CAUTIONS = (8, 9, 10)

#: integration_class values and meanings.
CELL_CLASS = {
    0: ("not_integrated", "land, ocean outside every basin, or a row left empty"),
    1: ("interior", "counted in the basin's interior transport"),
    2: ("marginal_sea", "a sea cut off from the open basin in this row by a continent, or a "
        "marginal sea that is not counted; it has its own streamfunction from its own "
        "eastern edge but is not counted"),
    3: ("uncounted_row", "streamfunction from the eastern coast, but the row is left empty "
        "(no western coast, too narrow, or it spans two oceans)"),
}


@dataclass
class RowPlan:
    """The westward integral of one call, worked out from grid and mask alone.

    ``cells``/``run_starts``: the runs to integrate, each from its eastern cell westward (flat
    indices j * nx + i), in ascending row order. ``group_runs``/``group_starts``/
    ``group_slot``: which runs add up to the interior transport of (basin, row) slot
    ``b * ny + j``. ``count_cells``/``count_starts``/``count_slot``: the counted cells of each
    slot, for per-row coverage.
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
    count_cells: np.ndarray
    count_starts: np.ndarray
    count_slot: np.ndarray
    crossed_seas: np.ndarray
    ending_seas: np.ndarray


def _ints(x):
    return np.asarray(x, dtype=np.int64)


def _face(edges, i, periodic):
    """Longitudes of the western faces of columns ``i`` (which may run past the last column)."""
    nx = edges.size - 1
    i = np.asarray(i, dtype=np.int64)
    if periodic:
        return edges[i % nx] + 360.0 * (i // nx)
    return edges[np.clip(i, 0, nx)]


def _sea_strings(slots, sea, names, n_slots):
    out = np.full(n_slots, "", dtype=object)
    ok = sea >= 0
    if not ok.any():
        return out
    pairs = np.unique(np.column_stack([slots[ok], sea[ok]]), axis=0)
    for s in np.unique(pairs[:, 0]):
        out[s] = " ".join(names[k] for k in pairs[pairs[:, 0] == s, 1])
    return out


def plan_rows(bid, cls, land_labels, grid, *, n_basins, equatorial, min_width_km,
              coast_e=None, excluded=None, counted_sea=None, sea_id=None, sea_names=(),
              depth=None, shelf_depth_m=1000.0):
    """Runs, groups, row status, coasts and seas for every basin row (see :class:`RowPlan`).

    ``excluded`` (ny, nx): cells of marginal seas that are never counted; their edges end the
    counted ocean like a coast. ``counted_sea``: cells of sub-basins counted with the basin
    even where a continent separates them from the widest run (the Bay of Bengal beside the
    Arabian Sea). ``depth`` (ny, nx), m positive down: rows mostly shallower than
    ``shelf_depth_m`` get the caution ``over_shelf``.
    """
    ny, nx = bid.shape
    periodic = grid.periodic
    edges = grid.lon_edges
    dx = grid.dx
    excluded = np.zeros((ny, nx), bool) if excluded is None else excluded
    counted_sea = np.zeros((ny, nx), bool) if counted_sea is None else counted_sea
    sea_id = np.full((ny, nx), -1, np.int64) if sea_id is None else sea_id
    coast_e = np.zeros((ny, nx), bool) if coast_e is None else coast_e
    lat_e = grid.lat_edges
    pole = np.zeros(ny, dtype=bool)
    pole[0] = lat_e[0] <= -90.0 + 1e-9
    pole[-1] = lat_e[-1] >= 90.0 - 1e-9
    empty_row = equatorial | pole

    # Rows poleward of a band where the water wraps round the globe.
    water = cls <= 1
    wg = find_groups(water, cls, land_labels, dx, periodic=periodic)
    circ = np.zeros(ny, dtype=bool)
    circ[wg.row[wg.circular]] = True
    poleward = np.zeros(ny, dtype=bool)
    south = np.flatnonzero(circ & (grid.lat < 0))
    north = np.flatnonzero(circ & (grid.lat > 0))
    if south.size:
        poleward[: south[0]] = True
    if north.size:
        poleward[north[-1] + 1:] = True
    arcs = continent_arcs(cls, land_labels, periodic)

    status = np.full((n_basins, ny), 4, dtype=np.int8)
    east_lon = np.full((n_basins, ny), np.nan)
    west_lon = np.full((n_basins, ny), np.nan)
    crossed = np.full(n_basins * ny, "", dtype=object)
    ending = np.full(n_basins * ny, "", dtype=object)
    cell_class = np.zeros((ny, nx), dtype=np.int8)
    # Per run: its cells (flat, east to west, concatenated), length, row and slot (-1: none).
    all_cells, all_lens, all_rows, run_slot = [], [], [], []
    count_cells, count_slot = [], []

    for b in range(n_basins):
        inb = bid == b
        if not inb.any():
            continue
        excl = inb & excluded
        m = inb & ~excl
        east_nb = np.roll(inb, -1, axis=1)
        ex_nb = np.roll(excl, -1, axis=1)
        link = coast_e | (inb & east_nb & (excl != ex_nb))
        if not periodic:
            link[:, -1] = coast_e[:, -1]
        G = find_groups(m, cls, land_labels, dx, periodic=periodic, coast_link=link)
        ng = G.row.size
        if ng == 0:
            continue
        has = np.zeros(ny, bool)
        has[G.row] = True
        main = per_row_argmax(G.row, G.width, ny)
        # Counted sub-basins beside the widest run (Earth only: counted_sea is empty elsewhere).
        gcells, gstarts = G.run_cells(nx)
        run_len = G.run_k1 - G.run_k0
        cell_group = np.repeat(G.run_group, run_len)
        in_cs = np.bincount(cell_group, weights=counted_sea.ravel()[gcells], minlength=ng)
        n_in = np.bincount(cell_group, minlength=ng)
        extra = ((in_cs > 0.5 * n_in) & (G.east == END_COAST) & (G.west == END_COAST)
                 & ~G.circular)
        counted = np.zeros(ng, bool)
        valid_main = main >= 0
        counted[main[valid_main]] = True
        counted |= extra & has[G.row]
        # Span of the counted groups in each row (rotated columns).
        kmin = np.full(ny, nx + 1, np.int64)
        kmax = np.full(ny, -1, np.int64)
        np.minimum.at(kmin, G.row[counted], G.k0[counted])
        np.maximum.at(kmax, G.row[counted], G.k1[counted])
        wsum = np.zeros(ny)
        np.add.at(wsum, G.row[counted], G.width[counted])
        mg = np.maximum(main, 0)
        st = np.full(ny, 4, dtype=np.int8)
        st[has] = 0
        st[has & (wsum < min_width_km * 1e3)] = 3
        st[has & (G.west[mg] != END_COAST)] = 5
        # Half the globe and whole continents inside the span.
        span = np.where(has, _face(edges, np.clip(kmax, 0, nx) + G.shift, periodic)
                        - _face(edges, np.clip(kmin, 0, nx) + G.shift, periodic), 0.0)
        inside = passes_continent(arcs, kmin, kmax, G.shift, has, nx)
        ok_far = (st == 0) | (st == 3)
        st[has & ok_far & inside] = 7
        st[has & ok_far & (span > 180.0)] = 6
        st[has & (G.circular[mg] | (G.east[mg] != END_COAST))] = 2
        st[has & empty_row] = np.where(equatorial, 1, 11)[has & empty_row]
        st[has & (st == 0) & poleward] = 8
        status[b] = st

        # Runs to integrate: counted groups of rows with an eastern coast, and marginal ones.
        with_east = np.isin(st, (0, 3, 5, 6, 7, 8))
        g_count = counted & with_east[G.row]
        g_marg = (~counted & (G.east == END_COAST) & ~G.circular & ~empty_row[G.row])
        slot_ok = np.isin(st, (0, 8))
        run_sel = g_count[G.run_group] | g_marg[G.run_group]
        sel = np.flatnonzero(run_sel)
        cells, starts = G.run_cells(nx, sel)
        lens = G.run_k1[sel] - G.run_k0[sel]
        all_cells.append(cells)
        all_lens.append(lens)
        all_rows.append(G.run_row[sel])
        rslot = np.where(g_count[G.run_group[sel]] & slot_ok[G.run_row[sel]],
                         b * ny + G.run_row[sel], -1)
        run_slot.append(rslot)
        cls_val = np.where(g_count[G.run_group[sel]],
                           np.where(slot_ok[G.run_row[sel]], 1, 3), 2).astype(np.int8)
        cell_class.ravel()[cells] = np.repeat(cls_val, lens)
        cslot = np.repeat(rslot, lens)
        count_cells.append(cells[cslot >= 0])
        count_slot.append(cslot[cslot >= 0])

        # Coasts of rows with an eastern coast.
        er = np.flatnonzero(with_east & has)
        east_lon[b, er] = _face(edges, kmax[er] + G.shift[er], periodic)
        west_lon[b, er] = _face(edges, kmin[er] + G.shift[er], periodic)

        # Excluded seas: their own runs, integrated as marginal seas.
        if excl.any():
            E = find_groups(excl, cls, land_labels, dx, periodic=periodic, coast_link=link)
            eg = (E.east == END_COAST) & ~E.circular & ~empty_row[E.row]
            sel = np.flatnonzero(eg[E.run_group])
            if sel.size:
                cells, starts = E.run_cells(nx, sel)
                all_cells.append(cells)
                all_lens.append(E.run_k1[sel] - E.run_k0[sel])
                all_rows.append(E.run_row[sel])
                run_slot.append(np.full(sel.size, -1, np.int64))
                cell_class.ravel()[cells] = 2
        # Seas crossed by the counted cells, and excluded seas at the counted span's ends.
        cs_cells = np.concatenate([count_cells[-1]]) if count_cells else _ints([])
        cs_slot = count_slot[-1] if count_slot else _ints([])
        crossed_b = _sea_strings(cs_slot, sea_id.ravel()[cs_cells], sea_names, n_basins * ny)
        crossed[b * ny:(b + 1) * ny] = crossed_b[b * ny:(b + 1) * ny]
        jj = np.flatnonzero(slot_ok & has)
        beyond_w = (kmin[jj] - 1 + G.shift[jj]) % nx
        beyond_e = (kmax[jj] + G.shift[jj]) % nx
        for cols in (beyond_w, beyond_e):
            s_at = sea_id[jj, cols]
            hit = excluded[jj, cols] & (s_at >= 0) & inb[jj, cols]
            for j, s in zip(jj[hit], s_at[hit]):
                k = b * ny + j
                ending[k] = (ending[k] + " " + sea_names[s]).strip()

    # Caution for shelf rows.
    cc = np.concatenate(count_cells) if count_cells else _ints([])
    cs = np.concatenate(count_slot) if count_slot else _ints([])
    if depth is not None and cc.size:
        shallow = np.bincount(cs, weights=(depth.ravel()[cc] < shelf_depth_m),
                              minlength=n_basins * ny)
        ncount = np.bincount(cs, minlength=n_basins * ny)
        over = (ncount > 0) & (shallow > 0.5 * np.maximum(ncount, 1))
        flat = status.reshape(-1)
        flat[over & (flat == 0)] = 9
    order_c = np.argsort(cs, kind="stable")
    cc, cs = cc[order_c], cs[order_c]
    c_first = np.flatnonzero(np.r_[True, cs[1:] != cs[:-1]]) if cs.size else _ints([])

    # Runs in ascending row order, so that a kernel scans each row while it is in cache.
    rows_all = np.concatenate(all_rows) if all_rows else _ints([])
    slots_all = np.concatenate(run_slot) if run_slot else _ints([])
    cells_all = np.concatenate(all_cells) if all_cells else _ints([])
    lens_all = np.concatenate(all_lens) if all_lens else _ints([])
    src_start = np.concatenate([[0], np.cumsum(lens_all)[:-1]]).astype(np.int64)
    order = np.argsort(rows_all, kind="stable")
    lengths = lens_all[order]
    new_start = np.concatenate([[0], np.cumsum(lengths)[:-1]]).astype(np.int64)
    gather = np.repeat(src_start[order] - new_start, lengths) + np.arange(int(lengths.sum()))
    cells_sorted = cells_all[gather]
    slots_sorted = slots_all[order]
    in_group = np.flatnonzero(slots_sorted >= 0)
    gord = in_group[np.argsort(slots_sorted[in_group], kind="stable")]
    gs = slots_sorted[gord]
    firsts = np.flatnonzero(np.r_[True, gs[1:] != gs[:-1]]) if gs.size else _ints([])
    return RowPlan(
        cells=cells_sorted.astype(np.int64),
        run_starts=new_start,
        group_runs=gord.astype(np.int64),
        group_starts=firsts.astype(np.int64),
        group_slot=gs[firsts].astype(np.int64) if gs.size else _ints([]),
        row_status=status,
        east_lon=east_lon,
        west_lon=west_lon,
        cell_class=cell_class,
        count_cells=cc.astype(np.int64),
        count_starts=c_first.astype(np.int64),
        count_slot=cs[c_first].astype(np.int64) if cs.size else _ints([]),
        crossed_seas=crossed.reshape(n_basins, ny),
        ending_seas=ending.reshape(n_basins, ny),
    )
