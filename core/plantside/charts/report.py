"""The design report: one self-contained HTML file that prints cleanly to PDF.

:func:`design_report_html` puts together, from a study's results, what a design
report needs: headline figures, the cooling and heating plant, the cautions, the
coil schedule and the water side, the five charts of each view as inline SVG, the
derivation of each figure and chart, and every input, in the units asked for. It
computes nothing a second way: the charts are those of the dashboard and
``plantside charts`` (:mod:`plantside.charts.study_frames`, rendered by
:func:`plantside.charts.export.chart_bytes`), the figures
:func:`plantside.study.figures.headline_figures` (in the views), the tables
:mod:`plantside.charts.tables`, the water side
:func:`plantside.study.water_side_run.run_water_side` (as ``plantside design
--json``), the cautions those of the study (as the command line prints them). The
file fetches nothing and runs no script: styles inline (:mod:`plantside.charts.
report_style`), charts as SVG elements, links only to its own sections.
"""

from __future__ import annotations

import html
import re
from collections.abc import Sequence
from datetime import datetime

from plantside import __version__
from plantside.air_handler.coil_schedule import coil_schedule
from plantside.charts.compare import combine_scenarios
from plantside.charts.derivation_html import DERIVATION_STYLE, report_derivations
from plantside.charts.export import ChartImage, chart_images
from plantside.charts.labels import change_against_a_text, condition_text
from plantside.charts.report_inputs import inputs_html
from plantside.charts.report_style import REPORT_CSS
from plantside.charts.study_frames import (
    CHARTS,
    ChartView,
    chart_frames,
    study_chart,
    study_chart_views,
)
from plantside.charts.tables import coil_schedule_table, html_table, water_side_html
from plantside.errors import PlantsideError
from plantside.study.figures import PART_LOAD_THRESHOLD, climate_label, first_recirculating_unit
from plantside.study.run import GENERAL_CAUTIONS
from plantside.study.water_side_run import run_water_side
from plantside.units import UnitSystem, display_text, to_display

__all__ = ["CHART_TITLES", "HEADLINE_FIGURES", "design_report_html", "inline_svg"]

#: The five charts in the report's words (what each shows).
CHART_TITLES = {
    "design": "Design load, from the zone loads to the coil or plant",
    "year": "The year hour by hour: coil or plant load against zone load",
    "distribution": "How the year's load spreads over the capacity",
    "psychrometric": "Design process on the psychrometric chart",
    "sweep": "Design coil load against outdoor-air fraction",
}

#: Headline figures: attribute of :class:`~plantside.study.figures.HeadlineFigures`,
#: label, quantity (``None`` for a number shown as it is) and decimals.
HEADLINE_FIGURES = (
    ("design_zone_load", "Design zone load (sensible + latent)", "power", None),
    ("design_coil_load", "Design coil load (plant: plant load)", "power", None),
    ("coil_to_zone_ratio", "Design coil load / zone load", None, 2),
    ("recommended_capacity", "Recommended capacity (design load + margin)", "power", None),
    ("peak_coil_load", "Peak load of the year", "power", None),
    ("cooling_energy", "Cooling energy of the year", "energy", None),
    (
        "hours_above_threshold",
        f"Hours above {100 * PART_LOAD_THRESHOLD:.0f} % of the recommended capacity",
        "hours",
        0,
    ),
)

_ID = re.compile(r'\bid="([^"]+)"')


def inline_svg(svg: str, prefix: str, label: str) -> str:
    """An SVG file's text as an element for an HTML page.

    Element ids get ``prefix`` (with their ``url(#...)`` and ``href="#..."``
    references), so two charts in one page never share an id (a second chart's
    legend gradient would otherwise be drawn with the first's); the XML
    declaration is dropped; the element is named for a screen reader
    (``role="img"``, ``aria-label``).
    """
    text = re.sub(r"^\s*<\?xml[^>]*\?>\s*", "", svg)
    ids = set(_ID.findall(text))
    for name in sorted(ids, key=len, reverse=True):
        quoted = re.escape(name)
        text = re.sub(rf'\bid="{quoted}"', f'id="{prefix}{name}"', text)
        text = re.sub(rf"url\(#{quoted}\)", f"url(#{prefix}{name})", text)
        text = re.sub(rf'href="#{quoted}"', f'href="#{prefix}{name}"', text)
    attrs = f' role="img" aria-label="{html.escape(label, quote=True)}"'
    return re.sub(r"<svg\b", "<svg" + attrs, text, count=1)


def _value_text(quantity, value, digits, system) -> tuple[str, str]:
    """A figure in ``system``; ``digits`` None: none from 100 up, else one (the dashboard's)."""
    if quantity is None:
        return f"{float(value):,.{digits}f}", "-"
    if quantity == "hours":
        return f"{int(value):,}", "h"
    number, unit = to_display(quantity, value, system)
    number = float(number)
    if digits is None:
        digits = 0 if abs(number) >= 100 else 1
    return f"{number:,.{digits}f}", unit


def _view_name(key, view: ChartView) -> str:
    return "Plant" if key is None else f"Air handler {view.unit.name}"


def _anchor(key) -> str:
    return "plant" if key is None else f"unit-{key}"


def _figures_table(sections, system) -> str:
    """Headline figures, one column per view (A, B and their change when pinned)."""
    head = ["<th scope='col'>figure</th>", "<th scope='col'>unit</th>"]
    for key, view, pinned in sections:
        name = html.escape(_view_name(key, view))
        if pinned is not None:
            head += [f"<th scope='col'>{name}: A</th>", f"<th scope='col'>{name}: B</th>"]
            head.append("<th scope='col'>B against A</th>")
        else:
            head.append(f"<th scope='col'>{name}</th>")
    rows = []
    for field, label, quantity, digits in HEADLINE_FIGURES:
        unit = _value_text(quantity, 0.0, digits, system)[1]
        cells = []
        for key, view, pinned in sections:
            value = getattr(view.figures, field)
            shown = [(pinned, "A"), (view, "B")] if pinned is not None else [(view, "")]
            for source, tag in shown:
                figure = getattr(source.figures, field)
                cells.append(
                    f"<td data-view='{_anchor(key)}' data-figure='{field}' data-scenario='{tag}'"
                    f" data-si='{float(figure)!r}'>"
                    f"{_value_text(quantity, figure, digits, system)[0]}</td>"
                )
            if pinned is not None:
                before = getattr(pinned.figures, field)
                cells.append(f"<td>{change_against_a_text(value, before)}</td>")
        rows.append(
            f"<tr><th scope='row'>{html.escape(label)}</th><td>{html.escape(unit)}</td>"
            f"{''.join(cells)}</tr>"
        )
    governing = []
    for _, view, pinned in sections:
        shown = [pinned, view] if pinned is not None else [view]
        governing += [
            f"<td class='ps-note'>{html.escape(condition_text(v.figures.governing, system))}</td>"
            for v in shown
        ]
        if pinned is not None:
            governing.append("<td></td>")
    rows.append(
        "<tr><th scope='row'>Governing cooling design condition</th><td></td>"
        f"{''.join(governing)}</tr>"
    )
    return (
        "<div class='ps-wide'><table class='ps-table ps-figures'>"
        "<caption>Headline figures (the plant's design load includes the distribution gain "
        "and any morning pick-up allowance)</caption>"
        f"<thead><tr>{''.join(head)}</tr></thead><tbody>{''.join(rows)}</tbody></table></div>"
    )


def _plants_table(result, system) -> str:
    """The cooling and heating plant: design load, margin, capacity, peak, energy."""
    scenario = result.scenario
    cooling_kind = str(result.cooling.design_table["plant_kW"].idxmax())
    conditions = {
        "cooling": result.conditions.cooling(cooling_kind, scenario.cooling_design_percent),
        "heating": result.conditions.heating(scenario.heating_design_percent),
    }
    rows = []
    for plant, power, energy in (
        (result.cooling, "power", "energy"),
        (result.heating, "heating_power", "heating_energy"),
    ):
        cells = [
            _value_text(power, plant.design_load, None, system),
            (f"{plant.margin_percent:g}", "%"),
            _value_text(power, plant.design_capacity, None, system),
            _value_text(power, plant.annual_peak, None, system),
            _value_text(energy, plant.annual_energy, None, system),
        ]
        rows.append(
            f"<tr><th scope='row'>{plant.kind.capitalize()}</th>"
            + "".join(
                f"<td data-plant='{plant.kind}' data-si='{float(si)!r}'>{text} {unit}</td>"
                for (text, unit), si in zip(
                    cells,
                    (
                        plant.design_load,
                        plant.margin_percent,
                        plant.design_capacity,
                        plant.annual_peak,
                        plant.annual_energy,
                    ),
                    strict=True,
                )
            )
            + f"<td class='ps-note'>{html.escape(condition_text(conditions[plant.kind], system))}"
            "</td></tr>"
        )
    return (
        "<table class='ps-table ps-figures'><caption>Cooling and heating plant</caption>"
        "<thead><tr><th>plant</th><th>design load</th><th>margin</th><th>design capacity</th>"
        "<th>peak of the year</th><th>energy of the year</th><th>design condition</th></tr>"
        f"</thead><tbody>{''.join(rows)}</tbody></table>"
    )


#: Columns of the coil schedule's first table (the air); the rest go in the second.
_AIR_COLUMNS = 12


def _schedule_html(result, system) -> str:
    """The coil schedule (:func:`plantside.charts.tables.coil_schedule_table`) as two
    tables, the air side then the loads, each with the air handler and condition, so
    it fits the width of a printed page."""
    table = coil_schedule_table(coil_schedule(result.air_handlers), system)
    keys = list(table.columns[:3])
    parts = []
    for columns, caption in (
        (list(table.columns[:_AIR_COLUMNS]), "Coil schedule: air (the governing row sets it)"),
        (keys + list(table.columns[_AIR_COLUMNS:]), "Coil schedule: loads"),
    ):
        part = table[columns].copy()
        part.attrs = table.attrs
        parts.append(html_table(part, caption))
    return "".join(parts)


def _combined(name: str, current: dict, before: dict | None) -> dict:
    """A's and B's frames of one chart stacked (the dashboard's A/B charts); the
    psychrometric background (lines and outdoor hours) is the current site's only."""
    if before is None:
        return current
    return {
        key: (
            frame
            if name == "psychrometric" and key in ("grid", "density")
            else combine_scenarios({"A": before[key], "B": frame})
        )
        for key, frame in current.items()
    }


def _charts_html(key, view, pinned, system, title, when, caches, derivations, pending) -> str:
    """The view's charts, each SVG left as a marker: the charts of the whole report are
    drawn at once (:func:`_draw_pending`) and ``pending`` collects them."""
    parts = []
    who = _view_name(key, view)
    for number, name in enumerate(CHARTS, start=1):
        frames = chart_frames(name, view, system, caches[0])
        before = chart_frames(name, pinned, system, caches[1]) if pinned is not None else None
        chart = study_chart(name, _combined(name, frames, before), system, view)
        stamp = f"plantside {__version__} · {title} · {who} · {when:%Y-%m-%d %H:%M}"
        label = f"{who}: {CHART_TITLES[name]}"
        marker = f"<!--ps-chart-{len(pending)}-->"
        pending.append((ChartImage(chart, "svg", stamp), f"{_anchor(key)}-{name}-", label))
        parts.append(
            f"<figure class='ps-chart' id='{_anchor(key)}-{name}' data-chart='{name}'>"
            f"{marker}"
            f"<figcaption>Figure {number} of {html.escape(who.lower())}: "
            f"{html.escape(CHART_TITLES[name].lower())}.</figcaption></figure>"
            f"{derivations(name, key, view)}"
        )
    return "".join(parts)


def _draw_pending(document: str, pending, separate_process: bool) -> str:
    """Draw every chart :func:`_charts_html` left as a marker, in one go, and put it in."""
    images = chart_images([image for image, _, _ in pending], separate_process=separate_process)
    for number, (svg, (_, prefix, label)) in enumerate(zip(images, pending, strict=True)):
        marker = f"<!--ps-chart-{number}-->"
        document = document.replace(marker, inline_svg(svg.decode("utf-8"), prefix, label), 1)
    return document


def _cautions_html(result, notes, system) -> str:
    items = [*notes, *(c for c in result.cautions if c not in GENERAL_CAUTIONS)]
    if not items:
        return "<p>The model gave no caution for these inputs.</p>"
    return (
        "<ul class='ps-cautions'>"
        + "".join(f"<li>{html.escape(display_text(c, system))}</li>" for c in items)
        + "</ul>"
    )


def _water_side(result):
    """The study's water side (as ``plantside design --json``), or the error saying why not."""
    try:
        return run_water_side(result)
    except PlantsideError as error:  # said in place of the tables
        return error


def _water_html(result, water, system) -> str:
    if isinstance(water, PlantsideError):
        return f"<p>⚠ {html.escape(display_text(str(water), system))}</p>"
    tables = water_side_html(water, result.scenario.water_side, system)
    return tables or "<p>The scenario has no water-side tables ([plant.chilled_water], ...).</p>"


def design_report_html(
    result,
    system=None,
    pinned=None,
    *,
    sections: Sequence[int | None] | None = None,
    shown: int | None = None,
    climate: str | None = None,
    pinned_climate: str | None = None,
    notes: Sequence[str] = (),
    when: datetime | None = None,
    separate_process: bool = False,
) -> str:
    """The design report of a study as one self-contained HTML page.

    Parameters
    ----------
    result : StudyResult
        :func:`plantside.study.run.run_study` (or :func:`~plantside.study.run.
        assemble_plants` of results already computed, as the dashboard's); its
        ``scenario`` is the study as run, with any changed setting.
    system : {"IP", "SI"}, optional
        Units of the figures, tables and charts (default: the scenario's). The
        inputs are listed in the scenario's own units, as its file gives them.
    pinned : StudyResult, optional
        A study pinned as "A": its figures beside the current ("B") ones, its
        curves and points drawn in the same charts, its differing settings named.
    sections : sequence of (int or None), optional
        The views to report: ``None`` for the plant, an index for an air handler
        (default: the plant, then every air handler, as ``plantside charts``).
    shown : int, optional
        The air handler the plant view's psychrometric and outdoor-air charts
        show (default: the first with return air).
    climate, pinned_climate : str, optional
        The climates as the views name them (default:
        :func:`plantside.study.figures.climate_label`).
    notes : sequence of str
        More lines for the cautions, before the study's (e.g. settings the
        dashboard carried with a control).
    when : datetime, optional
        Time printed on the report (default: now).
    separate_process : bool
        Draw the charts in a child process (a dashboard kernel; see
        :func:`plantside.charts.export.chart_images`).

    Returns
    -------
    str
        The HTML document (UTF-8 text), with no external URL and no script.
    """
    scenario = result.scenario
    system = UnitSystem.parse(system if system is not None else scenario.unit_system).value
    when = datetime.now() if when is None else when
    shown = first_recirculating_unit(scenario) if shown is None else int(shown)
    climate = climate_label(scenario) if climate is None else climate
    views = dict(study_chart_views(result, climate, shown))
    keys = list(views) if sections is None else list(sections)
    for key in keys:
        if key not in views:
            raise KeyError(f"no view {key!r}; the plant (None) or 0..{len(views) - 2}")
    pinned_views = {}
    if pinned is not None:
        pinned_climate = (
            climate_label(pinned.scenario) if pinned_climate is None else pinned_climate
        )
        pinned_views = dict(study_chart_views(pinned, pinned_climate, shown))
    chosen = [(key, views[key], pinned_views.get(key)) for key in keys]
    title = scenario.title
    water = _water_side(result)
    hook = report_derivations(
        result,
        system,
        water_side=None if isinstance(water, PlantsideError) else water,
        opened=True,  # the printed page shows what a click would
    )

    def derivations(name, key, view) -> str:
        # the disclosures' style sheet is in the page's head, once
        return hook(name, key, view).replace(DERIVATION_STYLE, "")

    what = ", ".join(_view_name(key, view) for key, view, _ in chosen)
    if None in keys:  # the plant view's psychrometric and outdoor-air charts show one unit
        what += f" (the plant's unit charts show {views[None].unit.name})"
    meta = [
        ("Study", title),
        ("Site", f"{result.weather.site} ({climate}; {result.weather.hours:,} h of weather)"),
        (
            "Design conditions",
            f"cooling {scenario.cooling_design_percent:g} %, heating "
            f"{scenario.heating_design_percent:g} %",
        ),
        ("Shown", what),
        ("Units", f"{system} (inputs in the scenario's {scenario.unit_system})"),
        ("Made", f"{when:%Y-%m-%d %H:%M} with plantside {__version__}"),
    ]
    if pinned is not None:
        meta.append(("Compared", f"A: a pinned study ({pinned_climate}); B: the current one"))
    meta_html = "".join(
        f"<tr><th scope='row'>{html.escape(k)}</th><td>{html.escape(v)}</td></tr>" for k, v in meta
    )
    caution = "".join(f"<p>{html.escape(text)}</p>" for text in GENERAL_CAUTIONS)
    chart_sections = []
    caches = ({}, {})
    pending: list = []
    for key, view, before in chosen:
        chart_sections.append(
            f"<section class='ps-section' id='{_anchor(key)}'>"
            f"<h2>{html.escape(_view_name(key, view))}: figures and charts</h2>"
            f"<h3>How the headline figures are worked out</h3>{derivations('figures', key, view)}"
            "<h3>Charts</h3>"
            f"{_charts_html(key, view, before, system, title, when, caches, derivations, pending)}"
            "</section>"
        )
    toc = [
        ("figures", "Headline figures"),
        ("cautions", "Cautions for these inputs"),
        ("schedule", "Coil schedule"),
        ("water", "Water side"),
        *(
            (_anchor(key), f"{_view_name(key, view)}: figures and charts")
            for key, view, _ in chosen
        ),
        ("inputs", "Inputs"),
    ]
    toc_html = "".join(f"<li><a href='#{a}'>{html.escape(t)}</a></li>" for a, t in toc)
    schedule = _schedule_html(result, system)
    body = (
        f"<header><h1>Design report: {html.escape(title)}</h1>"
        f"<table class='ps-meta'>{meta_html}</table></header>"
        f"<main><div class='ps-caution' role='note'><p><b>Caution.</b></p>{caution}</div>"
        f"<nav class='ps-toc' aria-label='Contents'><b>Contents</b><ol>{toc_html}</ol></nav>"
        f"<section id='figures'><h2>Headline figures</h2>{_figures_table(chosen, system)}"
        f"<div class='ps-keep'>{_plants_table(result, system)}</div></section>"
        f"<section id='cautions'><h2>Cautions for these inputs</h2>"
        f"{_cautions_html(result, notes, system)}</section>"
        "<section id='schedule'><h2>Coil schedule</h2>"
        f"<div class='ps-wide ps-schedule'>{schedule}</div></section>"
        f"<section id='water'><h2>Water side</h2><div class='ps-wide'>"
        f"{_water_html(result, water, system)}</div>{derivations('water', None, None)}</section>"
        f"{''.join(chart_sections)}"
        f"<section class='ps-section' id='inputs'><h2>Inputs</h2>"
        f"{inputs_html(scenario, pinned.scenario if pinned is not None else None)}</section></main>"
        f"<footer>plantside {__version__} · {when:%Y-%m-%d %H:%M} · {html.escape(title)} · "
        "a preliminary design aid, for review by a licensed engineer under the local codes."
        "</footer>"
    )
    document = (
        "<!DOCTYPE html>\n<html lang='en'><head><meta charset='utf-8'>"
        "<meta name='viewport' content='width=device-width, initial-scale=1'>"
        f"<title>Design report: {html.escape(title)}</title>"
        f"<style>{REPORT_CSS}</style>{DERIVATION_STYLE}</head><body>{body}</body></html>\n"
    )
    return _draw_pending(document, pending, separate_process)
