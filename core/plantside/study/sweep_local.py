"""Running a sweep's batches on local worker processes.

A :class:`concurrent.futures.ProcessPoolExecutor` with the ``forkserver`` start method
where the platform has it (a clean, single-threaded parent, with the worker module
:mod:`plantside.study.sweep_worker` preloaded once), the platform default (spawn)
elsewhere. Workers ignore SIGINT, so Ctrl-C reaches only the parent, which keeps what
finished and stops the workers. A worker that dies breaks the whole pool; the batches
it may have been running are run again, each in a worker of its own
(:func:`run_local`).
"""

from __future__ import annotations

import multiprocessing
import os
import signal
import threading
from collections import deque
from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait
from concurrent.futures.process import BrokenProcessPool

from plantside.study.sweep_worker import WORKER_DIED, failed_rows

__all__ = ["WORKER_MODULE", "local_workers", "run_local"]

#: The module the workers run from, imported once in the forkserver.
WORKER_MODULE = "plantside.study.sweep_worker"


def _ignore_interrupt() -> None:
    """Worker initialiser: Ctrl-C is the parent's to handle (it keeps finished parts)."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)


def _local_context():
    """forkserver where available (a clean, single-threaded parent for the workers, with
    plantside imported once), else the platform default (spawn)."""
    if "forkserver" in multiprocessing.get_all_start_methods():
        context = multiprocessing.get_context("forkserver")
        context.set_forkserver_preload([WORKER_MODULE])
        return context
    return multiprocessing.get_context()


def _quiet_manager_thread(executor: ProcessPoolExecutor) -> None:
    """Keep the pool's manager thread from printing a traceback when we stop its workers.

    Killing the workers on Ctrl-C can race with the executor's own manager thread, which
    then reports a broken pool on stderr; the user asked for the stop, so that report is
    noise (the finished cases are kept and the message says so).
    """
    manager = getattr(executor, "_executor_manager_thread", None)
    previous = threading.excepthook

    def hook(args):
        if manager is None or args.thread is not manager:
            previous(args)

    threading.excepthook = hook


def _terminate(executor: ProcessPoolExecutor) -> None:
    _quiet_manager_thread(executor)
    stop = getattr(executor, "terminate_workers", None)  # Python 3.14+
    if stop is not None:
        stop()
        return
    for process in list((getattr(executor, "_processes", None) or {}).values()):
        process.terminate()


def _new_pool(workers: int) -> ProcessPoolExecutor:
    return ProcessPoolExecutor(
        max_workers=workers, mp_context=_local_context(), initializer=_ignore_interrupt
    )


def _stop(executors, futures) -> None:
    """Stop on Ctrl-C or an error: cancel what has not started, stop the workers."""
    for future in futures:
        future.cancel()
    for executor in executors:
        _terminate(executor)
        executor.shutdown(wait=False, cancel_futures=True)


def run_local(sweep, batches, workers, on_done, run_batch):
    """Run ``batches`` on ``workers`` local processes; ``on_done(frame)`` for each.

    ``run_batch(sweep, batch)`` is what each task runs (normally
    :func:`plantside.study.sweep_worker.run_batch`; passed in, so that a test may put
    another in its place); ``workers = 1`` runs the batches in this process.

    A worker that dies breaks the whole pool, and which of the batches it was running
    is not known: those batches (the suspects) are run again, each in a fresh worker of
    its own, ``workers`` at a time, and the rest go on in a new pool. A suspect whose
    own worker dies too is the cause: its cases are recorded failed (``WORKER_DIED``).
    """
    if workers <= 1:
        for batch in batches:
            on_done(run_batch(sweep, batch))
        return
    waiting = deque(batches)
    while waiting:
        suspects = _run_pool(sweep, waiting, workers, on_done, run_batch)
        if suspects:
            _run_alone(sweep, suspects, workers, on_done, run_batch)


def _run_pool(sweep, waiting: deque, workers: int, on_done, run_batch) -> list:
    """Run batches from ``waiting`` in one pool until it is empty or the pool breaks.

    At most ``workers + 1`` batches are in the pool at once (what it runs, plus one
    ready), so a broken pool names a few suspects, not the whole sweep. Returns the
    batches that were in the pool when it broke (empty if it did not).
    """
    executor = _new_pool(workers)
    running: dict = {}  # future -> batch
    suspects: list = []
    broken = False
    try:
        while (waiting or running) and not broken:
            while waiting and len(running) <= workers and not broken:
                batch = waiting.popleft()
                try:
                    running[executor.submit(run_batch, sweep, batch)] = batch
                except BrokenProcessPool:  # broke since the last wait: not this one's fault
                    waiting.appendleft(batch)
                    broken = True
            if broken:
                break
            finished, _ = wait(running, return_when=FIRST_COMPLETED)
            for future in finished:
                batch = running.pop(future)
                if isinstance(future.exception(), BrokenProcessPool):
                    suspects.append(batch)
                    broken = True
                else:
                    on_done(future.result())
        if broken:  # every batch still in the pool ends soon
            wait(running)
            for future, batch in running.items():
                if future.exception() is None:
                    on_done(future.result())
                elif isinstance(future.exception(), BrokenProcessPool):
                    suspects.append(batch)
                else:
                    future.result()  # an unexpected error: raise it
            running.clear()
    except BaseException:
        # keep what finished while we were stopping, then stop the workers
        for future in list(running):
            if future.done() and not future.cancelled() and future.exception() is None:
                on_done(future.result())
        _stop([executor], running)
        raise
    executor.shutdown(wait=True)
    return suspects


def _run_alone(sweep, suspects: list, workers: int, on_done, run_batch) -> None:
    """Run each suspect batch in a fresh one-worker pool, ``workers`` pools at a time."""
    queue = deque(suspects)
    alone: dict = {}  # future -> (executor, batch)
    try:
        while queue or alone:
            while queue and len(alone) < workers:
                executor, batch = _new_pool(1), queue.popleft()
                alone[executor.submit(run_batch, sweep, batch)] = (executor, batch)
            finished, _ = wait(alone, return_when=FIRST_COMPLETED)
            for future in finished:
                executor, batch = alone.pop(future)
                if isinstance(future.exception(), BrokenProcessPool):
                    frame = failed_rows(sweep, batch, *WORKER_DIED)
                else:
                    frame = future.result()
                executor.shutdown(wait=False)
                on_done(frame)
    except BaseException:
        _stop([executor for executor, _ in alone.values()], alone)
        raise


def local_workers() -> int:
    """Cores this process may use."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # not on Linux
        return max(1, os.cpu_count() or 1)
