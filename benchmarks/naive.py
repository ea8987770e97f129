"""The baseline: the NumPy a practitioner would write for the curl and the Sverdrup integral.

``np.gradient`` for the derivatives (padded by one column across the date line when longitude
is periodic), one-sided differences patched in next to land with ``np.where``, ``V = curl /
(rho0 beta)``, and a reversed cumulative sum along every run of ocean cells, one run at a time.
It computes the same numbers as the toolkit's kernels (to round-off) and is what the
benchmarks time them against; the tests check that the two agree.

Not part of the package: imported by the benchmark scripts and by tests/test_kernels.py.
"""

from __future__ import annotations

import numpy as np


def _roll(a, k, axis, periodic):
    """a[i + k] along ``axis``; NaN past the ends unless periodic."""
    out = np.roll(a, -k, axis=axis)
    if not periodic:
        n = a.shape[axis]
        idx = [slice(None)] * a.ndim
        idx[axis] = slice(n - k, n) if k > 0 else slice(0, -k)
        out[tuple(idx)] = np.nan
    return out


def _coord(x, k, period):
    n = x.size
    idx = np.arange(n) + k
    if period is None:
        # Values beyond the ends are never used (the field there is NaN); any finite number will do.
        return x[np.clip(idx, 0, n - 1)] + (idx - np.clip(idx, 0, n - 1))
    return x[idx % n] + np.floor_divide(idx, n) * period


def derivative(f, x, axis, *, period=None):
    """d f / d x along ``axis``: np.gradient, then one-sided differences next to land."""
    periodic = period is not None
    if periodic:
        pad = np.concatenate(
            [np.take(f, [-1], axis=axis), f, np.take(f, [0], axis=axis)], axis=axis
        )
        xp = np.concatenate([[x[-1] - period], x, [x[0] + period]])
        d = np.gradient(pad, xp, axis=axis, edge_order=2)
        d = np.take(d, np.arange(1, f.shape[axis] + 1), axis=axis)
    else:
        d = np.gradient(f, x, axis=axis, edge_order=2)
    shape = [1] * f.ndim
    shape[axis] = -1

    def c(k):
        return _coord(x, k, period).reshape(shape)

    fm2, fm1, fp1, fp2 = (_roll(f, k, axis, periodic) for k in (-2, -1, 1, 2))
    hm, hp = c(0) - c(-1), c(1) - c(0)
    hmm, hpp = c(-1) - c(-2), c(2) - c(1)
    okm, okp = np.isfinite(fm1), np.isfinite(fp1)
    okmm, okpp = okm & np.isfinite(fm2), okp & np.isfinite(fp2)
    with np.errstate(invalid="ignore", divide="ignore"):
        fwd2 = (-(2 * hp + hpp) * f / (hp * (hp + hpp)) + (hp + hpp) * fp1 / (hp * hpp)
                - hp * fp2 / (hpp * (hp + hpp)))  # fmt: skip
        bwd2 = ((2 * hm + hmm) * f / (hm * (hm + hmm)) - (hm + hmm) * fm1 / (hm * hmm)
                + hm * fm2 / (hmm * (hm + hmm)))  # fmt: skip
        fwd1 = (fp1 - f) / hp
        bwd1 = (f - fm1) / hm
    patch = np.where(
        okpp, fwd2, np.where(okmm, bwd2, np.where(okp, fwd1, np.where(okm, bwd1, 0.0)))
    )
    d = np.where(okm & okp, d, patch)
    return np.where(np.isfinite(f), d, np.nan)


def curl(taux, tauy, lat, lon, *, periodic, radius=6.371e6):
    """Wind-stress curl (N m-3) on a latitude-longitude grid given in degrees."""
    land = ~(np.isfinite(taux) & np.isfinite(tauy))
    tx = np.where(land, np.nan, taux)
    ty = np.where(land, np.nan, tauy)
    phi, lam = np.deg2rad(lat), np.deg2rad(lon)
    cos = np.cos(phi)[:, None]
    dty = derivative(ty, lam, -1, period=2 * np.pi if periodic else None)
    dtx = derivative(tx * cos, phi, -2)
    with np.errstate(divide="ignore", invalid="ignore"):
        out = (dty - dtx) / (radius * cos)
    out[..., np.abs(cos[:, 0]) < 1e-12, :] = np.nan
    return out


def ocean_runs(ocean, *, periodic):
    """Runs of ocean cells in each row, east to west, as flat indices (cells, run_starts).

    A run starts at the ocean cell west of a land cell (an eastern coast) and ends at the next
    land cell to the west; on a periodic row it may wrap across the date line. Rows with no
    land have no eastern coast and give no run.
    """
    ny, nx = ocean.shape
    cells, starts, n = [], [], 0
    for j in range(ny):
        row = ocean[j]
        if row.all() or not row.any():
            continue
        if periodic:
            # Start the walk just west of a land cell so that no run is cut by the wrap.
            first_land = int(np.flatnonzero(~row)[0])
            order = (first_land - 1 - np.arange(nx)) % nx
        else:
            order = np.arange(nx - 1, -1, -1)
        wet = row[order]
        edges = np.flatnonzero(np.diff(np.concatenate([[False], wet, [False]]).astype(np.int8)))
        for a, b in zip(edges[::2], edges[1::2]):
            starts.append(n)
            cells.append(j * nx + order[a:b])
            n += b - a
    if not cells:
        return np.zeros(0, dtype=np.int64), np.zeros(0, dtype=np.int64)
    return np.concatenate(cells).astype(np.int64), np.asarray(starts, dtype=np.int64)


def westward_integral(v, dx, cells, run_starts):
    """psi = -(sum of v dx east of a cell + half its own), one reversed cumsum per run."""
    ny, nx = v.shape[-2:]
    flat = v.reshape(v.shape[:-2] + (ny * nx,))
    psi = np.full(flat.shape, np.nan)
    bounds = np.append(run_starts, cells.size)
    for a, b in zip(bounds[:-1], bounds[1:]):
        idx = cells[a:b]
        f = flat[..., idx] * dx.reshape(-1)[idx]
        psi[..., idx] = -(np.cumsum(f, axis=-1) - 0.5 * f)
    return psi.reshape(v.shape)


def sverdrup(taux, tauy, lat, lon, *, periodic, dx, cells, run_starts, rho0_beta,
             radius=6.371e6):  # fmt: skip
    """Curl, V = curl / (rho0 beta) and the westward integral, the practitioner's way."""
    c = curl(taux, tauy, lat, lon, periodic=periodic, radius=radius)
    v = c / rho0_beta[:, None]
    return c, v, westward_integral(v, dx, cells, run_starts)
