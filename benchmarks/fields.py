"""Invented test fields for the benchmarks: global stress with land at any resolution.

The continents are those of the bundled synthetic world (2 degree mask, repeated onto the finer
grid) plus scattered small islands, so that a quarter-degree field has a few per cent of coastal
cells as real quarter-degree coastlines do; the winds are the world's analytic monthly winds
with noise. Deterministic for a given seed.
"""

from __future__ import annotations

import numpy as np

from sverdrup_kit.synthetic import analytic_winds, load_world

RADIUS = 6.371e6
OMEGA = 7.292115e-5
RHO0 = 1025.0


def grid(step: float):
    """Cell-centre latitudes and longitudes (degrees) of a global grid of ``step`` degrees."""
    return np.arange(-90 + step / 2, 90, step), np.arange(step / 2, 360, step)


def ocean_mask(step: float, *, islands: int = 3000, seed: int = 0) -> np.ndarray:
    """Boolean (ny, nx) ocean mask at ``step`` degrees (a divisor of 2)."""
    world = load_world()["ocean_mask"].values.astype(bool)
    k = int(round(2.0 / step))
    ocean = np.repeat(np.repeat(world, k, axis=0), k, axis=1)
    rng = np.random.default_rng(seed)
    ny, nx = ocean.shape
    for _ in range(islands):
        j, i = rng.integers(0, ny), rng.integers(0, nx)
        h, w = rng.integers(1, 4, size=2)
        ocean[j : j + h, i : i + w] = False
    return ocean


def stress(step: float, n_time: int, *, seed: int = 0):
    """(taux, tauy, lat, lon, ocean): float64 (n_time, ny, nx) stress in Pa, NaN on land."""
    lat, lon = grid(step)
    ocean = ocean_mask(step, seed=seed)
    rng = np.random.default_rng(seed + 1)
    shape = (n_time, lat.size, lon.size)
    taux = np.empty(shape)
    tauy = np.empty(shape)
    for t in range(n_time):
        u0, v0 = analytic_winds(lat, t % 12)
        u = u0[:, None] + rng.normal(0.0, 2.0, shape[1:])
        v = v0[:, None] + rng.normal(0.0, 2.0, shape[1:])
        speed = np.hypot(u, v)
        # Constant drag 1.3e-3 and air density 1.22 kg m-3 (common practice).
        taux[t] = 1.22 * 1.3e-3 * speed * u
        tauy[t] = 1.22 * 1.3e-3 * speed * v
    taux[:, ~ocean] = np.nan
    tauy[:, ~ocean] = np.nan
    return taux, tauy, lat, lon, ocean


def rho0_beta(lat, band: float = 3.0):
    """rho0 * beta per row (kg m-4 s-1), NaN within ``band`` degrees of the equator."""
    rb = RHO0 * 2 * OMEGA * np.cos(np.deg2rad(lat)) / RADIUS
    return np.where(np.abs(lat) < band, np.nan, rb)


def cell_width(lat, lon):
    """Zonal cell widths (ny, nx) in m."""
    return RADIUS * np.cos(np.deg2rad(lat))[:, None] * np.deg2rad(np.gradient(lon))[None, :]
