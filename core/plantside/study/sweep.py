"""Sweep definitions: one base scenario and the axes to vary over it.

A sweep is a ``[sweep]`` table, either in a file of its own that names its base
scenario, or inside a scenario file (the scenario itself is then the base)::

    [sweep]
    title = "Clinic: outdoor air by climate"
    base = "../scenarios/quillon_clinic.toml"   # relative to this file
    climates = ["Salvia Flats", "Port Calder"]  # bundled names, or "all"
    # climate_folder = "weather"                # or every *.csv in a folder
    # water_side = true                         # also each plant option's year

    [sweep.axes]
    "air_handler[2].minimum_outdoor_air_fraction" = { start = 0.1, stop = 0.5, num = 5 }
    "plant.cooling_margin_percent" = [0, 10, 20]

The cases are the full cartesian product of the climates and the axes. Axis
values are written in the base scenario's unit system and converted to SI here,
at the edge, with :data:`plantside.study.scenario.FIELD_QUANTITIES`. Every problem
raises :class:`plantside.errors.ScenarioError` naming the sweep file and the
field (``sweep.axes."air_handler[2].supply_drybulb"``); an unknown field gets a
did-you-mean suggestion.

Each case carries a stable id: a hash of its climate and its varied values, so a
rerun of the same sweep recognises the cases it has already finished. The parts of a
sweep (:class:`Sweep`, its axes, climates and cases, their ids and the fingerprint) are
in :mod:`plantside.study.sweep_cases`; this module reads and validates the file and
re-exports them.
"""

from __future__ import annotations

import difflib
import math
import os
import re
import types
import typing
from dataclasses import fields, replace
from itertools import product
from pathlib import Path

import numpy as np

from plantside.air_handler.year import AirHandlerSettings
from plantside.air_handler.zone_loads import ZoneLoadModel
from plantside.climate.bundled import BUNDLED_CLIMATES
from plantside.climate.design_conditions import COOLING_PERCENTS, HEATING_PERCENTS
from plantside.errors import InputRangeError, ScenarioError, excerpt
from plantside.study.scenario import (
    FIELD_QUANTITIES,
    Scenario,
    load_scenario,
    scenario_from_dict,
)

# The parts of a sweep live in sweep_cases; re-exported here, where readers look first.
from plantside.study.sweep_cases import (
    SI_SUFFIXES,
    ClimateChoice,
    Sweep,
    SweepAxis,
    SweepCase,
    _file_digest,
    _resolved,
    apply_values,
    case_id_from_values,
)
from plantside.study.toml_input import parse_toml_text, read_toml_text
from plantside.study.water_side import WATER_SIDE_FIELDS
from plantside.units import UnitSystem, from_display, unit_label

__all__ = [
    "MAX_CASES",
    "SI_SUFFIXES",
    "ClimateChoice",
    "Sweep",
    "SweepAxis",
    "SweepCase",
    "apply_values",
    "case_id_from_values",
    "load_sweep",
    "loads_sweep",
    "sweepable_fields",
]

#: Most cases one sweep may hold (a guard against a typo such as ``num = 100000``).
MAX_CASES = 200_000
#: Most values one ``{start, stop, num}`` range may produce.
MAX_RANGE_VALUES = 10_000


def _quoted(value) -> str:
    """A value from the file as quoted in a message: its repr, at most a short excerpt."""
    return excerpt(repr(value))


_SWEEP_KEYS = (
    "title",
    "base",
    "climates",
    "climate_folder",
    "weather_units",
    "altitude",
    "fill_gaps",
    "axes",
    "water_side",
)
_RANGE_KEYS = ("start", "stop", "num")
_SITE_FIELDS = {
    "cooling_design_percent": COOLING_PERCENTS,
    "heating_design_percent": HEATING_PERCENTS,
}
_PLANT_FIELDS = ("distribution_gain_percent", "cooling_margin_percent", "heating_margin_percent")
_AIR_HANDLER_FIELD = re.compile(r"^air_handler\[(\d+|\*)\]\.(zone\.)?([A-Za-z_][A-Za-z0-9_]*)$")


def _numeric_kind(cls, name: str):
    """(kind, optional) of a dataclass field: kind 'float', 'int' or None if not numeric."""
    hint = typing.get_type_hints(cls)[name]
    optional = False
    if typing.get_origin(hint) in (typing.Union, types.UnionType):
        args = typing.get_args(hint)
        optional = type(None) in args
        hint = next(a for a in args if a is not type(None))
    if hint is float:
        return "float", optional
    if hint is int:
        return "int", optional
    return None, optional


def _numeric_fields(cls) -> list[str]:
    return [f.name for f in fields(cls) if _numeric_kind(cls, f.name)[0] is not None]


def sweepable_fields(base: Scenario) -> list[str]:
    """Every field a sweep of ``base`` may vary, as dotted names (for messages and docs)."""
    names = [f"site.{n}" for n in _SITE_FIELDS] + [f"plant.{n}" for n in _PLANT_FIELDS]
    settings = _numeric_fields(AirHandlerSettings)
    zone = _numeric_fields(ZoneLoadModel)
    for i, spec in enumerate(base.air_handlers):
        names += [f"air_handler[{i + 1}].{n}" for n in settings]
        if spec.zone is not None:
            names += [f"air_handler[{i + 1}].zone.{n}" for n in zone]
    names += [f"air_handler[*].{n}" for n in settings]
    return names


class _Reader:
    """Validation of one ``[sweep]`` table; every message names ``source``."""

    def __init__(self, source: str, base: Scenario):
        self.source = source
        self.base = base
        self.system = base.unit_system

    def error(self, where: str, message: str) -> ScenarioError:
        return ScenarioError(self.source, where, message)

    def unknown(self, where: str, key: str, allowed) -> ScenarioError:
        guess = difflib.get_close_matches(key, list(allowed), n=1, cutoff=0.6)
        hint = f"; did you mean {_quoted(guess[0])}?" if guess else ""
        return self.error(where, f"unknown field {_quoted(key)}{hint}")

    def number(self, where, value, kind="float"):
        if isinstance(value, bool) or not isinstance(value, int | float):
            raise self.error(where, f"expected a number, got {_quoted(value)}")
        if not math.isfinite(value):
            raise self.error(where, f"expected a finite number, got {_quoted(value)}")
        if kind == "int":
            if float(value) != int(value):
                raise self.error(where, f"expected a whole number, got {_quoted(value)}")
            return int(value)
        return float(value)

    # -- climates ------------------------------------------------------------------------
    def climates(self, table: dict, base_dir: Path) -> tuple[ClimateChoice, ...]:
        names, folder = table.get("climates"), table.get("climate_folder")
        if names is not None and folder is not None:
            raise self.error(
                "sweep.climate_folder", "give sweep.climates or climate_folder, not both"
            )
        if names is not None:
            return self.bundled(names)
        if folder is not None:
            return self.folder(folder, base_dir)
        for key in ("weather_units", "altitude", "fill_gaps"):
            if key in table:
                raise self.error(f"sweep.{key}", "only used with sweep.climate_folder")
        return (self.base_climate(),)

    def base_climate(self) -> ClimateChoice:
        base = self.base
        if base.climate is not None:
            return ClimateChoice(base.climate, climate=base.climate, is_base=True)
        path = _resolved(base, base.weather_file)
        return ClimateChoice(
            path.stem, weather_file=str(path), digest=_file_digest(path), is_base=True
        )

    def bundled(self, names) -> tuple[ClimateChoice, ...]:
        where = "sweep.climates"
        if names == "all":
            names = list(BUNDLED_CLIMATES)
        if not isinstance(names, list) or not names:
            raise self.error(
                where, f'expected a list of bundled climate names or "all", got {_quoted(names)}'
            )
        lookup = {n.lower(): n for n in BUNDLED_CLIMATES}
        chosen = []
        for i, name in enumerate(names):
            item = f"{where}[{i + 1}]"
            if not isinstance(name, str):
                raise self.error(item, f"expected a climate name in quotes, got {_quoted(name)}")
            if name.strip().lower() not in lookup:
                guess = difflib.get_close_matches(name, list(BUNDLED_CLIMATES), n=1, cutoff=0.5)
                hint = f"; did you mean {_quoted(guess[0])}?" if guess else ""
                raise self.error(
                    item,
                    f"{_quoted(name)} is not a bundled climate{hint} "
                    f"Bundled: {', '.join(BUNDLED_CLIMATES)}",
                )
            chosen.append(lookup[name.strip().lower()])
        repeated = sorted({n for n in chosen if chosen.count(n) > 1})
        if repeated:
            raise self.error(where, f"each climate once; repeated: {repeated}")
        return tuple(ClimateChoice(n, climate=n) for n in chosen)

    def folder(self, folder, base_dir: Path) -> tuple[ClimateChoice, ...]:
        where = "sweep.climate_folder"
        if not isinstance(folder, str) or not folder:
            raise self.error(where, f"expected a folder name in quotes, got {_quoted(folder)}")
        path = Path(folder)
        if not path.is_absolute():
            path = base_dir / path
        if not path.is_dir():
            raise self.error(where, f"folder {_quoted(folder)} not found (looked in {path.parent})")
        files = sorted(p for p in path.iterdir() if p.suffix.lower() == ".csv" and p.is_file())
        if not files:
            raise self.error(where, f"no .csv weather files in {path}")
        return tuple(
            ClimateChoice(p.stem, weather_file=str(p.resolve()), digest=_file_digest(p))
            for p in files
        )

    def folder_settings(self, table: dict) -> dict:
        """Site settings the folder's CSVs are read with (units, altitude, gap filling)."""
        changes = {}
        if "weather_units" in table:
            units = table["weather_units"]
            try:
                changes["weather_units"] = str(UnitSystem.parse(units))
            except InputRangeError as error:
                raise self.error("sweep.weather_units", str(error)) from error
        if "altitude" in table:
            altitude = self.number("sweep.altitude", table["altitude"])
            changes["altitude"] = float(from_display("length", altitude, self.system))
        if "fill_gaps" in table:
            if not isinstance(table["fill_gaps"], bool):
                raise self.error(
                    "sweep.fill_gaps", f"expected true or false, got {_quoted(table['fill_gaps'])}"
                )
            changes["fill_gaps"] = table["fill_gaps"]
        return changes

    # -- axes ----------------------------------------------------------------------------
    def axes(self, table) -> tuple[SweepAxis, ...]:
        if table is None:
            return ()
        if not isinstance(table, dict):
            raise self.error(
                "sweep.axes", f"expected a table of field = values, got {_quoted(table)}"
            )
        return tuple(self.axis(key, raw) for key, raw in table.items())

    def target(self, key: str, where: str):
        """(section, name, indices, kind, optional, quantity) of a dotted field name."""
        allowed = sweepable_fields(self.base)
        parts = key.split(".")
        if parts[0] == "site" and len(parts) == 2:
            if parts[1] in ("climate", "weather_file"):
                raise self.error(where, "vary climates with sweep.climates or sweep.climate_folder")
            if parts[1] not in _SITE_FIELDS:
                raise self.unknown(where, key, allowed)
            return "site", parts[1], (), "float", False, None
        if parts[0] == "plant" and len(parts) == 2:
            if parts[1] not in _PLANT_FIELDS:
                raise self.unknown(where, key, allowed)
            return "plant", parts[1], (), "float", False, None
        match = _AIR_HANDLER_FIELD.match(key)
        if not match:
            raise self.unknown(where, key, allowed)
        index, zone, name = match.groups()
        count = len(self.base.air_handlers)
        if index == "*":
            indices = tuple(range(count))
        else:
            number = int(index)
            if not 1 <= number <= count:
                raise self.error(
                    where,
                    f"air_handler[{number}] does not exist: the base scenario has {count} "
                    f"air handler(s), numbered 1 to {count}",
                )
            indices = (number - 1,)
        cls = ZoneLoadModel if zone else AirHandlerSettings
        names = [f.name for f in fields(cls)]
        if name not in names:
            raise self.unknown(where, key, allowed)
        kind, optional = _numeric_kind(cls, name)
        if kind is None:
            raise self.error(
                where,
                f"{_quoted(name)} is not a number; sweeps vary numeric fields (for a text or "
                "true/false setting, write one scenario per choice)",
            )
        if zone:
            without = [i + 1 for i in indices if self.base.air_handlers[i].zone is None]
            if without:
                raise self.error(
                    where,
                    f"air_handler{without} reads its zone loads from a file; "
                    "zone fields can only be varied on a [air_handler.zone] model",
                )
        return (
            ("zone" if zone else "air_handler"),
            name,
            indices,
            kind,
            optional,
            (FIELD_QUANTITIES.get(name)),
        )

    def values(self, where: str, raw, kind: str, optional: bool) -> list:
        if isinstance(raw, dict):
            unknown = [k for k in raw if k not in _RANGE_KEYS]
            if unknown:
                raise self.unknown(f"{where}.{unknown[0]}", unknown[0], _RANGE_KEYS)
            missing = [k for k in _RANGE_KEYS if k not in raw]
            if missing:
                raise self.error(
                    where, f"a range needs start, stop and num; missing {', '.join(missing)}"
                )
            start = self.number(f"{where}.start", raw["start"])
            stop = self.number(f"{where}.stop", raw["stop"])
            num = self.number(f"{where}.num", raw["num"], "int")
            if not 1 <= num <= MAX_RANGE_VALUES:
                raise self.error(
                    f"{where}.num", f"{num} is outside the allowed range 1 to {MAX_RANGE_VALUES}"
                )
            values = [float(f"{v:.12g}") for v in np.linspace(start, stop, num)]
            if kind == "int":
                if any(v != round(v) for v in values):
                    raise self.error(
                        where, f"this field takes whole numbers; the range gives {values}"
                    )
                values = [round(v) for v in values]
        elif isinstance(raw, list):
            if not raw:
                raise self.error(where, "expected at least one value")
            values = []
            for i, item in enumerate(raw):
                if item == "none" and optional:
                    values.append(None)
                else:
                    values.append(self.number(f"{where}[{i + 1}]", item, kind))
        else:
            hint = ' or "none"' if optional else ""
            raise self.error(
                where,
                f"expected a list of numbers{hint} or a range {{start, stop, num}}, "
                f"got {_quoted(raw)}",
            )
        seen = [v for v in values if values.count(v) > 1]
        if seen:
            raise self.error(where, f"each value once; repeated: {sorted(set(seen), key=str)}")
        return values

    def axis(self, key: str, raw) -> SweepAxis:
        where = f'sweep.axes."{key}"'
        if not isinstance(key, str):
            raise self.error(where, "field names are text")
        section, name, indices, kind, optional, quantity = self.target(key, where)
        written = self.values(where, raw, kind, optional)
        if quantity is not None:
            values = [
                None if v is None else float(from_display(quantity, v, self.system))
                for v in written
            ]
        else:
            values = [v if v is None or kind == "int" else float(v) for v in written]
        axis = SweepAxis(key, tuple(values), tuple(written), section, name, indices, quantity)
        for value, shown in zip(axis.values, axis.written, strict=True):
            self.check(axis, value, shown, where)
        return axis

    def check(self, axis: SweepAxis, value, shown, where: str) -> None:
        """One value of one axis, applied alone to the base scenario."""
        unit = f" {unit_label(axis.quantity, self.system)}" if axis.quantity else ""
        text = "none" if shown is None else f"{shown:g}{unit}"
        if axis.section == "site":
            allowed = _SITE_FIELDS[axis.name]
            if not any(math.isclose(value, a) for a in allowed):
                raise self.error(
                    where, f"{text} is not allowed; allowed: {', '.join(f'{a:g}' for a in allowed)}"
                )
            return
        if axis.section == "plant":
            if not 0.0 <= value <= 100.0:
                raise self.error(where, f"{text} is outside the allowed range 0 to 100 %")
            return
        try:
            apply_values(self.base, (axis,), (value,))
        except InputRangeError as error:
            note = ""
            if axis.quantity and self.system is UnitSystem.IP:
                label = unit_label(axis.quantity, "IP")
                note = f" (the model works in SI; this field is read in {label})"
            raise self.error(where, f"value {text}: {error}{note}") from error
        except TypeError as error:
            raise self.error(where, f"value {text}: {error}") from error

    def combinations(self, axes: tuple[SweepAxis, ...]) -> None:
        """Every combination of values that meet in one air handler (cross-field limits,
        e.g. supply dry bulb below the zone's), checked before anything runs."""
        groups: dict[tuple, list[SweepAxis]] = {}
        for axis in axes:
            for i in axis.indices:
                groups.setdefault((axis.section, i), []).append(axis)
        for group in groups.values():
            if len(group) < 2:
                continue
            for picks in product(*(range(len(a.values)) for a in group)):
                values = [a.values[k] for a, k in zip(group, picks, strict=True)]
                try:
                    apply_values(self.base, group, values)
                except InputRangeError as error:
                    shown = ", ".join(
                        f"{a.field} = {_written(a, k, self.system)}"
                        for a, k in zip(group, picks, strict=True)
                    )
                    raise self.error(
                        "sweep.axes", f"the combination {shown} is refused: {error}"
                    ) from error


def _written(axis: SweepAxis, k: int, system) -> str:
    value = axis.written[k]
    if value is None:
        return "none"
    unit = f" {unit_label(axis.quantity, system)}" if axis.quantity else ""
    return f"{value:g}{unit}"


def sweep_from_dict(table: dict, base: Scenario, source: str = "<sweep>", base_dir=None) -> Sweep:
    """Validate a parsed ``[sweep]`` table against its base scenario.

    Parameters
    ----------
    table : dict
        The ``[sweep]`` table as parsed from TOML (``base`` already resolved by the caller).
    base : Scenario
        The scenario every case starts from.
    source : str
        Name used in messages (the sweep file).
    base_dir : path-like, optional
        Folder that ``climate_folder`` resolves against (the sweep file's folder).
    """
    reader = _Reader(source, base)
    base_dir = Path.cwd() if base_dir is None else Path(base_dir)
    if not isinstance(table, dict):
        raise reader.error("sweep", f"expected a [sweep] table, got {_quoted(table)}")
    for key in table:
        if key not in _SWEEP_KEYS:
            raise reader.unknown(f"sweep.{key}", key, _SWEEP_KEYS)
    title = table.get("title", f"Sweep of {base.title}")
    if not isinstance(title, str):
        raise reader.error("sweep.title", f"expected text in quotes, got {_quoted(title)}")
    climates = reader.climates(table, base_dir)
    if table.get("climate_folder") is not None:
        changes = reader.folder_settings(table)
        if changes:
            base = replace(base, **changes)
            reader.base = base
    axes = reader.axes(table.get("axes"))
    fields_seen = [a.field for a in axes]
    if len(set(fields_seen)) != len(fields_seen):
        raise reader.error("sweep.axes", "each field once")
    touched = {}
    for axis in axes:
        for i in axis.indices:
            key = (axis.section, i, axis.name)
            if key in touched:
                raise reader.error(
                    f'sweep.axes."{axis.field}"',
                    f"varies the same field as {_quoted(touched[key])}; give it once",
                )
            touched[key] = axis.field
    reader.combinations(axes)
    water_side = table.get("water_side", False)
    if not isinstance(water_side, bool):
        raise reader.error("sweep.water_side", f"expected true or false, got {_quoted(water_side)}")
    if water_side and base.water_side is None:
        tables = ", ".join(f"[plant.{name}]" for name in WATER_SIDE_FIELDS)
        raise reader.error(
            "sweep.water_side",
            f"the base scenario has no water side to sweep (none of {tables}); add its "
            "tables to the scenario or leave water_side out",
        )
    sweep = Sweep(
        title=title,
        base=base,
        axes=axes,
        climates=climates,
        source=source,
        water_side=water_side,
    )
    if sweep.size > MAX_CASES:
        raise reader.error(
            "sweep.axes",
            f"{sweep.size:,} cases is more than the {MAX_CASES:,} allowed in one sweep; "
            "split it into several sweeps",
        )
    return sweep


def loads_sweep(text: str, source: str = "<sweep>", base_dir=None) -> Sweep:
    """Parse a sweep from TOML text: a ``[sweep]`` with ``base = "file.toml"``, or a
    scenario that holds a ``[sweep]`` table.

    Parameters
    ----------
    text : str
        The TOML document.
    source : str
        Name used in messages.
    base_dir : path-like, optional
        Folder that relative paths resolve against (default: the working folder).
    """
    base_dir = Path.cwd() if base_dir is None else Path(base_dir)
    data = parse_toml_text(text, source)
    if "sweep" not in data:
        raise ScenarioError(
            source, "sweep", "missing: a sweep file needs a [sweep] table (see the README)"
        )
    table = data.pop("sweep")
    if not isinstance(table, dict):
        raise ScenarioError(source, "sweep", f"expected a [sweep] table, got {_quoted(table)}")
    base_name = table.get("base")
    if base_name is not None:
        if data:
            raise ScenarioError(
                source,
                "sweep.base",
                f"a file with sweep.base holds only the [sweep] table; found also: "
                f"{', '.join(sorted(data))}",
            )
        if not isinstance(base_name, str) or not base_name:
            raise ScenarioError(
                source, "sweep.base", f"expected a file name, got {_quoted(base_name)}"
            )
        path = Path(base_name)
        if not path.is_absolute():
            path = Path(os.path.normpath(base_dir / path))
        try:
            found = path.is_file()
        except (OSError, ValueError) as error:  # a name the file system refuses (too long)
            raise ScenarioError(
                source,
                "sweep.base",
                f"file {_quoted(base_name)} cannot be opened: {excerpt(error)}",
            ) from None
        if not found:
            raise ScenarioError(
                source,
                "sweep.base",
                f"file {_quoted(base_name)} not found (looked in {excerpt(path.parent, 160)})",
            )
        base = load_scenario(path)
        table = {k: v for k, v in table.items() if k != "base"}
    else:
        if "air_handler" not in data:
            raise ScenarioError(
                source,
                "sweep.base",
                'missing: name the base scenario (base = "scenario.toml") or put the '
                "[sweep] table inside a scenario file",
            )
        base = scenario_from_dict(data, source, base_dir)
    return sweep_from_dict(table, base, source, base_dir)


def load_sweep(path) -> Sweep:
    """Read and validate a sweep file.

    Parameters
    ----------
    path : path-like
        A ``.toml`` file with a ``[sweep]`` table. Relative names inside it (``base``,
        ``climate_folder``) resolve against its folder.

    Returns
    -------
    Sweep
    """
    path = Path(path)
    return loads_sweep(read_toml_text(path), str(path), path.parent)
