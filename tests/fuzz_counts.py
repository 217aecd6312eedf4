"""What every fuzz test module shares: how many examples to run and the case count.

Used by the CSV fuzz (``tests/csv_fuzz.py`` and the weather and zone-load fuzz tests)
and the scenario fuzz (``tests/test_fuzz_scenario.py``).
"""

from __future__ import annotations

import os
from collections import Counter

import pytest

#: Multiplies every max_examples (default 1; e.g. PLANTSIDE_FUZZ_SCALE=20 for a long hunt
#: by hand; CI keeps the default so the fuzz files stay under a minute).
FUZZ_SCALE = float(os.environ.get("PLANTSIDE_FUZZ_SCALE", "1"))


def examples(count: int) -> int:
    """``count`` hypothesis examples scaled by :data:`FUZZ_SCALE`."""
    return max(1, round(count * FUZZ_SCALE))


def case_count_fixture(outcomes: Counter, label: str):
    """A module fixture printing how many cases ran, by outcome, at the end of the module."""

    @pytest.fixture(scope="module", autouse=True)
    def _print_case_count(request):
        outcomes.clear()
        yield
        total = sum(outcomes.values())
        line = f"{label}: {total} cases ran ({dict(sorted(outcomes.items()))})"
        print(line)
        capture = request.config.pluginmanager.getplugin("capturemanager")
        if capture is not None:
            with capture.global_and_fixture_disabled():
                print("\n" + line)

    return _print_case_count
