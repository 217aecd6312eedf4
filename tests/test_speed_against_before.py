"""Benchmark: the core against itself before the speed work, in the same run.

Issue 15 sets its speed targets against "today's" time, measured once the air-side and
water-side work had landed: an air handler's year in half of it, the outdoor-air sweep
(101 fractions x 8,760 hours) in at most 40 % of it. This benchmark times both versions
in the same run: it exports the package as it was at :data:`BEFORE` (the last commit
before the speed work) from the repository's history, then runs ``tests/speed_probe.py``
in fresh processes, the working tree's and the earlier package by turns, on the same
inputs. It prints the ratios beside their targets and asserts only that both versions
give the same sweep (the speed work changed no result beyond the wet-bulb solver's
stated tolerance).
"""

from __future__ import annotations

import io
import json
import os
import statistics
import subprocess
import sys
import tarfile
from pathlib import Path

import numpy as np
import pytest

pytestmark = pytest.mark.benchmark

ROOT = Path(__file__).resolve().parents[1]
PROBE = Path(__file__).with_name("speed_probe.py")
#: The last commit before the speed work of issue 15 (after the air-side and water-side
#: work it says to measure after): "Hourly cautions count hours in good English".
BEFORE = "b058fd4"
#: Time of the working tree / time before, at most (issue 15's table).
TARGETS = {"year_default": 0.5, "year_heavy": 0.5, "sweep": 0.4}
#: Rounds of (working tree, before) runs; each prints medians of several timings.
ROUNDS = 3


def _export_before(folder: Path) -> Path | None:
    """The package at :data:`BEFORE`, extracted into ``folder``; None without the history."""
    try:
        archive = subprocess.run(
            ["git", "-C", str(ROOT), "archive", "--format=tar", BEFORE, "core/plantside"],
            capture_output=True,
            check=True,
            timeout=60,
        ).stdout
    except (OSError, subprocess.SubprocessError):
        return None
    with tarfile.open(fileobj=io.BytesIO(archive)) as tar:
        tar.extractall(folder, filter="data")
    return folder / "core"


def _probe(path: Path | None) -> dict:
    environment = dict(os.environ)
    if path is not None:
        environment["PYTHONPATH"] = str(path)
    environment["PYTHONDONTWRITEBYTECODE"] = "1"
    done = subprocess.run(
        [sys.executable, str(PROBE), "5"],
        capture_output=True,
        text=True,
        env=environment,
        cwd=ROOT,
        timeout=600,
        check=False,
    )
    assert done.returncode == 0, done.stderr[-3000:]
    return json.loads(done.stdout.strip().splitlines()[-1])


def test_core_speed_against_the_code_before_the_speed_work(tmp_path):
    before_path = _export_before(tmp_path)
    if before_path is None:  # a shallow clone: say so, and measure nothing
        print(f"\n[benchmark] the history holds no commit {BEFORE}: nothing to compare with")
        return
    now, before = [], []
    for _ in range(ROUNDS):  # by turns, so a busy minute weighs on both alike
        now.append(_probe(None))
        before.append(_probe(before_path))
    # the same answers: every sweep column within the wet-bulb solver's stated tolerance
    for column, values in before[0]["sweep"].items():
        np.testing.assert_allclose(now[0]["sweep"][column], values, rtol=1e-5, atol=1e-3)
    load = os.getloadavg()[0]
    print(
        f"\n[benchmark] the core against commit {BEFORE} (before the speed work), load {load:.1f}:"
    )
    for name, target in TARGETS.items():
        t_now = statistics.median(run["seconds"][name] for run in now)
        t_before = statistics.median(run["seconds"][name] for run in before)
        share = t_now / t_before
        print(
            f"  {name:13s} now {1000 * t_now:8.2f} ms, before {1000 * t_before:8.2f} ms: "
            f"{100 * share:4.0f} % of before (target <= {100 * target:.0f} %: "
            f"{'met' if share <= target else 'not met'})"
        )
