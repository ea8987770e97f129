"""The same numbers in memory, chunked on local threads, and on a dask.distributed cluster.

Run:  .venv/bin/python benchmarks/cluster.py [--workers 2] [--repeat 4]

Takes the bundled invented world (12 monthly wind fields, 2 degree grid; ``--repeat`` stacks
copies of the year into a longer record), runs wind_stress -> wind_stress_curl, ekman and
sverdrup (ocean mask given) three ways and prints, for every output variable, the largest
difference from the in-memory result relative to the largest in-memory value, with wall times:

- in memory (NumPy arrays);
- chunked one month per chunk on the local threaded scheduler;
- the same chunks on a LocalCluster of ``--workers`` worker processes (one thread each).
"""

from __future__ import annotations

import argparse
import time
import warnings

import numpy as np
import xarray as xr


def pipeline(u, v, mask):
    from sverdrup_kit.physics.ekman import ekman
    from sverdrup_kit.physics.operators import wind_stress_curl
    from sverdrup_kit.physics.stress import wind_stress
    from sverdrup_kit.physics.sverdrup import sverdrup_transport

    st = wind_stress(u, v)
    out = xr.merge(
        [
            st,
            wind_stress_curl(st["taux"], st["tauy"]).to_dataset(),
            ekman(st["taux"], st["tauy"]),
            sverdrup_transport(st["taux"], st["tauy"], ocean_mask=mask).drop_vars("wind_stress_curl"),
        ],
        compat="override",
    )
    return out


def compare(got, ref):
    worst = 0.0
    for name, r in ref.data_vars.items():
        if not np.issubdtype(r.dtype, np.floating):
            same = np.array_equal(got[name].values, r.values)
            print(f"  {name:28s} {'identical' if same else 'DIFFERENT'}")
            worst = max(worst, 0.0 if same else np.inf)
            continue
        g, rv = got[name].values, r.values
        same_nan = np.array_equal(np.isnan(g), np.isnan(rv))
        scale = np.nanmax(np.abs(rv)) if np.isfinite(rv).any() else 1.0
        rel = np.nanmax(np.abs(g - rv)) / scale if np.isfinite(rv).any() else 0.0
        worst = max(worst, rel if same_nan else np.inf)
        print(f"  {name:28s} max |diff| / max |value| = {rel:.1e}"
              f"{'' if same_nan else '  (missing cells differ)'}")  # fmt: skip
    return worst


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--workers", type=int, default=2)
    p.add_argument("--repeat", type=int, default=4, help="years of the record (stacked)")
    args = p.parse_args(argv)
    warnings.simplefilter("ignore")  # monthly-mean winds: the bias warning is beside the point

    from distributed import Client, LocalCluster

    from sverdrup_kit.synthetic import load_world

    w = load_world()
    u = xr.concat([w["u"]] * args.repeat, "time")
    v = xr.concat([w["v"]] * args.repeat, "time")
    u["time"] = v["time"] = np.arange(u.sizes["time"])
    mask = w["ocean_mask"]
    print(f"record: {u.sizes['time']} fields of {u.sizes['lat']} x {u.sizes['lon']}")

    t0 = time.perf_counter()
    ref = pipeline(u, v, mask).compute()
    t_mem = time.perf_counter() - t0

    uc, vc = u.chunk({"time": 1}), v.chunk({"time": 1})
    t0 = time.perf_counter()
    local = pipeline(uc, vc, mask).compute(scheduler="threads")
    t_local = time.perf_counter() - t0

    with LocalCluster(n_workers=args.workers, threads_per_worker=1, processes=True,
                      dashboard_address=None) as cluster, Client(cluster):  # fmt: skip
        t0 = time.perf_counter()
        dist = pipeline(uc, vc, mask).compute()
        t_dist = time.perf_counter() - t0

    print(f"\nwall time: in memory {t_mem:.2f} s, chunked on local threads {t_local:.2f} s, "
          f"LocalCluster {args.workers} processes {t_dist:.2f} s "
          "(includes starting the workers and sending the data)")  # fmt: skip
    print("\nchunked (local threads) vs in memory:")
    w1 = compare(local, ref)
    print("\nLocalCluster vs in memory:")
    w2 = compare(dist, ref)
    print(f"\nlargest relative difference: local {w1:.1e}, distributed {w2:.1e}")


if __name__ == "__main__":
    main()
