"""Tables of physical limits and undeclared fill values, apart from the checks that use them.

The checks live in :mod:`sverdrup_kit._validate`; every public function that takes wind, stress
or curl reads its limits from here, so one table decides what is refused everywhere. A value
beyond its limit is refused with an :class:`~sverdrup_kit.errors.InputError` that names the
variable, the number of cells and an example; a value equal to one of
:data:`UNDECLARED_FILL_VALUES` is taken as missing, with a warning.
"""

from __future__ import annotations

__all__ = ["PLAUSIBLE_LIMITS", "UNDECLARED_FILL_VALUES", "FILL_SENTINEL"]

#: Largest plausible magnitude of each kind of field, in SI units: kind -> (limit, units, why).
PLAUSIBLE_LIMITS = {
    "speed": (
        150.0,
        "m s-1",
        "the highest reliably measured near-surface winds are gusts of about 113 m s-1 "
        "(Barrow Island, 1996, WMO record; from memory); gridded means stay well below",
    ),
    "stress": (
        100.0,
        "Pa",
        "the bulk formula with a drag coefficient saturating near 2.5e-3 at hurricane speeds "
        "(Powell, Vickery and Reinhold 2003, Nature 422, 279-283; from memory) gives about "
        "70 Pa at 150 m s-1",
    ),
    "curl": (
        1.0e-2,
        "N m-3",
        "100 Pa changing across a 10 km grid cell (derived from the stress limit); basin-scale "
        "curls are near 1e-7 N m-3 (common practice)",
    ),
}

#: Fill values that files use without declaring them in _FillValue or missing_value (common
#: practice): -9999 and -999 (hand-written and station-derived grids), 9.96921e36 (netCDF's
#: default float fill), 1e20 (CMIP output) and -1e34 (older ocean-model output). They are
#: compared in the field's own precision, so a float32 9.96921e36 matches.
UNDECLARED_FILL_VALUES = (-9999.0, -999.0, 9.969209968386869e36, 1.0e20, -1.0e34)

#: Any magnitude at or beyond this is a fill sentinel, not data: no wind, stress or curl in any
#: accepted unit comes near it (fills seen in real files all lie beyond it).
FILL_SENTINEL = 1.0e15
