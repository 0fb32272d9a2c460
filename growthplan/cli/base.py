"""The ``growthplan`` command line.

Exit codes: 0 optimal plan (or success), 1 infeasible plan, 2 invalid input
(bad options, unreadable or malformed files, outputs that cannot be
written), 3 solver failure (time limit, interrupt, unverified result, an
unexpected error), 4 unbounded plan. Every failure prints one line on
stderr, never a traceback (``GROWTHPLAN_DEBUG=1`` adds the traceback of an
unexpected error).

Ctrl-C (SIGINT) or SIGTERM during a solve stops HiGHS at its next iteration
and exits 3 with ``interrupted``; a second signal, or one outside the solve,
stops at once, also with exit 3, and no output is left half-written.
"""

from __future__ import annotations

import contextlib
import gc
import importlib.util
import os
import signal
import sys
import threading
import traceback
import warnings
from collections.abc import Callable, Iterator, Sequence
from pathlib import Path
from types import FrameType
from typing import TYPE_CHECKING, Any, NoReturn, TextIO

import click
import numpy as np

from ..errors import GrowthplanError, invalid
from ..limits import MAX_SECONDS

if TYPE_CHECKING:
    from ..model.plan import Plan
    from ..results.result import PlanResult

EXIT_OK, EXIT_INFEASIBLE, EXIT_INVALID, EXIT_SOLVER, EXIT_UNBOUNDED = 0, 1, 2, 3, 4
DEBUG_ENV = "GROWTHPLAN_DEBUG"
MAX_MESSAGE = 400  # characters of one error line


class Failure(Exception):
    """A failure the command line reports in one line with its exit code."""

    def __init__(self, message: str, code: int) -> None:
        super().__init__(message)
        self.code = code


def _one_line(text: str) -> str:
    line = " ".join(str(text).split())
    return line if len(line) <= MAX_MESSAGE else line[: MAX_MESSAGE - 1] + "…"


def _say(message: str) -> None:
    from ..progress import clear_bars

    with contextlib.suppress(OSError, ValueError):  # a closed stderr cannot take it either
        clear_bars()  # a solve's bar may still be on the line (its thread winds down)
        click.echo(_one_line(message), err=True)


def exit_with(code: int) -> NoReturn:
    sys.exit(code)


def _debug() -> bool:
    return os.environ.get(DEBUG_ENV, "").strip() not in ("", "0")


def _report_failure(exc: BaseException) -> int:
    """Report ``exc`` in one line; its documented exit code."""
    if isinstance(exc, Failure):
        _say(f"error: {exc}")
        return exc.code
    if isinstance(exc, KeyboardInterrupt):
        _STOPPING.on = True
        _say("interrupted")
        return EXIT_SOLVER
    if isinstance(exc, GrowthplanError):
        _say(f"error: {_flags(str(exc))}")
        return EXIT_INVALID if isinstance(exc, ValueError) else EXIT_SOLVER
    if isinstance(exc, BrokenPipeError):  # the reader of stdout went away (| head)
        with contextlib.suppress(OSError, ValueError):
            sys.stdout = open(os.devnull, "w")  # noqa: SIM115 - lives until exit
        return EXIT_SOLVER
    if _debug():
        traceback.print_exception(exc)
    _say(f"error: unexpected {type(exc).__name__}: {exc}"
         + ("" if _debug() else f" (set {DEBUG_ENV}=1 for the traceback)"))
    return EXIT_SOLVER


def _culprit(exc: BaseException, default: Path) -> str:
    """The file an input error is about: the OSError's own file name, or the
    ``path`` being read in the innermost growthplan frame, or ``default``."""
    name = getattr(exc, "filename", None)
    if isinstance(name, str | os.PathLike):
        return str(name)
    found = None
    tb = exc.__traceback__
    while tb is not None:
        frame = tb.tb_frame
        if frame.f_globals.get("__name__", "").startswith("growthplan."):
            value = frame.f_locals.get("path")
            if isinstance(value, str | os.PathLike):
                found = value
        tb = tb.tb_next
    return str(found if found is not None else default)


@contextlib.contextmanager
def reading_input(path: Path) -> Iterator[None]:
    """Turn any failure while reading input into exit 2, naming the file."""
    try:
        yield
    except (GrowthplanError, KeyboardInterrupt, Failure):
        raise
    except OSError as exc:
        raise Failure(f"cannot read {_culprit(exc, path)}: {exc.strerror or exc}",
                      EXIT_INVALID) from None
    except RecursionError as exc:
        raise Failure(f"cannot read {_culprit(exc, path)}: nested too deeply",
                      EXIT_INVALID) from None
    except Exception as exc:
        detail = str(exc) or type(exc).__name__
        raise Failure(f"cannot read {_culprit(exc, path)}: {type(exc).__name__}: {detail}",
                      EXIT_INVALID) from None


_FAILED_WRITES: list[Path] = []


def _drop_frames(exc: BaseException | None) -> None:
    seen = set()
    while exc is not None and id(exc) not in seen:
        seen.add(id(exc))
        exc.__traceback__ = None
        exc = exc.__cause__ or exc.__context__


_PYTHON_ONLY = " (load_plan_file(..., allow_outside=True) reads others)"


def _flags(message: str) -> str:
    """A library message in the command line's words: ``--overwrite``, not the keyword,
    and no advice that only the Python interface can follow."""
    return message.replace(_PYTHON_ONLY, "").replace("overwrite=True", "--overwrite") \
        .replace("force=True", "--force")


@contextlib.contextmanager
def writing_output(path: Path, option: str = "") -> Iterator[None]:
    """Turn an operating-system failure while writing into exit 2, naming the path;
    a library refusal is worded for the command line (its option, ``--overwrite``)."""
    message = None
    try:
        yield
    except GrowthplanError as exc:
        if not isinstance(exc, ValueError):
            raise
        text = _flags(str(exc))
        for word in ("folder", "path"):  # the library's parameter names the option here
            if option and text.startswith(f"{word} must"):
                text = option + text[len(word):]
        raise Failure(text, EXIT_INVALID) from None
    except OSError as exc:
        message = f"cannot write {_culprit(exc, path)}: {exc.strerror or exc}"
        _drop_frames(exc)  # let the half-written files' objects go now
    if message is not None:
        _FAILED_WRITES.append(path)  # their finalizers run while stderr is kept quiet
        raise Failure(message, EXIT_INVALID)


def input_file(path: Path, what: str) -> Path:
    """``path`` if it is a regular file: folders, devices, pipes and sockets are
    refused before anything reads them (a pipe or /dev/zero would never end)."""
    from ..io.atomic import valid_path

    if not valid_path(path, what).exists():
        raise invalid(what, "name an existing file", str(path))
    if not path.is_file():
        kind = "a folder" if path.is_dir() else "a pipe, device or socket"
        raise invalid(what, f"name a regular file, not {kind}", str(path))
    return path


def absolute_path(p: Path) -> Path:
    return Path(os.path.abspath(p))


def check_outputs(out: Path | None, excel: Path | None, charts: Path | None,
                   overwrite: bool, inputs: tuple[Path, ...] = (),
                   report: Path | None = None, input_name: str = "the plan file") -> None:
    """Refuse outputs that cannot be written before any time goes into solving
    (``input_name``: the inputs in words, for the messages)."""
    named = {"--out": out, "--excel": excel, "--charts": charts, "--report": report}
    for opt, p, full in distinct_outputs(named):
        if p.exists() and not overwrite and opt != "--charts":
            raise invalid(opt, "not exist yet (pass --overwrite to replace it)", str(p))
        if opt == "--out":
            cwd = absolute_path(Path.cwd())
            if full == cwd or full in cwd.parents:
                raise invalid(opt, "not be the current folder or one holding it", str(p))
            if any(full in absolute_path(i).parents for i in inputs):
                raise invalid(opt, f"not be a folder holding {input_name}", str(p))
            if p.exists() and not p.is_dir():
                raise invalid(opt, "name a folder (it is a file)", str(p))
        if opt != "--out" and any(full == absolute_path(i) for i in inputs):
            raise invalid(opt, f"not be {input_name}", str(p))
        if opt in ("--excel", "--report") and p.is_dir():
            raise invalid(opt, "name a file (it is a folder)", str(p))
        if opt in _SUFFIXES and p.suffix.lower() not in _SUFFIXES[opt]:
            raise invalid(opt, f"end in {' or '.join(_SUFFIXES[opt])}", str(p))
        if opt == "--charts" and p.exists() and not p.is_dir():
            raise invalid(opt, "name a folder (it is a file)", str(p))
        if opt == "--charts" and p.is_dir() and not overwrite and any(p.iterdir()):
            # what the chart writer would refuse after the solve, refused before it
            raise invalid(opt, "not exist yet or be empty (pass --overwrite to replace the "
                          "charts growthplan wrote there)", str(p))
        if opt == "--charts" and p.is_dir() and overwrite:
            _charts_replaceable(p)
        if opt == "--charts":
            _plot_extra(opt)
        if opt in ("--excel", "--report"):
            replaceable(opt, p, overwrite)
        writable(opt, p)


def distinct_outputs(named: dict[str, Path | None]) -> list[tuple[str, Path, Path]]:
    """The outputs given, as (option, path, absolute path); two options naming one
    path are refused."""
    from ..io.atomic import valid_path

    seen: dict[Path, str] = {}
    out = []
    for opt, p in named.items():
        if p is None:
            continue
        valid_path(p, opt)  # a NUL byte or a name too long: refused before anything else
        full = absolute_path(p)
        if full in seen:
            raise invalid(opt, f"differ from {seen[full]}", str(p))
        seen[full] = opt
        out.append((opt, p, full))
    return out


def writable(opt: str, p: Path) -> None:
    """Refuse ``p`` when no folder it would be created in can be written."""
    parent = absolute_path(p).parent
    while not parent.exists() and parent != parent.parent:
        parent = parent.parent
    if not parent.is_dir():
        raise invalid(opt, "lie inside a folder", str(p))
    if not os.access(parent, os.W_OK | os.X_OK):
        raise invalid(opt, "lie in a writable folder", str(p))


_SUFFIXES = {"--excel": (".xlsx",), "--report": (".html", ".htm")}
CHART_NAMES = ("output", "capacity", "starts", "labour", "shadow_prices", "ray_distance",
                "consumption", "targets", "utilisation", "diagnosis")


def _charts_replaceable(folder: Path) -> None:
    """Refuse before the solve a chart folder the chart writer would refuse after it:
    one holding a file under a chart's name that growthplan did not write there."""
    from ..io.atomic import read_manifest

    ours = {name for names in read_manifest(folder).values() for name in names}
    for name in CHART_NAMES:
        if (folder / f"{name}.png").exists() and f"{name}.png" not in ours:
            raise invalid("--charts", "not hold files growthplan did not write under the "
                          "names it writes (move them, or choose another folder)",
                          str(folder / f"{name}.png"))
PLOT_EXTRA = 'pip install "growthplan[plot]"'


def _has_matplotlib() -> bool:
    try:
        return importlib.util.find_spec("matplotlib") is not None
    except (ImportError, ValueError):
        return False


def _plot_extra(option: str) -> None:
    """Refuse ``option`` in one line when matplotlib (the ``plot`` extra) is missing."""
    try:
        import matplotlib  # noqa: F401 - only whether it imports
    except ImportError:
        raise Failure(f"{option} needs matplotlib, which is not installed: {PLOT_EXTRA}",
                      EXIT_INVALID) from None


def _finite(value: float | None) -> float | None:
    if value is not None and not np.isfinite(value):  # NaN passes every range check
        raise click.BadParameter(f"{value} is not a number of seconds")
    return value




def positive_seconds(ctx: click.Context, param: click.Parameter,
                     value: float | None) -> float | None:
    """A time limit: a finite number of seconds above 0 (0 would stop before starting)."""
    if value is None:
        return None
    if not (np.isfinite(value) and 0 < value <= MAX_SECONDS):
        raise click.BadParameter(f"must be more than 0 and at most {MAX_SECONDS:g} seconds "
                                 f"(leave it out for no limit). Got {value:g}.")
    return value


def result_exit_code(result: PlanResult) -> int:
    from .. import Status

    return {Status.OPTIMAL: EXIT_OK, Status.INFEASIBLE: EXIT_INFEASIBLE,
            Status.UNBOUNDED: EXIT_UNBOUNDED}.get(result.status, EXIT_SOLVER)


# a signal handler: (signal number, interrupted frame)
_Handler = Callable[[int, FrameType | None], None]


@contextlib.contextmanager
def _signals(handler: _Handler) -> Iterator[None]:
    """Route SIGINT and SIGTERM to ``handler`` (main thread only), then restore.

    A signal the parent set to be ignored (a shell's background job) stays ignored.
    """
    saved: dict[int, Any] = {}
    try:
        for sig in (signal.SIGINT, signal.SIGTERM):
            if signal.getsignal(sig) == signal.SIG_IGN:
                continue
            try:
                saved[sig] = signal.signal(sig, handler)
            except ValueError:  # not the main thread: leave signals alone
                break
        yield
    finally:
        for signum, old in saved.items():
            signal.signal(signum, old)


class _Flag:
    """A plain flag for signal handlers: no lock, so a signal arriving inside a
    handler cannot deadlock on one (``Event.set`` would)."""

    __slots__ = ("on",)

    def __init__(self) -> None:
        self.on = False


_STOPPING = _Flag()  # the command is ending on an interrupt: ignore further signals


def _interrupt() -> NoReturn:
    _STOPPING.on = True
    raise KeyboardInterrupt


def _raise_interrupt(signum: int, frame: FrameType | None) -> None:
    if not _STOPPING.on:
        _interrupt()


_SOLVES: set[threading.Thread] = set()  # solve threads not yet finished


def solve_stoppable(plan: Plan, **options: Any) -> PlanResult:
    """``plan.solve`` that a first SIGINT/SIGTERM stops through ``stop=``.

    The solve runs in a worker thread so the main thread is always free to
    take the signal (Python runs handlers only there); the handler sets the
    event that HiGHS polls. A second signal raises KeyboardInterrupt at once.
    """
    stop = threading.Event()
    box: dict[str, Any] = {}

    def work() -> None:
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                box["result"] = plan.solve(stop=stop, **options)
        except BaseException as exc:  # noqa: BLE001 - handed to the main thread
            box["error"] = exc

    asked = _Flag()

    def on_signal(signum: int, frame: FrameType | None) -> None:
        if _STOPPING.on:
            return
        if asked.on:
            _interrupt()
        asked.on = True

    with _signals(on_signal):
        worker = threading.Thread(target=work, name="growthplan-solve", daemon=True)
        _SOLVES.add(worker)
        worker.start()
        try:
            while worker.is_alive():
                worker.join(0.1)
                if asked.on and not stop.is_set():
                    stop.set()  # here, not in the handler: Event.set takes a lock
        except KeyboardInterrupt:
            stop.set()  # HiGHS stops too, even if nobody waits for it
            raise
    _SOLVES.discard(worker)
    if "error" in box:
        raise box["error"]
    if asked.on:
        _interrupt()
    return box["result"]


def report_result(result: PlanResult, out: Path | None, excel: Path | None, charts: Path | None,
            overwrite: bool, protect: tuple[Path, ...] = (),
            report: Path | None = None) -> None:
    click.echo(str(result.summary()))
    print_shortfalls(result)
    from ..io.atomic import together

    wrote: list[Path] = []
    # every output is written and checked first; they appear together or none does
    with together():
        if report is not None:  # an impossible plan's report holds its diagnosis
            with writing_output(report, "--report"):
                wrote.append(result.report(report, overwrite=overwrite, protect=protect,
                                           force=forced()))
        if result.ok or result.diagnosis is not None:  # else nothing to hand on
            # an impossible plan's folder and workbook hold its diagnosis
            if out is not None:
                with writing_output(out, "--out"):
                    wrote.append(result.to_csv(out, overwrite=overwrite, protect=protect))
            if excel is not None:
                with writing_output(excel, "--excel"):
                    wrote.append(result.to_excel(excel, overwrite=overwrite, protect=protect,
                                                 force=forced()))
            if charts is not None:  # an impossible plan's charts show its shortfalls
                import matplotlib

                matplotlib.use("Agg")
                from ..results.charts import save_charts

                with writing_output(charts, "--charts"):
                    wrote.extend(save_charts(result, charts, overwrite=overwrite,
                                             protect=protect))
    for p in wrote:
        click.echo(f"wrote {p}")


def print_shortfalls(result: PlanResult) -> None:
    """The elastic re-solve's shortfalls, each with its unit, the share in percent."""
    from ..results.report import shortfall_table

    short = shortfall_table(result)
    if short.empty:
        return
    short["share"] = [f"{100 * v:.1f} %" for v in short["share"]]
    click.echo("\nShortfalls (elastic re-solve):")
    click.echo(short.to_string(index=False, float_format=lambda v: f"{v:,.2f}"))


def plural(n: int, word: str, many: str | None = None) -> str:
    """``1 target``, ``2 targets``: a count with its noun in the right number."""
    return f"{n} {word if n == 1 else (many or word + 's')}"


def key_schedules(result: PlanResult) -> None:
    """Output by sector in the first, middle and last plan year, and what binds first."""
    if not result.ok:
        return
    output = result.output
    rows = sorted({0, (len(output) - 1) // 2, len(output) - 1})
    which = {1: "the plan year", 2: "the first and last plan year",
             3: "the first, middle and last plan year"}[len(rows)]
    click.echo(f"\nOutput by sector in {which} ({output_unit_words(result)}):")
    click.echo(output.iloc[rows].T.round(0).to_string())
    first = output.index[0]
    b = first_year_binding(result, first)
    if not b.empty:
        from ..results.summary import objective_unit

        click.echo(f"\nWhat binds first (value of one more unit, in {objective_unit(result)} "
                   f"per unit, {first}):")
        click.echo(b.to_string(index=False))
    if result.data is not None and result.data.tech is not None:
        years = result.technique_years[["sector", "first_start", "last_used"]].rename(
            columns={"first_start": "first started", "last_used": "last used"})
        click.echo("\nTechniques (first year started, last year used):")
        click.echo(years.to_string(na_rep="never"))


def output_unit_words(result: PlanResult) -> str:
    """"million arvens a year" when every sector shares a unit, else where to read them."""
    units = sorted(set(result.plan.economy.units))
    if len(units) == 1:
        return f"{units[0]} a year"
    return "each sector in its own unit a year: " + ", ".join(units)


def first_year_binding(result: PlanResult, year: int) -> Any:
    """The first year's five most valuable binding conditions; ``per_value`` only where it
    differs from ``value`` (it does when a base-year price is not 1)."""
    b = result.bottlenecks(top=5)
    b = b[b.year == year]
    if np.allclose(b["value"], b["per_value"], rtol=1e-12, atol=0):
        b = b.drop(columns="per_value")
    return b


def next_steps(out: Path | None, excel: Path | None, report: Path | None,
                charts: Path | None) -> None:
    """The exports this run did not write, as the options that write them."""
    steps = [(out, "--out FOLDER", "every schedule as CSV"),
             (excel, "--excel FILE.xlsx", "a workbook"),
             (report, "--report FILE.html", "a report for readers"),
             (charts, "--charts FOLDER", "charts as PNG" + (
                 "" if _has_matplotlib() else f"; needs {PLOT_EXTRA}"))]
    left = [f"{flag} ({what})" for given, flag, what in steps if given is None]
    if left:
        click.echo(f"\nNext: {'; '.join(left)}.")


def _show_warning(message: Warning | str, category: type[Warning], filename: str, lineno: int,
                  file: TextIO | None = None, line: str | None = None) -> None:
    _say(f"warning: {message}")  # one line, without the source line Python adds


@contextlib.contextmanager
def _quiet_unraisable() -> Iterator[None]:
    """Keep the noise of half-closed files (``Exception ignored in …``) that a
    failed export leaves for the garbage collector off stderr."""
    saved = sys.unraisablehook
    if not _debug():
        sys.unraisablehook = lambda unraisable: None
    try:
        yield
    finally:
        if _FAILED_WRITES:
            gc.collect()
            _FAILED_WRITES.clear()
        sys.unraisablehook = saved


class _Main(click.Group):
    """The command group, reporting every failure in one line with its exit code."""

    def main(self, args: Sequence[str] | None = None, prog_name: str | None = None,
             complete_var: str | None = None, standalone_mode: bool = True,
             **extra: Any) -> Any:
        if not standalone_mode:
            return super().main(args, prog_name, complete_var, standalone_mode, **extra)
        code: Any = EXIT_OK
        _STOPPING.on = False
        with _signals(_raise_interrupt), _quiet_unraisable(), warnings.catch_warnings():
            warnings.showwarning = _show_warning
            try:
                rv = super().main(args, prog_name, complete_var, False, **extra)
                code = rv if isinstance(rv, int) else EXIT_OK
            except click.exceptions.Exit as exc:
                code = exc.exit_code
            except click.exceptions.NoArgsIsHelpError as exc:  # a bare ``growthplan``
                click.echo(exc.ctx.get_help())
                _say(f"error: name a command (see '{exc.ctx.command_path} --help')")
                code = EXIT_INVALID
            except click.ClickException as exc:  # bad options and arguments
                # only the usage errors among them carry a context
                ctx: click.Context | None = getattr(exc, "ctx", None)
                _say(f"error: {exc.format_message()}"
                     + (f" (see '{ctx.command_path} --help')" if ctx is not None else ""))
                code = EXIT_INVALID
            except click.exceptions.Abort:
                _say("interrupted")
                code = EXIT_SOLVER
            except SystemExit as exc:
                code = exc.code
                _drop_frames(exc)  # so the collector finalizes them while it is quiet
            except BaseException as exc:  # noqa: BLE001 - the last resort
                code = _report_failure(exc)
                _drop_frames(exc)
        if (args is None and _STOPPING.on) or any(t.is_alive() for t in _SOLVES):
            # The process ends on a signal, or HiGHS still runs in its thread: a
            # normal exit would tear HiGHS's C++ threads down under it (abort) and
            # further signals could cut the interpreter's shutdown short. Leave now;
            # every output file is complete or removed already.
            for stream in (sys.stdout, sys.stderr):
                with contextlib.suppress(Exception):
                    stream.flush()
            os._exit(code if isinstance(code, int) else EXIT_SOLVER)
        sys.exit(code)

    def invoke(self, ctx: click.Context) -> Any:
        try:
            return super().invoke(ctx)
        except (click.ClickException, click.exceptions.Exit, click.exceptions.Abort,
                SystemExit):
            raise
        except BaseException as exc:  # noqa: BLE001 - every failure is one line
            exit_with(_report_failure(exc))


out_option = click.option("--out", type=click.Path(path_type=Path), default=None,
                    help="Write every schedule as CSV into this new folder.")
excel_option = click.option("--excel", type=click.Path(path_type=Path), default=None,
                      help="Write every schedule as a sheet of this new workbook.")
report_option = click.option("--report", type=click.Path(path_type=Path), default=None,
                           help="Write a self-contained HTML report (charts need matplotlib) "
                                "to this new file; an impossible plan's report explains why.")
charts_option = click.option("--charts", type=click.Path(path_type=Path), default=None,
                       help="Save the standard charts as PNG files into this folder.")
_FORCE = "growthplan.force"


def _remember_force(ctx: click.Context, param: click.Parameter, value: bool) -> bool:
    if value:
        ctx.meta[_FORCE] = True
    return value


def forced() -> bool:
    """Whether this command was given ``--force`` (replace files growthplan did not write)."""
    ctx = click.get_current_context(silent=True)
    return bool(ctx is not None and ctx.meta.get(_FORCE))


def overwrite_options(f: Any) -> Any:
    """``--overwrite`` and ``--force``: the second is read through :func:`forced`, so the
    commands keep one ``overwrite`` argument."""
    f = click.option("--force", is_flag=True, expose_value=False, callback=_remember_force,
                     help="With --overwrite, replace output files growthplan did not write "
                          "too (without it such a file is refused).")(f)
    return click.option("--overwrite", is_flag=True,
                        help="Replace existing output files and folders growthplan "
                             "wrote.")(f)


def replaceable(opt: str, p: Path, overwrite: bool) -> None:
    """Refuse, before any solve, an existing output file that ``--overwrite`` may not
    replace: without the flag, or without growthplan's mark and without ``--force``."""
    from ..io.marks import MARK, ours

    if forced() and not overwrite:
        raise invalid("--force", "come with --overwrite", True)
    if not p.is_file():
        return
    if not overwrite:
        raise invalid(opt, "not exist yet (pass --overwrite to replace it)", str(p))
    if not forced() and not ours(p):
        raise invalid(opt, f"be a file growthplan wrote to be replaced (it holds no '{MARK}' "
                      "mark; pass --force to replace it anyway)", str(p))


@click.group(cls=_Main, help="Multi-year growth planning of multi-sector economies. Exit "
             "codes: 0 optimal, 1 infeasible, 2 invalid input, 3 solver failure or "
             "interrupt, 4 unbounded.")
@click.version_option(package_name="growthplan")
def main() -> None:
    pass
