"""Climate: hourly weather years, design conditions, design days, the bundled sites.

Builds on :mod:`plantside.air` (wet bulb, dew point and enthalpy of each hour).

Modules
-------
weather            the ``Weather`` year (SI arrays, one value per hour)
design_conditions  annual percentage design conditions with coincident means
design_day         a design day's hourly profile from the daily range
fictional_sites    the seeded generator of the bundled fictional climates
bundled            the five bundled fictional climates, read from package data
solar              the sun's position and clear-sky irradiance on vertical surfaces
climate_zone       degree days and the ASHRAE climate zone they suggest

At the edge (input/output, not physics):

weather_csv        the hourly weather CSV reader (built on :mod:`plantside.hourly_csv`)
generate           ``python -m plantside.climate.generate``: rewrite the bundled files
"""
