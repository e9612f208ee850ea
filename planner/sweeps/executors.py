"""Where fan-out work runs: the caller's executor, fed in chunks.

The library keeps no pool of its own.  Every function that fans out (a comparison's rows, an
envelope's cells, a sweep's plans, a calibration's replays) takes any ``concurrent.futures.Executor``
and sends it work in chunks; ``None`` runs the work in this process, in order.  The caller owns the
executor and its life: the command line opens ``local_executor()`` (or ``cluster_executor()`` for a
``dask.distributed`` scheduler) around one command, the dashboard's worker around one job, a test
around its checks.

Chunks: a process's first plan pays for its imports and warms the caches of the correlations, and on
a cluster every task also pays a round trip to the scheduler (about a millisecond on a LAN), so work
goes out ``CHUNK_MOST`` plans at a time when there is enough of it, fewer when that would leave a
worker idle (``chunk_size``).  Each task returns its plans' results as plain data (lists, dicts,
floats), in the order they were sent.
"""

from __future__ import annotations

import contextlib
import itertools
import math
import os
from concurrent.futures import FIRST_COMPLETED, Executor, wait
from typing import Callable, Iterator

CHUNK_LEAST = 8          # plans per task once there are enough to keep every worker busy
CHUNK_MOST = 32          # ... and never more: a task's results come back, and progress moves, in these steps
TASKS_PER_WORKER = 4     # enough tasks a worker that the last ones finish close together
SCHEDULER_ENV = "PLANNER_DASK_SCHEDULER"


def width(executor: Executor | None) -> int:
    """How many tasks ``executor`` runs at once (1 for None; the threads of a dask cluster's workers;
    the machine's cores when it does not say)."""
    if executor is None:
        return 1
    workers = getattr(executor, "_max_workers", None)          # concurrent.futures pools
    if isinstance(workers, int) and workers > 0:
        return workers
    client = getattr(executor, "_client", None)               # distributed.client.ClientExecutor
    if client is not None:
        try:
            return max(1, sum(client.nthreads().values()))
        except Exception:  # noqa: BLE001  (a cluster that does not answer: guess, the work still runs)
            return os.cpu_count() or 1
    return os.cpu_count() or 1


def chunk_size(count: int, workers: int) -> int:
    """Plans per task for ``count`` plans on ``workers``: at most CHUNK_MOST, at least CHUNK_LEAST when
    every worker still gets a whole chunk, and small enough that each worker gets TASKS_PER_WORKER tasks."""
    if count <= 0:
        return 1
    workers = max(1, workers)
    spread = math.ceil(count / (workers * TASKS_PER_WORKER))
    least = min(CHUNK_LEAST, math.ceil(count / workers))
    return max(1, min(CHUNK_MOST, max(least, spread)))


def chunks(items: list, size: int) -> list[tuple[int, list]]:
    """``items`` in consecutive pieces of ``size``, each with the index of its first item."""
    return [(start, items[start:start + size]) for start in range(0, len(items), size)]


def run_chunk(function: Callable, items: list) -> list:
    """One task: ``function`` on each item in turn (runs in the worker)."""
    return [function(item) for item in items]


def fan_out(function: Callable, items: list, executor: Executor | None = None, progress=None,
            size: int | None = None) -> list:
    """``[function(item) for item in items]``, the items sent to ``executor`` in chunks (``None``: here, in
    order).  ``function`` must be a module-level function and the items plain data (they are pickled).
    ``progress(done, total)`` is called as chunks come back."""
    results: list = [None] * len(items)
    done = 0
    for start, part in iter_chunks(function, items, executor, size):
        results[start:start + len(part)] = part
        done += len(part)
        if progress:
            progress(done, len(items))
    return results


def iter_chunks(function: Callable, items: list, executor: Executor | None = None,
                size: int | None = None) -> Iterator[tuple[int, list]]:
    """Each chunk's ``(first index, results)`` as it finishes (in order when ``executor`` is None).  At most
    TASKS_PER_WORKER tasks a worker are out at once, the next sent as one comes back: a sweep of a million
    plans never holds a million plans' arguments in the executor's queue (or a cluster scheduler's)."""
    if executor is None or len(items) <= 1:
        size = size or CHUNK_MOST
        for start, part in chunks(items, size):
            yield start, run_chunk(function, part)
        return
    workers = width(executor)
    size = size or chunk_size(len(items), workers)
    waiting = iter(chunks(items, size))
    out: dict = {}

    def send(count: int) -> None:
        for start, part in itertools.islice(waiting, count):
            out[executor.submit(run_chunk, function, part)] = start

    send(TASKS_PER_WORKER * workers)
    try:
        while out:
            done, _ = wait(out, return_when=FIRST_COMPLETED)
            for future in done:
                start = out.pop(future)
                yield start, future.result()
            send(len(done))
    finally:
        for future in out:
            future.cancel()


@contextlib.contextmanager
def local_executor(workers: int | None = None) -> Iterator[Executor | None]:
    """One pool of worker processes for the block (forked on Linux: they start with the planner loaded;
    no re-import of ``__main__``), shut down when the block ends.  ``workers`` 1 (or a 1-core machine):
    no pool, the work runs in this process."""
    import multiprocessing
    from concurrent.futures import ProcessPoolExecutor

    workers = workers if workers is not None else (os.cpu_count() or 1)
    if workers <= 1:
        yield None
        return
    methods = multiprocessing.get_all_start_methods()
    context = multiprocessing.get_context("fork" if "fork" in methods else None)
    pool = ProcessPoolExecutor(max_workers=workers, mp_context=context)
    try:
        yield pool
    finally:
        pool.shutdown(cancel_futures=True)


def scheduler_address(given: str | None) -> str | None:
    """The dask scheduler to use: the option, else ``PLANNER_DASK_SCHEDULER``, else None (run locally)."""
    address = (given or os.environ.get(SCHEDULER_ENV, "")).strip()
    return address or None


@contextlib.contextmanager
def cluster_executor(address: str, timeout_s: float = 30.0) -> Iterator[Executor]:
    """The executor of a ``dask.distributed`` scheduler at ``address`` (``tcp://HOST:PORT``) for the block.
    Dask is imported here only: a local run never loads it."""
    from planner.errors import PlannerError, quoted

    try:
        from distributed import Client
    except ImportError:
        raise PlannerError("--scheduler: dask.distributed is not installed here (pip install 'dask[distributed]')") from None
    try:
        client = Client(address, timeout=timeout_s, set_as_default=False)
    except (OSError, TimeoutError, ValueError) as exc:
        raise PlannerError(f"--scheduler: cannot reach the dask scheduler at {quoted(address)} within "
                           f"{timeout_s:g} s ({type(exc).__name__}): start it with `dask scheduler`, or check the "
                           f"address (tcp://HOST:PORT) and {SCHEDULER_ENV}") from None
    try:
        yield client.get_executor(pure=False)
    finally:
        client.close()


@contextlib.contextmanager
def executor_for(scheduler: str | None = None, workers: int | None = None) -> Iterator[Executor | None]:
    """The command line's executor: the dask cluster when a scheduler is given (option or environment),
    else one local pool."""
    address = scheduler_address(scheduler)
    manager = cluster_executor(address) if address else local_executor(workers)
    with manager as executor:
        yield executor
