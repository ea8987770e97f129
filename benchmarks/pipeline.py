"""The public functions end to end on quarter-degree fields, in memory.

Run:  .venv/bin/python benchmarks/pipeline.py [--steps 12] [--step 0.25] [--repeat 3]

Times wind_stress_curl, ekman and sverdrup (ocean mask given) on global stress fields with land
(benchmarks/fields.py), best of ``--repeat``, with numba on all cores; then each again with
SVERDRUP_KIT_JIT=0 (the NumPy kernels), and checks that the results agree.
"""

from __future__ import annotations

import argparse
import os

import fields
import numpy as np
import xarray as xr
from timing import best_time

from sverdrup_kit._compiled import dispatch
from sverdrup_kit.physics.ekman import ekman
from sverdrup_kit.physics.operators import wind_stress_curl
from sverdrup_kit.physics.sverdrup import sverdrup_transport


def worst_difference(got, ref):
    """Largest difference over all float variables, relative to each variable's largest value;
    integer variables must be equal."""
    got = got.to_dataset() if isinstance(got, xr.DataArray) else got
    ref = ref.to_dataset() if isinstance(ref, xr.DataArray) else ref
    worst = 0.0
    for name, r in ref.data_vars.items():
        g, rv = got[name].values, r.values
        if not np.issubdtype(rv.dtype, np.floating):
            assert np.array_equal(g, rv), name
            continue
        assert np.array_equal(np.isnan(g), np.isnan(rv)), name
        if np.isfinite(rv).any():
            scale = np.nanmax(np.abs(rv))
            worst = max(worst, np.nanmax(np.abs(g - rv)) / scale if scale else 0.0)
    return worst


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

    funcs = {
        "wind_stress_curl": lambda: wind_stress_curl(tx, ty),
        "ekman": lambda: ekman(tx, ty),
        "sverdrup": lambda: sverdrup_transport(tx, ty, ocean_mask=mask),
    }
    print(f"{'':18s}{'compiled s':>12s}{'NumPy s':>10s}{'ratio':>8s}{'max |diff| / max':>18s}")
    for name, fn in funcs.items():
        t_fast, fast = best_time(fn, args.repeat)
        before = os.environ.get(dispatch.JIT_ENV)
        os.environ[dispatch.JIT_ENV] = "0"
        try:
            t_np, ref = best_time(fn, max(1, args.repeat // 2))
        finally:
            if before is None:
                del os.environ[dispatch.JIT_ENV]
            else:
                os.environ[dispatch.JIT_ENV] = before
        diff = worst_difference(fast, ref)
        print(f"{name:18s}{t_fast:12.3f}{t_np:10.3f}{t_np / t_fast:7.1f}x{diff:18.1e}")


if __name__ == "__main__":
    main()
