"""Scenario sweeps: many variants of one plan, solved on any executor.

A variant changes plan parameters named by dotted paths into the plan's
fields, for example ``"labour.0.growth"``, ``"objective.rate"``,
``"consumption.floor_growth"``, ``"terminal.rate"`` or
``"economy.capital.energy.mean_service_life"``. Variants come from a grid
(every combination) or from named scenarios. They run on any
``concurrent.futures.Executor``: a process pool by default, or a Dask
distributed client's ``client.get_executor()`` to go past one machine.
Results come back in the order of the variants, whatever order they finish
in, and a variant that fails is reported in the table, not raised. A
process-pool worker that dies (killed, out of memory, a crash in native
code) breaks the whole pool; the variants it took down are solved again,
each alone in a fresh one-worker pool, so a variant that kills its worker
again is reported by name and takes no other variant with it.
"""

from __future__ import annotations

import contextlib
import csv
import difflib
import itertools
import os
import signal
import sys
import threading
import time
import traceback
import warnings
from collections import deque
from collections.abc import Callable, Iterator
from concurrent.futures import FIRST_COMPLETED, Executor, Future, ProcessPoolExecutor, wait
from concurrent.futures.process import BrokenProcessPool
from dataclasses import dataclass
from multiprocessing.context import BaseContext
from typing import Any, TypeVar

import pandas as pd

from ..errors import invalid
from ..limits import MAX_WORKERS
from ..model.plan import Plan

__all__ = ["Sweep", "SerialExecutor", "check_parameters", "sweep", "variant"]

_T = TypeVar("_T")
# one variant's work: (plan, parameters, solve options, keep the result)
_Task = tuple[Plan, dict[str, Any], dict[str, Any], bool]
# one variant's outcome: (key figures or error row, result or None)
_Outcome = tuple[dict[str, Any], Any]


class SerialExecutor(Executor):
    """Runs each task at once in this process (for debugging and reference runs)."""

    def submit(self, fn: Callable[..., _T], /, *args: Any, **kwargs: Any) -> Future[_T]:
        """Call ``fn(*args, **kwargs)`` now and return its finished future.

        Parameters
        ----------
        fn : callable
            The task.
        *args, **kwargs
            Its arguments.

        Returns
        -------
        concurrent.futures.Future
            Done, holding the result or the exception ``fn`` raised.
        """
        fut: Future[_T] = Future()
        try:
            fut.set_result(fn(*args, **kwargs))
        except BaseException as exc:  # noqa: BLE001 - handed to the caller via the future
            fut.set_exception(exc)
        return fut


@dataclass
class Sweep:
    """The outcome of :func:`sweep`.

    Attributes
    ----------
    table : pandas.DataFrame
        One row per variant: its name, the parameters, status, objective and
        key figures (terminal capacity, total starts, peak labour use, solve
        seconds), or the error of a failed variant.
    results : list of PlanResult or None
        In the order of the table (None where the variant failed or results
        were not kept).
    """

    table: pd.DataFrame
    results: list[Any]

    @property
    def failed(self) -> pd.DataFrame:
        """Rows of the variants that raised an error."""
        return self.table[self.table["status"] == "error"]


def _resolve(data: dict[str, Any], path: str) -> list[str | int]:
    """The steps of a dotted ``path`` into ``data``, checked: each names an existing field.

    A list of one entry (one labour supply) may be stepped over, so
    ``"labour.growth"`` means ``"labour.0.growth"``. A step that names
    nothing raises InvalidInput naming the path, with the nearest field names.
    """
    steps: list[str | int] = []
    node: Any = data
    parts = path.split(".") if isinstance(path, str) else []
    if not parts or any(p == "" for p in parts):
        raise invalid("parameter", "be a dotted path into the plan's fields (like "
                      "'labour.0.growth')", path)
    k = 0
    while k < len(parts):
        part = parts[k]
        if isinstance(node, list):
            if part.isdigit() and int(part) < len(node):
                steps.append(int(part))
                node = node[int(part)]
                k += 1
                continue
            if len(node) == 1 and not part.isdigit():  # the one entry of a list
                steps.append(0)
                node = node[0]
                continue
            where = ".".join(str(s) for s in steps) or "the plan"
            raise invalid(f"parameter {path!r}", f"index {where} by 0..{len(node) - 1}",
                          part)
        if isinstance(node, dict) and part in node and (node[part] is not None
                                                        or k == len(parts) - 1):
            steps.append(part)
            node = node[part]
            k += 1
            continue
        where = ".".join(str(s) for s in steps)
        if isinstance(node, dict):
            options = [str(x) for x in node if node[x] is not None or k == len(parts) - 1]
            close = difflib.get_close_matches(part, options, n=1, cutoff=0.6)
            hint = f"Did you mean {'.'.join([*map(str, steps), close[0]])!r}?" if close \
                else f"fields here: {', '.join(sorted(options)[:12])}"
            if part in node:  # present but unset: nothing below it to change
                unset = f"{where}.{part}" if where else part
                raise invalid(f"parameter {path!r}", f"name a field the plan has ({unset} "
                              "is not set)", part)
            raise invalid(f"parameter {path!r}", "name an existing field of the plan", part,
                          hint=hint)
        raise invalid(f"parameter {path!r}", f"stop at {where} (it has no fields)", part)
    return steps


def _set_path(data: dict[str, Any], path: str, value: Any) -> None:
    steps = _resolve(data, path)
    node: Any = data
    for step in steps[:-1]:
        node = node[step]
    node[steps[-1]] = value


def check_parameters(plan: Plan, paths: Any) -> None:
    """Raise InvalidInput for the first path that names no field of ``plan``.

    Parameters
    ----------
    plan : Plan
    paths : iterable of str
        Dotted parameter paths, as for :func:`variant`.
    """
    paths = list(paths)
    touches_economy = any(isinstance(p, str) and p.startswith("economy.") for p in paths)
    data = plan.model_dump(exclude=set() if touches_economy else {"economy"})
    if not touches_economy:
        data["economy"] = {}
    for path in paths:
        _resolve(data, path)


def variant(plan: Plan, params: dict[str, Any]) -> Plan:
    """A copy of ``plan`` with the parameters at the dotted paths changed (validated anew).

    Parameters
    ----------
    plan : Plan
        The plan to vary; it is not changed.
    params : dict of str to object
        New values by dotted path into the plan's fields, for example
        ``{"objective.rate": 0.03, "labour.0.growth": 0.01}``; list entries
        are named by their index. Each path must name an existing field.

    Returns
    -------
    Plan
        The changed plan, validated like a new one (the economy is shared
        unless a path starts with ``economy.``).

    Notes
    -----
    A list of one entry may be stepped over: with one labour supply,
    ``"labour.growth"`` is ``"labour.0.growth"``. A path naming no field
    raises InvalidInput with the nearest field name.
    """
    touches_economy = any(p.startswith("economy.") for p in params)
    data = plan.model_dump(exclude=set() if touches_economy else {"economy"})
    for path, value in params.items():
        _set_path(data, path, value)
    if not touches_economy:
        data["economy"] = plan.economy
    return Plan(**data)


def _run_one(task: _Task) -> _Outcome:
    """Solve one variant (top level, so process pools and Dask can pickle it)."""
    plan, params, options, keep = task
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            result = variant(plan, params).solve(**options)
        return result.key_figures(), (result if keep else None)
    except Exception as exc:  # a failed variant is data, not the end of the sweep
        return {"status": "error", "error": f"{type(exc).__name__}: {exc}",
                "detail": traceback.format_exc(limit=2)}, None


def sweep(plan: Plan, grid: dict[str, list[Any]] | None = None, *,
          scenarios: dict[str, dict[str, Any]] | None = None, executor: Executor | None = None,
          max_workers: int | None = None, keep_results: bool = True, progress: bool = False,
          solve_options: dict[str, Any] | None = None, out: Any = None,
          overwrite: bool = False, in_flight: int | None = None) -> Sweep:
    """Solve variants of ``plan`` and gather their key figures.

    Parameters
    ----------
    plan : Plan
        The base plan every variant changes.
    grid : dict of str to list, optional
        Every combination of these parameter values is a variant.
    scenarios : dict of str to dict, optional
        Named variants, each a mapping of parameter paths to values.
    executor : concurrent.futures.Executor, optional
        Where to run; default a process pool of ``max_workers`` (the CPU
        count) created and shut down here. Pass a Dask ``client.get_executor()``
        for a cluster.
    max_workers : int, optional
        Workers of the default process pool (default: the CPU count). It also
        bounds how many one-worker pools solve again the variants of a dead
        worker when ``executor`` does not tell its own size.
    keep_results : bool, default True
        Return each PlanResult too (False sends back only the figures).
    progress : bool, default False
        A per-variant progress bar.
    solve_options : dict, optional
        Keywords for :meth:`Plan.solve` (method, time_limit, …).
    out : path, optional
        A CSV file the table's rows are appended to as the variants finish
        (in order; variants solved again after a worker died come last). It
        is written aside and renamed into place when the sweep ends, so an
        interrupted sweep leaves no half file.
    overwrite : bool, default False
        Replace an existing ``out``.
    in_flight : int, optional
        Most variants sent to the executor and not yet collected (default
        four per worker): memory, here and in a Dask scheduler, stays bounded
        however many variants there are. Results are still kept unless
        ``keep_results=False``.

    Returns
    -------
    Sweep
        One table row per variant, grid variants first, then the scenarios.
    """
    from ..progress import sweep_progress

    check_workers(max_workers)
    for name, params in (scenarios or {}).items():
        if not isinstance(params, dict):
            raise invalid(f"scenarios.{name}", "be a mapping of parameter paths to values",
                          type(params).__name__)
    # every path checked before any scenario runs: a misspelt key fails at once
    check_parameters(plan, [*(grid or {}), *(k for p in (scenarios or {}).values() for k in p)])
    variants: list[tuple[str, dict[str, Any]]] = []
    if grid:
        keys = list(grid)
        for combo in itertools.product(*(grid[k] for k in keys)):
            params = dict(zip(keys, combo, strict=True))
            variants.append((", ".join(f"{k}={v}" for k, v in params.items()), params))
    for name, params in (scenarios or {}).items():
        variants.append((name, dict(params)))
    if not variants:
        raise invalid("grid", "or scenarios name at least one variant", None)
    options = dict(solve_options or {})
    own = executor is None
    workers = check_workers(max_workers) or os.cpu_count() or 1
    key = _token()
    if own:  # the base plan goes to each worker once, when it starts, not with every task
        pool: Executor = worker_pool(workers, _warm, (key, (plan, options, keep_results)))
        fn: Callable[[Any], _Outcome] = _run_warm
        args: Any = _Lazy(lambda i: (key, variants[i][1]), len(variants))
    else:
        assert executor is not None
        pool = executor
        ref = _scattered(executor, (plan, options, keep_results))
        if ref is not None:  # a Dask cluster: the base sits on every worker once
            fn = _run_based
            args = _Lazy(lambda i: (ref, variants[i][1]), len(variants))
        else:
            fn = _run_one
            args = _Lazy(lambda i: (plan, variants[i][1], options, keep_results),
                         len(variants))
    window = max(1, in_flight or 4 * workers)
    lost: list[int] = []
    outcomes: list[Any] = [None] * len(variants)
    stream = _Stream(out, overwrite)
    with owned_pool(pool, own), sweep_progress(progress, len(variants)) as bar, stream:
        for i, got in in_order(pool, fn, args, window):  # in order: deterministic
            if got is LOST:  # a worker died: solved again below
                lost.append(i)
                continue
            if isinstance(got, BaseException):  # the executor itself failed
                got = ({"status": "error", "error": f"{type(got).__name__}: {got}"}, None)
            outcomes[i] = got
            stream.write({"scenario": variants[i][0], **variants[i][1], **got[0]})
            bar.update(1)
        if lost:
            if not own:
                workers = getattr(pool, "_max_workers", None) or workers
            retried = _solve_alone([(plan, variants[i][1], options, keep_results)
                                    for i in lost], [variants[i][0] for i in lost],
                                   workers, getattr(pool, "_mp_context", None))
            for i, outcome in zip(lost, retried, strict=True):
                outcomes[i] = outcome
                stream.write({"scenario": variants[i][0], **variants[i][1], **outcome[0]})
                bar.update(1)
    rows = []
    for (name, params), (figures, _) in zip(variants, outcomes, strict=True):
        rows.append({"scenario": name, **params, **figures})
    table = pd.DataFrame(rows)
    return Sweep(table=table, results=[r for _, r in outcomes])


def check_workers(workers: Any) -> int | None:
    """``max_workers`` within :data:`~growthplan.limits.MAX_WORKERS` (None: the CPU count)."""
    if workers is None:
        return None
    if isinstance(workers, bool) or not isinstance(workers, int) or workers < 1:
        raise invalid("max_workers", "be a whole number >= 1", workers)
    if workers > MAX_WORKERS:
        raise invalid("max_workers", f"be at most {MAX_WORKERS:,}", int(workers))
    return int(workers)


# -- running many tasks with few in flight --------------------------------------------------

LOST = object()
"""What :func:`in_order` yields for a task whose process pool broke."""

_WARM: dict[str, Any] = {}  # per worker process: the base of each analysis, by key


def _token() -> str:
    return f"{os.getpid()}-{time.monotonic_ns()}-{next(_COUNTER)}"


_COUNTER = itertools.count()


def _warm(key: str, base: Any) -> None:
    """Process-pool initializer: keep ``base`` for the tasks that name ``key``."""
    _WARM.clear()  # a worker serves one analysis; the last one's base can go
    _WARM[key] = base


def _run_warm(task: tuple[str, dict[str, Any]]) -> _Outcome:
    key, params = task
    plan, options, keep = _WARM[key]
    return _run_one((plan, params, options, keep))


def _scattered(executor: Executor, base: Any) -> Any:
    """A Dask future of ``base`` copied to every worker, when ``executor`` is a Dask
    client's executor (None otherwise): tasks then carry the future, not the base."""
    client = getattr(executor, "_client", None)
    if client is None or not hasattr(client, "scatter") or \
            not type(executor).__module__.startswith("distributed"):
        return None
    return client.scatter([base], broadcast=True, hash=False)[0]


def _run_based(task: tuple[Any, dict[str, Any]]) -> _Outcome:
    (plan, options, keep), params = task
    return _run_one((plan, params, options, keep))


def worker_pool(max_workers: int, initializer: Callable[..., None] | None = None,
                initargs: tuple[Any, ...] = (),
                mp_context: BaseContext | None = None) -> ProcessPoolExecutor:
    """The library's own process pool, whose workers never outlive this process.

    Each worker, when it starts, asks the kernel to kill it when its parent dies
    (Linux), watches its parent in a thread (every system), takes SIGTERM with
    the system's default action (so ``terminate`` ends it even where the parent
    routed SIGTERM to a handler) and leaves Ctrl-C to the parent, which stops
    the pool; then it runs ``initializer(*initargs)``.
    """
    return ProcessPoolExecutor(max_workers=max_workers, mp_context=mp_context,
                               initializer=_guarded_worker,
                               initargs=(os.getpid(), initializer, initargs))


_PARENT_POLL = 0.2  # seconds between a worker's looks at its parent


def _guarded_worker(parent: int, initializer: Callable[..., None] | None,
                    initargs: tuple[Any, ...]) -> None:
    """Process-pool initializer: die with the parent, then ``initializer(*initargs)``."""
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    if sys.platform.startswith("linux"):
        with contextlib.suppress(Exception):  # no libc to ask: the watcher still runs
            import ctypes

            libc = ctypes.CDLL(None, use_errno=True)
            libc.prctl(1, signal.SIGKILL, 0, 0, 0)  # PR_SET_PDEATHSIG
    if os.getppid() != parent:  # the parent died before the request took hold
        os._exit(1)

    def watch() -> None:
        while os.getppid() == parent:
            time.sleep(_PARENT_POLL)
        os._exit(1)

    threading.Thread(target=watch, name="growthplan-parent-watch", daemon=True).start()
    if initializer is not None:
        initializer(*initargs)


@contextlib.contextmanager
def owned_pool(pool: Executor, own: bool) -> Iterator[Executor]:
    """Use ``pool``; when the library made it (``own``), shut it down afterwards, and
    on an interrupt stop its workers at once rather than after their queue."""
    try:
        yield pool
    except BaseException:
        if own:
            stop_pool(pool)
        raise
    finally:
        if own:
            pool.shutdown()


def stop_pool(pool: Executor) -> None:
    """Cancel a process pool's queued tasks and end its workers at once."""
    pool.shutdown(wait=False, cancel_futures=True)
    for proc in list((getattr(pool, "_processes", None) or {}).values()):
        try:
            proc.terminate()
        except (OSError, ValueError, AttributeError):  # already gone
            pass


class _Lazy:
    """A sequence whose items are made when asked for (tasks built as they are sent)."""

    def __init__(self, make: Callable[[int], Any], n: int) -> None:
        self.make, self.n = make, n

    def __len__(self) -> int:
        return self.n

    def __getitem__(self, i: int) -> Any:
        return self.make(i)


def in_order(pool: Executor, fn: Callable[[Any], _T], args: Any,
             window: int) -> Iterator[tuple[int, Any]]:
    """Run ``fn(args[i])`` on ``pool`` with at most ``window`` tasks in flight.

    Yields ``(i, result)`` in the order of ``args`` whatever order the tasks
    finish in, so memory (in this process and in a cluster's scheduler) holds
    ``window`` futures, never all of them. The result is :data:`LOST` when the
    process pool broke (a worker died) and the exception itself when the
    executor failed on the task; tasks not yet sent to a broken pool are lost
    too.
    """
    pending: deque[tuple[int, Future[Any]]] = deque()
    nxt, n, broken = 0, len(args), False
    while nxt < n or pending:
        while not broken and nxt < n and len(pending) < window:
            try:
                pending.append((nxt, pool.submit(fn, args[nxt])))
            except BrokenProcessPool:
                broken = True
                break
            nxt += 1
        if not pending:  # the pool broke before these were sent
            for i in range(nxt, n):
                yield i, LOST
            return
        i, fut = pending.popleft()
        got: Any
        try:
            got = fut.result()
        except BrokenProcessPool:
            broken, got = True, LOST
        except Exception as exc:
            got = exc
        del fut
        yield i, got


class _Stream:
    """Rows appended to a CSV file as they arrive, written aside and renamed at the end.

    The columns are fixed by the first row without an error (rows before it
    wait in memory); later keys outside them are left out of the file.
    """

    def __init__(self, path: Any, overwrite: bool) -> None:
        self.path, self.overwrite = path, overwrite
        self.columns: list[str] | None = None
        self.waiting: list[dict[str, Any]] = []
        self.handle: Any = None
        self.writer: Any = None
        self._context: Any = None

    def __enter__(self) -> _Stream:
        if self.path is not None:
            from ..io.atomic import atomic_file

            self._context = atomic_file(self.path, overwrite=self.overwrite)
            tmp = self._context.__enter__()
            self.handle = open(tmp, "w", newline="", encoding="utf-8")  # noqa: SIM115
        return self

    def write(self, row: dict[str, Any]) -> None:
        if self.handle is None:
            return
        if self.columns is None:
            self.waiting.append(row)
            if row.get("status") == "error":
                return
            keys = list(dict.fromkeys(k for r in self.waiting for k in r))
            self.columns = [k for k in keys if k not in ("error", "detail")] + ["error"]
            self.writer = csv.DictWriter(self.handle, self.columns, extrasaction="ignore")
            self.writer.writeheader()
            rows, self.waiting = self.waiting, []
        else:
            rows = [row]
        self.writer.writerows(rows)
        self.handle.flush()

    def __exit__(self, *exc: Any) -> None:
        if self.handle is None:
            return
        if self.columns is None:  # every row failed: their own columns
            keys = list(dict.fromkeys(k for r in self.waiting for k in r))
            writer = csv.DictWriter(self.handle, keys, extrasaction="ignore")
            writer.writeheader()
            writer.writerows(self.waiting)
        self.handle.close()
        self._context.__exit__(*exc)


def _solve_alone(tasks: list[_Task], names: list[str], workers: int,
                 mp_context: BaseContext | None = None) -> list[_Outcome]:
    """Solve variants whose pool broke, each alone in a one-worker process pool.

    Up to ``workers`` such pools run at once. A variant whose worker dies
    again is reported as an error row naming it; its pool is replaced and no
    other variant is lost with it.
    """
    out: list[Any] = [None] * len(tasks)
    queue = list(range(len(tasks)))
    idle: list[ProcessPoolExecutor] = []
    running: dict[Future[_Outcome], tuple[int, ProcessPoolExecutor]] = {}
    try:
        while queue or running:
            while queue and len(running) < max(1, workers):
                i = queue.pop(0)
                pool = idle.pop() if idle else worker_pool(1, mp_context=mp_context)
                running[pool.submit(_run_one, tasks[i])] = (i, pool)
            done, _ = wait(running, return_when=FIRST_COMPLETED)
            for fut in done:
                i, pool = running.pop(fut)
                try:
                    out[i] = fut.result()
                except BrokenProcessPool:
                    out[i] = ({"status": "error", "error": "worker died while solving "
                               f"scenario {names[i]} (twice; the second time alone)"}, None)
                    pool.shutdown(wait=False)
                    continue
                except Exception as exc:
                    out[i] = ({"status": "error", "error": f"{type(exc).__name__}: {exc}"},
                              None)
                idle.append(pool)
    finally:
        for pool in idle + [p for _, p in running.values()]:
            pool.shutdown(cancel_futures=True)
    return out
