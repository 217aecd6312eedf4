"""The central plant: coincident loads, sizing, part-load hours, staging, efficiency.

Works on arrays of hourly coil loads [kW] and, for the water side, of hourly weather
(wet bulb, dry bulb [°C]); knows nothing of air handlers or climate files.

Modules
-------
loads       plant load from coil loads (coincident sum, distribution gain), diversity
sizing      design capacity from the design load and margin; sizing cautions
part_load   load-duration curve and part-load bins
staging     machines started in order, hours per stage, options compared
efficiency  AHRI 550/590 IPLV and the project's own weighted efficiency
efficient_staging  staging fraction, "two use less than one", machines for flow
water       chilled and hot water: flow, part-load ΔT, reset, flow-limited machines
pumps       pump power, variable speed at part load, heat to the water
chillers    performance curves (CAPFT, EIRFT, EIRFPLR), defaults, fit to ratings
boilers     efficiency against return water and firing rate, fuel
heat_rejection  condenser heat, towers, dry coolers, waterside economizer
heat_recovery   simultaneous heating and cooling, heat-recovery chiller
chiller_plant   a chiller plant's year against the weather (arrays in)
hot_water_plant a hot-water plant's year (reset, return, boilers)
"""
