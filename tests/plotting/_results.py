"""A stand-in of the agreed Sverdrup result schema, built by hand from the synthetic world, and
helpers that read figures back.

The curl comes from the toolkit's operator and the interior transport from a plain zonal sum,
so the figure tests exercise the figures, not the Sverdrup solver.
"""

import numpy as np
import xarray as xr

from sverdrup_kit.physics.operators import wind_stress_curl

RHO0, CD, RHO_AIR = 1025.0, 1.2e-3, 1.22


OMEGA, R = 7.292115e-5, 6.371e6


FLAGS = dict(flag_values=np.array([0, 1, 2, 3, 4], dtype=np.int8),
             flag_meanings="valid equatorial_band no_eastern_coast too_narrow no_ocean")


# (name, a longitude inside the basin, latitude range) on the synthetic world.
BASINS = [("Halcyon Ocean", 101.0, (-36, 70)), ("Lissom Ocean", 291.0, (-36, 70)),
          ("Gulf of Maren", 51.0, (16, 32)), ("Skerrow Passage", 1.0, (-66, -46))]


def _runs_containing(row_ocean, j):
    """Indices of the periodic run of ocean cells containing column j (empty if land)."""
    n = row_ocean.size
    if not row_ocean[j]:
        return []
    if row_ocean.all():
        return list(range(n))
    cells, k = [j], (j - 1) % n
    while row_ocean[k]:
        cells.append(k)
        k = (k - 1) % n
    k = (j + 1) % n
    while row_ocean[k]:
        cells.append(k)
        k = (k + 1) % n
    return cells


def fake_sverdrup(world):
    """A Dataset of the agreed sverdrup_transport() schema, computed by hand on the synthetic
    world."""
    speed = world.wind_speed.astype("f8")
    taux = (RHO_AIR * CD * speed * world.u.astype("f8")).assign_attrs(units="Pa")
    tauy = (RHO_AIR * CD * speed * world.v.astype("f8")).assign_attrs(units="Pa")
    curl_t = wind_stress_curl(taux, tauy)
    lat, lon = world.lat.values, world.lon.values
    ocean = world.ocean_mask.values.astype(bool)
    beta = 2 * OMEGA * np.cos(np.deg2rad(lat)) / R
    dx = R * np.cos(np.deg2rad(lat)) * np.deg2rad(2.0)
    nb, ny, nx = len(BASINS), lat.size, lon.size
    basin_id = np.full((ny, nx), -1, dtype=np.int32)
    status = np.full((nb, ny), 4, dtype=np.int8)
    west = np.full((nb, ny), np.nan)
    east = np.full((nb, ny), np.nan)
    for b, (_, lon0, (s, n)) in enumerate(BASINS):
        j = int(np.argmin(np.abs(lon - lon0)))
        for i in np.flatnonzero((lat > s) & (lat < n)):
            cells = [c for c in _runs_containing(ocean[i], j) if basin_id[i, c] < 0]
            if not cells:
                continue
            basin_id[i, cells] = b
            whole = ocean[i].all()
            status[b, i] = 2 if whole else (1 if abs(lat[i]) < 3 else 0)
            if not whole:
                order = sorted(cells, key=lambda c: (lon[c] - lon[j] + 180) % 360)
                west[b, i], east[b, i] = lon[order[0]] - 1, lon[order[-1]] + 1
    t_dims = ("time", "basin", "lat")
    interior_t = np.full((12, nb, ny), np.nan)
    psi_t = np.full((12, ny, nx), np.nan)
    curl_v = curl_t.values
    for b in range(nb):
        for i in np.flatnonzero(status[b] == 0):
            cols = np.flatnonzero(basin_id[i] == b)
            v = curl_v[:, i, cols] / (RHO0 * beta[i]) * dx[i] / 1e6  # Sv per cell
            interior_t[:, b, i] = v.sum(axis=1)
            # Integrate westward from the eastern coast: order the cells from east to west.
            order = np.argsort(-((lon[cols] - west[b, i]) % 360))
            psi_t[:, i, cols[order]] = -np.cumsum(v[:, order], axis=1)
    basin = [name for name, _, _ in BASINS]
    sv = "1e6 m3 s-1"
    ds = xr.Dataset(
        {
            "wind_stress_curl": curl_t.mean("time"),
            "sverdrup_streamfunction": (("lat", "lon"), psi_t.mean(0),
                               {"units": sv, "long_name": "Sverdrup streamfunction"}),
            "basin_id": (("lat", "lon"), basin_id),
            "interior_transport": (("basin", "lat"), interior_t.mean(0),
                                   {"units": sv, "long_name": "Sverdrup interior transport"}),
            "boundary_current_transport": (("basin", "lat"), -interior_t.mean(0),
                                           {"units": sv, "long_name": "boundary current"}),
            "interior_transport_by_time": (t_dims, interior_t,
                                           {"units": sv,
                                            "long_name": "Sverdrup interior transport"}),
            "western_coast_lon": (("basin", "lat"), west, {"units": "degrees_east"}),
            "eastern_coast_lon": (("basin", "lat"), east, {"units": "degrees_east"}),
            "row_status": (("basin", "lat"), status, FLAGS),
            "ocean_mask": world.ocean_mask,
            "taux": taux.mean("time").assign_attrs(units="Pa", long_name="eastward wind stress"),
            "tauy": tauy.mean("time").assign_attrs(units="Pa", long_name="northward wind stress"),
        },
        coords={"basin": basin, "lat": world.lat, "lon": world.lon, "time": world.time},
        attrs={"equatorial_half_width": 3.0},
    )
    f = 2 * OMEGA * np.sin(np.deg2rad(ds.lat))
    pumping = (ds.wind_stress_curl / (RHO0 * f)).where(np.abs(ds.lat) >= 3)
    ds["ekman_pumping"] = pumping.assign_attrs(units="m s-1", long_name="Ekman pumping")
    return ds


OBS = [
    dict(name="Brenn Current", basin="Halcyon Ocean", lat=27.0, transport=35.0, spread=4.0),
    dict(name="Quillon Jet", basin="Lissom Ocean", lat=33.0, transport=20.0, spread=3.0),
    dict(name="Austral Drift", basin="Halcyon Ocean", lat=-25.0, transport=-25.0, spread=6.0),
]


def save(fig, tmp_path, name):
    path = tmp_path / f"{name}.png"
    fig.savefig(path, dpi=150)
    assert path.stat().st_size > 10_000
    return path


def colorbar_label(fig):
    labels = [a.get_xlabel() for a in fig.axes if a.get_label() == "<colorbar>"]
    assert len(labels) == 1
    return labels[0]


def _drawn_texts(fig):
    """Visible, non-empty texts of a figure: tick labels inside each axis's view, axis labels,
    titles, annotations, legends and figure texts."""
    out = list(fig.texts)
    for leg in fig.legends:
        out += leg.get_texts()
    for ax in fig.axes:
        for axis, limits in ((ax.xaxis, ax.get_xlim()), (ax.yaxis, ax.get_ylim())):
            lo, hi = sorted(limits)
            for tick in axis.get_major_ticks():
                if lo - 1e-9 <= tick.get_loc() <= hi + 1e-9:
                    out.append(tick.label1)
            out.append(axis.label)
        out += [ax.title, ax._left_title, ax._right_title, *ax.texts]
        if ax.get_legend() is not None:
            out += ax.get_legend().get_texts()
    return [t for t in out if t.get_visible() and t.get_text().strip()]


def overlapping_texts(fig):
    """Pairs of drawn texts whose boxes overlap by more than a pixel, and texts reaching
    outside the figure (common practice: no label may hide another or be cut off)."""
    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    boxes = [(t.get_text(), t.get_window_extent(renderer)) for t in _drawn_texts(fig)]
    fw, fh = fig.bbox.width, fig.bbox.height
    problems = [(a, "outside the figure") for a, b in boxes
                if b.x0 < -1 or b.y0 < -1 or b.x1 > fw + 1 or b.y1 > fh + 1]
    for i, (a, ba) in enumerate(boxes):
        for c, bc in boxes[i + 1:]:
            w = min(ba.x1, bc.x1) - max(ba.x0, bc.x0)
            h = min(ba.y1, bc.y1) - max(ba.y0, bc.y0)
            if w > 1 and h > 1:
                problems.append((a, c))
    return problems
