"""The climate stress test's chart: the cooling plant load of the recorded and the shifted year.

Pure builders: :func:`climate_stress_frames` turns a
:class:`plantside.study.climate_stress.ClimateStress` into tidy frames in the units on
show; :func:`climate_stress_chart` draws them as load-duration curves (the load
chart's own builder) against the capacity sized on the recorded year.
"""

from __future__ import annotations

from plantside.charts.labels import condition_text
from plantside.charts.load_duration import load_duration_chart
from plantside.charts.load_duration_frames import capacity_lines_frame, load_duration_frame
from plantside.units import to_display

__all__ = [
    "climate_stress_chart",
    "climate_stress_frames",
    "climate_stress_rows",
    "shifted_label",
]


def shifted_label(stress, system: str) -> str:
    """The shifted year's legend label, its steps in ``system`` ("+7.2 °F DB, +5.4 °F DP")."""
    steps = []
    for value, name in ((stress.drybulb_shift, "DB"), (stress.dew_point_shift, "DP")):
        shown, unit = to_display("temperature_difference", value, system)
        steps.append(f"+{float(shown):.3g} {unit} {name}")
    return f"Shifted year ({', '.join(steps)})"


def climate_stress_frames(stress, system: str, points: int = 200) -> dict:
    """``curves`` (the two years' cooling plant loads) and ``lines`` (the capacity)."""
    curves = load_duration_frame(
        {
            "Recorded year": stress.designed_study.cooling.hourly_load,
            "Shifted year": stress.shifted_study.cooling.hourly_load,
        },
        system,
        points=points,
    )
    lines = capacity_lines_frame([stress.designed.capacity], system)
    lines["line"] = "Capacity as sized"
    return {"curves": curves, "lines": lines, "title": shifted_label(stress, system)}


def climate_stress_chart(curves, lines, system: str, shifted: str = "", width: int | None = None):
    """Load-duration curves of the two years with the capacity sized on the recorded one.

    ``shifted`` names the shift in the title (the frames' ``title``).
    """
    shifted = f" {shifted[len('Shifted year ') :]}" if shifted else ""
    return load_duration_chart(
        curves,
        lines,
        system,
        title=f"Climate stress test{shifted}: the cooling plant as sized",
        width=width,
    )


def climate_stress_rows(stress, system: str) -> list[tuple[str, str, str]]:
    """The test's figures as (what, recorded year, shifted year) text in ``system``.

    One table for the command line and the dashboard, so they read the same.
    """

    def power(value: float) -> str:
        shown, unit = to_display("power", value, system)
        return f"{float(shown):,.1f} {unit}"

    def energy(value: float) -> str:
        shown, unit = to_display("energy", value, system)
        return f"{float(shown):,.0f} {unit}"

    years = (stress.designed, stress.shifted)
    rows = [
        ("Design load (the year's own design condition)", "design_load", power),
        ("Cooling capacity, sized on the recorded year", "capacity", power),
        ("Peak of the year", "peak", power),
        ("Load energy of the year", "energy", energy),
        ("Hours above capacity", "hours_above_capacity", lambda v: f"{v:,d} h"),
        ("Load energy above capacity", "unmet_energy", energy),
        ("Governing design condition", "governing", lambda c: condition_text(c, system)),
    ]
    table = [(label, *(text(getattr(y, field)) for y in years)) for label, field, text in rows]
    for (name, before), (_, after) in zip(*(y.humidity_hours for y in years), strict=True):
        table.append((f"{name}: hours above its humidity limit", f"{before:,d} h", f"{after:,d} h"))
    return table
