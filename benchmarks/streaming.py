"""Long records stream: time and peak memory at 1x and 4x the record length, fixed chunks.

Run:  .venv/bin/python benchmarks/streaming.py [--days 365] [--chunk 30] [--factors 1 4]
                                          [--modes mean netcdf write_netcdf sverdrup]

Synthetic lazy winds (dask random numbers on a 1 degree global grid with land, daily, chunked in
time) go through the public functions and are reduced or written:

- mean:     wind_stress -> wind_stress_curl and ekman -> time means, computed;
- netcdf:   the same fields, every day, written with to_netcdf (compute=True);
- write_netcdf: the same, with the toolkit's writer (compressed, written atomically);
- sverdrup: wind_stress -> sverdrup (ocean_mask given) -> time mean of the streamfunction
            and of the interior transport.

Each case runs in a fresh subprocess, which reports its wall time and its peak resident memory
(resource.getrusage, ru_maxrss). A record N times longer should take about N times longer and
need not much more memory; the script prints both ratios.
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent


def _peak_mb():
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0


def _lazy_winds(days, chunk, seed=0):
    import dask.array as da
    import fields
    import numpy as np
    import xarray as xr

    lat, lon = fields.grid(1.0)
    ocean = fields.ocean_mask(1.0, islands=300, seed=seed)
    rng = da.random.default_rng(seed)
    shape, chunks = (days, lat.size, lon.size), (chunk, lat.size, lon.size)
    coords = {
        "time": np.datetime64("2001-01-01") + np.arange(days).astype("timedelta64[D]"),
        "lat": ("lat", lat, {"units": "degrees_north"}),
        "lon": ("lon", lon, {"units": "degrees_east"}),
    }
    land = da.from_array(~ocean, chunks=-1)

    def field(mean, name):
        vals = rng.normal(mean, 6.0, size=shape, chunks=chunks)
        vals = da.where(land, np.nan, vals)
        return xr.DataArray(vals, dims=("time", "lat", "lon"), coords=coords, name=name,
                            attrs={"units": "m s-1"})  # fmt: skip

    mask = xr.DataArray(ocean, dims=("lat", "lon"), coords={"lat": lat, "lon": lon})
    return field(3.0, "u"), field(0.0, "v"), mask


def run_case(mode, days, chunk):
    """One measurement; prints a JSON line with wall time and memory."""
    import dask
    import xarray as xr

    from sverdrup_kit import progress as _progress
    from sverdrup_kit.io.writers import write_netcdf
    from sverdrup_kit.physics.ekman import ekman
    from sverdrup_kit.physics.operators import wind_stress_curl
    from sverdrup_kit.physics.stress import wind_stress
    from sverdrup_kit.physics.sverdrup import sverdrup_transport

    def pipeline(days):
        u, v, mask = _lazy_winds(days, chunk)
        st = wind_stress(u, v)
        if mode == "sverdrup":
            sv = sverdrup_transport(st["taux"], st["tauy"], ocean_mask=mask)
            return sv["sverdrup_streamfunction"], sv["interior_transport"]
        curl = wind_stress_curl(st["taux"], st["tauy"])
        return curl, ekman(st["taux"], st["tauy"])["ekman_pumping"]

    # A two-day run first loads the compiled kernels, so that the memory measured below is
    # that of the data, not of the compiler.
    dask.compute(*[a.mean("time") for a in pipeline(2)])
    a, b = pipeline(days)
    base = _peak_mb()
    t0 = time.perf_counter()
    if mode == "netcdf":
        with tempfile.TemporaryDirectory() as tmp:
            xr.Dataset({"wind_stress_curl": a, "ekman_pumping": b}).to_netcdf(
                os.path.join(tmp, "out.nc"), compute=True
            )
    elif mode == "write_netcdf":
        with tempfile.TemporaryDirectory() as tmp:
            write_netcdf(xr.Dataset({"wind_stress_curl": a, "ekman_pumping": b}),
                         os.path.join(tmp, "out.nc"))  # fmt: skip
    else:
        _progress.compute(a.mean("time"), b.mean("time"))
    wall = time.perf_counter() - t0
    print(json.dumps({"mode": mode, "days": days, "chunk": chunk, "wall_s": wall,
                      "peak_rss_mb": _peak_mb(), "rss_before_compute_mb": base,
                      "threads": dask.system.CPU_COUNT}))  # fmt: skip


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--days", type=int, default=365, help="record length at 1x (daily fields)")
    p.add_argument("--chunk", type=int, default=30, help="time steps per chunk")
    p.add_argument("--factors", type=int, nargs="+", default=[1, 4])
    p.add_argument("--modes", nargs="+", default=["mean", "netcdf", "write_netcdf", "sverdrup"],
                   choices=["mean", "netcdf", "write_netcdf", "sverdrup"])  # fmt: skip
    p.add_argument("--case", help=argparse.SUPPRESS)
    args = p.parse_args(argv)
    if args.case:
        run_case(args.case, args.days, args.chunk)
        return
    print(f"1 degree global grid (180 x 360), daily fields, chunks of {args.chunk} days; "
          f"each case in a fresh process")  # fmt: skip
    print(f"{'mode':10s}{'days':>7s}{'wall s':>9s}{'peak MB':>9s}{'before MB':>11s}")
    for mode in args.modes:
        res = {}
        for f in args.factors:
            days = args.days * f
            out = subprocess.run(
                [sys.executable, __file__, "--case", mode, "--days", str(days),
                 "--chunk", str(args.chunk)],
                capture_output=True, text=True, check=True, cwd=HERE,
            )  # fmt: skip
            r = json.loads(out.stdout.strip().splitlines()[-1])
            res[f] = r
            print(f"{mode:10s}{days:7d}{r['wall_s']:9.1f}{r['peak_rss_mb']:9.0f}"
                  f"{r['rss_before_compute_mb']:11.0f}")  # fmt: skip
        lo, hi = min(args.factors), max(args.factors)
        if lo != hi:
            n = hi / lo
            print(f"{mode:10s} {n:g}x record: time x{res[hi]['wall_s'] / res[lo]['wall_s']:.2f}, "
                  f"peak memory x{res[hi]['peak_rss_mb'] / res[lo]['peak_rss_mb']:.2f} "
                  f"({res[hi]['peak_rss_mb'] - res[lo]['peak_rss_mb']:+.0f} MB)")  # fmt: skip


if __name__ == "__main__":
    main()
