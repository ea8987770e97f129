r"""A bundled synthetic world: an invented planet with invented winds, for demos and tests.

The world is a global grid of 2 degree cells (centres 89S..89N, 1E..359E; 90 x 180) with a
12-month wind climatology built from an analytic zonal profile, a weak meridional component and
seeded month-to-month noise. Every name below is invented.

Geography
---------
Edges are in degrees; a cell is land when its centre lies inside a land shape.

=====================  =========  ==================================================================
name                   kind       where
=====================  =========  ==================================================================
Boreal Cap             land       north of 70N
Austral Cap            land       south of 66S
Aurelia                continent  320E to 60E (100 degrees) from 36S to 70N; south of 10S its
                                  west coast moves 20 degrees east and its east coast 30 degrees
                                  west, linearly, by its tip at 36S
Cendra                 continent  190E to 260E (70 degrees) from 46S to 70N; south of 10S its west
                                  coast moves 15 degrees east and its east coast 25 degrees west,
                                  linearly, by its tip at 46S
Halcyon Ocean          basin      the wide basin east of Aurelia and west of Cendra: 60E to 190E,
                                  130 degrees wide from 10S to 70N (124 beside the peninsula,
                                  150 across the strait into the gulf)
Lissom Ocean           basin      the narrow basin east of Cendra and west of Aurelia: 260E to
                                  320E, 60 degrees wide north of 10S
Quillon Peninsula      peninsula  60E to 66E, 20N to 34N, joined to Aurelia at 32N-34N
Gulf of Maren          gulf       marginal sea west of the Quillon Peninsula: 40E to 60E, 16N to
                                  32N, open to the Halcyon Ocean through the strait at 16N-20N
Isle of Brenn          island     150E to 160E, 30S to 18S (5 x 6 cells), in the Halcyon Ocean
Tiel Island            island     286E to 290E, 32N to 34N (2 x 1 cells), in the Lissom Ocean
Skerrow Passage        channel    66S to 46S: an open latitude band with no land at any longitude
=====================  =========  ==================================================================

Winds
-----
Month ``m = 0..11`` has the seasonal meridional shift (northward in northern summer)

.. math:: \delta_m = D \sin\left(2\pi\left(\frac{m + 1/2}{12} - \frac14\right)\right),
   \qquad D = 4^\circ,

and the noise-free monthly winds are zonally uniform, with :math:`\varphi' = \varphi - \delta_m`:

.. math:: u_0 = \sum_{k=0}^{4} a_k \cos(2k\varphi') + \sum_{j=0}^{2} b_j \sin((2j+1)\varphi'),
   \qquad v_0 = -V \sin(6\varphi')

with ``a = (-0.1, -2.6, -5.8, 0.7, 3.1)``, ``b = (-0.4, -0.4, 0.8)`` and ``V = 1.2`` m s-1.
In the annual mean: easterly trades peaking near 16N (-6.3 m s-1) and 16S (-7.0 m s-1),
westerlies peaking near 47N (7.4 m s-1) and 47S (9.8 m s-1), polar easterlies of about
-2 m s-1 near 74N and 78S; ``v0`` is equatorward in the trades and poleward under the
westerlies.
Because the twelve shifts come in pairs of opposite sign and
:math:`\frac{1}{12}\sum_m \cos(n\delta_m) = J_0(nD)` to within 1e-15 for these ``n``, the
annual means are the same series with every coefficient multiplied by :math:`J_0(nD)` (``n`` the
wavenumber of the term, ``D`` in radians).

Noise (``noise=True``, seed 20261201): white noise from ``numpy.random.default_rng``, smoothed
in latitude and (periodically) in longitude by ``NOISE_SMOOTHING_PASSES`` passes of the
1-2-1 filter (close to a Gaussian kernel of standard deviation sqrt(passes/2) cells,
about 5 degrees), then, separately for each month and
each latitude row, the mean over that row's ocean cells is removed, and the whole field is
scaled to a standard deviation over all ocean cells and months of exactly
``NOISE_STD_U = 1.0`` (u) and ``NOISE_STD_V = 0.7`` (v) m s-1. Hence the ocean zonal mean of
``u`` and ``v`` in every month equals the noise-free profile, up to float32 rounding.

Sub-monthly weather: within each month the wind is taken to scatter about the monthly mean as an
isotropic Gaussian with standard deviation per component
:math:`s(\varphi) = 2 + 4\sin^2(2\varphi)` m s-1 (stored as ``weather_wind_std``). Its speed
then follows a Rice distribution, and ``wind_speed`` is its mean (the scalar-mean speed a
marine climatology reports):

.. math:: \bar S = s\sqrt{\pi/2}\; e^{-z/2}\left[(1+z) I_0(z/2) + z I_1(z/2)\right],
   \qquad z = \frac{u^2 + v^2}{2 s^2},

which exceeds the speed of the monthly-mean wind, so a drag law fed with monthly means
underestimates the stress.

Wind-stress curl with a constant drag coefficient and no noise: :math:`\tau_x = \rho_a C_d S_0 u_0`
and :math:`\tau_y = \rho_a C_d S_0 v_0` with :math:`S_0 = (u_0^2 + v_0^2)^{1/2}` depend on
latitude only, so

.. math:: \operatorname{curl}\boldsymbol\tau = -\frac{1}{R\cos\varphi}
   \frac{\partial}{\partial\varphi}\left(\rho_a C_d S_0 u_0 \cos\varphi\right),

evaluated exactly by :func:`analytic_stress_curl`. A basin of zonal width
:math:`L = R\cos\varphi\,\Delta\lambda` then carries the Sverdrup interior transport
:math:`T = L\,\operatorname{curl}\boldsymbol\tau / (\rho_0\beta)`.

Use :func:`load_world` for the bundled file and :func:`make_world` to regenerate it (the two are
equal bit for bit); ``python -m sverdrup_kit.synthetic --write PATH`` writes a fresh copy.
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
from importlib import resources

import numpy as np
import xarray as xr
from scipy import special

from . import constants

__all__ = [
    "make_world",
    "load_world",
    "world_basins",
    "BASIN_LANDMARKS",
    "write_world",
    "analytic_winds",
    "analytic_stress_curl",
    "weather_std",
    "FEATURES",
    "U_COS_COEFFICIENTS",
    "U_SIN_COEFFICIENTS",
    "V_AMPLITUDE",
    "SEASONAL_SHIFT_DEG",
    "NOISE_STD_U",
    "NOISE_STD_V",
    "NOISE_SEED",
]

#: Coefficients a_k of cos(2k phi), k = 0..4, in the zonal wind, m s-1.
U_COS_COEFFICIENTS = (-0.1, -2.6, -5.8, 0.7, 3.1)
#: Coefficients b_j of sin((2j+1) phi), j = 0..2, in the zonal wind, m s-1.
U_SIN_COEFFICIENTS = (-0.4, -0.4, 0.8)
#: Amplitude V of the meridional wind -V sin(6 phi), m s-1.
V_AMPLITUDE = 1.2
#: Amplitude D of the seasonal meridional shift of the wind belts, degrees.
SEASONAL_SHIFT_DEG = 4.0
#: Standard deviation of the monthly noise in u and v over all ocean cells and months, m s-1.
NOISE_STD_U = 1.0
NOISE_STD_V = 0.7
NOISE_SEED = 20261201
NOISE_SMOOTHING_PASSES = 12
#: Version of the generator; bump it whenever the bundled file changes.
GENERATOR_VERSION = 1

DLAT = DLON = 2.0
_DATA_FILE = "synthetic_world.nc"

#: The named features: kind and a one-line description (also written to the file's attrs).
FEATURES = {
    "Boreal Cap": ("land", "north of 70N"),
    "Austral Cap": ("land", "south of 66S"),
    "Aurelia": ("continent", "320E-60E (100 degrees) from 36S to 70N, narrowing south of 10S"),
    "Cendra": ("continent", "190E-260E (70 degrees) from 46S to 70N, narrowing south of 10S"),
    "Halcyon Ocean": ("basin", "wide basin 60E-190E (130 degrees) east of Aurelia"),
    "Lissom Ocean": ("basin", "narrow basin 260E-320E (60 degrees) east of Cendra"),
    "Quillon Peninsula": ("peninsula", "60E-66E, 20N-34N, on the east coast of Aurelia"),
    "Gulf of Maren": ("gulf", "marginal sea 40E-60E, 16N-32N, west of the Quillon Peninsula"),
    "Isle of Brenn": ("island", "150E-160E, 30S-18S (5 x 6 cells), Halcyon Ocean"),
    "Tiel Island": ("island", "286E-290E, 32N-34N (2 x 1 cells), Lissom Ocean"),
    "Skerrow Passage": ("channel", "66S-46S, open at every longitude"),
}


def _grid():
    lat = np.arange(-90 + DLAT / 2, 90, DLAT)
    lon = np.arange(DLON / 2, 360, DLON)
    return lat, lon


def _ocean_mask(lat: np.ndarray, lon: np.ndarray) -> np.ndarray:
    """Boolean (lat, lon) array, True on ocean, from the shapes in the module docstring."""
    la, lo = np.meshgrid(lat, lon, indexing="ij")
    land = (la > 70) | (la < -66)

    # Continents narrow linearly from 10S to their southern tips.
    t = np.clip((-10 - la) / 26.0, 0, 1)
    east_of_320 = (lo - 320) % 360
    land |= (la > -36) & (la < 70) & (east_of_320 >= 20 * t) & (east_of_320 < 100 - 30 * t)
    t = np.clip((-10 - la) / 36.0, 0, 1)
    land |= (la > -46) & (la < 70) & (lo >= 190 + 15 * t) & (lo < 260 - 25 * t)

    land &= ~((lo > 40) & (lo < 60) & (la > 16) & (la < 32))  # Gulf of Maren
    land |= (lo > 60) & (lo < 66) & (la > 20) & (la < 34)  # Quillon Peninsula
    land |= (lo > 150) & (lo < 160) & (la > -30) & (la < -18)  # Isle of Brenn
    land |= (lo > 286) & (lo < 290) & (la > 32) & (la < 34)  # Tiel Island
    return ~land


def _check_month(month):
    if month is None:
        return None
    m = np.asarray(month)
    if not np.issubdtype(m.dtype, np.integer) or np.any((m < 0) | (m > 11)):
        raise ValueError(
            f"month: expected None (annual mean) or integers 0..11 (0 = January), found "
            f"{month!r}. Fix: pass e.g. month=6 for July."
        )
    return m


def _seasonal_shift(month) -> np.ndarray:
    """delta_m in radians."""
    return np.deg2rad(SEASONAL_SHIFT_DEG) * np.sin(2 * np.pi * ((month + 0.5) / 12 - 0.25))


def _profiles(phi, delta):
    """u0, v0 and their phi-derivatives at latitude phi (rad) with shift delta (rad)."""
    p = phi - delta
    u = np.zeros_like(p)
    du = np.zeros_like(p)
    for k, a in enumerate(U_COS_COEFFICIENTS):
        u += a * np.cos(2 * k * p)
        du -= 2 * k * a * np.sin(2 * k * p)
    for j, b in enumerate(U_SIN_COEFFICIENTS):
        n = 2 * j + 1
        u += b * np.sin(n * p)
        du += n * b * np.cos(n * p)
    v = -V_AMPLITUDE * np.sin(6 * p)
    dv = -6 * V_AMPLITUDE * np.cos(6 * p)
    return u, v, du, dv


def analytic_winds(lat, month=None):
    """Noise-free zonal and meridional wind of the synthetic world, m s-1.

    Parameters
    ----------
    lat : array_like
        Latitude, degrees_north, any shape.
    month : int or None
        0 (January) to 11, or None for the annual mean of the twelve months.

    Returns
    -------
    u0, v0 : ndarray, shape of ``lat``
        Eastward and northward wind before noise (the same at every longitude).

    Notes
    -----
    The series and the annual-mean identity (each coefficient times :math:`J_0(nD)`) are in the
    module docstring.
    """
    m = _check_month(month)
    phi = np.deg2rad(np.asarray(lat, dtype=np.float64))
    if m is not None:
        u, v, _, _ = _profiles(phi, _seasonal_shift(m))
        return u, v
    d = np.deg2rad(SEASONAL_SHIFT_DEG)
    u = sum(
        a * special.j0(2 * k * d) * np.cos(2 * k * phi) for k, a in enumerate(U_COS_COEFFICIENTS)
    )
    u = u + sum(
        b * special.j0((2 * j + 1) * d) * np.sin((2 * j + 1) * phi)
        for j, b in enumerate(U_SIN_COEFFICIENTS)
    )
    v = -V_AMPLITUDE * special.j0(6 * d) * np.sin(6 * phi)
    return u, v


def analytic_stress_curl(
    lat,
    month=None,
    *,
    drag_coefficient: float = 1.2e-3,
    air_density: float = constants.AIR_DENSITY,
    radius: float = constants.EARTH_RADIUS,
):
    r"""Exact wind-stress curl of the noise-free winds under a constant drag coefficient, N m-3.

    Parameters
    ----------
    lat : array_like
        Latitude, degrees_north (not +-90).
    month : int or None
        0 (January) to 11, or None for the mean of the twelve monthly curls.
    drag_coefficient : float
        Constant :math:`C_d`, dimensionless.
    air_density : float
        kg m-3.
    radius : float
        Planet radius, m.

    Returns
    -------
    ndarray, shape of ``lat``

    Notes
    -----
    .. math:: \operatorname{curl}\boldsymbol\tau = -\frac{\rho_a C_d}{R\cos\varphi}\left[
       (S_0' u_0 + S_0 u_0')\cos\varphi - S_0 u_0\sin\varphi\right],
       \qquad S_0' = (u_0 u_0' + v_0 v_0') / S_0,

    with primes for :math:`\partial/\partial\varphi` of the series in the module docstring.
    """
    m = _check_month(month)
    months = np.arange(12) if m is None else np.atleast_1d(m)
    phi = np.deg2rad(np.asarray(lat, dtype=np.float64))
    out = []
    for mm in months:
        u, v, du, dv = _profiles(phi, _seasonal_shift(mm))
        s = np.hypot(u, v)
        with np.errstate(invalid="ignore", divide="ignore"):
            ds = np.where(s > 0, (u * du + v * dv) / s, 0.0)
        d_flux = (ds * u + s * du) * np.cos(phi) - s * u * np.sin(phi)
        out.append(-air_density * drag_coefficient * d_flux / (radius * np.cos(phi)))
    out = np.stack(out)
    return out.mean(axis=0) if m is None else (out[0] if np.ndim(m) == 0 else out)


def _smooth(a: np.ndarray, passes: int) -> np.ndarray:
    """1-2-1 filter on the last two axes: periodic in longitude, mirrored at the poles."""
    for _ in range(passes):
        a = 0.25 * (np.roll(a, 1, axis=-1) + 2 * a + np.roll(a, -1, axis=-1))
        p = np.concatenate([a[..., :1, :], a, a[..., -1:, :]], axis=-2)
        a = 0.25 * (p[..., :-2, :] + 2 * p[..., 1:-1, :] + p[..., 2:, :])
    return a


def _noise(rng, shape, ocean: np.ndarray, std: float) -> np.ndarray:
    """Smoothed noise with zero ocean mean in every (month, row) and ocean std exactly ``std``."""
    a = _smooth(rng.standard_normal(shape), NOISE_SMOOTHING_PASSES)
    count = np.maximum(ocean.sum(axis=-1, keepdims=True), 1)
    row_mean = np.where(ocean, a, 0.0).sum(axis=-1, keepdims=True) / count
    a = np.where(ocean, a - row_mean, 0.0)
    return a * (std / np.sqrt((a**2).sum() / (ocean.sum() * shape[0])))


def weather_std(lat) -> np.ndarray:
    """Standard deviation of each wind component over sub-monthly weather, m s-1."""
    return 2.0 + 4.0 * np.sin(2 * np.deg2rad(np.asarray(lat, dtype=np.float64))) ** 2


def _rice_mean(speed: np.ndarray, s: np.ndarray) -> np.ndarray:
    """Mean of the Rice distribution, written with scaled Bessel functions to avoid overflow."""
    z = speed**2 / (2 * s**2)
    return s * np.sqrt(np.pi / 2) * ((1 + z) * special.i0e(z / 2) + z * special.i1e(z / 2))


def _mid_months():
    starts = np.arange("2001-01", "2002-02", dtype="datetime64[M]").astype("datetime64[ns]")
    return starts[:-1] + (starts[1:] - starts[:-1]) // 2


def make_world(*, noise: bool = True) -> xr.Dataset:
    """Generate the synthetic world (deterministic; equal bit for bit to the bundled file).

    Parameters
    ----------
    noise : bool, optional
        Add the seeded month-to-month noise to ``u`` and ``v`` (True for the bundled world).
        False gives the analytic winds alone, for checks against :func:`analytic_stress_curl`.

    Returns
    -------
    xarray.Dataset
        ``u``, ``v``, ``wind_speed`` (time: 12, lat: 90, lon: 180) float32 m s-1, NaN on land;
        ``ocean_mask`` (lat, lon) int8, 1 on ocean; ``weather_wind_std`` (lat) float32 m s-1.
        Features, formulas and coefficients are in the attrs and the module docstring.
    """
    if not isinstance(noise, (bool, np.bool_)):
        raise TypeError(f"noise: expected True or False, found {noise!r}. Fix: pass noise=False.")
    lat, lon = _grid()
    ocean = _ocean_mask(lat, lon)
    phi = np.deg2rad(lat)
    delta = _seasonal_shift(np.arange(12))[:, None]
    u0, v0, _, _ = _profiles(phi[None, :], delta)
    shape = (12, lat.size, lon.size)
    u = np.broadcast_to(u0[:, :, None], shape).copy()
    v = np.broadcast_to(v0[:, :, None], shape).copy()
    if noise:
        rng = np.random.default_rng(NOISE_SEED)
        u += _noise(rng, shape, ocean, NOISE_STD_U)
        v += _noise(rng, shape, ocean, NOISE_STD_V)
    s = weather_std(lat)[None, :, None]
    speed = _rice_mean(np.hypot(u, v), s)
    land = ~ocean[None]
    u[:, ~ocean] = np.nan
    v[:, ~ocean] = np.nan
    speed = np.where(land, np.nan, speed)

    dims = ("time", "lat", "lon")
    data = {"u": u, "v": v, "wind_speed": speed}
    ds = xr.Dataset(
        {name: (dims, data[name].astype(np.float32), _ATTRS[name]) for name in data},
        coords={
            "time": ("time", _mid_months(), _ATTRS["time"]),
            "lat": ("lat", lat, _ATTRS["lat"]),
            "lon": ("lon", lon, _ATTRS["lon"]),
        },
        attrs=_global_attrs(noise),
    )
    ds["ocean_mask"] = (("lat", "lon"), ocean.astype(np.int8), _ATTRS["ocean_mask"])
    ds["weather_wind_std"] = (("lat",), weather_std(lat).astype(np.float32),
                              _ATTRS["weather_wind_std"])
    return ds


_MONTHLY = {"units": "m s-1", "cell_methods": "time: mean"}
_ATTRS = {
    "u": {"standard_name": "eastward_wind", "long_name": "eastward wind, monthly mean",
          **_MONTHLY},
    "v": {"standard_name": "northward_wind", "long_name": "northward wind, monthly mean",
          **_MONTHLY},
    "wind_speed": {
        "standard_name": "wind_speed",
        "long_name": "scalar-mean wind speed over sub-monthly weather",
        "comment": "mean of the Rice distribution of speed about the monthly-mean vector, "
                   "with weather_wind_std per component",
        **_MONTHLY,
    },
    "ocean_mask": {"long_name": "ocean mask", "flag_values": np.array([0, 1], dtype=np.int8),
                   "flag_meanings": "land ocean"},
    "weather_wind_std": {
        "long_name": "standard deviation of each wind component over sub-monthly weather",
        "units": "m s-1",
        "comment": "2 + 4 sin(2 lat)**2, isotropic Gaussian",
    },
    "time": {"standard_name": "time", "long_name": "climatological month", "axis": "T",
             "comment": "12-month climatology: each value stands for the middle of that month "
                        "in every year; the year 2001 is nominal"},
    "lat": {"standard_name": "latitude", "long_name": "latitude", "units": "degrees_north",
            "axis": "Y"},
    "lon": {"standard_name": "longitude", "long_name": "longitude", "units": "degrees_east",
            "axis": "X"},
}


def _global_attrs(noise: bool) -> dict:
    attrs = {
        "title": "sverdrup_kit synthetic world: an invented planet with invented winds",
        "Conventions": "CF-1.10",
        "source": f"sverdrup_kit.synthetic.make_world(noise={bool(noise)}), generator version "
                  f"{GENERATOR_VERSION}",
        "comment": "Invented geography and winds for demonstrations and tests; not real data. "
                   "Formulas: see the docstring of sverdrup_kit.synthetic.",
        # Fixed text, no time stamp: the bundled file is reproduced bit for bit.
        "history": f"generated by sverdrup_kit.synthetic.make_world (generator version "
                   f"{GENERATOR_VERSION})",
        "climatology": "12 monthly means of a nominal year",
        "zonal_wind_profile": "u0 = sum_k a_k cos(2k p) + sum_j b_j sin((2j+1) p), "
                              "p = lat - delta_m",
        "meridional_wind_profile": "v0 = -V sin(6 p)",
        "seasonal_shift": "delta_m = D sin(2 pi ((m + 0.5)/12 - 0.25)), m = 0 (January)..11",
        "u_cos_coefficients": np.array(U_COS_COEFFICIENTS),
        "u_sin_coefficients": np.array(U_SIN_COEFFICIENTS),
        "v_amplitude": V_AMPLITUDE,
        "seasonal_shift_deg": SEASONAL_SHIFT_DEG,
        "noise": int(bool(noise)),
        "noise_seed": NOISE_SEED,
        "noise_std_u": NOISE_STD_U,
        "noise_std_v": NOISE_STD_V,
        "noise_property": "zero mean over the ocean cells of every latitude row in every month",
    }
    for name, (kind, where) in FEATURES.items():
        attrs["feature_" + name.lower().replace(" ", "_")] = f"{name}: {kind}, {where}"
    return attrs


def _encoding(ds: xr.Dataset) -> dict:
    enc = {name: {"_FillValue": None} for name in ("lat", "lon")}
    enc["time"] = {"units": "days since 2001-01-01", "calendar": "standard",
                   "dtype": "float64", "_FillValue": None}
    for name in ("u", "v", "wind_speed", "weather_wind_std"):
        enc[name] = {"dtype": "float32", "zlib": True, "complevel": 6, "shuffle": True,
                     "_FillValue": np.float32(np.nan)}
    enc["ocean_mask"] = {"dtype": "int8", "zlib": True, "_FillValue": None}
    return enc


def write_world(path, *, noise: bool = True) -> None:
    """Write :func:`make_world` to NetCDF at ``path`` atomically (temp file, then rename)."""
    path = os.fspath(path)
    ds = make_world(noise=noise)
    folder = os.path.dirname(os.path.abspath(path))
    fd, tmp = tempfile.mkstemp(suffix=".nc.tmp", dir=folder)
    os.close(fd)
    try:
        ds.to_netcdf(tmp, encoding=_encoding(ds), engine="netcdf4", format="NETCDF4")
        # mkstemp creates the file private; a data file should be readable like any other.
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)
        os.replace(tmp, path)
    except BaseException:
        os.unlink(tmp)
        raise


def load_world(*, chunks=None) -> xr.Dataset:
    """Open the bundled synthetic world (``sverdrup_kit/data/synthetic_world.nc``) in memory.

    Parameters
    ----------
    chunks : dict, optional
        When given, the loaded data are chunked with dask (e.g. ``{"time": 1}``).
    """
    ref = resources.files("sverdrup_kit").joinpath("data", _DATA_FILE)
    with resources.as_file(ref) as path:
        with xr.open_dataset(path, engine="netcdf4") as ds:
            ds = ds.load()
    return ds if chunks is None else ds.chunk(chunks)


#: A point (lat, lon) inside each named basin of the world: the wide ocean, the narrow one and
#: the open rows south of Aurelia's tip, where the two meet.
BASIN_LANDMARKS = {
    "halcyon": (29.0, 121.0),
    "lissom": (29.0, 291.0),
    "skerrow_passage": (-41.0, 1.0),
}


def world_basins(world: xr.Dataset | None = None) -> xr.DataArray:
    """Basin numbers of the synthetic world with their invented names.

    The connected ocean regions that :func:`sverdrup_kit.basin_ids` finds, each named after
    the landmark of :data:`BASIN_LANDMARKS` it contains; pass the result as ``basins=`` to
    :func:`sverdrup_kit.sverdrup_transport` or :func:`sverdrup_kit.diagnose`.
    """
    from .geometry.basins import basin_ids

    world = load_world() if world is None else world
    ids = basin_ids(world["ocean_mask"].astype(bool))
    numbers, names = [], []
    lon0 = float(ids.lon.min())
    for name, (lat, lon) in BASIN_LANDMARKS.items():
        # Put the landmark in the world's longitude convention (0..360, -180..180, ...).
        lon = lon0 + (lon - lon0) % 360.0
        number = int(ids.sel(lat=lat, lon=lon, method="nearest"))
        if number < 0 or number in numbers:
            raise RuntimeError(
                f"world_basins: the landmark of '{name}' at ({lat}, {lon}) does not fall in a "
                "basin of its own; the world's geography and BASIN_LANDMARKS disagree."
            )
        numbers.append(number)
        names.append(name)
    renumber = np.full(int(ids.max()) + 2, -1, dtype=np.int32)
    for new, old in enumerate(numbers):
        renumber[old] = new
    out = ids.copy(data=renumber[ids.values])
    return out.assign_attrs(
        long_name="basin number of the synthetic world",
        flag_values=np.arange(len(names), dtype=np.int32),
        flag_meanings=" ".join(names),
        comment="-1 on land and in ocean outside every named basin",
    )


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(
        prog="python -m sverdrup_kit.synthetic",
        description="Regenerate the synthetic world of sverdrup_kit.",
    )
    parser.add_argument("--write", metavar="PATH", required=True,
                        help="NetCDF file to write (replaced atomically)")
    parser.add_argument("--no-noise", action="store_true",
                        help="write the analytic winds without the monthly noise")
    args = parser.parse_args(argv)
    write_world(args.write, noise=not args.no_noise)
    print(f"wrote {args.write}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
