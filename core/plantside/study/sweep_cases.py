"""Sweep cases: the parts of a sweep, each case's stable id and the sweep's fingerprint.

A :class:`Sweep` is a validated base scenario, its axes and its climates (read by
:mod:`plantside.study.sweep`); its :attr:`Sweep.cases` are the cartesian product of the
climates and the axes. Each case carries a stable id, a hash of its climate and its
varied values, and the sweep a fingerprint of what every case shares (the base
scenario, its input files, the plantside version and the model's source), so a rerun of
the same sweep recognises the cases it has already finished.
"""

from __future__ import annotations

import hashlib
import json
import math
from dataclasses import dataclass, replace
from functools import cached_property, lru_cache
from itertools import product
from pathlib import Path

from plantside import __version__
from plantside.study.scenario import Scenario, scenario_to_dict
from plantside.units import unit_label

__all__ = [
    "SI_SUFFIXES",
    "ClimateChoice",
    "Sweep",
    "SweepAxis",
    "SweepCase",
    "apply_values",
    "case_id_from_values",
]

#: Suffix of a varied value's column in the results table (values there are SI).
SI_SUFFIXES = {
    "temperature": "_C",
    "airflow": "_m3s",
    "power": "_kW",
    "heating_power": "_kW",
    "enthalpy": "_kJkg",
}


# ---------------------------------------------------------------------------------------
# the parts of a sweep
# ---------------------------------------------------------------------------------------
@dataclass(frozen=True)
class ClimateChoice:
    """One climate of a sweep: a bundled site, a weather CSV, or the base's own.

    Parameters
    ----------
    label : str
        What the results table and the charts call it (site name or file stem).
    climate : str or None
        Bundled climate name (one of :data:`plantside.climate.bundled.BUNDLED_CLIMATES`).
    weather_file : str or None
        Absolute path of an hourly weather CSV.
    digest : str
        Hash of the weather file's content ("" for a bundled climate), so an edited
        file gives new case ids.
    is_base : bool
        True when the sweep has no climate axis: the base scenario's weather is kept.
    """

    label: str
    climate: str | None = None
    weather_file: str | None = None
    digest: str = ""
    is_base: bool = False

    @property
    def key(self) -> str:
        """Identity of the climate in case ids."""
        if self.climate is not None:
            return f"bundled:{self.climate}"
        return f"file:{Path(self.weather_file).name if self.weather_file else ''}:{self.digest}"


@dataclass(frozen=True)
class SweepAxis:
    """One varied field and its values.

    Parameters
    ----------
    field : str
        Dotted name as written, e.g. ``"air_handler[2].minimum_outdoor_air_fraction"``.
    values : tuple
        Values in SI (°C, m³/s, kW, kJ/kg; fractions and percents as they are); ``None``
        for an optional field switched off.
    written : tuple
        The same values as written in the file (the base scenario's unit system).
    section : str
        ``"air_handler"``, ``"zone"``, ``"site"`` or ``"plant"``.
    name : str
        The field's name in its dataclass (``minimum_outdoor_air_fraction``).
    indices : tuple of int
        0-based air-handler indices the axis changes (empty for site and plant).
    quantity : str or None
        Physical quantity (:data:`plantside.study.scenario.FIELD_QUANTITIES`) or None.
    """

    field: str
    values: tuple
    written: tuple
    section: str
    name: str
    indices: tuple[int, ...] = ()
    quantity: str | None = None

    @property
    def column(self) -> str:
        """Column of the results table holding this axis's SI values."""
        return self.field + SI_SUFFIXES.get(self.quantity, "")


@dataclass(frozen=True)
class SweepCase:
    """One case: a climate and one value of every axis (SI)."""

    index: int
    case_id: str
    climate: ClimateChoice
    values: tuple


def _canonical(value):
    """A value written so that the same number always hashes the same."""
    if value is None:
        return None
    return format(float(value), ".12g")


def case_id_from_values(climate_key: str, fields_values) -> str:
    """Stable id of a case: a SHA-256 of its climate and its (field, value) pairs.

    Parameters
    ----------
    climate_key : str
        :attr:`ClimateChoice.key`.
    fields_values : iterable of (str, float or None)
        Varied field names and their SI values; order does not matter.
    """
    pairs = sorted((str(f), _canonical(v)) for f, v in fields_values)
    text = json.dumps([climate_key, pairs], separators=(",", ":"))
    return hashlib.sha256(text.encode("utf-8")).hexdigest()[:20]


@dataclass(frozen=True, eq=False)
class Sweep:
    """A base scenario and the axes varied over it (all validated, values in SI).

    Use :func:`load_sweep` to read one from a file.
    """

    title: str
    base: Scenario
    axes: tuple[SweepAxis, ...]
    climates: tuple[ClimateChoice, ...]
    source: str = "<sweep>"
    #: Also run each case's water side and keep each plant option's year (opt-in: about
    #: a quarter more time per case, and more columns).
    water_side: bool = False

    def __getstate__(self):
        # the case list and fingerprint are recomputed where needed, not shipped to workers
        state = dict(self.__dict__)
        state.pop("cases", None)
        state.pop("fingerprint", None)
        return state

    @property
    def size(self) -> int:
        """Number of cases (climates x product of the axes' lengths)."""
        return len(self.climates) * math.prod(len(a.values) for a in self.axes)

    @cached_property
    def cases(self) -> tuple[SweepCase, ...]:
        """Every case, climates outermost, then the axes in file order."""
        out = []
        for climate in self.climates:
            for values in product(*(a.values for a in self.axes)):
                pairs = [(a.field, v) for a, v in zip(self.axes, values, strict=True)]
                case_id = case_id_from_values(climate.key, pairs)
                out.append(SweepCase(len(out), case_id, climate, tuple(values)))
        return tuple(out)

    def scenario_for(self, case: SweepCase) -> Scenario:
        """The base scenario with the case's climate and values applied (SI)."""
        return apply_values(self.base, self.axes, case.values, case.climate)

    @cached_property
    def fingerprint(self) -> str:
        """Hash of what every case shares: the base scenario (less what the axes vary)
        and its input files, the plantside version and the model's source. Results
        computed under another fingerprint are not reused."""
        data = scenario_to_dict(self.base)
        if not self.climates[0].is_base:
            for key in ("climate", "weather_file", "weather_units"):
                data["site"].pop(key, None)
        files = []
        if self.climates[0].is_base and self.base.weather_file:
            files.append(self.climates[0].digest)
        for index, spec in enumerate(self.base.air_handlers):
            if spec.zone_load_file:
                path = _resolved(self.base, spec.zone_load_file)
                files.append(f"{index}:{_file_digest(path)}")
        parts = [__version__, _model_digest(), data, files]
        if self.water_side:  # more columns: a table without them is not reused
            parts.append("water_side")
        text = json.dumps(parts, sort_keys=True, default=str)
        return hashlib.sha256(text.encode("utf-8")).hexdigest()[:20]

    def describe(self) -> str:
        """A few lines: the base, the climates and each axis with its values as written."""
        system = self.base.unit_system
        lines = [
            f"{self.title}: {self.size} cases",
            f"  base scenario: {self.base.source}",
            f"  climates ({len(self.climates)}): " + ", ".join(c.label for c in self.climates),
        ]
        for axis in self.axes:
            unit = f" {unit_label(axis.quantity, system)}" if axis.quantity else ""
            shown = ", ".join("none" if v is None else f"{v:g}" for v in axis.written)
            lines.append(f"  {axis.field} ({len(axis.values)}): {shown}{unit}")
        if self.water_side:
            lines.append("  water side: each plant option's year, per case")
        return "\n".join(lines)


# ---------------------------------------------------------------------------------------
# applying values
# ---------------------------------------------------------------------------------------
def apply_values(base: Scenario, axes, values, climate: ClimateChoice | None = None) -> Scenario:
    """``base`` with each axis set to its value (SI) and the climate applied.

    Raises
    ------
    InputRangeError
        If a value (or a combination of values of one air handler) is out of range.
    """
    scenario = base
    settings_changes: dict[int, dict] = {}
    zone_changes: dict[int, dict] = {}
    site_changes = {}
    for axis, value in zip(axes, values, strict=True):
        if axis.section == "air_handler":
            for i in axis.indices:
                settings_changes.setdefault(i, {})[axis.name] = value
        elif axis.section == "zone":
            for i in axis.indices:
                zone_changes.setdefault(i, {})[axis.name] = value
        else:
            site_changes[axis.name] = value
    if settings_changes or zone_changes:
        specs = list(base.air_handlers)
        for i in sorted(set(settings_changes) | set(zone_changes)):
            spec = specs[i]
            if i in settings_changes:
                spec = replace(spec, settings=replace(spec.settings, **settings_changes[i]))
            if i in zone_changes:
                spec = replace(spec, zone=replace(spec.zone, **zone_changes[i]))
            specs[i] = spec
        scenario = replace(scenario, air_handlers=tuple(specs))
    if climate is not None and not climate.is_base:
        if climate.climate is not None:
            site_changes.update(climate=climate.climate, weather_file=None)
        else:
            site_changes.update(climate=None, weather_file=climate.weather_file)
    if site_changes:
        scenario = replace(scenario, **site_changes)
    return scenario


# ---------------------------------------------------------------------------------------
# the files every case shares (for the fingerprint)
# ---------------------------------------------------------------------------------------
def _resolved(base: Scenario, name: str) -> Path:
    path = Path(name)
    return path if path.is_absolute() else Path(base.base_dir) / path


def _file_digest(path: Path) -> str:
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()[:20]


@lru_cache(maxsize=1)
def _model_digest() -> str:
    """Hash of the model's source (every module but the charts, dashboard and command
    line), so results computed by an edited model are not taken for current ones."""
    package = Path(__file__).resolve().parents[1]
    digest = hashlib.sha256()
    for path in sorted(package.rglob("*.py")):
        relative = path.relative_to(package).as_posix()
        if relative.startswith(("charts/", "dashboard/", "cli/")):
            continue
        digest.update(relative.encode("utf-8"))
        digest.update(path.read_bytes())
    return digest.hexdigest()[:20]
