"""Figures of the wind-driven circulation: maps, transports against latitude, seasonal cycles.

Every function returns ``(fig, ax)`` (or ``(fig, axes)``) and never calls ``plt.show()``, so a
notebook shows the figure once and a script can save it. Figures are sized for print:
``width="column"`` (3.5 in), ``"page"`` (7.2 in) or a number of inches, with font sizes set on
each figure's own artists (global ``rcParams`` are left alone).

Conventions, the same on every figure:

- diverging fields use perceptually uniform cmocean maps centred on zero with symmetric limits
  from a robust percentile of ``|x|`` (98 by default) and discrete, round colour levels;
- every colour bar and axis label carries units read from the data's ``units`` attribute,
  with transports in "1e6 m3 s-1" shown as "Sv" (labels only: files keep UDUNITS spellings);
- where the Sverdrup relation is not expected to hold (the equatorial band, rows with no
  eastern coast, the western boundary-current zone) the figure shades and names it;
- coastlines never come from the network. A map draws the data's own land cells; when the
  crude GSHHS shapefile exists under ``$CARTOPY_DATA_DIR/shapefiles/gshhs/c/`` and the data's
  land looks like Earth's, its coast lines are added, read straight from that file.
"""

from __future__ import annotations

import logging
import os
import re
import tempfile
import warnings
from contextlib import contextmanager
from functools import lru_cache, partial
from pathlib import Path
from typing import NamedTuple

import cartopy.crs as ccrs
import matplotlib as mpl
import matplotlib.pyplot as plt
import numpy as np
import xarray as xr
from cartopy.feature import ShapelyFeature
from cartopy.io import shapereader
from matplotlib import colors as mcolors
from matplotlib import patches as mpatches
from matplotlib import ticker as mticker
from shapely.geometry import LineString

from ..geometry.coords import grid_layout, matching_positions, require_dataarray, to_canonical
from ..geometry.grid import cell_edges

with warnings.catch_warnings():
    # cmocean 3.0 builds its maps with an argument matplotlib 3.11 deprecates; the maps are
    # unaffected and users cannot act on the message, so it is not passed on.
    warnings.filterwarnings("ignore", message="Passing 'N' to ListedColormap",
                            category=DeprecationWarning)
    import cmocean

__all__ = [
    "FIGURE_WIDTHS",
    "map_field",
    "map_wind_stress",
    "map_curl",
    "map_ekman_pumping",
    "map_streamfunction",
    "plot_transport",
    "plot_hovmoller",
    "save_standard_figures",
]

#: Figure widths in inches: one journal column and a full page width (common practice; AGU and
#: AMS columns are 3.2-3.5 in, pages 6.5-7.3 in).
FIGURE_WIDTHS = {"column": 3.5, "page": 7.2}

SECONDS_PER_YEAR = 365.25 * 86400.0


class _Shade(NamedTuple):
    """How a region where the Sverdrup relation fails is drawn and named."""

    label: str
    facecolor: str
    hatch: str | None

    def patch(self, label: str | None = None) -> mpatches.Patch:
        return mpatches.Patch(facecolor=self.facecolor, hatch=self.hatch, edgecolor="0.35",
                              linewidth=0.4, label=label or self.label)


_DIMENSIONLESS = {"1", "", "dimensionless", "none"}

#: Display spellings of transport units (labels only).
_SVERDRUP_UNITS = {"1e6 m3 s-1": 1.0, "1e6 m3/s": 1.0, "sverdrup": 1.0, "sverdrups": 1.0,
                   "10^6 m3 s-1": 1.0, "m3 s-1": 1e-6, "m3/s": 1e-6}

#: How each row_status meaning is named on figures and how its region is shaded: hatching on a
#: pale neutral ground, so that it cannot be mistaken for a value of a diverging colour map.
_REASONS = {
    # V = curl/(rho0 beta) stays finite at the equator; the Ekman part (1/f) and equatorial
    # dynamics are what fail there.
    "equatorial_band": _Shade("equatorial band (Ekman ~ 1/f, equatorial dynamics)", "#ececec",
                              "...."),
    "no_eastern_coast": _Shade("no eastern coast", "#ececec", "\\\\\\"),
    "too_narrow": _Shade("basin too narrow", "#ececec", "xxxx"),
    "outside": _Shade("outside the basins", "#f7f7f7", "||||"),
}
_SKIP_REASONS = {"valid", "no_ocean", "ok", "land"}
#: The boundary-current zone is a strip one or two cells wide on coarse grids: a solid colour
#: that no diverging map uses keeps it visible at column width.
_BOUNDARY_ZONE = _Shade("western boundary-current zone", "#e6ab02", None)
_LAND_COLOUR = "#bdbdbd"
_GSHHS_FILES = ("GSHHS_c_L1.shp", "GSHHS_c_L1.shx", "GSHHS_c_L1.dbf")


# --- sizes and fonts ----------------------------------------------------------------------------


def _figure_width(width) -> float:
    if isinstance(width, str):
        if width in FIGURE_WIDTHS:
            return FIGURE_WIDTHS[width]
    elif isinstance(width, (int, float, np.floating, np.integer)) and 1.0 <= float(width) <= 20:
        return float(width)
    raise ValueError(
        f"width: expected 'column' (3.5 in), 'page' (7.2 in) or a width in inches between 1 and "
        f"20, found {width!r}. Fix: pass width='column' for a journal column."
    )


def _fonts(width_in: float) -> dict:
    """Font sizes in points: 7 pt at column width, 9 pt at page width (journals ask 6-9 pt)."""
    base = float(np.clip(5.5 + 0.5 * width_in, 7.0, 10.0))
    return {"base": base, "small": base - 1.0, "title": base + 0.5}


def _rc(fs: dict) -> dict:
    """Defaults for the artists created while one figure is drawn (restored afterwards)."""
    return {
        "font.size": fs["base"],
        "axes.labelsize": fs["base"],
        "axes.titlesize": fs["title"],
        "xtick.labelsize": fs["small"],
        "ytick.labelsize": fs["small"],
        "legend.fontsize": fs["small"],
        "axes.linewidth": 0.6,
        "lines.linewidth": 1.0,
        "xtick.major.width": 0.6,
        "ytick.major.width": 0.6,
        "hatch.linewidth": 0.5,
        "hatch.color": "0.35",
    }


def _style(ax, fs: dict) -> None:
    ax.tick_params(labelsize=fs["small"], width=0.6, length=2.5)


# --- labels and units ---------------------------------------------------------------------------


def _pretty_units(units: str) -> str:
    """UDUNITS spelling to a label: 'N m-3' -> 'N m$^{-3}$', '1e6 m3 s-1' -> 'Sv'."""
    u = str(units).strip()
    if u.lower() in _SVERDRUP_UNITS:
        return "Sv"
    out = []
    for token in u.split():
        m = re.fullmatch(r"([A-Za-z]+)\^?(-?\d+)", token)
        out.append(f"{m.group(1)}$^{{{m.group(2)}}}$" if m else token)
    return " ".join(out)


def _name(da: xr.DataArray, default: str = "") -> str:
    return str(da.attrs.get("long_name", da.name if da.name is not None else default))


def _label(name: str, units: str, scale_exp: int = 0) -> str:
    # "velocity (positive upward)" + units reads better as "velocity, positive upward (units)".
    name = re.sub(r"\s*\(([^()]*)\)\s*$", r", \1", name.strip())
    units = units.strip()
    if units in _DIMENSIONLESS:
        units = ""
    if scale_exp:
        units = f"10$^{{{scale_exp}}}$ {units}".strip()
    return f"{name} ({units})" if units else name


def _as_display(da: xr.DataArray, *, to_per_year: bool = False) -> tuple[xr.DataArray, str]:
    """Values and unit label for display: transports in Sv, optionally m s-1 as m yr-1."""
    units = str(da.attrs.get("units", "")).strip()
    if units.lower() in _SVERDRUP_UNITS:
        return da * _SVERDRUP_UNITS[units.lower()], "Sv"
    if to_per_year and units in ("m s-1", "m/s"):
        return da * SECONDS_PER_YEAR, "m yr$^{-1}$"
    return da, _pretty_units(units) if units else ""


def _nice_step(vmax: float, n: int) -> float:
    """The round step (1, 2, 2.5 or 5 times a power of ten) giving closest to n bins to vmax."""
    mag = 10.0 ** np.floor(np.log10(vmax / n))
    steps = [m * mag * f for f in (1.0, 10.0) for m in (1.0, 2.0, 2.5, 5.0)]
    return min(steps, key=lambda st: (abs(np.ceil(vmax / st - 1e-9) - n), st))


def _levels(values: np.ndarray, *, robust: float, symmetric: bool, vmax=None):
    """Round colour levels and the power of ten to show them in."""
    finite = values[np.isfinite(values)]
    if finite.size == 0:
        raise ValueError(
            "data: expected some finite values to map, found only missing values. Fix: check "
            "the selection (time, basin) and the land mask."
        )
    if not 0 < robust <= 100:
        raise ValueError(f"robust: expected a percentile in (0, 100], found {robust!r}.")
    if vmax is not None and not (np.isfinite(vmax) and vmax > 0):
        raise ValueError(f"vmax: expected a positive colour limit, found {vmax!r}.")
    if vmax is None:
        vmax = float(np.percentile(np.abs(finite) if symmetric else finite, robust))
        if vmax <= 0:
            vmax = float(np.abs(finite).max()) or 1.0
    step = _nice_step(vmax, 6)
    m = int(np.ceil(vmax / step - 1e-9))
    top = step * m
    exp = int(np.floor(np.log10(top)))
    exp = 0 if -1 <= exp <= 2 else exp
    # Whole multiples of the step, so that zero is exactly a level.
    levels = step * np.arange(-m if symmetric else 0, m + 1)
    return levels, exp, (finite.min() < levels[0], finite.max() > levels[-1])


def _ticks(levels: np.ndarray, width_in: float) -> np.ndarray:
    """Every k-th level counted from zero (or the first level), so that labels do not collide."""
    most = 5 if width_in < 5 else 7
    idx = np.arange(len(levels))
    zero = np.flatnonzero(np.isclose(levels, 0, atol=1e-12 * np.abs(levels).max()))
    origin = zero[0] if zero.size else 0
    for k in range(1, len(levels)):
        pick = (idx - origin) % k == 0
        if pick.sum() <= most:
            return levels[pick]
    return levels[[origin]]


def _extend(below: bool, above: bool) -> str:
    return {(True, True): "both", (True, False): "min", (False, True): "max"}.get(
        (below, above), "neither")


def _lat_formatter():
    def fmt(x, _pos):
        if abs(x) < 1e-9:
            return "EQ"
        return f"{abs(x):g}\u00b0{'N' if x > 0 else 'S'}"
    return mticker.FuncFormatter(fmt)


# --- inputs -------------------------------------------------------------------------------------


def _pick(data, names: tuple[str, ...], argname: str) -> xr.DataArray:
    if isinstance(data, xr.Dataset):
        for n in names:
            if n in data:
                return data[n]
        raise KeyError(
            f"{argname}: expected a Dataset with one of {list(names)}, found variables "
            f"{list(data.data_vars)}. Fix: pass the DataArray itself or the output of the "
            "matching sverdrup_kit function."
        )
    return require_dataarray(data, argname)


def _reduce_time(da: xr.DataArray, time, argname: str) -> xr.DataArray:
    if "time" not in da.dims:
        return da
    if isinstance(time, str) and time == "mean":
        # A row of all-land cells averages to NaN: that is the map's land, not news.
        with np.errstate(invalid="ignore"), _quiet_mean():
            return da.mean("time", keep_attrs=True)
    if isinstance(time, (int, np.integer)):
        return da.isel(time=int(time))
    raise ValueError(
        f"time: expected 'mean' or an integer position along 'time' for {argname}, found "
        f"{time!r}. Fix: pass time='mean' or time=0."
    )


@contextmanager
def _quiet_mean():
    """Silence the 'Mean of empty slice' warning of all-missing columns, and only that."""
    with warnings.catch_warnings():
        warnings.filterwarnings("ignore", message="Mean of empty slice", category=RuntimeWarning)
        yield


def _canonical_2d(da: xr.DataArray, argname: str):
    """(lat, lon, values, periodic) on ascending latitude and increasing longitude."""
    lay = grid_layout(da, argname=argname)
    others = [d for d in da.dims if d not in (lay.lat_name, lay.lon_name)]
    if others:
        raise ValueError(
            f"{argname}: expected a (lat, lon) field for a map, found extra dimensions "
            f"{others}. Fix: select one, e.g. {argname}.isel({others[0]}=0), or average it."
        )
    c = to_canonical(da, lay).transpose(lay.lat_name, lay.lon_name)
    return lay.lat, lay.lon, np.asarray(c.values, dtype=np.float64), lay.periodic


def _mask_like(mask: xr.DataArray, lat: np.ndarray, lon: np.ndarray, argname: str):
    """Boolean (lat, lon) array of ``mask`` > 0.5 on a field's canonical grid.

    The mask may use another latitude order or longitude convention; its cells must be the
    field's cells.
    """
    ml = grid_layout(mask, argname=argname)
    m = to_canonical(mask, ml).transpose(ml.lat_name, ml.lon_name).values
    same_lat = ml.lat.shape == lat.shape and np.allclose(ml.lat, lat, atol=1e-6)
    cols = matching_positions(ml.lon, lon, 360.0)
    if not same_lat or cols is None:
        raise ValueError(
            f"{argname}: expected the grid of the data ({lat.size} x {lon.size}), found "
            f"{ml.lat.size} x {ml.lon.size} with other latitudes or longitudes. Fix: pass the "
            "mask of the same grid, e.g. ds['ocean_mask']."
        )
    return np.asarray(m, dtype=float)[:, cols] > 0.5


# --- maps ---------------------------------------------------------------------------------------


class _MapGrid:
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


def _projection(name: str, central_longitude: float):
    key = str(name).lower().replace(" ", "").replace("_", "")
    if key == "robinson":
        return ccrs.Robinson(central_longitude=central_longitude)
    if key == "platecarree":
        return ccrs.PlateCarree(central_longitude=central_longitude)
    raise ValueError(
        f"projection: expected 'robinson' or 'platecarree', found {name!r}. Fix: pass "
        "projection='robinson'."
    )


@lru_cache(maxsize=2)
def _gshhs_geometries(folder: str):
    # Two crude GSHHS polygons are stored as holes only; pyshp logs a warning for each, which
    # would reach stderr (and break checked notebook cells). The shapes are read correctly.
    log = logging.getLogger("shapefile")
    level = log.level
    log.setLevel(logging.ERROR)
    try:
        reader = shapereader.Reader(os.path.join(folder, _GSHHS_FILES[0]))
        polygons = tuple(reader.geometries())
    finally:
        log.setLevel(level)
    return polygons


@lru_cache(maxsize=2)
def _gshhs_coastlines(folder: str):
    """Coast lines of the GSHHS polygons without the edges that close Antarctica.

    The Antarctic polygon is closed along the date line and the South Pole; drawn as an outline
    those edges would show as lines across the Southern Ocean, so segments on 180E or at the
    pole are left out.
    """
    segments = []
    for poly in _gshhs_geometries(folder):
        for part in getattr(poly, "geoms", [poly]):
            for ring in (part.exterior, *part.interiors):
                xy = np.asarray(ring.coords)
                fake = ((np.abs(xy[:-1, 0]) >= 179.999) & (np.abs(xy[1:, 0]) >= 179.999)) | (
                    (xy[:-1, 1] <= -89.9) | (xy[1:, 1] <= -89.9))
                for i0, i1 in _runs(~fake):
                    if i1 >= i0:
                        segments.append(LineString(xy[i0:i1 + 2]))
    return tuple(segments)


def _gshhs_folder() -> str | None:
    """Folder of the crude GSHHS level-1 shapefile under $CARTOPY_DATA_DIR, or None."""
    root = os.environ.get("CARTOPY_DATA_DIR")
    if not root:
        return None
    folder = os.path.join(root, "shapefiles", "gshhs", "c")
    ok = all(os.path.isfile(os.path.join(folder, f)) for f in _GSHHS_FILES)
    return folder if ok else None


#: Points that are land (True) or open ocean (False) on Earth at any grid of 5 degrees or finer
#: (from memory of a world map; each lies 5 degrees or more from a coast).
_EARTH_PROBES = [
    (0, 20, True), (45, 100, True), (40, -100, True), (-10, -55, True), (-25, 135, True),
    (62, 100, True), (25, -5, True), (55, -100, True), (48, 15, True), (30, 100, True),
    (-20, 22, True), (72, -40, True),
    (0, -150, False), (30, -40, False), (-30, 80, False), (-40, -20, False), (20, 160, False),
    (-35, -120, False), (15, -45, False), (50, -30, False), (-20, -100, False), (0, 85, False),
    (40, 170, False), (-60, -150, False),
]


def _looks_like_earth(lat, lon, land, periodic=True) -> bool:
    """Whether a land mask matches Earth's at unambiguous points (invented worlds do not)."""
    hits = []
    dlon = np.abs(np.median(np.diff(lon))) if lon.size > 1 else 1.0
    for la, lo, is_land in _EARTH_PROBES:
        if not (lat[0] - 2 <= la <= lat[-1] + 2):
            continue
        dist = np.abs((lon - lo + 180) % 360 - 180)
        if not periodic and dist.min() > dlon:
            continue
        i = int(np.argmin(np.abs(lat - la)))
        j = int(np.argmin(dist))
        hits.append(bool(land[i, j]) == is_land)
    return len(hits) >= 4 and np.mean(hits) >= 0.8


def _coastline_mode(coastlines: str, lat, lon, land, periodic=True) -> str:
    if coastlines not in ("auto", "gshhs", "mask", "none"):
        raise ValueError(
            f"coastlines: expected 'auto', 'gshhs', 'mask' or 'none', found {coastlines!r}. "
            "Fix: pass coastlines='auto'."
        )
    if coastlines == "gshhs" and _gshhs_folder() is None:
        raise FileNotFoundError(
            "coastlines='gshhs': expected shapefiles/gshhs/c/GSHHS_c_L1.shp (.shx, .dbf) under "
            f"$CARTOPY_DATA_DIR, found CARTOPY_DATA_DIR={os.environ.get('CARTOPY_DATA_DIR')!r}. "
            "Fix: run `python -m data_recipes.coastlines` and set CARTOPY_DATA_DIR, or pass "
            "coastlines='mask' to draw the data's own land."
        )
    if coastlines == "auto":
        use = _gshhs_folder() is not None and _looks_like_earth(lat, lon, land, periodic)
        return "gshhs" if use else "mask"
    return coastlines


def _new_map(width, projection, grid: _MapGrid, *, central_longitude=None):
    w = _figure_width(width)
    fs = _fonts(w)
    cl = grid.central_longitude if central_longitude is None else float(central_longitude)
    proj = _projection(projection, cl)
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


def _draw_land_and_coast(ax, grid: _MapGrid, land: np.ndarray, mode: str):
    if mode == "none":
        return
    pc = ccrs.PlateCarree()
    shown = np.ma.masked_where(~grid.roll(land), np.ones(land.shape))
    ax.pcolormesh(grid.lon_e, grid.lat_e, shown, transform=pc, zorder=3,
                  cmap=mcolors.ListedColormap([_LAND_COLOUR]), vmin=0, vmax=1, rasterized=True)
    if mode == "gshhs":
        folder = _gshhs_folder()
        ax.add_feature(ShapelyFeature(_gshhs_coastlines(folder), pc, facecolor="none",
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


def _gridlines(ax, fs, grid: _MapGrid, width_in: float):
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


def _colorbar(fig, ax, mappable, label, fs, *, extend, ticks=None):
    cb = fig.colorbar(mappable, ax=ax, orientation="horizontal", shrink=0.8, aspect=32,
                      pad=0.02, extend=extend, ticks=ticks)
    cb.set_label(label, fontsize=fs["base"])
    cb.ax.tick_params(labelsize=fs["small"], width=0.5, length=2)
    cb.ax.xaxis.set_major_formatter(_plain_formatter())
    cb.outline.set_linewidth(0.5)
    return cb


def _plain_formatter():
    """Tick labels without trailing zeros ('1.5', not '1.50'), with a true minus sign."""
    return mticker.FuncFormatter(lambda x, _pos: f"{x:.6g}".replace("-", "\u2212"))


def _refined(grid: _MapGrid, mask: np.ndarray, k: int = 4):
    """A cell mask refined k times, so that contours of it follow the cell edges."""
    fine = np.repeat(np.repeat(grid.roll(mask).astype(float), k, axis=0), k, axis=1)
    return _subcentres(grid.lon_e, k), _subcentres(grid.lat_e, k), fine


def _shade_cells(ax, grid: _MapGrid, mask: np.ndarray, shade: _Shade, label=None):
    """Shade grid cells in the style of ``shade`` and return a legend handle."""
    lon_f, lat_f, fine = _refined(grid, mask)
    ax.contourf(lon_f, lat_f, fine, levels=[0.5, 1.5], colors=[shade.facecolor],
                hatches=[shade.hatch], transform=ccrs.PlateCarree(),
                zorder=2)
    return shade.patch(label)


def _legend_below(fig, ax, handles, fs):
    if not handles:
        return
    ncols = min(2 if fig.get_figwidth() < 5 else 3, len(handles))
    fig.legend(handles=handles, loc="outside lower center", frameon=False, ncols=ncols,
               fontsize=fs["small"], handlelength=1.6, columnspacing=1.0)
    # Grow the figure by the legend's rows so that the map keeps its size.
    rows = -(-len(handles) // ncols)
    fig.set_figheight(fig.get_figheight() + rows * fs["small"] * 1.6 / 72 + 0.05)


def map_field(
    data,
    *,
    ocean_mask=None,
    cmap=None,
    robust: float = 98.0,
    vmax=None,
    symmetric=None,
    time="mean",
    width="column",
    projection: str = "robinson",
    central_longitude=None,
    coastlines: str = "auto",
    title=None,
    label=None,
    missing_label=None,
    to_per_year: bool = False,
):
    """Map one field on a cartopy projection, with a colour bar that states the units.

    Parameters
    ----------
    data : xarray.DataArray (lat, lon) or (time, lat, lon)
        Field on a latitude-longitude grid, any latitude order and longitude convention,
        missing on land.
    ocean_mask : xarray.DataArray (lat, lon), optional
        1 (or True) on ocean. Defaults to the cells where ``data`` has values. When given,
        ocean cells where ``data`` is missing are shaded and named ``missing_label``.
    cmap : matplotlib colormap, optional
        Defaults to cmocean ``balance``, or ``amp`` for fields with no negative values.
    robust : float
        Percentile of ``|data|`` that sets the colour limits (98: the top 2 % saturate).
    vmax : float, optional
        Colour limit in the units of ``data``, overriding ``robust``.
    symmetric : bool, optional
        Limits symmetric about zero; default: unless ``data`` has no negative values.
    time : "mean" or int
        Average over ``time`` or take one position along it.
    width : "column", "page" or float
        Figure width (3.5 in, 7.2 in or inches).
    projection : {"robinson", "platecarree"}
    central_longitude : float, optional
        Default: the map's seam runs through the longitude with most land.
    coastlines : {"auto", "gshhs", "mask", "none"}
        "mask" draws the data's land cells; "gshhs" adds crude GSHHS coast lines from
        ``$CARTOPY_DATA_DIR`` (never downloaded); "auto" uses GSHHS when the files exist and the
        data's land looks like Earth's, else "mask".
    title, label : str, optional
        Axes title; colour-bar label (default: long_name and units of ``data``).
    missing_label : str, optional
        Legend name of ocean cells without data (e.g. "no eastern coast").
    to_per_year : bool
        Show a velocity in m s-1 as m yr-1.

    Returns
    -------
    fig : matplotlib.figure.Figure
    ax : cartopy.mpl.geoaxes.GeoAxes
    """
    da = _reduce_time(require_dataarray(data, "data"), time, "data")
    w = _figure_width(width)
    fs = _fonts(w)
    with mpl.rc_context(_rc(fs)):
        fig, ax, handles = _map_core(
            da, ocean_mask=ocean_mask, cmap=cmap, robust=robust, vmax=vmax, symmetric=symmetric,
            width=width, projection=projection, central_longitude=central_longitude,
            coastlines=coastlines, title=title, label=label, missing_label=missing_label,
            to_per_year=to_per_year)
        _legend_below(fig, ax, handles, fs)
    return fig, ax


def _map_core(da, *, ocean_mask, cmap, robust, vmax, symmetric, width, projection,
              central_longitude, coastlines, title, label, missing_label, to_per_year,
              extra_shading=None):
    shown, units = _as_display(da, to_per_year=to_per_year)
    lat, lon, values, periodic = _canonical_2d(shown, "data")
    if ocean_mask is not None:
        ocean = _mask_like(require_dataarray(ocean_mask, "ocean_mask").astype(float), lat, lon,
                           "ocean_mask")
    else:
        ocean = np.isfinite(values)
    land = ~ocean
    grid = _MapGrid(lat, lon, periodic, land)
    if symmetric is None:
        finite = values[np.isfinite(values)]
        # Only non-negative fields (magnitudes) get a sequential map; anything that can be
        # negative is shown about zero so that its sign reads at a glance.
        symmetric = bool(finite.size and finite.min() < 0)
    if vmax is not None and to_per_year and str(da.attrs.get("units", "")) in ("m s-1", "m/s"):
        vmax = vmax * SECONDS_PER_YEAR
    levels, exp, (below, above) = _levels(values, robust=robust, symmetric=symmetric, vmax=vmax)
    scale = 10.0**exp
    if cmap is None:
        cmap = cmocean.cm.balance if symmetric else cmocean.cm.amp
    norm = mcolors.BoundaryNorm(levels / scale, ncolors=cmap.N, extend=_extend(below, above))
    fig, ax, fs = _new_map(width, projection, grid, central_longitude=central_longitude)
    mesh = ax.pcolormesh(grid.lon_e, grid.lat_e, grid.roll(values) / scale, cmap=cmap, norm=norm,
                         transform=ccrs.PlateCarree(), zorder=1, rasterized=True)
    handles = []
    missing = ocean & ~np.isfinite(values)
    if missing_label and missing.any():
        handles.append(_shade_cells(ax, grid, missing, _REASONS["equatorial_band"],
                                    missing_label))
    for mask, shade in extra_shading or ():
        if mask.any():
            handles.append(_shade_cells(ax, grid, mask, shade))
    mode = _coastline_mode(coastlines, lat, lon, land, periodic)
    _draw_land_and_coast(ax, grid, land, mode)
    _gridlines(ax, fs, grid, fig.get_figwidth())
    ticks = _ticks(levels, fig.get_figwidth()) / scale
    cb_label = label if label is not None else _label(_name(da, "value"), units, exp)
    _colorbar(fig, ax, mesh, cb_label, fs, extend=_extend(below, above), ticks=ticks)
    if title:
        ax.set_title(title, fontsize=fs["title"])
    return fig, ax, handles


def map_curl(data, **kw):
    """Map the wind-stress curl (N m-3) with the cmocean ``curl`` map; see :func:`map_field`.

    ``data`` is the DataArray from :func:`~sverdrup_kit.physics.operators.wind_stress_curl` or a Dataset
    holding ``wind_stress_curl`` (and perhaps ``ocean_mask``).
    """
    da = _pick(data, ("wind_stress_curl",), "data")
    kw.setdefault("cmap", cmocean.cm.curl)
    if isinstance(data, xr.Dataset) and "ocean_mask" in data:
        kw.setdefault("ocean_mask", data["ocean_mask"])
    return map_field(da, **kw)


def map_ekman_pumping(data, *, equatorial_half_width=None, limits_poleward_of: float = 10.0, **kw):
    """Map Ekman pumping in m yr-1 (positive upward), the equatorial band shaded and named.

    Parameters
    ----------
    data : xarray.Dataset or xarray.DataArray
        The Dataset from :func:`~sverdrup_kit.physics.ekman.ekman` (or one holding ``ekman_pumping``),
        or the ``ekman_pumping`` DataArray, in m s-1.
    equatorial_half_width : float, optional
        Half-width in degrees of the band left empty (default: the data's attrs, else 3).
        Ocean cells there are shaded and named.
    limits_poleward_of : float
        Take the robust colour limits from latitudes poleward of this (degrees): the beta
        term of the pumping grows as 1/f^2 next to the band and would otherwise wash out the
        gyres. 0 uses every latitude.
    **kw
        As in :func:`map_field` (``vmax`` in m s-1).

    Returns
    -------
    fig, ax
    """
    da = _pick(data, ("ekman_pumping",), "data")
    ds = data if isinstance(data, xr.Dataset) else None
    band = _equatorial_band(data if ds is not None else da, equatorial_half_width)
    kw.setdefault("cmap", cmocean.cm.delta)
    kw.setdefault("to_per_year", True)
    kw.setdefault("missing_label", f"{_REASONS['equatorial_band'].label}, |lat| < {band:g}\u00b0")
    reduced = _reduce_time(da, kw.get("time", "mean"), "data")
    if "ocean_mask" not in kw:
        # Only cells inside the band are shaded as the band: elsewhere a missing value is land
        # (the stress of a result may be filled over small islands).
        across = _ocean_across_band(reduced, band)
        known = _ocean_of(ds) if ds is not None else None
        kw["ocean_mask"] = across if known is None else _aligned_and(across, known)
    if kw.get("vmax") is None and limits_poleward_of > 0:
        lat_name = grid_layout(reduced, argname="data").lat_name
        far = np.abs(reduced.where(np.abs(reduced[lat_name]) >= limits_poleward_of).values)
        far = far[np.isfinite(far)]
        if far.size:
            kw["vmax"] = float(np.percentile(far, kw.get("robust", 98.0)))
    return map_field(da, **kw)


def _aligned_and(canon: xr.DataArray, other: xr.DataArray) -> xr.DataArray:
    """``canon`` (on the canonical grid) and ``other`` (any order), on the canonical grid."""
    lat_name, lon_name = canon.dims
    o = _mask_like(other.astype(float), canon[lat_name].values, canon[lon_name].values,
                   "ocean_mask")
    return canon.copy(data=((canon.values > 0) & o).astype(np.int8))


def _ocean_across_band(da: xr.DataArray, band: float) -> xr.DataArray:
    """Ocean mask of a field left empty in the equatorial band: a band cell is ocean when the
    rows just outside the band are ocean at its longitude on both sides."""
    lay = grid_layout(da, argname="data")
    c = to_canonical(da, lay).transpose(lay.lat_name, lay.lon_name)
    ocean = np.isfinite(c.values)
    inside = np.abs(lay.lat) < band
    north = np.flatnonzero(lay.lat >= band)
    south = np.flatnonzero(lay.lat <= -band)
    if inside.any() and north.size and south.size:
        ocean[inside] |= (ocean[north[0]] & ocean[south[-1]])[None, :]
    return xr.DataArray(ocean.astype(np.int8), dims=(lay.lat_name, lay.lon_name),
                        coords={lay.lat_name: lay.lat, lay.lon_name: lay.lon})


def _equatorial_band(obj, given) -> float:
    if given is not None:
        return float(given)
    for attrs in (obj.attrs, *(v.attrs for v in getattr(obj, "data_vars", {}).values())):
        if "equatorial_half_width" in attrs:
            try:
                return float(attrs["equatorial_half_width"])
            except (TypeError, ValueError):
                continue
    return 3.0


def map_wind_stress(data, tauy=None, *, every=None, reference=None, time="mean", width="column",
                    projection="robinson", coastlines="auto", title=None, robust=98.0):
    """Map wind-stress magnitude (shaded, cmocean ``amp``) with stress vectors.

    Parameters
    ----------
    data : xarray.Dataset with ``taux``, ``tauy``, or the DataArray ``taux`` (then pass
        ``tauy``)
        Stress in Pa on a latitude-longitude grid, missing on land.
    every : int, optional
        Draw one arrow every ``every`` cells in each direction (default: about 30 arrows
        around the globe).
    reference : float, optional
        Stress of the key arrow, in the units of the data (default: a round number near the
        90th percentile).
    time, width, projection, coastlines, title, robust
        As in :func:`map_field`.

    Returns
    -------
    fig, ax
    """
    if isinstance(data, xr.Dataset):
        taux, tauy = _pick(data, ("taux",), "data"), _pick(data, ("tauy",), "data")
    else:
        taux = require_dataarray(data, "taux")
        tauy = require_dataarray(tauy, "tauy")
    taux = _reduce_time(taux, time, "taux")
    tauy = _reduce_time(tauy, time, "tauy")
    units = str(taux.attrs.get("units", "Pa"))
    mag = np.hypot(taux, tauy).rename("wind_stress_magnitude").assign_attrs(
        long_name="wind stress magnitude", units=units)
    w = _figure_width(width)
    fs = _fonts(w)
    with mpl.rc_context(_rc(fs)):
        fig, ax, _ = _map_core(
            mag, ocean_mask=None, cmap=cmocean.cm.amp, robust=robust, vmax=None, symmetric=False,
            width=width, projection=projection, central_longitude=None, coastlines=coastlines,
            title=title, label=None, missing_label=None, to_per_year=False)
        lat, lon, tx, _ = _canonical_2d(taux, "taux")
        _, _, ty, _ = _canonical_2d(tauy, "tauy")
        step = every or max(1, int(round(lon.size / (22 if w < 5 else 40))))
        j0 = step // 2
        sl = (slice(j0, None, step), slice(j0, None, step))
        la2, lo2 = np.meshgrid(lat[sl[0]], lon[sl[1]], indexing="ij")
        u, v = tx[sl], ty[sl]
        ok = np.isfinite(u) & np.isfinite(v) & (np.abs(la2) < 88)
        speed = np.hypot(u[ok], v[ok])
        if reference is None:
            reference = _nice_step(float(np.percentile(speed, 90)), 1) if speed.size else 0.1
        # Arrows of the 95th-percentile stress reach a little beyond the next arrow.
        spacing_in = 0.85 * w * step / lon.size
        typical = float(np.percentile(speed, 95)) if speed.size else reference
        q = ax.quiver(lo2[ok], la2[ok], u[ok], v[ok], transform=ccrs.PlateCarree(), zorder=3.5,
                      scale=typical / (1.3 * spacing_in), scale_units="inches",
                      width=0.0035 * 3.5 / w, headwidth=3.5, headlength=3.5, headaxislength=3,
                      color="0.1")
        ax.quiverkey(q, 0.86, 0.03, reference, f"{reference:g} {_pretty_units(units)}",
                     labelpos="E", fontproperties={"size": fs["small"]}, coordinates="axes")
    return fig, ax


def _status_info(ds: xr.Dataset):
    """row_status values, meanings and legend names from its CF flag attributes."""
    st = ds["row_status"]
    values = np.atleast_1d(st.attrs.get("flag_values", []))
    meanings = str(st.attrs.get("flag_meanings", "")).split()
    if len(values) != len(meanings) or not meanings:
        raise ValueError(
            "row_status: expected CF attributes flag_values and flag_meanings of equal length, "
            f"found {list(values)} and {meanings}. Fix: pass the Dataset from "
            "sverdrup_kit.physics.sverdrup unchanged."
        )
    return {int(v): m for v, m in zip(values, meanings)}


def _reason_style(meaning: str) -> _Shade:
    if meaning in _REASONS:
        return _REASONS[meaning]
    return _Shade(meaning.replace("_", " "), "#ececec", "++")


def _basin_names(ds: xr.Dataset) -> list[str]:
    return [str(b) for b in ds["basin"].values]


def map_streamfunction(data, *, boundary_zone_km: float = 300.0, time="mean", width="column",
                       projection="robinson", coastlines="auto", title=None, robust=98.0,
                       vmax=None, contours: bool = True):
    """Map the Sverdrup streamfunction (Sv), with the regions where it does not hold shaded.

    Parameters
    ----------
    data : xarray.Dataset
        From :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport`: ``streamfunction`` (1e6 m3 s-1) and, when
        present, ``row_status`` (basin, lat) with CF flags, ``basin_id`` (lat, lon),
        ``western_coast_lon`` (basin, lat) and ``wind_stress_curl`` (its finite cells are the
        ocean). For a bare streamfunction DataArray only the equatorial band between cells
        with values is shaded (as "no Sverdrup solution").
    boundary_zone_km : float
        Width east of each western coast shaded as the western boundary-current zone, km
        (a few Munk or Stommel widths: 300 km is common practice on coarse grids). 0 turns it
        off.
    contours : bool
        Draw streamlines at the colour levels (negative dashed).
    time, width, projection, coastlines, title, robust, vmax
        As in :func:`map_field`.

    Returns
    -------
    fig, ax
    """
    psi = _reduce_time(_pick(data, ("sverdrup_streamfunction",), "data"), time, "sverdrup_streamfunction")
    ds = data if isinstance(data, xr.Dataset) else xr.Dataset()
    if not np.isfinite(boundary_zone_km) or boundary_zone_km < 0:
        raise ValueError(
            f"boundary_zone_km: expected a width >= 0 in km, found {boundary_zone_km!r}. "
            "Fix: pass e.g. boundary_zone_km=300, or 0 to leave the zone unshaded."
        )
    lay = grid_layout(psi, argname="streamfunction")
    ocean = _ocean_of(ds)
    if ocean is None:
        # A bare DataArray does not say where the ocean is: take its cells with values and the
        # equatorial band between them.
        ocean = _ocean_across_band(psi, _equatorial_band(psi, None))
    shading = []
    if "row_status" in ds and "basin_id" in ds:
        shading = _not_valid_cells(ds, lay, ocean, boundary_zone_km)
    w = _figure_width(width)
    fs = _fonts(w)
    with mpl.rc_context(_rc(fs)):
        fig, ax, handles = _map_core(
            psi, ocean_mask=ocean, cmap=cmocean.cm.balance, robust=robust, vmax=vmax,
            symmetric=True, width=width, projection=projection, central_longitude=None,
            coastlines=coastlines, title=title, label=None,
            missing_label="no Sverdrup solution" if not shading else None, to_per_year=False,
            extra_shading=shading)
        if contours:
            _streamlines(ax, psi, ocean, robust=robust, vmax=vmax)
        _legend_below(fig, ax, handles, fs)
    return fig, ax


def _ocean_of(ds: xr.Dataset) -> xr.DataArray | None:
    """The ocean of a result Dataset, from the variables that have values on all of it."""
    if "ocean_mask" in ds:
        return ds["ocean_mask"]
    for name in ("wind_stress_curl", "taux"):
        if name in ds:
            c = ds[name]
            c = c.notnull().any("time") if "time" in c.dims else c.notnull()
            return c.astype(np.int8)
    if "basin_id" in ds:
        return (ds["basin_id"] >= 0).astype(np.int8)
    return None


def _not_valid_cells(ds, lay, ocean_da, boundary_zone_km):
    """(mask, Shade) for each reason the Sverdrup relation fails, on the canonical grid."""
    meanings = _status_info(ds)
    status = ds["row_status"].transpose("basin", ...)
    bid_da = ds["basin_id"]
    bid = np.full(bid_da.shape, -1)
    for b in range(len(_basin_names(ds))):
        bid[_mask_like((bid_da == b).astype(float), lay.lat, lay.lon, "basin_id")] = b
    ocean = _mask_like(ocean_da.astype(float), lay.lat, lay.lon, "ocean_mask")
    st_lat = status[[d for d in status.dims if d != "basin"][0]]
    ny, nx = bid.shape
    cell_status = np.full((ny, nx), -1, dtype=int)
    for b, _ in enumerate(_basin_names(ds)):
        row = status.isel(basin=b).interp({st_lat.name: lay.lat}, method="nearest").values
        in_basin = bid == b
        cell_status = np.where(in_basin, np.asarray(row, dtype=float)[:, None], cell_status)
    out = {}
    for value, meaning in meanings.items():
        if meaning in _SKIP_REASONS:
            continue
        out[meaning] = [ocean & (cell_status == value), _reason_style(meaning)]
    # Ocean cells that no basin claims are rows without a coast to start from (a circumpolar
    # channel) when their whole row is ocean, and otherwise simply outside the basins.
    unclaimed = ocean & (bid < 0)
    if unclaimed.any():
        whole_row = unclaimed & ocean.all(axis=1)[:, None]
        if "no_eastern_coast" in out:
            out["no_eastern_coast"][0] = out["no_eastern_coast"][0] | whole_row
        else:
            out["no_eastern_coast"] = [whole_row, _REASONS["no_eastern_coast"]]
        out["outside"] = [unclaimed & ~whole_row, _REASONS["outside"]]
    if boundary_zone_km > 0 and "western_coast_lon" in ds:
        zone = _boundary_zone(ds, lay, bid, cell_status, meanings, boundary_zone_km)
        out["boundary_zone"] = [zone, _BOUNDARY_ZONE]
    return [tuple(v) for v in out.values()]


def _boundary_zone(ds, lay, bid, cell_status, meanings, km):
    valid_values = [v for v, m in meanings.items() if m in ("valid", "ok")]
    wb = ds["western_coast_lon"].transpose("basin", ...)
    lat_dim = [d for d in wb.dims if d != "basin"][0]
    zone = np.zeros(bid.shape, dtype=bool)
    lon = lay.lon
    # km to degrees of longitude on a sphere of radius 6371 km (111.195 km per degree).
    width_deg = km / (111.195 * np.maximum(np.cos(np.deg2rad(lay.lat)), 0.05))
    for b in range(wb.sizes["basin"]):
        west = wb.isel(basin=b).interp({lat_dim: lay.lat}, method="nearest").values
        east_of_coast = (lon[None, :] - west[:, None]) % 360.0
        z = (bid == b) & (east_of_coast <= width_deg[:, None])
        if valid_values:
            z &= np.isin(cell_status, valid_values)
        zone |= z
    return zone


def _streamlines(ax, psi, ocean_da, *, robust, vmax):
    """Contours of the streamfunction at its colour levels, negative dashed."""
    shown, _ = _as_display(psi)
    lat, lon, c, periodic = _canonical_2d(shown, "streamfunction")
    finite = c[np.isfinite(c)]
    if finite.size < 4 or finite.min() == finite.max():
        return
    levels, _, _ = _levels(c, robust=robust, symmetric=True, vmax=vmax)
    levels = levels[levels != 0]
    ocean = _mask_like(ocean_da.astype(float), lat, lon, "ocean_mask")
    grid = _MapGrid(lat, lon, periodic, ~ocean)
    lon_c, vals = grid.cyclic(c)
    levels = levels[(levels > np.nanmin(vals)) & (levels < np.nanmax(vals))]
    if levels.size:
        ax.contour(lon_c, lat, vals, levels=levels, colors="0.15", linewidths=0.35,
                   negative_linestyles="dashed", transform=ccrs.PlateCarree(), zorder=2.6)


# --- transports against latitude ----------------------------------------------------------------


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


def _runs(flags: np.ndarray):
    """Start and end indices of runs of True."""
    padded = np.concatenate([[False], flags, [False]])
    d = np.diff(padded.astype(int))
    return list(zip(np.flatnonzero(d == 1), np.flatnonzero(d == -1) - 1))


def plot_transport(data, *, basins=None, observations=None, time="mean", width="column",
                   boundary_current: bool = True, title=None):
    """Sverdrup interior and boundary-current transport against latitude, one panel per basin.

    Parameters
    ----------
    data : xarray.Dataset
        From :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport`: ``interior_transport`` (basin, lat) in
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
            "data: expected the Dataset from sverdrup_kit.physics.sverdrup with 'interior_transport' "
            f"(basin, lat), found {type(data).__name__}"
            + (f" with variables {list(data.data_vars)}" if isinstance(data, xr.Dataset) else "")
            + ". Fix: pass the whole result of sverdrup()."
        )
    interior = _reduce_time(data["interior_transport"], time, "interior_transport")
    names = _basin_names(data)
    if basins is None:
        # A basin with no valid row at all (a circumpolar channel) would be an empty panel.
        has_values = interior.notnull().any([d for d in interior.dims if d != "basin"]).values
        chosen = [n for n, ok in zip(names, has_values) if ok]
    else:
        chosen = list(basins)
    unknown = [b for b in chosen if b not in names]
    if unknown or not chosen:
        raise ValueError(f"basins: expected names among {names}, found {chosen}. "
                         "Fix: pass some of those names or None for all.")
    bc = None
    if boundary_current and "boundary_current_transport" in data:
        bc = _reduce_time(data["boundary_current_transport"], time, "boundary_current_transport")
    meanings = _status_info(data) if "row_status" in data else {}
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

    shown, units = _as_display(interior)
    lat_dim = [d for d in shown.dims if d != "basin"][0]
    w = _figure_width(width)
    fs = _fonts(w)
    n = len(chosen)
    with mpl.rc_context(_rc(fs)):
        fig, axes = plt.subplots(n, 1, figsize=(w, 0.35 + n * (1.5 + 0.1 * (w - 3.5))),
                                 sharex=True, squeeze=False, layout="constrained")
        axes = axes[:, 0]
        handles = {}
        spans = []
        for ax, name in zip(axes, chosen):
            spans.append(_transport_panel(ax, data, shown, bc, name, lat_dim, meanings, obs,
                                          len(chosen), fs, handles))
            ax.set_ylabel(f"transport ({units})" if units else "transport", fontsize=fs["base"])
        lo, hi = min(a for a, _ in spans), max(b for _, b in spans)
        axes[-1].set_xlim(lo, hi)
        axes[-1].xaxis.set_major_locator(mticker.MultipleLocator(30 if hi - lo > 60 else 15))
        axes[-1].set_xlabel("latitude", fontsize=fs["base"])
        axes[-1].xaxis.set_major_formatter(_lat_formatter())
        # Curves and observations first, then the shaded regions.
        order = sorted(handles, key=lambda k: (k not in ("interior", "bc", "obs"), 0))
        fig.legend(handles=[handles[k] for k in order], loc="outside lower center",
                   ncols=min(2 if w < 5 else 3, len(handles)), frameon=False,
                   fontsize=fs["small"], handlelength=1.8, columnspacing=1.0)
        if title:
            fig.suptitle(title, fontsize=fs["title"])
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
    for value, meaning in meanings.items():
        if meaning in _SKIP_REASONS:
            continue
        shade = _reason_style(meaning)
        for i0, i1 in _runs(status == value):
            ax.axvspan(lat[i0] - dlat / 2, lat[i1] + dlat / 2, facecolor=shade.facecolor,
                       hatch=shade.hatch, edgecolor="0.35", lw=0, zorder=0)
            handles.setdefault(shade.label, shade.patch())
    ax.axhline(0, color="0.5", lw=0.5, zorder=1)
    (line,) = ax.plot(lat, y, color="#08306b", lw=1.1, zorder=3, label="Sverdrup interior")
    handles.setdefault("interior", line)
    if bc is not None:
        yb, _ = _as_display(bc.sel(basin=name))
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
    _style(ax, fs)
    return lo - dlat, hi + dlat


# --- seasonal cycle -----------------------------------------------------------------------------


def _time_labels(time: xr.DataArray) -> list[str]:
    try:
        months = time.dt.month.values
    except (AttributeError, TypeError):
        return [str(i) for i in range(time.size)]
    if time.size == 12 and sorted(months) == list(range(1, 13)):
        return ["JFMAMJJASOND"[m - 1] for m in months]
    return [str(t)[:7] for t in time.dt.strftime("%Y-%m").values]


def plot_hovmoller(data, *, basin=None, row_status=None, width="column", cmap=None,
                   robust: float = 98.0, vmax=None, title=None, label=None, adjusted=None):
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
    adjusted : xarray.DataArray (basin, lat), optional
        ``sverdrup_adjusted`` of :func:`~sverdrup_kit.pipeline.diagnose` at the time scale of
        the data's steps: a strip along each panel's right edge shows which rows had time to
        adjust to Sverdrup balance (:func:`~sverdrup_kit.plotting.adjustment.mark_adjusted_rows`).

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
        name = f"zonal mean {_name(da, 'value')}"
        with _quiet_mean():
            da = to_canonical(da, lay).mean(lay.lon_name, keep_attrs=True)
    elif len(spatial) == 1:
        lat_name = spatial[0]
        name = _name(da, "value")
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
    shown, units = _as_display(da)
    values = shown.sel(basin=panels) if panels != [None] else shown
    symmetric = True
    levels, exp, (below, above) = _levels(np.asarray(values.values, float), robust=robust,
                                          symmetric=symmetric, vmax=vmax)
    scale = 10.0**exp
    cmap = cmocean.cm.balance if cmap is None else cmap
    norm = mcolors.BoundaryNorm(levels / scale, ncolors=cmap.N, extend=_extend(below, above))
    meanings = {}
    if row_status is not None:
        meanings = _status_info(xr.Dataset({"row_status": row_status}))
    w = _figure_width(width)
    fs = _fonts(w)
    n = len(panels)
    with mpl.rc_context(_rc(fs)):
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
                    if meaning in _SKIP_REASONS:
                        continue
                    shade = _reason_style(meaning)
                    for i0, i1 in _runs(st == value):
                        ax.axhspan(st_lat[i0] - dl / 2, st_lat[i1] + dl / 2,
                                   facecolor=shade.facecolor, hatch=shade.hatch,
                                   edgecolor="0.35", lw=0, zorder=0.5)
                        handles.setdefault(shade.label, shade.patch())
                        spans.append((st_lat[i0] - dl, st_lat[i1] + dl))
            if adjusted is not None and b is not None and b in [str(x) for x in
                                                                adjusted["basin"].values]:
                from .adjustment import mark_adjusted_rows

                mark_adjusted_rows(ax, adjusted.sel(basin=b), fs=fs, handles=handles)
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
            _style(ax, fs)
        if spans:
            lo, hi = min(a for a, _ in spans), max(b for _, b in spans)
            axes[0].set_ylim(lo, hi)
            axes[0].yaxis.set_major_locator(mticker.MultipleLocator(30 if hi - lo > 90 else 15))
        axes[0].yaxis.set_major_formatter(_lat_formatter())
        axes[0].set_ylabel("latitude", fontsize=fs["base"])
        cb_label = label if label is not None else _label(name, units, exp)
        cb = fig.colorbar(mesh, ax=list(axes), orientation="horizontal", shrink=0.9, aspect=35,
                          pad=0.02, extend=_extend(below, above),
                          ticks=_ticks(levels, w) / scale)
        cb.set_label(cb_label, fontsize=fs["base"])
        cb.ax.tick_params(labelsize=fs["small"], width=0.5, length=2)
        cb.ax.xaxis.set_major_formatter(_plain_formatter())
        cb.outline.set_linewidth(0.5)
        if handles:
            fig.legend(handles=list(handles.values()), loc="outside upper center",
                       ncols=min(3, len(handles)), frameon=False, fontsize=fs["small"])
        if title:
            fig.suptitle(title, fontsize=fs["title"])
    return (fig, axes[0]) if n == 1 else (fig, axes)


# --- batch --------------------------------------------------------------------------------------


def _save(fig, path: Path, dpi: int) -> Path:
    """Save atomically: a temporary file in the same folder, then a rename."""
    fd, tmp = tempfile.mkstemp(suffix=path.suffix, dir=path.parent)
    os.close(fd)
    try:
        fig.savefig(tmp, dpi=dpi, bbox_inches="tight")
        os.chmod(tmp, 0o644)
        os.replace(tmp, path)
    except BaseException:
        os.unlink(tmp)
        raise
    finally:
        plt.close(fig)
    return path


def save_standard_figures(data: xr.Dataset, folder, *, width="page", dpi: int = 200,
                          fmt: str = "png", coastlines: str = "auto") -> list[Path]:
    """Draw and save the standard figures of a diagnosis; return the paths written.

    Parameters
    ----------
    data : xarray.Dataset
        From :func:`~sverdrup_kit.pipeline.diagnose` (or any Dataset with some of ``taux`` and
        ``tauy``, ``wind_stress_curl``, ``ekman_pumping``, ``streamfunction``,
        ``interior_transport``, ``interior_transport_by_time``).
    folder : path
        Existing or new folder.
    width, dpi, fmt, coastlines
        Figure width, resolution, file format and coastline mode (see :func:`map_field`).

    Returns
    -------
    list of pathlib.Path
        Files written: wind_stress, wind_stress_curl, ekman_pumping, streamfunction,
        transport, seasonal_transport, crossing_time (those the data allow).
    """
    if not isinstance(data, xr.Dataset):
        raise TypeError(f"data: expected an xarray.Dataset, found {type(data).__name__}. "
                        "Fix: pass the result of sverdrup_kit.pipeline.diagnose.")
    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    maps = (
        ("wind_stress", ("taux", "tauy"), map_wind_stress),
        ("wind_stress_curl", ("wind_stress_curl",), map_curl),
        ("ekman_pumping", ("ekman_pumping",), map_ekman_pumping),
        ("streamfunction", ("sverdrup_streamfunction",), map_streamfunction),
    )
    jobs = [(stem, partial(draw, data, width=width, coastlines=coastlines))
            for stem, needs, draw in maps if all(name in data for name in needs)]
    if "interior_transport" in data:
        jobs.append(("transport", partial(plot_transport, data, width=width)))
    if "interior_transport_by_time" in data:
        by_time = data["interior_transport_by_time"]
        flags, scale = data.get("sverdrup_adjusted"), by_time.attrs.get("adjustment_time_scale")
        if flags is not None and scale in flags["time_scale"].values:
            flags = flags.sel(time_scale=scale)
        else:
            flags = None
        jobs.append(("seasonal_transport", partial(
            plot_hovmoller, by_time, row_status=data.get("row_status"), width=width,
            adjusted=flags)))
    if "basin_crossing_time" in data:
        from .adjustment import plot_crossing_time

        jobs.append(("crossing_time", partial(plot_crossing_time, data, width=width)))
    paths = []
    for stem, draw in jobs:
        fig, _ = draw()
        paths.append(_save(fig, folder / f"{stem}.{fmt}", dpi))
    return paths
