r"""Curl, Ekman and Sverdrup transport on curvilinear ocean-model grids, and the model's own
depth-integrated circulation set beside them.

On a model grid (two-dimensional latitude and longitude, rows that need not follow latitude
circles, a displaced pole or a folded tripolar cap) the operators work on the model's own cells:

- the curl comes from Stokes' theorem round each cell (edge chords and spherical cell areas
  from :class:`~sverdrup_kit.geometry.curvilinear.CurvilinearGrid`), coast-aware;
- the Sverdrup transport :math:`V = \operatorname{curl}\tau/(\rho_0\beta)` lives at cell
  centres and is summed in latitude bands: the transport of a basin across band :math:`b` is
  :math:`T_b = \sum_c V_c A_c / (R\,\Delta\phi_b)` over the basin's ocean cells whose centres
  lie in the band, the band mean of :math:`\int V\,dx`. On a regular grid whose rows are the
  bands this is the midpoint sum of the regular-grid integral, to a relative difference of
  :math:`\Delta\phi^2/24`;
- the streamfunction is the same sum taken westward from the band's eastern coast, cell by
  cell in order of longitude.

What is approximate here (and exact on regular grids with the regular-grid functions): next to
land and at the edge of the grid the curl is first-order; a band's cells are integrated as one
run from its eastern coast (the widest gap of land in longitude), islands inside the band are
crossed, marginal seas are not told apart from the open basin unless the user's ``basins``
leave them out; a band with no land gap is left empty (``no_eastern_coast``).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import xarray as xr

from .. import _validate, constants
from .._compiled.stokes import band_sums, stokes_curl, westward_band_scan
from ..errors import GridError, InputError
from ..geometry.curvilinear import CurvilinearGrid

__all__ = [
    "model_grid_curl",
    "model_grid_ekman",
    "model_grid_sverdrup",
    "model_circulation",
    "rotate_to_geographic",
    "rotate_to_grid",
]

SV_UNITS = "1e6 m3 s-1"

BAND_STATUS = {
    0: ("valid", "interior transport computed"),
    1: ("equatorial_band", "within the equatorial band, where the Ekman/geostrophic split "
        "(both go as 1/f) and the interior balance fail"),
    2: ("no_eastern_coast", "the basin's ocean in this band has no gap of land in longitude "
        "(a circumpolar band)"),
    4: ("no_ocean", "the basin has no ocean in this band"),
}


def rotate_to_geographic(u_grid, v_grid, angle):
    r"""Components along the grid lines to eastward and northward components.

    ``angle`` is the angle in radians, anticlockwise, from east to the grid's x direction
    (:attr:`CurvilinearGrid.angle`, or the model's own angle variable):

    .. math:: u_E = u\cos\alpha - v\sin\alpha, \qquad u_N = u\sin\alpha + v\cos\alpha
    """
    c, s = np.cos(angle), np.sin(angle)
    return u_grid * c - v_grid * s, u_grid * s + v_grid * c


def rotate_to_grid(u_east, u_north, angle):
    """Eastward and northward components to components along the grid lines (the inverse of
    :func:`rotate_to_geographic`)."""
    c, s = np.cos(angle), np.sin(angle)
    return u_east * c + u_north * s, -u_east * s + u_north * c


def _grid_of(da, argname, grid, radius, omega):
    if grid is not None:
        return grid
    radius = _validate.number(radius, "radius", units="m", example=constants.EARTH_RADIUS)
    omega = _validate.number(omega, "omega", units="rad s-1", example=constants.OMEGA)
    return CurvilinearGrid.from_data(da, argname=argname, radius=radius, omega=omega)


def _core_dims(da, grid, argname):
    ydim, xdim = grid.dims
    if ydim not in da.dims or xdim not in da.dims:
        raise GridError(
            f"{argname}: expected the model grid's dimensions {grid.dims}, found {da.dims}. "
            "Fix: pass fields on the grid of their 2-D latitude and longitude."
        )
    return [ydim, xdim]


def _apply(kernel, *arrays, grid, argname, n_out=1, kwargs=None):
    dims = _core_dims(arrays[0], grid, argname)
    arrays = [a.chunk({d: -1 for d in dims}) if a.chunks is not None else a for a in arrays]
    out = xr.apply_ufunc(
        kernel, *arrays,
        input_core_dims=[dims] * len(arrays),
        output_core_dims=[dims] * n_out,
        dask="parallelized",
        output_dtypes=[np.float64] * n_out,
        kwargs=kwargs or {},
    )
    return out


def _curl_kernel(ux, uy, *, grid):
    return stokes_curl(ux, uy, east=grid.east, north=grid.north, geometry=grid.stokes_geometry,
                       area=grid.cell_area, radius=grid.radius, orientation=grid.orientation,
                       neighbour=grid.neighbour)


def model_grid_curl(taux, tauy, *, grid: CurvilinearGrid | None = None,
                    radius: float = constants.EARTH_RADIUS) -> xr.DataArray:
    r"""Wind-stress curl on a curvilinear model grid, N m-3, by Stokes' theorem round each cell.

    Parameters
    ----------
    taux, tauy : xarray.DataArray (..., y, x)
        Eastward and northward stress (geographic components; rotate grid-line components
        first with :func:`rotate_to_geographic`), Pa, with 2-D ``lat``/``lon`` coordinates;
        missing on land.
    grid : CurvilinearGrid, optional
        Reuse a grid built once.

    Returns
    -------
    xarray.DataArray (..., y, x)
        ``wind_stress_curl``; NaN on land.

    Notes
    -----
    .. math:: \operatorname{curl}\tau \approx \frac{1}{A}\sum_{\text{edges}}
       \boldsymbol\tau_e\cdot\Delta\mathbf l_e

    with the stress on each edge the mean of the two cells it separates (extrapolated from the
    ocean side next to land) and :math:`\Delta\mathbf l_e` the edge's chord. Second-order in the
    interior (also on regular grids, where it is the centred flux-form difference), first-order
    next to land and at the grid's edges.
    """
    grid = _grid_of(taux, "taux", grid, radius, constants.OMEGA)
    tx = _validate.field(taux, "taux", "stress", default_units="Pa")
    ty = _validate.field(tauy, "tauy", "stress", default_units="Pa")
    curl = _apply(_curl_kernel, tx, ty, grid=grid, argname="taux", kwargs=dict(grid=grid))
    return curl.transpose(*taux.dims).rename("wind_stress_curl").assign_attrs(
        long_name="wind stress curl", units="N m-3",
        comment="vertical component of the curl of the surface stress, from the circulation "
        "round each model cell (Stokes' theorem); first-order next to land",
        grid=repr(grid),
    )


def model_grid_ekman(taux, tauy, *, grid=None, rho0: float = constants.RHO0,
                     equatorial_half_width: float = 3.0,
                     radius: float = constants.EARTH_RADIUS) -> xr.Dataset:
    r"""Ekman transport and pumping on a curvilinear model grid.

    :math:`U_E = \tau_y/(\rho_0 f)`, :math:`V_E = -\tau_x/(\rho_0 f)` (geographic
    components, m2 s-1) and :math:`w_E = \operatorname{curl}(\boldsymbol\tau/(\rho_0 f))`
    (m s-1, positive upward) with the curl of :func:`model_grid_curl`; missing within
    ``equatorial_half_width`` degrees of the equator, where :math:`1/f` diverges.
    """
    rho0 = _validate.number(rho0, "rho0", units="kg m-3", example=1025.0)
    equatorial_half_width = _validate.number(
        equatorial_half_width, "equatorial_half_width", sign="non-negative", units="degrees",
        example=3.0)
    grid = _grid_of(taux, "taux", grid, radius, constants.OMEGA)
    tx = _validate.field(taux, "taux", "stress", default_units="Pa")
    ty = _validate.field(tauy, "tauy", "stress", default_units="Pa")
    f = xr.DataArray(grid.f, dims=grid.dims)
    lat = xr.DataArray(grid.lat, dims=grid.dims)
    f = f.where((np.abs(lat) >= equatorial_half_width) & (lat != 0))
    ue = (ty / (rho0 * f))
    ve = (-tx / (rho0 * f))
    w = _apply(_curl_kernel, tx / (rho0 * f), ty / (rho0 * f), grid=grid, argname="taux",
               kwargs=dict(grid=grid))
    reason = (f"missing within {equatorial_half_width:g} degrees of the equator, where 1/f "
              "diverges and the Ekman balance fails")
    return xr.Dataset({
        "ekman_eastward_transport": ue.transpose(*taux.dims).assign_attrs(
            long_name="Ekman volume transport, eastward", units="m2 s-1", comment=reason),
        "ekman_northward_transport": ve.transpose(*taux.dims).assign_attrs(
            long_name="Ekman volume transport, northward", units="m2 s-1", comment=reason),
        "ekman_pumping": w.transpose(*taux.dims).assign_attrs(
            long_name="Ekman pumping velocity (positive upward)", units="m s-1",
            standard_name="upward_sea_water_velocity", comment=reason),
    }, attrs=dict(rho0=rho0, equatorial_half_width=equatorial_half_width))


# --- bands, basins and the westward order ---------------------------------------------------


@dataclass
class BandPlan:
    """Cells of each (basin, band) group in westward order, from grid and mask alone."""

    band_lat: np.ndarray          # (nb,) band centres
    band_edges: np.ndarray        # (nb + 1,)
    status: np.ndarray            # (n_basins, nb) int8
    east_lon: np.ndarray          # (n_basins, nb)
    west_lon: np.ndarray          # (n_basins, nb)
    # One triplet per (cell, valid band it overlaps), sorted run by run (a band splits into
    # runs at land), each from its eastern coast westward: the cell, the flat (basin, band) slot, the cell's share of the
    # band (A frac / (R dphi), m) and its fraction of latitude extent in the band.
    cell: np.ndarray
    slot: np.ndarray
    weight: np.ndarray
    share: np.ndarray
    starts: np.ndarray            # where each run's triplets begin (n_runs + 1,)
    n_cells: int


def _band_edges(grid, band_width):
    if band_width is None:
        # Three significant figures, so that a 1-degree grid gets 1-degree bands exactly.
        band_width = float(f"{grid.nominal_spacing:.3g}")
    if not (np.isfinite(band_width) and band_width > 0):
        raise InputError(
            f"band_width: expected a positive number of degrees, found {band_width!r}. "
            "Fix: e.g. band_width=1.0."
        )
    n = int(np.ceil(180.0 / band_width))
    return -90.0 + band_width * np.arange(n + 1)


def _label_basins(ocean, grid, min_area_km2):
    """Connected ocean regions through the grid's own neighbours (faces, the periodic seam and
    the north fold), largest first; regions under ``min_area_km2`` belong to no basin."""
    from scipy.sparse import coo_matrix
    from scipy.sparse.csgraph import connected_components

    n = ocean.size
    index = np.arange(n, dtype=np.float64).reshape(ocean.shape)
    wet = np.where(ocean, index, np.nan)
    src, dst = [], []
    for side in ("E", "N"):
        other = grid.neighbour(wet, side)
        link = ocean & np.isfinite(other)
        src.append(index[link].astype(np.int64))
        dst.append(other[link].astype(np.int64))
    src, dst = np.concatenate(src), np.concatenate(dst)
    graph = coo_matrix((np.ones(src.size), (src, dst)), shape=(n, n))
    _, lab = connected_components(graph, directed=False)
    lab = np.where(ocean.ravel(), lab, -1)
    area = (grid.cell_area / 1e6).ravel()
    ids = np.unique(lab[lab >= 0])
    sizes = np.bincount(lab[lab >= 0], weights=area[lab >= 0])[ids]
    keep = ids[sizes >= min_area_km2][np.argsort(-sizes[sizes >= min_area_km2])]
    bid = np.full(n, -1, dtype=np.int32)
    for k, root in enumerate(keep):
        bid[lab == root] = k
    return bid.reshape(ocean.shape), [f"basin_{k}" for k in range(len(keep))]


def _earth_basins(ocean, grid):
    """The regular-grid Earth basins carried over to the model grid by nearest neighbours."""
    from scipy.spatial import cKDTree

    from ..geometry.basins import basin_ids
    from ..geometry.curvilinear import _unit

    d = max(0.5, min(2.0, grid.nominal_spacing))
    lat = np.arange(-90 + d / 2, 90, d)
    lon = np.arange(d / 2, 360, d)
    la, lo = np.meshgrid(lat, lon, indexing="ij")
    tree = cKDTree(grid.xyz.reshape(-1, 3))
    _, near = tree.query(_unit(la, lo).reshape(-1, 3))
    reg = ocean.ravel()[near].reshape(la.shape)
    mask = xr.DataArray(reg, coords={"lat": lat, "lon": lon}, dims=("lat", "lon"))
    ids = basin_ids(mask, basins="earth")
    names = ids.attrs["flag_meanings"].split()
    back = cKDTree(_unit(la, lo).reshape(-1, 3))
    _, near2 = back.query(grid.xyz.reshape(-1, 3))
    bid = ids.values.ravel()[near2].reshape(ocean.shape).astype(np.int32)
    return np.where(ocean, bid, -1), names


def _polygon_basins(basins, ocean, grid):
    from matplotlib.path import Path

    bid = np.full(ocean.shape, -1, dtype=np.int32)
    names = list(basins)
    for k, name in enumerate(names):
        verts = np.asarray(basins[name], dtype=np.float64)
        if verts.ndim != 2 or verts.shape[1] != 2:
            raise InputError(
                f"basins['{name}']: expected a list of (lon, lat) vertices, found an array of "
                f"shape {verts.shape}. Fix: e.g. [(280, 10), (350, 10), (350, 45), (280, 45)]."
            )
        path = Path(verts)
        lon0 = verts[:, 0].min()
        lon = lon0 + np.mod(grid.lon - lon0, 360.0)
        pts = np.stack([lon.ravel(), grid.lat.ravel()], axis=1)
        inside = path.contains_points(pts).reshape(ocean.shape) & ocean & (bid < 0)
        bid[inside] = k
    return bid, names


def _basins_on_grid(basins, ocean, grid, min_area_km2):
    if basins is None:
        return _label_basins(ocean, grid, min_area_km2)
    if isinstance(basins, str):
        if basins != "earth":
            raise InputError(
                f"basins: expected None, 'earth', a DataArray of basin numbers on the model grid "
                f"or a dict of polygons, found '{basins}'. Fix: basins='earth'."
            )
        return _earth_basins(ocean, grid)
    if isinstance(basins, dict):
        return _polygon_basins(basins, ocean, grid)
    if isinstance(basins, xr.DataArray):
        if basins.shape != ocean.shape:
            raise GridError(
                f"basins: expected basin numbers on the model grid {ocean.shape}, found shape "
                f"{basins.shape}. Fix: compute them on the same grid."
            )
        vals = np.asarray(basins.values, dtype=np.float64)
        bid = np.where(np.isfinite(vals), vals, -1).astype(np.int32)
        meanings = str(basins.attrs.get("flag_meanings", "")).split()
        n = int(bid.max()) + 1 if bid.max() >= 0 else 0
        names = meanings if len(meanings) >= n else [f"basin_{k}" for k in range(n)]
        return np.where(ocean, bid, -1), names[:max(n, len(names))]
    raise InputError(
        f"basins: expected None, 'earth', a DataArray or a dict, found "
        f"{type(basins).__name__}. Fix: basins='earth'."
    )


_PLANS: dict = {}


def plan_bands(ocean, bid, n_basins, grid, *, band_width=None, equatorial_half_width=3.0,
               gap_factor=1.5) -> BandPlan:
    """:func:`_plan_bands`, cached on the grid, mask, basins and options (a loop over the
    fields of one model plans once)."""
    from ..geometry.curvilinear import _grid_key

    key = _grid_key(grid.lat, grid.lon, grid.corners_xyz, grid.periodic, grid.north_fold,
                    grid.radius, ocean, bid, n_basins, band_width, equatorial_half_width,
                    gap_factor)
    plan = _PLANS.get(key)
    if plan is None:
        if len(_PLANS) >= 8:
            _PLANS.pop(next(iter(_PLANS)))
        plan = _PLANS[key] = _plan_bands(ocean, bid, n_basins, grid, band_width=band_width,
                                         equatorial_half_width=equatorial_half_width,
                                         gap_factor=gap_factor)
    return plan


def _plan_bands(ocean, bid, n_basins, grid, *, band_width=None, equatorial_half_width=3.0,
                gap_factor=1.5) -> BandPlan:
    """Group the ocean cells by basin and latitude band and order each group westward.

    A gap in longitude between a band's ocean cells counts as land when it is wider than
    ``gap_factor`` typical cell widths of the band. Land gaps split the band into runs; each
    run is integrated westward from its own eastern coast and the band's transport is the sum
    over its runs (as for a row split by islands on regular grids). A band with no land gap
    has no eastern coast. The reported coasts are those of the widest run.
    """
    edges = _band_edges(grid, band_width)
    nb = edges.size - 1
    centres = 0.5 * (edges[1:] + edges[:-1])
    lat = grid.lat.ravel()
    lon = np.mod(grid.lon.ravel(), 360.0)
    band = np.clip(np.searchsorted(edges, lat, side="right") - 1, 0, nb - 1)
    dphi = np.deg2rad(np.diff(edges))
    b = bid.ravel()
    ok = ocean.ravel() & (b >= 0)
    equatorial = np.abs(centres) < equatorial_half_width
    status = np.full((n_basins, nb), 4, dtype=np.int8)
    east = np.full((n_basins, nb), np.nan)
    west = np.full((n_basins, nb), np.nan)
    runs = {}  # (basin, band) -> (east lons, extents in degrees, first run id)
    n_runs = 0
    key = np.where(ok, b * nb + band, -1)
    cells = np.flatnonzero(key >= 0)
    sort = cells[np.lexsort((lon[cells], key[cells]))]
    bounds = np.flatnonzero(np.diff(key[sort])) + 1
    typical = grid.nominal_spacing
    for part in (np.split(sort, bounds) if sort.size else []):
        k, j = divmod(int(key[part[0]]), nb)
        if equatorial[j]:
            status[k, j] = 1
            continue
        lons = lon[part]
        gaps = np.diff(np.concatenate([lons, [lons[0] + 360.0]]))
        width = typical / max(np.cos(np.deg2rad(centres[j])), 1e-3)
        land = np.flatnonzero(gaps > gap_factor * width)
        if land.size == 0:
            status[k, j] = 2
            continue
        status[k, j] = 0
        # Each run ends in the east at the western side of a land gap.
        e = lons[land] + 0.5 * width
        w = lons[(np.roll(land, 1) + 1) % lons.size] - 0.5 * width
        extent = np.mod(e - w, 360.0)
        widest = int(np.argmax(extent))
        east[k, j], west[k, j] = e[widest], w[widest]
        runs[(k, j)] = (e, extent, n_runs)
        n_runs += e.size

    # A cell adds to every valid band its latitude extent overlaps, by the share of the
    # extent in that band (cells straddle band edges on rotated grids).
    clat, _ = grid.corners_latlon
    corners = np.stack([clat[:-1, :-1], clat[:-1, 1:], clat[1:, 1:], clat[1:, :-1]])
    lo, hi = corners.min(axis=0).ravel(), corners.max(axis=0).ravel()
    span = np.maximum(hi - lo, 1e-12)
    first = np.clip(np.searchsorted(edges, lo, side="right") - 1, 0, nb - 1)
    last = np.clip(np.searchsorted(edges, hi, side="left") - 1, 0, nb - 1)
    parts = []
    idx = np.flatnonzero(ok)
    for off in range(int((last - first).max()) + 1 if idx.size else 0):
        j = first[idx] + off
        use = j <= last[idx]
        c, j = idx[use], j[use]
        frac = (np.minimum(hi[c], edges[j + 1]) - np.maximum(lo[c], edges[j])) / span[c]
        keep = (status[b[c], j] == 0) & (frac > 0)
        c, j, frac = c[keep], j[keep], frac[keep]
        area = grid.cell_area.ravel()[c]
        parts.append((c, b[c] * nb + j, frac * area / (grid.radius * dphi[j]), frac))
    if parts:
        c, sl, w, fr = (np.concatenate(x) for x in zip(*parts))
    else:
        c, sl, w, fr = (np.zeros(0, dt) for dt in (int, int, float, float))
    # Each triplet joins the run of its band whose span holds it (the nearest run to its east
    # when it sits over the band's land), and is ordered by its distance west of that run's
    # eastern coast.
    run = np.empty(c.size, dtype=np.int64)
    dist = np.empty(c.size)
    order = np.argsort(sl, kind="stable")
    seg = np.concatenate([[0], np.flatnonzero(np.diff(sl[order])) + 1, [order.size]])
    for a, z in zip(seg[:-1], seg[1:]):
        t = order[a:z]
        k, j = divmod(int(sl[t[0]]), nb)
        e, extent, r0 = runs[(k, j)]
        d = np.mod(e[None, :] - lon[c[t]][:, None], 360.0)
        inside = d <= extent[None, :] + 1e-9
        pick = np.where(inside.any(axis=1), np.argmax(inside, axis=1), np.argmin(d, axis=1))
        run[t] = r0 + pick
        dist[t] = d[np.arange(t.size), pick]
    o = np.lexsort((dist, run))
    c, sl, w, fr, run = c[o], sl[o], w[o], fr[o], run[o]
    starts = np.concatenate([[0], np.flatnonzero(np.diff(run)) + 1, [run.size]])
    return BandPlan(centres, edges, status, east, west, c.astype(np.int64),
                    sl.astype(np.int64), w, fr, starts.astype(np.int64), lat.size)


def _sverdrup_kernel(v, *, plan, n_basins):
    flat = v.reshape(v.shape[:-2] + (-1,))
    nb = plan.band_lat.size
    out = band_sums(flat, plan.cell, plan.slot, plan.weight, n_basins * nb)
    psi = westward_band_scan(flat, plan.cell, plan.weight, plan.share, plan.starts,
                             plan.n_cells)
    return (psi.reshape(v.shape) / constants.SVERDRUP_IN_M3_S,
            out.reshape(v.shape[:-2] + (n_basins, nb)) / constants.SVERDRUP_IN_M3_S)


def _ocean_of(taux, tauy, ocean_mask, grid):
    if ocean_mask is not None:
        vals = np.asarray(ocean_mask.values if isinstance(ocean_mask, xr.DataArray)
                          else ocean_mask)
        if vals.shape != grid.shape:
            raise GridError(
                f"ocean_mask: expected the model grid's shape {grid.shape}, found {vals.shape}. "
                "Fix: pass the mask of the same grid."
            )
        return _validate.mask(vals, "ocean_mask")
    seen = taux.notnull() & tauy.notnull()
    lead = [d for d in seen.dims if d not in grid.dims]
    if lead:
        seen = seen.any(lead)
    return np.asarray(seen.transpose(*grid.dims).values, dtype=bool)


def model_grid_sverdrup(taux, tauy, *, ocean_mask=None, basins=None, grid=None,
                        rho0: float = constants.RHO0, equatorial_half_width: float = 3.0,
                        band_width: float | None = None, min_basin_area_km2: float = 1e5,
                        radius: float = constants.EARTH_RADIUS,
                        omega: float = constants.OMEGA) -> xr.Dataset:
    r"""Sverdrup transport on a curvilinear model grid, by basin and latitude band.

    Parameters
    ----------
    taux, tauy : xarray.DataArray (..., y, x)
        Eastward and northward stress (geographic components), Pa, with 2-D latitude and
        longitude coordinates; missing on land.
    ocean_mask : array or DataArray (y, x), optional
        True/1 for ocean; by default where the stress is present.
    basins : None, "earth", DataArray (y, x) or dict of (lon, lat) polygons, optional
        ``None``: connected ocean regions (through faces, the periodic seam and the fold);
        ``"earth"``: the regular-grid Earth basins (:func:`sverdrup_kit.basin_ids`) carried to
        the model grid by nearest neighbours; a DataArray of basin numbers on the model grid
        (names from CF ``flag_meanings``); or polygons, a cell belonging to the first that
        contains its centre.
    band_width : float, optional
        Width of the latitude bands in degrees; default the grid's nominal spacing. Bands start
        at 90S.
    rho0, equatorial_half_width, radius, omega
        As for :func:`sverdrup_kit.sverdrup_transport`.

    Returns
    -------
    xarray.Dataset
        ``wind_stress_curl``, ``sverdrup_northward_transport`` (m2 s-1) and
        ``sverdrup_streamfunction`` (1e6 m3 s-1, zero at each band's eastern coast) on the
        model grid; ``interior_transport`` and ``boundary_current_transport`` (..., basin,
        lat) with ``lat`` the band centres; ``row_status``, ``eastern_coast_lon``,
        ``western_coast_lon`` (basin, lat); ``basin_id`` (y, x).
    """
    rho0 = _validate.number(rho0, "rho0", units="kg m-3", example=1025.0)
    equatorial_half_width = _validate.number(
        equatorial_half_width, "equatorial_half_width", sign="non-negative", units="degrees",
        example=3.0)
    min_basin_area_km2 = _validate.number(min_basin_area_km2, "min_basin_area_km2",
                                          sign="non-negative", units="km2", example=1e5)
    if band_width is not None:
        band_width = _validate.number(band_width, "band_width", units="degrees", example=1.0)
    grid = _grid_of(taux, "taux", grid, radius, omega)
    tx = _validate.field(taux, "taux", "stress", default_units="Pa")
    ty = _validate.field(tauy, "tauy", "stress", default_units="Pa")
    ocean = _ocean_of(taux, tauy, ocean_mask, grid)
    bid, names = _basins_on_grid(basins, ocean, grid, min_basin_area_km2)
    plan = plan_bands(ocean, bid, len(names), grid, band_width=band_width,
                      equatorial_half_width=equatorial_half_width)
    curl = _apply(_curl_kernel, tx, ty, grid=grid, argname="taux", kwargs=dict(grid=grid))
    beta = xr.DataArray(grid.beta, dims=grid.dims)
    v = curl / (rho0 * beta)
    dims = list(grid.dims)
    vv = v.chunk({d: -1 for d in dims}) if v.chunks is not None else v
    nb = plan.band_lat.size
    psi, transport = xr.apply_ufunc(
        _sverdrup_kernel, vv,
        input_core_dims=[dims],
        output_core_dims=[dims, ["basin", "lat"]],
        dask="parallelized",
        output_dtypes=[np.float64, np.float64],
        dask_gufunc_kwargs={"output_sizes": {"basin": len(names), "lat": nb}},
        kwargs=dict(plan=plan, n_basins=len(names)),
    )
    lead = [d for d in taux.dims if d not in dims]
    transport = transport.transpose(*lead, "basin", "lat")
    coords = {"basin": np.array(names, dtype=object),
              "lat": ("lat", plan.band_lat, {"units": "degrees_north",
                                             "standard_name": "latitude",
                                             "long_name": "centre of the latitude band"})}
    transport = transport.assign_coords(coords)
    flag = {"flag_values": np.array(list(BAND_STATUS), dtype=np.int8),
            "flag_meanings": " ".join(n for n, _ in BAND_STATUS.values()),
            "comment": "; ".join(f"{k} {n}: {w}" for k, (n, w) in BAND_STATUS.items())}
    ds = xr.Dataset({
        "wind_stress_curl": curl.transpose(*taux.dims).assign_attrs(
            long_name="wind stress curl", units="N m-3"),
        "sverdrup_northward_transport": v.transpose(*taux.dims).assign_attrs(
            long_name="Sverdrup meridional transport per unit width", units="m2 s-1"),
        "sverdrup_streamfunction": psi.transpose(*taux.dims).assign_attrs(
            long_name="Sverdrup transport streamfunction", units=SV_UNITS,
            comment="band by band, westward from the band's eastern coast, cells in order of "
            "longitude; zero at the eastern coast"),
        "interior_transport": transport.assign_attrs(
            long_name="Sverdrup interior transport across the basin", units=SV_UNITS,
            comment="sum over the basin's ocean cells in the latitude band of V A / (R dphi), "
            "positive northward"),
        "boundary_current_transport": (-transport).assign_attrs(
            long_name="western boundary current transport implied by Sverdrup balance",
            units=SV_UNITS),
        "row_status": (("basin", "lat"), plan.status, {
            "long_name": "status of the Sverdrup interior transport of each basin band",
            **flag}),
        "eastern_coast_lon": (("basin", "lat"), plan.east_lon, {
            "long_name": "longitude of the band's eastern coast", "units": "degrees_east",
            "standard_name": "longitude"}),
        "western_coast_lon": (("basin", "lat"), plan.west_lon, {
            "long_name": "longitude of the band's western end", "units": "degrees_east",
            "standard_name": "longitude"}),
        "basin_id": (tuple(dims), bid, {
            "long_name": "ocean basin number",
            "flag_values": np.arange(len(names), dtype=np.int32),
            "flag_meanings": " ".join(names)}),
    }, coords=coords)
    ds.attrs.update(rho0=rho0, equatorial_half_width=equatorial_half_width,
                    band_width_deg=float(np.diff(plan.band_edges)[0]),
                    grid=repr(grid), corners_from=grid.corners_from,
                    method="curvilinear: Stokes curl per cell, latitude-band sums")
    return ds


def model_circulation(u, v, *, thickness=None, depth_dim=None, taux=None, tauy=None,
                      grid=None, components="geographic", angle=None, ocean_mask=None,
                      basins=None, band_width=None, rho0: float = constants.RHO0,
                      equatorial_half_width: float = 3.0,
                      radius: float = constants.EARTH_RADIUS) -> xr.Dataset:
    r"""The model's own depth-integrated circulation, beside the Sverdrup transport of its stress.

    Parameters
    ----------
    u, v : xarray.DataArray (..., [depth], y, x)
        Velocities (m s-1) with ``thickness`` (m, layer or cell thickness, same shape or
        broadcastable), or depth-integrated transports per unit width (m2 s-1) without it.
    components : {"geographic", "grid"}, optional
        Whether ``u``, ``v`` are eastward/northward or along the grid lines; grid-line
        components are rotated with ``angle`` (radians from east to the grid's x direction;
        default: computed from the coordinates).
    taux, tauy : xarray.DataArray, optional
        The model's own stress; when given, the Sverdrup transport of
        :func:`model_grid_sverdrup` over the same bands and basins is added with the
        difference.

    Returns
    -------
    xarray.Dataset
        ``model_northward_transport`` (m2 s-1) and ``model_streamfunction`` (1e6 m3 s-1, from
        the same westward band integral as the Sverdrup streamfunction) on the model grid;
        ``model_interior_transport`` (basin, lat), and with stress also
        ``interior_transport`` (Sverdrup) and ``transport_difference`` (model minus Sverdrup).
    """
    rho0 = _validate.number(rho0, "rho0", units="kg m-3", example=1025.0)
    equatorial_half_width = _validate.number(
        equatorial_half_width, "equatorial_half_width", sign="non-negative", units="degrees",
        example=3.0)
    grid = _grid_of(u, "u", grid, radius, constants.OMEGA)
    if thickness is not None:
        if depth_dim is None:
            extra = [d for d in u.dims if d not in grid.dims and d in thickness.dims]
            if len(extra) != 1:
                raise InputError(
                    f"depth_dim: expected the name of the depth dimension, found candidates "
                    f"{extra}. Fix: pass depth_dim='lev' (or the model's name)."
                )
            depth_dim = extra[0]
        U = (u * thickness).sum(depth_dim, skipna=True, min_count=1)
        V = (v * thickness).sum(depth_dim, skipna=True, min_count=1)
    else:
        U, V = u, v
    if components == "grid":
        a = grid.angle if angle is None else np.asarray(angle)
        a = xr.DataArray(a, dims=grid.dims)
        U, V = rotate_to_geographic(U, V, a)
    elif components != "geographic":
        raise InputError(
            f"components: expected 'geographic' or 'grid', found {components!r}. Fix: "
            "components='grid' for velocities along the model's grid lines."
        )
    ocean = _ocean_of(U, V, ocean_mask, grid)
    bid, names = _basins_on_grid(basins, ocean, grid, 1e5)
    plan = plan_bands(ocean, bid, len(names), grid, band_width=band_width,
                      equatorial_half_width=equatorial_half_width)
    dims = list(grid.dims)
    psi, transport = xr.apply_ufunc(
        _sverdrup_kernel, V.chunk({d: -1 for d in dims}) if V.chunks is not None else V,
        input_core_dims=[dims], output_core_dims=[dims, ["basin", "lat"]],
        dask="parallelized", output_dtypes=[np.float64, np.float64],
        dask_gufunc_kwargs={"output_sizes": {"basin": len(names), "lat": plan.band_lat.size}},
        kwargs=dict(plan=plan, n_basins=len(names)),
    )
    lead = [d for d in V.dims if d not in dims]
    coords = {"basin": np.array(names, dtype=object),
              "lat": ("lat", plan.band_lat, {"units": "degrees_north",
                                             "standard_name": "latitude"})}
    ds = xr.Dataset({
        "model_northward_transport": V.assign_attrs(
            long_name="depth-integrated northward transport of the model", units="m2 s-1"),
        "model_streamfunction": psi.transpose(*V.dims).assign_attrs(
            long_name="streamfunction of the model's depth-integrated flow", units=SV_UNITS,
            comment="westward from each band's eastern coast; zero there"),
        "model_interior_transport": transport.transpose(*lead, "basin", "lat")
        .assign_coords(coords).assign_attrs(
            long_name="northward transport of the model across the basin", units=SV_UNITS),
        "basin_id": (tuple(dims), bid, {"flag_meanings": " ".join(names)}),
    }, coords=coords)
    if taux is not None and tauy is not None:
        basin_da = xr.DataArray(bid, dims=grid.dims, attrs={"flag_meanings": " ".join(names)})
        sv = model_grid_sverdrup(taux, tauy, ocean_mask=ocean, basins=basin_da, grid=grid,
                                 rho0=rho0, equatorial_half_width=equatorial_half_width,
                                 band_width=band_width)
        ds["interior_transport"] = sv.interior_transport
        ds["transport_difference"] = (ds.model_interior_transport - sv.interior_transport
                                      ).assign_attrs(long_name="model minus Sverdrup interior "
                                                     "transport", units=SV_UNITS)
        ds["row_status"] = sv.row_status
    return ds
