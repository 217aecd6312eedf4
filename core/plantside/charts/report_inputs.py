"""The inputs of a study as tables for the design report, in the scenario's own units.

What the report lists is what the scenario file holds (or would hold, saved): the site
and plant settings and the plant options as :func:`plantside.study.scenario_write.
scenario_to_dict` writes them (the one writer of scenario files, so the numbers read
as the file gives them, six significant digits), and every setting of every air
handler and its zone-load model, each number in the scenario's unit system with its
unit (:func:`plantside.study.scenario_fields.field_unit`). Nothing is computed here.
"""

from __future__ import annotations

import html
from dataclasses import fields

from plantside.study.scenario_fields import FIELD_QUANTITIES, field_unit
from plantside.study.scenario_write import scenario_to_dict
from plantside.study.toml_input import saved_number
from plantside.study.water_side import WATER_SIDE_FIELDS
from plantside.units import to_display, unit_label

__all__ = ["inputs_html", "setting_text"]


def setting_text(key: str, value, system) -> str:
    """One setting as the report prints it: numbers in ``system`` (six significant
    digits, as a saved scenario), ``None`` as "none", flags as "yes"/"no"."""
    if value is None:
        return "none"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, str):
        return value
    if isinstance(value, tuple | list):
        return ", ".join(setting_text(key, v, system) for v in value)
    if key in FIELD_QUANTITIES:
        value = float(to_display(FIELD_QUANTITIES[key], value, system)[0])
    return f"{saved_number(float(value)):g}"


def _pairs_table(rows, caption: str) -> str:
    """Rows of (setting, value, unit) as a two-column table."""
    body = "".join(
        f"<tr><th scope='row'>{html.escape(key)}</th><td>{html.escape(value)}</td>"
        f"<td>{html.escape(unit)}</td></tr>"
        for key, value, unit in rows
    )
    return (
        f"<table class='ps-table ps-inputs'><caption>{html.escape(caption)}</caption>"
        "<thead><tr><th>setting</th><th>value</th><th>unit</th></tr></thead>"
        f"<tbody>{body}</tbody></table>"
    )


def _file_value(value) -> str:
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, list):
        return ", ".join(_file_value(v) for v in value)
    if isinstance(value, float):
        return f"{value:g}"
    return str(value)


def _water_unit(table: str, key: str, system) -> str:
    quantity = WATER_SIDE_FIELDS.get(table, {}).get(key, ("",))[0]
    if quantity in ("", "bool", "list", "text"):
        return ""
    return unit_label(quantity, system)


#: Units of the [site] fields that are not quantities of :mod:`plantside.units`.
_SITE_UNITS = {
    "cooling_design_percent": "%",
    "heating_design_percent": "%",
    "latitude": "°",
    "longitude": "°",
}


def _site_unit(key: str, system) -> str:
    return unit_label("length", system) if key == "altitude" else _SITE_UNITS.get(key, "")


def _matrix(names, rows, caption: str, pinned=None) -> str:
    """Settings (rows) by air handler (columns); ``pinned`` the A values where they differ."""
    head = "".join(f"<th scope='col'>{html.escape(n)}</th>" for n in names)
    body = []
    for key, unit, values in rows:
        cells = []
        for i, value in enumerate(values):
            before = pinned[key][i] if pinned is not None and key in pinned else None
            text = html.escape(value)
            if before is not None and before != value:
                text += f" <span class='ps-a'>(A: {html.escape(before)})</span>"
            cells.append(f"<td>{text}</td>")
        body.append(
            f"<tr><th scope='row'>{html.escape(key)}</th><td>{html.escape(unit)}</td>"
            f"{''.join(cells)}</tr>"
        )
    return (
        f"<table class='ps-table ps-inputs'><caption>{html.escape(caption)}</caption>"
        f"<thead><tr><th>setting</th><th>unit</th>{head}</tr></thead>"
        f"<tbody>{''.join(body)}</tbody></table>"
    )


#: Air-handler settings in a unit of their own in both unit systems (README, "[[air_handler]]").
_FIXED_UNITS = {"supply_fan_power": "kW"}


def _unit_rows(scenario) -> list[tuple[str, str, list[str]]]:
    """Every air-handler setting and zone-load field, one row each, in the file's units."""
    system = scenario.unit_system
    specs = scenario.air_handlers
    rows = []
    for f in fields(specs[0].settings):
        if f.name == "name":
            continue
        rows.append(
            (
                f.name,
                _FIXED_UNITS.get(f.name) or field_unit(f.name, system),
                [setting_text(f.name, getattr(s.settings, f.name), system) for s in specs],
            )
        )
    zone_fields = []
    for spec in specs:
        if spec.zone is not None:
            zone_fields = [f.name for f in fields(spec.zone) if f.init]
            break
    for name in zone_fields:
        rows.append(
            (
                f"zone.{name}",
                field_unit(name, system),
                [
                    setting_text(name, getattr(s.zone, name), system) if s.zone is not None else ""
                    for s in specs
                ],
            )
        )
    if any(s.zone is None for s in specs):
        rows.append(
            (
                "zone_load_file",
                "",
                [str(s.zone_load_file) if s.zone is None else "" for s in specs],
            )
        )
    return rows


def inputs_html(scenario, pinned_scenario=None) -> str:
    """The study's inputs as HTML tables, in the scenario's own unit system.

    Parameters
    ----------
    scenario : Scenario
        The study as run (with any setting changed on the dashboard).
    pinned_scenario : Scenario, optional
        The pinned "A": its air-handler settings are shown beside those that differ.

    Returns
    -------
    str
        Site and plant settings, the plant options, the water-side settings and a table
        of every air handler's settings and zone loads (text escaped).
    """
    system = scenario.unit_system
    saved = scenario_to_dict(scenario)
    site = [(k, _file_value(v), _site_unit(k, system)) for k, v in saved["site"].items()]
    plant = saved["plant"]
    parts = [
        f"<p>Numbers in the scenario's own unit system ({html.escape(str(system))}), named as "
        "the scenario file names them (README, 'Scenario files').</p>",
        _pairs_table([("title", saved["title"], ""), *site], "Site and design conditions ([site])"),
        _pairs_table(
            [
                (k, _file_value(v), "%" if k.endswith("_percent") else "")
                for k, v in plant.items()
                if not isinstance(v, dict | list)
            ],
            "Plant ([plant])",
        ),
    ]
    for kind in ("cooling_option", "heating_option"):
        options = plant.get(kind, [])
        if options:
            keys = list(dict.fromkeys(k for option in options for k in option if k != "name"))
            parts.append(
                _matrix(
                    [o["name"] for o in options],
                    [(k, "", [_file_value(o.get(k, "")) for o in options]) for k in keys],
                    f"Plant options ([[plant.{kind}]]; capacity as fractions of the design "
                    "capacity, efficiencies at 100/75/50/25 % load)",
                )
            )
    for table in ("chilled_water", "condenser", "hot_water"):
        if table in plant:
            parts.append(
                _pairs_table(
                    [
                        (k, _file_value(v), _water_unit(table, k, system))
                        for k, v in plant[table].items()
                    ],
                    f"Water side ([plant.{table}])",
                )
            )
    pinned = None
    if pinned_scenario is not None and len(pinned_scenario.air_handlers) == len(
        scenario.air_handlers
    ):
        pinned = {key: values for key, _, values in _unit_rows(pinned_scenario)}
    parts.append(
        _matrix(
            [spec.settings.name for spec in scenario.air_handlers],
            _unit_rows(scenario),
            "Air handlers ([[air_handler]] and its [air_handler.zone]): every setting, "
            "defaults included" + ("; (A: ...) where the pinned study A differs" if pinned else ""),
            pinned,
        )
    )
    return "".join(parts)
