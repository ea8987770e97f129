"""Physical constants used throughout the toolkit, each with its source.

Every function that uses one of these takes it as a keyword argument too, so a user can
reproduce a study that chose another value (for example rho0 = 1027 or 1035 kg m-3).
"""

__all__ = [
    "OMEGA",
    "EARTH_RADIUS",
    "RHO0",
    "AIR_DENSITY",
    "SVERDRUP_IN_M3_S",
    "GRAVITY",
]

#: Earth's sidereal rotation rate, rad s-1 (Groten 2004, J. Geodesy 77, 724).
OMEGA = 7.292115e-5

#: Mean Earth radius, m (IUGG mean radius 6371008.8 m, rounded as is common practice).
EARTH_RADIUS = 6.371e6

#: Reference sea-water density, kg m-3 (common practice; 1027 and 1035 are also used).
RHO0 = 1025.0

#: Near-surface air density, kg m-3 (common practice; values of 1.22 to 1.225 are used).
AIR_DENSITY = 1.22

#: One sverdrup in m3 s-1 (definition). UDUNITS reads "Sv" as sievert, so units are written
#: as "1e6 m3 s-1" in files.
SVERDRUP_IN_M3_S = 1.0e6

#: Standard gravity, m s-2 (CGPM 1901 conventional value).
GRAVITY = 9.80665
