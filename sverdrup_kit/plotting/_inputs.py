"""What the figure functions accept: picking variables, time reduction, grids, masks, flags.

Every figure reads its data through these helpers, so that any latitude order, longitude
convention and CF-flagged ``row_status`` is understood the same way on every figure.
"""

from __future__ import annotations

import warnings
from contextlib import contextmanager

import numpy as np
import xarray as xr

from .. import _validate
from ..geometry.coords import grid_layout, matching_positions, require_dataarray, to_canonical


def pick(data, names: tuple[str, ...], argname: str) -> xr.DataArray:
    if isinstance(data, xr.Dataset):
        for n in names:
            if n in data:
                return data[n]
        raise KeyError(
            f"{argname}: expected a Dataset with one of {list(names)}, found variables "
            f"{list(data.data_vars)}. Fix: pass the DataArray itself or the output of the "
            "matching sverdrup_kit function."
        )
    return require_dataarray(data, argname)


def reduce_time(da: xr.DataArray, time, argname: str) -> xr.DataArray:
    if "time" not in da.dims:
        return da
    if isinstance(time, str) and time == "mean":
        # A row of all-land cells averages to NaN: that is the map's land, not news.
        with np.errstate(invalid="ignore"), quiet_mean():
            return da.mean("time", keep_attrs=True)
    if isinstance(time, (int, np.integer)):
        return da.isel(time=int(time))
    raise ValueError(
        f"time: expected 'mean' or an integer position along 'time' for {argname}, found "
        f"{time!r}. Fix: pass time='mean' or time=0."
    )


@contextmanager
def quiet_mean():
    """Silence the 'Mean of empty slice' warning of all-missing columns, and only that."""
    with warnings.catch_warnings():
        warnings.filterwarnings("ignore", message="Mean of empty slice", category=RuntimeWarning)
        yield


def _display_index(grid, d, lat=None):
    """Display grid of ``d`` degrees (rows at ``lat`` when given): its latitudes, longitudes,
    and for each display cell the nearest model cell (flat index) or -1 farther than ``d``
    from every model cell."""
    from ..geometry.curvilinear import _unit

    lat = np.arange(-90.0 + d / 2, 90.0, d) if lat is None else np.asarray(lat, float)
    lon = np.arange(d / 2, 360.0, d)
    la, lo = np.meshgrid(lat, lon, indexing="ij")
    dist, idx = grid._tree.query(_unit(la.ravel(), lo.ravel()))
    return lat, lon, np.where(dist <= np.deg2rad(d), idx, -1).reshape(la.shape)


def _resampled(da, dims, lat, lon, idx):
    lead = [x for x in da.dims if x not in dims]
    vals = np.asarray(da.transpose(*lead, *dims).values)
    flat = vals.reshape(vals.shape[:-2] + (-1,))
    fill = np.nan if flat.dtype.kind == "f" else (-1 if flat.dtype.kind in "iu" else 0)
    out = np.where(idx >= 0, flat[..., np.maximum(idx, 0)], fill)
    coords = {k: da[k] for k in lead if k in da.coords}
    coords.update(lat=("lat", lat, {"units": "degrees_north", "standard_name": "latitude"}),
                  lon=("lon", lon, {"units": "degrees_east", "standard_name": "longitude"}))
    return xr.DataArray(out, dims=(*lead, "lat", "lon"), coords=coords, attrs=dict(da.attrs),
                        name=da.name)


def on_display_grid(data):
    """``data`` (DataArray or Dataset) itself on a latitude-longitude grid; fields on a model
    grid (two-dimensional latitude and longitude) sampled onto a regular display grid, each
    display cell taking the value of the nearest model cell within one spacing (missing
    farther away: outside the model's domain). The spacing is the result's band width when
    it has one (so that the display latitudes are its bands') or the model's nominal spacing.
    For display only: every number is computed on the model's own cells."""
    from ..geometry.curvilinear import CurvilinearGrid, find_curvilinear_coords

    fields = [data] if isinstance(data, xr.DataArray) else list(data.data_vars.values())
    model = [f for f in fields if find_curvilinear_coords(f) is not None]
    if not model:
        return data
    grid = CurvilinearGrid.from_data(model[0])
    names = find_curvilinear_coords(model[0])
    dims = model[0][names[0]].dims
    d = float(data.attrs.get("band_width_deg", grid.nominal_spacing))
    bands = None
    if isinstance(data, xr.Dataset) and "lat" in data.coords and data["lat"].ndim == 1:
        bands = data["lat"].values  # the result's bands: one latitude axis for all
    lat, lon, idx = _display_index(grid, d, bands)

    if isinstance(data, xr.DataArray):
        return _resampled(data, dims, lat, lon, idx)
    out = {}
    for name, f in data.data_vars.items():
        if set(dims) <= set(f.dims):
            out[name] = _resampled(f.drop_vars(names, errors="ignore"), dims, lat, lon, idx)
        else:
            out[name] = f
    return xr.Dataset(out, attrs=dict(data.attrs))


def canonical_2d(da: xr.DataArray, argname: str):
    """(lat, lon, values, periodic) on ascending latitude and increasing longitude; a field on
    a model grid is shown on a regular display grid (:func:`on_display_grid`)."""
    da = on_display_grid(da)
    lay = grid_layout(da, argname=argname)
    others = [d for d in da.dims if d not in (lay.lat_name, lay.lon_name)]
    if others:
        raise ValueError(
            f"{argname}: expected a (lat, lon) field for a map, found extra dimensions "
            f"{others}. Fix: select one, e.g. {argname}.isel({others[0]}=0), or average it."
        )
    c = to_canonical(da, lay).transpose(lay.lat_name, lay.lon_name)
    return lay.lat, lay.lon, np.asarray(c.values, dtype=np.float64), lay.periodic


def mask_like(mask: xr.DataArray, lat: np.ndarray, lon: np.ndarray, argname: str):
    """Boolean (lat, lon) array of ``mask`` (booleans or 0/1) on a field's canonical grid.

    The mask may use another latitude order or longitude convention; its cells must be the
    field's cells.
    """
    mask = on_display_grid(mask)
    ml = grid_layout(mask, argname=argname)
    m = to_canonical(mask, ml).transpose(ml.lat_name, ml.lon_name).values
    same_lat = ml.lat.shape == lat.shape and np.allclose(ml.lat, lat, atol=1e-6)
    cols = matching_positions(ml.lon, lon, 360.0)
    if not same_lat or cols is None:
        raise ValueError(
            f"{argname}: expected the grid of the data ({lat.size} x {lon.size}), found "
            f"{ml.lat.size} x {ml.lon.size} with other latitudes or longitudes. Fix: pass the "
            "mask of the same grid, e.g. ds['ocean_mask']."
        )
    return _validate.mask(m, argname)[:, cols]


def status_info(ds: xr.Dataset):
    """row_status values, meanings and legend names from its CF flag attributes."""
    st = ds["row_status"]
    values = np.atleast_1d(st.attrs.get("flag_values", []))
    meanings = str(st.attrs.get("flag_meanings", "")).split()
    if len(values) != len(meanings) or not meanings:
        raise ValueError(
            "row_status: expected CF attributes flag_values and flag_meanings of equal length, "
            f"found {list(values)} and {meanings}. Fix: pass the Dataset from "
            "sverdrup_kit.physics.sverdrup unchanged."
        )
    return {int(v): m for v, m in zip(values, meanings)}


def basin_names(ds: xr.Dataset) -> list[str]:
    return [str(b) for b in ds["basin"].values]


def choose_basins(field: xr.DataArray, basins) -> list[str]:
    """The basins a figure draws: ``basins`` checked against the names along ``field``'s
    ``basin`` dimension, or every basin with at least one value (a basin with no valid row,
    such as a circumpolar channel, would be an empty panel)."""
    names = [str(b) for b in field["basin"].values]
    if basins is None:
        has = field.notnull().any([d for d in field.dims if d != "basin"]).values
        chosen = [n for n, ok in zip(names, has) if ok]
    else:
        chosen = [str(b) for b in basins]
    unknown = [b for b in chosen if b not in names]
    if unknown or not chosen:
        raise ValueError(f"basins: expected names among {names}, found {chosen}. "
                         "Fix: pass some of those names or None for all.")
    return chosen


def runs(flags: np.ndarray):
    """Start and end indices of runs of True."""
    padded = np.concatenate([[False], flags, [False]])
    d = np.diff(padded.astype(int))
    return list(zip(np.flatnonzero(d == 1), np.flatnonzero(d == -1) - 1))


def equatorial_half_width_of(obj, given) -> float:
    if given is not None:
        return float(given)
    for attrs in (obj.attrs, *(v.attrs for v in getattr(obj, "data_vars", {}).values())):
        if "equatorial_half_width" in attrs:
            try:
                return float(attrs["equatorial_half_width"])
            except (TypeError, ValueError):
                continue
    return 3.0


def ocean_of(ds: xr.Dataset) -> xr.DataArray | None:
    """The ocean of a result Dataset, from the variables that have values on all of it."""
    if "ocean_mask" in ds:
        return ds["ocean_mask"]
    for name in ("wind_stress_curl", "taux"):
        if name in ds:
            c = ds[name]
            c = c.notnull().any("time") if "time" in c.dims else c.notnull()
            return c.astype(np.int8)
    if "basin_id" in ds:
        return (ds["basin_id"] >= 0).astype(np.int8)
    return None


def ocean_across_band(da: xr.DataArray, band: float) -> xr.DataArray:
    """Ocean mask of a field left empty in the equatorial band: a band cell is ocean when the
    rows just outside the band are ocean at its longitude on both sides."""
    lay = grid_layout(da, argname="data")
    c = to_canonical(da, lay).transpose(lay.lat_name, lay.lon_name)
    ocean = np.isfinite(c.values)
    inside = np.abs(lay.lat) < band
    north = np.flatnonzero(lay.lat >= band)
    south = np.flatnonzero(lay.lat <= -band)
    if inside.any() and north.size and south.size:
        ocean[inside] |= (ocean[north[0]] & ocean[south[-1]])[None, :]
    return xr.DataArray(ocean.astype(np.int8), dims=(lay.lat_name, lay.lon_name),
                        coords={lay.lat_name: lay.lat, lay.lon_name: lay.lon})


def aligned_and(canon: xr.DataArray, other: xr.DataArray) -> xr.DataArray:
    """``canon`` (on the canonical grid) and ``other`` (any order), on the canonical grid."""
    lat_name, lon_name = canon.dims
    o = mask_like(other.astype(float), canon[lat_name].values, canon[lon_name].values,
                   "ocean_mask")
    return canon.copy(data=((canon.values > 0) & o).astype(np.int8))
