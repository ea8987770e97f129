"""Grid geometry: Coriolis parameter, beta, cell sizes, periodicity."""

import numpy as np
import pytest
import xarray as xr

from sverdrup_kit import SphericalGrid, beta_parameter, coriolis_parameter
from sverdrup_kit.constants import EARTH_RADIUS
from sverdrup_kit.geometry.coords import GridError, grid_layout


def test_coriolis_parameter_matches_gsw():
    # gsw.f (TEOS-10 GSW toolbox) uses the same sidereal rate 7.292115e-5 rad/s.
    gsw = pytest.importorskip("gsw")
    lat = np.linspace(-89, 89, 37)
    np.testing.assert_allclose(coriolis_parameter(lat), gsw.f(lat), rtol=1e-12)


@pytest.mark.parametrize(
    "lat, f, beta",
    # Derived from Omega = 7.292115e-5 rad/s (Groten 2004, J. Geodesy 77) and R = 6.371e6 m.
    [(26.5, 6.5075e-5, 2.0487e-11), (30.0, 7.2921e-5, 1.9825e-11), (45.0, 1.0313e-4, 1.6187e-11)],
)
def test_f_and_beta_hand_values(lat, f, beta):
    assert coriolis_parameter(lat) == pytest.approx(f, rel=1e-4)
    assert beta_parameter(lat) == pytest.approx(beta, rel=1e-4)


def test_xarray_in_gives_cf_attributes():
    lat = xr.DataArray([10.0, 20.0], dims="lat")
    f = coriolis_parameter(lat)
    assert f.attrs["standard_name"] == "coriolis_parameter"
    assert f.attrs["units"] == "s-1"


def test_cell_areas_sum_to_the_sphere():
    # Surface of a sphere: 4 pi R^2 (geometry).
    g = SphericalGrid.regular(2.0)
    assert g.cell_area.sum() == pytest.approx(4 * np.pi * EARTH_RADIUS**2, rel=1e-12)
    # A 1-degree cell at the equator is about 111.2 km wide (2 pi R / 360; common practice).
    g1 = SphericalGrid.regular(1.0)
    assert g1.dx[90, 0] == pytest.approx(2 * np.pi * EARTH_RADIUS / 360, rel=1e-4)


@pytest.mark.parametrize(
    "lon, periodic",
    [
        (np.arange(0, 360, 2.0), True),
        (np.arange(21, 380, 2.0), True),
        (np.arange(-180, 180, 2.5), True),
        (np.arange(0, 358, 2.0), False),
        (np.arange(100, 200, 1.0), False),
    ],
)
def test_periodicity_is_recognised(lon, periodic):
    da = xr.DataArray(np.zeros((3, lon.size)), coords={"lat": [0.0, 1.0, 2.0], "lon": lon},
                      dims=("lat", "lon"))
    assert grid_layout(da).periodic is periodic


def test_coordinates_found_by_attributes_and_ambiguity_refused():
    da = xr.DataArray(np.zeros((3, 4)), dims=("COADSY", "COADSX"),
                      coords={"COADSY": ("COADSY", [0.0, 1.0, 2.0], {"units": "degrees_north"}),
                              "COADSX": ("COADSX", [21.0, 23.0, 25.0, 27.0],
                                         {"units": "degrees_east"})})
    lay = grid_layout(da)
    assert (lay.lat_name, lay.lon_name) == ("COADSY", "COADSX")
    two = da.expand_dims(lat2=[5.0, 6.0]).assign_coords(
        lat2=("lat2", [5.0, 6.0], {"units": "degrees_north"}))
    with pytest.raises(GridError, match="several"):
        grid_layout(two)
    with pytest.raises(GridError, match="expected a latitude"):
        grid_layout(xr.DataArray(np.zeros((3, 4)), dims=("a", "b")))


def test_matching_positions_compares_longitudes_on_the_circle():
    # The same cells in 0..360 and -180..180 (and a value a hair below 360 matching 0) match;
    # shifted cells do not (common practice: longitudes are equal modulo 360).
    from sverdrup_kit.geometry.coords import matching_positions

    a = np.arange(1.0, 360.0, 2.0)
    b = (a + 180.0) % 360.0 - 180.0
    take = matching_positions(a, b, 360.0)
    np.testing.assert_allclose(a[take] % 360.0, b % 360.0)
    assert matching_positions(a, b + 0.5, 360.0) is None
    np.testing.assert_array_equal(
        matching_positions(np.array([0.0, 120.0, 240.0]), np.array([359.9999999, 120.0, 240.0]),
                           360.0), [0, 1, 2])
    np.testing.assert_array_equal(matching_positions(np.array([0.0, 1.0, 2.0]),
                                                     np.array([2.0, 0.0, 1.0])), [2, 0, 1])
