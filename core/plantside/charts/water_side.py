"""The water side of a study: each cooling option's year of electricity, and its efficiency.

One chart of two panels, stacked so it fits a narrow page:

1. each cooling plant option's electricity over the year, stacked by chillers, pumps
   (chilled and condenser water) and tower fans;
2. its seasonal efficiency (the year's cooling over the chillers' input, and over the
   whole plant's) beside the IPLV of its rating (AHRI 550/590), as COP in SI and
   kW/ton in I-P.

The figures are those of :func:`plantside.study.water_side_run.run_water_side` (the
command line's ``water_side``); :func:`water_side_of_units` runs it for air-handler
results already computed (the dashboard's). Electricity is in kWh in both unit
systems (as the command line prints it); efficiency through :func:`efficiency_display`.
"""

from __future__ import annotations

from dataclasses import replace

import altair as alt
import numpy as np
import pandas as pd

from plantside.charts.frames import frame_system, value_format
from plantside.charts.palette import (
    COIL,
    PLANT,
    STANDARD,
    chart_builder,
    concatenated,
    layered,
    plot_width,
    themed,
)
from plantside.constants import KW_PER_TON
from plantside.study.run import assemble_plants
from plantside.study.water_side_run import run_water_side
from plantside.units import UnitSystem

__all__ = [
    "EFFICIENCY_COLOURS",
    "ENERGY_COLOURS",
    "ENERGY_PARTS",
    "efficiency_display",
    "water_side_chart",
    "water_side_efficiency_frame",
    "water_side_energy_frame",
    "water_side_of_units",
]

#: Parts of a cooling option's electricity: label and the study's column [kWh].
ENERGY_PARTS = (
    ("Chillers", "chiller_kWh"),
    ("Pumps", "pump_kWh"),
    ("Tower fans", "tower_fan_kWh"),
)

#: Colour of each part (Tol muted purple, Okabe-Ito sky blue, Tol bright yellow; none of
#: them has a role elsewhere, so none reads as coil or zone load).
ENERGY_COLOURS = {"Chillers": "#AA4499", "Pumps": "#56B4E9", "Tower fans": "#DDAA33"}

#: Efficiency measures: label, the study's column [COP, kW/kW], colour by role (this
#: building's year in coil blue and plant ink, the rating in the standard's colour, as
#: the IPLV weights chart draws them).
EFFICIENCY_MEASURES = (
    ("Seasonal, chillers", "seasonal_cop", COIL),
    ("Seasonal, chillers + pumps + tower", "seasonal_plant_cop", PLANT),
    ("IPLV as rated (AHRI 550/590)", "rated_iplv_cop", STANDARD),
)
EFFICIENCY_COLOURS = {label: colour for label, _, colour in EFFICIENCY_MEASURES}
EFFICIENCY_SHAPES = dict(zip(EFFICIENCY_COLOURS, ("square", "triangle-up", "circle"), strict=True))

_BAR_PX = 34  # height of one option's bar [px]


def efficiency_display(cop, system) -> tuple[np.ndarray, str]:
    """A chiller efficiency as the user reads it: COP in SI, kW/ton in I-P.

    Parameters
    ----------
    cop : array_like
        Coefficient of performance [kW/kW], > 0 (NaN passes through).
    system : {"SI", "IP"}

    Returns
    -------
    (numpy.ndarray, str)
        The value and its unit ("COP" or "kW/ton").

    Notes
    -----
    kW/ton = 3.517 / COP (1 ton of refrigeration = 12,000 Btu/h = 3.517 kW; ASHRAE
    Handbook Fundamentals 2017, Ch. 38, conversion factors).
    """
    cop = np.asarray(cop, dtype=float)
    if UnitSystem.parse(system) is UnitSystem.IP:
        with np.errstate(divide="ignore"):
            return KW_PER_TON / cop, "kW/ton"
    return cop, "COP"


def _cooling_rows(water) -> pd.DataFrame:
    options = water.options
    return options[options["plant"] == "cooling"].reset_index(drop=True)


def water_side_energy_frame(water, system) -> pd.DataFrame:
    """Each cooling option's electricity over the year, one row per option and part.

    Parameters
    ----------
    water : plantside.study.water_side_run.WaterSideResult
    system : {"SI", "IP"}

    Returns
    -------
    pandas.DataFrame
        ``option``, ``option_order``, ``part`` (:data:`ENERGY_PARTS`), ``order``,
        ``energy`` [kWh, both unit systems], ``start`` and ``end`` (the stacked bar
        [kWh]), ``percent`` (of the option's total [%]); ``attrs["system"]``.
    """
    rows = []
    for index, row in _cooling_rows(water).iterrows():
        total = sum(float(row[column]) for _, column in ENERGY_PARTS)
        start = 0.0
        for order, (part, column) in enumerate(ENERGY_PARTS):
            value = float(row[column])
            rows.append(
                {
                    "option": row["option"],
                    "option_order": int(index),
                    "part": part,
                    "order": order,
                    "energy": value,
                    "start": start,
                    "end": start + value,
                    "percent": 100.0 * value / total if total > 0 else 0.0,
                }
            )
            start += value
    frame = pd.DataFrame(
        rows,
        columns=["option", "option_order", "part", "order", "energy", "start", "end", "percent"],
    )
    frame.attrs["system"] = UnitSystem.parse(system).value
    return frame


def water_side_efficiency_frame(water, system) -> pd.DataFrame:
    """Each cooling option's seasonal efficiency beside its rated IPLV.

    Parameters
    ----------
    water : plantside.study.water_side_run.WaterSideResult
    system : {"SI", "IP"}

    Returns
    -------
    pandas.DataFrame
        ``option``, ``option_order``, ``measure`` (see :data:`EFFICIENCY_COLOURS`),
        ``order``, ``value`` (COP in SI, kW/ton in I-P); a measure the option does
        not have (no rating given) is left out. ``attrs["system"]`` and
        ``attrs["unit"]``.
    """
    rows = []
    for index, row in _cooling_rows(water).iterrows():
        for order, (measure, column, _) in enumerate(EFFICIENCY_MEASURES):
            cop = row.get(column, np.nan)
            if cop is None or not np.isfinite(float(cop)) or float(cop) <= 0:
                continue
            value, _unit = efficiency_display(float(cop), system)
            rows.append(
                {
                    "option": row["option"],
                    "option_order": int(index),
                    "measure": measure,
                    "order": order,
                    "value": float(value),
                }
            )
    frame = pd.DataFrame(rows, columns=["option", "option_order", "measure", "order", "value"])
    frame.attrs["system"] = UnitSystem.parse(system).value
    frame.attrs["unit"] = efficiency_display(1.0, system)[1]
    return frame


def _scale(colours: dict, names) -> alt.Scale:
    present = [n for n in colours if n in set(names)]
    return alt.Scale(domain=present, range=[colours[n] for n in present])


@chart_builder
def water_side_chart(
    energy: pd.DataFrame,
    efficiency: pd.DataFrame | None = None,
    system=None,
    title: str | None = None,
    width: int | None = None,
):
    """Each cooling option's electricity a year by part, and its efficiency beside IPLV.

    Parameters
    ----------
    energy : pandas.DataFrame
        From :func:`water_side_energy_frame`.
    efficiency : pandas.DataFrame, optional
        From :func:`water_side_efficiency_frame`.
    system : {"SI", "IP"}, optional
        Unit system (default: the frame's own).
    title : str, optional
    width : int, optional
        Plot width [px], 240 to 1600; default 760 (the exports' width).

    Returns
    -------
    altair.VConcatChart
    """
    system = frame_system(energy, system)
    width = plot_width(width)
    options = list(dict.fromkeys(energy.sort_values("option_order")["option"]))
    height = max(_BAR_PX * len(options), 60)
    y = alt.Y("option:N", title=None, sort=options, axis=alt.Axis(labelLimit=260))
    fmt = value_format(energy["energy"])
    bars = (
        alt.Chart(alt.NamedData(name="energy"))
        .mark_bar()
        .encode(
            x=alt.X("start:Q", title="Electricity a year [kWh]", axis=alt.Axis(format="~s")),
            x2=alt.X2("end:Q"),
            y=y,
            color=alt.Color(
                "part:N",
                title=None,
                scale=_scale(ENERGY_COLOURS, energy["part"]),
                legend=alt.Legend(orient="bottom", direction="horizontal"),
            ),
            order=alt.Order("order:Q"),
            tooltip=[
                alt.Tooltip("option:N", title="Option"),
                alt.Tooltip("part:N", title="Part"),
                alt.Tooltip("energy:Q", title="Electricity [kWh]", format=fmt),
                alt.Tooltip("percent:Q", title="Share of the option [%]", format=".1f"),
            ],
        )
    )
    panels = [layered([bars], width=width, height=height)]
    datasets = {"energy": energy}
    if efficiency is not None and len(efficiency):
        unit = efficiency.attrs.get("unit") or efficiency_display(1.0, system)[1]
        better = "lower is better" if unit == "kW/ton" else "higher is better"
        dots = (
            alt.Chart(alt.NamedData(name="efficiency"))
            .mark_point(filled=True, size=170, opacity=1)
            .encode(
                x=alt.X(
                    "value:Q",
                    title=f"Efficiency [{unit}; {better}]",
                    scale=alt.Scale(zero=False, padding=20),
                    # a few labels, never run together ("0.520.54") at a narrow width
                    axis=alt.Axis(tickCount=6, labelOverlap="greedy"),
                ),
                y=y,
                color=alt.Color(
                    "measure:N",
                    title=None,
                    scale=_scale(EFFICIENCY_COLOURS, efficiency["measure"]),
                    legend=alt.Legend(orient="bottom", direction="vertical"),
                ),
                shape=alt.Shape(  # shape too, so the measures part without colour
                    "measure:N",
                    title=None,
                    scale=_scale(EFFICIENCY_SHAPES, efficiency["measure"]),
                    legend=alt.Legend(orient="bottom", direction="vertical"),
                ),
                tooltip=[
                    alt.Tooltip("option:N", title="Option"),
                    alt.Tooltip("measure:N", title="Measure"),
                    alt.Tooltip("value:Q", title=unit, format=".3f" if unit == "kW/ton" else ".2f"),
                ],
            )
        )
        panels.append(layered([dots], width=width, height=height))
        datasets["efficiency"] = efficiency
    chart = concatenated("v", panels)
    chart.resolve = alt.Resolve(scale=alt.ScaleResolveMap(color="independent", shape="independent"))
    return themed(
        chart,
        title=title or "The chilled-water plant's year, each option",
        subtitle="Chillers, pumps and tower fans over the year; seasonal efficiency beside IPLV",
        datasets=datasets,
    )


def water_side_of_units(scenario, weather, conditions, units, cooling_design_percent=None):
    """The water side of air-handler results already computed (the dashboard's).

    Assembles the plants as the command line does
    (:func:`plantside.study.run.assemble_plants`) and runs
    :func:`plantside.study.water_side_run.run_water_side`: one calculation.

    Parameters
    ----------
    scenario : Scenario
    weather : Weather
    conditions : DesignConditions
    units : sequence of AirHandlerResult
    cooling_design_percent : float, optional
        Cooling design percentage the units' design points are at [%] (default: the
        scenario's own).

    Returns
    -------
    WaterSideResult or None
        None when the scenario has no water-side tables.
    """
    if scenario.water_side is None:
        return None
    if (
        cooling_design_percent is not None
        and cooling_design_percent != scenario.cooling_design_percent
    ):
        scenario = replace(scenario, cooling_design_percent=float(cooling_design_percent))
    return run_water_side(assemble_plants(scenario, weather, conditions, tuple(units)))
