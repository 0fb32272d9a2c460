"""The scenario commands: stress, reoptimise and revise.

``stress`` and ``reoptimise`` read the plan file's ``uncertainty:`` section
(see :func:`growthplan.load_uncertainty`); ``--draws`` and ``--seed`` override
its numbers. ``revise`` reads the starts actually made from a tidy CSV file
(``year,sector,starts``, see :func:`growthplan.read_actuals`). Every output
file is checked before anything is solved and written atomically.
"""

from __future__ import annotations

from collections.abc import Iterator
from concurrent.futures import Executor
from contextlib import contextmanager
from pathlib import Path
from typing import TYPE_CHECKING, Any

import click

if TYPE_CHECKING:
    import pandas as pd

from ..errors import invalid
from .base import (
    EXIT_OK,
    _distinct,
    _exit,
    _exit_code,
    _input_file,
    _overwrite,
    _reading,
    _resolved,
    _solve,
    _writable,
    _writing,
    main,
)

_csv_out = click.option("--out", type=click.Path(path_type=Path), default=None,
                        help="Write the tidy table as CSV to this new file.")
_xlsx_out = click.option("--excel", type=click.Path(path_type=Path), default=None,
                         help="Write the tables as sheets of this new workbook.")


def _check_files(named: dict[str, Path | None], overwrite: bool, inputs: tuple[Path, ...],
                 suffixes: dict[str, tuple[str, ...]]) -> None:
    """Refuse output files that cannot be written, before any time goes into solving."""
    for opt, p, full in _distinct(named):
        if p.suffix.lower() not in suffixes[opt]:
            raise invalid(opt, f"end in {' or '.join(suffixes[opt])}", str(p))
        if any(full == _resolved(i) for i in inputs):
            raise invalid(opt, "not be an input file", str(p))
        if p.is_dir():
            raise invalid(opt, "name a file (it is a folder)", str(p))
        if p.exists() and not overwrite:
            raise invalid(opt, "not exist yet (pass --overwrite to replace it)", str(p))
        _writable(opt, p)


_SUFFIXES: dict[str, tuple[str, ...]] = {"--out": (".csv",), "--excel": (".xlsx",)}


def _protected(plan_file: Path, *more: Path) -> tuple[Path, ...]:
    """The plan file, the tables it names and ``more``: what no output may replace,
    known before any solve."""
    from ..io.planfile import plan_file_inputs

    _input_file(plan_file, "plan file")
    with _reading(plan_file):
        return (*plan_file_inputs(plan_file), *more)


def _write(out: Path | None, excel: Path | None, sheets: dict[str, pd.DataFrame],
           main_sheet: str, overwrite: bool, protect: tuple[Path, ...]) -> None:
    import pandas as pd

    from ..io.atomic import atomic_file

    if out is not None:
        with _writing(out), atomic_file(out, overwrite=overwrite, protect=protect) as tmp:
            sheets[main_sheet].to_csv(tmp, index=False)
        click.echo(f"wrote {out}")
    if excel is not None:
        with _writing(excel), atomic_file(excel, overwrite=overwrite, protect=protect) as tmp, \
                pd.ExcelWriter(tmp, engine="openpyxl") as book:
            for name, frame in sheets.items():
                frame.to_excel(book, sheet_name=name, index=False)
        click.echo(f"wrote {excel}")


@contextmanager
def _executor(workers: int) -> Iterator[Executor | None]:
    """None (the analysis's own warm process pool) for several workers, else serial."""
    from ..scenarios.sweep import SerialExecutor

    if workers > 1:
        yield None
    else:
        yield SerialExecutor()


def _load(plan_file: Path, draws: int | None, seed: int | None) -> tuple[Any, Any, Any, int]:
    from .. import load_plan_file, load_uncertainty

    _input_file(plan_file, "plan file")
    with _reading(plan_file):
        plan, opts = load_plan_file(plan_file)
        spec = load_uncertainty(plan_file)
    if spec is None:
        raise invalid("plan file", "have an uncertainty section (see 'growthplan schema')",
                      str(plan_file))
    if seed is not None:
        spec = spec.model_copy(update={"seed": seed})
    return plan, opts, spec, spec.draws if draws is None else draws


def _analysis_options(f: Any) -> Any:
    for option in reversed([
        click.option("--draws", type=click.IntRange(min=1, max=10_000_000), default=None,
                     help="Drawn economies (default: the plan file's uncertainty.draws)."),
        click.option("--seed", type=click.IntRange(min=0), default=None,
                     help="Seed of the draws (default: the plan file's uncertainty.seed)."),
        click.option("--workers", type=click.IntRange(min=1, max=1024), default=1,
                     show_default=True,
                     help="Worker processes; 1 solves every draw in this process."),
        _csv_out, _xlsx_out, _overwrite,
        click.option("--progress/--no-progress", default=True, show_default=True,
                     help="A progress bar over the draws."),
    ]):
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
           out: Path | None, excel: Path | None, overwrite: bool, progress: bool) -> None:
    from ..io.planfile import plan_file_inputs
    from ..scenarios.uncertainty import stress_test

    _check_files({"--out": out, "--excel": excel}, overwrite, _protected(plan_file),
                 _SUFFIXES)
    plan, opts, spec, n = _load(plan_file, draws, seed)
    nominal = _solve(plan, method=opts.method, time_limit=opts.time_limit,
                     threads=opts.threads, tolerance=opts.tolerance, progress=False)
    if not nominal.ok:
        click.echo(str(nominal.summary()))
        click.echo("The nominal plan has no optimum: nothing to stress-test.")
        _exit(_exit_code(nominal))
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
    _exit(EXIT_OK)


@main.command(help="Solve a plan file again in every drawn economy (the uncertainty section "
              "says what is uncertain). Prints the probability that the plan is feasible and "
              "quantiles of its objective and key figures.")
@click.argument("plan_file", type=click.Path(path_type=Path))
@_analysis_options
def reoptimise(plan_file: Path, draws: int | None, seed: int | None, workers: int,
               out: Path | None, excel: Path | None, overwrite: bool, progress: bool) -> None:
    from ..io.planfile import plan_file_inputs
    from ..scenarios.uncertainty import reoptimise as run

    _check_files({"--out": out, "--excel": excel}, overwrite, _protected(plan_file),
                 _SUFFIXES)
    plan, opts, spec, n = _load(plan_file, draws, seed)
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
    click.echo(f"Re-optimisation of {plan_file.name}: {n} drawn economies (seed {spec.seed}); "
               f"{len(result.failed)} draws failed.")
    whole = prob[prob["condition"] == "plan"]
    if len(whole):
        click.echo(f"Probability that the plan is feasible: "
                   f"{float(whole['probability'].iloc[0]):.3f} "
                   f"({int(whole['draws'].iloc[0])} draws)")
    click.echo("Key figures over the draws (5 %, median, 95 %):")
    click.echo(quant.to_string(float_format=lambda v: f"{v:.6g}"))
    _write(out, excel, {"draws": result.table, "probability": prob,
                        "figures": figures.reset_index(),
                        "quantiles": quant.reset_index()}, "draws", overwrite,
           tuple(plan_file_inputs(plan_file)))
    _exit(EXIT_OK)


@main.command(help="Revise a plan file from a later year, given the capacity starts "
              "actually made before it (ACTUALS: CSV with columns year,sector,starts). "
              "Solves the original and the revised plan and prints their comparison.")
@click.argument("plan_file", type=click.Path(path_type=Path))
@click.argument("actuals", type=click.Path(path_type=Path))
@click.option("--from-year", type=int, required=True,
              help="First year of the revised plan (a plan year after the first).")
@_csv_out
@_xlsx_out
@_overwrite
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
    _input_file(plan_file, "plan file")
    _input_file(actuals, "actuals")
    with _reading(plan_file):
        plan, opts = load_plan_file(plan_file)
    with _reading(actuals):
        done = read_actuals(actuals)
    new_plan = revised_plan(plan, done, from_year)  # checked before anything is solved
    options = {"method": opts.method, "time_limit": opts.time_limit, "threads": opts.threads,
               "tolerance": opts.tolerance, "progress": progress}
    original = _solve(plan, **options)
    if not original.ok:
        click.echo(str(original.summary()))
        click.echo("The original plan has no optimum: nothing to compare with.")
        _exit(_exit_code(original))
    result = _solve(new_plan, **options)
    click.echo(str(result.summary()))
    if not result.ok:
        click.echo(f"The revised plan from {from_year} has no optimum.")
        if result.diagnosis is not None and not result.diagnosis.shortfalls.empty:
            click.echo("\nShortfalls (elastic re-solve):")
            click.echo(result.diagnosis.shortfalls.to_string(index=False))
        _exit(_exit_code(result))
    table = compare(original, result)
    per_year = table.groupby(["quantity", "year"])[["a", "b", "difference"]].sum()
    per_year = per_year.rename(columns={"a": "original", "b": "revised"}).reset_index()
    click.echo(f"\nOriginal and revised plan from {from_year}, summed over sectors:")
    click.echo(per_year.to_string(index=False, float_format=lambda v: f"{v:.6g}"))
    click.echo(f"objective: original {original.objective:.6g}, revised {result.objective:.6g}")
    _write(out, excel, {"comparison": table, "per_year": per_year}, "comparison", overwrite,
           (*plan_file_inputs(plan_file), actuals))
    _exit(_exit_code(result))
