"""The sweep command line with a gate on its workers, for the Ctrl-C test.

``python -c "import sweep_gate; sweep_gate.main()" sweep ...`` runs the real command line
with :func:`plantside.study.sweep_run.run_batch` replaced by :func:`gated_run_batch`: the
first batch to claim the gate runs; every other batch waits in its worker (at most
``HOLD_SECONDS``). So the sweep cannot finish before the test's interrupt arrives, and
exactly one batch has finished when it does, however fast or loaded the machine is.

The workers unpickle :func:`gated_run_batch` by its module name, so the child needs this
folder on ``PYTHONPATH``; the environment variable ``GATE_VARIABLE`` names an empty folder
where the first batch leaves its claim.
"""

import os
import signal
import sys
import time
from pathlib import Path

from plantside.study import sweep_run

GATE_VARIABLE = "PLANTSIDE_TEST_SWEEP_GATE"
HOLD_SECONDS = 120.0

_run_batch = sweep_run.run_batch


def gated_run_batch(sweep, cases):
    """Run the first batch claimed; hold every later one until the workers are stopped."""
    claim = Path(os.environ[GATE_VARIABLE]) / "first-batch"
    try:
        os.close(os.open(claim, os.O_CREAT | os.O_EXCL | os.O_WRONLY))
    except FileExistsError:
        time.sleep(HOLD_SECONDS)  # ended early by the parent terminating this worker
    return _run_batch(sweep, cases)


def main() -> None:
    """Run ``plantside`` with the arguments after ``-c``, the workers gated.

    Ctrl-C is given its usual meaning first: a test suite started as a background job
    (``command &`` in a shell without job control) runs with SIGINT ignored, Python then
    leaves it ignored in this child, and the test's interrupt would never arrive.
    """
    signal.signal(signal.SIGINT, signal.default_int_handler)
    sweep_run.run_batch = gated_run_batch
    from plantside.cli.main import main as plantside_main

    sys.exit(plantside_main(sys.argv[1:]))
