"""The whole diagnosis in one call: winds (or stress) to boundary-current transports.

This is what the command line and the first notebook run. It only calls the public functions
of the other modules, in the order of the data path.
"""

from __future__ import annotations

import warnings

import numpy as np
import xarray as xr

from . import constants
from .errors import BuiltinOceanMaskWarning, InputError
from .geometry.curvilinear import find_curvilinear_coords, is_curvilinear
from .io import masks as _masks
from .physics.ekman import DEFAULT_EQUATORIAL_HALF_WIDTH, ekman
from .physics.stress import wind_stress
from .physics.adjustment import adjustment_flags, averaging_period, rossby_adjustment
from .physics.model_grid import grid_coords_apart
from .physics.sverdrup import sverdrup_transport

__all__ = ["OPEN_OCEAN_DEPTH", "diagnose", "first_mode_speed_on"]


def _stress_from(winds: xr.Dataset, *, drag_law, air_density, use_wind_speed) -> xr.Dataset:
    if "taux" in winds and "tauy" in winds:
        return winds[["taux", "tauy"]]
    if not ("u" in winds and "v" in winds):
        raise ValueError(
            "winds: expected a Dataset with 'u' and 'v' (from open_winds) or 'taux' and 'tauy' "
            f"(from open_stress), found variables {list(winds.data_vars)}. Fix: open the file "
            "with sverdrup_kit.open_winds or open_stress, or rename the variables."
        )
    speed = winds["wind_speed"] if use_wind_speed and "wind_speed" in winds else None
    return wind_stress(winds["u"], winds["v"], drag_law=drag_law, air_density=air_density, wind_speed=speed)


def _dated(time: xr.DataArray) -> bool:
    """Whether a time coordinate holds dates (undecodable climatology times stay numbers)."""
    v = time.values
    return bool(np.issubdtype(v.dtype, np.datetime64) or (v.dtype == object and v.size and hasattr(
        v[0], "calendar")))


def resolve_ocean_mask(winds: xr.Dataset, ocean_mask=None, *, threshold: float = 0.5,
                       variable: str | None = None, kind: str | None = None):
    """The ocean mask :func:`diagnose` uses for ``winds``, and one line saying where it came from.

    Parameters
    ----------
    winds : xarray.Dataset
        From :func:`~sverdrup_kit.open_winds` or :func:`~sverdrup_kit.open_stress`.
    ocean_mask : None, "earth", "data", path, xarray.Dataset or xarray.DataArray, optional
        ``None`` (automatic): the built-in Earth mask when the grid is global and the first
        time step has no missing values (winds over land), otherwise the data's own missing
        values. ``"earth"``: the built-in Earth mask. ``"data"``: land where the data are
        missing. A path, Dataset or DataArray on another grid: relief, depth, land or ocean
        fraction averaged onto the wind grid (:func:`~sverdrup_kit.io.masks.ocean_mask`). A
        DataArray on the wind grid itself is used as it is (True or 1 for ocean).
    threshold, variable, kind
        Passed to :func:`~sverdrup_kit.io.masks.ocean_mask`.

    Returns
    -------
    mask : xarray.DataArray (lat, lon) of bool, or None
        None when the data's missing values decide.
    note : str
        One line for the user and the ``ocean_mask`` attribute of the result.
    """
    _masks.check_threshold(threshold, "ocean_threshold")
    fields = [n for n in ("u", "v", "taux", "tauy") if n in winds]
    if ocean_mask is None:
        if _masks.is_global(winds) and fields and not _masks.has_missing(winds, fields):
            mask = _masks.ocean_mask("earth", winds, threshold=threshold)
            mask.attrs["note"] = (
                "the winds have no missing values on a global grid (winds over land), so the "
                f"built-in Earth ocean mask was used (ocean fraction >= {threshold:g}, from the "
                "ETOPO5 relief)"
            )
            return mask, mask.attrs["note"] + (
                ". Fix: pass ocean_mask='earth' to choose it and silence this, a mask file of "
                "your own, or ocean_mask='data'."
            )
        return None, "land where the data are missing"
    if isinstance(ocean_mask, str) and ocean_mask.strip().lower() == "data":
        return None, "land where the data are missing"
    if isinstance(ocean_mask, xr.DataArray) and _same_grid(ocean_mask, winds):
        # A mask made here earlier (the command line resolves it first) keeps its story.
        return ocean_mask, str(ocean_mask.attrs.get(
            "note", f"ocean_mask given on the wind grid ('{ocean_mask.name}')"))
    mask = _masks.ocean_mask(ocean_mask, winds, threshold=threshold, variable=variable, kind=kind)
    mask.attrs["note"] = (f"{mask.attrs['source']}; ocean where at least {threshold:g} of a wind "
                          "cell is ocean")
    return mask, mask.attrs["note"]


def _same_grid(mask: xr.DataArray, winds) -> bool:
    from .geometry.coords import find_latlon, matching_positions

    try:
        mlat, mlon = find_latlon(mask, argname="ocean_mask")
        wlat, wlon = find_latlon(winds, argname="winds")
    except ValueError:
        return False
    return (matching_positions(mask[mlat].values, winds[wlat].values) is not None
            and matching_positions(mask[mlon].values, winds[wlon].values, 360.0) is not None)


def _on_grid(mask: xr.DataArray, field: xr.DataArray) -> xr.DataArray:
    """``mask`` with the coordinate names and values of ``field`` (same points, any order)."""
    from .geometry.coords import find_latlon, matching_positions

    mlat, mlon = find_latlon(mask, argname="ocean_mask")
    flat, flon = find_latlon(field, argname="winds")
    ilat = matching_positions(mask[mlat].values, field[flat].values)
    ilon = matching_positions(mask[mlon].values, field[flon].values, 360.0)
    out = mask.isel({mlat: ilat, mlon: ilon})
    out = out.drop_vars([c for c in out.coords if c not in (mlat, mlon)])
    out = out.rename({mlat: "_mlat", mlon: "_mlon"}).rename({"_mlat": flat, "_mlon": flon})
    return out.assign_coords({flat: field[flat].values, flon: field[flon].values})


#: Water columns at least this deep (m) set the first-mode speed of a cell of the stress grid
#: when it has any: over a shelf the flat-bottom first mode is slow (a few tens of cm/s) and a
#: single shelf cell would add decades to a basin's crossing time, while the wave that crosses
#: the basin travels in the deep water off the shelf. Shelves are shallower than about 200-500 m
#: and the open ocean deeper than about 3000 m (common practice); 1000 m also matches the
#: default shelf_depth_m of sverdrup_transport.
OPEN_OCEAN_DEPTH = 1000.0


def first_mode_speed_on(first_mode_speed: xr.DataArray, like, *, column_depth=None,
                        open_ocean_depth: float = OPEN_OCEAN_DEPTH) -> xr.DataArray:
    """First-mode speed of water columns on a grid of their own, on the grid of ``like``.

    Parameters
    ----------
    first_mode_speed : xarray.DataArray (lat, lon)
        :math:`c_1` in m s-1 on a regular latitude-longitude grid, NaN on land (e.g. from
        :func:`~sverdrup_kit.physics.adjustment.first_mode_speed_from_ts`).
    like : xarray.Dataset or xarray.DataArray
        Anything with the target grid (the winds or the stress).
    column_depth : xarray.DataArray (lat, lon), optional
        Depth in m of each water column of ``first_mode_speed`` (its deepest level with data,
        as ``column_depth`` of :func:`~sverdrup_kit.ocean.hydrography.open_ts_climatology`).
        When given, a target cell takes the mean over its columns at least
        ``open_ocean_depth`` deep; a cell with none takes the value of the nearest such cells
        through the ocean (mean of face neighbours, pass after pass), and a cell of a sea with
        no deep column at all the mean of all its columns.
    open_ocean_depth : float, optional
        m, see :data:`OPEN_OCEAN_DEPTH`.

    Returns
    -------
    xarray.DataArray (lat, lon)
        ``first_mode_gravity_wave_speed`` in m s-1 on the grid, order and coordinates of
        ``like``; NaN where no column lies under a cell. The ``source`` attribute of the
        input, with the method added.

    Notes
    -----
    Each average is the area-weighted mean over the overlap of target and source cells
    (first-order conservative remapping, Jones 1999, Mon. Weather Rev. 127, 2204-2210;
    :func:`~sverdrup_kit.geometry.regrid.area_weighted_average`), over columns with data.
    """
    from ._compiled.dispatch import fill_from_neighbours
    from .geometry.regrid import area_weighted_average

    c1 = first_mode_speed
    source = str(c1.attrs.get("source", "first-mode speed field as given"))
    every = area_weighted_average(c1, like, min_coverage=1e-9, argname="first_mode_speed")
    if column_depth is None:
        return every.assign_attrs(source=source + "; averaged by area onto the stress grid")
    deep = area_weighted_average(c1.where(column_depth >= open_ocean_depth), like,
                                 min_coverage=1e-9, argname="first_mode_speed")
    every_v = np.asarray(every.values, dtype=np.float64)
    filled = fill_from_neighbours(np.asarray(deep.values, dtype=np.float64),
                                  target=np.isfinite(every_v), periodic=_masks.is_global(like))
    out = every.copy(data=np.where(np.isfinite(filled), filled, every_v))
    return out.assign_attrs(
        source=source + f"; averaged by area onto the stress grid over columns at least "
        f"{open_ocean_depth:g} m deep, cells over shallower water filled from the nearest deep "
        "ones")


def _first_mode_on(first_mode_speed, like: xr.DataArray):
    """c1 for rossby_adjustment on the grid of ``like``, and one line saying where it came from."""
    from .physics.adjustment import DEFAULT_STRATIFICATION

    if first_mode_speed is None:
        d = DEFAULT_STRATIFICATION
        return None, (f"default stratification: N = {d['n0']:g} s-1 exp(-depth / "
                      f"{d['e_folding_depth']:g} m), flat bottom at {d['bottom_depth']:g} m "
                      "(Garrett & Munk 1972), the same in every column")
    if not isinstance(first_mode_speed, xr.DataArray):
        return first_mode_speed, f"constant first-mode speed {first_mode_speed!r} m s-1"
    if not _same_grid(first_mode_speed, like):
        first_mode_speed = first_mode_speed_on(first_mode_speed, like)
    return first_mode_speed, str(first_mode_speed.attrs.get("source",
                                                             "first-mode speed field as given"))


def diagnose(
    winds: xr.Dataset,
    *,
    drag_law="large-pond-1981",
    air_density: float = constants.AIR_DENSITY,
    use_wind_speed: bool = True,
    basins=None,
    ocean_mask=None,
    ocean_threshold: float = 0.5,
    ocean_mask_variable: str | None = None,
    rho0: float = constants.RHO0,
    equatorial_half_width: float = DEFAULT_EQUATORIAL_HALF_WIDTH,
    first_mode_speed=None,
    relief=None,
    shelf_depth_m: float = 1000.0,
) -> xr.Dataset:
    """Run the data path on a wind (or stress) climatology.

    Parameters
    ----------
    winds : xarray.Dataset
        From :func:`~sverdrup_kit.open_winds` (``u``, ``v``, optionally ``wind_speed``) or
        :func:`~sverdrup_kit.open_stress` (``taux``, ``tauy``), with or without ``time``.
    drag_law, air_density
        Passed to :func:`~sverdrup_kit.physics.stress.wind_stress` (ignored when stress is given).
    use_wind_speed : bool, optional
        Use the scalar-mean ``wind_speed`` in the bulk formula when the data carry it (the
        better choice for monthly climatologies).
    ocean_mask : None, "earth", "data", path, xarray.Dataset or xarray.DataArray, optional
        Where the ocean is (see :func:`resolve_ocean_mask`). By default a global product with
        winds over land (no missing values) gets the built-in Earth mask, with a
        :class:`~sverdrup_kit.errors.BuiltinOceanMaskWarning` saying so; otherwise land is
        where the data are missing. Winds (or stress) over land are set missing before the
        stress, curl and Ekman fields are computed, as if masked by hand.
    ocean_threshold : float, optional
        A wind cell is ocean when at least this fraction of it is ocean (0..1], for masks
        given as relief or fractions on another grid, and for the built-in one.
    ocean_mask_variable : str, optional
        The mask's variable in a file that holds several.
    basins, rho0, equatorial_half_width
        Passed to :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport` and :func:`~sverdrup_kit.physics.ekman.ekman`.
    first_mode_speed : None, float or xarray.DataArray (lat, lon), optional
        First baroclinic gravity-wave speed in m s-1 for the Rossby-wave adjustment times,
        passed to :func:`~sverdrup_kit.physics.adjustment.rossby_adjustment` (default: its
        documented default stratification). A field on a regular grid of its own (e.g.
        :func:`~sverdrup_kit.physics.adjustment.first_mode_speed_from_ts` of a T/S
        climatology) is averaged by area onto the stress grid over the cells where it has
        values; its ``source`` attribute, when set, is named in the ``stratification``
        attribute of the result.
    relief, shelf_depth_m
        Passed to :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport`: rows whose
        counted ocean is mostly shallower than ``shelf_depth_m`` (m) get the caution
        ``over_shelf`` (row_status 9). ``relief`` is a surface height in m on the stress grid
        or on a regular grid of its own (:func:`~sverdrup_kit.io.masks.relief_field` reads
        one from a file).

    Returns
    -------
    xarray.Dataset
        Time-mean stress, curl, Ekman fields and every Sverdrup result, plus, when the input
        has a ``time`` dimension, ``interior_transport_by_time`` (time, basin, lat): the
        Sverdrup interior transport of each time step (the seasonal cycle of a climatology).
        The Rossby-wave adjustment of :func:`~sverdrup_kit.physics.adjustment.rossby_adjustment`
        (``basin_crossing_time`` and the fields beside it) and ``sverdrup_adjusted``
        (time_scale, basin, lat) from :func:`~sverdrup_kit.physics.adjustment.adjustment_flags`:
        whether each row had time to adjust at the monthly, seasonal and annual scales (and
        the record length when the record is longer than a year); the scale of the input's
        own steps is named in the ``adjustment_time_scale`` attribute of
        ``interior_transport_by_time``. Lazy where the input is.

    Notes
    -----
    The Sverdrup and Ekman balances are linear in the stress, so the diagnosis of the
    time-mean stress equals the time mean of the diagnoses. The stress itself is quadratic in
    the wind: it is computed for each time step before averaging.
    """
    if not isinstance(winds, xr.Dataset):
        raise TypeError(
            f"winds: expected an xarray.Dataset, found {type(winds).__name__}. Fix: open the "
            "file with sverdrup_kit.open_winds(path)."
        )
    mask, note = resolve_ocean_mask(winds, ocean_mask, threshold=ocean_threshold,
                                    variable=ocean_mask_variable)
    if mask is not None and ocean_mask is None:
        warnings.warn(note, BuiltinOceanMaskWarning, stacklevel=2)
    if mask is not None:
        # Mask the inputs, not only the transport: the curl next to a coast must not see the
        # stress of winds over land.
        keep = mask if mask.dtype == bool else mask.fillna(0) != 0
        winds = winds.copy()
        for name in [n for n in ("u", "v", "wind_speed", "taux", "tauy") if n in winds]:
            winds[name] = winds[name].where(_on_grid(keep, winds[name]))
    ocean_mask = mask
    stress = _stress_from(winds, drag_law=drag_law, air_density=air_density, use_wind_speed=use_wind_speed)
    has_time = "time" in stress.dims
    with warnings.catch_warnings():
        # A mean of a few all-land columns is NaN by design; that is not news to the user.
        warnings.simplefilter("ignore", RuntimeWarning)
        mean = stress.mean("time", keep_attrs=True) if has_time else stress
    if has_time:
        # Land is where every time step is missing; a cell observed in some months only (a
        # ship-based climatology's gaps) is averaged over the months it has.
        # No cell_methods "time: mean": CF-1.8 (section 7.3) wants its name to be a dimension or
        # a scalar coordinate of the variable, and the mean has neither (the file's time
        # dimension belongs to interior_transport_by_time). The comment says it in words.
        for name in ("taux", "tauy"):
            mean[name].attrs.pop("cell_methods", None)
            mean[name].attrs["comment"] = (
                f"mean over the {stress.sizes['time']} time steps of the input, each with data; "
                "cells missing in some steps are averaged over the steps they have"
            )
    shelf = dict(relief=relief, shelf_depth_m=shelf_depth_m)
    sv = sverdrup_transport(mean["taux"], mean["tauy"], basins=basins, ocean_mask=ocean_mask, rho0=rho0,
                  equatorial_half_width=equatorial_half_width, **shelf)
    ek = ekman(mean["taux"], mean["tauy"], rho0=rho0, equatorial_half_width=equatorial_half_width)
    model_grid = is_curvilinear(mean["taux"])
    dated = has_time and stress.sizes["time"] > 1 and _dated(stress["time"])
    if model_grid:
        # The Rossby-wave adjustment follows rows of latitude from coast to coast; model grids
        # have bands of cells instead, and no adjustment is built on them yet.
        if first_mode_speed is not None:
            raise InputError(
                "first_mode_speed: expected None for winds on a model grid (two-dimensional "
                "latitude and longitude), found a stratification: the Rossby-wave adjustment "
                "is computed on regular latitude-longitude grids only. Fix: drop it (the "
                "command line's --hydrography), or regrid the winds first.")
        stratification = "none: no Rossby-wave adjustment on a model grid"
        # The model grid's latitude and longitude take the names the Sverdrup result gives
        # them, apart from its latitude bands.
        names = find_curvilinear_coords(mean["taux"])
        mean, ek = (grid_coords_apart(x, names) for x in (mean, ek))
        out = xr.merge([mean, ek, sv], compat="override", combine_attrs="drop_conflicts")
    else:
        c1, stratification = _first_mode_on(first_mode_speed, mean["taux"])
        adj = rossby_adjustment(sv, first_mode_speed=c1)
        adj["first_mode_gravity_wave_speed"].attrs["comment"] = stratification
        out = xr.merge([mean, ek, sv, adj], compat="override", combine_attrs="drop_conflicts")
        out["sverdrup_adjusted"] = adjustment_flags(adj["basin_crossing_time"],
                                                    time=stress["time"] if dated else None)
    if has_time:
        monthly = sverdrup_transport(stress["taux"], stress["tauy"], basins=basins, ocean_mask=ocean_mask,
                           rho0=rho0, equatorial_half_width=equatorial_half_width, **shelf)
        out["interior_transport_by_time"] = monthly["interior_transport"].assign_attrs(
            monthly["interior_transport"].attrs,
            long_name="Sverdrup interior transport of each time step",
            **({} if model_grid else {"ancillary_variables": "sverdrup_adjusted"}),
            adjustment_time_scale=averaging_period(stress["time"])[0] if dated else "unknown",
        )
    out.attrs.update(
        title="Wind-driven circulation diagnosed from a wind climatology",
        drag_law=str(stress.attrs.get("drag_law", stress["taux"].attrs.get("drag_law", "given"))),
        rho0=rho0,
        equatorial_half_width=equatorial_half_width,
        source_winds=str(winds.attrs.get("source", winds.attrs.get("title", "unknown"))),
        ocean_mask=note,
        stratification=stratification,
    )
    if relief is not None:
        out.attrs.update(relief=str(relief.attrs.get("source", f"DataArray '{relief.name}'"))
                         if isinstance(relief, xr.DataArray) else "given",
                         shelf_depth_m=float(shelf_depth_m))
    return out

