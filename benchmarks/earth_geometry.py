"""sverdrup_transport on the quarter-degree Earth coastline against the naive NumPy script.

Run:  .venv/bin/python benchmarks/earth_geometry.py [--fields 8] [--repeat 3]

The quarter-degree Earth mask comes from the 5-minute relief ETOPO5 (fetched and cached by
``python -m data_recipes.marine_climatology``): a quarter-degree cell is ocean where more than
half of its 3 x 3 relief points lie below sea level. The stress fields are invented (the
synthetic world's analytic monthly winds plus noise, benchmarks/fields.py), NaN on land.

Prints, each the best of ``--repeat`` runs:

- naive: benchmarks/naive.py (np.gradient curl, reversed cumsum per run) on the same fields,
  runs found once beforehand (not timed);
- one call on all fields, Earth basins, mask given, geometry cached;
- one call per field, the same; and again with a reusable ``geometry=`` plan;
- the first call on a new mask (geometry and island paths built), minus a cached call;
- the synthetic quarter-degree world (benchmarks/fields.py: thousands of land blobs), no mask
  given, one call on all fields.

Each case is timed with the default options (Godfrey's island rule on) and with
``island_rule=False`` (the geometry and the westward integral alone); the targets hold for
both.

Targets (issue 10): one call <= 0.2 x naive; single calls <= 0.25 x naive; synthetic world
<= 0.2 x naive; first call <= cached + 1 s.
"""

from __future__ import annotations

import argparse
import time
import warnings

import fields
import naive
import numpy as np
import xarray as xr
from timing import best_time

from sverdrup_kit.geometry.integral import clear_geometry_cache
from sverdrup_kit.physics.sverdrup import sverdrup_transport


def earth_mask_quarter_degree():
    """Boolean (720, 1440) ocean mask and its latitudes and longitudes."""
    from data_recipes.marine_climatology import path

    ds = xr.open_dataset(path("etopo5"))
    rose = ds[list(ds.data_vars)[0]]
    lat_name, lon_name = rose.dims
    vals = rose.values[:2160]  # drop the row at 90N: 2160 rows = 720 x 3
    below = (vals < 0).reshape(720, 3, 1440, 3).mean(axis=(1, 3)) > 0.5
    lat0 = float(rose[lat_name][0])
    lon0 = float(rose[lon_name][0])
    lat = lat0 + 0.25 * np.arange(720) + 1 / 12
    lon = (lon0 + 0.25 * np.arange(1440) + 1 / 12) % 360
    order = np.argsort(lon)
    return below[:, order], lat, lon[order]


def stress_on(ocean, lat, lon, n, seed=0):
    from sverdrup_kit.synthetic import analytic_winds

    rng = np.random.default_rng(seed)
    shape = (n, lat.size, lon.size)
    tx, ty = np.empty(shape), np.empty(shape)
    for t in range(n):
        u0, v0 = analytic_winds(lat, t % 12)
        u = u0[:, None] + rng.normal(0.0, 2.0, shape[1:])
        v = v0[:, None] + rng.normal(0.0, 2.0, shape[1:])
        s = np.hypot(u, v)
        tx[t], ty[t] = 1.22 * 1.3e-3 * s * u, 1.22 * 1.3e-3 * s * v
    tx[:, ~ocean] = np.nan
    ty[:, ~ocean] = np.nan
    return tx, ty


def as_da(a, lat, lon):
    coords = {"lat": ("lat", lat, {"units": "degrees_north"}),
              "lon": ("lon", lon, {"units": "degrees_east"})}
    dims = ("time", "lat", "lon") if a.ndim == 3 else ("lat", "lon")
    return xr.DataArray(a, dims=dims, coords=coords, attrs={"units": "Pa"})


def naive_time(tx, ty, ocean, lat, lon, repeat):
    cells, starts = naive.ocean_runs(ocean, periodic=True)
    dx = fields.cell_width(lat, lon)
    rb = fields.rho0_beta(lat)

    def run():
        naive.sverdrup(tx, ty, lat, lon, periodic=True, dx=dx, cells=cells, run_starts=starts,
                       rho0_beta=rb, radius=fields.RADIUS)

    return best_time(run, repeat)[0]


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--fields", type=int, default=8)
    p.add_argument("--repeat", type=int, default=3)
    args = p.parse_args(argv)
    n = args.fields
    warnings.simplefilter("ignore")

    ocean, lat, lon = earth_mask_quarter_degree()
    tx, ty = stress_on(ocean, lat, lon, n)
    TX, TY, M = as_da(tx, lat, lon), as_da(ty, lat, lon), as_da(ocean, lat, lon)
    print(f"Earth, quarter degree from ETOPO5: {n} x {lat.size} x {lon.size}, land "
          f"{100 * (1 - ocean.mean()):.0f}%")
    t_naive = naive_time(tx, ty, ocean, lat, lon, args.repeat)

    from sverdrup_kit.geometry.integral import sverdrup_geometry

    geom = sverdrup_geometry(M, basins="earth")
    print(f"  naive NumPy script, {n} fields        {t_naive:8.3f} s")
    for rule in (True, False):
        opts = {} if rule else {"island_rule": False}
        print("  default options (island rule on)" if rule else "  island_rule=False")

        def one_call(opts=opts):
            return sverdrup_transport(TX, TY, ocean_mask=M, basins="earth", **opts)

        def single_calls(opts=opts):
            return [sverdrup_transport(TX[k], TY[k], ocean_mask=M, basins="earth", **opts)
                    for k in range(n)]

        def single_calls_plan(opts=opts):
            return [sverdrup_transport(TX[k], TY[k], geometry=geom, **opts) for k in range(n)]

        t_one, _ = best_time(one_call, args.repeat)
        t_single, _ = best_time(single_calls, args.repeat)
        t_plan, _ = best_time(single_calls_plan, args.repeat)
        firsts = []
        for _ in range(args.repeat):
            clear_geometry_cache()
            t0 = time.perf_counter()
            sverdrup_transport(TX[0], TY[0], ocean_mask=M, basins="earth", **opts)
            firsts.append(time.perf_counter() - t0)
        t_cached, _ = best_time(lambda opts=opts: sverdrup_transport(
            TX[0], TY[0], ocean_mask=M, basins="earth", **opts), args.repeat)
        print(f"    one call, {n} fields                 {t_one:8.3f} s  = "
              f"{t_one / t_naive:5.2f} x naive (target <= 0.20)")
        print(f"    {n} single-field calls               {t_single:8.3f} s  = "
              f"{t_single / t_naive:5.2f} x naive (target <= 0.25)")
        print(f"    {n} single-field calls, geometry=    {t_plan:8.3f} s  = "
              f"{t_plan / t_naive:5.2f} x naive")
        print(f"    first call on a new mask - cached    {min(firsts) - t_cached:8.3f} s "
              "(target <= 1 s)")

    stx, sty, slat, slon, socean = fields.stress(0.25, n)
    STX, STY = as_da(stx, slat, slon), as_da(sty, slat, slon)
    print(f"synthetic world, quarter degree, {n} fields, land blobs, no mask given")
    s_naive = naive_time(stx, sty, socean, slat, slon, args.repeat)
    t_syn, _ = best_time(lambda: sverdrup_transport(STX, STY), args.repeat)
    t_syn_off, _ = best_time(lambda: sverdrup_transport(STX, STY, island_rule=False),
                             args.repeat)
    clear_geometry_cache()
    t0 = time.perf_counter()
    sverdrup_transport(STX, STY)
    t_syn_first = time.perf_counter() - t0
    print(f"  naive NumPy script                     {s_naive:8.3f} s")
    print(f"  one call, no mask                      {t_syn:8.3f} s  = {t_syn / s_naive:5.2f} x "
          "naive (target <= 0.20)")
    print(f"  the same, island_rule=False            {t_syn_off:8.3f} s  = "
          f"{t_syn_off / s_naive:5.2f} x naive (target <= 0.20)")
    print(f"  first call (geometry built)            {t_syn_first:8.3f} s")


if __name__ == "__main__":
    main()
