"""Compiled geometry kernels (sverdrup_kit._compiled.jit_geometry) against their NumPy twins
and against scipy.ndimage.label, a general-purpose reference for connected components."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import ndimage

from sverdrup_kit._compiled import geometry as G
from sverdrup_kit._compiled import jit_geometry as J


def _world(seed, shape=(40, 90)):
    rng = np.random.default_rng(seed)
    land = ndimage.binary_dilation(rng.random(shape) < 0.06, iterations=2)
    lab, n = ndimage.label(land)
    area = np.bincount(lab.ravel())
    cls = np.where(land, np.where(area[lab] > 40, 3, np.where(area[lab] > 12, 2, 1)), 0)
    return ~land, cls.astype(np.int8), np.where(land, lab - 1, -1).astype(np.int64), rng


@pytest.mark.parametrize("seed", [0, 1, 2])
@pytest.mark.parametrize("periodic", [True, False])
def test_compiled_labels_match_the_numpy_twin_and_ndimage(seed, periodic):
    ocean, _, _, rng = _world(seed)
    none = np.zeros(ocean.shape, bool)
    for diagonal in (False, True):
        a = G.label_links_numpy(ocean, none, none, periodic, diagonal)
        b = J.label_links(ocean, none, none, periodic, diagonal)
        np.testing.assert_array_equal(a[0], b[0])
        assert a[1] == b[1]
        if not periodic:
            ref, n = ndimage.label(ocean, structure=np.ones((3, 3)) if diagonal else None)
            assert n == b[1]
            # The same partition: one-to-one between labels.
            pairs = np.unique(np.column_stack([ref[ocean], b[0][ocean]]), axis=0)
            assert len(pairs) == n
    cut_e, cut_n = rng.random(ocean.shape) < 0.2, rng.random(ocean.shape) < 0.2
    a = G.label_links_numpy(ocean, cut_e, cut_n, periodic, False)
    b = J.label_links(ocean, cut_e, cut_n, periodic, False)
    np.testing.assert_array_equal(a[0], b[0])


@pytest.mark.parametrize("seed", [0, 1, 2])
@pytest.mark.parametrize("periodic", [True, False])
def test_compiled_row_groups_match_the_numpy_twin(seed, periodic):
    ocean, cls, lab, rng = _world(seed)
    link = rng.random(ocean.shape) < 0.02
    dx = rng.random(ocean.shape) + 0.5
    a = G.row_groups_numpy(ocean, cls, lab, dx, periodic, link)
    b = J.row_groups(ocean, cls, lab, dx, periodic, link)
    assert len(a) == len(b) == 12
    for x, y in zip(a, b):
        if x.dtype.kind == "f":
            np.testing.assert_allclose(x, y, rtol=1e-12)
        else:
            np.testing.assert_array_equal(x, y)
    # Runs cover exactly the member cells (a check from the definition of a run).
    shift, rr, k0, k1 = b[0], b[1], b[2], b[3]
    covered = np.zeros(ocean.shape, bool)
    for j, s, e in zip(rr, k0, k1):
        covered[j, (np.arange(s, e) + shift[j]) % ocean.shape[1]] = True
    np.testing.assert_array_equal(covered, ocean)
