"""Time per standard figure, on the bundled synthetic world and on a 2 degree Earth product.

Run:  .venv/bin/python benchmarks/figures.py [--repeat 3] [--width page] [--dpi 200]
      [--format png]

Diagnoses the synthetic world (2 degrees, 12 months) and, when the recipe cache holds it, the
COADS monthly climatology (2 degrees, `python -m data_recipes.marine_climatology`), then draws
and saves each standard figure as `sverdrup-kit diagnose` does. The first pass runs in a fresh
process, so it includes the one-time costs a command-line run pays (font cache, projections,
coast lines); then the best of ``--repeat`` passes. Wall time and this process's CPU time are
printed: on a shared machine the CPU time is the steadier of the two.
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
import time
import warnings
from pathlib import Path

os.environ.setdefault("MPLBACKEND", "Agg")
# The data recipes live beside the package, not in it: make them importable from any folder.
sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from sverdrup_kit.pipeline import diagnose  # noqa: E402
from sverdrup_kit.plotting import available_figures, save_standard_figures  # noqa: E402
from sverdrup_kit.synthetic import load_world, world_basins  # noqa: E402


def results():
    world = load_world()
    yield "synthetic world, 2 deg", diagnose(world, basins=world_basins(world)).compute()
    try:
        from data_recipes.marine_climatology import path

        file = path("coads_monthly")
    except (ImportError, FileNotFoundError) as err:
        print(f"(COADS climatology skipped: {err})")
        return
    from sverdrup_kit import open_winds

    with warnings.catch_warnings():
        # Its year-0 time axis warns on every read; the warning is about the file, not speed.
        warnings.simplefilter("ignore")
        winds = open_winds(file)
    yield "COADS climatology, 2 deg", diagnose(winds, basins="earth").compute()


def one_pass(res, folder, args):
    """Wall and CPU seconds of each figure, drawn and saved."""
    out = {}
    for name in available_figures(res):
        w0, c0 = time.perf_counter(), time.process_time()
        save_standard_figures(res, folder, figures=[name], width=args.width, dpi=args.dpi,
                              fmt=args.format)
        out[name] = (time.perf_counter() - w0, time.process_time() - c0)
    return out


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--repeat", type=int, default=3)
    p.add_argument("--width", default="page")
    p.add_argument("--dpi", type=int, default=200)
    p.add_argument("--format", default="png")
    args = p.parse_args(argv)
    if args.width not in ("column", "page"):
        args.width = float(args.width)
    with tempfile.TemporaryDirectory() as folder:
        for label, res in results():
            first = one_pass(res, folder, args)
            best = {}
            for _ in range(args.repeat):
                for name, (wall, cpu) in one_pass(res, folder, args).items():
                    b = best.get(name, (float("inf"), float("inf")))
                    best[name] = (min(b[0], wall), min(b[1], cpu))
            print(f"\n{label}: {res.sizes['lat']} x {res.sizes['lon']}, "
                  f"{args.width} width, {args.dpi} dpi, {args.format}")
            print(f"  {'figure':32s}{'first wall':>11s}{'first CPU':>11s}"
                  f"{'best wall':>11s}{'best CPU':>10s}")
            for name in first:
                (fw, fc), (bw, bc) = first[name], best[name]
                print(f"  {name:32s}{fw:10.2f}s{fc:10.2f}s{bw:10.2f}s{bc:9.2f}s")
            tot = [sum(v[i] for v in first.values()) for i in (0, 1)]
            totb = [sum(v[i] for v in best.values()) for i in (0, 1)]
            print(f"  {'all':32s}{tot[0]:10.2f}s{tot[1]:10.2f}s{totb[0]:10.2f}s{totb[1]:9.2f}s")


if __name__ == "__main__":
    main()
