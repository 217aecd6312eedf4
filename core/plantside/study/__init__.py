"""A study: a scenario file, every air handler of it, and the plants they load.

The orchestration layer: reads the scenario, runs each air handler against the
climate, and hands the coil loads to the plant. Nothing here computes physics.

Modules
-------
scenario    the scenario TOML file: fields, units, validation (at the edge)
run         ``run_study`` = ``run_air_handler`` per unit + ``assemble_plants``
figures     the headline figures of the plant or one air handler (both views' one source)
design_sweep an air handler's design coil load against its outdoor-air fraction
sweep       a sweep file: the cases (fields varied over climates)
sweep_run   running a sweep's cases on a process pool or a Dask cluster
"""
