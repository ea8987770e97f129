r"""Area-weighted averaging from one regular latitude-longitude grid onto another.

Each target cell gets the mean of the source cells it overlaps, weighted by the area of the
overlap on the sphere (first-order conservative remapping). On regular latitude-longitude grids
the overlap area factorises into a latitude part (the difference of :math:`\sin\phi` between the
overlap's edges) and a longitude part (the overlap in degrees, compared modulo 360), so the
remapping is two small matrix products per field. Missing source cells are left out of the
mean; a target cell is missing when less than ``min_coverage`` of its area has source data.

References
----------
Jones, P. W. (1999). First- and second-order conservative remapping schemes for grids in
spherical coordinates. Mon. Weather Rev. 127, 2204-2210.
"""

from __future__ import annotations

import numpy as np
import xarray as xr

from .._apply import whole_fields
from ..errors import InputError
from .coords import from_canonical, grid_layout, to_canonical
from .grid import cell_edges

__all__ = ["area_weighted_average", "cell_bounds", "coverage", "grid_step", "overlap_weights"]


def cell_bounds(lat: np.ndarray, lon: np.ndarray, *, periodic: bool):
    """Cell edges (degrees) of ascending ``lat`` and increasing ``lon`` centres.

    Latitude edges are half-way between centres and clipped to -90..90; on a periodic grid the
    longitude edges close the circle.
    """
    lat_e = np.clip(cell_edges(np.asarray(lat, float)), -90.0, 90.0)
    lon_e = cell_edges(np.asarray(lon, float))
    if periodic:
        # The first and last cells meet across the seam: make them share one edge.
        seam = 0.5 * (lon[0] + 360.0 + lon[-1])
        lon_e[-1] = seam
        lon_e[0] = seam - 360.0
    return lat_e, lon_e


def overlap_weights(src_edges, dst_edges, *, period=None, sine=False) -> np.ndarray:
    """Overlap of every target interval with every source interval, shape (n_dst, n_src).

    Parameters
    ----------
    src_edges, dst_edges : numpy.ndarray (n + 1,)
        Increasing interval edges in degrees.
    period : float, optional
        Compare modulo this period (360 for longitude).
    sine : bool, optional
        Measure the overlap in :math:`\\sin\\phi` (latitude: proportional to area on the sphere)
        instead of degrees.
    """
    s0, s1 = np.asarray(src_edges[:-1], float), np.asarray(src_edges[1:], float)
    d0, d1 = np.asarray(dst_edges[:-1], float)[:, None], np.asarray(dst_edges[1:], float)[:, None]
    shifts = (0.0,) if period is None else tuple(period * k for k in (-2, -1, 0, 1, 2))
    out = np.zeros((d0.shape[0], s0.size))
    for k in shifts:
        lo = np.maximum(d0, s0 + k)
        hi = np.minimum(d1, s1 + k)
        if sine:
            part = np.sin(np.deg2rad(hi)) - np.sin(np.deg2rad(lo))
        else:
            part = hi - lo
        out += np.where(hi > lo, part, 0.0)
    return out


def grid_step(obj, argname="data") -> float:
    """Typical cell size in degrees (the larger of the median latitude and longitude steps)."""
    lay = grid_layout(obj, argname=argname)
    return float(max(np.median(np.diff(lay.lat)), np.median(np.diff(lay.lon))))


def _kernel(values, wy, wx, area, min_coverage):
    vals = np.asarray(values, dtype=np.float64)
    valid = np.isfinite(vals)
    filled = np.where(valid, vals, 0.0)
    # Two matrix products (not one four-index contraction): cost O(n_src * n_dst) per field.
    num = wy @ (filled @ wx.T)
    den = wy @ (valid.astype(np.float64) @ wx.T)
    with np.errstate(invalid="ignore", divide="ignore"):
        out = num / den
    return np.where(den >= min_coverage * area, out, np.nan)


def area_weighted_average(da: xr.DataArray, like, *, min_coverage: float = 0.5,
                          argname: str = "data") -> xr.DataArray:
    r"""Average ``da`` onto the grid of ``like``, weighting by the area of overlap.

    Parameters
    ----------
    da : xarray.DataArray (..., lat, lon)
        Field on a regular latitude-longitude grid, any order and longitude convention;
        NaN where missing. Leading dimensions pass through; dask-backed input stays lazy.
    like : xarray.DataArray or xarray.Dataset
        Anything with the target latitude and longitude coordinates.
    min_coverage : float, optional
        Fraction (0..1] of a target cell's area that must have source data for it to get a
        value; below that it is NaN.
    argname : str, optional
        Name of ``da`` in error messages.

    Returns
    -------
    xarray.DataArray (..., lat, lon)
        float64 on the grid, order and coordinate values of ``like``, attributes of ``da``.

    Notes
    -----
    With :math:`A_{ij}` the area of the overlap of target cell :math:`i` with source cell
    :math:`j` and :math:`m_j` = 1 where the source has data,

    .. math:: \bar x_i = \frac{\sum_j A_{ij} m_j x_j}{\sum_j A_{ij} m_j},
       \qquad A_{ij} = R^2\,[\sin\phi]_{\mathrm{overlap}}\,[\lambda]_{\mathrm{overlap}},

    which conserves the area integral wherever the source covers the target (Jones 1999,
    Mon. Weather Rev. 127, 2204-2210).
    """
    if not (np.isfinite(min_coverage) and 0.0 < min_coverage <= 1.0):
        raise InputError(
            f"min_coverage: expected a fraction in (0, 1], found {min_coverage!r}. Fix: e.g. 0.5."
        )
    src = grid_layout(da, argname=argname)
    dst = grid_layout(like, argname="like")
    s_lat, s_lon = cell_bounds(src.lat, src.lon, periodic=src.periodic)
    d_lat, d_lon = cell_bounds(dst.lat, dst.lon, periodic=dst.periodic)
    wy = overlap_weights(s_lat, d_lat, sine=True)
    wx = overlap_weights(s_lon, d_lon, period=360.0)
    area = (np.diff(np.sin(np.deg2rad(d_lat)))[:, None] * np.diff(d_lon)[None, :])
    can = to_canonical(da, src)
    lat, lon = src.lat_name, src.lon_name
    can = can.transpose(..., lat, lon)
    out = xr.apply_ufunc(
        _kernel,
        whole_fields(can, (lat, lon)),
        input_core_dims=[[lat, lon]],
        output_core_dims=[["_lat_target", "_lon_target"]],
        dask="parallelized",
        output_dtypes=[np.float64],
        dask_gufunc_kwargs={"output_sizes": {"_lat_target": dst.lat.size,
                                             "_lon_target": dst.lon.size}},
        kwargs=dict(wy=wy, wx=wx, area=area, min_coverage=min_coverage),
    )
    ref = like
    out = out.rename({"_lat_target": dst.lat_name, "_lon_target": dst.lon_name})
    out = out.assign_coords({dst.lat_name: dst.lat, dst.lon_name: dst.lon})
    for name in (dst.lat_name, dst.lon_name):
        out[name].attrs = dict(ref[name].attrs)
    out = from_canonical(out, dst, ref)
    out.attrs = dict(da.attrs)
    return out


def coverage(like, source_like) -> np.ndarray:
    """Fraction of each cell of ``like``'s canonical grid that the grid of ``source_like`` covers."""
    src = grid_layout(source_like, argname="source")
    dst = grid_layout(like, argname="like")
    s_lat, s_lon = cell_bounds(src.lat, src.lon, periodic=src.periodic)
    d_lat, d_lon = cell_bounds(dst.lat, dst.lon, periodic=dst.periodic)
    cy = overlap_weights(s_lat, d_lat, sine=True).sum(1) / np.diff(np.sin(np.deg2rad(d_lat)))
    cx = overlap_weights(s_lon, d_lon, period=360.0).sum(1) / np.diff(d_lon)
    return np.clip(cy[:, None] * cx[None, :], 0.0, 1.0)
