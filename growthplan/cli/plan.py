"""The plan commands: solve, check, steady, schema and demo."""

from __future__ import annotations

import importlib.util
import json
from pathlib import Path
from typing import TYPE_CHECKING, Any

import click
import numpy as np

from ..backends.methods import METHODS
from ..errors import InvalidInput, invalid
from .base import (
    charts_option,
    check_outputs,
    distinct_outputs,
    excel_option,
    exit_with,
    first_year_binding,
    input_file,
    key_schedules,
    main,
    next_steps,
    out_option,
    output_unit_words,
    overwrite_options,
    plural,
    positive_seconds,
    reading_input,
    report_option,
    report_result,
    result_exit_code,
    solve_stoppable,
    writing_output,
)

if TYPE_CHECKING:
    from ..model.plan import Plan


def _method_help() -> str:
    return "HiGHS method: " + ", ".join(("auto", *METHODS)) + " (default: the plan file's)."


def _solver_options(plan: Plan, method: str | None,
                    time_limit: float | None) -> dict[str, Any]:
    """The solve's settings (the options', else the plan file's), refused here as the
    solve would refuse them."""
    from ..backends.options import SolveOptions, highs_backend

    changes = {k: v for k, v in (("method", method), ("time_limit", time_limit)) if v}
    try:
        chosen = SolveOptions(**{**plan.solve_options, **changes})  # checked as every solve's
        highs_backend(chosen)  # and what this HiGHS provides (no solve)
    except InvalidInput as exc:
        raise InvalidInput(f"solve.{exc}", field=f"solve.{exc.field}") from None
    return chosen.keywords()


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
@out_option
@excel_option
@report_option
@charts_option
@overwrite_options
@click.option("--progress/--no-progress", default=True, show_default=True,
              help="Show the solver's progress.")
@click.option("--method", type=click.Choice(["auto", *METHODS]), default=None, metavar="METHOD",
              help=_method_help())
@click.option("--time-limit", type=float, default=None, callback=positive_seconds,
              help="Seconds for the solver, more than 0 (default: the plan file's, or none).")
def solve(plan_file: Path, out: Path | None, excel: Path | None, report: Path | None,
          charts: Path | None, overwrite: bool, progress: bool, method: str | None,
          time_limit: float | None) -> None:
    from .. import load_plan_file

    check_outputs(out, excel, charts, overwrite, inputs=(plan_file,), report=report)
    with reading_input(plan_file):
        plan = load_plan_file(input_file(plan_file, "plan file"))
    chosen = _solver_options(plan, method, time_limit)
    result = solve_stoppable(plan, **chosen, progress=progress)
    from ..io.planfile import plan_file_inputs

    report_result(result, out, excel, charts, overwrite, protect=tuple(plan_file_inputs(plan_file)),
            report=report)
    key_schedules(result)
    if result.ok or result.diagnosis is not None:
        _targets(result)  # what an edit changed that matters: met, binding, missed
    if result.ok:
        next_steps(out, excel, report, charts)
    exit_with(result_exit_code(result))


@main.command(help="Check a plan file without solving: the validation and settings the "
              "solve would refuse, productiveness, the LP's size.")
@click.argument("plan_file", type=click.Path(path_type=Path))
def check(plan_file: Path) -> None:
    from .. import load_plan_file

    with reading_input(plan_file):
        plan = load_plan_file(input_file(plan_file, "plan file"))
    chosen = _solver_options(plan, None, None)
    _needs_capital(plan)
    econ = plan.economy
    from ..backends.options import SolveOptions, highs_backend
    from ..solve import formulation_for

    form, rule = formulation_for(plan.lowered(), highs_backend(SolveOptions.of(**chosen)))
    lp = plan.compile(formulation=form)  # the size guard and the build the solve runs first
    click.echo(f"{plan_file}: valid")
    click.echo(f"  {plural(econ.n, 'sector')}, years {plan.years[0]}–{plan.years[-1]}, "
               f"{plural(len(plan.targets), 'target')}, objective "
               f"{plan.objective.kind}, method {chosen['method']}")
    click.echo(f"  spectral radius of the input coefficients {econ.spectral_radius():.6f} "
               "(productive)")
    click.echo(f"  LP: {plural(lp.shape[0], 'row')}, {plural(lp.shape[1], 'column')}, "
               f"{plural(lp.nnz, 'nonzero')}")
    click.echo(f"  solver: {rule}")


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

    input_file(flows, "flows")
    given = (("--capital", capital), ("--capital-stocks", capital_stocks),
             ("--capital-coefficients", capital_coefficients))
    for what, p in given:
        if p is not None:
            input_file(p, what)
    if capital_stocks is not None and capital_coefficients is not None:
        raise invalid("--capital-stocks", "not come with --capital-coefficients (give one)",
                      str(capital_stocks))
    if (capital_stocks is not None or capital_coefficients is not None) and capital is None:
        raise invalid("--capital", "be given with --capital-stocks or --capital-coefficients "
                      "(its lives and lead times turn them into growth)", None)
    if capital is not None and capital_stocks is None and capital_coefficients is None:
        raise invalid("--capital", "come with --capital-stocks or --capital-coefficients "
                      "(the dynamic balanced growth needs capital coefficients)", str(capital))
    with reading_input(flows):
        econ = Economy.from_tables(flows, capital=capital, capital_stocks=capital_stocks,
                                   capital_coefficients=capital_coefficients)
    click.echo(f"{plural(econ.n, 'sector')}; spectral radius of the input coefficients "
               f"{econ.spectral_radius():.6f} (below 1: productive)")
    units = sorted(set(econ.units))
    unit = units[0] if len(units) == 1 else "the sector's own unit"
    legend = [f"output multiplier: output of all sectors ({unit}) per {unit} of the "
              "sector's final demand"]
    table = econ.output_multipliers().to_frame("output multiplier").map(lambda v: f"{v:.4f}")
    if econ.labour_coefficients is not None:
        content = econ.labour_content().T
        kinds = dict(zip(econ.labour_kinds or ["labour"], econ.labour_unit_names,
                         strict=False))
        for k in content.columns:
            name = "labour content" if k == "labour" else f"labour content {k}"
            legend.append(f"{name}: {kinds.get(k, 'person-years')} per {unit} of the "
                          "sector's final demand")
            table[name] = [f"{v:.4f}" for v in content[k]]
    bg = econ.balanced_growth()
    table["static balanced"] = [f"{100 * v:.2f} %" for v in bg.proportions]
    legend.append("balanced: each sector's share of the balanced-growth "
                  "output bundle")
    click.echo(f"static balanced growth rate (current inputs only, ignoring capital) "
               f"{100 * bg.rate:.3f} % a year")
    if capital is not None:
        if not np.any(econ.capital_coefficients):
            raise invalid("--capital-stocks" if capital_stocks is not None
                          else "--capital-coefficients", "hold some capital goods (all are "
                          "zero, so capacity would cost nothing)", "all zero")
        dyn = econ.dynamic_balanced_growth()
        click.echo(f"dynamic balanced growth rate (with capital and its replacement) "
                   f"{100 * dyn.rate:.3f} % a year")
        table["dynamic balanced"] = [f"{100 * v:.2f} %" for v in dyn.proportions]
    click.echo("\nUnits: " + "; ".join(legend) + ".")
    click.echo(table.to_string())


@main.command(help="Print the JSON Schema of plan files.")
def schema() -> None:
    from .. import plan_file_schema

    click.echo(json.dumps(plan_file_schema(), indent=2))


@main.command(help="Solve the demo plan of the invented Republic of Arvenna and explain it.")
@out_option
@excel_option
@report_option
@charts_option
@overwrite_options
@click.option("--progress/--no-progress", default=True, show_default=True,
              help="Show the solver's progress.")
@click.option("--copy", "copy_to", type=click.Path(path_type=Path), default=None,
              help="Write the demo's plan file and tables into this folder, to edit and "
                   "solve with 'growthplan solve FOLDER/plan.yaml', and stop.")
def demo(out: Path | None, excel: Path | None, report: Path | None, charts: Path | None,
         overwrite: bool, progress: bool, copy_to: Path | None) -> None:
    from .. import load_plan_file
    from ..demo import DEMO_DIR, PLAN_FILE, copy_demo

    if copy_to is not None:
        distinct_outputs({"--copy": copy_to})  # a path the system refuses: said in one line
        if copy_to.exists() and not overwrite and (not copy_to.is_dir()
                                                   or any(copy_to.iterdir())):
            raise invalid("--copy", "name a new or empty folder (pass --overwrite to replace "
                          "the demo files written there before)", str(copy_to))
        with writing_output(copy_to):
            written = copy_demo(copy_to, overwrite=overwrite)
        click.echo(f"wrote {', '.join(str(p) for p in written)}")
        click.echo(f"Edit {written[0]}, then: growthplan solve {written[0]}")
        return
    check_outputs(out, excel, charts, overwrite, report=report)
    has_plot = importlib.util.find_spec("matplotlib") is not None
    if charts is not None and not has_plot:  # said before the solve, not after it
        raise invalid("--charts", "be used with matplotlib installed (pip install "
                      "'growthplan[plot]')", str(charts))
    with reading_input(DEMO_DIR / PLAN_FILE):
        plan = load_plan_file(DEMO_DIR / PLAN_FILE)
    econ = plan.economy
    bg = econ.dynamic_balanced_growth()
    money = econ.value_unit
    sector_units = set(econ.units)
    labour_unit = ", ".join(econ.labour_units or ["person-years"])
    first, last = plan.years[0], plan.years[-1]
    units = (f"each sector's output, capacity and capacity started in {money} a year (the "
             "tables are in money)" if sector_units == {money} else
             "each sector's output, capacity and capacity started in its own unit a year "
             f"({', '.join(sorted(sector_units))})")
    _say_wrapped(f"The Republic of Arvenna (an invented country) plans its development for "
                 f"{first}–{last}.")
    _say_wrapped(f"Units: {units}; labour in {labour_unit}; consumption in baskets, one "
                 f"basket worth {float(econ.prices @ _basket(plan)):,.4g} {money}.")
    _say_wrapped(f"Its {econ.n}-sector economy is productive (spectral radius of the input "
                 f"coefficients {econ.spectral_radius():.3f}); with no consumption its "
                 f"capital could grow at most {100 * bg.rate:.1f} % a year.")
    _say_wrapped("The plan guarantees households a consumption level rising 2 % a year, "
                 "meets an energy-capacity and a machinery-output target, respects the "
                 "labour supply (+1.2 % a year) and maximises capacity at the end, in "
                 "balanced proportions, growing on at 4 % after the plan.")
    click.echo()
    result = solve_stoppable(plan, progress=progress)
    report_result(result, out, excel, charts, overwrite, report=report)
    if result.ok:
        shown = [0, plan.horizon // 2, plan.horizon - 1]
        click.echo(f"\nOutput by sector ({output_unit_words(result)}) in the first, middle and "
                   "last plan year:")
        click.echo(result.output.iloc[shown].T.round(0).to_string())
        assert result.data is not None
        level = result.consumption["level"].to_numpy()
        floor = result.data.floor
        on_floor = int((level <= floor * (1 + 1e-6) + 1e-9).sum())
        click.echo()
        _say_wrapped(f"Consumption (baskets a year): {level[0]:,.0f} in {first} (floor "
                     f"{floor[0]:,.0f}), {level[-1]:,.0f} in {last} (floor {floor[-1]:,.0f}); "
                     f"at the floor in {on_floor} of {plan.horizon} years: the plan invests "
                     "what it does not have to consume.")
        _targets(result)
        click.echo()
        _say_wrapped("The objective: " + _objective_words(result))
        click.echo()
        b = first_year_binding(result, plan.years[0])
        _say_wrapped("What binds first, in the first plan year: value is what one more "
                     "unit of the commodity (or of the sector's capacity) would add to the "
                     "objective, in terminal bundles" + (
                         "; per_value is the same per unit of base-year value."
                         if "per_value" in b else
                         " (every base-year price is 1, so per unit of base-year value too)."))
        click.echo(b.to_string(index=False))
        # what this run did not write yet, then the way to a plan of one's own
        steps = [(report, "  growthplan demo --report arvenna.html   one page to open in a "
                  "browser (charts, targets, accounts)"),
                 (excel, "  growthplan demo --excel arvenna.xlsx    the workbook, one sheet "
                  "per schedule, with units"),
                 (out, "  growthplan demo --out arvenna           every schedule as CSV"),
                 (charts, "  growthplan demo --charts charts         the charts as PNG files"
                  + ("" if has_plot else " (need pip install 'growthplan[plot]')"))]
        click.echo("\nTry next:\n" + "".join(line + "\n" for given, line in steps
                                              if given is None)
                   + "  growthplan demo --copy my-plan          the plan file and tables, to "
                   "edit my-plan/plan.yaml\n"
                   "                                          (data/demo/plan.yaml in a "
                   "source checkout)\n"
                   "  growthplan solve my-plan/plan.yaml      then solve your version"
                   + ("" if has_plot else "\n(charts need matplotlib: "
                      "pip install 'growthplan[plot]')"))
    exit_with(result_exit_code(result))


def _targets(result: Any) -> None:
    """Each target in words: met (with its margin), binding (met exactly) or missed."""
    from ..results.report import targets_table

    targets = targets_table(result)
    if targets.empty:
        return
    click.echo("\nTargets:")
    for t in targets.itertuples():
        tight = abs(t.margin) <= 1e-6 * max(1.0, abs(t.required))
        if t.verdict == "met":
            verdict = "binding (met exactly)" if tight else f"met, margin {t.margin:+,.0f}"
        elif t.verdict == "missed":
            verdict = f"missed by {-t.margin:,.0f}"
        else:
            verdict = str(t.verdict)
        reached = "" if np.isnan(t.reached) else f", reached {t.reached:,.0f}"
        unit = f" ({t.unit} a year)" if t.unit else ""  # a sector's output or capacity
        _say_wrapped(f"{t.target} in {t.year}: {verdict}; required {t.required:,.0f}"
                     f"{reached}{unit}", indent="  ")


def _basket(plan: Any) -> np.ndarray:
    """The demo's consumption basket as an array over the sectors (zeros without one)."""
    from ..lp.data import basket

    return basket(plan)


def _objective_words(result: Any) -> str:
    """The demo's objective value in words and units."""
    unit = result.plan.economy.value_unit
    after = result.plan.years[-1] + 1
    if result.level is None:
        return f"value {result.objective:,.6g} ({type(result.plan.objective).__name__})."
    return (f"the capacity in service in {after}, the year after the plan, counted in "
            "bundles of the balanced-growth proportions, each bundle able to make 1 "
            f"{unit} of output a year. The optimum is {result.level:,.0f} bundles: in {after} "
            f"Arvenna can make output worth at least {result.level:,.0f} {unit} a year in "
            "balanced proportions. Capacity beyond those proportions adds nothing to the "
            "objective; all capacity then in service could make "
            f"{result.terminal_value:,.0f} {unit} a year.")


def _say_wrapped(text: str, indent: str = "") -> None:
    """One paragraph wrapped to 88 columns (the demo is read in a terminal)."""
    import textwrap

    click.echo(textwrap.fill(text, width=88, initial_indent=indent,
                             subsequent_indent=indent + ("  " if indent else "")))
