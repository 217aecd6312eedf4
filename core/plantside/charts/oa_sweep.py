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

from .compare import SCENARIO_COLUMN, SCENARIO_LABELS, has_scenarios, scenario_dash, scenarios_in
from .frames import axis_title, frame_system, value_format
from .palette import (
    BACKGROUND,
    CATEGORY_COLOURS,
    COIL,
    INK,
    PLANT,
    REFERENCE,
    WIDTH,
    ZONE,
    chart_builder,
    layered,
    themed,
)

__all__ = ["oa_sweep_chart"]

_SERIES_COLOURS = {
    "Coil total": COIL,
    "Coil sensible": "#009E73",  # Okabe-Ito bluish green
    "Coil latent": "#56B4E9",  # Okabe-Ito sky blue
    "Zone load": ZONE,
    "Year's peak coil load": PLANT,
}


def _scale(names) -> alt.Scale:
    spare = iter(CATEGORY_COLOURS[3:] * 3)
    return alt.Scale(
        domain=list(names), range=[_SERIES_COLOURS.get(n) or next(spare) for n in names]
    )


@chart_builder
def oa_sweep_chart(
    sweep: pd.DataFrame,
    marker: pd.DataFrame | None = None,
    system=None,
    title: str | None = None,
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
    y = alt.Y("load:Q", title=power)
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
        for halo in (True, False):  # a white halo under the label keeps it clear of the line
            layers.append(
                alt.Chart(named)
                .mark_text(
                    align="left",
                    dx=9,
                    dy=-9,
                    fontSize=15,
                    fontWeight="bold",
                    color=INK,
                    **(
                        {"stroke": BACKGROUND, "strokeWidth": 4, "strokeJoin": "round"}
                        if halo
                        else {}
                    ),
                )
                .encode(x=x, y=y, text=alt.Text("text:N"))
            )
        subtitle = _marker_text(marker)
    chart = layered(layers, width=WIDTH, height=400)
    return themed(
        chart,
        title=title or "Coil design load against outdoor air",
        subtitle=subtitle,
        datasets=datasets,
    )


def _marker_text(marker: pd.DataFrame) -> str:
    keys = scenarios_in(marker)
    if not keys:
        return f"Current setting: {marker['outdoor_air_percent'].iloc[0]:.0f} % outdoor air"
    parts = []
    for key in keys:
        value = marker.loc[marker[SCENARIO_COLUMN] == key, "outdoor_air_percent"].iloc[0]
        parts.append(f"{SCENARIO_LABELS[key]} {value:.0f} %")
    return "Settings: " + ", ".join(parts) + " outdoor air"
