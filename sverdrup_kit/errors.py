"""Public exceptions and warnings of sverdrup_kit, in one place.

Every error says which argument is wrong, what was expected, what was found and how to fix
it. Catch these classes from here (``from sverdrup_kit.errors import GridError``); they are
also on the package's top level. Most derive from :class:`ValueError`, so code that already
catches that keeps working.
"""

from __future__ import annotations

__all__ = [
    "BuiltinOceanMaskWarning",
    "GridError",
    "InputError",
    "MonthlyMeanWindWarning",
    "TimeDecodingWarning",
    "UndeclaredFillValueWarning",
    "UnitsError",
]


class InputError(ValueError):
    """A value passed in that the toolkit cannot use as given: out of range, of the wrong
    kind, or physically implausible."""


class GridError(InputError):
    """A latitude/longitude grid that the toolkit cannot work on, with the reason and the fix."""


class UnitsError(InputError):
    """Units that the toolkit does not recognise for the quantity asked for."""


class MonthlyMeanWindWarning(UserWarning):
    """Winds that look like monthly (or longer) means were fed to the quadratic bulk formula."""


class TimeDecodingWarning(UserWarning):
    """A time axis that its own calendar cannot decode was decoded another way."""


class BuiltinOceanMaskWarning(UserWarning):
    """Winds over land were masked with the built-in Earth ocean mask, chosen automatically."""


class UndeclaredFillValueWarning(UserWarning):
    """Values equal to a common fill value (-9999, 1e20, ...) that no attribute declares were
    taken as missing."""
