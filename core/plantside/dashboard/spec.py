"""Vega-Lite specs of the dashboard's charts, fast enough for a slider move.

Altair's ``chart.to_dict()`` deep-copies the chart at every level of nesting
and re-checks every leaf against runtime protocols; for the dashboard's five
composed charts that is about 180 ms per slider move, most of the kernel time.
:func:`fast_spec` walks the same chart objects once and writes the same
dictionary, for the subset of Altair the chart builders use (unit, layer and
concat charts; field, value and datum channels; expressions; named and inline
data; no parameters or selections).

It never guesses: anything outside that subset (a DataFrame given as data, a
parameter, a class with its own serialisation this module does not know)
raises :class:`UnsupportedChartError`, and :class:`SpecWriter` then uses Altair's
own ``to_dict``. :class:`SpecWriter` also compares both results whenever a
chart's structure may have changed (first draw, unit system, pinned "A" on or
off), and keeps to Altair for that chart if they ever differ. The tests check
equality for every chart in every state they reach.
"""

from __future__ import annotations

import datetime as dt
import numbers

import altair as alt
import numpy as np

from plantside.charts.altair_internals import (
    Expression,
    SchemaBase,
    Undefined,
    parse_shorthand,
    update_nested,
)
from plantside.charts.altair_internals import vegalite_api as _api
from plantside.charts.altair_internals import vegalite_channels as _channels
from plantside.charts.altair_internals import vegalite_core as _core

__all__ = ["SpecWriter", "UnsupportedChartError", "altair_spec", "fast_spec"]


class UnsupportedChartError(Exception):
    """The chart uses a feature :func:`fast_spec` does not write."""


_PLAIN = (str, bool, int, float, type(None))
_GENERIC = SchemaBase.to_dict
_FIELD = _channels.FieldChannelMixin.to_dict
_VALUE = _channels.ValueChannelMixin.to_dict
_DATUM = _channels.DatumChannelMixin.to_dict
_TOP = _api.TopLevelMixin.to_dict
_CHART = _api.Chart.to_dict


def altair_spec(chart) -> dict:
    """Altair's own serialisation (no schema validation)."""
    return chart.to_dict(validate=False)


def fast_spec(chart) -> dict:
    """The Vega-Lite dict of ``chart``, equal to ``chart.to_dict(validate=False)``.

    Raises
    ------
    UnsupportedChartError
        When the chart uses something outside the supported subset.
    """
    if not isinstance(chart, _api.TopLevelMixin):
        raise UnsupportedChartError(f"not a top-level chart: {type(chart).__name__}")
    context = {"datasets": {}}
    spec = _top_level(chart, context, top=True)
    if "$schema" not in spec:
        spec["$schema"] = _api.SCHEMA_URL
    theme = alt.theme.get()
    if theme is None:
        raise UnsupportedChartError("no Altair theme enabled")
    spec = update_nested(theme(), spec, copy=True)
    if context["datasets"]:
        spec.setdefault("datasets", {}).update(context["datasets"])
    return spec


_COMPOSITIONS = (
    (_api.LayerChart, "layer"),
    (_api.HConcatChart, "hconcat"),
    (_api.VConcatChart, "vconcat"),
    (_api.ConcatChart, "concat"),
)
_LAYER_PROPS = ("height", "width", "view")


def _without(chart, prop: str):
    copy = chart.copy(deep=False)
    copy._kwds[prop] = Undefined
    return copy


def _normalised(chart, top: bool) -> dict:
    """The chart's properties as Altair's constructors leave them.

    Altair's layer and concat constructors move data shared by every part up to
    the composition, and a layer's height, width and view up to the layer
    chart; serialising re-runs the constructors, so the spec shows the moved form.
    """
    kwds = dict(chart._kwds)
    for cls, field in _COMPOSITIONS:
        if type(chart) is not cls:
            continue
        parts = list(kwds.get(field) or [])
        if not parts:
            return kwds
        if any(not isinstance(part, SchemaBase) for part in parts):
            raise UnsupportedChartError(f"{field} of non-chart objects")
        data = kwds.get("data", Undefined)
        if not top:
            # Below the top Altair has deep-copied the parts before their constructor
            # runs, so data objects shared by several parts are no longer the same
            # object; only a single part's data still moves up.
            if data is Undefined and len(parts) == 1 and parts[0]._get("data") is not Undefined:
                data = parts[0]._get("data")
                parts = [_without(parts[0], "data")]
        elif data is Undefined:
            shared = parts[0]._get("data")
            if shared is not Undefined and all(p._get("data") is shared for p in parts):
                data = shared
                parts = [_without(p, "data") for p in parts]
        elif all(p._get("data") is Undefined or p._get("data") is data for p in parts):
            parts = [_without(p, "data") if p._get("data") is not Undefined else p for p in parts]
        kwds["data"] = data
        if cls is _api.LayerChart:
            for prop in _LAYER_PROPS:
                own = kwds.get(prop, Undefined)
                values = [p._get(prop) for p in parts if p._get(prop) is not Undefined]
                if own is Undefined:
                    if values and any(v != values[0] for v in values[1:]):
                        raise UnsupportedChartError(f"inconsistent layer {prop}")
                    if values:
                        kwds[prop] = values[0]
                elif any(v != own for v in values):
                    raise UnsupportedChartError(f"inconsistent layer {prop}")
                parts = [_without(p, prop) if p._get(prop) is not Undefined else p for p in parts]
        kwds[field] = parts
    return kwds


def _top_level(chart, context: dict, top: bool = False) -> dict:
    kwds = _normalised(chart, top)
    data = kwds.get("data", Undefined)
    if type(chart).to_dict is _CHART and data is Undefined and "data" not in context:
        data = _core.InlineData(values=[{}])  # Altair's empty data for datum encodings
    if data is not Undefined:
        if not isinstance(data, dict | _core.Data | _core.InlineData | _core.NamedData):
            raise UnsupportedChartError(f"data of type {type(data).__name__}")
        kwds["data"] = _consolidate(data, context)
        context = dict(context, data=data)
    if kwds.get("params", Undefined) is not Undefined:
        raise UnsupportedChartError("parameters")
    out = {}
    for key, value in kwds.items():
        if value is Undefined:
            continue
        if key == "datasets" and top and isinstance(value, dict):
            out[key] = {name: _records(rows) for name, rows in value.items()}
            continue
        out[key] = _walk(value, context)
    mark = out.get("mark")
    if isinstance(mark, str):
        out["mark"] = {"type": mark}
    return out


def _consolidate(data, context):
    values, extra = Undefined, {}
    if isinstance(data, _core.InlineData):
        if data._get("name") is Undefined and data._get("values") is not Undefined:
            values = data._get("values")
            if isinstance(values, SchemaBase):
                raise UnsupportedChartError("InlineDataset values")
            extra = {"format": data._get("format")}
    elif isinstance(data, dict) and "name" not in data and "values" in data:
        values = data["values"]
        extra = {k: v for k, v in data.items() if k != "values"}
    if values is Undefined:
        return data
    name = _api._dataset_name(values)
    context["datasets"][name] = values
    return _core.NamedData(name=name, **extra)


def _records(rows):
    if not isinstance(rows, list):
        raise UnsupportedChartError("dataset that is not a list of rows")
    for row in rows:
        if not isinstance(row, dict) or not all(type(v) in _PLAIN for v in row.values()):
            return _walk(rows, {})
    return rows


def _walk(obj, context):
    if isinstance(obj, _PLAIN):
        return obj
    if isinstance(obj, SchemaBase):
        return _schema(obj, context)
    if isinstance(obj, list | tuple):
        return [_walk(v, context) for v in obj]
    if isinstance(obj, dict):
        return {k: _walk(v, context) for k, v in obj.items() if v is not Undefined}
    if isinstance(obj, np.ndarray):
        return [_walk(v, context) for v in obj]
    if isinstance(obj, np.bool_):
        return bool(obj)
    if isinstance(obj, np.number | numbers.Number):
        return float(obj)
    if isinstance(obj, dt.date):
        raise UnsupportedChartError("dates")
    raise UnsupportedChartError(f"value of type {type(obj).__name__}")


def _schema(obj: SchemaBase, context) -> object:
    method = type(obj).to_dict
    if isinstance(obj, Expression):
        return repr(obj)
    if isinstance(obj, _api.TopLevelMixin):
        if method not in (_TOP, _CHART):
            raise UnsupportedChartError(f"{type(obj).__name__} serialises itself")
        return _top_level(obj, context)
    if method is _FIELD:
        return _field_channel(obj, context)
    if method is _VALUE:
        condition = obj._get("condition", Undefined)
        if isinstance(condition, dict) and "field" in condition and "type" not in condition:
            raise UnsupportedChartError("condition with an untyped field")
        return _generic(obj, context)
    if method in (_GENERIC, _DATUM):
        return _generic(obj, context)
    raise UnsupportedChartError(f"{type(obj).__name__} serialises itself")


def _generic(obj: SchemaBase, context, kwds: dict | None = None):
    if obj._args and not obj._kwds:
        return _walk(obj._args[0], context)
    if obj._args:
        raise UnsupportedChartError("schema object with both a value and properties")
    kwds = dict(obj._kwds) if kwds is None else kwds
    out = {}
    for key, value in kwds.items():
        if key in ("shorthand", "_cached_hash") or value is Undefined:
            continue
        out[key] = _walk(value, context)
    mark = out.get("mark")
    if isinstance(mark, str):
        out["mark"] = {"type": mark}
    return out


def _field_channel(obj: SchemaBase, context):
    shorthand = obj._get("shorthand")
    field = obj._get("field")
    if shorthand is not Undefined and field is not Undefined:
        raise UnsupportedChartError("shorthand and field both given")
    if shorthand is Undefined:
        parsed = {}
    elif isinstance(shorthand, str):
        data = context.get("data")
        if not isinstance(data, dict | SchemaBase | type(None)):
            raise UnsupportedChartError("type inference from a DataFrame")
        parsed = parse_shorthand(shorthand)
        type_required = "type" in obj._kwds
        if not type_required:
            parsed.pop("type", None)
        elif "type" not in parsed and obj._get("type") is Undefined:
            raise UnsupportedChartError(f"field {shorthand!r} without a type")
    elif isinstance(shorthand, list | tuple):
        raise UnsupportedChartError("list of shorthands")
    else:
        parsed = {"field": shorthand}
    kwds = dict(obj._kwds)
    if "sort" in parsed and ("sort" not in kwds or kwds["type"] not in {"ordinal", Undefined}):
        parsed.pop("sort")
    kwds.update((k, v) for k, v in parsed.items() if kwds.get(k, Undefined) is Undefined)
    return _generic(obj, context, kwds)


class SpecWriter:
    """Turns charts into specs: :func:`fast_spec`, checked against Altair when it matters.

    Parameters
    ----------
    check : bool
        Compare with Altair's result whenever :meth:`spec` is given a new
        ``structure`` key for a chart name.

    Attributes
    ----------
    fallbacks : dict of str to str
        Chart name -> why Altair's own serialisation is used for it.
    """

    def __init__(self, check: bool = True):
        self.check = check
        self.fallbacks: dict[str, str] = {}
        self._checked: dict[str, object] = {}

    def seed(self, name: str, chart, structure, reference: dict) -> None:
        """Check :func:`fast_spec` against a spec Altair already wrote (e.g. at first draw)."""
        try:
            same = fast_spec(chart) == reference
        except UnsupportedChartError as error:
            self.fallbacks[name] = str(error)
            return
        if same:
            self._checked[name] = structure
        else:
            self.fallbacks[name] = "differs from Altair's serialisation"

    def spec(self, name: str, chart, structure=None) -> dict:
        """The spec of ``chart`` (shown as chart ``name``; ``structure`` keys its shape)."""
        if name in self.fallbacks:
            return altair_spec(chart)
        try:
            fast = fast_spec(chart)
        except UnsupportedChartError as error:
            self.fallbacks[name] = str(error)
            return altair_spec(chart)
        if self.check and self._checked.get(name, object()) != structure:
            reference = altair_spec(chart)
            if reference != fast:
                self.fallbacks[name] = "differs from Altair's serialisation"
                return reference
            self._checked[name] = structure
        return fast
