"""A dask scheduler that counts computations, to check that functions stay lazy.

The habit of guarding against early computes comes from the cf_xarray and xarray test suites
(common practice).
"""

import dask


class CountingScheduler:
    """Use as ``dask.config.set(scheduler=CountingScheduler())``; ``calls`` counts computes."""

    def __init__(self):
        self.calls = 0

    def __call__(self, dsk, keys, **kwargs):
        self.calls += 1
        return dask.get(dsk, keys, **kwargs)
