"""Numerical kernels: plain NumPy statements of each method and their numba twins.

No xarray, no I/O; float64 inside, NaN is land; the last two axes are (lat, lon). Callers use
:mod:`.dispatch`, the one place that chooses between the NumPy and the compiled kernel.
"""
