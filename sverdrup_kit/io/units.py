"""Unit spellings that real wind and stress files use, and conversion to SI.

Tables of criteria live here, apart from the logic. Keys are spellings folded to lower case with
spaces, '*', '^' and '.' removed; values are (canonical UDUNITS spelling, factor to SI).
"""

from __future__ import annotations

import re

import xarray as xr

from ..errors import UnitsError

KNOT = 1852.0 / 3600.0

SPEED = {
    "m/s": 1.0, "ms-1": 1.0, "m/sec": 1.0, "meter/second": 1.0, "meters/second": 1.0,
    "metre/second": 1.0, "metres/second": 1.0, "mps": 1.0, "meterspersecond": 1.0,
    "metrespersecond": 1.0, "ms**-1": 1.0, "m1s-1": 1.0,
    # International knot: 1852 m per hour (exact by definition).
    "knots": KNOT, "knot": KNOT, "kt": KNOT, "kts": KNOT, "kn": KNOT,
    "cm/s": 0.01, "cms-1": 0.01, "km/h": 1.0 / 3.6, "kmh-1": 1.0 / 3.6, "kph": 1.0 / 3.6,
}
STRESS = {
    "pa": 1.0, "n/m2": 1.0, "nm-2": 1.0, "n/m**2": 1.0, "newton/meter2": 1.0,
    "newtons/meter2": 1.0, "newton/metre2": 1.0, "kg/m/s2": 1.0, "kgm-1s-2": 1.0,
    "pascal": 1.0, "pascals": 1.0, "n/m^2": 1.0,
    "dyn/cm2": 0.1, "dyne/cm2": 0.1, "dyncm-2": 0.1, "dynecm-2": 0.1, "dynes/cm2": 0.1,
    "dyn/cm**2": 0.1, "dyne/cm**2": 0.1, "dyn/cm^2": 0.1,
    "mpa": 1e-3, "10-3pa": 1e-3, "10**-3pa": 1e-3,
    "nm**-2": 1.0, "dyncm**-2": 0.1, "dynecm**-2": 0.1, "dynes/cm**2": 0.1, "dynescm-2": 0.1,
}
# Folding to lower case would read megapascal ("MPa") as millipascal ("mPa"): these keys must
# match the original spelling exactly (spaces removed).
CASE_SENSITIVE = {"mpa": "mPa"}
KIND = {"speed": (SPEED, "m s-1", "a wind speed"), "stress": (STRESS, "Pa", "a stress")}



def _fold(units: str) -> str:
    s = str(units).strip().lower()
    s = re.sub(r"[\s\*\.]", "", s) if "**" not in s else re.sub(r"[\s\.]", "", s)
    return s.replace("^", "")


def si_factor(units: str | None, kind: str, *, argname: str) -> float:
    """Factor that converts a field in ``units`` to SI for ``kind`` ('speed' or 'stress').

    Raises
    ------
    UnitsError
        When the spelling is unknown or missing, naming the argument and the accepted spellings.
    """
    table, canon, what = KIND[kind]
    if units is None or str(units).strip() == "":
        raise UnitsError(
            f"{argname}: expected {what} with a 'units' attribute, found none. Fix: set it, e.g. "
            f"{argname}.attrs['units'] = '{canon}'."
        )
    key = _fold(units)
    exact = CASE_SENSITIVE.get(key)
    if key not in table or (exact is not None and str(units).replace(" ", "") != exact):
        raise UnitsError(
            f"{argname}: expected units of {what} such as {sorted(set(_examples(kind)))}, found "
            f"'{units}'. Fix: convert the field yourself and set attrs['units'] = '{canon}'."
        )
    return table[key]


def _examples(kind: str) -> list[str]:
    return ["m s-1", "m/s", "M/S", "knots"] if kind == "speed" else ["Pa", "N m-2", "dyn cm-2"]


def to_si(da: xr.DataArray, kind: str, *, argname: str, default: str | None = None) -> xr.DataArray:
    """Return ``da`` converted to SI (lazily) with UDUNITS-valid units; never modifies ``da``.

    ``default`` is assumed, silently, when the field carries no units attribute at all; functions
    that take bare arrays from users' own computations pass the SI spelling here.
    """
    units = da.attrs.get("units", default)
    factor = si_factor(units, kind, argname=argname)
    out = da if factor == 1.0 else da * factor
    attrs = dict(da.attrs)
    attrs["units"] = KIND[kind][1]
    return out.assign_attrs(attrs)
