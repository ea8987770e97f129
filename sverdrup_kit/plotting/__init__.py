"""Figures: maps, latitude profiles, time diagrams and the standard figure set.

Imported on demand (``from sverdrup_kit import plotting``), not by ``import sverdrup_kit``:
cartopy and matplotlib cost about a second to import.
"""

from .figures import *  # noqa: F401,F403
from .figures import __all__  # noqa: F401
from .balance import plot_balance  # noqa: E402,F401
from .islands import map_island_rule, plot_island_transports  # noqa: E402,F401
from .model_grid import plot_model_vs_sverdrup  # noqa: E402,F401
from .adjustment import mark_adjusted_rows, plot_crossing_time, plot_lagged_transport  # noqa: E402,F401
from .spread import plot_transport_spread  # noqa: E402,F401

__all__ = [*__all__, "plot_balance", "plot_model_vs_sverdrup"]
__all__ = [*__all__, "mark_adjusted_rows", "plot_crossing_time", "plot_lagged_transport",
           "plot_transport_spread"]
__all__ = [*__all__, "map_island_rule", "plot_island_transports"]
