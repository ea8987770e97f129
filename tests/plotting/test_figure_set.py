"""The standard figure set: names, files, formats and the choice of figures."""

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402

from sverdrup_kit import plotting  # noqa: E402


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
    assert len(paths) == 6
