"""Reading one value of a scenario file: field kinds, units, file names, mistakes.

The checks every table of a scenario file goes through: the quantity (and so the unit)
of each numeric field (:data:`FIELD_QUANTITIES`), unknown keys with a did-you-mean
suggestion, numbers, text, flags, choices and percentages, a settings dataclass built
from its table with every mistake collected (``_Mistakes``) and the model's range
messages turned into the file's units, and the files a scenario names
(:data:`FILE_POLICIES`). Each problem is a :class:`plantside.errors.ScenarioError`
naming the file, the field, the value and what is allowed.
"""

from __future__ import annotations

import dataclasses
import difflib
import math
import types
import typing
from contextlib import contextmanager
from dataclasses import fields
from pathlib import Path

from plantside.errors import InputRangeError, ScenarioError, excerpt
from plantside.units import MESSAGE_QUANTITIES, UnitSystem, display_text, from_display, unit_label

__all__ = ["FIELD_QUANTITIES", "FILE_POLICIES", "field_unit"]


#: Physical quantity of each numeric field written in the file's unit system. Fields not
#: listed are dimensionless (fractions, effectivenesses) or carry their unit in their name
#: (``*_percent``); fan power is in kW in both systems.
FIELD_QUANTITIES = {
    # air handler
    "supply_airflow": "airflow",
    "minimum_outdoor_airflow": "airflow",
    "ventilation_airflow_required": "airflow",
    "zone_cooling_drybulb": "temperature",
    "zone_heating_drybulb": "temperature",
    "supply_drybulb": "temperature",
    "supply_reset_drybulb": "temperature",
    "supply_reset_outdoor_low": "temperature",
    "supply_reset_outdoor_high": "temperature",
    "heating_supply_drybulb_max": "temperature",
    "economizer_drybulb_limit": "temperature",
    "economizer_enthalpy_limit": "enthalpy",
    "preheat_drybulb": "temperature",
    "apparatus_dew_point": "temperature",
    "leaving_dew_point": "temperature",
    "night_setback_drybulb": "temperature",
    "apparatus_dew_point_min": "temperature",
    # zone load model
    "cooling_design_sensible": "power",
    "cooling_design_latent": "power",
    "cooling_design_drybulb": "temperature",
    "heating_design_load": "heating_power",
    "heating_design_drybulb": "temperature",
    "glazing_area_north": "area",
    "glazing_area_east": "area",
    "glazing_area_south": "area",
    "glazing_area_west": "area",
}


#: File policies: "any" follows any name (the user's own files, command line);
#: "inside" (for uploads) accepts only names inside the scenario's folder.
FILE_POLICIES = ("any", "inside")


def _resolve(base_dir: Path, name: str | None, source: str, where: str, files: str = "any") -> Path:
    """A file named in a scenario, relative to the scenario's folder; must exist.

    With ``files="inside"`` an absolute name, or one that leads out of the scenario's
    folder, is refused: an uploaded scenario cannot make the server read other files.
    """
    if not name:
        raise ScenarioError(source, where, "no file given")
    path = Path(name)
    if not path.is_absolute():
        path = Path(base_dir) / path
    try:
        if files == "inside" and (
            Path(name).is_absolute() or not path.resolve().is_relative_to(Path(base_dir).resolve())
        ):
            raise ScenarioError(
                source, where, f"{excerpt(name)!r} must name a file inside the scenario's folder"
            )
        found = path.is_file()
    except (OSError, ValueError) as error:  # a name the file system refuses (too long, NUL)
        raise ScenarioError(
            source, where, f"file {excerpt(name)!r} cannot be opened: {excerpt(error)}"
        ) from error
    if not found:
        raise ScenarioError(
            source, where, f"file {excerpt(name)!r} not found (looked in {excerpt(path.parent)})"
        )
    return path


def _unknown_key(source: str, where: str, key: str, allowed) -> ScenarioError:
    guess = difflib.get_close_matches(key, list(allowed), n=1, cutoff=0.6)
    hint = f"; did you mean {guess[0]!r}?" if guess else ""
    prefix = f"{where}." if where else ""
    return ScenarioError(
        source,
        f"{prefix}{key}",
        f"unknown key {key!r}{hint} Allowed here: {', '.join(sorted(allowed))}",
    )


def _bad_choice(source: str, where: str, value, allowed) -> ScenarioError:
    guess = difflib.get_close_matches(str(value), list(allowed), n=1, cutoff=0.6)
    hint = f"; did you mean {guess[0]!r}?" if guess else ""
    return ScenarioError(source, where, f"{value!r} is not one of: {', '.join(allowed)}{hint}")


def _check_keys(source: str, where: str, table: dict, allowed) -> None:
    if not isinstance(table, dict):
        raise ScenarioError(source, where or "(top level)", f"expected a table, got {table!r}")
    for key in table:
        if key not in allowed:
            raise _unknown_key(source, where, key, allowed)


def _number(source, where, value, *, integer=False):
    if isinstance(value, bool) or not isinstance(value, int | float):
        kind = "a whole number" if integer else "a number"
        raise ScenarioError(source, where, f"expected {kind}, got {value!r}")
    if not math.isfinite(value):
        raise ScenarioError(source, where, f"expected a finite number, got {value!r}")
    return int(value) if integer else float(value)


def _text(source, where, value):
    if not isinstance(value, str):
        raise ScenarioError(source, where, f"expected text in quotes, got {value!r}")
    return value


def _flag(source, where, value):
    if not isinstance(value, bool):
        raise ScenarioError(source, where, f"expected true or false, got {value!r}")
    return value


def _field_kind(cls, name):
    """'float', 'int', 'str', 'bool' and whether None is allowed, from the type hint."""
    hint = typing.get_type_hints(cls)[name]
    optional = False
    args = typing.get_args(hint)
    if typing.get_origin(hint) in (typing.Union, types.UnionType):
        optional = type(None) in args
        hint = next(a for a in args if a is not type(None))
    return hint, optional


class _Mistakes:
    """Every mistake found in a scenario file, so one message lists them all.

    ``with mistakes.check(): ...`` runs a part of the reading and keeps its
    :class:`ScenarioError` instead of stopping; :meth:`raise_any` raises one error
    listing every mistake (:meth:`ScenarioError.several`).
    """

    def __init__(self, source: str):
        self.source = source
        self.found: list[ScenarioError] = []

    @contextmanager
    def check(self):
        try:
            yield
        except ScenarioError as error:
            self.found.append(error)

    def raise_any(self) -> None:
        if self.found:
            raise ScenarioError.several(self.source, self.found)


def _dataclass_from_table(cls, table, source, where, system):
    """Build a settings dataclass from a TOML table in ``system`` units, with checks.

    Every field that cannot be read is reported, and so is every value out of its
    range: after a value the model refuses, that field is taken at its default and the
    table checked again, until the rest is accepted (or the refused field has no
    default, or is one the file did not give: a range that depends on the refused
    value is not checked further).
    """
    names = [f.name for f in fields(cls) if f.init]
    _check_keys(source, where, table, names)
    mistakes = _Mistakes(source)
    values = {}
    for key, raw in table.items():
        with mistakes.check():
            values[key] = _table_value(cls, key, raw, source, f"{where}.{key}", system)
    defaults = {
        f.name
        for f in fields(cls)
        if f.default is not dataclasses.MISSING or f.default_factory is not dataclasses.MISSING
    }
    tried = dict(values)
    built = None
    for _ in range(len(tried) + 1):
        try:
            built = cls(**tried)
            break
        except InputRangeError as error:
            mistakes.found.append(
                ScenarioError(source, f"{where}.{error.field}", _in_file_units(error, system))
            )
            if error.field not in tried or error.field not in defaults:
                break
            del tried[error.field]  # its default, to look for further mistakes
        except TypeError as error:
            mistakes.found.append(ScenarioError(source, where, str(error)))
            break
    mistakes.raise_any()
    return built


def _table_value(cls, key, raw, source, path, system):
    """One field of a settings table, read as its type (SI for a quantity)."""
    hint, optional = _field_kind(cls, key)
    if raw == "none" and optional:
        return None
    if hint is float:
        value = _number(source, path, raw)
        if key in FIELD_QUANTITIES:
            value = float(from_display(FIELD_QUANTITIES[key], value, system))
        return value
    if hint is int:
        return _number(source, path, raw, integer=True)
    if hint is bool:
        return _flag(source, path, raw)
    if typing.get_origin(hint) is tuple:
        if not isinstance(raw, list):
            raise ScenarioError(source, path, f"expected a list of numbers, got {raw!r}")
        return tuple(_number(source, f"{path}[{i + 1}]", v) for i, v in enumerate(raw))
    return _text(source, path, raw)


#: Core unit the model writes for each quantity of :data:`FIELD_QUANTITIES`.
_CORE_UNITS = {
    "temperature": "°C",
    "power": "kW",
    "heating_power": "kW",
    "airflow": "m³/s",
    "area": "m²",
    "enthalpy": "kJ/kg",
}


def _in_file_units(error: InputRangeError, system: UnitSystem) -> str:
    """The model's message (written in core SI units) with its figures in the file's units.

    The field's own quantity decides what its unit means (kW of a heating load is MBH in
    an I-P file, not tons); temperatures and the rest read as
    :func:`plantside.units.display_text` reads them.
    """
    quantities = dict(MESSAGE_QUANTITIES)
    quantity = FIELD_QUANTITIES.get(error.field)
    if quantity in _CORE_UNITS:
        quantities[_CORE_UNITS[quantity]] = quantity
    return display_text(str(error), system, quantities)


def _choice(source, where, value, allowed):
    value = _number(source, where, value)
    if not any(math.isclose(value, a) for a in allowed):
        allowed_text = ", ".join(f"{a:g}" for a in allowed)
        raise ScenarioError(source, where, f"{value:g} is not allowed; allowed: {allowed_text}")
    return value


def _percent(source, where, value, high=100.0):
    value = _number(source, where, value)
    if not 0.0 <= value <= high:
        raise ScenarioError(
            source, where, f"{value:g} is outside the allowed range 0 to {high:g} %"
        )
    return value


def field_unit(key: str, system) -> str:
    """The unit a scenario field is written in, in ``system`` ("" if dimensionless)."""
    quantity = FIELD_QUANTITIES.get(key)
    return unit_label(quantity, system) if quantity else ""
