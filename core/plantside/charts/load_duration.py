"""Chart 3: how the year's hours spread over the plant's capacity.

Three views of one distribution, meant to be read together:

- the **load-duration curves** of coil and zone load (hours at or above each
  load), with the plant capacity and the capacity of each stage of machines
  drawn across, so the meeting sees how many hours each stage runs;
- the **part-load histogram**: hours in each 10 % band of the design capacity;
- the building's own weights at the four **IPLV rating points** beside the
  AHRI Standard 550/590 weights (1, 42, 45, 12 % at 100, 75, 50, 25 % load),
  so the meeting sees how far this building is from the rating's assumption.

Frames: :func:`~plantside.charts.frames.load_duration_frame`,
:func:`~plantside.charts.frames.capacity_lines_frame`,
:func:`~plantside.charts.frames.part_load_frame` and
:func:`~plantside.charts.frames.iplv_weights_frame`.
"""

from __future__ import annotations

import altair as alt
import numpy as np
import pandas as pd

from plantside.charts.compare import (
    SCENARIO_COLUMN,
    SCENARIO_LABELS,
    axis_top,
    has_scenarios,
    scenario_dash,
    scenario_opacity,
    scenarios_in,
    spread_labels,
)
from plantside.charts.frames import axis_title, frame_system, value_format
from plantside.charts.palette import (
    CATEGORY_COLOURS,
    COIL,
    INK,
    PLANT,
    REFERENCE,
    STAGE,
    STANDARD,
    ZONE,
    chart_builder,
    concatenated,
    layered,
    plot_width,
    themed,
)
from plantside.errors import InputRangeError

__all__ = [
    "load_distribution_chart",
    "load_duration_chart",
    "part_load_chart",
]

_WEIGHTS_TITLE = "IPLV weights: AHRI 550/590 and this building"
_SERIES_COLOURS = {"Coil load": COIL, "Zone load": ZONE, "Plant load": PLANT}


def _series_scale(names) -> alt.Scale:
    spare = iter(CATEGORY_COLOURS[2:] * 3)
    colours = [_SERIES_COLOURS.get(n) or next(spare) for n in names]
    return alt.Scale(domain=list(names), range=colours)


def _curves_layer(curves: pd.DataFrame, lines: pd.DataFrame | None, system, width, height):
    power = axis_title("Load", "power", system)
    names = list(dict.fromkeys(curves["series"]))
    fmt = value_format(curves["load"])
    hours_max = int(curves["hours_at_or_above"].max()) if len(curves) else 1
    encoding = {
        "x": alt.X(
            "hours_at_or_above:Q",
            title="Hours at or above load [h]",
            scale=alt.Scale(domain=[0, hours_max], nice=False),
            # about one label per 110 px: "8,000" in 15 px type is ~40 px wide
            axis=alt.Axis(format=",d", tickCount=max(2, width // 110)),
        ),
        # a fixed zero-based domain, so the capacity labels can be spaced in pixels
        "y": alt.Y(
            "load:Q", title=power, scale=alt.Scale(domain=[0, _load_top(curves, lines)], nice=False)
        ),
        "color": alt.Color("series:N", title=None, scale=_series_scale(names)),
        "tooltip": [
            alt.Tooltip("series:N", title="Series"),
            alt.Tooltip("hours_at_or_above:Q", title="Hours at or above", format=",d"),
            alt.Tooltip("load:Q", title=power, format=fmt),
        ],
    }
    detail = ["series"]
    if has_scenarios(curves):
        encoding["strokeDash"] = scenario_dash(curves)
        encoding["tooltip"].insert(0, alt.Tooltip(f"{SCENARIO_COLUMN}:N", title="Scenario"))
        detail.append(SCENARIO_COLUMN)
    encoding["detail"] = [alt.Detail(f"{d}:N") for d in detail]
    curve_marks = alt.Chart(alt.NamedData(name="curves")).mark_line(
        interpolate="step-after", strokeWidth=3
    )
    layers = [curve_marks.encode(**encoding)]
    if lines is not None and len(lines):
        layers.extend(_capacity_layers(lines, system, fmt, width))
    return layered(layers, width=width, height=height)


#: Least plot height of the curves panel [px] and least spacing of its labels [px].
_CURVES_HEIGHT_MIN = 360
_LABEL_GAP_PX = 18


def _load_top(curves: pd.DataFrame, lines: pd.DataFrame | None) -> float:
    loads = [curves["load"].to_numpy(dtype=float)]
    if lines is not None and len(lines):
        loads.append(lines["load"].to_numpy(dtype=float))
    return axis_top(np.concatenate(loads))


def _capacity_data(lines: pd.DataFrame, system, fmt, top: float) -> pd.DataFrame:
    """The capacity lines with their label text and ``label_load``: where the label sits,
    spread so labels of close lines (A and B, plant and stage) never print over each other."""
    unit = axis_title("", "power", system).strip()[1:-1]
    gap = top / _CURVES_HEIGHT_MIN * _LABEL_GAP_PX
    loads = lines["load"].to_numpy(dtype=float)
    below = _labels_below(loads, gap)
    placed = loads.copy()
    if (~below).any():  # the labels above their lines, spread so they never touch
        placed[~below] = spread_labels(loads[~below], gap)
    lines = lines.assign(label_load=placed, label_below=below)
    return lines.assign(
        text=[
            f"{name}: {format(value, fmt)} {unit}"
            + (f" ({SCENARIO_LABELS[key][0]})" if key else "")
            for name, value, key in zip(
                lines["line"],
                lines["load"],
                lines[SCENARIO_COLUMN] if has_scenarios(lines) else [None] * len(lines),
                strict=True,
            )
        ]
    )


def _labels_below(loads: np.ndarray, gap: float) -> np.ndarray:
    """Which lines take their label below the line rather than above it.

    A label sits above its line, one text height (``gap``, in load units) tall; a line
    less than ``gap`` above would run through it (A's and B's plant capacity 4 % apart
    did). Such a line's label goes below it instead, where there is room: no other line
    within ``gap`` below, and the line under it not labelled below too.
    """
    order = np.argsort(loads, kind="stable")
    ordered = loads[order]
    below = np.zeros(loads.size, dtype=bool)
    for rank, index in enumerate(order):
        crowded_above = rank + 1 < ordered.size and ordered[rank + 1] - ordered[rank] < gap
        room_below = ordered[rank] >= gap and (
            rank == 0 or ordered[rank] - ordered[rank - 1] >= 2 * gap
        )
        below[index] = crowded_above and room_below
    return below


def _capacity_layers(lines: pd.DataFrame, system, fmt, width):
    """Plant capacity (solid) and stage capacities (dashed) as fixed-colour rules.

    Fixed colours rather than a colour encoding: the curves' colour scale (coil,
    zone) stays the only one in the panel, so its legend stays clean.
    """
    data = alt.NamedData(name="lines")
    layers = []
    for kind, colour, dash in (("capacity", REFERENCE, [1, 0]), ("stage", STAGE, [7, 4])):
        base = alt.Chart(data).transform_filter(alt.datum.kind == kind)
        layers.append(
            base.mark_rule(color=colour, strokeDash=dash, strokeWidth=2).encode(
                y=alt.Y("load:Q"), tooltip=[alt.Tooltip("text:N", title="Capacity")]
            )
        )
        for below in (False, True):  # above the line, or below it where a line is close above
            layers.append(
                base.transform_filter(alt.datum.label_below == below)
                .mark_text(
                    align="right",
                    baseline="top" if below else "bottom",
                    dy=3 if below else -2,
                    fontSize=14,
                    color=colour,
                )
                .encode(x=alt.XValue(width - 4), y=alt.Y("label_load:Q"), text=alt.Text("text:N"))
            )
    return layers


def _band_labels(bins: pd.DataFrame) -> pd.DataFrame:
    shown = bins[bins["band"] != "no load"].copy()
    upper = shown["upper_percent"].to_numpy(dtype=float)
    lower = shown["lower_percent"].to_numpy(dtype=float)
    shown["band_label"] = [
        f"{lo:g}–{hi:g}" if np.isfinite(hi) else f">{lo:g}"
        for lo, hi in zip(lower, upper, strict=True)
    ]
    return shown


def _histogram_layer(shown: pd.DataFrame, measure: str, width, height):
    order = list(dict.fromkeys(shown.sort_values("order")["band_label"]))
    field, title = {
        "hours": ("hours", "Hours in band [h]"),
        "energy": ("percent_of_energy", "Share of cooling energy [%]"),
    }[measure]
    encoding = {
        "x": alt.X(
            "band_label:N",
            sort=order,
            title="Load band [% of design capacity]",
            axis=alt.Axis(labelAngle=-40),
        ),
        "y": alt.Y(f"{field}:Q", title=title),
        "color": alt.ColorValue(COIL),
        "tooltip": [
            alt.Tooltip("band:N", title="Band"),
            alt.Tooltip("hours:Q", title="Hours", format=",d"),
            alt.Tooltip("percent_of_hours:Q", title="Share of hours [%]", format=".1f"),
            alt.Tooltip("percent_of_energy:Q", title="Share of energy [%]", format=".1f"),
        ],
    }
    if has_scenarios(shown):
        encoding["xOffset"] = alt.XOffset(
            f"{SCENARIO_COLUMN}:N", sort=scenarios_in(shown), scale=alt.Scale(paddingInner=0.05)
        )
        # below the bars, as the weights' legend: the row stays no wider than the curves
        encoding["opacity"] = scenario_opacity(shown, orient="bottom")
        encoding["tooltip"].insert(0, alt.Tooltip(f"{SCENARIO_COLUMN}:N", title="Scenario"))
    return (
        alt.Chart(
            alt.NamedData(name="bins"),
            width=width,
            height=height,
            title=_panel_title("Part-load hours"),
        )
        .mark_bar()
        .encode(**encoding)
    )


def _panel_title(text: str) -> alt.TitleParams:
    return alt.TitleParams(text=text, fontSize=18)


def _weights_data(weights: pd.DataFrame) -> pd.DataFrame:
    data = weights.copy()
    if has_scenarios(data):
        building = data["source"] != "AHRI 550/590"
        data.loc[building, "source"] = [
            f"This building ({key})" for key in data.loc[building, SCENARIO_COLUMN]
        ]
        data = data.drop_duplicates(subset=["source", "rating_point"])
    return data


def _weights_title(data: pd.DataFrame) -> str | list[str]:
    """The weights panel's title, naming the plant option staged (``attrs["option"]``)."""
    option = data.attrs.get("option") or next(
        (a.get("option") for a in data.attrs.get("scenarios", {}).values() if a.get("option")),
        None,
    )
    return [_WEIGHTS_TITLE, f"(plant option: {option})"] if option else _WEIGHTS_TITLE


#: Opacity of A's and B's building weights, as the histogram draws A and B (compare.py).
_BUILDING_OPACITY = {"A": 0.55, "B": 0.95}


def _over_white(colour: str, opacity: float) -> str:
    """``colour`` (#rrggbb) drawn at ``opacity`` on white, as an opaque #rrggbb."""
    rgb = [int(colour[i : i + 2], 16) for i in (1, 3, 5)]
    return "#" + "".join(f"{round(255 - opacity * (255 - c)):02x}" for c in rgb)


def _weights_layer(data: pd.DataFrame, basis: str, width, height):
    sources = list(dict.fromkeys(data["source"]))
    # the standard in its own colour; the building in coil blue (its weights come from the
    # coil load), A light and B strong as on the histogram beside it: orange means zone load
    colours = [
        STANDARD
        if s == "AHRI 550/590"
        else _over_white(COIL, _BUILDING_OPACITY.get(s.removeprefix("This building ")[1:2], 1.0))
        for s in sources
    ]
    points = ["100 %", "75 %", "50 %", "25 %"]
    encoding = {
        "x": alt.X(
            "rating_point:N",
            sort=points,
            title="IPLV rating point [% load]",
            axis=alt.Axis(labelAngle=0),
        ),
        "xOffset": alt.XOffset("source:N", sort=sources),
        "y": alt.Y("weight_percent:Q", title=f"Weight [% of {basis}]"),
        "color": alt.Color(
            "source:N",
            title="Weights",
            scale=alt.Scale(domain=sources, range=colours),
            legend=alt.Legend(orient="bottom", direction="vertical"),
        ),
        "tooltip": [
            alt.Tooltip("source:N", title="Weights"),
            alt.Tooltip("rating_point:N", title="Rating point"),
            alt.Tooltip("weight_percent:Q", title="Weight [%]", format=".1f"),
        ],
    }
    named = alt.NamedData(name="weights")
    bars = alt.Chart(named).mark_bar().encode(**encoding)
    if len(sources) > 2:  # three bars a point leave no room for readable labels
        return layered([bars], width=width, height=height, title=_panel_title(_weights_title(data)))
    text = (
        alt.Chart(named)
        .mark_text(baseline="bottom", dy=-2, fontSize=13, color=INK)
        .encode(
            x=encoding["x"],
            xOffset=encoding["xOffset"],
            y=encoding["y"],
            text=alt.Text("weight_percent:Q", format=".0f"),
        )
    )
    return layered(
        [bars, text],
        width=width,
        height=height,
        title=_panel_title(_weights_title(data)),
    )


def _datasets(curves, lines, bins, weights, system) -> dict:
    data = {}
    if curves is not None:
        data["curves"] = curves
        if lines is not None and len(lines):
            data["lines"] = _capacity_data(
                lines, system, value_format(curves["load"]), _load_top(curves, lines)
            )
    if bins is not None:
        data["bins"] = _band_labels(bins)
    if weights is not None and len(weights):
        data["weights"] = _weights_data(weights)
    return data


@chart_builder
def load_duration_chart(
    curves: pd.DataFrame,
    lines: pd.DataFrame | None = None,
    system=None,
    title: str | None = None,
    width: int | None = None,
):
    """Load-duration curves with plant capacity and stage lines.

    Parameters
    ----------
    curves : pandas.DataFrame
        From :func:`~plantside.charts.frames.load_duration_frame` (optionally
        with scenarios: A dashed, B solid).
    lines : pandas.DataFrame, optional
        From :func:`~plantside.charts.frames.capacity_lines_frame`.
    system : {"SI", "IP"}, optional
        Unit system (default: the frame's own).
    title : str, optional
    width : int, optional
        Plot width [px], 240 to 1600; default 760 (the exports' width). The dashboard passes the
        width that fits its panel.

    Returns
    -------
    altair.LayerChart
    """
    system = frame_system(curves, system)
    chart = _curves_layer(curves, lines, system, plot_width(width), 400)
    return themed(
        chart,
        title=title or "Load-duration curves",
        subtitle=_curve_subtitle(curves),
        datasets=_datasets(curves, lines, None, None, system),
    )


def _curve_subtitle(curves: pd.DataFrame) -> str:
    hours = int(curves["hours_at_or_above"].max()) if len(curves) else 0
    return f"Each curve: the hourly loads of the year ({hours:,} h) sorted from the highest"


@chart_builder
def part_load_chart(
    bins: pd.DataFrame,
    weights: pd.DataFrame | None = None,
    measure: str = "hours",
    title: str | None = None,
    width: int | None = None,
):
    """Part-load histogram (10 % bands), with the IPLV weights beside it.

    Parameters
    ----------
    bins : pandas.DataFrame
        From :func:`~plantside.charts.frames.part_load_frame`.
    weights : pandas.DataFrame, optional
        From :func:`~plantside.charts.frames.iplv_weights_frame`.
    measure : {"hours", "energy"}
        Bar height: hours in the band, or the band's share of cooling energy.
    title : str, optional
    width : int, optional
        Plot width [px], 240 to 1600 (histogram and weights together); default 760 (the exports'
        width). The dashboard passes the width that fits its panel.

    Returns
    -------
    altair.Chart or altair.HConcatChart
    """
    _check_measure(measure)
    chart = _part_load_panels(bins, weights, measure, plot_width(width))
    return themed(
        chart,
        title=title or "Part-load hours and rating weights",
        subtitle=_no_load(bins),
        datasets=_datasets(None, None, bins, weights, None),
    )


def _check_measure(measure: str):
    if measure not in ("hours", "energy"):
        raise InputRangeError("measure", f"measure = {measure!r}", "'hours' or 'energy'")


#: Least plot width [px] that keeps the histogram and the weights side by side, each with
#: its legend (measured with vl-convert: below it they need more than the panel).
_SIDE_BY_SIDE_PX = 620


def _part_load_panels(bins, weights, measure, total_width):
    shown = _band_labels(bins)
    if weights is None or not len(weights):
        return _histogram_layer(shown, measure, total_width, 300)
    basis = weights.attrs.get("basis", "energy")
    if total_width < _SIDE_BY_SIDE_PX:  # a narrow panel: the weights under the histogram
        return concatenated(
            "v",
            [
                _histogram_layer(shown, measure, total_width, 260),
                _weights_layer(_weights_data(weights), basis, total_width, 260),
            ],
            resolve=alt.Resolve(
                scale={
                    "color": "independent",
                    "opacity": "independent",
                    "xOffset": "independent",
                }
            ),
        )
    return concatenated(
        "h",
        [
            _histogram_layer(shown, measure, int(total_width * 0.52), 300),
            _weights_layer(_weights_data(weights), basis, int(total_width * 0.38), 300),
        ],
        resolve=alt.Resolve(
            scale={"color": "independent", "opacity": "independent", "xOffset": "independent"}
        ),
    )


def _no_load(bins: pd.DataFrame) -> str:
    rows = bins[bins["band"] == "no load"]
    if not len(rows):
        return ""
    if has_scenarios(rows):
        parts = [
            f"{k}: {int(h):,} h" for k, h in zip(rows[SCENARIO_COLUMN], rows["hours"], strict=True)
        ]
        return "Hours with no load, not shown: " + ", ".join(parts)
    return f"Hours with no load, not shown: {int(rows['hours'].iloc[0]):,} h"


@chart_builder
def load_distribution_chart(
    curves: pd.DataFrame,
    lines: pd.DataFrame | None = None,
    bins: pd.DataFrame | None = None,
    weights: pd.DataFrame | None = None,
    measure: str = "hours",
    system=None,
    title: str | None = None,
    width: int | None = None,
):
    """Chart 3 in one piece: load-duration curves above, part-load histogram and weights below.

    Parameters are those of :func:`load_duration_chart` and :func:`part_load_chart`;
    ``width`` [px] is the curves' plot width, shared below by the histogram and the weights.

    Returns
    -------
    altair.VConcatChart (or a LayerChart when ``bins`` is None)
    """
    system = frame_system(curves, system)
    _check_measure(measure)
    top = _curves_layer(curves, lines, system, plot_width(width), 360)
    subtitle = [_curve_subtitle(curves)]
    if bins is None:
        chart = top
    else:
        chart = concatenated(
            "v",
            [top, _part_load_panels(bins, weights, measure, plot_width(width))],
            resolve=alt.Resolve(
                scale={
                    "color": "independent",
                    "strokeDash": "independent",
                    "opacity": "independent",
                }
            ),
        )
        if _no_load(bins):
            subtitle.append(_no_load(bins))
    return themed(
        chart,
        title=title or "How the year's load spreads over the plant",
        subtitle=subtitle,
        datasets=_datasets(curves, lines, bins, weights, system),
    )
