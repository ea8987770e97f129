"""The whole diagnosis in one call: winds (or stress) to boundary-current transports.

This is what the command line and the first notebook run. It only calls the public functions
of the other modules, in the order of the data path.
"""

from __future__ import annotations

import warnings

import xarray as xr

from . import constants
from .physics.ekman import DEFAULT_EQUATORIAL_HALF_WIDTH, ekman
from .physics.stress import wind_stress
from .physics.sverdrup import sverdrup_transport

__all__ = ["diagnose"]


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


def diagnose(
    winds: xr.Dataset,
    *,
    drag_law="large-pond-1981",
    air_density: float = constants.AIR_DENSITY,
    use_wind_speed: bool = True,
    basins=None,
    ocean_mask=None,
    rho0: float = constants.RHO0,
    equatorial_half_width: float = DEFAULT_EQUATORIAL_HALF_WIDTH,
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
    basins, ocean_mask, rho0, equatorial_half_width
        Passed to :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport` and :func:`~sverdrup_kit.physics.ekman.ekman`.

    Returns
    -------
    xarray.Dataset
        Time-mean stress, curl, Ekman fields and every Sverdrup result, plus, when the input
        has a ``time`` dimension, ``interior_transport_by_time`` (time, basin, lat): the
        Sverdrup interior transport of each time step (the seasonal cycle of a climatology).
        Lazy where the input is.

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
    sv = sverdrup_transport(mean["taux"], mean["tauy"], basins=basins, ocean_mask=ocean_mask, rho0=rho0,
                  equatorial_half_width=equatorial_half_width)
    ek = ekman(mean["taux"], mean["tauy"], rho0=rho0, equatorial_half_width=equatorial_half_width)
    out = xr.merge([mean, ek, sv], compat="override", combine_attrs="drop_conflicts")
    if has_time:
        monthly = sverdrup_transport(stress["taux"], stress["tauy"], basins=basins, ocean_mask=ocean_mask,
                           rho0=rho0, equatorial_half_width=equatorial_half_width)
        out["interior_transport_by_time"] = monthly["interior_transport"].assign_attrs(
            monthly["interior_transport"].attrs,
            long_name="Sverdrup interior transport of each time step",
        )
    out.attrs.update(
        title="Wind-driven circulation diagnosed from a wind climatology",
        drag_law=str(stress.attrs.get("drag_law", stress["taux"].attrs.get("drag_law", "given"))),
        rho0=rho0,
        equatorial_half_width=equatorial_half_width,
        source_winds=str(winds.attrs.get("source", winds.attrs.get("title", "unknown"))),
    )
    return out

