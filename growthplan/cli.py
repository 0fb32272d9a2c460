"""The ``growthplan`` command line.

Exit codes: 0 optimal (or success), 1 infeasible plan, 2 invalid input,
3 solver failure (time limit, interrupt, unverified result), 4 unbounded.
"""

from __future__ import annotations

import sys
import warnings
from pathlib import Path

import click

from .errors import GrowthplanError, InvalidInput

EXIT_OK, EXIT_INFEASIBLE, EXIT_INVALID, EXIT_SOLVER, EXIT_UNBOUNDED = 0, 1, 2, 3, 4


def _fail(exc: Exception) -> None:
    click.echo(f"error: {exc}", err=True)
    sys.exit(EXIT_INVALID if isinstance(exc, InvalidInput | ValueError) else EXIT_SOLVER)


@click.group(help="Multi-year growth planning of multi-sector economies.")
@click.version_option(package_name="growthplan")
def main() -> None:
    pass


@main.command(help="Solve the demo plan of the invented Republic of Arvenna and print it.")
@click.option("--out", type=click.Path(path_type=Path), default=None,
              help="Write the schedules as CSV files into this new folder.")
@click.option("--overwrite", is_flag=True, help="Replace an existing --out folder.")
def demo(out: Path | None, overwrite: bool) -> None:
    from .demo import demo_plan
    from .solvers import Status

    try:
        plan = demo_plan()
        econ = plan.economy
        bg = econ.dynamic_balanced_growth()
        click.echo("Republic of Arvenna (an invented economy), ten sectors")
        click.echo(f"  spectral radius of the input coefficients: {econ.spectral_radius():.4f}")
        click.echo(f"  maximal balanced growth with capital replacement: {100 * bg.rate:.2f} % "
                   "a year (no consumption)")
        click.echo(f"Plan {plan.years[0]}–{plan.years[-1]}: terminal capacity in balanced "
                   "proportions, consumption floor +2 % a year, labour +1.2 % a year\n")
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            result = plan.solve()
        click.echo(str(result.summary()))
        if result.ok:
            click.echo("\nOutput by sector, first, middle and last plan year:")
            rows = result.output.iloc[[0, plan.horizon // 2, -1]].T.round(0)
            click.echo(rows.to_string())
        if out is not None and result.ok:
            click.echo(f"\nwrote {result.to_csv(out, overwrite=overwrite)}")
    except GrowthplanError as exc:
        _fail(exc)
    sys.exit(EXIT_OK if result.status is Status.OPTIMAL else EXIT_SOLVER)


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
        if econ.capital is not None and econ.capital_coefficients.any():
            dyn = econ.dynamic_balanced_growth()
            click.echo(f"dynamic balanced growth rate with replacement {100 * dyn.rate:.3f} %")
            table["dynamic_balanced"] = dyn.proportions
        click.echo(table.round(4).to_string())
    except GrowthplanError as exc:
        _fail(exc)


if __name__ == "__main__":  # pragma: no cover
    main()
