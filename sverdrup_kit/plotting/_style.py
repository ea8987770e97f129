"""Sizes, fonts, colours, unit labels and colour levels shared by every figure.

Figures are sized for print: ``width="column"`` (3.5 in), ``"page"`` (7.2 in) or a number of
inches, with font sizes set on each figure's own artists (global ``rcParams`` are left alone).
Diverging fields get discrete, round colour levels centred on zero with symmetric limits from
a robust percentile; every colour bar and axis label carries units read from the data's
``units`` attribute, transports in "1e6 m3 s-1" shown as "Sv" (labels only: files keep UDUNITS
spellings). Regions where the Sverdrup relation is not expected to hold are hatched on a pale
neutral ground, so that they cannot be mistaken for a value of a diverging colour map.
"""

from __future__ import annotations

import re
import warnings
from typing import NamedTuple

import numpy as np
import xarray as xr
from matplotlib import patches as mpatches
from matplotlib import ticker as mticker

with warnings.catch_warnings():
    # cmocean 3.0 builds its maps with an argument matplotlib 3.11 deprecates; the maps are
    # unaffected and users cannot act on the message, so it is not passed on.
    warnings.filterwarnings("ignore", message="Passing 'N' to ListedColormap",
                            category=DeprecationWarning)
    import cmocean  # noqa: F401  (the colour maps of every figure come from here)

#: Figure widths in inches: one journal column and a full page width (common practice; AGU and
#: AMS columns are 3.2-3.5 in, pages 6.5-7.3 in).
FIGURE_WIDTHS = {"column": 3.5, "page": 7.2}


SECONDS_PER_YEAR = 365.25 * 86400.0


class Shade(NamedTuple):
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
REASONS = {
    # V = curl/(rho0 beta) stays finite at the equator; the Ekman part (1/f) and equatorial
    # dynamics are what fail there (the wording of row_status and the guide).
    "equatorial_band": Shade("equatorial band (Ekman ~ 1/f, equatorial dynamics)", "#ececec",
                             "...."),
    "no_eastern_coast": Shade("no eastern coast", "#ececec", "\\\\\\"),
    "no_western_coast": Shade("no western coast", "#ececec", "///"),
    "too_narrow": Shade("basin too narrow", "#ececec", "xxxx"),
    "spans_half_globe": Shade("row spans over half the globe", "#ececec", "----"),
    "spans_two_oceans": Shade("row spans two oceans", "#ececec", "oo"),
    "pole_row": Shade("pole row", "#ececec", "**"),
    "outside": Shade("outside the basins", "#f7f7f7", "||||"),
    # Cautions: the transport is computed and drawn, on a pale warm ground that sets them
    # apart from the rows left empty.
    "poleward_of_circumpolar": Shade("caution: poleward of the circumpolar band", "#fbefc9",
                                     "\\\\"),
    "over_shelf": Shade("caution: over a shelf", "#fbefc9", "o"),
    "mostly_filled": Shade("caution: stress mostly filled", "#fbefc9", ".."),
}


SKIP_REASONS = {"valid", "no_ocean", "ok", "land"}


#: The boundary-current zone is a strip one or two cells wide on coarse grids: a solid colour
#: that no diverging map uses keeps it visible at column width.
BOUNDARY_ZONE = Shade("western boundary-current zone", "#e6ab02", None)


LAND_COLOUR = "#bdbdbd"


def reason_style(meaning: str) -> Shade:
    if meaning in REASONS:
        return REASONS[meaning]
    return Shade(meaning.replace("_", " "), "#ececec", "++")


def shade_row_status(ax, lat, status, meanings, handles, *, axis="x", zorder=0):
    """Shade the runs of rows whose status says the Sverdrup relation was not applied, or
    was applied with a caution.

    ``lat`` (n,) and ``status`` (n,) of one basin; ``meanings`` maps flag values to names.
    Spans run along x (``axvspan``, latitude on the x axis) or y (``axhspan``); legend handles
    are added to ``handles``. Returns the (low, high) latitudes of every span drawn.
    """
    from ._inputs import runs

    dlat = np.median(np.diff(lat)) if lat.size > 1 else 1.0
    span = ax.axvspan if axis == "x" else ax.axhspan
    drawn = []
    for value, meaning in meanings.items():
        if meaning in SKIP_REASONS:
            continue
        shade = reason_style(meaning)
        for i0, i1 in runs(status == value):
            lo, hi = lat[i0] - dlat / 2, lat[i1] + dlat / 2
            span(lo, hi, facecolor=shade.facecolor, hatch=shade.hatch, edgecolor="0.35", lw=0,
                 zorder=zorder)
            handles.setdefault(shade.label, shade.patch())
            drawn.append((lo, hi))
    return drawn


def figure_width(width) -> float:
    if isinstance(width, str):
        if width in FIGURE_WIDTHS:
            return FIGURE_WIDTHS[width]
    elif isinstance(width, (int, float, np.floating, np.integer)) and 1.0 <= float(width) <= 20:
        return float(width)
    raise ValueError(
        f"width: expected 'column' (3.5 in), 'page' (7.2 in) or a width in inches between 1 and "
        f"20, found {width!r}. Fix: pass width='column' for a journal column."
    )


def fonts(width_in: float) -> dict:
    """Font sizes in points: 7 pt at column width, 9 pt at page width (journals ask 6-9 pt)."""
    base = float(np.clip(5.5 + 0.5 * width_in, 7.0, 10.0))
    return {"base": base, "small": base - 1.0, "title": base + 0.5}


def rc(fs: dict) -> dict:
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


def style_axes(ax, fs: dict) -> None:
    ax.tick_params(labelsize=fs["small"], width=0.6, length=2.5)


def pretty_units(units: str) -> str:
    """UDUNITS spelling to a label: 'N m-3' -> 'N m$^{-3}$', '1e6 m3 s-1' -> 'Sv'."""
    u = str(units).strip()
    if u.lower() in _SVERDRUP_UNITS:
        return "Sv"
    out = []
    for token in u.split():
        m = re.fullmatch(r"([A-Za-z]+)\^?(-?\d+)", token)
        out.append(f"{m.group(1)}$^{{{m.group(2)}}}$" if m else token)
    return " ".join(out)


def long_name(da: xr.DataArray, default: str = "") -> str:
    return str(da.attrs.get("long_name", da.name if da.name is not None else default))


def axis_label(name: str, units: str, scale_exp: int = 0) -> str:
    # "velocity (positive upward)" + units reads better as "velocity, positive upward (units)".
    name = re.sub(r"\s*\(([^()]*)\)\s*$", r", \1", name.strip())
    units = units.strip()
    if units in _DIMENSIONLESS:
        units = ""
    if scale_exp:
        units = f"10$^{{{scale_exp}}}$ {units}".strip()
    return f"{name} ({units})" if units else name


def as_display(da: xr.DataArray, *, to_per_year: bool = False) -> tuple[xr.DataArray, str]:
    """Values and unit label for display: transports in Sv, optionally m s-1 as m yr-1."""
    units = str(da.attrs.get("units", "")).strip()
    if units.lower() in _SVERDRUP_UNITS:
        return da * _SVERDRUP_UNITS[units.lower()], "Sv"
    if to_per_year and units in ("m s-1", "m/s"):
        return da * SECONDS_PER_YEAR, "m yr$^{-1}$"
    return da, pretty_units(units) if units else ""


def nice_step(vmax: float, n: int) -> float:
    """The round step (1, 2, 2.5 or 5 times a power of ten) giving closest to n bins to vmax."""
    mag = 10.0 ** np.floor(np.log10(vmax / n))
    steps = [m * mag * f for f in (1.0, 10.0) for m in (1.0, 2.0, 2.5, 5.0)]
    return min(steps, key=lambda st: (abs(np.ceil(vmax / st - 1e-9) - n), st))


def colour_levels(values: np.ndarray, *, robust: float, symmetric: bool, vmax=None):
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
    step = nice_step(vmax, 6)
    m = int(np.ceil(vmax / step - 1e-9))
    top = step * m
    exp = int(np.floor(np.log10(top)))
    exp = 0 if -1 <= exp <= 2 else exp
    # Whole multiples of the step, so that zero is exactly a level.
    levels = step * np.arange(-m if symmetric else 0, m + 1)
    return levels, exp, (finite.min() < levels[0], finite.max() > levels[-1])


def colour_ticks(levels: np.ndarray, width_in: float) -> np.ndarray:
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


def extend_of(below: bool, above: bool) -> str:
    return {(True, True): "both", (True, False): "min", (False, True): "max"}.get(
        (below, above), "neither")


def latitude_formatter():
    def fmt(x, _pos):
        if abs(x) < 1e-9:
            return "EQ"
        return f"{abs(x):g}\u00b0{'N' if x > 0 else 'S'}"
    return mticker.FuncFormatter(fmt)


def plain_formatter():
    """Tick labels without trailing zeros ('1.5', not '1.50'), with a true minus sign."""
    return mticker.FuncFormatter(lambda x, _pos: f"{x:.6g}".replace("-", "\u2212"))


def colorbar(fig, cax, mappable, label, fs, *, extend, ticks=None):
    """A horizontal colour bar in the axes ``cax``, its label and ticks at the figure's sizes."""
    cb = fig.colorbar(mappable, cax=cax, orientation="horizontal", extend=extend, ticks=ticks)
    cb.set_label(label, fontsize=fs["base"])
    cb.ax.tick_params(labelsize=fs["small"], width=0.5, length=2)
    cb.ax.xaxis.set_major_formatter(plain_formatter())
    cb.outline.set_linewidth(0.5)
    return cb


def line_height(points: float) -> float:
    """Height in inches of one line of text at a font size in points (1.35 em: common
    practice for label boxes with their leading)."""
    return 1.35 * points / 72.0


def text_width(chars: int, points: float) -> float:
    """Width in inches of ``chars`` characters of DejaVu Sans at a font size (about 0.6 em)."""
    return chars * 0.6 * points / 72.0


def place_panels(fig, axes, *, left, right, bottom, top, gap, stacked):
    """Place axes in a column (``stacked``) or a row, with margins and gaps in inches.

    Layouts are worked out from the font sizes instead of by a layout engine: the engine draws
    the figure twice more to measure it, which was a third of the time of a figure.
    """
    w, h = fig.get_size_inches()
    n = len(axes)
    if stacked:
        ph = (h - top - bottom - gap * (n - 1)) / n
        for i, ax in enumerate(axes):
            y = bottom + (n - 1 - i) * (ph + gap)
            ax.set_position((left / w, y / h, (w - left - right) / w, ph / h))
    else:
        pw = (w - left - right - gap * (n - 1)) / n
        for i, ax in enumerate(axes):
            ax.set_position(((left + i * (pw + gap)) / w, bottom / h, pw / w,
                             (h - top - bottom) / h))


def legend_columns(labels, fs: dict, width_in: float, most: int = 3) -> int:
    """The most legend columns (up to ``most``) whose entries fit side by side in the width:
    each entry is its handle (1.8 em), a pad (0.8 em), its text and the column spacing (1 em)."""
    em = fs["small"] / 72.0
    widths = sorted((text_width(len(str(s)), fs["small"]) + 3.6 * em for s in labels),
                    reverse=True)
    for k in range(min(most, len(widths)), 1, -1):
        if sum(widths[:k]) <= width_in - 0.1:
            return k
    return 1
