"""Time of the Rossby-wave adjustment pieces (target: seconds each).

- the first-mode speed of a global 1-degree, 20-level T/S climatology (needs the data fetched
  by ``python -m data_recipes.marine_climatology``; skipped otherwise);
- the crossing times and the lagged long-wave response of the synthetic world: the periodic
  state of its 12-month climatology and a 60-year record of annual means.

Run: .venv/bin/python benchmarks/adjustment.py
"""

from __future__ import annotations

import argparse

import numpy as np
import pandas as pd
import xarray as xr
from timing import best_time

from sverdrup_kit import (
    first_mode_speed_from_ts,
    long_wave_response,
    rossby_adjustment,
    sverdrup_transport,
    wind_stress,
)
from sverdrup_kit.synthetic import load_world, world_basins


def main(argv=None) -> None:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--repeat", type=int, default=3)
    args = p.parse_args(argv)
    try:
        from data_recipes import marine_climatology as recipe

        ts = xr.open_dataset(recipe.path("levitus_ts"), decode_times=False)
    except (FileNotFoundError, ValueError) as err:
        print(f"T/S climatology skipped: {err}")
    else:
        t, c1 = best_time(lambda: first_mode_speed_from_ts(ts.TEMP, ts.SALT).compute(), args.repeat)
        n = int(np.isfinite(c1.values).sum())
        print(f"first_mode_speed_from_ts: {n} columns x {ts.sizes['ZAXLEVITR']} levels in "
              f"{t:.2f} s")

    world = load_world()
    basins = world_basins(world)
    stress = wind_stress(world.u, world.v, wind_speed=world.wind_speed)
    sv = sverdrup_transport(stress.taux.mean("time"), stress.tauy.mean("time"), basins=basins)
    t, _ = best_time(lambda: rossby_adjustment(sv), args.repeat)
    print(f"rossby_adjustment, synthetic world 90 x 180: {t:.2f} s")
    t, _ = best_time(lambda: long_wave_response(stress.taux, stress.tauy, sv, periodic=True),
                 args.repeat)
    print(f"long_wave_response, periodic 12-month climatology: {t:.2f} s")
    years = 60
    time_ = pd.date_range("2001-07-01", periods=years, freq="YS-JUL")
    ramp = xr.DataArray(1.0 + 0.2 * np.clip((np.arange(years) - 10) / 10, 0, 1), dims="time",
                        coords={"time": time_})
    taux = (stress.taux.mean("time") * ramp).assign_attrs(units="Pa")
    tauy = (stress.tauy.mean("time") * ramp).assign_attrs(units="Pa")
    t, _ = best_time(lambda: long_wave_response(taux, tauy, sv, initial="steady"), args.repeat)
    print(f"long_wave_response, {years} annual steps: {t:.2f} s")


if __name__ == "__main__":
    main()
