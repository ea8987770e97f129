"""The standard figure set: names, files, formats and the choice of figures."""

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import pytest  # noqa: E402

from sverdrup_kit import plotting  # noqa: E402

from ._results import overlapping_texts  # noqa: E402


def test_save_standard_figures(strict, tmp_path, result):
    paths = plotting.save_standard_figures(result, tmp_path / "figs", width="column", dpi=100)
    assert [p.name for p in paths] == [
        "wind_stress_map.png", "wind_stress_curl_map.png", "ekman_pumping_map.png",
        "sverdrup_streamfunction_map.png", "interior_transport_by_latitude.png",
        "interior_transport_by_time.png"]  # no crossing times in the stand-in
    assert sorted(p.name for p in (tmp_path / "figs").iterdir()) == sorted(p.name for p in paths)
    assert not plt.get_fignums()


def test_standard_figures_of_the_real_pipeline(strict, tmp_path, world):
    # The same figures from the toolkit's own diagnosis of the synthetic world.
    from sverdrup_kit.pipeline import diagnose

    res = diagnose(world).compute()
    paths = plotting.save_standard_figures(res, tmp_path, width="column", dpi=80)
    assert [p.stem for p in paths] == list(plotting.STANDARD_FIGURES)
    # Its transports reach -100 Sv and more: wider tick labels than the stand-in's.
    for name in ("interior_transport_by_latitude", "interior_transport_by_time"):
        fig, _ = plotting.figure_set._FIGURES[name].draw(res, "column", "auto")
        assert overlapping_texts(fig) == [], name
        plt.close(fig)


@pytest.mark.parametrize("width", ["column", "page"])
def test_no_label_hides_another_or_is_cut_off(strict, result, width):
    # Every standard figure, drawn as the command line draws it (common practice: a figure a
    # journal accepts has no overlapping or clipped text).
    for name in plotting.available_figures(result):
        fig, _ = plotting.figure_set._FIGURES[name].draw(result, width, "auto")
        assert overlapping_texts(fig) == [], name
        plt.close(fig)


def test_chosen_figures_and_vector_formats(strict, tmp_path, result):
    paths = plotting.save_standard_figures(
        result, tmp_path, figures=["interior_transport_by_time", "wind_stress_curl_map"],
        width="column", fmt="svg")
    assert [p.name for p in paths] == ["interior_transport_by_time.svg",
                                       "wind_stress_curl_map.svg"]
    # SVG sizes here are in points, 72 to the inch (CSS units as SVG 1.1 section 7.10 defines
    # them, from memory): a journal column is 3.5 in = 252 pt.
    head = paths[1].read_text()[:2000]
    assert 'width="252pt"' in head


def test_bad_figure_choices_name_the_valid_ones(result, tmp_path):
    with pytest.raises(ValueError, match="wind_stress_curl_map"):
        plotting.save_standard_figures(result, tmp_path, figures=["curl"])
    with pytest.raises(ValueError, match="interior_transport_by_time"):
        plotting.save_standard_figures(result[["interior_transport"]], tmp_path,
                                       figures=["interior_transport_by_time"])
    with pytest.raises(ValueError, match="fmt"):
        plotting.save_standard_figures(result, tmp_path, fmt="jpeg")
    assert list(tmp_path.iterdir()) == []
