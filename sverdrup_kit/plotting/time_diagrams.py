"""Latitude-time (Hovmoller) diagrams of a seasonal cycle or a multi-year record."""

from __future__ import annotations

from typing import NamedTuple

import matplotlib as mpl
import matplotlib.pyplot as plt
import numpy as np
import xarray as xr
from matplotlib import colors as mcolors
from matplotlib import ticker as mticker

from ..geometry.coords import grid_layout, require_dataarray, to_canonical
from ..geometry.grid import cell_edges
from ._inputs import quiet_mean, status_info
from ._style import (
    as_display,
    axis_label,
    cmocean,
    colorbar,
    colour_levels,
    colour_ticks,
    extend_of,
    figure_width,
    fonts,
    latitude_formatter,
    legend_columns,
    line_height,
    long_name,
    place_panels,
    rc,
    shade_row_status,
    style_axes,
    text_width,
)
from .adjustment import mark_adjusted_rows

__all__ = ["TIME_DIMS", "plot_latitude_time"]


def plot_latitude_time(data, *, basin=None, row_status=None, width="column", cmap=None,
                       robust: float = 98.0, vmax=None, title=None, label=None, adjusted=None):
    """Latitude-time (Hovmoller) diagram of a seasonal cycle or a record of any length.

    The time axis reads at any length: a climatology (12 months of one year, or a ``month``
    or ``season`` dimension from ``groupby``) shows its months or seasons; a record of up to
    two years shows month names with the years in the axis label; a longer record shows years,
    as many as fit without overlapping.

    Parameters
    ----------
    data : xarray.DataArray
        (time, lat, lon): drawn as the zonal mean over the ocean cells of each row;
        (time, basin, lat): a basin-integrated quantity such as the interior transport of each
        month (``interior_transport_by_time`` from :func:`~sverdrup_kit.pipeline.diagnose`),
        one panel per basin unless ``basin`` picks one; (time, lat): drawn as it is. The
        ``time`` dimension may instead be ``month`` (1-12) or ``season`` ("DJF", ...).
    basin : str, optional
        Basin to draw.
    row_status : xarray.DataArray (basin, lat), optional
        CF-flagged row status; rows that are not valid are hatched and named.
    width : "column", "page" or float
    cmap, robust, vmax, label, title
        As in :func:`~sverdrup_kit.plotting.maps.map_field`.
    adjusted : xarray.DataArray (basin, lat), optional
        ``sverdrup_adjusted`` of :func:`~sverdrup_kit.pipeline.diagnose` at the time scale of
        the data's steps: a strip along each panel's right edge shows which rows had time to
        adjust to Sverdrup balance (:func:`~sverdrup_kit.plotting.adjustment.mark_adjusted_rows`).

    Returns
    -------
    fig, ax (one basin or no basin dimension) or fig, axes (several basins)
    """
    da = require_dataarray(data, "data")
    tdims = [d for d in TIME_DIMS if d in da.dims]
    if len(tdims) != 1:
        raise ValueError(
            f"data: expected one time dimension (one of {list(TIME_DIMS)}), found dims "
            f"{da.dims}. Fix: pass a record or a climatology, e.g. the result's "
            "interior_transport_by_time."
        )
    tdim = tdims[0]
    spatial = [d for d in da.dims if d not in (tdim, "basin")]
    if len(spatial) == 2:
        lay = grid_layout(da, argname="data")
        lat_name = lay.lat_name
        name = f"zonal mean {long_name(da, 'value')}"
        with quiet_mean():
            da = to_canonical(da, lay).mean(lay.lon_name, keep_attrs=True)
    elif len(spatial) == 1:
        lat_name = spatial[0]
        name = long_name(da, "value")
    else:
        lat_name = None
    if lat_name is None or lat_name not in da.dims:
        raise ValueError(f"data: expected a latitude dimension, found dims {da.dims}.")
    if "basin" in da.dims:
        names = [str(b) for b in da["basin"].values]
        if basin is not None and basin not in names:
            raise ValueError(f"basin: expected one of {names}, found {basin!r}.")
        if basin is not None:
            panels = [basin]
        else:
            has = da.notnull().any([d for d in da.dims if d != "basin"]).values
            panels = [b for b, ok in zip(names, has) if ok] or names
    else:
        panels = [None]
    shown, units = as_display(da)
    values = shown.sel(basin=panels) if panels != [None] else shown
    symmetric = True
    levels, exp, (below, above) = colour_levels(np.asarray(values.values, float), robust=robust,
                                          symmetric=symmetric, vmax=vmax)
    scale = 10.0**exp
    cmap = cmocean.cm.balance if cmap is None else cmap
    norm = mcolors.BoundaryNorm(levels / scale, ncolors=cmap.N, extend=extend_of(below, above))
    meanings = {}
    if row_status is not None:
        meanings = status_info(xr.Dataset({"row_status": row_status}))
    w = figure_width(width)
    fs = fonts(w)
    n = len(panels)
    with mpl.rc_context(rc(fs)):
        fig, axes = plt.subplots(1, n, figsize=(w, 4.0), sharey=True, squeeze=False)
        axes = axes[0]
        small, base = fs["small"], fs["base"]
        left = line_height(base) + text_width(4, small) + 0.14
        # Labels at the panels' ends reach half their width beyond them: the gap holds two halves.
        right, gap = 0.15, text_width(4, small) + 0.08
        axis = _time_axis(shown[tdim], (w - left - right - gap * (n - 1)) / n, fs)
        handles = {}
        spans = []
        for ax, b in zip(axes, panels):
            field = shown if b is None else shown.sel(basin=b)
            field = field.transpose(lat_name, tdim)
            lat = field[lat_name].values
            mesh = ax.pcolormesh(axis.edges, np.clip(cell_edges(lat), -90, 90),
                                 field.values / scale, cmap=cmap, norm=norm, rasterized=True)
            vals = field.values
            finite = vals[np.isfinite(vals)]
            if finite.size and finite.min() < 0 < finite.max():
                ax.contour(axis.centres, lat, vals, levels=[0], colors="0.1", linewidths=0.6)
            if meanings and b is not None and b in [str(x) for x in row_status["basin"].values]:
                st = row_status.sel(basin=b).values
                st_lat = row_status[[d for d in row_status.dims if d != "basin"][0]].values
                dl = np.median(np.diff(st_lat))
                drawn = shade_row_status(ax, st_lat, st, meanings, handles, axis="y",
                                         zorder=0.5)
                spans.extend((lo - dl / 2, hi + dl / 2) for lo, hi in drawn)
            if adjusted is not None and b is not None and b in [str(x) for x in
                                                                adjusted["basin"].values]:
                mark_adjusted_rows(ax, adjusted.sel(basin=b), fs=fs, handles=handles)
            finite_rows = np.isfinite(vals).any(axis=1)
            if finite_rows.any():
                pad = np.median(np.diff(lat)) if lat.size > 1 else 1.0
                spans.append((lat[finite_rows].min() - pad, lat[finite_rows].max() + pad))
            ax.set_xlim(axis.edges[0], axis.edges[-1])
            ax.set_xticks(axis.ticks, axis.labels)
            ax.set_xticks(axis.minor, minor=True)
            if b is not None:
                ax.set_title(b, fontsize=fs["base"], loc="left")
            style_axes(ax, fs)
        if spans:
            lo, hi = min(a for a, _ in spans), max(b for _, b in spans)
            axes[0].set_ylim(lo, hi)
            axes[0].yaxis.set_major_locator(mticker.MultipleLocator(30 if hi - lo > 90 else 15))
        axes[0].yaxis.set_major_formatter(latitude_formatter())
        axes[0].set_ylabel("latitude", fontsize=fs["base"])
        cb_label = label if label is not None else axis_label(name, units, exp)
        # Heights from the bottom: colour-bar label and ticks, the bar, the time axis's label
        # and ticks; from the top: title, legend, panel titles.
        cb_text = line_height(base) + 0.04 + line_height(small) + 0.04
        cb_h = 0.1
        bottom = cb_text + cb_h + 0.14 + line_height(base) + 0.04 + line_height(small) + 0.06
        ncols = legend_columns([h.get_label() for h in handles.values()], fs, w)
        legend_h = -(-len(handles) // ncols) * 1.3 * line_height(small) + 0.06 if handles else 0
        title_h = line_height(fs["title"]) + 0.06 if title else 0.0
        top = 0.06 + title_h + legend_h + (line_height(base) + 0.04 if panels != [None] else 0)
        panel_h = 0.4 * w + 0.3 if n == 1 else 0.3 * w + 0.5
        h = top + bottom + panel_h
        fig.set_size_inches(w, h)
        place_panels(fig, axes, left=left, right=right, bottom=bottom, top=top, gap=gap,
                     stacked=False)
        xlabel_y = cb_text + cb_h + 0.14
        fig.text((left + (w - right)) / 2 / w, xlabel_y / h, axis.label, ha="center",
                 va="bottom", fontsize=base)
        span = w - left - right
        cax = fig.add_axes(((left + 0.05 * span) / w, cb_text / h, 0.9 * span / w, cb_h / h),
                           label="<colorbar>")
        colorbar(fig, cax, mesh, cb_label, fs, extend=extend_of(below, above),
                 ticks=colour_ticks(levels, w) / scale)
        if handles:
            fig.legend(handles=list(handles.values()), loc="upper center",
                       bbox_to_anchor=(0.5, 1 - (0.04 + title_h) / h), ncols=ncols,
                       frameon=False, fontsize=small, borderaxespad=0.0, borderpad=0.0)
        if title:
            fig.suptitle(title, fontsize=fs["title"], y=1 - 0.04 / h, va="top")
    return (fig, axes[0]) if n == 1 else (fig, axes)


#: Dimensions that can hold the time axis: a record, or a climatology from ``groupby``.
TIME_DIMS = ("time", "month", "season")

_MONTHS = ("Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec")


class _TimeAxis(NamedTuple):
    centres: np.ndarray
    edges: np.ndarray
    ticks: np.ndarray
    labels: list
    minor: np.ndarray
    label: str


def _fits(n_labels: int, chars: int, panel_in: float, fs: dict) -> bool:
    """Whether n labels of ``chars`` characters fit side by side on a panel without touching
    (a character is about 0.6 em wide; one em of space between labels)."""
    return n_labels * (chars + 1.7) * 0.6 * fs["small"] / 72 <= panel_in


def _cycle_axis(labels, panel_in, fs, label) -> _TimeAxis:
    n = len(labels)
    x = np.arange(n, dtype=float)
    every = next((k for k in (1, 2, 3, 4, 6) if _fits(-(-n // k), max(map(len, labels)),
                                                      panel_in, fs)), 6)
    ticks = x[::every]
    return _TimeAxis(x, cell_edges(x), ticks, [labels[int(i)] for i in ticks], x, label)


def _month_axis(months, panel_in, fs) -> _TimeAxis:
    """Month names of a cycle: "Jan" ... where they fit, else single letters if every month
    fits, else every third (or sixth) month named, never every other initial ("J M M J")."""
    n = len(months)
    if _fits(n, 3, panel_in, fs):
        return _cycle_axis([_MONTHS[m - 1] for m in months], panel_in, fs, "month")
    if _fits(n, 1, panel_in, fs):
        return _cycle_axis([_MONTHS[m - 1][0] for m in months], panel_in, fs, "month")
    x = np.arange(n, dtype=float)
    every = 3 if _fits(-(-n // 3), 3, panel_in, fs) else 6
    ticks = x[::every]
    return _TimeAxis(x, cell_edges(x), ticks, [_MONTHS[months[int(i)] - 1] for i in ticks], x,
                     "month")


def _time_axis(time: xr.DataArray, panel_in: float, fs: dict) -> _TimeAxis:
    """Positions, ticks and labels of a time axis that read at any record length."""
    n = time.size
    if time.name == "season" or time.dtype.kind in "US":
        return _cycle_axis([str(s) for s in time.values], panel_in, fs, str(time.name))
    if time.name == "month":
        return _month_axis(np.asarray(time.values, dtype=int), panel_in, fs)
    try:
        year = time.dt.year.values.astype(float)
        month = time.dt.month.values
        frac = (time.dt.day.values - 1) / time.dt.days_in_month.values
    except (AttributeError, TypeError):
        x = np.arange(n, dtype=float)
        ticks = mticker.MaxNLocator(nbins=max(2, int(panel_in / 0.5)), integer=True).tick_values(
            0, max(n - 1, 1))
        ticks = ticks[(ticks >= 0) & (ticks <= n - 1)]
        return _TimeAxis(x, cell_edges(x) if n > 1 else np.array([-0.5, 0.5]), ticks,
                         [f"{t:g}" for t in ticks], x, f"{time.name} (position)")
    if n <= 12 and np.unique(month).size == n and np.unique(year).size == 1:
        # Twelve months (or fewer) of one year: a climatology, or one year's seasonal cycle;
        # the year of a climatology is a placeholder, so it is left out.
        return _month_axis(month, panel_in, fs)
    x = year + (month - 1 + frac) / 12.0
    edges = cell_edges(x) if n > 1 else np.array([x[0], x[0] + 1 / 12])
    first, last = int(np.floor(edges[0])), int(np.ceil(edges[-1]))
    if edges[-1] - edges[0] <= 2.0:
        # Up to two years: month names at the month starts, as many as fit.
        starts = np.array([y + m / 12.0 for y in range(first, last + 1) for m in range(12)])
        starts = starts[(starts >= edges[0] - 1e-9) & (starts <= edges[-1] + 1e-9)]
        every = next((k for k in (1, 2, 3, 6) if _fits(-(-starts.size // k), 3, panel_in, fs)),
                     12)
        pick = np.round((starts % 1) * 12).astype(int) % every == 0
        ticks = starts[pick]
        labels = [_MONTHS[int(round((t % 1) * 12)) % 12] for t in ticks]
        years = f"{first}" if last - first <= 1 else f"{first}\u2013{last - 1}"
        return _TimeAxis(x, edges, ticks, labels, starts, f"month of {years}")
    # Longer records: years at their first day, every k-th year so that the labels fit.
    step = next((k for k in (1, 2, 5, 10, 20, 25, 50, 100, 200, 500)
                 if _fits((last - first) // k + 1, 4, panel_in, fs)), 1000)
    ticks = np.array([y for y in range(first, last + 1)
                      if y % step == 0 and edges[0] - 1e-9 <= y <= edges[-1] + 1e-9], float)
    minor = np.arange(first, last + 1, dtype=float) if step > 1 else np.array(
        [y + m / 4.0 for y in range(first, last + 1) for m in range(4)])
    minor = minor[(minor >= edges[0] - 1e-9) & (minor <= edges[-1] + 1e-9)]
    return _TimeAxis(x, edges, ticks, [f"{int(t)}" for t in ticks], minor, "year")
