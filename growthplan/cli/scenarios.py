"""The scenario commands: stress, reoptimise and revise.

``stress`` and ``reoptimise`` read the plan file's ``uncertainty:`` section
(see :func:`growthplan.load_uncertainty`), or ``--vary`` options for the
common cases; ``--draws`` and ``--seed`` override its numbers. ``revise``
reads the starts actually made from a tidy CSV file (``year,sector,starts``,
see :func:`growthplan.read_actuals`). Every output file is checked before
anything is solved and written atomically.
"""

from __future__ import annotations

from collections.abc import Callable, Iterator
from concurrent.futures import Executor
from contextlib import contextmanager
from pathlib import Path
from typing import TYPE_CHECKING, Any

import click

if TYPE_CHECKING:
    import pandas as pd

from ..errors import invalid
from ..limits import MAX_DRAWS, MAX_WORKERS
from .base import (
    EXIT_OK,
    absolute_path,
    distinct_outputs,
    exit_with,
    forced,
    input_file,
    main,
    overwrite_options,
    print_shortfalls,
    reading_input,
    replaceable,
    result_exit_code,
    solve_stoppable,
    writable,
    writing_output,
)

_csv_out = click.option("--out", type=click.Path(path_type=Path), default=None,
                        help="Write the tidy table as CSV to this new file.")
_xlsx_out = click.option("--excel", type=click.Path(path_type=Path), default=None,
                         help="Write the tables as sheets of this new workbook.")


def _check_files(named: dict[str, Path | None], overwrite: bool, inputs: tuple[Path, ...],
                 suffixes: dict[str, tuple[str, ...]]) -> None:
    """Refuse output files that cannot be written, before any time goes into solving."""
    for opt, p, full in distinct_outputs(named):
        if p.suffix.lower() not in suffixes[opt]:
            raise invalid(opt, f"end in {' or '.join(suffixes[opt])}", str(p))
        if any(full == absolute_path(i) for i in inputs):
            raise invalid(opt, "not be an input file", str(p))
        if p.is_dir():
            raise invalid(opt, "name a file (it is a folder)", str(p))
        if p.exists() and not overwrite:
            raise invalid(opt, "not exist yet (pass --overwrite to replace it)", str(p))
        replaceable(opt, p, overwrite)
        writable(opt, p)


_SUFFIXES: dict[str, tuple[str, ...]] = {"--out": (".csv",), "--excel": (".xlsx",)}


def _protected(plan_file: Path, *more: Path) -> tuple[Path, ...]:
    """The plan file, the tables it names and ``more``: what no output may replace,
    known before any solve."""
    from ..io.planfile import plan_file_inputs

    input_file(plan_file, "plan file")
    with reading_input(plan_file):
        return (*plan_file_inputs(plan_file), *more)


def _write(out: Path | None, excel: Path | None, sheets: dict[str, pd.DataFrame],
           main_sheet: str, overwrite: bool, protect: tuple[Path, ...]) -> None:

    from ..io.atomic import together

    force = forced()
    with together():  # both files appear, or neither
        _write_files(out, excel, sheets, main_sheet, overwrite, protect, force)
    for p in (out, excel):
        if p is not None:
            click.echo(f"wrote {p}")


def _write_files(out: Path | None, excel: Path | None, sheets: dict[str, pd.DataFrame],
                 main_sheet: str, overwrite: bool, protect: tuple[Path, ...],
                 force: bool) -> None:
    import pandas as pd

    from ..io.atomic import atomic_file
    from ..io.workbooks import finish_workbook

    if out is not None:
        with writing_output(out), atomic_file(out, overwrite=overwrite, protect=protect,
                                        force=force) as tmp:
            sheets[main_sheet].to_csv(tmp, index=False)
    if excel is not None:
        with writing_output(excel), atomic_file(excel, overwrite=overwrite, protect=protect,
                                          force=force) as tmp, \
                pd.ExcelWriter(tmp, engine="openpyxl") as book:
            for name, frame in sheets.items():
                frame.to_excel(book, sheet_name=name, index=False)
            finish_workbook(book.book)  # names stay text; the mark for --overwrite


def _figure_unit(plan: Any, figure: str) -> str:
    """The unit of a key figure of :func:`growthplan.results.summary.key_figures`."""
    money = plan.economy.value_unit
    units = {"terminal_capacity": f"{money} a year", "total_starts": f"{money} a year",
             "gdp_first": money, "gdp_last": money,
             "investment_share": "fraction of GDP (mean over the years)",
             "peak_labour_use": "fraction of the labour supply (the largest)",
             "objective": "terminal bundles" if plan.objective.kind == "terminal_capacity"
             else "units of the objective"}
    return units.get(figure, "")


@contextmanager
def _executor(workers: int) -> Iterator[Executor | None]:
    """None (the analysis's own warm process pool) for several workers, else serial."""
    from ..scenarios.sweep import SerialExecutor

    if workers > 1:
        yield None
    else:
        yield SerialExecutor()


# the parameters of each distribution --vary takes, in order
_VARY = {"uniform": ("low", "high"), "triangular": ("low", "mode", "high"),
         "normal": ("mean", "sd"), "lognormal": ("mean", "sd")}
VARY_HELP = ("What is uncertain, as WHAT=DISTRIBUTION:PARAMETERS, for example "
             "capital_coefficients=uniform:0.9:1.1 (a factor on every cell, one draw for all); "
             "distributions uniform:LOW:HIGH, triangular:LOW:MODE:HIGH, normal:MEAN:SD, "
             "lognormal:MEAN:SD. Repeat for several; replaces the plan file's uncertainty "
             "items.")


def _vary(ctx: click.Context, param: click.Parameter, values: tuple[str, ...]) -> list[Any]:
    """``--vary`` options as uncertain items, refused in the option's words."""
    from ..errors import InvalidInput
    from ..scenarios.uncertainty import Uncertain

    items = []
    for text in values:
        what, sep, dist = text.partition("=")
        kind, *numbers = dist.split(":")
        names = _VARY.get(kind.strip())
        if not sep or names is None or len(numbers) != len(names):
            raise click.BadParameter(
                "must be WHAT=uniform:LOW:HIGH, triangular:LOW:MODE:HIGH, normal:MEAN:SD or "
                f"lognormal:MEAN:SD (e.g. capital_coefficients=uniform:0.9:1.1). Got {text!r}.")
        try:
            values_ = [float(n) for n in numbers]
        except ValueError:
            raise click.BadParameter(f"must give numbers after {kind}:. Got {text!r}.") from None
        try:
            items.append(Uncertain.model_validate({"what": what.strip(), "distribution": {
                "kind": kind.strip(), **dict(zip(names, values_, strict=True))}}))
        except InvalidInput as exc:
            raise click.BadParameter(f"{exc} (in {text!r})") from None
    return items


def _load(plan_file: Path, draws: int | None, seed: int | None,
          vary: list[Any] | None = None) -> tuple[Any, Any, Any, int]:
    from .. import load_plan_file, load_uncertainty
    from ..scenarios.uncertainty import UncertaintySpec

    input_file(plan_file, "plan file")
    with reading_input(plan_file):
        plan = load_plan_file(plan_file)
        spec = load_uncertainty(plan_file)
    if vary:
        spec = UncertaintySpec(items=vary, seed=0 if spec is None else spec.seed,
                               draws=100 if spec is None else spec.draws)
        with reading_input(plan_file):
            spec.check(plan)  # the cells it names exist
    if spec is None:
        raise invalid("plan file", "have an uncertainty section (see the commented one in "
                      "'growthplan demo --copy' and 'growthplan schema'), or the command "
                      "--vary WHAT=uniform:LOW:HIGH", str(plan_file))
    if seed is not None:
        spec = spec.model_copy(update={"seed": seed})
    return plan, _options(plan), spec, spec.draws if draws is None else draws


def _options(plan: Any) -> Any:
    """The plan file's solver settings, as attributes."""
    from ..io.planfile import SolveOptions

    return SolveOptions(**plan.solve_options)


def _analysis_options(f: Any) -> Any:
    options: list[Callable[[Any], Any]] = [
        click.option("--draws", type=click.IntRange(min=1, max=MAX_DRAWS), default=None,
                     help="Drawn economies (default: the plan file's uncertainty.draws)."),
        click.option("--seed", type=click.IntRange(min=0), default=None,
                     help="Seed of the draws (default: the plan file's uncertainty.seed)."),
        click.option("--workers", type=click.IntRange(min=1, max=MAX_WORKERS), default=1,
                     show_default=True,
                     help="Worker processes; 1 solves every draw in this process."),
        _csv_out, _xlsx_out, overwrite_options,
        click.option("--progress/--no-progress", default=True, show_default=True,
                     help="A progress bar over the draws."),
        click.option("--vary", multiple=True, callback=_vary, metavar="WHAT=DIST:ARGS",
                     help=VARY_HELP),
    ]
    for option in reversed(options):
        f = option(f)
    return f


def _probabilities(result: Any) -> pd.DataFrame:
    p = result.probability()
    p["year"] = p["year"].astype("Int64")
    return p


@main.command(help="Stress-test a plan file: keep the optimal plan's capacity starts and "
              "ask what each drawn economy can deliver (the uncertainty section says what is "
              "uncertain). Prints the probability that each condition is met.")
@click.argument("plan_file", type=click.Path(path_type=Path))
@_analysis_options
def stress(plan_file: Path, draws: int | None, seed: int | None, workers: int,
           out: Path | None, excel: Path | None, overwrite: bool, progress: bool,
           vary: list[Any]) -> None:
    from ..io.planfile import plan_file_inputs
    from ..scenarios.uncertainty import stress_test

    _check_files({"--out": out, "--excel": excel}, overwrite, _protected(plan_file),
                 _SUFFIXES)
    plan, opts, spec, n = _load(plan_file, draws, seed, vary)
    nominal = solve_stoppable(plan, method=opts.method, time_limit=opts.time_limit,
                     threads=opts.threads, tolerance=opts.tolerance, progress=False)
    if not nominal.ok:
        click.echo(str(nominal.summary()))
        click.echo("The nominal plan has no optimum: nothing to stress-test.")
        exit_with(result_exit_code(nominal))
    with _executor(workers) as ex:
        result = stress_test(plan, spec, n, nominal=nominal, executor=ex, max_workers=workers,
                             progress=progress)
    prob = _probabilities(result)
    click.echo(f"Stress test of {plan_file.name}: {n} drawn economies (seed {spec.seed}), "
               f"the nominal plan's capacity starts kept; {len(result.failed)} draws failed.")
    whole = prob[prob["condition"] == "plan"]
    if len(whole):
        click.echo(f"Probability that the whole plan is met: "
                   f"{float(whole['probability'].iloc[0]):.3f} "
                   f"({int(whole['draws'].iloc[0])} draws)")
    conditions = prob[prob["condition"] != "plan"]
    missed = conditions[conditions["probability"] < 1].sort_values(
        ["probability", "condition", "year"], kind="stable")
    if len(missed):
        more = "; the first 30" if len(missed) > 30 else ""
        click.echo("Conditions not always met (mean and 95th-percentile shortfall in the "
                   f"condition's own unit), least likely first{more}:")
        click.echo(missed.head(30).to_string(index=False, float_format=lambda v: f"{v:.4g}"))
    click.echo(f"{len(conditions) - len(missed)} other conditions met in every draw.")
    _write(out, excel, {"draws": result.table, "probability": prob,
                        "figures": result.figures().reset_index()}, "draws", overwrite,
           tuple(plan_file_inputs(plan_file)))
    exit_with(EXIT_OK)


@main.command(help="Solve a plan file again in every drawn economy (the uncertainty section "
              "says what is uncertain). Prints the probability that the plan is feasible and "
              "quantiles of its objective and key figures.")
@click.argument("plan_file", type=click.Path(path_type=Path))
@_analysis_options
def reoptimise(plan_file: Path, draws: int | None, seed: int | None, workers: int,
               out: Path | None, excel: Path | None, overwrite: bool, progress: bool,
               vary: list[Any]) -> None:
    from ..io.planfile import plan_file_inputs
    from ..scenarios.uncertainty import reoptimise as run

    _check_files({"--out": out, "--excel": excel}, overwrite, _protected(plan_file),
                 _SUFFIXES)
    plan, opts, spec, n = _load(plan_file, draws, seed, vary)
    options = opts.keywords()
    with _executor(workers) as ex:
        result = run(plan, spec, n, executor=ex, max_workers=workers, progress=progress,
                     solve_options=options)
    prob = _probabilities(result)
    figures = result.figures()
    numeric = figures.drop(columns=["status", "solve_seconds", "plan"], errors="ignore")
    numeric = numeric.loc[:, [not c.startswith(tuple("0123456789")) for c in numeric.columns]]
    quant = numeric.quantile([0.05, 0.5, 0.95]).T.rename_axis("figure")
    quant.columns = ["p05", "median", "p95"]
    quant.insert(0, "unit", [_figure_unit(plan, str(f)) for f in quant.index])
    click.echo(f"Re-optimisation of {plan_file.name}: {n} drawn economies (seed {spec.seed}); "
               f"{len(result.failed)} draws failed.")
    whole = prob[prob["condition"] == "plan"]
    if len(whole):
        click.echo(f"Probability that the plan is feasible: "
                   f"{float(whole['probability'].iloc[0]):.3f} "
                   f"({int(whole['draws'].iloc[0])} draws)")
    click.echo("Key figures over the draws (5 %, median, 95 %):")
    shown = quant.copy()
    for col in ("p05", "median", "p95"):  # shares as percent in text, fractions in files
        shown[col] = [f"{100 * v:.1f} %" if u.startswith("fraction") else f"{v:,.6g}"
                      for v, u in zip(quant[col], quant["unit"], strict=True)]
    shown["unit"] = [u.replace("fraction", "share", 1) if u.startswith("fraction") else u
                     for u in quant["unit"]]
    click.echo(shown.to_string())
    _write(out, excel, {"draws": result.table, "probability": prob,
                        "figures": figures.reset_index(),
                        "quantiles": quant.reset_index()}, "draws", overwrite,
           tuple(plan_file_inputs(plan_file)))
    exit_with(EXIT_OK)


@main.command(help="Revise a plan file from a later year, given the capacity starts "
              "actually made before it (ACTUALS: CSV with columns year,sector,starts). "
              "Solves the original and the revised plan and prints their comparison.")
@click.argument("plan_file", type=click.Path(path_type=Path))
@click.argument("actuals", type=click.Path(path_type=Path))
@click.option("--from-year", type=int, required=True,
              help="First year of the revised plan (a plan year after the first).")
@_csv_out
@_xlsx_out
@overwrite_options
@click.option("--progress/--no-progress", default=True, show_default=True,
              help="Show the solver's progress.")
def revise(plan_file: Path, actuals: Path, from_year: int, out: Path | None,
           excel: Path | None, overwrite: bool, progress: bool) -> None:
    from .. import load_plan_file
    from ..io.planfile import plan_file_inputs
    from ..scenarios.revision import compare, read_actuals
    from ..scenarios.revision import revise as revised_plan

    _check_files({"--out": out, "--excel": excel}, overwrite, _protected(plan_file, actuals),
                 _SUFFIXES)
    input_file(plan_file, "plan file")
    input_file(actuals, "actuals")
    with reading_input(plan_file):
        plan = load_plan_file(plan_file)
    opts = _options(plan)
    with reading_input(actuals):
        done = read_actuals(actuals)
    absent = [n for n in plan.economy.names if n not in done.columns]
    if absent:  # a forgotten or misspelt sector would silently start nothing
        raise invalid(f"actuals ({actuals.name})", "name every sector of the plan at least "
                      "once (write 0 for a sector that started nothing)",
                      f"missing {absent[:5]}")
    new_plan = revised_plan(plan, done, from_year)  # checked before anything is solved
    options = {"method": opts.method, "time_limit": opts.time_limit, "threads": opts.threads,
               "tolerance": opts.tolerance, "progress": progress}
    original = solve_stoppable(plan, **options)
    if not original.ok:
        click.echo(str(original.summary()))
        click.echo("The original plan has no optimum: nothing to compare with.")
        exit_with(result_exit_code(original))
    result = solve_stoppable(new_plan, **options)
    click.echo(str(result.summary()))
    if not result.ok:
        click.echo(f"The revised plan from {from_year} has no optimum.")
        print_shortfalls(result)
        exit_with(result_exit_code(result))
    # the columns named as the console names them
    table = compare(original, result).rename(columns={"a": "original", "b": "revised"})
    per_year = table.groupby(["quantity", "year"])[["original", "revised",
                                                    "difference"]].sum().reset_index()
    units = sorted(set(plan.economy.units))
    unit = (f"{units[0]} a year" if len(units) == 1 else
            "each sector's own unit a year, summed as given")
    click.echo(f"\nOriginal and revised plan from {from_year}, summed over sectors ({unit}):")
    click.echo(per_year.to_string(index=False, float_format=lambda v: f"{v:.6g}"))
    click.echo(f"objective: original {original.objective:.6g}, revised {result.objective:.6g}")
    _write(out, excel, {"comparison": table, "per_year": per_year}, "comparison", overwrite,
           (*plan_file_inputs(plan_file), actuals))
    exit_with(result_exit_code(result))
