"""Reading winds and wind stress from files, URLs and xarray objects onto the canonical grid.

:func:`open_winds` and :func:`open_stress` are the front door of the toolkit: whatever the
source calls its coordinates and variables, and whatever units, fill values, latitude order,
longitude convention and calendar it uses, they return a Dataset with dimensions
``(..., time, lat, lon)``, ascending latitude, monotonic longitude, SI units with UDUNITS
spellings, CF standard names, NaN for land and unobserved cells, and float64 values. Files are
opened lazily with dask and stay lazy; xarray objects passed in are never modified.
"""

from __future__ import annotations

import glob
import os
import re
import warnings
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import xarray as xr

from .. import _validate
from ..errors import InputError, TimeDecodingWarning
from ..geometry.coords import GridError, grid_layout, to_canonical
from ..limits import FILL_SENTINEL
from .units import KIND, si_factor

__all__ = ["open_winds", "open_stress", "TimeDecodingWarning"]



@dataclass(frozen=True)
class _Field:
    """How to recognise one input variable and what to call it on output."""

    key: str  # keyword argument of the opening function
    out: str  # output variable name
    kind: str  # 'speed' or 'stress' (see _units.KIND)
    standard_name: str  # CF standard name written on output
    long_name: str
    # Recognised on input, strongest first: CF standard names, variable names, long names
    # (all compared in lower case).
    standard_names: tuple
    names: tuple
    long_names: tuple
    # Stress only: standard names of the opposite sign (the stress of the sea on the air), and
    # names of momentum fluxes whose sign convention differs between products.
    upward_standard_names: tuple = ()
    unsigned_names: tuple = ()


# Tables of criteria, kept apart from the logic. Names are those real wind and stress products
# use (reanalyses, scatterometer and ship climatologies, CMIP, ocean-model forcing files).
# Momentum-flux names such as NCEP's 'uflx' are recognised, but their sign convention differs
# between products: they need ``stress_sign`` unless a standard name or long name says it.
WIND_FIELDS = (
    _Field(
        "u", "u", "speed", "eastward_wind", "eastward wind",
        ("eastward_wind",),
        ("u", "uwnd", "u10", "u10m", "uas", "uwind", "u_wind", "wind_u", "zonal_wind",
         "eastward_wind", "u_10m"),
        ("zonal wind", "eastward wind", "u-component of wind", "u wind component",
         "10 metre u wind component", "eastward near-surface wind", "zonal wind component"),
    ),
    _Field(
        "v", "v", "speed", "northward_wind", "northward wind",
        ("northward_wind",),
        ("v", "vwnd", "v10", "v10m", "vas", "vwind", "v_wind", "wind_v", "meridional_wind",
         "northward_wind", "v_10m"),
        ("meridional wind", "northward wind", "v-component of wind", "v wind component",
         "10 metre v wind component", "northward near-surface wind", "meridional wind component"),
    ),
    _Field(
        "speed", "wind_speed", "speed", "wind_speed", "scalar-mean wind speed",
        ("wind_speed",),
        ("wspd", "wind_speed", "windspeed", "speed", "si10", "sfcwind", "ws", "wspd10",
         "scalar_wind"),
        ("wind speed", "scalar wind speed", "scalar wind", "10 metre wind speed",
         "near-surface wind speed"),
    ),
)
STRESS_FIELDS = (
    _Field(
        "taux", "taux", "stress", "surface_downward_eastward_stress",
        "eastward surface wind stress",
        ("surface_downward_eastward_stress", "surface_downward_x_stress"),
        ("taux", "tau_x", "tauu", "tauuo", "utau", "sustr", "metss", "iews", "stress_x",
         "wind_stress_x", "taux_wind", "zonal_stress"),
        ("zonal wind stress", "eastward wind stress", "zonal surface stress",
         "eastward surface stress", "zonal stress", "surface downward eastward stress",
         "mean eastward turbulent surface stress"),
        ("surface_upward_eastward_stress",),
        ("uflx", "momentum_flux_u", "umom", "u_momentum_flux", "zonal_momentum_flux"),
    ),
    _Field(
        "tauy", "tauy", "stress", "surface_downward_northward_stress",
        "northward surface wind stress",
        ("surface_downward_northward_stress", "surface_downward_y_stress"),
        ("tauy", "tau_y", "tauv", "tauvo", "vtau", "svstr", "mntss", "inss", "stress_y",
         "wind_stress_y", "tauy_wind", "meridional_stress"),
        ("meridional wind stress", "northward wind stress", "meridional surface stress",
         "northward surface stress", "meridional stress", "surface downward northward stress",
         "mean northward turbulent surface stress"),
        ("surface_upward_northward_stress",),
        ("vflx", "momentum_flux_v", "vmom", "v_momentum_flux", "meridional_momentum_flux"),
    ),
)
REQUIRED = {"u", "v", "taux", "tauy"}

TIME_NAMES = {"time", "t", "valid_time", "time_counter", "date", "times"}
LAT_ATTRS = {"units": "degrees_north", "standard_name": "latitude", "long_name": "latitude",
             "axis": "Y"}
LON_ATTRS = {"units": "degrees_east", "standard_name": "longitude", "long_name": "longitude",
             "axis": "X"}


# ---------------------------------------------------------------------------------------------
# Public functions


def open_winds(source, *, u=None, v=None, wind_speed=None) -> xr.Dataset:
    """Open near-surface winds and put them on the canonical grid in m s-1.

    Parameters
    ----------
    source : str, os.PathLike, list of paths, xarray.Dataset, tuple or dict of xarray.DataArray
        A netCDF path (a glob pattern, list or tuple of paths is combined along time with
        :func:`xarray.open_mfdataset`), a URL that xarray can open (OPeNDAP), a Dataset, or the
        components themselves as ``(u, v)``, ``(u, v, wind_speed)`` or
        ``{'u': u, 'v': v, 'wind_speed': wind_speed}``.
    u, v, wind_speed : str, optional
        Names of the eastward wind, northward wind and scalar-mean wind speed in ``source``
        when they cannot be found by CF ``standard_name`` (``eastward_wind``,
        ``northward_wind``, ``wind_speed``) or a common name (``u``, ``uwnd``, ``u10``,
        ``UWND``, ``WSPD``, ...). Not allowed with a tuple or dict source.

    Returns
    -------
    xarray.Dataset
        ``u``, ``v`` (..., time, lat, lon) in m s-1 with standard names ``eastward_wind`` and
        ``northward_wind``; ``wind_speed`` (scalar mean of the speed, m s-1) when the source
        carries one. Latitude ascending, longitude monotonic (the source's convention kept, so
        21..379 stays 21..379), ``time`` decoded where possible, float64, NaN where the source
        is missing. Dataset attributes ``input`` and ``normalisation`` record where the data
        came from and every change made. Dask-backed input stays lazy; files are opened lazily
        in chunks holding whole horizontal fields.

    Raises
    ------
    GridError
        Two-dimensional (curvilinear) coordinates, latitudes outside -90..90, non-monotonic or
        duplicate coordinates, or components on different grids.
    UnitsError
        Missing or unrecognised units.
    ValueError
        Variables not found or ambiguous, or in-memory data that is entirely missing.

    Warns
    -----
    TimeDecodingWarning
        Once, when the time axis needed a fallback calendar (e.g. 'hour since 0000-01-01', whose
        year 0 the standard calendar lacks).

    Notes
    -----
    The all-missing check runs only on in-memory data: on dask-backed data it would read the
    whole record, which opening must not do.

    Examples
    --------
    >>> winds = open_winds("monthly_winds.nc")  # doctest: +SKIP
    >>> winds.u.groupby("time.month").mean()  # doctest: +SKIP
    """
    if isinstance(source, dict) or (
        isinstance(source, tuple) and any(isinstance(s, xr.DataArray) for s in source)
    ):
        if any(k is not None for k in (u, v, wind_speed)):
            raise TypeError(
                "open_winds: u, v, wind_speed name variables inside a file or Dataset; with a tuple "
                "or dict source the components are given directly. Fix: drop the keywords, "
                "e.g. open_winds((u, v))."
            )
        return _open_components(source)
    return _open(source, WIND_FIELDS, {"u": u, "v": v, "speed": wind_speed}, "open_winds")


def open_stress(source, *, taux=None, tauy=None, stress_sign=None) -> xr.Dataset:
    """Open surface wind stress and put it on the canonical grid in Pa.

    Parameters
    ----------
    source : str, os.PathLike, list or tuple of paths, or xarray.Dataset
        A netCDF path, glob pattern or list of paths, a URL that xarray can open, or a Dataset.
    taux, tauy : str, optional
        Names of the eastward and northward stress in ``source`` when they cannot be found by
        CF ``standard_name`` (``surface_downward_eastward_stress``, ...) or a common name
        (``taux``, ``tauu``, ``sustr``, ``utau``, ...).

    Returns
    -------
    xarray.Dataset
        ``taux``, ``tauy`` (..., time, lat, lon) in Pa with standard names
        ``surface_downward_eastward_stress`` and ``surface_downward_northward_stress`` (the stress
        of the air on the sea, positive eastward/northward). Grid, time, missing values, laziness
        and attributes as in :func:`open_winds`; dyn cm-2 and N m-2 are converted.

    Raises
    ------
    GridError, UnitsError, ValueError
        As in :func:`open_winds`; ValueError also when the sign of the stress cannot be told
        (a momentum flux with no standard name, or attributes that contradict each other).
    """
    if stress_sign not in (None, "downward", "upward"):
        raise ValueError(
            f"open_stress: stress_sign: expected 'downward' (stress of the air on the sea) or "
            f"'upward' (of the sea on the air), found {stress_sign!r}. Fix: pass one of those."
        )
    return _open(source, STRESS_FIELDS, {"taux": taux, "tauy": tauy}, "open_stress",
                 stress_sign=stress_sign)


# ---------------------------------------------------------------------------------------------
# Opening


def _describe(source) -> str:
    if isinstance(source, xr.Dataset):
        return "xarray.Dataset"
    if isinstance(source, (list, tuple)):
        return f"{len(source)} files: {', '.join(str(s) for s in source[:3])}" + (
            ", ..." if len(source) > 3 else ""
        )
    return str(source)


def _open(source, fields, chosen, func, stress_sign=None) -> xr.Dataset:
    warned: list[tuple[str, str]] = []
    ds, chunk = _as_dataset(source, func, warned)
    # Multi-file sources were decoded file by file (units may differ); this is then a no-op.
    ds = _decode_time(ds, warned)
    if chunk:
        ds = _chunk_whole_fields(ds)
    picked = {}
    for field in fields:
        name = _pick_variable(ds, field, chosen[field.key], func)
        if name is not None:
            picked[field.key] = (name, ds[name])
    from .model_grid import assemble_on_model_grid, on_model_grid

    if picked and on_model_grid(picked[fields[0].key][1]):
        return assemble_on_model_grid(picked, fields, func, _describe(source), ds, warned)
    return _assemble(picked, fields, func, _describe(source), dict(ds.attrs), warned,
                     stress_sign=stress_sign)


def _as_dataset(source, func, warned) -> tuple[xr.Dataset, bool]:
    """Open ``source`` and say whether it still needs chunking.

    Single files are opened with times undecoded (decoding may need a fallback); the files of a
    multi-file source are decoded one by one, with fallback messages collected in ``warned``.
    """
    if isinstance(source, xr.Dataset):
        return source, False
    if isinstance(source, xr.DataArray):
        raise TypeError(
            f"{func}: source: expected a path, URL, list of paths or Dataset"
            f"{' (or a tuple of DataArrays)' if func == 'open_winds' else ''}, found a single "
            f"DataArray. Fix: pass both components, e.g. {func}(xr.Dataset({{...}}))"
            f"{' or open_winds((u, v))' if func == 'open_winds' else ''}."
        )
    if isinstance(source, (str, os.PathLike)) and _is_zarr(source):
        return _open_zarr(source, func), True
    if isinstance(source, (list, tuple)) or (
        isinstance(source, str) and _is_pattern(source)
    ):
        paths = _expand_paths(source, func)
        for p in paths:
            _require_whole(p, func)
        if len(paths) == 1 and _is_zarr(paths[0]):
            return _open_zarr(paths[0], func), True
        calendars: dict[str, list[str]] = {}

        def prepare(d):
            _note_calendar(d, calendars)
            return _decode_time(d, warned)

        try:
            ds = xr.open_mfdataset(
                paths, decode_times=False, preprocess=prepare,
                combine="by_coords",
                data_vars="minimal", coords="minimal", compat="override", join="exact",
                chunks={},
            )
        except (ValueError, TypeError) as err:
            _check_one_calendar(calendars, func)
            raise GridError(
                f"{func}: source: expected files on one grid that continue each other in time, "
                f"found a mismatch while combining {len(paths)} files ({_short(err)}). Fix: "
                "open them separately, or regrid them onto one grid first."
            ) from err
        _check_one_calendar(calendars, func)
        return ds, False
    if isinstance(source, (str, os.PathLike)):
        text = os.fspath(source)
        if "://" not in text:
            _require_file(text, func)
            _require_whole(text, func)
        try:
            return xr.open_dataset(text, decode_times=False), True
        except (OSError, ValueError) as err:
            damaged = "HDF error" in str(err) or "truncated" in str(err).lower()
            raise InputError(
                f"{func}: source: expected a netCDF file or a URL xarray can open, could not "
                f"open {text!r} ({err})"
                + (", so the file looks truncated or damaged" if damaged else "")
                + ". Fix: check the file with ncdump -h, or fetch or copy it again."
            ) from err
    raise TypeError(
        f"{func}: source: expected a path, URL, list of paths or xarray.Dataset"
        f"{', or a tuple/dict of DataArrays' if func == 'open_winds' else ''}, found "
        f"{type(source).__name__}. Fix: pass one of those."
    )


def _is_pattern(text: str) -> bool:
    return any(c in text for c in "*?[") and "://" not in text


def _is_zarr(path) -> bool:
    """A Zarr store: a folder ending in .zarr, or any folder with Zarr metadata in it."""
    if not isinstance(path, (str, os.PathLike)) or _is_pattern(os.fspath(path)):
        return False
    p = Path(path)
    return p.is_dir() and (
        p.suffix == ".zarr" or any((p / m).exists() for m in (".zmetadata", ".zgroup",
                                                               "zarr.json"))
    )


def _open_zarr(path, func) -> xr.Dataset:
    try:
        import zarr  # noqa: F401  (only to give a clear error when it is missing)
    except ImportError as err:
        raise ImportError(
            f"{func}: source: reading the Zarr store {os.fspath(path)!r} needs the 'zarr' "
            "package, which is not installed. Fix: pip install zarr."
        ) from err
    try:
        with warnings.catch_warnings():
            # A store without consolidated metadata opens as well, only a little slower.
            warnings.simplefilter("ignore", RuntimeWarning)
            return xr.open_dataset(os.fspath(path), engine="zarr", chunks={}, decode_times=False)
    except (OSError, ValueError, KeyError) as err:
        raise ValueError(
            f"{func}: source: expected a Zarr store xarray can open, could not open "
            f"{os.fspath(path)!r} ({_short(err)}). Fix: check the store, or open it yourself "
            "and pass the Dataset."
        ) from err


def _expand_paths(source, func) -> list[str]:
    """Paths of a pattern, or of a list whose items are paths or patterns, in order, once each."""
    items = [source] if isinstance(source, (str, os.PathLike)) else list(source)
    bad = [p for p in items if not isinstance(p, (str, os.PathLike))]
    if bad:
        raise TypeError(
            f"{func}: source: expected a list of paths, found items of type "
            f"{sorted({type(p).__name__ for p in bad})}. Fix: pass paths only, or one Dataset."
        )
    paths: list[str] = []
    for item in items:
        text = os.fspath(item)
        if _is_pattern(text):
            found = sorted(glob.glob(text))
            if not found:
                raise FileNotFoundError(
                    f"{func}: source: expected files matching {text!r}, found none. Fix: check "
                    "the pattern and the folder."
                )
        else:
            _require_file(text, func)
            found = [text]
        paths.extend(f for f in found if f not in paths)
    if not paths:
        raise FileNotFoundError(
            f"{func}: source: expected at least one file, found an empty list. Fix: pass "
            "paths or patterns."
        )
    return paths


def _note_calendar(d: xr.Dataset, calendars: dict) -> None:
    name = _time_name(d)
    if name is None:
        return
    cal = str(d[name].attrs.get("calendar", "standard")).strip().lower()
    # CF names the same calendar several ways.
    cal = {"gregorian": "standard", "365_day": "noleap", "366_day": "all_leap"}.get(cal, cal)
    calendars.setdefault(cal, []).append(str(d.encoding.get("source", "?")))


def _check_one_calendar(calendars: dict, func) -> None:
    if len(calendars) > 1:
        found = "; ".join(f"'{c}' in {', '.join(Path(f).name for f in fs[:2])}"
                          + (", ..." if len(fs) > 2 else "") for c, fs in calendars.items())
        raise GridError(
            f"{func}: source: expected files on one calendar, found {found}. Fix: open the "
            "files of each calendar separately, or convert one set, e.g. "
            "ds.convert_calendar('standard'), and write it out again."
        )


def _short(err) -> str:
    return str(err).strip().splitlines()[0][:200] if str(err).strip() else type(err).__name__


def _require_whole(path, func) -> None:
    """Refuse a classic-format netCDF file shorter than its header says (a cut-off copy).

    netCDF-C reads the missing end of such a file as zeros, which would pass for calm winds;
    scipy's reader maps the variables onto the file and fails when they do not fit.
    NetCDF-4 (HDF5) files cut short fail to open in netCDF-C already.
    """
    if not Path(path).is_file():
        return  # a Zarr store or a URL
    with open(path, "rb") as fh:
        magic = fh.read(4)
    if magic not in (b"CDF\x01", b"CDF\x02"):
        return
    from scipy.io import netcdf_file

    try:
        nc = netcdf_file(path, "r", mmap=True)
    except (ValueError, TypeError, OSError):
        size = os.path.getsize(path)
        raise InputError(
            f"{func}: source: expected a whole netCDF file, found that {str(path)!r} ({size} "
            "bytes) holds less data than its header describes: it looks truncated, e.g. by an "
            "interrupted download or copy. Fix: fetch or copy the file again."
        ) from None
    # The variables' arrays point into the mapped file: drop them so that it closes cleanly.
    nc.variables.clear()
    nc.close()


def _require_file(path, func) -> None:
    if not Path(path).is_file():
        raise FileNotFoundError(
            f"{func}: source: expected an existing file, found no file at {str(path)!r}. Fix: "
            f"check the path and the working folder ({os.getcwd()})."
        )


def _chunk_whole_fields(ds: xr.Dataset) -> xr.Dataset:
    """Chunk a freshly opened file lazily: whole horizontal fields, dask's size along the rest."""
    chunks = {}
    for name, var in ds.data_vars.items():
        if var.ndim >= 2:
            try:
                lay = grid_layout(var, argname=name)
            except GridError:
                continue  # not a lat-lon field; any problem with a chosen variable shows later
            chunks.update({lay.lat_name: -1, lay.lon_name: -1})
    rest = {d: "auto" for d in ds.dims if d not in chunks}
    return ds.chunk({**rest, **chunks})


def _open_components(source) -> xr.Dataset:
    keys = ("u", "v", "speed")
    if isinstance(source, tuple):
        if len(source) not in (2, 3):
            raise ValueError(
                f"open_winds: source: expected a tuple (u, v) or (u, v, speed), found "
                f"{len(source)} items. Fix: pass the components in that order."
            )
        given = dict(zip(keys, source))
    else:
        given = {("speed" if k == "wind_speed" else k): val for k, val in source.items()}
        unknown = set(given) - set(keys)
        if unknown or not {"u", "v"} <= set(given):
            raise ValueError(
                f"open_winds: source: expected a dict with keys 'u', 'v' and optionally "
                f"'speed', found keys {sorted(source)}. Fix: rename the keys."
            )
    picked = {}
    for key, da in given.items():
        if not isinstance(da, xr.DataArray):
            raise TypeError(
                f"open_winds: source['{key}']: expected an xarray.DataArray with latitude and "
                f"longitude coordinates, found {type(da).__name__}. Fix: wrap it, e.g. "
                "xr.DataArray(values, coords={'lat': lat, 'lon': lon}, dims=('lat', 'lon'), "
                "attrs={'units': 'm s-1'})."
            )
        picked[key] = (da.name if da.name is not None else key, da)
    warned: list[tuple[str, str]] = []
    picked = {k: (n, _decode_time(da, warned)) for k, (n, da) in picked.items()}
    return _assemble(picked, WIND_FIELDS, "open_winds", "DataArrays " + ", ".join(picked), {},
                     warned)


# ---------------------------------------------------------------------------------------------
# Finding variables


def _lower(s) -> str:
    return str(s).strip().lower()


def _score(name, da: xr.DataArray, field: _Field) -> int:
    std = _lower(da.attrs.get("standard_name", ""))
    if std in field.standard_names or std in field.upward_standard_names:
        return 3
    if _lower(name) in field.names or _lower(name) in field.unsigned_names:
        return 2
    if _lower(da.attrs.get("long_name", "")) in field.long_names:
        return 1
    return 0


def _pick_variable(ds: xr.Dataset, field: _Field, chosen, func) -> str | None:
    if chosen is not None:
        if not isinstance(chosen, str) or chosen not in ds.data_vars:
            raise ValueError(
                f"{func}: {field.key}: expected the name of a variable in the source, found "
                f"{chosen!r}; the variables are {list(ds.data_vars)}. Fix: pass one of those, "
                f"e.g. {field.key}='{next(iter(ds.data_vars), 'NAME')}'."
            )
        return chosen
    scored = [(n, _score(n, ds[n], field)) for n in ds.data_vars]
    best = max((s for _, s in scored), default=0)
    if best == 0:
        if field.key not in REQUIRED:
            return None
        listing = ", ".join(
            f"{n} ({ds[n].attrs.get('long_name', ds[n].attrs.get('standard_name', '?'))})"
            for n in ds.data_vars
        )
        raise ValueError(
            f"{func}: {field.key}: expected a variable with standard_name '{field.standard_name}' "
            f"or a common name such as {list(field.names[:4])}, found none among: "
            f"{listing or 'no variables'}. Fix: name it, e.g. {func}(source, "
            f"{field.key}='MY_VARIABLE')."
        )
    cands = [n for n, s in scored if s == best]
    if len(cands) > 1:
        raise ValueError(
            f"{func}: {field.key}: expected one variable for {field.long_name}, found several "
            f"that qualify equally: {cands}. Fix: choose one, e.g. {func}(source, "
            f"{field.key}='{cands[0]}')."
        )
    return cands[0]


# ---------------------------------------------------------------------------------------------
# Time


def _time_name(obj) -> str | None:
    """The dimension that is time: CF attributes, 'since' units or datetime values, or its name."""
    best, found = 0, []
    for d in obj.dims:
        if d not in obj.coords or obj[d].ndim != 1:
            continue
        c = obj[d]
        units = _lower(c.attrs.get("units", c.encoding.get("units", "")))
        if (
            _lower(c.attrs.get("standard_name", "")) == "time"
            or str(c.attrs.get("axis", "")).upper() == "T"
            or " since " in units
            or np.issubdtype(c.dtype, np.datetime64)
            or (c.dtype == object and c.size and hasattr(c.values[0], "calendar"))
        ):
            score = 2
        elif _lower(d) in TIME_NAMES:
            score = 1
        else:
            continue
        if score > best:
            best, found = score, [d]
        elif score == best:
            found.append(d)
    if len(found) > 1:
        raise ValueError(
            f"time: expected one time dimension, found several that qualify equally: {found}. "
            f"Fix: rename or drop the ones that are not time."
        )
    return found[0] if found else None


def _decode_one(coord: xr.DataArray, calendar: str | None, use_cftime):
    attrs = dict(coord.attrs)
    if calendar is not None:
        attrs["calendar"] = calendar
    sub = xr.Dataset(coords={coord.name: xr.Variable(coord.dims, coord.values, attrs)})
    coder = xr.coders.CFDatetimeCoder(use_cftime=use_cftime)
    with warnings.catch_warnings():
        # xarray's own advice about calendars is replaced by the one warning issued here.
        warnings.simplefilter("ignore")
        return xr.decode_cf(sub, decode_times=coder)[coord.name]


# Calendars to fall back on, in order: proleptic_gregorian keeps real month lengths and has a
# year 0 (CF 1.9, cftime); 360_day also reads 'months since' units.
FALLBACK_CALENDARS = ("proleptic_gregorian", "360_day")


def _decode_time(obj, warned: list[tuple[str, str]]):
    """Return ``obj`` with its time coordinate decoded.

    Fallbacks append (warning text, short note for the ``normalisation`` attribute) to ``warned``.
    """
    name = _time_name(obj)
    if name is None:
        return obj
    coord = obj[name]
    units = coord.attrs.get("units")
    if coord.dtype.kind in "Mm" or coord.dtype == object:
        return obj
    if not (isinstance(units, str) and " since " in _lower(units)):
        return _month_fallback(obj, name, f"it has no 'UNIT since DATE' units ({units!r})",
                               warned)
    calendar = coord.attrs.get("calendar", "standard")
    try:
        return obj.assign_coords({name: _decode_one(coord, None, None)})
    except (ValueError, OverflowError, TypeError) as err:
        first = err
    for cal in FALLBACK_CALENDARS:
        try:
            decoded = _decode_one(coord, cal, True)
        except (ValueError, OverflowError, TypeError):
            continue
        warned.append((
            f"time coordinate '{name}': units '{units}' with calendar '{calendar}' cannot be "
            f"decoded ({_reason(units, first)}); decoded with calendar '{cal}' (cftime) instead. "
            f"Months and days are as the file gives them, so grouping by "
            f"'time.month' works; for a climatology the year is a placeholder. Fix: give the "
            f"time variable the calendar attribute that fits, e.g. calendar='{cal}', to "
            f"silence this.",
            f"time '{name}' decoded with fallback calendar '{cal}' (units '{units}')",
        ))
        return obj.assign_coords({name: decoded})
    why = f"no calendar decodes units '{units}' ({_reason(units, first)})"
    return _month_fallback(obj, name, why, warned)


def _reason(units: str, err) -> str:
    if re.search(r"since\s*0+-", units):
        return "the standard calendar has no year 0"
    return str(err).split(". ")[0][:160]


def _month_fallback(obj, name, why, warned):
    """Leave the raw time values; for 12 steps add a ``month`` (1..12) coordinate to group by."""
    if obj.sizes[name] == 12:
        warned.append((
            f"time coordinate '{name}': {why}; kept the raw values and, since there are 12 steps, "
            f"added a coordinate 'month' = 1..12 assuming they are January..December. Fix: give "
            f"the time variable CF units and a calendar.",
            f"time '{name}' left undecoded; coordinate 'month' = 1..12 added",
        ))
        month = xr.DataArray(np.arange(1, 13), dims=name,
                             attrs={"long_name": "month of the year", "units": "1"})
        return obj.assign_coords(month=month)
    warned.append((
        f"time coordinate '{name}': {why}; kept the raw values. Fix: give the time variable CF "
        f"units ('days since 1970-01-01') and a calendar.",
        f"time '{name}' left undecoded",
    ))
    return obj


# ---------------------------------------------------------------------------------------------
# Normalising the fields


def _unmask(da: xr.DataArray, steps: list[str], label: str) -> xr.DataArray:
    """Apply packing and fill attributes left undecoded, and the fill sentinel; float64."""
    attrs = da.attrs
    out = da
    fills = [attrs[k] for k in ("_FillValue", "missing_value") if k in attrs]
    if fills:
        # Compare in the field's own dtype: a float32 -99.9 is not the float64 -99.9.
        for fill in np.unique(np.asarray(fills).astype(da.dtype).ravel()):
            out = out.where(out != fill)
        steps.append(f"{label}: _FillValue/missing_value in attributes applied")
    out = out.astype(np.float64)
    if "scale_factor" in attrs or "add_offset" in attrs:
        out = out * float(attrs.get("scale_factor", 1.0)) + float(attrs.get("add_offset", 0.0))
        steps.append(f"{label}: scale_factor/add_offset in attributes applied")
    return _validate.fills_to_missing(out, label)


def _stress_sign(name, da: xr.DataArray, field: _Field, stress_sign, argname) -> tuple[float, str]:
    """+1 for the stress of the air on the sea, -1 for the sea on the air, with a note."""
    if stress_sign is not None:
        return (1.0 if stress_sign == "downward" else -1.0), f"stress_sign='{stress_sign}' given"
    std = _lower(da.attrs.get("standard_name", ""))
    long = _lower(da.attrs.get("long_name", ""))
    says_up = "upward" in long or "sea on the air" in long or "ocean on the atmosphere" in long
    says_down = "downward" in long or "air on the sea" in long or "on the ocean" in long
    if std in field.upward_standard_names:
        if says_down:
            return _unknown_sign(name, da, argname, "its standard_name says upward and its "
                                 "long_name downward")
        return -1.0, f"standard_name '{std}' is upward: sign flipped"
    if std in field.standard_names:
        if says_up:
            return _unknown_sign(name, da, argname, "its standard_name says downward and its "
                                 "long_name upward")
        return 1.0, ""
    if says_up and not says_down:
        return -1.0, "long_name says upward: sign flipped"
    if says_down and not says_up:
        return 1.0, ""
    if _lower(name) in field.unsigned_names or (says_up and says_down):
        return _unknown_sign(name, da, argname, "it is a momentum flux with no standard_name "
                             "saying upward or downward, and products differ")
    return 1.0, ""


def _unknown_sign(name, da, argname, why):
    raise ValueError(
        f"{argname}: expected a stress whose sign can be told (standard_name "
        f"surface_downward_*_stress or surface_upward_*_stress), found standard_name "
        f"{da.attrs.get('standard_name')!r}, long_name {da.attrs.get('long_name')!r}: {why}. "
        f"Fix: say which it is, open_stress(..., stress_sign='downward') for the stress of the "
        f"air on the sea or 'upward' for the sea on the air (command line: --stress-sign)."
    )


def _normalise_field(name, da: xr.DataArray, field: _Field, func: str, steps: list[str],
                     stress_sign=None):
    argname = f"{func}: {field.key} (variable '{name}')"
    units = da.attrs.get("units")
    factor = si_factor(units, field.kind, argname=argname)
    if field.kind == "stress":
        sign, sign_note = _stress_sign(name, da, field, stress_sign, argname)
        if sign_note:
            steps.append(f"{field.out}: {sign_note}")
        factor = factor * sign
    layout = grid_layout(da, argname=argname)
    time = _time_name(da)
    out = _unmask(da, steps, field.out)
    if factor != 1.0:
        out = out * factor
    out = _validate.checked(out, argname, field.kind)
    unit_out = KIND[field.kind][1]
    steps.append(
        f"{field.out}: from variable '{name}' in '{units}'"
        + (f" (x {factor:.9g})" if factor != 1.0 else "") + f" -> '{unit_out}'"
    )
    out = to_canonical(out, layout)
    renames = {layout.lat_name: "lat", layout.lon_name: "lon"}
    if time is not None:
        renames[time] = "time"
    renames = {k: val for k, val in renames.items() if k != val}
    # A leftover coordinate that already carries a target name (e.g. a scalar 'time' on a
    # field whose time dimension is called 'TIME') would clash with the rename.
    clash = [c for c in out.coords if c in renames.values() and c not in renames]
    out = out.drop_vars(clash).rename(renames)
    out = out.transpose(..., "lat", "lon")
    out = out.assign_coords(
        lat=out["lat"].astype(np.float64).assign_attrs(LAT_ATTRS),
        lon=out["lon"].astype(np.float64).assign_attrs(LON_ATTRS),
    )
    if "time" in out.coords:
        tattrs = {k: val for k, val in out["time"].attrs.items()
                  if k not in ("units", "calendar", "time_origin", "modulo")}
        out = out.assign_coords(time=out["time"].copy().assign_attrs(
            {**tattrs, "standard_name": "time", "axis": "T"}))
    attrs = {
        "standard_name": field.standard_name,
        "long_name": field.long_name,
        "units": unit_out,
        # Kept from an earlier pass, so that reopening our own output changes nothing.
        "source_variable": str(da.attrs.get("source_variable", name)),
    }
    if units is not None:
        attrs["source_units"] = str(da.attrs.get("source_units", units))
    out = out.rename(field.out)
    out.attrs = attrs
    out.encoding = {}
    if out.chunks is None and not bool(np.isfinite(out.values).any()):
        raise ValueError(
            f"{argname}: expected some valid values, found every value missing (NaN, a fill "
            f"value, or beyond {FILL_SENTINEL:g}). Fix: check that the right variable was "
            f"chosen and that its _FillValue/missing_value attributes are right."
        )
    return out, layout, renames


def _assemble(picked, fields, func, described, global_attrs, warned,
              stress_sign=None) -> xr.Dataset:
    steps: list[str] = []
    outs = {}
    layouts = {}
    for field in fields:
        if field.key not in picked:
            continue
        name, da = picked[field.key]
        out, layout, renames = _normalise_field(name, da, field, func, steps, stress_sign)
        outs[field.key] = out
        layouts[field.key] = (name, layout, renames)
    first = fields[0].key
    for key in list(outs)[1:]:
        _check_same_grid(outs[first], outs[key], (first, key), func)
    name, layout, renames = layouts[first]
    if renames:
        pairs = ", ".join(f"'{a}' -> '{b}'" for a, b in renames.items())
        steps.append(f"dimensions renamed {pairs}")
    if layout.lat_order[0] != 0:
        steps.append("latitude reversed to ascending")
    if not np.array_equal(layout.lon_order, np.arange(layout.lon_order.size)):
        steps.append("longitude reordered to increasing")
    elif not np.array_equal(layout.lon, np.asarray(picked[first][1][layout.lon_name], float)):
        steps.append("longitude unwrapped past the wrap-around to stay increasing")
    steps.append(f"values below -{FILL_SENTINEL:g} or above {FILL_SENTINEL:g} and the "
                 "undeclared fills -9999 and -999 set to NaN (with a warning where found); "
                 "float64")
    if warned:
        # Components and files often share one time axis: say it once.
        message, note = warned[0]
        steps.append(note)
        warnings.warn(message, TimeDecodingWarning, stacklevel=4)
    out_names = {f.key: f.out for f in fields}
    ds = xr.Dataset({out_names[k]: da for k, da in outs.items()})
    attrs = {k: val for k, val in global_attrs.items() if k not in ("input", "normalisation")}
    history = f"sverdrup_kit.{func}({described})"
    attrs["history"] = f"{attrs['history']}\n{history}" if attrs.get("history") else history
    attrs["input"] = described
    attrs["normalisation"] = "; ".join(steps)
    ds.attrs = attrs
    return ds


def _check_same_grid(a: xr.DataArray, b: xr.DataArray, keys, func) -> None:
    for coord in ("lat", "lon"):
        va, vb = a[coord].values, b[coord].values
        if va.shape != vb.shape or not np.allclose(va, vb, rtol=0, atol=1e-6):
            raise GridError(
                f"{func}: {keys[0]} and {keys[1]}: expected the same grid, found different "
                f"'{coord}' ({va.size} values {va[0]:g}..{va[-1]:g} vs {vb.size} values "
                f"{vb[0]:g}..{vb[-1]:g}, after putting both in ascending order). Fix: "
                f"interpolate one onto the other, e.g. {keys[1]}.interp_like({keys[0]}), or pick "
                f"variables on the same grid ({keys[0]}=..., {keys[1]}=...)."
            )
    if set(a.dims) != set(b.dims):
        raise GridError(
            f"{func}: {keys[0]} and {keys[1]}: expected the same dimensions, found {a.dims} and "
            f"{b.dims}. Fix: pass components of the same field."
        )
    for d in a.dims:
        if d in ("lat", "lon") or d not in a.coords or d not in b.coords:
            continue
        if a.sizes[d] != b.sizes[d] or not np.array_equal(a[d].values, b[d].values):
            raise GridError(
                f"{func}: {keys[0]} and {keys[1]}: expected the same '{d}' coordinate, found "
                f"different values. Fix: select the common part, e.g. xr.align(u, v, "
                f"join='inner')."
            )
