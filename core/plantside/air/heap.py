"""Keep freed array memory in the process for the next array (glibc's allocator only).

A year of the core is some hundreds of numpy operations on arrays of 8,760 values
(70 kB each), and an outdoor-air sweep works on arrays of 101 x 8,760 (7 MB). With the
GNU C library's default allocator settings, the memory freed at the end of a call goes
back to the operating system once 128 kB lie free at the top of the heap, and arrays
above the (dynamic) mapping threshold are mapped and unmapped one by one; each new array
then starts with page faults, which can cost more than its arithmetic. Measured on a
2-core machine (one air handler's year, differential enthalpy and recovery): 10.4 ms
with the defaults, 3.3 ms with these settings; the moist-air year 2.0 ms and 1.1 ms.

:func:`keep_freed_memory` raises the trim threshold to 64 MiB and fixes the mapping
threshold at 32 MiB (the upper bound of glibc's own dynamic threshold), so that freed
memory is reused rather than returned and faulted in again. The cost: a process keeps up
to 64 MiB of freed memory. It is applied once, on import of :mod:`plantside.air`, on
Linux with glibc only, and not at all when the environment sets the allocator itself
(``MALLOC_TRIM_THRESHOLD_``, ``MALLOC_MMAP_THRESHOLD_``, a ``glibc.malloc`` tunable) or
sets ``PLANTSIDE_MALLOC_DEFAULTS=1``.

References
----------
GNU C Library manual, "Memory Allocation Tunables" and mallopt(3): M_TRIM_THRESHOLD,
M_MMAP_THRESHOLD (setting either turns off the dynamic adjustment of both).
"""

from __future__ import annotations

import ctypes
import os
import sys

__all__ = [
    "ALLOCATOR_VARIABLES",
    "MMAP_THRESHOLD_BYTES",
    "TRIM_THRESHOLD_BYTES",
    "keep_freed_memory",
    "without_settings_of",
]

#: mallopt(3) parameter numbers of glibc's <malloc.h>.
_M_TRIM_THRESHOLD = -1
_M_MMAP_THRESHOLD = -3
#: Free memory at the top of the heap kept before any is returned [bytes].
TRIM_THRESHOLD_BYTES = 64 * 2**20
#: Allocations at or above this size are mapped on their own [bytes].
MMAP_THRESHOLD_BYTES = 32 * 2**20
_OPT_OUT = "PLANTSIDE_MALLOC_DEFAULTS"
#: The environment variables of glibc's allocator this module gives way to.
ALLOCATOR_VARIABLES = ("MALLOC_TRIM_THRESHOLD_", "MALLOC_MMAP_THRESHOLD_")


def _allocator_set_by_environment(environ) -> bool:
    if environ.get(_OPT_OUT, "") not in ("", "0"):
        return True
    if any(name in environ for name in ALLOCATOR_VARIABLES):
        return True
    return "glibc.malloc" in environ.get("GLIBC_TUNABLES", "")


def keep_freed_memory(environ=None) -> bool:
    """Raise glibc's trim and mapping thresholds (module notes); True when applied.

    Parameters
    ----------
    environ : mapping, optional
        The environment to consult (``os.environ`` by default).

    Returns
    -------
    bool
        False on other platforms or C libraries, or when the environment sets the
        allocator or opts out.
    """
    if not sys.platform.startswith("linux"):
        return False
    if _allocator_set_by_environment(os.environ if environ is None else environ):
        return False
    try:
        libc = ctypes.CDLL(None)  # the C library this process already runs on
        libc.gnu_get_libc_version  # noqa: B018 - glibc only (musl ignores these settings)
        mallopt = libc.mallopt
    except (OSError, AttributeError):
        return False
    mallopt.argtypes = (ctypes.c_int, ctypes.c_int)
    mallopt.restype = ctypes.c_int
    trimmed = mallopt(_M_TRIM_THRESHOLD, TRIM_THRESHOLD_BYTES)
    mapped = mallopt(_M_MMAP_THRESHOLD, MMAP_THRESHOLD_BYTES)
    return bool(trimmed and mapped)


def without_settings_of(environ, settings) -> dict:
    """``environ`` without the allocator variables whose value is the one ``settings`` set.

    A Dask nanny sets ``MALLOC_TRIM_THRESHOLD_=65536`` in every worker it starts (its
    ``distributed.nanny.pre-spawn-environ``, unless the environment already sets it): a
    setting of the scheduler's configuration, not of the person who started the worker.
    With it, a sweep case ran 12 % slower (2-core machine, 60 cases in a fresh process,
    five runs each: 8.77-9.13 cases/s against 9.69-10.47). Passing the result to
    :func:`keep_freed_memory` applies this module's settings over Dask's, and still
    leaves a value someone set themselves alone.

    Parameters
    ----------
    environ : mapping
        The process's environment.
    settings : mapping
        Variables and the values a launcher sets (e.g. Dask's pre-spawn environment).
    """
    return {
        name: value
        for name, value in environ.items()
        if not (name in ALLOCATOR_VARIABLES and name in settings and value == str(settings[name]))
    }
