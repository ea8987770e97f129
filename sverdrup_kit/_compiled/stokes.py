"""Curl on quadrilateral cells by Stokes' theorem, and sums along latitude bands (plain NumPy).

No xarray; float64 inside; NaN is land. Vectors are handled as three-dimensional Cartesian
vectors, so that neither the rotation of the grid lines nor a fold of the grid needs special
cases: a cell's circulation is the sum over its four edges of the edge's vector dotted with
the chord from corner to corner.
"""

from __future__ import annotations

import numpy as np

_OPPOSITE = {"E": "W", "W": "E", "N": "S", "S": "N"}


def stokes_geometry(east, north, corners, neighbour):
    """What :func:`stokes_curl` needs of the grid, worked out once per grid.

    Returns, per side ``"S"``, ``"E"``, ``"N"``, ``"W"`` (anticlockwise for a grid whose rows
    run northward), the edge chord (ny, nx, 3) from corner to corner and the weight of the
    cell's own vector when interpolating to the edge (ny, nx): linear between the two centres,
    by their distances to the edge's midpoint (0.5 on a uniform grid).
    """
    c = corners
    sw, se, ne, nw = c[:-1, :-1], c[:-1, 1:], c[1:, 1:], c[1:, :-1]
    ends = {"S": (sw, se), "E": (se, ne), "N": (ne, nw), "W": (nw, sw)}
    centre = np.cross(east, north)
    out = {}
    for side, (a, b) in ends.items():
        mid = a + b
        mid = mid / np.linalg.norm(mid, axis=-1, keepdims=True)
        near = np.linalg.norm(mid - centre, axis=-1)
        far = np.stack([neighbour(centre[..., k], side) for k in range(3)], axis=-1)
        far = np.linalg.norm(mid - far, axis=-1)
        w_here = np.where(np.isfinite(far), far / (near + far), 0.5)
        out[side] = (b - a, w_here)
    return out


def stokes_curl(ux, uy, *, east, north, geometry, area, radius, orientation, neighbour):
    r"""Vertical curl of a horizontal vector field on quadrilateral cells, by Stokes' theorem.

    .. math:: (\nabla\times\mathbf u)\cdot\hat k \approx \frac{1}{A}\oint \mathbf u\cdot d\mathbf l
       = \frac{R}{A}\sum_{\text{edges}} \mathbf u_e\cdot(\mathbf c_b - \mathbf c_a)

    Parameters
    ----------
    ux, uy : ndarray (..., ny, nx)
        Eastward and northward components at cell centres; NaN on land.
    east, north : ndarray (ny, nx, 3)
        Local unit vectors at the centres.
    geometry : dict
        From :func:`stokes_geometry`.
    area : ndarray (ny, nx)
        Cell areas in m2.
    radius : float
        Sphere radius in m.
    orientation : float
        +1 when corners (j, i) -> (j, i+1) -> (j+1, i+1) -> (j+1, i) run anticlockwise seen
        from above, -1 otherwise.
    neighbour : callable
        ``neighbour(a, side)`` returns the values of ``a`` (..., ny, nx) at each cell's
        neighbour on side ``"E"``, ``"W"``, ``"N"`` or ``"S"`` (NaN beyond the grid).

    Returns
    -------
    ndarray (..., ny, nx)
        The curl, in units of ``u`` per metre; NaN on land.

    Notes
    -----
    The vector on an edge between two ocean cells is interpolated linearly between theirs, by
    their distances to the edge's midpoint (the mean on a uniform grid). On an edge facing
    land (or the end of the grid) it is extrapolated from the ocean side: with two ocean cells
    behind it, ``2 u_0 - 1.5 u_1 + 0.5 u_2``, which makes the cell's difference across that
    direction the second-order one-sided difference ``(3 u_0 - 4 u_1 + u_2) / 2`` on a
    uniform grid; with one, ``1.5 u_0 - 0.5 u_1`` (first order); with none, the cell's own
    vector (no difference across a one-cell channel). On a regular latitude-longitude grid
    the interior formula is the centred difference of the flux form, including the metric term
    of the sphere, and the coastal formulas are those of the regular-grid curl.
    """
    ux = np.asarray(ux, dtype=np.float64)
    uy = np.asarray(uy, dtype=np.float64)
    ocean = np.isfinite(ux) & np.isfinite(uy)
    ok = ocean.astype(np.float64)
    nb_ok = {s: neighbour(ok, s) == 1.0 for s in "EWNS"}
    # Two cells away on the opposite side, through ocean only.
    nb2_ok = {s: nb_ok[s] & (neighbour(neighbour(ok, s), s) == 1.0) for s in "EWNS"}
    circ = np.zeros(ux.shape)
    for k in range(3):
        here = np.where(ocean, ux * east[..., k] + uy * north[..., k], np.nan)
        shifted = {s: neighbour(here, s) for s in "EWNS"}
        for side, (chord, w_here) in geometry.items():
            opp = _OPPOSITE[side]
            back2 = neighbour(shifted[opp], opp)
            edge = np.where(
                nb_ok[side], w_here * here + (1.0 - w_here) * shifted[side],
                np.where(nb2_ok[opp], 2.0 * here - 1.5 * shifted[opp] + 0.5 * back2,
                         np.where(nb_ok[opp], 1.5 * here - 0.5 * shifted[opp], here)),
            )
            circ += edge * chord[..., k]
    out = orientation * radius * circ / area
    return np.where(ocean, out, np.nan)


def band_sums(values, cell, slot, weight, n_slots):
    """Sum ``values[cell] * weight`` (..., ncell) into ``n_slots`` slots by ``slot``.

    ``cell``, ``slot``, ``weight`` are triplets: a cell may add to several slots (a cell that
    straddles two latitude bands adds to both, by the share of its extent in each). A slot is
    NaN where it receives a missing value or nothing at all.
    """
    values = np.asarray(values, dtype=np.float64)
    lead = values.shape[:-1]
    flat = values.reshape(-1, values.shape[-1])
    out = np.empty((flat.shape[0], n_slots))
    hit = np.bincount(slot, minlength=n_slots) > 0
    for r in range(flat.shape[0]):
        v = flat[r, cell] * weight
        bad = ~np.isfinite(v)
        total = np.bincount(slot, weights=np.where(bad, 0.0, v), minlength=n_slots)
        nbad = np.bincount(slot, weights=bad.astype(np.float64), minlength=n_slots)
        out[r] = np.where((nbad > 0) | ~hit, np.nan, total)
    return out.reshape(lead + (n_slots,))


def westward_band_scan(values, cell, weight, share, starts, n_cells):
    """Running sum of ``values[cell] * weight`` westward from each band's eastern coast.

    The triplets (``cell``, ``weight``, ``share``) are sorted band by band, each band from its
    eastern coast westward; ``starts`` (n_bands + 1,) says where each band begins. A cell that
    straddles bands appears once per band with ``share``, the part of its latitude extent in
    that band. The band streamfunction at a triplet is minus the sum east of it minus half its
    own term; a cell's value is the ``share``-weighted mean over its bands. NaN for cells in no
    band and west of a missing value.
    """
    values = np.asarray(values, dtype=np.float64)
    term = values[..., cell] * weight
    bad = ~np.isfinite(term)
    term = np.where(bad, 0.0, term)
    inclusive = np.cumsum(term, axis=-1)
    nbad = np.cumsum(bad, axis=-1)
    band_of = np.repeat(np.arange(starts.size - 1), np.diff(starts))
    first = starts[:-1][band_of]
    prev = np.maximum(first - 1, 0)
    has_prior = first > 0
    prior = np.where(has_prior, inclusive[..., prev], 0.0)
    prior_bad = np.where(has_prior, nbad[..., prev], 0)
    psi = -(inclusive - prior - 0.5 * term)
    psi = np.where(nbad - prior_bad > 0, np.nan, psi)
    lead = values.shape[:-1]
    flat = psi.reshape(-1, psi.shape[-1])
    out = np.empty((flat.shape[0], n_cells))
    total = np.bincount(cell, weights=share, minlength=n_cells)
    for r in range(flat.shape[0]):
        ok = np.isfinite(flat[r])
        num = np.bincount(cell, weights=np.where(ok, flat[r] * share, 0.0), minlength=n_cells)
        nb = np.bincount(cell, weights=(~ok).astype(np.float64), minlength=n_cells)
        with np.errstate(invalid="ignore", divide="ignore"):
            out[r] = np.where((total > 0) & (nb == 0), num / total, np.nan)
    return out.reshape(lead + (n_cells,))
