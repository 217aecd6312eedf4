"""Words shown with the charts: design conditions, control values and the export stamp.

Shared by the dashboard and ``plantside charts`` so a chart exported from either
carries the same stamp for the same inputs. Values come in SI and are shown in
the unit system asked for (:func:`plantside.units.to_display`).
"""

from __future__ import annotations

from plantside import __version__
from plantside.climate.design_conditions import design_condition_text
from plantside.study.figures import outdoor_air_fraction_of
from plantside.units import to_display

__all__ = [
    "ECONOMIZER_CHOICES",
    "FAN_CHOICES",
    "change_against_a_text",
    "changed_settings_text",
    "condition_text",
    "export_stamp",
    "inputs_stamp",
    "unit_settings_parts",
    "unit_settings_text",
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
    """A design condition in words and the units on show
    (:func:`plantside.climate.design_conditions.design_condition_text`)."""
    return design_condition_text(condition, system)


def unit_settings_parts(settings, system: str) -> dict[str, str]:
    """An air handler's settings that the views show, in words, only those that apply.

    ``settings`` is an :class:`~plantside.air_handler.settings.AirHandlerSettings`
    (SI); temperatures are shown in ``system``. A 100 % outdoor-air unit has no
    economizer; the coil is named by its model (bypass factor, apparatus dew
    point or leaving dew point with the bypass factor of its process line).
    """

    def temperature(value):
        number, unit = to_display("temperature", value, system)
        return f"{float(number):.1f} {unit}"

    parts = {}
    if settings.all_outdoor_air:
        parts["outdoor air"] = "100 % outdoor air"
    else:
        parts["outdoor air"] = f"outdoor air {100 * outdoor_air_fraction_of(settings):.0f} %"
    parts["supply"] = f"supply {temperature(settings.supply_drybulb)}"
    if not settings.all_outdoor_air:
        integrated = ", integrated" if settings.economizer_integrated else ""
        economizer = ECONOMIZER_CHOICES.get(settings.economizer, settings.economizer)
        parts["economizer"] = f"{economizer.lower()}{integrated}"
    parts["fan"] = FAN_CHOICES.get(settings.fan_control, settings.fan_control)
    if settings.coil_model == "apparatus_dew_point":
        parts["coil"] = f"apparatus dew point {temperature(settings.apparatus_dew_point)}"
    elif settings.coil_model == "leaving_dew_point":
        parts["coil"] = (
            f"leaving dew point {temperature(settings.leaving_dew_point)} "
            f"(bypass factor {settings.bypass_factor:.2f})"
        )
    else:
        parts["coil"] = f"bypass factor {settings.bypass_factor:.2f}"
    if settings.preheat_drybulb is not None:
        parts["preheat"] = f"preheat to {temperature(settings.preheat_drybulb)}"
    if settings.supply_reset_drybulb is not None:
        parts["reset"] = f"cold-weather supply reset {temperature(settings.supply_reset_drybulb)}"
    return parts


def unit_settings_text(settings, system: str) -> str:
    """``"<name>: <every setting the views show>"`` (:func:`unit_settings_parts`)."""
    return f"{settings.name}: " + ", ".join(unit_settings_parts(settings, system).values())


def changed_settings_text(file_settings, settings, system: str) -> str:
    """What differs between an air handler's settings in the scenario file and in use.

    ``"<name>: supply 53.0 °F (file: supply 55.0 °F)"``, or "" when nothing differs.
    """
    before = unit_settings_parts(file_settings, system)
    after = unit_settings_parts(settings, system)
    changed = [
        f"{text} (file: {before.get(key, 'none')})"
        for key, text in after.items()
        if before.get(key) != text
    ]
    return f"{settings.name}: " + ", ".join(changed) if changed else ""


def inputs_stamp(
    climate: str,
    design_percent: float,
    units,
    *,
    shown: int,
    plant_view: bool,
    system: str,
) -> str:
    """The inputs that made a chart, in one line, for chart and file stamps.

    Parameters
    ----------
    climate : str
        The climate as the views name it.
    design_percent : float
        Cooling design condition [annual % exceeded].
    units : sequence of (settings, settings)
        Per air handler, its settings in the scenario file and those in use (SI).
    shown : int
        Index of the air handler the unit charts show (all its settings are named).
    plant_view : bool
        For the plant, every air handler's settings that differ from the scenario
        file are named; for one air handler, those of that one.
    system : str
        Unit system of the text.
    """
    parts = [climate, f"cooling design {design_percent:g} %"]
    parts.append(
        ("air handler shown " if plant_view else "") + unit_settings_text(units[shown][1], system)
    )
    considered = units if plant_view else [units[shown]]
    changes = [changed_settings_text(before, after, system) for before, after in considered]
    changes = [text for text in changes if text]
    if changes:
        parts.append("changed from the scenario file: " + "; ".join(changes))
    else:
        parts.append(
            ("all air handlers" if plant_view else "settings") + " as in the scenario file"
        )
    return "; ".join(parts)


def export_stamp(
    title: str,
    plant_view: bool,
    inputs: str,
    governing,
    system: str,
    when: str,
    pinned_inputs: str | None = None,
) -> str:
    """The text stamped on every exported chart and file: study, inputs, version, time.

    ``inputs`` is :func:`inputs_stamp` of what is shown (B when a result is pinned),
    ``governing`` the governing design condition of the view, ``when`` the time as
    text, ``pinned_inputs`` the :func:`inputs_stamp` of the pinned result "A".
    """
    view = "plant" if plant_view else "air handler"
    shown = f"A: {pinned_inputs} · B: {inputs}" if pinned_inputs else inputs
    return (
        f"plantside {__version__} · {title} · {view} view · {shown} · "
        f"governing {condition_text(governing, system)} · {when} · preliminary, "
        "for review by a licensed engineer"
    )


def change_against_a_text(value: float, before: float) -> str:
    """B's change against the pinned A, in per cent to 0.1 (e.g. "+4.9 %"); a change that
    rounds to nothing reads "+0.0 %", never "-0.0 %"; "+0.0 %" when A is zero."""
    change = (value - before) / before * 100.0 if before else 0.0
    return f"{round(change, 1) + 0.0:+.1f} %"
