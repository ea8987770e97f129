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
