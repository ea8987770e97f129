"""Numerical kernels on plain NumPy arrays: no xarray, no I/O, float64 inside, NaN is land.

All kernels act on the last two axes, (lat, lon), and broadcast over any leading axes.
"""

from __future__ import annotations

import numpy as np

from .stencil import shift, shift_coord


def masked_derivative(f: np.ndarray, x: np.ndarray, *, period: float | None = None):
    """Derivative of ``f`` along its last axis with respect to coordinate ``x``, NaN-aware.

    Second-order everywhere the stencil allows: centred three-point differences on a
    non-uniform axis where both neighbours are ocean; one-sided three-point differences where one
    neighbour is land (or the edge of a non-periodic axis) and two ocean cells lie on the other
    side; two-point differences where only one does. Where neither neighbour is ocean the field
    cannot be differenced along this axis and the derivative is set to zero (its number is
    returned so wrappers can report it).

    Parameters
    ----------
    f : ndarray (..., n)
        Field, NaN on land.
    x : ndarray (n,)
        Strictly increasing coordinate.
    period : float, optional
        Length of the period when the axis is periodic (2 pi for longitude in radians).

    Returns
    -------
    df : ndarray (..., n)
        Derivative, NaN where ``f`` is NaN.
    n_isolated : int
        Number of ocean cells with no ocean neighbour along the axis.
    """
    periodic = period is not None
    fm2, fm1, fp1, fp2 = (shift(f, k, periodic=periodic) for k in (-2, -1, 1, 2))
    xm2, xm1, x0, xp1, xp2 = (shift_coord(x, k, period=period) for k in (-2, -1, 0, 1, 2))
    hm, hp = x0 - xm1, xp1 - x0
    hmm, hpp = xm1 - xm2, xp2 - xp1
    okm, okp = np.isfinite(fm1), np.isfinite(fp1)
    okmm, okpp = okm & np.isfinite(fm2), okp & np.isfinite(fp2)
    with np.errstate(invalid="ignore"):
        central = (
            -hp / (hm * (hm + hp)) * fm1 + (hp - hm) / (hm * hp) * f + hm / (hp * (hm + hp)) * fp1
        )
        fwd2 = (
            -(2 * hp + hpp) / (hp * (hp + hpp)) * f
            + (hp + hpp) / (hp * hpp) * fp1
            - hp / (hpp * (hp + hpp)) * fp2
        )
        bwd2 = (
            (2 * hm + hmm) / (hm * (hm + hmm)) * f
            - (hm + hmm) / (hm * hmm) * fm1
            + hm / (hmm * (hm + hmm)) * fm2
        )
        fwd1 = (fp1 - f) / hp
        bwd1 = (f - fm1) / hm
    out = np.where(
        okm & okp,
        central,
        np.where(
            okpp, fwd2, np.where(okmm, bwd2, np.where(okp, fwd1, np.where(okm, bwd1, 0.0)))
        ),
    )
    ocean = np.isfinite(f)
    out[~ocean] = np.nan
    return out, int(np.count_nonzero(ocean & ~okm & ~okp))


def curl_kernel_numpy(
    taux, tauy, phi, lam, *, periodic: bool, radius: float, return_isolated=False
):
    """NumPy reference for :func:`curl_kernel`: the same arguments and results."""
    tx = np.asarray(taux, dtype=np.float64)
    ty = np.asarray(tauy, dtype=np.float64)
    land = ~(np.isfinite(tx) & np.isfinite(ty))
    tx = np.where(land, np.nan, tx)
    ty = np.where(land, np.nan, ty)
    cos = np.cos(phi)[:, None]
    dty, n1 = masked_derivative(ty, lam, period=2 * np.pi if periodic else None)
    dtx, n2 = masked_derivative(np.swapaxes(tx * cos, -1, -2), phi)
    dtx = np.swapaxes(dtx, -1, -2)
    with np.errstate(divide="ignore", invalid="ignore"):
        curl = (dty - dtx) / (radius * cos)
    curl[..., np.abs(cos[:, 0]) < 1e-12, :] = np.nan
    if return_isolated:
        return curl, n1 + n2
    return curl
