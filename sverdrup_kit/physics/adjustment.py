r"""When should Sverdrup balance hold? Long baroclinic Rossby waves and the lagged response.

The interior ocean does not answer a change of the wind at once: the change is carried west
from the eastern coast by long baroclinic Rossby waves, and the Sverdrup balance holds at a
point only once the wave front has passed it. This module gives

- the first baroclinic mode's gravity-wave speed :math:`c_1` from a stratification
  (:func:`first_mode_speed`, :func:`first_mode_speed_from_ts`, :func:`default_n_squared`);
- the long Rossby-wave speed, the Rossby radius and the crossing time from each eastern coast,
  along the same runs of cells as the Sverdrup integral (:func:`rossby_adjustment`);
- whether a row had time to adjust at a given time scale (:func:`adjustment_flags`);
- the lagged response of a linear long-wave model driven by the Ekman pumping record
  (:func:`long_wave_response`).

The numerical cores are plain NumPy functions at the end of the module (``_mode_*``,
``_march_*``); the wrappers validate, put fields on the canonical grid and attach metadata.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np
import xarray as xr

from .. import constants
from .._compiled.dispatch import curl_kernel, fill_from_neighbours
from ..errors import GridError, InputError
from ..geometry.coords import from_canonical, require_dataarray, to_canonical
from ..geometry.grid import SphericalGrid
from ..io.units import to_si

__all__ = [
    "DEFAULT_STRATIFICATION",
    "TIME_SCALES",
    "adjustment_flags",
    "averaging_period",
    "default_n_squared",
    "first_mode_speed",
    "first_mode_speed_from_ts",
    "long_wave_response",
    "rossby_adjustment",
]

SECONDS_PER_DAY = 86400.0
#: Length of the Julian year in days (IAU), used for the standard time scales below.
DAYS_PER_YEAR = 365.25

#: The standard time scales a time-resolved transport is judged at, in days.
TIME_SCALES = {
    "monthly": DAYS_PER_YEAR / 12.0,
    "seasonal": DAYS_PER_YEAR / 4.0,
    "annual": DAYS_PER_YEAR,
}

#: The stratification used where none is given: an exponential buoyancy-frequency profile
#: N(z) = N0 exp(-depth / b) down to a flat bottom, with the canonical values of Garrett &
#: Munk (1972) as restated by Munk (1981): N0 = 5.2e-3 s-1, b = 1300 m; bottom at 4000 m
#: (common practice for a mean ocean depth). It is the same at every latitude, so it gives a
#: first-mode speed of about 2.2 m s-1 everywhere; real oceans are more stratified in the
#: tropics and less at high latitude (Chelton et al. 1998): pass a climatology where it matters.
DEFAULT_STRATIFICATION = {"n0": 5.2e-3, "e_folding_depth": 1300.0, "bottom_depth": 4000.0}

_DEPTH_NAMES = ("depth", "z", "lev", "level", "deptht", "depth_mid", "zaxlevitr")


# --------------------------------------------------------------------------------------------
# The vertical-mode problem
# --------------------------------------------------------------------------------------------


def default_n_squared(depth=None, *, n0: float = DEFAULT_STRATIFICATION["n0"],
                      e_folding_depth: float = DEFAULT_STRATIFICATION["e_folding_depth"],
                      bottom_depth: float = DEFAULT_STRATIFICATION["bottom_depth"]):
    r"""The documented default stratification: :math:`N^2(z) = N_0^2 e^{-2\,\mathrm{depth}/b}`.

    Parameters
    ----------
    depth : array_like, optional
        Depths in m (positive down) of the samples; default 10 m spacing, 5 m to
        ``bottom_depth - 5`` m (cell centres of 10 m layers).
    n0 : float, optional
        Surface buoyancy frequency, s-1 (Garrett & Munk 1972: 5.2e-3 s-1, i.e. 3 cycles per hour).
    e_folding_depth : float, optional
        m (Garrett & Munk 1972: 1300 m).
    bottom_depth : float, optional
        m, the flat bottom of the column.

    Returns
    -------
    xarray.DataArray (depth,)
        ``n_squared`` in s-2 with a ``depth`` coordinate (m, positive down); samples are
        centred in their layers, so the last layer ends at ``bottom_depth`` (also an attribute).

    References
    ----------
    Garrett, C., and W. Munk (1972). Space-time scales of internal waves. Geophys. Fluid Dyn.
    3, 225-264.
    Munk, W. (1981). Internal waves and small-scale processes. In Evolution of Physical
    Oceanography, MIT Press, 264-291.
    """
    for name, value in (("n0", n0), ("e_folding_depth", e_folding_depth),
                        ("bottom_depth", bottom_depth)):
        if not (np.isfinite(value) and value > 0):
            raise InputError(f"{name}: expected a finite positive number, found {value!r}. "
                             f"Fix: e.g. {name}={DEFAULT_STRATIFICATION[name]}.")
    if depth is None:
        edges = np.arange(0.0, bottom_depth + 1e-9, 10.0)
        if edges[-1] < bottom_depth:
            edges = np.append(edges, bottom_depth)
        depth = 0.5 * (edges[1:] + edges[:-1])
    else:
        depth = np.asarray(depth, dtype=np.float64)
        edges = _edges_from_centres(depth, bottom_depth)
    n2 = n0**2 * np.exp(-2.0 * depth / e_folding_depth)
    return xr.DataArray(
        n2, dims=("depth",), name="n_squared",
        coords={"depth": ("depth", depth, {"units": "m", "positive": "down",
                                           "standard_name": "depth"})},
        attrs={"long_name": "squared buoyancy frequency (default stratification)",
               "standard_name": "square_of_brunt_vaisala_frequency_in_sea_water",
               "units": "s-2", "bottom_depth": float(edges[-1]),
               "comment": f"N0^2 exp(-2 depth / b), N0 = {n0:g} s-1, b = {e_folding_depth:g} m, "
               f"flat bottom at {bottom_depth:g} m (Garrett & Munk 1972)"},
    )


def _edges_from_centres(depth, bottom_depth=None):
    depth = np.asarray(depth, dtype=np.float64)
    if depth.size == 1:
        bottom = 2.0 * depth[0] if bottom_depth is None else bottom_depth
        return np.array([0.0, bottom])
    mid = 0.5 * (depth[1:] + depth[:-1])
    bottom = depth[-1] + (depth[-1] - mid[-1]) if bottom_depth is None else bottom_depth
    return np.concatenate([[0.0], mid, [bottom]])


def _depth_dim(da: xr.DataArray, depth_dim, argname: str) -> str:
    if depth_dim is not None:
        if depth_dim not in da.dims:
            raise InputError(f"depth_dim: expected a dimension of {argname} {da.dims}, found "
                             f"{depth_dim!r}. Fix: pass the name of the vertical dimension.")
        return depth_dim
    found = [d for d in da.dims
             if str(d).lower() in _DEPTH_NAMES
             or str(da[d].attrs.get("positive", "")).lower() in ("up", "down")
             or str(da[d].attrs.get("axis", "")).upper() == "Z"]
    if len(found) != 1:
        raise InputError(
            f"{argname}: expected one vertical dimension (named like depth or z, or with a "
            f"'positive' or axis='Z' attribute), found dims {da.dims}. Fix: pass depth_dim='...'."
        )
    return found[0]


def _depths_m(coord: xr.DataArray, argname: str) -> np.ndarray:
    """Depths in m, positive down, from a vertical coordinate (positive up or down)."""
    units = str(coord.attrs.get("units", "m")).strip().lower()
    factor = {"m": 1.0, "meter": 1.0, "meters": 1.0, "metre": 1.0, "metres": 1.0,
              "km": 1e3, "cm": 1e-2}.get(units)
    if factor is None:
        raise InputError(
            f"{argname}: expected a vertical coordinate '{coord.name}' in m, found units "
            f"{coord.attrs.get('units')!r}. Fix: convert to depth in m (for pressure in dbar, "
            "use -gsw.z_from_p(p, lat))."
        )
    z = np.asarray(coord.values, dtype=np.float64) * factor
    if str(coord.attrs.get("positive", "")).lower() == "up" or (z.size and np.nanmax(z) <= 0
                                                                and np.nanmin(z) < 0):
        z = -z
    if z.size > 1 and not np.all(np.diff(z) > 0):
        raise InputError(
            f"{argname}: expected depths increasing downward along '{coord.name}', found "
            f"{z[:4]}... Fix: sort by depth, e.g. {argname}.sortby('{coord.name}')."
        )
    if z.size and z[0] < 0:
        raise InputError(f"{argname}: expected depths >= 0 m, found {z[0]:g} m at the top.")
    return z


def first_mode_speed(n_squared, *, depth_dim: str | None = None, depth_edges=None,
                     bottom_depth=None, max_spacing: float = 50.0) -> xr.DataArray:
    r"""Gravity-wave speed :math:`c_1` of the first baroclinic mode from a profile of :math:`N^2`.

    Parameters
    ----------
    n_squared : xarray.DataArray (..., depth)
        Squared buoyancy frequency in s-2 at depths in m (a vertical coordinate positive down,
        or positive up with negative values). Each value holds over a layer whose edges are
        ``depth_edges`` when given, else half-way between samples, with the top at the sea
        surface. NaN marks levels below the bottom: each column ends
        at the lower edge of its deepest valid value (a missing value above it counts as
        zero). Negative values (static instability)
        are taken as zero. Any other dimensions (lat, lon, ...) are columns.
    depth_dim : str, optional
        Name of the vertical dimension, when it is not found by name or attribute.
    depth_edges : array_like (depth + 1,), optional
        m, positive down, increasing: the layer edges (e.g. the data levels between which
        ``gsw.Nsquared`` gives N^2, with 0 on top).
    bottom_depth : float, optional
        m. Depth of a flat bottom below the deepest sample, replacing the last lower edge.
    max_spacing : float, optional
        m. Layers are divided into equal sub-layers no thicker than this for the solve.

    Returns
    -------
    xarray.DataArray (...)
        ``first_mode_gravity_wave_speed`` in m s-1, float64; NaN where a column has no
        positive :math:`N^2`. Lazy (dask) where the input is, one column block at a time.

    Notes
    -----
    The vertical structure :math:`W(z)` of the vertical velocity of a free linear mode on a
    flat bottom, rigid lid (Gill 1982, section 6.11):

    .. math:: \frac{d^2 W}{dz^2} + \frac{N^2(z)}{c^2} W = 0, \qquad W(0) = W(-H) = 0,

    solved with linear finite elements (stiffness exact for piecewise-linear :math:`W`, lumped
    mass :math:`\int N^2 dz` over each node's half-layers, so a density jump concentrated in
    one thin layer is represented exactly). The smallest eigenvalue :math:`\lambda_1 = 1/c_1^2`
    of :math:`A W = \lambda M W` is found by bisection on the Sturm count (the number of
    negative pivots of :math:`A - \lambda M`, which equals the number of eigenvalues below
    :math:`\lambda` because :math:`A` is positive definite and :math:`M \ge 0`).

    Closed forms (derived): constant N over depth H gives :math:`c_1 = N H/\pi`; two layers
    of thickness :math:`h_1, h_2` with reduced gravity :math:`g'` give
    :math:`c_1 = \sqrt{g' h_1 h_2/(h_1 + h_2)}`.

    Examples
    --------
    Constant :math:`N = 2\times10^{-3}` s-1 over 4000 m: :math:`NH/\pi = 2.546` m s-1.

    >>> import numpy as np, xarray as xr
    >>> depth = np.arange(50.0, 4000.0, 100.0)
    >>> n2 = xr.DataArray(np.full(depth.size, 4e-6), dims="depth", coords={"depth": depth},
    ...                   attrs={"units": "s-2"})
    >>> c1 = float(first_mode_speed(n2))
    >>> abs(c1 / (2e-3 * 4000.0 / np.pi) - 1) < 1e-4
    True

    References
    ----------
    Gill, A. E. (1982). Atmosphere-Ocean Dynamics. Academic Press, sections 6.11 and 6.17.
    Chelton, D. B., R. A. deSzoeke, M. G. Schlax, K. El Naggar and N. Siwertz (1998).
    Geographical variability of the first baroclinic Rossby radius of deformation. J. Phys.
    Oceanogr. 28, 433-460.
    """
    n2 = require_dataarray(n_squared, "n_squared")
    zdim = _depth_dim(n2, depth_dim, "n_squared")
    depth = _depths_m(n2[zdim], "n_squared")
    if depth_edges is None:
        edges = _edges_from_centres(depth)
    else:
        edges = np.abs(np.asarray(depth_edges, dtype=np.float64))
        if edges.shape != (depth.size + 1,) or not np.all(np.diff(edges) > 0):
            raise InputError(
                f"depth_edges: expected {depth.size + 1} increasing depths in m (one more than "
                f"the levels of n_squared), found shape {edges.shape}. Fix: pass the layer "
                "edges, top (0) to bottom.")
    if bottom_depth is not None:
        if not (np.isfinite(bottom_depth) and bottom_depth > edges[-2]):
            raise InputError(
                f"bottom_depth: expected a depth in m below the last layer's top ({edges[-2]:g}"
                f" m), found {bottom_depth!r}. Fix: pass a deeper bottom or None.")
        edges = edges.copy()
        edges[-1] = float(bottom_depth)
    if not (np.isfinite(max_spacing) and max_spacing > 0):
        raise InputError(f"max_spacing: expected a positive number of m, found {max_spacing!r}.")
    units = str(n2.attrs.get("units", "s-2")).replace(" ", "").lower()
    if units not in ("s-2", "1/s2", "s**-2", "s^-2", "1/s^2", "rad2s-2", "radians2s-2"):
        raise InputError(f"n_squared: expected units s-2, found {n2.attrs.get('units')!r}. "
                         "Fix: convert, or set n_squared.attrs['units'] = 's-2'.")
    data = n2.chunk({zdim: -1}) if n2.chunks is not None else n2
    out = xr.apply_ufunc(
        _mode_speed_kernel, data,
        input_core_dims=[[zdim]],
        dask="parallelized", output_dtypes=[np.float64],
        kwargs=dict(edges=edges, max_spacing=float(max_spacing)),
    )
    return out.rename("first_mode_gravity_wave_speed").assign_attrs(
        long_name="gravity-wave speed of the first baroclinic mode", units="m s-1",
        comment="eigenvalue of W'' + N^2 W / c^2 = 0, W = 0 at the surface and at the bottom "
        "(flat bottom, rigid lid); linear finite elements on sub-layers of at most "
        f"{max_spacing:g} m",
    )


def first_mode_speed_from_ts(temperature, salinity, *, depth_dim: str | None = None,
                             max_spacing: float = 50.0) -> xr.DataArray:
    r"""First baroclinic gravity-wave speed from a temperature and salinity climatology.

    Parameters
    ----------
    temperature : xarray.DataArray (..., depth, lat, lon)
        In-situ temperature, degrees Celsius (ITS-90), NaN below the bottom and on land.
    salinity : xarray.DataArray, same shape
        Practical salinity (PSS-78).
    depth_dim : str, optional
        Name of the vertical dimension (depth in m, positive down), when not found by name.
    max_spacing : float, optional
        As in :func:`first_mode_speed`.

    Returns
    -------
    xarray.DataArray (..., lat, lon)
        ``first_mode_gravity_wave_speed`` in m s-1; NaN where fewer than two levels have data.

    Notes
    -----
    TEOS-10 through gsw: pressure from depth (``gsw.p_from_z``), Absolute Salinity and
    Conservative Temperature (``gsw.SA_from_SP``, ``gsw.CT_from_t``), then the squared
    buoyancy frequency between neighbouring levels (``gsw.Nsquared``), which holds over the
    layer between the two levels. The column ends at its deepest level with data, taken as a
    flat bottom; the layer above the first level (when it is below the surface) takes the
    first value. The mode problem is then solved as in :func:`first_mode_speed`.

    References
    ----------
    IOC, SCOR and IAPSO (2010). The international thermodynamic equation of seawater - 2010.
    Manuals and Guides 56, UNESCO.
    """
    import gsw

    t = require_dataarray(temperature, "temperature")
    s = require_dataarray(salinity, "salinity")
    zdim = _depth_dim(t, depth_dim, "temperature")
    if t.dims != s.dims or t.shape != s.shape:
        raise InputError(f"temperature and salinity: expected the same dims and shape, found "
                         f"{t.dims} {t.shape} and {s.dims} {s.shape}. Fix: pass fields of the "
                         "same climatology.")
    depth = _depths_m(t[zdim], "temperature")
    if depth.size < 2:
        raise InputError(f"temperature: expected at least 2 levels along '{zdim}', found "
                         f"{depth.size}.")
    grid = SphericalGrid.from_data(t, argname="temperature")
    lay = grid.layout
    lat = xr.DataArray(np.asarray(t[lay.lat_name].values, float), dims=(lay.lat_name,),
                       coords={lay.lat_name: t[lay.lat_name]})
    lon = xr.DataArray(np.asarray(t[lay.lon_name].values, float), dims=(lay.lon_name,),
                       coords={lay.lon_name: t[lay.lon_name]})
    edges = np.concatenate([[0.0], depth]) if depth[0] > 0 else depth
    n_layers = edges.size - 1

    def kernel(temp, salt, la, lo):
        temp = np.asarray(temp, dtype=np.float64)
        salt = np.asarray(salt, dtype=np.float64)
        la = np.broadcast_to(la, temp.shape[:-1])[..., None]
        lo = np.broadcast_to(lo, temp.shape[:-1])[..., None]
        p = gsw.p_from_z(-depth, la)
        sa = gsw.SA_from_SP(salt, p, lo, la)
        ct = gsw.CT_from_t(sa, temp, p)
        n2, _ = gsw.Nsquared(sa, ct, p, la, axis=-1)
        if n_layers > n2.shape[-1]:
            n2 = np.concatenate([n2[..., :1], n2], axis=-1)
        return _mode_speed_kernel(n2, edges=edges, max_spacing=float(max_spacing))

    tt = t.chunk({zdim: -1}) if t.chunks is not None else t
    ss = s.chunk({zdim: -1}) if s.chunks is not None else s
    la_b, lo_b = xr.broadcast(lat, lon)
    out = xr.apply_ufunc(
        kernel, tt, ss, la_b, lo_b,
        input_core_dims=[[zdim], [zdim], [], []],
        dask="parallelized", output_dtypes=[np.float64],
    )
    return out.rename("first_mode_gravity_wave_speed").assign_attrs(
        long_name="gravity-wave speed of the first baroclinic mode", units="m s-1",
        comment="from in-situ temperature and practical salinity through TEOS-10 (gsw.Nsquared) "
        "and the vertical-mode eigenproblem W'' + N^2 W / c^2 = 0, W = 0 at the surface and at "
        "the deepest level with data (flat bottom, rigid lid)",
    )


# --------------------------------------------------------------------------------------------
# Runs of cells along which the waves travel (the same runs as the Sverdrup integral)
# --------------------------------------------------------------------------------------------

#: integration_class values of a Sverdrup result whose cells belong to a basin row's main run
#: group (counted or not) and to marginal seas, see sverdrup_kit.geometry.basins.CELL_CLASS.
_MAIN_CLASSES = (1, 3)
_MARGINAL_CLASS = 2
_REQUIRED = ("basin_id", "integration_class", "row_status", "eastern_coast_lon")


@dataclass
class _Runs:
    """Runs of one Sverdrup result, each listed from its eastern cell westward (flat indices)."""

    cells: list
    basin: np.ndarray
    row: np.ndarray
    main: np.ndarray
    counted: np.ndarray
    grid: SphericalGrid
    names: list


def _segments(m: np.ndarray, periodic: bool):
    """Runs of True as (west index, length); a run may wrap round a periodic row."""
    nx = m.size
    if not m.any():
        return []
    if m.all():
        return [(0, nx)]
    shift = int(np.flatnonzero(~m)[0]) if periodic else 0
    mm = np.roll(m, -shift)
    d = np.diff(np.concatenate([[False], mm, [False]]).astype(np.int8))
    return [(int((s + shift) % nx), int(e - s))
            for s, e in zip(np.flatnonzero(d == 1), np.flatnonzero(d == -1))]


def _check_result(result, argname="sverdrup_result"):
    if not isinstance(result, xr.Dataset) or any(v not in result for v in _REQUIRED):
        found = list(result.data_vars) if isinstance(result, xr.Dataset) else type(result).__name__
        raise TypeError(
            f"{argname}: expected the Dataset returned by sverdrup_kit.sverdrup_transport (with "
            f"{', '.join(_REQUIRED)}), found {found}. Fix: pass the whole result of "
            "sverdrup_transport(taux, tauy) or diagnose(winds)."
        )


def _runs_of(result: xr.Dataset, *, radius, omega) -> tuple[_Runs, object]:
    _check_result(result)
    grid0 = SphericalGrid.from_data(result["basin_id"], argname="sverdrup_result",
                                    radius=radius, omega=omega)
    lay = grid0.layout
    bid = np.asarray(to_canonical(result["basin_id"], lay)
                     .transpose(lay.lat_name, lay.lon_name).values)
    cls = np.asarray(to_canonical(result["integration_class"], lay)
                     .transpose(lay.lat_name, lay.lon_name).values)
    names = [str(b) for b in result["basin"].values]
    ny, nx = bid.shape
    cells, basin, row, main, counted = [], [], [], [], []
    for b in range(len(names)):
        for j in range(ny):
            in_b = bid[j] == b
            for member, is_main in ((np.isin(cls[j], _MAIN_CLASSES), True),
                                    (cls[j] == _MARGINAL_CLASS, False)):
                for w, n in _segments(in_b & member, grid0.periodic):
                    idx = (w + n - 1 - np.arange(n)) % nx
                    cells.append(j * nx + idx)
                    basin.append(b)
                    row.append(j)
                    main.append(is_main)
                    counted.append(bool(is_main and (cls[j, idx] == 1).all()))
    runs = _Runs(cells, np.array(basin, int), np.array(row, int), np.array(main, bool),
                 np.array(counted, bool), grid0, names)
    return runs, lay


def _speed_on_grid(first_mode, runs: _Runs, lay) -> np.ndarray:
    """c1 (ny, nx) on the canonical grid, gaps inside the integrated cells filled."""
    grid = runs.grid
    if first_mode is None:
        c1 = float(_default_speed())
        return np.full(grid.shape, c1)
    if isinstance(first_mode, (int, float, np.floating, np.integer)):
        if not (np.isfinite(first_mode) and first_mode > 0):
            raise InputError(f"first_mode_speed: expected a positive speed in m s-1, found "
                             f"{first_mode!r}. Fix: e.g. first_mode_speed=2.5.")
        return np.full(grid.shape, float(first_mode))
    c1 = require_dataarray(first_mode, "first_mode_speed")
    extra = [d for d in c1.dims if d not in (lay.lat_name, lay.lon_name)]
    if extra:
        raise InputError(
            f"first_mode_speed: expected (lat, lon) on the grid of sverdrup_result, found "
            f"dims {c1.dims}. Fix: select one field, e.g. first_mode_speed.isel({extra[0]}=0)."
        )
    lay_c = SphericalGrid.from_data(c1, argname="first_mode_speed").layout
    same = (lay_c.lat.shape == lay.lat.shape and lay_c.lon.shape == lay.lon.shape
            and np.allclose(lay_c.lat, lay.lat) and np.allclose(
                np.mod(lay_c.lon - lay.lon + 180.0, 360.0) - 180.0, 0.0, atol=1e-6))
    if not same:
        raise GridError(
            "first_mode_speed: expected the grid of sverdrup_result "
            f"({lay.lat.size} lat x {lay.lon.size} lon), found {lay_c.lat.size} x "
            f"{lay_c.lon.size}. Fix: interpolate it first, e.g. "
            "c1.interp(lat=result.lat, lon=result.lon, method='nearest')."
        )
    vals = np.asarray(to_canonical(c1, lay_c).transpose(lay_c.lat_name, lay_c.lon_name).values,
                      dtype=np.float64)
    vals = np.where(vals > 0, vals, np.nan)
    target = np.zeros(grid.shape, dtype=bool)
    for c in runs.cells:
        target.flat[c] = True
    filled = fill_from_neighbours(vals, target=target | np.isfinite(vals),
                                  periodic=grid.periodic)
    if target.any() and np.isnan(filled[target]).any():
        raise InputError(
            "first_mode_speed: expected values in (or next to) every basin integrated by the "
            "Sverdrup result, found a basin with none. Fix: compute it over the same ocean, or "
            "pass a single speed, e.g. first_mode_speed=2.5."
        )
    return filled


@lru_cache(maxsize=1)
def _default_speed() -> float:
    """c1 of :data:`DEFAULT_STRATIFICATION`, solved once per session."""
    return float(first_mode_speed(default_n_squared()))


def _travel_times(runs: _Runs, c1: np.ndarray):
    """Per run: travel time (s) to each face, east to west; long-wave speed (ny, nx)."""
    grid = runs.grid
    f = grid.f[:, None]
    with np.errstate(divide="ignore", invalid="ignore"):
        c_r = grid.beta[:, None] * c1**2 / f**2
    dx = grid.dx
    faces = []
    for cells in runs.cells:
        dt = dx.flat[cells] / c_r.flat[cells]
        faces.append(np.concatenate([[0.0], np.cumsum(dt)]))
    return faces, c_r


def rossby_adjustment(sverdrup_result, *, first_mode_speed=None,
                      radius: float = constants.EARTH_RADIUS,
                      omega: float = constants.OMEGA) -> xr.Dataset:
    r"""Long Rossby-wave speed, Rossby radius and crossing times along the Sverdrup runs.

    Parameters
    ----------
    sverdrup_result : xarray.Dataset
        From :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport` (or
        :func:`~sverdrup_kit.pipeline.diagnose`): ``basin_id``, ``integration_class``,
        ``row_status`` and ``eastern_coast_lon`` say which runs of cells were integrated
        westward from which eastern coast. Not modified.
    first_mode_speed : None, float or xarray.DataArray (lat, lon), optional
        First baroclinic gravity-wave speed :math:`c_1` in m s-1, e.g. from
        :func:`first_mode_speed_from_ts` interpolated onto the grid of the result. Gaps
        inside the integrated cells are filled by nearest-ocean averaging. ``None`` uses the
        default stratification :data:`DEFAULT_STRATIFICATION` (about 2.2 m s-1 everywhere).
    radius, omega : float, optional
        Earth radius (m) and rotation rate (rad s-1); the grid's f and beta come from them.

    Returns
    -------
    xarray.Dataset
        On the grid and in the order of the result:

        - ``first_mode_gravity_wave_speed`` (lat, lon), m s-1: the :math:`c_1` used;
        - ``first_mode_rossby_radius`` (lat, lon), m: :math:`c_1/|f|`;
        - ``long_rossby_wave_speed`` (lat, lon), m s-1, positive westward:
          :math:`c_R = \beta c_1^2/f^2`;
        - ``rossby_crossing_time`` (lat, lon), days: travel time of the long wave from the
          eastern coast of the cell's run to the cell centre (every integrated cell, marginal
          seas included);
        - ``basin_crossing_time`` (basin, lat), days: from the eastern coast to the western
          boundary; where large islands split a row, the longest of its runs (each starts at
          its own eastern coast). NaN where the row has no eastern coast.

    Notes
    -----
    A reduced-gravity (first-mode) layer with Ekman pumping obeys, for scales much larger than
    the Rossby radius and frequencies much below :math:`\beta R_d`, the long-wave equation
    :math:`h_t - c_R h_x = -w_E` (see :func:`long_wave_response`); its characteristics run
    west at :math:`c_R`, so the crossing time from the eastern coast :math:`x_E` is

    .. math:: t_c(x) = \int_x^{x_E} \frac{dx'}{c_R(x')},

    summed cell by cell (:math:`c_R` constant in a cell) along the runs of the Sverdrup
    integral. The Sverdrup balance can hold at a point only for changes slower than
    :math:`t_c` there (Anderson & Gill 1975). Within a few degrees of the equator the
    long-wave limit fails; those rows are left empty by the Sverdrup result anyway.

    References
    ----------
    Anderson, D. L. T., and A. E. Gill (1975). Spin-up of a stratified ocean, with
    applications to upwelling. Deep-Sea Res. 22, 583-596.
    Chelton, D. B., et al. (1998). Geographical variability of the first baroclinic Rossby
    radius of deformation. J. Phys. Oceanogr. 28, 433-460.
    Gill, A. E. (1982). Atmosphere-Ocean Dynamics. Academic Press, section 12.4.
    """
    runs, lay = _runs_of(sverdrup_result, radius=radius, omega=omega)
    grid = runs.grid
    like = sverdrup_result["basin_id"]
    c1 = _speed_on_grid(first_mode_speed, runs, lay)
    faces, c_r = _travel_times(runs, c1)
    ny, nx = grid.shape
    t_cell = np.full(ny * nx, np.nan)
    nb = len(runs.names)
    t_row = np.full((nb, ny), np.nan)
    for k, (cells, s) in enumerate(zip(runs.cells, faces)):
        t_cell[cells] = 0.5 * (s[:-1] + s[1:])
        if runs.main[k]:
            b, j = runs.basin[k], runs.row[k]
            t_row[b, j] = np.fmax(t_row[b, j], s[-1])
    t_cell = t_cell.reshape(ny, nx) / SECONDS_PER_DAY
    t_row = t_row / SECONDS_PER_DAY
    water = np.asarray(to_canonical(like, lay).transpose(lay.lat_name, lay.lon_name).values) >= 0
    ocean = (np.isfinite(t_cell) | water) & np.isfinite(c1)
    with np.errstate(divide="ignore", invalid="ignore"):
        rd = c1 / np.abs(grid.f[:, None])
    hw = (lay.lat_name, lay.lon_name)
    canon = to_canonical(like, lay)
    coords = {lay.lat_name: canon[lay.lat_name], lay.lon_name: canon[lay.lon_name]}

    def field(values, **attrs):
        return xr.DataArray(np.where(ocean, values, np.nan), dims=hw, coords=coords,
                            attrs=attrs)

    ds = xr.Dataset({
        "first_mode_gravity_wave_speed": field(
            c1, long_name="gravity-wave speed of the first baroclinic mode", units="m s-1",
            comment="default stratification (exponential N, Garrett & Munk 1972)"
            if first_mode_speed is None else "as given"),
        "first_mode_rossby_radius": field(
            rd, long_name="first baroclinic Rossby radius of deformation", units="m",
            comment="c1 / |f|"),
        "long_rossby_wave_speed": field(
            c_r, long_name="westward phase speed of long first-mode baroclinic Rossby waves",
            units="m s-1", comment="beta c1^2 / f^2, positive westward (non-dispersive long-wave "
            "limit)"),
        "rossby_crossing_time": xr.DataArray(
            t_cell, dims=hw, coords=coords, attrs=dict(
                long_name="long Rossby-wave travel time from the eastern coast", units="days",
                comment="integral of dx / c_R from the eastern coast of the cell's run to the "
                "cell centre; missing where the Sverdrup integral does not run")),
    })
    ds = from_canonical(ds, lay, like)
    ds["basin_crossing_time"] = xr.DataArray(
        t_row, dims=("basin", lay.lat_name),
        coords={"basin": sverdrup_result["basin"], lay.lat_name: canon[lay.lat_name]},
        attrs=dict(long_name="long Rossby-wave crossing time from the eastern coast to the "
                   "western boundary", units="days",
                   comment="integral of dx / c_R over the row's main run (the longest run "
                   "where large islands split it); missing where the row has no eastern coast"),
    ).reindex({lay.lat_name: like[lay.lat_name]})
    return ds.assign_attrs(
        title="Long baroclinic Rossby-wave adjustment",
        first_mode_speed_source="default stratification" if first_mode_speed is None else (
            "constant" if np.ndim(first_mode_speed) == 0 and not isinstance(
                first_mode_speed, xr.DataArray) else "field"),
    )


# --------------------------------------------------------------------------------------------
# Time scales and flags
# --------------------------------------------------------------------------------------------


def _seconds(time: xr.DataArray, argname: str) -> np.ndarray:
    """Times in seconds since the first, from datetime64 or cftime values."""
    values = time.values
    if np.issubdtype(values.dtype, np.datetime64):
        return (values - values[0]).astype("timedelta64[ns]").astype(np.float64) / 1e9
    if values.dtype == object and values.size and hasattr(values[0], "calendar"):
        return np.array([(v - values[0]).total_seconds() for v in values], dtype=np.float64)
    raise TypeError(
        f"{argname}: expected a 'time' coordinate of dates (datetime64 or cftime), found dtype "
        f"{values.dtype}. Fix: decode times, e.g. xr.decode_cf(ds), or assign dates."
    )


def averaging_period(time) -> tuple[str, float]:
    """Name and length (days) of the averaging period of a record, from its time steps.

    Parameters
    ----------
    time : xarray.DataArray (time,)
        Dates (datetime64 or cftime) of the record's steps, one value per averaging period.

    Returns
    -------
    name : str
        ``"monthly"``, ``"seasonal"`` or ``"annual"`` when the median step lies within 20% of
        :data:`TIME_SCALES`, else ``"input_step"``.
    length : float
        The median step in days (the standard length for a named period).
    """
    t = time if isinstance(time, xr.DataArray) else xr.DataArray(np.asarray(time), dims="time")
    if t.size < 2:
        raise InputError(f"time: expected at least 2 steps to tell the averaging period, found "
                         f"{t.size}. Fix: pass the record's time coordinate.")
    step = float(np.median(np.diff(_seconds(t, "time")))) / SECONDS_PER_DAY
    for name, days in TIME_SCALES.items():
        if abs(step - days) <= 0.2 * days:
            return name, days
    return "input_step", step


def adjustment_flags(crossing_time, *, time=None) -> xr.DataArray:
    """Whether each basin row had time to adjust, per time scale.

    Parameters
    ----------
    crossing_time : xarray.DataArray (basin, lat)
        ``basin_crossing_time`` of :func:`rossby_adjustment`, in days.
    time : xarray.DataArray (time,), optional
        The record's dates. Adds the time scale ``"record"`` (number of steps times the median
        step) when that is longer than 1.2 years and, when the step is not monthly, seasonal or
        annual, ``"input_step"``.

    Returns
    -------
    xarray.DataArray (time_scale, basin, lat), int8
        ``sverdrup_adjusted``, CF flags: 1 ``adjusted`` (the crossing time to the western
        boundary is shorter than the time scale: a change of the wind that lasts that long has
        reached the whole row), 0 ``not_adjusted``, 2 ``no_crossing_time`` (the row has no
        eastern coast or no ocean). Coordinate ``time_scale_length`` gives each scale in days.

    Notes
    -----
    The test :math:`t_c < T` is the long-wave criterion of Anderson & Gill (1975): after the
    front from the eastern coast has crossed, the interior holds the Sverdrup transport of the
    wind it has felt; for forcing periods :math:`T \\lesssim t_c` the interior transport lags
    and departs from the instantaneous Sverdrup transport (see :func:`long_wave_response`).
    """
    ct = require_dataarray(crossing_time, "crossing_time")
    if "basin" not in ct.dims:
        raise InputError(f"crossing_time: expected (basin, lat) from rossby_adjustment, found "
                         f"dims {ct.dims}. Fix: pass result['basin_crossing_time'].")
    scales = dict(TIME_SCALES)
    if time is not None:
        name, step = averaging_period(time)
        if name == "input_step":
            scales[name] = step
        # A record of a year or less (a climatology's 12 months) adds nothing to "annual".
        if step * time.size > 1.2 * DAYS_PER_YEAR:
            scales["record"] = step * time.size
    lengths = xr.DataArray(list(scales.values()), dims="time_scale",
                           coords={"time_scale": list(scales)})
    ok = ct < lengths
    flags = xr.where(ct.notnull(), ok.astype(np.int8), np.int8(2)).astype(np.int8)
    flags = flags.transpose("time_scale", *ct.dims)
    flags.attrs = {}
    return flags.rename("sverdrup_adjusted").assign_coords(
        time_scale_length=("time_scale", list(scales.values()),
                           {"long_name": "length of the time scale", "units": "days"})
    ).assign_attrs(
        long_name="whether the row had time to adjust to Sverdrup balance at this time scale",
        flag_values=np.array([0, 1, 2], dtype=np.int8),
        flag_meanings="not_adjusted adjusted no_crossing_time",
        comment="adjusted when the long Rossby-wave crossing time from the eastern coast to the "
        "western boundary (basin_crossing_time) is shorter than the time scale (Anderson & Gill "
        "1975); time scales: " + ", ".join(f"{k} {v:.4g} days" for k, v in scales.items()),
    )


# --------------------------------------------------------------------------------------------
# The lagged response: a linear long-wave model driven by the Ekman pumping record
# --------------------------------------------------------------------------------------------


def long_wave_response(taux, tauy, sverdrup_result, *, first_mode_speed=None,
                       damping_time=None, periodic: bool = False, initial: str = "rest",
                       rho0: float = constants.RHO0, radius: float = constants.EARTH_RADIUS,
                       omega: float = constants.OMEGA) -> xr.Dataset:
    r"""Thermocline anomaly and interior transport of a linear long-wave ocean under a wind record.

    Parameters
    ----------
    taux, tauy : xarray.DataArray (time, lat, lon)
        Eastward and northward surface stress in Pa on the grid of ``sverdrup_result``, one
        value per step of the record (dates in ``time``). The forcing is taken as linear in
        time between the steps.
    sverdrup_result : xarray.Dataset
        From :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport` on the same grid
        (e.g. of the record's mean stress): the runs of cells and the eastern coasts the
        waves start from. Not modified.
    first_mode_speed : None, float or xarray.DataArray (lat, lon), optional
        :math:`c_1` in m s-1, as in :func:`rossby_adjustment`.
    damping_time : float, optional
        Linear damping time :math:`1/r` of the thermocline anomaly, in days; ``None`` for no
        damping.
    periodic : bool, optional
        Treat the record as one period of a cycle repeated for ever (a climatology) and return
        the periodic state: no spin-up, no initial condition. The period is the number of
        steps times the median step.
    initial : {"rest", "steady"}, optional
        For a record that is not periodic: the ocean at rest at the first step (``"rest"``:
        the wind is switched on then), or in the steady (Sverdrup-adjusted, with damping the
        damped steady) state of the first step's wind (``"steady"``: the wind changes from
        there on).
    rho0 : float, optional
        Reference sea-water density, kg m-3 (as in the Sverdrup result).
    radius, omega : float, optional
        Earth radius (m) and rotation rate (rad s-1).

    Returns
    -------
    xarray.Dataset
        On the grid and in the order of the input, with the input's ``time``:

        - ``thermocline_anomaly`` (time, lat, lon), m: upper-layer thickness anomaly
          :math:`h`, positive where the thermocline is deeper, at cell centres;
        - ``long_wave_northward_transport`` (time, lat, lon), m2 s-1: depth-integrated
          meridional transport :math:`V = (c_1^2/f)\,h_x + V_E`;
        - ``long_wave_interior_transport`` (time, basin, lat), 1e6 m3 s-1: its zonal integral
          over the same cells as the Sverdrup interior transport, positive northward;
        - ``ekman_pumping`` (time, lat, lon), m s-1: the forcing (gaps inside the integrated
          cells filled by nearest-ocean averaging).

        Computed in memory (the march runs along the whole record); missing outside the cells
        of the Sverdrup integral.

    Notes
    -----
    A 1.5-layer (reduced-gravity) ocean, or the first baroclinic mode with gravity-wave speed
    :math:`c_1^2 = g'H`, in the long-wave limit (scales much larger than :math:`c_1/f`,
    periods much longer than :math:`1/(\beta c_1/f)`). With :math:`h` the upper-layer thickness
    anomaly (positive down-going thermocline), :math:`w_E` the Ekman pumping (positive
    upward, :func:`~sverdrup_kit.physics.ekman.ekman`) and geostrophic flow
    :math:`(u_g, v_g) H = (g'H/f)(-h_y, h_x)`, mass conservation gives

    .. math:: h_t - c_R h_x = -w_E - r h, \qquad c_R = \frac{\beta c_1^2}{f^2},

    because :math:`\nabla\cdot(H\mathbf u_g) = -(\beta g'H/f^2) h_x` (Anderson & Gill 1975;
    Meyers 1979; Gill 1982, section 12.4). The boundary condition is :math:`h = 0` at each
    eastern coast (coastal Kelvin waves are taken as instantaneous). It is integrated
    along its characteristics :math:`dx/dt = -c_R`: in the travel-time coordinate
    :math:`s(x) = \int_x^{x_E} dx'/c_R` the equation is :math:`h_t + h_s = -w_E - r h`, and the
    march steps along :math:`s` and :math:`t` together with equal steps :math:`\Delta`
    (forcing constant in each cell, split at the faces, trapezoidal in time), from each
    eastern coast westward; :math:`\Delta`
    divides the record step by a power of 2 chosen per run so that it is at most half of the
    shortest cell crossing.

    The depth-integrated meridional transport is the geostrophic part plus the Ekman part:

    .. math:: V = \frac{c_1^2}{f} h_x - \frac{\tau_x}{\rho_0 f}.

    In a steady state :math:`h_x = w_E/c_R`, so :math:`V = f w_E/\beta - \tau_x/(\rho_0 f)
    = \operatorname{curl}\boldsymbol\tau/(\rho_0\beta)`, the Sverdrup transport (using
    :math:`w_E = \operatorname{curl}\boldsymbol\tau/(\rho_0 f) + \beta\tau_x/(\rho_0 f^2)`).
    The model reaches it at a point once the wave front from the eastern coast has passed
    (after :math:`t_c(x)`, :func:`rossby_adjustment`); for slow forcing it follows Sverdrup
    with a lag. It leaves out the mean flow, topography, nonlinearity, higher vertical modes
    and the short (dispersive) waves.

    References
    ----------
    Anderson, D. L. T., and A. E. Gill (1975). Spin-up of a stratified ocean, with
    applications to upwelling. Deep-Sea Res. 22, 583-596.
    Meyers, G. (1979). On the annual Rossby wave in the tropical North Pacific Ocean. J. Phys.
    Oceanogr. 9, 663-674.
    Gill, A. E. (1982). Atmosphere-Ocean Dynamics. Academic Press, section 12.4.
    """
    taux = require_dataarray(taux, "taux")
    tauy = require_dataarray(tauy, "tauy")
    _check_result(sverdrup_result)
    if "time" not in taux.dims or "time" not in tauy.dims:
        raise InputError(f"taux: expected a 'time' dimension (the record), found dims "
                         f"{taux.dims}. Fix: for a single field use sverdrup_transport.")
    if taux.sizes["time"] < 2:
        raise InputError(f"taux: expected at least 2 time steps, found {taux.sizes['time']}.")
    if initial not in ("rest", "steady"):
        raise InputError(f"initial: expected 'rest' or 'steady', found {initial!r}.")
    if damping_time is not None and not (np.isfinite(damping_time) and damping_time > 0):
        raise InputError(f"damping_time: expected a positive number of days or None, found "
                         f"{damping_time!r}. Fix: e.g. damping_time=3650 (10 years).")
    runs, lay = _runs_of(sverdrup_result, radius=radius, omega=omega)
    grid = runs.grid
    lay_t = SphericalGrid.from_data(taux, argname="taux").layout
    extra = [d for d in taux.dims if d not in ("time", lay_t.lat_name, lay_t.lon_name)]
    if extra:
        raise InputError(f"taux: expected dims (time, lat, lon), found {taux.dims}. Fix: select "
                         f"one value of {extra}, e.g. taux.isel({extra[0]}=0).")
    if not (lay_t.lat.shape == lay.lat.shape and np.allclose(lay_t.lat, lay.lat)
            and lay_t.lon.shape == lay.lon.shape and np.allclose(
                np.mod(lay_t.lon - lay.lon + 180.0, 360.0) - 180.0, 0.0, atol=1e-6)):
        raise GridError(
            "taux and sverdrup_result: expected the same grid, found "
            f"{lay_t.lat.size} x {lay_t.lon.size} and {lay.lat.size} x {lay.lon.size} cells. "
            "Fix: compute sverdrup_result from this stress (e.g. its time mean)."
        )
    t_sec = _seconds(taux["time"], "taux")
    if not np.all(np.diff(t_sec) > 0):
        raise InputError("taux: expected increasing times, found repeated or unsorted dates. "
                         "Fix: taux.sortby('time').")
    ny, nx = grid.shape
    target = np.zeros((ny, nx), dtype=bool)
    for c in runs.cells:
        target.flat[c] = True
    water = np.asarray(to_canonical(sverdrup_result["basin_id"], lay)
                       .transpose(lay.lat_name, lay.lon_name).values) >= 0

    def record(da, name):
        si = to_si(da, "stress", argname=name, default="Pa")
        a = to_canonical(si, lay_t).transpose("time", lay_t.lat_name, lay_t.lon_name).values
        a = np.asarray(a, dtype=np.float64)
        # Gaps and small islands filled as the Sverdrup integral fills them, before the curl.
        return fill_from_neighbours(a, target=water | np.isfinite(a).any(axis=0),
                                    periodic=grid.periodic)

    tx, ty = record(taux, "taux"), record(tauy, "tauy")
    curl = curl_kernel(tx, ty, grid.phi, grid.lam, periodic=grid.periodic, radius=grid.radius)
    f = grid.f[:, None]
    with np.errstate(divide="ignore", invalid="ignore"):
        w_e = curl / (rho0 * f) + grid.beta[:, None] * tx / (rho0 * f**2)
        v_ek = -tx / (rho0 * f)
    w_e = np.where(target, w_e, np.nan)
    if np.isnan(w_e.reshape(w_e.shape[0], -1)[:, target.ravel()]).any():
        raise InputError("taux: expected stress over every basin of sverdrup_result in every "
                         "time step, found a basin with none. Fix: use the same ocean mask.")
    c1 = _speed_on_grid(first_mode_speed, runs, lay)
    faces, c_r = _travel_times(runs, c1)
    rate = 0.0 if damping_time is None else 1.0 / (damping_time * SECONDS_PER_DAY)
    n_t = t_sec.size
    period = None
    if periodic:
        period = float(np.median(np.diff(t_sec))) * n_t
    # h is wanted at every face (for h_x) and every centre (for the map).
    points = [np.concatenate([s, 0.5 * (s[:-1] + s[1:])]) for s in faces]
    w_flat = w_e.reshape(n_t, -1)
    h_points = _march_runs(w_flat, t_sec, runs.cells, faces, points, rate=rate,
                           period=period, initial=initial)

    f = grid.f[:, None] * np.ones((1, nx))
    dx = grid.dx
    h_out = np.full((n_t, ny * nx), np.nan)
    v_out = np.full((n_t, ny * nx), np.nan)
    nb = len(runs.names)
    t_out = np.zeros((n_t, nb, ny))
    has_row = np.zeros((nb, ny), dtype=bool)
    v_ek_flat = v_ek.reshape(n_t, -1)
    for k, cells in enumerate(runs.cells):
        n = cells.size
        hp = h_points[k]
        h_faces, h_centres = hp[:, : n + 1], hp[:, n + 1:]
        h_out[:, cells] = h_centres
        geo = (c1.flat[cells] ** 2 / f.flat[cells]) * (h_faces[:, :-1] - h_faces[:, 1:]) \
            / dx.flat[cells]
        v = geo + v_ek_flat[:, cells]
        v_out[:, cells] = v
        if runs.counted[k]:
            b, j = runs.basin[k], runs.row[k]
            t_out[:, b, j] += (v * dx.flat[cells]).sum(axis=1) / constants.SVERDRUP_IN_M3_S
            has_row[b, j] = True
    t_out = np.where(has_row[None], t_out, np.nan)

    hw = ("time", lay_t.lat_name, lay_t.lon_name)
    canon = to_canonical(taux, lay_t)
    coords = {"time": taux["time"], lay_t.lat_name: canon[lay_t.lat_name],
              lay_t.lon_name: canon[lay_t.lon_name]}
    w_shown = np.where(target[None], w_e, np.nan)
    ds = xr.Dataset({
        "thermocline_anomaly": (hw, h_out.reshape(n_t, ny, nx), dict(
            long_name="upper-layer thickness anomaly of the long-wave model", units="m",
            comment="positive where the thermocline is deeper; h_t - c_R h_x = -w_E - r h, "
            "h = 0 at each eastern coast")),
        "long_wave_northward_transport": (hw, v_out.reshape(n_t, ny, nx), dict(
            long_name="depth-integrated northward transport per unit width of the long-wave "
            "model", units="m2 s-1",
            comment="(c1^2 / f) dh/dx (geostrophic) - taux / (rho0 f) (Ekman)")),
        "ekman_pumping": (hw, w_shown.reshape(n_t, ny, nx), dict(
            long_name="Ekman pumping velocity (positive upward)", units="m s-1",
            comment="the forcing of the long-wave model, w_E = curl(tau) / (rho0 f) + beta "
            "taux / (rho0 f^2) with the curl of the gap-filled stress as in the Sverdrup "
            "integral")),
    }, coords=coords)
    ds = from_canonical(ds, lay_t, taux)
    ds["long_wave_interior_transport"] = xr.DataArray(
        t_out, dims=("time", "basin", lay_t.lat_name),
        coords={"time": taux["time"], "basin": sverdrup_result["basin"],
                lay_t.lat_name: canon[lay_t.lat_name]},
        attrs=dict(long_name="interior transport of the long-wave model across the basin",
                   units="1e6 m3 s-1",
                   comment="zonal integral of long_wave_northward_transport over the cells of "
                   "the Sverdrup interior transport, positive northward; equals the Sverdrup "
                   "interior transport of a steady wind once the long Rossby wave has crossed"),
    ).reindex({lay_t.lat_name: taux[lay_t.lat_name]})
    return ds.assign_attrs(
        title="Lagged response of a linear long-wave (first baroclinic mode) ocean",
        rho0=rho0,
        damping_time_days="none" if damping_time is None else float(damping_time),
        periodic=int(bool(periodic)),
        initial="periodic" if periodic else initial,
        first_mode_speed_source="default stratification" if first_mode_speed is None
        else "given",
    )


# --------------------------------------------------------------------------------------------
# Numerical cores (plain NumPy, float64)
# --------------------------------------------------------------------------------------------


def _mode_speed_kernel(n2, *, edges, max_spacing):
    r"""First-mode speed of each column: bisection on the Sturm count of :math:`A - \lambda M`.

    ``n2`` (..., L): N^2 of the layers between ``edges`` (L + 1,), NaN below a column's
    bottom. Returns c1 (...) in m s-1, NaN for columns with no positive N^2.
    """
    n2 = np.asarray(n2, dtype=np.float64)
    shape = n2.shape[:-1]
    n2 = n2.reshape(-1, n2.shape[-1])
    n_col, n_lay = n2.shape
    thick = np.diff(edges)
    sub = np.maximum(1, np.ceil(thick / max_spacing - 1e-9)).astype(int)
    # Sub-layers: thickness d (S,), N^2 per column (n_col, S), layer of each sub-layer.
    layer_of = np.repeat(np.arange(n_lay), sub)
    d = np.repeat(thick / sub, sub)
    valid = np.isfinite(n2)
    # A column ends at the lower edge of its deepest valid layer.
    n_valid = np.where(valid.any(axis=1), n_lay - np.argmax(valid[:, ::-1], axis=1), 0)
    n_sub = np.concatenate([[0], np.cumsum(sub)])[n_valid]  # sub-layers per column
    q = np.where(valid, np.maximum(n2, 0.0), 0.0)[:, layer_of]  # (n_col, S)
    # Interior nodes k = 1..n_sub-1, between sub-layers k-1 and k.
    a = 1.0 / d[:-1] + 1.0 / d[1:]  # (S-1,)
    e = -1.0 / d[1:-1]  # coupling of node k and k+1, (S-2,)
    m = 0.5 * (q[:, :-1] * d[:-1] + q[:, 1:] * d[1:])  # (n_col, S-1)
    n_nodes = n_sub - 1
    active = np.arange(d.size - 1)[None, :] < n_nodes[:, None]
    m = np.where(active, m, 0.0)
    good = (n_nodes >= 1) & (m.sum(axis=1) > 0)
    out = np.full(n_col, np.nan)
    if not good.any():
        return out.reshape(shape)
    m, active, n_nodes = m[good], active[good], n_nodes[good]
    # Upper bound: the Rayleigh quotient of a half sine over the column.
    z = np.cumsum(d)[:-1]
    depth_c = np.concatenate([[0.0], np.cumsum(d)])[n_nodes + 1]
    trial = np.where(active, np.sin(np.pi * z[None, :] / depth_c[:, None]), 0.0)
    ta = a * trial**2
    ta[:, :-1] += 2.0 * e * trial[:, :-1] * trial[:, 1:]
    hi = ta.sum(axis=1) / (m * trial**2).sum(axis=1)
    lo = np.zeros_like(hi)
    tiny = np.finfo(float).tiny
    for _ in range(52):
        lam = 0.5 * (lo + hi)
        count = np.zeros(lam.size, dtype=int)
        piv = np.ones_like(lam)
        for k in range(d.size - 1):
            diag = a[k] - lam * m[:, k]
            piv = diag - (e[k - 1] ** 2 / piv if k > 0 else 0.0)
            piv = np.where(piv == 0.0, -tiny, piv)
            count += (piv < 0) & active[:, k]
            if not active[:, k].any():
                break
        below = count >= 1
        hi = np.where(below, lam, hi)
        lo = np.where(below, lo, lam)
    out[good] = 1.0 / np.sqrt(0.5 * (lo + hi))
    return out.reshape(shape)


def _march_runs(w, t, cells, faces, points, *, rate, period, initial, max_level=12,
                max_elements=4_000_000):
    r"""Integrate :math:`h_t + h_s = -w - r h`, :math:`h(s=0) = 0`, along each run.

    Parameters
    ----------
    w : ndarray (n_t, n_cells_total)
        Forcing (Ekman pumping, m s-1) at the record times, flat cell index.
    t : ndarray (n_t,)
        Record times, s, increasing from 0.
    cells, faces, points : lists over runs
        Flat cell indices east to west; travel time s (s) at the cell faces (n + 1,), from 0;
        travel times at which h is wanted.
    rate : float
        Damping rate r, s-1.
    period : float or None
        The record repeats with this period (s) and the periodic state is returned.
    initial : "rest" or "steady"
        Initial state at t[0] of a record that does not repeat.

    Returns
    -------
    list of ndarray (n_t, n_points) per run: h at the record times, m.

    Notes
    -----
    Slot m of a run sits at travel time :math:`s_m = m\Delta` and time step k at
    :math:`t_k = k\Delta`, so that the characteristic through slot m-1 at step k-1 reaches
    slot m at step k: :math:`h_{m,k} = e^{-r\Delta} h_{m-1,k-1} - F_{m,k}`, with
    :math:`F` the forcing integrated along that piece of characteristic: the forcing is
    constant in each cell and linear in time, so the piece is split at the cell face it
    crosses (if any) and each part integrated by the trapezoid rule in time, decayed from
    its midpoint. The march goes along m (westward from the coast) with all k at once. A
    periodic record wraps k; otherwise :math:`h_{m,0}` is the initial state. Values between
    slots are interpolated linearly in s and in t, plus the difference between the piecewise
    forcing and its mean over the interval (so a steady state is exact at every face).
    """
    n_t = t.size
    if period is None:
        dt0 = float(np.median(np.diff(t)))
    else:
        dt0 = period / n_t
    out = [None] * len(cells)
    levels = []
    for s in faces:
        shortest = float(np.min(np.diff(s))) if s.size > 1 else np.inf
        need = dt0 / (0.5 * shortest) if shortest > 0 else np.inf
        levels.append(int(min(max_level, max(0, math.ceil(math.log2(need))) if need > 1 else 0)))
    levels = np.array(levels)
    for p in np.unique(levels):
        members = np.flatnonzero(levels == p)
        if period is None:
            n_k = int(math.ceil(t[-1] / (dt0 / 2**p) - 1e-9)) + 1
            delta = t[-1] / (n_k - 1)
            t_int = np.arange(n_k) * delta
        else:
            n_k = n_t * 2**p
            delta = period / n_k
            t_int = np.arange(n_k) * delta
        # Batches small enough that (runs x steps) and (steps x cells) arrays stay in memory.
        batch, size_c = [], 0
        for r in members:
            batch.append(r)
            size_c += cells[r].size
            if len(batch) * n_k >= max_elements or size_c * n_k >= max_elements:
                _march_batch(batch, w, t, cells, faces, points, out, t_int, delta, rate,
                             period, initial)
                batch, size_c = [], 0
        if batch:
            _march_batch(batch, w, t, cells, faces, points, out, t_int, delta, rate, period,
                         initial)
    return out


def _forcing_at(w, t, t_int, cols, period):
    """Forcing of the cells ``cols`` at the internal times, linear in time between records."""
    wc = w[:, cols]
    if period is not None:
        t = np.append(t, t[0] + period)
        wc = np.concatenate([wc, wc[:1]], axis=0)
        t_int = np.mod(t_int - t[0], period) + t[0]
    i = np.clip(np.searchsorted(t, t_int, side="right") - 1, 0, t.size - 2)
    a = ((t_int - t[i]) / (t[i + 1] - t[i]))[:, None]
    return wc[i] * (1.0 - a) + wc[i + 1] * a


def _time_weights(t, t_int, delta, period):
    """Indices and weights of the internal steps around each record time."""
    n_k = t_int.size
    kf = (t - t[0]) / delta
    k0 = np.floor(kf + 1e-9).astype(int)
    wt = kf - k0
    if period is None:
        k0 = np.clip(k0, 0, n_k - 1)
        k1 = np.clip(k0 + 1, 0, n_k - 1)
    else:
        k0 = k0 % n_k
        k1 = (k0 + 1) % n_k
    return k0, k1, np.clip(wt, 0.0, 1.0)


def _march_batch(batch, w, t, cells, faces, points, out, t_int, delta, rate, period, initial):
    n_r = len(batch)
    n_k = t_int.size
    all_cells = np.concatenate([cells[r] for r in batch])
    offsets = np.concatenate([[0], np.cumsum([cells[r].size for r in batch])])
    forcing = _forcing_at(w, t, t_int, all_cells, period)  # (n_k, C)
    n_slots = np.array([int(math.floor(faces[r][-1] / delta)) + 2 for r in batch])
    m_max = int(n_slots.max())
    # Column of the forcing felt at each slot (the cell holding s_m; the last cell beyond), and
    # the share of the step from slot m-1 to m spent in the cell of slot m-1 (1 when both
    # slots lie in one cell; at most one face lies between two slots).
    col = np.empty((n_r, m_max), dtype=np.int64)
    share = np.ones((n_r, m_max))
    s = np.arange(m_max) * delta
    for i, r in enumerate(batch):
        c = np.clip(np.searchsorted(faces[r], s, side="right") - 1, 0, cells[r].size - 1)
        col[i] = offsets[i] + c
        moved = np.flatnonzero(c[1:] != c[:-1]) + 1
        face = faces[r][c[moved - 1] + 1]
        share[i, moved] = np.clip((face - s[moved - 1]) / delta, 0.0, 1.0)
    # Points to read, grouped by the slot interval [m-1, m] they fall in.
    pr, pi, pm, pa = [], [], [], []
    for i, r in enumerate(batch):
        x = points[r] / delta
        mm = np.clip(np.floor(x).astype(int), 0, n_slots[i] - 2)
        pr.append(np.full(x.size, i))
        pi.append(np.arange(x.size))
        pm.append(mm + 1)
        pa.append(x - mm)
        out[r] = np.empty((t.size, x.size))
    pr, pi, pm, pa = (np.concatenate(v) for v in (pr, pi, pm, pa))
    order = np.argsort(pm, kind="stable")
    pr, pi, pm, pa = pr[order], pi[order], pm[order], pa[order]
    bounds = np.searchsorted(pm, np.arange(m_max + 1))
    k0, k1, wt = _time_weights(t, t_int, delta, period)
    decay = math.exp(-rate * delta)
    h = np.zeros((n_r, n_k))
    init = np.zeros(n_r)
    w_prev = forcing[:, col[:, 0]].T
    for m in range(1, m_max):
        w_cur = forcing[:, col[:, m]].T
        f = share[:, m, None]
        # Forcing integrated along the characteristic from (s_{m-1}, t_{k-1}) to (s_m, t_k):
        # a share f of the step in the first cell, 1 - f in the second, each by the trapezoid
        # rule in time and decayed from its midpoint.
        d1 = np.exp(-rate * delta * (1.0 - 0.5 * f))
        d2 = np.exp(-rate * delta * 0.5 * (1.0 - f))
        if period is None:
            p0, p1, c0, c1 = w_prev[:, :-1], w_prev[:, 1:], w_cur[:, :-1], w_cur[:, 1:]
        else:
            p0, p1 = np.roll(w_prev, 1, axis=1), w_prev
            c0, c1 = np.roll(w_cur, 1, axis=1), w_cur
        felt = 0.5 * delta * (f * (2.0 - f) * p0 + f * f * p1) * d1 \
            + 0.5 * delta * (1.0 - f) * ((1.0 - f) * c0 + (1.0 + f) * c1) * d2
        new = np.empty_like(h)
        if period is None:
            new[:, 1:] = decay * h[:, :-1] - felt
            if initial == "steady":
                fs = f[:, 0]
                init = decay * init - delta * (fs * w_prev[:, 0] * d1[:, 0]
                                               + (1.0 - fs) * w_cur[:, 0] * d2[:, 0])
            new[:, 0] = init
        else:
            new[:] = decay * np.roll(h, 1, axis=1) - felt
        lo, hi = bounds[m], bounds[m + 1]
        if hi > lo:
            rr, ii, aa = pr[lo:hi], pi[lo:hi], pa[lo:hi, None]
            a_t = (h[rr][:, k0] * (1.0 - wt) + h[rr][:, k1] * wt)
            b_t = (new[rr][:, k0] * (1.0 - wt) + new[rr][:, k1] * wt)
            vals = (1.0 - aa) * a_t + aa * b_t  # (n_sel, n_t)
            # Linear interpolation in s assumes one forcing across the interval; where a face
            # lies in it, put back the difference of the piecewise forcing (exact when steady).
            fa = share[rr, m][:, None]
            wp = w_prev[rr][:, k0] * (1.0 - wt) + w_prev[rr][:, k1] * wt
            wc = w_cur[rr][:, k0] * (1.0 - wt) + w_cur[rr][:, k1] * wt
            part = np.minimum(aa, fa) * wp + np.maximum(aa - fa, 0.0) * wc
            vals -= delta * (part - aa * (fa * wp + (1.0 - fa) * wc))
            for i in np.unique(rr):
                sel = rr == i
                out[batch[i]][:, ii[sel]] = vals[sel].T
        h, w_prev = new, w_cur
    return out
