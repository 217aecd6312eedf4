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
    chart_builder,
    layered,
    plot_width,
    themed,
)
from plantside.units import to_display

__all__ = ["psychrometric_chart"]

#: Relative-humidity and enthalpy lines: thin, but 3:1 on white (WCAG 2.1 SC 1.4.11), since
#: a reader reads the air's state off them; the enthalpy lines dashed to tell them apart.
_RH_LINE = "#8a919a"
_ENTHALPY_LINE = "#8a919a"


def _extent(grid: pd.DataFrame) -> tuple[list[float], list[float]]:
    t = grid["drybulb"].to_numpy(dtype=float)
    w = grid["humidity_ratio"].to_numpy(dtype=float)
    return [float(np.nanmin(t)), float(np.nanmax(t))], [0.0, float(np.nanmax(w))]


def _grid_layers(x, y):
    grid = alt.NamedData(name="grid")
    rh = (
        alt.Chart(grid)
        .transform_filter(alt.datum.family == "relative humidity")
        .mark_line(color=_RH_LINE, strokeWidth=1)
        .encode(x=x, y=y, detail=alt.Detail("line:N"), order=alt.Order("order:Q"))
    )
    enthalpy = (
        alt.Chart(grid)
        .transform_filter(alt.datum.family == "enthalpy")
        .mark_line(color=_ENTHALPY_LINE, strokeWidth=1, strokeDash=[4, 4])
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


#: Plot height [px]; least spacing of the dry-bulb tick labels [px].
_HEIGHT = 460
_TICK_SPACING_PX = 45
#: The grid labels' type: (font size [px], dx [px], dy [px]) of the relative-humidity and
#: enthalpy labels (right-aligned, baseline at the bottom: the box is up and left of dx, dy).
_GRID_LABEL_STYLE = {"relative humidity": (13, -2, -2), "enthalpy": (12, -3, -3)}
#: Width of a character as a share of the font size (Liberation Sans digits and "%": 0.556;
#: 0.6 leaves a margin for other glyphs) and the least gap between two labels [px].
_CHARACTER_WIDTH = 0.6
_LABEL_GAP_PX = 2


def _label_boxes(labels: pd.DataFrame, x_domain, y_domain, width, height) -> np.ndarray:
    """Pixel boxes (left, top, right, bottom) of grid labels as the text marks place them."""
    x = (labels["drybulb"].to_numpy(float) - x_domain[0]) / (x_domain[1] - x_domain[0]) * width
    y = (
        height
        - (labels["humidity_ratio"].to_numpy(float) - y_domain[0])
        / (y_domain[1] - y_domain[0])
        * height
    )
    style = np.array([_GRID_LABEL_STYLE[f] for f in labels["family"]], dtype=float)
    size, dx, dy = style.T
    text_width = np.array([len(str(t)) for t in labels["line"]]) * size * _CHARACTER_WIDTH
    right, bottom = x + dx, y + dy
    return np.column_stack([right - text_width, bottom - size, right, bottom])


def _process_label_boxes(process, x_domain, y_domain, width, height) -> list[np.ndarray]:
    """Pixel boxes of the process's state labels (``_with_label_positions`` rows; only the
    labelled scenario), bold 15 px type."""
    if process is None or not len(process):
        return []
    keys = scenarios_in(process)
    if keys:
        process = process[process[SCENARIO_COLUMN] == keys[-1]]
    x = (process["drybulb"].to_numpy(float) - x_domain[0]) / (x_domain[1] - x_domain[0]) * width
    y = (
        height
        - (process["humidity_ratio"].to_numpy(float) - y_domain[0])
        / (y_domain[1] - y_domain[0])
        * height
    )
    boxes = []
    for x0, y0, text, position in zip(
        x, y, process["point"], process["label_position"], strict=True
    ):
        align, baseline, dx, dy = _LABEL_POSITIONS[position]
        size = 15
        text_width = len(str(text)) * size * _CHARACTER_WIDTH * 1.1  # bold is wider
        left = x0 + dx if align == "left" else x0 + dx - text_width
        top = y0 + dy - size if baseline == "bottom" else y0 + dy
        boxes.append(np.array([left, top, left + text_width, top + size]))
    return boxes


def _labels_apart(grid: pd.DataFrame, x_domain, y_domain, width, height, taken=()) -> pd.DataFrame:
    """``grid`` with the ``label`` flag cleared on labels that would print over another.

    The boxes in ``taken`` (the process's state labels) are placed first, then the enthalpy
    labels (along the saturation curve), then the relative humidity labels (along the top
    edge); a label whose box comes within ``_LABEL_GAP_PX`` of one already placed, or runs
    off the plot's left edge, is not drawn (its line stays). A copy: the caller's frame is
    not changed.
    """
    if "label" not in grid or not grid["label"].any():
        return grid
    order = {"enthalpy": 0, "relative humidity": 1}
    wanted = grid[grid["label"] & grid["family"].isin(list(order))]
    wanted = wanted.iloc[np.argsort(wanted["family"].map(order).to_numpy(), kind="stable")]
    boxes = _label_boxes(wanted, x_domain, y_domain, width, height)
    kept: list[np.ndarray] = list(taken)
    dropped = []
    for index, box in zip(wanted.index, boxes, strict=True):
        clear = box[0] >= 0 and all(
            box[0] > k[2] + _LABEL_GAP_PX
            or box[2] < k[0] - _LABEL_GAP_PX
            or box[1] > k[3] + _LABEL_GAP_PX
            or box[3] < k[1] - _LABEL_GAP_PX
            for k in kept
        )
        if clear:
            kept.append(box)
        else:
            dropped.append(index)
    if not dropped:
        return grid
    placed = grid.copy()
    placed.loc[dropped, "label"] = False
    return placed


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
    width: int | None = None,
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
    width : int, optional
        Plot width [px], 240 to 1600; default 760 (the exports' width). The dashboard passes the
        width that fits its panel.

    Returns
    -------
    altair.LayerChart
    """
    system = frame_system(grid, system)
    x_domain, y_domain = _extent(grid)
    plot = plot_width(width)
    step = 5.0 if system.value == "SI" else 10.0  # round dry bulbs: 5 °C or 10 °F
    while plot / ((x_domain[1] - x_domain[0]) / step) < _TICK_SPACING_PX:
        step *= 2  # a narrow plot: every other label, so "100" and "110" never touch
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
    if process is not None and len(process):
        process = _with_label_positions(process, x_domain)
    states = _process_label_boxes(process, x_domain, y_domain, plot, _HEIGHT)
    datasets = {"grid": _labels_apart(grid, x_domain, y_domain, plot, _HEIGHT, states)}
    if density is not None and len(density):
        keys = scenarios_in(density)
        layers.append(_density_layer(x_domain, y_domain, system, keys[-1] if keys else None))
        datasets["outdoor"] = density
    layers.extend(_grid_layers(x, y))
    if process is not None and len(process):
        layers.extend(_process_layers(process, x, y, system))
        datasets["process"] = process
    chart = layered(layers, width=plot, height=_HEIGHT)
    return themed(
        chart,
        title=title or "Psychrometric chart: design process and the year's outdoor air",
        subtitle=_subtitle(grid, process, density, system),
        datasets=datasets,
    )
