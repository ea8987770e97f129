"""Figure of the spread of the Sverdrup transport across wind products and drag laws."""

from __future__ import annotations

import warnings

import matplotlib as mpl
import matplotlib.pyplot as plt
import numpy as np
import xarray as xr
from matplotlib import ticker as mticker

from ._inputs import choose_basins
from ._style import figure_width as _figure_width
from ._style import fonts as _fonts
from ._style import latitude_formatter as _lat_formatter
from ._style import rc as _rc
from ._style import style_axes as _style

__all__ = ["plot_transport_spread"]

_COMBINATION = "#6baed6"
_MEAN = "#08306b"
_RANGE = "#c6dbef"


def plot_transport_spread(spread, *, basins=None, observations=None, width="column",
                          title=None):
    """Western boundary-current transport implied by Sverdrup, for every product and drag law.

    One panel per basin: each (product, drag law, mean speed) combination as a thin line, their
    range shaded, their mean as a thick line, and the observed boundary currents of that basin
    as points with their spread. The Sverdrup value shown is the boundary current that returns
    the interior flow, ``-interior_transport`` (positive northward), so that it compares
    directly with the observed currents.

    Parameters
    ----------
    spread : xarray.Dataset
        From :func:`~sverdrup_kit.spread.transport_spread`.
    basins : list of str, optional
        Basins to draw (default: those with values).
    observations : xarray.Dataset, optional
        Observed currents as from
        :func:`~sverdrup_kit.ocean.observations.boundary_current_observations` (the default);
        ``False`` for none.
    width : "column", "page" or float
        Figure width (inches for a float).
    title : str, optional

    Returns
    -------
    fig : matplotlib.figure.Figure
    axes : ndarray of Axes, one per basin
    """
    if not isinstance(spread, xr.Dataset) or "interior_transport" not in spread or (
            "product" not in spread["interior_transport"].dims):
        raise TypeError(
            "spread: expected the Dataset from sverdrup_kit.transport_spread, with "
            "'interior_transport' (product, drag_law, mean_speed, basin, lat), found "
            f"{type(spread).__name__}. Fix: pass the result of transport_spread()."
        )
    if observations is None:
        from ..ocean.observations import boundary_current_observations

        observations = boundary_current_observations()
    tr = -spread["interior_transport"]
    basins = choose_basins(tr, basins)
    combos = tr.stack(combination=("product", "drag_law", "mean_speed"))
    w = _figure_width(width)
    fs = _fonts(w)
    n = len(basins)
    with mpl.rc_context(_rc(fs)):
        fig, axes = plt.subplots(n, 1, figsize=(w, 0.5 + n * (1.5 + 0.1 * (w - 3.5))),
                                 sharex=True, squeeze=False, layout="constrained")
        axes = axes[:, 0]
        handles = {}
        lo, hi = 90.0, -90.0
        for ax, name in zip(axes, basins):
            sub = combos.sel(basin=name)
            lat = sub["lat"].values
            vals = sub.transpose("combination", "lat").values
            valid = np.isfinite(vals).any(0)
            if valid.any():
                lo, hi = min(lo, lat[valid].min()), max(hi, lat[valid].max())
            with np.errstate(all="ignore"), warnings.catch_warnings():
                # all-NaN rows (land, equatorial band) are expected
                warnings.simplefilter("ignore", RuntimeWarning)
                vmin, vmax = np.nanmin(vals, 0), np.nanmax(vals, 0)
                mean = np.nanmean(vals, 0)
            ax.axhline(0, color="0.5", lw=0.5, zorder=1)
            handles.setdefault("range", ax.fill_between(
                lat, vmin, vmax, color=_RANGE, lw=0, zorder=2,
                label="range over products and drag laws"))
            for row in vals:
                (line,) = ax.plot(lat, row, color=_COMBINATION, lw=0.5, zorder=3,
                                  label="one product and drag law")
                handles.setdefault("one", line)
            (line,) = ax.plot(lat, mean, color=_MEAN, lw=1.3, zorder=4, label="mean")
            handles.setdefault("mean", line)
            if observations is not False:
                _observed(ax, observations, name, fs, handles)
            ax.set_title(name, fontsize=fs["base"], loc="left")
            ax.set_ylabel("northward transport (Sv)", fontsize=fs["base"])
            _style(ax, fs)
        if hi > lo:
            axes[-1].set_xlim(lo - 2, hi + 2)
            axes[-1].xaxis.set_major_locator(mticker.MultipleLocator(30 if hi - lo > 60 else 15))
        axes[-1].xaxis.set_major_formatter(_lat_formatter())
        axes[-1].set_xlabel("latitude", fontsize=fs["base"])
        n_comb = int(combos.notnull().any([d for d in combos.dims if d != "combination"]).sum())
        fig.legend(handles=list(handles.values()), loc="outside lower center",
                   ncols=2, frameon=False, fontsize=fs["small"], handlelength=1.8)
        fig.suptitle(title or f"Western boundary current from Sverdrup: {n_comb} combinations "
                     f"of {spread.sizes['product']} products, {spread.sizes['drag_law']} drag "
                     f"laws and {spread.sizes['mean_speed']} mean speeds", fontsize=fs["title"])
    return fig, axes


def _observed(ax, obs, name, fs, handles):
    for k in range(obs.sizes["current"]):
        if str(obs["basin"].values[k]).lower() != name.lower():
            continue
        s = float(obs["spread"].values[k])
        eb = ax.errorbar(float(obs["lat"].values[k]), float(obs["transport"].values[k]),
                         yerr=s if np.isfinite(s) else None, fmt="o", ms=3, color="k",
                         mfc="white", mew=0.8, elinewidth=0.8, capsize=2, zorder=5,
                         label="observed boundary current (\u00b1 spread)")
        handles.setdefault("obs", eb)
        ax.annotate(str(obs["current"].values[k]), (float(obs["lat"].values[k]),
                    float(obs["transport"].values[k])), xytext=(4, 3),
                    textcoords="offset points", fontsize=fs["small"] - 1, color="0.15", zorder=6)

