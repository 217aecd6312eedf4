"""Small tables in the user's units: the coil schedule and the water side's key figures.

Each table is first a frame (numbers in display units, headers carrying their unit,
from :mod:`plantside.units`), then plain HTML (:func:`html_table`: every text escaped,
no scripts, no styles beyond class names). The figures are those of the study's own
functions: :func:`plantside.air_handler.coil_schedule.coil_schedule` (the command
line's coil schedule) and :func:`plantside.study.water_side_run.run_water_side` (its
``water_side``).
"""

from __future__ import annotations

import html
import math

import numpy as np
import pandas as pd

from plantside.charts.water_side import efficiency_display
from plantside.units import to_display, unit_label

__all__ = [
    "coil_schedule_html",
    "coil_schedule_table",
    "html_table",
    "options_html_table",
    "water_side_html",
    "water_side_tables",
]


def _d(quantity, values, system) -> np.ndarray:
    return np.asarray(to_display(quantity, np.asarray(values, dtype=float), system)[0], float)


def _h(label, quantity, system) -> str:
    return f"{label} [{unit_label(quantity, system)}]"


def coil_schedule_table(schedule: pd.DataFrame, system) -> pd.DataFrame:
    """The coil schedule in display units, one row per air handler and condition.

    Parameters
    ----------
    schedule : pandas.DataFrame
        :func:`plantside.air_handler.coil_schedule.coil_schedule` (SI).
    system : {"SI", "IP"}

    Returns
    -------
    pandas.DataFrame
        Headers with their unit. Loads are cooling power (kW or tons) on cooling rows
        and heating power (kW or MBH) on heating rows, so the rows say their unit in
        ``Load unit``; reheat is heating power. ``attrs["digits"]`` gives the decimals
        each numeric column is shown with.
    """
    s = schedule
    cooling = (s["coil"] == "cooling").to_numpy()

    def load(column):
        return np.where(
            cooling, _d("power", s[column], system), _d("heating_power", s[column], system)
        )

    t = lambda label: _h(label, "temperature", system)  # noqa: E731
    flow = lambda label: _h(label, "airflow", system)  # noqa: E731
    table = pd.DataFrame(
        {
            "Air handler": s["air_handler"].to_numpy(),
            "Condition": [  # the kind, not the label (the label's figures are SI)
                f"{kind.replace('_', ' ')}{' (governing)' if gov and coil == 'cooling' else ''}"
                for kind, gov, coil in zip(s["condition"], s["governing"], s["coil"], strict=True)
            ],
            "Coil": s["coil"].to_numpy(),
            flow("Airflow"): _d("airflow", s["airflow_m3s"], system),
            "Airflow used": s["airflow_used"].to_numpy(),
            flow("Load airflow"): _d("airflow", s["load_airflow_m3s"], system),
            t("Entering DB"): _d("temperature", s["entering_drybulb_C"], system),
            t("Entering WB"): _d("temperature", s["entering_wet_bulb_C"], system),
            t("Leaving DB"): _d("temperature", s["leaving_drybulb_C"], system),
            t("Leaving WB"): _d("temperature", s["leaving_wet_bulb_C"], system),
            t("ADP"): _d("temperature", s["apparatus_dew_point_C"], system),
            "BF [-]": s["bypass_factor"].to_numpy(dtype=float),
            "Total": load("total_kW"),
            "Sensible": load("sensible_kW"),
            "Latent": load("latent_kW"),
            "Load unit": np.where(
                cooling, unit_label("power", system), unit_label("heating_power", system)
            ),
            "SHR [-]": s["sensible_heat_ratio"].to_numpy(dtype=float),
            _h("Condensate", "mass_flow", system): _d("mass_flow", s["condensate_kgs"], system),
            _h("Reheat", "heating_power", system): _d("heating_power", s["reheat_kW"], system),
            _h("Terminal reheat", "heating_power", system): _d(
                "heating_power", s["terminal_reheat_kW"], system
            ),
        }
    )
    digits = {column: 1 for column in table.columns}
    digits.update({flow("Airflow"): 0, flow("Load airflow"): 0, "BF [-]": 2, "SHR [-]": 2})
    digits[_h("Condensate", "mass_flow", system)] = 3 if str(system) == "SI" else 1
    table.attrs["digits"] = digits
    table.attrs["system"] = str(system)
    return table


def _loop(name, rows, delta_t, system) -> dict:
    """Design flow of each option's loop and the loop's design ΔT, in display units."""
    return {
        _h(name, "water_flow", system): _d("water_flow", rows["design_flow_m3s"], system),
        _h("ΔT", "temperature_difference", system): np.full(
            len(rows), _d("temperature_difference", delta_t, system)
        ),
    }


#: The option tables' row of machine starts in the year.
STARTS_ROW = "Starts a year"


def water_side_tables(water, spec, system) -> dict[str, pd.DataFrame]:
    """The water side's key figures per plant option, in display units.

    Parameters
    ----------
    water : plantside.study.water_side_run.WaterSideResult or None
    spec : plantside.study.water_side.WaterSideSpec or None
        The scenario's water-side inputs (the design temperature differences).
    system : {"SI", "IP"}

    Returns
    -------
    dict of str to pandas.DataFrame
        ``"cooling"`` (one row per cooling option: design chilled-water flow and ΔT,
        pump power, condenser heat, tower size, the year's chiller, pump and tower
        electricity, seasonal efficiency beside IPLV, free-cooling and extra-for-flow
        hours), ``"heating"`` (hot-water flow and ΔT, pump power, fuel, pump
        electricity, seasonal boiler efficiency) and ``"heat_recovery"`` (hours and
        heat of a heat-recovery chiller) where the study has them; empty when
        ``water`` is None. Pump power and electricity stay in kW and kWh in both unit
        systems (as the command line prints them).
    """
    if water is None:
        return {}
    tables = {}
    options = water.options
    cooling = options[options["plant"] == "cooling"]
    rejection = dict(water.heat_rejection)
    eff = efficiency_display(1.0, system)[1]
    if len(cooling):
        towers = [rejection[name] for name in cooling["option"]]
        table = pd.DataFrame(
            {
                "Option": cooling["option"].to_numpy(),
                **_loop("Chilled water", cooling, spec.chilled_water.design_delta_t, system),
                "Pump [kW]": cooling["design_pump_kW"].to_numpy(dtype=float),
                _h("Condenser heat", "power", system): _d(
                    "power", cooling["condenser_heat_kW"], system
                ),
                "Tower [nominal tons]": (
                    cooling["tower_tons"].to_numpy(dtype=float)
                    if water.condenser == "water"
                    else np.full(len(cooling), np.nan)
                ),
                _h("Condenser water", "water_flow", system): _d(
                    "water_flow", [t.flow for t in towers], system
                ),
                "Chillers [kWh]": cooling["chiller_kWh"].to_numpy(dtype=float),
                "Pumps [kWh]": cooling["pump_kWh"].to_numpy(dtype=float),
                "Tower fans [kWh]": cooling["tower_fan_kWh"].to_numpy(dtype=float),
                f"Seasonal [{eff}]": efficiency_display(cooling["seasonal_cop"], system)[0],
                f"Plant seasonal [{eff}]": efficiency_display(
                    cooling["seasonal_plant_cop"], system
                )[0],
                f"IPLV rated [{eff}]": efficiency_display(cooling["rated_iplv_cop"], system)[0],
                "Free-cooling hours [h]": cooling["free_cooling_hours"].to_numpy(dtype=float),
                "Hours a chiller more for flow [h]": cooling["hours_extra_for_flow"].to_numpy(
                    dtype=float
                ),
                STARTS_ROW: cooling["machine_starts"].to_numpy(dtype=float),
            }
        )
        digits = {column: 1 for column in table.columns}
        digits.update(
            {
                c: 0
                for c in table.columns
                if c.endswith("[kWh]") or c.endswith("[h]") or c.startswith("Tower [")
            }
        )
        digits.update({c: 3 if eff == "kW/ton" else 2 for c in table.columns if eff in c})
        table.attrs["digits"] = digits
        tables["cooling"] = table
    heating = options[options["plant"] == "heating"]
    if len(heating):
        table = pd.DataFrame(
            {
                "Option": heating["option"].to_numpy(),
                **_loop("Hot water", heating, spec.hot_water.design_delta_t, system),
                "Pump [kW]": heating["design_pump_kW"].to_numpy(dtype=float),
                "Fuel [kWh]": heating["fuel_kWh"].to_numpy(dtype=float),
                "Pumps [kWh]": heating["pump_kWh"].to_numpy(dtype=float),
                "Seasonal boiler efficiency [%]": 100.0
                * heating["seasonal_efficiency"].to_numpy(dtype=float),
                STARTS_ROW: heating["machine_starts"].to_numpy(dtype=float),
            }
        )
        digits = {column: 1 for column in table.columns}
        digits.update({"Fuel [kWh]": 0, "Pumps [kWh]": 0, STARTS_ROW: 0})
        table.attrs["digits"] = digits
        tables["heating"] = table
    recovery = water.heat_recovery
    if recovery:
        table = pd.DataFrame(
            {
                "Heat-recovery hours [h]": [float(recovery["heat_recovery_hours"])],
                "Heat recovered [kWh]": [float(recovery["heat_recovered_kWh"])],
                "Share of simultaneous heating [%]": [
                    100.0 * float(recovery["share_of_simultaneous_heating"])
                ],
            }
        )
        table.attrs["digits"] = {c: (1 if c.endswith("[%]") else 0) for c in table.columns}
        tables["heat_recovery"] = table
    return tables


def _cell(value, digits: int) -> str:
    if isinstance(value, bool | np.bool_):
        return "yes" if value else ""
    if isinstance(value, int | float | np.integer | np.floating):
        value = float(value)
        return "–" if not math.isfinite(value) else f"{value:,.{digits}f}"
    return html.escape(str(value))


def html_table(frame: pd.DataFrame, caption: str | None = None, css: str = "ps-table") -> str:
    """A frame as a plain HTML table (text escaped; numbers with ``attrs["digits"]``)."""
    digits = frame.attrs.get("digits", {})
    head = "".join(f"<th>{html.escape(str(c))}</th>" for c in frame.columns)
    body = "".join(
        "<tr>"
        + "".join(
            f"<td>{_cell(v, digits.get(c, 1))}</td>"
            for c, v in zip(frame.columns, row, strict=True)
        )
        + "</tr>"
        for row in frame.itertuples(index=False, name=None)
    )
    cap = f"<caption>{html.escape(caption)}</caption>" if caption else ""
    return (
        f"<table class='{html.escape(css, quote=True)}'>{cap}"
        f"<thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>"
    )


def coil_schedule_html(schedule: pd.DataFrame, system, caption: str | None = None) -> str:
    """:func:`coil_schedule_table` as HTML (default caption: "Coil schedule")."""
    return html_table(coil_schedule_table(schedule, system), caption or "Coil schedule")


#: Captions of the water-side tables.
_WATER_CAPTIONS = {
    "cooling": "Chilled-water plant options: design water side and the year",
    "heating": "Hot-water plant options: design water side and the year",
    "heat_recovery": "Heat-recovery chiller over the year",
}


def options_html_table(frame: pd.DataFrame, caption: str | None = None) -> str:
    """A table of plant options (an ``Option`` column, one row each) turned on its side:
    a row per figure, a column per option, so a dozen figures fit a projector-width
    page (1280 px) and stay readable on paper (text escaped; ``attrs["digits"]``)."""
    digits = frame.attrs.get("digits", {})
    options = [str(name) for name in frame["Option"]]
    head = "<th scope='col'>Figure</th>" + "".join(
        f"<th scope='col'>{html.escape(name)}</th>" for name in options
    )
    body = "".join(
        f"<tr><th scope='row'>{html.escape(str(column))}</th>"
        + "".join(f"<td>{_cell(v, digits.get(column, 1))}</td>" for v in frame[column])
        + "</tr>"
        for column in frame.columns
        if column != "Option"
    )
    cap = f"<caption>{html.escape(caption)}</caption>" if caption else ""
    return (
        f"<table class='ps-table ps-options'>{cap}"
        f"<thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>"
    )


def water_side_html(water, spec, system) -> str:
    """:func:`water_side_tables` as HTML tables ("" when the study has no water side); the
    option tables with a column per option (:func:`options_html_table`), and a line on
    the staging their starts follow."""
    tables = water_side_tables(water, spec, system)
    page = "".join(
        options_html_table(table, _WATER_CAPTIONS[key])
        if "Option" in table.columns
        else html_table(table, _WATER_CAPTIONS[key])
        for key, table in tables.items()
    )
    if "cooling" in tables or "heating" in tables:
        page += f"<p class='plantside-help'>{html.escape(staging_note(spec))}</p>"
    return page


def staging_note(spec) -> str:
    """How the water side stages its machines (its starts differ from the plant's load-only
    staging when a machine starts before the running ones are full, or for the flow)."""
    return (
        "Starts on the water side: the next chiller starts above "
        f"{100 * spec.chiller_staging_fraction:.0f} % of the running capacity, or when the "
        "chilled-water flow needs it; the next boiler above "
        f"{100 * spec.boiler_staging_fraction:.0f} %. The Plant part stages on the load "
        "alone (the next machine when the running ones are full), so its starts can differ."
    )
