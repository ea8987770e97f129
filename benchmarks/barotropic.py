"""Time of the barotropic vorticity solver on a 1 degree global grid (the brief: seconds).

Run: .venv/bin/python benchmarks/barotropic.py
"""

from __future__ import annotations

import argparse
import time

import numpy as np
import xarray as xr

from sverdrup_kit import solve_barotropic


def invented_planet(step: float) -> xr.DataArray:
    """Wind-stress curl on an invented planet: two meridional continents, polar caps, an island."""
    lat = np.arange(-90 + step / 2, 90, step)
    lon = np.arange(step / 2, 360, step)
    la, lo = np.meshgrid(lat, lon, indexing="ij")
    land = (la < -70) | (la > 80)
    land |= (np.abs(lo - 100) < 15) & (la > -40)
    land |= (np.abs(lo - 290) < 10) & (la > -55)
    land |= (lo - 200) ** 2 + (la - 20) ** 2 < 25
    curl = np.where(land, np.nan, -1e-7 * np.sin(3 * np.deg2rad(la)))
    return xr.DataArray(curl, coords={"lat": lat, "lon": lon}, dims=("lat", "lon"),
                        attrs={"units": "N m-3"})


def main(argv=None) -> None:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--step", type=float, default=1.0, help="grid spacing in degrees")
    p.add_argument("--repeat", type=int, default=3)
    args = p.parse_args(argv)
    curl = invented_planet(args.step)
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
