"""The batch command: results that reopen, pass a CF sanity check, and one-line errors."""

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
    figures = sorted(p.name for p in tmp_path.iterdir() if p.suffix != ".nc")
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
