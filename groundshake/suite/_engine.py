"""Running one function over many record sets: serial, a local process pool, or Dask.

The model-dependent data (``shared``) is built once and sent to each worker once:
as the pool initializer's argument, or scattered with ``broadcast=True`` on a
Dask cluster. Each task then receives only its record set (plain data) and
returns plain data. No scheduler of our own: the pool is the standard
library's, the cluster is ``dask.distributed``'s (which retries a lost worker's
tasks, here up to ``retries`` times).
"""
from __future__ import annotations

import concurrent.futures as cf
import multiprocessing
import os
from typing import Any, Callable, Iterator, Mapping, Sequence

from .._errors import InputError

__all__ = ["run_tasks"]

TaskFn = Callable[[Mapping[str, Any], Mapping[str, Any]], dict]

_WORKER_SHARED: dict[str, Any] = {}


def _pool_init(shared: Mapping[str, Any]) -> None:
    # Each worker process keeps one copy of the shared data for all its tasks.
    _WORKER_SHARED.clear()
    _WORKER_SHARED.update(shared)


def _pool_call(fn: TaskFn, item: Mapping[str, Any]) -> dict:
    return fn(_WORKER_SHARED, item)


def _safe(fn: TaskFn, shared, item) -> dict:
    try:
        return fn(shared, item)
    except Exception as e:  # a bad record must not stop the others
        return {"record": item.get("name"), "status": "failed", "error": _one_line(e)}


def _one_line(e: BaseException) -> str:
    text = str(e).strip().splitlines()
    return f"{type(e).__name__}: {text[0] if text else ''}".rstrip(": ")


def run_tasks(fn: TaskFn, shared: Mapping[str, Any], items: Sequence[Mapping[str, Any]], *,
              workers: int | None = 1, scheduler: str | None = None,
              retries: int = 2) -> Iterator[dict]:
    """Yield ``fn(shared, item)`` for each item, in order of completion.

    Parameters
    ----------
    fn : callable
        A module-level function ``fn(shared, item) -> dict`` (importable by
        workers). It should catch its own record errors and return
        ``{"status": "failed", ...}``; any exception it raises is turned into
        such a result here.
    shared : mapping
        Plain data and numpy arrays built once (the model's part of the work).
    items : sequence of mapping
        One plain-data item per task; ``item["name"]`` names it in errors.
    workers : int, optional
        1 runs in this process; N > 1 a local process pool of N workers;
        None the CPU count. Ignored with ``scheduler``.
    scheduler : str, optional
        Address of a ``dask.distributed`` scheduler (``tcp://host:8786``), or a
        ``distributed.Client`` object.
    retries : int
        Dask retries of a task whose worker was lost.
    """
    # keys starting with "_" are a worker's own caches: never sent
    shared = {k: v for k, v in shared.items() if not str(k).startswith("_")}
    if scheduler is not None:
        yield from _run_dask(fn, shared, items, scheduler, retries)
        return
    n = (os.cpu_count() or 1) if workers is None else int(workers)
    if n < 1:
        raise InputError(f"--workers {workers}: must be >= 1")
    if n == 1 or len(items) <= 1:
        for item in items:
            yield _safe(fn, shared, item)
        return
    ctx = multiprocessing.get_context("fork" if "fork" in multiprocessing.get_all_start_methods()
                                      else "spawn")
    with cf.ProcessPoolExecutor(max_workers=min(n, len(items)), mp_context=ctx,
                                initializer=_pool_init, initargs=(dict(shared),)) as pool:
        futures = {pool.submit(_pool_call, fn, item): item for item in items}
        try:
            for fut in cf.as_completed(futures):
                item = futures[fut]
                try:
                    yield fut.result()
                except Exception as e:
                    yield {"record": item.get("name"), "status": "failed", "error": _one_line(e)}
        except BaseException:
            for f in futures:
                f.cancel()
            raise


def _run_dask(fn: TaskFn, shared, items, scheduler, retries: int) -> Iterator[dict]:
    try:
        from distributed import Client, as_completed
    except ImportError:
        raise InputError("--scheduler needs dask.distributed: pip install 'groundshake[cluster]'") from None
    own = isinstance(scheduler, str)
    try:
        client = Client(scheduler, timeout="20s") if own else scheduler
    except OSError as e:
        raise InputError(f"--scheduler {scheduler}: cannot connect ({e})") from None
    try:
        shared_future = client.scatter(dict(shared), broadcast=True, hash=False)
        futures = [client.submit(_safe, fn, shared_future, item, pure=False, retries=retries,
                                 key=f"groundshake-{i}-{item.get('name')}")
                   for i, item in enumerate(items)]
        index = {f.key: items[i] for i, f in enumerate(futures)}
        for fut in as_completed(futures):
            try:
                yield fut.result()
            except Exception as e:
                item = index.get(fut.key, {})
                yield {"record": item.get("name"), "status": "failed", "error": _one_line(e)}
    finally:
        if own:
            client.close()
