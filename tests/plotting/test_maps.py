"""Maps draw and save without warnings and without the network; colours, labels and the
regions where Sverdrup fails read as documented."""

import re

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pytest  # noqa: E402
import xarray as xr  # noqa: E402
from matplotlib.colors import BoundaryNorm  # noqa: E402

from sverdrup_kit import plotting  # noqa: E402
from sverdrup_kit.plotting import _coastlines  # noqa: E402

from ._results import colorbar_label, overlapping_texts, save  # noqa: E402


@pytest.mark.parametrize("width", ["column", "page", 5.0])
def test_map_wind_stress_curl(strict, tmp_path, result, width):
    fig, ax = plotting.map_wind_stress_curl(result, width=width)
    assert fig.get_figwidth() == pytest.approx(plotting.FIGURE_WIDTHS.get(width, width))
    label = colorbar_label(fig)
    assert "N m$^{-3}$" in label and "10$^{-" in label
    save(fig, tmp_path, f"curl_{width}")


def test_map_wind_stress_curl_colours_are_symmetric_about_zero(strict, result):
    fig, ax = plotting.map_wind_stress_curl(result)
    mesh = next(c for c in ax.collections if isinstance(getattr(c, "norm", None), BoundaryNorm))
    b = mesh.norm.boundaries
    np.testing.assert_allclose(b, -b[::-1], atol=1e-12)
    assert mesh.get_cmap().name == "curl"
    # Limits: the 98th percentile of |curl| rounded up by less than one of about six steps
    # (derived from the level rule in _style.colour_levels); the label gives the power of ten.
    exp = int(re.search(r"10\$\^\{(-?\d+)\}\$", colorbar_label(fig)).group(1))
    top = b[-1] * 10.0**exp
    p98 = np.nanpercentile(np.abs(result.wind_stress_curl.values), 98)
    assert p98 <= top < 1.5 * p98
    assert 8 <= len(b) - 1 <= 16


def test_map_ekman_pumping_names_the_equatorial_band(strict, tmp_path, result):
    fig, ax = plotting.map_ekman_pumping(result, projection="platecarree")
    assert colorbar_label(fig) == "Ekman pumping (m yr$^{-1}$)"
    names = [t.get_text() for t in fig.legends[0].get_texts()]
    assert any(n.startswith("equatorial band") for n in names)
    save(fig, tmp_path, "pumping")


def test_map_ekman_pumping_from_a_bare_dataarray(strict, tmp_path, result):
    # Without a Dataset the ocean in the band is inferred from the rows on either side.
    fig, ax = plotting.map_ekman_pumping(result.ekman_pumping, width="page")
    names = [t.get_text() for t in fig.legends[0].get_texts()]
    assert names == ["equatorial band (Ekman ~ 1/f, equatorial dynamics), |lat| < 3\u00b0"]
    save(fig, tmp_path, "pumping_da")


def test_map_wind_stress(strict, tmp_path, result):
    fig, ax = plotting.map_wind_stress(result)
    assert colorbar_label(fig) == "wind stress magnitude (Pa)"
    save(fig, tmp_path, "stress")


def test_map_sverdrup_streamfunction_shades_where_sverdrup_fails(strict, tmp_path, result):
    fig, ax = plotting.map_sverdrup_streamfunction(result)
    assert colorbar_label(fig) == "Sverdrup streamfunction (Sv)"
    names = {t.get_text() for t in fig.legends[0].get_texts()}
    assert {"equatorial band (Ekman ~ 1/f, equatorial dynamics)", "no eastern coast",
            "western boundary-current zone"} <= names
    save(fig, tmp_path, "psi")


def test_map_sverdrup_streamfunction_from_a_bare_dataarray(strict, tmp_path, result):
    fig, ax = plotting.map_sverdrup_streamfunction(result.sverdrup_streamfunction, width="page")
    assert colorbar_label(fig) == "Sverdrup streamfunction (Sv)"
    assert [t.get_text() for t in fig.legends[0].get_texts()] == ["no Sverdrup solution"]
    save(fig, tmp_path, "psi_da")


def test_map_field_on_a_regional_grid_in_other_conventions(strict, tmp_path, world):
    # A regional window with descending latitude and -180..180 longitudes.
    da = world.u.isel(time=0).sel(lat=slice(-40, 60))
    da = da.isel(lat=slice(None, None, -1)).assign_coords(lon=((da.lon + 180) % 360) - 180)
    da = da.sortby("lon").sel(lon=slice(-100, 0))
    fig, ax = plotting.map_field(da, projection="platecarree", width="column")
    assert colorbar_label(fig) == "eastward wind, monthly mean (m s$^{-1}$)"
    save(fig, tmp_path, "regional")


def test_ocean_mask_in_another_longitude_convention(strict, tmp_path, result):
    # The mask on -180..180 with latitude descending, the field on 0..360 ascending.
    mask = result.ocean_mask.assign_coords(lon=((result.lon + 180) % 360) - 180).sortby("lon")
    mask = mask.isel(lat=slice(None, None, -1))
    fig, ax = plotting.map_wind_stress_curl(result.wind_stress_curl, ocean_mask=mask)
    save(fig, tmp_path, "curl_mask_convention")
    with pytest.raises(ValueError, match="ocean_mask"):
        plotting.map_wind_stress_curl(result.wind_stress_curl,
                                      ocean_mask=mask.isel(lon=slice(0, -1)))


def test_invented_world_never_gets_earth_coastlines(strict, tmp_path, result, monkeypatch):
    fake = tmp_path / "cartopy" / "shapefiles" / "gshhs" / "c"
    fake.mkdir(parents=True)
    for ext in ("shp", "shx", "dbf"):
        (fake / f"GSHHS_c_L1.{ext}").write_bytes(b"")
    monkeypatch.setenv("CARTOPY_DATA_DIR", str(tmp_path / "cartopy"))
    # The synthetic land does not look like Earth's, so the (here empty) files are not read.
    fig, ax = plotting.map_wind_stress_curl(result)
    save(fig, tmp_path, "curl_mask")


def test_gshhs_requested_without_files_says_how_to_fix(strict, result, monkeypatch, tmp_path):
    monkeypatch.setenv("CARTOPY_DATA_DIR", str(tmp_path))
    with pytest.raises(FileNotFoundError, match="coastlines='mask'"):
        plotting.map_wind_stress_curl(result, coastlines="gshhs")


def test_gshhs_coastlines_drawn_offline_when_present(strict, tmp_path, monkeypatch):
    folder = _coastlines.gshhs_folder()
    if folder is None:
        pytest.skip("crude GSHHS shapefiles not under $CARTOPY_DATA_DIR (data_recipes.coastlines)")
    # An Earth-like land mask: land where the GSHHS polygons are, from the shapefile itself.
    from shapely import contains_xy
    from shapely.ops import unary_union

    lat = np.arange(-89.0, 90, 2)
    lon = np.arange(1.0, 360, 2)
    geoms = unary_union(_coastlines.gshhs_geometries(folder))
    lo2, la2 = np.meshgrid(((lon + 180) % 360) - 180, lat)
    land = contains_xy(geoms, lo2, la2)
    field = xr.DataArray(np.where(land, np.nan, np.cos(np.deg2rad(la2)) * np.sin(np.deg2rad(lo2))),
                         coords={"lat": lat, "lon": lon}, dims=("lat", "lon"),
                         attrs={"units": "1", "long_name": "test field"})
    fig, ax = plotting.map_field(field)
    save(fig, tmp_path, "gshhs")


def test_bad_arguments_name_themselves(result):
    with pytest.raises(ValueError, match="width"):
        plotting.map_wind_stress_curl(result, width="poster")
    with pytest.raises(ValueError, match="projection"):
        plotting.map_wind_stress_curl(result, projection="mercator")
    with pytest.raises(ValueError, match="coastlines"):
        plotting.map_wind_stress_curl(result, coastlines="yes")
    with pytest.raises(KeyError, match="sverdrup_streamfunction"):
        plotting.map_sverdrup_streamfunction(result[["taux"]])
    with pytest.raises(ValueError, match="time"):
        plotting.plot_latitude_time(result.interior_transport)
    plt.close("all")


def test_titles_legends_and_labels_do_not_collide(strict, result):
    fig, ax = plotting.map_sverdrup_streamfunction(
        result, width="column", title="Sverdrup streamfunction, annual mean")
    assert overlapping_texts(fig) == []
    fig, ax = plotting.map_field(result.ekman_pumping, projection="platecarree", width="page",
                                 title="Ekman pumping")
    assert overlapping_texts(fig) == []
