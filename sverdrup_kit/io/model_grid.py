"""Reading winds and stress on curvilinear ocean-model grids (2-D latitude and longitude).

:func:`~sverdrup_kit.open_winds` and :func:`~sverdrup_kit.open_stress` come here when the
chosen variables carry two-dimensional latitude and longitude coordinates. Such fields keep the
model's own grid and dimension names (nothing is regridded: the coasts the method depends on
stay where the model has them); units, fill values and time are normalised as on regular grids.
Cell bounds named by the coordinates' CF ``bounds`` attributes are kept in the Dataset as
``lat_bounds`` and ``lon_bounds`` so that
:meth:`~sverdrup_kit.geometry.curvilinear.CurvilinearGrid.from_data` finds the corners.

Vector components along the grid lines (CF ``x_wind``/``y_wind``,
``surface_downward_x_stress``/``..._y_stress``, or a ``grid_relative`` attribute) are rotated to
eastward and northward with the file's angle variable (``angle``, ``ANGLE``, ``anglet``,
``rotation_angle``; radians or degrees by its units) or, without one, the angle computed from
the coordinates.
"""

from __future__ import annotations

import warnings

import numpy as np
import xarray as xr

from ..errors import GridError, TimeDecodingWarning
from ..geometry.curvilinear import CurvilinearGrid, find_curvilinear_coords
from .units import KIND, si_factor

ANGLE_NAMES = ("angle", "anglet", "angle_t", "rotation_angle", "angle_dx")
GRID_RELATIVE_NAMES = ("x_wind", "y_wind", "surface_downward_x_stress",
                       "surface_downward_y_stress")


def on_model_grid(da: xr.DataArray) -> bool:
    """Whether ``da`` has two-dimensional latitude and longitude coordinates."""
    return find_curvilinear_coords(da) is not None


def _grid_relative(da) -> bool:
    std = str(da.attrs.get("standard_name", "")).strip().lower()
    return std in GRID_RELATIVE_NAMES or bool(da.attrs.get("grid_relative", False))


def _angle(ds, grid):
    for name in list(ds.variables):
        if name.lower() in ANGLE_NAMES and ds[name].ndim == 2:
            a = np.asarray(ds[name].values, dtype=np.float64)
            units = str(ds[name].attrs.get("units", "radians")).lower()
            return (np.deg2rad(a) if units.startswith("deg") else a), f"variable '{name}'"
    return grid.angle, "computed from the coordinates"


def assemble_on_model_grid(picked, fields, func, described, ds, warned) -> xr.Dataset:
    """The Dataset :func:`open_winds`/:func:`open_stress` return for a model-grid source."""
    from . import readers

    steps: list[str] = []
    first = fields[0].key
    la, lo = find_curvilinear_coords(picked[first][1], argname=func)
    outs = {}
    for field in fields:
        if field.key not in picked:
            continue
        name, da = picked[field.key]
        argname = f"{func}: {field.key} (variable '{name}')"
        if find_curvilinear_coords(da) != (la, lo):
            raise GridError(
                f"{argname}: expected the same 2-D coordinates as '{picked[first][0]}' "
                f"({la}, {lo}), found {find_curvilinear_coords(da)}. Fix: pick components "
                "on the same grid points (a C-grid's u and v points differ: average them to "
                "the cell centres first)."
            )
        units = da.attrs.get("units")
        factor = si_factor(units, field.kind, argname=argname)
        out = readers._unmask(da, steps, field.out) * factor
        steps.append(f"{field.out}: from variable '{name}' in '{units}' -> "
                     f"'{KIND[field.kind][1]}'")
        time = readers._time_name(out)
        if time is not None and time != "time":
            out = out.rename({time: "time"})
        out = out.rename(field.out)
        out.attrs = {"standard_name": field.standard_name, "long_name": field.long_name,
                     "units": KIND[field.kind][1], "source_variable": name}
        out.encoding = {}
        outs[field.key] = (out, _grid_relative(da))
    keys = [f.key for f in fields if f.key in outs]
    grid = CurvilinearGrid.from_data(outs[first][0], argname=func)
    ux, uy = keys[0], keys[1]
    if outs[ux][1] or outs[uy][1]:
        angle, how = _angle(ds, grid)
        a = xr.DataArray(angle, dims=grid.dims)
        x, y = outs[ux][0], outs[uy][0]
        c, s = np.cos(a), np.sin(a)
        east, north = x * c - y * s, x * s + y * c
        outs[ux] = (east.assign_attrs(x.attrs).rename(x.name), False)
        outs[uy] = (north.assign_attrs(y.attrs).rename(y.name), False)
        steps.append(f"components along the grid lines rotated to eastward/northward with the "
                     f"angle {how}")
    out_names = {f.key: f.out for f in fields}
    result = xr.Dataset({out_names[k]: outs[k][0] for k in keys})
    for bname, coord in (("lat_bounds", la), ("lon_bounds", lo)):
        src = ds[coord].attrs.get("bounds") if coord in ds.variables else None
        if src and src in ds.variables:
            result[bname] = ds[src].variable.copy()
            result[coord].attrs["bounds"] = bname
    if warned:
        steps.append(warned[0][1])
        warnings.warn(warned[0][0], TimeDecodingWarning, stacklevel=4)
    attrs = {k: v for k, v in ds.attrs.items() if k not in ("input", "normalisation")}
    history = f"sverdrup_kit.{func}({described})"
    attrs["history"] = f"{attrs['history']}\n{history}" if attrs.get("history") else history
    attrs["input"] = described
    attrs["normalisation"] = "; ".join(steps) + (
        f"; model grid kept ({grid.shape[0]} x {grid.shape[1]}, corners from "
        f"{'bounds' if 'lat_bounds' in result else 'centres'})")
    result.attrs = attrs
    return result
