"""An air handler's design coil load against its minimum outdoor-air fraction.

The outdoor-air chart of the dashboard and of ``plantside charts``: the air handler at
each cooling design condition, with the minimum outdoor-air fraction swept from 0 to
100 % of the supply air (the rest of its settings as given, on the airflow basis of its
design points: ``design_airflow``, so the chart at the unit's own fraction reads the design
coil load the page and the coil schedule show). Orchestration only: the air-handler model
computes every point, all fractions at once.
"""

from __future__ import annotations

import numpy as np

from plantside.air_handler.design import COOLING_DESIGN_KINDS, design_airflow_settings
from plantside.air_handler.model import air_handler_hours
from plantside.air_handler.zone_loads import ZoneLoadModel, design_zone_loads
from plantside.study.run import design_zone

__all__ = [
    "DESIGN_KINDS",
    "SWEEP_FRACTIONS",
    "design_kind_label",
    "design_outdoor_air_sweep",
]

#: Cooling design-condition kinds evaluated at the chosen annual percentage.
DESIGN_KINDS = COOLING_DESIGN_KINDS
#: Outdoor-air fractions of the sweep [-].
SWEEP_FRACTIONS = np.linspace(0.0, 1.0, 101)


def design_kind_label(kind: str, percent: float) -> str:
    """The sweep's name of a design condition, e.g. ``"Dew-point condition, 0.4 %"``."""
    names = {
        "cooling": "Dry-bulb condition",
        "dehumidification": "Dew-point condition",
        "enthalpy": "Enthalpy condition",
    }
    return f"{names.get(kind, kind)}, {percent:g} %"


def design_outdoor_air_sweep(settings, zone, conditions, percent: float) -> dict[str, np.ndarray]:
    """Coil total load [kW] at each of :data:`SWEEP_FRACTIONS`, per cooling design condition.

    Parameters
    ----------
    settings : AirHandlerSettings
        The air handler.
    zone : ZoneLoadModel or HourlyZoneLoads
        Its zone loads; hourly loads from a file are taken at their peak cooling hour
        (:func:`plantside.study.run.design_zone`), as the design points are.
    conditions : DesignConditions
        The site's design conditions.
    percent : float
        Annual percentage of the cooling design conditions [%].

    Returns
    -------
    dict of str to numpy.ndarray
        :func:`design_kind_label` -> coil total load [kW], one value per fraction.
    """
    zone = design_zone(zone, "cooling")
    fractions = SWEEP_FRACTIONS[:, None]
    # the airflow basis of the design points (the design coil load card, the coil schedule)
    settings = design_airflow_settings(settings, settings.design_airflow)
    sweep = {}
    for kind in DESIGN_KINDS:
        condition = conditions.cooling(kind, percent)
        loads = (
            design_zone_loads(zone, condition.drybulb, occupied=True)
            if isinstance(zone, ZoneLoadModel)
            else zone
        )
        hours = air_handler_hours(
            settings,
            [condition.drybulb],
            [condition.humidity_ratio],
            [condition.pressure],
            loads,
            minimum_outdoor_air_fraction=fractions,
            force_operating=True,
        )
        sweep[design_kind_label(kind, percent)] = np.asarray(
            hours["coil_total_kW"], dtype=float
        ).reshape(-1)
    return sweep
