"""How each headline figure and each chart is worked out, with the current numbers.

A colleague who asks "where does this figure come from?" gets, in one place, the
equation with the study's numbers in it, the air states it uses and the published
source. Nothing is computed a second way: every number is read from the results the
figures and charts show (:func:`plantside.study.figures.headline_figures`, the air
handlers' design points, :func:`plantside.study.figures.coincident_cooling_design`,
the hourly loads of the view) or from the functions the charts call
(:func:`plantside.plant.part_load.part_load_bins`,
:func:`plantside.plant.staging.stage_machines`,
:func:`plantside.plant.efficiency.iplv_band_weights`). The numbers are converted to
the display units only here, at the edge.

Each step keeps its arithmetic (:class:`Check`: a formula in the display units, its
operands and its result) so a test can redo it; the final step's result is the
figure shown.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import NamedTuple

import numpy as np

from plantside.climate.design_conditions import design_condition_text
from plantside.constants import CP_LIQUID_WATER
from plantside.plant.efficiency import iplv_band_weights
from plantside.plant.part_load import part_load_bins
from plantside.plant.staging import stage_machines
from plantside.plant.water import water_density
from plantside.study.figures import (
    PART_LOAD_THRESHOLD,
    HeadlineFigures,
    ViewLoads,
    coincident_cooling_design,
    first_recirculating_unit,
    view_loads,
)
from plantside.units import UnitSystem, to_display, unit_label

__all__ = [
    "CHART_KEYS",
    "HEADLINE_KEYS",
    "Check",
    "Derivation",
    "StatePoint",
    "chart_derivations",
    "headline_derivations",
    "number_text",
]

#: The headline figures, in the order the views show them.
HEADLINE_KEYS = (
    "design_zone_load",
    "design_coil_load",
    "coil_to_zone_ratio",
    "governing_condition",
    "recommended_capacity",
    "peak_coil_load",
    "cooling_energy",
    "hours_above_threshold",
)

#: The charts with a derivation (the five study charts and the water side).
CHART_KEYS = ("design", "year", "distribution", "psychrometric", "sweep", "water")

_PSYCHROMETRICS = "ASHRAE Handbook Fundamentals 2017, Ch. 1 (Psychrometrics)"
_COIL_SOURCE = (
    f"{_PSYCHROMETRICS}, 'Moist Air Cooling and Dehumidification': "
    "q = ṁ_da [(h1 − h2) − (W1 − W2) h_w2], with h from Eq. 30"
)
_MIXING_SOURCE = (
    f"{_PSYCHROMETRICS}, adiabatic mixing of two moist airstreams (mass and energy "
    "balances) and Eq. 30 for the dry bulb"
)
_CONDITIONS_SOURCE = (
    "Annual design conditions from the site's hourly year as ASHRAE Handbook Fundamentals "
    "2017 Ch. 14 defines them (a design value exceeded in the stated share of the hours, "
    "with its mean coincident companion)"
)
_AHRI = (
    "AHRI Standard 550/590: IPLV = 0.01 A + 0.42 B + 0.45 C + 0.12 D at 100, 75, 50 and 25 % load"
)


#: The cooling design kinds in words.
_KIND_WORDS = {
    "cooling": "cooling (design dry bulb, mean coincident wet bulb)",
    "dehumidification": "dehumidification (design dew point, mean coincident dry bulb)",
    "enthalpy": "enthalpy (design enthalpy, mean coincident dry bulb)",
}


class StatePoint(NamedTuple):
    """One air state in display units: dry bulb [°C or °F], humidity ratio [g/kg or
    gr/lb], enthalpy [kJ/kg or Btu/lb], relative humidity [%]."""

    name: str
    drybulb: float
    humidity_ratio: float
    enthalpy: float
    relative_humidity: float


class Check(NamedTuple):
    """The arithmetic of one step, in display units: ``formula`` (a Python expression
    of the names in ``operands``) gives ``result``. An empty formula marks a step that
    is a count or a choice, not arithmetic."""

    formula: str
    operands: dict
    result: float


@dataclass(frozen=True)
class Derivation:
    """How one figure or chart is worked out.

    Attributes
    ----------
    key : str
        The figure's attribute of :class:`~plantside.study.figures.HeadlineFigures`
        (:data:`HEADLINE_KEYS`) or the chart's name (:data:`CHART_KEYS`).
    title : str
        What is derived, in words.
    value_text : str
        The figure as shown, with its unit (the final step's result).
    steps : tuple of str
        Each an equation with the current numbers substituted.
    state_points : tuple of StatePoint
        The air states the steps use (display units), may be empty.
    source : str
        The published source, or "common practice" / "from memory".
    checks : tuple of Check
        The arithmetic of each step (same length as ``steps``).
    value : float
        The final number in display units (NaN for a figure that is a choice).
    units : tuple of str
        Units of the state points' dry bulb, humidity ratio, enthalpy and RH.
    """

    key: str
    title: str
    value_text: str
    steps: tuple[str, ...]
    state_points: tuple[StatePoint, ...]
    source: str
    checks: tuple[Check, ...] = ()
    value: float = float("nan")
    units: tuple[str, str, str, str] = ("°C", "g/kg", "kJ/kg", "%")


# --------------------------------------------------------------------------- formatting
def number_text(value: float, digits: int | None = None) -> str:
    """A number as the steps print it: ``digits`` decimals, or by its size (none from
    1,000 up, one from 10, two from 1, three significant figures below 1)."""
    value = float(value)
    if digits is not None:
        return f"{value:,.{digits}f}"
    size = abs(value)
    if size >= 1000.0:
        return f"{value:,.0f}"
    if size >= 10.0:
        return f"{value:,.1f}"
    if size >= 1.0 or value == 0.0:
        return f"{value:.2f}"
    return f"{value:.3g}"


def _figure_digits(value: float) -> int:
    """Decimals of a headline figure: none from 100 up, else one (the views' rule)."""
    return 0 if abs(value) >= 100.0 else 1


class _Units:
    """Display conversions of one unit system."""

    def __init__(self, system):
        self.system = UnitSystem.parse(system).value

    def __call__(self, quantity: str, value) -> float:
        return float(to_display(quantity, value, self.system)[0])

    def label(self, quantity: str) -> str:
        return unit_label(quantity, self.system)

    @property
    def ip(self) -> bool:
        return self.system == UnitSystem.IP.value

    def figure(self, quantity: str, value_si: float) -> tuple[float, str]:
        """A headline figure: its display value and its text with the unit."""
        shown = self(quantity, value_si)
        return shown, f"{number_text(shown, _figure_digits(shown))} {self.label(quantity)}"


def _states(states, names: Sequence[str], units: _Units) -> tuple[StatePoint, ...]:
    """Rows ``names`` of a design point's state table, in display units."""
    points = []
    for name in names:
        if name not in states.index:
            continue
        row = states.loc[name]
        points.append(
            StatePoint(
                name.replace("_", " "),
                units("temperature", row["drybulb_C"]),
                units("humidity_ratio", row["humidity_ratio_kgkg"]),
                units("enthalpy", row["enthalpy_kJkg"]),
                100.0 * float(row["relative_humidity"]),
            )
        )
    return tuple(points)


def _state_units(units: _Units) -> tuple[str, str, str, str]:
    return (
        units.label("temperature"),
        units.label("humidity_ratio"),
        units.label("enthalpy"),
        "%",
    )


def _sum_step(
    lhs: str,
    terms: Sequence[tuple[str, float]],
    total: float,
    unit: str,
    total_text: str,
    digits: int | None = None,
):
    """``lhs = a + b − c = total`` with its check (terms signed, display units)."""
    names = [f"x{i}" for i in range(len(terms))]
    words = " + ".join(label for label, _ in terms)
    numbers = ""
    for i, (_, value) in enumerate(terms):
        if i == 0:
            numbers += number_text(value, digits)
        else:
            numbers += f" {'−' if value < 0 else '+'} {number_text(abs(value), digits)}"
    text = f"{lhs} = {words} = {numbers} {unit} = {total_text}"
    check = Check(
        " + ".join(names) or "0", dict(zip(names, (v for _, v in terms), strict=True)), total
    )
    return text, check


# --------------------------------------------------------------------------- headline
def _governing_points(units, kind: str, air_handler: int | None):
    chosen = units if air_handler is None else [units[air_handler]]
    return [(unit.name, unit.cooling_design.points[kind]) for unit in chosen]


def _coil_steps(
    name: str, point, u: _Units, power_unit: str, total_text: str | None = None
) -> list[tuple[str, Check]]:
    """An air handler's coil load at a design point from its air states; the last step
    ends on ``total_text`` (default: the total as the steps print numbers)."""
    row = point.row
    m_si = float(row["supply_mass_flow_kgs"])
    h1_si = float(row["coil_entering_enthalpy_kJkg"])
    h2_si = float(row["coil_leaving_enthalpy_kJkg"])
    qw_si = float(row["condensate_heat_kW"])
    total_si = float(point.loads["coil_total_kW"])
    m, h1, h2 = u("mass_flow", m_si), u("enthalpy", h1_si), u("enthalpy", h2_si)
    qw, total = u("power", qw_si), u("power", total_si)
    per = " / 12,000 Btu/h per ton" if u.ip else ""
    formula = "m * (h1 - h2) / 12000 - qw" if u.ip else "m * (h1 - h2) - qw"
    text = (
        f"{name}: Q_coil = ṁ·(h_entering − h_leaving){per} − Q_condensate = "
        f"{number_text(m)} {u.label('mass_flow')} × ({number_text(h1)} − {number_text(h2)}) "
        f"{u.label('enthalpy')}{per} − {number_text(qw)} {power_unit} = "
        f"{number_text(total)} {power_unit}"
    )
    sensible = u("power", point.loads["coil_sensible_kW"])
    latent = u("power", point.loads["coil_latent_kW"])
    split = (
        f"{name}: Q_coil = Q_sensible + Q_latent = {number_text(sensible)} + "
        f"{number_text(latent)} {power_unit} = "
        f"{total_text or number_text(total) + ' ' + power_unit}"
    )
    return [
        (text, Check(formula, {"m": m, "h1": h1, "h2": h2, "qw": qw}, total)),
        (split, Check("s + l", {"s": sensible, "l": latent}, total)),
    ]


def headline_derivations(
    scenario,
    units: Sequence,
    figures: HeadlineFigures,
    system,
    air_handler: int | None = None,
    loads: ViewLoads | None = None,
) -> dict[str, Derivation]:
    """How each headline figure of the plant or of one air handler is worked out.

    Parameters
    ----------
    scenario : Scenario
        The study as run (distribution gain, pick-up allowance, cooling margin).
    units : sequence of AirHandlerResult
        Every air handler, in scenario order (as ``figures`` was computed from).
    figures : HeadlineFigures
        :func:`plantside.study.figures.headline_figures` of the view.
    system : {"IP", "SI"}
        Display units.
    air_handler : int, optional
        The air handler of the view; None for the plant.
    loads : ViewLoads, optional
        :func:`plantside.study.figures.view_loads` of the view (computed when not given).

    Returns
    -------
    dict of str to Derivation
        Keyed by :data:`HEADLINE_KEYS`, in that order.
    """
    u = _Units(system)
    pu = u.label("power")
    gain = float(scenario.distribution_gain_percent)
    loads = view_loads(units, gain, air_handler) if loads is None else loads
    plant = air_handler is None
    kind = figures.governing_kind
    points = _governing_points(units, kind, air_handler)
    condition = design_condition_text(figures.governing, u.system)
    out: dict[str, Derivation] = {}
    table = None
    if plant:
        table = coincident_cooling_design(
            units, gain, scenario.cooling_pickup_allowance_percent
        ).table

    # design zone load
    zone, zone_text = u.figure("power", figures.design_zone_load)
    if plant:
        terms = [(name, u("power", table.loc[kind, f"{name}_zone_kW"])) for name, _ in points]
        steps = []
        for name, point in points:
            s, lat = (u("power", point.loads[k]) for k in ("zone_sensible_kW", "zone_latent_kW"))
            steps.append(
                (
                    f"{name}: Q_zone = Q_sensible + Q_latent = {number_text(s)} + "
                    f"{number_text(lat)} {pu} = {number_text(s + lat)} {pu}",
                    Check(
                        "s + l", {"s": s, "l": lat}, u("power", table.loc[kind, f"{name}_zone_kW"])
                    ),
                )
            )
        steps.append(_sum_step("Q_zone", terms, zone, pu, zone_text))
    else:
        name, point = points[0]
        s, lat = (u("power", point.loads[k]) for k in ("zone_sensible_kW", "zone_latent_kW"))
        steps = [
            (
                f"Q_zone = Q_sensible + Q_latent = {number_text(s)} + {number_text(lat)} {pu} "
                f"= {zone_text}",
                Check("s + l", {"s": s, "l": lat}, zone),
            )
        ]
    names = ("supply", "zone") if not plant else ()
    out["design_zone_load"] = _derivation(
        "design_zone_load",
        f"Design zone load at the governing condition ({condition})",
        zone_text,
        steps,
        _states(points[0][1].states, names, u),
        "The scenario's zone loads at the design hour; latent load met ṁ (W_zone − W_supply) "
        f"h_g and sensible from the supply and zone states: {_PSYCHROMETRICS}, Eq. 30",
        zone,
        u,
    )

    # design coil (plant) load
    coil, coil_text = u.figure("power", figures.design_coil_load)
    steps = []
    for name, point in points:
        steps += _coil_steps(name, point, u, pu, None if plant else coil_text)
    source = _COIL_SOURCE
    if plant:
        terms = [(name, u("power", table.loc[kind, f"{name}_coil_total_kW"])) for name, _ in points]
        coil_sum = u("power", table.loc[kind, "coil_total_kW"])
        steps.append(_sum_step("Q_coils", terms, coil_sum, pu, f"{number_text(coil_sum)} {pu}"))
        pickup = float(table.loc[kind, "pickup_percent"])
        pickup_load = u("power", table.loc[kind, "pickup_kW"])
        steps.append(
            (
                f"Q_pickup = Q_coils × (1 + g/100) × p/100 = {number_text(coil_sum)} {pu} × "
                f"(1 + {gain:g}/100) × {pickup:g}/100 = {number_text(pickup_load)} {pu}",
                Check(
                    "q * (1 + g / 100) * p / 100",
                    {"q": coil_sum, "g": gain, "p": pickup},
                    pickup_load,
                ),
            )
        )
        steps.append(
            (
                f"Q_plant = Q_coils × (1 + g/100) + Q_pickup = {number_text(coil_sum)} {pu} × "
                f"(1 + {gain:g}/100) + {number_text(pickup_load)} {pu} = {coil_text}",
                Check("q * (1 + g / 100) + k", {"q": coil_sum, "g": gain, "k": pickup_load}, coil),
            )
        )
        source += (
            "; the distribution gain g (pump heat and pipe gains) and the morning pick-up "
            "allowance p are the scenario's (common practice, no source)"
        )
        title = "Design plant load: the air handlers' coils at one outdoor state, plus gains"
    else:
        title = f"Design coil load at the governing condition ({condition})"
    names = ("outdoor", "return", "mixed", "coil_entering", "coil_leaving") if not plant else ()
    out["design_coil_load"] = _derivation(
        "design_coil_load",
        title,
        coil_text,
        steps,
        _states(points[0][1].states, names, u),
        source,
        coil,
        u,
    )

    # ratio
    ratio = float(figures.coil_to_zone_ratio)
    ratio_text = f"{ratio:.2f}" if np.isfinite(ratio) else "no zone load"
    out["coil_to_zone_ratio"] = _derivation(
        "coil_to_zone_ratio",
        "Design coil load over design zone load (what the air handler adds: outdoor air, "
        "fan heat, reheat)"
        if not plant
        else "Design plant load over design zone load",
        ratio_text,
        [
            (
                f"ratio = Q_{'plant' if plant else 'coil'} / Q_zone = {number_text(coil)} / "
                f"{number_text(zone)} = {ratio_text}",
                Check("c / z", {"c": coil, "z": zone}, ratio),
            )
        ],
        (),
        "Definition (a figure to judge the ventilation and fan share by; common practice)",
        ratio,
        u,
    )

    # governing condition
    steps = []
    kinds = list(units[0].cooling_design.points)
    values = {}
    for k in kinds:
        if plant:
            value = u("power", table.loc[k, "plant_kW"])
        else:
            value = u("power", units[air_handler].cooling_design.points[k].loads["coil_total_kW"])
        values[k] = value
        steps.append(
            (f"{_KIND_WORDS.get(k, k)}: Q = {number_text(value)} {pu}", Check("", {}, value))
        )
    names = [f"q{i}" for i in range(len(kinds))]
    steps.append(
        (
            f"governs: the largest, max({', '.join(number_text(values[k]) for k in kinds)}) = "
            f"{number_text(values[kind])} {pu} ({kind})",
            Check(
                f"max({', '.join(names)})",
                dict(zip(names, values.values(), strict=True)),
                values[kind],
            ),
        )
    )
    out["governing_condition"] = _derivation(
        "governing_condition",
        "Governing design condition: the one with the largest "
        + ("coincident plant load" if plant else "coil load"),
        condition,
        steps,
        (),
        _CONDITIONS_SOURCE,
        values[kind],
        u,
    )

    # recommended capacity
    margin = float(scenario.cooling_margin_percent)
    capacity, capacity_text = u.figure("power", figures.recommended_capacity)
    out["recommended_capacity"] = _derivation(
        "recommended_capacity",
        "Recommended capacity: design load plus the sizing margin",
        capacity_text,
        [
            (
                f"Q_capacity = Q_design × (1 + margin/100) = {number_text(coil)} {pu} × "
                f"(1 + {margin:g}/100) = {capacity_text}",
                Check("q * (1 + m / 100)", {"q": coil, "m": margin}, capacity),
            )
        ],
        (),
        "The scenario's cooling margin (the engineer's choice; common practice). Final "
        "selection belongs to a licensed engineer under the local codes",
        capacity,
        u,
    )

    # peak of the year
    hourly = np.asarray(loads.coil, dtype=float)
    peak, peak_text = u.figure("power", figures.peak_coil_load)
    hour = int(np.argmax(hourly)) if hourly.size else 0
    steps = [
        (
            f"Q_peak = max over the {hourly.size:,} hours of Q(h) = Q at hour {hour + 1:,} "
            f"= {peak_text}",
            Check("q", {"q": u("power", hourly[hour]) if hourly.size else 0.0}, peak),
        )
    ]
    if plant:
        parts = [(unit.name, u("power", unit.hourly["coil_total_kW"].iloc[hour])) for unit in units]
        total = sum(v for _, v in parts)
        steps.append(
            _sum_step(f"Q_coils(hour {hour + 1:,})", parts, total, pu, f"{number_text(total)} {pu}")
        )
        steps.append(
            (
                f"Q_plant(hour {hour + 1:,}) = Q_coils × (1 + g/100) = {number_text(total)} "
                f"{pu} × (1 + {gain:g}/100) = {peak_text}",
                Check("q * (1 + g / 100)", {"q": total, "g": gain}, peak),
            )
        )
    out["peak_coil_load"] = _derivation(
        "peak_coil_load",
        "Peak " + ("plant" if plant else "coil") + " load of the year (highest hour)",
        peak_text,
        steps,
        (),
        f"The hourly year of the model: each hour's coil load by {_COIL_SOURCE}"
        + ("; hours summed over the air handlers (coincident)" if plant else ""),
        peak,
        u,
    )

    # cooling energy
    energy, energy_text = u.figure("energy", figures.cooling_energy)
    eu = u.label("energy")
    bins = part_load_bins(np.maximum(hourly, 0.0), figures.recommended_capacity)
    terms = [
        (str(band), u("energy", value))
        for band, value in zip(bins["band"], bins["energy_kWh"], strict=True)
        if value > 0
    ]
    text, check = _sum_step("E", terms, energy, eu, energy_text)
    out["cooling_energy"] = _derivation(
        "cooling_energy",
        "Cooling energy of the year: the sum of the hours' loads × 1 h (hours below zero "
        "count 0), here by bands of the recommended capacity",
        energy_text,
        [
            (
                f"E = Σ_h max(Q(h), 0) × 1 h over {hourly.size:,} h = {energy_text}",
                Check("", {}, energy),
            ),
            (text, check),
        ],
        (),
        "Sum of hourly steps (rectangle rule over the hourly year); bands from "
        "plantside.plant.part_load.part_load_bins",
        energy,
        u,
    )

    # hours above the threshold
    threshold = u("power", PART_LOAD_THRESHOLD * figures.recommended_capacity)
    hours = int(figures.hours_above_threshold)
    out["hours_above_threshold"] = _derivation(
        "hours_above_threshold",
        f"Hours above {100 * PART_LOAD_THRESHOLD:.0f} % of the recommended capacity",
        f"{hours:,} h",
        [
            (
                f"Q_threshold = {PART_LOAD_THRESHOLD:g} × Q_capacity = {PART_LOAD_THRESHOLD:g} × "
                f"{number_text(capacity)} {pu} = {number_text(threshold)} {pu}",
                Check("f * c", {"f": PART_LOAD_THRESHOLD, "c": capacity}, threshold),
            ),
            (
                f"of the {hourly.size:,} h, those with Q(h) > {number_text(threshold)} {pu}: "
                f"{hours:,} h",
                Check("", {}, float(hours)),
            ),
        ],
        (),
        f"Threshold {100 * PART_LOAD_THRESHOLD:.0f} % of capacity: common practice (no "
        "source), the hours near full load are those that test a plant",
        float(hours),
        u,
    )
    return out


def _derivation(key, title, value_text, steps, state_points, source, value, u) -> Derivation:
    return Derivation(
        key=key,
        title=title,
        value_text=value_text,
        steps=tuple(text for text, _ in steps),
        state_points=tuple(state_points),
        source=source,
        checks=tuple(check for _, check in steps),
        value=float(value),
        units=_state_units(u),
    )


#: How the design points take their airflow (``design_airflow``), in words.
_AIRFLOW_BASIS = {
    "scheduled": "at the scheduled supply airflow with terminal reheat",
    "load": "at the airflow the zone load asks for",
}


# --------------------------------------------------------------------------- charts
def chart_derivations(
    scenario,
    units: Sequence,
    figures: HeadlineFigures,
    system,
    air_handler: int | None = None,
    loads: ViewLoads | None = None,
    *,
    shown: int | None = None,
    sweep: Mapping[str, np.ndarray] | None = None,
    outdoor_air_fraction: float | None = None,
    breakdown: Sequence[tuple[str, tuple[str, ...], float]] = (),
    breakdown_optional: Sequence[tuple[str, tuple[str, ...], float]] = (),
    water_side=None,
) -> dict[str, Derivation]:
    """How each chart of the plant or of one air handler is worked out.

    Parameters
    ----------
    scenario, units, figures, system, air_handler, loads
        As :func:`headline_derivations`.
    shown : int, optional
        The air handler the psychrometric and outdoor-air charts draw (default: the
        view's, or for the plant the first with return air, as the plant page shows).
    sweep : dict of str to numpy.ndarray, optional
        Its design coil load [kW] against outdoor-air fraction
        (:func:`plantside.study.design_sweep.design_outdoor_air_sweep`, as the chart
        draws it); no ``"sweep"`` derivation without it.
    outdoor_air_fraction : float, optional
        Its minimum outdoor-air fraction as set [-] (the sweep's marker).
    breakdown, breakdown_optional : sequence of (label, keys, sign)
        The design chart's steps (the charts layer's ``BREAKDOWN_COMPONENTS``, always
        drawn, and ``BREAKDOWN_OPTIONAL``, drawn where not zero): each the sum of
        ``keys`` of ``figures.design_loads`` times ``sign``; no ``"design"``
        derivation without them.
    water_side : WaterSideResult, optional
        :func:`plantside.study.water_side_run.run_water_side` of the study; no
        ``"water"`` derivation without it.

    Returns
    -------
    dict of str to Derivation
        Keyed by the chart names of :data:`CHART_KEYS` (those with their inputs).
    """
    u = _Units(system)
    pu = u.label("power")
    gain = float(scenario.distribution_gain_percent)
    loads = view_loads(units, gain, air_handler) if loads is None else loads
    plant = air_handler is None
    if shown is None:  # the plant page's unit charts show the first unit with return air
        shown = air_handler if not plant else first_recirculating_unit(scenario)
    shown = int(shown)
    unit = units[shown]
    out: dict[str, Derivation] = {}
    word = "plant" if plant else "coil"

    # design breakdown
    coil, coil_text = u.figure("power", figures.design_coil_load)
    terms = []
    tiny = 1e-6 * max(1.0, abs(figures.design_coil_load))
    for optional, steps_of in ((False, breakdown), (True, breakdown_optional)):
        for label, keys, sign in steps_of:
            value = sign * sum(float(figures.design_loads.get(k, 0.0)) for k in keys)
            if not optional or abs(value) > tiny:  # as the chart draws its bars
                terms.append((label, u("power", value)))
    if breakdown:
        other = coil - sum(v for _, v in terms)
        if abs(other) > 1e-6 * max(1.0, abs(coil)):
            terms.append(("Other", other))
        text, check = _sum_step(f"Q_{word}", terms, coil, pu, coil_text)
        out["design"] = _derivation(
            "design",
            f"Design {word} load, step by step from the zone loads (the bars of the chart)",
            coil_text,
            [(text, check)],
            (),
            "Energy balance of the air handler at the design hour: coil = zone + ventilation "
            "+ fan heat − economizer − recovery + reheats − condensate heat; terms by "
            f"{_PSYCHROMETRICS}, Eq. 30 (see plantside.air_handler.results)",
            coil,
            u,
        )

    # year scatter
    hourly = np.asarray(loads.coil, dtype=float)
    zone_hourly = np.asarray(loads.zone, dtype=float)
    e_coil = u("energy", float(np.sum(np.maximum(hourly, 0.0))))
    e_zone = u("energy", float(np.sum(np.maximum(zone_hourly, 0.0))))
    eu = u.label("energy")
    ratio = e_coil / e_zone if e_zone > 0 else float("nan")
    running = int(np.count_nonzero(hourly > 0))
    out["year"] = _derivation(
        "year",
        f"The year hour by hour: each point one hour, x the zone load met, y the {word} load",
        f"{running:,} h with {word} load",
        [
            (
                f"hours with {word} load > 0: {running:,} of {hourly.size:,}",
                Check("", {}, float(running)),
            ),
            (
                f"E_{word} / E_zone = {number_text(e_coil)} / {number_text(e_zone)} {eu} = "
                f"{number_text(ratio)}",
                Check("a / b", {"a": e_coil, "b": e_zone}, ratio),
            ),
        ],
        (),
        f"Each hour's coil load by {_COIL_SOURCE}; zone load met = sensible + latent",
        float(running),
        u,
    )

    # load duration and IPLV weights
    capacity = u("power", figures.recommended_capacity)
    capacities = np.asarray(figures.machine_capacities, dtype=float)
    bins = part_load_bins(np.maximum(hourly, 0.0), figures.recommended_capacity)
    staged = stage_machines(np.maximum(hourly, 0.0), capacities, figures.minimum_turndown)
    weights = iplv_band_weights(staged.machine_load, capacities)
    hour_terms = [(str(b), float(h)) for b, h in zip(bins["band"], bins["hours"], strict=True)]
    text, check = _sum_step("hours", hour_terms, float(hourly.size), "h", f"{hourly.size:,} h", 0)
    building = np.nan_to_num(weights["building_energy_weight"].to_numpy(dtype=float)) * 100.0
    standard = weights["standard_weight"].to_numpy(dtype=float) * 100.0
    points = weights["rating_point_percent"].to_numpy(dtype=float)
    names = [f"w{i}" for i in range(len(points))]
    machines = " + ".join(number_text(u("power", c)) for c in capacities)
    steps = [
        (
            f"curve: the {hourly.size:,} hourly loads sorted from the highest; capacity = "
            f"{number_text(capacity)} {pu} (recommended), machines of {figures.option_name}: "
            f"{machines} {pu}",
            Check("", {}, capacity),
        ),
        (text, check),
        (
            "weights at "
            + ", ".join(f"{p:g} %" for p in points)
            + ": AHRI 550/590 "
            + ", ".join(f"{w:.0f} %" for w in standard)
            + "; this building (share of cooling energy) "
            + " + ".join(f"{w:.1f}" for w in building)
            + f" = {np.sum(building):.1f} %",
            Check(
                " + ".join(names), dict(zip(names, building, strict=True)), float(np.sum(building))
            ),
        ),
    ]
    out["distribution"] = _derivation(
        "distribution",
        "How the year's load spreads over the capacity: load-duration curve, part-load bands "
        "and the IPLV weights",
        f"{number_text(capacity, _figure_digits(capacity))} {pu}",
        steps,
        (),
        f"{_AHRI}; the building's weights are its cooling energy in each band of the "
        "machines' load (plantside.plant.efficiency.iplv_band_weights)",
        capacity,
        u,
    )

    # psychrometric process of the shown unit at its governing condition
    point = unit.cooling_design.points[unit.cooling_design.governing]
    row = point.row
    x = float(row["outdoor_air_fraction"])
    h_o2 = u("enthalpy", row["recovered_enthalpy_kJkg"])
    h_r = u("enthalpy", row["return_enthalpy_kJkg"])
    h_m = u("enthalpy", row["mixed_enthalpy_kJkg"])
    hu = u.label("enthalpy")
    steps = [
        (
            f"h_mixed = x·h_outdoor (after any recovery) + (1 − x)·h_return = {number_text(x)} × "
            f"{number_text(h_o2)} + {number_text(1.0 - x)} × {number_text(h_r)} {hu} = "
            f"{number_text(h_m)} {hu}",
            Check("x * a + (1 - x) * b", {"x": x, "a": h_o2, "b": h_r}, h_m),
        ),
        *_coil_steps(unit.name, point, u, pu),
    ]
    out["psychrometric"] = _derivation(
        "psychrometric",
        f"Design process of {unit.name} at its governing condition "
        f"({_KIND_WORDS.get(unit.cooling_design.governing, unit.cooling_design.governing)})",
        f"{number_text(u('power', point.loads['coil_total_kW']))} {pu}",
        steps,
        _states(
            point.states,
            (
                "outdoor",
                "recovered",
                "return",
                "mixed",
                "coil_entering",
                "coil_leaving",
                "supply",
                "zone",
            ),
            u,
        ),
        f"{_MIXING_SOURCE}; coil: {_COIL_SOURCE}",
        u("power", point.loads["coil_total_kW"]),
        u,
    )

    # outdoor-air sweep
    if sweep:
        first = np.asarray(next(iter(sweep.values())), dtype=float)
        fractions = np.linspace(0.0, 1.0, first.size) if first.size > 1 else None
        steps = []
        for label, values in sweep.items():
            values = np.asarray(values, dtype=float)
            if fractions is not None:
                low, high = u("power", values[0]), u("power", values[-1])
                slope = high - low
                steps.append(
                    (
                        f"{label}: Q(0 %) = {number_text(low)} {pu}, Q(100 %) = "
                        f"{number_text(high)} {pu}; change over the sweep "
                        f"{number_text(high)} − {number_text(low)} = {number_text(slope)} {pu}",
                        Check("b - a", {"a": low, "b": high}, slope),
                    )
                )
                if outdoor_air_fraction is not None:  # the marker: along the curve
                    x = 100.0 * float(outdoor_air_fraction)
                    percents = 100.0 * fractions
                    i = int(
                        np.clip(
                            np.searchsorted(percents, x, side="right") - 1, 0, len(percents) - 2
                        )
                    )
                    xa, xb = float(percents[i]), float(percents[i + 1])
                    qa, qb = u("power", values[i]), u("power", values[i + 1])
                    q = qa + (x - xa) / (xb - xa) * (qb - qa)
                    steps.append(
                        (
                            f"{label} at the set {number_text(x)} % (the marker, linear between "
                            f"{xa:g} and {xb:g} %): Q = {number_text(qa)} + ({number_text(x)} − "
                            f"{xa:g}) / ({xb:g} − {xa:g}) × ({number_text(qb)} − "
                            f"{number_text(qa)}) = {number_text(q)} {pu}",
                            Check(
                                "qa + (x - xa) / (xb - xa) * (qb - qa)",
                                {"qa": qa, "qb": qb, "x": x, "xa": xa, "xb": xb},
                                q,
                            ),
                        )
                    )
            else:
                only = u("power", values[0])
                steps.append((f"{label}: Q = {number_text(only)} {pu}", Check("", {}, only)))
        fraction = float(outdoor_air_fraction) if outdoor_air_fraction is not None else float("nan")
        out["sweep"] = _derivation(
            "sweep",
            f"Design coil load of {unit.name} against outdoor-air fraction ({first.size} "
            f"fraction{'s' if first.size > 1 else ''}, each a full design run at every design "
            f"condition, {_AIRFLOW_BASIS[unit.settings.design_airflow]} as the design coil load)",
            f"set: {100 * fraction:.0f} % outdoor air",
            steps,
            (),
            f"The same air-handler model at each fraction: mixing by {_MIXING_SOURCE}; coil "
            f"by {_COIL_SOURCE}",
            100 * fraction,
            u,
        )

    if water_side is not None and water_side.chiller_options and scenario.water_side is not None:
        out["water"] = _water_derivation(water_side, scenario.water_side.chilled_water, u)
    return out


def _water_derivation(water_side, chilled_water, u: _Units) -> Derivation:
    """The first cooling option's design chilled-water flow from its design load."""
    name, year = water_side.chiller_options[0]
    load = float(year.design["design_load_kW"])
    flow = float(year.design["chilled_water_flow_m3s"])
    supply = float(chilled_water.supply_temperature)
    delta = float(chilled_water.design_delta_t)
    mean = supply + delta / 2.0
    rho = float(water_density(mean))
    shown, flow_unit = u("water_flow", flow), u.label("water_flow")
    steps = [
        (
            f"mean water temperature t = t_supply + ΔT/2 = {number_text(supply)} + "
            f"{number_text(delta)}/2 °C = {number_text(mean)} °C; ρ(t) = {number_text(rho)} kg/m³",
            Check("a + b / 2", {"a": supply, "b": delta}, mean),
        ),
        (
            f"V = Q / (ρ·c_p·ΔT) = {number_text(load)} kW / ({number_text(rho)} kg/m³ × "
            f"{CP_LIQUID_WATER:g} kJ/(kg·K) × {number_text(delta)} K) = {flow:.5f} m³/s",
            Check("q / (r * c * d)", {"q": load, "r": rho, "c": CP_LIQUID_WATER, "d": delta}, flow),
        ),
        (
            f"V = {flow:.5f} m³/s = {number_text(shown)} {flow_unit}",
            Check("", {}, shown),
        ),
    ]
    return _derivation(
        "water",
        f"Design chilled-water flow of {name} (its design load at the design temperature "
        "difference)",
        f"{number_text(shown)} {flow_unit}",
        steps,
        (),
        "Heat balance of the water Q = ρ c_p V ΔT; c_p of liquid water from ASHRAE Handbook "
        "Fundamentals 2017 Ch. 1 (Eq. 33), ρ(t) from plantside.plant.water.water_density; "
        "the temperatures are the scenario's [plant.chilled_water]",
        shown,
        u,
    )
