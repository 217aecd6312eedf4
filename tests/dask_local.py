"""A Dask LocalCluster for the tests that leaves this process's environment as it was.

A Dask nanny sets its ``distributed.nanny.pre-spawn-environ`` variables in the process
that starts it, before spawning the worker (Dask's own documentation says so: "even if
this means poisoning the process running the Nanny"), and leaves them there. One of
them, ``MALLOC_TRIM_THRESHOLD_=65536``, turns off glibc's dynamic mapping threshold in
every process this test run starts afterwards, and ``plantside.air.heap`` then leaves
the allocator alone, as it must when the environment sets it: measured on a 2-core
machine, the outdoor-air sweep of ``tests/speed_probe.py`` took 0.76 s in such a process
against 0.11 s in a clean one, an air handler's year 4.3 ms against 2.0 ms. So the
benchmarks and the command-line tests that run after the Dask tests would measure, or
wait for, a slower core than the one users run.
"""

from __future__ import annotations

import os
from contextlib import contextmanager


@contextmanager
def local_cluster(n_workers: int, **options):
    """Single-threaded worker processes on 127.0.0.1, no dashboard; ``os.environ`` is
    restored when the cluster closes."""
    from dask import distributed

    saved = dict(os.environ)
    try:
        with distributed.LocalCluster(
            host="127.0.0.1",
            n_workers=n_workers,
            threads_per_worker=1,
            processes=True,
            dashboard_address=None,
            # the scheduler's health and metrics server, on a free loopback port (not on
            # 8787, which the module's other cluster may hold: a warning each time)
            scheduler_kwargs={"dashboard_address": "127.0.0.1:0"},
            **options,
        ) as cluster:
            yield cluster
    finally:
        os.environ.clear()
        os.environ.update(saved)
