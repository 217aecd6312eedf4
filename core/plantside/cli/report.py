"""The ``plantside report`` command: a study's design report as one HTML file.

::

    plantside report SCENARIO --out FILE.html [--units IP|SI] [--design-percent 0.4|1|2]

The file is :func:`plantside.charts.report.design_report_html` of the study: headline
figures, plant, cautions, coil schedule, water side, the five charts of the plant and
of each air handler (SVG, the charts ``plantside charts`` writes), how each figure and
chart is worked out, and every input. It needs nothing else to be read: open it in a
browser and print it to PDF (A4 or Letter). Exit status 0, or 2 for a user mistake
(bad scenario, unwritable file) with the message on stderr.

The parser is added to the main command by :func:`add_report_parser`.
"""

from __future__ import annotations

import json
from dataclasses import replace
from pathlib import Path

from plantside.climate.design_conditions import COOLING_PERCENTS

__all__ = ["add_report_parser", "cmd_report"]

EXIT_OK = 0


def cmd_report(args) -> int:
    """Run the study of ``args.scenario`` and write its design report to ``args.out``."""
    from plantside.charts.report import design_report_html
    from plantside.study.run import run_study
    from plantside.study.scenario import load_scenario

    scenario = load_scenario(args.scenario)
    if args.design_percent is not None:
        scenario = replace(scenario, cooling_design_percent=float(args.design_percent))
    result = run_study(scenario)
    text = design_report_html(result, args.units)
    out = Path(args.out)
    out.write_text(text, encoding="utf-8")
    if args.json:
        print(json.dumps({"written": [str(out)]}, indent=2))
    else:
        print(out)
    return EXIT_OK


def add_report_parser(subparsers) -> None:
    """Add the ``report`` subcommand to the main parser's subparsers."""
    report = subparsers.add_parser(
        "report",
        help="the design report as one self-contained HTML file (prints to PDF)",
        description="Write the study's design report: headline figures, plant, cautions, "
        "coil schedule, water side, every chart (SVG), how each figure is worked out and "
        "every input, in one HTML file that needs nothing else and prints to PDF from a "
        "browser.",
    )
    report.add_argument("scenario", help="scenario TOML file")
    report.add_argument("--out", required=True, help="the HTML file to write")
    report.add_argument(
        "--units", choices=("IP", "SI"), help="units of the report (default: the scenario's)"
    )
    report.add_argument(
        "--design-percent",
        type=float,
        choices=COOLING_PERCENTS,
        help="cooling design condition, annual %% exceeded (default: the scenario's)",
    )
    report.add_argument("--json", action="store_true", help="list the written file as JSON")
    report.set_defaults(func=cmd_report)
