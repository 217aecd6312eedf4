"""A sweep on a real Dask cluster (LocalCluster, loopback only) equals the single-process run.

The reference is the same sweep run in this process (workers=1), itself checked case by
case against :func:`plantside.study.run.run_study` in ``tests/test_sweep.py``.
"""

import json
import sys
from pathlib import Path

import pandas as pd
import pytest
from dask_local import local_cluster
from plantside.errors import InputRangeError
from plantside.study.sweep import load_sweep
from plantside.study.sweep_dask import WORKER_MODULE
from plantside.study.sweep_run import run_sweep
from plantside.study.sweep_worker import QUIET_CALLBACKS

distributed = pytest.importorskip("dask.distributed", reason="needs the 'cluster' extra")

ROOT = Path(__file__).parents[1]
CLINIC = ROOT / "example_data" / "scenarios" / "quillon_clinic.toml"
CLIMATES = ["Salvia Flats", "Korva Plains", "Port Calder"]


@pytest.fixture(scope="module")
def cluster():
    """Two workers started as the README starts them (the model preloaded)."""
    with local_cluster(2, preload=[WORKER_MODULE]) as local:
        yield local


def test_preloaded_workers_do_without_the_profiler(cluster):
    # the profiler's 10 ms samples slowed the batches (1.59-1.62x of one process on
    # 2 workers with it, 1.66-1.73x without; tests/test_sweep_benchmark.py)
    with distributed.Client(cluster) as client:
        callbacks = client.run(lambda dask_worker: sorted(dask_worker.periodic_callbacks))
    assert len(callbacks) == 2
    for names in callbacks.values():
        assert "heartbeat" in names  # the worker's own callbacks are still there
        assert not set(QUIET_CALLBACKS) & set(names)


def test_preloaded_workers_keep_freed_memory_over_dasks_allocator_setting(cluster):
    # Dask starts each worker with its own MALLOC_TRIM_THRESHOLD_ (65536); a sweep case ran
    # 12 % slower with it (plantside/air/heap.py). The preload applies plantside's.
    import platform

    if not sys.platform.startswith("linux") or platform.libc_ver()[0] != "glibc":
        pytest.skip("glibc only")
    with distributed.Client(cluster) as client:
        kept = client.run(
            lambda: __import__(WORKER_MODULE, fromlist=["ALLOCATOR_KEPT"]).ALLOCATOR_KEPT
        )
    assert list(kept.values()) == [True, True]


@pytest.fixture(scope="module")
def sweep(tmp_path_factory):
    """3 climates x 4 outdoor-air fractions of the clinic's office unit: 12 cases."""
    folder = tmp_path_factory.mktemp("sweep")
    path = folder / "clinic.toml"
    path.write_text(
        f'[sweep]\nbase = "{CLINIC.as_posix()}"\nclimates = {CLIMATES!r}\n'.replace("'", '"')
        + '[sweep.axes]\n"air_handler[2].minimum_outdoor_air_fraction" = [0.1, 0.2, 0.3, 0.4]\n',
        encoding="utf-8",
    )
    return load_sweep(path)


def _bundled_cache_calls():
    """(lookups, loads) of the per-process bundled-climate cache, run on each worker."""
    from plantside.climate.bundled import _load

    info = _load.cache_info()
    return info.hits + info.misses, info.misses


def test_dask_local_cluster_equals_single_process_case_by_case(cluster, sweep, tmp_path):
    single = run_sweep(sweep, tmp_path / "single", workers=1)
    with distributed.Client(cluster) as client:
        before = client.run(_bundled_cache_calls)
        on_dask = run_sweep(sweep, tmp_path / "dask", client=client, batch_size=2)
        after = client.run(_bundled_cache_calls)
    assert on_dask.computed == single.computed == 12
    assert on_dask.batches == 6
    assert list(on_dask.table["case_id"]) == list(single.table["case_id"])
    for (_, a), (_, b) in zip(single.table.iterrows(), on_dask.table.iterrows(), strict=True):
        pd.testing.assert_series_equal(a, b, check_exact=False, rtol=1e-12, check_names=False)
    # climates are loaded once per worker, not once per case: each worker read at most the
    # three climates, and every one of the 12 cases looked its climate up in the cache
    lookups = sum(after[w][0] - before[w][0] for w in after)
    loads = [after[w][1] - before[w][1] for w in after]
    assert lookups == 12
    assert all(n <= len(CLIMATES) for n in loads)


def test_rerun_on_the_cluster_skips_what_the_local_run_finished(cluster, sweep, tmp_path):
    out = tmp_path / "out"
    first = run_sweep(sweep, out, workers=1, batch_size=4)  # all 12 cases, here
    with distributed.Client(cluster) as client:
        again = run_sweep(sweep, out, client=client)
    assert (again.computed, again.skipped) == (0, 12)
    pd.testing.assert_frame_equal(first.table, again.table)


def test_scheduler_address_runs_there(cluster, sweep, tmp_path):
    run = run_sweep(sweep, tmp_path / "by_address", scheduler=cluster.scheduler_address)
    assert run.computed == 12 and len(run.table) == 12


def test_unreachable_scheduler_is_a_clear_error(sweep, tmp_path, monkeypatch):
    import plantside.study.sweep_run as sweep_run

    monkeypatch.setattr(sweep_run, "CONNECT_TIMEOUT", "2s")
    with pytest.raises(InputRangeError, match="cannot reach the Dask scheduler"):
        run_sweep(sweep, tmp_path / "out", scheduler="tcp://127.0.0.1:9")


def test_missing_cluster_extra_is_a_clear_error(sweep, tmp_path, monkeypatch):
    monkeypatch.setitem(sys.modules, "dask", None)  # as if the extra were not installed
    with pytest.raises(InputRangeError, match=r"plantside\[cluster\]"):
        run_sweep(sweep, tmp_path / "out", scheduler="tcp://127.0.0.1:8786")
    assert not (tmp_path / "out").exists()  # refused before anything is written


def test_a_batch_whose_worker_dies_is_resubmitted_once_then_recorded_failed(
    sweep, tmp_path, monkeypatch
):
    # A cluster of its own where attribution is exact: each worker holds one task at a
    # time (worker-saturation 1.0) and the scheduler reports a task whose worker died
    # at once (allowed-failures 0), so plantside's one resubmission is the only retry.
    import functools
    import os

    import dask
    import plantside.study.sweep_run as sweep_run
    import sweep_faults

    doomed = sweep.cases[5]
    dying = functools.partial(
        sweep_faults.dying_run_batch, frozenset({doomed.case_id}), None, os.getpid()
    )
    settings = {
        "distributed.scheduler.allowed-failures": 0,
        "distributed.scheduler.worker-saturation": 1.0,
    }
    out = tmp_path / "out"
    with (
        dask.config.set(settings),
        local_cluster(2) as local,
        distributed.Client(local) as client,
    ):
        monkeypatch.setattr(sweep_run, "run_batch", dying)
        run = run_sweep(sweep, out, client=client, batch_size=1)
        monkeypatch.undo()
        table = run.table.set_index("case_id")
        assert (run.computed, run.failed, len(table)) == (12, 1, 12)
        assert table.loc[doomed.case_id, "status"] == "failed"
        assert "worker died" in table.loc[doomed.case_id, "error_message"]
        assert (table.drop(doomed.case_id)["status"] == "ok").all()
        manifest = json.loads((out / "manifest.json").read_text())
        assert (manifest["state"], manifest["cases_done"], manifest["cases_failed"]) == (
            "complete",
            12,
            1,
        )
        # the cause gone, a rerun asked to retry finishes the rest on the same cluster
        again = run_sweep(sweep, out, client=client, retry_failed=True)
    assert (again.computed, again.skipped, again.failed) == (1, 11, 0)
    single = run_sweep(sweep, tmp_path / "single", workers=1)
    pd.testing.assert_frame_equal(again.table, single.table, check_exact=False, rtol=1e-12)


def test_tasks_dropped_with_the_only_copy_of_the_sweep_are_resubmitted(
    sweep, tmp_path, monkeypatch
):
    # One worker: when it dies, the scattered sweep dies with it and the scheduler drops
    # the task queued behind the dying one (its input is gone: CancelledError, not
    # KilledWorker). That task is resubmitted with a fresh copy, not counted as its try;
    # only the batch that kills its worker twice is recorded failed.
    import functools
    import os

    import dask
    import plantside.study.sweep_run as sweep_run
    import sweep_faults

    doomed = sweep.cases[2]
    dying = functools.partial(
        sweep_faults.dying_run_batch, frozenset({doomed.case_id}), None, os.getpid()
    )
    with (
        dask.config.set({"distributed.scheduler.allowed-failures": 0}),
        local_cluster(1) as local,
        distributed.Client(local) as client,
    ):
        monkeypatch.setattr(sweep_run, "run_batch", dying)
        run = run_sweep(sweep, tmp_path / "out", client=client, batch_size=1)
    table = run.table.set_index("case_id")
    assert (run.computed, run.failed, len(table)) == (12, 1, 12)
    assert table.loc[doomed.case_id, "status"] == "failed"
    assert (table.drop(doomed.case_id)["status"] == "ok").all()


def test_a_local_cluster_leaves_this_process_environment_as_it_was():
    """Dask's nanny sets its pre-spawn variables (MALLOC_TRIM_THRESHOLD_ among them) in the
    process that starts it; the tests' cluster puts the environment back, or every
    process the test run starts later runs the core several times slower
    (tests/dask_local.py)."""
    import os

    before = dict(os.environ)
    with local_cluster(1) as local, distributed.Client(local) as client:
        assert client.submit(sum, [1, 2]).result() == 3
    assert dict(os.environ) == before
