"""The ``growthplan`` command line.

Exit codes: 0 optimal plan (or success), 1 infeasible plan, 2 invalid input,
3 solver failure (time limit, interrupt, unverified result), 4 unbounded plan.
User errors print one message, never a traceback.
"""

from __future__ import annotations

import json
import sys
import warnings
from pathlib import Path

import click
import numpy as np

from .errors import GrowthplanError, InvalidInput

EXIT_OK, EXIT_INFEASIBLE, EXIT_INVALID, EXIT_SOLVER, EXIT_UNBOUNDED = 0, 1, 2, 3, 4


def _fail(exc: Exception) -> None:
    click.echo(f"error: {exc}", err=True)
    sys.exit(EXIT_INVALID if isinstance(exc, InvalidInput | ValueError) else EXIT_SOLVER)


def _exit_code(result) -> int:
    from . import Status

    return {Status.OPTIMAL: EXIT_OK, Status.INFEASIBLE: EXIT_INFEASIBLE,
            Status.UNBOUNDED: EXIT_UNBOUNDED}.get(result.status, EXIT_SOLVER)


def _report(result, out: Path | None, excel: Path | None, charts: Path | None,
            overwrite: bool) -> None:
    click.echo(str(result.summary()))
    if result.diagnosis is not None and not result.diagnosis.shortfalls.empty:
        click.echo("\nShortfalls (elastic re-solve):")
        click.echo(result.diagnosis.shortfalls.to_string(index=False))
    if not result.ok:
        return
    if out is not None:
        click.echo(f"wrote {result.to_csv(out, overwrite=overwrite)}")
    if excel is not None:
        click.echo(f"wrote {result.to_excel(excel, overwrite=overwrite)}")
    if charts is not None:
        import matplotlib

        matplotlib.use("Agg")
        from .plot import save_charts

        for p in save_charts(result, charts, overwrite=overwrite):
            click.echo(f"wrote {p}")


_out = click.option("--out", type=click.Path(path_type=Path), default=None,
                    help="Write every schedule as CSV into this new folder.")
_excel = click.option("--excel", type=click.Path(path_type=Path), default=None,
                      help="Write every schedule as a sheet of this new workbook.")
_charts = click.option("--charts", type=click.Path(path_type=Path), default=None,
                       help="Save the standard charts as PNG files into this folder.")
_overwrite = click.option("--overwrite", is_flag=True,
                          help="Replace existing output files and folders.")


@click.group(help="Multi-year growth planning of multi-sector economies. Exit codes: 0 "
             "optimal, 1 infeasible, 2 invalid input, 3 solver failure, 4 unbounded.")
@click.version_option(package_name="growthplan")
def main() -> None:
    pass


@main.command(help="Solve a plan file (YAML or TOML) and print a summary.")
@click.argument("plan_file", type=click.Path(path_type=Path))
@_out
@_excel
@_charts
@_overwrite
@click.option("--progress/--no-progress", default=True, show_default=True,
              help="Show the solver's progress.")
@click.option("--method", default=None, help="HiGHS method: auto, simplex, ipm, ipm-crossover.")
@click.option("--time-limit", type=float, default=None, help="Seconds for the solver.")
def solve(plan_file: Path, out, excel, charts, overwrite: bool, progress: bool, method,
          time_limit) -> None:
    from .io.planfile import load_plan_file

    try:
        plan, opts = load_plan_file(plan_file)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            result = plan.solve(method=method or opts.method,
                                time_limit=time_limit or opts.time_limit,
                                threads=opts.threads, tolerance=opts.tolerance,
                                progress=progress)
        _report(result, out, excel, charts, overwrite)
    except GrowthplanError as exc:
        _fail(exc)
    sys.exit(_exit_code(result))


@main.command(help="Check a plan file without solving: validation and productiveness.")
@click.argument("plan_file", type=click.Path(path_type=Path))
def check(plan_file: Path) -> None:
    from .io.planfile import load_plan_file

    try:
        plan, _ = load_plan_file(plan_file)
        econ = plan.economy
        lp = plan.compile()
        click.echo(f"{plan_file}: valid")
        click.echo(f"  {econ.n} sectors, years {plan.years[0]}–{plan.years[-1]}, "
                   f"{len(plan.targets)} targets, objective {type(plan.objective).__name__}")
        click.echo(f"  spectral radius of the input coefficients {econ.spectral_radius():.6f} "
                   "(productive)")
        click.echo(f"  LP: {lp.shape[0]} rows, {lp.shape[1]} columns, {lp.nnz} nonzeros")
    except GrowthplanError as exc:
        _fail(exc)


@main.command(help="Print the steady-state figures of an economy given as tables.")
@click.argument("flows", type=click.Path(path_type=Path))
@click.option("--capital", type=click.Path(path_type=Path), default=None,
              help="Capital table (one row per sector).")
@click.option("--capital-stocks", type=click.Path(path_type=Path), default=None,
              help="Capital stocks, commodities × sectors.")
def steady(flows: Path, capital: Path | None, capital_stocks: Path | None) -> None:
    from .economy import Economy

    try:
        econ = Economy.from_tables(flows, capital=capital, capital_stocks=capital_stocks)
        click.echo(f"{econ.n} sectors; spectral radius {econ.spectral_radius():.6f}")
        table = econ.output_multipliers().to_frame()
        if econ.labour_coefficients is not None:
            table = table.join(econ.labour_content().T.add_prefix("labour_content_"))
        bg = econ.balanced_growth()
        table["static_balanced"] = bg.proportions
        click.echo(f"static balanced growth rate {100 * bg.rate:.3f} %")
        if econ.capital is not None and np.any(econ.capital_coefficients):
            dyn = econ.dynamic_balanced_growth()
            click.echo(f"dynamic balanced growth rate with replacement {100 * dyn.rate:.3f} %")
            table["dynamic_balanced"] = dyn.proportions
        click.echo(table.round(4).to_string())
    except GrowthplanError as exc:
        _fail(exc)


@main.command(help="Print the JSON Schema of plan files.")
def schema() -> None:
    from .io.planfile import plan_file_schema

    click.echo(json.dumps(plan_file_schema(), indent=2))


@main.command(help="Solve the demo plan of the invented Republic of Arvenna and print it.")
@_out
@_excel
@_charts
@_overwrite
@click.option("--progress/--no-progress", default=True, show_default=True)
def demo(out, excel, charts, overwrite: bool, progress: bool) -> None:
    from .demo import DEMO_DIR, PLAN_FILE
    from .io.planfile import load_plan_file

    try:
        plan, _ = load_plan_file(DEMO_DIR / PLAN_FILE)
        econ = plan.economy
        bg = econ.dynamic_balanced_growth()
        click.echo("The Republic of Arvenna (an invented country) plans its development "
                   f"for {plan.years[0]}–{plan.years[-1]}.")
        click.echo(f"Its ten-sector economy is productive (spectral radius of the input "
                   f"coefficients {econ.spectral_radius():.3f}); with no consumption its "
                   f"capital could grow at most {100 * bg.rate:.1f} % a year.")
        click.echo("The plan guarantees households a consumption level rising 2 % a year, "
                   "meets an energy-capacity and a machinery-output target, respects the "
                   "labour supply (+1.2 % a year) and maximises capacity at the end, in "
                   "balanced proportions, growing on at 4 % after the plan.\n")
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            result = plan.solve(progress=progress)
        _report(result, out, excel, charts, overwrite)
        if result.ok:
            click.echo("\nOutput by sector in the first, middle and last plan year:")
            click.echo(result.output.iloc[[0, plan.horizon // 2, -1]].T.round(0).to_string())
            click.echo("\nWhat binds first (value of one more unit, first plan year):")
            b = result.bottlenecks(top=5)
            click.echo(b[b.year == plan.years[0]].to_string(index=False))
    except GrowthplanError as exc:
        _fail(exc)
    sys.exit(_exit_code(result))


if __name__ == "__main__":  # pragma: no cover
    main()
