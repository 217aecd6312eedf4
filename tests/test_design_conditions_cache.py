"""Design conditions are kept per climate: the same record gives the same (immutable)
result without computing it again; any change of content, site name or settings gives
its own. The figures themselves are checked in tests/test_design_conditions.py."""

from __future__ import annotations

import dataclasses

import pytest
from air_handler_cases import synthetic_weather
from plantside.climate import design_conditions as dc
from plantside.errors import InputRangeError


@pytest.fixture(autouse=True)
def _empty_cache():
    dc.clear_design_conditions_cache()
    yield
    dc.clear_design_conditions_cache()


def _count_computations(monkeypatch):
    calls = []
    original = dc._design_conditions

    def counted(*args):
        calls.append(args)
        return original(*args)

    monkeypatch.setattr(dc, "_design_conditions", counted)
    return calls


def test_same_record_computed_once(monkeypatch):
    calls = _count_computations(monkeypatch)
    weather = synthetic_weather()
    first = dc.design_conditions_from_weather(weather)
    # an equal record in a new object (as a worker reads the same file again)
    again = dc.design_conditions_from_weather(synthetic_weather())
    assert again is first
    assert len(calls) == 1
    with pytest.raises(dataclasses.FrozenInstanceError):
        first.pressure = 0.0  # immutable, so sharing it is safe


def test_content_site_and_settings_each_give_their_own(monkeypatch):
    calls = _count_computations(monkeypatch)
    base = dc.design_conditions_from_weather(synthetic_weather())
    warmer = dc.design_conditions_from_weather(synthetic_weather(mean=16.0))
    renamed = dc.design_conditions_from_weather(synthetic_weather(site="Fictional Otherville"))
    wider = dc.design_conditions_from_weather(synthetic_weather(), drybulb_band=1.0)
    assert len(calls) == 4
    assert warmer.cooling().drybulb > base.cooling().drybulb
    assert renamed.site == "Fictional Otherville" and base.site == "Fictional Testville"
    assert wider is not base
    assert calls[-1][1:] == (1.0, 0.5, 1.0, 5, 0.5)  # the settings reach the computation
    # one changed hour is a different record
    weather = synthetic_weather()
    drybulb = weather.drybulb.copy()
    drybulb[100] += 0.01
    changed = dataclasses.replace(weather, drybulb=drybulb)
    dc.design_conditions_from_weather(changed)
    assert len(calls) == 5


def test_refused_records_are_not_kept_and_the_cache_is_bounded(monkeypatch):
    with pytest.raises(InputRangeError):
        dc.design_conditions_from_weather(synthetic_weather(hours=240))
    assert len(dc._CACHE) == 0
    for index in range(dc.CACHE_SIZE + 3):
        dc.design_conditions_from_weather(synthetic_weather(seed=index, hours=744))
    assert len(dc._CACHE) == dc.CACHE_SIZE
