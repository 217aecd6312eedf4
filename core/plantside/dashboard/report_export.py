"""The dashboard's "Design report (HTML)" export: the report of what is on screen.

:class:`DesignReportExport` builds :func:`plantside.charts.report.design_report_html`
from the dashboard state's current result (the last valid one, the one the figures and
charts show) and the pinned "A" seen on the same air handler, in the units on show,
for the view on show (the plant, or the air handler chosen), and hands the bytes to
the page's :class:`~plantside.dashboard.download.BrowserDownload`. The study it reports
is the study layer's own (:func:`plantside.study.run.assemble_plants` of the air
handlers' results already computed), so its plant figures, cautions and water side are
those ``plantside design`` gives for the same inputs; nothing is recomputed a second way.
"""

from __future__ import annotations

from datetime import datetime
from types import SimpleNamespace

from plantside.charts.export import safe_filename
from plantside.charts.report import design_report_html
from plantside.study.run import assemble_plants

__all__ = ["DesignReportExport", "dashboard_report_html", "result_study"]

#: Media type of the report.
REPORT_MIME = "text/html"


def result_study(state, result):
    """The study (:class:`~plantside.study.run.StudyResult`) of a dashboard result.

    Its scenario is the state's scenario with that result's inputs applied, made by
    the state's own :meth:`~plantside.dashboard.state.DashboardState.current_scenario`
    (what "Save scenario" writes), given the result's inputs instead of the inputs on
    the page: a refused move leaves the page's inputs ahead of the result on show.
    """
    as_of = SimpleNamespace(scenario=state.scenario, inputs=result.inputs)
    scenario = type(state).current_scenario(as_of)
    return assemble_plants(
        scenario,
        result.climate.weather,
        result.climate.conditions,
        tuple(unit.study for unit in result.units),
    )


def dashboard_report_html(state, when: datetime | None = None) -> str:
    """The design report of the view on show: figures, charts (A and B when pinned),
    coil schedule, water side, cautions (with the notes of settings carried along),
    inputs; in the units on show."""
    result = state.result
    pinned = state.pinned_result()  # A, on the air handler shown now
    index = result.inputs.air_handler
    return design_report_html(
        result_study(state, result),
        state.inputs.unit_system,
        result_study(state, pinned) if pinned is not None else None,
        sections=[None] if state.view == "plant" else [index],
        shown=index,
        climate=result.climate.source,
        pinned_climate=pinned.climate.source if pinned is not None else None,
        notes=state.carried_notes(),
        when=when,
        separate_process=True,  # the kernel does not keep vl-convert's engine (~90 MB)
    )


class DesignReportExport:
    """Sends the design report of what the dashboard shows to the browser.

    Parameters
    ----------
    state : DashboardState
    download : BrowserDownload
        The dashboard's download widget.
    """

    def __init__(self, state, download):
        self.state = state
        self.download = download

    def file_name(self) -> str:
        """``<study>-<plant or air handler>-design-report.html``."""
        state = self.state
        shown = "plant" if state.view == "plant" else state.result.unit.name
        stem = f"{state.scenario.title.split(':')[0]}-{shown}-design-report"
        return safe_filename(stem.replace(" ", "-").lower()) + ".html"

    def export(self) -> str:
        """Build the report and send it; returns the file name sent."""
        data = dashboard_report_html(self.state).encode("utf-8")
        return self.download.send_file(data, self.file_name(), REPORT_MIME)
