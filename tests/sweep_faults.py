"""Worker deaths on demand, for the sweep tests: a batch that kills its own worker process.

The tests put ``functools.partial(dying_run_batch, doomed, claims, os.getpid())`` in place
of :func:`plantside.study.sweep_run.run_batch`. The partial is pickled with each task, so
the worker (a local pool's process or a Dask worker) receives the doomed case ids with
it; nothing is read from the environment, which a forkserver's children would not see.
"""

import os
import signal
from pathlib import Path

from plantside.study import sweep_run

_run_batch = sweep_run.run_batch  # the real one, whatever a test puts in its place


def dying_run_batch(doomed, claims, test_process, sweep, cases):
    """Kill this worker process (SIGKILL, as the out-of-memory killer does) when the
    batch holds a case id in ``doomed``; with ``claims`` (a folder), only the first time.

    Never kills the test process itself (``test_process``, its pid): there it just runs.
    """
    if os.getpid() != test_process and any(case.case_id in doomed for case in cases):
        first = True
        if claims is not None:
            claim = Path(claims) / min(case.case_id for case in cases)
            try:
                os.close(os.open(claim, os.O_CREAT | os.O_EXCL | os.O_WRONLY))
            except FileExistsError:
                first = False
        if first:
            os.kill(os.getpid(), signal.SIGKILL)
    return _run_batch(sweep, cases)
