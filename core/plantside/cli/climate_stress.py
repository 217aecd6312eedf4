"""The ``plantside stress`` command: the climate stress test of a study.

::

    plantside stress SCENARIO [--drybulb-shift K] [--dew-point-shift K] [--units IP|SI] [--json]

Runs :func:`plantside.study.climate_stress.climate_stress` (the function the
dashboard's stress test calls) and prints the recorded and the shifted year side by side
in the scenario's units (or ``--units``), or the SI figures as JSON. Exit status 0, or 2
for a user mistake (bad scenario, a shift out of range) with the message on stderr.
"""

from __future__ import annotations

import json

from plantside.climate.weather_shift import DEW_POINT_SHIFT_RANGE, DRYBULB_SHIFT_RANGE

__all__ = ["add_stress_parser", "cmd_stress", "stress_text"]


def stress_text(stress, system: str) -> str:
    """The test as a readable table in ``system`` (IP or SI)."""
    from plantside.charts.climate_stress import climate_stress_rows, shifted_label
    from plantside.study.climate_stress import STRESS_CAUTION

    rows = climate_stress_rows(stress, system)
    width = max(len(r[0]) for r in rows) + 2
    column = max(18, *(len(r[1]) + 2 for r in rows))
    lines = [
        f"Climate stress test: {stress.designed_study.scenario.title}",
        f"Site: {stress.designed_study.weather.site}; units: {system}",
        f"Shifted year: {shifted_label(stress, system).removeprefix('Shifted year (')[:-1]}",
        "",
        f"{'':{width}}{'recorded year':<{column}}shifted year",
    ]
    lines += [f"{label:{width}}{before:<{column}}{after}" for label, before, after in rows]
    if stress.saturated_hours:
        lines.append(f"({stress.saturated_hours} shifted hours held at saturation)")
    verdict = stress.verdict.ip if system == "IP" else str(stress.verdict)
    lines += ["", verdict, "", f"! {STRESS_CAUTION}"]
    return "\n".join(lines)


def cmd_stress(args) -> int:
    """Run the stress test of ``args.scenario`` and print it."""
    from plantside.study.climate_stress import climate_stress, stress_summary
    from plantside.study.scenario import load_scenario

    scenario = load_scenario(args.scenario)
    stress = climate_stress(scenario, args.drybulb_shift, args.dew_point_shift)
    if args.json:
        print(json.dumps(stress_summary(stress), indent=2, allow_nan=False))
    else:
        print(stress_text(stress, args.units or scenario.unit_system.value))
    return 0


def add_stress_parser(subparsers) -> None:
    """Add the ``stress`` subcommand to the main parser's subparsers."""
    stress = subparsers.add_parser(
        "stress",
        help="climate stress test: the plant as sized, in a warmer and more humid year",
        description="Run the study on its year and on the same year shifted warmer "
        "(dry bulb) and more humid (dew point), and say whether the cooling plant, sized "
        "on the recorded year, still holds: hours above capacity, unmet load, peak and "
        "design load, humidity hours.",
    )
    stress.add_argument("scenario", help="scenario TOML file")
    low, high = DRYBULB_SHIFT_RANGE
    stress.add_argument(
        "--drybulb-shift",
        type=float,
        default=2.0,
        help=f"dry-bulb step [K], {low:g} to {high:g} (default 2; 1 K = 1.8 °F)",
    )
    low, high = DEW_POINT_SHIFT_RANGE
    stress.add_argument(
        "--dew-point-shift",
        type=float,
        default=1.0,
        help=f"dew-point step [K], {low:g} to {high:g} (default 1)",
    )
    stress.add_argument("--units", choices=("IP", "SI"), help="default: the scenario's")
    stress.add_argument("--json", action="store_true", help="SI figures as JSON")
    stress.set_defaults(func=cmd_stress)
