"""Pinned physical constants and unit factors (SI). Imports nothing.

Pinned so that results and tests do not move with a new CODATA release.
"""

#: Molar gas constant [J/(mol K)], CODATA 2018 (exact since the 2019 SI redefinition).
GAS_CONSTANT = 8.314462618

#: 0 degC in kelvin [K].
ZERO_CELSIUS = 273.15

#: Seconds per hour [s/h].
SECONDS_PER_HOUR = 3600.0

#: Standard atmosphere [Pa].
STANDARD_ATMOSPHERE = 101325.0

#: Standard acceleration of gravity [m/s^2].
STANDARD_GRAVITY = 9.80665
