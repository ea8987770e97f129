"""Every plotting function draws and saves without warnings and without the network.

The Sverdrup results are a stand-in of the agreed schema built here by hand from the synthetic
world (curl from the toolkit's operator, a plain zonal sum for the interior transport), so these
tests exercise the figures, not the Sverdrup solver.
"""

import re
import socket
import warnings

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pytest  # noqa: E402
import xarray as xr  # noqa: E402
from matplotlib.colors import BoundaryNorm  # noqa: E402

from sverdrup_kit import synthetic  # noqa: E402
from sverdrup_kit.physics.operators import wind_stress_curl  # noqa: E402
from sverdrup_kit import plotting  # noqa: E402
from sverdrup_kit.plotting import _coastlines, _style  # noqa: E402

RHO0, CD, RHO_AIR = 1025.0, 1.2e-3, 1.22
OMEGA, R = 7.292115e-5, 6.371e6
FLAGS = dict(flag_values=np.array([0, 1, 2, 3, 4], dtype=np.int8),
             flag_meanings="valid equatorial_band no_eastern_coast too_narrow no_ocean")
# (name, a longitude inside the basin, latitude range) on the synthetic world.
BASINS = [("Halcyon Ocean", 101.0, (-36, 70)), ("Lissom Ocean", 291.0, (-36, 70)),
          ("Gulf of Maren", 51.0, (16, 32)), ("Skerrow Passage", 1.0, (-66, -46))]


def _runs_containing(row_ocean, j):
    """Indices of the periodic run of ocean cells containing column j (empty if land)."""
    n = row_ocean.size
    if not row_ocean[j]:
        return []
    if row_ocean.all():
        return list(range(n))
    cells, k = [j], (j - 1) % n
    while row_ocean[k]:
        cells.append(k)
        k = (k - 1) % n
    k = (j + 1) % n
    while row_ocean[k]:
        cells.append(k)
        k = (k + 1) % n
    return cells


def fake_sverdrup(world):
    """A Dataset of the agreed sverdrup_transport() schema, computed by hand on the synthetic world."""
    speed = world.wind_speed.astype("f8")
    taux = (RHO_AIR * CD * speed * world.u.astype("f8")).assign_attrs(units="Pa")
    tauy = (RHO_AIR * CD * speed * world.v.astype("f8")).assign_attrs(units="Pa")
    curl_t = wind_stress_curl(taux, tauy)
    lat, lon = world.lat.values, world.lon.values
    ocean = world.ocean_mask.values.astype(bool)
    beta = 2 * OMEGA * np.cos(np.deg2rad(lat)) / R
    dx = R * np.cos(np.deg2rad(lat)) * np.deg2rad(2.0)
    nb, ny, nx = len(BASINS), lat.size, lon.size
    basin_id = np.full((ny, nx), -1, dtype=np.int32)
    status = np.full((nb, ny), 4, dtype=np.int8)
    west = np.full((nb, ny), np.nan)
    east = np.full((nb, ny), np.nan)
    for b, (_, lon0, (s, n)) in enumerate(BASINS):
        j = int(np.argmin(np.abs(lon - lon0)))
        for i in np.flatnonzero((lat > s) & (lat < n)):
            cells = [c for c in _runs_containing(ocean[i], j) if basin_id[i, c] < 0]
            if not cells:
                continue
            basin_id[i, cells] = b
            whole = ocean[i].all()
            status[b, i] = 2 if whole else (1 if abs(lat[i]) < 3 else 0)
            if not whole:
                order = sorted(cells, key=lambda c: (lon[c] - lon[j] + 180) % 360)
                west[b, i], east[b, i] = lon[order[0]] - 1, lon[order[-1]] + 1
    t_dims = ("time", "basin", "lat")
    interior_t = np.full((12, nb, ny), np.nan)
    psi_t = np.full((12, ny, nx), np.nan)
    curl_v = curl_t.values
    for b in range(nb):
        for i in np.flatnonzero(status[b] == 0):
            cols = np.flatnonzero(basin_id[i] == b)
            v = curl_v[:, i, cols] / (RHO0 * beta[i]) * dx[i] / 1e6  # Sv per cell
            interior_t[:, b, i] = v.sum(axis=1)
            # Integrate westward from the eastern coast: order the cells from east to west.
            order = np.argsort(-((lon[cols] - west[b, i]) % 360))
            psi_t[:, i, cols[order]] = -np.cumsum(v[:, order], axis=1)
    basin = [name for name, _, _ in BASINS]
    sv = "1e6 m3 s-1"
    ds = xr.Dataset(
        {
            "wind_stress_curl": curl_t.mean("time"),
            "sverdrup_streamfunction": (("lat", "lon"), psi_t.mean(0),
                               {"units": sv, "long_name": "Sverdrup streamfunction"}),
            "basin_id": (("lat", "lon"), basin_id),
            "interior_transport": (("basin", "lat"), interior_t.mean(0),
                                   {"units": sv, "long_name": "Sverdrup interior transport"}),
            "boundary_current_transport": (("basin", "lat"), -interior_t.mean(0),
                                           {"units": sv, "long_name": "boundary current"}),
            "interior_transport_by_time": (t_dims, interior_t,
                                           {"units": sv,
                                            "long_name": "Sverdrup interior transport"}),
            "western_coast_lon": (("basin", "lat"), west, {"units": "degrees_east"}),
            "eastern_coast_lon": (("basin", "lat"), east, {"units": "degrees_east"}),
            "row_status": (("basin", "lat"), status, FLAGS),
            "ocean_mask": world.ocean_mask,
            "taux": taux.mean("time").assign_attrs(units="Pa", long_name="eastward wind stress"),
            "tauy": tauy.mean("time").assign_attrs(units="Pa", long_name="northward wind stress"),
        },
        coords={"basin": basin, "lat": world.lat, "lon": world.lon, "time": world.time},
        attrs={"equatorial_half_width": 3.0},
    )
    f = 2 * OMEGA * np.sin(np.deg2rad(ds.lat))
    pumping = (ds.wind_stress_curl / (RHO0 * f)).where(np.abs(ds.lat) >= 3)
    ds["ekman_pumping"] = pumping.assign_attrs(units="m s-1", long_name="Ekman pumping")
    return ds


@pytest.fixture(scope="module")
def world():
    return synthetic.load_world()


@pytest.fixture(scope="module")
def result(world):
    return fake_sverdrup(world)


@pytest.fixture
def strict(monkeypatch):
    """Any warning fails the test, and any attempt to reach the network raises."""

    def no_network(*args, **kwargs):
        raise OSError("tests must not touch the network")

    monkeypatch.setattr(socket.socket, "connect", no_network)
    monkeypatch.setattr(socket, "create_connection", no_network)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        yield
    plt.close("all")


def save(fig, tmp_path, name):
    path = tmp_path / f"{name}.png"
    fig.savefig(path, dpi=150)
    assert path.stat().st_size > 10_000
    return path


def colorbar_label(fig):
    labels = [a.get_xlabel() for a in fig.axes if a.get_label() == "<colorbar>"]
    assert len(labels) == 1
    return labels[0]


OBS = [
    dict(name="Brenn Current", basin="Halcyon Ocean", lat=27.0, transport=35.0, spread=4.0),
    dict(name="Quillon Jet", basin="Lissom Ocean", lat=33.0, transport=20.0, spread=3.0),
    dict(name="Austral Drift", basin="Halcyon Ocean", lat=-25.0, transport=-25.0, spread=6.0),
]


# --- maps ---------------------------------------------------------------------------------------


@pytest.mark.parametrize("width", ["column", "page", 5.0])
def test_map_curl(strict, tmp_path, result, width):
    fig, ax = plotting.map_wind_stress_curl(result, width=width)
    assert fig.get_figwidth() == pytest.approx(plotting.FIGURE_WIDTHS.get(width, width))
    label = colorbar_label(fig)
    assert "N m$^{-3}$" in label and "10$^{-" in label
    save(fig, tmp_path, f"curl_{width}")


def test_map_curl_colours_are_symmetric_about_zero(strict, result):
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


def test_map_streamfunction_shades_where_sverdrup_fails(strict, tmp_path, result):
    fig, ax = plotting.map_sverdrup_streamfunction(result)
    assert colorbar_label(fig) == "Sverdrup streamfunction (Sv)"
    names = {t.get_text() for t in fig.legends[0].get_texts()}
    assert {"equatorial band (Ekman ~ 1/f, equatorial dynamics)", "no eastern coast",
            "western boundary-current zone"} <= names
    save(fig, tmp_path, "psi")


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
        plotting.map_wind_stress_curl(result.wind_stress_curl, ocean_mask=mask.isel(lon=slice(0, -1)))


# --- offline coastlines -------------------------------------------------------------------------


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


# --- transports and seasonal cycle --------------------------------------------------------------


def test_plot_transport_with_observations(strict, tmp_path, result):
    fig, axes = plotting.plot_interior_transport(result, observations=OBS, width="column")
    # The Skerrow Passage has no valid row, so by default it gets no (empty) panel.
    assert [a.get_title(loc="left") for a in axes] == ["Halcyon Ocean", "Lissom Ocean",
                                                      "Gulf of Maren"]
    assert axes[0].get_ylabel() == "transport (Sv)"
    names = {t.get_text() for t in fig.legends[0].get_texts()}
    assert {"Sverdrup interior", "western boundary current", "observed (\u00b1 spread)",
            "equatorial band (Ekman ~ 1/f, equatorial dynamics)"} <= names
    save(fig, tmp_path, "transport")
    fig, axes = plotting.plot_interior_transport(result, basins=["Skerrow Passage"])
    assert "no eastern coast" in {t.get_text() for t in fig.legends[0].get_texts()}
    save(fig, tmp_path, "transport_channel")


def test_plot_transport_accepts_the_observation_table(strict, tmp_path, result):
    obs = xr.Dataset(
        {"transport": ("current", [30.0]), "spread": ("current", [3.0]),
         "lat": ("current", [27.0]), "basin": ("current", ["Halcyon Ocean"])},
        coords={"current": ["Brenn Current"]})
    fig, axes = plotting.plot_interior_transport(result, basins=["Halcyon Ocean"], observations=obs,
                                        width="page")
    assert len(axes) == 1
    save(fig, tmp_path, "transport_one")


def test_plot_transport_accepts_a_dataframe(strict, tmp_path, result):
    pd = pytest.importorskip("pandas")
    fig, axes = plotting.plot_interior_transport(result, observations=pd.DataFrame(OBS))
    names = {t.get_text() for a in axes for t in a.texts}
    assert names == {"Brenn Current", "Quillon Jet", "Austral Drift"}
    save(fig, tmp_path, "transport_df")


def test_map_streamfunction_from_a_bare_dataarray(strict, tmp_path, result):
    fig, ax = plotting.map_sverdrup_streamfunction(result.sverdrup_streamfunction, width="page")
    assert colorbar_label(fig) == "Sverdrup streamfunction (Sv)"
    assert [t.get_text() for t in fig.legends[0].get_texts()] == ["no Sverdrup solution"]
    save(fig, tmp_path, "psi_da")


def test_plot_transport_bad_observations(result):
    with pytest.raises(ValueError, match="observations"):
        plotting.plot_interior_transport(result, observations=[{"lat": 20, "transport": 3}])
    with pytest.raises(ValueError, match="basins"):
        plotting.plot_interior_transport(result, basins=["Atlantis"])
    with pytest.raises(ValueError, match="observations"):
        plotting.plot_interior_transport(result, observations=[dict(OBS[0], basin="Atlantis")])
    plt.close("all")


def test_hovmoller_zonal_mean_and_basin(strict, tmp_path, world, result):
    fig, ax = plotting.plot_latitude_time(world.u)
    assert colorbar_label(fig).startswith("zonal mean eastward wind")
    assert [t.get_text() for t in ax.get_xticklabels()] == list("JFMAMJJASOND")
    save(fig, tmp_path, "hov_u")
    fig, axes = plotting.plot_latitude_time(result.interior_transport_by_time,
                                        row_status=result.row_status, width="page")
    assert len(axes) == 3  # the passage has no values
    assert colorbar_label(fig) == "Sverdrup interior transport (Sv)"
    save(fig, tmp_path, "hov_T")
    fig, ax = plotting.plot_latitude_time(result.interior_transport_by_time, basin="Halcyon Ocean",
                                      row_status=result.row_status)
    save(fig, tmp_path, "hov_T1")


def test_save_standard_figures(strict, tmp_path, result):
    paths = plotting.save_standard_figures(result, tmp_path / "figs", width="column", dpi=100)
    assert [p.name for p in paths] == [
        "wind_stress_map.png", "wind_stress_curl_map.png", "ekman_pumping_map.png",
        "sverdrup_streamfunction_map.png", "interior_transport_by_latitude.png",
        "interior_transport_by_time.png"]
    assert sorted(p.name for p in (tmp_path / "figs").iterdir()) == sorted(p.name for p in paths)
    assert not plt.get_fignums()


def test_standard_figures_of_the_real_pipeline(strict, tmp_path, world):
    # The same figures from the toolkit's own diagnosis of the synthetic world.
    from sverdrup_kit.pipeline import diagnose

    res = diagnose(world).compute()
    paths = plotting.save_standard_figures(res, tmp_path, width="column", dpi=80)
    assert len(paths) == 7
    assert paths[-1].name == "crossing_time.png"


def test_global_rcparams_untouched(strict, result):
    before = dict(plt.rcParams)
    plotting.map_wind_stress_curl(result, width="page")
    plotting.plot_interior_transport(result)
    assert dict(plt.rcParams) == before


def test_functions_never_show(strict, result, monkeypatch):
    def fail(*a, **k):
        raise AssertionError("plt.show() called")

    monkeypatch.setattr(plt, "show", fail)
    plotting.map_sverdrup_streamfunction(result)
    plotting.plot_latitude_time(result.interior_transport_by_time, basin="Lissom Ocean")


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


def test_units_are_rendered_for_labels_only():
    # UDUNITS spellings to label text (common practice in journal figures).
    assert _style.pretty_units("1e6 m3 s-1") == "Sv"
    assert _style.pretty_units("N m-3") == "N m$^{-3}$"
    assert _style.pretty_units("m2 s-1") == "m$^{2}$ s$^{-1}$"
    assert _style.pretty_units("Pa") == "Pa"
