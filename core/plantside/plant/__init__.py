"""The central plant: coincident loads, sizing, part-load hours, staging, efficiency.

Works on arrays of hourly coil loads [kW]; knows nothing of air handlers or weather.

Modules
-------
loads       plant load from coil loads (coincident sum, distribution gain), diversity
sizing      design capacity from the design load and margin; sizing cautions
part_load   load-duration curve and part-load bins
staging     machines started in order, hours per stage, options compared
efficiency  AHRI 550/590 IPLV and the project's own weighted efficiency
"""
