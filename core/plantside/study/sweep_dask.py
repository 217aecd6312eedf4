"""Running a sweep's batches on a Dask cluster (the optional ``cluster`` extra).

The sweep is scattered once to every worker (broadcast) and each batch submitted with
``pure=False``. A task whose worker died is rerun by Dask up to the scheduler's
``allowed-failures``, then ends in ``KilledWorker``; :func:`run_dask` submits that batch
once more, then records its cases failed.
"""

from __future__ import annotations

from plantside.errors import InputRangeError
from plantside.study.sweep_worker import WORKER_DIED, failed_rows

__all__ = ["CONNECT_TIMEOUT", "cluster_workers", "open_client", "run_dask"]


#: How long to wait for a Dask scheduler to answer.
CONNECT_TIMEOUT = "20s"


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
    :func:`plantside.study.sweep_local.run_local`).

    A task whose worker died (Dask itself first reruns it elsewhere, up to the
    scheduler's ``allowed-failures``, then reports ``KilledWorker``) is submitted once
    more; if that ends the same way its cases are recorded failed (``WORKER_DIED``).
    """
    distributed = _dask()
    futures: dict = {}  # future -> (batch, tries)
    scattered = []  # every copy of the sweep sent, held so that none is released early
    try:
        [shared] = client.scatter([sweep], broadcast=True, hash=False)
        scattered.append(shared)
        for batch in batches:
            futures[client.submit(run_batch, shared, batch, pure=False)] = (batch, 1)
        pending = set(futures)
        while pending:
            finished, pending = distributed.wait(pending, return_when="FIRST_COMPLETED")
            for future in finished:
                batch, tries = futures.pop(future)
                # (a result lost with a dead worker is recomputed: exception() waits for it)
                error = future.exception()
                if error is None:
                    on_done(future.result())
                elif not isinstance(error, distributed.KilledWorker):
                    future.result()  # an unexpected error: raise it
                elif tries > 1:
                    on_done(failed_rows(sweep, batch, *WORKER_DIED))
                else:  # once more, with the sweep scattered afresh (a dead worker held a copy)
                    scattered += client.scatter([sweep], broadcast=True, hash=False)
                    again = client.submit(run_batch, scattered[-1], batch, pure=False)
                    futures[again] = (batch, tries + 1)
                    pending.add(again)
    except BaseException:
        for future in futures:
            if future.status == "finished":
                try:
                    on_done(future.result(timeout=5))
                except Exception:  # keep stopping; the first error wins
                    pass
        client.cancel(list(futures))
        raise
