"""Tests of sverdrup_kit._compiled (the NumPy kernels and their numba twins)."""
