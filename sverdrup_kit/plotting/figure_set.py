"""The standard figure set of a diagnosis, as the command line writes it.

Each standard figure has a name that says what it shows; the file it is saved to is that name
with the format's suffix (``interior_transport_by_latitude.png``).
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path
from typing import Callable, NamedTuple

import matplotlib.pyplot as plt
import xarray as xr

from .adjustment import plot_crossing_time
from .maps import (
    map_ekman_pumping,
    map_sverdrup_streamfunction,
    map_wind_stress,
    map_wind_stress_curl,
)
from .profiles import plot_interior_transport
from .time_diagrams import plot_latitude_time

__all__ = ["FIGURE_FORMATS", "STANDARD_FIGURES", "available_figures", "save_standard_figures"]

#: File formats the standard figures are written in (raster PNG; vector PDF and SVG, with the
#: large colour meshes embedded as images).
FIGURE_FORMATS = ("png", "pdf", "svg")


class _Figure(NamedTuple):
    needs: tuple[str, ...]
    draw: Callable
    shows: str


def _maps(draw):
    return lambda data, width, coastlines: draw(data, width=width, coastlines=coastlines)


_FIGURES = {
    "wind_stress_map": _Figure(
        ("taux", "tauy"), _maps(map_wind_stress),
        "wind-stress magnitude and vectors, time mean"),
    "wind_stress_curl_map": _Figure(
        ("wind_stress_curl",), _maps(map_wind_stress_curl), "wind-stress curl, time mean"),
    "ekman_pumping_map": _Figure(
        ("ekman_pumping",), _maps(map_ekman_pumping), "Ekman pumping, time mean"),
    "sverdrup_streamfunction_map": _Figure(
        ("sverdrup_streamfunction",), _maps(map_sverdrup_streamfunction),
        "Sverdrup streamfunction, with where the balance fails shaded"),
    "interior_transport_by_latitude": _Figure(
        ("interior_transport",),
        lambda data, width, coastlines: plot_interior_transport(data, width=width),
        "interior and boundary-current transport of each basin against latitude"),
    "interior_transport_by_time": _Figure(
        ("interior_transport_by_time",),
        lambda data, width, coastlines: plot_latitude_time(
            data["interior_transport_by_time"], row_status=data.get("row_status"),
            width=width, adjusted=_adjusted_at_the_step(data)),
        "interior transport of each basin against latitude and time, with the rows that had "
        "time to adjust"),
    "rossby_crossing_time_by_latitude": _Figure(
        ("basin_crossing_time",),
        lambda data, width, coastlines: plot_crossing_time(data, width=width),
        "Rossby-wave crossing time of each basin against latitude"),
}


def _adjusted_at_the_step(data: xr.Dataset):
    """``sverdrup_adjusted`` at the time scale of the record's steps, when the result has it."""
    flags = data.get("sverdrup_adjusted")
    scale = data["interior_transport_by_time"].attrs.get("adjustment_time_scale")
    if flags is None or scale not in flags["time_scale"].values:
        return None
    return flags.sel(time_scale=scale)

#: The standard figures, by name (also the file name), and what each shows.
STANDARD_FIGURES = {name: f.shows for name, f in _FIGURES.items()}


def _save(fig, path: Path, dpi: int) -> Path:
    """Save atomically: a temporary file in the same folder, then a rename."""
    fd, tmp = tempfile.mkstemp(suffix=path.suffix, dir=path.parent)
    os.close(fd)
    try:
        # Fast PNG compression: a third of the time of the default for files 10-20 % larger.
        extra = {"pil_kwargs": {"compress_level": 2}} if path.suffix == ".png" else {}
        fig.savefig(tmp, dpi=dpi, format=path.suffix[1:], **extra)
        os.chmod(tmp, 0o644)
        os.replace(tmp, path)
    except BaseException:
        os.unlink(tmp)
        raise
    finally:
        plt.close(fig)
    return path


def available_figures(data: xr.Dataset) -> list[str]:
    """Names of the standard figures that the variables of ``data`` allow, in table order."""
    return [n for n, f in _FIGURES.items() if all(v in data for v in f.needs)]


def _chosen(data: xr.Dataset, figures) -> list[str]:
    if figures is None:
        return available_figures(data)
    chosen = [figures] if isinstance(figures, str) else list(figures)
    unknown = [n for n in chosen if n not in _FIGURES]
    if unknown or not chosen:
        raise ValueError(
            f"figures: expected names among {list(_FIGURES)}, found {unknown or chosen}. "
            "Fix: pick some of those names, or None for every figure the data allow."
        )
    for name in chosen:
        lacking = [v for v in _FIGURES[name].needs if v not in data]
        if lacking:
            raise ValueError(
                f"figures: '{name}' needs the variables {lacking}, which data lacks (it has "
                f"{list(data.data_vars)}). Fix: leave '{name}' out, or pass the full result of "
                "sverdrup_kit.pipeline.diagnose."
            )
    return list(dict.fromkeys(chosen))


def save_standard_figures(data: xr.Dataset, folder, *, figures=None, width="page",
                          dpi: int = 200, fmt: str = "png",
                          coastlines: str = "auto") -> list[Path]:
    """Draw and save the standard figures of a diagnosis; return the paths written.

    Parameters
    ----------
    data : xarray.Dataset
        From :func:`~sverdrup_kit.pipeline.diagnose` (or any Dataset with some of ``taux`` and
        ``tauy``, ``wind_stress_curl``, ``ekman_pumping``, ``sverdrup_streamfunction``,
        ``interior_transport``, ``interior_transport_by_time``).
    folder : path
        Existing or new folder.
    figures : str or list of str, optional
        Names from :data:`STANDARD_FIGURES`, drawn in the order given (default: every figure
        the variables of ``data`` allow, in the order of that table).
    width : "column", "page" or float
        Figure width: 3.5 in, 7.2 in or inches.
    dpi : int
        Resolution of PNG files (and of the meshes embedded in PDF and SVG files).
    fmt : {"png", "pdf", "svg"}
        File format.
    coastlines : {"auto", "gshhs", "mask", "none"}
        As in :func:`~sverdrup_kit.plotting.maps.map_field`.

    Returns
    -------
    list of pathlib.Path
        Files written, ``folder / f"{name}.{fmt}"`` for each figure drawn.
    """
    if not isinstance(data, xr.Dataset):
        raise TypeError(f"data: expected an xarray.Dataset, found {type(data).__name__}. "
                        "Fix: pass the result of sverdrup_kit.pipeline.diagnose.")
    if fmt not in FIGURE_FORMATS:
        raise ValueError(f"fmt: expected one of {list(FIGURE_FORMATS)}, found {fmt!r}. "
                         "Fix: pass fmt='png' (or 'pdf', 'svg' for vector files).")
    if not isinstance(dpi, int) or not 30 <= dpi <= 1200:
        raise ValueError(f"dpi: expected a whole number of dots per inch from 30 to 1200, "
                         f"found {dpi!r}. Fix: pass dpi=200.")
    names = _chosen(data, figures)
    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    paths = []
    for name in names:
        fig, _ = _FIGURES[name].draw(data, width, coastlines)
        paths.append(_save(fig, folder / f"{name}.{fmt}", dpi))
    return paths
