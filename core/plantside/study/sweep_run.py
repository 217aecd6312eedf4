"""Run a sweep: every case on all local cores, or on a Dask cluster, written as it goes.

How a sweep runs
----------------
- Cases are grouped by climate and cut into batches, so each task carries several
  whole studies (a study takes a few tenths of a second) and a worker reads each
  climate once: bundled climates are cached per process by
  :func:`plantside.climate.bundled.load_bundled_climate`, weather CSVs by :func:`_weather`.
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
"""

from __future__ import annotations

import hashlib
import json
import multiprocessing
import os
import signal
import threading
import time
from collections import deque
from collections.abc import Callable, Sequence
from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait
from concurrent.futures.process import BrokenProcessPool
from dataclasses import dataclass
from datetime import UTC, datetime
from functools import lru_cache
from pathlib import Path

import numpy as np
import pandas as pd

from plantside import __version__
from plantside.climate.weather import Weather
from plantside.errors import (
    NAME_EXCERPT_CHARS,
    InputFileError,
    InputRangeError,
    PlantsideError,
    excerpt,
)
from plantside.study.run import GENERAL_CAUTIONS, StudyResult, heating_load_columns, run_study
from plantside.study.scenario import Scenario
from plantside.study.sweep import Sweep, SweepCase

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

MANIFEST_NAME = "manifest.json"
PARTS_FOLDER = "parts"
RESULTS_NAME = "sweep_results"
#: Share of the design capacity above which hours are counted (a plant running near
#: full load; common practice for a "hours near capacity" figure, no source).
NEAR_CAPACITY_FRACTION = 0.75
#: Largest batch chosen automatically [cases]; a case is a few tenths of a second.
MAX_AUTO_BATCH = 16
#: Batches aimed for per worker, so the last ones finish close together.
BATCHES_PER_WORKER = 4
#: How long to wait for a Dask scheduler to answer.
CONNECT_TIMEOUT = "20s"
#: Columns after the results: ``status`` (``ok`` or ``failed``), the failed case's
#: ``error_field`` and ``error_message`` (empty for a case that ran).
STATUS_COLUMNS = ("status", "error_field", "error_message")
CASE_OK = "ok"
CASE_FAILED = "failed"
#: Longest error message kept in the table [characters].
MAX_ERROR_CHARS = 200
#: ``error_field`` and ``error_message`` of the cases of a batch whose worker died twice.
WORKER_DIED = (
    "worker",
    "worker died: the process running this case's batch was killed twice (out of memory, "
    "or stopped from outside); rerun with retry of failed cases to try again",
)


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
# one case, one batch (what the workers run)
# ---------------------------------------------------------------------------------------
def headline_columns(scenario: Scenario) -> list[str]:
    """Result columns of the sweep table for air handlers named as in ``scenario``."""
    per_unit = (
        "design_coil_total_kW",
        "design_coil_sensible_kW",
        "design_coil_latent_kW",
        "governing_condition",
        "annual_peak_coil_total_kW",
        "annual_coil_total_kWh",
        "heating_design_kW",
    )
    names = [f"{c}[{spec.settings.name}]" for spec in scenario.air_handlers for c in per_unit]
    return [
        *names,
        "cooling_governing_condition",
        "cooling_design_load_kW",
        "cooling_design_capacity_kW",
        "cooling_annual_peak_kW",
        "cooling_sum_of_coil_peaks_kW",
        "cooling_energy_kWh",
        "cooling_hours_with_load",
        "cooling_hours_above_75_percent_capacity",
        "cooling_hours_above_capacity",
        "heating_design_load_kW",
        "heating_design_capacity_kW",
        "heating_annual_peak_kW",
        "heating_energy_kWh",
        "caution_count",
    ]


def case_headlines(result: StudyResult) -> dict:
    """The headline results of one study, SI, keyed as :func:`headline_columns`.

    Parameters
    ----------
    result : StudyResult
        A finished :func:`plantside.study.run.run_study`.

    Returns
    -------
    dict
        Per air handler (``name`` in brackets): design coil total, sensible and latent
        load [kW] at its governing condition, the governing condition's kind, the
        year's peak coil load [kW] and coil energy [kWh], the heating design load
        [kW]. For the plants: governing condition, design load and design capacity
        (with margin) [kW], the year's peak [kW] and energy [kWh], the sum of the
        coil peaks [kW], hours with load, hours above 75 % of the design capacity and
        above it [h]; the number of cautions beyond the general ones.
    """
    row = {}
    for unit in result.air_handlers:
        design = unit.cooling_design
        governing = design.points[design.governing]
        tag = f"[{unit.name}]"
        row[f"design_coil_total_kW{tag}"] = float(governing.loads["coil_total_kW"])
        row[f"design_coil_sensible_kW{tag}"] = float(governing.loads["coil_sensible_kW"])
        row[f"design_coil_latent_kW{tag}"] = float(governing.loads["coil_latent_kW"])
        row[f"governing_condition{tag}"] = str(design.governing)
        row[f"annual_peak_coil_total_kW{tag}"] = float(unit.hourly["coil_total_kW"].max())
        row[f"annual_coil_total_kWh{tag}"] = float(unit.hourly["coil_total_kW"].sum())
        row[f"heating_design_kW{tag}"] = float(
            sum(unit.heating_design.loads[c] for c in heating_load_columns)
        )
    cooling, heating = result.cooling, result.heating
    load = cooling.hourly_load
    capacity = cooling.design_capacity
    row["cooling_governing_condition"] = str(cooling.governing)
    row["cooling_design_load_kW"] = float(cooling.design_load)
    row["cooling_design_capacity_kW"] = float(capacity)
    row["cooling_annual_peak_kW"] = cooling.annual_peak
    row["cooling_sum_of_coil_peaks_kW"] = float(
        sum(u.hourly["coil_total_kW"].max() for u in result.air_handlers)
    )
    row["cooling_energy_kWh"] = cooling.annual_energy
    row["cooling_hours_with_load"] = int(np.count_nonzero(load > 0.0))
    row["cooling_hours_above_75_percent_capacity"] = int(
        np.count_nonzero(load > NEAR_CAPACITY_FRACTION * capacity)
    )
    row["cooling_hours_above_capacity"] = int(np.count_nonzero(load > capacity))
    row["heating_design_load_kW"] = float(heating.design_load)
    row["heating_design_capacity_kW"] = float(heating.design_capacity)
    row["heating_annual_peak_kW"] = heating.annual_peak
    row["heating_energy_kWh"] = heating.annual_energy
    row["caution_count"] = len(result.cautions) - len(GENERAL_CAUTIONS)
    return row


@lru_cache(maxsize=8)
def _weather(weather_file: str, digest: str, units, altitude, fill_gaps) -> Weather:
    """A weather CSV read once per process (``digest`` keys an edited file afresh)."""
    from plantside.climate.weather_csv import read_weather_csv

    return read_weather_csv(weather_file, units=units, altitude=altitude, fill_gaps=fill_gaps)


def _weather_for(scenario: Scenario, digest: str) -> Weather:
    if scenario.climate is not None:
        return scenario.load_weather()  # bundled: cached per process in plantside.climate.bundled
    path = Path(scenario.weather_file)
    if not path.is_absolute():
        path = Path(scenario.base_dir) / path
    altitude = scenario.altitude
    if altitude is not None and str(scenario.unit_system) == "IP":
        from plantside.units import to_display

        altitude = float(to_display("length", altitude, "IP")[0])
    return _weather(str(path), digest, scenario.weather_units, altitude, scenario.fill_gaps)


def _case_row(sweep: Sweep, case: SweepCase) -> dict:
    row = {"case_index": case.index, "case_id": case.case_id, "climate": case.climate.label}
    for axis, value in zip(sweep.axes, case.values, strict=True):
        row[axis.column] = np.nan if value is None else value
    return row


def _failure(error: BaseException) -> dict:
    """``status``, ``error_field``, ``error_message`` of a case the model refused."""
    field = getattr(error, "field", None)
    if field is None:  # a file that cannot be used: the file is the field
        field = getattr(error, "source", None) or getattr(error, "filename", None) or ""
    return {
        "status": CASE_FAILED,
        "error_field": excerpt(field, NAME_EXCERPT_CHARS),
        "error_message": excerpt(error, MAX_ERROR_CHARS),
    }


def run_batch(sweep: Sweep, cases: Sequence[SweepCase]) -> pd.DataFrame:
    """Run a batch of cases one study each; one row per case (what a worker does).

    A case the model refuses (any :class:`plantside.errors.PlantsideError`, or a file
    it cannot read) is a row with status ``failed``, the error's field and message
    (at most ``MAX_ERROR_CHARS``) and no results; the batch goes on. Errors cross
    process and cluster boundaries as these plain values (our exception types take
    several constructor arguments and do not unpickle).
    """
    rows = []
    ran = {"status": CASE_OK, "error_field": "", "error_message": ""}
    for case in cases:
        try:
            scenario = sweep.scenario_for(case)
            weather = _weather_for(scenario, case.climate.digest)
            result = run_study(scenario, weather)
        except (PlantsideError, OSError) as error:  # a bad file, a refused value
            rows.append(_case_row(sweep, case) | _failure(error))
            continue
        rows.append(_case_row(sweep, case) | case_headlines(result) | ran)
    return _typed(pd.DataFrame(rows), sweep)


def failed_rows(sweep: Sweep, cases: Sequence[SweepCase], field: str, message: str):
    """Rows of ``cases`` recorded failed with one ``field`` and ``message`` (no results)."""
    failure = {"status": CASE_FAILED, "error_field": field, "error_message": message}
    return _typed(pd.DataFrame([_case_row(sweep, case) | failure for case in cases]), sweep)


def _typed(frame: pd.DataFrame, sweep: Sweep) -> pd.DataFrame:
    """Fixed column order and dtypes, so parts from any worker concatenate cleanly."""
    columns = ["case_index", "case_id", "climate", *[a.column for a in sweep.axes]]
    results = headline_columns(sweep.base)
    frame = frame.reindex(columns=[*columns, *results, *STATUS_COLUMNS])
    for axis in sweep.axes:
        frame[axis.column] = frame[axis.column].astype(float)
    for column in results:  # a part of failed cases only has no value to type them by
        text = column.startswith(("governing_condition", "cooling_governing_condition"))
        if text:
            frame[column] = frame[column].astype("str")  # missing stays missing
        elif frame[column].isna().any():
            frame[column] = frame[column].astype(float)
    for column in STATUS_COLUMNS:
        frame[column] = frame[column].fillna("").astype("str")
    return frame


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
# the results folder
# ---------------------------------------------------------------------------------------
class _Folder:
    """``out/``: parts, manifest and the final table."""

    def __init__(self, out: Path, sweep: Sweep, restart: bool):
        self.out = Path(out)
        self.parts = self.out / PARTS_FOLDER
        self.sweep = sweep
        manifest = self.out / MANIFEST_NAME
        if restart:
            if self.parts.is_dir():
                for part in self.parts.glob("part-*.parquet"):
                    part.unlink()
            manifest.unlink(missing_ok=True)
        if manifest.is_file():
            try:
                old = json.loads(manifest.read_text(encoding="utf-8"))
            except (ValueError, UnicodeDecodeError) as error:
                raise InputFileError(
                    str(manifest), [f"not a readable manifest ({error})"]
                ) from None
            if old.get("base_fingerprint") != sweep.fingerprint:
                raise InputFileError(
                    str(manifest),
                    [
                        "this folder holds results of another sweep (its base scenario, "
                        "input files or the plantside model differ); choose another output "
                        "folder, or restart to discard them"
                    ],
                )
        elif self.parts.is_dir() and any(self.parts.glob("part-*.parquet")):
            raise InputFileError(
                str(self.out), ["parts found without a manifest; restart to discard them"]
            )
        self.parts.mkdir(parents=True, exist_ok=True)
        self.part_files: list[str] = sorted(p.name for p in self.parts.glob("part-*.parquet"))

    def statuses(self) -> dict[str, str]:
        """``case_id`` -> ``ok`` or ``failed`` of every case in the parts (the latest row)."""
        status: dict[str, str] = {}
        for path in _parts_in_order(self.out):
            frame = pd.read_parquet(path, columns=["case_id", "status"])
            status.update(zip(frame["case_id"], frame["status"], strict=True))
        return status

    def write_part(self, frame: pd.DataFrame) -> Path:
        first = int(frame["case_index"].min())
        tag = hashlib.sha256(",".join(frame["case_id"]).encode("ascii")).hexdigest()[:10]
        path = self.parts / f"part-{first:07d}-{tag}.parquet"
        temporary = path.with_suffix(".tmp")
        frame.to_parquet(temporary, index=False)
        os.replace(temporary, path)
        self.part_files.append(path.name)
        return path

    def write_manifest(self, done: int, state: str, failed: int = 0) -> None:
        sweep = self.sweep
        data = {
            "format": "plantside sweep results",
            "plantside_version": __version__,
            "sweep": sweep.source,
            "title": sweep.title,
            "base_scenario": sweep.base.source,
            "base_fingerprint": sweep.fingerprint,
            "unit_system_of_sweep_file": str(sweep.base.unit_system),
            "values_in_table": "SI (column names carry the unit)",
            "climates": [c.label for c in sweep.climates],
            "axes": [
                {"field": a.field, "column": a.column, "values_as_written": list(a.written)}
                for a in sweep.axes
            ],
            "cases_total": sweep.size,
            "cases_done": done,
            "cases_failed": failed,
            "state": state,
            "parts": sorted(self.part_files),
            "updated": datetime.now(UTC).isoformat(timespec="seconds"),
        }
        path = self.out / MANIFEST_NAME
        temporary = path.with_suffix(".tmp")
        temporary.write_text(json.dumps(data, indent=2), encoding="utf-8")
        os.replace(temporary, path)


def _parts_in_order(out) -> list[Path]:
    """The parts in ``out`` in the order they were written (a retried case's row last)."""
    parts = (Path(out) / PARTS_FOLDER).glob("part-*.parquet")
    return sorted(parts, key=lambda p: (p.stat().st_mtime_ns, p.name))


def results_table(out, sweep: Sweep) -> pd.DataFrame:
    """The tidy table of a sweep from the parts in ``out`` (cases done so far).

    One row per finished case of ``sweep``, in case order: ``case_index``, ``case_id``,
    ``climate``, one column per axis (SI; the name carries the unit), the headline
    results of :func:`case_headlines`, then ``status`` (``ok`` or ``failed``),
    ``error_field`` and ``error_message`` (a failed case has no results). A case run
    more than once (a failed case retried) has the row of its latest run. Parts of
    cases that are no longer in the sweep (e.g. an axis value since removed) are left
    out.
    """
    parts = _parts_in_order(out)
    template = _typed(pd.DataFrame(), sweep)
    if not parts:
        return template
    frame = pd.concat([pd.read_parquet(p) for p in parts], ignore_index=True)
    frame = frame.drop_duplicates(subset="case_id", keep="last")
    index = {case.case_id: case.index for case in sweep.cases}
    frame = frame[frame["case_id"].isin(index)].copy()
    frame["case_index"] = frame["case_id"].map(index)
    # varied values come from the sweep itself (authoritative), results from the parts
    cases = pd.DataFrame([_case_row(sweep, sweep.cases[i]) for i in frame["case_index"]])
    results = frame[["case_id", *headline_columns(sweep.base), *STATUS_COLUMNS]]
    table = cases.merge(results, on="case_id", how="left") if len(cases) else template
    return _typed(table.sort_values("case_index").reset_index(drop=True), sweep)


# ---------------------------------------------------------------------------------------
# executors
# ---------------------------------------------------------------------------------------
def _ignore_interrupt() -> None:
    """Worker initialiser: Ctrl-C is the parent's to handle (it keeps finished parts)."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)


def _local_context():
    """forkserver where available (a clean, single-threaded parent for the workers, with
    plantside imported once), else the platform default (spawn)."""
    if "forkserver" in multiprocessing.get_all_start_methods():
        context = multiprocessing.get_context("forkserver")
        context.set_forkserver_preload(["plantside.study.sweep_run"])
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


def _run_local(sweep, batches, workers, on_done):
    """Run ``batches`` on ``workers`` local processes; ``on_done(frame)`` for each.

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
        suspects = _run_pool(sweep, waiting, workers, on_done)
        if suspects:
            _run_alone(sweep, suspects, workers, on_done)


def _run_pool(sweep, waiting: deque, workers: int, on_done) -> list:
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


def _run_alone(sweep, suspects: list, workers: int, on_done) -> None:
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


def _open_client(scheduler: str):
    distributed = _dask()
    try:
        return distributed.Client(scheduler, timeout=CONNECT_TIMEOUT)
    except (OSError, TimeoutError, ValueError) as error:
        raise InputRangeError(
            "scheduler",
            f"cannot reach the Dask scheduler at {scheduler!r}: {error}",
            "an address such as tcp://10.0.0.5:8786",
        ) from error


def _cluster_workers(client) -> int:
    """Worker threads of the cluster (each runs one batch at a time)."""
    return max(1, sum(int(n) for n in client.nthreads().values()))


def _run_dask(sweep, batches, client, on_done):
    """Run ``batches`` on a Dask cluster; ``on_done(frame)`` for each, as they finish.

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


def local_workers() -> int:
    """Cores this process may use."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # not on Linux
        return max(1, os.cpu_count() or 1)


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
        client = _open_client(scheduler)  # a clear message before anything is written
    try:
        folder = _Folder(Path(out), sweep, restart)
        status = folder.statuses()  # case_id -> ok / failed, of the cases already run
        kept = {CASE_OK} if retry_failed else {CASE_OK, CASE_FAILED}
        todo = [case for case in sweep.cases if status.get(case.case_id) not in kept]
        skipped = sweep.size - len(todo)
        left_failed = [c for c in sweep.cases if status.get(c.case_id) == CASE_FAILED]
        failed = 0 if retry_failed else len(left_failed)
        count = _cluster_workers(client) if client is not None else (workers or local_workers())
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
                _run_dask(sweep, batches, client, on_done)
            else:
                _run_local(sweep, batches, count, on_done)
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
