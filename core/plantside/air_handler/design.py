"""Design points of an air handler: full breakdown and state points.

A design point runs the same vectorised model as the hourly year
(:func:`plantside.air_handler.model.air_handler_hours`) for one hour at a design
outdoor state, with the fan forced on. The cooling coil is evaluated at the three
annual cooling design conditions of ASHRAE Handbook Fundamentals (2017, Ch. 14):
dry bulb with mean coincident wet bulb, dew point with mean coincident dry bulb,
and enthalpy with mean coincident dry bulb; the condition with the largest total
coil load *governs*. For units with much outdoor air the dew-point or enthalpy
condition often governs, not the dry-bulb one.

The heating design point uses the zone's envelope heat loss only (no credit for
internal gains), the usual conservative convention.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
import pandas as pd

from plantside.air.economizer import ECONOMIZER_MODES
from plantside.air.moist_air import (
    dew_point_from_humidity_ratio,
    relative_humidity_from_humidity_ratio,
    wet_bulb_from_humidity_ratio,
)
from plantside.air_handler.model import HOURLY_COLUMNS, air_handler_hours
from plantside.air_handler.settings import AirHandlerSettings
from plantside.air_handler.zone_loads import HourlyZoneLoads, ZoneLoadModel, design_zone_loads
from plantside.errors import InputRangeError

__all__ = [
    "COOLING_DESIGN_KINDS",
    "STATE_POINTS",
    "CoolingDesignSummary",
    "DesignPoint",
    "cooling_design_points",
    "design_airflow_settings",
    "design_point",
    "heating_design_point",
]

#: Kinds of the three cooling design conditions (names of plantside.climate.design_conditions).
COOLING_DESIGN_KINDS = ("cooling", "dehumidification", "enthalpy")
#: State points of a design point, in air-path order, and the column prefix of each.
STATE_POINTS = {
    "outdoor": "outdoor",
    "recovered": "recovered",
    "return": "return",
    "mixed": "mixed",
    "coil_entering": "coil_entering",
    "coil_leaving": "coil_leaving",
    "supply": "supply",
    "zone": "zone",
}


@dataclass(frozen=True, eq=False)
class DesignPoint:
    """The air handler at one design outdoor state.

    Attributes
    ----------
    label : str
        Description of the design condition.
    kind : str
        Design condition kind (``"cooling"``, ``"dehumidification"``, ``"enthalpy"``,
        ``"heating"`` or ``"custom"``).
    loads : dict of str to float
        Every ``*_kW`` and ``*_kgs`` quantity of the hourly columns [kW, kg/s].
    states : pandas.DataFrame
        State points (index: outdoor, recovered, return, mixed, coil_entering,
        coil_leaving, supply, zone) with columns drybulb_C, humidity_ratio_kgkg,
        enthalpy_kJkg, relative_humidity, dew_point_C, wet_bulb_C.
    row : pandas.Series
        Every hourly column for this point.
    economizer_mode : str
        Mode name (see :data:`plantside.air.economizer.ECONOMIZER_MODES`).
    cautions : tuple of str
        Plain-language cautions for the engineer.
    airflow_used : str
        Which airflow the point uses: ``"scheduled"`` (the unit's ``supply_airflow``,
        coil leaving at the supply set point; the surplus over the zone load shows as
        ``reheat_kW``) or ``"load"`` (the airflow the zone load asks for).
    load_airflow : float
        The airflow the zone load asks for at this condition [m³/s on the unit's
        ``airflow_basis``] (the scheduled airflow for a constant-volume unit).
    """

    label: str
    kind: str
    loads: dict
    states: pd.DataFrame
    row: pd.Series
    economizer_mode: str
    cautions: tuple = ()
    airflow_used: str = "load"
    load_airflow: float = float("nan")


@dataclass(frozen=True, eq=False)
class CoolingDesignSummary:
    """The three cooling design conditions and which one governs the coil.

    Attributes
    ----------
    points : dict of str to DesignPoint
        Keyed by kind.
    table : pandas.DataFrame
        One row per kind: the condition and the main loads.
    governing : str
        Kind with the largest total coil load.
    governing_latent : str
        Kind with the largest latent coil load.
    """

    points: dict
    table: pd.DataFrame
    governing: str
    governing_latent: str


def _outdoor(outdoor):
    if isinstance(outdoor, tuple | list) and len(outdoor) == 3:
        t, w, p = (float(v) for v in outdoor)
        return t, w, p, "custom", f"{t:.1f} °C, {1000 * w:.1f} g/kg"
    try:
        t, w, p = float(outdoor.drybulb), float(outdoor.humidity_ratio), float(outdoor.pressure)
    except AttributeError:
        raise InputRangeError(
            "outdoor",
            "outdoor must be a design condition (drybulb, humidity_ratio, pressure) or a "
            "(drybulb [°C], humidity_ratio [kg/kg], pressure [Pa]) tuple",
            "a design condition or a 3-tuple",
        ) from None
    kind = str(getattr(outdoor, "kind", "custom"))
    label = str(getattr(outdoor, "label", "") or f"{kind}: {t:.1f} °C, {1000 * w:.1f} g/kg")
    return t, w, p, kind, label


def _design_loads(zone_loads, drybulb, occupied):
    if isinstance(zone_loads, ZoneLoadModel):
        return design_zone_loads(zone_loads, drybulb, occupied)
    if isinstance(zone_loads, HourlyZoneLoads):
        if zone_loads.hours != 1:
            raise InputRangeError(
                "zone_loads",
                f"a design point needs the zone loads of one hour, got {zone_loads.hours}",
                "1 hour",
            )
        return zone_loads
    if isinstance(zone_loads, tuple | list) and len(zone_loads) == 2:
        return HourlyZoneLoads(sensible=[float(zone_loads[0])], latent=[float(zone_loads[1])])
    raise InputRangeError(
        "zone_loads",
        "zone_loads must be a ZoneLoadModel, one hour of HourlyZoneLoads or "
        "(sensible [kW], latent [kW])",
        "ZoneLoadModel, HourlyZoneLoads or a 2-tuple",
    )


def _states_table(row: pd.Series) -> pd.DataFrame:
    names = list(STATE_POINTS)
    t = np.array([row[f"{STATE_POINTS[k]}_drybulb_C"] for k in names], dtype=float)
    w = np.array([row[f"{STATE_POINTS[k]}_humidity_ratio_kgkg"] for k in names], dtype=float)
    h = np.array([row[f"{STATE_POINTS[k]}_enthalpy_kJkg"] for k in names], dtype=float)
    p = np.full(t.shape, float(row["pressure_Pa"]))
    w_pos = np.maximum(w, 1e-9)
    return pd.DataFrame(
        {
            "drybulb_C": t,
            "humidity_ratio_kgkg": w,
            "enthalpy_kJkg": h,
            "relative_humidity": relative_humidity_from_humidity_ratio(t, w, p, check=False),
            "dew_point_C": dew_point_from_humidity_ratio(w_pos, p, check=False),
            "wet_bulb_C": wet_bulb_from_humidity_ratio(t, w, p, check=False),
        },
        index=pd.Index(names, name="state"),
    )


def _cautions(settings: AirHandlerSettings, row: pd.Series) -> list[str]:
    cautions = []
    if row["zone_sensible_unmet_kW"] > 0:
        cautions.append(
            f"The design supply airflow at the supply set point removes only "
            f"{row['zone_sensible_kW']:.1f} kW of the zone's "
            f"{row['zone_sensible_kW'] + row['zone_sensible_unmet_kW']:.1f} kW sensible load: "
            "the zone will run warm. Increase the supply airflow or lower the supply set point."
        )
    if row["zone_sensible_unmet_kW"] < 0:
        cautions.append(
            f"At the highest heating supply temperature the unit delivers "
            f"{-row['zone_sensible_kW']:.1f} kW of the zone's "
            f"{-(row['zone_sensible_kW'] + row['zone_sensible_unmet_kW']):.1f} kW heat loss."
        )
    if row["zone_relative_humidity"] > settings.zone_relative_humidity_limit:
        cautions.append(
            f"Zone relative humidity floats to {100 * row['zone_relative_humidity']:.0f} % "
            f"(limit {100 * settings.zone_relative_humidity_limit:.0f} %): risk of discomfort "
            "and mould. Check the coil leaving dew point, the latent load and the outdoor air."
        )
    if abs(row["zone_latent_unmet_kW"]) > 1e-6:
        cautions.append(
            f"{row['zone_latent_unmet_kW']:.1f} kW of zone latent load cannot be removed by this "
            "unit at this condition (dry coil and no outdoor air)."
        )
    return cautions


def design_airflow_settings(settings: AirHandlerSettings, airflow: str) -> AirHandlerSettings:
    """The settings the coil is worked out with at a design condition.

    ``"load"``: the unit as it runs (the airflow the zone load asks for); ``"scheduled"``:
    constant volume at the unit's ``supply_airflow`` with the coil leaving at the supply
    set point and the surplus over the zone load met by terminal reheat (the coil
    schedule's selection point). Every design figure (the design points, the coil
    load against outdoor-air fraction) takes its settings from here, so they agree.
    """
    if airflow == "scheduled":
        return replace(settings, fan_control="constant_volume", low_load_response="reheat")
    if airflow != "load":
        raise InputRangeError(
            "airflow", f"airflow = {airflow!r}; allowed: 'load', 'scheduled'", "load, scheduled"
        )
    return settings


def design_point(
    settings: AirHandlerSettings, zone_loads, outdoor, *, occupied=True, airflow="load"
):
    """The air handler at one design outdoor condition, with full breakdown.

    Parameters
    ----------
    settings : AirHandlerSettings
        The air handler.
    zone_loads : ZoneLoadModel or HourlyZoneLoads or tuple
        Zone loads: a model (evaluated at the outdoor dry bulb), one hour of loads, or
        (sensible [kW], latent [kW]).
    outdoor : DesignCondition or tuple
        Anything with ``drybulb`` [°C], ``humidity_ratio`` [kg/kg] and ``pressure`` [Pa]
        (optional ``kind`` and ``label``), or a (drybulb, humidity_ratio, pressure) tuple.
    occupied : bool
        Evaluate a zone model's occupied line (default) or unoccupied line.
    airflow : str
        ``"load"`` (the airflow the zone load asks for, as the hourly year runs) or
        ``"scheduled"`` (the unit's ``supply_airflow`` with the coil leaving at the
        supply set point: the coil schedule's selection point; the surplus over the
        zone load is reported as terminal ``reheat_kW`` so the energy balance closes).
        The load-derived airflow is reported either way (``load_airflow``).

    Returns
    -------
    DesignPoint

    Raises
    ------
    InputRangeError
        If the cooling coil would need an apparatus dew point below
        ``settings.apparatus_dew_point_min`` (the coil cannot produce the supply air).
    """
    t, w, p, kind, label = _outdoor(outdoor)
    loads = _design_loads(zone_loads, t, occupied)
    selected = design_airflow_settings(settings, airflow)
    result = air_handler_hours(settings, [t], [w], [p], loads, force_operating=True)
    load_airflow = float(result["supply_airflow_m3s"].reshape(-1)[0])
    if selected is not settings:
        result = air_handler_hours(selected, [t], [w], [p], loads, force_operating=True)
    values = {key: result[key].reshape(-1)[0] for key in HOURLY_COLUMNS}
    values["economizer_mode"] = ECONOMIZER_MODES[int(values["economizer_mode"])]
    row = pd.Series(values, name=kind)
    adp = float(result["apparatus_dew_point_required_C"].reshape(-1)[0])
    if np.isfinite(adp) and adp < settings.apparatus_dew_point_min - 1e-9:
        raise InputRangeError(
            "apparatus_dew_point",
            f"at {label} the cooling coil would need an apparatus dew point of {adp:.1f} °C, "
            f"below the lowest it can produce (apparatus_dew_point_min = "
            f"{settings.apparatus_dew_point_min:g} °C); raise the supply set point, use a coil "
            "with a smaller bypass factor, or lower apparatus_dew_point_min if the cooling "
            f"medium allows; allowed: at least {settings.apparatus_dew_point_min:g} °C",
            f"at least {settings.apparatus_dew_point_min:g} °C",
        )
    loads_out = {k: float(v) for k, v in values.items() if k.endswith(("_kW", "_kgs"))}
    return DesignPoint(
        label=label,
        kind=kind,
        loads=loads_out,
        states=_states_table(row),
        row=row,
        economizer_mode=values["economizer_mode"],
        cautions=tuple(_cautions(settings, row)),
        airflow_used=airflow,
        load_airflow=load_airflow,
    )


def _pick_conditions(conditions, percent):
    if hasattr(conditions, "conditions"):
        conditions = conditions.conditions
    if isinstance(conditions, dict):
        return {kind: conditions[kind] for kind in COOLING_DESIGN_KINDS if kind in conditions}
    picked = {}
    for condition in conditions:
        kind = getattr(condition, "kind", None)
        if kind in COOLING_DESIGN_KINDS and abs(float(condition.percent) - percent) < 1e-9:
            picked[kind] = condition
    return picked


def cooling_design_points(settings, zone_loads, conditions, percent=0.4):
    """Evaluate the three cooling design conditions and say which governs the coil.

    Parameters
    ----------
    settings : AirHandlerSettings
        The air handler.
    zone_loads : ZoneLoadModel or tuple
        Zone loads (a model is evaluated at each condition's dry bulb).
    conditions : iterable of DesignCondition, DesignConditions or dict
        Conditions with ``kind`` in ("cooling", "dehumidification", "enthalpy") and
        ``percent``; a dict maps kind to condition.
    percent : float
        Annual percentage of the conditions to use [%] (0.4, 1 or 2).

    Returns
    -------
    CoolingDesignSummary
    """
    picked = _pick_conditions(conditions, percent)
    missing = [kind for kind in COOLING_DESIGN_KINDS if kind not in picked]
    if missing:
        raise InputRangeError(
            "conditions",
            f"no {', '.join(missing)} design condition at {percent:g} % among the conditions given",
            "cooling, dehumidification and enthalpy conditions",
        )
    points = {
        kind: design_point(settings, zone_loads, picked[kind], airflow=settings.design_airflow)
        for kind in picked
    }
    columns = [
        "outdoor_drybulb_C",
        "outdoor_humidity_ratio_kgkg",
        "outdoor_enthalpy_kJkg",
        "zone_sensible_kW",
        "zone_latent_kW",
        "ventilation_sensible_kW",
        "ventilation_latent_kW",
        "fan_heat_kW",
        "economizer_effect_kW",
        "recovery_effect_kW",
        "coil_sensible_kW",
        "coil_latent_kW",
        "coil_total_kW",
        "condensate_kgs",
        "supply_airflow_m3s",
        "zone_relative_humidity",
        "economizer_mode",
    ]
    table = pd.DataFrame(
        {kind: point.row[columns] for kind, point in points.items()}
    ).T.rename_axis("kind")
    table.insert(0, "label", [points[k].label for k in table.index])
    table["load_airflow_m3s"] = [points[k].load_airflow for k in table.index]
    table["airflow_used"] = [points[k].airflow_used for k in table.index]
    for column in columns:
        if column != "economizer_mode":
            table[column] = table[column].astype(float)
    governing = str(table["coil_total_kW"].idxmax())
    governing_latent = str(table["coil_latent_kW"].idxmax())
    table["governing"] = table.index == governing
    return CoolingDesignSummary(points, table, governing, governing_latent)


def heating_design_point(settings, zone_loads, condition):
    """The air handler at the heating design condition.

    Parameters
    ----------
    settings : AirHandlerSettings
        The air handler.
    zone_loads : ZoneLoadModel or tuple
        A model: the envelope line at the condition's dry bulb, without internal gains
        (equal to ``-heating_design_load`` at ``heating_design_drybulb``). A tuple:
        (sensible [kW], latent [kW]) as given (sensible negative for heating).
    condition : DesignCondition or tuple
        Heating design outdoor state.

    Returns
    -------
    DesignPoint
    """
    t, *_ = _outdoor(condition)
    if isinstance(zone_loads, ZoneLoadModel):
        model = zone_loads
        envelope = (1.0 - model.internal_fraction) * model.cooling_design_sensible
        envelope += model.envelope_slope * (t - model.cooling_design_drybulb)
        zone_loads = HourlyZoneLoads(
            sensible=[envelope], latent=[0.0], internal_sensible=[0.0], occupied=[False]
        )
    return design_point(settings, zone_loads, condition)
