r"""Geostrophic transport from a temperature and salinity climatology, and the balance check.

The dynamic method: dynamic height (the geostrophic streamfunction on pressure surfaces,
TEOS-10 via :mod:`gsw`) per column, the northward geostrophic velocity between neighbouring
columns relative to a reference level, integrated from the surface to that level and summed
across a basin row between the coasts that the Sverdrup interior uses. :func:`balance_check`
puts that transport, the Ekman transport and the Sverdrup transport over the same span side by
side, the classic hydrographic test of Sverdrup balance (Leetmaa, Niiler & Stommel 1977).

The transport between two columns needs no distance: with :math:`\Psi` the dynamic height
anomaly relative to the reference pressure, :math:`f v = \partial\Psi/\partial x` on pressure
surfaces, so

.. math:: T_{ab} = \int_0^{z_r}\!\!\int_a^b v\,dx\,dz
   = \frac{1}{f}\int_0^{z_r} \left(\Psi_b(z) - \Psi_a(z)\right) dz
   = \frac{\chi_b - \chi_a}{f}, \qquad \chi = \int_0^{z_r}\Psi\,dz,

and the sum over a row of columns that all reach the reference telescopes to the difference
between its two end columns. Columns shallower than the reference change the reference of the
pairs they belong to (their deepest common level); those pairs are counted in the output.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import gsw
import numpy as np
import xarray as xr

from .. import constants
from ..errors import GridError, InputError, UnitsError
from ..geometry.coords import grid_layout, require_dataarray
from ..geometry.grid import SphericalGrid, cell_edges
from ..io.units import to_si

__all__ = [
    "geostrophic_transport",
    "open_ts_climatology",
    "balance_check",
    "LinearEquationOfState",
    "DEFAULT_REFERENCE_PRESSURE",
    "DEFAULT_BOUNDARY_LAYER_KM",
]

SV_UNITS = "1e6 m3 s-1"

#: Default reference pressure, dbar. Below the wind-driven thermocline of the subtropical gyres
#: (about 1000 m deep) and near the top of the southward deep water, inside the 1500-2000 dbar
#: range of classic dynamic-method tests of Sverdrup balance in the North Atlantic (Leetmaa,
#: Niiler & Stommel 1977, J. Mar. Res., from memory), and on a standard level of most
#: climatologies (2000 m is about 2020 dbar at 25N).
DEFAULT_REFERENCE_PRESSURE = 2000.0

#: Default width (km) left out next to the western coast of each row: the western boundary
#: current and its recirculation. At 26.5N the Florida Current and the Antilles Current lie
#: within about 400 km of the Florida coast; RAPID's interior section begins east of the
#: Bahamas near 76.5W (our choice of round number).
DEFAULT_BOUNDARY_LAYER_KM = 500.0

#: gsw interpolates Absolute Salinity and Conservative Temperature to this pressure step (dbar)
#: with its 'mrst' scheme (Barker & McDougall 2020, J. Atmos. Oceanic Technol. 37, 605-619;
#: the scheme of the toolbox's check values) before integrating specific volume anomaly; 1 and
#: 5 dbar differ by 2e-5 relative, and 1 dbar costs ten times as long.
_GSW_MAX_DP = 5.0
_GSW_INTERP = "mrst"

_TEMPERATURE_STANDARD_NAMES = {
    "sea_water_temperature": "in-situ",
    "sea_water_potential_temperature": "potential",
    "sea_water_conservative_temperature": "conservative",
}
_SALINITY_STANDARD_NAMES = {
    "sea_water_practical_salinity": "practical",
    "sea_water_salinity": "practical",
    "sea_water_absolute_salinity": "absolute",
}
_TEMPERATURE_KINDS = ("in-situ", "potential", "conservative")
_SALINITY_KINDS = ("practical", "absolute")
_CELSIUS = {"degc", "degreec", "degreesc", "degreecelsius", "degreescelsius", "celsius", "c",
            "degcelsius", "°c"}
_KELVIN = {"k", "kelvin", "degk", "degreek", "degreesk"}
_PRACTICAL_UNITS = {"psu", "pss78", "pss", "ppt", "1e3", "0001", "1", "", "permil",
                    "partsperthousand", "practicalsalinityunits"}
_ABSOLUTE_UNITS = {"gkg1", "gkg", "gperkg", "gramsperkilogram"}
_DEPTH_UNITS = {"m", "meter", "meters", "metre", "metres"}
_PRESSURE_UNITS = {"dbar", "decibar", "decibars", "db"}
_DEPTH_NAMES = {"depth", "z", "lev", "level", "deptht", "depth_coord", "st_ocean", "pressure",
                "pres", "p"}


@dataclass(frozen=True)
class LinearEquationOfState:
    r"""A linear (Boussinesq) equation of state, for idealised fields and analytic tests.

    .. math:: \rho = \rho_0\left(1 - \alpha (T - T_0) + \beta_S (S - S_0)\right), \qquad
       \delta = \frac{\alpha (T - T_0) - \beta_S (S - S_0)}{\rho_0}, \qquad p = \rho_0 g z,

    with :math:`\delta` the specific volume anomaly (m3 kg-1) to first order and hydrostatic
    pressure from depth at the constant density :math:`\rho_0`.

    Parameters
    ----------
    rho0 : float
        Reference density, kg m-3.
    alpha : float
        Thermal expansion coefficient, K-1.
    beta : float
        Haline contraction coefficient, per unit of the salinity passed (e.g. kg g-1).
    t0, s0 : float
        Reference temperature (degC) and salinity.
    gravity : float
        m s-2.
    """

    rho0: float = constants.RHO0
    alpha: float = 2.0e-4
    beta: float = 7.6e-4
    t0: float = 10.0
    s0: float = 35.0
    gravity: float = constants.GRAVITY

    def specific_volume_anomaly(self, t, s):
        """Specific volume anomaly, m3 kg-1."""
        return (self.alpha * (t - self.t0) - self.beta * (s - self.s0)) / self.rho0

    def pressure_from_depth(self, z):
        """Sea pressure in dbar at depth ``z`` (m, positive down)."""
        return self.rho0 * self.gravity * np.asarray(z, dtype=float) / 1.0e4

    def depth_from_pressure(self, p):
        """Depth in m (positive down) at sea pressure ``p`` (dbar)."""
        return np.asarray(p, dtype=float) * 1.0e4 / (self.rho0 * self.gravity)


# --- finding and checking the inputs -----------------------------------------------------------

def _fold(s) -> str:
    return "".join(ch for ch in str(s).lower() if ch.isalnum() or ch == "°")


def _pick_variable(ds: xr.Dataset, argname: str, standard_names, unit_set, words):
    for name, da in ds.data_vars.items():
        if da.attrs.get("standard_name") in standard_names:
            return da
    for name, da in ds.data_vars.items():
        text = _fold(name) + _fold(da.attrs.get("long_name", ""))
        if _fold(da.attrs.get("units", "")) in unit_set and any(w in text for w in words):
            return da
    raise InputError(
        f"{argname}: expected a Dataset with a variable whose standard_name is one of "
        f"{sorted(standard_names)} (or whose name and units say so), found variables "
        f"{list(ds.data_vars)}. Fix: pass the DataArray itself, e.g. {argname}=ds['TEMP']."
    )


def _as_fields(temperature, salinity):
    if isinstance(temperature, xr.Dataset):
        ds = temperature
        temperature = _pick_variable(ds, "temperature", _TEMPERATURE_STANDARD_NAMES,
                                     _CELSIUS | _KELVIN, ("temp", "theta", "pot"))
        if salinity is None:
            salinity = _pick_variable(ds, "salinity", _SALINITY_STANDARD_NAMES,
                                      _PRACTICAL_UNITS | _ABSOLUTE_UNITS, ("sal",))
    if salinity is None:
        raise TypeError(
            "salinity: expected a DataArray of salinity, found None. Fix: pass it, or pass "
            "a Dataset holding both fields as the first argument."
        )
    if isinstance(salinity, xr.Dataset):
        salinity = _pick_variable(salinity, "salinity", _SALINITY_STANDARD_NAMES,
                                  _PRACTICAL_UNITS | _ABSOLUTE_UNITS, ("sal",))
    return require_dataarray(temperature, "temperature"), require_dataarray(salinity, "salinity")


def _kind(da, given, table, kinds, default, argname):
    """The kind of temperature or salinity, and where the choice came from."""
    if given is not None:
        if given not in kinds:
            raise InputError(
                f"{argname}: expected one of {list(kinds)}, found {given!r}. Fix: say which "
                "the data are, e.g. from the file's documentation."
            )
        return given, "argument"
    std = da.attrs.get("standard_name")
    if std in table:
        return table[std], f"standard_name {std}"
    return default, f"default (no CF standard_name among {sorted(table)})"


def _temperature_celsius(t: xr.DataArray) -> xr.DataArray:
    units = _fold(t.attrs.get("units", "degC"))
    if units in _CELSIUS:
        return t.astype(np.float64)
    if units in _KELVIN:
        return t.astype(np.float64) - 273.15
    raise UnitsError(
        f"temperature: expected units of degrees Celsius or kelvin (degC, deg C, "
        f"degree_Celsius, K), found {t.attrs.get('units')!r}. Fix: convert, or set "
        "temperature.attrs['units'] = 'degC' if the values are in Celsius."
    )


def _salinity_kind_from_units(s: xr.DataArray):
    units = _fold(s.attrs.get("units", ""))
    if units in _ABSOLUTE_UNITS:
        return "absolute"
    if units in _PRACTICAL_UNITS:
        return "practical" if units else None
    raise UnitsError(
        f"salinity: expected practical salinity (units 1, 1e-3, PSU, PSS-78 or PPT) or "
        f"absolute salinity (g kg-1), found units {s.attrs.get('units')!r}. Fix: convert, or "
        "set salinity.attrs['units'] to one of those."
    )


def _depth_dim(da: xr.DataArray, argname: str, lat: str, lon: str):
    """The vertical dimension of ``da`` and whether it holds pressure (dbar) or depth (m)."""
    candidates = []
    for d in da.dims:
        if d in (lat, lon) or d not in da.coords:
            continue
        c = da[d]
        units = _fold(c.attrs.get("units", ""))
        score = 0
        if c.attrs.get("axis", "").upper() == "Z" or "positive" in c.attrs:
            score += 2
        if c.attrs.get("standard_name") in ("depth", "sea_water_pressure", "altitude"):
            score += 2
        if _fold(d) in _DEPTH_NAMES:
            score += 1
        if units in _DEPTH_UNITS | _PRESSURE_UNITS:
            score += 1
        if score:
            candidates.append((score, d, units))
    if not candidates:
        raise GridError(
            f"{argname}: expected a vertical coordinate (depth in m or pressure in dbar; CF "
            f"axis 'Z' or attribute 'positive'), found dimensions {da.dims}. Fix: give it "
            "CF attributes, e.g. da[name].attrs.update(units='m', positive='down')."
        )
    score, name, units = max(candidates)
    values = np.asarray(da[name].values, dtype=np.float64)
    if units in _PRESSURE_UNITS:
        is_pressure = True
    elif units in _DEPTH_UNITS:
        is_pressure = False
    else:
        raise GridError(
            f"{argname}: vertical coordinate '{name}' has units {da[name].attrs.get('units')!r}; "
            "expected m (depth) or dbar (sea pressure). Fix: set its units attribute."
        )
    if not is_pressure and da[name].attrs.get("positive", "down").lower() == "up":
        values = -values
    if np.any(values < -1e-6) or not np.all(np.isfinite(values)):
        raise GridError(
            f"{argname}: vertical coordinate '{name}' must be finite and >= 0 below the surface, "
            f"found {values.min():g}..{values.max():g}. Fix: use depth positive down."
        )
    return name, values, is_pressure


def open_ts_climatology(source, *, temperature_variable: str | None = None,
                        salinity_variable: str | None = None) -> xr.Dataset:
    """Open a temperature and salinity climatology and check it, reading only its metadata.

    Parameters
    ----------
    source : str or os.PathLike
        A NetCDF file holding in-situ temperature and practical salinity on depth levels
        (m, positive down, or height levels, positive up) over a regular latitude-longitude
        grid (any resolution, order and longitude convention).
    temperature_variable, salinity_variable : str, optional
        Names of the two variables, when the CF ``standard_name``, or the name and units, do
        not find them.

    Returns
    -------
    xarray.Dataset
        ``temperature`` (degC) and ``salinity`` (depth, lat, lon), lazily read; other
        dimensions (a monthly climatology's ``time``) are averaged away. ``column_depth``
        (lat, lon), m: the depth of each column's deepest level with both. Attributes ``source``
        (one line naming the file and the variables) and ``depth_dim``.

    Raises
    ------
    FileNotFoundError, InputError, UnitsError, GridError
        Each names the argument (``hydrography``, ``temperature_variable``,
        ``salinity_variable``), what was expected, what was found and the fix.
    """
    import os

    path = os.fspath(source)
    if not os.path.isfile(path):
        raise FileNotFoundError(
            f"hydrography: expected a NetCDF file of temperature and salinity, found no file at "
            f"{path!r}. Fix: check the path.")
    try:
        # Chunked: nothing is read until the first-mode speed is computed.
        ds = xr.open_dataset(path, decode_times=False, chunks={})
    except (OSError, ValueError) as err:
        raise InputError(
            f"hydrography: expected a NetCDF file of temperature and salinity, could not open "
            f"{path!r} ({err.__class__.__name__}). Fix: check it with ncdump -h.") from None
    found = {}
    for what, given, table, units, words, example in (
            ("temperature", temperature_variable, _TEMPERATURE_STANDARD_NAMES,
             _CELSIUS | _KELVIN, ("temp", "theta", "pot"), ("sea_water_temperature", "degC")),
            ("salinity", salinity_variable, _SALINITY_STANDARD_NAMES,
             _PRACTICAL_UNITS | _ABSOLUTE_UNITS, ("sal",),
             ("sea_water_practical_salinity", "PSU"))):
        if given is not None:
            if given not in ds.data_vars:
                raise InputError(
                    f"{what}_variable: expected a variable of {path!r}, found {given!r}; the "
                    f"variables are {list(ds.data_vars)}. Fix: pass one of those.")
            found[what] = ds[given]
            continue
        try:
            found[what] = _pick_variable(ds, what, table, units, words)
        except InputError:
            raise InputError(
                f"hydrography: expected a {what} variable in {path!r} (CF standard_name "
                f"{example[0]}, or a name like '{words[0]}' with units such as {example[1]}), found variables {list(ds.data_vars)}. Fix: name it with "
                f"{what}_variable.") from None
    t, s = found["temperature"], found["salinity"]
    named = {"temperature": t, "salinity": s}
    for what, check in (("temperature", _temperature_celsius),
                        ("salinity", _salinity_kind_from_units)):
        da = named[what]
        try:
            check(da)
        except UnitsError:
            raise UnitsError(
                f"{what}_variable: expected {what} ("
                + ("degC or K" if what == "temperature" else "practical salinity: PSU, PSS-78, "
                   "PPT or 1") + f"), found variable '{da.name}' with units "
                f"{da.attrs.get('units')!r}. Fix: name the {what} variable with "
                f"{what}_variable, or set its units attribute.") from None
    kinds = (_kind(t, None, _TEMPERATURE_STANDARD_NAMES, _TEMPERATURE_KINDS, "in-situ",
                   "temperature")[0],
             _salinity_kind_from_units(s) or "practical")
    if kinds != ("in-situ", "practical"):
        raise InputError(
            f"hydrography: expected in-situ temperature and practical salinity, found "
            f"{kinds[0]} temperature '{t.name}' and {kinds[1]} salinity '{s.name}'. Fix: "
            "convert them first (gsw.t_from_CT, gsw.SP_from_SA).")
    lay = grid_layout(t, argname="hydrography")
    zname, _, is_pressure = _depth_dim(t, "hydrography", lay.lat_name, lay.lon_name)
    if is_pressure:
        raise GridError(
            f"hydrography: expected a depth axis in m, found '{zname}' in dbar. Fix: give the "
            "levels as depth (-gsw.z_from_p(p, lat) at a mid-basin latitude is close enough "
            "for the first mode).")
    if t.dims != s.dims or t.shape != s.shape:
        raise GridError(
            f"hydrography: expected temperature and salinity on one grid, found "
            f"{dict(t.sizes)} and {dict(s.sizes)}. Fix: name two variables of one climatology.")
    extra = [d for d in t.dims if d not in (zname, lay.lat_name, lay.lon_name)]
    note = ""
    if extra:
        t, s = t.mean(extra, keep_attrs=True), s.mean(extra, keep_attrs=True)
        note = f", averaged over {', '.join(map(str, extra))}"
    temperature = _temperature_celsius(t)
    z = np.abs(temperature[zname])
    out = xr.Dataset({
        "temperature": temperature, "salinity": s.astype(np.float64),
        "column_depth": z.where(temperature.notnull() & s.notnull()).max(zname).assign_attrs(
            long_name="depth of the deepest level with temperature and salinity", units="m")})
    return out.assign_attrs(
        source=f"temperature '{t.name}' and salinity '{s.name}' of {path}{note}",
        depth_dim=str(zname))


# --- the numerical core: NumPy, one latitude row at a time -------------------------------------

def _hermite_integrals(A, s, z):
    """Cumulative integral B(z_k) = int_0^z_k A dz of the cubic Hermite interpolant of A.

    A, s: (nz, nx) values and z-derivatives at levels z (nz,). NaN propagates below the bottom.
    """
    h = np.diff(z)[:, None]
    piece = h * (A[:-1] + A[1:]) / 2.0 + h**2 * (s[:-1] - s[1:]) / 12.0
    return np.concatenate([np.zeros((1, A.shape[1])), np.cumsum(piece, axis=0)])


def _hermite_at(A, s, B, z, zr):
    """A and int_0^zr A dz at depth zr (scalar) for every column, from the Hermite cubic."""
    k = int(np.clip(np.searchsorted(z, zr, side="right") - 1, 0, z.size - 2))
    h = z[k + 1] - z[k]

    def cubic(x):
        t = (x - z[k]) / h
        h00, h10 = 2 * t**3 - 3 * t**2 + 1, t**3 - 2 * t**2 + t
        h01, h11 = -2 * t**3 + 3 * t**2, t**3 - t**2
        return h00 * A[k] + h10 * h * s[k] + h01 * A[k + 1] + h11 * h * s[k + 1]

    # Two-point Gauss-Legendre rule: exact for the cubic on [z_k, zr].
    mid, half = (zr + z[k]) / 2.0, (zr - z[k]) / 2.0
    g = half / np.sqrt(3.0)
    partial = half * (cubic(mid - g) + cubic(mid + g))
    return cubic(zr), B[k] + partial


@dataclass
class _Row:
    """Per-column tables of one latitude row: what every reference choice needs."""

    chi: np.ndarray        # (nz, nx) int_0^z_k Psi dz with Psi referenced at level k, m3 s-2
    bottom: np.ndarray     # (nx,) index of the deepest level with data, -1 if none usable
    z: np.ndarray          # (nz,) depth of the levels, m
    A: np.ndarray          # (nz, nx) int_0^p delta dp', m2 s-2
    s: np.ndarray          # (nz, nx) dA/dz, m s-2
    B: np.ndarray          # (nz, nx) int_0^z A dz', m3 s-2


def _row_tables(A, delta, z, p_dbar) -> _Row:
    """Build the tables of one row from A = int_0^p delta dp (m2 s-2) and delta (m3 kg-1)."""
    valid = np.isfinite(A) & np.isfinite(delta)
    # The bottom is the last level of the unbroken run of data from the top.
    run = np.cumprod(valid, axis=0).astype(bool)
    depth_count = run.sum(axis=0)
    bottom = np.where(depth_count >= 2, depth_count - 1, -1)
    A = np.where(run, A, np.nan)
    dpdz = np.gradient(p_dbar * 1.0e4, z)  # Pa m-1
    s = np.where(run, delta * dpdz[:, None], np.nan)
    B = _hermite_integrals(A, s, z)
    chi = z[:, None] * A - B
    return _Row(chi=chi, bottom=bottom, z=z, A=A, s=s, B=B)


def _chi_at_pressure(row: _Row, zr: float):
    """chi for a reference at depth zr, NaN for columns that do not reach it."""
    A_r, B_r = _hermite_at(row.A, row.s, row.B, row.z, zr)
    reach = (row.bottom >= 0) & (row.z[np.maximum(row.bottom, 0)] >= zr - 1e-9)
    return np.where(reach, zr * A_r - B_r, np.nan)


def _pair_transports(row: _Row, cols, f, zr, v_ref, dx_pair):
    """Transports (m3 s-1) between consecutive columns ``cols`` (ordered east to west).

    Returns transport (npairs,), whether each pair used its deepest common level, and whether
    it had no common level below the surface. ``zr`` None references every pair at its
    deepest common level.
    """
    east, west = cols[:-1], cols[1:]
    k = np.minimum(row.bottom[east], row.bottom[west])
    usable = k >= 1
    kk = np.maximum(k, 0)
    chi_common_e = row.chi[kk, east]
    chi_common_w = row.chi[kk, west]
    z_common = row.z[kk]
    if zr is None:
        shallow = np.zeros_like(usable)
        t = (chi_common_e - chi_common_w) / f
        zref = z_common
    else:
        chi_r = _chi_at_pressure(row, zr)
        deep = np.isfinite(chi_r[east]) & np.isfinite(chi_r[west])
        shallow = usable & ~deep
        t = np.where(deep, (chi_r[east] - chi_r[west]) / f, (chi_common_e - chi_common_w) / f)
        zref = np.where(deep, zr, z_common)
    if v_ref is not None:
        t = t + 0.5 * (v_ref[east] + v_ref[west]) * zref * dx_pair
    t = np.where(usable, t, 0.0)
    return t, shallow, ~usable


def _cell_overlap_integral(values, lon_lo, lon_hi, east, dist):
    """int of values over the westward distance 0..dist (degrees) from longitude ``east``.

    values (n,) per wind cell with faces lon_lo/lon_hi; dist (m,) in degrees; returns (m,) in
    units of values x degrees. Cells are placed by their westward distance from ``east``.
    """
    d_east = np.mod(east - lon_hi + 1e-9, 360.0) - 1e-9
    width = lon_hi - lon_lo
    d_west = d_east + width
    v = np.where(np.isfinite(values), values, 0.0)
    over = np.clip(np.minimum(d_west[None, :], dist[:, None]) - d_east[None, :], 0.0, None)
    over = np.minimum(over, width[None, :])
    return over @ v


# --- matching the T/S grid to the Sverdrup result ----------------------------------------------

_SVERDRUP_VARS = ("sverdrup_northward_transport", "eastern_coast_lon", "western_coast_lon",
                  "row_status")


def _check_sverdrup_result(ds, argname: str):
    if not isinstance(ds, xr.Dataset):
        raise TypeError(
            f"{argname}: expected the Dataset returned by sverdrup_transport, found "
            f"{type(ds).__name__}. Fix: pass sverdrup_kit.sverdrup_transport(taux, tauy, ...)."
        )
    missing = [v for v in _SVERDRUP_VARS if v not in ds]
    if missing:
        raise InputError(
            f"{argname}: expected the variables {list(_SVERDRUP_VARS)} of a sverdrup_transport "
            f"result, found {sorted(ds.data_vars)} (missing {missing}). Fix: pass the whole "
            "result of sverdrup_transport, computed with this version of sverdrup_kit."
        )
    lay = grid_layout(ds, argname=argname)
    extra = [d for d in ds["sverdrup_northward_transport"].dims
             if d not in (lay.lat_name, lay.lon_name)]
    if extra:
        raise InputError(
            f"{argname}: expected a result without leading dimensions, found {extra}. Fix: "
            f"compute the Sverdrup transport from the time-mean stress, or select one step, e.g. "
            f"{argname}.isel({extra[0]}=0)."
        )
    return lay


def _western_limits(western_limit, basins, lat_ts):
    """(nbasin, nlat) longitudes of the western limit, NaN where the default rule applies."""
    out = np.full((len(basins), lat_ts.size), np.nan)
    if western_limit is None:
        return out
    if isinstance(western_limit, Mapping):
        unknown = [b for b in western_limit if b not in basins]
        if unknown:
            raise InputError(
                f"western_limit: expected keys among the basins {list(basins)}, found "
                f"{unknown}. Fix: use the basin names of the Sverdrup result."
            )
        for i, b in enumerate(basins):
            if b in western_limit:
                out[i] = float(western_limit[b])
        return out
    if isinstance(western_limit, xr.DataArray):
        lay = [d for d in western_limit.dims]
        if set(lay) - {"basin"} and "basin" in lay and len(lay) == 2:
            latname = [d for d in lay if d != "basin"][0]
            wl = western_limit.sel(basin=list(basins)).interp(
                {latname: lat_ts}, method="nearest")
            return np.asarray(wl.transpose("basin", latname).values, dtype=float)
        raise InputError(
            f"western_limit: expected a DataArray over (basin, latitude), found dims {lay}. "
            "Fix: pass a float, a dict basin -> longitude, or such a DataArray."
        )
    value = float(western_limit)
    if not np.isfinite(value):
        raise InputError(f"western_limit: expected a longitude in degrees, found {value!r}.")
    out[:] = value
    return out


def _references(reference_pressure):
    """List of references (float dbar or None for 'bottom') and whether to add a dimension."""
    if isinstance(reference_pressure, str):
        if reference_pressure != "bottom":
            raise InputError(
                f"reference_pressure: expected a pressure in dbar, a list of them, or "
                f"'bottom', found {reference_pressure!r}. Fix: e.g. reference_pressure=2000.0."
            )
        return [None], False
    seq = isinstance(reference_pressure, (Sequence, np.ndarray)) and not isinstance(
        reference_pressure, str)
    values = list(np.atleast_1d(np.asarray(reference_pressure, dtype=float)))
    if not values or not all(np.isfinite(v) and v > 0 for v in values):
        raise InputError(
            f"reference_pressure: expected positive pressures in dbar, found "
            f"{reference_pressure!r}. Fix: e.g. reference_pressure=2000.0 or [1500, 2000]."
        )
    return values, seq


def _prepare_ts(temperature, salinity, temperature_kind, salinity_kind, equation_of_state):
    temperature, salinity = _as_fields(temperature, salinity)
    lay = grid_layout(temperature, argname="temperature")
    lat, lon = lay.lat_name, lay.lon_name
    zname, zvals, is_pressure = _depth_dim(temperature, "temperature", lat, lon)
    if set(temperature.dims) != set(salinity.dims) or any(
        temperature.sizes[d] != salinity.sizes[d] for d in temperature.dims
    ):
        raise GridError(
            f"temperature and salinity: expected the same grid, found dims "
            f"{dict(temperature.sizes)} and {dict(salinity.sizes)}. Fix: pass fields of one "
            "climatology on one grid."
        )
    extra = [d for d in temperature.dims if d not in (zname, lat, lon)]
    if extra:
        raise InputError(
            f"temperature: expected dimensions (depth, lat, lon), found extra {extra}. Fix: "
            f"average or select first, e.g. temperature.mean('{extra[0]}')."
        )
    order = np.argsort(zvals)
    t = _temperature_celsius(temperature).transpose(zname, lat, lon)
    s = salinity.astype(np.float64).transpose(zname, lat, lon)
    unit_kind = _salinity_kind_from_units(salinity)
    t_kind, t_from = _kind(temperature, temperature_kind, _TEMPERATURE_STANDARD_NAMES,
                           _TEMPERATURE_KINDS, "in-situ", "temperature_kind")
    s_default = unit_kind or "practical"
    s_kind, s_from = _kind(salinity, salinity_kind, _SALINITY_STANDARD_NAMES, _SALINITY_KINDS,
                           s_default, "salinity_kind")
    if s_from.startswith("default") and unit_kind:
        s_from = f"units {salinity.attrs.get('units')!r}"
    # Rows of the canonical grid; levels from the top down.
    t_np = np.asarray(t.values, dtype=np.float64)[order][:, lay.lat_order][:, :, lay.lon_order]
    s_np = np.asarray(s.values, dtype=np.float64)[order][:, lay.lat_order][:, :, lay.lon_order]
    bad = np.isfinite(s_np) & ((s_np < 0) | (s_np > 50))
    if bad.any():
        raise InputError(
            f"salinity: expected values of 0-50 (practical salinity or g kg-1), found "
            f"{np.nanmin(s_np):g}..{np.nanmax(s_np):g}. Fix: convert the units (kg kg-1 "
            "values must be multiplied by 1000) or mask fill values."
        )
    meta = dict(temperature_kind=t_kind, temperature_kind_from=t_from, salinity_kind=s_kind,
                salinity_kind_from=s_from,
                equation_of_state="TEOS-10 (gsw)" if equation_of_state is None else repr(
                    equation_of_state))
    return t_np, s_np, zvals[order], is_pressure, lay, temperature, meta


def _teos10(t, s, p, lon, lat, kinds):
    """Absolute Salinity (g kg-1) and Conservative Temperature (degC) from the data's kinds."""
    tk, sk = kinds
    sa = s if sk == "absolute" else gsw.SA_from_SP(s, p, lon, lat)
    if tk == "conservative":
        return sa, t
    if tk == "potential":
        return sa, gsw.CT_from_pt(sa, t)
    return sa, gsw.CT_from_t(sa, t, p)


def _dynamic_height(sa, ct, p, delta):
    """Dynamic height anomaly relative to 0 dbar, m2 s-2, (nz, nx); NaN where a column is empty.

    gsw's 'mrst' scheme needs four levels. Shallower columns (two or three levels, on shelves)
    integrate the specific volume anomaly ``delta`` by the trapezoidal rule instead: gsw's
    other schemes corrupted memory on such columns of a 1 degree climatology (gsw 3.6).
    """
    levels = np.sum(np.isfinite(sa) & np.isfinite(ct), axis=0)
    out = np.full(sa.shape, np.nan)
    deep = levels >= 4
    if deep.any():
        with np.errstate(invalid="ignore"):
            out[:, deep] = gsw.geo_strf_dyn_height(
                sa[:, deep], ct[:, deep], p, p_ref=0.0, axis=0, max_dp=_GSW_MAX_DP,
                interp_method=_GSW_INTERP)
    shelf = (levels >= 2) & ~deep
    if shelf.any():
        out[:, shelf] = -_trapezoid_from_surface(delta[:, shelf], p)
    return out


def _trapezoid_from_surface(delta, p_dbar):
    """int_0^p delta dp' (m2 s-2) at each level by the trapezoidal rule; NaN propagates."""
    dp = np.diff(p_dbar)[:, None] * 1.0e4
    return np.concatenate([np.zeros((1, delta.shape[1])),
                           np.cumsum(dp * (delta[:-1] + delta[1:]) / 2.0, axis=0)])


def _row_from_ts(t, s, zcoord, is_pressure, lat, lon, kinds, eos):
    """Tables of one row from in-situ data (nz, nx): TEOS-10 via gsw, or a linear EOS."""
    if eos is None:
        if is_pressure:
            p = zcoord
            z = -gsw.z_from_p(p, lat)
        else:
            z = zcoord
            p = gsw.p_from_z(-z, lat)
    else:
        if is_pressure:
            p, z = zcoord, eos.depth_from_pressure(zcoord)
        else:
            z, p = zcoord, eos.pressure_from_depth(zcoord)
    if z[0] > 0:
        # A surface level carries the top values up, as gsw does for dynamic height.
        t = np.vstack([t[:1], t])
        s = np.vstack([s[:1], s])
        z = np.concatenate([[0.0], z])
        p = np.concatenate([[0.0], p])
    if eos is None:
        sa, ct = _teos10(t, s, p[:, None], lon[None, :], lat, kinds)
        delta = gsw.specvol_anom_standard(sa, ct, p[:, None])
        A = -_dynamic_height(sa, ct, p, delta)
    else:
        delta = eos.specific_volume_anomaly(t, s)
        A = _trapezoid_from_surface(delta, p)
    return _row_tables(A, delta, z, p)


# --- public functions ----------------------------------------------------------------------------

def geostrophic_transport(
    temperature,
    salinity=None,
    *,
    sverdrup_result,
    reference_pressure=DEFAULT_REFERENCE_PRESSURE,
    reference_velocity=None,
    western_limit=None,
    boundary_layer_km: float = DEFAULT_BOUNDARY_LAYER_KM,
    temperature_kind: str | None = None,
    salinity_kind: str | None = None,
    equation_of_state: LinearEquationOfState | None = None,
    omega: float = constants.OMEGA,
    radius: float = constants.EARTH_RADIUS,
) -> xr.Dataset:
    r"""Geostrophic northward transport across each basin row, by the dynamic method.

    Parameters
    ----------
    temperature, salinity : xarray.DataArray (depth, lat, lon)
        Gridded climatology on depth levels (m, positive down) or pressure levels (dbar),
        missing below the bottom and on land; temperature in degC (K converted), salinity
        practical (1, PSU, PPT) or absolute (g kg-1). A Dataset may be passed as
        ``temperature`` (with ``salinity`` omitted): both fields are found by CF standard name,
        or by name and units. Any latitude order and longitude convention. The values needed
        are loaded into memory (gsw works column by column).
    sverdrup_result : xarray.Dataset
        The result of :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport` without
        leading dimensions: its basins, ``eastern_coast_lon``, ``western_coast_lon`` and
        ``row_status`` set each row's span. Its grid may differ from the T/S grid (see Notes).
    reference_pressure : float, sequence of float, or "bottom", optional
        The level of no motion, dbar; default :data:`DEFAULT_REFERENCE_PRESSURE` (2000 dbar).
        Pairs of columns that do not both reach it are referenced at their deepest common
        level instead and counted in ``pairs_above_reference``. ``"bottom"`` references every
        pair at its deepest common level. A sequence adds a ``reference_pressure`` dimension.
    reference_velocity : xarray.DataArray (lat, lon), optional
        Northward velocity at the reference level on the T/S grid, m s-1 (e.g. from floats or
        an inverse model); each pair adds the mean of its two columns times its reference depth
        times its width. Default: zero (a level of no motion).
    western_limit : float, dict or xarray.DataArray, optional
        Longitude (degrees_east, any convention) where the sum stops in the west: one value for
        every basin, a dict basin name -> longitude, or a DataArray over (basin, latitude).
        Basins not given use the default: ``boundary_layer_km`` east of the row's western
        coast, which leaves out the western boundary current. Interior sections in the
        literature start east of the Bahamas in the Atlantic at 24-27N (74.5W on a 1 degree
        grid) and east of the Kuroshio in the Pacific at 24N (135.5E).
    boundary_layer_km : float, optional
        Width left out next to the western coast where ``western_limit`` does not say.
    temperature_kind : {"in-situ", "potential", "conservative"}, optional
        Default: from the CF standard_name; without one, ``"in-situ"``, what gridded
        climatologies of bottle and CTD data such as Levitus (1982) hold. Recorded in attrs.
    salinity_kind : {"practical", "absolute"}, optional
        Default: from the standard_name, else from the units (g kg-1 is absolute), else
        practical.
    equation_of_state : LinearEquationOfState, optional
        Default TEOS-10 (gsw). A linear equation of state for idealised fields.
    omega, radius : float, optional
        Rotation rate (rad s-1) and Earth radius (m).

    Returns
    -------
    xarray.Dataset
        On the latitudes and longitudes of the T/S grid:

        - ``geostrophic_transport`` ([reference_pressure,] basin, lat), 1e6 m3 s-1, positive
          northward, between the easternmost and westernmost T/S columns of the span;
        - ``geostrophic_cumulative_transport`` ([reference_pressure,] basin, lat, lon):
          the sum from the easternmost column of the span to each column, westward;
        - ``pairs``, ``pairs_above_reference``, ``pairs_without_common_depth``,
          ``land_columns`` ([reference_pressure,] basin, lat): counts of column pairs, pairs
          referenced at their deepest common level, pairs with no common depth below the
          surface (no transport), and land or empty T/S columns crossed inside the span;
        - ``span_east_lon``, ``span_west_lon`` (basin, lat): the end columns used;
        - ``sverdrup_lat`` (lat): the latitude of the Sverdrup row each T/S row takes its span
          from; ``row_status`` (basin, lat) of that row.

    Notes
    -----
    Dynamic height anomaly relative to the surface, :math:`A(p) = \int_0^p \delta\,dp'`
    with :math:`\delta` the specific volume anomaly (``gsw.geo_strf_dyn_height`` with the
    'mrst' interpolation of Barker & McDougall 2020 at a 5 dbar step; columns of two or three
    levels by the trapezoidal rule; TEOS-10: IOC, SCOR & IAPWS 2010, section 3.27), so that
    relative to a reference :math:`p_r`,
    :math:`\Psi(p) = A(p_r) - A(p)` and

    .. math:: \chi = \int_0^{z_r}\Psi\,dz = z_r A(p_r) - \int_0^{z_r} A\,dz, \qquad
       T_{ab} = \frac{\chi_b - \chi_a}{f} + \bar v_{\mathrm{ref}}\,z_r\,\Delta x_{ab}

    for column ``a`` west of ``b`` (:math:`f v = \partial\Psi/\partial x`). The integral of
    :math:`A` over depth uses the cubic Hermite interpolant of :math:`A` with slopes
    :math:`\delta\,dp/dz` at the levels (exact for a cubic), and the same cubic gives
    :math:`A` at a reference between levels. Depths and pressures are related by
    ``gsw.p_from_z``. A surface level takes the values of the top level when the data start
    below 0 m.

    Matching the grids: each T/S row takes the span of the Sverdrup row whose cell contains its
    latitude. The T/S columns whose centres lie between that row's eastern coast and the
    western limit are the stations; pairs of neighbouring stations with land or empty columns
    between them are joined across the gap (counted in ``land_columns``). Transport between
    the coast and the first station is not seen by the method.

    References
    ----------
    Leetmaa, A., Niiler, P. & Stommel, H. (1977). Does the Sverdrup relation account for the
    mid-Atlantic circulation? J. Mar. Res. 35, 1-10.
    IOC, SCOR & IAPWS (2010). The international thermodynamic equation of seawater - 2010.
    Intergovernmental Oceanographic Commission, Manuals and Guides 56.
    McDougall, T. J. & Barker, P. M. (2011). Getting started with TEOS-10 and the Gibbs
    Seawater (GSW) Oceanographic Toolbox. SCOR/IAPWS WG127.
    Barker, P. M. & McDougall, T. J. (2020). Two interpolation methods using multiply-rotated
    piecewise cubic Hermite interpolating polynomials. J. Atmos. Oceanic Technol. 37, 605-619.
    """
    return _geostrophic(
        temperature, salinity, sverdrup_result=sverdrup_result,
        reference_pressure=reference_pressure, reference_velocity=reference_velocity,
        western_limit=western_limit, boundary_layer_km=boundary_layer_km,
        temperature_kind=temperature_kind, salinity_kind=salinity_kind,
        equation_of_state=equation_of_state, omega=omega, radius=radius,
    )[0]


def _geostrophic(temperature, salinity, *, sverdrup_result, reference_pressure,
                 reference_velocity, western_limit, boundary_layer_km, temperature_kind,
                 salinity_kind, equation_of_state, omega, radius, extra_fields=None):
    """Geostrophic transports plus what balance_check needs (spans and station positions)."""
    if equation_of_state is not None and not isinstance(equation_of_state,
                                                        LinearEquationOfState):
        raise TypeError(
            f"equation_of_state: expected None (TEOS-10) or a LinearEquationOfState, found "
            f"{type(equation_of_state).__name__}. Fix: e.g. LinearEquationOfState(alpha=2e-4)."
        )
    if not (np.isfinite(boundary_layer_km) and boundary_layer_km >= 0):
        raise InputError(
            f"boundary_layer_km: expected a width >= 0 in km, found {boundary_layer_km!r}. "
            "Fix: e.g. 500.0."
        )
    sv_lay = _check_sverdrup_result(sverdrup_result, "sverdrup_result")
    refs, ref_dim = _references(reference_pressure)
    t, s, zcoord, is_pressure, lay, original, meta = _prepare_ts(
        temperature, salinity, temperature_kind, salinity_kind, equation_of_state)
    lat_ts, lon_ts = lay.lat, lay.lon
    v_ref = None
    if reference_velocity is not None:
        reference_velocity = require_dataarray(reference_velocity, "reference_velocity")
        vl = grid_layout(reference_velocity, argname="reference_velocity")
        if vl.lat.shape != lat_ts.shape or not np.allclose(vl.lat, lat_ts) or not np.allclose(
                np.mod(vl.lon, 360), np.mod(lon_ts, 360)):
            raise GridError(
                "reference_velocity: expected the latitudes and longitudes of the T/S grid, "
                "found another grid. Fix: interpolate it, e.g. v.interp_like(temperature)."
            )
        units = str(reference_velocity.attrs.get("units", "m s-1"))
        if _fold(units) not in ("ms1", "mpers", "ms"):
            raise UnitsError(
                f"reference_velocity: expected units m s-1, found {units!r}. Fix: convert."
            )
        v_ref = np.asarray(reference_velocity.transpose(vl.lat_name, vl.lon_name).values,
                           dtype=np.float64)[vl.lat_order][:, vl.lon_order]

    # The Sverdrup rows, canonical (ascending latitude).
    sv = sverdrup_result
    basins = [str(b) for b in sv["basin"].values]
    sv_lat = sv_lay.lat
    sv_edges = np.clip(cell_edges(sv_lat), -90, 90)
    pos = np.searchsorted(sv_edges, lat_ts, side="right") - 1
    inside = (pos >= 0) & (pos < sv_lat.size)
    pos = np.clip(pos, 0, sv_lat.size - 1)
    latn = sv_lay.lat_name
    east = np.asarray(sv["eastern_coast_lon"].transpose("basin", latn).values, float)
    west = np.asarray(sv["western_coast_lon"].transpose("basin", latn).values, float)
    status = np.asarray(sv["row_status"].transpose("basin", latn).values)
    east, west, status = (a[:, sv_lay.lat_order][:, pos] for a in (east, west, status))
    east[:, ~inside] = np.nan
    status = np.where(inside[None, :], status, -1)
    limits = _western_limits(western_limit, basins, lat_ts)

    nb, ny, nx, nr = len(basins), lat_ts.size, lon_ts.size, len(refs)
    total = np.full((nr, nb, ny), np.nan)
    cum = np.full((nr, nb, ny, nx), np.nan)
    counts = {k: np.zeros((nr, nb, ny), dtype=np.int32) for k in
              ("pairs", "pairs_above_reference", "pairs_without_common_depth", "land_columns")}
    span_e = np.full((nb, ny), np.nan)
    span_w = np.full((nb, ny), np.nan)
    stations = {}
    f_all = 2.0 * omega * np.sin(np.deg2rad(lat_ts))
    dlon = np.diff(lay.lon)
    dlon = np.concatenate([dlon, dlon[-1:]])
    for j in range(ny):
        todo = [b for b in range(nb) if np.isfinite(east[b, j]) and status[b, j] == 0]
        if not todo:
            continue
        row = None
        for b in todo:
            e = east[b, j]
            # Westward distances, degrees, from the eastern coast.
            dist = np.mod(e - lon_ts, 360.0)
            width_w = np.mod(e - west[b, j], 360.0)
            if np.isfinite(limits[b, j]):
                lim = np.mod(e - limits[b, j], 360.0)
            else:
                km_per_deg = radius * np.cos(np.deg2rad(lat_ts[j])) * np.pi / 180.0 / 1e3
                lim = width_w - boundary_layer_km / km_per_deg
            lim = min(lim, width_w)
            # A station on the western limit belongs to the span (74.5W is the first station
            # of the Atlantic interior in the literature).
            in_span = (dist > 0) & (dist <= lim + 1e-6)
            if not in_span.any():
                continue
            if row is None:
                row = _row_from_ts(t[:, j], s[:, j], zcoord, is_pressure, lat_ts[j], lon_ts,
                                   (meta["temperature_kind"], meta["salinity_kind"]),
                                   equation_of_state)
            idx = np.flatnonzero(in_span)
            idx = idx[np.argsort(dist[idx])]
            wet = row.bottom[idx] >= 1
            cols = idx[wet]
            if cols.size < 2:
                continue
            # Columns crossed between the first and the last station.
            first, last = dist[cols[0]], dist[cols[-1]]
            inner = idx[(dist[idx] > first) & (dist[idx] < last)]
            dx_pair = radius * np.cos(np.deg2rad(lat_ts[j])) * np.deg2rad(
                dist[cols[1:]] - dist[cols[:-1]])
            vr = None if v_ref is None else v_ref[j]
            for r, ref in enumerate(refs):
                zr = None
                if ref is not None:
                    zr = float(_depth_of(ref, lat_ts[j], equation_of_state))
                tp, shallow, unusable = _pair_transports(row, cols, f_all[j], zr, vr, dx_pair)
                c = np.concatenate([[0.0], np.cumsum(tp)]) / constants.SVERDRUP_IN_M3_S
                cum[r, b, j, cols] = c
                total[r, b, j] = c[-1]
                counts["pairs"][r, b, j] = tp.size
                counts["pairs_above_reference"][r, b, j] = int(shallow.sum())
                counts["pairs_without_common_depth"][r, b, j] = int(unusable.sum())
                counts["land_columns"][r, b, j] = int(np.sum(row.bottom[inner] < 1))
            span_e[b, j] = lon_ts[cols[0]]
            span_w[b, j] = lon_ts[cols[-1]]
            stations[b, j] = (e, cols, dist[cols])

    ds = _assemble_geostrophic(total, cum, counts, span_e, span_w, basins, refs, ref_dim,
                               lay, original, sv_lat[pos], inside, status, meta,
                               reference_velocity is not None, western_limit,
                               boundary_layer_km)
    return ds, dict(stations=stations, pos=pos, inside=inside, lay=lay, sv_lay=sv_lay,
                    f=f_all, basins=basins, refs=refs, ref_dim=ref_dim, original=original)


def _depth_of(p_dbar, lat, eos):
    if eos is not None:
        return eos.depth_from_pressure(p_dbar)
    return -gsw.z_from_p(p_dbar, lat)


def _user_lon(values, original_lon):
    lo = float(np.min(original_lon))
    return np.where(np.isfinite(values), lo + np.mod(values - lo, 360.0), np.nan)


def _assemble_geostrophic(total, cum, counts, span_e, span_w, basins, refs, ref_dim, lay,
                          original, sv_lat, inside, status, meta, has_vref, western_limit,
                          boundary_layer_km):
    lat, lon = lay.lat_name, lay.lon_name
    inv_lat = np.argsort(lay.lat_order)
    inv_lon = np.argsort(lay.lon_order)
    user_lon = original[lon].values
    rdims = ("reference_pressure",) if ref_dim else ()

    def r(a):
        return a if ref_dim else a[0]

    def per_row(a):
        return a[..., inv_lat]

    ref_text = ("each pair's deepest common level (bottom)" if refs == [None] else
                ", ".join(f"{v:g}" for v in refs) + " dbar; pairs that do not both reach it "
                "use their deepest common level")
    ds = xr.Dataset(
        {
            "geostrophic_transport": (rdims + ("basin", lat), r(per_row(total)), {
                "long_name": "geostrophic northward transport across the basin interior "
                             "relative to the reference level",
                "units": SV_UNITS,
                "comment": "dynamic method, from the surface to the reference level, summed "
                           "over pairs of T/S columns from the easternmost to the westernmost "
                           "station of the span; positive northward",
            }),
            "geostrophic_cumulative_transport": (
                rdims + ("basin", lat, lon), r(cum[..., inv_lat, :][..., inv_lon]), {
                    "long_name": "geostrophic northward transport summed westward from the "
                                 "easternmost station of the span",
                    "units": SV_UNITS,
                    "comment": "zero at the easternmost station; NaN outside the span and on "
                               "land",
                }),
            "pairs": (rdims + ("basin", lat), r(per_row(counts["pairs"])), {
                "long_name": "number of neighbouring station pairs summed", "units": "1"}),
            "pairs_above_reference": (rdims + ("basin", lat),
                                      r(per_row(counts["pairs_above_reference"])), {
                "long_name": "pairs shallower than the reference pressure, referenced at "
                             "their deepest common level", "units": "1"}),
            "pairs_without_common_depth": (rdims + ("basin", lat),
                                           r(per_row(counts["pairs_without_common_depth"])), {
                "long_name": "pairs with no common level below the surface (no transport)",
                "units": "1"}),
            "land_columns": (rdims + ("basin", lat), r(per_row(counts["land_columns"])), {
                "long_name": "land or empty T/S columns crossed inside the span "
                             "(pairs joined across them)", "units": "1"}),
            "span_east_lon": (("basin", lat), _user_lon(per_row(span_e), user_lon), {
                "long_name": "longitude of the easternmost station", "units": "degrees_east",
                "standard_name": "longitude"}),
            "span_west_lon": (("basin", lat), _user_lon(per_row(span_w), user_lon), {
                "long_name": "longitude of the westernmost station", "units": "degrees_east",
                "standard_name": "longitude"}),
            "sverdrup_lat": ((lat,), np.where(inside, sv_lat, np.nan)[inv_lat], {
                "long_name": "latitude of the Sverdrup row whose span this row takes",
                "units": "degrees_north", "standard_name": "latitude"}),
            "row_status": (("basin", lat), per_row(status).astype(np.int8), {
                "long_name": "status of the Sverdrup row whose span this row takes",
                "comment": "0 valid; other values as in the Sverdrup result's row_status; -1 "
                           "outside the latitudes of the Sverdrup grid",
            }),
        },
        coords={"basin": ("basin", np.array(basins, dtype=object)),
                lat: original[lat], lon: original[lon]},
    )
    if ref_dim:
        ds = ds.assign_coords(reference_pressure=("reference_pressure", np.array(refs), {
            "long_name": "reference pressure (level of no motion)", "units": "dbar"}))
    wl = ("default" if western_limit is None else
          str(dict(western_limit)) if isinstance(western_limit, Mapping) else
          "per basin and latitude" if isinstance(western_limit, xr.DataArray) else
          f"{float(western_limit):g} degrees_east")
    ds.attrs.update(
        reference=ref_text,
        reference_velocity="given" if has_vref else "zero (level of no motion)",
        western_limit=wl,
        boundary_layer_km=boundary_layer_km,
        span="stations are the T/S columns between the eastern coast of the Sverdrup row "
             "containing each T/S latitude and the western limit (western_limit, or "
             f"boundary_layer_km={boundary_layer_km:g} km east of the row's western coast)",
        **meta,
    )
    return ds


def balance_check(
    sverdrup_result,
    temperature,
    salinity,
    taux,
    *,
    reference_pressure=DEFAULT_REFERENCE_PRESSURE,
    reference_velocity=None,
    western_limit=None,
    boundary_layer_km: float = DEFAULT_BOUNDARY_LAYER_KM,
    temperature_kind: str | None = None,
    salinity_kind: str | None = None,
    equation_of_state: LinearEquationOfState | None = None,
    rho0: float | None = None,
    omega: float = constants.OMEGA,
    radius: float = constants.EARTH_RADIUS,
) -> xr.Dataset:
    r"""Sverdrup against geostrophic plus Ekman transport, per basin row, over the same span.

    Parameters
    ----------
    sverdrup_result : xarray.Dataset
        Result of :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport` (no leading
        dimensions), computed from the same stress as ``taux``.
    temperature, salinity : xarray.DataArray (depth, lat, lon)
        As for :func:`geostrophic_transport`.
    taux : xarray.DataArray (lat, lon)
        Eastward surface stress on the grid of ``sverdrup_result`` (Pa; N m-2 and dyn cm-2
        converted), the same time mean that made the Sverdrup transport.
    reference_pressure, reference_velocity, western_limit, boundary_layer_km, temperature_kind,
    salinity_kind, equation_of_state, omega, radius
        As for :func:`geostrophic_transport`.
    rho0 : float, optional
        Reference density for the Ekman transport, kg m-3; default the ``rho0`` attribute of
        ``sverdrup_result`` (the Sverdrup and Ekman transports must share it).

    Returns
    -------
    xarray.Dataset
        On the T/S grid's latitudes (and longitudes for the profiles), 1e6 m3 s-1, positive
        northward, over the span between the easternmost and westernmost stations:

        - ``interior_transport`` (basin, lat): Sverdrup, :math:`\int V\,dx` over the span;
        - ``geostrophic_transport`` ([reference_pressure,] basin, lat);
        - ``ekman_transport`` (basin, lat): :math:`-\int \tau_x/(\rho_0 f)\,dx`;
        - ``geostrophic_plus_ekman`` and ``residual`` = interior minus that sum;
        - ``*_cumulative_transport`` (..., basin, lat, lon) for each of the four: the zonal
          profile summed westward from the easternmost station, zero there;
        - the counts and spans of :func:`geostrophic_transport`.

    Notes
    -----
    Sverdrup balance for the depth-integrated flow is :math:`\beta V = \hat k\cdot\nabla
    \times\boldsymbol\tau/\rho_0`, with :math:`V = V_g + V_E` the geostrophic plus Ekman
    transports. The dynamic method measures :math:`V_g` only above the reference level and
    only relative to it, so the residual holds the flow below and at the reference level, the
    overturning circulation's share, eddy and seasonal effects, and errors of winds and
    hydrography alike (Leetmaa, Niiler & Stommel 1977; Hautala, Roemmich & Schmitz 1994).

    Each T/S row takes :math:`V` and :math:`\tau_x` of the Sverdrup row whose cell contains its
    latitude, with :math:`f` of its own latitude; the zonal integrals weight each wind cell by
    its overlap with the span in longitude.

    References
    ----------
    Leetmaa, A., Niiler, P. & Stommel, H. (1977). J. Mar. Res. 35, 1-10.
    Hautala, S. L., Roemmich, D. H. & Schmitz, W. J. (1994). Is the North Pacific in Sverdrup
    balance along 24N? J. Geophys. Res. 99, 16041-16052.
    """
    lay_sv = _check_sverdrup_result(sverdrup_result, "sverdrup_result")
    taux = require_dataarray(taux, "taux")
    tl = grid_layout(taux, argname="taux")
    if (tl.lat.shape != lay_sv.lat.shape or not np.allclose(tl.lat, lay_sv.lat)
            or tl.lon.shape != lay_sv.lon.shape
            or not np.allclose(np.mod(tl.lon, 360), np.mod(lay_sv.lon, 360))):
        raise GridError(
            "taux: expected the grid of sverdrup_result, found another grid. Fix: pass the "
            "stress the Sverdrup transport was computed from."
        )
    extra = [d for d in taux.dims if d not in (tl.lat_name, tl.lon_name)]
    if extra:
        raise InputError(
            f"taux: expected (lat, lon), found extra dimensions {extra}. Fix: pass the time "
            f"mean the Sverdrup transport was computed from, e.g. taux.mean('{extra[0]}')."
        )
    if rho0 is None:
        rho0 = float(sverdrup_result.attrs.get("rho0", constants.RHO0))
    if not (np.isfinite(rho0) and rho0 > 0):
        raise InputError(f"rho0: expected a positive density in kg m-3, found {rho0!r}.")
    geo, info = _geostrophic(
        temperature, salinity, sverdrup_result=sverdrup_result,
        reference_pressure=reference_pressure, reference_velocity=reference_velocity,
        western_limit=western_limit, boundary_layer_km=boundary_layer_km,
        temperature_kind=temperature_kind, salinity_kind=salinity_kind,
        equation_of_state=equation_of_state, omega=omega, radius=radius,
    )
    tx = to_si(taux, "stress", argname="taux", default="Pa")
    tx = np.asarray(tx.transpose(tl.lat_name, tl.lon_name).values, float)[tl.lat_order][
        :, tl.lon_order]
    latn = lay_sv.lat_name
    v = sverdrup_result["sverdrup_northward_transport"].transpose(latn, lay_sv.lon_name)
    v = np.asarray(v.values, float)[lay_sv.lat_order][:, lay_sv.lon_order]
    grid = SphericalGrid(lay_sv.lat, lay_sv.lon, lay_sv.periodic, radius, omega)
    lon_lo, lon_hi = grid.lon_edges[:-1], grid.lon_edges[1:]

    lay = info["lay"]
    nb, ny, nx = len(info["basins"]), lay.lat.size, lay.lon.size
    interior = np.full((nb, ny), np.nan)
    ekman = np.full((nb, ny), np.nan)
    cum_i = np.full((nb, ny, nx), np.nan)
    cum_e = np.full((nb, ny, nx), np.nan)
    m_per_deg = radius * np.cos(np.deg2rad(lay.lat)) * np.pi / 180.0
    for (b, j), (e, cols, dists) in info["stations"].items():
        k = info["pos"][j]
        # Integrals from the coast to each station, minus the part east of the first one.
        iv = _cell_overlap_integral(v[k], lon_lo, lon_hi, e, dists) * m_per_deg[j]
        ve = -tx[k] / (rho0 * info["f"][j])
        ie = _cell_overlap_integral(ve, lon_lo, lon_hi, e, dists) * m_per_deg[j]
        iv, ie = (iv - iv[0]) / constants.SVERDRUP_IN_M3_S, (ie - ie[0]) / constants.SVERDRUP_IN_M3_S
        cum_i[b, j, cols] = iv
        cum_e[b, j, cols] = ie
        interior[b, j] = iv[-1]
        ekman[b, j] = ie[-1]

    return _assemble_balance(geo, interior, ekman, cum_i, cum_e, lay, info, rho0)


def _assemble_balance(geo, interior, ekman, cum_i, cum_e, lay, info, rho0):
    lat, lon = lay.lat_name, lay.lon_name
    inv_lat = np.argsort(lay.lat_order)
    inv_lon = np.argsort(lay.lon_order)
    row = lambda a: a[:, inv_lat]
    prof = lambda a: a[:, inv_lat][:, :, inv_lon]
    ds = geo.copy()
    ds["interior_transport"] = (("basin", lat), row(interior), {
        "long_name": "Sverdrup northward transport over the span of the stations",
        "units": SV_UNITS,
        "comment": "integral of the Sverdrup transport per unit width (curl tau / (rho0 beta), "
                   "Ekman included) of the Sverdrup row containing this latitude, from the "
                   "easternmost to the westernmost station",
    })
    ds["ekman_transport"] = (("basin", lat), row(ekman), {
        "long_name": "northward Ekman transport over the span of the stations",
        "units": SV_UNITS, "comment": f"-taux / (rho0 f), rho0 = {rho0:g} kg m-3",
    })
    ds["interior_cumulative_transport"] = (("basin", lat, lon), prof(cum_i), {
        "long_name": "Sverdrup transport summed westward from the easternmost station",
        "units": SV_UNITS})
    ds["ekman_cumulative_transport"] = (("basin", lat, lon), prof(cum_e), {
        "long_name": "Ekman transport summed westward from the easternmost station",
        "units": SV_UNITS})
    gpe = ds["geostrophic_transport"] + ds["ekman_transport"]
    ds["geostrophic_plus_ekman"] = gpe.assign_attrs(
        long_name="geostrophic plus Ekman northward transport over the span", units=SV_UNITS)
    ds["residual"] = (ds["interior_transport"] - gpe).assign_attrs(
        long_name="Sverdrup minus (geostrophic plus Ekman) transport over the span",
        units=SV_UNITS,
        comment="flow below and at the reference level, overturning, eddies, seasonal "
                "sampling and the errors of winds and hydrography",
    )
    gpe_c = ds["geostrophic_cumulative_transport"] + ds["ekman_cumulative_transport"]
    ds["residual_cumulative_transport"] = (ds["interior_cumulative_transport"] - gpe_c
                                           ).assign_attrs(
        long_name="Sverdrup minus (geostrophic plus Ekman), summed westward from the "
                  "easternmost station", units=SV_UNITS)
    order = ["interior_transport", "geostrophic_transport", "ekman_transport",
             "geostrophic_plus_ekman", "residual", "interior_cumulative_transport",
             "geostrophic_cumulative_transport", "ekman_cumulative_transport",
             "residual_cumulative_transport"]
    ds = ds[order + [v for v in ds.data_vars if v not in order]]
    ds.attrs.update(title="hydrographic test of Sverdrup balance", rho0=rho0)
    return ds
