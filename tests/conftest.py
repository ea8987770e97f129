"""Shared fixtures: paths to the real data files fetched by ``data_recipes``.

Tests never touch the network. When a file has not been fetched, a test that needs it is
skipped with the command that fetches it; under continuous integration (``CI=true``) it fails
instead, so missing data cannot pass unnoticed.
"""

from __future__ import annotations

import os

import pytest

from data_recipes import marine_climatology as recipe


def _real_file(name: str):
    try:
        return recipe.path(name)
    except FileNotFoundError as err:
        reason = f"real data missing: {err}"
        if os.environ.get("CI") == "true":
            pytest.fail(reason, pytrace=False)
        pytest.skip(reason)


@pytest.fixture(scope="session")
def marine_climatology():
    """Path of ``coads_monthly.nc`` (COADS monthly marine surface climatology)."""
    return _real_file("coads_monthly")


@pytest.fixture(scope="session")
def etopo60():
    """Path of ``etopo60.nc`` (global relief at 60 minutes)."""
    return _real_file("etopo60")


@pytest.fixture(scope="session")
def levitus():
    """Path of ``levitus_ts.nc`` (annual temperature and salinity, 1 degree)."""
    return _real_file("levitus_ts")


@pytest.fixture(scope="session")
def navy_winds():
    """Path of ``navy_monthly_winds.nc`` (monthly surface winds, 2.5 degree, 132 months)."""
    return _real_file("navy_monthly_winds")


@pytest.fixture(scope="session")
def etopo5():
    """Path of ``etopo5.nc`` (global relief at 5 minutes, source of the built-in Earth mask)."""
    return _real_file("etopo5")
