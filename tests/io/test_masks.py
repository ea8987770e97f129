"""Ocean masks for any wind grid: area-weighted averaging, mask sources, the built-in Earth mask."""

from __future__ import annotations

import numpy as np
import pytest
import xarray as xr

from data_recipes.earth_mask import read_etopo5
from sverdrup_kit.errors import GridError, InputError
from sverdrup_kit.geometry.regrid import area_weighted_average
from sverdrup_kit.io.masks import ocean_fraction, ocean_mask


def grid(step, lat0=-90.0, lat1=90.0, lon0=0.0, lon1=360.0, values=None):
    lat = np.arange(lat0 + step / 2, lat1, step)
    lon = np.arange(lon0 + step / 2, lon1, step)
    data = np.zeros((lat.size, lon.size)) if values is None else values(lat, lon)
    return xr.DataArray(data, dims=("lat", "lon"), coords={
        "lat": ("lat", lat, {"units": "degrees_north"}),
        "lon": ("lon", lon, {"units": "degrees_east"})})


def test_area_average_of_a_latitude_edge_is_the_spherical_zone_fraction():
    # Ocean south of 11N on a 0.5 degree grid; on 4 degree cells the cell 8-12N holds the zone
    # 8-11N, whose share of the cell's area is (sin 11 - sin 8)/(sin 12 - sin 8) (derived:
    # area of a latitude zone ~ difference of sines).
    fine = grid(0.5, values=lambda la, lo: (la[:, None] < 11.0) * np.ones(lo.size))
    coarse = grid(4.0, lat0=-92.0, lat1=92.0)
    coarse = coarse.isel(lat=slice(1, -1))  # cells -88..88 plus the polar caps left out
    out = area_weighted_average(fine, coarse)
    s = np.sin(np.deg2rad([8.0, 11.0, 12.0]))
    np.testing.assert_allclose(out.sel(lat=10.0).values, (s[1] - s[0]) / (s[2] - s[0]),
                               rtol=1e-12)
    assert float(out.sel(lat=6.0).min()) == 1.0 and float(out.sel(lat=14.0).max()) == 0.0


def test_area_average_wraps_across_the_seam_and_any_longitude_convention():
    # A box 350E..5E seen from a -180..180 source: the 0..10E cell of the target is half in.
    fine = grid(0.5, lon0=-180.0, lon1=180.0,
                values=lambda la, lo: np.ones(la.size)[:, None] * ((lo >= -10.0) & (lo < 5.0)))
    target = grid(10.0)
    out = area_weighted_average(fine, target)
    np.testing.assert_allclose(out.sel(lon=5.0).values, 0.5, rtol=1e-12)
    np.testing.assert_allclose(out.sel(lon=355.0).values, 1.0, rtol=1e-12)
    np.testing.assert_allclose(out.sel(lon=15.0).values, 0.0)


@pytest.mark.parametrize("units,scale", [("%", 100.0), ("1", 1.0)])
def test_land_fraction_in_percent_or_fraction_gives_the_same_mask(units, scale):
    land = grid(1.0, values=lambda la, lo: (np.abs(la[:, None]) > 30) * np.ones(lo.size) * scale)
    land = land.rename("sftlf").assign_attrs(units=units, standard_name="land_area_fraction")
    winds = grid(5.0)
    m = ocean_mask(land, winds)
    assert bool(m.sel(lat=2.5).all()) and not bool(m.sel(lat=37.5).any())
    # the 30N edge falls on a cell edge: cells 27.5N (ocean) and 32.5N (land)
    assert bool(m.sel(lat=27.5).all()) and not bool(m.sel(lat=32.5).any())


def test_threshold_chooses_how_much_ocean_makes_an_ocean_cell():
    relief = grid(1.0, values=lambda la, lo: np.where(lo[None, :] % 10 < 3, -100.0, 100.0)
                  * np.ones((la.size, 1)))
    winds = grid(10.0)
    frac = ocean_fraction(relief.rename("z").assign_attrs(units="m"), winds)
    np.testing.assert_allclose(frac.values, 0.3, rtol=1e-12)  # 3 of every 10 degrees
    assert not bool(ocean_mask(relief.rename("z"), winds, kind="relief").any())
    assert bool(ocean_mask(relief.rename("z"), winds, kind="relief", threshold=0.25).all())


def test_mask_that_does_not_cover_the_winds_is_refused():
    regional = grid(1.0, lat0=0.0, lat1=60.0, lon0=280.0, lon1=360.0).rename("z")
    with pytest.raises(GridError, match="covers the winds") as err:
        ocean_mask(regional.assign_attrs(units="m"), grid(5.0))
    assert "Fix:" in str(err.value) and "\n" not in str(err.value)


@pytest.mark.parametrize("bad", [0.0, 1.5, 50, -0.2, float("nan")])
def test_threshold_outside_its_range_is_refused(bad):
    with pytest.raises(InputError, match="threshold: expected") as err:
        ocean_mask("earth", grid(10.0), threshold=bad)
    if bad == 50:
        assert "use 0.5" in str(err.value)


def test_fraction_outside_0_100_is_refused():
    bad = grid(5.0, values=lambda la, lo: np.full((la.size, lo.size), 250.0))
    with pytest.raises(InputError, match="0..100"):
        ocean_mask(bad.rename("lsm"), grid(10.0))


def test_mask_from_a_file_with_a_named_variable(tmp_path):
    relief = grid(2.0, values=lambda la, lo: np.where(la[:, None] > 0, 500.0, -4000.0)
                  * np.ones(lo.size))
    ds = xr.Dataset({"z": relief.assign_attrs(units="m"), "other": relief * 0})
    ds.to_netcdf(tmp_path / "relief.nc")
    m = ocean_mask(str(tmp_path / "relief.nc"), grid(10.0), variable="z")
    assert bool(m.sel(lat=-5.0).all()) and not bool(m.sel(lat=5.0).any())
    with pytest.raises(InputError, match="ocean_mask_variable: expected the name"):
        ocean_mask(str(tmp_path / "relief.nc"), grid(10.0), variable="nope")


@pytest.mark.realdata
def test_builtin_mask_matches_the_recipe_relief_and_earths_ocean_area(etopo5):
    """Built-in 0.25 degree ocean fraction against ETOPO5 itself, both averaged onto 2 degrees."""
    two = grid(2.0)
    builtin = ocean_fraction("earth", two)
    relief = read_etopo5(etopo5)
    direct = area_weighted_average((relief < 0).astype(float), two)
    # per cell within 2% (issue 12; the file stores whole percent)
    assert float(np.abs(builtin - direct).max()) <= 0.02
    # Earth's ocean covers 70.8% of its surface (common practice value; 361 of 510 million
    # km2), within 1%. Relief below 0 m also counts the Caspian Sea and dry depressions.
    area = np.cos(np.deg2rad(two.lat))
    share = float(builtin.weighted(area).mean())
    assert abs(share - 0.708) <= 0.01 * 0.708

