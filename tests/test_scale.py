"""Scale: every public function stays lazy on dask input and gives the same numbers in memory,
chunked in time, chunked in longitude and on a dask.distributed cluster; progress reports.

Timings and memory are measured by the scripts in benchmarks/, not here: these tests check
correctness only. Fields come from the bundled invented world (sverdrup_kit.synthetic).
"""

from __future__ import annotations

import io
import warnings

import dask
import dask.array as da
import numpy as np
import pytest
import xarray as xr

from sverdrup_kit import progress as _progress

# Kernels work field by field and row by row, so chunked, in-memory and distributed runs agree
# to round-off; only time means (diagnose) are summed in another order (derived from the
# kernels' design).
RTOL = 1e-12


class CountingScheduler:
    """A dask scheduler that counts computations and refuses more than ``max_computes``
    (common practice in xarray's and cf_xarray's test suites)."""

    def __init__(self, max_computes=0):
        self.total = 0
        self.max_computes = max_computes

    def __call__(self, dsk, keys, **kwargs):
        self.total += 1
        if self.total > self.max_computes:
            raise RuntimeError(f"computed {self.total} times, allowed {self.max_computes}")
        return dask.get(dsk, keys, **kwargs)


@pytest.fixture(scope="module")
def world():
    from sverdrup_kit.physics.stress import wind_stress
    from sverdrup_kit.synthetic import load_world

    w = load_world().load()
    with warnings.catch_warnings():
        # Monthly-mean winds are what the world holds; the bias warning is beside the point.
        warnings.simplefilter("ignore")
        st = wind_stress(w["u"], w["v"])
    return {
        "u": w["u"],
        "v": w["v"],
        "taux": st["taux"].load(),
        "tauy": st["tauy"].load(),
        "mask": w["ocean_mask"],
    }


def _wind_stress(d):
    from sverdrup_kit.physics.stress import wind_stress

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return wind_stress(d["u"], d["v"])


def _drag_coefficient(d):
    from sverdrup_kit.physics.stress import drag_coefficient

    return drag_coefficient(np.hypot(d["u"], d["v"]).assign_attrs(units="m s-1"))


def _wind_stress_curl(d):
    from sverdrup_kit.physics.operators import wind_stress_curl

    return wind_stress_curl(d["taux"], d["tauy"])


def _curl_on_sphere(d):
    from sverdrup_kit.physics.operators import curl_on_sphere

    return curl_on_sphere(d["taux"], d["tauy"])


def _ekman(d):
    from sverdrup_kit.physics.ekman import ekman

    return ekman(d["taux"], d["tauy"])


def _sverdrup(d):
    from sverdrup_kit.physics.sverdrup import sverdrup_transport

    return sverdrup_transport(d["taux"], d["tauy"], ocean_mask=d["mask"])


def _diagnose(d):
    from sverdrup_kit.pipeline import diagnose

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return diagnose(xr.Dataset({"u": d["u"], "v": d["v"]}), ocean_mask=d["mask"])


FUNCTIONS = {
    "wind_stress": _wind_stress,
    "drag_coefficient": _drag_coefficient,
    "wind_stress_curl": _wind_stress_curl,
    "curl_on_sphere": _curl_on_sphere,
    "ekman": _ekman,
    "sverdrup": _sverdrup,
    "diagnose": _diagnose,
}


def _chunk(d, chunks):
    out = dict(d)
    for k in ("u", "v", "taux", "tauy"):
        out[k] = d[k].chunk(chunks)
    return out


def _arrays(obj):
    if isinstance(obj, xr.Dataset):
        return dict(obj.data_vars)
    return {obj.name or "result": obj}


def _assert_same(got, ref):
    got_v, ref_v = _arrays(got), _arrays(ref)
    assert set(got_v) == set(ref_v)
    for name, g in got_v.items():
        r = ref_v[name]
        assert g.dims == r.dims, name
        if np.issubdtype(r.dtype, np.floating):
            assert g.dtype == r.dtype, name
            # A time mean summed chunk by chunk is reassociated: differences scale with the
            # field's largest value, not with each (possibly cancelling) element.
            finite = np.isfinite(r.values)
            scale = np.abs(r.values[finite]).max() if finite.any() else 0.0
            np.testing.assert_allclose(
                g.values, r.values, rtol=RTOL, atol=RTOL * scale, equal_nan=True, err_msg=name
            )
        else:
            np.testing.assert_array_equal(g.values, r.values, err_msg=name)


@pytest.fixture(scope="module")
def in_memory(world):
    return {name: f(world).load() for name, f in FUNCTIONS.items()}


@pytest.mark.parametrize("name", list(FUNCTIONS))
def test_nothing_computes_early(world, name):
    chunked = _chunk(world, {"time": 3})
    counter = CountingScheduler(0)
    with dask.config.set(scheduler=counter):
        out = FUNCTIONS[name](chunked)
    assert counter.total == 0
    for var, arr in _arrays(out).items():
        if "time" in arr.dims:
            assert isinstance(arr.data, da.Array), f"{name}: {var} is not lazy"
            # Time chunks pass through: each block of the record is processed on its own,
            # which is what keeps memory bounded on long records.
            assert arr.chunksizes["time"] == (3, 3, 3, 3), f"{name}: {var} rechunked in time"


@pytest.mark.parametrize("name", list(FUNCTIONS))
@pytest.mark.parametrize("chunks", [{"time": 5}, {"lon": 45}, {"time": 4, "lat": 30, "lon": 60}])
def test_chunked_equals_in_memory(world, in_memory, name, chunks):
    out = FUNCTIONS[name](_chunk(world, chunks))
    _assert_same(out.compute(), in_memory[name])


@pytest.fixture(scope="module")
def cluster():
    distributed = pytest.importorskip("distributed")
    with distributed.LocalCluster(
        n_workers=2, threads_per_worker=1, processes=False, dashboard_address=None
    ) as c:
        yield c


@pytest.mark.parametrize("name", list(FUNCTIONS))
def test_distributed_equals_in_memory(world, in_memory, cluster, name):
    from distributed import Client

    with Client(cluster):
        out = FUNCTIONS[name](_chunk(world, {"time": 4}))
        got = out.compute()
    _assert_same(got, in_memory[name])


def test_time_mean_of_lazy_curl_streams(world):
    # A reduction over time of a lazy result is computed block by block: the graph keeps one
    # task per time chunk for the curl and reduces them pairwise (no task holds the record).
    from sverdrup_kit.physics.operators import wind_stress_curl

    d = _chunk(world, {"time": 1})
    curl = wind_stress_curl(d["taux"], d["tauy"])
    mean = curl.mean("time")
    assert curl.data.numblocks == (12, 1, 1)
    ref = wind_stress_curl(world["taux"], world["tauy"]).mean("time")
    np.testing.assert_allclose(mean.values, ref.values, rtol=RTOL, equal_nan=True)


# Progress reports --------------------------------------------------------------------------


@pytest.fixture
def no_env(monkeypatch):
    monkeypatch.delenv(_progress.PROGRESS_ENV, raising=False)


def _lazy_sum():
    return da.ones((200, 200), chunks=50).sum()


def test_progress_off_by_default(no_env):
    buf = io.StringIO()
    (total,) = _progress.compute(_lazy_sum(), stream=buf)
    assert total == 40000
    assert buf.getvalue() == ""
    assert not _progress.progress_enabled()


def test_progress_by_keyword(no_env):
    buf = io.StringIO()
    (total,) = _progress.compute(_lazy_sum(), progress=True, stream=buf, scheduler="threads")
    assert total == 40000
    assert "100%" in buf.getvalue()


def test_progress_by_environment(monkeypatch):
    monkeypatch.setenv(_progress.PROGRESS_ENV, "yes")
    buf = io.StringIO()
    with _progress.progress(stream=buf, minimum=0.0):
        assert _lazy_sum().compute(scheduler="threads") == 40000
    assert "100%" in buf.getvalue()
    buf = io.StringIO()
    _progress.compute(_lazy_sum(), progress=False, stream=buf)
    assert buf.getvalue() == ""


def test_progress_bad_environment_value(monkeypatch):
    monkeypatch.setenv(_progress.PROGRESS_ENV, "maybe")
    with pytest.raises(ValueError, match="SVERDRUP_KIT_PROGRESS: expected 1/0.*found 'maybe'"):
        _progress.progress_enabled()


def test_progress_on_distributed(no_env, cluster):
    from distributed import Client

    buf = io.StringIO()
    with Client(cluster):
        arr, total = _progress.compute(da.arange(10, chunks=5), _lazy_sum(), progress=True,
                                       stream=buf)  # fmt: skip
    np.testing.assert_array_equal(arr, np.arange(10))
    assert total == 40000
    assert "100%" in buf.getvalue()
