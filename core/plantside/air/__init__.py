"""Moist air and the air-side processes: properties, mixing, economizers, coils, recovery.

The lowest physical layer. Every function takes numpy arrays in SI units (°C,
kg/kg dry air, kJ/kg dry air, Pa) and returns arrays of the same shape. Nothing
here reads files, knows about air handlers, plants or the dashboard.

Modules
-------
moist_air        properties of moist air (ASHRAE Handbook Fundamentals 2017, Ch. 1)
mixing           adiabatic mixing of two air streams on a mass basis
economizer       outdoor-air damper control and the ASHRAE 90.1 high limits
energy_recovery  exhaust-air sensible and latent recovery
coils            cooling and heating coil leaving states and loads
heap             keeps freed array memory for reuse (glibc), applied on import
"""

from plantside.air.heap import keep_freed_memory

keep_freed_memory()
