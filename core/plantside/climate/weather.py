"""The hourly weather record every later calculation reads.

A :class:`Weather` holds one site's hourly outdoor air states in SI units. It
is built by the bundled-climate loader, the CSV importer or the design-day
builder, and passed unchanged to the air-handler and plant models.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from plantside.errors import check_range

__all__ = ["Weather"]


@dataclass(frozen=True, eq=False)
class Weather:
    """Hourly outdoor conditions at one site.

    Parameters
    ----------
    site : str
        Display name of the site (bundled sites are fictional).
    drybulb : numpy.ndarray
        Outdoor dry-bulb temperature [°C], one value per hour.
    humidity_ratio : numpy.ndarray
        Outdoor humidity ratio [kg water / kg dry air], one value per hour.
    pressure : numpy.ndarray
        Station (barometric) pressure [Pa], one value per hour.
    altitude : float
        Site altitude above sea level [m].
    hour_of_year : numpy.ndarray, optional
        Hour index 0..N-1 from local midnight, 1 January (or of the design day).
        Defaults to ``arange(N)``.
    month : numpy.ndarray, optional
        Calendar month 1..12 of each hour. Defaults to a 365-day calendar.
    notes : tuple of str
        Notes made while the record was built (filled gaps, leap day, ...).
    latitude, longitude : float, optional
        Site latitude (north positive) and longitude (east positive) [°]; needed for the
        sun's position (:mod:`plantside.climate.solar`).
    time_zone : float, optional
        Time zone of the record's hours [h from UTC], east positive (standard time).
    beam_optical_depth, diffuse_optical_depth : float, optional
        The site's clear-sky pseudo-optical depths tau_b and tau_d [-] (ASHRAE
        Fundamentals 2017 Ch. 14); ``None`` uses the defaults of
        :mod:`plantside.climate.solar`.
    """

    site: str
    drybulb: np.ndarray
    humidity_ratio: np.ndarray
    pressure: np.ndarray
    altitude: float = 0.0
    hour_of_year: np.ndarray | None = None
    month: np.ndarray | None = None
    notes: tuple[str, ...] = field(default=())
    latitude: float | None = None
    longitude: float | None = None
    time_zone: float | None = None
    beam_optical_depth: float | None = None
    diffuse_optical_depth: float | None = None

    def __post_init__(self):
        drybulb = np.asarray(self.drybulb, dtype=float)
        n = drybulb.size
        humidity_ratio = np.broadcast_to(np.asarray(self.humidity_ratio, float), (n,)).copy()
        pressure = np.broadcast_to(np.asarray(self.pressure, float), (n,)).copy()
        hours = np.arange(n) if self.hour_of_year is None else np.asarray(self.hour_of_year)
        if self.month is None:
            days_in_month = np.array([31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31])
            month_of_day = np.repeat(np.arange(1, 13), days_in_month)
            month = month_of_day[np.minimum((hours // 24) % 365, 364)]
        else:
            month = np.asarray(self.month, dtype=int)
        for name, value in (
            ("drybulb", drybulb),
            ("humidity_ratio", humidity_ratio),
            ("pressure", pressure),
            ("hour_of_year", hours),
            ("month", month),
        ):
            value.setflags(write=False)
            object.__setattr__(self, name, value)
        for name, low, high, unit in (
            ("latitude", -90.0, 90.0, "°"),
            ("longitude", -180.0, 180.0, "°"),
            ("time_zone", -12.0, 14.0, "h from UTC"),
            ("beam_optical_depth", 0.1, 1.5, ""),
            ("diffuse_optical_depth", 1.0, 4.0, ""),
        ):
            value = getattr(self, name)
            if value is not None:
                object.__setattr__(self, name, float(check_range(name, value, low, high, unit)))

    @property
    def hours(self) -> int:
        """Number of hourly records."""
        return int(self.drybulb.size)

    @property
    def located(self) -> bool:
        """Whether latitude, longitude and time zone are known (the sun can be placed)."""
        return None not in (self.latitude, self.longitude, self.time_zone)
