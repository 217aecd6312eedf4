"""Economizer high limits checked against the site's ASHRAE climate zone.

ASHRAE 90.1-2019 Table 6.5.1.1.3 (held in :mod:`plantside.air.economizer`) sets the fixed
dry-bulb high limit by climate zone: 75 °F where the air is dry or marine, 70 °F in 5A
and 6A, 65 °F in the humid 1A to 4A, where outdoor air above that carries enough
moisture to add coil load. It also does not allow a differential dry-bulb control in
1A to 4A. The zone is the scenario's ``site.climate_zone``; when the file gives none, the
zone suggested from the weather (:func:`plantside.climate.climate_zone.
suggest_climate_zone`) is used and the caution says so.
"""

from __future__ import annotations

from plantside.air.economizer import EconomizerControl
from plantside.climate.climate_zone import economizer_drybulb_limit, suggest_climate_zone
from plantside.units import to_display, unit_label

__all__ = ["economizer_limit_cautions"]

#: Zones where 90.1-2019 Table 6.5.1.1.3 does not allow differential dry-bulb control
#: (from memory).
_NO_DIFFERENTIAL_DRYBULB = ("0A", "1A", "2A", "3A", "4A")


def economizer_limit_cautions(scenario, weather=None) -> tuple[str, ...]:
    """Cautions for air handlers whose economizer high limit does not fit the climate zone.

    Parameters
    ----------
    scenario : Scenario
        The study (its ``climate_zone``, unit system and air handlers).
    weather : Weather, optional
        The year, for a suggested zone when the scenario gives none.

    Returns
    -------
    tuple of str
        One caution per air handler whose fixed dry-bulb limit is above the table's value
        for the zone, or whose differential dry-bulb control the table does not allow
        there; temperatures in the scenario's units.
    """
    zone, how = scenario.climate_zone, "site.climate_zone"
    if zone is None:
        if weather is None:
            return ()
        zone = suggest_climate_zone(weather).zone
        how = "suggested from the weather; confirm it with site.climate_zone"
    table = economizer_drybulb_limit(zone)
    system = scenario.unit_system
    unit = unit_label("temperature", system)

    def shown(celsius):
        return f"{float(to_display('temperature', celsius, system)[0]):.0f} {unit}"

    cautions = []
    for spec in scenario.air_handlers:
        settings = spec.settings
        if settings.all_outdoor_air:
            continue
        control = settings.economizer_control
        if control is EconomizerControl.FIXED_DRYBULB and (
            settings.economizer_drybulb_limit > table + 0.05
        ):
            limit = shown(settings.economizer_drybulb_limit)
            cautions.append(
                f"{settings.name}: economizer_drybulb_limit {limit}"
                f" is above ASHRAE 90.1's fixed dry-bulb high limit of {shown(table)} for "
                f"climate zone {zone} ({how}; 90.1-2019 Table 6.5.1.1.3): above it the "
                "outdoor air is humid enough to add coil load"
            )
        if control is EconomizerControl.DIFFERENTIAL_DRYBULB and zone in _NO_DIFFERENTIAL_DRYBULB:
            cautions.append(
                f"{settings.name}: ASHRAE 90.1-2019 Table 6.5.1.1.3 does not allow a "
                f"differential dry-bulb economizer in climate zone {zone} ({how})"
            )
    return tuple(cautions)
