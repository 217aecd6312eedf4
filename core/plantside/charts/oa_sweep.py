"""Chart 5: coil design load against outdoor-air fraction, 0 to 100 %.

One line per quantity of the sweep (e.g. the coil's total, sensible and latent
design load), with the current setting marked by a vertical rule and a point on
each line, so the meeting sees what each step of outdoor air costs the coil.

Frames: :func:`~plantside.charts.frames.oa_sweep_frame` (or
:func:`~plantside.charts.frames.oa_sweep_frame_from_sweep`) and
:func:`~plantside.charts.frames.oa_marker_frame`.
"""

from __future__ import annotations

import altair as alt
import pandas as pd

from plantside.charts.compare import (
    SCENARIO_COLUMN,
    SCENARIO_LABELS,
    axis_top,
    has_scenarios,
    scenario_dash,
    scenarios_in,
    spread_labels,
)
from plantside.charts.frames import axis_title, frame_system, value_format
from plantside.charts.palette import (
    BACKGROUND,
    CATEGORY_COLOURS,
    COIL,
    INK,
    PLANT,
    REFERENCE,
    ZONE,
    chart_builder,
    layered,
    plot_width,
    themed,
)

__all__ = ["oa_sweep_chart"]

_SERIES_COLOURS = {
    "Coil total": COIL,
    "Coil sensible": "#009E73",  # Okabe-Ito bluish green
    "Coil latent": "#CC79A7",  # Okabe-Ito reddish purple (sky blue is under 3:1 on white)
    "Zone load": ZONE,
    "Year's peak coil load": PLANT,
}


#: Colours of series with no role (the design conditions): reddish purple, vermillion, then
#: bluish green; black last, since black is the plant load's colour elsewhere.
_SPARE = (CATEGORY_COLOURS[3], CATEGORY_COLOURS[4], CATEGORY_COLOURS[2], CATEGORY_COLOURS[5])


def _scale(names) -> alt.Scale:
    spare = iter(_SPARE * 3)
    return alt.Scale(
        domain=list(names), range=[_SERIES_COLOURS.get(n) or next(spare) for n in names]
    )


#: Plot height [px] and the least spacing of value labels [px] (15 px bold text).
_HEIGHT = 400
_LABEL_GAP_PX = 19


@chart_builder
def oa_sweep_chart(
    sweep: pd.DataFrame,
    marker: pd.DataFrame | None = None,
    system=None,
    title: str | None = None,
    width: int | None = None,
):
    """Coil design load over outdoor-air fraction 0-100 %, current setting marked.

    Parameters
    ----------
    sweep : pandas.DataFrame
        From :func:`~plantside.charts.frames.oa_sweep_frame`, optionally with
        scenarios (A dashed, B solid).
    marker : pandas.DataFrame, optional
        From :func:`~plantside.charts.frames.oa_marker_frame`: the current
        setting on each line.
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
    system = frame_system(sweep, system)
    names = list(dict.fromkeys(sweep["series"]))
    power = axis_title("Coil design load", "power", system)
    fmt = value_format(sweep["load"])
    x = alt.X(
        "outdoor_air_percent:Q",
        title="Outdoor air fraction [%]",
        scale=alt.Scale(domain=[0, 100], nice=False),
        axis=alt.Axis(values=list(range(0, 101, 10))),
    )
    # a fixed zero-based domain, so label spacing can be set in pixels
    top = axis_top(sweep["load"])
    y = alt.Y("load:Q", title=power, scale=alt.Scale(domain=[0, top], nice=False))
    colour = alt.Color("series:N", title=None, scale=_scale(names))
    encoding = {
        "x": x,
        "y": y,
        "color": colour,
        "tooltip": [
            alt.Tooltip("series:N", title="Series"),
            alt.Tooltip("outdoor_air_percent:Q", title="Outdoor air [%]", format=".0f"),
            alt.Tooltip("load:Q", title=power, format=fmt),
        ],
    }
    detail = [alt.Detail("series:N")]
    if has_scenarios(sweep):
        encoding["strokeDash"] = scenario_dash(sweep)
        encoding["tooltip"].insert(0, alt.Tooltip(f"{SCENARIO_COLUMN}:N", title="Scenario"))
        detail.append(alt.Detail(f"{SCENARIO_COLUMN}:N"))
    encoding["detail"] = detail
    layers = [alt.Chart(alt.NamedData(name="sweep")).mark_line().encode(**encoding)]
    datasets = {"sweep": sweep}
    subtitle = None
    if marker is not None and len(marker):
        data = marker.assign(
            text=[
                f"{format(v, fmt)}" + (f" ({k})" if k else "")
                for v, k in zip(
                    marker["load"],
                    marker[SCENARIO_COLUMN] if has_scenarios(marker) else [""] * len(marker),
                    strict=True,
                )
            ]
        )
        data = _label_places(data, top / _HEIGHT * _LABEL_GAP_PX)
        datasets["marker"] = data
        named = alt.NamedData(name="marker")
        layers.append(
            alt.Chart(named)
            .mark_rule(color=REFERENCE, strokeWidth=2, strokeDash=[3, 3])
            .encode(x=alt.X("outdoor_air_percent:Q"))
        )
        layers.append(
            alt.Chart(named)
            .mark_point(filled=True, size=130, stroke="white", strokeWidth=1.2, opacity=1)
            .encode(x=x, y=y, color=colour, tooltip=encoding["tooltip"])
        )
        label_y = alt.Y("label_load:Q", scale=alt.Scale(domain=[0, top], nice=False))
        for side, align, dx in (("right", "left", 12), ("left", "right", -12)):
            if not (data["label_side"] == side).any():
                continue
            for halo in (True, False):  # a white halo under the label keeps it off the line
                layers.append(
                    alt.Chart(named)
                    .transform_filter(alt.datum.label_side == side)
                    .mark_text(
                        align=align,
                        baseline="middle",
                        dx=dx,
                        fontSize=15,
                        fontWeight="bold",
                        color=INK,
                        **(
                            {"stroke": BACKGROUND, "strokeWidth": 4, "strokeJoin": "round"}
                            if halo
                            else {}
                        ),
                    )
                    .encode(x=x, y=label_y, text=alt.Text("text:N"))
                )
        subtitle = _marker_text(marker)
    note = _single_fraction_note(sweep) if len(sweep) else None
    if note:
        subtitle = [note] if subtitle is None else [subtitle, note]
    chart = layered(layers, width=plot_width(width), height=_HEIGHT)
    return themed(
        chart,
        title=title or "Coil design load against outdoor air",
        subtitle=subtitle,
        datasets=datasets,
    )


#: Outdoor-air fraction [%] beyond which a marker's labels go to its left.
_RIGHT_EDGE_PERCENT = 85.0


def _single_fraction_note(sweep: pd.DataFrame) -> str | None:
    """Why the chart has points but no curves: an air handler without return air runs at
    one outdoor-air fraction (100 %), so there is no fraction to vary."""
    fractions = set(sweep["outdoor_air_percent"].round(6))
    if len(fractions) != 1:
        return None
    return (
        f"This air handler has no return air: it always takes {fractions.pop():.0f} % "
        "outdoor air, so its design coil load cannot vary with the fraction (points only)"
    )


def _label_places(data: pd.DataFrame, gap: float) -> pd.DataFrame:
    """Where each marker's value label goes: ``label_side`` and ``label_load``.

    With A and B pinned, the scenario further left labels to the left of its
    markers and the other to the right; within a side, labels are spread at
    least ``gap`` (one line of text) apart so none prints over another.
    """
    sides = pd.Series("right", index=data.index)
    if has_scenarios(data):
        where = data.groupby(SCENARIO_COLUMN)["outdoor_air_percent"].mean()
        if where.size == 2 and where.iloc[0] != where.iloc[1]:
            sides[data[SCENARIO_COLUMN] == where.idxmin()] = "left"
    # a marker near 100 % labelled to its right would print over the legend
    sides[(data["outdoor_air_percent"] > _RIGHT_EDGE_PERCENT).to_numpy()] = "left"
    places = data["load"].to_numpy(dtype=float).copy()
    for side in ("left", "right"):
        chosen = (sides == side).to_numpy()
        places[chosen] = spread_labels(places[chosen], gap)
    return data.assign(label_side=sides.to_numpy(), label_load=places)


def _marker_text(marker: pd.DataFrame) -> str:
    keys = scenarios_in(marker)
    if not keys:
        return f"Current setting: {marker['outdoor_air_percent'].iloc[0]:.0f} % outdoor air"
    parts = []
    for key in keys:
        value = marker.loc[marker[SCENARIO_COLUMN] == key, "outdoor_air_percent"].iloc[0]
        parts.append(f"{SCENARIO_LABELS[key]} {value:.0f} %")
    return "Settings: " + ", ".join(parts) + " outdoor air"
