"""The water side in ``plantside design``'s readable output, in the scenario's units."""

from __future__ import annotations

import math

from plantside.constants import KW_PER_TON
from plantside.units import display_text, to_display

__all__ = ["study_water_side_lines", "water_side_lines"]


def _fmt(quantity, value_si, system, digits=1):
    value, unit = to_display(quantity, value_si, system)
    return f"{float(value):,.{digits}f} {unit}"


def _efficiency(cop, system) -> str:
    if cop is None or not math.isfinite(cop):
        return "-"
    return f"{KW_PER_TON / cop:.3f} kW/ton" if str(system) == "IP" else f"COP {cop:.2f}"


def water_side_lines(water, system) -> list[str]:
    """Lines describing each option's water side (empty when the scenario has none).

    Parameters
    ----------
    water : plantside.study.water_side_run.WaterSideResult or None
    system : UnitSystem
        The scenario's unit system.
    """
    if water is None:
        return []
    lines = ["Water side (pumps replace the distribution percentage here):"]
    rejection = dict(water.heat_rejection)
    for row in water.options.to_dict(orient="records"):
        name = row["option"]
        if row["plant"] == "cooling":
            tower = rejection[name]
            if water.condenser == "water":
                rejected = (
                    f"tower {tower.nominal_tons:.0f} nominal tons (15,000 Btu/h) at "
                    f"{_fmt('temperature', tower.entering_air, system)} WB, condenser water "
                    f"{_fmt('water_flow', tower.flow, system)}"
                )
            else:
                rejected = (
                    f"air-cooled, rejected at {_fmt('temperature', tower.entering_air, system)} DB"
                )
            lines += [
                f"  {name}: chilled water {_fmt('water_flow', row['design_flow_m3s'], system)}"
                f", pump {row['design_pump_kW']:.1f} kW; condenser heat "
                f"{_fmt('power', row['condenser_heat_kW'], system)}, {rejected}",
                f"    a year: chillers {row['chiller_kWh']:,.0f} kWh, pumps "
                f"{row['pump_kWh']:,.0f} kWh"
                + (
                    f", tower fans {row['tower_fan_kWh']:,.0f} kWh"
                    if water.condenser == "water"
                    else ""
                )
                + "; "
                f"seasonal {_efficiency(row['seasonal_cop'], system)} (plant "
                f"{_efficiency(row['seasonal_plant_cop'], system)}) beside IPLV "
                f"{_efficiency(row['rated_iplv_cop'], system)} and rating-weighted "
                f"{_efficiency(row['rating_weighted_cop'], system)}; "
                f"{int(row['machine_starts'])} starts, "
                f"{int(row['hours_extra_for_flow'])} h with a chiller more for flow",
            ]
            if row["free_cooling_kWh"] > 0:
                lines.append(
                    f"    waterside economizer: {row['free_cooling_kWh']:,.0f} kWh of cooling, "
                    f"{row['economizer_kWh_saved']:,.0f} kWh of chiller input saved"
                )
        else:
            lines.append(
                f"  {name}: hot water {_fmt('water_flow', row['design_flow_m3s'], system)}, "
                f"pump {row['design_pump_kW']:.1f} kW; a year: fuel {row['fuel_kWh']:,.0f} kWh, "
                f"pumps {row['pump_kWh']:,.0f} kWh, seasonal boiler efficiency "
                f"{100 * row['seasonal_efficiency']:.1f} %"
            )
    recovery = water.heat_recovery
    if recovery:
        lines.append(
            f"  heat-recovery chiller: {recovery['heat_recovered_kWh']:,.0f} kWh of heat in "
            f"{recovery['heat_recovery_hours']} h "
            f"({100 * recovery['share_of_simultaneous_heating']:.0f} % of the simultaneous "
            "heating)"
        )
    lines += [f"! {display_text(c, system)}" for c in water.cautions]  # the study's units
    lines.append("")
    return lines


def study_water_side_lines(result) -> list[str]:
    """:func:`water_side_lines` of a finished study (runs its water side)."""
    from plantside.study.water_side_run import run_water_side

    return water_side_lines(run_water_side(result), result.scenario.unit_system)
