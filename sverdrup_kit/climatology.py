r"""Records to climatologies: monthly or seasonal means over the years, and anomalies from them.

Lazy: on dask-backed input nothing is computed until the result is; each function only builds
the graph (group-by reductions along ``time``).
"""

from __future__ import annotations

import numpy as np
import xarray as xr

from .errors import InputError

__all__ = ["SEASONS", "anomalies", "climatology"]

#: Meteorological seasons in calendar order (December counted with the following winter).
SEASONS = ("DJF", "MAM", "JJA", "SON")
PERIODS = ("month", "season")


def _check(obj, period, func):
    if not isinstance(obj, (xr.Dataset, xr.DataArray)):
        raise TypeError(
            f"{func}: data: expected an xarray.Dataset or DataArray with a time dimension, found "
            f"{type(obj).__name__}. Fix: open the record with sverdrup_kit.open_winds."
        )
    if period not in PERIODS:
        raise InputError(
            f"{func}: period: expected one of {PERIODS}, found {period!r}. Fix: e.g. "
            "period='month'."
        )
    if "time" not in obj.dims:
        raise InputError(
            f"{func}: data: expected a 'time' dimension, found dimensions {tuple(obj.dims)}. "
            "Fix: open the record with sverdrup_kit.open_winds, which names it 'time'."
        )
    decoded = obj["time"].dtype.kind == "M" or obj["time"].dtype == object
    if not decoded and "month" not in obj.coords:
        raise InputError(
            f"{func}: data: expected a decoded time coordinate (dates), found raw values of "
            f"dtype {obj['time'].dtype} and no 'month' coordinate. Fix: give the time variable "
            "CF units and a calendar, or assign a 'month' coordinate (1..12) along time."
        )
    if period == "season" and not decoded:
        raise InputError(
            f"{func}: period: 'season' needs decoded dates, found an undecoded time axis with a "
            "'month' coordinate only. Fix: use period='month', or decode the time axis."
        )
    return decoded


def _month_key(obj, decoded):
    return obj["time"].dt.month if decoded else obj["month"]


def climatology(data, *, period: str = "month"):
    r"""Mean annual cycle of a record: the mean of each calendar month or season over the years.

    Parameters
    ----------
    data : xarray.Dataset or xarray.DataArray (..., time, ...)
        A record with a decoded ``time`` coordinate (or an undecoded one with a ``month``
        coordinate, as :func:`~sverdrup_kit.open_winds` gives for 12-step climatologies),
        e.g. several years of monthly winds. Lazy input stays lazy.
    period : {"month", "season"}, optional
        ``"month"``: dimension ``month`` (1..12), the plain mean of each calendar month over
        the years. ``"season"``: dimension ``season`` (DJF, MAM, JJA, SON), each time step
        weighted by its number of days (the month length of its calendar), so that a season of
        monthly means is the mean over its days.

    Returns
    -------
    Same type as ``data``
        ``time`` replaced by ``month`` or ``season``; missing values are skipped. Attributes
        kept, with ``cell_methods`` and ``climatology_period`` (first and last time) added.

    Notes
    -----
    Seasonal mean of monthly means :math:`x_m` with month lengths :math:`d_m`:

    .. math:: \bar x_S = \frac{\sum_{m \in S} d_m x_m}{\sum_{m \in S} d_m}.

    December is grouped with the January and February of the same record year (calendar
    grouping), the usual practice for climatologies (common practice).

    Examples
    --------
    >>> import numpy as np, pandas as pd, xarray as xr
    >>> t = pd.date_range("2001-01-01", periods=24, freq="MS")
    >>> x = xr.DataArray(np.tile(np.arange(12.0), 2), coords={"time": t}, dims="time")
    >>> climatology(x).values[:3]
    array([0., 1., 2.])
    """
    decoded = _check(data, period, "climatology")
    span = _span(data, decoded)
    if period == "month":
        key = _month_key(data, decoded).rename("month")
        out = data.groupby(key).mean("time", keep_attrs=True)
        method = "time: mean within months time: mean over years"
    elif isinstance(data, xr.Dataset):
        out = data.map(lambda v: climatology(v, period="season") if "time" in v.dims else v,
                       keep_attrs=True)
        return out.assign_attrs(data.attrs)
    else:
        days = data["time"].dt.days_in_month.astype(np.float64)
        season = data["time"].dt.season.rename("season")
        num = (data * days).groupby(season).sum("time", min_count=1)
        den = days.where(data.notnull()).groupby(season).sum("time")
        out = (num / den).assign_attrs(data.attrs)
        out = out.sel(season=[s for s in SEASONS if s in out["season"].values])
        method = "time: mean within seasons (weighted by days) time: mean over years"
    return _stamp(out, method, span)


def anomalies(data, clim=None, *, period: str = "month"):
    """Departures of a record from its (or a given) monthly or seasonal climatology.

    Parameters
    ----------
    data : xarray.Dataset or xarray.DataArray (..., time, ...)
        The record, as in :func:`climatology`.
    clim : same type, optional
        The climatology to subtract (dimension ``month`` or ``season``); by default that of
        ``data`` itself.
    period : {"month", "season"}, optional
        Which climatology, when ``clim`` is not given.

    Returns
    -------
    Same type as ``data``
        On ``data``'s time axis: each step minus the climatology of its month or season.
        Lazy where the input is.

    Examples
    --------
    >>> import numpy as np, pandas as pd, xarray as xr
    >>> t = pd.date_range("2001-01-01", periods=24, freq="MS")
    >>> x = xr.DataArray(np.arange(24.0), coords={"time": t}, dims="time")
    >>> anomalies(x).values[[0, 12]]
    array([-6.,  6.])
    """
    if clim is not None:
        period = "season" if "season" in clim.dims else "month"
    decoded = _check(data, period, "anomalies")
    if clim is None:
        clim = climatology(data, period=period)
    elif period not in clim.dims:
        raise InputError(
            f"anomalies: clim: expected a climatology with a 'month' or 'season' dimension, "
            f"found dimensions {tuple(clim.dims)}. Fix: make it with sverdrup_kit.climatology."
        )
    key = (_month_key(data, decoded).rename("month") if period == "month"
           else data["time"].dt.season.rename("season"))
    out = (data.groupby(key) - clim).drop_vars(period, errors="ignore")
    if isinstance(out, xr.DataArray):
        out = out.assign_attrs(data.attrs)
        out.attrs["long_name"] = f"anomaly of {data.attrs.get('long_name', data.name or 'data')}"
    else:
        out = out.assign_attrs(data.attrs)
    out.attrs["comment"] = f"departure from the {period}ly climatology"
    return out


def _span(data, decoded) -> str:
    if not decoded or data.sizes["time"] == 0:
        return "undecoded time axis"
    t = data["time"].values
    return f"{str(t[0])[:10]} to {str(t[-1])[:10]}"


def _stamp(out, method, span):
    stamp = {"cell_methods": method, "climatology_period": span}
    if isinstance(out, xr.DataArray):
        out.attrs = {**out.attrs, **stamp}
        return out
    for name in out.data_vars:
        if "month" in out[name].dims or "season" in out[name].dims:
            out[name].attrs = {**out[name].attrs, **stamp}
    return out
