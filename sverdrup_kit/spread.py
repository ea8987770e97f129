r"""Spread of the Sverdrup transport across wind products, drag laws and mean-speed choices.

One call diagnoses every (product, drag law, mean speed) combination on one common grid with
one ocean mask and one set of basins, and summarises each basin row by the mean, range and
standard deviation over the combinations. :func:`spread_table` lays the result out at chosen
latitudes beside the observed western boundary currents.
"""

from __future__ import annotations

import os
import warnings
from pathlib import Path

import numpy as np
import xarray as xr

from . import constants
from .errors import InputError
from .geometry.coords import grid_layout, matching_positions
from .geometry.regrid import area_weighted_average, grid_step
from .io.readers import open_winds
from .ocean.observations import boundary_current_observations
from .physics.ekman import DEFAULT_EQUATORIAL_HALF_WIDTH
from .pipeline import _stress_from, diagnose, resolve_ocean_mask

__all__ = ["MEAN_SPEEDS", "spread_table", "transport_spread"]

#: How the speed in the bulk formula is averaged: "vector" from the mean wind components,
#: "scalar" from the product's mean wind speed (only where the product carries one).
MEAN_SPEEDS = ("vector", "scalar")
STATS_DIMS = ("product", "drag_law", "mean_speed")


def _name_of(source, i) -> str:
    if isinstance(source, (str, os.PathLike)):
        text = os.fspath(source)
        return Path(text.split(",")[0]).stem.replace("*", "") or f"product_{i}"
    if isinstance(source, (list, tuple)) and source and isinstance(source[0], (str, os.PathLike)):
        return Path(os.fspath(source[0])).stem.replace("*", "") or f"product_{i}"
    if isinstance(source, xr.Dataset):
        return str(source.attrs.get("product", source.attrs.get("title", f"product_{i}")))
    return f"product_{i}"


def _open(source, i):
    if isinstance(source, xr.Dataset):
        return source
    try:
        return open_winds(source)
    except (TypeError, ValueError, FileNotFoundError) as err:
        raise type(err)(f"sources[{i}]: {err}") from None


def _unique(names):
    seen: dict[str, int] = {}
    out = []
    for n in names:
        seen[n] = seen.get(n, 0) + 1
        out.append(n if seen[n] == 1 else f"{n}_{seen[n]}")
    return out


def _same_grid(a, b) -> bool:
    la, lb = grid_layout(a, argname="a"), grid_layout(b, argname="b")
    return (matching_positions(la.lat, lb.lat) is not None
            and matching_positions(la.lon, lb.lon, 360.0) is not None)


def _mean_stress_on(winds, target, mask_choice, *, drag_law, use_wind_speed, threshold):
    """Time-mean stress of ``winds`` on its own grid (winds over land masked), then averaged
    by area onto ``target``'s grid."""
    mask, _ = resolve_ocean_mask(winds, mask_choice, threshold=threshold)
    if mask is not None:
        winds = winds.copy()
        for name in [n for n in ("u", "v", "wind_speed", "taux", "tauy") if n in winds]:
            winds[name] = winds[name].where(mask.values)
    stress = _stress_from(winds, drag_law=drag_law, air_density=constants.AIR_DENSITY,
                          use_wind_speed=use_wind_speed)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)
        if "time" in stress.dims:
            stress = stress.mean("time", keep_attrs=True)
    out = xr.Dataset({n: area_weighted_average(stress[n], target, argname=n)
                      for n in ("taux", "tauy")})
    for n in ("taux", "tauy"):
        out[n].attrs = dict(stress[n].attrs)
    return out


def transport_spread(
    sources,
    *,
    drag_laws=("large-pond-1981", "large-yeager-2009"),
    mean_speeds=("vector",),
    names=None,
    basins="earth",
    ocean_mask="earth",
    ocean_threshold: float = 0.5,
    rho0: float = constants.RHO0,
    equatorial_half_width: float = DEFAULT_EQUATORIAL_HALF_WIDTH,
) -> xr.Dataset:
    r"""Sverdrup interior transport for several wind products and drag laws, with its spread.

    Parameters
    ----------
    sources : sequence or dict
        Wind products: paths, patterns or lists of files (opened with
        :func:`~sverdrup_kit.open_winds`), or Datasets from :func:`~sverdrup_kit.open_winds`;
        a dict maps product names to them.
    drag_laws : sequence of str or float
        Drag laws (names in :data:`~sverdrup_kit.DRAG_LAWS` or constant coefficients).
    mean_speeds : sequence of {"vector", "scalar"}
        ``"vector"``: the speed in the bulk formula from the (mean) wind components;
        ``"scalar"``: from the product's scalar-mean ``wind_speed`` (NaN for products that do
        not carry one). Both differ for monthly means by up to tens of percent.
    names : sequence of str, optional
        Product names (default: dict keys, file names, or ``title`` attributes).
    basins : optional
        As in :func:`~sverdrup_kit.sverdrup_transport`; ``"earth"`` (default) gives the same
        named basins for every product.
    ocean_mask : optional
        One mask for every product on the common grid, as in :func:`~sverdrup_kit.diagnose`
        (default the built-in Earth mask), so that rows and coasts are the same for all.
    ocean_threshold, rho0, equatorial_half_width
        As in :func:`~sverdrup_kit.diagnose`.

    Returns
    -------
    xarray.Dataset
        ``interior_transport`` (product, drag_law, mean_speed, basin, lat), 1e6 m3 s-1, positive
        northward, and over all combinations with a value: ``transport_mean``,
        ``transport_min``, ``transport_max``, ``transport_range`` (max - min),
        ``transport_std`` (standard deviation, ddof=0) and ``transport_count`` (basin, lat);
        ``row_status`` (basin, lat) of the common geometry. Attribute ``common_grid`` says how
        the products were aligned. Lazy where the inputs are.

    Notes
    -----
    Common grid: the coarsest of the products' grids (largest cell). A product on another
    grid has its stress computed on its own grid from its own winds (winds over land masked
    first, as in :func:`~sverdrup_kit.diagnose`), averaged over time, and then averaged by area
    onto the common grid (first-order conservative remapping, Jones 1999, Mon. Weather Rev.
    127, 2204-2210), which keeps the area integral of the stress and so the basin-wide curl.
    A product already on the common grid goes through :func:`~sverdrup_kit.diagnose` as it
    is, so its results equal a separate ``diagnose`` call with the same options.

    Examples
    --------
    >>> res = transport_spread(["winds_a.nc", "winds_b.nc"],
    ...                        drag_laws=("large-pond-1981", "large-yeager-2009"))  # doctest: +SKIP
    >>> res.transport_range.sel(basin="atlantic").sel(lat=26.5, method="nearest")  # doctest: +SKIP
    """
    if isinstance(sources, dict):
        names = list(sources) if names is None else names
        sources = list(sources.values())
    if isinstance(sources, (str, os.PathLike, xr.Dataset)) or not len(sources):
        raise InputError(
            "sources: expected a list (or dict) of one or more wind products, found "
            f"{type(sources).__name__}. Fix: e.g. transport_spread(['a.nc', 'b.nc'])."
        )
    if isinstance(drag_laws, (str, float, int)):
        drag_laws = (drag_laws,)
    bad = [m for m in mean_speeds if m not in MEAN_SPEEDS] if not isinstance(
        mean_speeds, str) else [mean_speeds]
    if bad or not len(mean_speeds):
        raise InputError(
            f"mean_speeds: expected a sequence of {MEAN_SPEEDS}, found {mean_speeds!r}. "
            "Fix: e.g. mean_speeds=('vector', 'scalar')."
        )
    products = [_open(s, i) for i, s in enumerate(sources)]
    names = _unique(list(names) if names is not None
                    else [_name_of(s, i) for i, s in enumerate(sources)])
    if len(names) != len(products):
        raise InputError(
            f"names: expected {len(products)} names, one per product, found {len(names)}. "
            "Fix: give one name per source."
        )
    steps = [grid_step(p, argname=f"sources[{i}]") for i, p in enumerate(products)]
    ref_i = int(np.argmax(steps))
    ref = products[ref_i]
    mask, mask_note = resolve_ocean_mask(ref, ocean_mask, threshold=ocean_threshold)
    if mask is None and ocean_mask is None:
        mask_note = "land where the common-grid product's data are missing"
    opts = dict(basins=basins, rho0=rho0, equatorial_half_width=equatorial_half_width,
                ocean_mask=mask if mask is not None else "data")
    regridded = []
    rows = []
    geometry = None
    for name, winds in zip(names, products):
        on_ref = _same_grid(winds, ref)
        if not on_ref:
            regridded.append(name)
        per_law = []
        for law in drag_laws:
            per_speed = []
            for speed in mean_speeds:
                if speed == "scalar" and "wind_speed" not in winds:
                    per_speed.append(None)
                    continue
                use = speed == "scalar"
                with warnings.catch_warnings():
                    warnings.simplefilter("ignore", UserWarning)
                    if on_ref:
                        res = diagnose(winds, drag_law=law, use_wind_speed=use, **opts)
                    else:
                        stress = _mean_stress_on(winds, ref, ocean_mask, drag_law=law,
                                                 use_wind_speed=use, threshold=ocean_threshold)
                        res = diagnose(stress, **opts)
                if geometry is None:
                    geometry = res["row_status"]
                per_speed.append(res["interior_transport"])
            per_law.append(per_speed)
        rows.append(per_law)
    template = next(t for law in rows for sp in law for t in sp if t is not None)
    filled = [[[t if t is not None else xr.full_like(template, np.nan) for t in sp]
               for sp in law] for law in rows]
    transport = xr.concat(
        [xr.concat([xr.concat(sp, dim="mean_speed") for sp in law], dim="drag_law")
         for law in filled], dim="product")
    transport = transport.assign_coords(
        product=("product", names), drag_law=("drag_law", [str(d) for d in drag_laws]),
        mean_speed=("mean_speed", list(mean_speeds)))
    transport = transport.transpose("product", "drag_law", "mean_speed", ...)
    transport.attrs = dict(template.attrs)
    units = transport.attrs.get("units", "1e6 m3 s-1")
    # Written out so that rows with no value at all (land, the equatorial band) give NaN
    # without the all-NaN warnings of nanmean/nanmin, which dask would raise at compute time.
    count = transport.notnull().sum(STATS_DIMS)
    has = count > 0
    mean = transport.fillna(0.0).sum(STATS_DIMS) / count.where(has)
    var = ((transport - mean) ** 2).fillna(0.0).sum(STATS_DIMS) / count.where(has)
    tmin = transport.fillna(np.inf).min(STATS_DIMS).where(has)
    tmax = transport.fillna(-np.inf).max(STATS_DIMS).where(has)
    stats = {
        "transport_mean": (mean, "mean over products, drag laws and mean speeds"),
        "transport_min": (tmin, "smallest (most southward) of the combinations"),
        "transport_max": (tmax, "largest (most northward) of the combinations"),
        "transport_range": (tmax - tmin, "range (max - min) over the combinations"),
        "transport_std": (np.sqrt(var), "standard deviation over the combinations (ddof=0)"),
    }
    out = xr.Dataset({"interior_transport": transport})
    for key, (da, long_name) in stats.items():
        out[key] = da.assign_attrs(units=units, long_name=f"Sverdrup interior transport: "
                                   f"{long_name}")
    out["transport_count"] = count.assign_attrs(
        long_name="number of combinations with a value", units="1")
    out["row_status"] = geometry
    ref_lay = grid_layout(ref, argname="reference")
    out.attrs = {
        "title": "Spread of the Sverdrup interior transport across wind products and drag laws",
        "common_grid": (
            f"the coarsest product grid, that of '{names[ref_i]}' ({steps[ref_i]:g} degrees, "
            f"{ref_lay.lat.size} x {ref_lay.lon.size}); "
            + (f"products {regridded} had their time-mean stress averaged by area onto it "
               "(first-order conservative remapping, Jones 1999)" if regridded
               else "every product was on it already")
        ),
        "ocean_mask": mask_note,
        "basins": str(basins),
        "rho0": rho0,
        "equatorial_half_width": equatorial_half_width,
        "mean_speed_note": "'scalar' is NaN for products without a wind_speed variable",
    }
    return out


def spread_table(spread: xr.Dataset, latitudes, *, basins=None):
    """The spread at chosen latitudes, beside the observed western boundary currents.

    Parameters
    ----------
    spread : xarray.Dataset
        From :func:`transport_spread` (computed or lazy).
    latitudes : sequence of float
        degrees_north; each is matched to the nearest grid row.
    basins : sequence of str, optional
        Basins to show (default all).

    Returns
    -------
    list of dict
        One row per basin and latitude: ``basin``, ``lat`` (asked), ``grid_lat``, ``mean``,
        ``min``, ``max``, ``std`` (1e6 m3 s-1, positive northward), ``count``, and the
        nearest observed boundary current of that basin within 3 degrees: ``observed``
        (name), ``observed_return`` (minus its transport: the interior flow it would
        balance, 1e6 m3 s-1) and ``observed_source``.
    """
    lats = [float(x) for x in np.atleast_1d(latitudes)]
    bad = [x for x in lats if not -90 <= x <= 90]
    if bad or not lats:
        raise InputError(
            f"latitudes: expected one or more latitudes in -90..90 degrees_north, found "
            f"{latitudes!r}. Fix: e.g. latitudes=(26.5, 30)."
        )
    obs = boundary_current_observations()
    rows = []
    names = [str(b) for b in spread["basin"].values] if basins is None else list(basins)
    for b in names:
        if b not in spread["basin"].values:
            raise InputError(
                f"basins: expected names among {list(map(str, spread['basin'].values))}, found "
                f"{b!r}. Fix: pick from those."
            )
        sub = spread.sel(basin=b)
        for la in lats:
            row = sub.sel(lat=la, method="nearest")
            match = [k for k in range(obs.sizes["current"])
                     if str(obs["basin"].values[k]) == b.lower()
                     and abs(float(obs["lat"].values[k]) - la) <= 3.0]
            k = min(match, key=lambda k: abs(float(obs["lat"].values[k]) - la)) if match else None
            rows.append(dict(
                basin=b, lat=la, grid_lat=float(row["lat"]),
                mean=float(row["transport_mean"]), min=float(row["transport_min"]),
                max=float(row["transport_max"]), std=float(row["transport_std"]),
                count=int(row["transport_count"]),
                observed=str(obs["current"].values[k]) if k is not None else "",
                observed_return=-float(obs["transport"].values[k]) if k is not None else np.nan,
                observed_source=str(obs["source"].values[k]) if k is not None else "",
            ))
    return rows
