"""Geometry kernels in plain NumPy: labelling with cut links, and runs of a row set joined
across large islands. Their compiled twins are in :mod:`.jit_geometry`; both return the same
arrays, and :mod:`.dispatch` chooses between them.
"""

from __future__ import annotations

import numpy as np
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components

#: Land classes as :mod:`sverdrup_kit.geometry.land` numbers them.
LARGE_ISLAND = 2
#: Kinds of the cell beyond a group's end.
END_COAST, END_WATER, END_EDGE = 0, 1, 2


def label_links_numpy(mask, cut_east, cut_north, periodic, diagonal):
    """Connected components of the True cells of ``mask`` (ny, nx), without the cut links.

    ``cut_east[j, i]`` removes the link (j, i)-(j, i+1), ``cut_north[j, i]`` the link
    (j, i)-(j+1, i); ``diagonal`` also joins cells that share a corner (never cut). Returns
    labels (0..n-1 in order of first appearance, row by row; -1 off the mask) and n.
    """
    mask = np.asarray(mask, dtype=bool)
    ny, nx = mask.shape
    ids = np.arange(ny * nx).reshape(ny, nx)
    rows, cols = [], []

    def link(a_sl, b_sl, keep):
        ok = mask[a_sl] & mask[b_sl] & keep
        rows.append(ids[a_sl][ok])
        cols.append(ids[b_sl][ok])

    link((slice(None), slice(0, nx - 1)), (slice(None), slice(1, nx)), ~cut_east[:, : nx - 1])
    if periodic:
        link((slice(None), slice(nx - 1, nx)), (slice(None), slice(0, 1)), ~cut_east[:, nx - 1:])
    link((slice(0, ny - 1), slice(None)), (slice(1, ny), slice(None)), ~cut_north[: ny - 1])
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


def _prefix(a):
    out = np.zeros(a.shape[:-1] + (a.shape[-1] + 1,), dtype=np.float64)
    np.cumsum(a, axis=-1, out=out[..., 1:])
    return out


def row_groups_numpy(member, cls, land_labels, dx, periodic, coast_link):
    """Runs of ``member`` (ny, nx) in every row, joined into groups across large islands.

    Two neighbouring runs of a row join when every cell between them is land of one large
    island (``cls == 2``, one ``land_labels`` value) and no link between them is a coast
    (``coast_link[j, i]``: the link from (j, i) to (j, i+1)). Each row is rotated to start on
    a cell that is neither a member nor a large island, so runs never wrap; a periodic row
    without such a cell but with members is circular.

    Returns
    -------
    tuple
        ``shift`` (ny,): rotated column k is column (k + shift) % nx; per run (ascending row,
        west to east): ``run_row``, ``run_k0``, ``run_k1`` (end exclusive), ``run_group``;
        per group: ``row``, ``k0``, ``k1``, ``width`` (sum of ``dx`` over member cells),
        ``east``, ``west`` (END_COAST: land of class >= 2 or a coast link beyond the end;
        END_EDGE: the edge of a regional grid; END_WATER: anything else), ``circular``.
    """
    member = np.asarray(member, dtype=bool)
    ny, nx = member.shape
    large = cls == LARGE_ISLAND
    hard = ~member & ~large
    if periodic:
        has_hard = hard.any(axis=1)
        shift = np.where(has_hard, np.argmax(hard, axis=1), 0).astype(np.int64)
        idx = (np.arange(nx)[None, :] + shift[:, None]) % nx
    else:
        has_hard = np.ones(ny, dtype=bool)
        shift = np.zeros(ny, dtype=np.int64)
        idx = np.broadcast_to(np.arange(nx), (ny, nx))
    rows = np.arange(ny)[:, None]
    m = member[rows, idx]
    lab = land_labels[rows, idx]
    lg = large[rows, idx]
    ext = cls[rows, idx] >= LARGE_ISLAND
    link = coast_link[rows, idx]
    width_p = _prefix(np.where(m, dx[rows, idx], 0.0))
    pad = np.zeros((ny, 1), dtype=np.int8)
    d = np.diff(np.concatenate([pad, m.astype(np.int8), pad], axis=1), axis=1)
    sj, sk = np.nonzero(d == 1)
    _, ek = np.nonzero(d == -1)
    circ_row = periodic & ~has_hard & m.any(axis=1)
    n_runs = sj.size
    e = np.zeros(0, np.int64)
    if n_runs == 0:
        return (shift, e, e, e, e, e, e, e, np.zeros(0), np.zeros(0, np.int8),
                np.zeros(0, np.int8), np.zeros(0, bool))
    nonlarge_p = _prefix((~lg).astype(np.int8))
    change = np.zeros((ny, nx), dtype=np.int8)
    change[:, 1:] = lab[:, 1:] != lab[:, :-1]
    change_p = _prefix(change)
    link_p = _prefix(link.astype(np.int8))
    same_row = np.zeros(n_runs, dtype=bool)
    same_row[1:] = sj[1:] == sj[:-1]
    joined = np.zeros(n_runs, dtype=bool)
    r = np.flatnonzero(same_row)
    j, a, b = sj[r], ek[r - 1], sk[r]
    joined[r] = ((nonlarge_p[j, b] - nonlarge_p[j, a] == 0)
                 & (change_p[j, b] - change_p[j, a + 1] == 0)
                 & (link_p[j, b] - link_p[j, a - 1] == 0))
    joined |= circ_row[sj] & same_row
    run_group = np.cumsum(~joined) - 1
    ng = int(run_group[-1]) + 1
    first = np.flatnonzero(~joined)
    last = np.append(first[1:] - 1, n_runs - 1)
    g_row = sj[first]
    k0, k1 = sk[first], ek[last]
    width = width_p[g_row, k1] - width_p[g_row, k0]
    circular = circ_row[g_row]

    def end_kind(k_beyond, k_link):
        out = np.full(ng, END_WATER, dtype=np.int8)
        if periodic:
            kb, lk = k_beyond % nx, k_link % nx
            coast = ext[g_row, kb] | link[g_row, lk]
        else:
            inside = (k_beyond >= 0) & (k_beyond < nx)
            out[~inside] = END_EDGE
            kb, lk = np.clip(k_beyond, 0, nx - 1), np.clip(k_link, 0, nx - 1)
            coast = (ext[g_row, kb] | link[g_row, lk]) & inside
        out[coast] = END_COAST
        return out

    east = end_kind(k1, k1 - 1)
    west = end_kind(k0 - 1, k0 - 1)
    east[circular] = END_WATER
    west[circular] = END_WATER
    i64 = np.int64
    return (shift, sj.astype(i64), sk.astype(i64), ek.astype(i64), run_group.astype(i64),
            g_row.astype(i64), k0.astype(i64), k1.astype(i64), width, east, west, circular)
