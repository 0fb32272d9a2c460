"""The plan commands: solve, check, steady, schema and demo."""

from __future__ import annotations

import json
from pathlib import Path

import click
import numpy as np

from ..errors import invalid
from .base import (
    _charts,
    _check_outputs,
    _excel,
    _exit,
    _exit_code,
    _finite,
    _input_file,
    _out,
    _overwrite,
    _reading,
    _report,
    _report_opt,
    _solve,
    main,
)


@main.command(help="Solve a plan file (YAML or TOML) and print a summary.")
@click.argument("plan_file", type=click.Path(path_type=Path))
@_out
@_excel
@_report_opt
@_charts
@_overwrite
@click.option("--progress/--no-progress", default=True, show_default=True,
              help="Show the solver's progress.")
@click.option("--method", default=None,
              help="HiGHS method: auto, simplex, ipm, ipm-crossover, pdlp.")
@click.option("--time-limit", type=click.FloatRange(min=0, min_open=True, max=1e9),
              default=None, callback=lambda ctx, param, v: _finite(v),
              help="Seconds for the solver.")
def solve(plan_file: Path, out: Path | None, excel: Path | None, report: Path | None,
          charts: Path | None, overwrite: bool, progress: bool, method: str | None,
          time_limit: float | None) -> None:
    from .. import load_plan_file
    from ..backends.highs import METHODS

    methods = METHODS  # checked before the slow part starts
    if method is not None and methods is not None and method != "auto" \
            and method not in methods:
        raise invalid("--method", f"be 'auto' or one of {sorted(methods)}", method)
    _check_outputs(out, excel, charts, overwrite, inputs=(plan_file,), report=report)
    with _reading(plan_file):
        plan, opts = load_plan_file(_input_file(plan_file, "plan file"))
    result = _solve(plan, method=method or opts.method,
                    time_limit=time_limit or opts.time_limit, threads=opts.threads,
                    tolerance=opts.tolerance, progress=progress)
    from ..io.planfile import plan_file_inputs

    _report(result, out, excel, charts, overwrite, protect=tuple(plan_file_inputs(plan_file)),
            report=report)
    _exit(_exit_code(result))


@main.command(help="Check a plan file without solving: validation and productiveness.")
@click.argument("plan_file", type=click.Path(path_type=Path))
def check(plan_file: Path) -> None:
    from .. import load_plan_file

    with _reading(plan_file):
        plan, _ = load_plan_file(_input_file(plan_file, "plan file"))
    econ = plan.economy
    lp = plan.compile()
    click.echo(f"{plan_file}: valid")
    click.echo(f"  {econ.n} sectors, years {plan.years[0]}–{plan.years[-1]}, "
               f"{len(plan.targets)} targets, objective {type(plan.objective).__name__}")
    click.echo(f"  spectral radius of the input coefficients {econ.spectral_radius():.6f} "
               "(productive)")
    click.echo(f"  LP: {lp.shape[0]} rows, {lp.shape[1]} columns, {lp.nnz} nonzeros")


@main.command(help="Print the steady-state figures of an economy given as tables.")
@click.argument("flows", type=click.Path(path_type=Path))
@click.option("--capital", type=click.Path(path_type=Path), default=None,
              help="Capital table (one row per sector).")
@click.option("--capital-stocks", type=click.Path(path_type=Path), default=None,
              help="Capital stocks, commodities × sectors.")
def steady(flows: Path, capital: Path | None, capital_stocks: Path | None) -> None:
    from .. import Economy

    _input_file(flows, "flows")
    for what, p in (("--capital", capital), ("--capital-stocks", capital_stocks)):
        if p is not None:
            _input_file(p, what)
    with _reading(flows):
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


@main.command(help="Print the JSON Schema of plan files.")
def schema() -> None:
    from .. import plan_file_schema

    click.echo(json.dumps(plan_file_schema(), indent=2))


@main.command(help="Solve the demo plan of the invented Republic of Arvenna and print it.")
@_out
@_excel
@_report_opt
@_charts
@_overwrite
@click.option("--progress/--no-progress", default=True, show_default=True)
def demo(out: Path | None, excel: Path | None, report: Path | None, charts: Path | None,
         overwrite: bool, progress: bool) -> None:
    from .. import load_plan_file
    from ..demo import DEMO_DIR, PLAN_FILE

    _check_outputs(out, excel, charts, overwrite, report=report)
    with _reading(DEMO_DIR / PLAN_FILE):
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
    result = _solve(plan, progress=progress)
    _report(result, out, excel, charts, overwrite, report=report)
    if result.ok:
        click.echo("\nOutput by sector in the first, middle and last plan year:")
        click.echo(result.output.iloc[[0, plan.horizon // 2, -1]].T.round(0).to_string())
        click.echo("\nWhat binds first (value of one more unit, first plan year):")
        b = result.bottlenecks(top=5)
        click.echo(b[b.year == plan.years[0]].to_string(index=False))
    _exit(_exit_code(result))
