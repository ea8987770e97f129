"""Latitude-time (Hovmoller) diagrams of a seasonal cycle or a multi-year record."""

from __future__ import annotations

import matplotlib as mpl
import matplotlib.pyplot as plt
import numpy as np
import xarray as xr
from matplotlib import colors as mcolors
from matplotlib import ticker as mticker

from ..geometry.coords import grid_layout, require_dataarray, to_canonical
from ..geometry.grid import cell_edges
from ._inputs import quiet_mean, runs, status_info
from ._style import (
    SKIP_REASONS,
    as_display,
    axis_label,
    cmocean,
    colour_levels,
    colour_ticks,
    extend_of,
    figure_width,
    fonts,
    latitude_formatter,
    long_name,
    plain_formatter,
    rc,
    reason_style,
    style_axes,
)

__all__ = ["plot_latitude_time"]

def plot_latitude_time(data, *, basin=None, row_status=None, width="column", cmap=None,
                   robust: float = 98.0, vmax=None, title=None, label=None):
    """Latitude-time (Hovmoller) diagram of a seasonal cycle.

    Parameters
    ----------
    data : xarray.DataArray
        (time, lat, lon): drawn as the zonal mean over the ocean cells of each row;
        (time, basin, lat): a basin-integrated quantity such as the interior transport of each
        month (``interior_transport_by_time`` from :func:`~sverdrup_kit.pipeline.diagnose`),
        one panel per basin unless ``basin`` picks one; (time, lat): drawn as it is.
    basin : str, optional
        Basin to draw.
    row_status : xarray.DataArray (basin, lat), optional
        CF-flagged row status; rows that are not valid are hatched and named.
    width : "column", "page" or float
    cmap, robust, vmax, label, title
        As in :func:`map_field`.

    Returns
    -------
    fig, ax (one basin or no basin dimension) or fig, axes (several basins)
    """
    da = require_dataarray(data, "data")
    if "time" not in da.dims:
        raise ValueError(
            f"data: expected a 'time' dimension for a seasonal cycle, found dims {da.dims}. "
            "Fix: pass the monthly field, e.g. the result's interior_transport_by_time."
        )
    spatial = [d for d in da.dims if d not in ("time", "basin")]
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
        fig, axes = plt.subplots(1, n, figsize=(w, 0.6 * w if n == 1 else 0.5 * w + 0.4),
                                 sharey=True, squeeze=False, layout="constrained")
        axes = axes[0]
        t = np.arange(shown.sizes["time"])
        handles = {}
        spans = []
        for ax, b in zip(axes, panels):
            field = shown if b is None else shown.sel(basin=b)
            field = field.transpose(lat_name, "time")
            lat = field[lat_name].values
            mesh = ax.pcolormesh(cell_edges(t.astype(float)), np.clip(cell_edges(lat), -90, 90),
                                 field.values / scale, cmap=cmap, norm=norm, rasterized=True)
            vals = field.values
            finite = vals[np.isfinite(vals)]
            if finite.size and finite.min() < 0 < finite.max():
                ax.contour(t, lat, vals, levels=[0], colors="0.1", linewidths=0.6)
            if meanings and b is not None and b in [str(x) for x in row_status["basin"].values]:
                st = row_status.sel(basin=b).values
                st_lat = row_status[[d for d in row_status.dims if d != "basin"][0]].values
                dl = np.median(np.diff(st_lat))
                for value, meaning in meanings.items():
                    if meaning in SKIP_REASONS:
                        continue
                    shade = reason_style(meaning)
                    for i0, i1 in runs(st == value):
                        ax.axhspan(st_lat[i0] - dl / 2, st_lat[i1] + dl / 2,
                                   facecolor=shade.facecolor, hatch=shade.hatch,
                                   edgecolor="0.35", lw=0, zorder=0.5)
                        handles.setdefault(shade.label, shade.patch())
                        spans.append((st_lat[i0] - dl, st_lat[i1] + dl))
            finite_rows = np.isfinite(vals).any(axis=1)
            if finite_rows.any():
                pad = np.median(np.diff(lat)) if lat.size > 1 else 1.0
                spans.append((lat[finite_rows].min() - pad, lat[finite_rows].max() + pad))
            labels = _time_labels(shown["time"])
            every = 1 if w / n >= 1.4 else 3
            ax.set_xticks(t[::every], labels[::every])
            ax.set_xticks(t, minor=True)
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
        cb = fig.colorbar(mesh, ax=list(axes), orientation="horizontal", shrink=0.9, aspect=35,
                          pad=0.02, extend=extend_of(below, above),
                          ticks=colour_ticks(levels, w) / scale)
        cb.set_label(cb_label, fontsize=fs["base"])
        cb.ax.tick_params(labelsize=fs["small"], width=0.5, length=2)
        cb.ax.xaxis.set_major_formatter(plain_formatter())
        cb.outline.set_linewidth(0.5)
        if handles:
            fig.legend(handles=list(handles.values()), loc="outside upper center",
                       ncols=min(3, len(handles)), frameon=False, fontsize=fs["small"])
        if title:
            fig.suptitle(title, fontsize=fs["title"])
    return (fig, axes[0]) if n == 1 else (fig, axes)


def _time_labels(time: xr.DataArray) -> list[str]:
    try:
        months = time.dt.month.values
    except (AttributeError, TypeError):
        return [str(i) for i in range(time.size)]
    if time.size == 12 and sorted(months) == list(range(1, 13)):
        return ["JFMAMJJASOND"[m - 1] for m in months]
    return [str(t)[:7] for t in time.dt.strftime("%Y-%m").values]
