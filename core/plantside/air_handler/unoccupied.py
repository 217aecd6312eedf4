"""Heat the zone needs while its air handler is off, and who serves it.

A unit with ``fan_schedule="occupied"`` is off in unoccupied hours, but the zone
still loses heat through its envelope. That heat does not vanish: it is served by

- ``unoccupied_heating="terminal"``: perimeter or terminal heating on the hot-water
  plant (radiators, fin tube, terminal coils), reported as ``terminal_heating_kW``,
  heat delivered straight to the zone, outside the air handler's energy balance; or
- ``unoccupied_heating="night_cycle"``: the fan cycles on with the outdoor damper
  closed (no outdoor air, economizer and recovery idle) and the coil heats the
  recirculated air to hold the set-back set point; these hours are computed by the
  same hour model (:func:`plantside.air_handler.model.air_handler_hours`), so the
  air handler's energy balance holds in them too (``night_cycle`` marks them).

Set-back. While unoccupied the zone is held at ``night_setback_drybulb`` (when
given). The envelope part of the zone sensible load (sensible minus internal gain)
is a heat loss proportional to the indoor-outdoor temperature difference
(conduction q = U A (t_i - t_o) and infiltration q = m c_p (t_i - t_o), ASHRAE
Handbook Fundamentals 2017 Ch. 18, heating load calculations), so at the set-back::

    q_env(t_sb) = q_env(t_z) (t_sb - t_o) / (t_z - t_o),   t_o < t_sb   (loss only)

and 0 when the outdoor air is at or above the set-back (the zone floats between
the set-back and the heating set point, no heat needed). Gains, and losses in hours
warmer than the heating set point, are kept as they are.

Ledger, every hour (``zone_sensible_need_kW`` is the load at the set point the
hour holds; heating negative, terminal heat positive)::

    zone_sensible_need = zone_sensible - terminal_heating + zone_sensible_unmet

Not modelled: the morning recovery from set-back and the pull-down after the zone
floats up (pick-up allowances on the heating and cooling plants' designs cover them,
:mod:`plantside.study.run`, :mod:`plantside.study.figures`), a cooling set-up,
and the zone's unoccupied latent gain during night cycling: the unit neither adds
nor removes moisture with the damper closed and its coil heating, so the gain is
reported unmet (``zone_latent_unmet_kW``, as in an off hour) and the zone humidity
is taken as the outdoor humidity (the air the building exchanges with outdoors
carries the gain away). In dry winter air that is no caution; hours whose outdoor
air is above the zone humidity limit at the set-back get one of their own
(:func:`plantside.air_handler.year.hourly_cautions`), never the coil's "cannot be
removed".
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from plantside.air_handler.model import HOURLY_COLUMNS, air_handler_hours
from plantside.air_handler.settings import AirHandlerSettings
from plantside.air_handler.zone_loads import HourlyZoneLoads

__all__ = [
    "UNOCCUPIED_COLUMNS",
    "night_cycle_settings",
    "serve_unoccupied_heating",
    "setback_sensible_load",
]

#: Columns added to an air handler's hourly year (after :data:`HOURLY_COLUMNS`).
UNOCCUPIED_COLUMNS = ("zone_sensible_need_kW", "terminal_heating_kW", "night_cycle")


def setback_sensible_load(sensible, internal_sensible, outdoor_drybulb, heating_drybulb, setback):
    """Zone sensible load [kW] with the zone held at a set-back heating set point.

    Parameters
    ----------
    sensible : array_like
        Zone sensible load at the heating set point [kW], heating negative.
    internal_sensible : array_like
        Its internal-gain part [kW], >= 0.
    outdoor_drybulb : array_like
        Outdoor dry bulb [°C].
    heating_drybulb : float
        The heating set point the load was computed for [°C].
    setback : float
        The set-back set point [°C], at most ``heating_drybulb``.

    Returns
    -------
    numpy.ndarray
        Sensible load at the set-back [kW]: the envelope loss scaled by
        (t_sb - t_o) / (t_z - t_o) where t_o < t_sb, 0 where t_o >= t_sb, plus the
        internal gain; hours whose envelope is a gain, or warmer than ``heating_drybulb``,
        unchanged.

    Notes
    -----
    .. math:: q_{env}(t_{sb}) = q_{env}(t_z)\\,\\frac{t_{sb} - t_o}{t_z - t_o}

    Conduction and infiltration losses proportional to the indoor-outdoor difference,
    ASHRAE Handbook Fundamentals 2017 Ch. 18 (heating load: q = U A Δt).

    Examples
    --------
    >>> float(setback_sensible_load(-50.0, 0.0, -9.0, 21.0, 15.0)[()])
    -40.0
    """
    q = np.asarray(sensible, dtype=float)
    internal = np.asarray(internal_sensible, dtype=float)
    t_o = np.asarray(outdoor_drybulb, dtype=float)
    envelope = q - internal
    colder = t_o < heating_drybulb
    with np.errstate(divide="ignore", invalid="ignore"):
        share = np.clip((setback - t_o) / (heating_drybulb - t_o), 0.0, 1.0)
    scaled = np.where((envelope < 0.0) & colder, envelope * share, envelope)
    return scaled + internal


def night_cycle_settings(settings: AirHandlerSettings) -> AirHandlerSettings:
    """The unit as it night-cycles: fan on, outdoor damper closed, set-back set point.

    No outdoor air (so no economizer and no recovery), the heating set point at
    ``night_setback_drybulb`` (the heating set point when None); airflow, fan, coils
    and supply limits as the unit's own. The unit heats the recirculated air itself (no
    cooling coil run to the supply set point for terminal reheat, no zone humidity
    control: the damper is closed and the zone's unoccupied latent gain is not the
    unit's, as :func:`plantside.air_handler.year.hourly_cautions` says).
    """
    setback = settings.night_setback_drybulb
    return replace(
        settings,
        fan_schedule="always",
        minimum_outdoor_air_fraction=0.0,
        minimum_outdoor_airflow=None,
        ventilation_airflow_required=None,
        economizer="none",
        recovery_sensible_effectiveness=0.0,
        recovery_latent_effectiveness=0.0,
        zone_heating_drybulb=settings.zone_heating_drybulb if setback is None else setback,
        low_load_response="raise_supply_temperature",
        zone_relative_humidity_max=None,
    )


def serve_unoccupied_heating(
    settings: AirHandlerSettings, outdoor_drybulb, outdoor_humidity_ratio, pressure, zone_loads,
    result: dict,
) -> dict:  # fmt: skip
    """Serve the heat of the hours the fan is off: terminal heating or night cycling.

    Parameters
    ----------
    settings : AirHandlerSettings
        The air handler (``unoccupied_heating``, ``night_setback_drybulb``).
    outdoor_drybulb, outdoor_humidity_ratio, pressure : array_like
        The year's outdoor states [°C, kg/kg, Pa], one per hour.
    zone_loads : HourlyZoneLoads
        The zone loads of the same hours.
    result : dict of str to numpy.ndarray
        :func:`plantside.air_handler.model.air_handler_hours` of the year (1-D).

    Returns
    -------
    dict of str to numpy.ndarray
        ``result`` with the night-cycle hours replaced by the night-cycling unit's
        results, unmet off-hour heating cleared where it is served, and
        :data:`UNOCCUPIED_COLUMNS`: ``zone_sensible_need_kW`` [kW],
        ``terminal_heating_kW`` [kW, >= 0], ``night_cycle`` (bool).
    """
    out = {key: np.array(value) for key, value in result.items()}
    q_sens = np.asarray(zone_loads.sensible, dtype=float)
    n = q_sens.shape[0]
    out["zone_sensible_need_kW"] = q_sens.copy()
    out["terminal_heating_kW"] = np.zeros(n)
    out["night_cycle"] = np.zeros(n, dtype=bool)
    off = ~np.asarray(out["operating"], dtype=bool)
    if not np.any(off):
        return out
    t_o = np.broadcast_to(np.asarray(outdoor_drybulb, dtype=float), (n,))
    setback = settings.night_setback_drybulb
    heat = float(settings.zone_heating_drybulb)
    q_sb = setback_sensible_load(
        q_sens, zone_loads.internal_sensible, t_o, heat, heat if setback is None else setback
    )
    heating_off = off & (q_sens < 0.0)
    # the zone holds the set-back where it needs heat there, and floats above it otherwise
    need = np.where(heating_off, np.minimum(q_sb, 0.0), q_sens)
    out["zone_sensible_need_kW"] = need
    served = heating_off & (need < 0.0)
    floating = heating_off & ~served
    out["zone_sensible_unmet_kW"] = np.where(floating, 0.0, out["zone_sensible_unmet_kW"])
    if settings.unoccupied_heating == "terminal":
        out["terminal_heating_kW"] = np.where(served, -need, 0.0)
        out["zone_sensible_unmet_kW"] = np.where(served, 0.0, out["zone_sensible_unmet_kW"])
        return out
    hours = np.flatnonzero(served)
    if hours.size == 0:
        return out

    def at(values):
        return np.broadcast_to(np.asarray(values, dtype=float), (n,))[hours]

    night_loads = HourlyZoneLoads(
        sensible=need[hours],
        latent=np.zeros(hours.size),
        internal_sensible=np.asarray(zone_loads.internal_sensible, dtype=float)[hours],
        occupied=np.zeros(hours.size, dtype=bool),
        source="night cycle",
    )
    night = air_handler_hours(
        night_cycle_settings(settings),
        at(outdoor_drybulb),
        at(outdoor_humidity_ratio),
        at(pressure),
        night_loads,
        force_operating=True,
        check=False,
    )
    for key in HOURLY_COLUMNS:
        if key != "occupied":
            out[key][hours] = night[key]
    if "apparatus_dew_point_required_C" in out:
        out["apparatus_dew_point_required_C"][hours] = night["apparatus_dew_point_required_C"]
    # the damper is closed: the zone's latent gain is not handled by the unit (as off)
    out["zone_latent_unmet_kW"][hours] = np.asarray(zone_loads.latent, dtype=float)[hours]
    out["night_cycle"][hours] = True
    return out
