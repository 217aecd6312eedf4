"""Fuzzing of what a served page can send to every control of a real dashboard.

Anyone who reaches a served dashboard can send any widget message over its websocket.
Hostile messages (hypothesis) go to every control of a :class:`Dashboard` in both
views through ``widget._handle_msg``, the path ipywidgets takes for a comm message
(an ``update`` calls ``widget.set_state``; a ``custom`` message is a button's click):
values of the wrong type, NaN and infinity, huge numbers, a 1 MB string, unknown
choices, negative indices, None, lists, dicts, other trait names (``disabled``,
``min``, ``max``, ``options``, ...), malformed file uploads (a 1 MB file name, bytes
that are not text, a scenario of too many air handlers), and now and then a valid
move. After each message:

- no exception escaped, and none was logged (ipywidgets logs an exception raised while
  handling a comm message, and :meth:`Controls.guarded` logs one it caught: either is a
  code path never meant to run);
- every control shows the value in use (the widget's value is the state's);
- every message beside a control is at most ``MAX_MESSAGE_CHARS`` long (plus markup):
  nothing sent is echoed whole;
- the headline figures are finite.

After each example a valid move still recomputes. The number of messages sent is
printed at the end of the module (``tests/fuzz_counts.py``).
"""

from __future__ import annotations

import dataclasses
import logging
import math
from collections import Counter
from pathlib import Path

import pytest
from fuzz_counts import case_count_fixture, examples
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from plantside.dashboard.app import Dashboard
from plantside.dashboard.controls import (
    MAX_MESSAGE_CHARS,
    SLIDERS,
    GuardedFileUpload,
    GuardedFloatSlider,
    GuardedInput,
)
from plantside.study.scenario import MAX_AIR_HANDLERS, load_scenario

EXAMPLE_FILE = Path(__file__).resolve().parents[1] / "core" / "plantside" / "data"
EXAMPLE_FILE = EXAMPLE_FILE / "example_scenario.toml"
HUGE = "x" * 1_000_000  # 1 MB: what a first attack sent as a file name

OUTCOMES: Counter = Counter()
_print_case_count = case_count_fixture(OUTCOMES, "widget message fuzz")


class Records(logging.Handler):
    """Every log record of WARNING or above, from any logger."""

    def __init__(self):
        super().__init__(logging.WARNING)
        self.records: list[logging.LogRecord] = []

    def emit(self, record):
        self.records.append(record)


@pytest.fixture(scope="module")
def records():
    handler = Records()
    # traitlets' logger (ipywidgets' "Exception in widget method") does not propagate
    loggers = [logging.getLogger(), logging.getLogger("traitlets")]
    for logger in loggers:
        logger.addHandler(handler)
    yield handler
    for logger in loggers:
        logger.removeHandler(handler)


@pytest.fixture(scope="module", params=["air_handler", "plant"])
def dashboard(request):
    return Dashboard(load_scenario(EXAMPLE_FILE), view=request.param, air_handler=1)


def _controls(dashboard: Dashboard) -> dict:
    """Every widget of the dashboard a page can send a message to, by a name."""
    found = dict(dashboard.controls.widgets)
    found["air_handler"] = dashboard.air_handler_choice
    found["export_csv"] = dashboard.file_buttons["csv"]
    found["export_toml"] = dashboard.file_buttons["toml"]
    for name, buttons in dashboard.export_buttons.items():
        for button in buttons:
            found[f"export_{name}_{button.description.lower()}"] = button
    if dashboard.view == "plant":  # the plant page's parts and their own controls
        found["page"] = dashboard.page_choice
        for name, slider in dashboard.stress_panel.sliders.items():
            found[f"stress_{name}"] = slider
        # the run buttons start a study or a sweep (seconds each): their clicks are tested
        # in the panels' own tests, not a thousand times here
        found.update(
            (name, widget)
            for name, widget in dashboard.sweep_panel.controls.items()
            if name != "sweep_run"
        )
    return found


# ------------------------------------------------------------------ hostile values
NUMBERS = [0, -1, 1, 7, 10**30, -(10**30), 2**63, 1e308, -1e308, 5e-324, 0.5, 35, 99.9]
values = st.one_of(
    st.none(),
    st.booleans(),
    st.sampled_from(NUMBERS),
    st.integers(),
    st.floats(allow_nan=True, allow_infinity=True),
    st.just(math.nan),
    st.just(math.inf),
    st.text(max_size=20),
    st.sampled_from(["", "1_0", "Infinity", "NaN", "SI", "IP", "Atlantis", "0", HUGE]),
    st.lists(st.integers(-3, 3), max_size=3),
    st.builds(dict),
    st.just({"name": HUGE}),
)
OTHER_TRAITS = [
    "disabled",
    "min",
    "max",
    "step",
    "options",
    "_options_labels",
    "description",
    "tooltip",
    "layout",
    "readout_format",
    "icon",
    "accept",
    "multiple",
    "",
    "x" * 300,
]


def _file(name="year.csv", content=b"drybulb_C\n20\n", **changes):
    item = {"name": name, "type": "text/csv", "size": len(content), "content": content}
    item["last_modified"] = 1.7e12  # ms since 1970 (what the page sends)
    item.update(changes)
    return item


def _scenario_with_units(count: int) -> bytes:
    head, *units = EXAMPLE_FILE.read_text("utf-8").split("[[air_handler]]")
    body = units[0]
    tables = "".join(
        "[[air_handler]]" + body.replace(body.split('"')[1], f"AHU-{i}", 1) for i in range(count)
    )
    return (head + tables).encode()


BAD_FILES = [
    [_file(name=HUGE)],
    [_file(content=HUGE)],
    [_file(content=b"\x89PNG\r\n\x1a\n" + bytes(range(1, 256)) * 20)],  # no NUL byte
    [_file(content=bytes(range(1, 256)) * 40)],
    [_file(content=b"\xff\xfe\x00d")],
    [_file(size=-1)],
    [_file(last_modified=math.nan)],
    [_file(last_modified=1e300)],
    [_file(), _file()],
    [{"name": "a.csv"}],
    [_file(name="x.toml", content=_scenario_with_units(MAX_AIR_HANDLERS + 1))],
    [_file(name="x.toml", content=b"[" * 100_000)],
    [_file(name="x.toml", content=b"title = '" + HUGE.encode() + b"'")],
    [_file(name="../../etc/passwd", content=b"unit_system = 'SI'\n")],
    [],
]


@st.composite
def messages(draw, widget):
    """One hostile message (method, data) for ``widget``; now and then a valid move."""
    if draw(st.integers(0, 9)) == 0:  # a button's click, or a custom message of junk
        return "custom", draw(st.one_of(st.just({"event": "click"}), values))
    key = getattr(widget, "input_key", "value") or "value"
    kind = draw(st.integers(0, 9))
    if kind == 0:
        return "update", {draw(st.sampled_from(OTHER_TRAITS)): draw(values)}
    if kind == 1:
        return "update", {key: draw(values), draw(st.sampled_from(OTHER_TRAITS)): draw(values)}
    if kind == 2:
        return "update", draw(st.one_of(st.just({}), values))  # not a state at all
    if isinstance(widget, GuardedFileUpload):
        return "update", {"value": draw(st.one_of(st.sampled_from(BAD_FILES), values))}
    if kind in (3, 5):  # a valid move (recomputes)
        # drawn with fixed bounds, then placed in the control's range: the range follows
        # the page's state, which carries over between examples (a draw bounded by it is
        # not replayable: hypothesis FlakyStrategyDefinition in the long run)
        if isinstance(widget, GuardedFloatSlider):
            share = draw(st.floats(0.0, 1.0))
            return "update", {key: min(widget.max, widget.min + share * (widget.max - widget.min))}
        if key == "index":
            return "update", {key: draw(st.integers(0, 2**16)) % max(1, len(widget.options))}
    if kind == 4 and key == "index":  # an index just outside the choices
        return "update", {key: draw(st.sampled_from([-1, len(widget.options), 2**31]))}
    return "update", {key: draw(values)}


def _send(widget, method, data):
    if method == "custom":
        message = {"content": {"data": {"method": "custom", "content": data}}, "buffers": []}
    else:
        message = {"content": {"data": {"method": "update", "state": data}}, "buffers": []}
    widget._handle_msg(message)


# ------------------------------------------------------------------ the oracle
def _check_shows_state(dashboard: Dashboard):
    controls, state = dashboard.controls, dashboard.state
    system = state.inputs.unit_system
    for name, spec in SLIDERS.items():
        slider = controls.widgets[name]
        shown = spec.to_display(state.shown_value(name), system)
        if not math.isfinite(shown):  # a setting this air handler does not hold (hidden)
            # disabled, hidden, and a number the page can draw (NaN breaks the slider's view)
            assert slider.disabled and slider.value == slider.min, name
            continue
        assert slider.value == pytest.approx(min(max(shown, slider.min), slider.max)), name
        assert bool(slider.disabled) == bool(state.applies(name)), name
    for name in ("economizer", "economizer_integrated", "fan_control", "design_percent"):
        assert controls.widgets[name].value == getattr(state.inputs, name), name
    assert controls.widgets["climate"].value == state.inputs.climate
    assert controls.widgets["unit_system"].value == system
    assert dashboard.air_handler_choice.value == state.inputs.air_handler
    assert controls.widgets["unpin"].disabled == (state.pinned is None)


def _check_messages(dashboard: Dashboard):
    areas = {**dashboard.controls.messages, "export": dashboard.export_message}
    markup = 120  # the message area's div, class, role and warning sign
    for name, area in areas.items():
        assert len(area.value) <= MAX_MESSAGE_CHARS + markup, (name, area.value[:200])
    for name, text in dashboard.state.messages.items():
        assert len(text) <= 20_000, (name, text[:200])  # shown as an excerpt


def _check_figures(dashboard: Dashboard):
    figures = dashboard.state.result.figures
    for field in dataclasses.fields(figures):
        value = getattr(figures, field.name)
        if isinstance(value, int | float):
            assert math.isfinite(value), field.name
    assert all(math.isfinite(v) for v in figures.design_loads.values())


@settings(
    max_examples=examples(60),
    deadline=None,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture],
)
@given(data=st.data())
def test_hostile_messages_to_every_control_are_refused_cleanly(dashboard, records, data):
    controls = _controls(dashboard)
    for _ in range(data.draw(st.integers(1, 4))):
        name = data.draw(st.sampled_from(sorted(controls)))
        widget = controls[name]
        assert isinstance(widget, GuardedInput), f"{name} takes page messages unguarded"
        method, payload = data.draw(messages(widget))
        before = (dashboard.state.inputs, dict(dashboard.state.messages))
        records.records.clear()
        _send(widget, method, payload)
        logged = [(r.name, r.getMessage()[:300]) for r in records.records]
        assert not logged, f"{name}: {method} {str(payload)[:200]}: {logged}"
        OUTCOMES[
            "taken"
            if dashboard.state.inputs != before[0]
            else "refused with a message"
            if dashboard.state.messages != before[1]
            else "no change"
        ] += 1
        _check_shows_state(dashboard)
        _check_messages(dashboard)
        _check_figures(dashboard)
    # the dashboard still works: a valid move of a slider that applies recomputes
    state = dashboard.state
    system = state.inputs.unit_system
    moves = [
        (name, round(target, 1))
        for name in SLIDERS
        if not controls[name].disabled
        for target in (
            controls[name].value + sign * controls[name].step * k
            for k in (1, 4)
            for sign in (1, -1)
        )
        if controls[name].min <= round(target, 1) <= controls[name].max
    ]
    name, target = next(
        (name, target) for name, target in moves if _accepted(state, name, target, system)
    )
    _send(controls[name], "update", {"value": target})
    assert not records.records, [r.getMessage()[:300] for r in records.records]
    assert controls[name].value == pytest.approx(target)
    assert state.shown_value(name) == pytest.approx(SLIDERS[name].from_display(target, system))
    assert state.result.inputs == state.inputs or state.stale
    _check_figures(dashboard)


def _accepted(state, name, target, system) -> bool:
    try:
        state.validate(name, SLIDERS[name].from_display(target, system))
    except Exception:
        return False
    return True


# ------------------------------------------------------------------ spot checks
def test_a_one_megabyte_file_name_is_refused_with_an_excerpt(dashboard, records):
    # The first attack's finding: a 1 MB name was echoed whole into the page.
    records.records.clear()
    upload = dashboard.controls.widgets["scenario_upload"]
    _send(upload, "update", {"value": [_file(name=HUGE, content=b"unit_system = 'SI'\n")]})
    message = dashboard.controls.messages["scenario"].value
    assert "255 characters" in message and len(message) < MAX_MESSAGE_CHARS + 120
    assert not records.records


def test_a_scenario_of_too_many_air_handlers_is_refused_before_the_work(dashboard, records):
    # The limit is MAX_AIR_HANDLERS (50); the refusal comes before any year is computed.
    upload = dashboard.controls.widgets["scenario_upload"]
    before = dashboard.state.scenario
    content = _scenario_with_units(MAX_AIR_HANDLERS + 1)
    _send(upload, "update", {"value": [_file(name="big.toml", content=content)]})
    assert dashboard.state.scenario is before
    message = dashboard.controls.messages["scenario"].value
    assert f"51 [[air_handler]] tables is more than the {MAX_AIR_HANDLERS}" in message
    assert not records.records


def test_a_callback_that_fails_unexpectedly_shows_a_short_message_and_logs(
    dashboard, records, monkeypatch
):
    # The guard every callback runs in: an exception no check foresaw is logged on the
    # server with its traceback and the page gets a short message, never the traceback.
    def broken(*args, **kwargs):
        raise RuntimeError("/srv/secret/path.py line 1")

    monkeypatch.setattr(dashboard, "export_hourly_csv", broken)
    records.records.clear()
    _send(dashboard.file_buttons["csv"], "custom", {"event": "click"})
    assert [r.name for r in records.records] == ["plantside.dashboard"]
    assert records.records[0].exc_info is not None
    shown = dashboard.export_message.value
    assert "details are in the server" in shown and "/srv/secret" not in shown
    records.records.clear()
    dashboard.state.messages["export"] = ""
    dashboard._show_text()
