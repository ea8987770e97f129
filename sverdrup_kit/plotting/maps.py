"""Maps: any field, wind stress, its curl, Ekman pumping and the Sverdrup streamfunction.

Every function returns ``(fig, ax)`` and never calls ``plt.show()``. Diverging fields use
perceptually uniform cmocean maps centred on zero; where the Sverdrup relation is not expected
to hold (the equatorial band, rows with no eastern coast, the western boundary-current zone)
the map shades and names it.
"""

from __future__ import annotations

import cartopy.crs as ccrs
import matplotlib as mpl
import numpy as np
import xarray as xr
from matplotlib.axes import Axes

from ..geometry.coords import grid_layout, require_dataarray
from ._inputs import (
    aligned_and,
    basin_names,
    canonical_2d,
    equatorial_half_width_of,
    mask_like,
    ocean_across_band,
    ocean_of,
    on_display_grid,
    pick,
    reduce_time,
    status_info,
)
from ._mapping import finish_map, map_core
from ._style import (
    BOUNDARY_ZONE,
    REASONS,
    SKIP_REASONS,
    as_display,
    cmocean,
    colour_levels,
    figure_width,
    fonts,
    nice_step,
    pretty_units,
    rc,
    reason_style,
)

__all__ = [
    "map_field",
    "map_wind_stress",
    "map_wind_stress_curl",
    "map_ekman_pumping",
    "map_sverdrup_streamfunction",
]

def map_field(
    data,
    *,
    ocean_mask=None,
    cmap=None,
    robust: float = 98.0,
    vmax=None,
    symmetric=None,
    time="mean",
    width="column",
    projection: str = "robinson",
    central_longitude=None,
    coastlines: str = "auto",
    title=None,
    label=None,
    missing_label=None,
    to_per_year: bool = False,
):
    """Map one field on a cartopy projection, with a colour bar that states the units.

    Parameters
    ----------
    data : xarray.DataArray (lat, lon) or (time, lat, lon)
        Field on a latitude-longitude grid, any latitude order and longitude convention,
        missing on land.
    ocean_mask : xarray.DataArray (lat, lon), optional
        1 (or True) on ocean. Defaults to the cells where ``data`` has values. When given,
        ocean cells where ``data`` is missing are shaded and named ``missing_label``.
    cmap : matplotlib colormap, optional
        Defaults to cmocean ``balance``, or ``amp`` for fields with no negative values.
    robust : float
        Percentile of ``|data|`` that sets the colour limits (98: the top 2 % saturate).
    vmax : float, optional
        Colour limit in the units of ``data``, overriding ``robust``.
    symmetric : bool, optional
        Limits symmetric about zero; default: unless ``data`` has no negative values.
    time : "mean" or int
        Average over ``time`` or take one position along it.
    width : "column", "page" or float
        Figure width (3.5 in, 7.2 in or inches).
    projection : {"robinson", "platecarree"}
    central_longitude : float, optional
        Default: the map's seam runs through the longitude with most land.
    coastlines : {"auto", "gshhs", "mask", "none"}
        "mask" draws the data's land cells; "gshhs" adds crude GSHHS coast lines from
        ``$CARTOPY_DATA_DIR`` (never downloaded); "auto" uses GSHHS when the files exist and the
        data's land looks like Earth's, else "mask".
    title, label : str, optional
        Axes title; colour-bar label (default: long_name and units of ``data``).
    missing_label : str, optional
        Legend name of ocean cells without data (e.g. "equatorial band, |lat| < 3°").
    to_per_year : bool
        Show a velocity in m s-1 as m yr-1.

    Returns
    -------
    fig : matplotlib.figure.Figure
    ax : cartopy.mpl.geoaxes.GeoAxes
    """
    da = reduce_time(on_display_grid(require_dataarray(data, "data")), time, "data")
    w = figure_width(width)
    fs = fonts(w)
    with mpl.rc_context(rc(fs)):
        m = map_core(
            da, ocean_mask=ocean_mask, cmap=cmap, robust=robust, vmax=vmax, symmetric=symmetric,
            width=width, projection=projection, central_longitude=central_longitude,
            coastlines=coastlines, label=label, missing_label=missing_label,
            to_per_year=to_per_year)
        finish_map(m.fig, m.ax, m.cax, m.handles, fs, title=title)
    return m.fig, m.ax


def map_wind_stress(data, tauy=None, *, every=None, reference=None, time="mean", width="column",
                    projection="robinson", coastlines="auto", title=None, robust=98.0):
    """Map wind-stress magnitude (shaded, cmocean ``amp``) with stress vectors.

    Parameters
    ----------
    data : xarray.Dataset with ``taux``, ``tauy``, or the DataArray ``taux`` (then pass
        ``tauy``)
        Stress in Pa on a latitude-longitude grid, missing on land.
    every : int, optional
        Draw one arrow every ``every`` cells in each direction (default: about 30 arrows
        around the globe).
    reference : float, optional
        Stress of the key arrow, in the units of the data (default: a round number near the
        90th percentile).
    time, width, projection, coastlines, title, robust
        As in :func:`map_field`.

    Returns
    -------
    fig, ax
    """
    if isinstance(data, xr.Dataset):
        data = on_display_grid(data)
        taux, tauy = pick(data, ("taux",), "data"), pick(data, ("tauy",), "data")
    else:
        taux = on_display_grid(require_dataarray(data, "taux"))
        tauy = on_display_grid(require_dataarray(tauy, "tauy"))
    taux = reduce_time(taux, time, "taux")
    tauy = reduce_time(tauy, time, "tauy")
    units = str(taux.attrs.get("units", "Pa"))
    mag = np.hypot(taux, tauy).rename("wind_stress_magnitude").assign_attrs(
        long_name="wind stress magnitude", units=units)
    w = figure_width(width)
    fs = fonts(w)
    with mpl.rc_context(rc(fs)):
        m = map_core(
            mag, ocean_mask=None, cmap=cmocean.cm.amp, robust=robust, vmax=None, symmetric=False,
            width=width, projection=projection, central_longitude=None, coastlines=coastlines,
            label=None, missing_label=None, to_per_year=False)
        ax = m.ax
        lat, lon, tx, _ = canonical_2d(taux, "taux")
        _, _, ty, _ = canonical_2d(tauy, "tauy")
        step = every or max(1, int(round(lon.size / (22 if w < 5 else 40))))
        j0 = step // 2
        sl = (slice(j0, None, step), slice(j0, None, step))
        la2, lo2 = np.meshgrid(lat[sl[0]], lon[sl[1]], indexing="ij")
        u, v = tx[sl], ty[sl]
        ok = np.isfinite(u) & np.isfinite(v) & (np.abs(la2) < 88)
        speed = np.hypot(u[ok], v[ok])
        if reference is None:
            reference = nice_step(float(np.percentile(speed, 90)), 1) if speed.size else 0.1
        # Arrows of the 95th-percentile stress reach a little beyond the next arrow.
        spacing_in = 0.85 * w * step / lon.size
        typical = float(np.percentile(speed, 95)) if speed.size else reference
        q = ax.quiver(lo2[ok], la2[ok], u[ok], v[ok], transform=ccrs.PlateCarree(), zorder=3.5,
                      scale=typical / (1.3 * spacing_in), scale_units="inches",
                      width=0.0035 * 3.5 / w, headwidth=3.5, headlength=3.5, headaxislength=3,
                      color="0.1")
        # The key sits in the empty corner south-east of the map's outline.
        ax.quiverkey(q, 0.9, 0.04, reference, f"{reference:g} {pretty_units(units)}",
                     labelpos="N", labelsep=0.03, fontproperties={"size": fs["small"]},
                     coordinates="axes")
        finish_map(m.fig, ax, m.cax, m.handles, fs, title=title)
    return m.fig, ax


def map_wind_stress_curl(data, **kw):
    """Map the wind-stress curl (N m-3) with the cmocean ``curl`` map; see :func:`map_field`.

    ``data`` is the DataArray from :func:`~sverdrup_kit.physics.operators.wind_stress_curl` or
    a Dataset
    holding ``wind_stress_curl`` (and perhaps ``ocean_mask``).
    """
    da = pick(data, ("wind_stress_curl",), "data")
    kw.setdefault("cmap", cmocean.cm.curl)
    if isinstance(data, xr.Dataset) and "ocean_mask" in data:
        kw.setdefault("ocean_mask", data["ocean_mask"])
    return map_field(da, **kw)


def map_ekman_pumping(data, *, equatorial_half_width=None, limits_poleward_of: float = 10.0, **kw):
    """Map Ekman pumping in m yr-1 (positive upward), the equatorial band shaded and named.

    Parameters
    ----------
    data : xarray.Dataset or xarray.DataArray
        The Dataset from :func:`~sverdrup_kit.physics.ekman.ekman` (or one holding
        ``ekman_pumping``),
        or the ``ekman_pumping`` DataArray, in m s-1.
    equatorial_half_width : float, optional
        Half-width in degrees of the band left empty (default: the data's attrs, else 3).
        Ocean cells there are shaded and named.
    limits_poleward_of : float
        Take the robust colour limits from latitudes poleward of this (degrees): the beta
        term of the pumping grows as 1/f^2 next to the band and would otherwise wash out the
        gyres. 0 uses every latitude.
    **kw
        As in :func:`map_field` (``vmax`` in m s-1).

    Returns
    -------
    fig, ax
    """
    data = on_display_grid(data)
    da = pick(data, ("ekman_pumping",), "data")
    ds = data if isinstance(data, xr.Dataset) else None
    band = equatorial_half_width_of(data if ds is not None else da, equatorial_half_width)
    kw.setdefault("cmap", cmocean.cm.delta)
    kw.setdefault("to_per_year", True)
    kw.setdefault("missing_label", f"{REASONS['equatorial_band'].label}, |lat| < {band:g}\u00b0")
    reduced = reduce_time(da, kw.get("time", "mean"), "data")
    if "ocean_mask" not in kw:
        # Only cells inside the band are shaded as the band: elsewhere a missing value is land
        # (the stress of a result may be filled over small islands).
        across = ocean_across_band(reduced, band)
        known = ocean_of(ds) if ds is not None else None
        kw["ocean_mask"] = across if known is None else aligned_and(across, known)
    if kw.get("vmax") is None and limits_poleward_of > 0:
        lat_name = grid_layout(reduced, argname="data").lat_name
        far = np.abs(reduced.where(np.abs(reduced[lat_name]) >= limits_poleward_of).values)
        far = far[np.isfinite(far)]
        if far.size:
            kw["vmax"] = float(np.percentile(far, kw.get("robust", 98.0)))
    return map_field(da, **kw)


def map_sverdrup_streamfunction(data, *, boundary_zone_km: float = 300.0, time="mean",
                                width="column", projection="robinson", coastlines="auto",
                                title=None, robust=98.0, vmax=None, contours: bool = True):
    """Map the Sverdrup streamfunction (Sv), with the regions where it does not hold shaded.

    Parameters
    ----------
    data : xarray.Dataset
        From :func:`~sverdrup_kit.physics.sverdrup.sverdrup_transport`:
        ``sverdrup_streamfunction`` (1e6 m3 s-1) and, when
        present, ``row_status`` (basin, lat) with CF flags, ``basin_id`` (lat, lon),
        ``western_coast_lon`` (basin, lat) and ``wind_stress_curl`` (its finite cells are the
        ocean). For a bare streamfunction DataArray only the equatorial band between cells
        with values is shaded (as "no Sverdrup solution").
    boundary_zone_km : float
        Width east of each western coast shaded as the western boundary-current zone, km
        (a few Munk or Stommel widths: 300 km is common practice on coarse grids). 0 turns it
        off.
    contours : bool
        Draw streamlines at the colour levels (negative dashed).
    time, width, projection, coastlines, title, robust, vmax
        As in :func:`map_field`.

    Returns
    -------
    fig, ax
    """
    data = on_display_grid(data)
    psi = reduce_time(pick(data, ("sverdrup_streamfunction",), "data"), time,
                      "sverdrup_streamfunction")
    ds = data if isinstance(data, xr.Dataset) else xr.Dataset()
    if not np.isfinite(boundary_zone_km) or boundary_zone_km < 0:
        raise ValueError(
            f"boundary_zone_km: expected a width >= 0 in km, found {boundary_zone_km!r}. "
            "Fix: pass e.g. boundary_zone_km=300, or 0 to leave the zone unshaded."
        )
    lay = grid_layout(psi, argname="streamfunction")
    ocean = ocean_of(ds)
    if ocean is None:
        # A bare DataArray does not say where the ocean is: take its cells with values and the
        # equatorial band between them.
        ocean = ocean_across_band(psi, equatorial_half_width_of(psi, None))
    shading = []
    if "row_status" in ds and "basin_id" in ds:
        shading = _not_valid_cells(ds, lay, ocean, boundary_zone_km)
    w = figure_width(width)
    fs = fonts(w)
    with mpl.rc_context(rc(fs)):
        m = map_core(
            psi, ocean_mask=ocean, cmap=cmocean.cm.balance, robust=robust, vmax=vmax,
            symmetric=True, width=width, projection=projection, central_longitude=None,
            coastlines=coastlines, label=None,
            missing_label="no Sverdrup solution" if not shading else None, to_per_year=False,
            extra_shading=shading)
        if contours:
            _streamlines(m.ax, m.grid, psi, robust=robust, vmax=vmax)
        finish_map(m.fig, m.ax, m.cax, m.handles, fs, title=title)
    return m.fig, m.ax


def _not_valid_cells(ds, lay, ocean_da, boundary_zone_km):
    """(mask, Shade) for each reason the Sverdrup relation fails, on the canonical grid."""
    meanings = status_info(ds)
    status = ds["row_status"].transpose("basin", ...)
    bid_da = ds["basin_id"]
    bid = np.full(bid_da.shape, -1)
    for b in range(len(basin_names(ds))):
        bid[mask_like((bid_da == b).astype(float), lay.lat, lay.lon, "basin_id")] = b
    ocean = mask_like(ocean_da.astype(float), lay.lat, lay.lon, "ocean_mask")
    st_lat = status[[d for d in status.dims if d != "basin"][0]]
    ny, nx = bid.shape
    cell_status = np.full((ny, nx), -1, dtype=int)
    for b, _ in enumerate(basin_names(ds)):
        row = status.isel(basin=b).interp({st_lat.name: lay.lat}, method="nearest").values
        in_basin = bid == b
        cell_status = np.where(in_basin, np.asarray(row, dtype=float)[:, None], cell_status)
    out = {}
    for value, meaning in meanings.items():
        if meaning in SKIP_REASONS:
            continue
        out[meaning] = [ocean & (cell_status == value), reason_style(meaning)]
    # Ocean cells that no basin claims are rows without a coast to start from (a circumpolar
    # channel) when their whole row is ocean, and otherwise simply outside the basins.
    unclaimed = ocean & (bid < 0)
    if unclaimed.any():
        whole_row = unclaimed & ocean.all(axis=1)[:, None]
        if "no_eastern_coast" in out:
            out["no_eastern_coast"][0] = out["no_eastern_coast"][0] | whole_row
        else:
            out["no_eastern_coast"] = [whole_row, REASONS["no_eastern_coast"]]
        out["outside"] = [unclaimed & ~whole_row, REASONS["outside"]]
    if boundary_zone_km > 0 and "western_coast_lon" in ds:
        zone = _boundary_zone(ds, lay, bid, cell_status, meanings, boundary_zone_km)
        out["boundary_zone"] = [zone, BOUNDARY_ZONE]
    return [tuple(v) for v in out.values()]


def _boundary_zone(ds, lay, bid, cell_status, meanings, km):
    valid_values = [v for v, m in meanings.items() if m in ("valid", "ok")]
    wb = ds["western_coast_lon"].transpose("basin", ...)
    lat_dim = [d for d in wb.dims if d != "basin"][0]
    zone = np.zeros(bid.shape, dtype=bool)
    lon = lay.lon
    # km to degrees of longitude on a sphere of radius 6371 km (111.195 km per degree).
    width_deg = km / (111.195 * np.maximum(np.cos(np.deg2rad(lay.lat)), 0.05))
    for b in range(wb.sizes["basin"]):
        west = wb.isel(basin=b).interp({lat_dim: lay.lat}, method="nearest").values
        east_of_coast = (lon[None, :] - west[:, None]) % 360.0
        z = (bid == b) & (east_of_coast <= width_deg[:, None])
        if valid_values:
            z &= np.isin(cell_status, valid_values)
        zone |= z
    return zone


def _streamlines(ax, grid, psi, *, robust, vmax):
    """Contours of the streamfunction at its colour levels, negative dashed."""
    shown, _ = as_display(psi)
    lat, lon, c, periodic = canonical_2d(shown, "streamfunction")
    finite = c[np.isfinite(c)]
    if finite.size < 4 or finite.min() == finite.max():
        return
    levels, _, _ = colour_levels(c, robust=robust, symmetric=True, vmax=vmax)
    levels = levels[levels != 0]
    lon_c, vals = grid.cyclic(c)
    levels = levels[(levels > np.nanmin(vals)) & (levels < np.nanmax(vals))]
    if levels.size:
        # Contoured on the projected centres: the same lines, without cartopy reprojecting them.
        x, y = grid.xy(ax.projection, *np.meshgrid(lon_c, lat))
        Axes.contour(ax, x, y, vals, levels=levels, colors="0.15", linewidths=0.35,
                     negative_linestyles="dashed", zorder=2.6)
