"""The ``plantside`` command line, for headless work and scripts.

Commands (``plantside COMMAND --help`` for each)::

    plantside design  SCENARIO [--json]            design points and plant size, as a table
    plantside year    SCENARIO --out DIR [--format csv|parquet]
                                                    hourly results, coil schedule CSV,
                                                    summary JSON
    plantside charts  SCENARIO --out DIR            every chart as PNG and SVG
    plantside report  SCENARIO --out FILE.html      the design report (prints to PDF)
    plantside climates                              the bundled fictional climates
    plantside sweep   SWEEP --out DIR [--workers N | --scheduler ADDR]
                                                    batch of cases -> one table

Exit status: 0 on success, 2 for a user mistake (bad scenario, unreadable file) with the
message on stderr, never a traceback for a user mistake; ``sweep`` also 3 (some cases
failed, their rows say why) and 130 (interrupted).
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

import numpy as np

from plantside.cli.climate_stress import add_stress_parser
from plantside.cli.report import add_report_parser
from plantside.cli.sweep import add_sweep_parser
from plantside.errors import NAME_EXCERPT_CHARS, PlantsideError, excerpt
from plantside.units import display_text, to_display

__all__ = ["main"]

EXIT_OK = 0
EXIT_BAD_INPUT = 2
#: Longest message printed [characters]: a message never echoes a huge input whole.
MAX_MESSAGE_CHARS = 4000


def _fmt(quantity, value_si, system, digits=1):
    value, unit = to_display(quantity, value_si, system)
    return f"{float(value):,.{digits}f} {unit}"


def _design_text(result) -> str:
    from plantside.climate.design_conditions import design_condition_text
    from plantside.study.figures import plant_design_condition
    from plantside.study.run import heating_load_columns

    scenario = result.scenario
    system = scenario.unit_system
    lines = [
        f"{scenario.title}",
        f"Site: {result.weather.site} ({result.weather.hours} h of weather); units: {system}",
        "",
    ]
    for condition in result.conditions.conditions:
        wanted = (
            scenario.heating_design_percent
            if condition.kind == "heating"
            else scenario.cooling_design_percent
        )
        if np.isclose(condition.percent, wanted):
            lines.append(f"  design condition {design_condition_text(condition, system)}")
    lines.append(_climate_zone_text(scenario, result.weather))
    lines.append("")
    width = max(14, *(len(u.name) + 2 for u in result.air_handlers))
    header = (
        f"{'air handler':<{width}}{'condition':<18}{'zone':>14}{'coil total':>14}"
        f"{'coil sens.':>14}{'coil lat.':>14}{'coil/zone':>10}"
    )
    lines += [header, "-" * len(header)]
    for unit in result.air_handlers:
        for kind, point in unit.cooling_design.points.items():
            zone = point.loads["zone_sensible_kW"] + point.loads["zone_latent_kW"]
            coil = point.loads["coil_total_kW"]
            ratio = coil / zone if zone > 0 else float("nan")
            mark = " *" if kind == unit.cooling_design.governing else ""
            lines.append(
                f"{unit.name:<{width}}{kind + mark:<18}{_fmt('power', zone, system):>14}"
                f"{_fmt('power', coil, system):>14}"
                f"{_fmt('power', point.loads['coil_sensible_kW'], system):>14}"
                f"{_fmt('power', point.loads['coil_latent_kW'], system):>14}{ratio:>10.2f}"
            )
        heat = sum(unit.heating_design.loads[c] for c in heating_load_columns)
        lines.append(
            f"{unit.name:<{width}}{'heating':<18}{'':>14}{_fmt('heating_power', heat, system):>14}"
        )
    lines += ["(* governs the coil)", ""]
    lines += _coil_schedule_text(result)
    for plant, quantity in ((result.cooling, "power"), (result.heating, "heating_power")):
        condition = plant_design_condition(result, plant.kind)
        lines.append(
            f"{plant.kind.capitalize()} plant: design load "
            f"{_fmt(quantity, plant.design_load, system)}"
            f" ({design_condition_text(condition, system)}); "
            f"with {plant.margin_percent:g} % margin "
            f"{_fmt(quantity, plant.design_capacity, system)}; the year's peak "
            f"{_fmt(quantity, plant.annual_peak, system)}"
        )
    pickup = scenario.pickup_allowance_percent
    if pickup > 0:
        lines.append(
            f"  the heating design load includes a {pickup:g} % morning pick-up allowance "
            "after night set-back (common practice; set plant.heating_pickup_percent)"
        )
    pickup = scenario.cooling_pickup_allowance_percent
    if pickup > 0:
        lines.append(
            f"  the cooling design load includes a {pickup:g} % morning pick-up allowance "
            "after the zones float up overnight (common practice; set "
            "plant.cooling_pickup_percent)"
        )
    for unit in result.air_handlers:
        off = unit.terminal_hourly.sum()
        cycled = int(unit.hourly["night_cycle"].sum()) if "night_cycle" in unit.hourly else 0
        if off > 0 or cycled:
            how = (
                f"perimeter/terminal heating, {_fmt('heating_energy', off, system, 0)} a year"
                if off > 0
                else f"night cycling, {cycled} h a year (outdoor damper closed)"
            )
            lines.append(f"  {unit.name}: heat while the fan is off served by {how}")
    lines.append("")
    from plantside.cli.water_side_text import study_water_side_lines

    lines += study_water_side_lines(result)
    # cautions in the study's units, as the dashboard shows them (the JSON keeps SI)
    lines += [f"! {display_text(c, system)}" for c in result.cautions]
    return "\n".join(lines)


def _climate_zone_text(scenario, weather) -> str:
    """The site's climate zone as given, beside the one its weather suggests."""
    from plantside.climate.climate_zone import suggest_climate_zone

    suggestion = suggest_climate_zone(weather)
    given = (
        f"climate zone {scenario.climate_zone} (site.climate_zone)"
        if scenario.climate_zone
        else "climate zone not given (site.climate_zone)"
    )
    return f"  {given}; {suggestion.describe()}"


def _coil_schedule_text(result) -> list[str]:
    """The coil schedule (``plantside.air_handler.coil_schedule``) in the user's units."""
    from plantside.air_handler.coil_schedule import coil_schedule

    system = result.scenario.unit_system
    schedule = coil_schedule(result.air_handlers)
    width = max(14, *(len(name) + 2 for name in schedule["air_handler"]))
    flow_unit = to_display("airflow", 1.0, system)[1]
    temp_unit = to_display("temperature", 0.0, system)[1]
    header = (
        f"{'air handler':<{width}}{'condition':<18}{'airflow':>9}{'load flow':>10}"
        f"{'EDB':>7}{'EWB':>7}{'LDB':>7}{'LWB':>7}{'ADP':>7}{'BF':>6}"
        f"{'total':>14}{'sensible':>14}{'latent':>14}{'SHR':>6}{'reheat':>14}"
    )
    lines = [
        f"Coil schedule (airflow and load flow in {flow_unit}, temperatures in {temp_unit}; "
        "airflow: the one the design uses, load flow: what the zone load asks for)",
        header,
        "-" * len(header),
    ]

    def num(quantity, value, digits=1):
        if not np.isfinite(value):
            return "-"
        return f"{float(to_display(quantity, value, system)[0]):,.{digits}f}"

    def _ratio(value):
        return "-" if not np.isfinite(value) else f"{value:.2f}"

    for row in schedule.itertuples(index=False):
        quantity = "power" if row.coil == "cooling" else "heating_power"
        used = "S" if row.airflow_used == "scheduled" else "L"
        mark = " *" if row.governing and row.coil == "cooling" else ""
        lines.append(
            f"{row.air_handler:<{width}}{row.condition + mark:<18}"
            f"{num('airflow', row.airflow_m3s, 0) + ' ' + used:>9}"
            f"{num('airflow', row.load_airflow_m3s, 0):>10}"
            f"{num('temperature', row.entering_drybulb_C):>7}"
            f"{num('temperature', row.entering_wet_bulb_C):>7}"
            f"{num('temperature', row.leaving_drybulb_C):>7}"
            f"{num('temperature', row.leaving_wet_bulb_C):>7}"
            f"{num('temperature', row.apparatus_dew_point_C):>7}"
            f"{_ratio(row.bypass_factor):>6}"
            f"{_fmt(quantity, row.total_kW, system):>14}"
            f"{_fmt(quantity, row.sensible_kW, system):>14}"
            f"{_fmt(quantity, row.latent_kW, system):>14}"
            f"{_ratio(row.sensible_heat_ratio):>6}"
            f"{_fmt('heating_power', row.reheat_kW + row.terminal_reheat_kW, system):>14}"
        )
    lines += [
        "(S: scheduled airflow, the coil leaving at the supply set point; L: load-derived "
        "airflow. Reheat: after a dehumidifying coil, plus at the scheduled airflow the "
        "supply's surplus over the zone load. Heating rows: preheat + heating coil from "
        "the mixed air. Condensate in the --json output and coil_schedule.csv.)",
        "",
    ]
    return lines


def _load(path):
    from plantside.study.run import run_study
    from plantside.study.scenario import load_scenario

    return run_study(load_scenario(path))


def _cmd_design(args) -> int:
    result = _load(args.scenario)
    if args.json:
        from plantside.study.run import study_summary

        print(json.dumps(study_summary(result), indent=2, allow_nan=False))
    else:
        print(_design_text(result))
    return EXIT_OK


def _cmd_year(args) -> int:
    from plantside.study.run import study_summary

    result = _load(args.scenario)
    out = Path(args.out)
    out.mkdir(parents=True, exist_ok=True)
    written = []
    for unit in result.air_handlers:
        safe = "".join(ch if ch.isalnum() or ch in "-_" else "_" for ch in unit.name)
        frame = unit.hourly
        if args.format == "parquet":
            path = out / f"hourly_{safe}.parquet"
            frame.to_parquet(path)
        else:
            path = out / f"hourly_{safe}.csv"
            frame.to_csv(path, float_format="%.6g")
        written.append(path)
    from plantside.air_handler.coil_schedule import coil_schedule

    path = out / "coil_schedule.csv"
    coil_schedule(result.air_handlers).to_csv(path, index=False, float_format="%.6g")
    written.append(path)
    summary = study_summary(result)
    path = out / "summary.json"
    path.write_text(json.dumps(summary, indent=2, allow_nan=False), encoding="utf-8")
    written.append(path)
    return _report_written(written, args.json)


def _cmd_charts(args) -> int:
    # The dashboard's five charts, built from the study by the same charts-layer module
    # the dashboard uses (charts/study_frames.py), with the same stamp: the plant view
    # (showing the first air handler with return air, as the dashboard opens), then each
    # air handler's view.
    from datetime import datetime

    from plantside.charts.export import safe_filename, save_chart
    from plantside.charts.study_frames import (
        CHARTS,
        chart_frames,
        study_chart,
        study_chart_views,
        view_stamp,
    )
    from plantside.study.figures import climate_label, first_recirculating_unit

    result = _load(args.scenario)
    scenario = result.scenario
    system = scenario.unit_system.value
    out = Path(args.out)
    out.mkdir(parents=True, exist_ok=True)
    when = datetime.now().strftime("%Y-%m-%d %H:%M")
    written = []
    cache: dict = {}
    views = study_chart_views(result, climate_label(scenario), first_recirculating_unit(scenario))
    for index, view in views:
        name = view.unit.name.replace(" ", "-").lower()
        prefix = "plant" if index is None else safe_filename(name)
        stamp = view_stamp(scenario, view, when)
        for chart, stem in CHARTS.items():
            drawn = study_chart(chart, chart_frames(chart, view, system, cache), system, view)
            written += save_chart(
                drawn, out, f"{prefix}_{stem}", formats=("png", "svg"), stamp=stamp
            )
    return _report_written(written, args.json)


def _report_written(written, as_json: bool) -> int:
    if as_json:
        print(json.dumps({"written": [str(p) for p in written]}, indent=2))
    else:
        for path in written:
            print(path)
    return EXIT_OK


def _cmd_climates(args) -> int:
    from plantside.climate.bundled import (
        BUNDLED_CLIMATES,
        bundled_climate_description,
        load_bundled_climate,
    )
    from plantside.climate.climate_zone import suggest_climate_zone

    zones = {n: suggest_climate_zone(load_bundled_climate(n)) for n in BUNDLED_CLIMATES}
    if args.json:
        print(
            json.dumps(
                [
                    {
                        "name": n,
                        "description": bundled_climate_description(n),
                        "suggested_climate_zone": zones[n].zone,
                        "heating_degree_days_18C": round(zones[n].heating_degree_days, 1),
                        "cooling_degree_days_10C": round(zones[n].cooling_degree_days, 1),
                    }
                    for n in BUNDLED_CLIMATES
                ],
                indent=2,
            )
        )
    else:
        for name in BUNDLED_CLIMATES:
            print(bundled_climate_description(name))
            print(f"    {zones[name].describe()}")
    return EXIT_OK


def build_parser() -> argparse.ArgumentParser:
    """The argument parser (exposed for the docs and tests)."""
    parser = argparse.ArgumentParser(
        prog="plantside",
        description="What the central plant sees: coil loads, design conditions, part-load "
        "hours and plant sizing. A preliminary design aid; final selection by a licensed "
        "engineer under local codes.",
    )
    sub = parser.add_subparsers(dest="command", required=True)
    design = sub.add_parser("design", help="design points and plant size as a table")
    design.add_argument("scenario", help="scenario TOML file")
    design.add_argument("--json", action="store_true", help="machine-readable SI output")
    design.set_defaults(func=_cmd_design)
    year = sub.add_parser("year", help="hourly results (CSV/Parquet) and summary JSON")
    year.add_argument("scenario")
    year.add_argument("--out", required=True, help="output folder")
    year.add_argument("--format", choices=("csv", "parquet"), default="csv")
    year.add_argument("--json", action="store_true", help="list written files as JSON")
    year.set_defaults(func=_cmd_year)
    charts = sub.add_parser("charts", help="every chart of the study as PNG and SVG")
    charts.add_argument("scenario")
    charts.add_argument("--out", required=True, help="output folder")
    charts.add_argument("--json", action="store_true", help="list written files as JSON")
    charts.set_defaults(func=_cmd_charts)
    climates = sub.add_parser("climates", help="list the bundled fictional climates")
    climates.add_argument("--json", action="store_true")
    climates.set_defaults(func=_cmd_climates)
    add_sweep_parser(sub)
    add_report_parser(sub)
    add_stress_parser(sub)
    return parser


def main(argv=None) -> int:
    """Entry point of the ``plantside`` command; returns the exit status."""
    parser = build_parser()
    args = parser.parse_args(argv)
    try:
        return args.func(args)
    except PlantsideError as error:
        print(f"plantside: error: {excerpt(error, MAX_MESSAGE_CHARS)}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except OSError as error:  # the file name shortened, never the whole of a huge one
        name = f": {excerpt(error.filename, NAME_EXCERPT_CHARS)}" if error.filename else ""
        print(f"plantside: error: {error.strerror or error}{name}", file=sys.stderr)
        return EXIT_BAD_INPUT


if __name__ == "__main__":
    sys.exit(main())
