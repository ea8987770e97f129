"""sverdrup_kit: wind-driven ocean circulation diagnostics from gridded wind climatologies.

The package tree follows the data path: :mod:`.io` (reading winds and stress, units, writing
CF NetCDF) -> :mod:`.physics` (drag laws, operators on the sphere, Ekman, Sverdrup, boundary
layers and the barotropic solver) on the grids of :mod:`.geometry` (grid, coordinates, basins)
-> :mod:`.ocean` (comparison with the ocean) -> :mod:`.plotting`. Kernels live in
``_compiled`` behind one dispatch point; :mod:`.pipeline` and :mod:`.cli` run the whole path.
Users import from this top level (or the public sub-packages), never from a private module.

Results are climatological diagnostics for research, not forecasts for navigation or
marine operations.
"""

from .constants import AIR_DENSITY, EARTH_RADIUS, OMEGA, RHO0, SVERDRUP_IN_M3_S
from .geometry.basins import basin_ids
from .geometry.curvilinear import CurvilinearGrid
from .geometry.integral import EarthBasinsNotice, sverdrup_geometry
from .geometry.land import island_table
from .geometry.grid import SphericalGrid, beta_parameter, coriolis_parameter
from .errors import (
    GridError,
    InputError,
    MonthlyMeanWindWarning,
    TimeDecodingWarning,
    UndeclaredFillValueWarning,
    UnitsError,
)
from .io.readers import open_stress, open_winds
from .io.masks import ocean_fraction, ocean_mask
from .climatology import anomalies, climatology
from .spread import spread_table, transport_spread
from .errors import BuiltinOceanMaskWarning
from .io.writers import open_results, write_netcdf
from .ocean.hydrography import LinearEquationOfState, balance_check, geostrophic_transport
from .ocean.observations import balance_section_observations, boundary_current_observations
from .physics.adjustment import (
    adjustment_flags,
    default_n_squared,
    first_mode_speed,
    first_mode_speed_from_ts,
    long_wave_response,
    rossby_adjustment,
)
from .physics.barotropic import boundary_current, solve_barotropic, solve_basin
from .physics.boundary_layers import (
    munk_boundary_layer,
    munk_edge_distance,
    munk_peak_distance,
    munk_width,
    stommel_basin,
    stommel_width,
)
from .physics.ekman import ekman
from .physics.island_rule import island_rule, passage_transport
from .physics.model_grid import model_circulation, rotate_to_geographic, rotate_to_grid
from .physics.operators import curl_on_sphere, wind_stress_curl
from .physics.stress import DRAG_LAWS, DragLaw, drag_coefficient, wind_stress
from .physics.sverdrup import sverdrup_transport
from .pipeline import diagnose

__version__ = "0.1.0"

__all__ = [
    "adjustment_flags",
    "default_n_squared",
    "first_mode_speed",
    "first_mode_speed_from_ts",
    "long_wave_response",
    "rossby_adjustment",
    "anomalies",
    "BuiltinOceanMaskWarning",
    "climatology",
    "ocean_fraction",
    "ocean_mask",
    "spread_table",
    "transport_spread",
    "AIR_DENSITY",
    "balance_check",
    "balance_section_observations",
    "basin_ids",
    "EarthBasinsNotice",
    "island_table",
    "sverdrup_geometry",
    "beta_parameter",
    "boundary_current",
    "boundary_current_observations",
    "coriolis_parameter",
    "curl_on_sphere",
    "CurvilinearGrid",
    "diagnose",
    "drag_coefficient",
    "DRAG_LAWS",
    "DragLaw",
    "EARTH_RADIUS",
    "ekman",
    "geostrophic_transport",
    "model_circulation",
    "GridError",
    "InputError",
    "island_rule",
    "LinearEquationOfState",
    "MonthlyMeanWindWarning",
    "munk_boundary_layer",
    "munk_edge_distance",
    "munk_peak_distance",
    "munk_width",
    "OMEGA",
    "open_results",
    "open_stress",
    "open_winds",
    "passage_transport",
    "RHO0",
    "rotate_to_geographic",
    "rotate_to_grid",
    "solve_barotropic",
    "solve_basin",
    "SphericalGrid",
    "stommel_basin",
    "stommel_width",
    "sverdrup_transport",
    "SVERDRUP_IN_M3_S",
    "TimeDecodingWarning",
    "UndeclaredFillValueWarning",
    "UnitsError",
    "wind_stress",
    "wind_stress_curl",
    "write_netcdf",
]
