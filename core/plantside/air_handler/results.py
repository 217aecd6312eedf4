"""Results of the air-handler hour model: final states, loads and the energy bookkeeping.

:func:`hourly_results` turns the converged pass of
:func:`plantside.air_handler.model.air_handler_hours` into every published column.
All states are recomputed from the final zone humidity, so the energy balance

    coil_total - heating_coil - preheat - dehumidification_reheat
        - condenser_heat_recovered - humidity_control_reheat
        = zone_sensible + zone_latent + reheat
        + ventilation_sensible + ventilation_latent + fan_heat
        - economizer_effect - recovery_effect - condensate_heat

holds as an identity of the reported states (ASHRAE Handbook Fundamentals 2017
Ch. 1: Eq. 30 for enthalpy; mixing, heating and cooling-and-dehumidifying
balances; q = m_da [(h1 - h2) - (W1 - W2) h_w2] for the cooling coil with the
condensate leaving at the coil leaving dry bulb).

Definitions of the bookkeeping terms (m = supply dry-air mass flow, x = outdoor-air
fraction, x_min = minimum outdoor-air fraction, o = outdoor, o' = after recovery,
r = return):

- ventilation = m x_min (h_o - h_r), split into sensible m x_min c_p(W_r) (t_o - t_r)
  and latent m x_min (W_o - W_r)(2501 + 1.86 t_o);
- economizer_effect = m (x - x_min)(h_r - h_o): the load the extra outdoor air takes off
  the coil (negative when it adds load);
- recovery_effect = m x (h_o - h_o'): positive when recovery cools or dries the outdoor
  air, negative when it heats it;
- zone sensible = m c_p(W_s)(t_z - t_s) - reheat + m c_p(W_z)(t_r - t_z) (room and
  return plenum), zone latent = m (W_z - W_s)(2501 + 1.86 t_z).

A coil holding a leaving dew point (``coil_model="leaving_dew_point"``), in the hours
where the dew point and not the leaving dry bulb sets it, leaves on its process line
(:func:`plantside.air.coils.dew_point_coil_process`), below the coil leaving target t_cl,
and is reheated to t_cl: first by the passive exchanger around the coil
(``coil_runaround_heat_kW``, Q taken from the entering air and given to the leaving air,
:func:`plantside.air.coils.runaround_exchange`, so it appears on neither side of the
balance), then by the unit's reheat source (``dehumidification_reheat_kW`` from hot water,
or ``condenser_heat_recovered_kW``). Reheat above the entering dry bulb (a zone that needs
heat) is the heating coil's, as without dehumidification. The coil entering state is the
air entering the coil itself, after the exchanger's pre-cooling.

Zone humidity control (``zone_relative_humidity_max``) takes the same path in the hours it
governs; its reheat is terminal reheat on hot water, ``humidity_control_reheat_kW``.
VAV terminal reheat (``low_load_response="reheat"``) is ``reheat_kW`` = m c_p(W_s)
(t_term - t_s), t_term = min(t_z - q_room / (m c_p), heating_supply_drybulb_max), at the
lowest airflow and in heating hours.
"""

from __future__ import annotations

from types import SimpleNamespace

import numpy as np

from plantside.air.coils import dew_point_coil_process, runaround_exchange
from plantside.air.economizer import MODE_OFF
from plantside.air.moist_air import dew_point_from_humidity_ratio
from plantside.constants import (
    CP_DRY_AIR,
    CP_LIQUID_WATER,
    CP_WATER_VAPOR,
    LATENT_HEAT_0C,
    MOLAR_MASS_RATIO,
    R_DRY_AIR,
    VOLUME_WATER_FACTOR,
    ZERO_CELSIUS,
)
from plantside.constants import STANDARD_AIR_DENSITY as _RHO_STD

__all__ = ["HOURLY_COLUMNS", "MINIMUM_IN_A_PASS", "hourly_results", "zone_load"]

#: Dry-bulb tolerance under which a coil is idle [K].
COIL_IDLE_K = 1e-6

#: Column names of :func:`air_handler_hours` (and of the hourly DataFrame), in order.
#: A column given only on request: True where the outdoor-air damper stood at the
#: minimum in some pass of the humidity solution, or the fan was off.
MINIMUM_IN_A_PASS = "outdoor_air_at_minimum_in_a_pass"

HOURLY_COLUMNS = (
    "occupied",
    "operating",
    "economizer_mode",
    "outdoor_drybulb_C",
    "outdoor_humidity_ratio_kgkg",
    "outdoor_enthalpy_kJkg",
    "pressure_Pa",
    "supply_mass_flow_kgs",
    "supply_airflow_m3s",
    "supply_airflow_standard_m3s",
    "supply_airflow_actual_m3s",
    "airflow_fraction",
    "outdoor_air_fraction",
    "outdoor_mass_flow_kgs",
    "recovery_fraction",
    "zone_drybulb_C",
    "zone_humidity_ratio_kgkg",
    "zone_enthalpy_kJkg",
    "zone_relative_humidity",
    "return_drybulb_C",
    "return_humidity_ratio_kgkg",
    "return_enthalpy_kJkg",
    "recovered_drybulb_C",
    "recovered_humidity_ratio_kgkg",
    "recovered_enthalpy_kJkg",
    "mixed_drybulb_C",
    "mixed_humidity_ratio_kgkg",
    "mixed_enthalpy_kJkg",
    "coil_entering_drybulb_C",
    "coil_entering_humidity_ratio_kgkg",
    "coil_entering_enthalpy_kJkg",
    "coil_leaving_drybulb_C",
    "coil_leaving_humidity_ratio_kgkg",
    "coil_leaving_enthalpy_kJkg",
    "supply_drybulb_C",
    "supply_humidity_ratio_kgkg",
    "supply_enthalpy_kJkg",
    "apparatus_dew_point_C",
    "bypass_factor",
    "coil_wet",
    "coil_total_kW",
    "coil_sensible_kW",
    "coil_latent_kW",
    "condensate_kgs",
    "condensate_heat_kW",
    "preheat_kW",
    "heating_coil_kW",
    "reheat_kW",
    "zone_sensible_kW",
    "zone_latent_kW",
    "zone_sensible_unmet_kW",
    "zone_latent_unmet_kW",
    "plenum_gain_kW",
    "ventilation_sensible_kW",
    "ventilation_latent_kW",
    "fan_power_kW",
    "fan_heat_kW",
    "economizer_effect_kW",
    "recovery_effect_kW",
    "dehumidification_reheat_kW",
    "condenser_heat_recovered_kW",
    "coil_runaround_heat_kW",
    "humidity_control_reheat_kW",
)

_STATE_COLUMNS = tuple(
    c
    for c in HOURLY_COLUMNS
    if c.endswith(("_C", "_kgkg", "_kJkg", "relative_humidity", "bypass_factor"))
    and not c.startswith("outdoor_")
)
_FLOW_AND_LOAD_COLUMNS = (
    *(c for c in HOURLY_COLUMNS if c.endswith(("_kW", "_kgs", "_m3s"))),
    "airflow_fraction",
    "outdoor_air_fraction",
    "recovery_fraction",
)


def zone_load(loads):
    """Zone load met: sensible + latent [kW].

    Parameters
    ----------
    loads : pandas.DataFrame, mapping or DesignPoint.loads
        Hourly results or a design point's loads, with ``zone_sensible_kW`` and
        ``zone_latent_kW`` [kW].

    Returns
    -------
    numpy.ndarray or float
        One value per hour [kW] (a float for a single design point).
    """
    total = np.asarray(loads["zone_sensible_kW"], dtype=float) + np.asarray(
        loads["zone_latent_kW"], dtype=float
    )
    return float(total) if total.ndim == 0 else total


def _h(t, w):
    """Enthalpy [kJ/kg dry air], ASHRAE Handbook Fundamentals 2017 Ch. 1 Eq. 30."""
    return CP_DRY_AIR * t + w * (LATENT_HEAT_0C + CP_WATER_VAPOR * t)


def _dew_point(w, p):
    """Dew point [°C] of a humidity ratio [kg/kg] at a pressure [Pa] (Ch. 1 Eq. 36)."""
    return dew_point_from_humidity_ratio(w, p, check=False)


def _only_where(mask, fill, function, *arrays):
    """``function(*arrays)`` evaluated only where ``mask`` (broadcast), ``fill`` elsewhere."""
    shape = np.broadcast_shapes(np.shape(mask), *(np.shape(a) for a in arrays))
    where = np.broadcast_to(mask, shape)
    out = np.full(shape, fill, dtype=float)
    if np.any(where):
        out[where] = function(*(np.broadcast_to(a, shape)[where] for a in arrays))
    return out


#: The columns of the zone's balance (from the supply state).
_ZONE_COLUMNS = (
    "zone_sensible_kW",
    "zone_latent_kW",
    "zone_sensible_unmet_kW",
    "zone_latent_unmet_kW",
    "plenum_gain_kW",
)


def hourly_results(v: SimpleNamespace, columns=None) -> dict:
    """Every published column from the model's converged pass.

    Parameters
    ----------
    v : types.SimpleNamespace
        The variables of :func:`plantside.air_handler.model.air_handler_hours` after its
        last pass (arrays in SI; names as there).
    columns : collection of str, optional
        Only these columns (and ``humidity_iteration_change``); every column of
        :data:`HOURLY_COLUMNS` and ``apparatus_dew_point_required_C`` by default. A
        column is computed by the same expressions either way, so its values are the
        same (an outdoor-air sweep asks for the few it sums).

    Returns
    -------
    dict of str to numpy.ndarray
        See :func:`plantside.air_handler.model.air_handler_hours`.
    """
    want = None if columns is None else frozenset(columns)

    def needed(*names):
        return want is None or not want.isdisjoint(names)

    (
        w_s,
        recovery,
        w_e,
        reheat_mode,
        change,
        t_r,
        w_z,
        blow_through,
        cooling,
        m,
        h_g_zone,
        heating,
        occupied,
        operating,
        t_o,
        w_o,
        h_o,
        p,
        airflow_fraction,
        x,
        f,
        t_z,
        t_o2,
        w_o2,
        h_o2,
        fan_power,
        fan_heat,
        t_adp,
        preheat_t,
        t_cl,
        t_need,
        t_hmax,
        t_ss,
        q_sens,
        q_lat,
        rho,
        bf,
        x_min,
        eps_l,
        q_room,
        mode,
        pws_zone,
    ) = (
        v.w_s,
        v.recovery,
        v.w_e,
        v.reheat_mode,
        v.change,
        v.t_r,
        v.w_z,
        v.blow_through,
        v.cooling,
        v.m,
        v.h_g_zone,
        v.heating,
        v.occupied,
        v.operating,
        v.t_o,
        v.w_o,
        v.h_o,
        v.p,
        v.airflow_fraction,
        v.x,
        v.f,
        v.t_z,
        v.t_o2,
        v.w_o2,
        v.h_o2,
        v.fan_power,
        v.fan_heat,
        v.t_adp,
        v.preheat_t,
        v.t_cl,
        v.t_need,
        v.t_hmax,
        v.t_ss,
        v.q_sens,
        v.q_lat,
        v.rho,
        v.bf,
        v.x_min,
        v.eps_l,
        v.q_room,
        v.mode,
        v.pws_zone,
    )
    w_cl = w_s
    if recovery:
        w_o2 = w_o + f * eps_l * (w_z - w_o)
        h_o2 = _h(t_o2, w_o2)
    h_r = _h(t_r, w_z)
    h_m = h_r + x * (h_o2 - h_r)
    w_m = w_e
    c_m = CP_DRY_AIR + CP_WATER_VAPOR * w_m
    t_m = (h_m - LATENT_HEAT_0C * w_m) / c_m
    t_ph = t_m if preheat_t is None else np.maximum(t_m, preheat_t)
    preheat = m * c_m * (t_ph - t_m)
    t_e = t_ph + fan_heat / (m * c_m) if blow_through else t_ph
    # Coil duties as decided in the last pass (the humidity solution belongs to them);
    # the final dry bulbs differ from that pass by the iteration tolerance only, and the
    # clamps keep a coil from reversing its duty within that tolerance.
    dew = v.dew_point_governs
    heat_coil = ~cooling & (t_e < t_cl - COIL_IDLE_K) & ~dew
    t_leave = np.where(
        cooling, np.minimum(t_cl, t_e), np.where(heat_coil, np.maximum(t_cl, t_e), t_e)
    )
    c_cl = CP_DRY_AIR + CP_WATER_VAPOR * w_cl
    heating_coil = np.where(heat_coil, m * c_m * (t_leave - t_e), 0.0)
    t_coil_in, t_after, adp_required = t_e, t_leave, t_adp
    runaround = reheat_active = 0.0
    if v.dew_point_coil or v.humidity_control:
        settings = v.s
        # the dew point solves run only in the hours where the humidity sets the coil
        process_adp = _only_where(
            dew,
            0.0,
            lambda t1, w1, w2, pressure: (
                dew_point_coil_process(t1, w1, w2, v.bf_setting, pressure).apparatus_dew_point
            ),
            t_e,
            w_e,
            w_cl,
            p,
        )
        effectiveness = float(settings.coil_runaround_effectiveness)
        t_dew_e = (
            _only_where(dew, 0.0, _dew_point, np.maximum(w_e, 1e-9), p)
            if effectiveness > 0.0
            else t_e
        )
        if v.dew_point_coil:
            t_dew_leaving = float(settings.leaving_dew_point)
        else:
            t_dew_leaving = _only_where(dew, 0.0, _dew_point, w_cl, p)
        exchange = runaround_exchange(
            m,
            t_e,
            w_e,
            t_dew_e,
            w_cl,
            t_dew_leaving,
            process_adp,
            v.bf_setting,
            t_cl,
            effectiveness,
        )
        t_coil_in = np.where(dew, exchange.coil_entering_drybulb, t_e)
        t_leave = np.where(dew, exchange.coil_leaving_drybulb, t_leave)
        t_after = np.where(dew, np.maximum(t_cl, t_leave), t_leave)
        t_reheated = np.where(dew, exchange.reheated_drybulb, t_leave)
        runaround = np.where(dew, exchange.heat, 0.0)
        # the lift above the entering dry bulb heats the zone: the heating coil's duty
        above_entering = np.where(
            dew, m * c_cl * np.maximum(t_after - np.maximum(t_e, t_reheated), 0.0), 0.0
        )
        reheat_active = np.where(dew, m * c_cl * (t_after - t_reheated), 0.0) - above_entering
        heating_coil = heating_coil + above_entering
        t_adp = np.where(dew, process_adp, t_adp)
        adp_required = t_adp
        cooling = cooling | dew
    wet = (
        cooling & (w_cl < w_e)
        if needed("apparatus_dew_point_C", "bypass_factor", "coil_wet")
        else None
    )
    condensate = m * (w_e - w_cl)
    condensate_heat = condensate * CP_LIQUID_WATER * t_leave
    coil_sensible = np.where(cooling, m * c_cl * (t_coil_in - t_leave), 0.0)
    coil_latent = condensate * (LATENT_HEAT_0C + CP_WATER_VAPOR * t_coil_in) - condensate_heat
    supply_state = reheat_mode or needed(
        "supply_airflow_actual_m3s",
        "supply_drybulb_C",
        "supply_enthalpy_kJkg",
        *_ZONE_COLUMNS,
    )
    if supply_state:
        h_after = _h(t_after, w_cl)
        h_supply = h_after if blow_through else h_after + fan_heat / m
    from_condenser = v.dew_point_coil and v.s.reheat_source == "condenser_heat"
    humidity_reheat = reheat_active if v.humidity_control else 0.0
    if v.humidity_control:
        reheat_active = 0.0
    t_supply = (h_supply - LATENT_HEAT_0C * w_cl) / c_cl if supply_state else None
    if reheat_mode:
        # VAV terminal reheat: from the unit's supply to the dry bulb the zone needs (at most
        # the heating supply limit), in heating hours and at the lowest airflow
        t_terminal = np.minimum(t_z - q_room / (m * c_cl), t_hmax)
        at_lowest = heating | (m <= v.m_lowest * (1.0 + 1e-9))
        reheat = np.where(at_lowest, m * c_cl * np.maximum(t_terminal - t_supply, 0.0), 0.0)
    else:
        reheat = np.zeros(np.shape(t_leave))
    if needed(*_ZONE_COLUMNS):
        # zone: what the supply air takes up in the room and the plenum, from the states
        zone_latent = m * (w_z - w_cl) * h_g_zone
        to_room = m * c_cl * (t_z - t_supply)
        plenum = m * (CP_DRY_AIR + CP_WATER_VAPOR * w_z) * (t_r - t_z)
        zone_sensible = to_room - reheat + plenum
        undersized = np.where(heating, t_need > t_hmax, t_need < t_ss)
        unmet_sensible = np.where(undersized, q_sens - zone_sensible, 0.0)
        zone_latent_unmet = np.where(
            np.abs(q_lat - zone_latent) > 1e-9 * (1.0 + np.abs(q_lat)), q_lat - zone_latent, 0.0
        )

    # Each column as an expression, evaluated only when asked for (ventilation, economizer
    # and recovery terms among them).
    every_column = {
        "occupied": lambda: occupied,
        "operating": lambda: operating,
        "economizer_mode": lambda: np.where(operating, mode, MODE_OFF).astype(np.int8),
        "outdoor_drybulb_C": lambda: t_o,
        "outdoor_humidity_ratio_kgkg": lambda: w_o,
        "outdoor_enthalpy_kJkg": lambda: h_o,
        "pressure_Pa": lambda: p,
        "supply_mass_flow_kgs": lambda: m,
        "supply_airflow_m3s": lambda: m / rho,
        "supply_airflow_standard_m3s": lambda: m / _RHO_STD,
        # actual volume at the supply state: v of Eq. 26, ASHRAE Handbook Fundamentals Ch. 1
        "supply_airflow_actual_m3s": lambda: (
            m * R_DRY_AIR * (t_supply + ZERO_CELSIUS) * (1.0 + VOLUME_WATER_FACTOR * w_cl) / p
        ),
        "airflow_fraction": lambda: airflow_fraction,
        "outdoor_air_fraction": lambda: x,
        "outdoor_mass_flow_kgs": lambda: m * x,
        "recovery_fraction": lambda: f,
        "zone_drybulb_C": lambda: t_z,
        "zone_humidity_ratio_kgkg": lambda: w_z,
        "zone_enthalpy_kJkg": lambda: _h(t_z, w_z),
        "zone_relative_humidity": lambda: np.minimum(
            p * w_z / ((MOLAR_MASS_RATIO + w_z) * pws_zone), 1.0
        ),
        "return_drybulb_C": lambda: t_r,
        "return_humidity_ratio_kgkg": lambda: w_z,
        "return_enthalpy_kJkg": lambda: h_r,
        "recovered_drybulb_C": lambda: t_o2,
        "recovered_humidity_ratio_kgkg": lambda: w_o2,
        "recovered_enthalpy_kJkg": lambda: h_o2,
        "mixed_drybulb_C": lambda: t_m,
        "mixed_humidity_ratio_kgkg": lambda: w_m,
        "mixed_enthalpy_kJkg": lambda: h_m,
        "coil_entering_drybulb_C": lambda: t_coil_in,
        "coil_entering_humidity_ratio_kgkg": lambda: w_e,
        "coil_entering_enthalpy_kJkg": lambda: _h(t_coil_in, w_e),
        "coil_leaving_drybulb_C": lambda: t_leave,
        "coil_leaving_humidity_ratio_kgkg": lambda: w_cl,
        "coil_leaving_enthalpy_kJkg": lambda: _h(t_leave, w_cl),
        "supply_drybulb_C": lambda: t_supply,
        "supply_humidity_ratio_kgkg": lambda: w_cl,
        "supply_enthalpy_kJkg": lambda: h_supply,
        "apparatus_dew_point_C": lambda: np.where(wet, t_adp, np.nan),
        "bypass_factor": lambda: np.where(wet, bf, np.nan),
        "coil_wet": lambda: wet,
        "coil_total_kW": lambda: coil_sensible + coil_latent,
        "coil_sensible_kW": lambda: coil_sensible,
        "coil_latent_kW": lambda: coil_latent,
        "condensate_kgs": lambda: condensate,
        "condensate_heat_kW": lambda: condensate_heat,
        "preheat_kW": lambda: preheat,
        "heating_coil_kW": lambda: heating_coil,
        "reheat_kW": lambda: reheat,
        "zone_sensible_kW": lambda: zone_sensible,
        "zone_latent_kW": lambda: zone_latent,
        "zone_sensible_unmet_kW": lambda: unmet_sensible,
        "zone_latent_unmet_kW": lambda: zone_latent_unmet,
        "plenum_gain_kW": lambda: plenum,
        "ventilation_sensible_kW": lambda: (
            m * x_min * (CP_DRY_AIR + CP_WATER_VAPOR * w_z) * (t_o - t_r)
        ),
        "ventilation_latent_kW": lambda: (
            m * x_min * (w_o - w_z) * (LATENT_HEAT_0C + CP_WATER_VAPOR * t_o)
        ),
        "fan_power_kW": lambda: fan_power,
        "fan_heat_kW": lambda: fan_heat,
        "economizer_effect_kW": lambda: m * (x - x_min) * (h_r - h_o),
        "recovery_effect_kW": lambda: m * x * (h_o - h_o2),
        "dehumidification_reheat_kW": lambda: 0.0 if from_condenser else reheat_active,
        "condenser_heat_recovered_kW": lambda: reheat_active if from_condenser else 0.0,
        "coil_runaround_heat_kW": lambda: runaround,
        "humidity_control_reheat_kW": lambda: humidity_reheat,
    }
    out = {key: value() for key, value in every_column.items() if needed(key)}
    # the shape of the whole table, whichever columns are asked for (a scalar fill such as
    # reheat_active = 0.0 is broadcast to it)
    shape = np.broadcast_shapes(
        *(np.shape(v) for v in out.values()),
        *(np.shape(v) for v in (m, x, t_o, w_z, operating, t_leave, w_cl, heating_coil)),
    )
    for key, value in out.items():
        if np.shape(value) != shape:
            out[key] = np.broadcast_to(value, shape)
    if not np.all(operating):
        off = ~operating
        for key in _STATE_COLUMNS:
            if key in out:
                out[key] = np.where(off, np.nan, out[key])
        for key in _FLOW_AND_LOAD_COLUMNS:
            if key in out:
                out[key] = np.where(off, 0.0, out[key])
        if "coil_wet" in out:
            out["coil_wet"] = out["coil_wet"] & operating
        # the zone loads of off hours are not met by this unit
        if "zone_sensible_unmet_kW" in out:
            out["zone_sensible_unmet_kW"] = np.where(off, q_sens, out["zone_sensible_unmet_kW"])
        if "zone_latent_unmet_kW" in out:
            out["zone_latent_unmet_kW"] = np.where(off, q_lat, out["zone_latent_unmet_kW"])
    out["humidity_iteration_change"] = change
    if want is not None and MINIMUM_IN_A_PASS in want:
        out[MINIMUM_IN_A_PASS] = np.broadcast_to(v.at_minimum_in_a_pass | ~operating, shape)
    if needed("apparatus_dew_point_required_C"):
        adp_required = np.where(cooling & operating, adp_required, np.nan)
        out["apparatus_dew_point_required_C"] = np.broadcast_to(adp_required, shape)
    return out
