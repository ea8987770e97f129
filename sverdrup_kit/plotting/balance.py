"""The hydrographic test of Sverdrup balance on one latitude axis per basin."""

from __future__ import annotations

import matplotlib as mpl
import matplotlib.pyplot as plt
import numpy as np
import xarray as xr
from matplotlib import ticker as mticker

from ._inputs import choose_basins
from ._inputs import runs as _runs
from ._style import figure_width as _figure_width
from ._style import fonts as _fonts
from ._style import latitude_formatter as _lat_formatter
from ._style import rc as _rc
from ._style import style_axes as _style

__all__ = ["plot_balance"]

_COLOURS = {"sverdrup": "k", "geo_ekman": "#2166ac", "ekman": "0.45", "residual": "#b2182b",
            "observed": "#e08214"}


def _lat_name(check: xr.Dataset) -> str:
    dims = [d for d in check["interior_transport"].dims if d != "basin"]
    return dims[0]


def plot_balance(check, *, observations=None, basins=None, residual: bool = True,
                 width="page", title=None):
    """Sverdrup against geostrophic plus Ekman transport, one panel per basin.

    Parameters
    ----------
    check : xarray.Dataset
        The result of :func:`~sverdrup_kit.balance_check`. With a ``reference_pressure``
        dimension the geostrophic plus Ekman curve is the median over the reference levels and
        the shading spans their range.
    observations : xarray.Dataset, optional
        :func:`~sverdrup_kit.balance_section_observations` (or a Dataset with the same
        variables). Interior geostrophic transports are drawn with their spread, and, where
        the same section also has an Ekman entry, their sum: the observed counterpart of the
        geostrophic plus Ekman curve.
    basins : list of str, optional
        Basins to draw (default: every basin with a value).
    residual : bool, optional
        Also draw the residual (Sverdrup minus geostrophic plus Ekman).
    width : "column", "page" or float
    title : str, optional

    Returns
    -------
    fig : matplotlib.figure.Figure
    axes : ndarray of Axes, one per basin
    """
    needed = ("interior_transport", "geostrophic_plus_ekman", "ekman_transport", "residual")
    if not isinstance(check, xr.Dataset) or any(v not in check for v in needed):
        raise TypeError(
            f"check: expected the Dataset from sverdrup_kit.balance_check with {list(needed)}, "
            f"found {type(check).__name__}"
            + (f" with {sorted(check.data_vars)}" if isinstance(check, xr.Dataset) else "")
            + ". Fix: pass the whole result of balance_check()."
        )
    lat = _lat_name(check)
    chosen = choose_basins(check["interior_transport"], basins)
    gpe = check["geostrophic_plus_ekman"]
    refs = None
    if "reference_pressure" in gpe.dims:
        refs = check["reference_pressure"].values
        lo, hi = gpe.min("reference_pressure"), gpe.max("reference_pressure")
        gpe = gpe.median("reference_pressure")
        res = check["residual"].median("reference_pressure")
    else:
        lo = hi = None
        res = check["residual"]

    w = _figure_width(width)
    fs = _fonts(w)
    n = len(chosen)
    with mpl.rc_context(_rc(fs)):
        fig, axes = plt.subplots(n, 1, figsize=(w, 0.5 + n * (1.6 + 0.1 * (w - 3.5))),
                                 sharex=True, squeeze=False, layout="constrained")
        axes = axes[:, 0]
        handles = {}
        spans = []
        for ax, name in zip(axes, chosen):
            y_lat = check[lat].values
            sv = check["interior_transport"].sel(basin=name).values
            valid = np.isfinite(sv)
            if not valid.any():
                spans.append((np.nanmin(y_lat), np.nanmax(y_lat)))
                continue
            spans.append((y_lat[valid].min() - 2, y_lat[valid].max() + 2))
            ax.axhline(0, color="0.6", lw=0.5)
            for a, b in _runs(~valid & (y_lat >= spans[-1][0]) & (y_lat <= spans[-1][1])):
                handles.setdefault("empty", ax.axvspan(
                    y_lat[a] - 0.5, y_lat[b] + 0.5, color="0.9", lw=0, zorder=0,
                    label="no Sverdrup row"))
            if lo is not None:
                handles["spread"] = ax.fill_between(
                    y_lat, lo.sel(basin=name), hi.sel(basin=name), color=_COLOURS["geo_ekman"],
                    alpha=0.25, lw=0, label="range over "
                    + ", ".join(f"{r:g}" for r in refs) + " dbar")
            (handles["sverdrup"],) = ax.plot(y_lat, sv, color=_COLOURS["sverdrup"], lw=1.2,
                                             label="Sverdrup")
            (handles["geo_ekman"],) = ax.plot(y_lat, gpe.sel(basin=name),
                                              color=_COLOURS["geo_ekman"], lw=1.2,
                                              label="geostrophic + Ekman")
            (handles["ekman"],) = ax.plot(y_lat, check["ekman_transport"].sel(basin=name),
                                          color=_COLOURS["ekman"], lw=0.8, ls="--",
                                          label="Ekman")
            if residual:
                (handles["residual"],) = ax.plot(y_lat, res.sel(basin=name),
                                                 color=_COLOURS["residual"], lw=0.8, ls=":",
                                                 label="residual")
            if observations is not None:
                _observed(ax, observations, name, handles)
            ax.set_ylabel("northward transport (Sv)", fontsize=fs["base"])
            ax.set_title(name, loc="left", fontsize=fs["base"])
            _style(ax, fs)
        lo_lat, hi_lat = min(a for a, _ in spans), max(b for _, b in spans)
        axes[-1].set_xlim(lo_lat, hi_lat)
        axes[-1].xaxis.set_major_locator(mticker.MultipleLocator(
            30 if hi_lat - lo_lat > 60 else 10))
        axes[-1].xaxis.set_major_formatter(_lat_formatter())
        axes[-1].set_xlabel("latitude", fontsize=fs["base"])
        fig.legend(handles=list(handles.values()), loc="outside lower center",
                   ncols=2 if w < 5 else 4, frameon=False, fontsize=fs["small"],
                   handlelength=1.8, columnspacing=1.0)
        if title:
            fig.suptitle(title, fontsize=fs["title"])
    return fig, axes


def _observed(ax, obs: xr.Dataset, basin: str, handles: dict) -> None:
    mine = obs.where(obs["basin"] == basin, drop=True) if obs.sizes.get("observation") else obs
    if not mine.sizes.get("observation"):
        return
    comp = [str(c) for c in mine["component"].values]
    lat = mine["lat"].values.astype(float)
    tr = mine["transport"].values.astype(float)
    spread = mine["spread"].values.astype(float)
    for i, c in enumerate(comp):
        if c != "interior geostrophic":
            continue
        err = None if not np.isfinite(spread[i]) else spread[i]
        handles["obs_geo"] = ax.errorbar(
            lat[i], tr[i], yerr=err, fmt="s", ms=3.5, color=_COLOURS["observed"], capsize=2,
            lw=0.8, label="observed geostrophic", zorder=5)
        # The same section's Ekman entry makes the observed counterpart of the blue curve.
        ek = [j for j, cj in enumerate(comp) if cj == "Ekman" and lat[j] == lat[i]]
        if ek:
            handles["obs_sum"] = ax.errorbar(
                lat[i], tr[i] + tr[ek[0]], yerr=err, fmt="o", ms=3.5, mfc="white",
                color=_COLOURS["observed"], capsize=2, lw=0.8,
                label="observed geostrophic + Ekman", zorder=5)
