"""The machinery of a map: the grid laid out for drawing, projections, land, shading, layout."""

from __future__ import annotations

import cartopy.crs as ccrs
import matplotlib.pyplot as plt
import numpy as np
from cartopy.feature import ShapelyFeature
from matplotlib import colors as mcolors
from matplotlib import ticker as mticker

from ..geometry.coords import require_dataarray
from ..geometry.grid import cell_edges
from ._coastlines import coastline_mode, gshhs_coastlines, gshhs_folder
from ._inputs import canonical_2d, mask_like
from ._style import (
    LAND_COLOUR,
    REASONS,
    SECONDS_PER_YEAR,
    Shade,
    as_display,
    axis_label,
    cmocean,
    colorbar,
    colour_levels,
    colour_ticks,
    extend_of,
    figure_width,
    fonts,
    long_name,
)


class MapGrid:
    """A global or regional field laid out for drawing: rolled so no cell crosses the seam."""

    def __init__(self, lat, lon, periodic, land):
        self.lat, self.periodic = lat, periodic
        self.lat_e = np.clip(cell_edges(lat), -90, 90)
        if periodic:
            # Put the seam of the map through the longitude with most land, so that basins are
            # drawn whole (through a continent on the synthetic world, Africa-Europe on Earth).
            band = np.abs(lat) < 60
            frac = land[band].mean(axis=0) if band.any() else land.mean(axis=0)
            self.shift = int(np.argmax(frac))
        else:
            self.shift = 0
        self.lon = np.roll(lon, -self.shift)
        if periodic and self.shift:
            self.lon[-self.shift:] += 360.0
        self.lon_e = cell_edges(self.lon)
        if periodic:
            # Edges exactly on the seam project to either side of the map and make cartopy
            # split every cell along it; a hair's breadth inside keeps each cell whole.
            self.lon_e[0] += 1e-6
            self.lon_e[-1] -= 1e-6
        self.central_longitude = float(0.5 * (self.lon_e[0] + self.lon_e[-1]))
        self.central_longitude = (self.central_longitude + 180) % 360 - 180

    def roll(self, a: np.ndarray) -> np.ndarray:
        return np.roll(a, -self.shift, axis=-1)

    def cyclic(self, a: np.ndarray):
        """Centres and values with the first column repeated, for contouring across the seam."""
        a = self.roll(a)
        if not self.periodic:
            return self.lon, a
        return np.append(self.lon, self.lon[0] + 360.0), np.concatenate([a, a[:, :1]], axis=1)


def projection_of(name: str, central_longitude: float):
    key = str(name).lower().replace(" ", "").replace("_", "")
    if key == "robinson":
        return ccrs.Robinson(central_longitude=central_longitude)
    if key == "platecarree":
        return ccrs.PlateCarree(central_longitude=central_longitude)
    raise ValueError(
        f"projection: expected 'robinson' or 'platecarree', found {name!r}. Fix: pass "
        "projection='robinson'."
    )


def new_map(width, projection, grid: MapGrid, *, central_longitude=None):
    w = figure_width(width)
    fs = fonts(w)
    cl = grid.central_longitude if central_longitude is None else float(central_longitude)
    proj = projection_of(projection, cl)
    # Height: the map's own aspect at 88 % of the width, plus room for labels and colour bar.
    if grid.periodic:
        aspect = 0.5
    else:
        lat_span = grid.lat_e[-1] - grid.lat_e[0]
        aspect = float(np.clip(lat_span / (grid.lon_e[-1] - grid.lon_e[0]), 0.3, 1.5))
    height = 0.88 * w * aspect + 0.55 + 0.06 * w
    fig = plt.figure(figsize=(w, height), layout="constrained")
    ax = fig.add_subplot(1, 1, 1, projection=proj)
    if grid.periodic:
        ax.set_global()
    else:
        ax.set_extent([grid.lon_e[0], grid.lon_e[-1], grid.lat_e[0], grid.lat_e[-1]],
                      crs=ccrs.PlateCarree())
    return fig, ax, fs


def draw_land_and_coast(ax, grid: MapGrid, land: np.ndarray, mode: str):
    if mode == "none":
        return
    pc = ccrs.PlateCarree()
    shown = np.ma.masked_where(~grid.roll(land), np.ones(land.shape))
    ax.pcolormesh(grid.lon_e, grid.lat_e, shown, transform=pc, zorder=3,
                  cmap=mcolors.ListedColormap([LAND_COLOUR]), vmin=0, vmax=1, rasterized=True)
    if mode == "gshhs":
        folder = gshhs_folder()
        ax.add_feature(ShapelyFeature(gshhs_coastlines(folder), pc, facecolor="none",
                                      edgecolor="0.15", linewidth=0.35), zorder=4)
    elif 0 < land.mean() < 1:
        # Outline the land cells themselves (not a smoothed curve between centres): contour a
        # mask refined k times so the line follows the cell edges to within 1/(2k) cell.
        lon_f, lat_f, fine = _refined(grid, land)
        ax.contour(lon_f, lat_f, fine, levels=[0.5], colors="0.3", linewidths=0.4,
                   transform=pc, zorder=4)


def _subcentres(edges: np.ndarray, k: int) -> np.ndarray:
    """Centres of k equal sub-cells of each cell between consecutive edges."""
    frac = (np.arange(k) + 0.5) / k
    return (edges[:-1, None] + np.diff(edges)[:, None] * frac[None, :]).ravel()


def gridlines(ax, fs, grid: MapGrid, width_in: float):
    # Meridians crowd together along the bottom edge of a Robinson map, so its longitude labels
    # need half as much again of the spacing of a rectangular map.
    span = grid.lon_e[-1] - grid.lon_e[0]
    per_label = 360.0 / (4 if width_in < 5 else 6)
    if not isinstance(ax.projection, ccrs.PlateCarree):
        per_label *= 1.5
    dlon = min((d for d in (10, 15, 20, 30, 45, 60, 90) if d >= per_label * span / 360.0),
               default=90)
    gl = ax.gridlines(crs=ccrs.PlateCarree(), draw_labels=True, linewidth=0.3, color="0.4",
                      alpha=0.6, linestyle=":", x_inline=False, y_inline=False, zorder=5)
    gl.top_labels = False
    gl.right_labels = False
    gl.xlocator = mticker.FixedLocator(np.arange(-180, 181, dlon))
    lat_span = grid.lat_e[-1] - grid.lat_e[0]
    dlat = min((d for d in (5, 10, 15, 20, 30) if d >= lat_span / 5), default=30)
    gl.ylocator = mticker.FixedLocator(np.arange(-90, 91, dlat))
    gl.xlabel_style = {"size": fs["small"] - 0.5, "color": "0.2"}
    gl.ylabel_style = {"size": fs["small"] - 0.5, "color": "0.2"}
    return gl


def _refined(grid: MapGrid, mask: np.ndarray, k: int = 4):
    """A cell mask refined k times, so that contours of it follow the cell edges."""
    fine = np.repeat(np.repeat(grid.roll(mask).astype(float), k, axis=0), k, axis=1)
    return _subcentres(grid.lon_e, k), _subcentres(grid.lat_e, k), fine


def shade_cells(ax, grid: MapGrid, mask: np.ndarray, shade: Shade, label=None):
    """Shade grid cells in the style of ``shade`` and return a legend handle."""
    lon_f, lat_f, fine = _refined(grid, mask)
    ax.contourf(lon_f, lat_f, fine, levels=[0.5, 1.5], colors=[shade.facecolor],
                hatches=[shade.hatch], transform=ccrs.PlateCarree(),
                zorder=2)
    return shade.patch(label)


def legend_below(fig, ax, handles, fs):
    if not handles:
        return
    ncols = min(2 if fig.get_figwidth() < 5 else 3, len(handles))
    fig.legend(handles=handles, loc="outside lower center", frameon=False, ncols=ncols,
               fontsize=fs["small"], handlelength=1.6, columnspacing=1.0)
    # Grow the figure by the legend's rows so that the map keeps its size.
    rows = -(-len(handles) // ncols)
    fig.set_figheight(fig.get_figheight() + rows * fs["small"] * 1.6 / 72 + 0.05)


def map_core(da, *, ocean_mask, cmap, robust, vmax, symmetric, width, projection,
              central_longitude, coastlines, title, label, missing_label, to_per_year,
              extra_shading=None):
    shown, units = as_display(da, to_per_year=to_per_year)
    lat, lon, values, periodic = canonical_2d(shown, "data")
    if ocean_mask is not None:
        ocean = mask_like(require_dataarray(ocean_mask, "ocean_mask").astype(float), lat, lon,
                           "ocean_mask")
    else:
        ocean = np.isfinite(values)
    land = ~ocean
    grid = MapGrid(lat, lon, periodic, land)
    if symmetric is None:
        finite = values[np.isfinite(values)]
        # Only non-negative fields (magnitudes) get a sequential map; anything that can be
        # negative is shown about zero so that its sign reads at a glance.
        symmetric = bool(finite.size and finite.min() < 0)
    if vmax is not None and to_per_year and str(da.attrs.get("units", "")) in ("m s-1", "m/s"):
        vmax = vmax * SECONDS_PER_YEAR
    levels, exp, (below, above) = colour_levels(values, robust=robust, symmetric=symmetric, vmax=vmax)
    scale = 10.0**exp
    if cmap is None:
        cmap = cmocean.cm.balance if symmetric else cmocean.cm.amp
    norm = mcolors.BoundaryNorm(levels / scale, ncolors=cmap.N, extend=extend_of(below, above))
    fig, ax, fs = new_map(width, projection, grid, central_longitude=central_longitude)
    mesh = ax.pcolormesh(grid.lon_e, grid.lat_e, grid.roll(values) / scale, cmap=cmap, norm=norm,
                         transform=ccrs.PlateCarree(), zorder=1, rasterized=True)
    handles = []
    missing = ocean & ~np.isfinite(values)
    if missing_label and missing.any():
        handles.append(shade_cells(ax, grid, missing, REASONS["equatorial_band"],
                                    missing_label))
    for mask, shade in extra_shading or ():
        if mask.any():
            handles.append(shade_cells(ax, grid, mask, shade))
    mode = coastline_mode(coastlines, lat, lon, land, periodic)
    draw_land_and_coast(ax, grid, land, mode)
    gridlines(ax, fs, grid, fig.get_figwidth())
    ticks = colour_ticks(levels, fig.get_figwidth()) / scale
    cb_label = label if label is not None else axis_label(long_name(da, "value"), units, exp)
    colorbar(fig, ax, mesh, cb_label, fs, extend=extend_of(below, above), ticks=ticks)
    if title:
        ax.set_title(title, fontsize=fs["title"])
    return fig, ax, handles
