"""Coastlines that never come from the network.

A map draws the data's own land cells; when the crude GSHHS shapefile exists under
``$CARTOPY_DATA_DIR/shapefiles/gshhs/c/`` and the data's land looks like Earth's, its coast
lines are added, read straight from that file once per process.
"""

from __future__ import annotations

import logging
import os
from functools import lru_cache

import numpy as np
from cartopy.io import shapereader
from shapely.geometry import LineString

from ._inputs import runs

GSHHS_FILES = ("GSHHS_c_L1.shp", "GSHHS_c_L1.shx", "GSHHS_c_L1.dbf")


def gshhs_folder() -> str | None:
    """Folder of the crude GSHHS level-1 shapefile under $CARTOPY_DATA_DIR, or None."""
    root = os.environ.get("CARTOPY_DATA_DIR")
    if not root:
        return None
    folder = os.path.join(root, "shapefiles", "gshhs", "c")
    ok = all(os.path.isfile(os.path.join(folder, f)) for f in GSHHS_FILES)
    return folder if ok else None


@lru_cache(maxsize=2)
def gshhs_geometries(folder: str):
    # Two crude GSHHS polygons are stored as holes only; pyshp logs a warning for each, which
    # would reach stderr (and break checked notebook cells). The shapes are read correctly.
    log = logging.getLogger("shapefile")
    level = log.level
    log.setLevel(logging.ERROR)
    try:
        reader = shapereader.Reader(os.path.join(folder, GSHHS_FILES[0]))
        polygons = tuple(reader.geometries())
    finally:
        log.setLevel(level)
    return polygons


@lru_cache(maxsize=2)
def gshhs_coastlines(folder: str):
    """Coast lines of the GSHHS polygons without the edges that close Antarctica.

    The Antarctic polygon is closed along the date line and the South Pole; drawn as an outline
    those edges would show as lines across the Southern Ocean, so segments on 180E or at the
    pole are left out.
    """
    segments = []
    for poly in gshhs_geometries(folder):
        for part in getattr(poly, "geoms", [poly]):
            for ring in (part.exterior, *part.interiors):
                xy = np.asarray(ring.coords)
                fake = ((np.abs(xy[:-1, 0]) >= 179.999) & (np.abs(xy[1:, 0]) >= 179.999)) | (
                    (xy[:-1, 1] <= -89.9) | (xy[1:, 1] <= -89.9))
                for i0, i1 in runs(~fake):
                    if i1 >= i0:
                        segments.append(LineString(xy[i0:i1 + 2]))
    return tuple(segments)


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


def looks_like_earth(lat, lon, land, periodic=True) -> bool:
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


def coastline_mode(coastlines: str, lat, lon, land, periodic=True) -> str:
    if coastlines not in ("auto", "gshhs", "mask", "none"):
        raise ValueError(
            f"coastlines: expected 'auto', 'gshhs', 'mask' or 'none', found {coastlines!r}. "
            "Fix: pass coastlines='auto'."
        )
    if coastlines == "gshhs" and gshhs_folder() is None:
        raise FileNotFoundError(
            "coastlines='gshhs': expected shapefiles/gshhs/c/GSHHS_c_L1.shp (.shx, .dbf) under "
            f"$CARTOPY_DATA_DIR, found CARTOPY_DATA_DIR={os.environ.get('CARTOPY_DATA_DIR')!r}. "
            "Fix: run `python -m data_recipes.coastlines` and set CARTOPY_DATA_DIR, or pass "
            "coastlines='mask' to draw the data's own land."
        )
    if coastlines == "auto":
        use = gshhs_folder() is not None and looks_like_earth(lat, lon, land, periodic)
        return "gshhs" if use else "mask"
    return coastlines
