"""Command line: run the whole diagnosis on a wind file and write results and figures.

``sverdrup-kit diagnose FILE --out DIR`` or ``sverdrup-kit diagnose --synthetic --out DIR``.
Bad arguments and unreadable files give one clear line on stderr and exit status 2; nothing
is left half-written.
"""

from __future__ import annotations

import argparse
import os
import sys
import time
import warnings
from pathlib import Path

import numpy as np

EXIT_USAGE = 2


class CommandError(Exception):
    """An error the user can fix, reported as one line."""


def _drag_arg(text: str):
    try:
        return float(text)
    except ValueError:
        return text


def latitude_label(lat: float, decimals: int = 1) -> str:
    """A latitude as oceanographers write it: ``15.5S``, ``0``, ``30N``.

    >>> latitude_label(-15.5), latitude_label(30, 0), latitude_label(0.0)
    ('15.5S', '30N', '0')
    """
    text = f"{abs(lat):.{decimals}f}"
    if float(text) == 0:
        return "0"
    return text + ("N" if lat > 0 else "S")


def _parser() -> argparse.ArgumentParser:
    from .physics.stress import DRAG_LAWS

    p = argparse.ArgumentParser(
        prog="sverdrup-kit",
        description="Wind-driven ocean circulation diagnostics from a gridded wind climatology. "
        "Research diagnostics, not forecasts for navigation or marine operations.",
    )
    sub = p.add_subparsers(dest="command", required=True)
    d = sub.add_parser(
        "diagnose",
        help="wind file in; stress, curl, Ekman, Sverdrup transport NetCDF and figures out",
        description="Run the whole diagnosis: stress from a drag law, curl and Ekman fields, "
        "Sverdrup transport integrated westward from each basin's eastern coast, and the "
        "western boundary current that returns it.",
    )
    src = d.add_mutually_exclusive_group(required=True)
    src.add_argument("source", nargs="?", help="wind or wind-stress file (NetCDF), or a URL")
    src.add_argument("--synthetic", action="store_true",
                     help="use the bundled synthetic world instead of a file")
    d.add_argument("--out", required=True, help="folder for results.nc and the figures")
    d.add_argument("--input-kind", choices=("wind", "stress"), default="wind",
                   help="what the file holds: 10 m wind (stress from a drag law) or wind stress "
                        "(the drag law is skipped); default: wind")
    d.add_argument("--u-var", metavar="NAME",
                   help="name of the eastward wind (or stress) variable, if not found")
    d.add_argument("--v-var", metavar="NAME",
                   help="name of the northward wind (or stress) variable, if not found")
    d.add_argument("--drag-law", type=_drag_arg, default="large-pond-1981", metavar="LAW",
                   help="drag law: one of " + ", ".join(DRAG_LAWS) + ", or a constant drag "
                        "coefficient such as 1.3e-3 (default: large-pond-1981)")
    d.add_argument("--air-density", type=float, default=None, help="kg m-3 (default 1.22)")
    d.add_argument("--basins", default=None,
                   help="'earth' for named Atlantic/Pacific/Indian basins; default: connected "
                        "ocean regions")
    d.add_argument("--water-density", type=float, default=None,
                   help="reference sea-water density rho0, kg m-3 (default 1025)")
    d.add_argument("--no-figures", action="store_true", help="write the NetCDF only")
    d.add_argument("--no-progress", action="store_true",
                   help="do not draw a progress bar for computations longer than a second")
    d.add_argument("--quiet", action="store_true", help="print only errors")
    return p


def _open(args):
    from . import open_stress, open_winds
    from .synthetic import load_world

    if args.synthetic:
        return load_world()
    src = args.source
    if not (str(src).startswith(("http://", "https://")) or Path(src).exists()):
        raise CommandError(f"source: no such file '{src}'. Fix: check the path.")
    try:
        if args.input_kind == "stress":
            return open_stress(src, taux=args.u_var, tauy=args.v_var)
        return open_winds(src, u=args.u_var, v=args.v_var)
    except OSError as err:
        raise CommandError(
            f"source: could not read '{src}' as NetCDF ({err.__class__.__name__}: {err}). "
            "Fix: pass a NetCDF file of wind or wind stress."
        ) from None


def _summary(res, say) -> None:
    lats = [-40, -30, -20, 20, 30, 40, 50]
    tr = res["interior_transport"]
    say("interior Sverdrup transport (Sv, + northward); the western boundary current carries "
        "minus this:")
    header = "  basin            " + "".join(f"{latitude_label(la, 0):>7s}" for la in lats)
    say(header)
    for b in tr["basin"].values:
        row = tr.sel(basin=b)
        cells = []
        for la in lats:
            if row.lat.min() <= la <= row.lat.max():
                val = float(row.sel(lat=la, method="nearest"))
                cells.append(f"{val:7.1f}" if np.isfinite(val) else "      -")
            else:
                cells.append("      -")
        say(f"  {str(b):<16s} " + "".join(cells))
    if "gyre_boundary_lat" in res:
        for b in tr["basin"].values:
            g = res["gyre_boundary_lat"].sel(basin=b).values
            g = g[np.isfinite(g)]
            if g.size:
                say(f"  gyre boundaries in {b}: " + ", ".join(latitude_label(x) for x in g))
    _adjustment_summary(res, say, lats)


def _adjustment_summary(res, say, lats) -> None:
    """Rossby-wave crossing times and the rows whose time-resolved transport had time to adjust."""
    if "basin_crossing_time" not in res:
        return
    years = res["basin_crossing_time"] / 365.25
    say("long Rossby-wave crossing time from the eastern coast to the western boundary (years):")
    for b in years["basin"].values:
        row = years.sel(basin=b)
        vals = [float(row.sel(lat=la, method="nearest")) if row.lat.min() <= la <= row.lat.max()
                else np.nan for la in lats]
        if np.isfinite(vals).any():
            say(f"  {str(b):<16s} " + "".join(f"{v:7.1f}" if np.isfinite(v) else "      -"
                                               for v in vals))
    if "sverdrup_adjusted" not in res or "interior_transport_by_time" not in res:
        return
    scale = res["interior_transport_by_time"].attrs.get("adjustment_time_scale")
    if scale not in res["sverdrup_adjusted"]["time_scale"].values:
        return
    say(f"rows where the {scale} transports (interior_transport_by_time) had time to adjust "
        "to Sverdrup balance:")
    flags = res["sverdrup_adjusted"].sel(time_scale=scale)
    valid = res["row_status"] == 0
    for b in flags["basin"].values:
        ok = ((flags.sel(basin=b) == 1) & valid.sel(basin=b)).values
        if not valid.sel(basin=b).any():
            continue
        lat = flags["lat"].values
        edges = np.flatnonzero(np.diff(np.concatenate([[0], ok.astype(int), [0]])))
        spans = [f"{latitude_label(lat[i])} to {latitude_label(lat[j - 1])}"
                 for i, j in zip(edges[::2], edges[1::2])]
        say(f"  {str(b):<16s} " + ("; ".join(spans) if spans else "none"))


def _run_diagnose(args) -> int:
    from .io.writers import write_netcdf
    from .pipeline import diagnose

    say = (lambda *a: None) if args.quiet else (lambda *a: print(*a, flush=True))
    out = Path(args.out)
    if out.exists() and not out.is_dir():
        raise CommandError(f"--out: expected a folder, found a file '{out}'. Fix: pick a folder.")
    t0 = time.perf_counter()
    say(f"reading {'the bundled synthetic world' if args.synthetic else args.source}")
    winds = _open(args)
    kw = {}
    if args.air_density is not None:
        kw["air_density"] = args.air_density
    if args.water_density is not None:
        kw["rho0"] = args.water_density
    basins = args.basins
    if basins is None and args.synthetic:
        from .synthetic import world_basins

        basins = world_basins(winds)
    say("computing stress, curl, Ekman and Sverdrup transports")
    res = diagnose(winds, drag_law=args.drag_law, basins=basins, **kw)
    from .progress import progress

    with progress(enabled=not (args.no_progress or args.quiet)):
        res = res.compute()
    out.mkdir(parents=True, exist_ok=True)
    path = write_netcdf(res, out / "results.nc")
    say(f"wrote {path}")
    _summary(res, say)
    if not args.no_figures:
        from .plotting.figures import save_standard_figures

        for p in save_standard_figures(res, out):
            say(f"wrote {p}")
    say(f"done in {time.perf_counter() - t0:.1f} s")
    return 0


def _warn_one_line(message, category, filename, lineno, file=None, line=None):
    """Show a warning as one line naming its kind, without the source line it came from."""
    print(f"sverdrup-kit: {category.__name__}: {message}", file=sys.stderr if file is None else file)


def main(argv=None) -> int:
    """Entry point of the ``sverdrup-kit`` command."""
    args = _parser().parse_args(argv)
    os.environ.setdefault("MPLBACKEND", "Agg")
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("default")
            warnings.showwarning = _warn_one_line
            if args.command == "diagnose":
                return _run_diagnose(args)
    except CommandError as err:
        print(f"sverdrup-kit: {err}", file=sys.stderr)
        return EXIT_USAGE
    except (ValueError, TypeError, KeyError, FileNotFoundError) as err:
        msg = str(err).strip().splitlines()[0] if str(err).strip() else err.__class__.__name__
        print(f"sverdrup-kit: {msg}", file=sys.stderr)
        return EXIT_USAGE
    return EXIT_USAGE


if __name__ == "__main__":
    sys.exit(main())
