"""Command line on real products: winds over land, u and v in two files, the spread table."""

from __future__ import annotations

import warnings

import numpy as np
import pytest
import xarray as xr

import sverdrup_kit as sk

from sverdrup_kit.cli import main


@pytest.fixture(scope="module")
def navy_split(navy_winds, tmp_path_factory):
    """The navy winds (global, winds over land) as u and v in two files, one year."""
    folder = tmp_path_factory.mktemp("navy")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        ds = xr.open_dataset(navy_winds, decode_times=False).isel(TIME=slice(0, 12))
        for name in ("UWND", "VWND"):
            ds[[name]].to_netcdf(folder / f"{name.lower()}_1982.nc")
    return folder


@pytest.mark.realdata
def test_global_winds_over_land_in_two_files_need_no_option(navy_split, tmp_path, capsys):
    out = tmp_path / "run"
    code = main(["diagnose", str(navy_split / "uwnd_1982.nc"), str(navy_split / "vwnd_1982.nc"),
                 "--basins", "earth", "--latitudes", "26.5,30", "--out", str(out),
                 "--no-figures", "--no-progress"])
    captured = capsys.readouterr()
    assert code == 0, captured.err
    assert "ocean mask: the winds have no missing values" in captured.out
    with sk.open_results(out / "results.nc") as res:
        assert "built-in Earth ocean mask" in res.attrs["ocean_mask"]
        atl = res.interior_transport.sel(basin="atlantic").sel(lat=26.5, method="nearest")
        # southward interior flow of 10-25 Sv at 26.5N (common practice for climatological
        # winds)
        assert -25 < float(atl) < -10
    assert "26.5N" in captured.out


@pytest.mark.realdata
def test_spread_command_prints_the_table(navy_split, marine_climatology, capsys):
    code = main(["spread", f"navy={navy_split / 'uwnd_1982.nc'},{navy_split / 'vwnd_1982.nc'}",
                 str(marine_climatology), "--drag-laws", "large-pond-1981,large-yeager-2009",
                 "--latitudes", "26.5,30", "--quiet"])
    captured = capsys.readouterr()
    assert code == 0, captured.err
    lines = [ln for ln in captured.out.splitlines() if ln.strip().startswith("atlantic")]
    assert len(lines) == 2 and "Florida Current" in lines[0]
    # four combinations (two products, two drag laws) at each latitude
    assert lines[0].split()[8] == "4"


def test_bad_threshold_and_uncovering_mask_are_one_line(tmp_path, capsys):
    lat, lon = np.arange(-80.0, 81.0, 20.0), np.arange(0.0, 360.0, 30.0)
    winds = xr.Dataset(
        {n: (("lat", "lon"), np.ones((lat.size, lon.size)), {"units": "m/s"}) for n in "uv"},
        coords={"lat": lat, "lon": lon})
    winds.to_netcdf(tmp_path / "w.nc")
    regional = xr.Dataset({"z": (("lat", "lon"), -np.ones((10, 10)), {"units": "m"})},
                          coords={"lat": np.arange(10.0), "lon": np.arange(10.0)})
    regional.to_netcdf(tmp_path / "relief.nc")
    with pytest.raises(SystemExit):
        main(["diagnose", str(tmp_path / "w.nc"), "--ocean-threshold", "1.5", "--out",
              str(tmp_path / "o")])
    err = capsys.readouterr().err
    assert "--ocean-threshold" in err and "(0, 1]" in err
    code = main(["diagnose", str(tmp_path / "w.nc"), "--ocean-mask", str(tmp_path / "relief.nc"),
                 "--out", str(tmp_path / "o"), "--no-figures"])
    err = capsys.readouterr().err.strip()
    assert code == 2 and len(err.splitlines()) == 1
    assert "--ocean-mask: expected a mask grid that covers the winds" in err and "Fix:" in err
    assert not (tmp_path / "o" / "results.nc").exists()


# ------------------------------------------------------------------------------------------
# The ocean below the surface: --hydrography (stratification) and --relief (shelf caution)
# ------------------------------------------------------------------------------------------


@pytest.fixture(scope="module")
def coads_below_surface(marine_climatology, levitus, etopo60, tmp_path_factory):
    """One run of COADS with the Levitus T/S and the ETOPO60 relief: (results, stdout)."""
    import contextlib
    import io

    from sverdrup_kit import open_results

    out = tmp_path_factory.mktemp("below")
    text = io.StringIO()
    with contextlib.redirect_stdout(text), contextlib.redirect_stderr(io.StringIO()):
        code = main(["diagnose", str(marine_climatology), "--hydrography", str(levitus),
                     "--relief", str(etopo60), "--basins", "earth", "--out", str(out),
                     "--no-figures", "--no-progress", "--latitudes=20,30,50"])
    assert code == 0
    return open_results(out / "results.nc"), text.getvalue()


@pytest.mark.realdata
def test_levitus_first_mode_speed_in_the_subtropics(coads_below_surface):
    # Chelton et al. (1998), J. Phys. Oceanogr. 28, 433-460 (from memory): c1 of about 2.5-3
    # m/s at 20-30 degrees, falling below 1.5 m/s poleward of 50. Medians along the rows of the
    # Levitus (1982) annual climatology.
    res, _ = coads_below_surface
    c1 = res.first_mode_gravity_wave_speed
    for basin in ("atlantic", "pacific"):
        k = list(res.basin.values).index(basin)
        row = c1.where(res.basin_id == k).median("lon")
        for lat in (-25, -21, 21, 25, 29):
            assert 2.0 <= float(row.sel(lat=lat)) <= 3.3, (basin, lat)
        assert float(row.sel(lat=55)) < 1.9
    # The default stratification is the same everywhere; this one is not.
    assert "levitus_ts.nc" in res.attrs["stratification"]
    assert "levitus_ts.nc" in res.first_mode_gravity_wave_speed.attrs["comment"]


@pytest.mark.realdata
def test_levitus_crossing_times_against_the_default_stratification(coads_below_surface):
    # Crossing time goes as 1/c1^2 (c_R = beta c1^2 / f^2, Gill 1982, section 12.4): the
    # climatology's faster subtropical first mode (2.5-3 m/s against the default's 2.2; Chelton
    # et al. 1998, from memory) crosses sooner, its slower subpolar one later.
    from sverdrup_kit.physics.adjustment import rossby_adjustment

    res, _ = coads_below_surface
    levitus = res.basin_crossing_time
    default = rossby_adjustment(res).basin_crossing_time  # same runs, default stratification
    for basin in ("atlantic", "pacific"):
        sub = slice(20, 32)
        assert (levitus.sel(basin=basin, lat=sub) < default.sel(basin=basin, lat=sub)).all()
        high = slice(48, 56)
        assert (levitus.sel(basin=basin, lat=high) > default.sel(basin=basin, lat=high)).all()


@pytest.mark.realdata
def test_relief_cautions_the_bering_shelf_rows(coads_below_surface):
    # Most of the Bering Sea north of 58N lies on the shelf, shallower than 200 m (Coachman
    # 1986, Cont. Shelf Res. 5, 23-108; from memory): the Pacific rows there get over_shelf
    # (9); the deep subtropical rows stay valid.
    res, out = coads_below_surface
    st = res.row_status.sel(basin="pacific")
    assert (st.sel(lat=slice(58, 64)) == 9).all()
    assert (st.sel(lat=slice(15, 45)) == 0).all()
    assert res.attrs["shelf_depth_m"] == 1000.0 and "etopo60.nc" in res.attrs["relief"]
    lines = out.splitlines()
    at = next(i for i, line in enumerate(lines) if line.startswith("rows cautioned over shelves"))
    pacific = next(line for line in lines[at:] if line.strip().startswith("pacific"))
    assert "59.0N to 65.0N" in pacific
    assert any(line.startswith("stratification: ") and "levitus_ts.nc" in line
               for line in lines)


def _ts_file(path, **changes):
    """A small T/S climatology (3 levels, 2 x 2 columns) with some attributes changed."""
    t = np.array([20.0, 10.0, 4.0])[:, None, None] * np.ones((3, 2, 2))
    ds = xr.Dataset(
        {"TEMP": (("depth", "lat", "lon"), t, {"units": "degC"}),
         "SALT": (("depth", "lat", "lon"), np.full((3, 2, 2), 35.0), {"units": "PSU"})},
        coords={"depth": ("depth", [0.0, 500.0, 2000.0], {"units": "m", "positive": "down"}),
                "lat": [10.0, 20.0], "lon": [200.0, 210.0]})
    for name, attrs in changes.items():
        if attrs is None:
            ds = ds.drop_vars(name)
        else:
            ds[name].attrs.update(attrs)
    ds.to_netcdf(path)
    return path


def _one_line_and_nothing_written(argv, tmp_path, capsys, option, *words):
    code = main(["diagnose", "--synthetic", "--out", str(tmp_path / "o"), "--quiet", *argv])
    err = capsys.readouterr().err.strip()
    assert code == 2, err
    assert len(err.splitlines()) == 1, err
    assert err.startswith(f"sverdrup-kit: {option}:"), err
    assert "Fix:" in err and all(w in err for w in words), err
    assert not (tmp_path / "o").exists()


def test_bad_hydrography_is_one_line_before_any_work(tmp_path, capsys, monkeypatch):
    monkeypatch.setattr("sverdrup_kit.pipeline.diagnose", lambda *a, **k: pytest.fail("ran"))
    good = _ts_file(tmp_path / "ts.nc")
    _one_line_and_nothing_written(["--hydrography", str(tmp_path / "none.nc")], tmp_path,
                                  capsys, "--hydrography", "no file", "none.nc")
    _one_line_and_nothing_written(["--hydrography", str(good), "--salinity-var", "SALINITY"],
                                  tmp_path, capsys, "--salinity-var", "'SALINITY'", "SALT")
    _one_line_and_nothing_written(["--hydrography", str(_ts_file(tmp_path / "nos.nc",
                                                                 SALT=None))],
                                  tmp_path, capsys, "--hydrography", "salinity", "--salinity-var")
    # Temperature passed as salinity: refused by its units.
    _one_line_and_nothing_written(["--hydrography", str(good), "--salinity-var", "TEMP"],
                                  tmp_path, capsys, "--salinity-var", "'degC'")
    flat = tmp_path / "flat.nc"
    xr.open_dataset(good).isel(depth=0).drop_vars("depth").to_netcdf(flat)
    _one_line_and_nothing_written(["--hydrography", str(flat)], tmp_path, capsys,
                                  "--hydrography", "vertical")
    _one_line_and_nothing_written(["--temperature-var", "T"], tmp_path, capsys,
                                  "--temperature-var", "--hydrography FILE")


def test_bad_relief_is_one_line_before_any_work(tmp_path, capsys, monkeypatch):
    monkeypatch.setattr("sverdrup_kit.pipeline.diagnose", lambda *a, **k: pytest.fail("ran"))
    _one_line_and_nothing_written(["--relief", str(tmp_path / "none.nc")], tmp_path, capsys,
                                  "--relief", "none.nc")
    frac = tmp_path / "frac.nc"
    xr.Dataset({"sftlf": (("lat", "lon"), np.zeros((2, 2)), {"units": "%"})},
               coords={"lat": [10.0, 20.0], "lon": [200.0, 210.0]}).to_netcdf(frac)
    _one_line_and_nothing_written(["--relief", str(frac)], tmp_path, capsys, "--relief",
                                  "height", "'%'")
    _one_line_and_nothing_written(["--relief", str(frac), "--relief-var", "z"], tmp_path,
                                  capsys, "--relief-var", "sftlf")
    _one_line_and_nothing_written(["--shelf-depth", "500"], tmp_path, capsys, "--shelf-depth",
                                  "--relief FILE")
    with pytest.raises(SystemExit):
        main(["diagnose", "--synthetic", "--out", str(tmp_path / "o"), "--relief", str(frac),
              "--shelf-depth", "-5"])
    assert "--shelf-depth" in capsys.readouterr().err
