"""The field screen of the validation layer, stated in NumPy: fill values and magnitudes.

:mod:`sverdrup_kit._validate` decides what a fill value or an implausible magnitude means and
words the messages; this kernel only counts them, in one pass the compiled twin
(:func:`sverdrup_kit._compiled.jit.screen`) makes over memory, so that a clean field (the usual
case) costs one copy.
"""

from __future__ import annotations

import numpy as np


def fill_cells(a: np.ndarray, fills: np.ndarray, sentinel: float) -> np.ndarray | None:
    """Cells of ``a`` equal to one of ``fills`` (given in ``a``'s own dtype) or, for floats,
    finite and at or beyond ``sentinel`` in magnitude; None when there are none."""
    hit = None
    for fill in fills:
        eq = a == fill
        hit = eq if hit is None else hit | eq
    if a.dtype.kind == "f":
        with np.errstate(invalid="ignore"):
            # Two comparisons allocate less than abs() on a large field.
            far = (a >= sentinel) | (a <= -sentinel)
        if far.any():
            far &= np.isfinite(a)
            hit = far if hit is None else hit | far
    return hit if hit is not None and hit.any() else None


def screen_numpy(a, *, fills, sentinel, factor, limit):
    """A float64 copy of ``a`` times ``factor`` with fill cells set to NaN, and two counts.

    Parameters
    ----------
    a : ndarray
        Any shape, integer or floating dtype; not modified.
    fills : ndarray
        Fill values in ``a``'s dtype (compared in the array's own precision).
    sentinel : float
        Finite magnitudes at or beyond this are fills too (floating ``a`` only).
    factor : float
        Unit conversion applied to the copy.
    limit : float
        Largest plausible magnitude of the converted values (``inf``: no limit).

    Returns
    -------
    out : ndarray, float64
    n_fill : int
        Cells taken as fills.
    n_over : int
        Cells of ``out`` beyond ``limit`` in magnitude, infinite values included.
    """
    a = np.asarray(a)
    out = np.array(a, dtype=np.float64)
    hit = fill_cells(a, np.asarray(fills, dtype=a.dtype), sentinel)
    n_fill = 0
    if hit is not None:
        out[hit] = np.nan
        n_fill = int(hit.sum())
    if factor != 1.0:
        out *= factor
    with np.errstate(invalid="ignore"):
        n_over = int(np.count_nonzero((out > limit) | (out < -limit)))
    return out, n_fill, n_over
