"""Chart 4: a psychrometric chart with the design process and the year's outdoor hours.

Dry bulb across, humidity ratio up the right-hand side (the trade's layout),
drawn for the site's own pressure from :mod:`plantside.air.moist_air`
(ASHRAE Handbook Fundamentals 2017 Ch. 1): the saturation curve, relative
humidity lines every 10 %, and lines of constant enthalpy. On it:

- the year's outdoor hours as a shaded density (darker = more hours), so the
  meeting sees where the climate spends its time against the design point;
- the design process: outdoor, return, mixed, coil leaving and supply air as
  labelled points, joined in the order the air flows (the supply air's path
  back to the room and the return is dotted).

Frames: :func:`~plantside.charts.frames.psychrometric_grid_frame`,
:func:`~plantside.charts.frames.process_frame` and
:func:`~plantside.charts.frames.outdoor_density_frame`.
"""

from __future__ import annotations

import altair as alt
import numpy as np
import pandas as pd

from plantside.charts.compare import SCENARIO_COLUMN, SCENARIO_LABELS, has_scenarios, scenarios_in
from plantside.charts.frames import axis_title, frame_system
from plantside.charts.palette import (
    BACKGROUND,
    DENSITY_SCHEME,
    INK,
    INK_SOFT,
    PROCESS,
    WIDTH,
    chart_builder,
    layered,
    themed,
)
from plantside.units import to_display

__all__ = ["psychrometric_chart"]

_RH_LINE = "#aeb7c1"
_ENTHALPY_LINE = "#c4ccd4"


def _extent(grid: pd.DataFrame) -> tuple[list[float], list[float]]:
    t = grid["drybulb"].to_numpy(dtype=float)
    w = grid["humidity_ratio"].to_numpy(dtype=float)
    return [float(np.nanmin(t)), float(np.nanmax(t))], [0.0, float(np.nanmax(w))]


def _grid_layers(x, y):
    grid = alt.NamedData(name="grid")
    rh = (
        alt.Chart(grid)
        .transform_filter(alt.datum.family == "relative humidity")
        .mark_line(color=_RH_LINE, strokeWidth=1.2)
        .encode(x=x, y=y, detail=alt.Detail("line:N"), order=alt.Order("order:Q"))
    )
    enthalpy = (
        alt.Chart(grid)
        .transform_filter(alt.datum.family == "enthalpy")
        .mark_line(color=_ENTHALPY_LINE, strokeWidth=1.2, strokeDash=[5, 4])
        .encode(x=x, y=y, detail=alt.Detail("line:N"), order=alt.Order("order:Q"))
    )
    saturation = (
        alt.Chart(grid)
        .transform_filter(alt.datum.family == "saturation")
        .mark_line(color=INK, strokeWidth=2.6)
        .encode(x=x, y=y, order=alt.Order("order:Q"))
    )
    rh_labels = (
        alt.Chart(grid)
        .transform_filter((alt.datum.family == "relative humidity") & alt.datum.label)
        .mark_text(align="right", baseline="bottom", dx=-2, dy=-2, fontSize=13, color=INK_SOFT)
        .encode(x=x, y=y, text=alt.Text("line:N"))
    )
    enthalpy_labels = (
        alt.Chart(grid)
        .transform_filter((alt.datum.family == "enthalpy") & alt.datum.label)
        .mark_text(align="right", baseline="bottom", dx=-3, dy=-3, fontSize=12, color=INK_SOFT)
        .encode(x=x, y=y, text=alt.Text("line:N"))
    )
    return [rh, enthalpy, saturation, rh_labels, enthalpy_labels]


def _density_layer(x_domain, y_domain, system, scenario):
    chart = alt.Chart(alt.NamedData(name="outdoor"))
    if scenario is not None:
        chart = chart.transform_filter(alt.datum[SCENARIO_COLUMN] == scenario)
    temperature = axis_title("Dry bulb", "temperature", system)
    humidity = axis_title("Humidity ratio", "humidity_ratio", system)
    return chart.mark_rect(opacity=0.9).encode(
        x=alt.X("drybulb_low:Q", scale=alt.Scale(domain=x_domain, nice=False)),
        x2=alt.X2("drybulb_high"),
        y=alt.Y("humidity_low:Q", scale=alt.Scale(domain=y_domain, nice=False)),
        y2=alt.Y2("humidity_high"),
        color=alt.Color(
            "hours:Q",
            title="Outdoor hours in cell",
            scale=alt.Scale(type="sqrt", range=list(DENSITY_SCHEME), zero=False),
            legend=alt.Legend(orient="left", gradientLength=220, format=",d"),
        ),
        tooltip=[
            alt.Tooltip("drybulb_low:Q", title=f"{temperature}, from", format=".0f"),
            alt.Tooltip("drybulb_high:Q", title="to", format=".0f"),
            alt.Tooltip("humidity_low:Q", title=f"{humidity}, from", format=".0f"),
            alt.Tooltip("humidity_high:Q", title="to", format=".0f"),
            alt.Tooltip("hours:Q", title="Hours", format=",d"),
        ],
    )


def _process_layers(process: pd.DataFrame, x, y, system):
    data = alt.NamedData(name="process")
    keys = scenarios_in(process)
    temperature = axis_title("Dry bulb", "temperature", system)
    humidity = axis_title("Humidity ratio", "humidity_ratio", system)
    enthalpy = axis_title("Enthalpy", "enthalpy", system)
    tooltip = [
        alt.Tooltip("point:N", title="Air"),
        alt.Tooltip("drybulb:Q", title=temperature, format=".1f"),
        alt.Tooltip("humidity_ratio:Q", title=humidity, format=".1f"),
        alt.Tooltip("enthalpy:Q", title=enthalpy, format=".1f"),
        alt.Tooltip("relative_humidity:Q", title="Relative humidity [%]", format=".0f"),
    ]
    layers = []
    for key in keys or [None]:
        base = alt.Chart(data)
        if key is not None:
            base = base.transform_filter(alt.datum[SCENARIO_COLUMN] == key)
        pinned = key == "A" and len(keys) > 1
        dash = [8, 5] if pinned else [1, 0]
        opacity = 0.55 if pinned else 1.0
        segment = base.encode(x=x, y=y, x2=alt.X2("to_drybulb"), y2=alt.Y2("to_humidity_ratio"))
        layers.append(
            segment.transform_filter(alt.datum.segment == "air handler").mark_rule(
                color=PROCESS, strokeWidth=3, strokeDash=dash, opacity=opacity
            )
        )
        layers.append(
            segment.transform_filter(alt.datum.segment == "room").mark_rule(
                color=INK_SOFT, strokeWidth=2, strokeDash=[2, 4], opacity=opacity
            )
        )
        layers.append(
            base.mark_point(
                shape="diamond" if pinned else "circle",
                size=150,
                filled=not pinned,
                color=PROCESS,
                stroke=PROCESS if pinned else "white",
                strokeWidth=2 if pinned else 1.2,
                opacity=1.0,
            ).encode(x=x, y=y, tooltip=tooltip)
        )
        if not pinned:
            for position, (align, baseline, dx, dy) in _LABEL_POSITIONS.items():
                placed = base.transform_filter(alt.datum.label_position == position)
                for halo in (True, False):  # white halo first: labels stay legible on shading
                    style = (
                        {"stroke": BACKGROUND, "strokeWidth": 4, "strokeJoin": "round"}
                        if halo
                        else {}
                    )
                    layers.append(
                        placed.mark_text(
                            align=align,
                            baseline=baseline,
                            dx=dx,
                            dy=dy,
                            fontSize=15,
                            color=INK,
                            fontWeight="bold",
                            **style,
                        ).encode(x=x, y=y, text=alt.Text("point:N"))
                    )
    return layers


#: Where each state's label sits around its point (compass side): chosen so the usual
#: cooling process (outdoor hot and humid, mixed between it and return, coil leaving
#: and supply close together near saturation) keeps every label clear of the others.
_STATE_LABEL_POSITION = {
    "outdoor": "ne",
    "recovered": "ne",
    "return": "se",
    "mixed": "nw",
    "coil_entering": "nw",
    "coil_leaving": "sw",
    "supply": "se",
    "zone": "se",
}
_LABEL_POSITIONS = {
    "ne": ("left", "bottom", 9, -6),
    "se": ("left", "top", 9, 6),
    "nw": ("right", "bottom", -9, -6),
    "sw": ("right", "top", -9, 6),
}


#: Share of the dry-bulb axis, at its right end, where a label set east of its point would
#: run off the chart: such labels move to the west side.
_RIGHT_MARGIN_SHARE = 0.15


def _with_label_positions(process: pd.DataFrame, x_domain=None) -> pd.DataFrame:
    positions = [_STATE_LABEL_POSITION.get(state, "ne") for state in process["state"]]
    if x_domain is not None:
        low, high = x_domain
        edge = high - _RIGHT_MARGIN_SHARE * (high - low)
        positions = [
            position.replace("e", "w") if position.endswith("e") and drybulb > edge else position
            for position, drybulb in zip(positions, process["drybulb"], strict=True)
        ]
    return process.assign(label_position=positions)


def _subtitle(grid: pd.DataFrame, process, density, system) -> list[str]:
    lines = []
    pressure = grid.attrs.get("pressure_Pa")
    if pressure is not None:
        value, unit = to_display("pressure", pressure, system)
        lines.append(f"Drawn at the site pressure, {float(value):.2f} {unit}")
    if density is not None and len(density):
        lines.append("Shading: the year's outdoor hours (darker = more hours)")
    if process is not None and has_scenarios(process) and len(scenarios_in(process)) > 1:
        lines.append(
            f"Process: {SCENARIO_LABELS['B']} solid and labelled, {SCENARIO_LABELS['A']} dashed"
        )
    return lines


@chart_builder
def psychrometric_chart(
    grid: pd.DataFrame,
    process: pd.DataFrame | None = None,
    density: pd.DataFrame | None = None,
    system=None,
    title: str | None = None,
):
    """Psychrometric chart with the design process and the outdoor hours.

    Parameters
    ----------
    grid : pandas.DataFrame
        From :func:`~plantside.charts.frames.psychrometric_grid_frame`; sets
        the axes' extent and the site pressure.
    process : pandas.DataFrame, optional
        From :func:`~plantside.charts.frames.process_frame`, optionally with
        scenarios (B solid and labelled, A dashed with hollow diamonds).
    density : pandas.DataFrame, optional
        From :func:`~plantside.charts.frames.outdoor_density_frame`; with
        scenarios, the current climate (B, else A) is shaded.
    system : {"SI", "IP"}, optional
        Unit system (default: the grid frame's own).
    title : str, optional

    Returns
    -------
    altair.LayerChart
    """
    system = frame_system(grid, system)
    x_domain, y_domain = _extent(grid)
    step = 5.0 if system.value == "SI" else 10.0  # round dry bulbs: 5 °C or 10 °F
    ticks = np.arange(np.ceil(x_domain[0] / step) * step, x_domain[1] + 1e-9, step)
    x = alt.X(
        "drybulb:Q",
        title=axis_title("Dry-bulb temperature", "temperature", system),
        scale=alt.Scale(domain=x_domain, nice=False),
        axis=alt.Axis(values=[float(v) for v in ticks]),
    )
    y = alt.Y(
        "humidity_ratio:Q",
        title=axis_title("Humidity ratio", "humidity_ratio", system),
        scale=alt.Scale(domain=y_domain, nice=False),
        axis=alt.Axis(orient="right"),
    )
    layers = []
    datasets = {"grid": grid}
    if density is not None and len(density):
        keys = scenarios_in(density)
        layers.append(_density_layer(x_domain, y_domain, system, keys[-1] if keys else None))
        datasets["outdoor"] = density
    layers.extend(_grid_layers(x, y))
    if process is not None and len(process):
        layers.extend(_process_layers(process, x, y, system))
        datasets["process"] = _with_label_positions(process, x_domain)
    chart = layered(layers, width=WIDTH, height=460)
    return themed(
        chart,
        title=title or "Psychrometric chart: design process and the year's outdoor air",
        subtitle=_subtitle(grid, process, density, system),
        datasets=datasets,
    )
