"""Connected components on the grid graph, and the links that lines on the sphere cut.

Shared by :mod:`.land` (land bodies, split at named straits) and :mod:`.basins` (the ocean,
divided along the lines between the Earth's oceans). Longitude wraps when the grid is periodic.
"""

from __future__ import annotations

import numpy as np
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components

from .grid import SphericalGrid


def label_cells(mask, *, periodic, diagonal=False, cut_east=None, cut_north=None):
    """Connected components of the True cells of ``mask`` (ny, nx).

    Parameters
    ----------
    mask : ndarray of bool (ny, nx)
    periodic : bool
        Longitude wraps: the last column neighbours the first.
    diagonal : bool
        Also connect cells that share only a corner.
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


def line_cuts(grid: SphericalGrid, lines):
    """Links between neighbouring cell centres that cross any of ``lines`` (lon, lat vertices).

    Returns ``cut_east`` and ``cut_north`` (ny, nx) of bool: True where the link from (j, i) to
    (j, i+1), resp. to (j+1, i), crosses a line.
    """
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
                    if rows.size:
                        xc = xa + (lat[rows] - y1) * (xb - xa) / (y2 - y1)
                        hit = (lon[None, :] <= xc[:, None]) & (xc[:, None] < lon_next[None, :])
                        cut_e[rows] |= hit
                if xa != xb:
                    lo, hi = min(xa, xb), max(xa, xb)
                    cols = np.flatnonzero((lon >= lo) & (lon < hi))
                    if cols.size:
                        yc = y1 + (lon[cols] - xa) * (y2 - y1) / (xb - xa)
                        hit = (lat[None, :-1] <= yc[:, None]) & (yc[:, None] < lat[None, 1:])
                        cut_n[:-1, cols] |= hit.T
    return cut_e, cut_n
