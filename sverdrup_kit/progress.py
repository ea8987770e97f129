"""Progress reports for long dask computations: off by default, on by keyword or environment.

Results of the public functions stay lazy; the work happens when the caller computes or writes
them. These helpers show how far that work has got:

- :func:`progress` -- a context manager; dask computations inside it (``.compute()``,
  ``.load()``, ``to_netcdf``) draw a text bar on the local schedulers;
- :func:`compute` -- computes any dask or xarray objects with a bar, on the local schedulers
  and on a :mod:`dask.distributed` cluster alike.

Both are silent unless ``progress=True`` is passed or the environment variable
``SVERDRUP_KIT_PROGRESS`` is set to ``1`` (``true``, ``yes``, ``on``); ``progress=False``
silences them whatever the environment says.
"""

from __future__ import annotations

import contextlib
import os
import sys

import dask

__all__ = ["PROGRESS_ENV", "progress_enabled", "progress", "compute"]

#: Environment variable that turns progress bars on when no keyword says otherwise.
PROGRESS_ENV = "SVERDRUP_KIT_PROGRESS"

_TRUE = {"1", "true", "yes", "on"}
_FALSE = {"", "0", "false", "no", "off"}


def progress_enabled(progress: bool | None = None) -> bool:
    """Whether to show progress: ``progress`` when given, else ``SVERDRUP_KIT_PROGRESS``.

    Raises
    ------
    ValueError
        When the environment variable holds something other than a yes/no word.
    """
    if progress is not None:
        return bool(progress)
    raw = os.environ.get(PROGRESS_ENV, "").strip().lower()
    if raw in _TRUE:
        return True
    if raw in _FALSE:
        return False
    raise ValueError(
        f"{PROGRESS_ENV}: expected 1/0 (or true/false, yes/no, on/off), found {raw!r}. "
        f"Fix: export {PROGRESS_ENV}=1 to show progress bars, or unset it."
    )


def _client():
    """The current dask.distributed client, or None (also when distributed is not installed)."""
    try:
        from distributed import get_client
    except ImportError:
        return None
    try:
        return get_client()
    except ValueError:
        return None


@contextlib.contextmanager
def progress(enabled: bool | None = None, *, stream=None, minimum: float = 1.0):
    """Draw a text progress bar for dask computations run inside the block.

    Parameters
    ----------
    enabled : bool, optional
        Show the bar; default from ``SVERDRUP_KIT_PROGRESS`` (off when unset).
    stream : file-like, optional
        Where to draw (default ``sys.stderr``, so that standard output stays clean for data).
    minimum : float, optional
        Seconds a computation must last before a bar appears; short ones stay silent.

    Notes
    -----
    Covers the local schedulers (threads, processes, synchronous). On a dask.distributed
    cluster use :func:`compute`, or the cluster's dashboard.

    Examples
    --------
    >>> with progress(True):                                     # doctest: +SKIP
    ...     result.to_netcdf("out.nc")
    """
    if not progress_enabled(enabled):
        yield
        return
    from dask.diagnostics import ProgressBar

    with ProgressBar(minimum=minimum, out=sys.stderr if stream is None else stream):
        yield


def compute(*objs, progress: bool | None = None, stream=None, **kwargs):
    """Compute dask-backed objects (arrays, xarray objects, delayed), with an optional bar.

    Parameters
    ----------
    *objs
        Objects to compute together, sharing intermediate results.
    progress : bool, optional
        Show a bar; default from ``SVERDRUP_KIT_PROGRESS`` (off when unset).
    stream : file-like, optional
        Where to draw (default ``sys.stderr``).
    **kwargs
        Passed to :func:`dask.compute` (e.g. ``scheduler="processes"``).

    Returns
    -------
    tuple
        The computed objects, in order (as :func:`dask.compute`).
    """
    if not progress_enabled(progress):
        return dask.compute(*objs, **kwargs)
    out = sys.stderr if stream is None else stream
    client = None if "scheduler" in kwargs else _client()
    if client is not None:
        from distributed import progress as distributed_progress

        futures = client.compute(list(objs), **kwargs)
        # distributed draws its text bar on standard output; send it where the caller asked.
        with contextlib.redirect_stdout(out):
            distributed_progress(futures)
        return tuple(client.gather(futures))
    from dask.diagnostics import ProgressBar

    with ProgressBar(minimum=0.0, out=out):
        return dask.compute(*objs, **kwargs)
