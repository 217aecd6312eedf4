"""The whole plant on the plant page: the cooling and the heating plant side by side.

For each plant, from the study's own :class:`plantside.study.run.PlantResult` (the
state's :meth:`~plantside.dashboard.state_results.ResultAssembly.plants`, i.e.
:func:`plantside.study.run.assemble_plants` of the air handlers' years, as
``plantside design`` gives it): the design load and its condition, the margin and the
design capacity, the year's peak and energy; a load-duration curve with the stage lines
of the plant option chosen on the page (named in the title); the part-load hours; and
every option's staging (machines, hours unmet, hours below the lowest stable load,
starts, the chosen option's hours per number of machines running). Nothing is computed
here a second way: the panel reads the tables and converts units for display.

Heating is in kW (SI) or MBH, MMBtu (I-P), never in tons.
"""

from __future__ import annotations

import html

import altair as alt
import ipywidgets as widgets
import numpy as np
import pandas as pd

from plantside.charts.compare import SCENARIO_LABELS
from plantside.charts.labels import condition_text
from plantside.charts.palette import COIL, REFERENCE, STAGE, themed
from plantside.plant.staging import PlantOption
from plantside.study.figures import plant_design_condition, plant_option_specs
from plantside.units import display_text, to_display

__all__ = ["PLANT_KINDS", "PlantPanel", "plant_duration_chart"]

#: The two plants: kind -> (title, power quantity, energy quantity, curve colour).
PLANT_KINDS = {
    "cooling": ("Cooling plant", "power", "energy", COIL),
    "heating": ("Heating plant", "heating_power", "heating_energy", REFERENCE),
}

#: Plot width of each plant's chart [px]: two side by side in a 1280 px page's panel.
PLANT_CHART_WIDTH = 330


def _value(quantity: str, value_si, system: str) -> tuple[np.ndarray | float, str]:
    value, unit = to_display(quantity, value_si, system)
    return value, unit


def _number(value: float, digits: int | None = None) -> str:
    value = float(value)
    if digits is None:
        digits = 0 if abs(value) >= 100 else 1
    return f"{value:,.{digits}f}"


def chosen_option(scenario, kind: str, index: int):
    """The option spec of ``kind`` shown (index into the scenario's options)."""
    return plant_option_specs(getattr(scenario, f"{kind}_options"), kind)[index]


def plant_duration_chart(
    plant, plant_options, option_name: str, system: str, width: int | None = None
):
    """Load-duration curve of one plant with its design capacity and the chosen option's
    stage lines (cumulative capacity of the first n machines).

    Parameters
    ----------
    plant : PlantResult
        The study's cooling or heating plant.
    plant_options : tuple of PlantOptionSpec
        The scenario's options of the plant's kind.
    option_name : str
        Name of the plant option whose stages are drawn (a row of ``plant.options``).
    system : {"SI", "IP"}
    width : int, optional
        Plot width [px] (default :data:`PLANT_CHART_WIDTH`).

    Returns
    -------
    altair.LayerChart
    """
    title, quantity, _, colour = PLANT_KINDS[plant.kind]
    curve = plant.duration
    load, unit = _value(quantity, curve["load_kW"].to_numpy(), system)
    curves = pd.DataFrame(
        {"hours": curve["hours_at_or_above"].to_numpy(), "load": np.asarray(load, dtype=float)}
    )
    spec = next(o for o in plant_option_specs(plant_options, plant.kind) if o.name == option_name)
    # the option's machines as the study places them (its fractions of the design capacity)
    option = PlantOption.from_fractions(
        spec.name, max(plant.design_capacity, 1e-6), spec.capacity_fractions, spec.minimum_turndown
    )
    cumulative = np.cumsum(option.capacities)
    stages = [
        {"line": f"{n} machine{'s' if n > 1 else ''}", "load_kW": float(cumulative[n - 1])}
        for n in range(1, len(cumulative))
    ]
    stages.append({"line": "Design capacity", "load_kW": float(plant.design_capacity)})
    lines = pd.DataFrame(stages)
    lines["load"] = np.asarray(_value(quantity, lines["load_kW"].to_numpy(), system)[0], float)
    top = float(max(curves["load"].max(), lines["load"].max()) * 1.1) or 1.0
    axis_load = f"{'Heating' if plant.kind == 'heating' else 'Cooling'} load [{unit}]"
    base = alt.Chart(curves).encode(
        x=alt.X(
            "hours:Q",
            title="Hours at or above load [h]",
            scale=alt.Scale(domain=[0, 8760], nice=False),
            axis=alt.Axis(values=[0, 2000, 4000, 6000, 8760], format=",d"),
        ),
        y=alt.Y("load:Q", title=axis_load, scale=alt.Scale(domain=[0, top], nice=False)),
    )
    line = base.mark_line(color=colour, strokeWidth=2.5).encode(
        tooltip=[
            alt.Tooltip("hours:Q", title="Hours at or above", format=",d"),
            alt.Tooltip("load:Q", title=axis_load, format=",.1f"),
        ]
    )
    rules = (
        alt.Chart(lines)
        .mark_rule(color=STAGE, strokeDash=[5, 3])
        .encode(
            y="load:Q",
            tooltip=[
                alt.Tooltip("line:N", title="Line"),
                alt.Tooltip("load:Q", title=axis_load, format=",.1f"),
            ],
        )
    )
    labels = (
        alt.Chart(lines)
        .mark_text(align="right", dx=-4, dy=-6, color=STAGE, fontSize=11)
        .encode(y="load:Q", x=alt.value(plot := int(width or PLANT_CHART_WIDTH)), text="line:N")
    )
    chart = alt.layer(line, rules, labels).properties(width=plot, height=240)
    return themed(
        chart,
        title=f"{title}: load-duration curve, option {option_name}",
        subtitle=(
            f"Stage lines: {option_name}; design capacity with {plant.margin_percent:g} % margin"
        ),
    )


class PlantPanel:
    """The cooling and heating plants side by side (plant page).

    Parameters
    ----------
    state : DashboardState

    Attributes
    ----------
    box : ipywidgets.HBox
        The two plants' columns.
    charts : dict of str to altair.JupyterChart
        ``"cooling"`` and ``"heating"`` load-duration charts.
    chart_specs : dict of str to altair chart
        The charts on show (what the exports render).
    tables : dict of str to ipywidgets.HTML
        Each plant's figures and tables.
    """

    def __init__(self, state):
        self.state = state
        self.charts: dict[str, alt.JupyterChart] = {}
        self.chart_specs: dict[str, object] = {}
        self.tables: dict[str, widgets.HTML] = {}
        self.export_rows: dict[str, widgets.HBox] = {}
        self._shown: dict[str, tuple] = {}
        self.columns: dict[str, widgets.VBox] = {}
        for kind in PLANT_KINDS:
            self.tables[kind] = widgets.HTML()
            self.tables[kind].add_class(f"plantside-plant-{kind}")
            self.export_rows[kind] = widgets.HBox([])
            self.export_rows[kind].add_class("plantside-chart-tools")
            self.columns[kind] = widgets.VBox([self.export_rows[kind], self.tables[kind]])
            self.columns[kind].add_class("plantside-plant-column")
        self.box = widgets.HBox([self.columns["cooling"], self.columns["heating"]])
        self.box.add_class("plantside-plant-panel")

    def _key(self, kind: str) -> tuple:
        inputs = self.state.result.inputs
        return (
            id(self.state.result),
            id(self.state.pinned),
            self.state.inputs.unit_system,
            getattr(inputs, f"{kind}_option"),
        )

    def update(self) -> list[str]:
        """Redraw the plants whose result, units or option changed; return their kinds."""
        state = self.state
        plants = state.plants()
        # a pinned "A": its plants by the same function, beside B's in the figures table
        pinned = state.plants(state.pinned) if state.pinned is not None else None
        system = state.inputs.unit_system
        changed = []
        # one set of plants per result: a change of the cooling option redraws both
        for kind in PLANT_KINDS:
            key = self._key(kind)
            if self._shown.get(kind) == key:
                continue
            plant = getattr(plants, kind)
            option = chosen_option(
                state.scenario, kind, getattr(state.result.inputs, f"{kind}_option")
            )
            options = getattr(state.scenario, f"{kind}_options")
            chart = plant_duration_chart(plant, options, option.name, system)
            self.chart_specs[kind] = chart
            if kind not in self.charts:
                self.charts[kind] = alt.JupyterChart(
                    chart, embed_options={"actions": False, "renderer": "canvas"}
                )
                self.charts[kind].add_class(f"plantside-chart-plant_{kind}")
                self.columns[kind].children = (
                    self.export_rows[kind],
                    self.charts[kind],
                    self.tables[kind],
                )
            else:
                self.charts[kind].spec = chart.to_dict()
            pinned_figures = None
            if pinned is not None:
                pinned_figures = (
                    getattr(pinned, kind),
                    plant_design_condition(pinned, kind),
                )
            self.tables[kind].value = plant_tables_html(
                plant,
                option.name,
                system,
                plant_design_condition(plants, kind),
                pinned=pinned_figures,
            )
            self._shown[kind] = key
            changed.append(kind)
        return changed


#: An efficiency metric as the table shows it (AHRI 550/590 writes IPLV in kW/ton, EER
#: or COP).
_METRIC_TEXT = {"kw_per_ton": "kW/ton", "cop": "COP", "eer": "EER"}


def plant_figures(plant, system: str, condition=None) -> list[tuple[str, str]]:
    """One plant's headline figures as (label, text) rows, in display units.

    ``condition`` is the governing design condition as an object
    (:func:`plantside.study.figures.plant_design_condition`), rounded once from SI as
    the header's; without it the plant's own text is converted.
    """
    _, quantity, energy_quantity, _ = PLANT_KINDS[plant.kind]

    def power(v):
        value, unit = _value(quantity, v, system)
        return f"{_number(value)} {unit}"

    bins = plant.bins
    above = int(bins.loc[bins["band"] == "above 100 %", "hours"].sum())
    energy, energy_unit = _value(energy_quantity, plant.annual_energy, system)
    return [
        ("Design load", power(plant.design_load)),
        (
            "Design condition",
            html.escape(
                condition_text(condition, system)
                if condition is not None
                else display_text(str(plant.governing), system)
            ),
        ),
        ("Sizing margin", f"{plant.margin_percent:g} %"),
        ("Design capacity", power(plant.design_capacity)),
        ("Peak hour of the year", power(plant.annual_peak)),
        ("Load energy, year", f"{_number(energy)} {energy_unit}"),
        ("Hours above design capacity", f"{above:,} h"),
    ]


def plant_tables_html(plant, option_name: str, system: str, condition=None, pinned=None) -> str:
    """One plant's figures, part-load hours and staging of every option, as HTML tables.

    ``condition`` is the governing design condition as an object (see
    :func:`plant_figures`). ``pinned`` is ``(plant, condition)`` of the pinned "A" (the
    same kind of plant, from the same functions): then the figures table has a column
    for A beside the current B, and the part says that the curve and the other tables
    are of B only.
    """
    title, quantity, _, _ = PLANT_KINDS[plant.kind]
    bins = plant.bins
    figures = plant_figures(plant, system, condition)
    if pinned is None:
        rows = "".join(f"<tr><th scope='row'>{a}</th><td>{b}</td></tr>" for a, b in figures)
        head = ""
        note = ""
    else:
        before = plant_figures(pinned[0], system, pinned[1])
        rows = "".join(
            f"<tr><th scope='row'>{a}</th><td class='ps-a'>{pa}</td><td>{b}</td></tr>"
            for (a, b), (_, pa) in zip(figures, before, strict=True)
        )
        head = (
            "<tr><th scope='col'>Figure</th>"
            f"<th scope='col'>{SCENARIO_LABELS['A']}</th>"
            f"<th scope='col'>{SCENARIO_LABELS['B']}</th></tr>"
        )
        note = (
            "<p class='plantside-help ps-ab-note'>The curve above and the tables below are "
            f"of {SCENARIO_LABELS['B']} only.</p>"
        )
    parts = [
        f"<h2 class='ps-plant-title'>{title}</h2>",
        f"<table class='ps-table ps-plant-figures'><caption>{title}: design and year"
        f"</caption>{head}{rows}</table>",
        note,
    ]
    band_rows = "".join(
        f"<tr><th scope='row'>{html.escape(str(r.band))}</th><td>{int(r.hours):,}</td>"
        f"<td>{r.percent_of_hours:.1f}</td><td>{r.percent_of_energy:.1f}</td></tr>"
        for r in bins.itertuples()
        if int(r.hours) > 0
    )
    parts.append(
        f"<table class='ps-table'><caption>Part-load hours (share of design capacity)</caption>"
        "<tr><th scope='col'>Band</th><th scope='col'>Hours</th><th scope='col'>% of hours</th>"
        f"<th scope='col'>% of energy</th></tr>{band_rows}</table>"
    )
    option_rows = []
    for r in plant.options.itertuples():
        mark = " class='ps-chosen'" if r.option == option_name else ""
        chosen = " (shown)" if r.option == option_name else ""
        option_rows.append(
            f"<tr{mark}><th scope='row'>{html.escape(str(r.option))}{chosen}</th>"
            f"<td>{html.escape(_machines(r, quantity, system))}</td><td>{int(r.unmet_hours):,}</td>"
            f"<td>{int(r.hours_below_lowest_stable_load):,}</td><td>{int(r.machine_starts):,}</td>"
            f"<td>{float(r.mean_machines_running):.2f}</td></tr>"
        )
    parts.append(
        "<table class='ps-table'><caption>Staging of each option over the year</caption>"
        "<tr><th scope='col'>Option</th><th scope='col'>Machines</th>"
        "<th scope='col'>Hours unmet</th><th scope='col'>Hours below lowest stable load</th>"
        "<th scope='col'>Starts</th><th scope='col'>Mean running</th></tr>"
        f"{''.join(option_rows)}</table>"
    )
    stage = plant.stage_hours[plant.stage_hours["option"] == option_name]
    stage_rows = "".join(
        f"<tr><th scope='row'>{int(r.machines_running)}</th><td>{int(r.hours):,}</td>"
        f"<td>{r.percent_of_hours:.1f}</td></tr>"
        for r in stage.itertuples()
    )
    parts.append(
        f"<table class='ps-table'><caption>Hours by machines running, option "
        f"{html.escape(option_name)}</caption><tr><th scope='col'>Running</th>"
        f"<th scope='col'>Hours</th><th scope='col'>% of hours</th></tr>{stage_rows}</table>"
    )
    if plant.kind == "cooling" and len(plant.efficiency):
        eff_rows = "".join(
            f"<tr{' class=ps-chosen' if r.option == option_name else ''}>"
            f"<th scope='row'>{html.escape(str(r.option))}</th>"
            f"<td>{html.escape(_METRIC_TEXT.get(str(r.metric), str(r.metric)))}</td>"
            f"<td>{r.rated_iplv:.3g}</td><td>{r.project_iplv:.3g}</td></tr>"
            for r in plant.efficiency.itertuples()
        )
        parts.append(
            "<table class='ps-table'><caption>Rated IPLV and the project's weighting "
            "(AHRI 550/590 rating points)</caption><tr><th scope='col'>Option</th>"
            "<th scope='col'>Metric</th><th scope='col'>Rated IPLV</th>"
            f"<th scope='col'>Project</th></tr>{eff_rows}</table>"
        )
    body = "".join(parts)
    return f"<div class='ps-scroll' tabindex='0' role='region' aria-label='{title}'>{body}</div>"


def _machines(row, quantity: str, system: str) -> str:
    count = int(row.machine_count)
    total, unit = _value(quantity, float(row.total_capacity_kW), system)
    return f"{count} machines, {_number(total)} {unit} in all"
