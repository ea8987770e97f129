"""The one validation layer: numbers, masks and fields, checked the same way everywhere.

Every public function checks its inputs through these helpers, so that one rule holds across
the toolkit:

* **Numbers** (densities, depths, friction, beta, widths): a real number, not a bool or a
  string, finite, with the sign the parameter needs. A number given as text (``rho0="1025"``)
  is refused with the fix spelled out, never converted silently.
* **Masks**: booleans, or numbers that are 0 or 1 (NaN counts as outside, as written by
  ``where``). Any other value (-1, 0.7, 2) is refused: it is not clear what it means.
* **Fields** (wind, stress, curl): values equal to a common undeclared fill value
  (:data:`~sverdrup_kit.limits.UNDECLARED_FILL_VALUES`, or beyond
  :data:`~sverdrup_kit.limits.FILL_SENTINEL`) are taken as missing, with a
  :class:`~sverdrup_kit.errors.UndeclaredFillValueWarning`. Infinite values are refused: they
  are neither data nor a fill convention, and taking them as missing would turn an ocean cell
  into land. Values beyond :data:`~sverdrup_kit.limits.PLAUSIBLE_LIMITS` are refused.

Dask-backed fields stay lazy: their checks are mapped over the blocks and run, raise or warn
when the blocks are computed, in the same pass that computes the result (no extra read of the
record). In-memory fields are checked at call time and the error gives the place of an example.
"""

from __future__ import annotations

import functools
import numbers
import warnings

import numpy as np
import xarray as xr

from .errors import InputError, UndeclaredFillValueWarning
from .io.units import KIND, si_factor
from ._compiled.dispatch import screen
from ._compiled.screen import fill_cells
from .limits import FILL_SENTINEL, PLAUSIBLE_LIMITS, UNDECLARED_FILL_VALUES

_SIGNS = {
    "positive": ("a finite number > 0", lambda v: v > 0),
    "non-negative": ("a finite number >= 0", lambda v: v >= 0),
    "any": ("a finite number", lambda v: True),
}

_FIELD_WORDS = {"speed": "wind speeds", "stress": "wind stresses", "curl": "wind-stress curls"}


def _describe(value) -> str:
    if isinstance(value, str):
        return f"the text {value!r}"
    return f"{value!r} ({type(value).__name__})" if not isinstance(value, numbers.Real) else (
        repr(value))


def _text_fix(name: str, value) -> str:
    try:
        return f" Fix: pass a number, not text: {name}={float(value)!r}."
    except ValueError:
        return ""


def number(value, name: str, *, sign: str = "positive", units: str = "", example=None,
           low: float | None = None, high: float | None = None) -> float:
    """``value`` as a float after checking it is a finite real number with the sign asked for.

    ``low``/``high`` bound the plausible range (exclusive); ``example`` goes into the fix.
    """
    what, ok = _SIGNS[sign]
    if low is not None or high is not None:
        what = f"a number between {low:g} and {high:g}"
    unit_text = f" in {units}" if units else ""
    fix = f" Fix: pass e.g. {name}={example!r}." if example is not None else ""
    if isinstance(value, str):
        raise InputError(f"{name}: expected {what}{unit_text}, found {_describe(value)}."
                         + (_text_fix(name, value) or fix))
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, numbers.Real):
        if isinstance(value, np.ndarray) and value.ndim == 0 and value.dtype.kind in "iuf":
            value = value.item()
        else:
            raise InputError(f"{name}: expected {what}{unit_text}, found {_describe(value)}."
                             + fix)
    v = float(value)
    inside = (low is None or v > low) and (high is None or v < high)
    if not (np.isfinite(v) and ok(v) and inside):
        raise InputError(f"{name}: expected {what}{unit_text}, found {value!r}.{fix}")
    return v


def numbers_array(value, name: str, *, sign: str = "positive", units: str = "",
                  example=None) -> np.ndarray:
    """Like :func:`number` for a scalar or array_like of numbers; returns float64."""
    if isinstance(value, (str, bool, np.bool_)) or np.ndim(value) == 0:
        return np.asarray(number(value, name, sign=sign, units=units, example=example))
    arr = np.asarray(value)
    what, ok = _SIGNS[sign]
    unit_text = f" in {units}" if units else ""
    fix = f" Fix: pass e.g. {name}={example!r}." if example is not None else ""
    if arr.dtype.kind not in "iuf":
        raise InputError(f"{name}: expected {what}{unit_text} (or an array of them), found an "
                         f"array of dtype {arr.dtype}.{fix}")
    arr = arr.astype(np.float64)
    bad = ~(np.isfinite(arr) & ok(np.where(np.isfinite(arr), arr, 0.0)))
    if bad.any():
        raise InputError(f"{name}: expected {what}{unit_text} everywhere, found {int(bad.sum())} "
                         f"value(s) that are not, e.g. {arr[bad].flat[0]!r}.{fix}")
    return arr


def mask(values, name: str) -> np.ndarray:
    """A boolean copy of a mask given as booleans or 0/1 numbers (NaN counts as 0)."""
    vals = np.asarray(values)
    if vals.dtype == bool:
        return vals.copy()
    if vals.dtype.kind not in "iuf":
        raise InputError(
            f"{name}: expected a mask of booleans or 0/1 (True/1 inside), found dtype "
            f"{vals.dtype}. Fix: build it with a comparison, e.g. {name} = (depth > 0)."
        )
    v = vals.astype(np.float64)
    bad = np.isfinite(v) & (v != 0.0) & (v != 1.0) | np.isinf(v)
    if bad.any():
        found = np.unique(v[bad])
        shown = ", ".join(f"{x:g}" for x in found[:4]) + (", ..." if found.size > 4 else "")
        raise InputError(
            f"{name}: expected a mask of booleans or 0/1 (NaN counts as 0), found "
            f"{int(bad.sum())} cell(s) with other values ({shown}). Fix: say what is inside, "
            f"e.g. {name} == 1, or {name} > 0 if every positive value means inside."
        )
    return np.where(np.isfinite(v), v, 0.0) == 1.0


# --- fields ---


def _fills_for(dtype) -> np.ndarray:
    """The common undeclared fill values that ``dtype`` can hold, in that dtype; those beyond
    the sentinel are found by it."""
    if dtype.kind not in "iuf":
        return np.zeros(0, dtype=dtype if dtype.kind in "iufc" else np.float64)
    info = np.finfo(dtype) if dtype.kind == "f" else np.iinfo(dtype)
    keep = [f for f in UNDECLARED_FILL_VALUES
            if abs(f) < FILL_SENTINEL and info.min <= f <= info.max]
    return np.asarray(keep).astype(dtype)


def _where(index, offset, dims, coords) -> str:
    parts = []
    for d, i in zip(dims, np.add(index, offset)):
        c = coords.get(d)
        parts.append(f"{d}={c[i]}" if c is not None else f"{d}[{int(i)}]")
    return " at " + ", ".join(parts)


def _screen(a, *, name, kind, factor, dims=None, coords=None, fills=True, block_info=None):
    """The field check on one array: fills -> NaN (warn), inf and implausible -> InputError.

    With ``kind=None`` only the fills are looked for (readers, before units are known). On a
    dask block, ``block_info`` (from map_blocks) places the block in the whole array.
    """
    offset, scope = (0,) * np.ndim(a), ""
    if block_info is not None:
        offset = tuple(lo for lo, _ in block_info[0]["array-location"])
        scope = " in one block of the data"
    a = np.asarray(a)
    limit, units, why = PLAUSIBLE_LIMITS[kind] if kind is not None else (np.inf, "", "")
    fill_values = _fills_for(a.dtype) if fills else np.zeros(0, dtype=a.dtype)
    sentinel = FILL_SENTINEL if fills else np.inf
    # One pass for the usual clean field: a float64 copy (the caller's data stay as they
    # are) and counts; the cells are looked for again only to word a message.
    out, n_fill, n_over = screen(a, fills=fill_values, sentinel=sentinel, factor=factor,
                                 limit=limit)
    if n_fill:
        hit = fill_cells(a, fill_values, sentinel)
        example = float(a[hit].flat[0])
        warnings.warn(
            f"{name}: found {n_fill} cell(s){scope} holding {example:g}, a common "
            "fill value not declared in _FillValue or missing_value; they are taken as "
            "missing. "
            f"Fix: declare it in the variable's _FillValue attribute ({example:g}), or mask "
            "it yourself before passing the data.",
            UndeclaredFillValueWarning, stacklevel=5,
        )
    if not n_over:
        return out
    with np.errstate(invalid="ignore"):
        over = (out > limit) | (out < -limit)  # infinite values too: told apart if found
    inf = np.isinf(out)
    if inf.any():
        at = _where(np.argwhere(inf)[0], offset, dims, coords) if dims is not None else ""
        raise InputError(
            f"{name}: expected finite values or NaN for missing, found {int(inf.sum())} "
            f"infinite cell(s){scope}{at}. Fix: mark them missing, e.g. "
            f"{name}.where(np.isfinite({name})), or find where they came from."
        )
    idx = np.argwhere(over)[0]
    at = _where(idx, offset, dims, coords) if dims is not None else ""
    raise InputError(
        f"{name}: expected {_FIELD_WORDS[kind]} of magnitude at most {limit:g} {units} "
        f"({why}), found {int(over.sum())} cell(s){scope} beyond, e.g. {out[tuple(idx)]:g} "
        f"{units}{at}. Fix: check the variable, its units attribute and its fill values."
    )


def _apply(da: xr.DataArray, *, name, kind, factor, fills) -> xr.DataArray:
    coords = {d: np.asarray(da[d].values) for d in da.dims if d in da.coords}
    if da.chunks is not None:
        # partial, not keywords: map_blocks keeps 'name' for itself.
        check = functools.partial(_screen, name=name, kind=kind, factor=factor, fills=fills,
                                  dims=da.dims, coords=coords)
        data = da.data.map_blocks(check, dtype=np.float64)
    else:
        data = _screen(da.values, name=name, kind=kind, factor=factor, dims=da.dims,
                       coords=coords, fills=fills)
    return da.copy(data=data)


def field(da: xr.DataArray, name: str, kind: str, *, default_units: str | None = None,
          fills: bool = True) -> xr.DataArray:
    """``da`` in SI units and float64, checked for fill values, infinities and plausibility.

    Parameters
    ----------
    da : xarray.DataArray
        Wind (``kind="speed"``), stress (``"stress"``) or curl (``"curl"``, taken as N m-3).
    name : str
        The argument's name, used in messages.
    default_units : str, optional
        Units assumed when ``da`` has no ``units`` attribute (see
        :func:`sverdrup_kit.io.units.to_si`).
    fills : bool
        Look for undeclared fill values (readers that have already done so pass False).

    Returns
    -------
    xarray.DataArray
        A new array (``da`` is not modified) with ``units`` set to the SI spelling. Lazy when
        ``da`` is dask-backed: the checks then run when its blocks are computed.
    """
    if kind == "curl":
        factor, units = 1.0, "N m-3"
    else:
        factor = si_factor(da.attrs.get("units", default_units), kind, argname=name)
        units = KIND[kind][1]
    out = _apply(da, name=name, kind=kind, factor=factor, fills=fills)
    return out.assign_attrs({**da.attrs, "units": units})


def array_field(values, name: str, kind: str) -> np.ndarray:
    """:func:`field` for a plain array in SI units; returns a new float64 array."""
    a = np.asarray(values)
    return _screen(a, name=name, kind=kind, factor=1.0, dims=tuple(f"axis{i}" for i in
                                                                      range(a.ndim)), coords={})


def fills_to_missing(da: xr.DataArray, name: str) -> xr.DataArray:
    """``da`` as float64 with common undeclared fill values set to NaN, with a warning.

    For readers, which check plausibility later, once the units are known.
    """
    return _apply(da, name=name, kind=None, factor=1.0, fills=True)


def checked(da: xr.DataArray, name: str, kind: str) -> xr.DataArray:
    """``da``, already in SI units, checked for infinities and plausibility (no fill search)."""
    return _apply(da, name=name, kind=kind, factor=1.0, fills=False)
