"""Running one function over many record sets: in this process, a local pool, or Dask.

The model-dependent data (``shared``) is built once and sent to each worker once;
each task then receives only its record set (plain data) and returns plain data.

Local pool. Worker processes are started with the ``forkserver`` method (``spawn``
where there is none), never by forking this process: a process that has already run
a parallel compiled kernel may hold a threading runtime that does not survive a
fork (GNU OpenMP aborts the child), whatever numba's threading layer turns out to
be. The fork server is a fresh interpreter with the package preloaded, so a worker
starts in a fraction of a second; ``shared`` goes to each worker once, as the
argument of its start-up, and stays there for all of its tasks. One task per worker
at a time, so this process always knows which set a worker is on: a worker that
dies has its set run again elsewhere (up to ``retries`` times); a worker past a
set's time limit plus a grace period is stopped and replaced, and its set reported
failed.

Dask. ``shared`` is scattered once per run as one piece of data under a key of its
own (never a fixed name) to every worker, and this function holds its future until
the run ends, so consecutive or concurrent suites on one client cannot release
each other's data. Task keys are unique per run too. The cluster reruns the tasks
of a lost worker; if the cluster loses the shared data itself, it is scattered
again and the waiting sets resubmitted. Each task announces its start (a Dask
event), so a set past its limit is cancelled and reported failed, and silence from
the scheduler for longer than any set may take ends the run with a clear error.

Every worker (pool or Dask) is set up by :func:`_prepare_worker` before a set:
compiled kernels on one thread, and (glibc) an allocator that keeps medium-sized
arrays on its heap, with free memory given back after each set.

The time limit inside a worker is soft: the computing thread receives an exception
at the limit (delivered between Python steps, so one long compiled call finishes
first). The hard stop (above) catches what the soft one cannot; in this process
(``workers=1``) only the soft limit applies.
"""
from __future__ import annotations

import ctypes
import logging
import math
import multiprocessing
import multiprocessing.connection as mpc
import os
import threading
import time
import uuid
from dataclasses import asdict, dataclass, field
from typing import Any, Callable, Iterator, Mapping, Sequence

from .._errors import GroundshakeError, InputError

__all__ = ["run_tasks", "EngineReport", "SuiteStalled", "SetTimedOut"]

log = logging.getLogger(__name__)

TaskFn = Callable[[Mapping[str, Any], Mapping[str, Any]], dict]

#: modules the fork server imports once, so that every worker starts warm
_PRELOAD = ["numpy", "scipy.sparse", "obspy", "groundshake.records", "groundshake.processing",
            "groundshake.spectra", "groundshake.scenario", "groundshake.model",
            "groundshake.dynamics", "groundshake.results", "groundshake.suite._run"]


class SetTimedOut(BaseException):
    """Raised inside a worker's computing thread when its set passes the time limit.

    A ``BaseException``, so the analysis code's ``except Exception`` cannot swallow it.
    """


class SuiteStalled(GroundshakeError, RuntimeError):
    """The engine stopped answering (scheduler silence, data lost beyond recovery)."""


@dataclass
class EngineReport:
    """What ran a suite, filled in while it runs (written to ``suite.json`` as ``engine``).

    Attributes
    ----------
    name : {"in-process", "pool", "dask"}
    workers : int
        Worker processes (Dask: workers known to the scheduler at the start).
    start_method : str or None
        How pool workers were started (``forkserver`` or ``spawn``).
    scheduler : str or None
        The Dask scheduler's address.
    retries : int
        Sets run again because their worker was lost (or the shared data was).
    lost_workers : int
        Worker processes that died while running a set (pool), or restarts seen (Dask).
    timed_out : int
        Sets stopped at their time limit.
    failed : int
        Sets reported failed, for any reason (filled in by the suite).
    """

    name: str = "in-process"
    workers: int = 1
    start_method: str | None = None
    scheduler: str | None = None
    retries: int = 0
    lost_workers: int = 0
    timed_out: int = 0
    failed: int = 0
    notes: list[str] = field(default_factory=list)

    def to_dict(self) -> dict:
        return asdict(self)

    def line(self) -> str:
        """One line for the terminal."""
        where = {"in-process": "in this process", "pool": f"local pool ({self.start_method})",
                 "dask": f"Dask at {self.scheduler}"}.get(self.name, self.name)
        return (f"engine: {where}, {self.workers} worker{'s' if self.workers != 1 else ''}; "
                f"{self.retries} retr{'ies' if self.retries != 1 else 'y'}, "
                f"{self.timed_out} timed out, {self.failed} failed")


def _failed(item: Mapping[str, Any], error: str, **extra) -> dict:
    return {"record": item.get("name"), "status": "failed", "files": dict(item.get("files", {})),
            "error": error, **extra}


def _one_line(e: BaseException) -> str:
    text = str(e).strip().splitlines()
    return f"{type(e).__name__}: {text[0] if text else ''}".rstrip(": ")


def _timeout_text(limit: float) -> str:
    return (f"stopped at the set time limit of {limit:.0f} s (a limit that can be given; "
            "its default grows with the model size and the record length)")


class _Alarm:
    """Raise :class:`SetTimedOut` in the calling thread after ``limit`` seconds."""

    def __init__(self, limit: float | None):
        self._tid = threading.get_ident()
        self._lock = threading.Lock()
        self._live = True
        self.fired = False
        self._timer = None
        if limit is not None:
            self._timer = threading.Timer(limit, self._fire)
            self._timer.daemon = True
            self._timer.start()

    def _fire(self) -> None:
        with self._lock:
            if self._live:
                self.fired = True
                ctypes.pythonapi.PyThreadState_SetAsyncExc(ctypes.c_ulong(self._tid),
                                                           ctypes.py_object(SetTimedOut))

    def stop(self) -> None:
        with self._lock:
            self._live = False
            if self.fired:     # clear it if not delivered yet (no-op otherwise)
                ctypes.pythonapi.PyThreadState_SetAsyncExc(ctypes.c_ulong(self._tid), None)
        if self._timer is not None:
            self._timer.cancel()


def _limited(fn: TaskFn, shared, item, limit: float | None) -> dict:
    """``fn(shared, item)`` that never raises, stopped (softly) at ``limit`` seconds."""
    try:
        alarm = _Alarm(limit)
        try:
            return fn(shared, item)
        finally:
            alarm.stop()
    except SetTimedOut:
        return _failed(item, _timeout_text(limit or 0.0), timed_out=True)
    except Exception as e:  # a bad record must not stop the others
        return _failed(item, _one_line(e))


def run_tasks(fn: TaskFn, shared: Mapping[str, Any], items: Sequence[Mapping[str, Any]], *,
              workers: int | None = 1, scheduler: Any = None, retries: int = 2,
              limits: Sequence[float | None] | None = None,
              report: EngineReport | None = None) -> Iterator[dict]:
    """Yield ``fn(shared, item)`` for each item, in order of completion, exactly once each.

    Parameters
    ----------
    fn : callable
        A module-level function ``fn(shared, item) -> dict`` (importable by
        workers). It should catch its own record errors and return
        ``{"status": "failed", ...}``; any exception it raises is turned into
        such a result here.
    shared : mapping
        Plain data and numpy arrays built once (the model's part of the work).
        Keys starting with ``_`` are a worker's own caches and are never sent.
    items : sequence of mapping
        One plain-data item per task; ``item["name"]`` names it in errors.
    workers : int, optional
        1 runs in this process; N > 1 a local pool of N worker processes; None
        the CPU count. Ignored with ``scheduler``.
    scheduler : str or distributed.Client, optional
        Address of a ``dask.distributed`` scheduler (``tcp://host:8786``), or a
        ``distributed.Client``.
    retries : int
        How many times a set is run again after its worker was lost.
    limits : sequence of float or None, optional
        Time limit [s] of each item (None: no limit). A set past its limit is
        yielded as failed with ``timed_out = True``.
    report : EngineReport, optional
        Filled in with the engine, workers, retries, lost workers and time-outs.

    Raises
    ------
    InputError
        Bad ``workers``; no ``dask.distributed``; a scheduler that cannot be reached.
    SuiteStalled
        The Dask scheduler gave no result and started no set for longer than any
        set may take, or lost the shared data more than ``retries`` times.
    """
    report = report if report is not None else EngineReport()
    shared = {k: v for k, v in shared.items() if not str(k).startswith("_")}
    limits = list(limits) if limits is not None else [None] * len(items)
    if len(limits) != len(items):
        raise ValueError(f"limits: {len(limits)} given for {len(items)} items")
    if scheduler is not None:
        yield from _run_dask(fn, shared, items, limits, scheduler, retries, report)
        return
    n = (os.cpu_count() or 1) if workers is None else int(workers)
    if n < 1:
        raise InputError(f"given {workers}; allowed an integer >= 1", param="workers",
                         value=workers)
    if n == 1 or len(items) <= 1:
        report.name, report.workers = "in-process", 1
        for item, limit in zip(items, limits):
            r = _limited(fn, shared, item, limit)
            report.timed_out += bool(r.get("timed_out"))
            yield r
        return
    yield from _run_pool(fn, shared, items, limits, min(n, len(items)), retries, report)


# ---------------------------------------------------------------- local pool


def _pool_context():
    methods = multiprocessing.get_all_start_methods()
    if "forkserver" in methods:
        ctx = multiprocessing.get_context("forkserver")
        ctx.set_forkserver_preload(_PRELOAD)   # used only when the server first starts
        return ctx
    return multiprocessing.get_context("spawn")


def _one_compiled_thread() -> None:
    """Parallel compiled kernels run on one thread in a worker: the workers are the
    parallelism, and a spinning thread team per worker would oversubscribe the cores."""
    try:
        import numba

        numba.set_num_threads(1)    # per thread in numba: called in the computing one
    except Exception as e:  # noqa: BLE001 - an optional speed setting, never fatal
        log.debug("suite: numba threads left as they are (%s)", e)


#: glibc ``mallopt`` parameters and the values a worker uses (bytes)
_M_TRIM_THRESHOLD, _M_MMAP_THRESHOLD = -1, -3
_MMAP_THRESHOLD_B = 32 * 1024 * 1024     # glibc's own ceiling for its sliding threshold
_TRIM_THRESHOLD_B = 2 * _MMAP_THRESHOLD_B
_libc: Any = None
_process_ready = False
_malloc_tuned = False


def _glibc():
    """The C library when it is glibc (it has ``mallopt`` and ``malloc_trim``), else None."""
    global _libc
    if _libc is None:
        _libc = False
        try:
            lib = ctypes.CDLL(None)
            if hasattr(lib, "mallopt") and hasattr(lib, "malloc_trim"):
                _libc = lib
        except OSError:
            pass
    return _libc or None


def _prepare_worker() -> dict:
    """Set up the calling worker process and thread for suite sets; cheap to repeat.

    * compiled kernels on one thread (numba, this thread) and the oscillator
      kernel on one thread (``GROUNDSHAKE_THREADS``, unless already set);
    * glibc's allocator keeps blocks below 32 MiB on its heap and returns free
      memory above 64 MiB only. A set allocates and frees several hundred MB of
      medium-sized arrays; with a small trim threshold (Dask's nannies start
      workers with ``MALLOC_TRIM_THRESHOLD_=65536``) each of them is a fresh
      mapping, zero-filled page by page, which measured as a third of a set's CPU
      time. :func:`_release_memory` gives the free memory back once per set.

    Returns what is in force (for tests and the benchmark): ``numba_threads``,
    ``kernel_threads`` and ``malloc_tuned``.
    """
    global _process_ready, _malloc_tuned
    _one_compiled_thread()
    if not _process_ready:
        _process_ready = True
        os.environ.setdefault("GROUNDSHAKE_THREADS", "1")
        lib = _glibc()
        if lib is not None:
            _malloc_tuned = (lib.mallopt(_M_MMAP_THRESHOLD, _MMAP_THRESHOLD_B) == 1
                             and lib.mallopt(_M_TRIM_THRESHOLD, _TRIM_THRESHOLD_B) == 1)
            if not _malloc_tuned:
                log.debug("suite: the allocator settings were not taken")
    out = {"numba_threads": None, "kernel_threads": None, "malloc_tuned": _malloc_tuned}
    try:
        import numba

        out["numba_threads"] = int(numba.get_num_threads())
    except Exception:  # noqa: BLE001
        pass
    try:
        from ..pipeline import kernel_threads

        out["kernel_threads"] = kernel_threads()
    except Exception:  # noqa: BLE001 - a bad GROUNDSHAKE_THREADS is reported by the set
        pass
    return out


def _release_memory() -> None:
    """Give the allocator's free memory back to the system (once per set)."""
    lib = _glibc()
    if lib is not None:
        lib.malloc_trim(0)


def _run_prepared(fn: TaskFn, shared, item, limit) -> dict:
    """One set in a prepared worker: :func:`_limited`, then free memory returned."""
    _prepare_worker()
    try:
        return _limited(fn, shared, item, limit)
    finally:
        _release_memory()


def _worker_main(conn, fn: TaskFn, shared: dict) -> None:
    """A pool worker: one set at a time, until told to stop (None) or the pipe closes.

    Says ``("started", i)`` when it takes set ``i`` and ``("done", i, result)`` at the end.
    """
    _prepare_worker()
    try:
        while True:
            try:
                msg = conn.recv()
            except (EOFError, OSError):
                return
            if msg is None:
                return
            task_id, item, limit = msg
            conn.send(("started", task_id))
            conn.send(("done", task_id, _run_prepared(fn, shared, item, limit)))
    except KeyboardInterrupt:   # the parent handles Ctrl-C
        return


@dataclass
class _Slot:
    proc: Any
    conn: Any
    task: int | None = None
    sent: float = 0.0             # when the set was sent (monotonic)
    started: float | None = None  # when the worker said it took it


def _grace(limit: float) -> float:
    # time allowed past the soft limit before the worker is stopped
    return max(15.0, 0.25 * limit)


#: pool: time [s] a new worker may take to start and take its first set
_STARTUP_S = 300.0
#: Dask: silence [s] allowed beyond the longest set's limit and grace before giving up
_SILENCE_MARGIN_S = 60.0
#: Dask: time [s] to wait for a worker to take the shared data
_SCATTER_TIMEOUT_S = 120.0


def _run_pool(fn, shared, items, limits, n, retries, report) -> Iterator[dict]:
    ctx = _pool_context()
    report.name, report.workers = "pool", n
    report.start_method = ctx.get_start_method()
    todo = list(range(len(items)))[::-1]      # a stack: pop() takes the next in order
    tries = [0] * len(items)
    slots: list[_Slot] = []

    def start() -> _Slot:
        parent, child = ctx.Pipe(duplex=True)
        p = ctx.Process(target=_worker_main, args=(child, fn, shared), daemon=True,
                        name="groundshake-suite-worker")
        p.start()
        child.close()
        return _Slot(p, parent)

    def stop(slot: _Slot, *, kill: bool) -> None:
        try:
            if kill:
                slot.proc.kill()
            else:
                slot.conn.send(None)
        except (OSError, ValueError):
            pass
        slot.proc.join(timeout=5.0 if not kill else 2.0)
        if slot.proc.is_alive():
            slot.proc.kill()
            slot.proc.join(timeout=2.0)
        slot.conn.close()

    def lost(k: int, why: str) -> Iterator[dict]:
        """Worker k is gone (or stopped) while holding its set: run the set again or fail it."""
        slot = slots[k]
        i = slot.task
        slot.task = None
        stop(slot, kill=True)
        slots[k] = start()
        report.lost_workers += 1
        tries[i] += 1
        if tries[i] <= retries:
            report.retries += 1
            log.warning("suite: %s on set %s; running it again", why, items[i].get("name"))
            todo.append(i)
        else:
            yield _failed(items[i], f"{why}, {tries[i]} times")

    try:
        slots = [start() for _ in range(n)]
        pending = len(items)
        while pending:
            for k, slot in enumerate(slots):
                if slot.task is None and todo:
                    i = todo.pop()
                    try:
                        slot.conn.send((i, items[i], limits[i]))
                    except (OSError, ValueError):   # died before taking it: a new worker
                        todo.append(i)
                        report.lost_workers += 1
                        stop(slot, kill=True)
                        slots[k] = start()
                        continue
                    slot.task, slot.sent, slot.started = i, time.monotonic(), None
            busy = [s for s in slots if s.task is not None]
            if not busy:       # cannot happen while sets are pending; never spin
                raise SuiteStalled(f"suite: no worker is running a set but {pending} set(s) "
                                   "are pending")
            now = time.monotonic()
            waits = [(s.started + limits[s.task] + _grace(limits[s.task])
                      if limits[s.task] is not None else math.inf) if s.started is not None
                     else s.sent + _STARTUP_S for s in busy]
            timeout = max(0.05, min(waits) - now) if min(waits) < math.inf else None
            mpc.wait([s.conn for s in busy] + [s.proc.sentinel for s in busy], timeout=timeout)
            for k, slot in enumerate(slots):
                if slot.task is None:
                    continue
                i = slot.task
                while slot.task is not None and slot.conn.poll():
                    try:
                        msg = slot.conn.recv()
                    except (EOFError, OSError):
                        break
                    if msg[0] == "started" and msg[1] == i:
                        slot.started = time.monotonic()
                    elif msg[0] == "done" and msg[1] == i:
                        slot.task = None
                        pending -= 1
                        report.timed_out += bool(msg[2].get("timed_out"))
                        yield msg[2]
                if slot.task is None:
                    continue
                if not slot.proc.is_alive():
                    for r in lost(k, f"its worker process died (exit code "
                                     f"{slot.proc.exitcode})"):
                        pending -= 1
                        yield r
                    continue
                now = time.monotonic()
                limit = limits[i]
                if slot.started is None and now - slot.sent > _STARTUP_S:
                    for r in lost(k, f"its worker did not start within {_STARTUP_S:.0f} s"):
                        pending -= 1
                        yield r
                elif (slot.started is not None and limit is not None
                      and now - slot.started > limit + _grace(limit)):
                    report.timed_out += 1
                    slot.task = None
                    stop(slot, kill=True)              # stuck in compiled code: stop it
                    slots[k] = start()
                    pending -= 1
                    yield _failed(items[i], _timeout_text(limit) + "; its worker was stopped "
                                  f"{_grace(limit):.0f} s later", timed_out=True)
    finally:
        for slot in slots:
            stop(slot, kill=slot.task is not None)


# ---------------------------------------------------------------- Dask


def _dask_task(fn: TaskFn, shared, item, limit, topic: str, index: int) -> dict:
    """A Dask task: say that set ``index`` started (an event), then run it."""
    try:
        from distributed import get_worker

        w = get_worker()
        w.log_event(topic, {"index": index, "worker": w.address})
    except Exception:     # no worker context (e.g. a synchronous scheduler): run anyway
        pass
    return _run_prepared(fn, shared, item, limit)


def _run_dask(fn, shared, items, limits, scheduler, retries, report) -> Iterator[dict]:
    try:
        from distributed import Client, wait
    except ImportError:
        raise InputError("needs dask.distributed: pip install 'groundshake[cluster]'",
                         param="scheduler") from None
    own = isinstance(scheduler, str)
    try:
        client = Client(scheduler, timeout="20s") if own else scheduler
    except (OSError, TimeoutError) as e:
        raise InputError(f"cannot connect to {scheduler} ({e})", param="scheduler",
                         value=scheduler) from None
    run_id = uuid.uuid4().hex[:12]
    topic = f"groundshake-suite-{run_id}"
    started: dict[int, tuple[float, str]] = {}     # index → (monotonic time, worker)
    starts = [0] * len(items)
    lock = threading.Lock()
    last_news = [time.monotonic()]

    def on_event(event) -> None:
        msg = event[1] if isinstance(event, tuple) else event
        try:
            i = int(msg["index"])
        except (TypeError, KeyError, ValueError):
            return
        with lock:
            starts[i] += 1
            started[i] = (time.monotonic(), str(msg.get("worker", "")))
            last_news[0] = time.monotonic()

    report.name = "dask"
    try:
        info = client.scheduler_info()
        report.scheduler = str(info.get("address", scheduler if own else "client"))
        report.workers = len(info.get("workers", {}))
    except Exception:
        report.scheduler = str(scheduler) if own else "client"
    known = [x for x in limits if x is not None]
    silence = (max(known) + _grace(max(known)) + _SILENCE_MARGIN_S
               if known and len(known) == len(limits) else None)

    shared_future = None
    futures: dict[Any, int] = {}
    scatters = 0

    def scatter():
        nonlocal shared_future, scatters
        scatters += 1
        # one piece of data under a key of its own (hash=False gives a fresh random key);
        # a list, so the dict is not split into keys named after its entries
        try:
            (fut,) = client.scatter([dict(shared)], broadcast=True, hash=False,
                                    timeout=_SCATTER_TIMEOUT_S)
        except (TimeoutError, OSError) as e:
            raise SuiteStalled(f"suite: the Dask scheduler {report.scheduler} took no copy of "
                               f"the shared model within {_SCATTER_TIMEOUT_S:.0f} s ({e}); "
                               "are its workers running?") from None
        old, shared_future = shared_future, fut
        if old is not None:
            old.release()

    submitted = [0] * len(items)

    def submit(i: int) -> None:
        submitted[i] += 1
        with lock:
            started.pop(i, None)      # the limit counts from this submission's start
        f = client.submit(_dask_task, fn, shared_future, items[i], limits[i], topic, i,
                          key=f"groundshake-{run_id}-{scatters}-{i}", pure=False)
        futures[f] = i

    try:
        client.subscribe_topic(topic, on_event)
        scatter()
        for i in range(len(items)):
            submit(i)
        while futures:
            try:
                wait(list(futures), timeout=1.0, return_when="FIRST_COMPLETED")
            except Exception:  # noqa: BLE001 - a time-out, or futures cancelled (lost data)
                pass
            done = [f for f in futures if f.done()]
            lost = []
            for fut in done:
                i = futures.pop(fut)
                last_news[0] = time.monotonic()
                if fut.status == "finished":
                    r = fut.result()
                    report.timed_out += bool(r.get("timed_out"))
                    yield r
                elif fut.status == "cancelled":        # lost the shared data, or cancelled
                    lost.append(i)
                else:
                    try:
                        exc = fut.exception()
                    except Exception as e:   # noqa: BLE001 - any reason, one line
                        exc = e
                    yield _failed(items[i], _one_line(exc) if exc else "failed on the cluster")
                fut.release()
            if lost:
                if scatters > retries + 1:
                    raise SuiteStalled(f"suite: the cluster lost the shared model {scatters} "
                                       f"times; {len(lost) + len(futures)} set(s) not run "
                                       "(finished sets are kept; resuming the suite runs "
                                       "the rest)")
                log.warning("suite: the cluster lost the shared model; scattering it again "
                            "and resubmitting %d set(s)", len(lost))
                scatter()
                for i in lost:
                    submit(i)
            now = time.monotonic()
            with lock:
                running = dict(started)
            for fut, i in list(futures.items()):
                if i not in running or limits[i] is None:
                    continue
                t0, worker = running[i]
                if now - t0 > limits[i] + _grace(limits[i]):
                    futures.pop(fut)
                    fut.cancel()
                    report.timed_out += 1
                    last_news[0] = now
                    yield _failed(items[i], _timeout_text(limits[i]) + "; its task was "
                                  "cancelled", timed_out=True)
                    if worker:
                        try:       # free the worker if a nanny looks after it
                            client.restart_workers([worker], raise_for_error=False)
                        except Exception as e:  # noqa: BLE001
                            report.notes.append(f"could not restart {worker}: {_one_line(e)}")
            if futures and client.status in ("closing", "closed", "failed"):
                raise SuiteStalled(f"suite: lost the connection to the Dask scheduler "
                                   f"{report.scheduler}; {len(futures)} set(s) not run "
                                   "(finished sets are kept; resuming the suite runs the "
                                   "rest)")
            if silence is not None and futures and now - last_news[0] > silence:
                raise SuiteStalled(
                    f"suite: the Dask scheduler {report.scheduler} gave no result and started "
                    f"no set for {now - last_news[0]:.0f} s (longer than any set may take); "
                    f"{len(futures)} set(s) not run (finished sets are kept; resuming the "
                    "suite runs the rest)")
        with lock:      # a set run again: started twice (lost worker) or resubmitted
            report.retries += sum(max(0, max(a, b) - 1) for a, b in zip(starts, submitted))
    finally:
        for fut in list(futures):
            fut.cancel()
        try:
            client.unsubscribe_topic(topic)
        except Exception:   # noqa: BLE001 - a closed client
            pass
        if shared_future is not None:
            shared_future.release()
        if own:
            client.close()
