"""plantside: what the central plant sees.

Pure, vectorised SI functions for moist air, mixing and economizers, coils, zone
loads, climate and plant sizing, with chart builders and a Voila dashboard on
top. The package is layered; each layer imports only the layers below it
(``tests/test_layers.py`` fails otherwise)::

    constants, errors, units          the foundation: SI constants, error types, unit edges
    hourly_csv, air                   hourly CSV intake; moist air and air-side processes
    climate, air_handler, plant       weather and design conditions; one unit; the plant
    study                             scenario files, a whole study, sweeps
    charts                            Altair chart builders (frames in, charts out)
    dashboard, cli                    the Voila dashboard and the command line

For scripting, ``import plantside`` is enough::

    >>> import plantside
    >>> state = plantside.air_state(drybulb=35.0, wet_bulb=24.0)
    >>> round(float(state.enthalpy), 1)  # kJ/kg dry air
    71.7

The entry points below are imported on first use, so ``import plantside`` stays
cheap; see each function's own documentation.

- :func:`load_scenario` (a study's TOML file) and :func:`run_study` (run it)
- :func:`load_bundled_climate` (a bundled fictional site) and :func:`read_weather_csv`
  (an hourly weather CSV)
- :func:`design_conditions_from_weather` (0.4/1/2 % cooling, 99.6/99 % heating)
- :func:`air_state` (a moist-air state from any two properties) and :class:`AirState`
"""

from importlib import import_module

__version__ = "0.1.0"

#: Public entry point -> the module that defines it.
_ENTRY_POINTS = {
    "load_scenario": "plantside.study.scenario_read",
    "run_study": "plantside.study.run",
    "study_summary": "plantside.study.run",
    "load_bundled_climate": "plantside.climate.bundled",
    "read_weather_csv": "plantside.climate.weather_csv",
    "design_conditions_from_weather": "plantside.climate.design_conditions",
    "AirState": "plantside.air.moist_air",
    "air_state": "plantside.air.moist_air",
}

__all__ = ["__version__", *_ENTRY_POINTS]


def __getattr__(name: str):
    """Import an entry point on first use (PEP 562)."""
    module = _ENTRY_POINTS.get(name)
    if module is None:
        raise AttributeError(f"module 'plantside' has no attribute {name!r}")
    value = getattr(import_module(module), name)
    globals()[name] = value
    return value


def __dir__():
    return sorted(set(globals()) | set(_ENTRY_POINTS))
