"""Figures: maps, transports against latitude, latitude-time diagrams and the standard set.

Imported on demand (``from sverdrup_kit import plotting``), not by ``import sverdrup_kit``:
cartopy and matplotlib cost about a second to import.

- :mod:`.maps`: any field, wind stress, its curl, Ekman pumping, the Sverdrup streamfunction;
- :mod:`.profiles`: the interior transport of each basin against latitude;
- :mod:`.time_diagrams`: latitude-time diagrams of a seasonal cycle or a multi-year record;
- :mod:`.adjustment`: Rossby-wave crossing times and the lagged response;
- :mod:`.balance`: Sverdrup transport against hydrographic sections;
- :mod:`.model_grid`: ocean-model transports against the Sverdrup transport;
- :mod:`.spread`: the spread of transports across wind products and drag laws;
- :mod:`.islands`: Godfrey's island rule: island and throughflow transports, paths on a map;
- :mod:`.figure_set`: the standard figures of a diagnosis, as the command line writes them.

Private modules hold what they share: ``_style`` (sizes, fonts, colours, unit labels),
``_inputs`` (reading the data), ``_mapping`` (projections, land, shading, layout) and
``_coastlines`` (offline GSHHS coastlines).
"""

from ._style import FIGURE_WIDTHS
from .adjustment import mark_adjusted_rows, plot_crossing_time, plot_lagged_transport
from .balance import plot_balance
from .figure_set import (
    FIGURE_FORMATS,
    STANDARD_FIGURES,
    available_figures,
    save_standard_figures,
)
from .islands import map_island_rule, plot_island_transports
from .maps import (
    map_ekman_pumping,
    map_field,
    map_sverdrup_streamfunction,
    map_wind_stress,
    map_wind_stress_curl,
)
from .model_grid import plot_model_vs_sverdrup
from .profiles import plot_interior_transport
from .spread import plot_transport_spread
from .time_diagrams import plot_latitude_time

__all__ = [
    "FIGURE_FORMATS",
    "FIGURE_WIDTHS",
    "STANDARD_FIGURES",
    "map_field",
    "map_wind_stress",
    "map_wind_stress_curl",
    "map_ekman_pumping",
    "map_sverdrup_streamfunction",
    "map_island_rule",
    "mark_adjusted_rows",
    "plot_balance",
    "plot_crossing_time",
    "plot_lagged_transport",
    "plot_transport_spread",
    "plot_model_vs_sverdrup",
    "plot_interior_transport",
    "plot_island_transports",
    "plot_latitude_time",
    "available_figures",
    "save_standard_figures",
]
