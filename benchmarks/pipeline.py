"""The public functions end to end on quarter-degree fields, in memory.

Run:  .venv/bin/python benchmarks/pipeline.py [--steps 12] [--step 0.25] [--repeat 3]

Times wind_stress_curl, ekman and sverdrup (ocean mask given) on global stress fields with land
(benchmarks/fields.py), best of ``--repeat``, with numba on all cores. Then times sverdrup again
with the compiled gap fill and westward scan of sverdrup_kit._fast swapped in for the NumPy ones
(the hook proposed for sverdrup.py) and checks that the results agree.
"""

from __future__ import annotations

import argparse
import importlib
import time

import fields
import numpy as np
import xarray as xr

from sverdrup_kit import _scan
from sverdrup_kit.ekman import ekman
from sverdrup_kit.operators import wind_stress_curl

# The module, not the function of the same name that the package exports.
sv_module = importlib.import_module("sverdrup_kit.sverdrup")


def best_time(fn, repeat):
    out = fn()
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return min(times), out


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--steps", type=int, default=12)
    p.add_argument("--step", type=float, default=0.25)
    p.add_argument("--repeat", type=int, default=3)
    args = p.parse_args(argv)

    taux, tauy, lat, lon, ocean = fields.stress(args.step, args.steps)
    coords = {"lat": ("lat", lat, {"units": "degrees_north"}),
              "lon": ("lon", lon, {"units": "degrees_east"})}  # fmt: skip
    tx = xr.DataArray(taux, dims=("time", "lat", "lon"), coords=coords, attrs={"units": "Pa"})
    ty = xr.DataArray(tauy, dims=("time", "lat", "lon"), coords=coords, attrs={"units": "Pa"})
    mask = xr.DataArray(ocean, dims=("lat", "lon"), coords=coords)
    print(f"fields: {taux.shape[0]} x {lat.size} x {lon.size}, "
          f"land {100 * (1 - ocean.mean()):.0f}%")  # fmt: skip

    for name, fn in (
        ("wind_stress_curl", lambda: wind_stress_curl(tx, ty)),
        ("ekman", lambda: ekman(tx, ty)),
    ):
        t, _ = best_time(fn, args.repeat)
        print(f"{name:34s} {t:7.3f} s  {taux.size / t / 1e6:6.0f} M cells/s")

    # The shipped sverdrup dispatches to the compiled fill and scan; swap in their NumPy
    # statements to see what the compilation buys.
    saved = sv_module.westward_scan, sv_module.fill_from_neighbours
    sv_module.westward_scan = _scan.westward_scan_numpy
    sv_module.fill_from_neighbours = _scan.fill_from_neighbours_numpy
    try:
        t_np, ref = best_time(lambda: sv_module.sverdrup(tx, ty, ocean_mask=mask), args.repeat)
    finally:
        sv_module.westward_scan, sv_module.fill_from_neighbours = saved
    print(f"{'sverdrup (NumPy fill and scan)':34s} {t_np:7.3f} s  "
          f"{taux.size / t_np / 1e6:6.0f} M cells/s")  # fmt: skip
    t_c, got = best_time(lambda: sv_module.sverdrup(tx, ty, ocean_mask=mask), args.repeat)
    print(f"{'sverdrup (as shipped, compiled)':34s} {t_c:7.3f} s  "
          f"{taux.size / t_c / 1e6:6.0f} M cells/s  ({t_np / t_c:.1f}x)")  # fmt: skip
    worst = 0.0
    for name, r in ref.data_vars.items():
        g = got[name].values
        if np.issubdtype(r.dtype, np.floating):
            assert np.array_equal(np.isnan(g), np.isnan(r.values)), name
            scale = np.nanmax(np.abs(r.values)) if np.isfinite(r.values).any() else 1.0
            worst = max(worst, np.nanmax(np.abs(g - r.values)) / scale if scale else 0.0)
        else:
            assert np.array_equal(g, r.values), name
    print(f"agreement: largest difference / largest value over all variables = {worst:.1e}")


if __name__ == "__main__":
    main()
