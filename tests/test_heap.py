"""plantside.air.heap: glibc's allocator settings, applied on import unless the
environment sets them (mallopt(3), GNU C Library manual "Memory Allocation Tunables")."""

from __future__ import annotations

import os
import subprocess
import sys

import pytest
from plantside.air import heap


def test_environment_that_sets_the_allocator_is_left_alone():
    for environ in (
        {"MALLOC_TRIM_THRESHOLD_": "131072"},
        {"MALLOC_MMAP_THRESHOLD_": "131072"},
        {"GLIBC_TUNABLES": "glibc.malloc.trim_threshold=131072"},
        {"PLANTSIDE_MALLOC_DEFAULTS": "1"},
    ):
        assert heap.keep_freed_memory(environ) is False, environ


def test_a_launchers_own_setting_gives_way_and_a_persons_does_not():
    # Dask's nanny sets its pre-spawn values in each worker (distributed.yaml,
    # distributed.nanny.pre-spawn-environ: MALLOC_TRIM_THRESHOLD_ 65536, OMP_NUM_THREADS 1)
    dask_settings = {"MALLOC_TRIM_THRESHOLD_": 65536, "OMP_NUM_THREADS": 1}
    worker = {"MALLOC_TRIM_THRESHOLD_": "65536", "OMP_NUM_THREADS": "1", "HOME": "/root"}
    assert heap.without_settings_of(worker, dask_settings) == {
        "OMP_NUM_THREADS": "1",  # not the allocator's: kept
        "HOME": "/root",
    }
    own = {"MALLOC_TRIM_THRESHOLD_": "131072"}  # set by whoever started the worker
    assert heap.without_settings_of(own, dask_settings) == own
    assert heap.keep_freed_memory(heap.without_settings_of(own, dask_settings)) is False
    opted_out = {**worker, "PLANTSIDE_MALLOC_DEFAULTS": "1"}
    assert heap.keep_freed_memory(heap.without_settings_of(opted_out, dask_settings)) is False


def test_thresholds():
    # 32 MiB is glibc's own ceiling of the dynamic mapping threshold on 64-bit systems
    # (DEFAULT_MMAP_THRESHOLD_MAX, mallopt(3)); the trim threshold is twice it.
    assert heap.MMAP_THRESHOLD_BYTES == 32 * 2**20
    assert heap.TRIM_THRESHOLD_BYTES == 2 * heap.MMAP_THRESHOLD_BYTES


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="glibc only")
def test_applied_on_glibc_and_import_stays_quiet():
    import platform

    if platform.libc_ver()[0] != "glibc":
        pytest.skip("not glibc")
    assert heap.keep_freed_memory({}) is True
    # a fresh interpreter imports the package with and without the opt-out
    for extra in ({}, {"PLANTSIDE_MALLOC_DEFAULTS": "1"}):
        code = "import plantside.air.moist_air as m; print(float(m.saturation_vapor_pressure(20)))"
        done = subprocess.run(
            [sys.executable, "-c", code],
            capture_output=True,
            text=True,
            env={**os.environ, **extra},
            check=True,
        )
        assert done.stdout.strip().startswith("2338.8")  # psychrolib GetSatVapPres(20)
