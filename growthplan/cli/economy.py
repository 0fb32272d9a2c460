"""The economy commands: build an economy from supply and use tables."""

from __future__ import annotations

from pathlib import Path

import click

from .base import _check_outputs, _input_file, _overwrite, _reading, _writing, main


@main.group(help="Economies from the statistical office's tables.")
def economy() -> None:
    pass


@economy.command(help="Build an economy from an economy spec (supply and use, employment and "
                 "capital tables, or the tables as an office publishes them) and write its "
                 "coefficient tables, economy.yaml and assumptions.md into a new folder; "
                 "with --plan also a plan.yaml to solve.")
@click.argument("spec", type=click.Path(path_type=Path))
@click.option("--out", type=click.Path(path_type=Path), required=True,
              help="Write the economy into this new folder.")
@click.option("--plan", "with_plan", is_flag=True,
              help="Also write plan.yaml: the labour kinds, a consumption floor the base year "
                   "can keep up, and the years after the spec's base_year.")
@click.option("--years", type=click.IntRange(1, 200), default=30, show_default=True,
              help="Years of the plan written by --plan.")
@_overwrite
def build(spec: Path, out: Path, with_plan: bool, years: int, overwrite: bool) -> None:
    from ..statistics.build import _spec_inputs, build_economy, write_economy

    with _reading(spec):  # the folder is checked against the spec and its tables first
        inputs = _spec_inputs(_input_file(spec, "economy spec"))
    _check_outputs(out, None, None, overwrite, inputs=tuple(inputs),
                   input_name="the economy spec or its tables")
    with _reading(spec):
        econ, report = build_economy(spec)
        skeleton = None
        if with_plan:
            from ..statistics.build import plan_skeleton_of

            skeleton = plan_skeleton_of(econ, report, years=years)
    sym = report.symmetric
    click.echo(f"{spec}: {len(report.supply_use.products)} products, "
               f"{len(report.supply_use.industries)} industries → {econ.n} sectors "
               f"({sym.model.replace('_', ' ')} model)")
    click.echo(f"  spectral radius of the input coefficients {econ.spectral_radius():.6f}")
    if len(sym.negatives):
        click.echo(f"  {len(sym.negatives)} negative flow(s) remedied ({sym.remedy})")
    for name, (published, built) in getattr(report, "figures", {}).items():
        click.echo(f"  {name}: {built:,.0f} ({econ.value_unit}; the tables print "
                   f"{published:,.0f})")
    if skeleton is not None:
        click.echo(f"  consumption floor {skeleton.floor:,.0f} ({econ.value_unit} a year, "
                   f"{skeleton.section['years']['first']}–{skeleton.section['years']['last']})")
    with _writing(out):
        written = write_economy(econ, report, out, overwrite=overwrite, skeleton=skeleton)
    for p in written:
        click.echo(f"wrote {p}")
