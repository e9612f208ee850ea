"""A bounded pool of worker processes for the dashboard's plans and comparisons, with time limits.

No Streamlit here (``compute.py`` wraps it).  Every plan and comparison the pages ask for runs in
one of ``size`` worker processes (default: the machine's cores), never in the server process, so

- a computation still running past its time limit (``PLAN_SECONDS``, ``COMPARISON_SECONDS``) is
  stopped — its worker process group is killed and a fresh worker takes its place — and the page
  gets a message saying what to reduce;
- one session runs at most one computation at a time, and waits at most ``WAIT_SECONDS`` for a free
  worker: heavy work of one session cannot take more than one worker, nor queue the others out.
  While all workers are busy a request is told so and may be retried; it is never queued forever.

Each worker is a fresh interpreter (``python -m dashboard.compute.workers FD``) talking over a socket pair:
it inherits none of the server's threads, sockets or modules (Streamlit swaps ``__main__`` for the
page script, so multiprocessing's spawn and forkserver would re-run the page in every worker, and a
fork would keep the server's listening socket open).  It loads the planner before its first job,
and runs in its own session and process group: a comparison's own row processes are stopped with it.
Environment (read at each request): ``PLANNER_WORKERS``, ``PLANNER_PLAN_TIME_LIMIT_S``,
``PLANNER_COMPARISON_TIME_LIMIT_S``, ``PLANNER_ODDS_TIME_LIMIT_S`` (the odds, ``compute/odds``),
``PLANNER_WORKER_WAIT_S``; read when a worker starts:
``PLANNER_ROW_PROCESSES`` (processes of a worker's own pool for comparison rows and calibration replays,
default the machine's cores), ``PLANNER_DASK_SCHEDULER`` (send those to a dask cluster instead).
"""

from __future__ import annotations

import atexit
import contextlib
import logging
import os
import signal
import socket
import subprocess
import sys
import threading
import time
from multiprocessing.connection import Connection
from pathlib import Path

from dashboard.compute.demos import DEMO_FILES
from .odds import comparison_odds_job, odds_job
from .record import failure as _failure

log = logging.getLogger(__name__)

PLAN_SECONDS = 60.0          # a plan still running after this is stopped
COMPARISON_SECONDS = 180.0   # a comparison still running after this is stopped
CALIBRATION_SECONDS = 240.0  # a calibration fit (Calibration tab) still running after this is stopped
ODDS_SECONDS = 600.0         # the odds of a plan or of a comparison (sampled plans) still running after this
                             # (11 values x 128 samples took 162-296 s on the shared 2-core machine, DEVELOPERS.md)
WAIT_SECONDS = 20.0          # longest wait for a free worker before "busy, try again"
POLL_SECONDS = 0.2
STARTUP_SECONDS = 120.0      # a new worker interpreter loading the planner (seconds on a loaded machine)


def _env_float(name: str, default: float) -> float:
    try:
        value = float(os.environ.get(name, ""))
    except ValueError:
        return default
    return value if 0.0 < value < 1e6 else default


def limits() -> dict:
    return {"plan": _env_float("PLANNER_PLAN_TIME_LIMIT_S", PLAN_SECONDS),
            "comparison": _env_float("PLANNER_COMPARISON_TIME_LIMIT_S", COMPARISON_SECONDS),
            "envelope": _env_float("PLANNER_COMPARISON_TIME_LIMIT_S", COMPARISON_SECONDS),
            "calibration": _env_float("PLANNER_CALIBRATION_TIME_LIMIT_S", CALIBRATION_SECONDS),
            "odds": _env_float("PLANNER_ODDS_TIME_LIMIT_S", ODDS_SECONDS),
            "comparison_odds": _env_float("PLANNER_ODDS_TIME_LIMIT_S", ODDS_SECONDS),
            "wait": _env_float("PLANNER_WORKER_WAIT_S", WAIT_SECONDS)}


# ------------------------------------------------------------------------------------------ jobs
# They run in the worker process; plain data in and out; planner errors become {"error": ...}
# (``record.failure``).  The odds' two jobs are in ``compute/odds``.

def plan_job(scenario_json: str, progress=None, executor=None) -> dict:
    from planner.scenario.schema import parse_scenario_text

    from dashboard.compute.results import plan_results

    try:
        return {"results": plan_results(parse_scenario_text(scenario_json, "json"))}
    except Exception as exc:  # noqa: BLE001  (a bug must not put a traceback on the page)
        return _failure(exc, "plan")


def comparison_job(scenario_json: str, lever: str, values_si: list, sensitivity, progress=None,
                   executor=None) -> dict:
    from planner.scenario.schema import parse_scenario_text

    from dashboard.compute.results import run_comparison

    try:
        return run_comparison(parse_scenario_text(scenario_json, "json"), lever, list(values_si),
                              progress=progress, sensitivity=sensitivity, executor=executor)
    except Exception as exc:  # noqa: BLE001
        return _failure(exc, "comparison")


def calibration_job(fit_key: str, log_bytes: bytes, log_name: str, map_text: str, names: list, progress=None,
                    executor=None) -> dict:
    from dashboard.compute.calibration_data import fit_document

    try:
        return fit_document(fit_key, log_bytes, log_name, map_text, names, executor=executor)
    except Exception as exc:  # noqa: BLE001
        return _failure(exc, "calibration")


def envelope_job(scenario_json: str, lever: str, values_si: list, ambients_k: list, progress=None,
                 executor=None) -> dict:
    from planner.scenario.schema import parse_scenario_text
    from planner.sweeps.envelope import envelope, envelope_json

    try:
        result = envelope(parse_scenario_text(scenario_json, "json"), lever, list(values_si), list(ambients_k),
                          executor=executor, progress=progress)
        return envelope_json(result)
    except Exception as exc:  # noqa: BLE001
        return _failure(exc, "envelope")


JOBS = {"plan": plan_job, "comparison": comparison_job, "calibration": calibration_job, "envelope": envelope_job,
        "odds": odds_job, "comparison_odds": comparison_odds_job}


def _executor(stack: contextlib.ExitStack):
    """The worker's one executor for the fan-out of its jobs (comparison rows, calibration replays), kept for
    its life: the dask cluster of ``PLANNER_DASK_SCHEDULER`` when set and reachable, else a local pool
    (its processes are in this worker's process group, so a job stopped at its time limit stops them too)."""
    from planner.errors import PlannerError
    from planner.sweeps.executors import cluster_executor, local_executor, scheduler_address

    address = scheduler_address(None)
    if address:
        try:
            return stack.enter_context(cluster_executor(address))
        except PlannerError:
            log.exception("the dask scheduler %s cannot be reached: the plans run on this machine", address)
    return stack.enter_context(local_executor(int(_env_float("PLANNER_ROW_PROCESSES", os.cpu_count() or 1))))


def _serve(conn, preplan: str | None = None) -> None:
    """Worker main loop: a job in, progress messages and one result out, until the pipe closes."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)  # Ctrl-C on the server is the server's to handle
    from dashboard.compute.results import load_planner

    load_planner()                                # the planner's models, before the first job

    with contextlib.ExitStack() as stack:
        executor = _executor(stack)
        conn.send(("ready",))
        planned = _preplanned(preplan)
        while True:
            try:
                kind, args = conn.recv()
            except (EOFError, OSError):
                return

            def progress(done, total):
                conn.send(("progress", done, total))

            if kind == "plan" and args[0] in planned:
                conn.send(("result", planned.pop(args[0])))
                continue
            conn.send(("result", JOBS[kind](*args, progress=progress, executor=executor)))


def _preplanned(path: str | None) -> dict:
    """The plan of the scenario file ``path`` worked out before any page asks: ``{canonical JSON: result}``.

    The server's first worker is given the first demo (``pool(warm=True)``), which a new session opens: it plans
    it while the server is still loading the page's modules, so a fresh server's first page finds its plan
    done.  The JSON is the one the page sends for that demo (``loading.load_demo``, then ``app.validate``) and
    the result is ``plan_job``'s of it, the very one the request would have computed; another request waits
    at most this one plan."""
    if not path:
        return {}
    from planner.scenario.schema import load_scenario, scenario_from_dict, scenario_to_dict, scenario_to_json

    try:
        text = scenario_to_json(scenario_from_dict(scenario_to_dict(load_scenario(path))))
    except Exception:  # noqa: BLE001  (a demo that does not load is the page's to report, not the worker's)
        log.exception("the first demo %s could not be planned ahead", path)
        return {}
    return {text: plan_job(text)}


# ------------------------------------------------------------------------------------------ pool

ROOT = Path(__file__).resolve().parents[2]


class _Worker:
    """One worker interpreter and the parent's end of its socket pair."""

    def __init__(self, preplan: str | None = None):
        parent, child = socket.socketpair()
        env = dict(os.environ, PYTHONPATH=os.pathsep.join([str(ROOT), os.environ.get("PYTHONPATH", "")]))
        ahead = [preplan] if preplan else []         # a scenario file to plan before the first job (_preplanned)
        self.process = subprocess.Popen([sys.executable, "-m", "dashboard.compute.workers", str(child.fileno()), *ahead],
                                        cwd=ROOT, env=env, pass_fds=(child.fileno(),), start_new_session=True,
                                        stdin=subprocess.DEVNULL)
        child.close()
        self.conn = Connection(parent.detach())
        self.ready = False

    def wait_ready(self, timeout: float) -> bool:
        """True once the worker has loaded the planner (its first message)."""
        if not self.ready and self.conn.poll(timeout):
            self.ready = self.conn.recv() == ("ready",)
        return self.ready

    def kill(self) -> None:
        try:
            os.killpg(self.process.pid, signal.SIGKILL)     # the worker and a comparison's row processes
        except (ProcessLookupError, PermissionError):
            pass
        self.process.wait(timeout=10)
        self.conn.close()

    def alive(self) -> bool:
        return self.process.poll() is None


class WorkerPool:
    """At most ``size`` computations at once, one per session, each within its time limit."""

    def __init__(self, size: int | None = None):
        self.size = size or int(_env_float("PLANNER_WORKERS", os.cpu_count() or 1))
        self._slots = threading.BoundedSemaphore(self.size)
        self._lock = threading.Lock()
        self._idle: list[_Worker] = []
        self._all: set[_Worker] = set()
        self._sessions: set[str] = set()
        self._closed = False
        self.stopped = 0          # computations stopped at their time limit (for the tests and the log)

    def _take(self) -> _Worker:
        with self._lock:
            while self._idle:
                worker = self._idle.pop()
                if worker.alive():
                    return worker
                self._all.discard(worker)
        worker = _Worker()                       # outside the lock: starting takes a second or two
        with self._lock:
            self._all.add(worker)
        return worker

    def _give_back(self, worker: _Worker) -> None:
        with self._lock:
            self._idle.append(worker)

    def _discard(self, worker: _Worker) -> None:
        worker.kill()
        with self._lock:
            self._all.discard(worker)
        # a replacement starts loading now, so the next request does not wait for it
        threading.Thread(target=self.spare, name="planner-worker-replace", daemon=True).start()

    def run(self, kind: str, args: tuple, session: str = "", progress=None, time_limit: float | None = None,
            wait: float | None = None) -> dict:
        """The job's result, or ``{"error": ..., "transient": True}`` when it was stopped or not started."""
        chosen = limits()
        time_limit = time_limit or chosen[kind]
        with self._lock:
            if session in self._sessions:
                return {"error": "this page is still working on its previous computation: wait for it, then try "
                                 "again", "transient": True, "busy": True}
            self._sessions.add(session)
        try:
            if not self._slots.acquire(timeout=wait or chosen["wait"]):
                return {"error": f"the planner is busy with other users' computations (all {self.size} workers in "
                                 "use): try again in a minute", "transient": True, "busy": True}
            try:
                return self._run_in_worker(kind, args, progress, time_limit)
            finally:
                self._slots.release()
        finally:
            with self._lock:
                self._sessions.discard(session)

    def _run_in_worker(self, kind: str, args: tuple, progress, time_limit: float) -> dict:
        worker = self._take()
        if not worker.wait_ready(STARTUP_SECONDS):
            self._discard(worker)
            return {"error": "the planner's worker did not start; try again", "transient": True}
        deadline = time.monotonic() + time_limit        # the limit counts from the job's start
        try:
            worker.conn.send((kind, args))
            while True:
                remaining = deadline - time.monotonic()
                if remaining <= 0:
                    break
                if not worker.conn.poll(min(POLL_SECONDS, remaining)):
                    continue
                message = worker.conn.recv()
                if message[0] == "progress":
                    if progress is not None:
                        progress(message[1], message[2])
                    continue
                self._give_back(worker)
                return message[1]
        except (EOFError, OSError, BrokenPipeError) as exc:
            self._discard(worker)
            return {"error": f"the {kind} stopped unexpectedly ({type(exc).__name__}); try again", "transient": True}
        except BaseException:
            self._discard(worker)     # e.g. the page was left mid-run: the worker cannot be reused safely
            raise
        self._discard(worker)
        self.stopped += 1
        what = {"plan": "plan", "envelope": "envelope", "odds": "sampling of the odds",
                "comparison_odds": "comparison with odds"}.get(
            kind, "comparison")
        reduce = {"plan": "shorten the route or lower the timeline steps (Inputs)",
                  "envelope": "give fewer ambients or lever values",
                  "odds": "give fewer samples", "comparison_odds": "give fewer samples or compare fewer values"}.get(
            kind, "compare fewer values, or leave out the sensitivity cases")
        return {"error": f"the {what} was stopped after {time_limit:g} s, the dashboard's time limit: {reduce}",
                "transient": True, "timeout": True}

    def spare(self, preplan: str | None = None) -> None:
        """Start one worker now unless one is idle already or the pool is full: the next request then
        does not wait for an interpreter to load the planner.  The server starts one when it lays out
        its first page (``pool(warm=True)``) and after stopping a worker; the others start when a
        request finds no idle worker, so a fresh server does not load the planner ``size`` times over
        while its first page is being drawn.  ``preplan``: a scenario file the worker plans before its first
        job (``_preplanned``)."""
        with self._lock:
            if self._closed or self._idle or len(self._all) >= self.size:
                return
        self.warm(1, preplan)

    def warm(self, count: int | None = None, preplan: str | None = None) -> None:
        """Start workers now until the pool has ``count`` of them (default: all ``size``), each planning the
        scenario file ``preplan`` ahead when given."""
        target = min(self.size, count or self.size)
        while True:
            with self._lock:
                if self._closed or len(self._all) >= target:
                    return
            try:
                worker = _Worker(preplan)
            except OSError:
                log.exception("starting the planner's workers failed")
                return
            with self._lock:
                closed = self._closed
                if not closed:
                    self._all.add(worker)
                    self._idle.append(worker)
            if closed:
                worker.kill()
                return

    def close(self) -> None:
        with self._lock:
            self._closed = True
            workers, self._all, self._idle = list(self._all), set(), []
        for worker in workers:
            worker.kill()


_POOL: WorkerPool | None = None
_POOL_LOCK = threading.Lock()


def pool(warm: bool = False) -> WorkerPool:
    """The server's one pool (made on first use; ``warm``: its first worker started in the background, planning
    the first demo ahead of the first page)."""
    global _POOL
    with _POOL_LOCK:
        if _POOL is None:
            _POOL = WorkerPool()
            atexit.register(_POOL.close)
            if warm:
                first = str(DEMO_FILES[0]) if DEMO_FILES else None
                threading.Thread(target=_POOL.spare, args=(first,), name="planner-workers-warm", daemon=True).start()
        return _POOL


if __name__ == "__main__":       # a worker: python -m dashboard.compute.workers FD [SCENARIO_FILE_TO_PLAN_AHEAD]
    _serve(Connection(int(sys.argv[1])), sys.argv[2] if len(sys.argv) > 2 else None)
