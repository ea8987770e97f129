"""Time of the barotropic vorticity solver on the synthetic world at 1 degree (target: seconds).

Run: .venv/bin/python benchmarks/barotropic.py
"""

from __future__ import annotations

import argparse
import time

import numpy as np
import xarray as xr

from sverdrup_kit import solve_barotropic, wind_stress, wind_stress_curl
from sverdrup_kit.synthetic import load_world


def synthetic_curl(step: float) -> xr.DataArray:
    """Annual-mean wind-stress curl of the bundled synthetic world, on a ``step``-degree grid.

    The 2 degree world is sampled to the finer grid (nearest cell), so the geography, islands
    included, is the one shipped with the toolkit.
    """
    world = load_world()
    stress = wind_stress(world.u, world.v, wind_speed=world.wind_speed).mean("time")
    lat = np.arange(-90 + step / 2, 90, step)
    lon = np.arange(step / 2, 360, step)
    fine = stress.interp(lat=lat, lon=lon, method="nearest",
                         kwargs={"fill_value": "extrapolate"})
    return wind_stress_curl(fine.taux, fine.tauy)


def main(argv=None) -> None:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--step", type=float, default=1.0, help="grid spacing in degrees")
    p.add_argument("--repeat", type=int, default=3)
    args = p.parse_args(argv)
    curl = synthetic_curl(args.step)
    n = int(np.isfinite(curl.values).sum())
    print(f"grid {curl.sizes['lat']} x {curl.sizes['lon']}, {n} ocean unknowns")
    for label, kw in (("bottom friction only", dict(r=5e-6)),
                      ("bottom and lateral friction", dict(r=5e-6, A_H=5e4))):
        times = []
        for _ in range(args.repeat):
            t0 = time.perf_counter()
            solve_barotropic(curl, **kw)
            times.append(time.perf_counter() - t0)
        print(f"{label:30s} best {min(times):6.2f} s of {args.repeat}")


if __name__ == "__main__":
    main()
