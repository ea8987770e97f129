"""The table of observed sections that test Sverdrup balance."""

import numpy as np
import pytest

from sverdrup_kit import balance_section_observations


def test_rapid_parts_add_up_to_the_published_overturning():
    # RAPID 26.5N, 2004-2022 means: Florida Current 31.3, Ekman 3.8, upper mid-ocean -18.1 Sv,
    # overturning 16.9 Sv (RAPID-MOCHA time series; McCarthy et al. 2015, Prog. Oceanogr. 130,
    # for the method; from memory). The array defines the overturning as the sum of the three
    # (derived from that definition), so the table's parts must add up to 16.9 within rounding.
    obs = balance_section_observations("atlantic")
    rapid = obs.where(obs.lat == 26.5, drop=True)
    assert float(rapid.transport.sum()) == pytest.approx(16.9, abs=0.15)
    umo = rapid.sel(observation="RAPID 26.5N upper mid-ocean")
    assert str(umo.component.values) == "interior geostrophic"
    assert float(umo.spread) == 3.5


def test_table_has_sources_periods_and_units():
    obs = balance_section_observations()
    assert obs.transport.attrs["units"] == "1e6 m3 s-1"
    assert set(obs.basin.values) == {"atlantic", "pacific"}
    for name in obs.observation.values:
        row = obs.sel(observation=name)
        assert str(row.source.values) and str(row.period.values)
        assert np.isfinite(float(row.transport))
    pacific = balance_section_observations("pacific")
    assert "Hautala" in str(pacific.source.values[0])
    with pytest.raises(ValueError, match="basin: expected one of"):
        balance_section_observations("arctic")
