"""Run a sweep: every case on all local cores, or on a Dask cluster, written as it goes.

How a sweep runs
----------------
- Cases are grouped by climate and cut into batches, so each task carries several
  whole studies (a study takes a few tenths of a second) and a worker reads each
  climate once: bundled climates are cached per process by
  :func:`plantside.climate.bundled.load_bundled_climate`, weather CSVs by
  :func:`plantside.study.sweep_worker._weather`.
- By default the batches run on all local cores in a
  :class:`concurrent.futures.ProcessPoolExecutor` (no set-up). With a ``scheduler``
  address (or a ``client``) they run on a Dask cluster through
  :class:`dask.distributed.Client` (the optional ``cluster`` extra).
- Each finished batch is written at once as one Parquet part in ``<out>/parts/``
  (atomically: a part either exists whole or not at all), and ``<out>/manifest.json``
  is brought up to date. An interrupted sweep keeps every finished part; running
  the same sweep again into the same folder skips the cases already there (a case
  is known by its id, a hash of its climate and its values).
- A case that the model refuses (a :class:`plantside.errors.PlantsideError`, e.g. a
  supply temperature the coil cannot reach in one climate) is a row with status
  ``failed``, the error's field and message and no results; the other cases go on. A
  rerun leaves failed cases alone unless asked (``retry_failed``).
- A worker process that dies (killed, out of memory) loses only the batches it was
  running: they are run again, each in a worker of its own, so a batch that kills its
  worker a second time is known; its cases are recorded failed ("worker died"). On a
  Dask cluster a batch whose task ends in ``KilledWorker`` is submitted once more.
- At the end the parts are gathered into one tidy table, one row per case (the
  varied values and the headline results, SI with unit-suffixed column names),
  written as ``<out>/sweep_results.parquet`` and ``<out>/sweep_results.csv``.

Every case is one :func:`plantside.study.run.run_study`; the numbers in the table are
exactly what a study of that case alone gives.

Where each part lives: this module plans the batches and runs the sweep
(:func:`run_sweep`); :mod:`plantside.study.sweep_worker` holds what the workers run
(:func:`run_batch`, the headline results, failed rows), :mod:`plantside.study.sweep_folder`
the parts, manifest and table, :mod:`plantside.study.sweep_local` the local process pool
and :mod:`plantside.study.sweep_dask` the Dask cluster. Their public names are
re-exported here.
"""

from __future__ import annotations

import time
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

from plantside.errors import InputRangeError, PlantsideError

# The parts of a run live in modules of their own (what the workers run, the results
# folder, the local pool, the Dask cluster); the names are re-exported here, where
# callers and tests import them (a test puts its own ``run_batch`` in this module).
from plantside.study.sweep_cases import Sweep, SweepCase
from plantside.study.sweep_dask import CONNECT_TIMEOUT, cluster_workers, open_client, run_dask
from plantside.study.sweep_folder import (
    MANIFEST_NAME,
    PARTS_FOLDER,
    RESULTS_NAME,
    _Folder,
    results_table,
)
from plantside.study.sweep_local import local_workers, run_local
from plantside.study.sweep_worker import (
    CASE_FAILED,
    CASE_OK,
    STATUS_COLUMNS,
    _weather,  # noqa: F401  (its per-process cache, cleared by the tests)
    case_headlines,
    failed_rows,
    headline_columns,
    run_batch,
)

__all__ = [
    "MANIFEST_NAME",
    "PARTS_FOLDER",
    "RESULTS_NAME",
    "STATUS_COLUMNS",
    "SweepInterruptedError",
    "SweepRun",
    "case_headlines",
    "failed_rows",
    "headline_columns",
    "plan_batches",
    "results_table",
    "run_batch",
    "run_sweep",
]

#: Largest batch chosen automatically [cases]; a case is a few tenths of a second.
MAX_AUTO_BATCH = 16
#: Batches aimed for per worker, so the last ones finish close together.
BATCHES_PER_WORKER = 4


class SweepInterruptedError(PlantsideError):
    """The sweep was stopped (Ctrl-C); finished cases are kept in ``out``.

    Attributes
    ----------
    done : int
        Cases finished and written (including those skipped as already done).
    total : int
        Cases in the sweep.
    out : pathlib.Path
        The results folder.
    """

    def __init__(self, done: int, total: int, out: Path):
        self.done, self.total, self.out = done, total, Path(out)
        super().__init__(
            f"sweep interrupted: {done} of {total} cases finished and kept in {out}; "
            "run the same command again to continue"
        )


# ---------------------------------------------------------------------------------------
# planning
# ---------------------------------------------------------------------------------------
def plan_batches(
    cases: Sequence[SweepCase], workers: int, batch_size: int | None = None
) -> list[list[SweepCase]]:
    """Cut cases into batches of one climate each.

    Parameters
    ----------
    cases : sequence of SweepCase
        The cases still to run, in sweep order.
    workers : int
        Worker processes the batches are shared among.
    batch_size : int, optional
        Cases per batch; default about ``len(cases) / (4 x workers)``, 1 to 16, so every
        worker gets several batches and each carries a second or more of work.
    """
    if batch_size is None:
        target = len(cases) / max(1, BATCHES_PER_WORKER * workers)
        batch_size = int(min(MAX_AUTO_BATCH, max(1, np.ceil(target))))
    batches: list[list[SweepCase]] = []
    by_climate: dict[str, list[SweepCase]] = {}
    for case in cases:
        by_climate.setdefault(case.climate.key, []).append(case)
    for group in by_climate.values():
        for start in range(0, len(group), batch_size):
            batches.append(group[start : start + batch_size])
    return batches


# ---------------------------------------------------------------------------------------
# the entry point
# ---------------------------------------------------------------------------------------
@dataclass(frozen=True)
class SweepRun:
    """What :func:`run_sweep` did.

    Attributes
    ----------
    table : pandas.DataFrame
        One row per case (see :func:`results_table`).
    out : pathlib.Path
        The results folder.
    computed, skipped, total : int
        Cases run now, cases found already done (failed ones included unless retried),
        cases in the sweep.
    failed : int
        Cases of the table with status ``failed`` (now or in an earlier run).
    batches : int
        Batches run now.
    seconds : float
        Wall time of the run [s].
    files : tuple of pathlib.Path
        The table as Parquet and CSV.
    """

    table: pd.DataFrame
    out: Path
    computed: int
    skipped: int
    total: int
    failed: int
    batches: int
    seconds: float
    files: tuple[Path, ...]

    @property
    def cases_per_second(self) -> float:
        """Cases computed per second of wall time in this run."""
        return self.computed / self.seconds if self.seconds > 0 else float("nan")


def run_sweep(
    sweep: Sweep,
    out,
    *,
    workers: int | None = None,
    scheduler: str | None = None,
    client=None,
    batch_size: int | None = None,
    restart: bool = False,
    retry_failed: bool = False,
    progress: Callable[[int, int], None] | None = None,
) -> SweepRun:
    """Run every case of ``sweep`` not yet in ``out`` and write the tidy table.

    Parameters
    ----------
    sweep : Sweep
        From :func:`plantside.study.sweep.load_sweep`.
    out : path-like
        Results folder (created). Rerunning into the same folder skips finished cases.
    workers : int, optional
        Local worker processes; default all cores this process may use. ``1`` runs in
        this process. Ignored on a Dask cluster.
    scheduler : str, optional
        Address of a Dask scheduler (``tcp://host:8786``): run there instead.
    client : dask.distributed.Client, optional
        An open Dask client to run on (not closed here).
    batch_size : int, optional
        Cases per task (see :func:`plan_batches`), 1 to 10,000.
    restart : bool
        Discard the parts already in ``out`` and run everything.
    retry_failed : bool
        Run again the cases an earlier run recorded failed (by default a rerun leaves
        them as they are and runs only the cases not yet run).
    progress : callable, optional
        Called as ``progress(done, total)`` at the start and after every batch.

    Returns
    -------
    SweepRun

    Raises
    ------
    SweepInterruptedError
        On Ctrl-C, after the finished batches are written.

    A case the model refuses, or whose worker died twice, does not raise: it is a row
    with status ``failed`` (see :func:`results_table`), counted in ``SweepRun.failed``
    and in the manifest's ``cases_failed``.
    """
    if batch_size is not None:
        batch_size = int(batch_size)
        if not 1 <= batch_size <= 10_000:
            raise InputRangeError(
                "batch_size", f"batch_size = {batch_size} is outside 1 to 10000", "1 to 10000"
            )
    if workers is not None:
        workers = int(workers)
        if not 1 <= workers <= 4096:
            raise InputRangeError(
                "workers", f"workers = {workers} is outside 1 to 4096", "1 to 4096"
            )
    started = time.perf_counter()
    own_client = client is None and scheduler is not None
    if own_client:
        # a clear message before anything is written
        client = open_client(scheduler, CONNECT_TIMEOUT)
    try:
        folder = _Folder(Path(out), sweep, restart)
        status = folder.statuses()  # case_id -> ok / failed, of the cases already run
        kept = {CASE_OK} if retry_failed else {CASE_OK, CASE_FAILED}
        todo = [case for case in sweep.cases if status.get(case.case_id) not in kept]
        skipped = sweep.size - len(todo)
        left_failed = [c for c in sweep.cases if status.get(c.case_id) == CASE_FAILED]
        failed = 0 if retry_failed else len(left_failed)
        count = cluster_workers(client) if client is not None else (workers or local_workers())
        count = max(1, min(count, len(todo)))
        batches = plan_batches(todo, count, batch_size)
        done = skipped
        folder.write_manifest(done, "running", failed)
        if progress is not None:
            progress(done, sweep.size)

        def on_done(frame: pd.DataFrame) -> None:
            nonlocal done, failed
            folder.write_part(frame)
            done += len(frame)
            failed += int((frame["status"] == CASE_FAILED).sum())
            folder.write_manifest(done, "running", failed)
            if progress is not None:
                progress(done, sweep.size)

        try:
            if client is not None:
                run_dask(sweep, batches, client, on_done, run_batch)
            else:
                run_local(sweep, batches, count, on_done, run_batch)
        except KeyboardInterrupt:
            folder.write_manifest(done, "interrupted", failed)
            raise SweepInterruptedError(done, sweep.size, folder.out) from None
        except BaseException:
            folder.write_manifest(done, "failed", failed)
            raise
    finally:
        if own_client:
            client.close()
    table = results_table(folder.out, sweep)
    parquet = folder.out / f"{RESULTS_NAME}.parquet"
    csv = folder.out / f"{RESULTS_NAME}.csv"
    table.to_parquet(parquet, index=False)
    table.to_csv(csv, index=False, float_format="%.10g")
    failed = int((table["status"] == CASE_FAILED).sum())
    folder.write_manifest(done, "complete", failed)
    return SweepRun(
        table=table,
        out=folder.out,
        computed=len(todo),
        skipped=skipped,
        total=sweep.size,
        failed=failed,
        batches=len(batches),
        seconds=time.perf_counter() - started,
        files=(parquet, csv),
    )
