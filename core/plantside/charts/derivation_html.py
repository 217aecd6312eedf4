""" "How this is worked out": a derivation as an HTML disclosure, for the page and the report.

:func:`derivation_html` renders one :class:`plantside.study.derivations.Derivation`
as a ``<details>`` element (a native disclosure: focusable, opened with Enter or
Space, read by screen readers as a button) holding the steps with the study's
numbers, the air states and the source. Every text is escaped; the style is inline
(:data:`DERIVATION_STYLE`) so the block reads the same in a widget and in the
self-contained report. :func:`view_derivations` gathers the derivations of one view
of the charts (:class:`plantside.charts.study_frames.ChartView`) and
:func:`report_derivations` gives the design report its hook.
"""

from __future__ import annotations

import html
from collections.abc import Iterable, Sequence

from plantside.charts.design_breakdown_frames import BREAKDOWN_COMPONENTS, BREAKDOWN_OPTIONAL
from plantside.charts.palette import INK_SOFT
from plantside.study.derivations import (
    HEADLINE_KEYS,
    Derivation,
    chart_derivations,
    headline_derivations,
    number_text,
)
from plantside.study.figures import headline_figures, view_loads

__all__ = [
    "DERIVATION_STYLE",
    "FIGURE_NAMES",
    "derivation_html",
    "derivations_html",
    "figure_name",
    "report_derivations",
    "view_derivations",
]


#: Names of the headline figures as the views label them (air handler / plant).
FIGURE_NAMES = {
    "design_zone_load": ("Design zone load", "Design zone load"),
    "design_coil_load": ("Design coil load", "Design plant load"),
    "coil_to_zone_ratio": ("Design coil load / zone load", "Design plant load / zone load"),
    "governing_condition": ("Governing design condition", "Governing design condition"),
    "recommended_capacity": ("Recommended capacity", "Recommended capacity"),
    "peak_coil_load": ("Peak coil load, year", "Peak plant load, year"),
    "cooling_energy": ("Cooling energy, year", "Cooling energy, year"),
    "hours_above_threshold": ("Hours above 75 % of capacity", "Hours above 75 % of capacity"),
}

#: Names of the charts in a summary line.
CHART_NAMES = {
    "design": "the design-load chart",
    "year": "the year chart",
    "distribution": "the load-distribution chart",
    "psychrometric": "the psychrometric chart",
    "sweep": "the outdoor-air chart",
    "water": "the water side",
}

#: The disclosure's style: readable at 1280 px (steps wrap, the state table scrolls
#: sideways in its own box when narrow), the summary underlined as a control.
DERIVATION_STYLE = (
    "<style>"
    ".ps-derivation{margin:4px 0;font-size:13px;line-height:1.45;max-width:100%}"
    ".ps-derivation>summary{cursor:pointer;color:#1a4f8b;text-decoration:underline;"
    "padding:2px 0}"
    ".ps-derivation>summary:focus-visible{outline:2px solid #1a4f8b;outline-offset:2px}"
    ".ps-derivation-body{border-left:3px solid #c9d3de;padding:4px 0 4px 10px;margin:4px 0}"
    ".ps-derivation ol{margin:4px 0;padding-left:22px}"
    ".ps-derivation li{margin:2px 0;overflow-wrap:anywhere;font-variant-numeric:tabular-nums}"
    ".ps-derivation-states{overflow-x:auto}"
    ".ps-derivation table{border-collapse:collapse;font-size:12px;margin:4px 0}"
    ".ps-derivation caption{text-align:left;font-weight:600}"
    ".ps-derivation th,.ps-derivation td{padding:1px 8px;text-align:right;"
    "border-bottom:1px solid #e3e7ec}"
    ".ps-derivation th:first-child,.ps-derivation td:first-child{text-align:left}"
    f".ps-derivation-source{{color:{INK_SOFT};margin:4px 0}}"
    "@media print{.ps-derivation>summary{text-decoration:none}}"
    "</style>"
)


def figure_name(key: str, plant: bool) -> str:
    """A headline figure's name as the plant view or the air-handler view shows it (the
    cards and their derivations: a plant's loads include the distribution gain)."""
    names = FIGURE_NAMES[key]
    return names[1] if plant else names[0]


def _name(derivation: Derivation, plant: bool) -> str:
    if derivation.key in FIGURE_NAMES:
        return figure_name(derivation.key, plant)
    return CHART_NAMES.get(derivation.key, derivation.key)


def derivation_html(
    derivation: Derivation, *, plant: bool = False, opened: bool = False, style: bool = True
) -> str:
    """One derivation as a ``<details>`` disclosure ("How this is worked out").

    Parameters
    ----------
    derivation : Derivation
    plant : bool
        Name the figure as the plant view does ("Design plant load").
    opened : bool
        Open from the start (a printed report shows what a click would).
    style : bool
        Include :data:`DERIVATION_STYLE` (leave out when the page already has it).

    Returns
    -------
    str
        HTML text; every piece of text escaped.
    """
    e = html.escape
    name = _name(derivation, plant)
    steps = "".join(f"<li>{e(step)}</li>" for step in derivation.steps)
    states = ""
    if derivation.state_points:
        drybulb, humidity, enthalpy, rh = derivation.units
        rows = "".join(
            f"<tr><td>{e(p.name)}</td><td>{number_text(p.drybulb, 1)}</td>"
            f"<td>{number_text(p.humidity_ratio, 1)}</td><td>{number_text(p.enthalpy, 1)}</td>"
            f"<td>{number_text(p.relative_humidity, 0)}</td></tr>"
            for p in derivation.state_points
        )
        states = (
            "<div class='ps-derivation-states'><table><caption>Air states</caption>"
            f"<thead><tr><th scope='col'>state</th><th scope='col'>dry bulb [{e(drybulb)}]</th>"
            f"<th scope='col'>humidity ratio [{e(humidity)}]</th>"
            f"<th scope='col'>enthalpy [{e(enthalpy)}]</th><th scope='col'>RH [{e(rh)}]</th>"
            f"</tr></thead><tbody>{rows}</tbody></table></div>"
        )
    return (
        f"{DERIVATION_STYLE if style else ''}"
        f"<details class='ps-derivation' data-derivation='{e(derivation.key, quote=True)}'"
        f"{' open' if opened else ''}>"
        f"<summary>How this is worked out: {e(name)}</summary>"
        f"<div class='ps-derivation-body'>"
        f"<p>{e(derivation.title)}: <b>{e(derivation.value_text)}</b></p>"
        f"<ol>{steps}</ol>{states}"
        f"<p class='ps-derivation-source'><b>Source:</b> {e(derivation.source)}</p>"
        "</div></details>"
    )


def derivations_html(
    derivations: Iterable[Derivation], *, plant: bool = False, opened: bool = False
) -> str:
    """Several derivations, one disclosure each, with the style once."""
    parts = [derivation_html(d, plant=plant, opened=opened, style=False) for d in derivations]
    return f"{DERIVATION_STYLE}<div class='ps-derivations'>{''.join(parts)}</div>"


def view_derivations(scenario, units: Sequence, view, system, *, water_side=None) -> dict:
    """The derivations of one view of the charts: its headline figures, then its charts.

    Parameters
    ----------
    scenario : Scenario
        The study as run.
    units : sequence of AirHandlerResult
        Every air handler, in scenario order.
    view : ChartView
        :class:`plantside.charts.study_frames.ChartView` (figures, loads, the unit
        shown, its sweep).
    system : {"IP", "SI"}
    water_side : WaterSideResult, optional
        The study's water side (a ``"water"`` derivation with it).

    Returns
    -------
    dict of str to Derivation
        :data:`plantside.study.derivations.HEADLINE_KEYS`, then the chart names.
    """
    shown = next((i for i, unit in enumerate(units) if unit is view.unit), None)
    if shown is None:  # a view built from copies: the air handler of the same name
        names = [unit.name for unit in units]
        if view.unit.name not in names:
            raise KeyError(f"the view's air handler {view.unit.name!r} is not one of {names}")
        shown = names.index(view.unit.name)
    index = None if view.plant else shown
    out = headline_derivations(scenario, units, view.figures, system, index, view.loads)
    out.update(
        chart_derivations(
            scenario,
            units,
            view.figures,
            system,
            index,
            view.loads,
            shown=shown,
            sweep=view.sweep,
            outdoor_air_fraction=view.outdoor_air_fraction,
            breakdown=BREAKDOWN_COMPONENTS,
            breakdown_optional=BREAKDOWN_OPTIONAL,
            water_side=water_side,
        )
    )
    return out


def report_derivations(result, system, *, water_side=None, opened: bool = True):
    """The design report's hook: ``render(name, key, view) -> str``.

    ``name`` is a chart of the view (``"design"``, ..., ``"sweep"``), ``"water"``
    or ``"figures"`` (the plant's headline figures when ``view`` is None, else the
    view's). The derivations of a view are worked out once and kept.

    Parameters
    ----------
    result : StudyResult
    system : {"IP", "SI"}
    water_side : WaterSideResult, optional
        :func:`plantside.study.water_side_run.run_water_side` of ``result``.
    opened : bool
        Disclosures open (the printed page shows them).
    """
    scenario = result.scenario
    units = result.air_handlers
    kept: dict = {}

    def render(name, key, view) -> str:
        if view is None:
            gain = float(scenario.distribution_gain_percent)
            loads = view_loads(units, gain, key)
            figures = headline_figures(
                scenario, units, result.conditions, scenario.cooling_design_percent, key, loads
            )
            wanted = headline_derivations(scenario, units, figures, system, key, loads)
            if name == "water" and water_side is not None:
                wanted = chart_derivations(
                    scenario, units, figures, system, key, loads, water_side=water_side
                )
        else:
            if key not in kept:
                kept[key] = view_derivations(scenario, units, view, system, water_side=water_side)
            wanted = kept[key]
        plant = key is None
        if name == "figures":
            return derivations_html((wanted[k] for k in HEADLINE_KEYS), plant=plant, opened=opened)
        if name not in wanted:
            return ""
        return derivation_html(wanted[name], plant=plant, opened=opened)

    return render
