"""Command line: run the whole diagnosis on a wind file and write results and figures.

``sverdrup-kit diagnose FILE [FILE ...] --out DIR`` or ``sverdrup-kit diagnose --synthetic --out DIR``;
``sverdrup-kit spread PRODUCT [PRODUCT ...] --drag-laws A,B --latitudes 26.5,30``.
Bad arguments and unreadable files give one clear line on stderr and exit status 2; nothing
is left half-written.
"""

from __future__ import annotations

import argparse
import datetime as _dt
import os
import shlex
import signal
import sys
import threading
import time
import warnings
from pathlib import Path

import numpy as np

from ._outfolder import OutputFolder

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


# --- figure options ------------------------------------------------------------------------------
#: Names of the standard figures (sverdrup_kit.plotting.STANDARD_FIGURES; a test keeps the two
#: equal), listed here so that --help does not import matplotlib and cartopy.
FIGURE_NAMES = ("wind_stress_map", "wind_stress_curl_map", "ekman_pumping_map",
                "sverdrup_streamfunction_map", "interior_transport_by_latitude",
                "interior_transport_by_time", "rossby_crossing_time_by_latitude")


def _figure_width_arg(text: str):
    if text in ("column", "page"):
        return text
    try:
        inches = float(text)
    except ValueError:
        inches = float("nan")
    if not 1.0 <= inches <= 20.0:
        raise argparse.ArgumentTypeError(
            f"expected 'column' (3.5 in), 'page' (7.2 in) or inches from 1 to 20, found '{text}'")
    return inches


def _figure_names_arg(text: str) -> list[str]:
    names = [n.strip() for n in text.split(",") if n.strip()]
    unknown = [n for n in names if n not in FIGURE_NAMES]
    if unknown or not names:
        raise argparse.ArgumentTypeError(
            f"expected names among {', '.join(FIGURE_NAMES)}, found '{text}'")
    return names


def _add_figure_options(d: argparse.ArgumentParser) -> None:
    g = d.add_argument_group("figures")
    g.add_argument("--no-figures", action="store_true", help="write the NetCDF only")
    g.add_argument("--figures", type=_figure_names_arg, default=None, metavar="NAME[,NAME]",
                   help="which figures to draw (default: all the results allow): "
                        + ", ".join(FIGURE_NAMES))
    g.add_argument("--figure-format", choices=("png", "pdf", "svg"), default="png",
                   help="file format of the figures (default: png)")
    g.add_argument("--figure-width", type=_figure_width_arg, default="page",
                   metavar="column|page|INCHES",
                   help="figure width: a journal column (3.5 in), a page (7.2 in) or inches "
                        "(default: page)")
    g.add_argument("--figure-dpi", type=int, default=200, metavar="DPI",
                   help="resolution of PNG figures and of the colour meshes in PDF and SVG "
                        "(default: 200)")


def _save_figures(res, out: Path, args, say) -> None:
    from .plotting import save_standard_figures

    for p in save_standard_figures(res, out, figures=args.figures, width=args.figure_width,
                                   dpi=args.figure_dpi, fmt=args.figure_format):
        say(f"wrote {p}")
# --- end of figure options ----------------------------------------------------------------------


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
    src.add_argument("source", nargs="*", default=[],
                     help="wind or wind-stress files (NetCDF, Zarr store or URL); several files "
                          "or patterns (u and v in separate files, one file per year) are "
                          "read as one record, e.g. 'u_*.nc' 'v_*.nc'")
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
                   help="'earth' for named Atlantic/Pacific/Indian basins; default: the Earth "
                        "basins when the mask shows the Earth's continents, else connected "
                        "ocean regions")
    d.add_argument("--water-density", type=float, default=None,
                   help="reference sea-water density rho0, kg m-3 (default 1025)")
    _mask_options(d)
    _below_surface_options(d)
    d.add_argument("--stress-sign", choices=("downward", "upward"), default=None,
                   help="with --input-kind stress: the file holds the stress of the air on the "
                        "sea (downward, the usual wind stress) or of the sea on the air "
                        "(upward); needed only when the file does not say")
    d.add_argument("--latitudes", type=_latitudes_arg, default=None, metavar="LAT,LAT,...",
                   help="latitudes of the printed summary, degrees_north (default "
                        "-40,-30,-20,20,30,40,50)")
    d.add_argument("--overwrite", action="store_true",
                   help="write into a folder that holds files sverdrup-kit did not write "
                        "(files of the same names are replaced; others are left alone)")
    d.add_argument("--no-progress", action="store_true",
                   help="do not draw a progress bar for computations longer than a second")
    d.add_argument("--quiet", action="store_true", help="print only errors")
    _add_figure_options(d)
    _spread_parser(sub, DRAG_LAWS)
    return p


# --- wind products: masks and the spread command ---------------------------------------------


def _latitudes_arg(text: str):
    try:
        lats = [float(x) for x in text.split(",") if x.strip()]
    except ValueError:
        raise argparse.ArgumentTypeError(
            f"expected latitudes in degrees_north separated by commas, e.g. 26.5,30, found "
            f"{text!r}") from None
    if not lats or any(not -90 <= x <= 90 for x in lats):
        raise argparse.ArgumentTypeError(
            f"expected latitudes within -90..90 separated by commas, found {text!r}")
    return lats


def _threshold_arg(text: str) -> float:
    try:
        value = float(text)
    except ValueError:
        value = None
    if value is None or not 0.0 < value <= 1.0:
        raise argparse.ArgumentTypeError(
            f"expected the ocean fraction that makes a wind cell ocean, a number in (0, 1], "
            f"found {text!r}. Fix: e.g. --ocean-threshold 0.5")
    return value


def _mask_options(p) -> None:
    p.add_argument("--ocean-mask", metavar="FILE|earth|data", default=None,
                   help="where the ocean is: a relief, sea-floor depth, land-fraction or "
                        "ocean-fraction file on any grid (averaged onto the wind grid), 'earth' "
                        "for the built-in Earth mask, or 'data' for land where the winds are "
                        "missing. Default: 'earth' for global products with winds over land "
                        "(no missing values), else 'data'")
    p.add_argument("--ocean-mask-var", metavar="NAME", default=None,
                   help="variable of the mask file, if it holds several")
    p.add_argument("--ocean-mask-kind", default=None,
                   choices=("relief", "depth", "land_fraction", "ocean_fraction"),
                   help="what the mask variable holds, if its standard_name, name or units do "
                        "not say")
    p.add_argument("--ocean-threshold", type=_threshold_arg, default=0.5, metavar="FRACTION",
                   help="a wind cell is ocean when at least this fraction of it is ocean "
                        "(default 0.5)")


def _depth_arg(text: str) -> float:
    try:
        value = float(text)
    except ValueError:
        value = float("nan")
    if not 0.0 < value < 11000.0:
        raise argparse.ArgumentTypeError(
            f"expected a depth in m between 0 and 11000, found {text!r}. Fix: e.g. "
            "--shelf-depth 1000")
    return value


def _below_surface_options(p) -> None:
    g = p.add_argument_group("the ocean below the surface")
    g.add_argument("--hydrography", metavar="FILE", default=None,
                   help="temperature and salinity climatology (NetCDF, any grid and depth "
                        "levels): the first baroclinic mode speed of each water column sets the "
                        "Rossby-wave crossing times. Default: a documented default "
                        "stratification, the same everywhere")
    g.add_argument("--temperature-var", metavar="NAME", default=None,
                   help="in-situ temperature variable of --hydrography, if its standard_name "
                        "or name and units do not say")
    g.add_argument("--salinity-var", metavar="NAME", default=None,
                   help="practical salinity variable of --hydrography, if its standard_name "
                        "or name and units do not say")
    g.add_argument("--relief", metavar="FILE", default=None,
                   help="relief (height, m) or sea-floor depth file on any regular grid: rows "
                        "whose ocean is mostly shallower than --shelf-depth get the caution "
                        "over_shelf (row_status 9)")
    g.add_argument("--relief-var", metavar="NAME", default=None,
                   help="variable of the relief file, if it holds several")
    g.add_argument("--shelf-depth", type=_depth_arg, default=None, metavar="M",
                   help="with --relief: depth in m above which a row counts as over a shelf "
                        "(default 1000)")


def _below_surface_inputs(args) -> dict:
    """T/S and relief of the options above, checked before any work; diagnose's keywords."""
    kw = {}
    for option, needs in (("--temperature-var", "hydrography"), ("--salinity-var", "hydrography"),
                          ("--relief-var", "relief"), ("--shelf-depth", "relief")):
        if getattr(args, option[2:].replace("-", "_")) is not None and getattr(args, needs) is None:
            raise CommandError(f"{option}: only applies with --{needs} FILE, found no --{needs}. "
                               f"Fix: add --{needs} FILE, or drop {option}.")
    renames = (("temperature_variable", "--temperature-var"), ("salinity_variable",
               "--salinity-var"), ("hydrography", "--hydrography"),
               ("relief_variable", "--relief-var"), ("relief", "--relief"))
    try:
        if args.hydrography is not None:
            from .ocean.hydrography import open_ts_climatology

            kw["hydrography"] = open_ts_climatology(
                args.hydrography, temperature_variable=args.temperature_var,
                salinity_variable=args.salinity_var)
        if args.relief is not None:
            from .io.masks import relief_field

            _existing(args.relief, "--relief")
            kw["relief"] = relief_field(args.relief, variable=args.relief_var)
            kw["shelf_depth_m"] = 1000.0 if args.shelf_depth is None else args.shelf_depth
    except (ValueError, TypeError, OSError) as err:
        text = str(err).strip().splitlines()[0]
        for name, option in renames:
            text = text.replace(f"{name}:", f"{option}:").replace(f"with {name}", f"with {option}")
        raise CommandError(text) from None
    return kw


def _spread_parser(sub, drag_laws) -> None:
    s = sub.add_parser(
        "spread",
        help="Sverdrup transport across wind products and drag laws, with its spread",
        description="Diagnose several wind products with several drag laws on one common grid "
        "(the coarsest; other products' stress is averaged by area onto it) with one ocean "
        "mask and the Earth basins, and print the mean, range and standard deviation of the "
        "Sverdrup interior transport at chosen latitudes beside the observed western boundary "
        "currents.",
    )
    s.add_argument("products", nargs="+", metavar="PRODUCT",
                   help="one wind product each: a file, a quoted pattern ('navy_*.nc'), or "
                        "files joined by commas (u.nc,v.nc); NAME=... names it")
    s.add_argument("--drag-laws", default="large-pond-1981,large-yeager-2009", metavar="A,B",
                   help="drag laws separated by commas: " + ", ".join(drag_laws)
                        + " or constant coefficients (default large-pond-1981,large-yeager-2009)")
    s.add_argument("--mean-speed", default="vector", metavar="vector,scalar",
                   help="speed in the bulk formula: 'vector' (from the mean wind components), "
                        "'scalar' (the product's mean wind speed, where it has one), or both "
                        "'vector,scalar' (default vector)")
    s.add_argument("--latitudes", type=_latitudes_arg, default=[-27.0, 26.5, 30.0],
                   metavar="LAT,LAT,...", help="latitudes of the table, degrees_north "
                                                "(default -27,26.5,30)")
    s.add_argument("--ocean-mask", metavar="FILE|earth|data", default="earth",
                   help="one ocean mask for every product on the common grid (default the "
                        "built-in Earth mask)")
    s.add_argument("--ocean-mask-var", metavar="NAME", default=None,
                   help="variable of the mask file, if it holds several")
    s.add_argument("--ocean-threshold", type=_threshold_arg, default=0.5, metavar="FRACTION",
                   help="a cell is ocean when at least this fraction of it is ocean (default 0.5)")
    s.add_argument("--out", default=None,
                   help="folder for spread.nc and spread.png (default: print the table only)")
    s.add_argument("--overwrite", action="store_true",
                   help="write into a folder that holds files sverdrup-kit did not write")
    s.add_argument("--quiet", action="store_true", help="print only the table and errors")


def _product_source(text: str):
    name, _, rest = text.partition("=") if "=" in text and not text.startswith(
        ("http://", "https://")) else ("", "", text)
    parts = [x for x in rest.split(",") if x]
    return (name or None), (parts if len(parts) > 1 else parts[0])


def _run_spread(args) -> int:
    say = (lambda *a: None) if args.quiet else (lambda *a: print(*a, flush=True))
    # --- output folder: checked before any computation (see sverdrup_kit._outfolder) ---
    folder = None
    if args.out is not None:
        folder = OutputFolder(args.out, task="spread", outputs=("spread.nc", "spread.png"),
                              overwrite=args.overwrite)
        folder.prepare()
    try:
        return _spread_into(args, folder, say)
    except BaseException:
        if folder is not None:
            folder.abandon()
        raise


def _spread_into(args, folder, say) -> int:
    import xarray as xr

    from . import __version__, open_winds
    from .io.writers import write_netcdf
    from .spread import spread_table, transport_spread

    laws = [_drag_arg(x.strip()) for x in args.drag_laws.split(",") if x.strip()]
    speeds = [x.strip() for x in args.mean_speed.split(",") if x.strip()]
    sources, names = [], []
    for text in args.products:
        name, src = _product_source(text)
        say(f"reading {src}")
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            ds = open_winds(_existing(src, "PRODUCT"))
        sources.append(ds)
        names.append(name or Path(str(src[0] if isinstance(src, list) else src)).stem
                     .replace("*", ""))
    mask = args.ocean_mask
    if mask not in ("earth", "data"):
        _existing(mask, "--ocean-mask")
    say(f"diagnosing {len(sources)} products x {len(laws)} drag laws x {len(speeds)} mean "
        "speeds")
    res = transport_spread(sources, names=names, drag_laws=laws, mean_speeds=speeds,
                           ocean_mask=(mask if args.ocean_mask_var is None or mask in
                                       ("earth", "data")
                                       else xr.open_dataset(mask)[args.ocean_mask_var]),
                           ocean_threshold=args.ocean_threshold).compute()
    say(f"common grid: {res.attrs['common_grid']}")
    say(f"ocean mask: {res.attrs['ocean_mask']}")
    rows = spread_table(res, args.latitudes)
    print("Sverdrup interior transport (Sv, + northward) over products, drag laws and mean "
          "speeds; observed: minus the observed western boundary current (the interior flow "
          "it returns)")
    print(f"  {'basin':<10s}{'lat':>7s}{'grid':>7s}{'mean':>8s}{'min':>8s}{'max':>8s}"
          f"{'range':>8s}{'s.d.':>7s}{'n':>4s}  observed")
    for r in rows:
        if r["count"] == 0:
            continue
        obs = (f"{r['observed_return']:6.1f}  {r['observed']} ({r['observed_source']})"
               if r["observed"] else "     -")
        print(f"  {r['basin']:<10s}{latitude_label(r['lat']):>7s}"
              f"{latitude_label(r['grid_lat']):>7s}{r['mean']:8.1f}{r['min']:8.1f}"
              f"{r['max']:8.1f}{r['max'] - r['min']:8.1f}{r['std']:7.1f}{r['count']:4d}  {obs}")
    if folder is not None:
        # --- provenance and writing: only files the toolkit owns, each whole ---
        command = _command_line(args)
        stamp = _dt.datetime.now(_dt.timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ")
        before = res.attrs.get("history")
        res = res.assign_attrs(
            history=f"{stamp} {command}" + (f"\n{before}" if before else ""),
            source=f"sverdrup_kit {__version__} spread of {', '.join(args.products)}; drag "
                   f"laws: {args.drag_laws}",
            command_line=command, sverdrup_kit_version=__version__)
        folder.reserve(["spread.nc"], command=command, version=__version__)
        say(f"wrote {write_netcdf(res, folder.path / 'spread.nc')}")
        from .plotting.spread import plot_transport_spread

        import matplotlib.pyplot as plt

        fig, _ = plot_transport_spread(res, width="page")
        staged = folder.staging()
        fig.savefig(staged / "spread.png", dpi=150)
        plt.close(fig)
        for p in folder.commit(["spread.nc"], command=command, version=__version__,
                               staged=staged):
            say(f"wrote {p}")
    return 0


def _existing(src, argname):
    """Refuse paths that do not exist (patterns must match something), in one line."""
    import glob

    for item in (src if isinstance(src, list) else [src]):
        text = str(item)
        if text.startswith(("http://", "https://")):
            continue
        if any(c in text for c in "*?["):
            if not glob.glob(text):
                raise CommandError(f"{argname}: no file matches '{text}'. Fix: check the "
                                   "pattern and quote it so the shell does not expand it.")
        elif not Path(text).exists():
            raise CommandError(f"{argname}: no such file '{text}'. Fix: check the path.")
    return src


def _open(args):
    from . import open_stress, open_winds
    from .synthetic import load_world

    if args.synthetic:
        return load_world()
    srcs = args.source
    for one in srcs:
        if not (str(one).startswith(("http://", "https://")) or Path(one).exists()
                or any(c in str(one) for c in "*?[")):
            raise CommandError(f"source: no such file '{one}'. Fix: check the path.")
    _existing(srcs, "source")
    src = srcs[0] if len(srcs) == 1 else list(srcs)
    try:
        if args.input_kind == "stress":
            return open_stress(src, taux=args.u_var, tauy=args.v_var,
                               stress_sign=args.stress_sign)
        return open_winds(src, u=args.u_var, v=args.v_var)
    except OSError as err:
        raise CommandError(
            f"source: could not read '{src}' as NetCDF ({err.__class__.__name__}: {err}). "
            "Fix: pass a NetCDF file of wind or wind stress."
        ) from None


def _summary(res, say, lats=None) -> None:
    lats = [-40, -30, -20, 20, 30, 40, 50] if lats is None else lats
    tr = res["interior_transport"]
    say("interior Sverdrup transport (Sv, + northward); the western boundary current carries "
        "minus this:")
    header = "  basin            " + "".join(
        f"{latitude_label(la, 0 if float(la).is_integer() else 1):>7s}" for la in lats)
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
    _shelf_summary(res, say)
    _adjustment_summary(res, say, lats)


def _spans(lat, ok) -> list[str]:
    """Runs of True in ``ok`` along ``lat`` as 'from to' labels."""
    edges = np.flatnonzero(np.diff(np.concatenate([[0], ok.astype(int), [0]])))
    return [f"{latitude_label(lat[i])} to {latitude_label(lat[j - 1])}"
            for i, j in zip(edges[::2], edges[1::2])]


def _shelf_summary(res, say) -> None:
    """The rows cautioned over shelves (row_status 9), per basin."""
    if "shelf_depth_m" not in res.attrs:
        return
    say(f"rows cautioned over shelves (over_shelf: most of the row shallower than "
        f"{res.attrs['shelf_depth_m']:g} m; relief: {res.attrs.get('relief', 'given')}):")
    shelf = res["row_status"] == 9
    for b in shelf["basin"].values:
        spans = _spans(shelf["lat"].values, shelf.sel(basin=b).values)
        say(f"  {str(b):<16s} " + ("; ".join(spans) if spans else "none"))


def _adjustment_summary(res, say, lats) -> None:
    """Rossby-wave crossing times and the rows whose time-resolved transport had time to adjust."""
    if "basin_crossing_time" not in res:
        if str(res.attrs.get("stratification", "")).startswith("none"):
            say("Rossby-wave adjustment: not computed (the winds are on a model grid; it "
                "follows rows of latitude on regular grids only)")
        return
    years = res["basin_crossing_time"] / 365.25
    if "stratification" in res.attrs:
        say(f"stratification: {res.attrs['stratification']}")
    _first_mode_summary(res, say, lats)
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
        spans = _spans(flags["lat"].values, ok)
        say(f"  {str(b):<16s} " + ("; ".join(spans) if spans else "none"))


def _first_mode_summary(res, say, lats) -> None:
    """Median first-mode speed c1 over each basin's counted cells at the summary latitudes."""
    if "first_mode_gravity_wave_speed" not in res or "basin_id" not in res:
        return
    c1 = res["first_mode_gravity_wave_speed"]
    say("first baroclinic gravity-wave speed c1 (m/s), median along each basin row:")
    for k, b in enumerate(res["basin"].values):
        row = c1.where(res["basin_id"] == k).median("lon")
        vals = [float(row.sel(lat=la, method="nearest")) if row.lat.min() <= la <= row.lat.max()
                else np.nan for la in lats]
        if np.isfinite(vals).any():
            say(f"  {str(b):<16s} " + "".join(f"{v:7.1f}" if np.isfinite(v) else "      -"
                                               for v in vals))


def _run_diagnose(args) -> int:
    say = (lambda *a: None) if args.quiet else (lambda *a: print(*a, flush=True))
    # --- output folder: checked before any computation (see sverdrup_kit._outfolder) ---
    local = [] if args.synthetic else [s for s in args.source if "://" not in str(s)]
    below = _below_surface_inputs(args)
    folder = OutputFolder(args.out, overwrite=args.overwrite, inputs=local)
    folder.prepare()
    restore = _exit_on_sigterm()
    try:
        return _diagnose_into(args, folder, say, below)
    except BaseException:
        folder.abandon()
        raise
    finally:
        restore()


def _exit_on_sigterm():
    """Turn SIGTERM into SystemExit while running, so that half-written files are removed on
    the way out (SIGKILL cannot be caught: the next run removes those leftovers)."""
    if threading.current_thread() is not threading.main_thread():
        return lambda: None

    def terminated(signum, frame):
        raise SystemExit(128 + signum)

    before = signal.signal(signal.SIGTERM, terminated)
    return lambda: signal.signal(signal.SIGTERM, before)


def _diagnose_into(args, folder, say, below=None) -> int:
    from . import __version__
    from .io.writers import write_netcdf
    from .pipeline import diagnose

    out = folder.path
    t0 = time.perf_counter()
    if not args.synthetic and not args.source:
        raise CommandError("source: expected a wind file (or --synthetic), found none. Fix: "
                           "sverdrup-kit diagnose FILE --out DIR.")
    say(f"reading {'the bundled synthetic world' if args.synthetic else ' '.join(args.source)}")
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
    if not args.synthetic:
        kw["ocean_mask"] = _resolve_mask(args, winds, say)
    below = dict(below or {})
    ts = below.pop("hydrography", None)
    if ts is not None:
        from .physics.adjustment import first_mode_speed_from_ts

        say(f"first-mode speed from {ts.attrs['source']}")
        from .pipeline import first_mode_speed_on

        c1 = first_mode_speed_from_ts(ts["temperature"], ts["salinity"],
                                      depth_dim=ts.attrs["depth_dim"]).assign_attrs(
            source="first-mode speed of each water column from the " + ts.attrs["source"]
            + " (TEOS-10 through gsw)")
        kw["first_mode_speed"] = first_mode_speed_on(c1, winds,
                                                     column_depth=ts["column_depth"])
    if "relief" in below:
        say(f"relief: {below['relief'].attrs['source']}; rows mostly shallower than "
            f"{below['shelf_depth_m']:g} m get the caution over_shelf")
    say("computing stress, curl, Ekman and Sverdrup transports")
    res = diagnose(winds, drag_law=args.drag_law, basins=basins, **kw, **below)
    from .progress import progress

    with progress(enabled=not (args.no_progress or args.quiet)):
        res = res.compute()
    # --- provenance and writing: only files the toolkit owns, each whole ---
    command = _command_line(args)
    res = _with_provenance(res, args, command, __version__)
    folder.reserve(["results.nc"], command=command, version=__version__)
    path = write_netcdf(res, out / "results.nc")
    say(f"wrote {path}")
    _summary(res, say, args.latitudes)
    staged = None
    if not args.no_figures:
        # Drawn in a hidden staging folder, moved in whole; commit() says what it wrote.
        staged = folder.staging()
        _save_figures(res, staged, args, lambda *a: None)
    for p in folder.commit(["results.nc"], command=command, version=__version__,
                           staged=staged):
        say(f"wrote {p}")
    say(f"done in {time.perf_counter() - t0:.1f} s")
    return 0


def _resolve_mask(args, winds, say):
    """The mask diagnose gets, said in one line (the built-in one chosen here is no surprise)."""
    from .pipeline import resolve_ocean_mask

    choice = args.ocean_mask
    if choice is not None and choice not in ("earth", "data"):
        _existing(choice, "--ocean-mask")
    try:
        mask, note = resolve_ocean_mask(winds, choice, threshold=args.ocean_threshold,
                                        variable=args.ocean_mask_var, kind=args.ocean_mask_kind)
    except ValueError as err:
        raise CommandError(str(err).replace("ocean_mask_variable", "--ocean-mask-var")
                           .replace("ocean_mask_kind", "--ocean-mask-kind")
                           .replace("ocean_mask:", "--ocean-mask:")) from None
    if choice is None and mask is not None:
        note = (note.split(" Fix:")[0].rstrip(".")
                + "; --ocean-mask FILE (or 'data') chooses another")
    say(f"ocean mask: {note}")
    return mask if mask is not None else "data"


def _command_line(args) -> str:
    argv = getattr(args, "argv", None)
    return shlex.join(["sverdrup-kit", *(sys.argv[1:] if argv is None else argv)])


def _with_provenance(res, args, command: str, version: str):
    """``res`` with CF ``history`` and ``source``: the input, command line, drag law, version."""
    src = "the bundled synthetic world" if args.synthetic else ", ".join(
        str(s if "://" in str(s) else Path(s).resolve()) for s in args.source)
    stamp = _dt.datetime.now(_dt.timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ")
    before = res.attrs.get("history")
    history = f"{stamp} {command}" + (f"\n{before}" if before else "")
    drag = "none (stress given)" if args.input_kind == "stress" else str(args.drag_law)
    return res.assign_attrs(
        history=history,
        source=f"sverdrup_kit {version} diagnose of {src}; drag law: {drag}",
        input=src,
        command_line=command,
        sverdrup_kit_version=version,
    )


def _warn_one_line(message, category, filename, lineno, file=None, line=None):
    """Show a warning as one line naming its kind, without the source line it came from."""
    print(f"sverdrup-kit: {category.__name__}: {message}", file=sys.stderr if file is None else file)


def main(argv=None) -> int:
    """Entry point of the ``sverdrup-kit`` command."""
    args = _parser().parse_args(argv)
    args.argv = None if argv is None else list(argv)
    os.environ.setdefault("MPLBACKEND", "Agg")
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("default")
            warnings.showwarning = _warn_one_line
            if args.command == "diagnose":
                return _run_diagnose(args)
            if args.command == "spread":
                return _run_spread(args)
    except CommandError as err:
        print(f"sverdrup-kit: {err}", file=sys.stderr)
        return EXIT_USAGE
    except (ValueError, TypeError, KeyError, OSError) as err:
        msg = str(err).strip().splitlines()[0] if str(err).strip() else err.__class__.__name__
        print(f"sverdrup-kit: {msg}", file=sys.stderr)
        return EXIT_USAGE
    return EXIT_USAGE


if __name__ == "__main__":
    sys.exit(main())
