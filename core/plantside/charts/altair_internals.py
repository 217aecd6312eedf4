"""Every use of Altair's internal modules, in one place.

The chart builders use Altair's public API (``import altair as alt``). Two speed-ups
reach below it: the dashboard's spec writer (:mod:`plantside.dashboard.spec`, which
walks chart objects instead of calling ``to_dict``) and the builders' switch-off of
per-object validation (:mod:`plantside.charts.palette`). Both import Altair's internals
from here and nowhere else, so an Altair release that moves one breaks this module
only, and ``tests/test_altair_internals.py`` names what moved.

:data:`REQUIRED` lists every internal name plantside touches, with the few public
names that arrived late (``alt.theme``, Altair 5.5; ``altair.vegalite.v6``, Altair
6.0). Checked with Altair 6.0.0 and 6.3.0, hence ``altair>=6.0,<7`` in
``pyproject.toml``: a new major version gets a new ``vegalite`` module and must be
checked before the bound moves.
"""

from __future__ import annotations

import altair as alt
from altair.expr.core import Expression
from altair.utils import parse_shorthand, update_nested
from altair.utils.schemapi import SchemaBase, Undefined, debug_mode
from altair.vegalite.v6 import api as vegalite_api
from altair.vegalite.v6.schema import channels as vegalite_channels
from altair.vegalite.v6.schema import core as vegalite_core

__all__ = [
    "REQUIRED",
    "Expression",
    "SchemaBase",
    "Undefined",
    "chart_widget_sources",
    "debug_mode",
    "missing_names",
    "parse_shorthand",
    "update_nested",
    "vegalite_api",
    "vegalite_channels",
    "vegalite_core",
]

#: The attributes plantside reads below the names imported above, as
#: ``"<name in this module>.<attribute>"``.
REQUIRED = (
    "alt.theme.get",
    "alt.theme.register",
    "alt.theme.enable",
    "alt.theme.names",
    "alt.theme.ThemeConfig",
    "SchemaBase.to_dict",
    "SchemaBase.copy",
    "SchemaBase._get",
    "vegalite_api.SCHEMA_URL",
    "vegalite_api._dataset_name",
    "vegalite_api.TopLevelMixin.to_dict",
    "vegalite_api.Chart.to_dict",
    "vegalite_api.LayerChart",
    "vegalite_api.HConcatChart",
    "vegalite_api.VConcatChart",
    "vegalite_api.ConcatChart",
    "vegalite_channels.FieldChannelMixin.to_dict",
    "vegalite_channels.ValueChannelMixin.to_dict",
    "vegalite_channels.DatumChannelMixin.to_dict",
    "vegalite_core.Data",
    "vegalite_core.InlineData",
    "vegalite_core.NamedData",
)

_ROOTS = {
    "alt": alt,
    "SchemaBase": SchemaBase,
    "vegalite_api": vegalite_api,
    "vegalite_channels": vegalite_channels,
    "vegalite_core": vegalite_core,
}

#: Attributes every schema object carries once constructed (set in ``__init__``).
INSTANCE_ATTRIBUTES = ("_args", "_kwds")


def missing_names() -> list[str]:
    """The names of :data:`REQUIRED` and :data:`INSTANCE_ATTRIBUTES` this Altair lacks.

    Returns
    -------
    list of str
        Empty when everything plantside uses is where it expects it.
    """
    absent = object()
    missing = []
    for dotted in REQUIRED:
        first, *rest = dotted.split(".")
        obj = _ROOTS[first]
        for part in rest:
            obj = getattr(obj, part, absent)
            if obj is absent:
                missing.append(dotted)
                break
    sample = vegalite_core.InlineData(values=[{}])
    missing += [
        f"SchemaBase instance .{name}" for name in INSTANCE_ATTRIBUTES if not hasattr(sample, name)
    ]
    return missing


def chart_widget_sources() -> tuple[str, str]:
    """The Vega-Lite version vl-convert bundles for Altair's chart widget and the widget's
    own script: what its offline script is made from (dashboard/offline_charts.py)."""
    from altair.jupyter.jupyter_chart import load_js_src
    from altair.utils._importers import vl_version_for_vl_convert

    return vl_version_for_vl_convert(), load_js_src()
