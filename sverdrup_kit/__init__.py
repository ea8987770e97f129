"""sverdrup_kit: wind-driven ocean circulation diagnostics from gridded wind climatologies."""

from .constants import AIR_DENSITY, EARTH_RADIUS, OMEGA, RHO0, SVERDRUP
from .grid import SphericalGrid, beta_parameter, coriolis_parameter
from .operators import curl_on_sphere, wind_stress_curl

__version__ = "0.1.0"
