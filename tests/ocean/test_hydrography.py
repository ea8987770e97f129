"""Tests of the dynamic method and the balance check (sverdrup_kit.ocean.hydrography)."""

from __future__ import annotations

import numpy as np
import pytest
import xarray as xr

from sverdrup_kit import constants
from sverdrup_kit.ocean.hydrography import (
    LinearEquationOfState,
    _row_from_ts,
    _teos10,
    balance_check,
    geostrophic_transport,
)

from . import gsw_check_cast as cast

R = constants.EARTH_RADIUS
OMEGA = constants.OMEGA

# --- TEOS-10 -------------------------------------------------------------------------------------

def test_teos10_conversions_match_gsw_check_values():
    # Source: GSW toolbox check values gsw_cv_v3_0 (McDougall & Barker 2011), cast 1, all
    # 45 pressures; each kind of input is converted the way the data say.
    c = cast
    sa, ct = _teos10(c.T, c.SP, c.P, c.LON, c.LAT, ("in-situ", "practical"))
    np.testing.assert_allclose(sa, c.SA_FROM_SP, rtol=0, atol=1e-9)
    np.testing.assert_allclose(ct, c.CT_FROM_T, rtol=0, atol=1e-9)
    _, ct2 = _teos10(c.PT_FROM_T, c.SP, c.P, c.LON, c.LAT, ("potential", "practical"))
    np.testing.assert_allclose(ct2, c.CT_FROM_T, rtol=0, atol=1e-9)
    sa3, ct3 = _teos10(c.CT_FROM_T, c.SA_FROM_SP, c.P, c.LON, c.LAT,
                       ("conservative", "absolute"))
    np.testing.assert_array_equal(sa3, c.SA_FROM_SP)
    np.testing.assert_array_equal(ct3, c.CT_FROM_T)


def test_dynamic_height_of_a_column_matches_gsw_check_values():
    # Source: GSW toolbox check values gsw_cv_v3_0 (McDougall & Barker 2011), cast 1: specific
    # volume anomaly, dynamic height anomaly relative to 0 dbar and depth from pressure,
    # through the row tables the transports are built from. The check values integrate at a
    # 1 dbar step, this code at 5 dbar: 4.6e-4 m2 s-2 apart at most on this cast.
    c = cast
    row = _row_from_ts(c.T[:, None], c.SP[:, None], c.P, True, c.LAT, np.array([c.LON]),
                       ("in-situ", "practical"), None)
    np.testing.assert_allclose(row.z, -c.Z_FROM_P, rtol=0, atol=1e-6)
    np.testing.assert_allclose(row.A[:, 0], -c.GEO_STRF_DYN_HEIGHT, rtol=0, atol=6e-4)
    dpdz = np.gradient(c.P * 1e4, row.z)
    np.testing.assert_allclose(row.s[:, 0] / dpdz, c.SPECVOL_ANOM_STANDARD, rtol=1e-9)
