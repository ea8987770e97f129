"""Compiled kernels (numba): the curl, the westward scan, the gap fill, and a fused pass.

The NumPy kernels in :mod:`sverdrup_kit._compiled.curl` state the method; these compute the same
numbers (to round-off, usually bit for bit) in one pass over memory. Everything that depends
only on the grid -- finite-difference weights, ``R cos(phi)`` -- is prepared once per grid by
plain NumPy here and cached, so the compiled loops do only per-cell arithmetic.

Nothing is compiled when this module is imported: numba compiles each kernel on its first call
and keeps the machine code in its on-disk cache (``cache=True``) for later sessions. The NumPy
kernels import this module only when they are first called, so importing :mod:`sverdrup_kit`
does not even import numba.

Threads: a kernel called from the main thread runs its rows in parallel on the threads numba
is allowed (``numba.set_num_threads``); called from a worker thread (a dask task) it runs
serially, because dask already keeps every core busy with other blocks and nested thread pools
only fight over the cores.
"""

from __future__ import annotations

import threading
from functools import lru_cache, partial

import numba
import numpy as np

from .stencil import shift_coord


def _in_main_thread() -> bool:
    return threading.current_thread() is threading.main_thread()


def _blocks() -> int:
    """Blocks of rows for a parallel kernel: a few per thread, to even out coastlines."""
    return 4 * numba.get_num_threads()


# --------------------------------------------------------------------------------------------
# Grid-only preparation (plain NumPy, once per grid)
# --------------------------------------------------------------------------------------------

#: Rows of the weight table returned by :func:`derivative_weights`.
_C_M, _C_0, _C_P, _F_0, _F_1, _F_2, _B_0, _B_1, _B_2, _H_P, _H_M = range(11)


def _derivative_weights(x: np.ndarray, period: float | None) -> np.ndarray:
    # The expressions are written exactly as in curl.masked_derivative, so that the
    # compiled derivative multiplies by the same rounded weights and agrees bit for bit.
    xm2, xm1, x0, xp1, xp2 = (shift_coord(x, k, period=period) for k in (-2, -1, 0, 1, 2))
    hm, hp = x0 - xm1, xp1 - x0
    hmm, hpp = xm1 - xm2, xp2 - xp1
    w = np.empty((11, x.size))
    with np.errstate(divide="ignore", invalid="ignore"):
        w[_C_M] = -hp / (hm * (hm + hp))
        w[_C_0] = (hp - hm) / (hm * hp)
        w[_C_P] = hm / (hp * (hm + hp))
        w[_F_0] = -(2 * hp + hpp) / (hp * (hp + hpp))
        w[_F_1] = (hp + hpp) / (hp * hpp)
        w[_F_2] = hp / (hpp * (hp + hpp))
        w[_B_0] = (2 * hm + hmm) / (hm * (hm + hmm))
        w[_B_1] = (hm + hmm) / (hm * hmm)
        w[_B_2] = hm / (hmm * (hm + hmm))
    w[_H_P] = hp
    w[_H_M] = hm
    return w


@lru_cache(maxsize=16)
def _weights_cached(key: bytes, n: int, period: float | None):
    w = _derivative_weights(np.frombuffer(key, dtype=np.float64, count=n), period)
    # Point-major copy for the coastal cells, which need all eleven weights of one point:
    # one or two cache lines instead of eleven.
    wt = np.ascontiguousarray(w.T)
    w.flags.writeable = False
    wt.flags.writeable = False
    return w, wt


def weight_tables(x: np.ndarray, period: float | None = None):
    """Finite-difference weights along a (possibly non-uniform, possibly periodic) axis.

    Returns two read-only tables, cached per axis: ``w`` (11, n) and the same numbers point
    by point, (n, 11). The eleven weights of a point are the three centred weights, the three
    forward and three backward one-sided second-order weights, and the spacings to the next
    and previous points (for the two-point differences).
    """
    x = np.ascontiguousarray(x, dtype=np.float64)
    return _weights_cached(x.tobytes(), x.size, None if period is None else float(period))


def derivative_weights(x: np.ndarray, period: float | None = None) -> np.ndarray:
    """The (11, n) table of :func:`weight_tables`."""
    return weight_tables(x, period)[0]


# --------------------------------------------------------------------------------------------
# Compiled kernels, built on first use
# --------------------------------------------------------------------------------------------


# error_model="numpy": a division by zero gives inf/NaN as in NumPy instead of raising, which
# also keeps the inner loops free of checks so that LLVM can vectorise them.
_jit = partial(numba.njit, cache=True, error_model="numpy")


@_jit
def _ocean(a, b):
    # One test for both: a + b is finite exactly when a and b are (stress never nears 1e308).
    return np.isfinite(a + b)


@_jit
def _one_point(
    ok_m, ok_mm, ok_p, ok_pp, f, fm1, fm2, fp1, fp2, w0, w1, w2, w3, w4, w5, w6, w7, w8, h_p, h_m
):
    # Same order of preference and the same arithmetic as curl.masked_derivative. All
    # candidates are computed and the preferred one selected without branches: which one
    # applies changes from cell to cell along a coast, and mispredicted branches cost more
    # than the few extra operations.
    out = 0.0
    out = (f - fm1) / h_m if ok_m else out
    out = (fp1 - f) / h_p if ok_p else out
    out = w6 * f - w7 * fm1 + w8 * fm2 if ok_mm else out
    out = w3 * f + w4 * fp1 - w5 * fp2 if ok_pp else out
    return w0 * fm1 + w1 * f + w2 * fp1 if ok_m & ok_p else out


# The helpers above take scalars only: a compiled call that passes arrays costs reference
# counting on every call, which made the per-cell path ten times slower. Arrays are passed
# once per row instead.


@_jit
def _sweep_row(tx, ty, cos, rcos, wlon, wlat, t, j, out, todo, flags):
    """First part of the curl along row j of field t: returns how many cells it left to
    :func:`_fix_row`, listed in ``todo``; ``flags`` is scratch (see :func:`_scratch`).

    Most ocean cells have ocean on all four sides and take centred differences in both
    directions. This branch-free (vectorised) sweep computes exactly that everywhere, with NaN
    propagating from any land neighbour (the ``* 0.0`` terms bring in the other component of
    each neighbour, since a cell is land when either is missing), and flags the ocean cells it
    left NaN. Those, the two ends of the row and the rows the sweep skips are left to
    :func:`_fix_row`: coasts, grid edges and the wrap.
    """
    nt, ny, nx = tx.shape
    row = out[t, j]
    xr, yr = tx[t, j], ty[t, j]
    m = 0
    if j == 0 or j == ny - 1 or abs(cos[j]) < 1e-12 or nx < 3:
        for i in range(nx):
            todo[i] = i
        return nx
    txs, txn = tx[t, j - 1], tx[t, j + 1]
    tys, tyn = ty[t, j - 1], ty[t, j + 1]
    cs, cc, cn, r = cos[j - 1], cos[j], cos[j + 1], rcos[j]
    a, b, c = wlat[0, j], wlat[1, j], wlat[2, j]
    for i in range(1, nx - 1):
        dty = wlon[0, i] * yr[i - 1] + wlon[1, i] * yr[i] + wlon[2, i] * yr[i + 1]
        dtx = a * (txs[i] * cs) + b * (xr[i] * cc) + c * (txn[i] * cn)
        guard = (xr[i - 1] + xr[i + 1] + tys[i] + tyn[i]) * 0.0
        value = (dty - dtx) / r + guard
        row[i] = value
        flags[i] = np.isnan(value) & np.isfinite(xr[i] + yr[i])
    flags[0] = 1
    flags[nx - 1] = 1
    # Coastal cells are a few per cent and come in clusters: test eight flags at a time.
    words = flags.view(np.uint64)
    for w in range(words.size):
        if words[w] != 0:
            for i in range(8 * w, 8 * w + 8):
                if flags[i]:
                    todo[m] = i
                    m += 1
    return m


@_jit
def _fix_row(tx, ty, cos, rcos, plon, plat, periodic, t, j, out, todo, m):
    """Second part of the curl along row j: the ``m`` cells listed in ``todo``, case by case.

    Returns the number of derivatives with no ocean neighbour.
    """
    nt, ny, nx = tx.shape
    row = out[t, j]
    xr, yr = tx[t, j], ty[t, j]
    pole = abs(cos[j]) < 1e-12
    jm1, jm2 = max(j - 1, 0), max(j - 2, 0)
    jp1, jp2 = min(j + 1, ny - 1), min(j + 2, ny - 1)
    x_m, x_p, x_mm, x_pp = tx[t, jm1], tx[t, jp1], tx[t, jm2], tx[t, jp2]
    y_m, y_p, y_mm, y_pp = ty[t, jm1], ty[t, jp1], ty[t, jm2], ty[t, jp2]
    n_iso = 0
    for k in range(m):
        i = todo[k]
        if not _ocean(xr[i], yr[i]):
            row[i] = np.nan
            continue
        # d(tau_y)/d(lambda) along the row
        if periodic:
            im1 = i - 1 if i >= 1 else i - 1 + nx
            im2 = i - 2 if i >= 2 else i - 2 + nx
            ip1 = i + 1 if i + 1 < nx else i + 1 - nx
            ip2 = i + 2 if i + 2 < nx else i + 2 - nx
            okm = _ocean(xr[im1], yr[im1])
            okp = _ocean(xr[ip1], yr[ip1])
            okmm = okm & _ocean(xr[im2], yr[im2])
            okpp = okp & _ocean(xr[ip2], yr[ip2])
        else:
            im1, im2 = max(i - 1, 0), max(i - 2, 0)
            ip1, ip2 = min(i + 1, nx - 1), min(i + 2, nx - 1)
            okm = (i >= 1) & _ocean(xr[im1], yr[im1])
            okp = (i + 1 < nx) & _ocean(xr[ip1], yr[ip1])
            okmm = okm & (i >= 2) & _ocean(xr[im2], yr[im2])
            okpp = okp & (i + 2 < nx) & _ocean(xr[ip2], yr[ip2])
        dty = _one_point(
            okm, okmm, okp, okpp, yr[i], yr[im1], yr[im2], yr[ip1], yr[ip2],
            plon[i, 0], plon[i, 1], plon[i, 2], plon[i, 3], plon[i, 4], plon[i, 5],
            plon[i, 6], plon[i, 7], plon[i, 8], plon[i, 9], plon[i, 10],
        )  # fmt: skip
        n_iso += ~okm & ~okp
        # d(tau_x cos(phi))/d(phi) down the column
        okm = (j >= 1) & _ocean(x_m[i], y_m[i])
        okp = (j + 1 < ny) & _ocean(x_p[i], y_p[i])
        okmm = okm & (j >= 2) & _ocean(x_mm[i], y_mm[i])
        okpp = okp & (j + 2 < ny) & _ocean(x_pp[i], y_pp[i])
        dtx = _one_point(
            okm, okmm, okp, okpp, xr[i] * cos[j],
            x_m[i] * cos[jm1], x_mm[i] * cos[jm2], x_p[i] * cos[jp1], x_pp[i] * cos[jp2],
            plat[j, 0], plat[j, 1], plat[j, 2], plat[j, 3], plat[j, 4], plat[j, 5],
            plat[j, 6], plat[j, 7], plat[j, 8], plat[j, 9], plat[j, 10],
        )  # fmt: skip
        n_iso += ~okm & ~okp
        row[i] = np.nan if pole else (dty - dtx) / rcos[j]
    return n_iso


#: Rows between the sweep of a row and its case-by-case pass. The coastal stencils reach two
#: rows north; lagging lets the sweep bring those rows into cache first, instead of each
#: coastal cell waiting for memory.
_LAG = 2


@_jit
def _scratch(nx):
    """Scratch for a run of rows: a ring of cell lists (one per row in flight), their lengths,
    and per-cell flags padded to whole 8-byte words (the padding stays zero)."""
    todo = np.empty((_LAG + 1, nx), dtype=np.int64)
    counts = np.zeros(_LAG + 1, dtype=np.int64)
    return todo, counts, np.zeros(8 * (nx // 8 + 1), dtype=np.uint8)


@_jit
def _curl_rows(tx, ty, cos, rcos, wlon, wlat, plon, plat, periodic, out, start, stop):
    """Curl on rows start..stop-1 of the stack of fields flattened to (time x lat) rows."""
    ny, nx = tx.shape[1], tx.shape[2]
    todo, counts, flags = _scratch(nx)
    n_iso = 0
    for k in range(start, stop + _LAG):
        if k < stop:
            t = k // ny
            s = k % (_LAG + 1)
            counts[s] = _sweep_row(
                tx, ty, cos, rcos, wlon, wlat, t, k - t * ny, out, todo[s], flags
            )
        q = k - _LAG
        if q >= start:
            t = q // ny
            s = q % (_LAG + 1)
            n_iso += _fix_row(
                tx, ty, cos, rcos, plon, plat, periodic, t, q - t * ny, out, todo[s], counts[s]
            )
    return n_iso


@numba.njit(cache=True, error_model="numpy", parallel=True)
def _curl_parallel(tx, ty, cos, rcos, wlon, wlat, plon, plat, periodic, out, nblocks):
    # A few contiguous blocks of rows per thread: each thread streams through memory, and the
    # per-call overhead (reference counts on shared arrays, which threads would fight over)
    # is paid per block rather than per row.
    nrows = tx.shape[0] * tx.shape[1]
    nblocks = max(1, min(nrows, nblocks))
    isolated = np.zeros(nblocks, dtype=np.int64)
    for b in numba.prange(nblocks):
        isolated[b] = _curl_rows(
            tx, ty, cos, rcos, wlon, wlat, plon, plat, periodic, out,
            b * nrows // nblocks, (b + 1) * nrows // nblocks,
        )  # fmt: skip
    return isolated.sum()


@_jit
def _curl_serial(tx, ty, cos, rcos, wlon, wlat, plon, plat, periodic, out, nblocks):
    nrows = tx.shape[0] * tx.shape[1]
    return _curl_rows(tx, ty, cos, rcos, wlon, wlat, plon, plat, periodic, out, 0, nrows)


@_jit
def _scan_runs(v, dx, cells, run_starts, psi, totals, start, stop):
    """Westward scan of the (field, run) pairs start..stop-1, pairs ordered field-major."""
    n_runs = run_starts.size
    m = cells.size
    for p in range(start, stop):
        t = p // n_runs
        r = p - t * n_runs
        stop_cell = run_starts[r + 1] if r + 1 < n_runs else m
        # -(inclusive sum - half the cell), as in scan.westwardscan. A NaN cell makes the
        # running sum NaN, so it and every cell west of it come out NaN without a branch.
        total = 0.0
        for k in range(run_starts[r], stop_cell):
            c = cells[k]
            f = v[t, c] * dx[c]
            total += f
            psi[t, c] = -(total - 0.5 * f)
        totals[t, r] = total


@numba.njit(cache=True, error_model="numpy", parallel=True)
def _scan_parallel(v, dx, cells, run_starts, psi, totals, nblocks):
    npairs = v.shape[0] * run_starts.size
    nblocks = max(1, min(npairs, nblocks))
    for b in numba.prange(nblocks):
        _scan_runs(
            v, dx, cells, run_starts, psi, totals,
            b * npairs // nblocks, (b + 1) * npairs // nblocks,
        )  # fmt: skip


@_jit
def _scan_serial(v, dx, cells, run_starts, psi, totals, nblocks):
    _scan_runs(v, dx, cells, run_starts, psi, totals, 0, v.shape[0] * run_starts.size)


@_jit
def _sverdrup_rows(
    tx, ty, cos, rcos, wlon, wlat, plon, plat, periodic, rho0_beta, dx, cells, run_starts,
    row_runs,
    curl, v, psi, totals, start, stop,
):  # fmt: skip
    """Curl, V and the westward scan of rows start..stop-1 in one pass over each row (V and
    the scan follow each row's coastal pass, while the row is still in cache)."""
    ny, nx = tx.shape[1], tx.shape[2]
    n_runs = run_starts.size
    m = cells.size
    todo, counts, flags = _scratch(nx)
    n_iso = 0
    for k in range(start, stop + _LAG):
        if k < stop:
            t = k // ny
            s = k % (_LAG + 1)
            counts[s] = _sweep_row(
                tx, ty, cos, rcos, wlon, wlat, t, k - t * ny, curl, todo[s], flags
            )
        q = k - _LAG
        if q < start:
            continue
        t = q // ny
        j = q - t * ny
        s = q % (_LAG + 1)
        n_iso += _fix_row(
            tx, ty, cos, rcos, plon, plat, periodic, t, j, curl, todo[s], counts[s]
        )
        crow, vrow = curl[t, j], v[t, j]
        rb = rho0_beta[j]  # a local: the stores below could alias the array
        for i in range(nx):
            vrow[i] = crow[i] / rb
        # psi is NaN outside runs; the runs of this row overwrite their cells.
        prow = psi[t, j]
        for i in range(nx):
            prow[i] = np.nan
        base = j * nx
        for r in range(row_runs[j], row_runs[j + 1]):
            stop_cell = run_starts[r + 1] if r + 1 < n_runs else m
            total = 0.0
            for n in range(run_starts[r], stop_cell):
                i = cells[n] - base
                f = vrow[i] * dx[j, i]
                total += f
                prow[i] = -(total - 0.5 * f)
            totals[t, r] = total
    return n_iso


@numba.njit(cache=True, error_model="numpy", parallel=True)
def _sverdrup_parallel(
    tx, ty, cos, rcos, wlon, wlat, plon, plat, periodic, rho0_beta, dx, cells, run_starts,
    row_runs,
    curl, v, psi, totals, nblocks,
):  # fmt: skip
    nrows = tx.shape[0] * tx.shape[1]
    nblocks = max(1, min(nrows, nblocks))
    isolated = np.zeros(nblocks, dtype=np.int64)
    for b in numba.prange(nblocks):
        isolated[b] = _sverdrup_rows(
            tx, ty, cos, rcos, wlon, wlat, plon, plat, periodic, rho0_beta, dx, cells, run_starts,
            row_runs, curl, v, psi, totals, b * nrows // nblocks, (b + 1) * nrows // nblocks,
        )  # fmt: skip
    return isolated.sum()


@_jit
def _sverdrup_serial(
    tx, ty, cos, rcos, wlon, wlat, plon, plat, periodic, rho0_beta, dx, cells, run_starts,
    row_runs,
    curl, v, psi, totals, nblocks,
):  # fmt: skip
    return _sverdrup_rows(
        tx, ty, cos, rcos, wlon, wlat, plon, plat, periodic, rho0_beta, dx, cells, run_starts,
        row_runs,
        curl, v, psi, totals, 0, tx.shape[0] * tx.shape[1],
    )  # fmt: skip


@_jit
def _fill_field(field, target, periodic, todo, new):
    """Fill one (ny, nx) field in place, as scan.fill_from_neighbours does, pass by pass.

    Only the cells still missing are visited (``todo``, scratch of ny * nx indices); each pass
    computes every new value from the previous pass's field before storing any (``new``).
    """
    ny, nx = field.shape
    m = 0
    for j in range(ny):
        for i in range(nx):
            if target[j, i] and np.isnan(field[j, i]):
                todo[m] = j * nx + i
                m += 1
    _fill_todo(field, periodic, todo, new, m)


@_jit
def _fill_todo(field, periodic, todo, new, m):
    """The passes of :func:`_fill_field` over the ``m`` missing cells listed in ``todo``."""
    ny, nx = field.shape
    while m > 0:
        for k in range(m):
            c = todo[k]
            j = c // nx
            i = c - j * nx
            # West, east, south, north: the order of the NumPy kernel's sum.
            total = 0.0
            count = 0.0
            if i >= 1 or periodic:
                x = field[j, i - 1 if i >= 1 else nx - 1]
                if np.isfinite(x):
                    total += x
                    count += 1.0
            if i + 1 < nx or periodic:
                x = field[j, i + 1 if i + 1 < nx else 0]
                if np.isfinite(x):
                    total += x
                    count += 1.0
            if j >= 1:
                x = field[j - 1, i]
                if np.isfinite(x):
                    total += x
                    count += 1.0
            if j + 1 < ny:
                x = field[j + 1, i]
                if np.isfinite(x):
                    total += x
                    count += 1.0
            new[k] = total / count if count > 0.0 else np.nan
        left = 0
        for k in range(m):
            if np.isnan(new[k]):
                todo[left] = todo[k]
                left += 1
            else:
                c = todo[k]
                field[c // nx, c - (c // nx) * nx] = new[k]
        if left == m:
            break
        m = left


@numba.njit(cache=True, error_model="numpy", parallel=True)
def _fill_parallel(out, target, periodic):
    n = out.shape[1] * out.shape[2]
    for t in numba.prange(out.shape[0]):
        _fill_field(out[t], target, periodic, np.empty(n, np.int64), np.empty(n))


@_jit
def _fill_serial(out, target, periodic):
    n = out.shape[1] * out.shape[2]
    todo, new = np.empty(n, np.int64), np.empty(n)
    for t in range(out.shape[0]):
        _fill_field(out[t], target, periodic, todo, new)


# --------------------------------------------------------------------------------------------
# Entry points on plain arrays (same contracts as the NumPy kernels)
# --------------------------------------------------------------------------------------------


def _stack(a, shape) -> np.ndarray:
    """``a`` as a C-contiguous float64 stack of fields (n, ny, nx); copies only when needed."""
    a = np.ascontiguousarray(np.broadcast_to(np.asarray(a, dtype=np.float64), shape))
    return a.reshape((-1,) + shape[-2:])


def curl(taux, tauy, phi, lam, *, periodic: bool, radius: float, return_isolated=False):
    """Compiled twin of :func:`sverdrup_kit._compiled.curl.curl_kernel` (same arguments and result)."""
    shape = np.broadcast_shapes(np.shape(taux), np.shape(tauy))
    tx, ty = _stack(taux, shape), _stack(tauy, shape)
    phi = np.asarray(phi, dtype=np.float64)
    lam = np.asarray(lam, dtype=np.float64)
    cos = np.ascontiguousarray(np.cos(phi))
    rcos = radius * cos
    wlon, plon = weight_tables(lam, 2 * np.pi if periodic else None)
    wlat, plat = weight_tables(phi, None)
    out = np.empty(tx.shape)
    kernel = _curl_parallel if _in_main_thread() else _curl_serial
    n_iso = kernel(tx, ty, cos, rcos, wlon, wlat, plon, plat, bool(periodic), out, _blocks())
    out = out.reshape(shape)
    if return_isolated:
        return out, int(n_iso)
    return out


def westward_scan(v, dx, cells, run_starts):
    r"""Compiled twin of :func:`sverdrup_kit._compiled.scan.westward_scan` (same arguments and results).

    Each run is summed from zero at its eastern cell, so the results differ from the NumPy
    kernel (which differences one cumulative sum over all runs) by round-off only.
    """
    v = np.asarray(v, dtype=np.float64)
    shape = v.shape
    ny, nx = shape[-2:]
    flat = _stack(v, shape).reshape(-1, ny * nx)
    lead = shape[:-2]
    cells = np.ascontiguousarray(cells, dtype=np.int64)
    run_starts = np.ascontiguousarray(run_starts, dtype=np.int64)
    dxf = np.ascontiguousarray(np.broadcast_to(np.asarray(dx, dtype=np.float64), (ny, nx)))
    psi = np.full(flat.shape, np.nan)
    totals = np.full((flat.shape[0], run_starts.size), np.nan)
    if run_starts.size:
        kernel = _scan_parallel if _in_main_thread() else _scan_serial
        kernel(flat, dxf.reshape(-1), cells, run_starts, psi, totals, _blocks())
    return psi.reshape(shape), totals.reshape(lead + (run_starts.size,))


def runs_by_row(cells, run_starts, ny: int, nx: int) -> np.ndarray:
    """Offsets (ny + 1,) of each row's runs, for runs that lie in one row, rows ascending.

    Geometry, computed once per grid and mask. Raises ValueError when a run leaves its row or
    the runs are not in row order (the fused kernel needs both).
    """
    cells = np.asarray(cells, dtype=np.int64)
    run_starts = np.asarray(run_starts, dtype=np.int64)
    rows = cells // nx
    row_of_run = rows[run_starts] if run_starts.size else np.zeros(0, dtype=np.int64)
    run_of_cell = np.repeat(np.arange(run_starts.size), np.diff(np.append(run_starts, cells.size)))
    if np.any(rows != row_of_run[run_of_cell]) or np.any(np.diff(row_of_run) < 0):
        raise ValueError(
            "cells/run_starts: expected runs that each lie in one row, in ascending row order; "
            "found a run crossing rows or rows out of order. Fix: build runs with "
            "sverdrup_kit.geometry.basins.plan_rows or sort them by row."
        )
    return np.searchsorted(row_of_run, np.arange(ny + 1), side="left").astype(np.int64)


def sverdrup_fused(
    taux, tauy, phi, lam, *, periodic, radius, rho0_beta, dx, cells, run_starts, row_runs=None
):
    r"""Curl, meridional Sverdrup transport and the westward scan in one pass over the data.

    The same numbers as :func:`curl` followed by ``v = curl / rho0_beta`` and
    :func:`westward_scan`, computed row by row while each row is still in cache.

    Parameters
    ----------
    taux, tauy : ndarray (..., ny, nx)
        Stress components in Pa, NaN on land.
    phi, lam : ndarray (ny,), (nx,)
        Latitude and longitude in radians.
    periodic : bool
        Whether longitude wraps around.
    radius : float
        Sphere radius in m.
    rho0_beta : ndarray (ny,)
        :math:`\rho_0\beta` in kg m-4 s-1 for each row; NaN on rows left out (the equatorial
        band), which leaves them NaN in ``v`` and ``psi``.
    dx : ndarray (ny, nx)
        Zonal cell widths in m.
    cells, run_starts : ndarray of int
        Runs to integrate as for :func:`westward_scan`, each within one row, rows ascending.
    row_runs : ndarray of int (ny + 1,), optional
        :func:`runs_by_row` of the runs; pass it to skip recomputing geometry per call.

    Returns
    -------
    curl : ndarray (..., ny, nx)
        N m-3.
    v : ndarray (..., ny, nx)
        m2 s-1.
    psi : ndarray (..., ny, nx)
        m3 s-1 at cell centres: minus the transport between the run's eastern edge and the
        cell centre (as :func:`westward_scan`).
    totals : ndarray (..., n_runs)
        m3 s-1 across each run.
    """
    tx = np.asarray(taux, dtype=np.float64)
    ty = np.asarray(tauy, dtype=np.float64)
    shape = np.broadcast_shapes(tx.shape, ty.shape)
    ny, nx = shape[-2:]
    tx, ty = _stack(tx, shape), _stack(ty, shape)
    cells = np.ascontiguousarray(cells, dtype=np.int64)
    run_starts = np.ascontiguousarray(run_starts, dtype=np.int64)
    if row_runs is None:
        row_runs = runs_by_row(cells, run_starts, ny, nx)
    phi = np.asarray(phi, dtype=np.float64)
    lam = np.asarray(lam, dtype=np.float64)
    cos = np.ascontiguousarray(np.cos(phi))
    rcos = radius * cos
    wlon, plon = weight_tables(lam, 2 * np.pi if periodic else None)
    wlat, plat = weight_tables(phi, None)
    rb = np.ascontiguousarray(rho0_beta, dtype=np.float64)
    dxf = np.ascontiguousarray(np.broadcast_to(np.asarray(dx, dtype=np.float64), (ny, nx)))
    curl_out = np.empty(tx.shape)
    v = np.empty(tx.shape)
    psi = np.empty(tx.shape)
    totals = np.full((tx.shape[0], run_starts.size), np.nan)
    kernel = _sverdrup_parallel if _in_main_thread() else _sverdrup_serial
    kernel(
        tx, ty, cos, rcos, wlon, wlat, plon, plat, bool(periodic), rb, dxf, cells, run_starts,
        np.ascontiguousarray(row_runs, dtype=np.int64), curl_out, v, psi, totals, _blocks(),
    )  # fmt: skip
    lead = shape[:-2]
    return (
        curl_out.reshape(shape),
        v.reshape(shape),
        psi.reshape(shape),
        totals.reshape(lead + (run_starts.size,)),
    )


def fill_from_neighbours(a, *, target, periodic):
    """Compiled twin of :func:`sverdrup_kit._compiled.scan.fill_from_neighbours` (same arguments and
    results): missing cells of ``target`` take the mean of their valued face neighbours, pass
    after pass, visiting only the cells still missing."""
    a = np.asarray(a, dtype=np.float64)
    target = np.ascontiguousarray(np.asarray(target, dtype=bool))
    filled = np.where(target, a, np.nan)  # a new array, filled in place below
    kernel = _fill_parallel if _in_main_thread() else _fill_serial
    kernel(filled.reshape((-1,) + filled.shape[-2:]), target, bool(periodic))
    return filled


@_jit
def _pair_field(src, other, out, target, keep, periodic, todo, new):
    """One component of :func:`fill_pair` on one (ny, nx) field, written into ``out``."""
    ny, nx = out.shape
    m = 0
    for j in range(ny):
        for i in range(nx):
            x = src[j, i]
            if np.isnan(x) or np.isnan(other[j, i]):
                out[j, i] = np.nan
                if target[j, i]:
                    todo[m] = j * nx + i
                    m += 1
            elif target[j, i]:
                out[j, i] = x
            else:
                out[j, i] = np.nan
    _fill_todo(out, periodic, todo, new, m)
    if keep.shape[0] > 0:
        for j in range(ny):
            for i in range(nx):
                if keep[j, i] and (np.isnan(src[j, i]) or np.isnan(other[j, i])):
                    out[j, i] = np.nan


@numba.njit(cache=True, error_model="numpy", parallel=True)
def _pair_parallel(tx, ty, ox, oy, target, keep, periodic):
    n = tx.shape[1] * tx.shape[2]
    for k in numba.prange(2 * tx.shape[0]):
        t = k // 2
        if k % 2 == 0:
            _pair_field(tx[t], ty[t], ox[t], target, keep, periodic,
                        np.empty(n, np.int64), np.empty(n))
        else:
            _pair_field(ty[t], tx[t], oy[t], target, keep, periodic,
                        np.empty(n, np.int64), np.empty(n))


@_jit
def _pair_serial(tx, ty, ox, oy, target, keep, periodic):
    n = tx.shape[1] * tx.shape[2]
    todo, new = np.empty(n, np.int64), np.empty(n)
    for t in range(tx.shape[0]):
        _pair_field(tx[t], ty[t], ox[t], target, keep, periodic, todo, new)
        _pair_field(ty[t], tx[t], oy[t], target, keep, periodic, todo, new)


def fill_pair(tx, ty, *, target, periodic, keep_missing=None):
    """Compiled twin of :func:`sverdrup_kit._compiled.scan.fill_pair_numpy` (same arguments
    and results), one pass per component to copy and one to fill."""
    shape = np.broadcast_shapes(np.shape(tx), np.shape(ty))
    TX, TY = _stack(tx, shape), _stack(ty, shape)
    target = np.ascontiguousarray(np.asarray(target, dtype=bool))
    keep = (np.zeros((0, 0), dtype=bool) if keep_missing is None
            else np.ascontiguousarray(np.asarray(keep_missing, dtype=bool)))
    ox, oy = np.empty(TX.shape), np.empty(TX.shape)
    kernel = _pair_parallel if _in_main_thread() else _pair_serial
    kernel(TX, TY, ox, oy, target, keep, bool(periodic))
    return ox.reshape(shape), oy.reshape(shape)


@_jit
def _screen_range(a, out, fills, sentinel, factor, limit, lo, hi, counts, b):
    # Fills and limits are far from the values of a clean field: one test on |x| and |y|
    # clears almost every cell, and NaN cells are cleared by the next.
    small = sentinel
    for f in fills:
        small = min(small, abs(f))
    n_fill = 0
    n_over = 0
    for k in range(lo, hi):
        x = a[k]
        y = np.float64(x) * factor
        out[k] = y
        if abs(x) < small and abs(y) <= limit:
            continue
        if np.isnan(x):
            continue
        hit = False
        if x >= sentinel or x <= -sentinel:
            hit = np.isfinite(x)
        else:
            for f in fills:
                if x == f:
                    hit = True
                    break
        if hit:
            out[k] = np.nan
            n_fill += 1
        elif y > limit or y < -limit:
            n_over += 1
    counts[b, 0] = n_fill
    counts[b, 1] = n_over


@numba.njit(cache=True, error_model="numpy", parallel=True)
def _screen_parallel(a, out, fills, sentinel, factor, limit, counts):
    n, nb = a.size, counts.shape[0]
    for b in numba.prange(nb):
        _screen_range(a, out, fills, sentinel, factor, limit, b * n // nb, (b + 1) * n // nb,
                      counts, b)


def screen(a, *, fills, sentinel, factor, limit):
    """Compiled twin of :func:`sverdrup_kit._compiled.screen.screen_numpy` (same arguments and
    results) for float32 and float64 arrays."""
    a = np.asarray(a)
    flat = np.ascontiguousarray(a).reshape(-1)
    out = np.empty(flat.shape, dtype=np.float64)
    args = (flat, out, np.asarray(fills, dtype=a.dtype), a.dtype.type(sentinel), float(factor),
            float(limit))
    if _in_main_thread():
        counts = np.zeros((_blocks(), 2), dtype=np.int64)
        _screen_parallel(*args, counts)
    else:
        counts = np.zeros((1, 2), dtype=np.int64)
        _screen_range(*args, 0, flat.size, counts, 0)
    return out.reshape(a.shape), int(counts[:, 0].sum()), int(counts[:, 1].sum())


@_jit
def _coverage_slot(tx, ty, cells, starts, out, t, s):
    hi = starts[s + 1] if s + 1 < starts.size else cells.size
    n = 0
    for k in range(starts[s], hi):
        q = cells[k]
        if np.isfinite(tx[t, q]) and np.isfinite(ty[t, q]):
            n += 1
    out[t, s] = n / (hi - starts[s])


@_jit
def _coverage_serial(tx, ty, cells, starts, out):
    for t in range(tx.shape[0]):
        for s in range(starts.size):
            _coverage_slot(tx, ty, cells, starts, out, t, s)


@numba.njit(cache=True, error_model="numpy", parallel=True)
def _coverage_parallel(tx, ty, cells, starts, out):
    # Slots of every field in one parallel loop: a single field has thousands of them.
    ns = starts.size
    for k in numba.prange(tx.shape[0] * ns):
        _coverage_slot(tx, ty, cells, starts, out, k // ns, k % ns)


def coverage(tx, ty, cells, starts, slot, n_slots):
    """Compiled twin of :func:`sverdrup_kit._compiled.scan.coverage_numpy` (same arguments and
    results)."""
    shape = np.broadcast_shapes(np.shape(tx), np.shape(ty))
    lead = shape[:-2]
    TX = _stack(tx, shape).reshape(-1, shape[-2] * shape[-1])
    TY = _stack(ty, shape).reshape(TX.shape)
    out = np.full((TX.shape[0], n_slots), np.nan)
    if np.size(starts):
        share = np.empty((TX.shape[0], np.size(starts)))
        kernel = _coverage_parallel if _in_main_thread() else _coverage_serial
        kernel(TX, TY, np.ascontiguousarray(cells, dtype=np.int64),
               np.ascontiguousarray(starts, dtype=np.int64), share)
        out[:, slot] = share
    return out.reshape(lead + (n_slots,))
