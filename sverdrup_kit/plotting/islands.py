"""Figures of Godfrey's island rule: island and throughflow transports, and the paths on a map."""

from __future__ import annotations

import cartopy.crs as ccrs
import matplotlib as mpl
import matplotlib.pyplot as plt
import numpy as np
import xarray as xr

from ._style import figure_width, fonts, rc, style_axes
from .maps import map_sverdrup_streamfunction

__all__ = ["map_island_rule", "plot_island_transports"]


def map_island_rule(data, rule=None, *, islands=None, time="mean", width="page",
                    projection="robinson", coastlines="auto", title=None, robust=98.0,
                    vmax=None):
    """Map the Sverdrup streamfunction with each island's constant and the rule's path.

    Parameters
    ----------
    data : xarray.Dataset
        From :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport` (with
        ``island_rule=True`` the streamfunction carries the island constants).
    rule : xarray.Dataset, optional
        From :func:`~sverdrup_kit.physics.island_rule.island_rule` on the same stress: its
        ``path_lat``/``path_lon`` are drawn and ``island_streamfunction`` written beside each
        path. Default: ``data`` when it holds the paths.
    islands : list of str, optional
        Islands to draw (default: every island of ``rule`` whose rule was not refused).
    time, width, projection, coastlines, title, robust, vmax
        As in :func:`~sverdrup_kit.plotting.map_sverdrup_streamfunction`.

    Returns
    -------
    fig, ax
    """
    rule = data if rule is None else rule
    if not isinstance(rule, xr.Dataset) or "path_lat" not in rule:
        raise TypeError(
            "rule: expected the Dataset of sverdrup_kit.island_rule() with path_lat and "
            f"path_lon, found {type(rule).__name__}"
            + (f" with variables {list(rule.data_vars)}" if isinstance(rule, xr.Dataset) else "")
            + ". Fix: map_island_rule(sverdrup_result, island_rule(taux, tauy, ...))."
        )
    names = [str(n) for n in rule.island.values]
    if islands is None:
        islands = [n for n in names
                   if np.isfinite(_reduce(rule.island_streamfunction.sel(island=n), time))]
    unknown = [n for n in islands if n not in names]
    if unknown:
        raise ValueError(f"islands: expected names from rule.island {names}, found {unknown}. "
                         "Fix: pick from rule.island.values.")
    fig, ax = map_sverdrup_streamfunction(data, time=time, width=width, projection=projection,
                                 coastlines=coastlines, title=title, robust=robust, vmax=vmax)
    fs = fonts(figure_width(width))
    for n in islands:
        plat = rule.path_lat.sel(island=n).values
        plon = rule.path_lon.sel(island=n).values
        ok = np.isfinite(plat)
        if not ok.any():
            continue
        ax.plot(plon[ok], plat[ok], transform=ccrs.PlateCarree(), color="k", lw=0.9,
                ls=(0, (3, 1.5)), zorder=6)
        psi = float(_reduce(rule.island_streamfunction.sel(island=n), time))
        # The label sits at the start of the path: the north-western corner.
        ax.text(plon[ok][0], plat[ok][0], f" {n}\n \u03c8 = {psi:.1f} Sv",
                transform=ccrs.PlateCarree(), fontsize=fs["small"] - 0.5, va="bottom",
                ha="left", zorder=7,
                bbox=dict(boxstyle="round,pad=0.15", fc="white", ec="none", alpha=0.75))
    ax.plot([], [], color="k", lw=0.9, ls=(0, (3, 1.5)), label="island rule path")
    return fig, ax


def _reduce(da, time):
    if "time" not in da.dims:
        return da.squeeze()
    return da.mean("time") if time == "mean" else da.isel(time=time)


def plot_island_transports(data, *, reference=None, width="column", title=None):
    """Island or throughflow transports across cases (wind products, drag laws, seasons).

    Parameters
    ----------
    data : xarray.DataArray (..., island) or (..., passage)
        Transports in 1e6 m3 s-1 (``island_transport`` or ``passage_transport``). Every other
        dimension is a case: each combination becomes one marker, labelled by its
        coordinate values (e.g. ``product`` and ``drag_law``).
    reference : dict, optional
        Name (island or passage) -> ``(value, spread, label)``: an observed or published value
        drawn as a band, e.g. ``{"indonesian": (15.0, 3.0, "INSTANT 2004-06")}``.
    width : "column", "page" or float
    title : str, optional

    Returns
    -------
    fig, ax
    """
    if not isinstance(data, xr.DataArray):
        raise TypeError(f"data: expected an xarray.DataArray of transports, found "
                        f"{type(data).__name__}. Fix: pass ds.island_transport or "
                        "ds.passage_transport.")
    dim = next((d for d in ("passage", "island") if d in data.dims), None)
    if dim is None:
        raise ValueError(f"data: expected a dimension 'island' or 'passage', found {data.dims}. "
                         "Fix: pass ds.island_transport or ds.passage_transport.")
    cases = [d for d in data.dims if d != dim]
    flat = data.stack(_case=cases) if cases else data.expand_dims(_case=[0])
    flat = flat.transpose(dim, "_case")
    names = [str(n) for n in data[dim].values] if dim in data.coords else [
        str(k) for k in range(data.sizes[dim])]
    labels = []
    for k in range(flat.sizes["_case"]):
        if cases:
            vals = [flat["_case"].values[k]] if len(cases) == 1 else list(flat["_case"].values[k])
            labels.append(", ".join(str(v) for v in vals))
        else:
            labels.append("")
    w = figure_width(width)
    fs = fonts(w)
    n, m = len(names), flat.sizes["_case"]
    with mpl.rc_context(rc(fs)):
        fig, ax = plt.subplots(figsize=(w, 0.6 + 0.32 * n * max(1, min(m, 4)) ** 0.5 + 0.25 * m),
                               layout="constrained")
        colors = plt.get_cmap("tab10")
        offs = (np.arange(m) - (m - 1) / 2) * (0.7 / max(m, 1))
        hatches = ["", "////", "\\\\", "xx"]
        refs = []
        for i, name in enumerate(names):
            if reference and name in reference:
                val, spread, lab = reference[name]
                h = hatches[len(refs) % len(hatches)]
                ax.fill_betweenx([i - 0.42, i + 0.42], val - spread, val + spread,
                                 color="0.85", lw=0, zorder=1, hatch=h,
                                 label=lab)
                ax.plot([val, val], [i - 0.42, i + 0.42], color="0.4", lw=0.8, zorder=2)
                refs.append(name)
        for k in range(m):
            y = np.arange(n) + offs[k]
            ax.plot(flat.values[:, k], y, "o", ms=4, color=colors(k % 10), label=labels[k]
                    or None, zorder=3)
        ax.axvline(0, color="0.5", lw=0.5)
        ax.set_yticks(np.arange(n), names)
        ax.set_ylim(n - 0.4, -0.6)
        units = data.attrs.get("units", "1e6 m3 s-1")
        what = "throughflow" if dim == "passage" else "island transport"
        ax.set_xlabel(f"{what} (Sv{'' if units in ('1e6 m3 s-1', 'sverdrup') else ', ' + units})"
                      + (", positive northward" if dim == "island" else ""))
        style_axes(ax, fs)
        if any(labels) or refs:
            fig.legend(loc="outside lower center", frameon=False, fontsize=fs["small"],
                      ncols=1 if max(len(t) for t in labels + [""]) > 24 or w < 4 else 2,
                      title=" / ".join(cases) if cases else None,
                      title_fontsize=fs["small"])
        if title:
            ax.set_title(title)
    return fig, ax
