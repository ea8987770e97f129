r"""Sverdrup transport integrated westward from eastern coasts, basin by basin.

The geometry of the integral (basins, islands, coasts, marginal seas, rows left empty) comes
from :mod:`sverdrup_kit.geometry` and is cached per grid, mask and options
(:mod:`sverdrup_kit.geometry.integral`); each time step costs one pass of compiled kernels: the
gap fill, the coast-aware curl (the kernel of
:func:`~sverdrup_kit.physics.operators.wind_stress_curl`), V and the westward scan
(:mod:`sverdrup_kit._compiled.dispatch`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import xarray as xr

from .. import _validate, constants
from .._apply import _bare, whole_fields
from .._compiled.dispatch import coverage, curl_kernel, fill_pair, westward_scan
from .._compiled.scan import gyre_boundaries, sum_groups
from ..errors import InputError
from ..geometry.basins import (
    CELL_CLASS,
    CONTINENT_MIN_AREA,
    ISLAND_MIN_AREA,
    MIN_WIDTH,
    OCEAN,
    ROW_STATUS,
    _as_bool,
    _mask_on_grid,
    basin_id_attrs,
)
from ..geometry.integral import SverdrupGeometry, build_geometry, relief_depth
from ..geometry.land import LAND_CLASSES
from ..geometry.rows import MOSTLY_FILLED, VALID
from ..geometry.coords import (
    GridLayout,
    check_same_grid,
    from_canonical,
    require_dataarray,
    to_canonical,
)
from ..geometry.curvilinear import is_curvilinear
from ..geometry.grid import SphericalGrid
from .ekman import DEFAULT_EQUATORIAL_HALF_WIDTH
from .island_rule import add_island_variables, land_geometry_from, sverdrup_island_constants

__all__ = ["sverdrup_transport"]

SV_UNITS = "1e6 m3 s-1"

#: Default size (1e6 m3 s-1) a transport must reach on both sides of a sign change for it to
#: count as a gyre boundary: about 10% of a 20 Sv subtropical gyre, the uncertainty of an
#: effective drag coefficient on monthly winds (Trenberth, Large & Olson 1989, J. Climate 2,
#: 1507) -- smaller wiggles about zero are noise of the stress, not boundaries between gyres.
GYRE_THRESHOLD_SV = 2.0

#: Rows whose counted cells were observed less often than this are ``mostly_filled``.
MIN_OBSERVED_FRACTION = 0.5


def _land_geometry_cached(geometry, layout):
    """The island rule's view of ``geometry``, kept with it (geometry is cached per grid, mask
    and options, so the island paths worked out on this view are reused across fields)."""
    cache = geometry.__dict__.setdefault("_land_views", {})
    key = (layout.lat_name, layout.lon_name)
    if key not in cache:
        cache[key] = land_geometry_from(geometry, layout)
    return cache[key]


def _field_kernel(tx, ty, *, target, keep_missing, periodic, phi, lam, radius, pole, inv_rb,
                  dx_sv, plan, n_basins):
    """One field's whole pass: gap fill (both components missing where either is), the curl
    with pole rows masked, V, the westward scan (in Sv), and each row's observed coverage."""
    fx, fy = fill_pair(tx, ty, target=target, periodic=periodic, keep_missing=keep_missing)
    curl = curl_kernel(fx, fy, phi, lam, periodic=periodic, radius=radius)
    # Cells touching the pole: 1/cos(phi) makes their curl spikes, not data.
    curl[..., pole, :] = np.nan
    v = curl * inv_rb[:, None]
    # dx in units of 1e6 m2: the scan returns psi and run totals in Sv, no pass to rescale.
    psi, totals = westward_scan(v, dx_sv, plan.cells, plan.run_starts)
    ny = v.shape[-2]
    t = sum_groups(totals, plan.group_runs, plan.group_starts, plan.group_slot, n_basins * ny)
    t = t.reshape(t.shape[:-1] + (n_basins, ny))
    obs = coverage(tx, ty, plan.count_cells, plan.count_starts, plan.count_slot, n_basins * ny)
    obs = obs.reshape(obs.shape[:-1] + (n_basins, ny))
    return fx, fy, curl, v, psi, t, obs


def _boundaries_kernel(t, valid, *, lat, max_gyre_boundaries, threshold):
    """Gyre boundaries above ``threshold`` and every raw sign change."""
    kw = dict(lat=lat, max_gyre_boundaries=max_gyre_boundaries)
    return (*gyre_boundaries(t, valid, threshold=threshold, **kw),
            *gyre_boundaries(t, valid, threshold=0.0, **kw))


def boundaries_of(transport, valid, *, lat_name, lat, max_gyre_boundaries, threshold):
    """Gyre boundaries of ``transport`` (..., basin, lat) between ``valid`` rows: those above
    ``threshold`` (Sv on both sides) and every raw sign change, with their counts."""
    return xr.apply_ufunc(
        _boundaries_kernel, transport, valid,
        input_core_dims=[["basin", lat_name], ["basin", lat_name]],
        output_core_dims=[["basin", "gyre_boundary"], ["basin"]] * 2,
        dask="parallelized",
        output_dtypes=[np.float64, np.int64] * 2,
        dask_gufunc_kwargs={"output_sizes": {"gyre_boundary": max_gyre_boundaries}},
        kwargs=dict(lat=lat, max_gyre_boundaries=max_gyre_boundaries, threshold=threshold),
    )


def boundary_attrs(threshold):
    """Attributes of gyre_boundary_lat/_count and raw_gyre_boundary_lat/_count."""
    return {
        "gyre_boundary_lat": dict(
            long_name="latitude where the interior transport changes sign",
            units="degrees_north", standard_name="latitude",
            comment=f"sign changes where the interior transport reaches {threshold:g} Sv on "
            "both sides, between valid rows only; every sign change is in "
            "raw_gyre_boundary_lat"),
        "gyre_boundary_count": dict(
            long_name="number of sign changes of the interior transport", units="1",
            comment="may exceed the length of the gyre_boundary dimension"),
        "raw_gyre_boundary_lat": dict(
            long_name="latitude of every sign change of the interior transport",
            units="degrees_north", standard_name="latitude",
            comment="between neighbouring valid rows, without the threshold of "
            "gyre_boundary_lat"),
        "raw_gyre_boundary_count": dict(
            long_name="number of sign changes of the interior transport", units="1"),
    }


def _ocean_from(taux, tauy, ocean_mask, layout):
    if ocean_mask is not None:
        return _as_bool(_mask_on_grid(ocean_mask, taux, layout, "ocean_mask"), "ocean_mask")
    lat, lon = layout.lat_name, layout.lon_name
    seen = taux.notnull() & tauy.notnull()
    lead = [d for d in seen.dims if d not in (lat, lon)]
    if lead:
        seen = seen.any(lead)
    return np.asarray(to_canonical(seen, layout).transpose(lat, lon).values, dtype=bool)


def sverdrup_transport(
    taux,
    tauy,
    *,
    ocean_mask=None,
    basins=None,
    rho0: float = constants.RHO0,
    equatorial_half_width: float = DEFAULT_EQUATORIAL_HALF_WIDTH,
    island_min_area_km2: float = ISLAND_MIN_AREA,
    continent_min_area_km2: float = CONTINENT_MIN_AREA,
    min_width_km: float = MIN_WIDTH,
    fill_gaps: bool = True,
    max_gyre_boundaries: int = 8,
    gyre_threshold_sv: float = GYRE_THRESHOLD_SV,
    land_connectivity: int = 4,
    land_classes=None,
    seas=None,
    relief=None,
    shelf_depth_m: float = 1000.0,
    geometry: SverdrupGeometry | None = None,
    island_rule: bool = True,
    radius: float = constants.EARTH_RADIUS,
    omega: float = constants.OMEGA,
) -> xr.Dataset:
    r"""Sverdrup transport from wind stress, integrated westward from each eastern coast.

    Parameters
    ----------
    taux, tauy : xarray.DataArray (..., lat, lon)
        Eastward and northward surface stress in Pa (N m-2, dyn cm-2 converted; no units
        attribute is read as Pa), on the same grid, missing on land. Any latitude order and
        longitude convention; leading dimensions (time, member, ...) pass through.
    ocean_mask : xarray.DataArray (lat, lon), optional
        True (or 1) for ocean on the grid of ``taux``, e.g. from topography. Without it the
        ocean is every cell where the stress is present in at least one step of the leading
        dimensions; for dask-backed stress that needs one pass over the data at call time, so
        pass ``ocean_mask`` to keep the call fully lazy.
    basins : None, "earth", xarray.DataArray or dict, optional
        ``None``: on a global grid whose mask shows the Earth's continents
        (:func:`~sverdrup_kit.geometry.earth.looks_like_earth`), the Earth basins as for
        ``"earth"``, said in the attribute ``basins`` and once per session as an
        :class:`~sverdrup_kit.geometry.integral.EarthBasinsNotice`; otherwise connected ocean
        regions of the mask (faces only, longitude wrapping on a
        global grid), named ``basin_0``, ``basin_1``, ... by decreasing area; water bodies
        smaller than ``island_min_area_km2`` are left out. Where two oceans larger than
        :data:`~sverdrup_kit.geometry.basins.SEPARATE_OCEAN_AREA` (1e7 km2) meet beyond a continent's
        tip they become separate basins, and the rows beyond the tip a third; smaller branches
        (gulfs) stay with the ocean they open into. Oceans joined through an archipelago (the
        real Earth's Indonesian seas) stay one basin: use ``"earth"`` there.
        ``"earth"``: the Atlantic, Pacific and Indian Oceans of the real Earth, both
        hemispheres, cut along :data:`~sverdrup_kit.geometry.basins.EARTH_DIVIDING_LINES`: 20E south of
        Cape Agulhas, 147E south of Tasmania and across Bass Strait, 68W south of Cape Horn
        and 70W across the Strait of Magellan, a line through the Indonesian passages from
        the Strait of Malacca along the Lesser Sunda Islands to near Darwin, and along Central
        America (Tehuantepec, Panama); rows ending on the lines that stand for land or a
        shallow strait (:data:`~sverdrup_kit.geometry.basins.EARTH_COASTAL_LINES`) end on a coast,
        rows ending on the open-ocean lines have none. The Arctic and Nordic Seas north of
        65.5N, the Mediterranean and the Black Sea belong to none.
        A DataArray of basin numbers (-1 or NaN outside; names from CF
        ``flag_values``/``flag_meanings`` when present, so the ``basin_id`` of an earlier
        result can be passed back). A dict name -> boolean DataArray (masks must not overlap)
        or name -> list of (lon, lat) polygon vertices in degrees (a cell belongs to the first
        polygon that contains its centre).
    rho0 : float, optional
        Reference sea-water density, kg m-3.
    equatorial_half_width : float, optional
        Half-width in degrees of the band around the equator left empty, the same default as
        :func:`~sverdrup_kit.physics.ekman.ekman`. V itself has no f and stays finite there;
        the band is left out because the split into Ekman and geostrophic parts (both as
        1/f) fails and equatorial dynamics (undercurrents, nonlinearity, friction) break the
        balance.
    island_min_area_km2 : float, optional
        km2. Land bodies smaller than this are *small islands*: the integral runs across them
        with the stress filled in from the surrounding ocean (nearest-ocean averaging), so
        they add the transport of the interpolated wind over their width. Larger land bodies
        end a run; a *large island* (below ``continent_min_area_km2``) starts a new run at its
        western coast, and that run counts in the basin's interior transport.
    continent_min_area_km2 : float, optional
        km2. Land bodies at least this large, and land cut by the edge of a regional grid,
        are continents: a run of the same basin row that is separated from the widest run by
        a continent (a gulf behind a peninsula, an enclosed sea) is a *marginal sea*, given
        its own streamfunction but not counted.
    min_width_km : float, optional
        km. Rows whose counted ocean is narrower are left empty (``too_narrow``).
    fill_gaps : bool, optional
        Fill stress missing in single time steps inside the ocean (ship-based climatologies
        have unobserved cells) and in ocean cells of ``ocean_mask`` where the stress has no
        value (a topographic mask on a coarse stress grid) by nearest-ocean averaging before
        the curl. With ``False`` such gaps stay missing and spoil the rows they lie on.
    max_gyre_boundaries : int, optional
        Length of the ``gyre_boundary`` dimension of ``gyre_boundary_lat``.
    gyre_threshold_sv : float, optional
        1e6 m3 s-1. A sign change of the interior transport is a gyre boundary only where the
        transport reaches this size on both sides (valid rows only); default
        :data:`GYRE_THRESHOLD_SV` (2 Sv, about 10% of a subtropical gyre: the uncertainty of
        an effective drag coefficient, Trenberth, Large & Olson 1989). Every raw sign change
        is kept in ``raw_gyre_boundary_lat``.
    land_connectivity : {4, 8}, optional
        Land cells join through faces only (4, default) or also through corners (8).
    land_classes : dict, optional
        Class of chosen land bodies by name (Earth) or by a (lon, lat) point inside them:
        ``"small_island"``, ``"large_island"`` or ``"continent"``; see
        :func:`~sverdrup_kit.geometry.land.island_table`.
    seas : dict, optional
        Earth basins only: sea name -> ``"counted"`` or ``"excluded"``, overriding
        :data:`~sverdrup_kit.geometry.earth.EARTH_SEAS` (e.g. ``{"caribbean": "counted"}``).
    relief : xarray.DataArray (lat, lon), optional
        Surface height in m (negative below sea level) on the stress grid or on a regular
        latitude-longitude grid of its own (then each stress cell takes the area-weighted mean
        height of its part below sea level). Rows whose counted ocean is mostly shallower than
        ``shelf_depth_m`` get the caution ``over_shelf``.
    shelf_depth_m : float, optional
        m. Default 1000: deeper than the Antarctic and Arctic shelves (400-800 m; common
        practice) and shallower than the open ocean.
    geometry : SverdrupGeometry, optional
        From :func:`~sverdrup_kit.geometry.integral.sverdrup_geometry` on this grid; skips
        the geometry step (the options it was built with apply). Without it the geometry is
        built, or taken from an in-memory cache keyed on grid, mask and options.
    island_rule : bool, optional
        ``True``: each large island's streamfunction constant comes from Godfrey's island
        rule (:func:`~sverdrup_kit.physics.island_rule.island_rule`), so the streamfunction
        west of an island, and in a marginal sea behind it, carries the island's value; with
        ``basins="earth"`` Australia with New Guinea is such an island and the Indonesian
        dividing line is an open passage (the streamfunction continues across it, as it does
        into a marginal sea from the open ocean it borders). Adds
        ``island_transport``, ``island_boundary_current_transport``, ``island_rule_status``,
        the tip latitudes and, for Earth basins, ``passage_transport``. ``False``: the
        streamfunction restarts at zero on each island's western coast.
    radius, omega : float, optional
        Earth radius (m) and rotation rate (rad s-1).

    Returns
    -------
    xarray.Dataset
        On the input grid and order, float64, lazy where the input is:

        - ``wind_stress_curl`` (..., lat, lon), N m-3, of the gap-filled stress;
        - ``sverdrup_northward_transport`` (..., lat, lon), m2 s-1: :math:`V`, also on small islands;
        - ``streamfunction`` (..., lat, lon), 1e6 m3 s-1, zero at each eastern coast;
        - ``interior_transport`` (..., basin, lat), 1e6 m3 s-1, positive northward;
        - ``boundary_current_transport`` (..., basin, lat) = ``-interior_transport``;
        - ``gyre_boundary_lat`` (..., basin, gyre_boundary) and ``gyre_boundary_count``
          (..., basin): latitudes where the interior transport changes sign;
        - ``basin_id`` (lat, lon), ``integration_class`` (lat, lon), ``row_status``
          (basin, lat), ``eastern_coast_lon`` and ``western_coast_lon`` (basin, lat);
        - ``raw_gyre_boundary_lat`` and ``raw_gyre_boundary_count``: every sign change;
        - ``observed_fraction`` (..., basin, lat): share of the counted cells whose stress
          was observed rather than filled;
        - ``land_class`` (lat, lon): 0 ocean, 1 small island, 2 large island, 3 continent;
        - with the Earth basins, ``crossed_seas`` and ``ending_seas`` (basin, lat), str: the
          named seas the counted ocean of a row crosses, and the excluded seas whose edge
          ends it.

        Rows left empty are NaN, with the reason in ``row_status`` (CF flags) and in the attrs.
        ``row_status`` 0 is valid; 8 (poleward of the circumpolar band), 9 (over a shelf) and
        10 (mostly filled: observed fraction averaged over the leading dimensions below 0.5)
        are cautions whose transport is given.

    Notes
    -----
    The Sverdrup relation for the depth-integrated meridional transport per unit width,

    .. math:: \beta V = \frac{\operatorname{curl}\boldsymbol\tau}{\rho_0},
       \qquad \beta = \frac{2\Omega\cos\phi}{R},

    is integrated westward from the eastern coast :math:`x_E`, where the zonal flow into the
    coast vanishes:

    .. math:: \psi(x) = -\int_x^{x_E} V\,dx', \qquad V = \partial\psi/\partial x.

    Discretisation: :math:`V_i` lives at cell centres; the interior transport of a run is the
    midpoint sum :math:`T = \sum_i V_i\,\Delta x_i`, exact when V is constant in x. The
    streamfunction lives at cell centres too, with a half-cell correction,
    :math:`\psi_i = -\left(\sum_{j\ \mathrm{east\ of}\ i} V_j\Delta x_j + V_i\Delta x_i/2
    \right)`, so that its value extended to the eastern face of the eastern cell,
    :math:`\psi_e + V_e\Delta x_e/2`, is zero, and its value at the western face of the
    western cell, :math:`\psi_w - V_w\Delta x_w/2`, is :math:`-T` of that run. A basin row
    made of several runs (split by large islands) restarts at zero on each run's eastern
    coast; its interior transport is the sum over its runs, and the western boundary current
    carries it back: ``boundary_current_transport = -interior_transport``. That is the scan
    (``island_rule=False``); with the island rule each run then adds the constant of the land
    east of it (Godfrey 1989; :mod:`sverdrup_kit.physics.island_rule`), and the return flow is
    split between the continent and the islands of the row.

    In each basin row the widest run is the open basin; runs joined to it across large
    islands only are counted with it, runs cut off by a continent are marginal seas. A row is
    left empty when it lies in the equatorial band, when its ocean wraps all the way round or
    its eastern end opens on another basin (no eastern coast), when its western end opens on
    another basin (no western coast), or when it is narrower than ``min_width_km``.

    Examples
    --------
    An invented closed basin between 0E and 60E, 15N to 55N, under easterlies that turn to
    westerlies:

    >>> import numpy as np, xarray as xr
    >>> lat, lon = np.arange(-89.0, 90.0, 2.0), np.arange(1.0, 360.0, 2.0)
    >>> ocean = (lon < 60) & (lat[:, None] > 15) & (lat[:, None] < 55)
    >>> tau = -0.1 * np.cos(np.deg2rad(4.5 * (lat[:, None] - 15)))
    >>> taux = xr.DataArray(np.where(ocean, tau, np.nan), coords={"lat": lat, "lon": lon},
    ...                     dims=("lat", "lon"), attrs={"units": "Pa"})
    >>> ds = sverdrup_transport(taux, 0 * taux)
    >>> ds.interior_transport.sel(basin="basin_0", lat=31.0).round(1).item()
    -19.8
    >>> ds.gyre_boundary_lat.sel(basin="basin_0", gyre_boundary=0).round(1).item()
    51.5

    References
    ----------
    Sverdrup, H. U. (1947). Wind-driven currents in a baroclinic ocean; with application to
    the equatorial currents of the eastern Pacific. Proc. Natl. Acad. Sci. USA 33, 318-326.
    Godfrey, J. S. (1989). A Sverdrup model of the depth-integrated flow for the world ocean
    allowing for island circulations. Geophys. Astrophys. Fluid Dyn. 45, 89-112.
    """
    taux = require_dataarray(taux, "taux")
    if not (isinstance(max_gyre_boundaries, (int, np.integer)) and max_gyre_boundaries >= 1):
        raise ValueError(
            f"max_gyre_boundaries: expected a positive integer, found {max_gyre_boundaries!r}. "
            "Fix: e.g. 8."
        )
    gyre_threshold_sv = _validate.number(gyre_threshold_sv, "gyre_threshold_sv",
                                         sign="non-negative", units="1e6 m3 s-1", example=2.0)
    if is_curvilinear(taux):
        from .model_grid import model_grid_sverdrup

        for name, value in (("relief", relief), ("geometry", geometry)):
            if value is not None:
                raise InputError(
                    f"{name}: expected None on a model grid (two-dimensional latitude and "
                    f"longitude), found {type(value).__name__}: {name}= serves regular "
                    "latitude-longitude grids only (the over_shelf caution and reusable "
                    f"geometry are not built on model grids yet). Fix: drop {name}=, or "
                    "regrid the stress to a regular grid first.")
        ds = model_grid_sverdrup(
            taux, require_dataarray(tauy, "tauy"), ocean_mask=ocean_mask, basins=basins,
            rho0=rho0, equatorial_half_width=equatorial_half_width, radius=radius, omega=omega,
            island_min_area_km2=island_min_area_km2,
            continent_min_area_km2=continent_min_area_km2, min_width_km=min_width_km,
            fill_gaps=fill_gaps, land_connectivity=land_connectivity,
            land_classes=land_classes, seas=seas, max_gyre_boundaries=max_gyre_boundaries,
            gyre_threshold_sv=gyre_threshold_sv)
        if island_rule:
            ds.attrs["island_rule"] = (
                "not applied: Godfrey's island rule is not available on model grids; the "
                "streamfunction restarts at zero west of each large island")
        return ds
    tauy = require_dataarray(tauy, "tauy")
    check_same_grid(taux, tauy, ("taux", "tauy"))
    rho0 = _validate.number(rho0, "rho0", units="kg m-3", example=1025.0)
    equatorial_half_width = _validate.number(
        equatorial_half_width, "equatorial_half_width", sign="non-negative",
        units="degrees", example=3.0)
    island_min_area_km2 = _validate.number(
        island_min_area_km2, "island_min_area_km2", sign="non-negative", units="km2",
        example=1e5)
    continent_min_area_km2 = _validate.number(
        continent_min_area_km2, "continent_min_area_km2", sign="non-negative", units="km2",
        example=5e6)
    min_width_km = _validate.number(min_width_km, "min_width_km", sign="non-negative",
                                    units="km", example=MIN_WIDTH)
    radius = _validate.number(radius, "radius", units="m", example=constants.EARTH_RADIUS)
    omega = _validate.number(omega, "omega", sign="non-negative", units="rad s-1",
                             example=constants.OMEGA)
    if not (np.isfinite(continent_min_area_km2) and continent_min_area_km2 >= island_min_area_km2):
        raise ValueError(
            f"continent_min_area_km2: expected a number of km2 >= island_min_area_km2 "
            f"({island_min_area_km2:g}), found {continent_min_area_km2!r}. Fix: e.g. 5e6."
        )

    grid0 = SphericalGrid.from_data(taux, argname="taux", radius=radius, omega=omega)
    lay = grid0.layout
    lat, lon = lay.lat_name, lay.lon_name
    tx = to_canonical(_validate.field(taux, "taux", "stress", default_units="Pa"), lay)
    ty = to_canonical(_validate.field(tauy, "tauy", "stress", default_units="Pa"), lay)
    # Everything below works on the canonical grid, whose layout is the identity.
    ident = GridLayout(lat, lon, lay.lat, lay.lon, np.arange(lay.lat.size),
                       np.arange(lay.lon.size), lay.periodic)
    grid = SphericalGrid(lay.lat, lay.lon, lay.periodic, radius, omega, ident)

    # Geometry: from grid, mask and options alone; cached.
    mask_from_geometry = geometry is not None
    if geometry is None:
        ocean = _ocean_from(taux, tauy, ocean_mask, lay)
        depth = relief_depth(relief, taux, lay) if relief is not None else None
        geometry = build_geometry(
            ocean, grid, basins=basins, layout=lay, ref=taux,
            island_min_area_km2=island_min_area_km2,
            continent_min_area_km2=continent_min_area_km2, min_width_km=min_width_km,
            equatorial_half_width=equatorial_half_width, land_connectivity=land_connectivity,
            land_classes=land_classes, seas=seas, depth=depth, shelf_depth_m=shelf_depth_m,
        )
    else:
        _check_geometry(geometry, grid)
    # The geometry's grid keeps its cell widths and weights from call to call.
    g_lay = geometry.grid.layout
    if g_lay is not None and (g_lay.lat_name, g_lay.lon_name) == (lat, lon):
        grid = geometry.grid
    cls, bid, names, plan = geometry.land.cls, geometry.basin_id, geometry.names, geometry.plan
    water = cls <= 1
    nb = len(names)
    band = geometry.equatorial
    pole = np.zeros(grid.lat.size, dtype=bool)
    pole[0] = grid.lat_edges[0] <= -90.0 + 1e-9
    pole[-1] = grid.lat_edges[-1] >= 90.0 - 1e-9

    # Per time step, one pass: fill, curl, V, scan, and the coverage of each row by observed
    # stress. V is missing in the equatorial band and on the pole rows.
    keep_missing = (cls == OCEAN) if not fill_gaps else None
    inv_rb = np.where(band | pole, np.nan, 1.0 / (rho0 * grid.beta))
    fx, fy, curl, v, psi, transport, observed = xr.apply_ufunc(
        _field_kernel,
        whole_fields(tx, (lat, lon)), whole_fields(ty, (lat, lon)),
        input_core_dims=[[lat, lon]] * 2,
        output_core_dims=[[lat, lon]] * 5 + [["basin", lat]] * 2,
        dask="parallelized",
        output_dtypes=[np.float64] * 7,
        dask_gufunc_kwargs={"output_sizes": {"basin": nb}},
        kwargs=dict(target=water, keep_missing=keep_missing, periodic=grid.periodic,
                    phi=grid.phi, lam=grid.lam, radius=grid.radius, pole=pole, inv_rb=inv_rb,
                    dx_sv=grid.dx / constants.SVERDRUP_IN_M3_S, plan=plan, n_basins=nb),
        # Keep the coordinates' attributes; the variables get their own in _assemble.
        keep_attrs=True,
    )
    order = [d for d in tx.dims]
    fx, fy, curl, v, psi, transport, observed = (
        _bare(x) for x in (fx, fy, curl, v, psi, transport, observed))
    curl, v, psi = (x.transpose(*order) for x in (curl, v, psi))
    lead = [d for d in order if d not in (lat, lon)]
    transport = transport.transpose(*lead, "basin", lat)
    observed = observed.transpose(*lead, "basin", lat)
    static = xr.DataArray(plan.row_status, dims=("basin", lat), coords={lat: tx[lat]})
    mean_obs = observed.mean(lead) if lead else observed
    status = xr.where((static == VALID) & (mean_obs < MIN_OBSERVED_FRACTION),
                      np.int8(MOSTLY_FILLED), static).astype(np.int8)
    valid = status == VALID

    crossings, count, raw_crossings, raw_count = boundaries_of(
        transport, valid, lat_name=lat, lat=grid.lat, max_gyre_boundaries=max_gyre_boundaries,
        threshold=gyre_threshold_sv)

    basin_bc = islands = None
    if island_rule:
        geo = _land_geometry_cached(geometry, lay)
        # With gaps filled, the rule takes the stress the curl took (filled once).
        psi, basin_bc, islands = sverdrup_island_constants(
            fx if fill_gaps else tx, fy if fill_gaps else ty, psi, v, transport, geo=geo,
            plan=plan, rho0=rho0, fill_gaps=fill_gaps, prepared=fill_gaps,
            equatorial_half_width=equatorial_half_width)
    settings = _Settings(rho0, equatorial_half_width, island_min_area_km2, continent_min_area_km2,
                         min_width_km, fill_gaps,
                         given_mask=ocean_mask is not None or mask_from_geometry)
    fields = dict(curl=curl, v=v, psi=psi, transport=transport, crossings=crossings, count=count)
    quality = _quality(geometry, status, observed, raw_crossings, raw_count, lay,
                       gyre_threshold_sv=gyre_threshold_sv)
    # Built once on the canonical grid, put in the user's order once at the end.
    ds = _assemble(fields, plan, bid, names, lay, taux, settings, quality)
    if island_rule:
        ds = add_island_variables(ds, basin_bc, islands, lat)
    return from_canonical(ds, lay, taux)


@dataclass(frozen=True)
class _Settings:
    """The options of one call, recorded in the result's attributes."""

    rho0: float
    equatorial_half_width: float
    island_min_area_km2: float
    continent_min_area_km2: float
    min_width_km: float
    fill_gaps: bool
    given_mask: bool

    def attrs(self) -> dict:
        return dict(
            rho0=self.rho0,
            equatorial_half_width=self.equatorial_half_width,
            island_min_area_km2=self.island_min_area_km2,
            continent_min_area_km2=self.continent_min_area_km2,
            min_width_km=self.min_width_km,
            fill_gaps=int(bool(self.fill_gaps)),
            land_mask_from="ocean_mask argument" if self.given_mask else "missing stress values",
        )


def _check_geometry(geometry, grid):
    if not isinstance(geometry, SverdrupGeometry):
        raise TypeError(
            f"geometry: expected the result of sverdrup_kit.sverdrup_geometry(), found "
            f"{type(geometry).__name__}. Fix: geometry=sverdrup_geometry(ocean_mask, ...)."
        )
    g = geometry.grid
    if (g.shape != grid.shape or g.periodic != grid.periodic or g.radius != grid.radius
            or g.omega != grid.omega
            or not np.allclose(g.lat, grid.lat) or not np.allclose(g.lon, grid.lon)):
        raise ValueError(
            f"geometry: expected a geometry built on the grid of taux ({grid!r}), found one "
            f"on {g!r}. Fix: build it from a mask on taux's grid."
        )


def _quality(geometry, status, observed, raw_crossings, raw_count, lay, *, gyre_threshold_sv):
    """Row quality, raw crossings, land classes and seas (Variables on the canonical grid),
    and the attributes that go with them."""
    lat, lon = lay.lat_name, lay.lon_name
    plan = geometry.plan
    gyre = boundary_attrs(gyre_threshold_sv)

    out = {
        "row_status": _var(
            status, long_name="status of the Sverdrup interior transport of each basin row",
            **_flag_attrs(ROW_STATUS)),
        "observed_fraction": _var(
            observed, long_name="fraction of the row's counted cells with observed stress",
            units="1",
            comment="the rest was filled by nearest-ocean averaging (gaps, small "
            "islands); row_status is mostly_filled where its mean over the leading "
            f"dimensions is below {MIN_OBSERVED_FRACTION:g}"),
        "raw_gyre_boundary_lat": _var(raw_crossings, **gyre["raw_gyre_boundary_lat"]),
        "raw_gyre_boundary_count": _var(raw_count, **gyre["raw_gyre_boundary_count"]),
        "land_class": xr.Variable((lat, lon), geometry.land.cls.copy(), {
            "long_name": "land class",
            "flag_values": np.arange(4, dtype=np.int8),
            "flag_meanings": "ocean " + " ".join(v[0] for v in LAND_CLASSES.values()),
            "comment": "; ".join(f"{v[0]}: {v[1]}" for v in LAND_CLASSES.values())}),
    }
    attrs = dict(basins=geometry.basins_used, gyre_threshold_sv=gyre_threshold_sv,
                 land_connectivity=geometry.options["land_connectivity"])
    if geometry.basins_used.startswith("earth"):
        out["crossed_seas"] = xr.Variable(("basin", lat), plan.crossed_seas.astype(str), {
            "long_name": "named seas that the row's counted ocean crosses",
            "comment": "space-separated names from sverdrup_kit.geometry.earth.EARTH_SEAS"})
        out["ending_seas"] = xr.Variable(("basin", lat), plan.ending_seas.astype(str), {
            "long_name": "excluded seas whose edge ends the row's counted ocean",
            "comment": "the counted ocean ends where it meets these seas, as on a coast"})
        policies = _policies(geometry)
        attrs["marginal_seas"] = (
            "Earth seas (sverdrup_kit.geometry.earth.EARTH_SEAS): excluded "
            + ", ".join(n for n, x in zip(geometry.sea_names, policies) if not x)
            + "; counted " + ", ".join(n for n, x in zip(geometry.sea_names, policies) if x))
    return out, attrs


def _policies(geometry):
    from ..geometry.earth import COUNTED, EARTH_SEAS

    seas = geometry.options.get("seas") or {}
    return [seas.get(n, EARTH_SEAS[n]["policy"]) == COUNTED for n in geometry.sea_names]


def _flag_attrs(table):
    return {
        "flag_values": np.array(list(table), dtype=np.int8),
        "flag_meanings": " ".join(name for name, _ in table.values()),
        "comment": "; ".join(f"{k} {name}: {why}" for k, (name, why) in table.items()),
    }


def _to_user_lon(x, original_lon):
    lo = float(np.min(original_lon))
    d = float(np.min(np.abs(np.diff(np.asarray(original_lon, float))))) if np.size(
        original_lon) > 1 else 0.0
    base = lo - d / 2.0
    return np.where(np.isfinite(x), base + np.mod(x - base, 360.0), np.nan)


def _assemble(fields, plan, bid, names, lay, original, settings: _Settings, quality):
    """The result Dataset from the computed ``fields`` (curl, v, psi, transport, crossings,
    count), the row plan and the ``quality`` variables and attributes, on the canonical grid
    (built from plain Variables: one Dataset, no alignment of its pieces)."""
    curl, v, psi = fields["curl"], fields["v"], fields["psi"]
    transport, crossings, count = fields["transport"], fields["crossings"], fields["count"]
    band = settings.equatorial_half_width
    gyre = boundary_attrs(quality[1]["gyre_threshold_sv"])
    lat, lon = lay.lat_name, lay.lon_name
    hw = (lat, lon)
    basin = xr.DataArray(np.array(names, dtype=object), dims=("basin",), name="basin",
                         attrs={"long_name": "ocean basin"})
    empty = (
        "rows left empty are NaN; row_status gives the reason: "
        + "; ".join(f"{k} {n}" for k, (n, _) in ROW_STATUS.items() if k)
    )
    user_lon = original[lon].values
    ds = xr.Dataset(
        {
            "wind_stress_curl": _var(curl,
                long_name="wind stress curl", units="N m-3",
                comment="vertical component of the curl of the surface stress on the sphere, "
                "after gaps and small islands were filled by nearest-ocean averaging",
            ),
            "sverdrup_northward_transport": _var(v,
                long_name="Sverdrup meridional transport per unit width", units="m2 s-1",
                comment="depth-integrated, V = curl(tau) / (rho0 beta); missing on land and in "
                f"the equatorial band |lat| < {band:g} degrees; present on small islands, "
                "where the stress is interpolated",
            ),
            "sverdrup_streamfunction": _var(psi,
                long_name="Sverdrup transport streamfunction", units=SV_UNITS,
                comment="at cell centres, psi_i = -(sum of V dx over the cells east of i in its "
                "run + V_i dx_i / 2): zero at the eastern face of each run (an eastern coast), "
                "minus the run's transport at its western face; V = d(psi)/dx; restarts at "
                "zero west of each large island; missing in rows with no eastern coast and in "
                "the equatorial band",
            ),
            "interior_transport": _var(transport,
                long_name="Sverdrup interior transport across the basin", units=SV_UNITS,
                comment="zonal integral of the meridional transport from the eastern coast to "
                "the western boundary, positive northward; marginal seas excluded. " + empty,
            ),
            "boundary_current_transport": _var(-transport,
                long_name="western boundary current transport implied by Sverdrup balance",
                units=SV_UNITS,
                comment="minus the interior transport: the western boundary current returns "
                "the interior flow, positive northward. " + empty,
            ),
            "gyre_boundary_lat": _var(crossings, **gyre["gyre_boundary_lat"]),
            "gyre_boundary_count": _var(count, **gyre["gyre_boundary_count"]),
            "basin_id": (hw, bid.astype(np.int32), basin_id_attrs(names)),
            "integration_class": (hw, plan.cell_class, {
                "long_name": "role of each cell in the westward integral",
                **_flag_attrs(CELL_CLASS),
            }),
            "eastern_coast_lon": (("basin", lat), _to_user_lon(plan.east_lon, user_lon), {
                "long_name": "longitude of the eastern coast where the integral starts",
                "units": "degrees_east", "standard_name": "longitude",
                "comment": "cell face; NaN where the row has no eastern coast or no ocean",
            }),
            "western_coast_lon": (("basin", lat), _to_user_lon(plan.west_lon, user_lon), {
                "long_name": "longitude of the western boundary where the integral ends",
                "units": "degrees_east", "standard_name": "longitude",
                "comment": "cell face; where a row is split by large islands, the western face "
                "of its westernmost run",
            }),
            **quality[0],
        },
        coords={**curl.coords, **transport.coords, "basin": basin},
    )
    ds.attrs.update(
        settings.attrs(),
        small_islands="integrated across, with stress filled by nearest-ocean averaging",
        marginal_seas="runs cut off from the widest run of a basin row by a continent are not "
        "counted (integration_class 2)",
    )
    ds.attrs.update(quality[1])
    return ds


def _var(da, **attrs):
    """The data of ``da`` as a plain Variable with ``attrs`` (no coordinates to align)."""
    return xr.Variable(da.dims, da.data, attrs)
