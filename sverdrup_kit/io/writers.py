"""Writing results to CF-compliant NetCDF, whole or not at all."""

from __future__ import annotations

import datetime as _dt
import os
import tempfile
import warnings
from pathlib import Path

import numpy as np
import xarray as xr

__all__ = ["write_netcdf", "open_results", "PURPOSE"]

#: What the results are for, written into every file.
PURPOSE = (
    "Climatological diagnostics of wind-driven circulation for research. Not a forecast or "
    "nowcast of currents; not for navigation or marine operations."
)


def _prepare(ds: xr.Dataset) -> xr.Dataset:
    from .. import __version__

    out = ds.copy()
    for name in list(out.variables):
        if np.issubdtype(out[name].dtype, np.integer) and out[name].dtype.itemsize > 4:
            out[name] = _as_int32(out[name], name)
        if out[name].dtype == bool:
            # NetCDF has no boolean type: store 0/1 and say so the CF way.
            out[name] = out[name].astype("int8").assign_attrs(
                out[name].attrs, flag_values=np.array([0, 1], "int8"), flag_meanings="false true")
        for key, value in list(out[name].attrs.items()):
            if isinstance(value, (bool, np.bool_)):
                out[name].attrs[key] = int(value)
            elif value is None:
                del out[name].attrs[key]
    stamp = _dt.datetime.now(_dt.timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ")
    history = f"{stamp} written by sverdrup_kit {__version__}"
    if "history" in ds.attrs:
        history = f"{history}\n{ds.attrs['history']}"
    out.attrs = {k: (int(v) if isinstance(v, (bool, np.bool_)) else v)
                 for k, v in ds.attrs.items() if v is not None}
    out.attrs.update(Conventions="CF-1.8", history=history, purpose=PURPOSE)
    # CF-1.8 section 2.6.2 asks for a title; name what the file holds when the caller gave none.
    out.attrs.setdefault("title", "sverdrup_kit results: " + ", ".join(map(str, out.data_vars)))
    for name in list(out.data_vars):
        out[name] = out[name].transpose(*_cf_dimension_order(out, out[name].dims))
    for name in out.dims:
        # A time coordinate read without attributes still says what it is (CF-1.8 4.4).
        if name in out.coords and (np.issubdtype(out[name].dtype, np.datetime64)
                                   or _is_cftime(out[name])):
            out[name].attrs = {"standard_name": "time", "axis": "T", **out[name].attrs}
    return _labels_as_auxiliary(out)


def _labels_as_auxiliary(ds: xr.Dataset) -> xr.Dataset:
    """Text labels of a dimension (basin names) as an auxiliary coordinate ``<dim>_name``.

    CF-1.8 (section 1.3) defines coordinate variables as numeric; labels belong in an
    auxiliary coordinate variable (section 6.1). Read back, ``ds.swap_dims(basin="basin_name")``
    selects by name again.
    """
    renames = {}
    for dim in ds.dims:
        if dim in ds.coords and _is_text(ds[dim]) and f"{dim}_name" not in ds.variables:
            renames[dim] = f"{dim}_name"
    return ds.rename_vars(renames) if renames else ds


def _is_text(coord: xr.DataArray) -> bool:
    """Whether a coordinate holds text labels (object arrays also hold cftime dates, which
    are times, not labels: a climatology's year-0 time axis is one)."""
    if coord.dtype.kind in "US":
        return True
    return coord.dtype.kind == "O" and coord.size > 0 and all(
        isinstance(v, str) for v in np.asarray(coord.values).ravel()[:8])


def _is_cftime(var) -> bool:
    """Whether ``var`` holds cftime dates (a climatology's year-0 or year-1 time axis)."""
    if var.dtype.kind != "O" or var.size == 0:
        return False
    first = np.asarray(var.values).ravel()[0]
    return type(first).__module__.split(".")[0] == "cftime"


def _as_int32(var: xr.DataArray, name: str) -> xr.DataArray:
    """64-bit integers as int32: CF-1.8 (section 2.2) has no 64-bit integer type."""
    info = np.iinfo(np.int32)
    if var.size and (int(var.min()) < info.min or int(var.max()) > info.max):
        raise ValueError(
            f"ds: expected the integers of '{name}' to fit in 32 bits (CF-1.8 has no 64-bit "
            f"integer type), found values from {int(var.min())} to {int(var.max())}. Fix: "
            "store them as float64."
        )
    return var.astype(np.int32)


def _axis_of(ds: xr.Dataset, dim: str) -> str | None:
    """T, Z, Y or X for a dimension whose coordinate says so (axis or standard_name), else None."""
    if dim not in ds.coords:
        return None
    if np.issubdtype(ds[dim].dtype, np.datetime64) or _is_cftime(ds[dim]):
        return "T"
    attrs = ds[dim].attrs
    by_name = {"time": "T", "latitude": "Y", "longitude": "X", "depth": "Z", "height": "Z"}
    return attrs.get("axis") or by_name.get(attrs.get("standard_name", ""))


def _cf_dimension_order(ds: xr.Dataset, dims: tuple) -> tuple:
    """Dimensions in the order CF-1.8 (section 2.4) recommends: other dimensions, then T, Z, Y, X."""
    rank = {"T": 1, "Z": 2, "Y": 3, "X": 4}
    return tuple(sorted(dims, key=lambda d: rank.get(_axis_of(ds, d), 0)))


def _compression(var: xr.DataArray) -> dict:
    """zlib with one whole horizontal field per compressed chunk.

    netCDF-C's default chunks span many time steps, so a lazy write of a long record, one dask
    block at a time, recompresses partly filled chunks over and over (benchmarks/streaming.py:
    15.6 s for a year of daily 1-degree fields, 234 s for four years).
    """
    enc = {"zlib": True, "complevel": 4}
    if var.ndim >= 2 and var.size > 0:
        enc["chunksizes"] = (1,) * (var.ndim - 2) + tuple(var.shape[-2:])
    return enc


def write_netcdf(ds: xr.Dataset, path: str | os.PathLike, *, compute: bool = True):
    """Write ``ds`` to ``path`` as CF-1.8 NetCDF-4, atomically.

    The file is written under a temporary name in the same folder and renamed into place only
    when complete, so a failure never leaves a half-written file. Global attributes record the
    conventions, the history and what the results are for. ``ds`` is not modified.

    Parameters
    ----------
    ds : xarray.Dataset
        Results; dask-backed variables are computed while writing.
    path : str or path-like
        Destination ``.nc`` file; its folder must exist.
    compute : bool, optional
        Passed to :meth:`xarray.Dataset.to_netcdf`; must be True for the atomic rename.
    """
    if not isinstance(ds, xr.Dataset):
        raise TypeError(
            f"ds: expected an xarray.Dataset, found {type(ds).__name__}. Fix: wrap a DataArray "
            "with da.to_dataset()."
        )
    path = Path(path)
    if not path.parent.is_dir():
        raise FileNotFoundError(
            f"path: expected a file in an existing folder, found that '{path.parent}' does not "
            f"exist. Fix: create it first, e.g. os.makedirs('{path.parent}')."
        )
    if not compute:
        raise ValueError("compute: must be True; an atomic write needs the data now.")
    out = _prepare(ds)
    encoding = {
        name: _compression(var)
        for name, var in out.data_vars.items()
        if np.issubdtype(var.dtype, np.number)
    }
    # CF-1.8 section 2.5.1: coordinate variables hold no missing values, so no _FillValue.
    for name in out.dims:
        if name in out.coords:
            encoding.setdefault(name, {})["_FillValue"] = None
    for name, var in out.variables.items():
        if np.issubdtype(var.dtype, np.datetime64) or _is_cftime(var):
            # xarray would store whole-day times as int64, which CF-1.8 (section 2.2) lacks.
            encoding.setdefault(name, {})["dtype"] = "float64"
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".part", dir=path.parent)
    os.close(fd)
    try:
        out.to_netcdf(tmp, format="NETCDF4", encoding=encoding)
        # mkstemp creates the file private; give it the permissions a plain open() would.
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.remove(tmp)
        raise
    return path


def open_results(path: str | os.PathLike, **kwargs) -> xr.Dataset:
    """Open a results file written by :func:`write_netcdf` with its labels back in place.

    On disk, text labels of a dimension (basin names) are the auxiliary coordinate
    ``<dim>_name`` (CF coordinate variables are numeric); here they become the dimension's
    coordinate again, so that ``ds.interior_transport.sel(basin="atlantic")`` works as on the
    result that was written. Other keyword arguments go to :func:`xarray.open_dataset`.

    Examples
    --------
    >>> ds = open_results("results.nc")  # doctest: +SKIP
    >>> ds.interior_transport.sel(basin="atlantic").sel(lat=26.5, method="nearest")  # doctest: +SKIP
    """
    with warnings.catch_warnings():
        # A climatology's placeholder years (0 or 1) fall before the Gregorian reform:
        # xarray then decodes time with cftime, as it should, and says so each time.
        warnings.filterwarnings("ignore", message="Unable to decode time axis",
                                category=xr.SerializationWarning)
        ds = xr.open_dataset(path, **kwargs)
        for name in list(ds.coords):
            dim = name[:-5] if name.endswith("_name") else None
            if dim and ds[name].dims == (dim,) and dim not in ds.coords:
                ds = ds.swap_dims({dim: name}).rename({name: dim})
    return ds

