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
