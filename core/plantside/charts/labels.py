"""Words shown with the charts: design conditions, control values and the export stamp.

Shared by the dashboard and ``plantside charts`` so a chart exported from either
carries the same stamp for the same inputs. Values come in SI and are shown in
the unit system asked for (:func:`plantside.units.to_display`).
"""

from __future__ import annotations

from plantside import __version__
from plantside.units import to_display

__all__ = [
    "ECONOMIZER_CHOICES",
    "FAN_CHOICES",
    "condition_text",
    "export_stamp",
    "inputs_stamp",
]

#: Economizer control types (model value -> label in the trade's words).
ECONOMIZER_CHOICES = {
    "none": "No economizer",
    "fixed_drybulb": "Fixed dry-bulb high limit",
    "differential_drybulb": "Differential dry bulb",
    "fixed_enthalpy": "Fixed enthalpy high limit",
    "differential_enthalpy": "Differential enthalpy",
}
#: Supply fan control (model value -> label).
FAN_CHOICES = {
    "constant_volume": "Constant volume (CV)",
    "variable_volume": "Variable air volume (VAV)",
}


def condition_text(condition, system: str) -> str:
    """A design condition in words and the units on show.

    ``"cooling 0.4 %: 95.1 °F DB / 77.0 °F MCWB"`` (IP) or ``"... 35.1 °C DB ..."``
    (SI): the design value first, then its mean coincident companion, as the
    ASHRAE Handbook Fundamentals climatic design tables (Ch. 14) list them.
    Enthalpy in IP is on the I-P scale (dry air at 0 °F), via
    :func:`plantside.units.to_display`.
    """

    def shown(quantity, value, digits=1):
        number, unit = to_display(quantity, value, system)
        return f"{float(number):.{digits}f} {unit}"

    pct = f"{condition.percent:g} %"
    drybulb = shown("temperature", condition.drybulb)
    if condition.kind == "cooling":
        return f"cooling {pct}: {drybulb} DB / {shown('temperature', condition.wet_bulb)} MCWB"
    if condition.kind == "dehumidification":
        return (
            f"dehumidification {pct}: {shown('temperature', condition.dew_point)} DP / "
            f"{shown('humidity_ratio', condition.humidity_ratio)} / {drybulb} MCDB"
        )
    if condition.kind == "enthalpy":
        return f"enthalpy {pct}: {shown('enthalpy', condition.enthalpy)} / {drybulb} MCDB"
    return f"{condition.kind} {pct}: {drybulb} DB"


def inputs_stamp(
    climate: str,
    design_percent: float,
    name: str,
    *,
    outdoor_air_fraction: float,
    supply_air_temperature: float,
    economizer: str,
    economizer_integrated: bool,
    fan_control: str,
    bypass_factor: float,
    system: str,
) -> str:
    """One line naming the inputs of an air handler, for chart and file stamps.

    ``outdoor_air_fraction`` [-], ``supply_air_temperature`` [°C] (shown in
    ``system``), ``bypass_factor`` [-]; the controls by their model values.
    """
    supply, supply_unit = to_display("temperature", supply_air_temperature, system)
    integrated = ", integrated" if economizer_integrated else ""
    return (
        f"{climate}; cooling design {design_percent:g} %; {name}: "
        f"outdoor air {100 * outdoor_air_fraction:.0f} %, "
        f"supply {float(supply):.1f} {supply_unit}, "
        f"{ECONOMIZER_CHOICES.get(economizer, economizer).lower()}{integrated}, "
        f"{FAN_CHOICES.get(fan_control, fan_control)}, "
        f"bypass factor {bypass_factor:.2f}"
    )


def export_stamp(
    title: str, plant_view: bool, inputs: str, governing, system: str, when: str
) -> str:
    """The text stamped on every exported chart and file: study, inputs, version, time.

    ``inputs`` is :func:`inputs_stamp` of the air handler shown, ``governing`` the
    governing design condition of the view, ``when`` the time as text.
    """
    view = "plant" if plant_view else "air handler"
    return (
        f"plantside {__version__} · {title} · {view} view · {inputs} · "
        f"governing {condition_text(governing, system)} · {when} · preliminary, "
        "for review by a licensed engineer"
    )
