"""Recipe: the built-in Earth ocean mask shipped in ``sverdrup_kit/data/earth_ocean_fraction.nc``.

Run ``python -m data_recipes.earth_mask`` to rebuild it: the ETOPO5 relief (5-minute global
heights of land and sea floor, fetched and cached by :mod:`data_recipes.marine_climatology`
from Debian's ``ferret-datasets``) is turned into ocean (height < 0) or land, averaged by area
onto a 0.25 degree grid (:func:`sverdrup_kit.geometry.regrid.area_weighted_average`), and stored
as whole percent in a compressed unsigned-byte variable, with its provenance in the attributes.

The file is small enough to ship with the package (a few hundred kB), so the mask needs neither
a network nor a clone. ETOPO5 is a work of the United States government (NOAA National
Geophysical Data Center), in the public domain.

Rule: a cell is water where the relief is below 0 m. Inland depressions below sea level (the
Caspian Sea, about 0.09% of the surface; the Dead Sea; dry basins such as the Qattara
Depression) are counted as water by that rule; the attributes say so.
"""

from __future__ import annotations

import datetime as _dt
import sys
from pathlib import Path

import numpy as np

from . import _debian, marine_climatology

OUT = Path(__file__).resolve().parent.parent / "sverdrup_kit" / "data" / "earth_ocean_fraction.nc"
STEP = 0.25  # degrees

SOURCE = (
    "ETOPO5 5-minute gridded elevations and bathymetry of the world (NOAA National Geophysical "
    "Data Center, 1988), file etopo5.cdf of Debian package ferret-datasets {version}"
)
CITATION = (
    "National Geophysical Data Center (1988). Data Announcement 88-MGG-02, Digital relief of "
    "the surface of the Earth. NOAA, National Geophysical Data Center, Boulder, Colorado."
)


def ocean_fraction_from_relief(relief, step: float = STEP):
    """Ocean fraction (0..1) of each cell of a global ``step``-degree grid from a relief field.

    Parameters
    ----------
    relief : xarray.DataArray (lat, lon)
        Height of land and sea floor in m on a regular global grid; water where < 0.
    step : float, optional
        Target cell size in degrees.

    Returns
    -------
    xarray.DataArray (lat, lon)
        Area-weighted ocean fraction on cell centres ``-90 + step/2 ..`` and ``step/2 ..``.
    """
    import xarray as xr

    from sverdrup_kit.geometry.regrid import area_weighted_average

    water = (relief < 0).astype(np.float64).where(relief.notnull())
    lat = np.arange(-90.0 + step / 2, 90.0, step)
    lon = np.arange(step / 2, 360.0, step)
    like = xr.DataArray(np.zeros((lat.size, lon.size)), dims=("lat", "lon"),
                        coords={"lat": ("lat", lat, {"units": "degrees_north"}),
                                "lon": ("lon", lon, {"units": "degrees_east"})})
    return area_weighted_average(water, like, argname="relief")


def read_etopo5(path: Path):
    """The ETOPO5 relief with its longitudes put on exact multiples of 5 minutes.

    The file stores the longitudes in single precision (359.92 for the last of 4320 points,
    which is 359.91667); the grid is the regular 1/12 degree grid they round.
    """
    import xarray as xr

    ds = xr.open_dataset(path)
    z = ds["ROSE"].rename({"ETOPO05_Y": "lat", "ETOPO05_X": "lon"})
    nx = z.sizes["lon"]
    return z.assign_coords(
        lat=("lat", z["lat"].values.astype(float), {"units": "degrees_north"}),
        lon=("lon", np.arange(nx) * 360.0 / nx, {"units": "degrees_east"}),
    ).load()


def build(out_path: Path = OUT, *, out=sys.stdout) -> Path:
    """Fetch the relief if needed, compute the ocean fraction and write ``out_path``."""
    files = marine_climatology.fetch(out=out)
    src = files["etopo5"]
    manifest = _debian.read_manifest(_debian.cache_dir() / marine_climatology.MANIFEST)
    version = manifest.get("etopo5", {}).get("version", "unknown")
    frac = ocean_fraction_from_relief(read_etopo5(src))
    percent = np.rint(frac.values * 100.0).astype(np.uint8)
    ds = frac.to_dataset(name="ocean_fraction")
    ds["ocean_fraction"] = (("lat", "lon"), percent)
    ds["ocean_fraction"].attrs = {
        "long_name": "fraction of the cell area that is ocean (relief below 0 m)",
        "standard_name": "sea_area_fraction",
        "units": "%",
        "valid_range": np.array([0, 100], dtype=np.uint8),
    }
    ds["lat"].attrs = {"units": "degrees_north", "standard_name": "latitude", "axis": "Y"}
    ds["lon"].attrs = {"units": "degrees_east", "standard_name": "longitude", "axis": "X"}
    ds.attrs = {
        "title": f"Earth ocean fraction on a {STEP:g} degree grid",
        "Conventions": "CF-1.10",
        "source": SOURCE.format(version=version),
        "source_sha256": _debian.sha256(src),
        "references": CITATION,
        "license": "public domain (work of the United States government)",
        "method": (
            "water where the relief is below 0 m; area-weighted average of the 5-minute water "
            f"indicator onto {STEP:g} degree cells (overlap areas on the sphere); rounded to "
            "whole percent"
        ),
        "comment": (
            "inland depressions below sea level (Caspian Sea, Dead Sea, dry basins) count as "
            "water by this rule"
        ),
        "script": "data_recipes/earth_mask.py",
        "date_created": _dt.date.today().isoformat(),
    }
    enc = {"ocean_fraction": {"zlib": True, "complevel": 9, "shuffle": True,
                              "_FillValue": None},
           "lat": {"_FillValue": None}, "lon": {"_FillValue": None}}
    out_path.parent.mkdir(parents=True, exist_ok=True)
    tmp = out_path.with_name(f".{out_path.name}.part")
    ds.to_netcdf(tmp, encoding=enc)
    tmp.replace(out_path)
    print(f"earth_mask: wrote {out_path} ({out_path.stat().st_size / 1024:.0f} kB)", file=out)
    return out_path


def main(argv=None) -> int:
    return _debian.run_recipe("earth_mask", lambda *, force: build(), __doc__, argv)


if __name__ == "__main__":
    sys.exit(main())
