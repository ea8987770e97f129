"""Fast kernels against the naive NumPy baseline, and against the machine's memory bandwidth.

Run:  .venv/bin/python benchmarks/kernels.py [--steps 12] [--step 0.25] [--repeat 5]

On global quarter-degree stress fields (720 x 1440, a year of monthly fields by default) with
land, times side by side on the same arrays:

- naive:   benchmarks/naive.py -- np.gradient curl with one-sided patches at coasts,
           V = curl / (rho0 beta), a reversed np.cumsum per run of ocean cells;
- numpy:   the toolkit's vectorised NumPy curl kernel (the method's reference statement);
- fast:    the compiled curl, V and scan, one after the other (public entry points);
- fused:   the compiled single pass (curl, V and scan per row while it is in cache).

each on one core and on all cores (numba.set_num_threads), and prints the speed-up over the
naive baseline, throughput in cells per second, and a memory-bandwidth bound measured here:
a STREAM-like triad a = b + s c (24 bytes per element, the same traffic per cell as the curl:
two fields read, one written) and a plain copy. Geometry (runs, weights) is prepared once,
outside the timings, as the toolkit does once per grid. Timings are the best of ``--repeat``.
"""

from __future__ import annotations

import argparse
import os
import platform
import time

import fields
import naive
import numba
import numpy as np

from sverdrup_kit._compiled import curl as _kernels
from sverdrup_kit._compiled import jit as _fast


def best_time(fn, repeat):
    fn()  # compile / warm the caches and the page tables
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times)


@numba.njit(parallel=True, cache=True)
def _triad(a, b, c, s):
    for i in numba.prange(a.size):
        a[i] = b[i] + s * c[i]


def bandwidth(n_elements, repeat):
    """(triad GB/s, triad elements/s) with the current number of threads, and copy GB/s."""
    a = np.zeros(n_elements)
    b = np.ones(n_elements)
    c = np.full(n_elements, 2.0)
    t = best_time(lambda: _triad(a, b, c, 3.0), repeat)
    t_copy = best_time(lambda: np.copyto(a, b), repeat)
    return 24 * n_elements / t / 1e9, n_elements / t, 16 * n_elements / t_copy / 1e9


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--steps", type=int, default=12, help="fields in the stack (default 12)")
    p.add_argument("--step", type=float, default=0.25, help="grid step in degrees")
    p.add_argument("--repeat", type=int, default=5, help="repeats; the best is kept")
    args = p.parse_args(argv)

    taux, tauy, lat, lon, ocean = fields.stress(args.step, args.steps)
    nt, ny, nx = taux.shape
    cells_total = taux.size
    phi, lam = np.deg2rad(lat), np.deg2rad(lon)
    dx, rb = fields.cell_width(lat, lon), fields.rho0_beta(lat)
    cells, starts = naive.ocean_runs(ocean, periodic=True)
    row_runs = _fast.runs_by_row(cells, starts, ny, nx)
    coast = ocean & ~(
        np.roll(ocean, 1, 1) & np.roll(ocean, -1, 1) & np.roll(ocean, 1, 0) & np.roll(ocean, -1, 0)
    )
    print(f"machine: {platform.processor() or platform.machine()}, {os.cpu_count()} cores, "
          f"numba {numba.__version__}, numpy {np.__version__}")  # fmt: skip
    print(f"fields: {nt} x {ny} x {nx} = {cells_total / 1e6:.1f} M cells, "
          f"land {100 * (1 - ocean.mean()):.1f}%, coastal ocean cells {100 * coast.mean():.1f}%, "
          f"{starts.size} runs")  # fmt: skip

    # Same numbers before timing anything.
    c_ref, v_ref, psi_ref = naive.sverdrup(
        taux, tauy, lat, lon, periodic=True, dx=dx, cells=cells, run_starts=starts, rho0_beta=rb
    )
    c_f, v_f, psi_f, _ = _fast.sverdrup_fused(
        taux, tauy, phi, lam, periodic=True, radius=fields.RADIUS, rho0_beta=rb, dx=dx,
        cells=cells, run_starts=starts, row_runs=row_runs,
    )  # fmt: skip
    for name, a, b in (("curl", c_f, c_ref), ("V", v_f, v_ref), ("psi", psi_f, psi_ref)):
        same_nan = np.array_equal(np.isnan(a), np.isnan(b))
        rel = np.nanmax(np.abs(a - b)) / np.nanmax(np.abs(b))
        print(f"agreement fast vs naive, {name}: max |diff| / max |naive| = {rel:.1e}, "
              f"same missing cells: {same_nan}")  # fmt: skip
        assert same_nan and rel < 1e-12
    del c_ref, v_ref, psi_ref, c_f, v_f, psi_f

    def naive_curl():
        naive.curl(taux, tauy, lat, lon, periodic=True, radius=fields.RADIUS)

    def naive_all():
        naive.sverdrup(taux, tauy, lat, lon, periodic=True, dx=dx, cells=cells,
                       run_starts=starts, rho0_beta=rb)  # fmt: skip

    def numpy_curl():
        _kernels.curl_kernel_numpy(taux, tauy, phi, lam, periodic=True, radius=fields.RADIUS)

    def fast_curl():
        _fast.curl(taux, tauy, phi, lam, periodic=True, radius=fields.RADIUS)

    def fast_all():
        c = _fast.curl(taux, tauy, phi, lam, periodic=True, radius=fields.RADIUS)
        v = c / rb[:, None]
        _fast.westward_scan(v, dx, cells, starts)

    def fused():
        _fast.sverdrup_fused(
            taux, tauy, phi, lam, periodic=True, radius=fields.RADIUS, rho0_beta=rb, dx=dx,
            cells=cells, run_starts=starts, row_runs=row_runs,
        )  # fmt: skip

    # The compiled loops alone, writing into buffers allocated once: the throughput to set
    # against the bandwidth bound (the entry points above also pay for fresh output pages).
    cos = np.cos(phi)
    rcos = fields.RADIUS * cos
    wlon, plon = _fast.weight_tables(lam, 2 * np.pi)
    wlat, plat = _fast.weight_tables(phi)
    out = [np.empty_like(taux) for _ in range(3)]
    totals = np.empty((nt, starts.size))

    def curl_loop():
        _fast._curl_parallel(
            taux, tauy, cos, rcos, wlon, wlat, plon, plat, True, out[0], _fast._blocks()
        )

    def fused_loop():
        _fast._sverdrup_parallel(
            taux, tauy, cos, rcos, wlon, wlat, plon, plat, True, rb, dx, cells, starts, row_runs,
            out[0], out[1], out[2], totals, _fast._blocks(),
        )  # fmt: skip

    # The slow ones take turns, so that a busy spell on a shared machine hits them alike.
    slow = {"naive curl": naive_curl, "naive all": naive_all, "numpy curl": numpy_curl}
    slow_t = {k: float("inf") for k in slow}
    for _ in range(max(1, min(args.repeat, 3))):
        for k, fn in slow.items():
            t0 = time.perf_counter()
            fn()
            slow_t[k] = min(slow_t[k], time.perf_counter() - t0)
    t_naive_curl, t_naive_all, t_numpy_curl = slow_t.values()
    print(f"\nnaive NumPy (one core): curl {t_naive_curl:.3f} s, curl + V + scan "
          f"{t_naive_all:.3f} s; toolkit NumPy curl kernel {t_numpy_curl:.3f} s")  # fmt: skip

    n_bw = max(cells_total, 1 << 24)
    for threads in sorted({1, numba.config.NUMBA_NUM_THREADS}):
        numba.set_num_threads(threads)
        bw, elem_rate, copy_bw = bandwidth(n_bw, args.repeat)
        t = {name: best_time(fn, args.repeat) for name, fn in (
            ("fast curl", fast_curl), ("fast curl+V+scan", fast_all),
            ("fused curl+V+scan", fused), ("curl loop", curl_loop),
            ("fused loop", fused_loop))}  # fmt: skip
        print(f"\n--- {threads} thread(s) ---")
        print(f"bandwidth: triad {bw:.1f} GB/s ({elem_rate / 1e6:.0f} M elements/s), "
              f"numpy copy {copy_bw:.1f} GB/s")  # fmt: skip
        print(f"{'':24s}{'time s':>9s}{'vs naive':>10s}{'M cells/s':>11s}")
        rows = [
            ("fast curl", t["fast curl"], t_naive_curl),
            ("fast curl+V+scan", t["fast curl+V+scan"], t_naive_all),
            ("fused curl+V+scan", t["fused curl+V+scan"], t_naive_all),
        ]
        for name, tt, ref in rows:
            print(f"{name:24s}{tt:9.4f}{ref / tt:9.1f}x{cells_total / tt / 1e6:11.0f}")
        # Bytes per cell that must cross the memory bus: curl reads two fields and writes
        # one (24 B, as the triad); the fused pass also writes V and psi (40 B).
        for name, tt, nbytes in (("curl loop", t["curl loop"], 24),
                                 ("fused loop", t["fused loop"], 40)):  # fmt: skip
            rate = cells_total / tt
            bound = bw * 1e9 / nbytes
            print(f"{name:24s}{tt:9.4f}{'':10s}{rate / 1e6:11.0f}   bound {bound / 1e6:.0f} M "
                  f"cells/s at {nbytes} B/cell: {100 * rate / bound:.0f}% of triad "
                  "bandwidth")  # fmt: skip


if __name__ == "__main__":
    main()
