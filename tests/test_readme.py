"""The README's Python example runs as printed, on a small file written here.

The file is ``monthly_winds.nc`` as the README names it: twelve months of invented, Earth-like
surface winds (trade winds and westerlies) on a 2 degree global grid, missing over a rough,
hand-drawn Earth land mask coarse enough to write down yet close enough to the real
continents for ``basins="earth"`` to find the Atlantic, Pacific and Indian Oceans.
"""

import re
from pathlib import Path

import numpy as np
import pytest
import xarray as xr
from matplotlib.path import Path as Polygon

README = Path(__file__).resolve().parents[1] / "README.md"

# Continents as (lon -180..180, lat) vertices, drawn by hand from a world map (common
# practice: a mask good to a few degrees). Antarctica is everything south of 68S.
CONTINENTS = {
    "americas": [
        (-168, 66), (-140, 70), (-100, 72), (-80, 70), (-62, 60), (-55, 50), (-70, 42),
        (-76, 35), (-81, 30), (-81, 25), (-90, 29), (-97, 27), (-97, 20), (-88, 21), (-87, 16),
        (-83, 12), (-78, 9), (-75, 11), (-62, 11), (-50, 2), (-35, -5), (-40, -22), (-48, -28),
        (-58, -38), (-65, -42), (-68, -52), (-68, -56), (-72, -56), (-75, -50), (-73, -38),
        (-71, -18), (-81, -6), (-80, 1), (-78, 7), (-83, 8), (-87, 13), (-95, 16), (-105, 20),
        (-110, 23), (-117, 32), (-124, 40), (-125, 49), (-135, 57), (-150, 60), (-165, 60),
    ],
    "afro_eurasia": [
        (-10, 36), (-17, 21), (-17, 14), (-8, 5), (8, 4), (9, -1), (13, -12), (12, -18),
        (18, -35), (26, -34), (33, -26), (40, -15), (40, -3), (51, 11), (43, 13), (52, 16),
        (57, 22), (62, 25), (67, 24), (72, 20), (77, 8), (80, 13), (80, 16), (87, 21), (92, 22),
        (94, 17), (98, 16), (98, 8), (100, 6), (103, 1.5), (104, 1), (105, 10), (109, 12),
        (108, 22), (117, 23), (121, 30), (120, 36), (122, 40), (127, 38), (129, 35), (130, 43),
        (140, 48), (141, 53), (136, 55), (143, 59), (156, 57), (163, 62), (180, 65), (180, 75),
        (100, 78), (60, 75), (30, 71), (15, 69), (5, 62), (8, 57), (-5, 58), (-10, 52),
        (-5, 48), (-9, 43), (-9, 38),
    ],
    "australia": [
        (114, -22), (115, -34), (123, -34), (131, -31), (138, -35), (141, -38), (147, -39),
        (150, -37), (153, -28), (153, -25), (146, -19), (142, -11), (136, -12), (131, -11),
        (129, -15), (123, -17),
    ],
}


def write_monthly_winds(path):
    lat = np.arange(-89.0, 90.0, 2.0)
    lon = np.arange(1.0, 360.0, 2.0)
    la, lo = np.meshgrid(lat, lon, indexing="ij")
    points = np.column_stack([(lo.ravel() + 180) % 360 - 180, la.ravel()])
    land = la < -68
    for verts in CONTINENTS.values():
        land |= Polygon(verts).contains_points(points).reshape(la.shape)
    months = np.arange(12)
    shift = 5 * np.sin(2 * np.pi * (months - 1) / 12)[:, None, None]  # seasonal migration
    phi = np.deg2rad(la[None] - shift)
    u = -7.0 * np.cos(3 * phi) * np.cos(phi)  # easterly trades, westerlies near 50 degrees
    v = -1.5 * np.sin(2 * phi) * np.ones_like(u)
    u, v = (np.where(land, np.nan, a).astype("float32") for a in (u, v))
    time = np.array([f"2001-{m + 1:02d}-15" for m in months], dtype="datetime64[ns]")
    coords = {
        "time": ("time", time, {"standard_name": "time"}),
        "lat": ("lat", lat, {"standard_name": "latitude", "units": "degrees_north"}),
        "lon": ("lon", lon, {"standard_name": "longitude", "units": "degrees_east"}),
    }
    xr.Dataset(
        {"u": (("time", "lat", "lon"), u, {"units": "m/s", "long_name": "eastward wind"}),
         "v": (("time", "lat", "lon"), v, {"units": "m/s", "long_name": "northward wind"})},
        coords=coords, attrs={"title": "invented monthly winds for the README test"},
    ).to_netcdf(path)


def python_blocks(text):
    return re.findall(r"^```python\n(.*?)^```", text, flags=re.S | re.M)


def test_readme_python_example_runs(tmp_path, monkeypatch):
    blocks = python_blocks(README.read_text())
    assert blocks, "README.md has no ```python block"
    write_monthly_winds(tmp_path / "monthly_winds.nc")
    monkeypatch.chdir(tmp_path)
    namespace = {}
    with pytest.warns(UserWarning):  # monthly means into a bulk formula: warned, as documented
        for block in blocks:
            exec(compile(block, str(README), "exec"), namespace)
    # Trade winds over westerlies drive a southward subtropical interior (Sverdrup 1947; the
    # sign is common practice): the README's last line reads that number.
    at = namespace["sv"].interior_transport.sel(basin="atlantic").sel(lat=26.5, method="nearest")
    assert np.isfinite(float(at)) and float(at) < 0
