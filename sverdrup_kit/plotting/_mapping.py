"""The machinery of a map: the grid laid out for drawing, projections, land, shading, layout.

Why maps are drawn this way (speed; see docs/performance.md): everything is projected here
with one ``transform_points`` call per artist and handed to plain matplotlib, instead of
letting cartopy reproject each mesh, contour and polygon at every draw. Both projections
offered (Robinson and Plate Carree) are linear in longitude at a fixed latitude,
``x = k(lat) (lon - lon0)``, so a point is projected at half its offset from the centre and its
``x`` doubled: nothing wraps at the seam. Regions are merged into polygons that follow the
cell edges; the layout is computed in inches, not searched for by a layout engine; grid lines
and their labels are plain lines and texts; GSHHS coast lines are projected once per process.
"""

from __future__ import annotations

from functools import lru_cache
from typing import NamedTuple

import cartopy.crs as ccrs
import matplotlib.pyplot as plt
import numpy as np
import shapely
from matplotlib import colors as mcolors
from matplotlib import patches as mpatches
from matplotlib import transforms as mtransforms
from matplotlib.axes import Axes
from matplotlib.collections import LineCollection
from matplotlib.path import Path

from ..geometry.coords import require_dataarray
from ..geometry.grid import cell_edges
from ._coastlines import coastline_mode, gshhs_coastlines, gshhs_folder
from ._inputs import canonical_2d, mask_like, runs
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
    legend_columns,
    long_name,
)

_PC = ccrs.PlateCarree()


class MapGrid:
    """A global or regional field laid out for drawing: rolled so no cell crosses the seam.

    On a global grid the seam runs along a cell edge: next to ``central_longitude + 180`` when
    one is asked for (the centre then moves by at most half a cell), else through the
    longitude with most land (so that basins are drawn whole), rounded to 10 degrees so that
    every map of one data set, whose land differs by a few cells, gets the same centre.
    """

    def __init__(self, lat, lon, periodic, land, central_longitude=None):
        self.lat, self.periodic = lat, periodic
        self.lat_e = np.clip(cell_edges(lat), -90, 90)
        west = cell_edges(lon)[:-1]
        if periodic and central_longitude is None:
            band = np.abs(lat) < 60
            frac = land[band].mean(axis=0) if band.any() else land.mean(axis=0)
            seam = 10.0 * np.round(west[int(np.argmax(frac))] / 10.0)
            central_longitude = seam - 180.0
        if periodic:
            seam = float(central_longitude) + 180.0
            self.shift = int(np.argmin(np.abs((west - seam + 180.0) % 360.0 - 180.0)))
        else:
            self.shift = 0
        self.lon = np.roll(lon, -self.shift)
        if periodic and self.shift:
            self.lon[-self.shift:] += 360.0
        self.lon_e = cell_edges(self.lon)
        self.middle = float(0.5 * (self.lon_e[0] + self.lon_e[-1]))
        self.central_longitude = (self.middle + 180.0) % 360.0 - 180.0

    def roll(self, a: np.ndarray) -> np.ndarray:
        return np.roll(a, -self.shift, axis=-1)

    def cyclic(self, a: np.ndarray):
        """Centres and values with the first column repeated, for contouring across the seam."""
        a = self.roll(a)
        if not self.periodic:
            return self.lon, a
        return np.append(self.lon, self.lon[0] + 360.0), np.concatenate([a, a[:, :1]], axis=1)

    def xy(self, proj, lon, lat):
        """Projected coordinates of points given in this grid's continuous longitudes."""
        lon, lat = np.broadcast_arrays(np.asarray(lon, float), np.asarray(lat, float))
        half = self.central_longitude + 0.5 * (lon - self.middle)
        pts = proj.transform_points(_PC, half.ravel(), np.clip(lat, -90, 90).ravel())
        return 2.0 * pts[:, 0].reshape(lon.shape), pts[:, 1].reshape(lon.shape)


def projection_of(name: str, central_longitude: float):
    key = str(name).lower().replace(" ", "").replace("_", "")
    if key == "robinson":
        return _projection("robinson", round(central_longitude, 9))
    if key == "platecarree":
        return _projection("platecarree", round(central_longitude, 9))
    raise ValueError(
        f"projection: expected 'robinson' or 'platecarree', found {name!r}. Fix: pass "
        "projection='robinson'."
    )


@lru_cache(maxsize=8)
def _projection(key: str, central_longitude: float):
    # One object per projection and centre: cartopy caches transforms per object.
    cls = ccrs.Robinson if key == "robinson" else ccrs.PlateCarree
    return cls(central_longitude=central_longitude)


def new_map(w: float, projection, grid: MapGrid):
    """A figure with a map axes and a colour-bar axes, both placed later by :func:`finish_map`."""
    proj = projection_of(projection, grid.central_longitude)
    fig = plt.figure(figsize=(w, 0.6 * w))
    ax = fig.add_axes((0.0, 0.0, 1.0, 1.0), projection=proj)
    if grid.periodic:
        ax.set_global()
    else:
        x, y = grid.xy(proj, *np.meshgrid(grid.lon_e[[0, -1]], grid.lat_e[[0, -1]]))
        xs, ys = grid.xy(proj, grid.lon_e, np.full(grid.lon_e.shape, grid.lat_e[0]))
        xn, _ = grid.xy(proj, grid.lon_e, np.full(grid.lon_e.shape, grid.lat_e[-1]))
        ax.set_xlim(min(x.min(), xs.min(), xn.min()), max(x.max(), xs.max(), xn.max()))
        ax.set_ylim(y.min(), y.max())
    cax = fig.add_axes((0.0, 0.0, 1.0, 1.0), label="<colorbar>")
    return fig, ax, cax


def mesh(ax, grid: MapGrid, values: np.ndarray, **kw):
    """A colour mesh of a (lat, lon) field on the grid's cells, projected once."""
    x, y = grid.xy(ax.projection, *np.meshgrid(grid.lon_e, grid.lat_e))
    return Axes.pcolormesh(ax, x, y, grid.roll(values), rasterized=True, **kw)


def _cells_geometry(grid: MapGrid, mask: np.ndarray):
    """The cells of a (lat, lon) mask merged into polygons in longitude and latitude."""
    m = grid.roll(np.asarray(mask, bool))
    boxes = []
    for i in np.flatnonzero(m.any(axis=1)):
        for j0, j1 in runs(m[i]):
            boxes.append((grid.lon_e[j0], grid.lat_e[i], grid.lon_e[j1 + 1], grid.lat_e[i + 1]))
    if not boxes:
        return None
    b = np.asarray(boxes)
    merged = shapely.orient_polygons(
        shapely.union_all(shapely.box(b[:, 0], b[:, 1], b[:, 2], b[:, 3])))
    # Meridians curve on a Robinson map: edges longer than 2.5 degrees get points between.
    if np.max(np.diff(grid.lat_e)) > 2.5:
        merged = shapely.segmentize(merged, 2.5)
    return merged


def _path(grid: MapGrid, proj, geom, *, closed=True) -> Path:
    verts, codes = [], []
    parts = getattr(geom, "geoms", [geom])
    for part in parts:
        rings = (part.exterior, *part.interiors) if closed else (part,)
        for ring in rings:
            c = np.asarray(ring.coords)
            if len(c) < 2:
                continue
            x, y = grid.xy(proj, c[:, 0], c[:, 1])
            verts.append(np.column_stack([x, y]))
            code = np.full(len(c), Path.LINETO, dtype=Path.code_type)
            code[0] = Path.MOVETO
            if closed:
                code[-1] = Path.CLOSEPOLY
            codes.append(code)
    if not verts:
        return Path(np.zeros((0, 2)))
    return Path(np.concatenate(verts), np.concatenate(codes))


def cells_patch(ax, grid: MapGrid, mask: np.ndarray, **kw):
    """One patch covering the cells of a mask, following their edges; None if none."""
    geom = _cells_geometry(grid, mask)
    if geom is None:
        return None
    patch = mpatches.PathPatch(_path(grid, ax.projection, geom), transform=ax.transData, **kw)
    # add_artist, not add_patch: the limits are set, and updating them walks every vertex.
    ax.add_artist(patch)
    return patch


def shade_cells(ax, grid: MapGrid, mask: np.ndarray, shade: Shade, label=None):
    """Shade grid cells in the style of ``shade`` and return a legend handle."""
    cells_patch(ax, grid, mask, facecolor=shade.facecolor, hatch=shade.hatch, hatchcolor="0.35",
                edgecolor="none", linewidth=0, zorder=2)
    return shade.patch(label)


@lru_cache(maxsize=4)
def _gshhs_path(folder: str, proj) -> Path:
    """GSHHS coast lines projected once per process and projection (cartopy cuts them at the
    seam)."""
    lines = proj.project_geometry(shapely.MultiLineString(list(gshhs_coastlines(folder))), _PC)
    verts, codes = [], []
    for line in getattr(lines, "geoms", [lines]):
        c = np.asarray(line.coords)
        if len(c) < 2:
            continue
        verts.append(c[:, :2])
        code = np.full(len(c), Path.LINETO, dtype=Path.code_type)
        code[0] = Path.MOVETO
        codes.append(code)
    return Path(np.concatenate(verts), np.concatenate(codes))


def draw_land_and_coast(ax, grid: MapGrid, land: np.ndarray, mode: str):
    if mode == "none":
        return
    # The data's own land cells; in "mask" mode their edges are the coast line.
    outline = mode == "mask" and 0 < land.mean() < 1
    cells_patch(ax, grid, land, facecolor=LAND_COLOUR, edgecolor="0.3" if outline else "none",
                linewidth=0.4 if outline else 0, zorder=3)
    if mode == "gshhs":
        coast = mpatches.PathPatch(_gshhs_path(gshhs_folder(), ax.projection), fill=False,
                                   edgecolor="0.15", linewidth=0.35, zorder=4,
                                   transform=ax.transData)
        ax.add_artist(coast)
        if not grid.periodic:
            # A regional map's axes reach beyond its data on a curved projection: no coast
            # is drawn where there is no data to read it against.
            region = _cells_geometry(grid, np.ones(land.shape, bool))
            coast.set_clip_path(_path(grid, ax.projection, region), ax.transData)


def _lon_text(lon: float) -> str:
    lon = (lon + 180.0) % 360.0 - 180.0
    if abs(lon) < 1e-9 or abs(abs(lon) - 180) < 1e-9:
        return f"{abs(lon):g}\u00b0"
    return f"{abs(lon):g}\u00b0{'E' if lon > 0 else 'W'}"


def _lat_text(lat: float) -> str:
    return "EQ" if abs(lat) < 1e-9 else f"{abs(lat):g}\u00b0{'N' if lat > 0 else 'S'}"


def gridlines(ax, fs, grid: MapGrid, width_in: float):
    """Dotted meridians and parallels, labelled west and south of the map."""
    proj = ax.projection
    # Meridians crowd together along the bottom edge of a Robinson map, so its longitude labels
    # need half as much again of the spacing of a rectangular map.
    span = grid.lon_e[-1] - grid.lon_e[0]
    per_label = 360.0 / (4 if width_in < 5 else 6)
    if not isinstance(proj, ccrs.PlateCarree):
        per_label *= 1.5
    dlon = min((d for d in (10, 15, 20, 30, 45, 60, 90) if d >= per_label * span / 360.0),
               default=90)
    lat_span = grid.lat_e[-1] - grid.lat_e[0]
    dlat = min((d for d in (5, 10, 15, 20, 30) if d >= lat_span / 5), default=30)
    south, north = (-90.0, 90.0) if grid.periodic else (grid.lat_e[0], grid.lat_e[-1])
    west, east = grid.lon_e[0], grid.lon_e[-1]
    first = np.ceil((west + 1e-6) / dlon) * dlon
    lons = np.arange(first, east - 1e-6, dlon)
    lats = np.arange(np.ceil(south / dlat) * dlat, north + 1e-9, dlat)
    lats = lats[(lats > south + 1e-6) & (lats < north - 1e-6)]
    t = np.linspace(south, north, 91)
    s = np.linspace(west, east, 181)
    segs = [np.column_stack(grid.xy(proj, np.full(t.shape, lo), t)) for lo in lons]
    segs += [np.column_stack(grid.xy(proj, s, np.full(s.shape, la))) for la in lats]
    ax.add_collection(LineCollection(segs, colors="0.4", alpha=0.6, linewidths=0.3,
                                     linestyles=":", zorder=5, transform=ax.transData),
                      autolim=False)
    style = {"fontsize": fs["small"] - 0.5, "color": "0.2", "clip_on": False}
    x0, x1 = ax.get_xlim()
    y0 = ax.get_ylim()[0]
    below = mtransforms.offset_copy(ax.transData, fig=ax.figure, y=-2, units="points")
    xs, _ = grid.xy(proj, lons, np.full(lons.shape, south))
    for lo, x in zip(lons, xs):
        if x0 <= x <= x1:
            ax.text(x, y0, _lon_text(lo), ha="center", va="top", transform=below, **style)
    left = mtransforms.offset_copy(ax.transData, fig=ax.figure, x=-2, units="points")
    xw, yw = grid.xy(proj, np.full(lats.shape, west), lats)
    for la, x, y in zip(lats, np.maximum(xw, x0), yw):
        ax.text(x, y, _lat_text(la), ha="right", va="center", transform=left, **style)


def finish_map(fig, ax, cax, handles, fs, *, title=None):
    """Size the figure and place the map, its labels, colour bar and legend, in inches.

    The map keeps the figure's width less room for the latitude labels on each side (so it
    stays centred); everything below it is stacked at heights worked out from the font sizes.
    """
    w = fig.get_figwidth()
    x0, x1 = ax.get_xlim()
    y0, y1 = ax.get_ylim()
    aspect = (y1 - y0) / (x1 - x0)
    small, base = fs["small"] / 72.0, fs["base"] / 72.0
    side = 4.5 * 0.6 * (fs["small"] - 0.5) / 72.0 + 0.08
    map_w = w - 2 * side
    map_h = map_w * aspect
    top = 0.06 + (1.6 * fs["title"] / 72.0 if title else 0.0)
    lon_labels = 1.3 * small + 0.06
    cb_gap, cb_h = 0.06, 0.1
    cb_text = 1.35 * small + 0.04 + 1.4 * base
    ncols = legend_columns([h.get_label() for h in handles], fs, w) if handles else 1
    rows = -(-len(handles) // ncols) if handles else 0
    legend = rows * 1.7 * small + 0.1 if rows else 0.04
    below = lon_labels + (cb_gap + cb_h + cb_text if cax is not None else 0.0) + legend
    h = top + map_h + below
    fig.set_size_inches(w, h)
    ax.set_position((side / w, below / h, map_w / w, map_h / h))
    if cax is not None:
        cb_w = 0.8 * map_w
        cax.set_position(((w - cb_w) / 2 / w, (legend + cb_text) / h, cb_w / w, cb_h / h))
    if handles:
        fig.legend(handles=handles, loc="lower center", bbox_to_anchor=(0.5, 0.02 / h),
                   frameon=False, ncols=ncols, fontsize=fs["small"], handlelength=1.6,
                   columnspacing=1.0, borderaxespad=0.0, borderpad=0.0)
    if title:
        ax.set_title(title, fontsize=fs["title"])


class Map(NamedTuple):
    """A map being drawn: its figure, axes, colour-bar axes, grid, fonts and legend handles."""

    fig: object
    ax: object
    cax: object
    grid: MapGrid
    fs: dict
    handles: list


def map_core(da, *, ocean_mask, cmap, robust, vmax, symmetric, width, projection,
             central_longitude, coastlines, label, missing_label, to_per_year,
             extra_shading=None) -> Map:
    """Draw a field's colour mesh, shading, land, coast and grid lines and its colour bar; the
    caller adds what is particular to it and calls :func:`finish_map`."""
    w = figure_width(width)
    fs = fonts(w)
    shown, units = as_display(da, to_per_year=to_per_year)
    lat, lon, values, periodic = canonical_2d(shown, "data")
    if ocean_mask is not None:
        ocean = mask_like(require_dataarray(ocean_mask, "ocean_mask").astype(float), lat, lon,
                          "ocean_mask")
    else:
        ocean = np.isfinite(values)
    land = ~ocean
    grid = MapGrid(lat, lon, periodic, land, central_longitude)
    if symmetric is None:
        finite = values[np.isfinite(values)]
        # Only non-negative fields (magnitudes) get a sequential map; anything that can be
        # negative is shown about zero so that its sign reads at a glance.
        symmetric = bool(finite.size and finite.min() < 0)
    if vmax is not None and to_per_year and str(da.attrs.get("units", "")) in ("m s-1", "m/s"):
        vmax = vmax * SECONDS_PER_YEAR
    levels, exp, (below, above) = colour_levels(values, robust=robust, symmetric=symmetric,
                                                vmax=vmax)
    scale = 10.0**exp
    if cmap is None:
        cmap = cmocean.cm.balance if symmetric else cmocean.cm.amp
    norm = mcolors.BoundaryNorm(levels / scale, ncolors=cmap.N, extend=extend_of(below, above))
    mode = coastline_mode(coastlines, lat, lon, land, periodic)
    fig, ax, cax = new_map(w, projection, grid)
    quads = mesh(ax, grid, values / scale, cmap=cmap, norm=norm, zorder=1)
    handles = []
    missing = ocean & ~np.isfinite(values)
    if missing_label and missing.any():
        handles.append(shade_cells(ax, grid, missing, REASONS["equatorial_band"],
                                   missing_label))
    for mask, shade in extra_shading or ():
        if mask.any():
            handles.append(shade_cells(ax, grid, mask, shade))
    draw_land_and_coast(ax, grid, land, mode)
    gridlines(ax, fs, grid, w)
    ticks = colour_ticks(levels, w) / scale
    cb_label = label if label is not None else axis_label(long_name(da, "value"), units, exp)
    colorbar(fig, cax, quads, cb_label, fs, extend=extend_of(below, above), ticks=ticks)
    return Map(fig, ax, cax, grid, fs, handles)
