"""The air handler of every hour at once: airflow, mixing, economizer, recovery, coils.

:func:`air_handler_hours` takes the outdoor states and zone loads of any number
of hours (numpy arrays that broadcast; a leading axis of outdoor-air fractions
gives a whole sweep in one call) and returns every state and load as arrays in
SI. No per-hour Python loop: each step is a closed form or a masked choice on
whole arrays.

Air path (draw-through fan shown; a blow-through fan sits between preheat and coil)::

    outdoor -> [energy recovery] -> mixing <- return <- [plenum] <- zone
            -> [preheat coil] -> cooling coil / heating coil -> [fan] -> supply -> zone

Per hour, in order:

1. Zone: set point by the sign of the room sensible load (cooling or heating set
   point); return plenum gain q_p = f_p x internal gain moves from the room to the
   return air.
2. Airflow: variable volume follows the room sensible load at the supply set point
   (m = q / (c_p (t_z - t_s))), clipped between the minimum and design airflow;
   heating at the lowest airflow that keeps the supply at or below its maximum.
   c_p = 1.006 + 1.86 W (moist air, Eq. 30 of ASHRAE Handbook Fundamentals 2017 Ch. 1).
3. Supply temperature: the set point (with outdoor reset); below the lowest
   airflow either the supply rises to meet the load or terminal reheat makes up
   the difference (``low_load_response``). With VAV terminal reheat the unit
   supplies the set point in heating hours too and the terminal heats.
4. Coil leaving target = supply - fan rise (draw-through), mixed-air set point =
   supply - fan rise (both fan positions).
5. Outdoor air: minimum fraction (or fixed airflow / hour's airflow), then the
   economizer (:mod:`plantside.air.economizer`).
6. Energy recovery at the minimum only, when it lowers the outdoor enthalpy in
   cooling, or modulated to (not past) the mixed-air set point in heating.
7. Mixing on a mass basis, preheat to ``preheat_drybulb``, blow-through fan.
8. Coil: cooling to the target when the entering air is warmer, heating when it is colder.
9. Zone humidity (closed form, below).

Humidity balance, closed form
-----------------------------
The return humidity W_z floats. With mu = m_w / m (zone moisture gain per kg of
dry supply air) and alpha = x (1 - f eps_L) (outdoor share of the coil's entering
moisture after mixing and recovery), the coil entering humidity is
W_e = alpha W_o + (1 - alpha) W_z and the zone balance W_z = W_cl + mu. The coil
leaving humidity is concave and piecewise linear in W_e::

    W_cl = min(W_e,  a W_e + b,  Ws(t_cl))

(dry coil; wet coil line with a = BF, b = (1 - BF) W_adp; saturation at the leaving
dry bulb). A coil holding a leaving dew point adds the branch W_t (a = 0, b = W_t) in
every hour, cooling or not: where it governs the coil leaves on its own process line
below the leaving target and is reheated (:mod:`plantside.air_handler.results`). Zone
humidity control adds the branch W_max - mu (a = 0), W_max the humidity ratio of
``zone_relative_humidity_max`` at the zone dry bulb, so W_z <= W_max; the coil then leaves
on its process line the same way. Each branch gives a linear equation for W_z::

    dry:        W_z = W_o + mu / alpha
    wet:        W_z = (a alpha W_o + b + mu) / (1 - a (1 - alpha))
    saturated:  W_z = Ws(t_cl) + mu

and because each branch residual falls strictly with W_z, the balance of the
minimum of the branches is solved by the *smallest* of the branch solutions.
Hours without a cooling coil take the dry branch. Dry bulbs depend on W only
weakly (through c_p in mass-basis mixing, airflow and fan rise, and through the
return enthalpy in enthalpy economizer control), so the model is passed over
two to five times (usually two, a few hours three), each pass using the previous
humidity, until a pass changes each hour's zone humidity by less than 5e-5 kg/kg;
an hour that has settled stops, and the third and later passes model only the hours
still going, so an hour's solution does not depend on the hours beside it. The
passes converge linearly with a ratio near 0.01, so the humidity is then within
about 5e-7 kg/kg and the dry bulbs within about 1e-3 K of the exact solution. The
largest last change is reported (``humidity_iteration_change``). Economizer and
recovery decisions are taken in the first two passes and then held.

Energy balance (an identity of the reported states, see
:mod:`plantside.air_handler.results`)::

    coil_total - heating_coil - preheat - dehumidification_reheat
        - condenser_heat_recovered - humidity_control_reheat
        = zone_sensible + zone_latent + reheat
        + ventilation_sensible + ventilation_latent + fan_heat
        - economizer_effect - recovery_effect - condensate_heat

References
----------
ASHRAE Handbook Fundamentals 2017, Ch. 1 (moist air, mixing, heating, cooling and
dehumidifying); ASHRAE 90.1-2019 section 6.5.1.1.3 (economizer high limits).
"""

from __future__ import annotations

from types import SimpleNamespace

import numpy as np

from plantside.air.economizer import (
    MODE_ALL_OUTDOOR_AIR,
    MODE_HEATING,
    MODE_OFF,
    _damper_control,
)
from plantside.air.energy_recovery import recovery_fraction_for_mixed_drybulb
from plantside.air.moist_air import (
    _ln_pws_water,
    saturation_humidity_ratio,
    saturation_vapor_pressure,
)
from plantside.air_handler.results import (
    _FLOW_AND_LOAD_COLUMNS,
    _STATE_COLUMNS,
    COIL_IDLE_K,
    HOURLY_COLUMNS,
    MINIMUM_IN_A_PASS,
    hourly_results,
)
from plantside.air_handler.settings import AirHandlerSettings, fan_power_fraction
from plantside.air_handler.zone_loads import HourlyZoneLoads
from plantside.constants import (
    CP_DRY_AIR,
    CP_WATER_VAPOR,
    LATENT_HEAT_0C,
    MOLAR_MASS_RATIO,
    ZERO_CELSIUS,
)
from plantside.errors import InputRangeError, check_range

__all__ = ["HOURLY_COLUMNS", "MINIMUM_IN_A_PASS", "air_handler_hours"]


#: Lowest zone humidity ratio kept by the balance [kg/kg].
_W_FLOOR = 1e-5
_MAX_PASSES = 5
#: Largest change of the zone humidity in a pass at which the passes stop [kg/kg].
_PASS_TOLERANCE = 5e-5
#: Hours still going, as a share of all, up to which a pass models only them (above it,
#: the whole array is passed over again: gathering and scattering would cost more).
_SUBSET_SHARE = 0.5
#: What a pass reads besides the humidity state (names as in :func:`air_handler_hours`).
_PASS_INPUTS = (
    "s",
    "bf_setting",
    "blow_through",
    "central_heating",
    "coil_model",
    "control",
    "dew_point_coil",
    "eps_l",
    "eps_s",
    "h_o",
    "has_fan",
    "has_plenum",
    "humidity_control",
    "load_per_kelvin",
    "m_design",
    "m_low",
    "m_oa_fixed",
    "moisture",
    "p",
    "preheat_t",
    "q_plenum",
    "q_room",
    "recovery",
    "reheat_mode",
    "t_adp_fixed",
    "t_dew_target",
    "t_hmax",
    "t_o",
    "t_ss",
    "t_z",
    "track_minimum",
    "w_adp_fixed",
    "w_o",
    "w_target",
    "w_zone_max",
    "ws_zone",
    "x_min_setting",
)
#: What a pass hands to the next one.
_PASS_STATE = ("w_s", "w_z", "ws_cl", "frozen_mode", "frozen_recovery", "at_minimum_in_a_pass")
#: What the results read from each hour's last pass (the first three are state).
_PASS_RESULTS = (
    "w_s",
    "w_z",
    "at_minimum_in_a_pass",
    "w_e",
    "t_r",
    "cooling",
    "m",
    "airflow_fraction",
    "x",
    "f",
    "t_o2",
    "w_o2",
    "h_o2",
    "fan_power",
    "fan_heat",
    "t_adp",
    "t_cl",
    "t_need",
    "bf",
    "x_min",
    "mode",
    "w_s_by_drybulb",
)
#: What a pass returns (the rest of its variables are dropped with it).
_PASS_KEPT = tuple(
    dict.fromkeys((*_PASS_RESULTS, *_PASS_STATE, "step", "heat_branch", "cool_branch"))
)
#: What a pass over some of the hours writes back into the whole array's variables.
_PASS_SCATTERED = tuple(dict.fromkeys((*_PASS_RESULTS, *_PASS_STATE, "step")))
#: Where an hour left before pass 1 has no frozen decision yet, the one it took.
_FROZEN_FROM = {"frozen_mode": "mode", "frozen_recovery": ("heat_branch", "cool_branch")}


def _h(t, w):
    """Enthalpy [kJ/kg dry air], ASHRAE Handbook Fundamentals 2017 Ch. 1 Eq. 30."""
    return CP_DRY_AIR * t + w * (LATENT_HEAT_0C + CP_WATER_VAPOR * t)


def _t_from_h(h, w):
    return (h - LATENT_HEAT_0C * w) / (CP_DRY_AIR + CP_WATER_VAPOR * w)


def _check_outdoor(t_o, w_o, p):
    # the range of the weather importer (plantside.climate.weather_csv)
    check_range("outdoor_drybulb", t_o, -70.0, 60.0, "°C")
    check_range("pressure", p, 30_000.0, 120_000.0, "Pa")
    check_range("outdoor_humidity_ratio", w_o, 0.0, 0.1, "kg/kg")
    ws = saturation_humidity_ratio(t_o, p, check=False)
    bad = w_o > ws * 1.01 + 1e-6
    if np.any(bad):
        idx = np.flatnonzero(np.broadcast_to(bad, np.broadcast_shapes(np.shape(bad))))
        raise InputRangeError(
            "outdoor_humidity_ratio",
            f"outdoor_humidity_ratio is above saturation at the outdoor dry bulb at {idx.size} "
            f"hour(s) (first index {idx[0]}); allowed 0 to saturation",
            "0 to saturation",
            idx,
        )


def _supply_setpoint(s: AirHandlerSettings, t_o):
    if s.supply_reset_drybulb is None:
        return np.full(np.shape(t_o), float(s.supply_drybulb))
    share = np.clip(
        (s.supply_reset_outdoor_high - t_o)
        / (s.supply_reset_outdoor_high - s.supply_reset_outdoor_low),
        0.0,
        1.0,
    )
    return s.supply_drybulb + share * (s.supply_reset_drybulb - s.supply_drybulb)


def air_handler_hours(
    settings: AirHandlerSettings,
    outdoor_drybulb,
    outdoor_humidity_ratio,
    pressure,
    zone_loads: HourlyZoneLoads,
    *,
    minimum_outdoor_air_fraction=None,
    force_operating=False,
    check=True,
    operating_hours_only=True,
    columns=None,
):
    """Every state and load of an air handler for many hours at once.

    Parameters
    ----------
    settings : AirHandlerSettings
        The air handler.
    outdoor_drybulb : array_like
        Outdoor dry bulb of each hour [°C], -70 to 60.
    outdoor_humidity_ratio : array_like
        Outdoor humidity ratio [kg/kg dry air], 0 to saturation.
    pressure : array_like
        Station pressure [Pa], 30,000 to 120,000.
    zone_loads : HourlyZoneLoads
        Zone loads of the same hours.
    minimum_outdoor_air_fraction : array_like, optional
        Overrides the settings' minimum outdoor air (as a fraction of each hour's
        supply airflow) [-], 0 to 1. A column vector of shape (k, 1) evaluates k
        fractions over all hours in one call (result arrays of shape (k, N)).
    force_operating : bool
        Run the fan in every hour whatever ``fan_schedule`` says (design points).
    check : bool
        Validate the inputs (once, here).
    operating_hours_only : bool
        Model only the hours the fan runs and fill the others (every state NaN, every
        flow and load 0, the zone loads unmet), as the whole record gives them; False
        models every hour (the same results to the pass tolerance, for tests).
    columns : collection of str, optional
        Return only these columns (and ``humidity_iteration_change``), each the same as
        in the whole table; all by default (see
        :func:`plantside.air_handler.results.hourly_results`). Only on request, also
        :data:`MINIMUM_IN_A_PASS`: True where the outdoor-air damper stood at the
        minimum in some pass (elsewhere the hour's solution, pass by pass, is the same
        at any lower minimum).

    Returns
    -------
    dict of str to numpy.ndarray
        One array per name in :data:`HOURLY_COLUMNS` (``economizer_mode`` as integer codes
        into :data:`plantside.air.economizer.ECONOMIZER_MODES`), plus
        ``humidity_iteration_change`` [kg/kg] (largest change of the zone humidity
        in the last pass) and ``apparatus_dew_point_required_C`` (the ADP each cooling
        hour needs, also where it is below ``apparatus_dew_point_min``).
    """
    s = settings
    t_o = np.asarray(outdoor_drybulb, dtype=float)
    w_o = np.asarray(outdoor_humidity_ratio, dtype=float)
    p = np.asarray(pressure, dtype=float)
    n = zone_loads.hours
    t_o, w_o, p = (np.broadcast_to(a, (n,)) if a.ndim == 0 else a for a in (t_o, w_o, p))
    if check:
        if not isinstance(zone_loads, HourlyZoneLoads):
            raise InputRangeError(
                "zone_loads", "zone_loads must be HourlyZoneLoads", "HourlyZoneLoads"
            )
        if t_o.shape[-1] != n or w_o.shape[-1] != n or p.shape[-1] != n:
            raise InputRangeError(
                "zone_loads",
                f"zone_loads has {n} hours but the outdoor record has {t_o.shape[-1]}",
                f"{t_o.shape[-1]} hours",
            )
        _check_outdoor(t_o, w_o, p)
        if columns is not None:
            known = {*HOURLY_COLUMNS, "apparatus_dew_point_required_C", MINIMUM_IN_A_PASS}
            unknown = sorted(set(columns) - known)
            if unknown or not len(columns):
                raise InputRangeError(
                    "columns",
                    f"columns: {', '.join(unknown) or 'none given'}; allowed: the names "
                    "of HOURLY_COLUMNS and apparatus_dew_point_required_C",
                    "names of HOURLY_COLUMNS",
                )
        if minimum_outdoor_air_fraction is not None:
            check_range(
                "minimum_outdoor_air_fraction",
                minimum_outdoor_air_fraction,
                0.0,
                1.0,
                "(fraction)",
            )

    if operating_hours_only and not (force_operating or s.fan_schedule == "always"):
        if not np.all(zone_loads.occupied):
            return _fan_off_hours_filled(
                settings,
                t_o,
                w_o,
                p,
                zone_loads,
                minimum_outdoor_air_fraction,
                columns,
            )

    # --- zone, airflow limits, fan (independent of humidity) --------------------------
    occupied = zone_loads.occupied
    operating = (
        np.ones(n, dtype=bool) if force_operating or s.fan_schedule == "always" else occupied
    )
    q_sens, q_lat = zone_loads.sensible, zone_loads.latent
    q_plenum = s.return_plenum_fraction * zone_loads.internal_sensible
    has_plenum = s.return_plenum_fraction > 0.0
    q_room = q_sens - q_plenum
    heating = q_room < 0.0
    t_cool, t_heat = float(s.zone_cooling_drybulb), float(s.zone_heating_drybulb)
    t_z = np.where(heating, t_heat, t_cool)
    h_g_zone = LATENT_HEAT_0C + CP_WATER_VAPOR * t_z
    moisture = q_lat / h_g_zone  # kg/s of water vapour added in the zone
    t_ss = _supply_setpoint(s, t_o)
    t_hmax = float(s.heating_supply_drybulb_max)
    rho = s.dry_air_density(p)
    m_design = s.supply_airflow * rho
    m_low = s.minimum_airflow_fraction * m_design
    with np.errstate(divide="ignore", invalid="ignore"):
        # airflow x c_p that meets the room load at the supply set point [kW/K]
        load_per_kelvin = np.where(heating, -q_room / (t_hmax - t_z), q_room / (t_z - t_ss))
    reheat_mode = s.low_load_response == "reheat"
    # VAV terminal reheat: the unit's supply stays at its set point in heating hours too
    # (the terminal heats), so only the other response heats at the unit
    central_heating = np.zeros_like(heating) if reheat_mode else heating
    m_lowest = m_low if s.variable_volume else m_design
    blow_through = s.fan_position == "blow_through"
    has_fan = s.supply_fan_power > 0.0
    # saturation at the two zone set points (Eq. 20 at saturation, ASHRAE Fundamentals 2017 Ch. 1)
    pws_cool = float(saturation_vapor_pressure(t_cool, check=False))
    pws_heat = float(saturation_vapor_pressure(t_heat, check=False))
    pws_zone = np.where(heating, pws_heat, pws_cool)
    ws_zone = MOLAR_MASS_RATIO * pws_zone / (p - pws_zone)
    # zone humidity control: the humidity ratio of the set point's relative humidity at
    # the zone dry bulb (ASHRAE Handbook Fundamentals 2017 Ch. 1, Eqs. 20 and 22)
    humidity_control = s.zone_relative_humidity_max is not None
    if humidity_control:
        pw_max = float(s.zone_relative_humidity_max) * pws_zone
        w_zone_max = MOLAR_MASS_RATIO * pw_max / (p - pw_max)
    h_o = _h(t_o, w_o)

    # --- outdoor air ---------------------------------------------------------------------
    m_oa_fixed = None
    if s.all_outdoor_air:
        x_min_setting = 1.0
    elif minimum_outdoor_air_fraction is not None:
        x_min_setting = np.asarray(minimum_outdoor_air_fraction, dtype=float)
    elif s.minimum_outdoor_airflow is not None:
        x_min_setting = None  # from the fixed airflow, per hour
        m_oa_fixed = s.minimum_outdoor_airflow * rho
    else:
        x_min_setting = float(s.minimum_outdoor_air_fraction)
    eps_s = float(s.recovery_sensible_effectiveness)
    eps_l = float(s.recovery_latent_effectiveness)
    recovery = eps_s > 0.0 or eps_l > 0.0
    control = s.economizer_control
    preheat_t = s.preheat_drybulb

    # --- cooling coil parameters ------------------------------------------------------------
    coil_model = s.coil_model
    bf_setting = float(s.bypass_factor)
    if coil_model == "apparatus_dew_point":
        t_adp_fixed = float(s.apparatus_dew_point)
        w_adp_fixed = saturation_humidity_ratio(t_adp_fixed, p, check=False)
    # A coil holding a leaving dew point: a bypass-factor coil cooling to the coil leaving
    # target, whose valve opens further whenever that leaves the air wetter than the
    # target humidity (W_cl = min(bypass-factor line, W_target)); it then leaves below the
    # target dry bulb on its process line and is reheated (results.py).
    dew_point_coil = coil_model == "leaving_dew_point"
    t_dew_target = float(s.leaving_dew_point) if dew_point_coil else None
    w_target = (
        saturation_humidity_ratio(float(s.leaving_dew_point), p, check=False)
        if dew_point_coil
        else None
    )

    # Initial humidity guess: cooling hours, supply at about 92 % RH at the supply set
    # point (a wet coil; the outdoor humidity if drier); heating hours, the dry-coil
    # balance at the minimum outdoor air; plus the zone moisture pickup at the airflow
    # the load asks for.
    pws_supply = float(saturation_vapor_pressure(s.supply_drybulb, check=False))
    w_wet = 0.92 * MOLAR_MASS_RATIO * pws_supply / (p - pws_supply)
    m_guess = np.minimum(np.maximum(load_per_kelvin / 1.02, m_low), m_design)
    mu_guess = moisture / m_guess
    if s.all_outdoor_air:
        x_guess = 1.0
    else:
        # each hour's own minimum (a sweep's pairs have one each), at least 5 %
        x_guess = np.maximum(0.0 if x_min_setting is None else x_min_setting, 0.05)
    w_s = np.where(heating, w_o, np.minimum(w_o, w_wet))
    w_z = np.minimum(
        np.maximum(np.where(heating, w_o + mu_guess / x_guess, w_s + mu_guess), _W_FLOOR), ws_zone
    )
    # Control decisions (economizer mode, recovery on/off) are taken in the first two
    # passes and then kept: near a switching point the decision would otherwise flip
    # between passes (a real controller holds it by its deadband).
    track_minimum = columns is not None and MINIMUM_IN_A_PASS in columns
    here = locals()
    last = _passes(
        {name: here.get(name) for name in _PASS_INPUTS},
        {
            "w_s": w_s,
            "w_z": w_z,
            "ws_cl": None,
            "frozen_mode": None,
            "frozen_recovery": None,
            "at_minimum_in_a_pass": False,
        },
        n,
    )
    del here
    change = float(np.max(last["step"]))
    (
        w_s,
        w_z,
        at_minimum_in_a_pass,
        w_e,
        t_r,
        cooling,
        m,
        airflow_fraction,
        x,
        f,
        t_o2,
        w_o2,
        h_o2,
        fan_power,
        fan_heat,
        t_adp,
        t_cl,
        t_need,
        bf,
        x_min,
        mode,
        w_s_by_drybulb,
    ) = (last.get(name) for name in _PASS_RESULTS)
    # hours where the leaving dew point or the zone humidity set point, not the leaving
    # dry bulb, sets the coil
    dew_point_governs = (w_s < w_s_by_drybulb) if dew_point_coil or humidity_control else False
    return hourly_results(SimpleNamespace(**locals()), columns)


def _passes(inputs, state, n):
    """Passes of :func:`_one_pass` until the zone humidity has settled (module notes).

    Where the arrays are one row of ``n`` hours (a year, or a sweep's pairs), each hour
    stops on its own after the first pass from its second on that changed its humidity
    by less than the tolerance, and the later passes model only the hours still going:
    an hour's solution is then the same whatever other hours share the call (a sweep's
    pair equals the year's hour). Otherwise (a block of fractions by hours) every hour
    passes until the largest change is below the tolerance, after at least two passes.
    Returns the variables of each hour's last pass (those of :data:`_PASS_RESULTS`, and
    ``step``, each hour's last change).
    """
    out = _one_pass(0, **inputs, **state)
    per_hour = np.shape(out["step"]) == (n,)
    for pass_number in range(1, _MAX_PASSES):
        if per_hour:
            if pass_number == 1:  # every hour takes two passes from the first guess
                out = _one_pass(pass_number, **inputs, **{key: out[key] for key in _PASS_STATE})
                continue
            hours = np.flatnonzero(~(out["step"] < _PASS_TOLERANCE))  # NaN goes on
            if hours.size == 0:
                break
            if hours.size <= _SUBSET_SHARE * n:
                part = _one_pass(
                    pass_number,
                    **_subset(inputs, hours, n),
                    **_subset({key: out[key] for key in _PASS_STATE}, hours, n),
                )
                _scatter(out, part, hours, n, inputs)
                continue
        elif pass_number >= 2 and float(np.max(out["step"])) < _PASS_TOLERANCE:
            break
        out = _one_pass(pass_number, **inputs, **{key: out[key] for key in _PASS_STATE})
    return out


def _subset(values, hours, n):
    """``values`` (a dict) with every array of one value per hour taken at ``hours``."""

    def take(value):
        if isinstance(value, tuple):
            return tuple(take(item) for item in value)
        if isinstance(value, np.ndarray) and value.shape == (n,):
            return value[hours]
        return value

    return {key: take(value) for key, value in values.items()}


def _scatter(out, part, hours, n, inputs):
    """Write a pass over ``hours`` (``part``) into the whole array's variables ``out``.

    An array a pass made and no other name holds is written in place; an input (a
    variable that only passes an input on, such as the recovered air without recovery)
    keeps its values, which the part's are taken from; anything else is copied first.
    """
    shared = {id(value) for value in inputs.values() if isinstance(value, np.ndarray)}
    written = set()

    def put(whole, piece):
        if np.ndim(piece) == 0:  # a constant of every pass (a scalar setting)
            return whole
        if id(whole) in shared:
            return whole
        if (
            isinstance(whole, np.ndarray)
            and whole.shape == (n,)
            and whole.dtype == piece.dtype
            and whole.base is None
            and whole.flags.writeable
            and id(whole) not in written
        ):
            merged = whole
        else:
            merged = np.empty(n, dtype=np.result_type(whole, piece))
            merged[...] = whole
        merged[hours] = piece
        written.add(id(merged))
        return merged

    for key in _PASS_SCATTERED:
        whole, piece = out.get(key), part.get(key)
        if piece is None:
            continue
        if whole is None:  # frozen at pass 1 here, not yet in the hours that left
            source = _FROZEN_FROM[key]
            whole = out[source] if isinstance(source, str) else tuple(out[s] for s in source)
        if isinstance(piece, tuple):
            out[key] = tuple(put(w, p) for w, p in zip(whole, piece, strict=True))
        else:
            out[key] = put(whole, piece)


def _one_pass(
    pass_number,
    *,
    s,
    bf_setting,
    blow_through,
    central_heating,
    coil_model,
    control,
    dew_point_coil,
    eps_l,
    eps_s,
    h_o,
    has_fan,
    has_plenum,
    humidity_control,
    load_per_kelvin,
    m_design,
    m_low,
    m_oa_fixed,
    moisture,
    p,
    preheat_t,
    q_plenum,
    q_room,
    recovery,
    reheat_mode,
    t_adp_fixed,
    t_dew_target,
    t_hmax,
    t_o,
    t_ss,
    t_z,
    track_minimum,
    w_adp_fixed,
    w_o,
    w_target,
    w_zone_max,
    ws_zone,
    x_min_setting,
    w_s,
    w_z,
    ws_cl,
    frozen_mode,
    frozen_recovery,
    at_minimum_in_a_pass,
):
    """One pass of :func:`air_handler_hours` over the hours given (module notes): every
    state from the previous pass's humidity, then the zone humidity in closed form.
    Returns its variables by name (``step``: each hour's change of the zone humidity)."""
    c_s = CP_DRY_AIR + CP_WATER_VAPOR * w_s
    # airflow
    if s.variable_volume:
        m = np.minimum(np.maximum(load_per_kelvin / c_s, m_low), m_design)
    else:
        m = m_design * np.ones_like(c_s)
    mc_s = m * c_s
    # supply temperature
    t_need = t_z - q_room / mc_s
    t_s_cool = t_ss if reheat_mode else np.maximum(t_ss, t_need)
    t_s = np.where(central_heating, np.minimum(t_need, t_hmax), t_s_cool)
    t_r = t_z + q_plenum / (m * (CP_DRY_AIR + CP_WATER_VAPOR * w_z)) if has_plenum else t_z
    # fan
    airflow_fraction = m / m_design
    if has_fan:
        fan_power = s.supply_fan_power * (
            fan_power_fraction(airflow_fraction) if s.variable_volume else 1.0
        )
        fan_heat = fan_power * s.fan_heat_fraction
        rise = fan_heat / mc_s
    else:
        fan_power = fan_heat = rise = 0.0
    t_cl = t_s if blow_through else t_s - rise
    t_ma = t_s - rise  # mixed-air set point, either fan position
    # minimum outdoor air and economizer
    x_min = np.minimum(1.0, m_oa_fixed / m) if x_min_setting is None else x_min_setting
    h_r = _h(t_r, w_z)
    if s.all_outdoor_air:
        x = np.ones(np.broadcast_shapes(np.shape(t_ma), np.shape(x_min)))
        mode = np.where(central_heating, MODE_HEATING, MODE_ALL_OUTDOOR_AIR).astype(np.int8)
    else:
        x, mode = _damper_control(
            control,
            s.economizer_integrated,
            x_min,
            t_ma,
            t_o,
            w_o,
            h_o,
            t_r,
            w_z,
            h_r,
            s.economizer_drybulb_limit,
            s.economizer_enthalpy_limit,
            central_heating,
            frozen_mode,
        )
    if track_minimum:
        # where the damper stood at the minimum in some pass, the hour's solution
        # depends on the minimum; elsewhere every pass is the same at any lower one
        at_minimum_in_a_pass = at_minimum_in_a_pass | (x <= x_min)
    # energy recovery (exhaust = return air), at the minimum outdoor air only
    if recovery:
        if frozen_recovery is None:
            at_minimum = x <= x_min + 1e-12
            t_m0 = _t_from_h(h_r + x * (h_o - h_r), w_z + x * (w_o - w_z))
            heat_branch = at_minimum & (t_m0 < t_ma) & (t_o < t_r)
            cool_branch = at_minimum & ~(t_m0 < t_ma)
            cool_branch &= _h(t_o + eps_s * (t_r - t_o), w_o + eps_l * (w_z - w_o)) < h_o
        else:
            heat_branch, cool_branch = frozen_recovery
        heat_hours = np.flatnonzero(heat_branch) if heat_branch.ndim == 1 else None
        if heat_hours is not None and heat_hours.size < 0.8 * heat_branch.size:
            # one array of hours (a year, or a sweep's pairs): the modulation solved
            # only in the hours that use it
            f = 1.0 * cool_branch
            f_heat = recovery_fraction_for_mixed_drybulb(
                *(
                    a[heat_hours] if np.ndim(a) else a
                    for a in (t_ma, x, t_o, w_o, t_r, w_z, t_r, w_z)
                ),
                eps_s,
                eps_l,
            )
            f[heat_hours] = np.where(np.isnan(f_heat), 1.0, np.fmin(np.fmax(f_heat, 0.0), 1.0))
        else:
            f_heat = recovery_fraction_for_mixed_drybulb(
                t_ma, x, t_o, w_o, t_r, w_z, t_r, w_z, eps_s, eps_l
            )
            f_heat = np.where(np.isnan(f_heat), 1.0, np.fmin(np.fmax(f_heat, 0.0), 1.0))
            f = np.where(heat_branch, f_heat, 1.0 * cool_branch)
        t_o2 = t_o + f * eps_s * (t_r - t_o)
        w_o2 = w_o + f * eps_l * (w_z - w_o)
        h_o2 = _h(t_o2, w_o2)
        alpha = x * (1.0 - f * eps_l)
    else:
        f, t_o2, w_o2, h_o2, alpha = 0.0, t_o, w_o, h_o, x
    # mixing on a mass basis, preheat, blow-through fan
    w_m = w_z + alpha * (w_o - w_z)
    c_m = CP_DRY_AIR + CP_WATER_VAPOR * w_m
    h_m = h_r + x * (h_o2 - h_r)
    t_m = (h_m - LATENT_HEAT_0C * w_m) / c_m
    t_ph = t_m if preheat_t is None else np.maximum(t_m, preheat_t)
    t_e = t_ph + fan_heat / (m * c_m) if blow_through else t_ph
    cooling = t_e > t_cl + COIL_IDLE_K
    # coil humidity line W_cl = a W_e + b on the wet branch
    if coil_model != "apparatus_dew_point":
        t_adp = (t_cl - bf_setting * t_e) / (1.0 - bf_setting)
        a = bf = bf_setting
        w_adp = _saturation_humidity_ratio(t_adp, p)
    else:
        t_adp, w_adp = t_adp_fixed, w_adp_fixed
        with np.errstate(divide="ignore", invalid="ignore"):
            a = bf = np.where(cooling, (t_cl - t_adp) / (t_e - t_adp), 1.0)
    b = (1.0 - a) * w_adp
    if pass_number <= 1:  # t_cl moves by the iteration tolerance only after that
        ws_cl = _saturation_humidity_ratio(t_cl, p)
    mu = moisture / m
    # closed-form zone humidity: smallest of the branch solutions (module notes)
    with np.errstate(divide="ignore", invalid="ignore"):
        z_dry = w_o + mu / alpha  # +-inf (no steady state) or NaN (any) when alpha = 0
        z_wet = (a * alpha * w_o + b + mu) / (1.0 - a * (1.0 - alpha))
    z = np.where(cooling, np.minimum(np.minimum(z_dry, z_wet), ws_cl + mu), z_dry)
    undetermined = w_z
    if dew_point_coil:
        # the target branch (a = 0, b = W_target) holds in every hour, heating too,
        # where the entering air is warmer than the target dew point (colder air, a
        # fog of mixing, is not dried by cooling it further)
        dew_active = t_e > t_dew_target + COIL_IDLE_K
        z = np.where(dew_active, np.minimum(z, w_target + mu), z)
        undetermined = np.where(dew_active, np.minimum(w_z, w_target + mu), w_z)
    elif humidity_control:
        # the coil is driven colder until the supply holds the zone at the set point
        # (a = 0, b = W_max - mu), in any hour the zone would be more humid
        w_cap = np.maximum(w_zone_max - mu, _W_FLOOR)
        z = np.minimum(z, w_cap + mu)
        undetermined = np.minimum(w_z, w_cap + mu)
    w_z_new = np.minimum(np.maximum(np.where(np.isnan(z), undetermined, z), _W_FLOOR), ws_zone)
    step = np.abs(w_z_new - w_z)
    w_z = w_z_new
    w_e = w_z + alpha * (w_o - w_z)
    w_s = np.where(cooling, np.minimum(np.minimum(w_e, a * w_e + b), ws_cl), w_e)
    if dew_point_coil:
        w_s_by_drybulb = w_s
        w_s = np.where(dew_active, np.minimum(w_s, w_target), w_s)
    elif humidity_control:
        w_s_by_drybulb = w_s
        w_s = np.minimum(w_s, w_cap)
    if pass_number == 1:
        frozen_mode = None if s.all_outdoor_air else mode
        frozen_recovery = (heat_branch, cool_branch) if recovery else None
    here = locals()
    return {key: here.get(key) for key in _PASS_KEPT}


def _fan_off_hours_filled(
    settings,
    t_o,
    w_o,
    p,
    zone_loads,
    minimum_outdoor_air_fraction,
    columns=None,
):
    """:func:`air_handler_hours` of the hours the fan runs, the others filled as
    :func:`plantside.air_handler.results.hourly_results` leaves them (fan-off hours do
    not depend on the outdoor air, so a sweep of fractions computes them once, here)."""
    occupied = np.asarray(zone_loads.occupied, dtype=bool)
    on = np.flatnonzero(occupied)
    q_sens, q_lat = zone_loads.sensible, zone_loads.latent
    sub = {}
    if on.size:
        loads = HourlyZoneLoads(
            sensible=q_sens[on],
            latent=q_lat[on],
            internal_sensible=zone_loads.internal_sensible[on],
            occupied=occupied[on],
        )
        fraction = minimum_outdoor_air_fraction
        if np.ndim(fraction) and np.shape(fraction)[-1] == occupied.size:
            fraction = np.asarray(fraction)[..., on]  # one per hour (a sweep's pairs)
        sub = air_handler_hours(
            settings,
            t_o[..., on],
            w_o[..., on],
            p[..., on],
            loads,
            minimum_outdoor_air_fraction=fraction,
            force_operating=True,
            check=False,
            columns=columns,
        )
    if sub:
        any_column = next(key for key in sub if key != "humidity_iteration_change")
        shape = (*sub[any_column].shape[:-1], occupied.size)
    else:
        shapes = [np.shape(a) for a in (t_o, w_o, p)]
        if minimum_outdoor_air_fraction is not None:
            shapes.append(np.shape(minimum_outdoor_air_fraction))
        shape = np.broadcast_shapes(*shapes)
    off_values = {
        "occupied": occupied,
        "operating": False,
        "economizer_mode": MODE_OFF,
        "coil_wet": False,
        "outdoor_drybulb_C": t_o,
        "outdoor_humidity_ratio_kgkg": w_o,
        "outdoor_enthalpy_kJkg": _h(t_o, w_o),
        "pressure_Pa": p,
        "zone_sensible_unmet_kW": q_sens,
        "zone_latent_unmet_kW": q_lat,
        "apparatus_dew_point_required_C": np.nan,
        MINIMUM_IN_A_PASS: True,
    }
    out = {}
    for key in (*HOURLY_COLUMNS, "apparatus_dew_point_required_C", MINIMUM_IN_A_PASS):
        if (columns is None and key == MINIMUM_IN_A_PASS) or (
            columns is not None and key not in columns
        ):
            continue
        if key in off_values:
            value = off_values[key]
        elif key in _STATE_COLUMNS:
            value = np.nan
        elif key in _FLOW_AND_LOAD_COLUMNS:
            value = 0.0
        else:
            raise KeyError(f"no fan-off value for the hourly column {key!r}")
        dtype = sub[key].dtype if sub else np.asarray(value).dtype
        if key == "economizer_mode":
            dtype = np.int8
        full = np.empty(shape, dtype=dtype)
        full[...] = value
        if sub:
            full[..., on] = sub[key]
        out[key] = full
    out["humidity_iteration_change"] = sub["humidity_iteration_change"] if sub else 0.0
    return out


def _saturation_humidity_ratio(t, p):
    """Saturation humidity ratio [kg/kg], Eqs. 6 and 20 of ASHRAE Handbook Fundamentals
    2017 Ch. 1, evaluated directly over water when every temperature is above the triple
    point (coil temperatures), else by :func:`plantside.air.moist_air.saturation_humidity_ratio`."""
    t = np.asarray(t, dtype=float)
    if np.all(t > 0.01) and np.all(t < 100.0):
        pws = np.exp(_ln_pws_water(t + ZERO_CELSIUS))
        return MOLAR_MASS_RATIO * pws / (p - pws)
    return saturation_humidity_ratio(np.clip(t, -100.0, 100.0), p, check=False)
