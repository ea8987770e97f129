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

Land, basins and seas follow the regular grids' rules (issue 10), worked out on the model's
own cells by :mod:`sverdrup_kit.geometry.bands`: land bodies are labelled through the grid's
neighbours (seam and fold included) and classed by their areas from the model's cells; the Earth
basins and seas come from the same dividing lines, straits and outlines; in each band a basin's
water splits into runs at land, small islands are crossed (their stress filled from the ocean
round them), runs either side of one large island count together, and runs cut off by a
continent or an excluded sea are marginal seas, not counted. The band status uses the regular
grids' ``row_status`` flags.

What is approximate here (and exact on regular grids with the regular-grid functions): next to
land and at the edge of the grid the curl is first-order; which cells a band counts is decided by
their centres, so a coast that cuts a band obliquely may count a cell in one band and not the
next; the streamfunction is a band mean. Not available on model grids: Godfrey's island rule
(the streamfunction restarts at zero west of each large island), the ``over_shelf`` and
``mostly_filled`` cautions, and the automatic split of one connected ocean at a continent's tip.
"""

from __future__ import annotations

import numpy as np
import xarray as xr

from .. import _validate, constants
from .._apply import _bare
from .._compiled.scan import fill_from_neighbours_numpy
from .._compiled.stokes import band_sums, stokes_curl, westward_band_scan
from ..errors import GridError, InputError
from ..geometry.bands import model_geometry
from ..geometry.basins import MIN_WIDTH, basin_id_attrs
from ..geometry.curvilinear import CurvilinearGrid
from ..geometry.land import (CONTINENT_MIN_AREA, ISLAND_MIN_AREA, LAND_CLASSES,
                             SMALL_ISLAND)
from ..geometry.rows import CELL_CLASS, ROW_STATUS

__all__ = [
    "model_grid_curl",
    "model_grid_ekman",
    "model_grid_sverdrup",
    "model_circulation",
    "rotate_to_geographic",
    "rotate_to_grid",
]

SV_UNITS = "1e6 m3 s-1"


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
    ue, ve, w = (_bare(x) for x in (ue, ve, w))
    return xr.Dataset({
        "ekman_eastward_transport": ue.transpose(*taux.dims).assign_attrs(
            long_name="Ekman volume transport, eastward", units="m2 s-1", comment=reason),
        "ekman_northward_transport": ve.transpose(*taux.dims).assign_attrs(
            long_name="Ekman volume transport, northward", units="m2 s-1", comment=reason),
        "ekman_pumping": w.transpose(*taux.dims).assign_attrs(
            long_name="Ekman pumping velocity (positive upward)", units="m s-1",
            standard_name="upward_sea_water_velocity", comment=reason),
    }, attrs=dict(rho0=rho0, equatorial_half_width=equatorial_half_width))


def _sverdrup_kernel(v, *, plan, n_basins):
    flat = v.reshape(v.shape[:-2] + (-1,))
    nb = plan.band_lat.size
    out = band_sums(flat, plan.sum_cell, plan.sum_slot, plan.sum_weight, n_basins * nb)
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


def _fill_kernel(tx, ty, *, target, keep_missing, neighbour):
    """Stress on small islands (and, unless ``keep_missing``, in gaps of the ocean) by
    nearest-ocean averaging through the model grid's neighbours, as on regular grids."""
    missing = np.isnan(tx) | np.isnan(ty)
    tx, ty = np.where(missing, np.nan, tx), np.where(missing, np.nan, ty)
    fx = fill_from_neighbours_numpy(tx, target=target, periodic=False, neighbour=neighbour)
    fy = fill_from_neighbours_numpy(ty, target=target, periodic=False, neighbour=neighbour)
    if keep_missing is None:
        return fx, fy
    stay = missing & keep_missing
    return np.where(stay, np.nan, fx), np.where(stay, np.nan, fy)


def _flags(table):
    return {"flag_values": np.array(list(table), dtype=np.int8),
            "flag_meanings": " ".join(n for n, _ in table.values()),
            "comment": "; ".join(f"{k} {n}: {w}" for k, (n, w) in table.items())}


def model_grid_sverdrup(taux, tauy, *, ocean_mask=None, basins=None, grid=None,
                        rho0: float = constants.RHO0, equatorial_half_width: float = 3.0,
                        band_width: float | None = None, min_basin_area_km2: float = 1e5,
                        island_min_area_km2: float = ISLAND_MIN_AREA,
                        continent_min_area_km2: float = CONTINENT_MIN_AREA,
                        min_width_km: float = MIN_WIDTH, fill_gaps: bool = True,
                        land_connectivity: int = 4, land_classes=None, seas=None,
                        max_gyre_boundaries: int = 8, gyre_threshold_sv: float | None = None,
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
        ``None``: on a global grid whose mask shows the Earth's continents, the Earth basins
        (``earth (detected)``); otherwise connected water regions (through faces, the
        periodic seam and the fold; not split at continents' tips as on regular grids).
        ``"earth"``: the Atlantic, Pacific and Indian Oceans, labelled through the model
        grid's own neighbours and cut where a link between two cell centres crosses a line of
        :data:`~sverdrup_kit.geometry.basins.EARTH_DIVIDING_LINES`. A DataArray of basin
        numbers on the model grid (names from CF ``flag_meanings``); or polygons, a cell
        belonging to the first that contains its centre.
    band_width : float, optional
        Width of the latitude bands in degrees; default the grid's nominal spacing. Bands start
        at 90S.
    island_min_area_km2, continent_min_area_km2, min_width_km, fill_gaps, land_connectivity,
    land_classes, seas
        As for :func:`sverdrup_kit.sverdrup_transport`; land bodies are labelled through the
        model grid's neighbours and measured with its cell areas.
    rho0, equatorial_half_width, radius, omega
        As for :func:`sverdrup_kit.sverdrup_transport`.

    Returns
    -------
    xarray.Dataset
        ``wind_stress_curl``, ``sverdrup_northward_transport`` (m2 s-1) and
        ``sverdrup_streamfunction`` (1e6 m3 s-1, zero at each run's eastern coast) on the
        model grid; ``interior_transport`` and ``boundary_current_transport`` (..., basin,
        lat) with ``lat`` the band centres; ``row_status`` (the regular grids' flags),
        ``eastern_coast_lon``, ``western_coast_lon`` (basin, lat); ``basin_id``,
        ``land_class`` and ``integration_class`` (y, x); with the Earth basins
        ``crossed_seas`` and ``ending_seas`` (basin, lat).
    """
    rho0 = _validate.number(rho0, "rho0", units="kg m-3", example=1025.0)
    equatorial_half_width = _validate.number(
        equatorial_half_width, "equatorial_half_width", sign="non-negative", units="degrees",
        example=3.0)
    min_basin_area_km2 = _validate.number(min_basin_area_km2, "min_basin_area_km2",
                                          sign="non-negative", units="km2", example=1e5)
    island_min_area_km2 = _validate.number(island_min_area_km2, "island_min_area_km2",
                                           sign="non-negative", units="km2", example=1e5)
    continent_min_area_km2 = _validate.number(continent_min_area_km2, "continent_min_area_km2",
                                              sign="non-negative", units="km2", example=5e6)
    min_width_km = _validate.number(min_width_km, "min_width_km", sign="non-negative",
                                    units="km", example=MIN_WIDTH)
    if band_width is not None:
        band_width = _validate.number(band_width, "band_width", units="degrees", example=1.0)
    grid = _grid_of(taux, "taux", grid, radius, omega)
    tx = _validate.field(taux, "taux", "stress", default_units="Pa")
    ty = _validate.field(tauy, "tauy", "stress", default_units="Pa")
    ocean = _ocean_of(taux, tauy, ocean_mask, grid)
    geom = model_geometry(
        grid, ocean, basins=basins, island_min_area_km2=island_min_area_km2,
        continent_min_area_km2=continent_min_area_km2, min_width_km=min_width_km,
        equatorial_half_width=equatorial_half_width, band_width=band_width,
        land_connectivity=land_connectivity, land_classes=land_classes, seas=seas,
        min_basin_area_km2=min_basin_area_km2)
    plan, names, bid = geom.plan, geom.names, geom.basin_id
    cls = geom.land.cls
    water = cls <= SMALL_ISLAND
    if (water & ~ocean).any() or fill_gaps:
        tx, ty = _apply(_fill_kernel, tx, ty, grid=grid, argname="taux", n_out=2, kwargs=dict(
            target=water, keep_missing=None if fill_gaps else ocean,
            neighbour=grid.neighbour))
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
    curl, v, psi = (_grid_coords_apart(x) for x in (curl, v, psi))
    transport = _bare(transport)
    ds = xr.Dataset({
        "wind_stress_curl": curl.transpose(*taux.dims).assign_attrs(
            long_name="wind stress curl", units="N m-3",
            comment="small islands and gaps filled by nearest-ocean averaging first"),
        "sverdrup_northward_transport": v.transpose(*taux.dims).assign_attrs(
            long_name="Sverdrup meridional transport per unit width", units="m2 s-1"),
        "sverdrup_streamfunction": psi.transpose(*taux.dims).assign_attrs(
            long_name="Sverdrup transport streamfunction", units=SV_UNITS,
            comment="band by band, westward from each run's eastern coast, cells in order of "
            "longitude; zero at the eastern coast; restarts west of each large island"),
        "interior_transport": transport.assign_attrs(
            long_name="Sverdrup interior transport across the basin", units=SV_UNITS,
            comment="sum over the basin's counted cells in the latitude band of V A / (R dphi), "
            "positive northward; small islands crossed, large islands start a new run, "
            "marginal seas not counted"),
        "boundary_current_transport": (-transport).assign_attrs(
            long_name="western boundary current transport implied by Sverdrup balance",
            units=SV_UNITS),
        "row_status": (("basin", "lat"), plan.status, {
            "long_name": "status of the Sverdrup interior transport of each basin band",
            **_flags(ROW_STATUS)}),
        "eastern_coast_lon": (("basin", "lat"), plan.east_lon, {
            "long_name": "longitude of the band's eastern coast", "units": "degrees_east",
            "standard_name": "longitude"}),
        "western_coast_lon": (("basin", "lat"), plan.west_lon, {
            "long_name": "longitude of the band's western end", "units": "degrees_east",
            "standard_name": "longitude"}),
        "basin_id": (tuple(dims), bid.astype(np.int32), basin_id_attrs(names)),
        "land_class": (tuple(dims), cls.copy(), {
            "long_name": "land class",
            "flag_values": np.arange(4, dtype=np.int8),
            "flag_meanings": "ocean " + " ".join(v[0] for v in LAND_CLASSES.values()),
            "comment": "; ".join(f"{v[0]}: {v[1]}" for v in LAND_CLASSES.values())}),
        "integration_class": (tuple(dims), plan.cell_class.copy(), {
            "long_name": "role of each cell (by its centre's band) in the band integral",
            **_flags(CELL_CLASS)}),
    }, coords=coords)
    # Gyre boundaries between valid bands, as on regular grids.
    from .sverdrup import GYRE_THRESHOLD_SV, boundaries_of, boundary_attrs

    threshold = GYRE_THRESHOLD_SV if gyre_threshold_sv is None else gyre_threshold_sv
    valid = xr.DataArray(plan.status == 0, dims=("basin", "lat"))
    found = boundaries_of(ds["interior_transport"], valid, lat_name="lat", lat=plan.band_lat,
                          max_gyre_boundaries=max_gyre_boundaries, threshold=threshold)
    for (name, attrs), da in zip(boundary_attrs(threshold).items(), found):
        ds[name] = _bare(da).assign_attrs(attrs)
    ds.attrs["gyre_threshold_sv"] = threshold
    if geom.basins_used.startswith("earth"):
        ds["crossed_seas"] = (("basin", "lat"), plan.crossed_seas.astype(str), {
            "long_name": "named seas that the band's counted ocean crosses"})
        ds["ending_seas"] = (("basin", "lat"), plan.ending_seas.astype(str), {
            "long_name": "excluded seas whose edge ends the band's counted ocean"})
    ds.attrs.update(rho0=rho0, equatorial_half_width=equatorial_half_width,
                    band_width_deg=float(np.diff(plan.band_edges)[0]),
                    island_min_area_km2=island_min_area_km2,
                    continent_min_area_km2=continent_min_area_km2, min_width_km=min_width_km,
                    basins=geom.basins_used, land_connectivity=land_connectivity,
                    grid=repr(grid), corners_from=grid.corners_from,
                    method="curvilinear: Stokes curl per cell, latitude-band sums")
    return ds


#: Names of the model grid's own latitude and longitude in results that also carry a ``lat``
#: band coordinate (the band sums): CF finds them by their standard names.
GRID_LAT, GRID_LON = "grid_lat", "grid_lon"


def grid_coords_apart(obj, names=None):
    """``obj`` (DataArray or Dataset) with the model grid's two-dimensional latitude and
    longitude named apart from the ``lat`` of the latitude bands (a Dataset holds one variable
    of each name), with their CF attributes. ``names``: the two coordinates' names (found by
    their CF attributes when not given)."""
    from ..geometry.curvilinear import find_curvilinear_coords

    names = find_curvilinear_coords(obj) if names is None else names
    if names is None or not {"lat", "lon"} & set(names):
        return obj
    obj = obj.rename({names[0]: GRID_LAT, names[1]: GRID_LON})
    for name, std, units in ((GRID_LAT, "latitude", "degrees_north"),
                             (GRID_LON, "longitude", "degrees_east")):
        obj[name].attrs = {**obj[name].attrs, "standard_name": std, "units": units,
                           "long_name": f"{std} of the model grid's cell centres"}
    return obj


def _grid_coords_apart(da: xr.DataArray) -> xr.DataArray:
    """A native-grid output: no attributes of its own (they came from the stress), and the
    grid's coordinates named apart from the bands (:func:`grid_coords_apart`)."""
    return grid_coords_apart(_bare(da))


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
    geom = model_geometry(grid, ocean, basins=basins, island_min_area_km2=ISLAND_MIN_AREA,
                          continent_min_area_km2=CONTINENT_MIN_AREA, min_width_km=MIN_WIDTH,
                          equatorial_half_width=equatorial_half_width, band_width=band_width)
    plan, names, bid = geom.plan, geom.names, geom.basin_id
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
    V, psi = (_grid_coords_apart(x) for x in (V, psi))
    transport = _bare(transport)
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
        sv = model_grid_sverdrup(taux, tauy, ocean_mask=ocean, basins=basins, grid=grid,
                                 rho0=rho0, equatorial_half_width=equatorial_half_width,
                                 band_width=band_width)
        ds["interior_transport"] = sv.interior_transport
        ds["transport_difference"] = (ds.model_interior_transport - sv.interior_transport
                                      ).assign_attrs(long_name="model minus Sverdrup interior "
                                                     "transport", units=SV_UNITS)
        ds["row_status"] = sv.row_status
    return ds
