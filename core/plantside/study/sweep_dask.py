"""Running a sweep's batches on a Dask cluster (the optional ``cluster`` extra).

The sweep (its base scenario and cases, a few kB) is scattered once to every worker
(broadcast); each task is one batch of cases (``pure=False``) and names the scattered
copy, so nothing but the batch travels with it. Batches are handed out as workers free
up, at most one more than the cluster's worker threads in flight (:data:`IN_FLIGHT_EXTRA`):
a worker that finishes early takes the next batch, as a local pool's worker does,
instead of the scheduler placing every batch up front and moving them about later. The
largest batches go first, so the last ones to finish are short. Workers started with
``--preload plantside.study.sweep_worker`` (``preload=[WORKER_MODULE]`` for a
:class:`~dask.distributed.LocalCluster`) have the model imported before the first batch.

A task whose worker died is rerun by Dask up to the scheduler's ``allowed-failures``,
then ends in ``KilledWorker``; :func:`run_dask` submits that batch once more, then
records its cases failed. A task the scheduler dropped because every copy of the
scattered sweep died with its workers is submitted again with a fresh copy (up to
:data:`MAX_LOST_COPIES` times; not counted as the batch's try).
"""

from __future__ import annotations

import time
from concurrent.futures import CancelledError

from plantside.errors import InputRangeError
from plantside.study.sweep_worker import WORKER_DIED, failed_rows

__all__ = [
    "CONNECT_TIMEOUT",
    "IN_FLIGHT_EXTRA",
    "WORKER_MODULE",
    "cluster_workers",
    "open_client",
    "run_dask",
]


#: How long to wait for a Dask scheduler to answer.
CONNECT_TIMEOUT = "20s"
#: Batches in flight beyond the cluster's worker threads: one waits ready on a worker
#: while the others run, so no worker idles for the round trip to this client.
IN_FLIGHT_EXTRA = 1
#: Times a batch is resubmitted because the workers holding the scattered sweep all
#: died before it ran (the scheduler drops such a task; it is not the batch's fault).
MAX_LOST_COPIES = 3
#: The module the workers run batches from: preload it on the workers
#: (``dask worker ... --preload plantside.study.sweep_worker``) to import it once, up front.
WORKER_MODULE = "plantside.study.sweep_worker"


def _dask():
    try:
        from dask import distributed
    except ImportError as error:
        raise InputRangeError(
            "scheduler",
            "running on a Dask cluster needs the optional 'cluster' extra: "
            "pip install 'plantside[cluster]' (dask[distributed])",
            "an installed dask.distributed",
        ) from error
    return distributed


def open_client(scheduler: str, timeout: str = CONNECT_TIMEOUT):
    """A Dask client of ``scheduler``, or a clear error if the extra or the scheduler is missing."""
    distributed = _dask()
    try:
        return distributed.Client(scheduler, timeout=timeout)
    except (OSError, TimeoutError, ValueError) as error:
        raise InputRangeError(
            "scheduler",
            f"cannot reach the Dask scheduler at {scheduler!r}: {error}",
            "an address such as tcp://10.0.0.5:8786",
        ) from error


def cluster_workers(client) -> int:
    """Worker threads of the cluster (each runs one batch at a time)."""
    return max(1, sum(int(n) for n in client.nthreads().values()))


def run_dask(sweep, batches, client, on_done, run_batch):
    """Run ``batches`` on a Dask cluster; ``on_done(frame)`` for each, as they finish.

    ``run_batch(sweep, batch)`` is what each task runs (see
    :func:`plantside.study.sweep_local.run_local`). Batches are submitted largest first
    and at most :func:`cluster_workers` + :data:`IN_FLIGHT_EXTRA` at a time (the count
    read again as batches finish, so workers that join are used).

    A task whose worker died (Dask itself first reruns it elsewhere, up to the
    scheduler's ``allowed-failures``, then reports ``KilledWorker``) is submitted once
    more; if that ends the same way its cases are recorded failed (``WORKER_DIED``).
    """
    distributed = _dask()
    waiting = sorted(batches, key=len, reverse=True)  # (stable: sweep order within a size)
    waiting.reverse()  # popped from the end
    futures: dict = {}  # future -> (batch, tries)
    lost: dict = {}  # id(batch) -> times its task was dropped with a lost copy of the sweep
    scattered = []  # every copy of the sweep sent, held so that none is released early
    try:
        [shared] = client.scatter([sweep], broadcast=True, hash=False)
        scattered.append(shared)

        def top_up() -> None:
            room = cluster_workers(client) + IN_FLIGHT_EXTRA - len(futures)
            for _ in range(min(room, len(waiting))):
                batch = waiting.pop()
                futures[client.submit(run_batch, scattered[-1], batch, pure=False)] = (batch, 1)

        top_up()
        while futures:
            try:
                finished, _ = distributed.wait(list(futures), return_when="FIRST_COMPLETED")
            except CancelledError:  # wait() raises for a dropped task: take it from here
                finished = [f for f in futures if f.status in ("cancelled", "finished", "error")]
                if not finished:  # the statuses are not in yet
                    time.sleep(0.05)
            for future in finished:
                batch, tries = futures.pop(future)
                # (a result lost with a dead worker is recomputed: exception() waits for it;
                # if the sweep it needs died too, the task is dropped: CancelledError)
                frame = None
                try:
                    if future.status == "cancelled":
                        raise CancelledError
                    error = future.exception()
                    if error is None:
                        frame = future.result()
                except CancelledError:
                    error = CancelledError()
                if isinstance(error, CancelledError):
                    # its copy of the sweep died with its worker: not the batch's doing
                    lost[id(batch)] = lost.get(id(batch), 0) + 1
                    if lost[id(batch)] > MAX_LOST_COPIES:
                        on_done(failed_rows(sweep, batch, *WORKER_DIED))
                        continue
                    if scattered[-1].status != "finished":
                        scattered += client.scatter([sweep], broadcast=True, hash=False)
                    again = client.submit(run_batch, scattered[-1], batch, pure=False)
                    futures[again] = (batch, tries)  # the same try
                    continue
                if error is None:
                    on_done(frame)
                elif not isinstance(error, distributed.KilledWorker):
                    future.result()  # an unexpected error: raise it
                elif tries > 1:
                    on_done(failed_rows(sweep, batch, *WORKER_DIED))
                else:  # once more, with the sweep scattered afresh (a dead worker held a copy)
                    scattered += client.scatter([sweep], broadcast=True, hash=False)
                    again = client.submit(run_batch, scattered[-1], batch, pure=False)
                    futures[again] = (batch, tries + 1)
            top_up()
    except BaseException:
        for future in futures:
            if future.status == "finished":
                try:
                    on_done(future.result(timeout=5))
                except Exception:  # keep stopping; the first error wins
                    pass
        client.cancel(list(futures))
        raise
