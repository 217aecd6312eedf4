"""The design report (charts/report.py, cli/report.py, dashboard/report_export.py).

What is checked against what:

- the figures against ``plantside design --json`` of the same scenario (the study's
  own summary, bit for bit), and their I-P text against the definition of the ton of
  refrigeration, 12,000 Btu/h, with 1 Btu(IT)/h = 0.29307107 W (NIST SP 811, 2008,
  Appendix B.8), i.e. 1 ton = 3.51685 kW;
- the inputs against the scenario file itself (read with tomllib);
- the page against the HTML rules a self-contained file must keep (every tag closed,
  no script, no external URL, one SVG per chart, ids unique in the document).
"""

from __future__ import annotations

import html
import json
import re
import tomllib
from dataclasses import replace
from datetime import datetime
from html.parser import HTMLParser
from pathlib import Path

import pytest
from plantside.charts.report import HEADLINE_FIGURES, design_report_html, inline_svg
from plantside.charts.study_frames import CHARTS
from plantside.cli.main import main
from plantside.study.run import GENERAL_CAUTIONS, run_study
from plantside.study.scenario import load_scenario
from plantside.units import display_text

SCENARIOS = Path(__file__).parents[1] / "example_data" / "scenarios"
CLINIC = SCENARIOS / "quillon_clinic.toml"  # I-P, three air handlers, a water side
OFFICE = SCENARIOS / "linden_office_si.toml"  # SI
WHEN = datetime(2026, 1, 2, 3, 4)
#: kW per ton of refrigeration: 12,000 Btu/h x 0.29307107 W per Btu/h (NIST SP 811, 2008,
#: Appendix B.8).
KW_PER_TON = 12_000 * 0.29307107 / 1000.0
#: HTML elements without an end tag (HTML Living Standard, "void elements").
VOID = {"area", "base", "br", "col", "embed", "hr", "img", "input", "link", "meta", "source",
        "track", "wbr"}  # fmt: skip


class _Page(HTMLParser):
    """Parses a page and records what the checks need; fails on an unclosed element."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.open: list[str] = []
        self.errors: list[str] = []
        self.tags: list[tuple[str, dict]] = []
        self.svg_parents: list[str] = []
        self.figures: list[dict] = []
        self.cells: list[dict] = []
        self._cell: dict | None = None
        self._svg_depth = 0

    def handle_starttag(self, tag, attrs):
        attributes = dict(attrs)
        self.tags.append((tag, attributes))
        if tag == "svg":
            figure = next((t for t in reversed(self.open) if t.startswith("figure")), "")
            if self._svg_depth == 0:
                self.svg_parents.append(figure)
            self._svg_depth += 1
        if tag == "figure":
            self.figures.append(attributes)
            tag = f"figure:{attributes.get('data-chart', '')}"
        if tag == "td" and "data-figure" in attributes:
            self._cell = {**attributes, "text": ""}
            self.cells.append(self._cell)
        if tag not in VOID and not self.get_starttag_text().endswith("/>"):
            self.open.append(tag)

    def handle_startendtag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))

    def handle_endtag(self, tag):
        if tag in VOID:
            return
        top = self.open.pop() if self.open else ""
        if top.split(":")[0] != tag:
            self.errors.append(f"</{tag}> closes <{top}>")
        if tag == "svg":
            self._svg_depth -= 1
        if tag == "td":
            self._cell = None

    def handle_data(self, data):
        if self._cell is not None:
            self._cell["text"] += data


def parse(text: str) -> _Page:
    page = _Page()
    page.feed(text)
    page.close()
    assert not page.errors, page.errors[:5]
    assert page.open == [], f"unclosed: {page.open[:5]}"
    return page


@pytest.fixture(scope="module")
def clinic():
    return run_study(load_scenario(CLINIC))


@pytest.fixture(scope="module")
def clinic_report(clinic):
    """The whole report of the I-P clinic: the plant and every air handler."""
    return design_report_html(clinic, when=WHEN)


@pytest.fixture(scope="module")
def clinic_json(clinic):
    from plantside.study.run import study_summary

    return json.loads(json.dumps(study_summary(clinic)))


def _figures(page: _Page, view: str, scenario: str = "") -> dict[str, dict]:
    return {
        c["data-figure"]: c
        for c in page.cells
        if c["data-view"] == view and c["data-scenario"] == scenario
    }


def test_the_page_parses_and_has_one_svg_per_chart(clinic, clinic_report):
    page = parse(clinic_report)
    views = 1 + len(clinic.air_handlers)  # the plant and each air handler
    charts = [f for f in page.figures if f.get("data-chart")]
    assert len(charts) == views * len(CHARTS)
    assert len(page.svg_parents) == len(charts)  # one top-level <svg> per chart...
    assert sorted(page.svg_parents) == sorted(f"figure:{f['data-chart']}" for f in charts)
    assert {tag for tag, _ in page.tags} >= {"html", "head", "style", "body", "table", "svg"}


def test_self_contained_no_script_no_external_url(clinic_report):
    page = parse(clinic_report)
    tags = {tag for tag, _ in page.tags}
    assert not tags & {"script", "link", "iframe", "img", "object", "embed"}
    for tag, attributes in page.tags:
        for name, value in attributes.items():
            if name.startswith("on"):
                pytest.fail(f"<{tag} {name}> runs a script")
            if name in ("src", "href", "xlink:href", "action"):
                assert not re.match(r"\s*(https?:|//|file:|data:|javascript:)", value or ""), (
                    tag,
                    name,
                    value,
                )
                assert (value or "").startswith("#"), (tag, name, value)
            if name.startswith("xmlns"):
                continue  # a namespace name, never fetched
            assert "http" not in (value or "").replace("http://www.w3.org/", ""), (tag, name)
    assert "@import" not in clinic_report and "url(http" not in clinic_report


def test_element_ids_are_unique_and_every_reference_resolves(clinic_report):
    page = parse(clinic_report)
    ids = [a["id"] for _, a in page.tags if "id" in a]
    assert len(ids) == len(set(ids))
    for target in re.findall(r"url\(#([^)]+)\)", clinic_report):
        assert target in ids
    # the psychrometric legend's gradient is drawn once per view, each with its own id
    assert sum("gradient" in i for i in ids) == 4


def test_inline_svg_prefixes_ids_and_their_references():
    svg = (
        '<?xml version="1.0"?><svg width="1"><defs><linearGradient id="g1"/></defs>'
        '<rect fill="url(#g1)"/><use href="#g1"/><rect id="g10"/></svg>'
    )
    out = inline_svg(svg, "p-", "a chart")
    assert out.startswith('<svg role="img" aria-label="a chart"')
    assert 'id="p-g1"' in out and "url(#p-g1)" in out and 'href="#p-g1"' in out
    assert 'id="p-g10"' in out and "<?xml" not in out


def test_plant_and_unit_figures_equal_the_design_json(clinic, clinic_report, clinic_json):
    page = parse(clinic_report)
    plant = clinic_json["cooling_plant"]
    shown = _figures(page, "plant")
    expected = {
        "design_zone_load": plant["design_zone_kW"],
        "design_coil_load": plant["design_load_kW"],
        "recommended_capacity": plant["design_capacity_kW"],
        "peak_coil_load": plant["annual_peak_kW"],
        "cooling_energy": plant["annual_energy_kWh"],
        "hours_above_threshold": plant["hours_above_75_percent_of_capacity"],
    }
    for field, value in expected.items():
        assert float(shown[field]["data-si"]) == value, field  # bit for bit
    for index, unit in enumerate(clinic_json["air_handlers"]):
        shown = _figures(page, f"unit-{index}")
        expected = {
            "design_zone_load": unit["design_zone_kW"],
            "design_coil_load": unit["design_coil_total_kW"],
            "recommended_capacity": unit["design_capacity_kW"],
            "peak_coil_load": unit["annual_peak_coil_total_kW"],
            "cooling_energy": unit["annual_coil_total_kWh"],
            "hours_above_threshold": unit["hours_above_75_percent_of_capacity"],
        }
        for field, value in expected.items():
            assert float(shown[field]["data-si"]) == value, (unit["name"], field)
    assert {f for f, *_ in HEADLINE_FIGURES} <= set(_figures(page, "plant"))


def test_ip_figures_read_in_tons(clinic_report, clinic_json):
    page = parse(clinic_report)
    shown = _figures(page, "plant")
    design_kw = clinic_json["cooling_plant"]["design_load_kW"]
    # 12,000 Btu/h per ton (NIST SP 811); shown to the ton from 100 up
    assert shown["design_coil_load"]["text"] == f"{design_kw / KW_PER_TON:,.0f}"
    zone_kw = clinic_json["cooling_plant"]["design_zone_kW"]
    assert shown["design_zone_load"]["text"] == f"{zone_kw / KW_PER_TON:,.1f}"
    assert "tons" in clinic_report and "°F" in clinic_report


def test_si_report_of_an_ip_study(clinic, clinic_json):
    text = design_report_html(clinic, "SI", sections=[None], when=WHEN)
    page = parse(text)
    assert len(page.svg_parents) == len(CHARTS)  # the plant only
    shown = _figures(page, "plant")
    design_kw = clinic_json["cooling_plant"]["design_load_kW"]
    assert shown["design_coil_load"]["text"] == f"{design_kw:,.0f}"
    assert float(shown["design_coil_load"]["data-si"]) == design_kw
    assert html.escape("SI (inputs in the scenario's IP)") in text
    # the inputs stay as the file gives them: 4,500 cfm, 55 °F (quillon_clinic.toml)
    assert re.search(r"supply_airflow</th><td>cfm</td><td>4500</td>", text)


def test_si_study(tmp_path):
    study = run_study(load_scenario(OFFICE))
    text = design_report_html(study, sections=[None, 0], when=WHEN)
    page = parse(text)
    assert len(page.svg_parents) == 2 * len(CHARTS)
    file = tomllib.loads(OFFICE.read_text("utf-8"))
    first = file["air_handler"][0]
    # the supply airflow in L/s, as linden_office_si.toml writes it
    assert re.search(rf"supply_airflow</th><td>L/s</td><td>{first['supply_airflow']:g}</td>", text)
    assert "kW" in text and "tons" not in text


def test_inputs_are_those_of_the_scenario_file(clinic_report):
    file = tomllib.loads(CLINIC.read_text("utf-8"))
    names = [unit["name"] for unit in file["air_handler"]]
    for key in ("supply_airflow", "supply_drybulb"):
        row = re.search(
            rf"<th scope='row'>{key}</th><td>[^<]*</td>((?:<td>[^<]*</td>)+)", clinic_report
        )
        assert row, key
        values = re.findall(r"<td>([^<]*)</td>", row.group(1))
        assert values == [f"{unit[key]:g}" for unit in file["air_handler"]], key
    for name in names:
        assert html.escape(name) in clinic_report
    for option in file["plant"]["cooling_option"]:
        assert html.escape(option["name"]) in clinic_report
    assert f"distribution_gain_percent</th><td>{file['plant']['distribution_gain_percent']:g}" in (
        clinic_report
    )


def test_cautions_standard_and_the_studys_naming_the_air_handler(clinic, clinic_report):
    for text in GENERAL_CAUTIONS:
        assert html.escape(text) in clinic_report
    for text in clinic.cautions:
        assert html.escape(display_text(text, "IP")) in clinic_report
    unit_cautions = [
        c for c in clinic.cautions if c.split(":")[0] in {u.name for u in clinic.air_handlers}
    ]
    assert unit_cautions, "the clinic has cautions of its air handlers"
    for word in ("licensed engineer", "local codes", "mould", "short cycling"):
        assert word in clinic_report


def _sections(text: str) -> dict[str, str]:
    """Each view's section of the page, by its anchor (``plant``, ``unit-0``, ...)."""
    parts = re.split(r"<section class='ps-section' id='([^']+)'>", text)
    return dict(zip(parts[1::2], parts[2::2], strict=True))


def test_every_figure_and_chart_says_how_it_is_worked_out(clinic, clinic_report):
    from plantside.study.derivations import HEADLINE_KEYS

    page = parse(clinic_report)
    sections = _sections(clinic_report)
    assert set(sections) == {"plant", "inputs"} | {f"unit-{i}" for i in range(3)}
    units = {"power": "tons", "energy": "ton·h", "hours": "h", None: ""}
    for view in ["plant", "unit-0", "unit-1", "unit-2"]:
        found = dict(re.findall(r"data-derivation='(\w+)' open>.*?<b>([^<]*)</b>", sections[view]))
        assert set(found) == set(HEADLINE_KEYS) | set(CHARTS), view  # each one, opened
        cells = _figures(page, view)
        for field, _, quantity, _ in HEADLINE_FIGURES:  # the derivation ends on the figure
            shown = html.unescape(cells[field]["text"])
            assert html.unescape(found[field]) == f"{shown} {units[quantity]}".strip(), field
    assert "data-derivation='water' open" in clinic_report  # under the water-side tables
    assert clinic_report.count("<details") == 4 * (len(HEADLINE_KEYS) + len(CHARTS)) + 1


def test_coil_schedule_and_water_side_tables(clinic_report):
    assert "Coil schedule: air" in clinic_report and "Coil schedule: loads" in clinic_report
    assert "Chilled-water plant options" in clinic_report
    assert "Hot-water plant options" in clinic_report


def test_print_css_keeps_charts_and_rows_whole(clinic_report):
    style = re.search(r"<style>(.*)</style>", clinic_report, re.S).group(1)
    printed = style[style.index("@media print") :]
    assert "page-break-inside: avoid" in printed and "break-inside: avoid" in printed
    assert "figure.ps-chart" in printed and "table.ps-table tr" in printed
    assert "color: #000000" in printed
    assert "display: none" in printed  # the contents list is left out on paper


def test_pinned_a_beside_b(clinic):
    scenario = clinic.scenario
    specs = list(scenario.air_handlers)
    specs[1] = replace(specs[1], settings=replace(specs[1].settings, supply_drybulb=12.0))
    changed = run_study(replace(scenario, air_handlers=tuple(specs)))
    text = design_report_html(changed, "IP", clinic, sections=[None], when=WHEN)
    page = parse(text)
    before = _figures(page, "plant", "A")
    after = _figures(page, "plant", "B")
    assert float(before["design_coil_load"]["data-si"]) == clinic.cooling.design_load
    assert float(after["design_coil_load"]["data-si"]) == changed.cooling.design_load
    assert "B against A" in text
    assert "(A: 55)" in text  # the setting A had (55 °F), beside B's (12 °C = 53.6 °F)
    assert len(page.svg_parents) == len(CHARTS)


def test_unknown_section_is_refused(clinic):
    with pytest.raises(KeyError, match="no view 7"):
        design_report_html(clinic, sections=[7])


# ----------------------------------------------------------------------- command line
def test_cli_writes_the_report(tmp_path, capsys):
    out = tmp_path / "clinic.html"
    assert main(["report", str(CLINIC), "--out", str(out), "--units", "SI"]) == 0
    assert capsys.readouterr().out.strip() == str(out)
    text = out.read_text("utf-8")
    page = parse(text)
    assert len(page.svg_parents) == 4 * len(CHARTS)
    assert main(["design", str(CLINIC), "--json"]) == 0
    summary = json.loads(capsys.readouterr().out)
    shown = _figures(page, "plant")
    assert float(shown["design_coil_load"]["data-si"]) == summary["cooling_plant"]["design_load_kW"]
    assert "SI (inputs" in text


def test_cli_design_percent(tmp_path, capsys):
    out = tmp_path / "one.html"
    assert main(["report", str(OFFICE), "--out", str(out), "--design-percent", "1"]) == 0
    text = out.read_text("utf-8")
    assert "cooling 1 %, heating" in text
    assert re.search(r"(cooling|dehumidification|enthalpy) 1 %:", text)
    with pytest.raises(SystemExit) as refused:  # argparse: usage and the choices, status 2
        main(["report", str(OFFICE), "--out", str(out), "--design-percent", "3"])
    assert refused.value.code == 2
    assert "--design-percent: invalid choice: 3.0 (choose from 0.4, 1.0, 2.0)" in (
        capsys.readouterr().err
    )


def test_cli_bad_scenario_exit_2_with_message(tmp_path, capsys):
    bad = tmp_path / "bad.toml"
    bad.write_text(
        CLINIC.read_text("utf-8").replace("supply_drybulb = 55.0", "supply_drybulb = 95.0", 1),
        encoding="utf-8",
    )
    out = tmp_path / "bad.html"
    assert main(["report", str(bad), "--out", str(out)]) == 2
    err = capsys.readouterr().err
    assert err.startswith("plantside: error:") and "supply_drybulb" in err
    assert "°F" in err and "Traceback" not in err  # the file's units
    assert not out.exists()
    assert main(["report", str(tmp_path / "missing.toml"), "--out", str(out)]) == 2
    assert "file not found" in capsys.readouterr().err


def test_cli_unwritable_out(tmp_path, capsys):
    out = tmp_path / "no-such-folder" / "r.html"
    assert main(["report", str(OFFICE), "--out", str(out)]) == 2
    assert "no-such-folder" in capsys.readouterr().err


# -------------------------------------------------------------------------- dashboard
@pytest.mark.parametrize("view", ["plant", "air_handler"])
def test_dashboard_report_shows_what_is_on_screen(view):
    from plantside.dashboard.app import Dashboard
    from plantside.dashboard.report_export import DesignReportExport, dashboard_report_html

    board = Dashboard(load_scenario(CLINIC), view=view)
    state = board.state
    state.pin()
    index = state.inputs.air_handler
    moved = state.inputs.units[index].supply_air_temperature - 0.5
    assert state.set("supply_air_temperature", moved)
    state.set("unit_system", "SI")
    text = dashboard_report_html(state, when=WHEN)
    page = parse(text)
    key = "plant" if view == "plant" else f"unit-{index}"
    now, before = _figures(page, key, "B"), _figures(page, key, "A")
    pinned = state.pinned_result().figures
    for field, *_ in HEADLINE_FIGURES:
        assert float(now[field]["data-si"]) == float(getattr(state.result.figures, field))
        assert float(before[field]["data-si"]) == float(getattr(pinned, field))
    assert len(page.svg_parents) == len(CHARTS)  # the view on show only
    assert html.escape("SI (inputs in the scenario's IP)") in text
    # the water side the plant page shows, the same tables
    if view == "plant":
        board.show_page("Water side")  # its part is worked out when shown
        assert board.water_side.tables.value.count("<table") >= 2
        for table in re.findall(r"<table.*?</table>", board.water_side.tables.value, re.S):
            assert table in text
    export = DesignReportExport(state, board.download)
    name = export.export()
    assert name.endswith("-design-report.html") and name.startswith("quillon-row-clinic-")
    assert board.download.sent[-1][1] == "text/html" and board.download.sent[-1][2] > 100_000
