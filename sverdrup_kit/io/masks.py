r"""Ocean masks for any wind grid: from relief, land or ocean fractions, or the built-in Earth.

A mask source on any regular latitude-longitude grid is turned into an ocean indicator (relief:
water where the height is below 0 m; depth: where it is above 0 m; land fraction: 1 minus it;
ocean fraction as it is, in percent or as a fraction), averaged by area onto the wind grid
(:func:`~sverdrup_kit.geometry.regrid.area_weighted_average`), and each wind cell is ocean when
its ocean fraction is at least ``threshold`` (half, by default).

The built-in Earth mask (``source="earth"``) is a 0.25 degree ocean fraction shipped with the
package (``sverdrup_kit/data/earth_ocean_fraction.nc``, 71 kB), made by
``data_recipes/earth_mask.py`` from the ETOPO5 relief (NOAA National Geophysical Data Center
1988, public domain); it needs no network and no download. On wind grids finer than 0.25 degree
its coastline is that of the 0.25 degree cells: pass a finer relief for those.
"""

from __future__ import annotations

import functools
import os
from importlib import resources

import numpy as np
import xarray as xr

from ..errors import GridError, InputError
from ..geometry.coords import find_latlon, grid_layout
from ..geometry.regrid import area_weighted_average, coverage

__all__ = ["EARTH_MASK_FILE", "MASK_KINDS", "ocean_fraction", "ocean_mask", "relief_field"]

EARTH_MASK_FILE = "earth_ocean_fraction.nc"
EARTH = "earth"

# Tables of criteria, apart from the logic: how a variable says what it holds (CF standard
# names first, then names that real files use, all compared in lower case).
MASK_KINDS = {
    "relief": dict(
        standard_names=("surface_altitude", "altitude", "height_above_mean_sea_level",
                        "height_above_geoid", "height_above_reference_ellipsoid",
                        "bedrock_altitude"),
        names=("rose", "z", "elevation", "elev", "topo", "topography", "relief", "height",
               "etopo", "altitude", "bathy_topo"),
        meaning="height of land and sea floor in m, ocean where < 0",
    ),
    "depth": dict(
        standard_names=("sea_floor_depth_below_geoid", "sea_floor_depth_below_sea_surface",
                        "sea_floor_depth_below_mean_sea_level", "sea_floor_depth"),
        names=("depth", "deptho", "bathymetry", "bathy", "h", "hdepth"),
        meaning="sea-floor depth in m, positive down, ocean where > 0",
    ),
    "land_fraction": dict(
        standard_names=("land_area_fraction", "land_binary_mask"),
        names=("lsm", "sftlf", "landmask", "land_mask", "land_fraction", "landfrac",
               "land_sea_mask", "lsmask", "land"),
        meaning="fraction (or percent) of land",
    ),
    "ocean_fraction": dict(
        standard_names=("sea_area_fraction", "sea_binary_mask"),
        names=("sftof", "ocean_fraction", "ocean_mask", "sea_fraction", "oceanfrac",
               "seamask", "sea_mask", "ocean", "mask", "wet"),
        meaning="fraction (or percent) of ocean",
    ),
}
PERCENT_UNITS = {"%", "percent", "percentage"}


# ---------------------------------------------------------------------------------------------
# Public functions


def ocean_fraction(source, like, *, variable: str | None = None, kind: str | None = None,
                   argname: str = "ocean_mask") -> xr.DataArray:
    r"""Ocean fraction of each cell of ``like``'s grid, from a mask source on any grid.

    Parameters
    ----------
    source : "earth", str, os.PathLike, xarray.Dataset or xarray.DataArray (lat, lon)
        ``"earth"`` for the built-in Earth ocean fraction (0.25 degree, from ETOPO5), or a
        relief, depth, land-fraction or ocean-fraction field on a regular latitude-longitude
        grid that covers ``like``'s (any resolution, order and longitude convention), or a
        file holding one.
    like : xarray.Dataset or xarray.DataArray
        Anything with the target latitude and longitude (the winds).
    variable : str, optional
        Name of the field in a file or Dataset that holds several.
    kind : {"relief", "depth", "land_fraction", "ocean_fraction"}, optional
        What the field holds, when its ``standard_name``, name or units do not say
        (see :data:`MASK_KINDS`).
    argname : str, optional
        Name of ``source`` in error messages.

    Returns
    -------
    xarray.DataArray (lat, lon)
        ``ocean_fraction`` (units "1", 0..1) on the grid, order and coordinates of ``like``,
        with ``source`` and ``method`` attributes.

    Raises
    ------
    GridError
        When the source's grid does not cover the wind grid.
    InputError
        Unknown kind, fractions outside 0..1 (or 0..100 percent), a variable that is not found.

    Notes
    -----
    With :math:`A_{ij}` the overlap area of wind cell :math:`i` and source cell :math:`j` and
    :math:`o_j` the ocean indicator of the source cell,
    :math:`f_i = \sum_j A_{ij} o_j / \sum_j A_{ij}` (first-order conservative remapping,
    Jones 1999, Mon. Weather Rev. 127, 2204-2210). Missing source values count as land.
    """
    if isinstance(source, str) and source.strip().lower() == EARTH:
        frac = _earth_fraction()
        what = frac.attrs["source"]
    else:
        da, what = _read_source(source, variable, argname)
        frac = _as_ocean_fraction(da, kind, argname)
    _check_covers(frac, like, argname)
    out = area_weighted_average(frac.fillna(0.0), like, min_coverage=1e-9, argname=argname)
    out = out.clip(0.0, 1.0).rename("ocean_fraction")
    out.attrs = {
        "long_name": "fraction of the cell area that is ocean",
        "standard_name": "sea_area_fraction",
        "units": "1",
        "source": what,
        "method": "area-weighted average onto the wind grid (overlap areas on the sphere); "
                  + frac.attrs.get("method", ""),
    }
    return out


def ocean_mask(source, like, *, variable: str | None = None, threshold: float = 0.5,
               kind: str | None = None, argname: str = "ocean_mask") -> xr.DataArray:
    """Boolean ocean mask on ``like``'s grid: cells whose ocean fraction is at least ``threshold``.

    Parameters
    ----------
    source, like, variable, kind, argname
        As in :func:`ocean_fraction`.
    threshold : float, optional
        Fraction in (0, 1]: a wind cell is ocean when at least this fraction of its area is
        ocean. Default 0.5 (at least half ocean).

    Returns
    -------
    xarray.DataArray (lat, lon) of bool
        ``ocean_mask``, True over the ocean, on the grid, order and coordinates of ``like``;
        attributes ``source``, ``method``, ``threshold``.

    Examples
    --------
    >>> import numpy as np, xarray as xr
    >>> winds = xr.Dataset(coords={"lat": np.arange(-88.75, 90, 2.5),
    ...                            "lon": np.arange(0, 360, 2.5)})
    >>> mask = ocean_mask("earth", winds)
    >>> round(float(mask.weighted(np.cos(np.deg2rad(mask.lat))).mean()), 2)
    0.72
    """
    check_threshold(threshold, "threshold")
    frac = ocean_fraction(source, like, variable=variable, kind=kind, argname=argname)
    out = (frac >= threshold).rename("ocean_mask")
    out.attrs = {
        "long_name": "ocean (True) or land (False)",
        "source": frac.attrs["source"],
        "method": f"ocean where the ocean fraction is at least {threshold:g}; "
                  + frac.attrs["method"],
        "threshold": float(threshold),
    }
    return out


def relief_field(source, *, variable: str | None = None, kind: str | None = None,
                 argname: str = "relief") -> xr.DataArray:
    """Surface height in m (negative below sea level) from a relief or sea-floor depth source.

    The reader of :func:`ocean_fraction`, for callers that need the depth itself (the
    ``over_shelf`` caution of :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport`).

    Parameters
    ----------
    source : str, os.PathLike, xarray.Dataset or xarray.DataArray (lat, lon)
        A relief (height, m, up) or sea-floor depth (m, positive down) field on a regular
        latitude-longitude grid, or a file holding one.
    variable, argname
        As in :func:`ocean_fraction`.
    kind : {"relief", "depth"}, optional
        What the field holds, when its ``standard_name``, name or units do not say.

    Returns
    -------
    xarray.DataArray (lat, lon)
        ``relief`` in m, float64, on the source's grid (depths turned into heights), with a
        ``source`` attribute saying which variable of which file it is.

    Raises
    ------
    InputError
        A variable that is not found, a land or ocean fraction, units that are not a length.
    """
    da, what = _read_source(source, variable, argname)
    if kind is None:
        kind = _kind_of(da, da.name)
        if kind is None and _is_length(da.attrs.get("units")):
            kind = "relief"
    units = da.attrs.get("units")
    if kind not in ("relief", "depth") or (units is not None and not _is_length(units)):
        raise InputError(
            f"{argname}: expected surface height or sea-floor depth in m, found {what} "
            f"(standard_name {da.attrs.get('standard_name')!r}, units {units!r}"
            f"{f', read as {kind}' if kind else ''}). Fix: pass a relief file such as ETOPO, "
            f"or name its height variable with {argname}_variable."
        )
    lat, lon = find_latlon(da, argname=argname)
    extra = [d for d in da.dims if d not in (lat, lon)]
    if extra and all(da.sizes[d] == 1 for d in extra):
        da = da.isel({d: 0 for d in extra}, drop=True)
    elif extra:
        raise GridError(
            f"{argname}: expected a (lat, lon) field, found dimensions {da.dims}. Fix: select "
            f"one field first, e.g. .isel({extra[0]}=0)."
        )
    scale = 1e3 if str(units).strip().lower() == "km" else 1.0
    out = da.astype(np.float64) * (scale if kind == "relief" else -scale)
    out = out.rename("relief")
    out.attrs = {"long_name": "height of the surface (land) and of the sea floor",
                 "standard_name": "surface_altitude", "units": "m",
                 "source": what + ("" if kind == "relief" else " (sea-floor depth, sign turned)")}
    return out


def check_threshold(threshold, argname: str = "threshold") -> None:
    """Raise :class:`InputError` unless ``threshold`` is a fraction in (0, 1]."""
    ok = isinstance(threshold, (int, float, np.floating, np.integer)) and not isinstance(
        threshold, bool) and np.isfinite(threshold) and 0.0 < threshold <= 1.0
    if not ok:
        hint = (f" (a percentage? use {threshold / 100:g})"
                if isinstance(threshold, (int, float)) and 1 < threshold <= 100 else "")
        raise InputError(
            f"{argname}: expected the ocean fraction of a wind cell that makes it ocean, a "
            f"number in (0, 1], found {threshold!r}{hint}. Fix: e.g. {argname}=0.5 (at least "
            "half ocean)."
        )


def has_missing(winds: xr.Dataset, names) -> bool:
    """Whether any field in ``names`` has a missing value in its first time step.

    Only the first step is read: on a lazily opened record this costs one field per variable.
    """
    for name in names:
        da = winds[name]
        if "time" in da.dims:
            da = da.isel(time=0)
        if bool(da.isnull().any()):
            return True
    return False


def is_global(winds) -> bool:
    """Whether the grid closes the circle in longitude (periodic)."""
    try:
        return grid_layout(winds, argname="winds").periodic
    except GridError:
        return False


# ---------------------------------------------------------------------------------------------
# Reading and interpreting the source


@functools.lru_cache(maxsize=1)
def _earth_fraction() -> xr.DataArray:
    ref = resources.files("sverdrup_kit").joinpath("data", EARTH_MASK_FILE)
    with resources.as_file(ref) as path, xr.open_dataset(path) as ds:
        raw = ds["ocean_fraction"].load()
        attrs = dict(ds.attrs)
    frac = (raw.astype(np.float64) / 100.0).rename("ocean_fraction")
    frac.attrs = {
        "source": "built-in Earth ocean fraction (0.25 degree, from the ETOPO5 relief; "
                  f"{attrs.get('script', '')}, {attrs.get('date_created', '')})",
        "source_detail": attrs.get("source", ""),
        "method": attrs.get("method", ""),
        "references": attrs.get("references", ""),
    }
    return frac


def _read_source(source, variable, argname):
    if isinstance(source, xr.DataArray):
        if variable is not None:
            raise InputError(
                f"{argname}_variable: a variable name only applies to a file or Dataset, found a "
                f"DataArray with variable={variable!r}. Fix: drop the variable name."
            )
        return source, f"DataArray '{source.name}'"
    if isinstance(source, (str, os.PathLike)):
        path = os.fspath(source)
        if not os.path.isfile(path):
            raise FileNotFoundError(
                f"{argname}: expected a relief, land-fraction or ocean-fraction file (or "
                f"'earth' for the built-in mask), found no file at {path!r}. Fix: check the "
                "path."
            )
        try:
            ds = xr.open_dataset(path)
        except (OSError, ValueError) as err:
            raise InputError(
                f"{argname}: expected a NetCDF file, could not open {path!r} ({err}). Fix: check "
                "it with ncdump -h, or open it yourself and pass the DataArray."
            ) from err
        name = _pick(ds, variable, argname)
        return ds[name].load(), f"variable '{name}' of {path}"
    if isinstance(source, xr.Dataset):
        name = _pick(source, variable, argname)
        return source[name], f"variable '{name}' of a Dataset"
    raise TypeError(
        f"{argname}: expected 'earth', a file path, a Dataset or a DataArray (lat, lon), found "
        f"{type(source).__name__}. Fix: pass one of those."
    )


def _kind_of(da: xr.DataArray, name) -> str | None:
    std = str(da.attrs.get("standard_name", "")).strip().lower()
    for kind, crit in MASK_KINDS.items():
        if std in crit["standard_names"]:
            return kind
    low = str(name).strip().lower()
    for kind, crit in MASK_KINDS.items():
        if low in crit["names"]:
            return kind
    return None


def _pick(ds: xr.Dataset, variable, argname) -> str:
    if variable is not None:
        if variable not in ds.data_vars:
            raise InputError(
                f"{argname}_variable: expected the name of a variable in the mask file, found "
                f"{variable!r}; the variables are {list(ds.data_vars)}. Fix: pass one of those."
            )
        return variable
    fields = [n for n in ds.data_vars if ds[n].ndim >= 2]
    known = [n for n in fields if _kind_of(ds[n], n) is not None]
    if len(known) == 1:
        return known[0]
    if len(fields) == 1:
        return fields[0]
    raise InputError(
        f"{argname}_variable: expected one relief, land-fraction or ocean-fraction variable in "
        f"the mask file, found {known or fields or 'none'}. Fix: name it, e.g. "
        f"{argname}_variable='{(known or fields or ['NAME'])[0]}'."
    )


def _as_ocean_fraction(da: xr.DataArray, kind, argname) -> xr.DataArray:
    lat, lon = find_latlon(da, argname=argname)
    extra = [d for d in da.dims if d not in (lat, lon)]
    if extra:
        if all(da.sizes[d] == 1 for d in extra):
            da = da.isel({d: 0 for d in extra})
        else:
            raise GridError(
                f"{argname}: expected a (lat, lon) field, found dimensions {da.dims}. Fix: "
                f"select one field, e.g. .isel({extra[0]}=0)."
            )
    if kind is None:
        kind = _kind_of(da, da.name)
        if kind is None and _is_length(da.attrs.get("units")):
            kind = "relief"
    if kind not in MASK_KINDS:
        choices = "; ".join(f"'{k}' ({c['meaning']})" for k, c in MASK_KINDS.items())
        raise InputError(
            f"{argname}_kind: expected one of {choices}, found "
            f"{kind!r} for variable '{da.name}' (standard_name "
            f"{da.attrs.get('standard_name')!r}, units {da.attrs.get('units')!r}). Fix: say what "
            "it holds, e.g. kind='land_fraction'."
        )
    vals = da.astype(np.float64)
    note = MASK_KINDS[kind]["meaning"]
    if kind == "relief":
        ocean = (vals < 0).astype(np.float64)
    elif kind == "depth":
        ocean = (vals > 0).astype(np.float64)
    else:
        vals, scale_note = _to_fraction(vals, da, argname)
        ocean = vals if kind == "ocean_fraction" else 1.0 - vals
        note += scale_note
    ocean = ocean.where(vals.notnull())
    ocean.attrs = {"method": f"source read as {kind} ({note}); missing values count as land"}
    return ocean


def _is_length(units) -> bool:
    return str(units).strip().lower() in {"m", "meter", "meters", "metre", "metres", "km"}


def _to_fraction(vals: xr.DataArray, da, argname):
    units = str(da.attrs.get("units", "")).strip().lower()
    finite = vals.values[np.isfinite(vals.values)]
    lo, hi = (float(finite.min()), float(finite.max())) if finite.size else (0.0, 0.0)
    if units in PERCENT_UNITS:
        scale, note = 100.0, ", percent (from its units)"
    elif hi > 1.0 + 1e-6:
        scale, note = 100.0, f", read as percent (values up to {hi:g}, units {units!r})"
    else:
        scale, note = 1.0, ""
    if lo < -1e-6 or hi > scale * (1 + 1e-6):
        raise InputError(
            f"{argname}: expected a fraction in 0..1 or a percentage in 0..100, found values "
            f"{lo:g}..{hi:g} in '{da.name}'. Fix: pass a land or ocean fraction, or say it is "
            "relief with kind='relief'."
        )
    return vals / scale, note


def _check_covers(frac: xr.DataArray, like, argname) -> None:
    cov = coverage(like, frac)
    lay = grid_layout(like, argname="winds")
    bad = cov < 0.5
    if bad.any():
        rows, cols = np.nonzero(bad)
        src = grid_layout(frac, argname=argname)
        raise GridError(
            f"{argname}: expected a mask grid that covers the winds, found {int(bad.sum())} of "
            f"{bad.size} wind cells outside it (winds {lay.lat[0]:g}..{lay.lat[-1]:g}N, "
            f"{lay.lon[0]:g}..{lay.lon[-1]:g}E; mask {src.lat[0]:g}..{src.lat[-1]:g}N, "
            f"{src.lon[0]:g}..{src.lon[-1]:g}E; first uncovered cell at "
            f"{lay.lat[rows[0]]:g}N {lay.lon[cols[0]]:g}E). Fix: pass a mask that covers the "
            "winds (a global one, or 'earth'), or cut the winds to the mask's region."
        )
