"""Curl plus Sverdrup transport on a nominal 1-degree tripolar grid (target: at most 1 s a field).

Run: .venv/bin/python benchmarks/model_grid.py [--rows 300] [--fields 8]

The grid is the invented tripolar grid of :mod:`sverdrup_kit.synthetic_grids` (360 columns;
rows spaced so that there are about 300), with an invented continent round each of its two
northern poles and one across the tropics, and the invented smooth stress field. The first call
builds the geometry (cell areas, edge chords, band plan); later calls on the same grid reuse it.
"""

from __future__ import annotations

import argparse
import time

import numpy as np
import xarray as xr

from sverdrup_kit import sverdrup_transport
from sverdrup_kit.synthetic_grids import as_field, smooth_winds, tripolar_grid


def fields(rows: int, n: int):
    lat, lon, _, _ = tripolar_grid(1.0, south=-78.0, rows=rows)
    tx, ty, _ = smooth_winds(lat, lon)
    lo = np.mod(lon, 360.0)
    land = ((lo > 280) & (lo < 330) & (lat > -50) & (lat < 60)) | (lat < -70)
    for plat, plon in ((60.0, 80.0), (60.0, 260.0)):
        land |= (np.abs(lat - plat) < 8) & (np.abs(np.mod(lon - plon + 180, 360) - 180) < 15)
    scale = xr.DataArray(1.0 + 0.1 * np.arange(n), dims="time")
    tx = as_field(np.where(land, np.nan, tx), lat, lon) * scale
    ty = as_field(np.where(land, np.nan, ty), lat, lon) * scale
    return tx.assign_attrs(units="Pa"), ty.assign_attrs(units="Pa")


def main(argv=None) -> None:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--rows", type=int, default=300)
    p.add_argument("--fields", type=int, default=8)
    args = p.parse_args(argv)
    tx, ty = fields(args.rows, args.fields)
    print(f"grid {tx.sizes['y']} x {tx.sizes['x']}, {args.fields} fields")
    t0 = time.perf_counter()
    sverdrup_transport(tx.isel(time=0), ty.isel(time=0)).load()
    first = time.perf_counter() - t0
    t0 = time.perf_counter()
    for k in range(args.fields):
        sverdrup_transport(tx.isel(time=k), ty.isel(time=k)).load()
    loop = (time.perf_counter() - t0) / args.fields
    t0 = time.perf_counter()
    sverdrup_transport(tx, ty).load()
    batch = (time.perf_counter() - t0) / args.fields
    print(f"first field (geometry built): {first:.2f} s")
    print(f"later single fields (geometry cached): {loop:.3f} s per field")
    print(f"one call on {args.fields} fields: {batch:.3f} s per field")


if __name__ == "__main__":
    main()
