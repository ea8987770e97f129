"""Invented ocean-model grids for demos, tests and benchmarks: rotated-pole, displaced-pole and
tripolar grids with exact cell corners, and an invented stress field whose curl is known.

Derived here: the rotated and displaced-pole grids are regular grids of a sphere whose pole
was moved by a rotation; the tripolar grid joins a regular grid south of ``join_lat`` to a
bipolar cap made with bipolar coordinates in the north-polar stereographic plane (a conformal
construction of the kind Murray 1996, J. Comput. Phys. 126, 251-273, describes; from memory),
its two poles on the join latitude at ``lon0`` and ``lon0 + 180`` and its last row folded.
"""

from __future__ import annotations

import numpy as np
import xarray as xr

from .geometry.curvilinear import _to_latlon, _unit

__all__ = ["rotated_pole_grid", "tripolar_grid", "as_field", "with_bounds", "smooth_winds"]


def _rotation(pole_lat, pole_lon):
    th = np.deg2rad(90.0 - pole_lat)
    ph = np.deg2rad(pole_lon)
    ry = np.array([[np.cos(th), 0, np.sin(th)], [0, 1, 0], [-np.sin(th), 0, np.cos(th)]])
    rz = np.array([[np.cos(ph), -np.sin(ph), 0], [np.sin(ph), np.cos(ph), 0], [0, 0, 1]])
    return rz @ ry


def rotated_pole_grid(d, *, pole_lat, pole_lon, lat_limit=80.0):
    """Centres and corners of a d-degree grid whose north pole sits at (pole_lat, pole_lon);
    rows cover rotated latitudes within +-lat_limit."""
    rot = _rotation(pole_lat, pole_lon)
    lat_r = np.arange(-lat_limit + d / 2, lat_limit, d)
    lon_r = np.arange(d / 2, 360, d)
    la, lo = np.meshgrid(lat_r, lon_r, indexing="ij")
    lat, lon = _to_latlon(_unit(la, lo) @ rot.T)
    le = np.arange(-lat_limit, lat_limit + d / 2, d)
    oe = np.arange(0, 360 + d / 2, d)
    cla, clo = np.meshgrid(le, oe, indexing="ij")
    clat, clon = _to_latlon(_unit(cla, clo) @ rot.T)
    return lat, lon, clat, clon


def _cap(lam, u, join_lat, lon0):
    a = np.tan(np.deg2rad(90.0 - join_lat) / 2)
    with np.errstate(divide="ignore"):
        s = np.log(np.abs(np.tan(lam / 2)))
    t = np.where(lam < np.pi, np.pi / 2 + np.pi / 2 * u, 3 * np.pi / 2 - np.pi / 2 * u)
    q = np.exp(s + 1j * t)
    with np.errstate(invalid="ignore", divide="ignore"):
        z = a * (1 + q) / (1 - q)
    z = np.where(np.isfinite(z), z, a)  # the poles themselves
    lat = 90.0 - np.rad2deg(2 * np.arctan(np.abs(z)))
    lon = lon0 + np.rad2deg(np.angle(z))
    return lat, lon


def tripolar_grid(d, *, join_lat=60.0, lon0=80.0, south=-78.0, rows=None):
    """Centres and corners of a nominal d-degree tripolar grid (ny, nx), folded at the top.

    ``rows``: total number of rows, when the rows south of ``join_lat`` should be closer than
    ``d`` (models refine their meridional spacing); the cap keeps ``d``.
    """
    nx = int(round(360 / d))
    lam_c = (np.arange(nx) + 0.5) * np.deg2rad(d)
    lam_e = np.arange(nx + 1) * np.deg2rad(d)
    ncap = int(round((90.0 - join_lat) / d))
    nsouth = int(round((join_lat - south) / d)) if rows is None else rows - ncap
    dy = (join_lat - south) / nsouth
    lat_s = south + dy * (np.arange(nsouth) + 0.5)
    uc = (np.arange(ncap) + 0.5) / ncap
    ue = np.arange(ncap + 1) / ncap
    la_s, lo_s = np.meshgrid(lat_s, np.rad2deg(lam_c) + lon0, indexing="ij")
    la_c, lo_c = _cap(lam_c[None, :], uc[:, None], join_lat, lon0)
    lat = np.concatenate([la_s, la_c])
    lon = np.concatenate([lo_s, lo_c])
    le_s = south + dy * np.arange(nsouth)
    cla_s, clo_s = np.meshgrid(le_s, np.rad2deg(lam_e) + lon0, indexing="ij")
    cla_c, clo_c = _cap(lam_e[None, :], ue[:, None], join_lat, lon0)
    clat = np.concatenate([cla_s, cla_c])
    clon = np.concatenate([clo_s, clo_c])
    return lat, lon, clat, clon


def as_field(values, lat, lon, *, units="Pa", name=None):
    """A DataArray on the model grid with 2-D CF latitude and longitude coordinates."""
    coords = {"lat": (("y", "x"), lat, {"units": "degrees_north", "standard_name": "latitude"}),
              "lon": (("y", "x"), lon, {"units": "degrees_east", "standard_name": "longitude"})}
    return xr.DataArray(values, dims=("y", "x"), coords=coords, attrs={"units": units},
                        name=name)


def with_bounds(ds, clat, clon):
    """``ds`` (a Dataset on the model grid) with CF cell bounds from (ny+1, nx+1) corners."""
    bl = np.stack([clat[:-1, :-1], clat[:-1, 1:], clat[1:, 1:], clat[1:, :-1]], axis=-1)
    bo = np.stack([clon[:-1, :-1], clon[:-1, 1:], clon[1:, 1:], clon[1:, :-1]], axis=-1)
    ds = ds.assign(lat_bounds=(("y", "x", "nv"), bl), lon_bounds=(("y", "x", "nv"), bo))
    ds["lat"].attrs["bounds"] = "lat_bounds"
    ds["lon"].attrs["bounds"] = "lon_bounds"
    return ds


#: Two fixed matrices for :func:`smooth_winds` (invented).
_M1 = np.array([[0.02, -0.09, 0.03], [0.07, -0.01, -0.05], [0.04, 0.06, 0.01]])
_M2 = np.array([[0.01, 0.05, -0.02], [-0.08, 0.03, 0.04], [0.02, -0.03, 0.02]])


def _curl_vector(m):
    return np.array([m[2, 1] - m[1, 2], m[0, 2] - m[2, 0], m[1, 0] - m[0, 1]])


def smooth_winds(lat, lon, radius=6.371e6):
    """An invented stress field, smooth everywhere on the sphere (poles included), with its
    exact curl.

    The field is the tangential part of F(r) = M1 r + z M2 r (r the unit position vector,
    z its third component). By Stokes' theorem the surface curl of the tangential part is the
    radial component of the 3-D curl of F (derived): curl F = w1 + grad z x M2 r + z w2,
    with w the curl vectors of the matrices, divided by the radius.
    """
    r = _unit(lat, lon)
    z = r[..., 2:3]
    f = r @ _M1.T + z * (r @ _M2.T)
    q = np.deg2rad(lon)
    east = np.stack([-np.sin(q), np.cos(q), np.zeros_like(q)], axis=-1)
    north = np.cross(r, east)
    tx = np.einsum("...i,...i", f, east)
    ty = np.einsum("...i,...i", f, north)
    w1, w2 = _curl_vector(_M1), _curl_vector(_M2)
    zhat = np.array([0.0, 0.0, 1.0])
    curl3 = w1 + np.cross(zhat, r @ _M2.T) + z * w2
    curl = np.einsum("...i,...i", curl3, r) / radius
    return tx, ty, curl
