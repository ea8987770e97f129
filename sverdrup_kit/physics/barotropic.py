r"""Steady linear barotropic vorticity equation on any coastline: the gyres with their boundaries.

Solves, for the streamfunction :math:`\psi` of the depth-integrated flow
(:math:`V = \partial_x\psi`, :math:`U = -\partial_y\psi`, m2 s-1),

.. math:: r\nabla^2\psi - A_H\nabla^4\psi + \beta\,\partial_x\psi
   = \operatorname{curl}\boldsymbol\tau/\rho_0,

the curl of the depth-integrated momentum balance
:math:`f\hat k\times\mathbf U = -\nabla P + \boldsymbol\tau/\rho_0 - r\mathbf U + A_H\nabla^2\mathbf U`
over a flat bottom, with bottom friction ``r`` (s-1), lateral friction ``A_H`` (m2 s-1) or both.

Two entry points share one discretisation: :func:`solve_barotropic` on a latitude-longitude
grid (geometry from :class:`~sverdrup_kit.geometry.grid.SphericalGrid`) and :func:`solve_basin` on a
Cartesian basin in metres. :func:`boundary_current` measures the western boundary current of a
solution row by row and compares its interior with the Sverdrup transport.

Discretisation
--------------
``psi`` lives at the points of the input grid. Ocean points are unknowns; every land point
takes the value of its land mass, so the coast lies at the first land point. The Laplacian is a
finite-volume five-point operator with the grid's cell widths and areas (conservative, so sums
over a region become line integrals around it); ``beta dpsi/dx`` is a centred difference. The
biharmonic is the Laplacian of the vorticity, with the wall vorticity from a ghost point beyond
the wall: ``zeta_wall = 2 (psi_1 - psi_wall) / h**2`` for no-slip (Thom's formula, from the
mirror ghost ``psi_ghost = psi_1``), summed over the axes along which the land point has an
ocean neighbour, and ``zeta_wall = 0`` for free-slip. A one-point land barrier with ocean on
both sides takes the plain second difference (the mean of its two sides' no-slip values).

Coasts and islands
------------------
Land masses are the 8-connected land regions of the mask. On a regional grid the edges of the
grid count as land joined to the main coast (``psi = 0``). On a periodic (global) grid the main
coast is the largest land mass by area, and the rows beyond the southern and northern edges are
land masses of their own (beyond a pole no flux reaches them). Each other land mass (an island,
or a polar continent ringed by a circumpolar channel) has ``psi`` constant at a value that is
one more unknown, fixed by Kelvin's circulation theorem round its coast: the pressure gradient
and the Coriolis force (there is no flow through the coast) integrate to zero, leaving

.. math:: r\oint\mathbf U\cdot d\mathbf l - A_H\oint\partial_n\zeta\,dl
   = \frac{1}{\rho_0}\oint\boldsymbol\tau\cdot d\mathbf l
   = \frac{1}{\rho_0}\iint_{\rm island}\operatorname{curl}\boldsymbol\tau\,dA .

Discretely the left side is the area-weighted sum of the friction terms of the vorticity
equation over the island's points; the finite-volume form turns it into fluxes across the faces
between island and ocean points. The wind term is, in order of preference: the stress
integrated along those faces (``wind_stress`` given); the curl over the island (finite there,
with ``ocean_mask`` marking the ocean); the area-mean curl of the ocean points round the island
times its area (good for small islands only). Attributes record which was used.
``islands="coast"`` instead joins every island to the main coast (``psi = 0``), closing the
passages beside it.

References
----------
Stommel, H. (1948). The westward intensification of wind-driven ocean currents. Transactions,
American Geophysical Union, 29, 202-206.
Munk, W. H. (1950). On the wind-driven ocean circulation. Journal of Meteorology, 7, 79-93.
Thom, A. (1933). The flow past circular cylinders at low speeds. Proceedings of the Royal
Society of London A, 141, 651-669 (the wall-vorticity formula).
Godfrey, J. S. (1989). A Sverdrup model of the depth-integrated flow for the world ocean allowing
for island circulations. Geophysical and Astrophysical Fluid Dynamics, 45, 89-112.
"""

from __future__ import annotations

import time
import warnings
from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla
import xarray as xr

from .. import _validate, constants
from .._apply import whole_fields
from ..errors import InputError
from ..geometry.coords import check_same_grid, from_canonical, require_dataarray, to_canonical
from ..geometry.grid import SphericalGrid
from ..geometry.land import label_land
from ..io.units import to_si
from .boundary_layers import munk_width, stommel_width

__all__ = ["solve_barotropic", "solve_basin", "boundary_current", "ROTATIONS", "BOUNDARIES"]

ROTATIONS = ("sphere", "beta-plane", "f-plane", "none")
BOUNDARIES = ("no-slip", "free-slip")
ISLAND_POLICIES = ("circulation", "coast")
_PAD = 2  # land frame around the grid: a wall point and the ghost beyond it


@dataclass(frozen=True)
class _Metrics:
    """Grid quantities the discretisation needs, shape (ny, nx) unless stated.

    ``hx``/``hy``: distance from a point to its eastern/northern neighbour (m); ``wx``/``wy``:
    length of the shared cell face divided by that distance; ``area``: cell area (m2);
    ``beta`` (ny,): df/dy (m-1 s-1).
    """

    hx: np.ndarray
    hy: np.ndarray
    wx: np.ndarray
    wy: np.ndarray
    area: np.ndarray
    beta: np.ndarray
    periodic: bool
    poles: tuple[bool, bool] = (False, False)

    def padded(self) -> "_Metrics":
        """The metrics on the grid with a land frame (values repeated from the nearest edge).

        A face on a pole has no length: no flux crosses it.
        """
        pad = ((_PAD, _PAD), (0, 0) if self.periodic else (_PAD, _PAD))
        hx, hy, wx, wy, area = (np.pad(a, pad, mode="edge") for a in (
            self.hx, self.hy, self.wx, self.wy, self.area))
        if self.poles[0]:
            wy[:_PAD] = 0.0
        if self.poles[1]:
            wy[-_PAD - 1:] = 0.0
        return _Metrics(hx, hy, wx, wy, area, np.pad(self.beta, _PAD, mode="edge"),
                        self.periodic, self.poles)


def _metrics_sphere(grid: SphericalGrid, beta: np.ndarray) -> _Metrics:
    """Metrics from the grid object; centre distances are means of adjacent cell widths.

    The means are exact on regular grids (cell edges lie half-way between centres) and
    second-order accurate otherwise.
    """
    dx = grid.dx
    dy = np.broadcast_to(grid.dy[:, None], grid.shape)
    hx = 0.5 * (dx + np.roll(dx, -1, axis=1))
    if not grid.periodic:
        hx[:, -1] = dx[:, -1]  # towards the wall beyond a regional grid's eastern edge
    hy = np.empty(grid.shape)
    hy[:-1] = 0.5 * (dy[:-1] + dy[1:])
    hy[-1] = hy[-2]
    face_n = np.empty(grid.shape)
    face_n[:-1] = 0.5 * (dx[:-1] + dx[1:])
    face_n[-1] = face_n[-2]
    poles = (bool(grid.lat_edges[0] <= -90.0), bool(grid.lat_edges[-1] >= 90.0))
    return _Metrics(hx, hy, dy / hx, face_n / hy, grid.cell_area, beta, grid.periodic, poles)


def _metrics_cartesian(x: np.ndarray, y: np.ndarray, beta: np.ndarray) -> _Metrics:
    """Metrics of a Cartesian grid of points: cells reach half-way to the neighbours."""
    def widths(c):
        e = np.concatenate([[c[0]], 0.5 * (c[1:] + c[:-1]), [c[-1]]])
        w = np.diff(e)
        w[0], w[-1] = 2 * w[0], 2 * w[-1]
        return w

    ny, nx = y.size, x.size
    dxc = np.diff(x)
    dyc = np.diff(y)
    hx = np.broadcast_to(np.append(dxc, dxc[-1])[None, :], (ny, nx))
    hy = np.broadcast_to(np.append(dyc, dyc[-1])[:, None], (ny, nx))
    cw, ch = widths(x)[None, :], widths(y)[:, None]
    area = cw * ch
    return _Metrics(hx, hy, ch / hx * np.ones((1, nx)), cw / hy * np.ones((ny, 1)), area,
                    beta, False)


class _Operator:
    """Sparse matrices of the discrete problem on a padded grid, and their factorisation."""

    def __init__(self, ocean, metrics: _Metrics, *, r, A_H, boundary, islands):
        t0 = time.perf_counter()
        m = metrics.padded()
        pad = ((_PAD, _PAD), (0, 0) if m.periodic else (_PAD, _PAD))
        ocean_p = np.pad(ocean, pad, constant_values=False)
        self.shape0 = ocean.shape
        self.pad = pad
        ny, nx = ocean_p.shape
        n = ny * nx
        self.n = n
        idx = np.arange(n).reshape(ny, nx)
        oc = ocean_p.ravel()
        self.ocean_flat = np.flatnonzero(oc)
        n_ocean = self.ocean_flat.size

        def nb(di, dj):
            """Flat index of the neighbour (di, dj), -1 beyond a non-periodic edge."""
            ii = np.arange(ny)[:, None] + di + np.zeros((1, nx), int)
            jj = np.arange(nx)[None, :] + dj + np.zeros((ny, 1), int)
            ok = (ii >= 0) & (ii < ny)
            if m.periodic:
                jj = jj % nx
            else:
                ok &= (jj >= 0) & (jj < nx)
            out = np.where(ok, np.clip(ii, 0, ny - 1) * nx + np.clip(jj, 0, nx - 1), -1)
            return out.ravel()

        east, west, north, south = nb(0, 1), nb(0, -1), nb(1, 0), nb(-1, 0)
        me = idx.ravel()
        area = m.area.ravel()
        self.area = area
        wx, wy = m.wx.ravel(), m.wy.ravel()
        hx, hy = m.hx.ravel(), m.hy.ravel()
        # Face weights and distances seen from each point towards each neighbour.
        w_w = np.where(west >= 0, wx[np.maximum(west, 0)], 0.0)
        w_s = np.where(south >= 0, wy[np.maximum(south, 0)], 0.0)
        h_w = np.where(west >= 0, hx[np.maximum(west, 0)], hx)
        h_s = np.where(south >= 0, hy[np.maximum(south, 0)], hy)
        faces = [(east, wx * (east >= 0)), (west, w_w), (north, wy * (north >= 0)), (south, w_s)]
        # Face lengths with the sign and component of the stress along an anticlockwise path
        # round a land point whose neighbour in that direction is ocean.
        self.coast_faces = [(east, wx * hx, 1, +1.0), (west, w_w * h_w, 1, -1.0),
                            (north, wy * hy, 0, -1.0), (south, w_s * h_s, 0, +1.0)]
        self.oc = oc
        touch = np.zeros(n, bool)
        for nbr, w in faces:
            touch |= (nbr >= 0) & (w > 0) & oc[np.maximum(nbr, 0)]
        land_id = _land_masses(~ocean_p, m.periodic, islands, m.area, touch.reshape(ny, nx))
        self.land_id = land_id
        self.n_islands = int(land_id.max()) if land_id.size else 0
        # Expansion from unknowns (ocean points, then one constant per island) to all points.
        col = np.full(n, -1)
        col[self.ocean_flat] = np.arange(n_ocean)
        lid = land_id.ravel()
        isl = lid > 0
        col[isl] = n_ocean + lid[isl] - 1
        rows = np.flatnonzero(col >= 0)
        E = sp.csr_matrix((np.ones(rows.size), (rows, col[rows])),
                          shape=(n, n_ocean + self.n_islands))
        self.E = E
        self.L = _flux_operator(me, faces, area, n)
        self.hx_e, self.hx_w, self.hy_n, self.hy_s = hx, h_w, hy, h_s
        # Centred d/dx, used for beta dpsi/dx and for the velocities.
        self.Dx = _difference(me, east, west, hx + h_w, n)
        self.Dy = _difference(me, north, south, hy + h_s, n)
        beta = np.broadcast_to(m.beta[:, None], (ny, nx)).ravel()

        A = sp.csr_matrix((n, n))
        if r > 0:
            A = A + r * self.L
        if A_H > 0:
            Z = self._vorticity(oc, faces, area, boundary)
            A = A - A_H * (self.L @ Z)
        friction = A
        A = A + sp.diags(beta) @ self.Dx
        rows_ocean = A[self.ocean_flat] @ E
        blocks = [rows_ocean]
        if self.n_islands:
            tot = np.bincount(lid[isl] - 1, weights=area[isl], minlength=self.n_islands)
            S = sp.csr_matrix(
                (area[isl] / tot[lid[isl] - 1], (lid[isl] - 1, np.flatnonzero(isl))),
                shape=(self.n_islands, n),
            )
            blocks.append(S @ friction @ E)
        self.M = sp.vstack(blocks).tocsc()
        self.t_assemble = time.perf_counter() - t0
        t0 = time.perf_counter()
        self.lu = spla.splu(self.M, permc_spec="COLAMD")
        self.t_factor = time.perf_counter() - t0
        self.n_unknowns = self.M.shape[0]

    def __getstate__(self):
        # SuperLU factors cannot be pickled: a dask worker that receives the operator
        # factorises the matrix again on first use.
        state = dict(self.__dict__)
        state["lu"] = None
        return state

    def _vorticity(self, oc, faces, area, boundary):
        """Matrix giving the relative vorticity at every point: lap(psi) in the ocean, the wall
        vorticity (ghost-point condition) on land next to the ocean, 0 elsewhere."""
        n = self.n
        me = np.arange(n)
        rows, cols, vals = [], [], []
        ocean_rows = self.L[np.flatnonzero(oc)]
        coo = ocean_rows.tocoo()
        rows.append(np.flatnonzero(oc)[coo.row])
        cols.append(coo.col)
        vals.append(coo.data)
        (east, we), (west, ww), (north, wn), (south, ws) = faces
        pairs = (
            (east, west, we, ww, self.hx_e, self.hx_w),
            (north, south, wn, ws, self.hy_n, self.hy_s),
        )
        land = ~oc
        # Free-slip walls have zero vorticity: only no-slip walls add entries.
        for plus, minus, wp, wm, hp, hm in pairs if boundary == "no-slip" else ():
            op = (plus >= 0) & oc[np.maximum(plus, 0)]
            om = (minus >= 0) & oc[np.maximum(minus, 0)]
            both = land & op & om
            # A one-point land barrier between two ocean points: the plain second difference,
            # the mean of the two sides' no-slip values on a uniform grid.
            for sel, nbr, wgt in ((both, plus, wp), (both, minus, wm)):
                k = me[sel]
                c = wgt[sel] / area[sel]
                rows += [k, k]
                cols += [nbr[sel], k]
                vals += [c, -c]
            for sel, nbr, h in ((land & op & ~om, plus, hp), (land & om & ~op, minus, hm)):
                k = me[sel]
                c = 2.0 / h[sel] ** 2
                rows += [k, k]
                cols += [nbr[sel], k]
                vals += [c, -c]
        return sp.csr_matrix(
            (np.concatenate(vals), (np.concatenate(rows), np.concatenate(cols))), shape=(n, n)
        )

    def island_area(self) -> np.ndarray:
        lid = self.land_id.ravel()
        isl = lid > 0
        return np.bincount(lid[isl] - 1, weights=self.area[isl], minlength=self.n_islands)

    def wind_circulation(self, taux: np.ndarray, tauy: np.ndarray) -> np.ndarray:
        """Anticlockwise circulation of the stress round each island's coast, N m-1.

        The path runs along the faces between island and ocean points; the stress is taken at
        the ocean point.
        """
        comps = (self.pad_field(taux).ravel(), self.pad_field(tauy).ravel())
        lid = self.land_id.ravel()
        out = np.zeros(self.n_islands)
        for nbr, length, comp, sign in self.coast_faces:
            ok = (lid > 0) & (nbr >= 0) & self.oc[np.maximum(nbr, 0)] & (length > 0)
            val = comps[comp][nbr[ok]]
            if not np.all(np.isfinite(val)):
                raise ValueError(
                    "wind_stress: expected finite stress at every ocean point next to an island, "
                    f"found {int(np.sum(~np.isfinite(val)))} missing. Fix: fill the stress "
                    "there, or leave wind_stress out to use the curl."
                )
            np.add.at(out, lid[ok] - 1, sign * val * length[ok])
        return out

    def solve(self, forcing: np.ndarray, island_forcing: np.ndarray) -> np.ndarray:
        """psi (m3 s-1) at every point of the unpadded grid for curl/rho0 on the ocean points."""
        return self.solve_with_islands(forcing, island_forcing)[0]

    def solve_with_islands(self, forcing: np.ndarray, island_forcing: np.ndarray):
        """psi (m3 s-1) on the unpadded grid, and the constant of each island (m3 s-1).

        The constants come from the unknowns, not from grid points: an island may lie wholly
        in the land frame (beyond a grid edge short of a pole whose last row is all ocean).
        """
        rhs = np.concatenate([forcing.ravel()[self._ocean_unpadded()], island_forcing])
        if self.lu is None:
            self.lu = spla.splu(self.M, permc_spec="COLAMD")
        x = self.lu.solve(rhs)
        full = self.E @ x
        return self._unpad(full), x[x.size - self.n_islands:]

    def _ocean_unpadded(self):
        ny, nx = self.shape0
        i, j = np.divmod(self.ocean_flat, self._padded_nx())
        i = i - self.pad[0][0]
        j = j - self.pad[1][0]
        return i * nx + j

    def _padded_nx(self):
        return self.shape0[1] + self.pad[1][0] + self.pad[1][1]

    def _unpad(self, full: np.ndarray) -> np.ndarray:
        ny, nx = self.shape0
        a = full.reshape(ny + 2 * _PAD, self._padded_nx())
        return a[_PAD : _PAD + ny, self.pad[1][0] : self.pad[1][0] + nx]

    def pad_field(self, a: np.ndarray) -> np.ndarray:
        return np.pad(a, self.pad, constant_values=0.0)

    def derivatives(self, psi: np.ndarray):
        """Centred (d psi/dx, d psi/dy) on the unpadded grid, land values included."""
        p = self.pad_field(psi).ravel()
        return self._unpad(self.Dx @ p), self._unpad(self.Dy @ p)

    def island_ids(self) -> np.ndarray:
        return self._unpad(self.land_id.ravel().astype(float)).astype(int)


def _flux_operator(me, faces, area, n):
    """Finite-volume Laplacian: (1/A) sum over faces of w (psi_neighbour - psi)."""
    rows, cols, vals = [], [], []
    for nbr, w in faces:
        ok = nbr >= 0
        c = np.where(ok, w, 0.0) / area
        rows += [me[ok], me[ok]]
        cols += [nbr[ok], me[ok]]
        vals += [c[ok], -c[ok]]
    return sp.csr_matrix(
        (np.concatenate(vals), (np.concatenate(rows), np.concatenate(cols))), shape=(n, n)
    )


def _difference(me, plus, minus, dist, n):
    ok = (plus >= 0) & (minus >= 0)
    rows = np.concatenate([me[ok], me[ok]])
    cols = np.concatenate([plus[ok], minus[ok]])
    vals = np.concatenate([1.0 / dist[ok], -1.0 / dist[ok]])
    return sp.csr_matrix((vals, (rows, cols)), shape=(n, n))


def _land_masses(land, periodic, islands, area, touch) -> np.ndarray:
    """Label land: 0 for the main coast, 1..k for islands, -1 for ocean.

    Land regions are 8-connected: two land points touching at a corner leave no passage for a
    five-point stencil, so they belong to one land mass. On a regional grid the frame around
    it is one wall and joins the main coast. On a periodic (global) grid the rows beyond the
    southern and northern edges are separate land masses and the main coast is the largest
    land mass by area; a land mass that no flux can reach (``touch`` is False on all its
    points: the rows beyond a pole) joins the main coast, as its value does not matter.
    """
    lab, _ = label_land(land, periodic=periodic, connectivity=8)
    lab = lab + 1  # 0 off land, 1..k the land masses
    frame = np.zeros_like(land)
    frame[:_PAD] = frame[-_PAD:] = True
    if periodic:
        sizes = np.bincount(lab.ravel(), weights=np.where(frame, 0.0, area).ravel(),
                            minlength=lab.max() + 1)
        sizes[0] = -1.0
        main = {int(np.argmax(sizes))}
    else:
        frame[:, :_PAD] = frame[:, -_PAD:] = True
        main = set(np.unique(lab[frame]).tolist()) - {0}
    main |= set(np.unique(lab[land]).tolist()) - set(np.unique(lab[land & touch]).tolist())
    out = np.full(land.shape, -1, dtype=int)
    out[land] = 0
    if islands == "circulation":
        others = [k for k in np.unique(lab[land]) if k not in main]
        for i, k in enumerate(others, start=1):
            out[lab == k] = i
    return out


def _check_params(r, A_H, boundary, islands, rotation=None):
    """The friction coefficients as floats, after checking every option."""
    r = _validate.number(r, "r", sign="non-negative", units="s-1", example=1e-6)
    A_H = _validate.number(A_H, "A_H", sign="non-negative", units="m2 s-1", example=1e3)
    if r == 0 and A_H == 0:
        raise ValueError(
            "r, A_H: expected some friction, found r=0 and A_H=0; without friction no boundary "
            "current can close the gyre. Fix: pass r>0 (Stommel), A_H>0 (Munk) or both."
        )
    if boundary not in BOUNDARIES:
        raise ValueError(
            f"boundary: expected one of {BOUNDARIES}, found {boundary!r}. Fix: pass "
            "boundary='no-slip' or boundary='free-slip' (used only when A_H > 0)."
        )
    if islands not in ISLAND_POLICIES:
        raise ValueError(
            f"islands: expected one of {ISLAND_POLICIES}, found {islands!r}. Fix: "
            "islands='circulation' (constant from Kelvin's theorem) or 'coast' (psi = 0)."
        )
    if rotation is not None and rotation not in ROTATIONS:
        raise ValueError(
            f"rotation: expected one of {ROTATIONS}, found {rotation!r}. Fix: e.g. "
            "rotation='sphere' (f and beta vary with latitude) or 'beta-plane'."
        )
    return r, A_H


def _island_forcing(op: _Operator, forcing: np.ndarray) -> np.ndarray:
    """Area-mean of ``forcing`` (curl/rho0, ocean points) over the ocean ring around each island."""
    f = op.pad_field(np.where(np.isfinite(forcing), forcing, 0.0))
    ok = op.pad_field(np.isfinite(forcing).astype(float)) > 0
    area = op.area.reshape(f.shape)
    lid = op.land_id
    out = np.zeros(op.n_islands)
    for k in range(1, op.n_islands + 1):
        on = lid == k
        grown = on.copy()
        for di in (-1, 0, 1):
            for dj in (-1, 0, 1):
                grown |= np.roll(np.roll(on, di, axis=0), dj, axis=1)
        ring = grown & ok
        out[k - 1] = np.sum(f[ring] * area[ring]) / np.sum(area[ring]) if ring.any() else 0.0
    return out


def _layer_width(r, A_H, beta):
    """The wider of the Stommel and Munk widths (m) for the friction in use."""
    return np.maximum(r / beta if r > 0 else 0.0, np.cbrt(A_H / beta) if A_H > 0 else 0.0)


def _resolution_warning(width: np.ndarray, spacing: np.ndarray, what: str) -> None:
    ratio = width / spacing
    ratio = np.min(ratio[np.isfinite(ratio)], initial=np.inf)
    if ratio < 1.0:
        warnings.warn(
            f"The {what} boundary layer is narrower than a grid spacing somewhere "
            f"(width/spacing = {ratio:.2f}); the centred differences will ripple near the "
            "western coast. Fix: raise the friction or refine the grid.",
            stacklevel=3,
        )


def _assemble_output(op, psi, curl_si, beta2d, *, rho0, depth, dims, coords):
    """Dataset with streamfunction, transports, velocities and the Sverdrup residual."""
    ocean = np.isfinite(curl_si) if curl_si is not None else None
    dpx, dpy = op.derivatives(psi)
    V = np.where(ocean, dpx, np.nan)
    U = np.where(ocean, -dpy, np.nan)
    psi_out = psi / constants.SVERDRUP_IN_M3_S
    resid = beta2d * V - curl_si / rho0
    ds = xr.Dataset(
        {
            "barotropic_streamfunction": (dims, psi_out, _ATTRS["psi"]),
            "barotropic_eastward_transport": (dims, U, _ATTRS["U"]),
            "barotropic_northward_transport": (dims, V, _ATTRS["V"]),
            "barotropic_eastward_velocity": (dims, U / depth, _ATTRS["u"]),
            "barotropic_northward_velocity": (dims, V / depth, _ATTRS["v"]),
            "sverdrup_residual": (dims, resid, _ATTRS["resid"]),
            "land_mass": (dims, op.island_ids(), _ATTRS["land"]),
        },
        coords=coords,
    )
    return ds


_ATTRS = {
    "psi": dict(
        standard_name="ocean_barotropic_streamfunction",
        long_name="streamfunction of the depth-integrated flow (northward transport = d psi/dx)",
        units="1e6 m3 s-1",
        comment="zero on the main coast; constant on each island",
    ),
    "U": dict(long_name="depth-integrated eastward transport per unit width", units="m2 s-1"),
    "V": dict(long_name="depth-integrated northward transport per unit width", units="m2 s-1"),
    "u": dict(long_name="depth-mean eastward velocity", units="m s-1"),
    "v": dict(long_name="depth-mean northward velocity", units="m s-1"),
    "resid": dict(
        long_name="residual of the Sverdrup relation, beta V - curl(tau)/rho0",
        units="m s-2",
        comment="near zero in a Sverdrup interior; large in boundary currents",
    ),
    "land": dict(
        long_name="land mass: -1 ocean, 0 main coast (psi = 0), k > 0 island k",
        units="1",
        flag_values=np.array([-1, 0], dtype=np.int32),
        flag_meanings="ocean main_coast",
        comment="positive values number the islands",
    ),
}


def _island_variable(values) -> xr.DataArray:
    """The constant of each island (1e6 m3 s-1) along ``island``, numbered as in land_mass."""
    n = values.shape[-1]
    number = xr.DataArray(np.arange(1, n + 1, dtype=np.int32), dims="island",
                          attrs={"long_name": "island number (the land_mass value)"})
    return xr.DataArray(values, dims=values.dims if isinstance(values, xr.DataArray) else
                        ("island",)).assign_coords(island=number).assign_attrs(
        long_name="streamfunction on each island", units="1e6 m3 s-1",
        comment="island k is land_mass k; an island in the land beyond a grid edge that stops "
        "short of a pole (an all-ocean last row) has no point on the grid")


def _solution_attrs(op, *, r, A_H, boundary, islands, rho0, depth, rotation, island_how):
    return dict(
        title="steady linear barotropic vorticity equation",
        equation="r lap(psi) - A_H lap(lap(psi)) + beta dpsi/dx = curl(tau)/rho0",
        r=r,
        A_H=A_H,
        boundary=boundary,
        islands=islands,
        island_rule=(
            "Kelvin circulation around each island: r circulation - A_H flux of vorticity "
            "= wind circulation/rho0"
        ),
        n_islands=op.n_islands,
        island_wind_circulation_from="; ".join(
            f"island {k}: {h}" for k, h in enumerate(island_how, start=1)) or "no islands",
        rho0=rho0,
        depth=depth,
        rotation=rotation,
        n_unknowns=op.n_unknowns,
        seconds_assembly=round(op.t_assemble, 3),
        seconds_factorisation=round(op.t_factor, 3),
    )


def solve_basin(
    x,
    y,
    curl,
    *,
    r: float = 0.0,
    A_H: float = 0.0,
    beta: float = 0.0,
    f0: float = 0.0,
    boundary: str = "no-slip",
    islands: str = "circulation",
    ocean_mask=None,
    wind_stress=None,
    rho0: float = constants.RHO0,
    depth: float = 4000.0,
) -> xr.Dataset:
    r"""Solve the steady linear barotropic vorticity equation in a Cartesian basin.

    Parameters
    ----------
    x, y : array_like, shapes (nx,) and (ny,)
        Strictly increasing eastward and northward positions of the grid points, m. The first
        and last rows and columns are the basin's walls (``psi = 0``).
    curl : array_like or xarray.DataArray, shape (ny, nx)
        Wind-stress curl, N m-3. NaN marks land (islands, peninsulas) inside the basin.
    r : float, optional
        Bottom friction on the depth-integrated flow, s-1.
    A_H : float, optional
        Lateral eddy viscosity, m2 s-1. At least one of ``r`` and ``A_H`` must be positive.
    beta : float, optional
        df/dy in m-1 s-1: 0 for a non-rotating basin or an f-plane.
    f0 : float, optional
        Coriolis parameter at ``y = 0``, s-1. Over a flat bottom f enters only through beta, so
        a basin on an f-plane (``f0 != 0``, ``beta = 0``) has the same streamfunction as a
        non-rotating one (Stommel 1948); ``f0`` is recorded and sets ``coriolis_parameter``.
    boundary : {"no-slip", "free-slip"}
        Wall condition for the lateral friction.
    islands : {"circulation", "coast"}
        How land not joined to the walls is treated (see the module notes).
    ocean_mask : array_like of bool, shape (ny, nx), optional
        Ocean points; default: where ``curl`` is finite. Where the mask says land but the curl
        is finite, the curl is used for the island's wind circulation.
    wind_stress : (array_like, array_like), optional
        Eastward and northward stress (Pa), shape (ny, nx), used only for the circulation of
        the wind round each island (more exact than the curl when the curl over the island is
        unknown).
    rho0 : float, optional
        Reference density, kg m-3.
    depth : float, optional
        Depth of the flat bottom, m; only converts transports to depth-mean velocities.

    Returns
    -------
    xarray.Dataset on (y, x)
        ``barotropic_streamfunction`` (1e6 m3 s-1), ``barotropic_eastward_transport``/``barotropic_northward_transport``
        (m2 s-1), ``barotropic_eastward_velocity``/``barotropic_northward_velocity`` (m s-1), ``sverdrup_residual``
        (m s-2), ``land_mass``, ``wind_stress_curl`` (N m-3), ``coriolis_parameter`` and
        ``beta`` (y), ``island_streamfunction`` (island; 1e6 m3 s-1) when there are islands;
        parameters, widths ``delta_S``/``delta_M`` (m) and timings in attrs.

    Notes
    -----
    See the module notes for the equation and its discretisation. Second-order accurate where
    the boundary layers span a few grid spacings; a warning is raised when a layer is narrower
    than half a spacing.
    """
    r, A_H = _check_params(r, A_H, boundary, islands)
    # A negative beta is a sign error (beta > 0 in both hemispheres), not a rotation "none".
    beta = _validate.number(beta, "beta", sign="non-negative", units="m-1 s-1", example=2e-11)
    f0 = _validate.number(f0, "f0", sign="any", units="s-1", example=7.3e-5)
    rho0 = _validate.number(rho0, "rho0", units="kg m-3", example=1025.0)
    depth = _validate.number(depth, "depth", units="m", example=4000.0)
    x = np.asarray(x, dtype=np.float64)
    y = np.asarray(y, dtype=np.float64)
    for name, c in (("x", x), ("y", y)):
        if c.ndim != 1 or c.size < 3 or not np.all(np.diff(c) > 0):
            raise ValueError(
                f"{name}: expected a strictly increasing 1-D array of at least 3 positions in m, "
                f"found shape {c.shape}. Fix: pass e.g. {name}=np.linspace(0, 2e6, 101)."
            )
    c = np.asarray(curl.values if isinstance(curl, xr.DataArray) else curl)
    if c.shape != (y.size, x.size):
        raise ValueError(
            f"curl: expected shape (ny, nx) = ({y.size}, {x.size}), found {c.shape}. Fix: pass "
            "the curl on the grid of y (rows) and x (columns)."
        )
    c = _validate.array_field(c, "curl", "curl")
    ocean = _ocean_mask(c, ocean_mask)
    ocean[0, :] = ocean[-1, :] = ocean[:, 0] = ocean[:, -1] = False
    if not ocean.any():
        arg = "curl" if ocean_mask is None else "ocean_mask"
        raise InputError(
            f"{arg}: expected ocean inside the walls (the first and last rows and columns), "
            "found no ocean there: the basin is all land. Fix: pass a curl that is finite (or "
            "an ocean_mask that is True) on the basin's interior points."
        )
    betas = np.full(y.size, float(beta))
    met = _metrics_cartesian(x, y, betas)
    if beta > 0:
        _resolution_warning(np.array([_layer_width(r, A_H, beta)]), np.diff(x).max(),
                            "western")
    op = _Operator(ocean, met, r=r, A_H=A_H, boundary=boundary, islands=islands)
    stress = None
    if wind_stress is not None:
        stress = tuple(np.asarray(t, dtype=np.float64) for t in wind_stress)
        if len(stress) != 2 or any(t.shape != c.shape for t in stress):
            raise ValueError(
                f"wind_stress: expected (taux, tauy) in Pa, each of shape {c.shape}, found "
                f"{[t.shape for t in stress]}. Fix: pass the stress on the grid of curl."
            )
    island_forcing, how = _island_forcing_mixed(op, c, ocean, rho0, stress)
    psi, island_psi = op.solve_with_islands(np.where(ocean, c, 0.0) / rho0, island_forcing)
    coords = {
        # No axis attribute: CF-aware readers take axis X/Y without a grid mapping for
        # longitude/latitude, which distances in a basin are not.
        "y": ("y", y, dict(units="m", long_name="northward distance")),
        "x": ("x", x, dict(units="m", long_name="eastward distance")),
    }
    beta2d = np.broadcast_to(betas[:, None], c.shape)
    curl_si = np.where(ocean, c, np.nan)
    ds = _assemble_output(op, psi, curl_si, beta2d, rho0=rho0, depth=depth, dims=("y", "x"),
                          coords=coords)
    ds["wind_stress_curl"] = (("y", "x"), curl_si, dict(long_name="wind stress curl",
                                                        units="N m-3"))
    ds["coriolis_parameter"] = ("y", f0 + beta * (y - y[0]),
                                dict(standard_name="coriolis_parameter", units="s-1"))
    ds["beta"] = ("y", betas, dict(long_name="meridional gradient of the Coriolis parameter",
                                   units="m-1 s-1"))
    if op.n_islands:
        ds["island_streamfunction"] = _island_variable(island_psi / constants.SVERDRUP_IN_M3_S)
    rotation = "beta-plane" if beta > 0 else ("f-plane" if f0 != 0 else "none")
    ds.attrs.update(_solution_attrs(op, r=r, A_H=A_H, boundary=boundary, islands=islands,
                                    rho0=rho0, depth=depth, rotation=rotation, island_how=how))
    ds.attrs.update(beta=float(beta), f0=float(f0), **_widths(r, A_H, beta))
    return ds


def _widths(r, A_H, beta):
    out = {}
    if beta > 0 and r > 0:
        out["delta_S"] = float(stommel_width(r, beta))
    if beta > 0 and A_H > 0:
        out["delta_M"] = float(munk_width(A_H, beta))
    return out


def _island_forcing_mixed(op, c, ocean, rho0, stress=None):
    """Right-hand side of each island's circulation condition (area-mean curl/rho0, m s-2).

    From the stress round the coast when ``stress`` = (taux, tauy) is given (Kelvin's
    condition as it stands); else from the curl over the island by Stokes' theorem where the
    curl is given on all its points; else from the mean curl of the ocean around it.
    Returns the values and, per island, the method used.
    """
    if not op.n_islands:
        return np.zeros(0), []
    if stress is not None:
        circ = op.wind_circulation(*stress)
        return circ / (rho0 * op.island_area()), ["stress circulation"] * op.n_islands
    given = np.where(~ocean & np.isfinite(c), c, np.nan)
    lid = op.island_ids()
    area = op._unpad(op.area)
    ring = _island_forcing(op, np.where(ocean, c, np.nan) / rho0)
    out, how = [], []
    for k in range(1, op.n_islands + 1):
        on = lid == k
        # An island wholly beyond a grid edge has no curl of its own on the grid.
        if on.any() and np.all(np.isfinite(given[on])):
            out.append(np.sum(given[on] * area[on]) / np.sum(area[on]) / rho0)
            how.append("curl over the island")
        else:
            out.append(ring[k - 1])
            how.append("curl of the ocean around the island")
    return np.array(out), how


def _ocean_mask(c, ocean_mask):
    if ocean_mask is None:
        return np.isfinite(c)
    m = np.asarray(ocean_mask.values if isinstance(ocean_mask, xr.DataArray) else ocean_mask)
    if m.shape != c.shape:
        raise ValueError(
            f"ocean_mask: expected the shape of curl {c.shape}, found {m.shape}. Fix: pass a "
            "boolean mask on the same grid (True for ocean)."
        )
    m = _validate.mask(m, "ocean_mask")
    bad = m & ~np.isfinite(c)
    if np.any(bad):
        raise ValueError(
            f"curl: expected finite values at every ocean point of ocean_mask, found "
            f"{int(bad.sum())} missing. Fix: fill the curl there or mark those points as land."
        )
    return m.copy()


def solve_barotropic(
    curl,
    *,
    r: float = 0.0,
    A_H: float = 0.0,
    rotation: str = "sphere",
    boundary: str = "no-slip",
    islands: str = "circulation",
    ocean_mask=None,
    wind_stress=None,
    reference_latitude: float | None = None,
    rho0: float = constants.RHO0,
    depth: float = 4000.0,
    radius: float = constants.EARTH_RADIUS,
) -> xr.Dataset:
    r"""Solve the steady linear barotropic vorticity equation on a latitude-longitude grid.

    Parameters
    ----------
    curl : xarray.DataArray (..., lat, lon)
        Wind-stress curl in N m-3 (e.g. from :func:`~sverdrup_kit.physics.operators.wind_stress_curl`),
        missing on land. Any latitude order and longitude convention; longitudes that close
        the circle are periodic. Leading dimensions (e.g. ``time``) are solved one field at a
        time with one factorisation; they must share the ocean mask. Dask-backed input gives
        lazy output (each block of leading dimensions is solved when computed).
    r : float, optional
        Bottom friction on the depth-integrated flow, s-1 (e.g. 1e-6 to 1e-5).
    A_H : float, optional
        Lateral eddy viscosity, m2 s-1 (e.g. 1e4 to 1e5 on a 1 degree grid). At least one of
        ``r`` and ``A_H`` must be positive.
    rotation : {"sphere", "beta-plane", "f-plane", "none"}
        ``"sphere"``: beta = 2 Omega cos(lat)/R from the grid. ``"beta-plane"``: beta fixed at
        its value at ``reference_latitude``. ``"f-plane"`` and ``"none"``: beta = 0 (over a flat
        bottom they give the same streamfunction; f is recorded in ``coriolis_parameter``).
    boundary : {"no-slip", "free-slip"}
        Wall condition for lateral friction.
    islands : {"circulation", "coast"}
        ``"circulation"``: one constant per island from Kelvin's circulation theorem;
        ``"coast"``: islands join the main coast (psi = 0).
    ocean_mask : xarray.DataArray (lat, lon) of bool, optional
        Ocean points; default: where the first curl field is finite (for dask-backed curl
        that field is computed at call time: pass ``ocean_mask`` to keep the call lazy).
    wind_stress : (xarray.DataArray, xarray.DataArray), optional
        ``(taux, tauy)`` on the grid of ``curl`` (Pa; dyn cm-2 converted), used only for the
        circulation of the wind round each island, taken along its coast. Recommended when
        there are large islands (a polar continent): without it the wind over an island is
        estimated from the curl of the ocean around it.
    reference_latitude : float, optional
        Latitude (degrees_north) of the beta-plane or f-plane; default: the mean latitude of the
        ocean points.
    rho0 : float, optional
        Reference density, kg m-3.
    depth : float, optional
        Depth of the flat bottom, m; only converts transports to depth-mean velocities.
    radius : float, optional
        Earth radius, m.

    Returns
    -------
    xarray.Dataset (..., lat, lon) on the input grid and order
        ``barotropic_streamfunction`` (1e6 m3 s-1, zero on the main coast, standard_name
        ocean_barotropic_streamfunction), ``barotropic_eastward_transport``/``barotropic_northward_transport``
        (m2 s-1), ``barotropic_eastward_velocity``/``barotropic_northward_velocity`` (m s-1), ``sverdrup_residual``
        (m s-2), ``land_mass`` (-1 ocean, 0 main coast, k island k), ``wind_stress_curl``,
        ``coriolis_parameter`` and ``beta`` (lat), and, when there are islands,
        ``island_streamfunction`` (..., island): the constant of island k (1e6 m3 s-1, the
        value of ``land_mass`` k). Attributes: the parameters,
        ``island_wind_circulation_from`` (how each island was forced), ``n_unknowns`` and the
        seconds spent assembling and factorising.

    Notes
    -----
    See the module notes for the equation, the coast and island conditions and the
    discretisation. Lengths and f, beta come from :class:`~sverdrup_kit.geometry.grid.SphericalGrid`;
    the Laplacian keeps the sphere's metric, and the lateral friction is the Laplacian of the
    relative vorticity (the usual form, without the small metric terms of the stress tensor).
    The coast lies at the first land point, half a cell inside the land of a cell-centred mask.

    Examples
    --------
    >>> out = solve_barotropic(curl, r=2e-6, rotation="sphere")     # doctest: +SKIP
    >>> out.barotropic_streamfunction.sel(lat=30, method="nearest").max()       # doctest: +SKIP
    """
    curl = require_dataarray(curl, "curl")
    r, A_H = _check_params(r, A_H, boundary, islands, rotation)
    rho0 = _validate.number(rho0, "rho0", units="kg m-3", example=1025.0)
    depth = _validate.number(depth, "depth", units="m", example=4000.0)
    radius = _validate.number(radius, "radius", units="m", example=constants.EARTH_RADIUS)
    if reference_latitude is not None:
        reference_latitude = _validate.number(reference_latitude, "reference_latitude",
                                              units="degrees_north", example=30.0,
                                              low=-90.0, high=90.0)
    mask_given = ocean_mask is not None
    grid = SphericalGrid.from_data(curl, argname="curl", radius=radius)
    lay = grid.layout
    c = to_canonical(_validate.field(curl, "curl", "curl"), lay).transpose(
        ..., lay.lat_name, lay.lon_name)
    if ocean_mask is not None:
        om = to_canonical(require_dataarray(ocean_mask, "ocean_mask"), lay)
        ocean = _validate.mask(om.transpose(lay.lat_name, lay.lon_name).values, "ocean_mask")
        if ocean.shape != grid.shape:
            raise ValueError(
                f"ocean_mask: expected a (lat, lon) mask of shape {grid.shape} like curl, found "
                f"{ocean.shape}. Fix: pass a boolean mask on the grid of curl (True for ocean)."
            )
    else:
        # One field decides the ocean (computed now for dask input; pass ocean_mask to avoid).
        first = c.isel({d: 0 for d in c.dims[:-2]})
        ocean = np.isfinite(np.asarray(first.values, dtype=np.float64))
    if not ocean.any():
        raise ValueError("curl: expected some ocean (finite values), found none. Fix: check "
                         "the land mask or pass ocean_mask.")
    lat0 = (float(np.mean(np.broadcast_to(grid.lat[:, None], grid.shape)[ocean]))
            if reference_latitude is None else float(reference_latitude))
    beta_grid = grid.beta
    f_grid = grid.f
    if rotation == "sphere":
        beta, f = beta_grid, f_grid
    elif rotation == "beta-plane":
        b0 = float(np.interp(lat0, grid.lat, beta_grid))
        f0 = float(np.interp(lat0, grid.lat, f_grid))
        beta = np.full(grid.lat.size, b0)
        f = f0 + b0 * radius * np.deg2rad(grid.lat - lat0)
    elif rotation == "f-plane":
        beta = np.zeros(grid.lat.size)
        f = np.full(grid.lat.size, float(np.interp(lat0, grid.lat, f_grid)))
    else:
        beta, f = np.zeros(grid.lat.size), np.zeros(grid.lat.size)
    met = _metrics_sphere(grid, beta)
    rows = np.any(ocean, axis=1) & (beta > 0)
    if rows.any():
        _resolution_warning(_layer_width(r, A_H, beta[rows]), grid.dx[rows].max(axis=1),
                            "western")
    op = _Operator(ocean, met, r=r, A_H=A_H, boundary=boundary, islands=islands)
    stresses = _stresses(wind_stress, curl, lay)
    dims = (lay.lat_name, lay.lon_name)
    beta2d = np.broadcast_to(beta[:, None], grid.shape)
    # apply_ufunc directly: the island constants add a dimension the grid bridge cannot.
    order = list(c.dims)
    outs = xr.apply_ufunc(
        _solve_kernel,
        *(whole_fields(a, dims) for a in (c, *stresses)),
        input_core_dims=[list(dims)] * (1 + len(stresses)),
        output_core_dims=[list(dims)] * 4 + [["island"]],
        dask="parallelized",
        output_dtypes=[np.float64] * 5,
        dask_gufunc_kwargs={"output_sizes": {"island": op.n_islands}},
        kwargs=dict(op=op, ocean=ocean, rho0=rho0, beta2d=beta2d,
                    mask_given=mask_given),
        keep_attrs=False,
    )
    psi, U, V, resid = (o.transpose(*order) for o in outs[:4])
    island_psi = outs[4]
    land = op.island_ids()
    ds = xr.Dataset(
        {
            "barotropic_streamfunction": (psi / constants.SVERDRUP_IN_M3_S).assign_attrs(_ATTRS["psi"]),
            "barotropic_eastward_transport": U.assign_attrs(_ATTRS["U"]),
            "barotropic_northward_transport": V.assign_attrs(_ATTRS["V"]),
            "barotropic_eastward_velocity": (U / depth).assign_attrs(_ATTRS["u"]),
            "barotropic_northward_velocity": (V / depth).assign_attrs(_ATTRS["v"]),
            "sverdrup_residual": resid.assign_attrs(_ATTRS["resid"]),
            "land_mass": (dims, land, _ATTRS["land"]),
            "wind_stress_curl": c.where(xr.DataArray(ocean, dims=dims)).assign_attrs(
                long_name="wind stress curl", units="N m-3"),
            "coriolis_parameter": (lay.lat_name, f, dict(standard_name="coriolis_parameter",
                                                         units="s-1")),
            "beta": (lay.lat_name, beta, dict(long_name="meridional gradient of the Coriolis "
                                              "parameter", units="m-1 s-1")),
        }
    )
    ds = from_canonical(ds, lay, curl)
    if op.n_islands:
        ds["island_streamfunction"] = _island_variable(island_psi / constants.SVERDRUP_IN_M3_S)
    ds.attrs.update(_solution_attrs(op, r=r, A_H=A_H, boundary=boundary, islands=islands,
                                    rho0=rho0, depth=depth, rotation=rotation,
                                    island_how=_island_how(op, ocean, stresses, c, lay)))
    ds.attrs["reference_latitude"] = lat0
    return ds


def _island_how(op, ocean, stresses, c, lay):
    """How each island's wind circulation is found (looks at one field of the curl)."""
    if stresses:
        return ["stress circulation"] * op.n_islands
    if not op.n_islands:
        return []
    if c.chunks is not None:
        return ["curl over the island where given there, else of the ocean around it"] * (
            op.n_islands)
    first = np.asarray(c.transpose(..., lay.lat_name, lay.lon_name).values).reshape(
        (-1,) + ocean.shape)[0]
    return _island_forcing_mixed(op, first, ocean, 1.0)[1]


def _solve_kernel(curl, *stress, op, ocean, rho0, beta2d, mask_given=False):
    """psi (m3 s-1), U, V (m2 s-1), the Sverdrup residual (m s-2) and the island constants
    (m3 s-1, last axis) for each field."""
    c = np.asarray(curl, dtype=np.float64)
    shape = c.shape
    flat = c.reshape((-1,) + shape[-2:])
    st = [np.asarray(t, dtype=np.float64).reshape(flat.shape) for t in stress]
    out = np.full((4,) + flat.shape, np.nan)
    islands = np.full((flat.shape[0], op.n_islands), np.nan)
    for k, field in enumerate(flat):
        if not np.all(np.isfinite(field[ocean])):
            n = int(np.sum(~np.isfinite(field[ocean])))
            if mask_given:
                raise InputError(
                    f"curl: expected finite values at every ocean point of ocean_mask, found "
                    f"{n} missing in one field. Fix: fill the curl there, or mark those points "
                    "as land in ocean_mask."
                )
            raise InputError(
                "curl: expected the same ocean points in every field, found a field missing "
                f"values at {n} ocean points of the first. Fix: pass ocean_mask (the ocean "
                "common to every field), or solve the fields separately."
            )
        pair = (st[0][k], st[1][k]) if st else None
        island_forcing, _ = _island_forcing_mixed(op, field, ocean, rho0, pair)
        psi, islands[k] = op.solve_with_islands(np.where(ocean, field, 0.0) / rho0,
                                                island_forcing)
        dpx, dpy = op.derivatives(psi)
        out[0, k] = psi
        out[1, k] = np.where(ocean, -dpy, np.nan)
        out[2, k] = np.where(ocean, dpx, np.nan)
        out[3, k] = beta2d * out[2, k] - np.where(ocean, field, np.nan) / rho0
    return (*(o.reshape(shape) for o in out), islands.reshape(shape[:-2] + (op.n_islands,)))


def _stresses(wind_stress, curl, lay):
    """(taux, tauy) on the canonical grid in Pa, as DataArrays like the curl, or ()."""
    if wind_stress is None:
        return ()
    if not isinstance(wind_stress, (tuple, list)) or len(wind_stress) != 2:
        raise TypeError(
            f"wind_stress: expected a pair (taux, tauy) of DataArrays, found "
            f"{type(wind_stress).__name__}. Fix: pass wind_stress=(ds['taux'], ds['tauy'])."
        )
    out = []
    for name, t in zip(("taux", "tauy"), wind_stress):
        t = require_dataarray(t, f"wind_stress {name}")
        check_same_grid(curl, t, ("curl", f"wind_stress {name}"))
        t = to_si(t, "stress", argname=f"wind_stress {name}", default="Pa")
        out.append(to_canonical(t, lay).transpose(*curl.dims))
    return tuple(out)


def _row_positions(solution: xr.Dataset):
    """Row/column dims, distance (m) from each point to its eastern neighbour, periodicity."""
    if "x" in solution.dims and "y" in solution.dims:
        x = np.asarray(solution["x"].values, dtype=np.float64)
        met = _metrics_cartesian(x, np.asarray(solution["y"].values, float), np.zeros(1))
        return ("y", "x"), np.asarray(met.hx), False
    grid = SphericalGrid.from_data(solution, argname="solution",
                                   radius=solution.attrs.get("radius", constants.EARTH_RADIUS))
    lay = grid.layout
    if not lay.is_identity:
        raise ValueError(
            "solution: expected ascending latitude and increasing longitude, found another "
            f"order. Fix: solution.sortby(['{lay.lat_name}', '{lay.lon_name}'])."
        )
    met = _metrics_sphere(grid, grid.beta)
    return (lay.lat_name, lay.lon_name), met.hx, grid.periodic


def _crossing(xs, vals, level):
    """First position where ``vals`` (decreasing through ``level``) crosses it, interpolated."""
    below = np.flatnonzero(vals <= level)
    if below.size == 0:
        return np.nan
    k = below[0]
    if k == 0:
        return xs[0]
    v0, v1 = vals[k - 1], vals[k]
    return xs[k - 1] + (v0 - level) / (v0 - v1) * (xs[k] - xs[k - 1])


def boundary_current(
    solution: xr.Dataset, *, bounds=None, interior_offset: float = 3.0, rho0: float | None = None
) -> xr.Dataset:
    r"""Western boundary current of a solution, row by row, against the Sverdrup interior.

    In each row (latitude, or ``y``) the widest run of ocean points within ``bounds`` that has
    land at both ends is taken as the basin crossing; its western land point is the coast. East
    of the coast the northward transport keeps one sign in the boundary current and first
    reverses at its outer edge.

    Parameters
    ----------
    solution : xarray.Dataset
        Output of :func:`solve_barotropic` (ascending lat, increasing lon) or
        :func:`solve_basin`, with ``barotropic_streamfunction``, ``barotropic_northward_transport``,
        ``barotropic_northward_velocity``, ``wind_stress_curl`` and ``beta``.
    bounds : (float, float), optional
        Western and eastern limits of the rows to search, in the units of the row coordinate
        (degrees_east, or m). Default: the whole row.
    interior_offset : float, optional
        Where the interior starts, in multiples of the edge distance (default 3: the Munk layer decays as exp(-x/(2 delta_M)), to 0.4% of the interior streamfunction by 3 x 3.63 delta_M).
    rho0 : float, optional
        Reference density for the Sverdrup transport; default: the solution's.

    Returns
    -------
    xarray.Dataset over the row coordinate
        ``western_coast``/``eastern_coast``: coordinate of the wall points.
        ``peak_northward_velocity`` (m s-1, signed) and ``peak_distance`` (m east of the coast).
        ``efolding_width`` (m): distance east of the peak over which the speed falls to 1/e of
        the peak (``r/beta`` for a Stommel layer).
        ``edge_distance`` (m): where the northward flow first reverses (3.63 ``delta_M`` for a
        no-slip Munk layer); ``peak_transport`` (1e6 m3 s-1): transport from the coast to there.
        ``interior_start`` (m): ``interior_offset`` times the edge distance, beyond the
        recirculation of a Munk layer.
        ``boundary_layer_transport`` (1e6 m3 s-1): net transport from the coast to the interior start.
        ``solved_interior_transport`` (1e6 m3 s-1): from the interior start to the eastern coast.
        ``sverdrup_transport_coast_to_coast`` (1e6 m3 s-1): Sverdrup transport coast to coast, and
        ``sverdrup_transport_east_of_layer`` over the same span as ``solved_interior_transport``.
        ``interior_ratio``: interior over Sverdrup interior transport (1 in Sverdrup balance).
        Rows without a closed crossing, without a reversal or with ``beta = 0`` are NaN.

    Notes
    -----
    The Sverdrup transport is :math:`\int \operatorname{curl}\tau/(\rho_0\beta)\,dx` from
    wall to wall (midpoint sum over the ocean points, plus half a spacing at each end with the
    end values, so that the walls count as in the solver). The boundary and interior
    transports of the solution add to the difference of the coastal values of psi, zero when
    both coasts are the main coast.
    """
    for name in ("barotropic_streamfunction", "barotropic_northward_transport", "barotropic_northward_velocity",
                 "wind_stress_curl", "beta"):
        if name not in solution:
            raise ValueError(
                f"solution: expected a variable '{name}', found {sorted(solution.data_vars)}. "
                "Fix: pass the Dataset returned by solve_barotropic or solve_basin."
            )
    dims, hx, periodic = _row_positions(solution)
    if set(solution["barotropic_streamfunction"].dims) != set(dims):
        raise ValueError(
            f"solution: expected one (row, column) field with dims {dims}, found "
            f"{solution['barotropic_streamfunction'].dims}. Fix: select one field, e.g. solution.isel(time=0)."
        )
    rho0 = _validate.number(solution.attrs.get("rho0", constants.RHO0) if rho0 is None else rho0,
                            "rho0", units="kg m-3", example=1025.0)
    interior_offset = _validate.number(interior_offset, "interior_offset", units="widths",
                                       example=3.0)
    psi = solution["barotropic_streamfunction"].transpose(*dims).values * constants.SVERDRUP_IN_M3_S
    V = solution["barotropic_northward_transport"].transpose(*dims).values
    v = solution["barotropic_northward_velocity"].transpose(*dims).values
    curl = solution["wind_stress_curl"].transpose(*dims).values
    beta = np.broadcast_to(solution["beta"].values.reshape(-1, 1), psi.shape)
    colc = solution[dims[1]].values
    ny, nx = psi.shape
    lo, hi = (-np.inf, np.inf) if bounds is None else bounds
    inside = (colc >= lo) & (colc <= hi)
    names = ("western_coast", "eastern_coast", "peak_northward_velocity", "peak_distance",
             "efolding_width", "edge_distance", "peak_transport", "interior_start",
             "boundary_layer_transport", "solved_interior_transport", "sverdrup_transport_coast_to_coast",
             "sverdrup_transport_east_of_layer")
    out = {k: np.full(ny, np.nan) for k in names}
    for i in range(ny):
        ocean = np.isfinite(V[i]) & inside
        run = _widest_closed_run(ocean, np.isfinite(V[i]), periodic)
        if run is None:
            continue
        j0, j1 = run  # first and last ocean index (j1 may exceed nx-1 across a periodic seam)
        cols = np.arange(j0 - 1, j1 + 2) % nx
        dist = np.concatenate([[0.0], np.cumsum(hx[i][cols[:-1]])])
        vv, VV, pp = v[i][cols[1:-1]], V[i][cols[1:-1]], psi[i][cols]
        s = np.sign(VV[0]) if VV[0] != 0 else 1.0
        sv = s * VV
        rev = np.flatnonzero(sv <= 0)
        k_edge = rev[0] if rev.size else sv.size
        k_peak = int(np.argmax(sv[:k_edge])) if k_edge > 0 else 0
        d_ocean = dist[1:-1]
        out["western_coast"][i] = colc[cols[0]]
        out["eastern_coast"][i] = colc[cols[-1]]
        out["peak_northward_velocity"][i] = vv[k_peak]
        out["peak_distance"][i] = d_ocean[k_peak]
        out["efolding_width"][i] = (
            _crossing(d_ocean[k_peak:], sv[k_peak:], sv[k_peak] / np.e) - d_ocean[k_peak]
        )
        edge = _crossing(d_ocean, sv, 0.0) if rev.size else np.nan
        out["edge_distance"][i] = edge
        if not np.isfinite(edge):
            continue
        k_ext = int(np.argmax(s * pp[1:-1])) + 1
        out["peak_transport"][i] = (pp[k_ext] - pp[0]) / constants.SVERDRUP_IN_M3_S
        start = interior_offset * edge
        out["interior_start"][i] = start
        k0 = int(np.searchsorted(dist, start))
        if k0 >= len(pp) - 1:
            continue
        out["boundary_layer_transport"][i] = (pp[k0] - pp[0]) / constants.SVERDRUP_IN_M3_S
        out["solved_interior_transport"][i] = (pp[-1] - pp[k0]) / constants.SVERDRUP_IN_M3_S
        b = beta[i][cols[1:-1]]
        if np.all(b > 0):
            # Cell widths of the ocean points; the end cells reach the walls, as in the solver.
            h = 0.5 * (dist[2:] - dist[:-2])
            h[0] += 0.5 * (dist[1] - dist[0])
            h[-1] += 0.5 * (dist[-1] - dist[-2])
            c = curl[i][cols[1:-1]] / (rho0 * b) * h
            out["sverdrup_transport_coast_to_coast"][i] = np.sum(c) / constants.SVERDRUP_IN_M3_S
            # From the point that starts the interior: the east half of its cell, then the rest.
            tail = c[k0 - 1:].copy()
            if k0 < len(pp) - 2:
                tail[0] *= 0.5 * (dist[k0 + 1] - dist[k0]) / h[k0 - 1]
            out["sverdrup_transport_east_of_layer"][i] = np.sum(tail) / constants.SVERDRUP_IN_M3_S
    row = dims[0]
    coords = {row: solution[row]}
    units = solution[dims[1]].attrs.get("units", "")
    # On the sphere the coast positions are longitudes; say so (CF-1.8 section 4.2).
    where = {"standard_name": "longitude"} if units == "degrees_east" else {}
    ds = xr.Dataset(
        {
            "western_coast": (row, out["western_coast"],
                              dict(long_name="position of the western coast (wall point)",
                                   units=units, **where)),
            "eastern_coast": (row, out["eastern_coast"],
                              dict(long_name="position of the eastern coast (wall point)",
                                   units=units, **where)),
            "peak_northward_velocity": (row, out["peak_northward_velocity"],
                                        dict(long_name="peak depth-mean northward velocity of "
                                             "the western boundary current", units="m s-1")),
            "peak_distance": (row, out["peak_distance"],
                              dict(long_name="distance of the peak from the coast", units="m")),
            "efolding_width": (row, out["efolding_width"],
                               dict(long_name="distance east of the peak over which the speed "
                                    "falls to 1/e of the peak", units="m")),
            "edge_distance": (row, out["edge_distance"],
                              dict(long_name="distance from the coast where the northward flow "
                                   "first reverses", units="m")),
            "boundary_layer_transport": (row, out["boundary_layer_transport"],
                                   dict(long_name="net northward transport of the western "
                                        "boundary layer", units="1e6 m3 s-1")),
            "solved_interior_transport": (row, out["solved_interior_transport"],
                                   dict(long_name="northward transport of the interior",
                                        units="1e6 m3 s-1")),
            "sverdrup_transport_coast_to_coast": (row, out["sverdrup_transport_coast_to_coast"],
                                   dict(long_name="Sverdrup transport coast to coast",
                                        units="1e6 m3 s-1")),
            "sverdrup_transport_east_of_layer": (
                row, out["sverdrup_transport_east_of_layer"],
                dict(long_name="Sverdrup transport from the interior start to the eastern coast",
                     units="1e6 m3 s-1")),
            "peak_transport": (row, out["peak_transport"],
                               dict(long_name="transport from the coast to the first reversal",
                                    units="1e6 m3 s-1")),
            "interior_start": (row, out["interior_start"],
                               dict(long_name="distance from the western coast where the "
                                    "interior is taken to start", units="m")),
        },
        coords=coords,
    )
    ds["interior_ratio"] = (ds.solved_interior_transport / ds.sverdrup_transport_east_of_layer).assign_attrs(
        long_name="interior transport of the solution over the Sverdrup transport", units="1")
    return ds.assign_attrs(rho0=rho0, bounds=str(bounds))


def _widest_closed_run(ocean: np.ndarray, any_ocean: np.ndarray, periodic: bool):
    """(first, last) index of the widest run of ``ocean`` bounded by land at both ends.

    A run that reaches a non-periodic edge of the grid, or the edge of the search bounds while
    the ocean goes on, is not closed. Across a periodic seam ``last`` may exceed nx - 1.
    """
    nx = ocean.size
    if ocean.all():
        return None
    if periodic:
        shift = int(np.flatnonzero(~ocean)[0])
        oc = np.roll(ocean, -shift)
        anyo = np.roll(any_ocean, -shift)
    else:
        shift, oc, anyo = 0, ocean, any_ocean
    best = None
    j = 0
    while j < nx:
        if not oc[j]:
            j += 1
            continue
        k = j
        while k + 1 < nx and oc[k + 1]:
            k += 1
        west_ok = j > 0 and not anyo[j - 1]
        east_ok = k + 1 < nx and not anyo[k + 1] or (periodic and k + 1 == nx and not anyo[0])
        if west_ok and east_ok and (best is None or k - j > best[1] - best[0]):
            best = (j, k)
        j = k + 1
    if best is None:
        return None
    return best[0] + shift, best[1] + shift
