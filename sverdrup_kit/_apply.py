"""The single bridge from NumPy kernels to labelled (and possibly dask-backed) data.

Kernels work on the last two axes (lat, lon) in float64 with NaN as land. Here they are mapped
over every leading dimension with :func:`xarray.apply_ufunc`; dask-backed input stays lazy and
is rechunked, lazily, so that each block holds whole horizontal fields.
"""

from __future__ import annotations

import numpy as np
import xarray as xr


def whole_fields(da: xr.DataArray, dims: tuple[str, ...]) -> xr.DataArray:
    """Rechunk (lazily) so that ``dims`` are each in one chunk; a no-op for in-memory data."""
    if da.chunks is None:
        return da
    return da.chunk({d: -1 for d in dims})


def apply_grid_kernel(kernel, *arrays, dims, n_out=1, kwargs=None):
    """Apply ``kernel`` over the horizontal ``dims`` of ``arrays``.

    Returns one DataArray (or a tuple of ``n_out``), float64, with the dimension order of the
    first array and no attributes of its own (coordinates keep theirs).
    """
    dims = list(dims)
    arrays = [whole_fields(a, tuple(dims)) for a in arrays]
    out = xr.apply_ufunc(
        kernel,
        *arrays,
        input_core_dims=[dims] * len(arrays),
        output_core_dims=[dims] * n_out,
        dask="parallelized",
        output_dtypes=[np.float64] * n_out,
        kwargs=kwargs or {},
        # keep_attrs=False would also strip the coordinates' units and standard names; keep
        # them, and drop only the data variables' attributes below.
        keep_attrs=True,
    )
    order = list(arrays[0].dims)
    outs = out if n_out > 1 else (out,)
    outs = tuple(_bare(o.transpose(*[d for d in order if d in o.dims], ...)) for o in outs)
    return outs if n_out > 1 else outs[0]


def _bare(da: xr.DataArray) -> xr.DataArray:
    """A shallow copy of ``da`` without its own attributes (coordinates keep theirs)."""
    out = da.copy(deep=False)
    out.attrs = {}
    return out
