"""Index shifts shared by the NumPy kernels and their compiled twins (plain NumPy)."""

from __future__ import annotations

import numpy as np


def shift(a: np.ndarray, k: int, *, periodic: bool) -> np.ndarray:
    """a[..., i + k] along the last axis; NaN beyond the ends unless periodic."""
    if periodic:
        return np.roll(a, -k, axis=-1)
    out = np.full_like(a, np.nan)
    n = a.shape[-1]
    if k > 0:
        out[..., : n - k] = a[..., k:]
    elif k < 0:
        out[..., -k:] = a[..., : n + k]
    else:
        out[...] = a
    return out


def shift_coord(x: np.ndarray, k: int, *, period: float | None) -> np.ndarray:
    """x[i + k] with the period added or removed across the wrap; linear beyond the ends."""
    n = x.size
    idx = np.arange(n) + k
    if period is not None:
        wraps = np.floor_divide(idx, n)
        return x[idx % n] + wraps * period
    lo, hi = x[1] - x[0], x[-1] - x[-2]
    out = np.empty(n)
    inside = (idx >= 0) & (idx < n)
    out[inside] = x[idx[inside]]
    out[idx < 0] = x[0] + idx[idx < 0] * lo
    out[idx >= n] = x[-1] + (idx[idx >= n] - n + 1) * hi
    return out
