"""The batch command: results that reopen, pass a CF sanity check, and one-line errors."""

import json
import os
import subprocess
import sys

import numpy as np
import pytest
import xarray as xr

from sverdrup_kit.cli import main

from ._cf_check import cf_problems


@pytest.fixture(scope="module")
def synthetic_run(tmp_path_factory):
    out = tmp_path_factory.mktemp("run")
    code = main(["diagnose", "--synthetic", "--out", str(out), "--quiet"])
    assert code == 0
    return out


def test_results_reopen_and_units_parse_with_udunits(synthetic_run):
    # cf-units wraps UDUNITS-2, the units library the CF conventions name.
    cf_units = pytest.importorskip("cf_units")
    with xr.open_dataset(synthetic_run / "results.nc") as ds:
        assert ds.attrs["Conventions"].startswith("CF-")
        assert "navigation" in ds.attrs["purpose"]
        for name, var in ds.variables.items():
            units = var.attrs.get("units")
            if units is not None:
                cf_units.Unit(units)  # raises on anything UDUNITS cannot parse
            if name in ds.data_vars and var.dtype.kind == "f":
                assert "long_name" in var.attrs, name
                assert units is not None, name
        # Sverdrup is not "Sv" (sievert in UDUNITS): the streamfunction is convertible to m3 s-1.
        assert cf_units.Unit(ds.sverdrup_streamfunction.attrs["units"]).is_convertible("m3 s-1")
        assert ds.interior_transport.dims[-2:] == ("basin", "lat")
        assert np.isfinite(ds.interior_transport).any()


def test_results_pass_the_cf_1_8_compliance_checker(synthetic_run, monkeypatch):
    # The IOOS compliance checker's cf:1.8 suite (a general-purpose reference tool): no errors
    # and no warnings. Before: int64 gyre_boundary_count, _FillValue on lat/lon/time, latitude
    # attributes on the Ekman transports, stale cell_methods, T before basin.
    assert cf_problems(synthetic_run / "results.nc", monkeypatch) == []


def test_figures_are_written(synthetic_run):
    pngs = sorted(p.name for p in synthetic_run.glob("*.png"))
    assert len(pngs) >= 3, pngs


def test_bad_file_gives_one_clear_line(tmp_path, capsys):
    bogus = tmp_path / "not_netcdf.nc"
    bogus.write_text("this is not a NetCDF file")
    code = main(["diagnose", str(bogus), "--out", str(tmp_path / "o")])
    err = capsys.readouterr().err.strip()
    assert code == 2
    assert len(err.splitlines()) == 1, err
    assert "not_netcdf.nc" in err
    assert not (tmp_path / "o" / "results.nc").exists()


def test_missing_file_and_bad_drag_law(tmp_path, capsys):
    assert main(["diagnose", str(tmp_path / "nope.nc"), "--out", str(tmp_path)]) == 2
    assert "no such file" in capsys.readouterr().err
    code = main(["diagnose", "--synthetic", "--drag-law", "made-up-law", "--out", str(tmp_path),
                 "--no-figures"])
    err = capsys.readouterr().err.strip()
    assert code == 2 and len(err.splitlines()) == 1 and "made-up-law" in err


def test_entry_point_runs_as_a_module():
    proc = subprocess.run([sys.executable, "-m", "sverdrup_kit.cli", "--help"],
                          capture_output=True, text=True, check=True)
    assert "diagnose" in proc.stdout


@pytest.mark.realdata
def test_real_climatology_runs_and_warnings_are_one_line(marine_climatology, tmp_path, capsys):
    # COADS (Woodruff et al. 1987) has a year-0 time axis: one TimeDecodingWarning, shown as one
    # line, and the named Earth basins in the summary.
    code = main(["diagnose", str(marine_climatology), "--basins", "earth", "--out",
                 str(tmp_path), "--no-figures", "--no-progress"])
    captured = capsys.readouterr()
    assert code == 0
    err = [line for line in captured.err.splitlines() if line.strip()]
    assert len(err) == 1 and err[0].startswith("sverdrup-kit: TimeDecodingWarning:"), err
    assert "atlantic" in captured.out and "pacific" in captured.out


@pytest.mark.realdata
def test_global_product_with_default_basins_has_no_row_across_two_oceans(marine_climatology,
                                                                        tmp_path, capsys,
                                                                        monkeypatch):
    # Issue 10: with no --basins, a global Earth product gets the Earth basins, and no valid
    # row of the written results spans more than half the globe or runs south of the capes
    # from one ocean into the next (common practice: the Atlantic, Pacific and Indian basins
    # end at the latitudes of Cape Agulhas, Tasmania and Cape Horn, Times Atlas of the World).
    from sverdrup_kit import open_results
    from sverdrup_kit.geometry import integral

    monkeypatch.setattr(integral, "_NOTICE_GIVEN", False)  # the notice is given once a session
    code = main(["diagnose", str(marine_climatology), "--out", str(tmp_path), "--no-figures",
                 "--no-progress"])
    err = capsys.readouterr().err
    assert code == 0
    assert "EarthBasinsNotice" in err
    ds = open_results(tmp_path / "results.nc")
    assert list(ds.basin.values) == ["atlantic", "pacific", "indian"]
    valid = ds.row_status == 0
    span = (ds.eastern_coast_lon - ds.western_coast_lon) % 360
    assert int(valid.sum()) > 100  # not vacuous: about 40 rows per basin
    assert float(span.where(valid).max()) <= 180.0
    assert not valid.sel(lat=slice(-61, -45)).any()
    # The climatology's year-0 time axis (cftime) is written as a CF time coordinate, not as
    # text labels, and the file passes the CF-1.8 check (IOOS compliance checker).
    assert ds.interior_transport_by_time.dims == ("basin", "time", "lat")
    assert cf_problems(tmp_path / "results.nc", monkeypatch) == []


# --- figure options ------------------------------------------------------------------------------


def test_figure_names_in_help_are_the_standard_figures(capsys):
    from sverdrup_kit.cli import FIGURE_NAMES
    from sverdrup_kit.plotting import STANDARD_FIGURES

    assert list(FIGURE_NAMES) == list(STANDARD_FIGURES)
    with pytest.raises(SystemExit):
        main(["diagnose", "--help"])
    help_text = " ".join(capsys.readouterr().out.split())
    assert all(name in help_text for name in FIGURE_NAMES)


def test_chosen_figures_in_pdf_at_column_width(tmp_path):
    code = main(["diagnose", "--synthetic", "--out", str(tmp_path), "--quiet",
                 "--figures", "wind_stress_curl_map,interior_transport_by_latitude",
                 "--figure-format", "pdf", "--figure-width", "column"])
    assert code == 0
    figures = sorted(p.name for p in tmp_path.iterdir() if p.suffix not in (".nc", ".json"))
    assert figures == ["interior_transport_by_latitude.pdf", "wind_stress_curl_map.pdf"]
    # A PDF page is sized in points, 72 to the inch (ISO 32000-1:2008, 8.3.2.3, from memory):
    # a journal column is 3.5 in = 252 pt.
    head = (tmp_path / "wind_stress_curl_map.pdf").read_bytes()
    width = float(head.split(b"/MediaBox [")[1].split()[2])
    assert width == pytest.approx(252.0, abs=0.5)


@pytest.mark.parametrize("option", [["--figures", "transport"], ["--figure-width", "poster"],
                                    ["--figure-format", "jpeg"]])
def test_bad_figure_options_stop_before_any_work(tmp_path, capsys, option):
    with pytest.raises(SystemExit) as stop:
        main(["diagnose", "--synthetic", "--out", str(tmp_path / "o"), *option])
    assert stop.value.code == 2
    assert option[0] in capsys.readouterr().err
    assert not (tmp_path / "o").exists()


# ------------------------------------------------------------------------------------------
# The output folder: checked first, only the toolkit's own files, provenance recorded
# ------------------------------------------------------------------------------------------

# The manifest's name is part of the command's interface: users see it in their folder.
MANIFEST = "sverdrup-kit-manifest.json"


@pytest.fixture(scope="module")
def small_winds(tmp_path_factory):
    """The synthetic world on a 6-degree grid, two months: a run takes seconds."""
    from sverdrup_kit.synthetic import load_world

    path = tmp_path_factory.mktemp("winds") / "monthly_winds.nc"
    load_world()[["u", "v"]].isel(time=[0, 6]).coarsen(lat=3, lon=3).mean().to_netcdf(path)
    return path


def _no_compute(monkeypatch):
    def fail(*a, **k):
        raise AssertionError("the diagnosis ran before the output folder was checked")

    monkeypatch.setattr("sverdrup_kit.pipeline.diagnose", fail)


def test_out_under_a_file_is_refused_before_computing(small_winds, tmp_path, capsys,
                                                      monkeypatch):
    _no_compute(monkeypatch)
    blocker = tmp_path / "afile.txt"
    blocker.write_text("x")
    code = main(["diagnose", str(small_winds), "--out", str(blocker / "sub"), "--quiet"])
    err = capsys.readouterr().err.strip()
    assert code == 2 and err.count("\n") == 0 and err.startswith("sverdrup-kit: --out:")
    assert blocker.read_text() == "x"


@pytest.mark.skipif(os.name != "posix" or os.geteuid() == 0,
                    reason="permissions do not bind the superuser")
def test_unwritable_out_is_refused_before_computing(small_winds, tmp_path, capsys, monkeypatch):
    _no_compute(monkeypatch)
    locked = tmp_path / "locked"
    locked.mkdir()
    locked.chmod(0o500)
    try:
        code = main(["diagnose", str(small_winds), "--out", str(locked), "--quiet"])
    finally:
        locked.chmod(0o700)
    err = capsys.readouterr().err.strip()
    assert code == 2 and err.count("\n") == 0 and "not writable" in err


def test_a_users_own_files_are_not_replaced_without_overwrite(small_winds, tmp_path, capsys,
                                                              monkeypatch):
    out = tmp_path / "mine"
    out.mkdir()
    (out / "results.nc").write_text("my own results")
    (out / "notes.txt").write_text("my notes")
    with monkeypatch.context() as m:
        _no_compute(m)
        code = main(["diagnose", str(small_winds), "--out", str(out), "--quiet"])
    err = capsys.readouterr().err.strip()
    assert code == 2 and "--overwrite" in err and err.count("\n") == 0
    assert (out / "results.nc").read_text() == "my own results"
    assert sorted(p.name for p in out.iterdir()) == ["notes.txt", "results.nc"]
    code = main(["diagnose", str(small_winds), "--out", str(out), "--quiet", "--no-figures",
                 "--overwrite"])
    assert code == 0
    assert (out / "notes.txt").read_text() == "my notes"  # other files are left alone
    with xr.open_dataset(out / "results.nc") as ds:
        assert "interior_transport" in ds


@pytest.fixture(scope="module")
def rerun(small_winds, tmp_path_factory):
    """A folder left by an earlier run (a figure, a killed write) and a new run into it."""
    out = tmp_path_factory.mktemp("again")
    (out / "results.nc").write_text("old results")
    (out / "streamfunction.png").write_bytes(b"old figure")
    (out / MANIFEST).write_text(json.dumps({"files": ["results.nc", "streamfunction.png"]}))
    (out / ".results.nc.k3j9x.part").write_bytes(b"half a file")  # SIGKILL while writing
    (out / ".sverdrup-kit-staging-a1b2").mkdir()
    (out / ".sverdrup-kit-staging-a1b2" / "tmpq1.png").write_bytes(b"half a figure")
    code = main(["diagnose", str(small_winds), "--out", str(out), "--quiet", "--no-figures",
                 "--drag-law", "trenberth-1990"])
    assert code == 0
    return out


def test_stale_figures_of_an_earlier_run_are_removed(rerun):
    assert not (rerun / "streamfunction.png").exists()
    assert json.loads((rerun / MANIFEST).read_text())["files"] == ["results.nc"]


def test_leftovers_of_a_killed_run_are_cleaned(rerun):
    assert sorted(p.name for p in rerun.iterdir()) == sorted([MANIFEST, "results.nc"])


def test_results_record_input_command_drag_law_and_version(rerun, small_winds):
    from sverdrup_kit import __version__

    with xr.open_dataset(rerun / "results.nc") as ds:
        history, source = ds.attrs["history"], ds.attrs["source"]
    assert "sverdrup-kit diagnose" in history and "--drag-law trenberth-1990" in history
    assert str(small_winds) in source and "trenberth-1990" in source and __version__ in source


def test_an_input_in_the_folder_is_never_replaced(rerun, capsys):
    # Re-diagnosing from the stress of an earlier results.nc into the same folder would
    # replace the input it reads.
    before = (rerun / "results.nc").read_bytes()
    code = main(["diagnose", str(rerun / "results.nc"), "--input-kind", "stress", "--out",
                 str(rerun), "--quiet", "--no-figures"])
    err = capsys.readouterr().err.strip()
    assert code == 2 and "--out" in err and err.count("\n") == 0
    assert (rerun / "results.nc").read_bytes() == before


_KILLED_MID_WRITE = """
import os, signal, sys
import xarray as xr
from sverdrup_kit.cli import main

real = xr.Dataset.to_netcdf
def to_netcdf(self, path, *a, **k):
    with open(path, "wb") as fh:
        fh.write(b"half a file")
    os.kill(os.getpid(), signal.SIGTERM)
    return real(self, path, *a, **k)
xr.Dataset.to_netcdf = to_netcdf
sys.exit(main(sys.argv[1:]))
"""


def test_sigterm_while_writing_leaves_no_partial_file(small_winds, tmp_path):
    out = tmp_path / "o"
    run = subprocess.run([sys.executable, "-c", _KILLED_MID_WRITE, "diagnose", str(small_winds),
                          "--out", str(out), "--quiet", "--no-figures"],
                         capture_output=True, text=True, timeout=300)
    assert run.returncode in (143, -15)
    assert not out.exists() or not [p.name for p in out.iterdir() if p.suffix == ".part"]


def test_manifest_lists_exactly_the_files_written(synthetic_run):
    listed = json.loads((synthetic_run / MANIFEST).read_text())["files"]
    assert sorted(listed) == sorted(p.name for p in synthetic_run.iterdir() if p.name != MANIFEST)
    assert "results.nc" in listed and any(n.endswith(".png") for n in listed)


# ------------------------------------------------------------------------------------------
# Bad input files through the command: one line, exit 2, nothing written
# ------------------------------------------------------------------------------------------


def test_truncated_file_fails_with_one_line_and_writes_nothing(small_winds, tmp_path, capsys):
    # netCDF-C reads the lost half of a classic file as zeros: calm winds, land included.
    whole = tmp_path / "whole.nc"
    with xr.open_dataset(small_winds) as ds:
        ds.load().to_netcdf(whole, format="NETCDF3_64BIT", unlimited_dims=["time"])
    data = whole.read_bytes()
    cut = tmp_path / "cut.nc"
    cut.write_bytes(data[: len(data) // 2])
    out = tmp_path / "o"
    code = main(["diagnose", str(cut), "--out", str(out), "--quiet"])
    err = capsys.readouterr().err.strip()
    assert code == 2 and err.count("\n") == 0 and "truncated" in err
    assert not out.exists()


def test_implausible_winds_fail_with_one_line(small_winds, tmp_path, capsys):
    with xr.open_dataset(small_winds) as ds:
        bad = ds.load()
    bad["u"][0, 10, 10] = 1e6  # m s-1: beyond any measured wind
    path = tmp_path / "fast.nc"
    bad.to_netcdf(path)
    out = tmp_path / "o"
    code = main(["diagnose", str(path), "--out", str(out), "--quiet"])
    err = capsys.readouterr().err.strip()
    # Warnings (monthly means) come first, each on its line; the error is the last line.
    assert code == 2 and "Traceback" not in err
    last = err.splitlines()[-1]
    assert "u (variable 'u')" in last and "beyond" in last and "1e+06" in last
    assert "lat=" in last and "lon=" in last
    assert not out.exists()


def test_spread_refuses_a_users_folder_before_computing(small_winds, tmp_path, capsys,
                                                        monkeypatch):
    def fail(*a, **k):
        raise AssertionError("the spread ran before the output folder was checked")

    monkeypatch.setattr("sverdrup_kit.spread.transport_spread", fail)
    out = tmp_path / "mine"
    out.mkdir()
    (out / "spread.nc").write_text("my own spread")
    code = main(["spread", str(small_winds), "--ocean-mask", "data", "--out", str(out),
                 "--quiet"])
    err = capsys.readouterr().err.strip()
    assert code == 2 and "--overwrite" in err and err.count("\n") == 0
    assert (out / "spread.nc").read_text() == "my own spread"


def test_model_grid_winds_run_from_the_command_line(tmp_path, capsys, monkeypatch):
    # Issue 14 on the command line: winds on a tripolar model grid (the invented synthetic
    # world sampled onto it by nearest cell) give results on the model's own cells, the band
    # transports under the regular names, and the standard maps (drawn on a display grid).
    from sverdrup_kit import open_results
    from sverdrup_kit.synthetic import load_world
    from sverdrup_kit.synthetic_grids import tripolar_grid, with_bounds

    world = load_world()[["u", "v"]].isel(time=[0, 6])
    lat, lon, clat, clon = tripolar_grid(4.0, lon0=80.0, south=-78.0)
    at = dict(lat=xr.DataArray(lat, dims=("y", "x")),
              lon=xr.DataArray(np.mod(lon, 360.0), dims=("y", "x")))
    picked = world.sel(**at, method="nearest")
    ds = xr.Dataset(
        {n: (("time", "y", "x"), picked[n].values, {"units": "m s-1", "standard_name": s})
         for n, s in (("u", "eastward_wind"), ("v", "northward_wind"))},
        coords={"time": world.time.values,
                "lat": (("y", "x"), lat, {"units": "degrees_north", "bounds": "lat_bounds"}),
                "lon": (("y", "x"), lon, {"units": "degrees_east", "bounds": "lon_bounds"})})
    path = tmp_path / "model_winds.nc"
    with_bounds(ds, clat, clon).to_netcdf(path)
    out = tmp_path / "out"
    code = main(["diagnose", str(path), "--out", str(out), "--no-progress"])
    printed = capsys.readouterr().out
    assert code == 0
    assert "not computed (the winds are on a model grid" in printed
    res = open_results(out / "results.nc")
    assert res["grid_lat"].dims == ("y", "x") and res["lat"].dims == ("lat",)
    assert res["sverdrup_streamfunction"].dims == ("y", "x")
    assert res["interior_transport"].dims == ("basin", "lat")
    assert int((res.row_status == 0).sum()) > 10
    for name in ("wind_stress_map", "sverdrup_streamfunction_map",
                 "interior_transport_by_latitude"):
        assert (out / f"{name}.png").stat().st_size > 10_000
    assert cf_problems(out / "results.nc", monkeypatch) == []  # IOOS compliance checker
    # A stratification needs rows of latitude: refused in one line before anything is written.
    code = main(["diagnose", str(path), "--out", str(tmp_path / "out2"), "--no-progress",
                 "--hydrography", str(path)])
    err = capsys.readouterr().err.strip().splitlines()
    assert code != 0 and len(err) == 1 and "Fix:" in err[0]
