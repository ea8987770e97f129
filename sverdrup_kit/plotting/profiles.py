"""Transports against latitude: the Sverdrup interior and boundary-current transport per basin,
with observed boundary-current transports and the latitude bands where Sverdrup fails."""

from __future__ import annotations

import matplotlib as mpl
import matplotlib.pyplot as plt
import numpy as np
import xarray as xr
from matplotlib import ticker as mticker

from ._inputs import choose_basins, reduce_time, status_info
from ._style import (
    as_display,
    figure_width,
    fonts,
    latitude_formatter,
    legend_columns,
    line_height,
    place_panels,
    rc,
    shade_row_status,
    style_axes,
    text_width,
)

__all__ = ["plot_interior_transport"]

def plot_interior_transport(data, *, basins=None, observations=None, time="mean", width="column",
                   boundary_current: bool = True, title=None):
    """Sverdrup interior and boundary-current transport against latitude, one panel per basin.

    Parameters
    ----------
    data : xarray.Dataset
        From :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport`:
        ``interior_transport`` (basin, lat) in
        1e6 m3 s-1, ``boundary_current_transport`` (optional) and ``row_status`` (basin, lat)
        with CF flag_values/flag_meanings. Latitude bands where a basin's rows are not valid
        are shaded and named by their flag meaning.
    basins : list of str, optional
        Basins to draw, in order (default: all).
    observations : list of dict, DataFrame or xarray.Dataset, optional
        Observed boundary-current transports: ``name``, ``lat`` (degrees_north), ``transport``
        (Sv, positive northward) and optionally ``spread`` (Sv) and ``basin``. Entries are drawn
        in the panel whose basin name matches (case-insensitive); without ``basin`` they need a
        single panel. :func:`~sverdrup_kit.ocean.observations.boundary_current_observations` fits.
    time : "mean" or int
        For data with a ``time`` dimension.
    width : "column", "page" or float
    boundary_current : bool
        Also draw ``boundary_current_transport`` (dashed).

    Returns
    -------
    fig : matplotlib.figure.Figure
    axes : ndarray of Axes, one per basin
    """
    if not isinstance(data, xr.Dataset) or "interior_transport" not in data:
        raise TypeError(
            "data: expected the Dataset from sverdrup_kit.physics.sverdrup with "
            "'interior_transport' "
            f"(basin, lat), found {type(data).__name__}"
            + (f" with variables {list(data.data_vars)}" if isinstance(data, xr.Dataset) else "")
            + ". Fix: pass the whole result of sverdrup_transport()."
        )
    interior = reduce_time(data["interior_transport"], time, "interior_transport")
    chosen = choose_basins(interior, basins)
    bc = None
    if boundary_current and "boundary_current_transport" in data:
        bc = reduce_time(data["boundary_current_transport"], time, "boundary_current_transport")
    meanings = status_info(data) if "row_status" in data else {}
    obs = _observation_rows(observations)
    has_basin = [("basin" in r and r["basin"] is not None) for r in obs]
    if obs and not all(has_basin) and len(chosen) > 1:
        raise ValueError(
            "observations: expected a 'basin' for every entry when several basins are drawn, "
            "found entries without one. Fix: add 'basin' to each entry or pass basins=[name]."
        )
    lowered = {c.lower() for c in chosen}
    if obs and all(has_basin) and not any(str(r["basin"]).lower() in lowered for r in obs):
        raise ValueError(
            f"observations: expected entries for the basins drawn {chosen}, found basins "
            f"{sorted({str(r['basin']) for r in obs})}. Fix: name the basins as the result "
            "does, or pass observations=None."
        )

    shown, units = as_display(interior)
    lat_dim = [d for d in shown.dims if d != "basin"][0]
    w = figure_width(width)
    fs = fonts(w)
    n = len(chosen)
    with mpl.rc_context(rc(fs)):
        fig, axes = plt.subplots(n, 1, figsize=(w, 4.0), sharex=True, squeeze=False)
        axes = axes[:, 0]
        handles = {}
        spans = []
        for ax, name in zip(axes, chosen):
            spans.append(_transport_panel(ax, data, shown, bc, name, lat_dim, meanings, obs,
                                          len(chosen), fs, handles))
            ax.set_ylabel(f"northward transport ({units})" if units else "northward transport",
                          fontsize=fs["base"])
        lo, hi = min(a for a, _ in spans), max(b for _, b in spans)
        axes[-1].set_xlim(lo, hi)
        axes[-1].xaxis.set_major_locator(mticker.MultipleLocator(30 if hi - lo > 60 else 15))
        axes[-1].set_xlabel("latitude", fontsize=fs["base"])
        axes[-1].xaxis.set_major_formatter(latitude_formatter())
        # Curves and observations first, then the shaded regions.
        order = sorted(handles, key=lambda k: (k not in ("interior", "bc", "obs"), 0))
        ncols = legend_columns([h.get_label() for h in handles.values()], fs, w)
        rows = -(-len(handles) // ncols)
        small, base = fs["small"], fs["base"]
        legend_h = rows * 1.3 * line_height(small) + 0.1
        # Room for the tick labels (up to "-100": a minus sign is wider than a digit, so five
        # characters' worth), the axis labels, each panel's title and the legend.
        left = line_height(base) + text_width(5, small) + 0.14
        bottom = line_height(small) + 0.06 + line_height(base) + 0.04 + legend_h
        title_h = line_height(base) + 0.04
        top = 0.06 + title_h + (line_height(fs["title"]) + 0.04 if title else 0.0)
        gap = title_h + 0.1
        panel_h = 1.5 + 0.1 * (w - 3.5)
        fig.set_size_inches(w, top + bottom + n * panel_h + (n - 1) * gap)
        place_panels(fig, axes, left=left, right=0.12, bottom=bottom, top=top, gap=gap,
                     stacked=True)
        fig.legend(handles=[handles[k] for k in order], loc="lower center",
                   bbox_to_anchor=(0.5, 0.02 / fig.get_figheight()), ncols=ncols,
                   frameon=False, fontsize=small, handlelength=1.8, columnspacing=1.0,
                   borderaxespad=0.0, borderpad=0.0)
        if title:
            fig.suptitle(title, fontsize=fs["title"], y=1 - 0.04 / fig.get_figheight(),
                         va="top")
    return fig, axes


def _transport_panel(ax, data, shown, bc, name, lat_dim, meanings, obs, n_panels, fs, handles):
    lat = shown[lat_dim].values
    y = shown.sel(basin=name).values
    status = data["row_status"].sel(basin=name).values if meanings else np.zeros(lat.size, int)
    present = np.isfinite(y) | np.isin(status, [v for v, m in meanings.items()
                                                if m not in ("no_ocean", "land")])
    if not present.any():
        present = np.ones(lat.size, bool)
    lo, hi = lat[present].min(), lat[present].max()
    dlat = np.median(np.diff(lat)) if lat.size > 1 else 1.0
    shade_row_status(ax, lat, status, meanings, handles)
    ax.axhline(0, color="0.5", lw=0.5, zorder=1)
    (line,) = ax.plot(lat, y, color="#08306b", lw=1.1, zorder=3, label="Sverdrup interior")
    handles.setdefault("interior", line)
    if bc is not None:
        yb, _ = as_display(bc.sel(basin=name))
        (line,) = ax.plot(lat, yb.values, color="#cb181d", lw=1.0, ls="--", zorder=3,
                          label="western boundary current")
        handles.setdefault("bc", line)
    mine = [r for r in obs if n_panels == 1 and not r.get("basin")
            or str(r.get("basin", "")).lower() == name.lower()]
    for r in mine:
        spread = r.get("spread")
        spread = None if spread is None or not np.isfinite(spread) else float(spread)
        eb = ax.errorbar(r["lat"], r["transport"], yerr=spread, fmt="o", ms=3, color="k",
                         mfc="white", mew=0.8, elinewidth=0.8, capsize=2, zorder=4)
        handles.setdefault("obs", eb)
        eb.set_label("observed (\u00b1 spread)")
        ax.annotate(str(r["name"]), (r["lat"], r["transport"]), xytext=(4, 3),
                    textcoords="offset points", fontsize=fs["small"] - 1, color="0.15",
                    zorder=5, bbox={"boxstyle": "square,pad=0.1", "fc": "white", "ec": "none",
                                    "alpha": 0.75})
    ax.set_title(name, fontsize=fs["base"], loc="left")
    style_axes(ax, fs)
    return lo - dlat, hi + dlat


def _observation_rows(observations) -> list[dict]:
    if observations is None:
        return []
    if isinstance(observations, xr.Dataset):
        # One entry per position along the dimension of ``transport`` (e.g. "current"), whose
        # coordinate values are the names.
        dim = observations["transport"].dims[0]
        columns = [k for k in observations.data_vars if observations[k].dims == (dim,)]
        rows = []
        for i in range(observations.sizes[dim]):
            row = {k: observations[k].values[i].item() for k in columns}
            row.setdefault("name", str(observations[dim].values[i]))
            rows.append(row)
    elif hasattr(observations, "to_dict"):
        rows = list(observations.to_dict("records"))
    else:
        rows = [dict(r) for r in observations]
    for r in rows:
        missing = [k for k in ("name", "lat", "transport") if k not in r]
        if missing:
            raise ValueError(
                f"observations: expected each entry to have name, lat, transport (and optionally "
                f"spread, basin), found an entry without {missing}: {r}. Fix: pass e.g. "
                "[{'name': 'Current', 'lat': 27, 'transport': 31, 'spread': 3}] or "
                "sverdrup_kit.ocean.observations.boundary_current_observations()."
            )
    return rows
