"""What every figure shares: unit labels, global settings left alone, no plt.show()."""

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402

from sverdrup_kit import plotting  # noqa: E402
from sverdrup_kit.plotting import _style  # noqa: E402


def test_units_are_rendered_for_labels_only():
    # UDUNITS spellings to label text (common practice in journal figures).
    assert _style.pretty_units("1e6 m3 s-1") == "Sv"
    assert _style.pretty_units("N m-3") == "N m$^{-3}$"
    assert _style.pretty_units("m2 s-1") == "m$^{2}$ s$^{-1}$"
    assert _style.pretty_units("Pa") == "Pa"


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


def test_every_row_status_has_its_own_shading():
    # Each reason a row is left empty or cautioned must be told apart on a figure: its own
    # hatch and ground, and its own legend label (common practice: one legend entry per
    # meaning). The cautions (rows drawn with a value) share a ground of their own.
    # Model grids' bands use the same ROW_STATUS table.
    from sverdrup_kit.geometry.rows import ROW_STATUS
    from sverdrup_kit.plotting._style import REASONS, SKIP_REASONS

    meanings = {m for m, _ in ROW_STATUS.values()}
    shown = sorted(meanings - SKIP_REASONS)
    missing = [m for m in shown if m not in REASONS]
    assert not missing, missing
    looks = [(REASONS[m].facecolor, REASONS[m].hatch) for m in shown]
    assert len(set(looks)) == len(looks)
    assert len({REASONS[m].label for m in shown}) == len(shown)
    cautions = [m for m, why in ROW_STATUS.values() if why.startswith("caution")]
    assert cautions and {REASONS[m].facecolor for m in cautions} == {"#fbefc9"}
