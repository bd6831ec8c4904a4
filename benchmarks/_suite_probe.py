"""A measuring wrapper around the suite task, for benchmarks/suite.py.

``probed_set(shared, item)`` runs :func:`groundshake.suite._run.run_record_set` and
adds ``_probe``: the worker process's CPU seconds (user and system, all its threads)
and the computing thread's CPU seconds spent on the set, page faults, and the
thread settings the set ran with. A worker runs one set at a time, so the process
CPU over the set is the set's cost on that worker (plus whatever the worker's own
threads did meanwhile, which is part of the engine's cost).
"""
from __future__ import annotations

import os
import resource
import time

# the real task, taken when this module is first imported (the benchmark then puts
# ``probed_set`` in its place in the parent process)
from groundshake.suite._run import run_record_set as _task


def _threads_now() -> int:
    try:
        with open("/proc/self/status", encoding="ascii") as f:
            for line in f:
                if line.startswith("Threads:"):
                    return int(line.split()[1])
    except OSError:
        pass
    return -1


def settings() -> dict:
    """The thread and allocator settings in force in the calling thread."""
    out = {"pid": os.getpid(), "os_threads": _threads_now()}
    for k in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS",
              "GROUNDSHAKE_THREADS", "MALLOC_TRIM_THRESHOLD_", "MALLOC_MMAP_THRESHOLD_",
              "NUMBA_NUM_THREADS", "NUMBA_THREADING_LAYER"):
        out[k] = os.environ.get(k)
    try:
        import numba

        out["numba_threads"] = numba.get_num_threads()
        try:
            out["numba_layer"] = numba.threading_layer()
        except ValueError:
            out["numba_layer"] = None      # no parallel kernel run yet
    except ImportError:
        pass
    from groundshake.spectra._kernel import kernel_threads

    out["kernel_threads"] = kernel_threads()
    return out


def probed_set(shared, item) -> dict:
    """``run_record_set(shared, item)`` with ``_probe`` (CPU seconds, faults, settings)."""
    t0 = os.times()
    th0 = time.thread_time()
    w0 = time.perf_counter()
    ru0 = resource.getrusage(resource.RUSAGE_SELF)
    r = _task(shared, item)
    ru1 = resource.getrusage(resource.RUSAGE_SELF)
    t1 = os.times()
    r["_probe"] = {
        "wall_s": time.perf_counter() - w0,
        "user_s": t1.user - t0.user,
        "sys_s": t1.system - t0.system,
        "thread_s": time.thread_time() - th0,
        "minor_faults": ru1.ru_minflt - ru0.ru_minflt,
        "ctx_switches": (ru1.ru_nvcsw - ru0.ru_nvcsw) + (ru1.ru_nivcsw - ru0.ru_nivcsw),
        **settings(),
    }
    return r
