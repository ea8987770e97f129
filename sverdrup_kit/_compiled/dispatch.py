"""The one switch between the NumPy kernels and their compiled twins.

Every kernel the wrappers call goes through here. The compiled twins (:mod:`.jit`) are imported
only on the first call, so importing :mod:`sverdrup_kit` does not import numba; setting
``SVERDRUP_KIT_JIT=0`` sends every call through the NumPy statement of the method.
Imports run one way: dispatch -> (curl, scan, screen, geometry, jit, jit_geometry) -> stencil.
"""

from __future__ import annotations

import os

import numpy as np

from .curl import curl_kernel_numpy
from .geometry import label_links_numpy, row_groups_numpy
from .scan import coverage_numpy, fill_from_neighbours_numpy, fill_pair_numpy, westward_scan_numpy
from .screen import screen_numpy

#: Setting this environment variable to 0 sends every kernel through the NumPy reference path.
JIT_ENV = "SVERDRUP_KIT_JIT"


def jit_enabled() -> bool:
    """Whether the compiled kernels are used (``SVERDRUP_KIT_JIT`` unset or not ``0``)."""
    return os.environ.get(JIT_ENV, "1").strip().lower() not in {"0", "false", "no", "off"}


def curl_kernel(taux, tauy, phi, lam, *, periodic: bool, radius: float, return_isolated=False):
    r"""Vertical component of the curl of a horizontal vector field on the sphere.

    .. math:: \hat k\cdot\nabla\times\boldsymbol\tau = \frac{1}{R\cos\phi}
       \left(\frac{\partial\tau_y}{\partial\lambda} - \frac{\partial(\tau_x\cos\phi)}{\partial\phi}\right)

    Parameters
    ----------
    taux, tauy : ndarray (..., ny, nx)
        Eastward and northward components, NaN on land (a cell is ocean where both are finite).
    phi, lam : ndarray (ny,), (nx,)
        Latitude and longitude in radians, strictly increasing.
    periodic : bool
        Whether longitude wraps around.
    radius : float
        Sphere radius in m.
    return_isolated : bool, optional
        Also return how many derivatives (cells times directions) were taken as zero because
        the cell had no ocean neighbour in that direction.

    Notes
    -----
    Runs the compiled twin in :mod:`sverdrup_kit._compiled.jit` (same numbers, one pass over memory)
    unless the environment variable ``SVERDRUP_KIT_JIT`` is ``0``; then
    :func:`curl_kernel_numpy`, which states the method in plain NumPy.
    """
    from . import jit

    kernel = jit.curl if jit_enabled() else curl_kernel_numpy
    return kernel(
        taux, tauy, phi, lam, periodic=periodic, radius=radius, return_isolated=return_isolated
    )


def fill_from_neighbours(a, *, target, periodic):
    """Fill missing values of ``a`` inside ``target``: see :func:`fill_from_neighbours_numpy`.

    Runs the compiled twin in :mod:`sverdrup_kit._compiled.jit` (the same numbers) unless the
    environment variable ``SVERDRUP_KIT_JIT`` is ``0``.
    """
    from . import jit

    kernel = jit.fill_from_neighbours if jit_enabled() else fill_from_neighbours_numpy
    return kernel(a, target=target, periodic=periodic)


def fill_pair(tx, ty, *, target, periodic, keep_missing=None):
    """Fill the gaps of a stress pair: see :func:`.scan.fill_pair_numpy`.

    Runs the compiled twin in :mod:`sverdrup_kit._compiled.jit` (the same numbers) unless the
    environment variable ``SVERDRUP_KIT_JIT`` is ``0``.
    """
    from . import jit

    kernel = jit.fill_pair if jit_enabled() else fill_pair_numpy
    return kernel(tx, ty, target=target, periodic=periodic, keep_missing=keep_missing)


def coverage(tx, ty, cells, starts, slot, n_slots):
    """Share of each slot's cells where both components are finite: see
    :func:`.scan.coverage_numpy`.

    Runs the compiled twin in :mod:`sverdrup_kit._compiled.jit` (the same numbers) unless the
    environment variable ``SVERDRUP_KIT_JIT`` is ``0``.
    """
    from . import jit

    kernel = jit.coverage if jit_enabled() else coverage_numpy
    return kernel(tx, ty, cells, starts, slot, n_slots)


def screen(a, *, fills, sentinel, factor, limit):
    """Fill cells and implausible magnitudes of a field: see :func:`.screen.screen_numpy`.

    Floating arrays run the compiled twin in :mod:`sverdrup_kit._compiled.jit` (one pass; the
    same numbers and counts) unless the environment variable ``SVERDRUP_KIT_JIT`` is ``0``.
    """
    if jit_enabled() and np.asarray(a).dtype in (np.float32, np.float64):
        from .jit import screen as kernel
    else:
        kernel = screen_numpy
    return kernel(a, fills=fills, sentinel=sentinel, factor=factor, limit=limit)


def westward_scan(v, dx, cells, run_starts):
    """Westward integral along runs: see :func:`westward_scan_numpy`.

    Runs the compiled twin in :mod:`sverdrup_kit._compiled.jit` (the same numbers to round-off: it
    sums each run from zero) unless the environment variable ``SVERDRUP_KIT_JIT`` is ``0``.
    """
    from . import jit

    kernel = jit.westward_scan if jit_enabled() else westward_scan_numpy
    return kernel(v, dx, cells, run_starts)


def label_links(mask, cut_east, cut_north, *, periodic, diagonal=False):
    """Connected components without cut links: see :func:`.geometry.label_links_numpy`.

    Runs the compiled twin in :mod:`sverdrup_kit._compiled.jit_geometry` (the same labels)
    unless the environment variable ``SVERDRUP_KIT_JIT`` is ``0``.
    """
    if jit_enabled():
        from .jit_geometry import label_links as kernel
    else:
        kernel = label_links_numpy
    return kernel(mask, cut_east, cut_north, periodic, diagonal)


def row_groups(member, cls, land_labels, dx, *, periodic, coast_link):
    """Runs of a row set joined across large islands: see :func:`.geometry.row_groups_numpy`.

    Runs the compiled twin in :mod:`sverdrup_kit._compiled.jit_geometry` (the same arrays)
    unless the environment variable ``SVERDRUP_KIT_JIT`` is ``0``.
    """
    if jit_enabled():
        from .jit_geometry import row_groups as kernel
    else:
        kernel = row_groups_numpy
    return kernel(member, cls, land_labels, dx, periodic, coast_link)
