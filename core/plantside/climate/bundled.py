"""The bundled demo climates: five fictional sites, one hourly year each.

The years live as CSV files in ``plantside/data/<slug>.csv`` (shipped with the
package; copies in the repository's ``example_data/climates/``). They were
written by :mod:`plantside.climate.fictional_sites` and can be regenerated exactly
with ``python -m plantside.climate.generate --out DIR``. They are read with
the generic importer (:func:`plantside.climate.weather_csv.read_weather_csv`), so the
bundled files also serve as an example of the accepted CSV format.

Loading is cached per process (:func:`functools.lru_cache`); :class:`Weather`
is immutable, so every caller can share the same object.
"""

from __future__ import annotations

from functools import lru_cache
from importlib import resources

from plantside.climate.fictional_sites import SITES, site_parameters
from plantside.climate.weather import Weather
from plantside.climate.weather_csv import read_weather_csv

__all__ = ["BUNDLED_CLIMATES", "bundled_climate_description", "load_bundled_climate"]

#: Display names of the bundled (fictional) sites, in a fixed order.
BUNDLED_CLIMATES: tuple[str, ...] = tuple(site.name for site in SITES.values())


def bundled_climate_description(name: str) -> str:
    """One-line description of a bundled site's climate (e.g. for a dropdown tooltip).

    Parameters
    ----------
    name : str
        Display name or slug, case-insensitive.
    """
    site = site_parameters(name)
    return f"{site.name} (fictional, {site.altitude:g} m): {site.character}"


@lru_cache(maxsize=16)
def _load(slug: str) -> Weather:
    site = SITES[slug]
    data = resources.files("plantside").joinpath("data", f"{slug}.csv").read_bytes()
    weather = read_weather_csv(data, units="SI", site=site.name, altitude=site.altitude)
    return Weather(
        site=site.name,
        drybulb=weather.drybulb,
        humidity_ratio=weather.humidity_ratio,
        pressure=weather.pressure,
        altitude=site.altitude,
        hour_of_year=weather.hour_of_year,
        month=weather.month,
        latitude=site.latitude,
        longitude=site.longitude,
        time_zone=site.time_zone,
        beam_optical_depth=site.beam_optical_depth,
        diffuse_optical_depth=site.diffuse_optical_depth,
        notes=(
            f"bundled synthetic year of the fictional site {site.name} "
            f"({site.character}); seed {site.seed}",
        ),
    )


def load_bundled_climate(name: str) -> Weather:
    """The hourly year of a bundled fictional site.

    Parameters
    ----------
    name : str
        Display name (one of :data:`BUNDLED_CLIMATES`) or slug, case-insensitive.

    Returns
    -------
    Weather
        8760 hours: dry bulb [°C], humidity ratio [kg/kg], station pressure [Pa].
        The same object is returned on every call in a process.
    """
    return _load(site_parameters(name).slug)
