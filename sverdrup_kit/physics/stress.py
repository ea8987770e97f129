"""Wind stress from wind by the bulk formula, with published neutral drag laws.

The drag laws live in one table, :data:`DRAG_LAWS`, apart from the logic that applies them: each
entry names the formula, its reference, the speed range it was published for and what is done
outside that range. :func:`drag_coefficient` evaluates a law; :func:`wind_stress` applies the
bulk formula to gridded winds and warns when the winds look like monthly means.
"""

from __future__ import annotations

import datetime
import difflib
import math
import re
import warnings
from collections.abc import Callable
from dataclasses import dataclass
from types import MappingProxyType

import numpy as np
import xarray as xr

from .. import _validate, constants
from .._apply import apply_grid_kernel
from ..errors import MonthlyMeanWindWarning
from ..geometry.coords import check_same_grid, require_dataarray
from ..io.units import to_si

__all__ = [
    "DRAG_LAWS",
    "DragLaw",
    "MonthlyMeanWindWarning",
    "drag_coefficient",
    "wind_stress",
]

#: Lowest speed, m s-1, at which the Large & Yeager formulas are evaluated; slower winds use the
#: drag coefficient at this speed. Their 2.7/U term grows without bound as U -> 0; 0.5 m/s is the
#: minimum wind speed of the CORE bulk-formula practice (from memory).
LY_MIN_SPEED = 0.5

#: Upper end of the Large & Pond (1981) data, m s-1. Above it the linear laws of that family are
#: held at their value here rather than extrapolated: measured drag levels off at high winds
#: (Powell, Vickery & Reinhold 2003, Nature 422, 279-283), and no later law in the table grows
#: linearly without bound either (Large & Yeager 2009 cap theirs at 33 m/s).
LP_MAX_SPEED = 25.0



# --- the laws: plain NumPy on speeds in m s-1, float64, NaN already set for invalid speeds ---


def _lp81_linear(U):
    return (0.49 + 0.065 * np.minimum(U, LP_MAX_SPEED)) * 1e-3


def _large_pond_1981(U):
    return np.where(U < 11.0, 1.2e-3, _lp81_linear(U))


def _large_pond_1981_continuous(U):
    return np.where(U < 10.0, 1.14e-3, _lp81_linear(U))


def _trenberth_1990(U):
    low = (0.62 + 1.56 / np.clip(U, 1.0, 3.0)) * 1e-3
    return np.where(U <= 1.0, 2.18e-3, np.where(U < 3.0, low, _large_pond_1981_continuous(U)))


def _ly_common(U):
    U = np.maximum(U, LY_MIN_SPEED)
    return U, 2.7 / U + 0.142 + U / 13.09


def _large_yeager_2004(U):
    _, cd = _ly_common(U)
    return cd * 1e-3


def _large_yeager_2009(U):
    Uf, cd = _ly_common(U)
    return np.where(U >= 33.0, 2.34e-3, (cd - 3.14807e-10 * Uf**6) * 1e-3)


@dataclass(frozen=True)
class DragLaw:
    """One neutral 10 m drag law: the formula and what is known about it.

    Attributes
    ----------
    name : str
        The key in :data:`DRAG_LAWS`.
    function : callable
        float64 ndarray of 10 m neutral wind speed (m s-1, non-negative or NaN) -> drag
        coefficient (dimensionless), same shape.
    formula : str
        The law in words, with the treatment outside its published range.
    reference : str
        The publication, with year and journal.
    published_range : tuple of float
        Wind speeds (m s-1) for which the source gives the formula.
    """

    name: str
    function: Callable[[np.ndarray], np.ndarray]
    formula: str
    reference: str
    published_range: tuple[float, float]


_LAWS = (
    DragLaw(
        "large-pond-1981",
        _large_pond_1981,
        "1e3 Cd = 1.2 for U < 11 m/s (published for 4 <= U < 11; held below 4 m/s); "
        "0.49 + 0.065 U for 11 <= U <= 25 m/s; held at 2.115 above 25 m/s. The pieces differ "
        "by 0.4% at 11 m/s.",
        "Large, W. G. and S. Pond (1981), Open ocean momentum flux measurements in moderate to "
        "strong winds, J. Phys. Oceanogr. 11, 324-336.",
        (4.0, 25.0),
    ),
    DragLaw(
        "large-pond-1981-continuous",
        _large_pond_1981_continuous,
        "1e3 Cd = 1.14 for U < 10 m/s; 0.49 + 0.065 U for 10 <= U <= 25 m/s, so the pieces "
        "meet at 10 m/s; held at 2.115 above 25 m/s. A common variant of Large & Pond (1981).",
        "Large, W. G. and S. Pond (1981), J. Phys. Oceanogr. 11, 324-336; low-wind constant as in "
        "Trenberth, Large & Olson (1990), J. Phys. Oceanogr. 20, 1742-1760.",
        (4.0, 25.0),
    ),
    DragLaw(
        "trenberth-1990",
        _trenberth_1990,
        "1e3 Cd = 2.18 for U <= 1 m/s; 0.62 + 1.56/U for 1 < U < 3; 1.14 for 3 <= U < 10; "
        "0.49 + 0.065 U for 10 <= U <= 25; held at 2.115 above 25 m/s. Continuous everywhere.",
        "Trenberth, K. E., W. G. Large and J. G. Olson (1990), The mean annual cycle in global "
        "ocean wind stress, J. Phys. Oceanogr. 20, 1742-1760.",
        (0.0, 25.0),
    ),
    DragLaw(
        "large-yeager-2004",
        _large_yeager_2004,
        "1e3 Cd = 2.7/U + 0.142 + U/13.09, with U no lower than 0.5 m/s. No strong-wind cap: "
        "Cd grows without bound (2.74 at 33 m/s); large-yeager-2009 caps it.",
        "Large, W. G. and S. G. Yeager (2004), Diurnal to decadal global forcing for ocean and "
        "sea-ice models: the data sets and flux climatologies, NCAR Technical Note "
        "NCAR/TN-460+STR.",
        (LY_MIN_SPEED, math.inf),
    ),
    DragLaw(
        "large-yeager-2009",
        _large_yeager_2009,
        "1e3 Cd = 2.7/U + 0.142 + U/13.09 - 3.14807e-10 U^6 for U < 33 m/s (U no lower than "
        "0.5 m/s); 2.34 for U >= 33 m/s (eq. 11). The pieces meet within 0.1%.",
        "Large, W. G. and S. G. Yeager (2009), The global climatology of an interannually varying "
        "air-sea flux data set, Clim. Dyn. 33, 341-364.",
        (LY_MIN_SPEED, math.inf),
    ),
)

#: The drag laws by name (read-only). ``drag_law=`` in this module takes one of these keys or a
#: constant drag coefficient.
DRAG_LAWS = MappingProxyType({law.name: law for law in _LAWS})

#: Largest constant drag coefficient accepted; measured neutral values stay below about 3e-3, so a
#: larger number is almost always 1e3 Cd passed by mistake.
_MAX_CONSTANT_CD = 1e-2


def _constant_law(cd: float) -> DragLaw:
    return DragLaw(
        f"constant {cd:g}",
        lambda U: np.where(np.isnan(U), np.nan, cd),
        f"Cd = {cd:g} at all speeds",
        "constant drag coefficient given by the user",
        (0.0, math.inf),
    )


def _resolve_drag(drag) -> DragLaw:
    """Return the :class:`DragLaw` for ``drag`` (a name or a constant), or raise naming it."""
    if isinstance(drag, DragLaw):
        return drag
    if isinstance(drag, str):
        key = re.sub(r"[\s_]+", "-", drag.strip().lower())
        if key in DRAG_LAWS:
            return DRAG_LAWS[key]
        close = difflib.get_close_matches(key, DRAG_LAWS, n=1)
        hint = f"drag_law='{close[0]}'" if close else "drag_law='large-pond-1981'"
        raise ValueError(
            f"drag_law: expected one of {list(DRAG_LAWS)} or a constant drag coefficient such as "
            f"1.3e-3, found '{drag}'. Fix: pass e.g. {hint}."
        )
    if isinstance(drag, (int, float, np.integer, np.floating)) and not isinstance(drag, bool):
        cd = float(drag)
        if not (math.isfinite(cd) and 0.0 < cd < _MAX_CONSTANT_CD):
            hint = f"drag_law={cd * 1e-3:g}" if 0.1 < cd < 10.0 else "drag_law=1.3e-3"
            raise ValueError(
                f"drag_law: expected a constant drag coefficient between 0 and {_MAX_CONSTANT_CD:g} "
                f"(dimensionless; typical values are 1e-3 to 2.5e-3), found {drag!r}. "
                f"Fix: pass e.g. {hint} (a value of 1.3 usually means 1e3 Cd)."
            )
        return _constant_law(cd)
    raise TypeError(
        f"drag_law: expected a drag-law name {list(DRAG_LAWS)} or a number, found "
        f"{type(drag).__name__}. Fix: pass e.g. drag_law='large-pond-1981' or drag_law=1.3e-3."
    )


def _cd_kernel(speed, *, law: DragLaw):
    """Drag coefficient for speeds in m s-1; negative or non-finite speeds give NaN."""
    U = np.asarray(speed, dtype=np.float64)
    U = np.where(np.isfinite(U) & (U >= 0.0), U, np.nan)
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.asarray(law.function(U), dtype=np.float64)


def _cd_attrs(law: DragLaw) -> dict:
    return {
        "standard_name": "surface_drag_coefficient_for_momentum_in_air",
        "long_name": "neutral 10 m drag coefficient",
        "units": "1",
        "drag_law": law.name,
        "drag_law_formula": law.formula,
        "drag_law_reference": law.reference,
    }


def _cd_dataarray(speed_si: xr.DataArray, law: DragLaw) -> xr.DataArray:
    cd = apply_grid_kernel(_cd_kernel, speed_si, dims=(), kwargs={"law": law})
    return cd.rename("drag_coefficient").assign_attrs(_cd_attrs(law))


def drag_coefficient(speed, *, drag_law="large-pond-1981"):
    r"""Neutral 10 m drag coefficient of a published drag law, dimensionless.

    Parameters
    ----------
    speed : float, array_like, dask array or xarray.DataArray, any shape
        10 m neutral wind speed. NumPy and dask input is in m s-1. A DataArray may carry any
        speed unit that :mod:`sverdrup_kit.io.units` knows (m s-1, M/S, knots, cm s-1, ...); one
        with no ``units`` attribute is taken as m s-1. Negative or missing speeds give NaN.
    drag_law : str or float, optional
        A key of :data:`DRAG_LAWS` -- ``"large-pond-1981"`` (default),
        ``"large-pond-1981-continuous"``, ``"trenberth-1990"``, ``"large-yeager-2004"``,
        ``"large-yeager-2009"`` -- or a constant drag coefficient (e.g. ``1.3e-3``), or a
        :class:`DragLaw` of your own. Names are matched ignoring case, spaces and underscores.

    Returns
    -------
    float, ndarray, dask array or xarray.DataArray
        Drag coefficient, float64, the same shape and kind as ``speed``. A DataArray comes back
        named ``drag_coefficient`` with CF attributes and the law and its reference in attrs;
        dask-backed input stays lazy.

    Raises
    ------
    ValueError
        Unknown law name (the message lists the valid names) or an implausible constant.
    sverdrup_kit.io.units.UnitsError
        A DataArray whose units are not a recognised speed.

    Notes
    -----
    The laws (U in m s-1, neutral stratification assumed throughout):

    ``large-pond-1981``
        :math:`10^3 C_D = 1.2` for :math:`U < 11`, :math:`0.49 + 0.065\,U` for
        :math:`11 \le U \le 25`. The paper's neutral formula starts at 4 m s-1; below that the
        constant 1.2 is held. Above 25 m s-1, beyond the data, :math:`C_D` is held at its 25 m
        s-1 value, 2.115e-3, for this and the two laws below that share the linear piece.
    ``large-pond-1981-continuous``
        As above but :math:`10^3 C_D = 1.14` below 10 m s-1, so the pieces meet.
    ``trenberth-1990``
        :math:`10^3 C_D = 2.18` for :math:`U \le 1`, :math:`0.62 + 1.56/U` for :math:`1 < U < 3`,
        then ``large-pond-1981-continuous``; continuous at 1, 3 and 10 m s-1.
    ``large-yeager-2004``
        :math:`10^3 C_D = 2.7/U + 0.142 + U/13.09`, as published, with no strong-wind cap
        (it reaches 2.74e-3 at 33 m s-1 and keeps growing; prefer ``large-yeager-2009`` there).
    ``large-yeager-2009``
        :math:`10^3 C_D = 2.7/U + 0.142 + U/13.09 - 3.14807\times10^{-10}U^6` for
        :math:`U < 33`, :math:`2.34` above (their eq. 11).

    Both Large & Yeager laws grow as :math:`1/U` for light winds; they are evaluated at
    ``max(U, 0.5 m/s)`` (:data:`LY_MIN_SPEED`), so :math:`C_D \le 5.58\times10^{-3}`.

    References
    ----------
    Large, W. G. and S. Pond (1981), J. Phys. Oceanogr. 11, 324-336.
    Trenberth, K. E., W. G. Large and J. G. Olson (1990), J. Phys. Oceanogr. 20, 1742-1760.
    Large, W. G. and S. G. Yeager (2004), NCAR Technical Note NCAR/TN-460+STR.
    Large, W. G. and S. G. Yeager (2009), Clim. Dyn. 33, 341-364.

    Examples
    --------
    >>> print(f"{drag_coefficient(15.0):.4g}")
    0.001465
    >>> print(f"{drag_coefficient(15.0, drag_law='large-yeager-2004'):.4g}")
    0.001468
    """
    law = _resolve_drag(drag_law)
    if isinstance(speed, xr.DataArray):
        s = to_si(speed, "speed", argname="speed", default="m s-1").astype(np.float64)
        return _cd_dataarray(s, law)
    if hasattr(speed, "map_blocks") and hasattr(speed, "dask"):
        return speed.map_blocks(_cd_kernel, law=law, dtype=np.float64)
    out = _cd_kernel(speed, law=law)
    return float(out) if out.ndim == 0 and np.ndim(speed) == 0 else out


# --- detecting time-mean winds ---

#: Attribute wording that marks monthly or longer means (searched in u, v and time attrs).
_MEAN_WORDS = re.compile(
    r"monthly|month(ly)?[\s_-]*means?|mean\s+(within|over)\s+months|interval:\s*1\s*month"
    r"|climatolog|long[\s_-]*term[\s_-]*mean",
    re.IGNORECASE,
)
#: Spacing, in days, from which a time axis is read as holding monthly or longer means.
_MEAN_SPACING_DAYS = 27.0
_TIME_NAMES = {"time", "month", "months", "t", "date"}
_TIME_UNIT_DAYS = {
    "day": 1.0, "days": 1.0, "d": 1.0, "hour": 1 / 24, "hours": 1 / 24, "h": 1 / 24,
    "hr": 1 / 24, "minute": 1 / 1440, "minutes": 1 / 1440, "second": 1 / 86400,
    "seconds": 1 / 86400, "s": 1 / 86400, "month": 30.44, "months": 30.44,
}


def _spacing_days(coord: xr.DataArray) -> float | None:
    """Median spacing of a time coordinate in days, or None when it cannot be told."""
    vals = coord.values
    if vals.size < 2:
        return None
    if np.issubdtype(vals.dtype, np.datetime64):
        return float(np.median(np.diff(vals) / np.timedelta64(1, "s"))) / 86400.0
    if vals.dtype == object and isinstance(
        vals.flat[0], (datetime.datetime, *_cftime_types())
    ):
        steps = [(b - a).total_seconds() for a, b in zip(vals[:-1], vals[1:])]
        return float(np.median(steps)) / 86400.0
    units = str(coord.attrs.get("units", "")).strip().lower()
    if np.issubdtype(vals.dtype, np.number) and " since " in units:
        per = _TIME_UNIT_DAYS.get(units.split(" since ")[0].strip())
        if per is not None:
            return float(np.median(np.diff(vals.astype(np.float64)))) * per
    return None


def _cftime_types() -> tuple:
    try:
        import cftime
    except ImportError:
        return ()
    return (cftime.datetime,)


def _time_coords(da: xr.DataArray) -> list[str]:
    out = []
    for name, c in da.coords.items():
        if c.ndim != 1 or c.dims[0] != name:
            continue
        is_time = (
            str(name).lower() in _TIME_NAMES
            or c.attrs.get("standard_name") == "time"
            or str(c.attrs.get("axis", "")).upper() == "T"
            or np.issubdtype(c.dtype, np.datetime64)
            or (c.dtype == object and c.size and isinstance(c.values.flat[0], _cftime_types()))
        )
        if is_time:
            out.append(name)
    return out


def _time_mean_reason(*fields: xr.DataArray) -> str | None:
    """Why the winds look like monthly (or longer) means, or None when nothing says so."""
    for da in fields:
        for tname in _time_coords(da):
            coord = da[tname]
            if "climatology" in coord.attrs:
                return f"time coordinate '{tname}' has CF climatology bounds"
            days = _spacing_days(coord)
            if days is not None and days >= _MEAN_SPACING_DAYS:
                return f"time coordinate '{tname}' is spaced {days:.1f} days apart"
            if days is None and coord.size == 12:
                return f"'{tname}' has 12 steps, like a monthly climatology"
        for where, attrs in [("attributes", da.attrs)] + [
            (f"'{t}' attributes", da[t].attrs) for t in _time_coords(da)
        ]:
            for key, val in attrs.items():
                if isinstance(val, str) and _MEAN_WORDS.search(val):
                    return f"{da.name or 'the wind'} {where} say {key}={val!r}"
    return None


# --- the bulk formula ---


def _check_air_density(air_density) -> float:
    # Outside 0.5..2 kg m-3 the value is a typo or another quantity (about 1.15 to 1.3 at sea).
    return _validate.number(air_density, "air_density", units="kg m-3", example=1.22,
                            low=0.5, high=2.0)


def wind_stress(
    u,
    v,
    *,
    drag_law="large-pond-1981",
    air_density: float = constants.AIR_DENSITY,
    wind_speed=None,
) -> xr.Dataset:
    r"""Surface wind stress from 10 m winds by the bulk formula, Pa.

    Parameters
    ----------
    u, v : xarray.DataArray (..., lat, lon)
        Eastward and northward 10 m wind on the same grid, in any speed unit that
        :mod:`sverdrup_kit.io.units` knows (m s-1, m/s, M/S, knots, cm s-1, ...). A field with no
        ``units`` attribute is taken as m s-1. Missing values (land) stay missing. Any leading
        dimensions (time, member) pass through; no latitude or longitude is needed.
    drag_law : str or float, optional
        Drag law: a key of :data:`DRAG_LAWS` or a constant drag coefficient; see
        :func:`drag_coefficient`. Default ``"large-pond-1981"``.
    air_density : float, optional
        Air density in kg m-3 (default 1.22, common practice).
    wind_speed : xarray.DataArray, optional
        Scalar-mean wind speed :math:`S = \overline{|\mathbf u|}` on the same grid as ``u``,
        as carried by monthly wind climatologies, in a speed unit. When given, it replaces
        :math:`|\overline{\mathbf u}|` in both the drag law and the formula. It should not be
        smaller than :math:`|(u, v)|`; that is not checked, so that dask input stays lazy.

    Returns
    -------
    xarray.Dataset
        ``taux`` and ``tauy`` in Pa (standard names ``surface_downward_eastward_stress``,
        ``surface_downward_northward_stress``), float64, the dimensions and coordinates of
        ``u``; attrs record the drag law, its formula and reference, the air density and which
        speed was used. Lazy when the input is dask-backed.

    Warns
    -----
    MonthlyMeanWindWarning
        Once per call, when ``wind_speed`` is not given and the winds look like monthly or longer
        means: a time coordinate spaced 27 days or more, CF climatology bounds, a 12-step time
        axis with no dates, or attributes that say so (``monthly``, ``climatology``,
        ``cell_methods`` with a one-month interval, ...).

    Raises
    ------
    TypeError
        ``u``, ``v`` or ``wind_speed`` is not a DataArray.
    sverdrup_kit.geometry.coords.GridError
        The fields are not on the same grid.
    sverdrup_kit.io.units.UnitsError
        Units that are not a recognised speed.
    ValueError
        Unknown drag law, implausible constant drag or air density.

    Notes
    -----
    .. math:: (\tau_x, \tau_y) = \rho_a\, C_D(W)\, W\, (u, v), \qquad
              W = \sqrt{u^2 + v^2} \ \text{or}\ W = S \ \text{when ``wind_speed`` is given.}

    The stress is quadratic in the wind, so the stress of a time-mean wind underestimates the
    time mean of the stress: by up to about 20% at mid and high latitudes for monthly means
    (Rosen & Ponte 2003), and an effective drag coefficient can only correct that to about 10%
    (Trenberth, Large & Olson 1989). For isotropic Gaussian fluctuations of standard deviation
    :math:`s` about a mean :math:`U \gg s`, :math:`\langle|\mathbf u|u\rangle/U^2 \approx
    1 + 1.5\,s^2/U^2` (1.13 at U = 10, s = 3 m s-1). Passing the scalar-mean wind speed recovers
    about a third of that in the same model (:math:`SU \approx U^2(1 + 0.5\,s^2/U^2)`), and
    more where the wind turns often and the mean vector is short. The best remedy is to
    compute stress from 6-hourly or daily winds and average it.

    Neutral stratification is assumed and ``u``, ``v`` are read as 10 m neutral winds; the
    winds are relative to a surface current taken as zero.

    References
    ----------
    Large, W. G. and S. Pond (1981), J. Phys. Oceanogr. 11, 324-336.
    Trenberth, K. E., W. G. Large and J. G. Olson (1989), The effective drag coefficient for
    evaluating wind stress over the oceans, J. Climate 2, 1507-1516.
    Rosen, R. D. and R. M. Ponte (2003), J. Climate (monthly-mean stress bias, from memory).
    """
    u = require_dataarray(u, "u")
    v = require_dataarray(v, "v")
    check_same_grid(u, v, ("u", "v"))
    law = _resolve_drag(drag_law)
    rho = _check_air_density(air_density)
    if wind_speed is not None:
        wind_speed = require_dataarray(wind_speed, "wind_speed")
        check_same_grid(u, wind_speed, ("u", "wind_speed"))
    us = _validate.field(u, "u", "speed", default_units="m s-1")
    vs = _validate.field(v, "v", "speed", default_units="m s-1")
    if wind_speed is None:
        reason = _time_mean_reason(u, v)
        if reason is not None:
            warnings.warn(
                f"u, v look like monthly or longer means ({reason}). The stress of a mean wind "
                "underestimates the mean stress, by up to about 20% at mid and high latitudes "
                "(Rosen & Ponte 2003); an effective drag coefficient is only good to about 10% "
                "(Trenberth et al. 1989). Fix: compute stress from 6-hourly or daily winds and "
                "average it, or pass the scalar-mean wind speed as wind_speed=; to accept the bias, "
                "filter MonthlyMeanWindWarning.",
                MonthlyMeanWindWarning,
                stacklevel=2,
            )
        w = np.hypot(us, vs)
        used = "magnitude of the (u, v) given"
    else:
        w = _validate.field(wind_speed, "wind_speed", "speed", default_units="m s-1")
        used = "scalar-mean wind speed from the wind_speed argument"
    k = rho * _cd_dataarray(w, law) * w
    taux = (k * us).assign_attrs(
        standard_name="surface_downward_eastward_stress",
        long_name="eastward surface wind stress",
        units="Pa",
    )
    tauy = (k * vs).assign_attrs(
        standard_name="surface_downward_northward_stress",
        long_name="northward surface wind stress",
        units="Pa",
    )
    return xr.Dataset(
        {"taux": taux, "tauy": tauy},
        attrs={
            "drag_law": law.name,
            "drag_law_formula": law.formula,
            "drag_law_reference": law.reference,
            "air_density": rho,
            "air_density_units": "kg m-3",
            "wind_speed_used": used,
            "comment": "bulk formula tau = air_density * Cd(W) * W * (u, v), neutral 10 m wind",
        },
    )
