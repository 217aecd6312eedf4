"""Frames of the design-load waterfall: the design hour's coil load, step by step.

:func:`design_breakdown_frame` turns an air handler's (or the plant's) design-hour loads
into the steps of its energy balance (:data:`BREAKDOWN_COMPONENTS`, and
:data:`BREAKDOWN_OPTIONAL` where not zero), in display units.
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np
import pandas as pd

from plantside.charts.frame_common import _display, _finish, _system
from plantside.errors import InputRangeError, check_range

__all__ = ["BREAKDOWN_COMPONENTS", "BREAKDOWN_OPTIONAL", "design_breakdown_frame"]


#: Steps of the design-load waterfall: label and how the step is read from the model's loads
#: (keys of ``DesignPoint.loads`` / the hourly columns, SI [kW]). The economizer and energy
#: recovery effects are positive when they reduce the coil load, so the step is their negative.
BREAKDOWN_COMPONENTS = (
    ("Zone sensible", ("zone_sensible_kW",), 1.0),
    ("Zone latent", ("zone_latent_kW",), 1.0),
    ("Ventilation sensible", ("ventilation_sensible_kW",), 1.0),
    ("Ventilation latent", ("ventilation_latent_kW",), 1.0),
    ("Fan heat", ("fan_heat_kW",), 1.0),
    ("Economizer / recovery", ("economizer_effect_kW", "recovery_effect_kW"), -1.0),
)

#: Further terms of the air handler's energy balance, drawn as steps only where they are not
#: zero at the design hour (coil = zone + ventilation + fan heat - economizer - recovery
#: + terminal reheat + dehumidification reheat - condensate heat + preheat + heating coil;
#: see :mod:`plantside.air_handler.results`). The reheats are grouped as the coil schedule
#: groups them (:mod:`plantside.air_handler.coil_schedule`). The passive run-around
#: exchanger around a dehumidifying coil (``coil_runaround_heat_kW``) moves heat from the
#: air entering the coil to the air leaving it: it is on neither side of the balance, so it
#: is no step (what it saves shows as less dehumidification reheat). The sun on glazing is
#: part of the zone sensible load.
BREAKDOWN_OPTIONAL = (
    # the terminals' reheat on the heating plant: at the scheduled airflow, the cooling the
    # supply air gives beyond the zone load; after a coil driven colder to hold the zone
    # humidity (zone_relative_humidity_max), the lift back to what the zone needs
    ("Terminal reheat", ("reheat_kW", "humidity_control_reheat_kW"), 1.0),
    # a leaving-dew-point coil's air reheated to the supply set point in the unit, from
    # hot water or from the refrigeration condenser (after any run-around exchanger)
    ("Dehumidification reheat", ("dehumidification_reheat_kW", "condenser_heat_recovered_kW"), 1.0),
    ("Preheat and heating coil", ("preheat_kW", "heating_coil_kW"), 1.0),
    ("Condensate heat", ("condensate_heat_kW",), -1.0),
    # plant view only: pump work and pipe heat gain between the coils and the plant
    ("Distribution gain", ("distribution_gain_kW",), 1.0),
    # plant view only: the morning pick-up allowance after the zones float up overnight
    # (plant.cooling_pickup_percent; common practice)
    ("Morning pick-up", ("pickup_kW",), 1.0),
)


def design_breakdown_frame(loads: Mapping[str, float], system="SI") -> pd.DataFrame:
    """Waterfall from zone load to coil load at the design hour.

    Parameters
    ----------
    loads : mapping
        The design point's loads, SI [kW], keyed as the air handler's hourly
        columns (``DesignPoint.loads``): ``zone_sensible_kW``,
        ``zone_latent_kW``, ``ventilation_sensible_kW``,
        ``ventilation_latent_kW``, ``fan_heat_kW``, ``economizer_effect_kW``
        and ``recovery_effect_kW`` (both positive when they reduce the coil
        load), and ``coil_total_kW``; where not zero, also the terms of
        :data:`BREAKDOWN_OPTIONAL` (terminal reheat: ``reheat_kW`` and
        ``humidity_control_reheat_kW``; dehumidification reheat:
        ``dehumidification_reheat_kW`` and ``condenser_heat_recovered_kW``; preheat
        and heating coil, condensate heat, and for a plant
        ``distribution_gain_kW``, the pump and pipe gain, and ``pickup_kW``, the
        morning pick-up allowance, both included in its coil load). A missing
        component counts as 0 kW. Whatever the steps do not explain is drawn
        as an "Other" step, so the waterfall always ends exactly on the
        model's coil load and never hides a discrepancy.
    system : {"SI", "IP"}
        Display unit system.

    Returns
    -------
    pandas.DataFrame
        One row per bar, in drawing order: ``component`` (str), ``kind``
        ("part" for a step, "total" for the zone-load subtotal and the
        coil-load total), ``start`` and ``end`` (the bar's span [display
        power]), ``load`` (signed size of the step, or the total [display
        power]), ``order`` (0..).
    """
    system = _system(system)
    if "coil_total_kW" not in loads:
        raise InputRangeError(
            "coil_total_kW", "the design loads have no coil_total_kW", "coil load [kW]"
        )

    def read(key):
        return float(check_range(key, loads.get(key, 0.0), None, None, "kW"))

    steps = [
        (label, sign * sum(read(key) for key in keys)) for label, keys, sign in BREAKDOWN_COMPONENTS
    ]
    coil = read("coil_total_kW")
    tiny = 1e-6 * max(1.0, abs(coil))
    for label, keys, sign in BREAKDOWN_OPTIONAL:
        value = sign * sum(read(key) for key in keys)
        if abs(value) > tiny:
            steps.append((label, value))
    other = coil - sum(value for _, value in steps)
    if abs(other) > tiny:
        steps.append(("Other", other))
    rows = []
    running = 0.0
    for label, value in steps:
        rows.append((label, "part", running, running + value, value))
        running += value
        if label == "Zone latent":
            rows.append(("Zone load", "total", 0.0, running, running))
    rows.append(("Coil load", "total", 0.0, coil, coil))
    frame = pd.DataFrame(rows, columns=["component", "kind", "start", "end", "load"])
    for column in ("start", "end", "load"):
        frame[column] = _display("power", frame[column].to_numpy(), system)
    frame["order"] = np.arange(len(frame))
    return _finish(frame, system, "design_breakdown")
