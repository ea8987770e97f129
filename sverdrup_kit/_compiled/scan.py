"""Kernels of the westward Sverdrup integral: plain NumPy, float64, NaN is land.

The geometry (which cells form which run, which runs form which basin row) is worked out once
per call in :mod:`sverdrup_kit.geometry.basins`; these kernels only do the per-time-step arithmetic and
broadcast over any leading axes. :func:`westward_scan` has a signature that a compiled version
can take over unchanged.
"""

from __future__ import annotations

import numpy as np


def fill_from_neighbours_numpy(a, *, target, periodic, neighbour=None):
    """Fill missing values of ``a`` inside ``target`` by repeated nearest-ocean averaging.

    Parameters
    ----------
    a : ndarray (..., ny, nx)
        Field, NaN where missing.
    target : ndarray of bool (ny, nx)
        Cells that must end with a value (the ocean, small islands included). Values outside
        are set to NaN and never used.
    periodic : bool
        Longitude wraps.
    neighbour : callable, optional
        ``neighbour(a, side)``: values at each cell's neighbour on side E, W, N or S, NaN
        beyond the grid (a model grid's own, with its seam and fold); default the rows and
        columns of a latitude-longitude grid.

    Returns
    -------
    ndarray (..., ny, nx), float64
        Each pass gives every still-missing target cell the mean of its valued face neighbours
        inside ``target``; passes repeat until nothing changes. A target region with no value
        at all (a basin wholly missing in one time step) stays NaN.
    """
    out = np.where(target, np.asarray(a, dtype=np.float64), np.nan)
    while True:
        missing = target & np.isnan(out)
        if not missing.any():
            return out
        total = np.zeros_like(out)
        count = np.zeros_like(out)
        for axis, k in ((-1, 1), (-1, -1), (-2, 1), (-2, -1)):
            if neighbour is not None:
                nb = neighbour(out, {(-1, 1): "W", (-1, -1): "E", (-2, 1): "S",
                                     (-2, -1): "N"}[(axis, k)])
            else:
                nb = np.roll(out, k, axis=axis)
                if axis == -2:
                    edge = (0 if k == 1 else -1)
                    nb[..., edge, :] = np.nan
                elif not periodic:
                    nb[..., :, 0 if k == 1 else -1] = np.nan
            ok = np.isfinite(nb)
            total += np.where(ok, nb, 0.0)
            count += ok
        fill = missing & (count > 0)
        if not fill.any():
            return out
        out = np.where(fill, total / np.where(count > 0, count, 1.0), out)


def fill_pair_numpy(tx, ty, *, target, periodic, keep_missing=None):
    """Fill the gaps of a stress pair inside ``target``; a cell is missing where either
    component is.

    Parameters
    ----------
    tx, ty : ndarray (..., ny, nx)
        The two components, NaN where missing; not modified.
    target, periodic
        As for :func:`fill_from_neighbours_numpy`.
    keep_missing : ndarray of bool (ny, nx), optional
        Cells that stay missing where they were missing (the ocean when gaps are not filled;
        small islands are still filled).

    Returns
    -------
    fx, fy : ndarray (..., ny, nx), float64
    """
    tx = np.asarray(tx, dtype=np.float64)
    ty = np.asarray(ty, dtype=np.float64)
    missing = np.isnan(tx) | np.isnan(ty)
    fx = fill_from_neighbours_numpy(np.where(missing, np.nan, tx), target=target,
                                    periodic=periodic)
    fy = fill_from_neighbours_numpy(np.where(missing, np.nan, ty), target=target,
                                    periodic=periodic)
    if keep_missing is None:
        return fx, fy
    stay = missing & keep_missing
    return np.where(stay, np.nan, fx), np.where(stay, np.nan, fy)


def westward_scan_numpy(v, dx, cells, run_starts):
    r"""Integrate ``v`` westward along runs of cells, each from its eastern end.

    Parameters
    ----------
    v : ndarray (..., ny, nx), float64
        Transport per unit width at cell centres, NaN where unknown.
    dx : ndarray (ny, nx)
        Zonal cell widths in m.
    cells : ndarray of int (m,)
        Flat indices ``j * nx + i`` of the cells of all runs, run after run, each run ordered
        from its eastern cell to its western cell.
    run_starts : ndarray of int (n_runs,)
        Offset of each run's first (eastern) cell in ``cells``, ascending.

    Returns
    -------
    psi : ndarray (..., ny, nx)
        At cell centres, :math:`\psi_i = -\left(\sum_{j\ \mathrm{east\ of}\ i} v_j\,dx_j +
        v_i\,dx_i/2\right)` within each run (units of ``v`` times m), NaN outside runs and
        west of (and at) any NaN cell of a run.
    totals : ndarray (..., n_runs)
        :math:`\sum v_i\,dx_i` over each run, NaN when any cell of the run is NaN.
    """
    v = np.asarray(v, dtype=np.float64)
    lead = v.shape[:-2]
    ny, nx = v.shape[-2:]
    psi = np.full(lead + (ny * nx,), np.nan)
    n_runs = run_starts.size
    if n_runs == 0:
        return psi.reshape(v.shape), np.full(lead + (0,), np.nan)
    flux = v.reshape(lead + (ny * nx,))[..., cells] * dx.reshape(-1)[cells]
    bad = np.isnan(flux)
    f0 = np.where(bad, 0.0, flux)
    lengths = np.diff(np.append(run_starts, cells.size))
    run_of = np.repeat(np.arange(n_runs), lengths)
    csum = np.cumsum(f0, axis=-1)
    cbad = np.cumsum(bad, axis=-1)
    before = np.concatenate([np.zeros(lead + (1,)), csum[..., :-1]], axis=-1)[..., run_starts]
    bad_before = np.concatenate(
        [np.zeros(lead + (1,), dtype=cbad.dtype), cbad[..., :-1]], axis=-1
    )[..., run_starts]
    inclusive = csum - before[..., run_of]
    nbad = cbad - bad_before[..., run_of]
    psi[..., cells] = np.where(nbad > 0, np.nan, -(inclusive - 0.5 * f0))
    totals = np.add.reduceat(f0, run_starts, axis=-1)
    nbad_run = np.add.reduceat(bad.astype(np.int64), run_starts, axis=-1)
    totals = np.where(nbad_run > 0, np.nan, totals)
    return psi.reshape(v.shape), totals


def sum_groups(totals, group_runs, group_starts, group_slot, n_slots):
    """Add run totals (..., n_runs) into slots (..., n_slots); NaN where no group or a NaN run."""
    lead = totals.shape[:-1]
    out = np.full(lead + (n_slots,), np.nan)
    if group_starts.size:
        out[..., group_slot] = np.add.reduceat(totals[..., group_runs], group_starts, axis=-1)
    return out


def coverage_numpy(tx, ty, cells, starts, slot, n_slots):
    """Share of the cells of each slot where both ``tx`` and ``ty`` (..., ny, nx) are finite;
    NaN for slots with no cells.

    ``cells`` (flat indices) are sorted by slot; ``starts`` gives each slot's first cell and
    ``slot`` its number (0..n_slots-1).
    """
    tx = np.asarray(tx)
    lead = tx.shape[:-2]
    out = np.full(lead + (n_slots,), np.nan)
    if starts.size:
        flat = (np.isfinite(tx.reshape(lead + (-1,))[..., cells])
                & np.isfinite(np.asarray(ty).reshape(lead + (-1,))[..., cells])
                ).astype(np.float64)
        counts = np.diff(np.append(starts, cells.size))
        out[..., slot] = np.add.reduceat(flat, starts, axis=-1) / counts
    return out


def gyre_boundaries(t, valid, *, lat, max_gyre_boundaries, threshold):
    """Sign changes of ``t`` that reach at least ``threshold`` on both sides.

    Parameters
    ----------
    t : ndarray (..., nb, ny)
        Transport by basin and row, NaN where unknown.
    valid : ndarray of bool (..., nb, ny)
        Rows that may be used; a crossing is never bridged across a row that is not valid.
    lat : ndarray (ny,)
        Ascending row latitudes.
    max_gyre_boundaries : int
        Length of the output's last axis.
    threshold : float
        Rows with ``|t| < threshold`` are passed over: a boundary lies between two valid rows
        of opposite sign, each at least ``threshold`` in size, with only valid rows between
        them. Its latitude is the middle one of the raw sign changes between them (linear
        interpolation between neighbouring rows). ``threshold=0`` gives every sign change.

    Returns
    -------
    crossings : ndarray (..., nb, max_gyre_boundaries)
        South to north, NaN-padded.
    count : ndarray (..., nb), int64
    """
    t = np.asarray(t, dtype=np.float64)
    valid = np.broadcast_to(np.asarray(valid, dtype=bool), t.shape)
    shape = t.shape[:-1]
    ny = t.shape[-1]
    tt = t.reshape(-1, ny)
    vv = valid.reshape(-1, ny)
    out = np.full((tt.shape[0], max_gyre_boundaries), np.nan)
    count = np.zeros(tt.shape[0], dtype=np.int64)
    with np.errstate(invalid="ignore", divide="ignore"):
        a, b = tt[:, :-1], tt[:, 1:]
        raw = vv[:, :-1] & vv[:, 1:] & (a * b < 0)
        y_raw = lat[:-1] + a / (a - b) * np.diff(lat)
    if threshold <= 0:
        # Every sign change: sorting puts NaN last, found latitudes first in ascending order.
        y = np.sort(np.where(raw, y_raw, np.nan), axis=-1)[:, :max_gyre_boundaries]
        out[:, : y.shape[1]] = y
        return (out.reshape(shape + (max_gyre_boundaries,)),
                raw.sum(axis=-1).astype(np.int64).reshape(shape))
    for s in range(tt.shape[0]):
        v = vv[s] & np.isfinite(tt[s])
        seg = np.cumsum(~v)
        keep = np.flatnonzero(v & (np.abs(tt[s]) >= threshold))
        if keep.size < 2:
            continue
        p, q = keep[:-1], keep[1:]
        hit = (seg[p] == seg[q]) & (np.sign(tt[s, p]) != np.sign(tt[s, q]))
        found = []
        for i, k in zip(p[hit], q[hit]):
            r = i + np.flatnonzero(raw[s, i:k])
            if r.size:
                found.append(y_raw[s, r[(r.size - 1) // 2]])
        count[s] = len(found)
        n = min(len(found), max_gyre_boundaries)
        out[s, :n] = found[:n]
    return out.reshape(shape + (max_gyre_boundaries,)), count.reshape(shape)
