"""Data recipes: clear errors when data are missing, one-line failures on the command line."""

import pytest

from data_recipes import _debian, marine_climatology


def test_missing_file_names_the_command_to_fetch_it(tmp_path, monkeypatch):
    monkeypatch.setenv("SVERDRUP_KIT_DATA", str(tmp_path))
    with pytest.raises(FileNotFoundError, match="python -m data_recipes.marine_climatology"):
        marine_climatology.path("coads_monthly")


def test_unknown_file_name_lists_the_valid_ones():
    with pytest.raises((KeyError, ValueError), match="coads"):
        marine_climatology.path("no_such_climatology")


def test_recipe_failure_is_one_line_and_exit_status_1(capsys):
    def failing_fetch(*, force):
        raise _debian.RecipeError("apt-get download failed: no Debian mirror reachable")

    assert _debian.run_recipe("marine_climatology", failing_fetch, "Doc.\n\nMore.", []) == 1
    err = capsys.readouterr().err.strip()
    assert err == "marine_climatology: apt-get download failed: no Debian mirror reachable"
