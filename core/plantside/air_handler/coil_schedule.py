"""The coil schedule: what a coil selection needs, per air handler and design condition.

One row per air handler and design condition (the three cooling conditions and the
heating condition), from the design points
(:mod:`plantside.air_handler.design`), in SI. The command line (readable, ``--json``
and the ``plantside year`` CSV) and the dashboard show this one table.

Cooling rows are the cooling coil at the airflow the design uses
(``airflow_used``: the unit's scheduled ``supply_airflow`` by default, the coil
leaving at the supply set point; or the load-derived airflow), with the
load-derived airflow beside it. Heating rows are the heating duty (preheat plus
heating coil) from the mixed air to the coil leaving state, at the airflow the
heating design point runs (the model's heating airflow).

Sensible heat ratio = sensible / total coil load (ASHRAE Handbook Fundamentals 2017
Ch. 1, cooling and dehumidifying of moist air).
"""

from __future__ import annotations

import numpy as np
import pandas as pd

__all__ = ["COIL_SCHEDULE_COLUMNS", "coil_schedule"]

#: Columns of :func:`coil_schedule`, in order (SI units as suffixes).
COIL_SCHEDULE_COLUMNS = (
    "air_handler",
    "condition",
    "label",
    "coil",
    "governing",
    "airflow_used",
    "airflow_basis",
    "airflow_m3s",
    "airflow_standard_m3s",
    "airflow_actual_m3s",
    "load_airflow_m3s",
    "scheduled_airflow_m3s",
    "entering_drybulb_C",
    "entering_wet_bulb_C",
    "leaving_drybulb_C",
    "leaving_wet_bulb_C",
    "apparatus_dew_point_C",
    "bypass_factor",
    "total_kW",
    "sensible_kW",
    "latent_kW",
    "sensible_heat_ratio",
    "condensate_kgs",
    "reheat_kW",
    "terminal_reheat_kW",
)


def _row(name, settings, kind, point, governing, coil):
    row = point.row
    states = point.states
    entering = "coil_entering" if coil == "cooling" else "mixed"
    loads = point.loads
    if coil == "cooling":
        total, sensible = loads["coil_total_kW"], loads["coil_sensible_kW"]
        latent, condensate = loads["coil_latent_kW"], loads["condensate_kgs"]
    else:
        total = sensible = loads["preheat_kW"] + loads["heating_coil_kW"]
        latent, condensate = 0.0, 0.0
    return {
        "air_handler": name,
        "condition": kind,
        "label": point.label,
        "coil": coil,
        "governing": governing,
        "airflow_used": point.airflow_used,
        "airflow_basis": settings.airflow_basis,
        "airflow_m3s": float(row["supply_airflow_m3s"]),
        "airflow_standard_m3s": float(row["supply_airflow_standard_m3s"]),
        "airflow_actual_m3s": float(row["supply_airflow_actual_m3s"]),
        "load_airflow_m3s": float(point.load_airflow),
        "scheduled_airflow_m3s": float(settings.supply_airflow),
        "entering_drybulb_C": float(states.loc[entering, "drybulb_C"]),
        "entering_wet_bulb_C": float(states.loc[entering, "wet_bulb_C"]),
        "leaving_drybulb_C": float(states.loc["coil_leaving", "drybulb_C"]),
        "leaving_wet_bulb_C": float(states.loc["coil_leaving", "wet_bulb_C"]),
        "apparatus_dew_point_C": float(row["apparatus_dew_point_C"])
        if coil == "cooling"
        else np.nan,
        "bypass_factor": float(row["bypass_factor"]) if coil == "cooling" else np.nan,
        "total_kW": float(total),
        "sensible_kW": float(sensible),
        "latent_kW": float(latent),
        "sensible_heat_ratio": float(sensible / total) if total > 0 else np.nan,
        "condensate_kgs": float(condensate),
        "reheat_kW": float(
            loads.get("dehumidification_reheat_kW", 0.0)
            + loads.get("condenser_heat_recovered_kW", 0.0)
        ),
        "terminal_reheat_kW": float(
            loads["reheat_kW"] + loads.get("humidity_control_reheat_kW", 0.0)
        ),
    }


def coil_schedule(units) -> pd.DataFrame:
    """The coil schedule of air handlers: one row per unit and design condition.

    Parameters
    ----------
    units : sequence
        Air-handler results with ``name``, ``settings``, ``cooling_design``
        (:class:`plantside.air_handler.design.CoolingDesignSummary`) and
        ``heating_design`` (:class:`plantside.air_handler.design.DesignPoint`), e.g.
        :class:`plantside.study.run.AirHandlerResult`.

    Returns
    -------
    pandas.DataFrame
        Columns :data:`COIL_SCHEDULE_COLUMNS` (SI): airflow used and its basis, the
        airflow on that basis, at standard air and actual at the supply state
        [m³/s], the load-derived and scheduled airflows [m³/s]; entering and leaving
        dry bulb and wet bulb [°C]; apparatus dew point [°C] and bypass factor [-]
        (NaN for a dry coil); total, sensible and latent load [kW]; sensible heat
        ratio [-]; condensate [kg/s]; ``reheat_kW`` after a dehumidifying coil (hot
        water or recovered condenser heat) and ``terminal_reheat_kW`` (at the scheduled
        airflow: the supply air's surplus over the zone load) [kW].
    """
    rows = []
    for unit in units:
        design = unit.cooling_design
        for kind, point in design.points.items():
            rows.append(
                _row(unit.name, unit.settings, kind, point, kind == design.governing, "cooling")
            )
        heating = unit.heating_design
        rows.append(_row(unit.name, unit.settings, "heating", heating, True, "heating"))
    return pd.DataFrame(rows, columns=list(COIL_SCHEDULE_COLUMNS))
