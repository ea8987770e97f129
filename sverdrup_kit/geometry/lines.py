"""Connected components on the grid graph, and the links that lines on the sphere cut.

Shared by :mod:`.land` (land bodies, split at named straits) and :mod:`.basins` (the ocean,
divided along the lines between the Earth's oceans). Longitude wraps when the grid is periodic.
"""

from __future__ import annotations

import numpy as np

from .._compiled.dispatch import label_links
from .grid import SphericalGrid


#: Degrees by which dividing lines are moved north and east before they are laid on a grid:
#: far below any grid spacing (0.1 m), far above round-off of coordinates given to 1e-9.
_NUDGE_DEG = 1e-6


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
        0..n-1 on True cells in order of first appearance row by row, -1 elsewhere.
    n : int
    """
    mask = np.asarray(mask, dtype=bool)
    none = np.zeros(mask.shape, dtype=bool)
    return label_links(mask, none if cut_east is None else cut_east,
                       none if cut_north is None else cut_north, periodic=periodic,
                       diagonal=diagonal)


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
        # Lines drawn along round numbers meet grids whose centres lie on them (65.5N on a grid
        # of centres at x.5): a centre exactly on a line would fall on different sides of two
        # segments that meet there and leave a passage at the corner. Moved by a hair north
        # and east, every line has each centre strictly on one side.
        v = np.asarray(verts, dtype=np.float64) + _NUDGE_DEG
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
