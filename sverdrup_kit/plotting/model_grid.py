"""Figure: the model's own depth-integrated transport beside the Sverdrup transport of its
stress, one panel per basin, with their difference."""

from __future__ import annotations

import matplotlib.pyplot as plt

__all__ = ["plot_model_vs_sverdrup"]


def _lat_label(x, _pos=None):
    if abs(x) < 1e-9:
        return "0"
    return f"{abs(x):g}{'N' if x > 0 else 'S'}"


def plot_model_vs_sverdrup(result, *, basins=None, width=7.2, lat_range=(-60, 60)):
    """Transport against latitude for each basin: model, Sverdrup, and model minus Sverdrup.

    Parameters
    ----------
    result : xarray.Dataset
        From :func:`sverdrup_kit.model_circulation` called with the model's stress
        (``model_interior_transport``, ``interior_transport``, ``transport_difference``).
    basins : list of str, optional
        Basins to draw; default all.
    width : float, optional
        Figure width in inches (7.2: a journal page).
    lat_range : (float, float), optional
        Latitudes shown.

    Returns
    -------
    matplotlib.figure.Figure
    """
    missing = [v for v in ("model_interior_transport", "interior_transport",
                           "transport_difference") if v not in result]
    if missing:
        raise KeyError(
            f"result: expected the output of model_circulation(..., taux=, tauy=), found no "
            f"{missing}. Fix: pass the model's own stress to model_circulation."
        )
    names = list(result.basin.values) if basins is None else list(basins)
    n = len(names)
    fig, axes = plt.subplots(1, n, figsize=(width, 0.55 * width), sharey=True, squeeze=False)
    lat = result.lat.values
    keep = (lat >= lat_range[0]) & (lat <= lat_range[1])
    for ax, name in zip(axes[0], names):
        m = result.model_interior_transport.sel(basin=name).values
        s = result.interior_transport.sel(basin=name).values
        d = result.transport_difference.sel(basin=name).values
        ax.axvline(0.0, color="0.6", lw=0.6)
        ax.plot(s[keep], lat[keep], "k-", lw=1.4, label="Sverdrup, from the model's stress")
        ax.plot(m[keep], lat[keep], "C0-", lw=1.2, label="model, depth-integrated")
        ax.plot(d[keep], lat[keep], "C3--", lw=1.0, label="model minus Sverdrup")
        ax.set_title(str(name).replace("_", " "), fontsize=9)
        ax.set_xlabel("northward transport (Sv)", fontsize=8)
        ax.tick_params(labelsize=7)
        ax.yaxis.set_major_formatter(plt.FuncFormatter(_lat_label))
    axes[0, 0].set_ylabel("latitude", fontsize=8)
    handles, labels = axes[0, 0].get_legend_handles_labels()
    fig.legend(handles, labels, loc="lower center", ncol=3, fontsize=7, frameon=False)
    fig.subplots_adjust(bottom=0.2, wspace=0.08)
    return fig
