"""The climate stress test: does the plant, sized on the recorded year, hold in a warmer one?

The study is run on the year as recorded (the plant is sized there, as designed) and on
the same year shifted warmer and more humid
(:func:`plantside.climate.weather_shift.shifted_weather`). The shifted year gets its own
design conditions and its own hourly loads (zone loads that follow the weather follow
it too); the cooling plant is then held at the capacity sized on the recorded year, and
the figures say where it falls short: hours above capacity, load energy left unmet, the
shifted year's peak and design load against that capacity, and each air handler's hours
above its humidity limit. The dashboard and ``plantside stress`` call
:func:`climate_stress`, so they cannot disagree.
"""

from __future__ import annotations

from dataclasses import dataclass

from plantside.air_handler.year import humidity_hours_above_limit
from plantside.climate.weather import Weather
from plantside.climate.weather_shift import shifted_weather
from plantside.plant.sizing import energy_above, hours_above
from plantside.study.figures import plant_design_condition
from plantside.study.run import StudyResult, run_study
from plantside.study.scenario import Scenario
from plantside.units import UnitText, display_text, to_display

__all__ = ["ClimateStress", "StressYear", "climate_stress", "stress_summary"]

#: The caution every stress test carries.
STRESS_CAUTION = (
    "A stress test shows how a plant sized on the recorded year behaves in a warmer one; "
    "it is no forecast. Hours above capacity leave spaces warm and humid (comfort, mould); "
    "adding capacity for them risks short cycling in every other hour. The choice of "
    "design year, margin and future climate belongs to the licensed engineer under the "
    "local codes."
)


@dataclass(frozen=True)
class StressYear:
    """One year of the test, against the cooling capacity sized on the recorded year (SI)."""

    #: "as designed" or "shifted".
    label: str
    #: The cooling plant's design load from this year's own design conditions [kW].
    design_load: float
    #: This year's governing cooling design condition (a condition object; shown with
    #: :func:`plantside.charts.labels.condition_text`).
    governing: object
    #: The cooling capacity sized on the recorded year [kW].
    capacity: float
    #: This year's highest hourly cooling plant load [kW].
    peak: float
    #: The year's cooling load energy [kWh].
    energy: float
    #: Hours in which the cooling plant load is above ``capacity``.
    hours_above_capacity: int
    #: Load energy above ``capacity`` over the year [kWh].
    unmet_energy: float
    #: (air handler, operating hours above its zone humidity limit), in scenario order.
    humidity_hours: tuple[tuple[str, int], ...]


@dataclass(frozen=True)
class ClimateStress:
    """The recorded and the shifted year side by side."""

    drybulb_shift: float
    dew_point_shift: float
    #: Hours whose shifted dew point was held at the shifted dry bulb.
    saturated_hours: int
    designed: StressYear
    shifted: StressYear
    designed_study: StudyResult
    shifted_study: StudyResult

    @property
    def holds(self) -> bool:
        """True when the shifted year never asks more of the cooling plant than its capacity."""
        return self.shifted.hours_above_capacity == 0

    @property
    def verdict(self) -> UnitText:
        """One sentence on whether the plant holds, in SI and (``.ip``) in I-P."""
        shifted, capacity = self.shifted, self.shifted.capacity
        wetter = sum(h for _, h in shifted.humidity_hours) - sum(
            h for _, h in self.designed.humidity_hours
        )
        humidity = f"; {wetter} more hours above the zone humidity limits" if wetter > 0 else ""
        if self.holds:
            text = (
                f"With {{shift}}, the cooling plant as sized ({capacity:.3f} kW) holds: the "
                f"shifted year's peak is {shifted.peak:.3f} kW, "
                f"{100 * shifted.peak / capacity:.0f} % of capacity"
            )
            if shifted.design_load > capacity:
                text += (
                    f", though the shifted year's design load ({shifted.design_load:.3f} kW) "
                    "is above it"
                )
        else:
            text = (
                f"With {{shift}}, the cooling plant as sized ({capacity:.3f} kW) falls short "
                f"in {shifted.hours_above_capacity} hours ({shifted.unmet_energy:.0f} kWh "
                f"unmet); the shifted year's peak is {shifted.peak:.3f} kW and its design "
                f"load {shifted.design_load:.3f} kW"
            )
        text += humidity + "."

        def shift(system: str) -> str:
            steps = (self.drybulb_shift, self.dew_point_shift)
            shown = [to_display("temperature_difference", v, system) for v in steps]
            (drybulb, unit), (dew_point, _) = ((float(v), u) for v, u in shown)
            return f"dry bulb +{drybulb:.3g} {unit}, dew point +{dew_point:.3g} {unit}"

        return UnitText(
            display_text(text.format(shift=shift("SI")), "SI"),
            display_text(text.format(shift=shift("IP")), "IP"),
        )


def _year(label: str, study: StudyResult, capacity: float) -> StressYear:
    load = study.cooling.hourly_load
    return StressYear(
        label=label,
        design_load=float(study.cooling.design_load),
        governing=plant_design_condition(study, "cooling"),
        capacity=float(capacity),
        peak=float(study.cooling.annual_peak),
        energy=float(study.cooling.annual_energy),
        hours_above_capacity=int(hours_above(load, capacity)),
        unmet_energy=float(energy_above(load, capacity)),
        humidity_hours=tuple(
            (unit.name, int(humidity_hours_above_limit(unit.settings, unit.hourly).above_limit))
            for unit in study.air_handlers
        ),
    )


def climate_stress(
    scenario: Scenario,
    drybulb_shift: float,
    dew_point_shift: float,
    weather: Weather | None = None,
    designed: StudyResult | None = None,
) -> ClimateStress:
    """Run ``scenario`` on its year and on the year shifted by the given steps.

    Parameters
    ----------
    scenario : Scenario
        The study (its margins and design condition size the plant).
    drybulb_shift : float
        Dry-bulb step [K], 0 to 4.
    dew_point_shift : float
        Dew-point step [K], 0 to 3.
    weather : Weather, optional
        The recorded year (default: the scenario's).
    designed : StudyResult, optional
        The study already run on ``weather`` (the dashboard's current result), so it is
        not run twice.

    Returns
    -------
    ClimateStress

    Raises
    ------
    InputRangeError
        A shift outside its range, named with its field and range.
    """
    weather = scenario.load_weather() if weather is None else weather
    shift = shifted_weather(weather, drybulb_shift, dew_point_shift)  # checked first
    designed = run_study(scenario, weather) if designed is None else designed
    shifted = run_study(scenario, shift.weather)
    capacity = designed.cooling.design_capacity
    return ClimateStress(
        drybulb_shift=shift.drybulb_shift,
        dew_point_shift=shift.dew_point_shift,
        saturated_hours=shift.saturated_hours,
        designed=_year("as designed", designed, capacity),
        shifted=_year("shifted", shifted, capacity),
        designed_study=designed,
        shifted_study=shifted,
    )


def stress_summary(stress: ClimateStress) -> dict:
    """The test's figures as plain SI values with unit suffixes (``plantside stress --json``)."""

    def year(y: StressYear) -> dict:
        return {
            "design_load_kW": y.design_load,
            "governing_condition": str(y.governing.label),
            "capacity_kW": y.capacity,
            "annual_peak_kW": y.peak,
            "annual_energy_kWh": y.energy,
            "hours_above_capacity": y.hours_above_capacity,
            "unmet_energy_kWh": y.unmet_energy,
            "hours_above_humidity_limit": dict(y.humidity_hours),
        }

    return {
        "drybulb_shift_K": stress.drybulb_shift,
        "dew_point_shift_K": stress.dew_point_shift,
        "saturated_hours": stress.saturated_hours,
        "holds": stress.holds,
        "as_designed": year(stress.designed),
        "shifted": year(stress.shifted),
        "verdict": stress.verdict,
        "caution": STRESS_CAUTION,
    }
