"""The plan commands: solve, check, steady, schema and demo."""

from __future__ import annotations

import json
from pathlib import Path
from typing import TYPE_CHECKING, Any

import click
import numpy as np

from ..backends.highs import METHODS
from ..errors import InvalidInput, invalid
from .base import (
    _charts,
    _check_outputs,
    _excel,
    _exit,
    _exit_code,
    _input_file,
    _key_schedules,
    _next_steps,
    _out,
    _overwrite,
    _plural,
    _reading,
    _report,
    _report_opt,
    _seconds,
    _solve,
    main,
)

if TYPE_CHECKING:
    from ..io.planfile import SolveOptions
    from ..plan import Plan


def _method_help() -> str:
    return "HiGHS method: " + ", ".join(("auto", *METHODS)) + " (default: the plan file's)."


def _solver_options(opts: SolveOptions, method: str | None,
                    time_limit: float | None) -> dict[str, Any]:
    """The solve's settings, refused here as the solve would refuse them."""
    from ..backends.highs import HighsBackend

    chosen: dict[str, Any] = {"method": method or opts.method,
                              "time_limit": time_limit or opts.time_limit,
                              "threads": opts.threads, "tolerance": opts.tolerance}
    try:
        HighsBackend(chosen["method"], time_limit=chosen["time_limit"],
                     threads=chosen["threads"], tolerance=chosen["tolerance"])  # no solve
    except InvalidInput as exc:
        raise InvalidInput(f"solve.{exc}", field=f"solve.{exc.field}") from None
    return chosen


def _needs_capital(plan: Plan) -> None:
    """Refuse a plan that maximises capacity when no capacity needs capital goods:
    the solve would find it unbounded (starts would cost nothing)."""
    econ = plan.economy
    if plan.objective.needs_level() and not np.any(econ.capital_coefficients):
        raise invalid("economy.capital_coefficients", "not be all zero when the objective "
                      "maximises capacity (capacity would cost nothing and the plan be "
                      "unbounded); give capital_stocks or capital_coefficients",
                      "all zero")


@main.command(help="Solve a plan file (YAML or TOML) and print a summary, the output by "
              "sector and what binds.")
@click.argument("plan_file", type=click.Path(path_type=Path))
@_out
@_excel
@_report_opt
@_charts
@_overwrite
@click.option("--progress/--no-progress", default=True, show_default=True,
              help="Show the solver's progress.")
@click.option("--method", type=click.Choice(["auto", *METHODS]), default=None, metavar="METHOD",
              help=_method_help())
@click.option("--time-limit", type=float, default=None, callback=_seconds,
              help="Seconds for the solver, more than 0 (default: the plan file's, or none).")
def solve(plan_file: Path, out: Path | None, excel: Path | None, report: Path | None,
          charts: Path | None, overwrite: bool, progress: bool, method: str | None,
          time_limit: float | None) -> None:
    from .. import load_plan_file

    _check_outputs(out, excel, charts, overwrite, inputs=(plan_file,), report=report)
    with _reading(plan_file):
        plan, opts = load_plan_file(_input_file(plan_file, "plan file"))
    chosen = _solver_options(opts, method, time_limit)
    result = _solve(plan, **chosen, progress=progress)
    from ..io.planfile import plan_file_inputs

    _report(result, out, excel, charts, overwrite, protect=tuple(plan_file_inputs(plan_file)),
            report=report)
    _key_schedules(result)
    if result.ok:
        _next_steps(out, excel, report, charts)
    _exit(_exit_code(result))


@main.command(help="Check a plan file without solving: the validation and settings the "
              "solve would refuse, productiveness, the LP's size.")
@click.argument("plan_file", type=click.Path(path_type=Path))
def check(plan_file: Path) -> None:
    from .. import load_plan_file

    with _reading(plan_file):
        plan, opts = load_plan_file(_input_file(plan_file, "plan file"))
    chosen = _solver_options(opts, None, None)
    _needs_capital(plan)
    econ = plan.economy
    lp = plan.compile()  # the size guard and the build the solve runs first
    click.echo(f"{plan_file}: valid")
    click.echo(f"  {_plural(econ.n, 'sector')}, years {plan.years[0]}–{plan.years[-1]}, "
               f"{_plural(len(plan.targets), 'target')}, objective "
               f"{plan.objective.kind}, method {chosen['method']}")
    click.echo(f"  spectral radius of the input coefficients {econ.spectral_radius():.6f} "
               "(productive)")
    click.echo(f"  LP: {_plural(lp.shape[0], 'row')}, {_plural(lp.shape[1], 'column')}, "
               f"{_plural(lp.nnz, 'nonzero')}")


@main.command(help="Print the steady-state figures of an economy given as tables: the "
              "static balanced growth (inputs only) and, with capital, the dynamic one.")
@click.argument("flows", type=click.Path(path_type=Path))
@click.option("--capital", type=click.Path(path_type=Path), default=None,
              help="Capital table (one row per sector); needs --capital-stocks or "
                   "--capital-coefficients.")
@click.option("--capital-stocks", type=click.Path(path_type=Path), default=None,
              help="Capital stocks, commodities × sectors (divided by capacity).")
@click.option("--capital-coefficients", type=click.Path(path_type=Path), default=None,
              help="Capital coefficients, commodities × sectors.")
def steady(flows: Path, capital: Path | None, capital_stocks: Path | None,
           capital_coefficients: Path | None) -> None:
    from .. import Economy

    _input_file(flows, "flows")
    given = (("--capital", capital), ("--capital-stocks", capital_stocks),
             ("--capital-coefficients", capital_coefficients))
    for what, p in given:
        if p is not None:
            _input_file(p, what)
    if capital_stocks is not None and capital_coefficients is not None:
        raise invalid("--capital-stocks", "not come with --capital-coefficients (give one)",
                      str(capital_stocks))
    if (capital_stocks is not None or capital_coefficients is not None) and capital is None:
        raise invalid("--capital", "be given with --capital-stocks or --capital-coefficients "
                      "(its lives and lead times turn them into growth)", None)
    if capital is not None and capital_stocks is None and capital_coefficients is None:
        raise invalid("--capital", "come with --capital-stocks or --capital-coefficients "
                      "(the dynamic balanced growth needs capital coefficients)", str(capital))
    with _reading(flows):
        econ = Economy.from_tables(flows, capital=capital, capital_stocks=capital_stocks,
                                   capital_coefficients=capital_coefficients)
    click.echo(f"{_plural(econ.n, 'sector')}; spectral radius {econ.spectral_radius():.6f}")
    table = econ.output_multipliers().to_frame()
    if econ.labour_coefficients is not None:
        table = table.join(econ.labour_content().T.add_prefix("labour_content_"))
    bg = econ.balanced_growth()
    table["static_balanced"] = bg.proportions
    click.echo(f"static balanced growth rate (current inputs only, ignoring capital) "
               f"{100 * bg.rate:.3f} %")
    if capital is not None:
        if not np.any(econ.capital_coefficients):
            raise invalid("--capital-stocks" if capital_stocks is not None
                          else "--capital-coefficients", "hold some capital goods (all are "
                          "zero, so capacity would cost nothing)", "all zero")
        dyn = econ.dynamic_balanced_growth()
        click.echo(f"dynamic balanced growth rate (with capital and its replacement) "
                   f"{100 * dyn.rate:.3f} %")
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
