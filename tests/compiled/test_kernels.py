"""Compiled kernels (sverdrup_kit._compiled.jit) against the NumPy kernels, the naive baseline and
analytic fields.

The naive baseline (benchmarks/naive.py) is the NumPy a practitioner writes: np.gradient for the
derivatives, one-sided differences patched in next to land, and a reversed cumulative sum along
each run of ocean cells. It shares no code with the kernels, so agreement to round-off checks
both the stencils and the scan.
"""

from __future__ import annotations

import importlib.util
import json
import os
import subprocess
import sys
import threading
from pathlib import Path

import numpy as np
import pytest

from sverdrup_kit._compiled import curl as _kernels
from sverdrup_kit._compiled import dispatch
from sverdrup_kit._compiled import jit as _fast
from sverdrup_kit._compiled import scan as _scan

ROOT = Path(__file__).resolve().parents[2]
RADIUS = 6.371e6
OMEGA = 7.292115e-5
RHO0 = 1025.0


def _load_naive():
    path = ROOT / "benchmarks" / "naive.py"
    spec = importlib.util.spec_from_file_location("naive_baseline", path)
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


naive = _load_naive()


def _random_case(seed, *, periodic, nt=2, ny=48, nx=96, land=0.2):
    """Random stress with scattered land, a few cells where only one component is missing,
    a non-uniform latitude axis and, when regional, a non-uniform longitude axis."""
    rng = np.random.default_rng(seed)
    lat = np.sort(rng.uniform(-88.0, 88.0, ny))
    if periodic:
        lon = np.arange(nx) * (360.0 / nx) - 180.0
    else:
        lon = np.cumsum(rng.uniform(0.5, 1.5, nx)) + 100.0
    tx = rng.normal(0.0, 0.1, (nt, ny, nx))
    ty = rng.normal(0.0, 0.1, (nt, ny, nx))
    is_land = rng.random((ny, nx)) < land
    tx[:, is_land] = np.nan
    ty[:, is_land] = np.nan
    ty[-1, rng.random((ny, nx)) < 0.02] = np.nan
    return lat, lon, tx, ty


def _rel_err(a, b):
    assert np.array_equal(np.isnan(a), np.isnan(b)), "missing values differ"
    scale = np.nanmax(np.abs(b))
    return np.nanmax(np.abs(a - b)) / scale


def _rho0_beta(lat, band=3.0):
    rb = RHO0 * 2 * OMEGA * np.cos(np.deg2rad(lat)) / RADIUS
    return np.where(np.abs(lat) < band, np.nan, rb)


def _dx(lat, lon):
    return RADIUS * np.cos(np.deg2rad(lat))[:, None] * np.deg2rad(np.gradient(lon))[None, :]


@pytest.mark.parametrize("periodic", [True, False])
def test_compiled_curl_matches_numpy_kernel(periodic):
    # Source: derived from _kernels.curl_kernel_numpy, the NumPy statement of the same method;
    # the compiled kernel multiplies by the same rounded weights, so 1e-14 is generous.
    lat, lon, tx, ty = _random_case(1, periodic=periodic)
    phi, lam = np.deg2rad(lat), np.deg2rad(lon)
    got, n_got = _fast.curl(
        tx, ty, phi, lam, periodic=periodic, radius=RADIUS, return_isolated=True
    )
    ref, n_ref = _kernels.curl_kernel_numpy(
        tx, ty, phi, lam, periodic=periodic, radius=RADIUS, return_isolated=True
    )
    assert got.dtype == np.float64
    assert _rel_err(got, ref) < 1e-14
    assert n_got == n_ref > 0


@pytest.mark.parametrize("periodic", [True, False])
def test_compiled_curl_matches_naive_gradient(periodic):
    # Source: NumPy's np.gradient (second-order non-uniform formula, NumPy documentation) with
    # one-sided differences next to land; agreement to round-off (1e-12 of the largest value).
    lat, lon, tx, ty = _random_case(2, periodic=periodic)
    got = _fast.curl(tx, ty, np.deg2rad(lat), np.deg2rad(lon), periodic=periodic, radius=RADIUS)
    ref = naive.curl(tx, ty, lat, lon, periodic=periodic, radius=RADIUS)
    assert _rel_err(got, ref) < 1e-12


def test_compiled_curl_analytic_field_with_coast():
    # Source: derived from the curl on the sphere (Gill 1982, appendix): tau = (0, t0 sin(lam))
    # has curl t0 cos(lam) / (R cos(phi)). Centred differences err by h^2/6 and second-order
    # one-sided ones by about h^2/3 of the value; h = 1 degree gives a few 1e-4.
    lat = np.arange(-60.0, 60.5, 1.0)
    lon = np.arange(0.0, 360.0, 1.0)
    lam = np.deg2rad(lon)
    t0 = 0.1
    ty = np.broadcast_to(t0 * np.sin(lam), (lat.size, lon.size)).copy()
    tx = np.zeros_like(ty)
    block = (np.abs(lat[:, None] - 10) < 15) & (np.abs(lon[None, :] - 200) < 20)
    tx[block] = np.nan
    ty[block] = np.nan
    got = _fast.curl(tx, ty, np.deg2rad(lat), lam, periodic=True, radius=RADIUS)
    exact = t0 * np.cos(lam)[None, :] / (RADIUS * np.cos(np.deg2rad(lat))[:, None])
    exact = np.where(block, np.nan, exact)
    scale = t0 / RADIUS
    err = np.abs(got - exact) / scale
    assert np.array_equal(np.isnan(got), np.isnan(exact))
    assert np.nanmax(err[:, ~block.any(axis=0)]) < 2e-4 / np.cos(np.deg2rad(60))
    assert np.nanmax(err) < 1e-3 / np.cos(np.deg2rad(60))


@pytest.mark.parametrize("periodic", [True, False])
def test_compiled_scan_matches_numpy_scan_and_reversed_cumsum(periodic):
    # Source: derived from _scan.westward_scan (vectorised NumPy) and from a reversed np.cumsum
    # per run (benchmarks/naive.py); the three sum in different orders: round-off only.
    lat, lon, tx, ty = _random_case(3, periodic=periodic, land=0.15)
    ocean = np.isfinite(tx[0]) & np.isfinite(ty[0])
    cells, starts = naive.ocean_runs(ocean, periodic=periodic)
    assert starts.size > 50
    v = np.where(ocean, tx, np.nan) * 1e3
    v[1, 5, :] = np.nan  # a whole row unknown in one time step
    dx = _dx(lat, lon)
    psi, totals = _fast.westward_scan(v, dx, cells, starts)
    psi_np, totals_np = _scan.westward_scan_numpy(v, dx, cells, starts)
    assert psi.dtype == totals.dtype == np.float64
    assert _rel_err(psi, psi_np) < 1e-12
    assert _rel_err(totals, totals_np) < 1e-12
    assert _rel_err(psi, naive.westward_integral(v, dx, cells, starts)) < 1e-12
    assert np.isnan(psi[1, 5]).all() and np.isfinite(psi[0, 5][ocean[5]]).all()


def test_compiled_scan_without_runs():
    v = np.ones((2, 3, 4))
    psi, totals = _fast.westward_scan(v, np.ones((3, 4)), np.zeros(0, int), np.zeros(0, int))
    assert np.isnan(psi).all() and totals.shape == (2, 0)


@pytest.mark.parametrize("periodic", [True, False])
def test_fused_pass_matches_naive_and_separate_kernels(periodic):
    # Source: the naive baseline (np.gradient + reversed cumsum), and the compiled kernels run
    # one after the other; round-off only.
    lat, lon, tx, ty = _random_case(4, periodic=periodic, land=0.1)
    ocean = np.isfinite(tx[0]) & np.isfinite(ty[0])
    cells, starts = naive.ocean_runs(ocean, periodic=periodic)
    dx, rb = _dx(lat, lon), _rho0_beta(lat)
    curl, v, psi, totals = _fast.sverdrup_fused(
        tx, ty, np.deg2rad(lat), np.deg2rad(lon), periodic=periodic, radius=RADIUS,
        rho0_beta=rb, dx=dx, cells=cells, run_starts=starts,
    )  # fmt: skip
    c_ref, v_ref, psi_ref = naive.sverdrup(
        tx, ty, lat, lon, periodic=periodic, dx=dx, cells=cells, run_starts=starts,
        rho0_beta=rb, radius=RADIUS,
    )  # fmt: skip
    for got, ref in ((curl, c_ref), (v, v_ref), (psi, psi_ref)):
        assert _rel_err(got, ref) < 1e-12
    psi2, totals2 = _fast.westward_scan(v, dx, cells, starts)
    np.testing.assert_array_equal(psi, psi2)
    np.testing.assert_array_equal(totals, totals2)
    assert np.isnan(psi[:, np.abs(lat) < 3]).all()


def test_runs_by_row_refuses_runs_across_rows():
    with pytest.raises(ValueError, match="cells/run_starts: expected runs that each lie in one"):
        _fast.runs_by_row(np.array([4, 3, 2]), np.array([0]), 2, 3)


def test_worker_threads_give_the_same_numbers():
    # A dask task runs in a worker thread, where the kernels run serially; the main thread
    # splits rows (and runs) among threads. Each row is done the same way in both.
    lat, lon, tx, ty = _random_case(5, periodic=True, nt=5)
    phi, lam = np.deg2rad(lat), np.deg2rad(lon)
    ocean = np.isfinite(tx[0]) & np.isfinite(ty[0])
    cells, starts = naive.ocean_runs(ocean, periodic=True)
    dx, rb = _dx(lat, lon), _rho0_beta(lat)

    def run():
        return (
            _fast.curl(tx, ty, phi, lam, periodic=True, radius=RADIUS),
            *_fast.sverdrup_fused(tx, ty, phi, lam, periodic=True, radius=RADIUS,
                                  rho0_beta=rb, dx=dx, cells=cells, run_starts=starts),
            *_fast.westward_scan(tx, dx, cells, starts),
            _fast.fill_from_neighbours(tx, target=np.ones_like(ocean), periodic=True),
        )  # fmt: skip

    main = run()
    box = {}
    th = threading.Thread(target=lambda: box.setdefault("out", run()))
    th.start()
    th.join()
    for got, ref in zip(box["out"], main):
        np.testing.assert_array_equal(got, ref)


def test_curl_kernel_dispatch_and_switch(monkeypatch):
    lat, lon, tx, ty = _random_case(6, periodic=False)
    args = (tx, ty, np.deg2rad(lat), np.deg2rad(lon))
    fast = dispatch.curl_kernel(*args, periodic=False, radius=RADIUS)
    monkeypatch.setenv(dispatch.JIT_ENV, "0")

    def refuse(*a, **k):
        raise AssertionError("compiled kernel used although SVERDRUP_KIT_JIT=0")

    monkeypatch.setattr(_fast, "curl", refuse)
    slow = dispatch.curl_kernel(*args, periodic=False, radius=RADIUS)
    assert _rel_err(fast, slow) < 1e-14


def test_float32_input_gives_float64_and_inputs_untouched():
    lat, lon, tx, ty = _random_case(7, periodic=True)
    tx32, ty32 = tx.astype(np.float32), ty.astype(np.float32)
    keep = tx32.copy(), ty32.copy()
    out = _fast.curl(tx32, ty32, np.deg2rad(lat), np.deg2rad(lon), periodic=True, radius=RADIUS)
    assert out.dtype == np.float64
    np.testing.assert_array_equal(tx32, keep[0])
    np.testing.assert_array_equal(ty32, keep[1])
    ref = _kernels.curl_kernel_numpy(
        tx32.astype(np.float64), ty32.astype(np.float64), np.deg2rad(lat), np.deg2rad(lon),
        periodic=True, radius=RADIUS,
    )  # fmt: skip
    assert _rel_err(out, ref) < 1e-14


def test_import_compiles_nothing():
    # Importing the package must neither compile nor import the compiled kernels.
    code = (
        "import json, sys\n"
        "import sverdrup_kit, sverdrup_kit.physics.operators, sverdrup_kit.physics.ekman, sverdrup_kit.physics.stress\n"
        "import sverdrup_kit.physics.sverdrup\n"
        "compiled = []\n"
        "if 'numba' in sys.modules:\n"
        "    from numba.core.dispatcher import Dispatcher\n"
        "    for m in list(sys.modules.values()):\n"
        "        for name, obj in list(vars(m).items()) if m else []:\n"
        "            if isinstance(obj, Dispatcher) and obj.signatures:\n"
        "                compiled.append(f'{m.__name__}.{name}')\n"
        "print(json.dumps({'fast': 'sverdrup_kit._compiled.jit' in sys.modules, 'compiled': compiled}))\n"
    )
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    res = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, env=env, check=True
    )
    report = json.loads(res.stdout.strip().splitlines()[-1])
    assert report == {"fast": False, "compiled": []}


def _world_stress():
    from sverdrup_kit.physics.stress import wind_stress
    from sverdrup_kit.synthetic import load_world

    world = load_world()
    st = wind_stress(world["u"], world["v"])
    return world, st["taux"], st["tauy"]


def _check_realistic(lat, lon, tx, ty, periodic):
    phi, lam = np.deg2rad(lat), np.deg2rad(lon)
    got = _fast.curl(tx, ty, phi, lam, periodic=periodic, radius=RADIUS)
    assert _rel_err(got, naive.curl(tx, ty, lat, lon, periodic=periodic, radius=RADIUS)) < 1e-12
    ref = _kernels.curl_kernel_numpy(tx, ty, phi, lam, periodic=periodic, radius=RADIUS)
    assert _rel_err(got, ref) < 1e-14
    ocean = np.isfinite(tx).all(axis=0) & np.isfinite(ty).all(axis=0)
    cells, starts = naive.ocean_runs(ocean, periodic=periodic)
    dx, rb = _dx(lat, lon), _rho0_beta(lat)
    curl, v, psi, totals = _fast.sverdrup_fused(
        tx, ty, phi, lam, periodic=periodic, radius=RADIUS, rho0_beta=rb, dx=dx,
        cells=cells, run_starts=starts,
    )  # fmt: skip
    c_ref, v_ref, psi_ref = naive.sverdrup(
        tx, ty, lat, lon, periodic=periodic, dx=dx, cells=cells, run_starts=starts,
        rho0_beta=rb, radius=RADIUS,
    )  # fmt: skip
    assert _rel_err(psi, psi_ref) < 1e-12
    psi_np, totals_np = _scan.westward_scan_numpy(v, dx, cells, starts)
    assert _rel_err(psi, psi_np) < 1e-12
    assert _rel_err(totals, totals_np) < 1e-12
    # Subtropical gyres: westward integrals of negative curl give sizeable transports.
    assert np.nanmax(np.abs(psi)) > 1e6


@pytest.mark.filterwarnings("ignore:u, v look like monthly")
def test_realistic_synthetic_world():
    # Source: the bundled invented world (sverdrup_kit.synthetic), against the naive baseline
    # and the NumPy kernels; round-off only.
    world, taux, tauy = _world_stress()
    tx = np.asarray(taux.transpose("time", "lat", "lon").values, dtype=np.float64)
    ty = np.asarray(tauy.transpose("time", "lat", "lon").values, dtype=np.float64)
    _check_realistic(world["lat"].values, world["lon"].values, tx, ty, periodic=True)


@pytest.mark.realdata
@pytest.mark.filterwarnings("ignore:u, v look like monthly")
@pytest.mark.filterwarnings("ignore:time coordinate")
def test_realistic_marine_climatology(marine_climatology):
    # Source: COADS monthly climatology (Woodruff et al. 1987), ship winds with ragged coasts
    # and unobserved cells; against the naive baseline and the NumPy kernels.
    from sverdrup_kit.io.readers import open_winds
    from sverdrup_kit.physics.stress import wind_stress

    w = open_winds(marine_climatology)
    st = wind_stress(w["u"], w["v"])
    tx = np.asarray(st["taux"].transpose("time", "lat", "lon").values, dtype=np.float64)
    ty = np.asarray(st["tauy"].transpose("time", "lat", "lon").values, dtype=np.float64)
    _check_realistic(w["lat"].values, w["lon"].values, tx, ty, periodic=True)


@pytest.mark.parametrize("periodic", [True, False])
def test_compiled_fill_matches_numpy_fill(periodic):
    # Source: derived from _scan.fill_from_neighbours (the NumPy statement of the gap fill);
    # the same passes and the same sums in the same order, so bit for bit.
    rng = np.random.default_rng(8)
    ny, nx = 40, 70
    target = rng.random((ny, nx)) < 0.85
    a = rng.normal(size=(3, ny, nx))
    a[rng.random(a.shape) < 0.4] = np.nan
    a[1] = np.nan  # nothing to fill from: stays missing
    a[2, :25, :] = np.nan  # a wide gap needing many passes
    keep = a.copy()
    got = _fast.fill_from_neighbours(a, target=target, periodic=periodic)
    ref = _scan.fill_from_neighbours_numpy(a, target=target, periodic=periodic)
    np.testing.assert_array_equal(a, keep)
    np.testing.assert_array_equal(got, ref)
    assert got.dtype == np.float64
    assert np.isnan(got[1]).all() and np.isfinite(got[2][target]).all()
    assert np.isnan(got[:, ~target]).all()


@pytest.mark.parametrize(
    "ny, nx, periodic, lat0, lat1",
    [
        (2, 5, True, 10.0, 12.0),  # two rows: no centred meridional difference
        (2, 2, False, -10.0, 10.0),  # too narrow for the vectorised sweep
        (3, 3, True, -90.0, 90.0),  # rows on the poles
        (5, 7, False, -60.0, 60.0),
        (9, 4, True, -89.0, 89.0),
    ],
)
def test_compiled_curl_small_and_polar_grids(ny, nx, periodic, lat0, lat1):
    # Source: derived from _kernels.curl_kernel_numpy on the grids where the compiled kernel
    # leaves its vectorised sweep: edges, poles, single rows, two-cell rows.
    rng = np.random.default_rng(ny * 100 + nx)
    lat = np.linspace(lat0, lat1, ny) if ny > 1 else np.array([lat0])
    lon = np.arange(nx) * (360.0 / nx) if periodic else np.sort(rng.uniform(0, 50, nx))
    phi, lam = np.deg2rad(lat), np.deg2rad(lon)
    for land in (0.0, 0.3, 1.0):
        tx = rng.normal(size=(2, ny, nx))
        ty = rng.normal(size=(2, ny, nx))
        tx[rng.random(tx.shape) < land] = np.nan
        got, n_got = _fast.curl(
            tx, ty, phi, lam, periodic=periodic, radius=RADIUS, return_isolated=True
        )
        ref, n_ref = _kernels.curl_kernel_numpy(
            tx, ty, phi, lam, periodic=periodic, radius=RADIUS, return_isolated=True
        )
        assert np.array_equal(np.isnan(got), np.isnan(ref))
        np.testing.assert_allclose(got, ref, rtol=1e-13, atol=0, equal_nan=True)
        assert n_got == n_ref


def test_compiled_curl_views_and_single_field():
    # Non-contiguous views (a transposed stack) and a 2-D field give the same numbers.
    lat, lon, tx, ty = _random_case(9, periodic=True)
    phi, lam = np.deg2rad(lat), np.deg2rad(lon)
    ref = _kernels.curl_kernel_numpy(tx, ty, phi, lam, periodic=True, radius=RADIUS)
    txv = np.ascontiguousarray(np.moveaxis(tx, 0, -1)).transpose(2, 0, 1)
    tyv = np.ascontiguousarray(np.moveaxis(ty, 0, -1)).transpose(2, 0, 1)
    assert not txv.flags.c_contiguous
    got = _fast.curl(txv, tyv, phi, lam, periodic=True, radius=RADIUS)
    assert _rel_err(got, ref) < 1e-14
    one = _fast.curl(tx[0], ty[0], phi, lam, periodic=True, radius=RADIUS)
    assert one.shape == tx.shape[1:]
    assert _rel_err(one, ref[0]) < 1e-14


@pytest.mark.parametrize("keep_missing", [False, True])
def test_compiled_fill_pair_matches_numpy_pair(keep_missing):
    # Source: derived from _scan.fill_pair_numpy (the NumPy statement: a cell is missing where
    # either component is, then the gap fill of each); the same passes, so bit for bit, in
    # the main thread (parallel) and in a worker thread (serial).
    rng = np.random.default_rng(21)
    ny, nx = 30, 50
    target = rng.random((ny, nx)) < 0.85
    tx = rng.normal(size=(3, ny, nx))
    ty = rng.normal(size=(3, ny, nx))
    tx[rng.random(tx.shape) < 0.3] = np.nan
    ty[rng.random(ty.shape) < 0.3] = np.nan  # gaps that differ between the components
    ty[2, :20, :] = np.nan
    keep = (rng.random((ny, nx)) < 0.5) if keep_missing else None
    before = tx.copy(), ty.copy()
    ref = _scan.fill_pair_numpy(tx, ty, target=target, periodic=True, keep_missing=keep)
    got = _fast.fill_pair(tx, ty, target=target, periodic=True, keep_missing=keep)
    box = {}
    th = threading.Thread(target=lambda: box.setdefault("out", _fast.fill_pair(
        tx, ty, target=target, periodic=True, keep_missing=keep)))
    th.start()
    th.join()
    np.testing.assert_array_equal(tx, before[0])
    np.testing.assert_array_equal(ty, before[1])
    for g, w, r in zip(got, box["out"], ref):
        np.testing.assert_array_equal(g, r)
        np.testing.assert_array_equal(w, r)
    # Both components end missing in the same cells.
    np.testing.assert_array_equal(np.isnan(got[0]), np.isnan(got[1]))
    assert np.isnan(got[0][:, ~target]).all()


@pytest.mark.parametrize("dtype", [np.float64, np.float32])
def test_compiled_screen_matches_numpy_screen(dtype):
    # Source: derived from _compiled.screen.screen_numpy (the NumPy statement of the field
    # screen): the same copy, the same fills set missing and the same counts.
    from sverdrup_kit._compiled.screen import screen_numpy

    rng = np.random.default_rng(22)
    a = rng.normal(0.0, 0.3, size=(4, 20, 30)).astype(dtype)
    a[0, 0, :5] = [-9999.0, -999.0, 1e20, -1e34, 9.969209968386869e36]
    a[1, 2, 3] = np.nan
    a[2, 4, 5] = np.inf
    a[3, 6, 7] = 150.0  # beyond a 100 limit, not a fill
    fills = np.asarray([-9999.0, -999.0]).astype(dtype)
    before = a.copy()
    for factor, limit in ((1.0, 100.0), (0.1, 10.0), (1.0, np.inf)):
        ref = screen_numpy(a, fills=fills, sentinel=1e15, factor=factor, limit=limit)
        got = _fast.screen(a, fills=fills, sentinel=1e15, factor=factor, limit=limit)
        np.testing.assert_array_equal(got[0], ref[0])
        assert got[0].dtype == np.float64
        assert got[1:] == ref[1:]
    np.testing.assert_array_equal(a, before)
    assert ref[1] == 5  # the five fills, counted the same way by both


def test_compiled_coverage_matches_numpy_coverage():
    # Source: derived from _scan.coverage_numpy: the share of each slot's cells where both
    # components are finite.
    rng = np.random.default_rng(23)
    tx = rng.normal(size=(2, 10, 12))
    ty = rng.normal(size=(2, 10, 12))
    tx[rng.random(tx.shape) < 0.3] = np.nan
    ty[rng.random(ty.shape) < 0.2] = np.nan
    cells = rng.permutation(120)[:80]
    starts = np.array([0, 10, 35, 60])
    slot = np.array([4, 0, 2, 5])
    ref = _scan.coverage_numpy(tx, ty, cells, starts, slot, 7)
    got = _fast.coverage(tx, ty, cells, starts, slot, 7)
    box = {}
    th = threading.Thread(target=lambda: box.setdefault(
        "out", _fast.coverage(tx, ty, cells, starts, slot, 7)))  # the serial twin
    th.start()
    th.join()
    np.testing.assert_array_equal(got, ref)
    np.testing.assert_array_equal(box["out"], ref)
    assert np.isnan(got[:, [1, 3, 6]]).all() and np.isfinite(got[:, slot]).all()
