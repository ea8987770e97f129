"""Figures of the Rossby-wave adjustment: crossing times, adjusted rows, the lagged response.

Same conventions as the other figures (:mod:`sverdrup_kit.plotting.maps`: print widths, fonts
set on each figure, units from the data, rows where the Sverdrup relation is not expected
shaded and named).
"""

from __future__ import annotations

import matplotlib as mpl
import matplotlib.pyplot as plt
import numpy as np
import xarray as xr
from matplotlib import patches as mpatches
from matplotlib import ticker as mticker
from matplotlib import transforms as mtransforms

from ..geometry.coords import require_dataarray
from ._inputs import choose_basins
from ._inputs import runs as _runs
from ._inputs import status_info as _status_info
from ._style import as_display as _as_display
from ._style import figure_width as _figure_width
from ._style import fonts as _fonts
from ._style import latitude_formatter as _lat_formatter
from ._style import rc as _rc
from ._style import shade_row_status as _shade_row_status
from ._style import style_axes as _style

__all__ = ["plot_crossing_time", "plot_lagged_transport", "mark_adjusted_rows"]

DAYS_PER_YEAR = 365.25

#: How the adjustment state of a row is drawn in the strip beside a latitude-time diagram.
_ADJUSTED_STYLE = {
    1: ("adjusted within the time step", "#1b7837", None),
    0: ("not adjusted (Rossby waves still crossing)", "white", "////"),
}


def _need(data, names, argname, fix):
    if not isinstance(data, xr.Dataset) or any(n not in data for n in names):
        found = list(data.data_vars) if isinstance(data, xr.Dataset) else type(data).__name__
        raise TypeError(f"{argname}: expected a Dataset with {', '.join(names)}, found {found}. "
                        f"Fix: {fix}")


def plot_crossing_time(data, *, basins=None, width="column", title=None):
    """Rossby-wave crossing time to the western boundary against latitude, one panel per basin.

    Parameters
    ----------
    data : xarray.Dataset
        From :func:`~sverdrup_kit.pipeline.diagnose` or
        :func:`~sverdrup_kit.physics.adjustment.rossby_adjustment` merged with the Sverdrup
        result: ``basin_crossing_time`` (basin, lat) in days; ``row_status`` (optional) shades
        the rows where the Sverdrup relation is not expected; ``sverdrup_adjusted`` (optional)
        gives the time scales drawn as horizontal lines.
    basins : list of str, optional
        Basins to draw (default: those with a crossing time).
    width : "column", "page" or float
    title : str, optional

    Returns
    -------
    fig, axes (one per basin)

    Notes
    -----
    Crossing times are drawn in years on a logarithmic axis; a row whose crossing time lies
    below a time-scale line has adjusted to Sverdrup balance at that scale (Anderson & Gill
    1975, Deep-Sea Res. 22, 583).
    """
    _need(data, ("basin_crossing_time",), "data",
          "pass the result of sverdrup_kit.diagnose, or merge rossby_adjustment's result.")
    ct = data["basin_crossing_time"] / DAYS_PER_YEAR
    chosen = choose_basins(ct, basins)
    scales = {"monthly": DAYS_PER_YEAR / 12, "seasonal": DAYS_PER_YEAR / 4,
              "annual": DAYS_PER_YEAR}
    if "sverdrup_adjusted" in data and "time_scale_length" in data["sverdrup_adjusted"].coords:
        fl = data["sverdrup_adjusted"]
        scales = dict(zip([str(s) for s in fl["time_scale"].values],
                          np.asarray(fl["time_scale_length"].values, float)))
    meanings = _status_info(data) if "row_status" in data else {}
    lat_dim = [d for d in ct.dims if d != "basin"][0]
    lat = ct[lat_dim].values
    w = _figure_width(width)
    fs = _fonts(w)
    n = len(chosen)
    with mpl.rc_context(_rc(fs)):
        fig, axes = plt.subplots(n, 1, figsize=(w, 0.4 + n * (1.5 + 0.1 * (w - 3.5))),
                                 sharex=True, squeeze=False, layout="constrained")
        axes = axes[:, 0]
        handles = {}
        finite = ct.sel(basin=chosen).values
        finite = finite[np.isfinite(finite) & (finite > 0)]
        lo = min(finite.min() if finite.size else 0.1, min(scales.values()) / DAYS_PER_YEAR)
        hi = max(finite.max() if finite.size else 10.0, max(scales.values()) / DAYS_PER_YEAR)
        dlat = np.median(np.diff(lat)) if lat.size > 1 else 1.0
        span = []
        for ax, name in zip(axes, chosen):
            y = ct.sel(basin=name).values
            if meanings:
                _shade_row_status(ax, lat, data["row_status"].sel(basin=name).values,
                                  meanings, handles)
            (line,) = ax.plot(lat, y, color="#08306b", lw=1.1, zorder=3,
                              label="crossing time to the western boundary")
            handles.setdefault("crossing", line)
            for k, (sname, days) in enumerate(scales.items()):
                ax.axhline(days / DAYS_PER_YEAR, color="0.3", lw=0.6, ls=(0, (4, 2)), zorder=2)
                ax.annotate(f"{sname} ({_duration(days)})", (1.0, days / DAYS_PER_YEAR),
                            xycoords=("axes fraction", "data"), xytext=(-2, 2),
                            textcoords="offset points", ha="right", va="bottom",
                            fontsize=fs["small"] - 1, color="0.25")
            ax.set_yscale("log")
            ax.set_ylim(lo / 1.5, hi * 1.5)
            ax.yaxis.set_major_formatter(mticker.FuncFormatter(
                lambda v, _p: f"{v:g}"))
            ax.set_ylabel("years", fontsize=fs["base"])
            ax.set_title(name, fontsize=fs["base"], loc="left")
            ok = np.isfinite(y)
            if ok.any():
                span.append((lat[ok].min() - dlat, lat[ok].max() + dlat))
            _style(ax, fs)
        if span:
            axes[-1].set_xlim(min(a for a, _ in span), max(b for _, b in span))
        axes[-1].xaxis.set_major_formatter(_lat_formatter())
        axes[-1].set_xlabel("latitude", fontsize=fs["base"])
        fig.legend(handles=list(handles.values()), loc="outside lower center",
                   ncols=min(2, len(handles)), frameon=False, fontsize=fs["small"])
        if title:
            fig.suptitle(title, fontsize=fs["title"])
    return fig, axes


def _duration(days: float) -> str:
    if days < 60:
        return f"{days:.0f} d"
    if days < 2 * DAYS_PER_YEAR:
        return f"{days / (DAYS_PER_YEAR / 12):.0f} mo"
    return f"{days / DAYS_PER_YEAR:.0f} yr"


def mark_adjusted_rows(ax, flags, *, fs=None, handles=None):
    """Draw, in a strip along the right edge of a latitude-time panel, which rows adjusted.

    Parameters
    ----------
    ax : matplotlib Axes
        A panel with latitude on the y axis.
    flags : xarray.DataArray (lat,)
        One basin's ``sverdrup_adjusted`` at one time scale (1 adjusted, 0 not adjusted,
        other values not drawn).
    fs : dict, optional
        Font sizes of the figure.
    handles : dict, optional
        Legend handles, updated in place.
    """
    flags = require_dataarray(flags, "flags")
    lat = np.asarray(flags[flags.dims[0]].values, float)
    values = np.asarray(flags.values)
    dlat = np.median(np.diff(lat)) if lat.size > 1 else 1.0
    strip = mtransforms.blended_transform_factory(ax.transAxes, ax.transData)
    for value, (label, colour, hatch) in _ADJUSTED_STYLE.items():
        for i0, i1 in _runs(values == value):
            ax.add_patch(mpatches.Rectangle(
                (0.975, lat[i0] - dlat / 2), 0.025, lat[i1] - lat[i0] + dlat, transform=strip,
                facecolor=colour, hatch=hatch, edgecolor="0.2", lw=0.4, zorder=4,
                clip_on=True))
            if handles is not None:
                handles.setdefault(label, mpatches.Patch(facecolor=colour, hatch=hatch,
                                                         edgecolor="0.2", lw=0.4, label=label))


def plot_lagged_transport(response, sverdrup_by_time, *, basin, lats, anomaly: bool = False,
                          width="column", title=None):
    """Instantaneous Sverdrup transport beside the lagged long-wave response, at a few rows.

    Parameters
    ----------
    response : xarray.Dataset
        From :func:`~sverdrup_kit.physics.adjustment.long_wave_response`:
        ``long_wave_interior_transport`` (time, basin, lat), 1e6 m3 s-1.
    sverdrup_by_time : xarray.DataArray (time, basin, lat)
        The Sverdrup interior transport of each step (``interior_transport`` of
        :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport` on the same record, or
        ``interior_transport_by_time`` of :func:`~sverdrup_kit.pipeline.diagnose`).
    basin : str
    lats : sequence of float
        Latitudes (nearest rows) of the panels, one each.
    anomaly : bool, optional
        Draw the change since the first step (both curves) instead of the transport.
    width : "column", "page" or float
    title : str, optional

    Returns
    -------
    fig, axes (one per latitude)
    """
    _need(response, ("long_wave_interior_transport",), "response",
          "pass the result of sverdrup_kit.long_wave_response.")
    sv = require_dataarray(sverdrup_by_time, "sverdrup_by_time")
    lw = response["long_wave_interior_transport"]
    names = [str(b) for b in lw["basin"].values]
    if basin not in names:
        raise ValueError(f"basin: expected one of {names}, found {basin!r}.")
    if "time" not in sv.dims or sv.sizes["time"] != lw.sizes["time"]:
        raise ValueError(f"sverdrup_by_time: expected the {lw.sizes['time']} steps of the "
                         f"response, found dims {sv.dims}. Fix: compute it from the same record.")
    lat_dim = [d for d in lw.dims if d not in ("time", "basin")][0]
    lats = list(np.atleast_1d(lats))
    shown_lw, units = _as_display(lw.sel(basin=basin))
    shown_sv, _ = _as_display(sv.sel(basin=basin))
    if anomaly:
        shown_lw = shown_lw - shown_lw.isel(time=0)
        shown_sv = shown_sv - shown_sv.isel(time=0)
    quantity = "change" if anomaly else "transport"
    t = lw["time"].values
    w = _figure_width(width)
    fs = _fonts(w)
    with mpl.rc_context(_rc(fs)):
        fig, axes = plt.subplots(len(lats), 1, figsize=(w, 0.5 + len(lats) * 1.3),
                                 sharex=True, squeeze=False, layout="constrained")
        axes = axes[:, 0]
        for ax, la in zip(axes, lats):
            a = shown_sv.sel({lat_dim: la}, method="nearest")
            b = shown_lw.sel({lat_dim: la}, method="nearest")
            if anomaly or np.nanmin(a.values) < 0 < np.nanmax(a.values):
                ax.axhline(0, color="0.5", lw=0.5)
            ax.plot(t, a.values, color="0.45", lw=0.9, label="Sverdrup, instantaneous")
            ax.plot(t, b.values, color="#b2182b", lw=1.2, label="long-wave model (lagged)")
            ax.set_title(f"{basin}, {_lat_text(float(a[lat_dim]))}", fontsize=fs["base"],
                         loc="left")
            ax.set_ylabel(f"{quantity} ({units})" if units else quantity, fontsize=fs["base"])
            _style(ax, fs)
        handles, labels = axes[0].get_legend_handles_labels()
        fig.legend(handles, labels, loc="outside lower center", ncols=2, frameon=False,
                   fontsize=fs["small"])
        if title:
            fig.suptitle(title, fontsize=fs["title"])
    return fig, axes


def _lat_text(lat: float) -> str:
    return _lat_formatter()(lat, None)
