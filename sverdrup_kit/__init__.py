"""sverdrup_kit: wind-driven ocean circulation diagnostics from gridded wind climatologies.

The data path, one module per step: :mod:`.sources` (open_winds, open_stress) ->
:mod:`.stress` (drag laws, wind_stress) -> :mod:`.operators` and :mod:`.ekman` (curl, Ekman
transport and pumping on the sphere) -> :mod:`.sverdrup` (westward integral from eastern
coasts, per basin) -> :mod:`.boundary_layers` and :mod:`.barotropic` (Stommel and Munk
closure) -> :mod:`.observations`, :mod:`.plotting`, :mod:`.output`.

Results are climatological diagnostics for research, not forecasts for navigation or
marine operations.
"""

from .barotropic import boundary_current, solve_barotropic, solve_basin
from .basins import basin_mask
from .boundary_layers import (
    munk_boundary_layer,
    munk_edge_distance,
    munk_peak_distance,
    munk_width,
    stommel_basin,
    stommel_width,
)
from .constants import AIR_DENSITY, EARTH_RADIUS, OMEGA, RHO0, SVERDRUP
from .ekman import ekman
from .grid import SphericalGrid, beta_parameter, coriolis_parameter
from .observations import boundary_current_observations
from .operators import curl_on_sphere, wind_stress_curl
from .output import write_netcdf
from .sources import TimeDecodingWarning, open_stress, open_winds
from .stress import DRAG_LAWS, DragLaw, MonthlyMeanWindWarning, drag_coefficient, wind_stress
from .sverdrup import sverdrup
from .pipeline import diagnose

__version__ = "0.1.0"

__all__ = [
    "AIR_DENSITY",
    "basin_mask",
    "beta_parameter",
    "boundary_current",
    "boundary_current_observations",
    "coriolis_parameter",
    "curl_on_sphere",
    "diagnose",
    "drag_coefficient",
    "DRAG_LAWS",
    "DragLaw",
    "EARTH_RADIUS",
    "ekman",
    "MonthlyMeanWindWarning",
    "munk_boundary_layer",
    "munk_edge_distance",
    "munk_peak_distance",
    "munk_width",
    "OMEGA",
    "open_stress",
    "open_winds",
    "RHO0",
    "solve_barotropic",
    "solve_basin",
    "SphericalGrid",
    "stommel_basin",
    "stommel_width",
    "sverdrup",
    "SVERDRUP",
    "TimeDecodingWarning",
    "wind_stress",
    "wind_stress_curl",
    "write_netcdf",
]
