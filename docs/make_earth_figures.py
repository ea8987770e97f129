"""Draw the guide's maps of the Earth geometry: basins, land classes, marginal seas, row quality.

Run:  .venv/bin/python docs/make_earth_figures.py

Needs the 1 degree relief fetched by ``python -m data_recipes.marine_climatology``. The maps
show geometry only (the relief's land and sea, the toolkit's basins, classes and seas); the
winds behind the row-quality map are invented (the synthetic world's analytic winds), with an
invented gap in the stress (North Atlantic, 30-34N) to show mostly-filled rows. Writes small PNGs to docs/figures/.
"""

from __future__ import annotations

import warnings
from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import xarray as xr  # noqa: E402
from matplotlib.colors import ListedColormap  # noqa: E402
from matplotlib.patches import Patch  # noqa: E402

from data_recipes.marine_climatology import path  # noqa: E402
from sverdrup_kit import sverdrup_transport  # noqa: E402
from sverdrup_kit.geometry.earth import EARTH_SEAS  # noqa: E402
from sverdrup_kit.geometry.rows import ROW_STATUS  # noqa: E402
from sverdrup_kit.synthetic import analytic_winds  # noqa: E402

OUT = Path(__file__).resolve().parent / "figures"


def earth_mask():
    e = xr.open_dataset(path("etopo60"))
    rose = e[list(e.data_vars)[0]]
    lat_name, lon_name = rose.dims
    rose = rose.assign_coords({lon_name: rose[lon_name] % 360}).sortby(lon_name)
    rose = rose.rename({lat_name: "lat", lon_name: "lon"})
    rose["lat"].attrs["units"] = "degrees_north"
    rose["lon"].attrs["units"] = "degrees_east"
    return rose < 0, rose


def invented_stress(ocean):
    lat, lon = ocean.lat.values, ocean.lon.values
    u, v = analytic_winds(lat, 0)
    u = np.broadcast_to(u[:, None], ocean.shape)
    v = np.broadcast_to(v[:, None], ocean.shape)
    s = np.hypot(u, v)
    tx = xr.DataArray(np.where(ocean, 1.22e-3 * 1.2 * s * u, np.nan), coords=ocean.coords,
                      dims=ocean.dims, attrs={"units": "Pa"})
    ty = xr.DataArray(np.where(ocean, 1.22e-3 * 1.2 * s * v, np.nan), coords=ocean.coords,
                      dims=ocean.dims, attrs={"units": "Pa"})
    # An invented gap in the "observations": most of the North Atlantic at 30-34N unobserved.
    gap = (ocean.lat > 30) & (ocean.lat < 34) & (ocean.lon > 300) & (ocean.lon < 345)
    return tx.where(~gap), ty.where(~gap)


def categorical(ax, field, colours, labels, title):
    cmap = ListedColormap(colours)
    ax.pcolormesh(field.lon, field.lat, field, cmap=cmap, vmin=-0.5, vmax=len(colours) - 0.5,
                  shading="nearest", rasterized=True)
    ax.set_title(title, fontsize=10)
    ax.set_xlabel("longitude (degrees east)")
    ax.set_ylabel("latitude (degrees north)")
    ax.set_aspect("equal")
    ax.legend(handles=[Patch(color=c, label=lab) for c, lab in zip(colours, labels)],
              loc="lower left", fontsize=7, ncol=2, framealpha=0.9)


def main():
    OUT.mkdir(exist_ok=True)
    ocean, rose = earth_mask()
    tx, ty = invented_stress(ocean)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        ds = sverdrup_transport(tx, ty, ocean_mask=ocean, relief=rose)
    land = ds.land_class
    size = (9.0, 4.8)

    fig, ax = plt.subplots(figsize=size)
    b = ds.basin_id.where(ocean, -2) + 2  # 0 land, 1 ocean outside, 2.. basins
    categorical(ax, b, ["0.55", "0.85", "#4c78a8", "#f58518", "#54a24b"],
                ["land", "in no basin", "Atlantic", "Pacific", "Indian"],
                "Earth basins (basins=None on an Earth mask)")
    fig.savefig(OUT / "earth_basins.png", dpi=80, bbox_inches="tight")
    plt.close(fig)

    fig, ax = plt.subplots(figsize=size)
    categorical(ax, land, ["white", "#e45756", "#f2cf5b", "0.35"],
                ["ocean", "small island (crossed)", "large island (restarts)", "continent"],
                "Land classes (face-connected land bodies, split at narrow straits)")
    fig.savefig(OUT / "land_classes.png", dpi=80, bbox_inches="tight")
    plt.close(fig)

    from sverdrup_kit.geometry.integral import sverdrup_geometry

    g = sverdrup_geometry(ocean, basins="earth")
    ic = ds.integration_class
    seas = np.full(ocean.shape, 0)
    seas[ic.values == 1] = 1
    seas[ic.values == 2] = 2
    seas[ic.values == 3] = 3
    seas[~ocean.values] = 4
    fig, ax = plt.subplots(figsize=size)
    categorical(ax, xr.DataArray(seas, coords=ocean.coords, dims=ocean.dims),
                ["0.9", "#4c78a8", "#e45756", "#f2cf5b", "0.55"],
                ["not integrated", "counted interior", "marginal sea (own streamfunction)",
                 "row left empty", "land"],
                "What each ocean cell counts for (integration_class)")
    names = g.sea_names
    for k, name in enumerate(names):
        spec = EARTH_SEAS[name]
        v = np.asarray(spec["polygon"])
        x = v[:, 0] % 360
        if np.ptp(x) > 180:
            continue
        ax.text(x.mean(), v[:, 1].mean(), name.replace("_", " "), fontsize=5, ha="center",
                color="k" if spec["policy"] == "counted" else "#7a1f1f")
    fig.savefig(OUT / "marginal_seas.png", dpi=80, bbox_inches="tight")
    plt.close(fig)

    st = ds.row_status
    fig, axes = plt.subplots(1, 3, figsize=(9.0, 4.2), sharey=True)
    colours = {0: "#54a24b", 1: "0.7", 2: "#4c78a8", 3: "#b279a2", 4: "white", 5: "#9d755d",
               6: "#e45756", 7: "#e45756", 8: "#f58518", 9: "#f2cf5b", 10: "#ff9da6",
               11: "0.4"}
    for ax, name in zip(axes, st.basin.values):
        s = st.sel(basin=name).values
        for la, code in zip(st.lat.values, s):
            ax.barh(la, 1, height=1.0, color=colours[int(code)], edgecolor="none")
        t = ds.interior_transport.sel(basin=name)
        ax2 = ax.twiny()
        ax2.plot(t, t.lat, "k", lw=0.8)
        ax2.set_xlabel("interior transport (Sv)", fontsize=8)
        ax.set_xticks([])
        ax.set_title(str(name), fontsize=10, pad=32)
    axes[0].set_ylabel("latitude (degrees north)")
    present = sorted({int(c) for c in np.unique(st.values)})
    fig.legend(handles=[Patch(color=colours[c], label=ROW_STATUS[c][0]) for c in present],
               loc="lower center", ncol=4, fontsize=7)
    fig.suptitle("Row status and interior transport (invented winds; an invented stress gap "
                 "at 30-34N in the North Atlantic)", fontsize=9, y=0.995)
    fig.subplots_adjust(bottom=0.2, top=0.76, wspace=0.15)
    fig.savefig(OUT / "row_quality.png", dpi=80)
    plt.close(fig)
    for p in sorted(OUT.glob("*.png")):
        print(p, p.stat().st_size // 1024, "kB")


if __name__ == "__main__":
    main()
