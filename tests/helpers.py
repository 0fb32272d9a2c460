"""Shared test helpers: plans used by tests and benchmarks alike (imported by both)."""

from __future__ import annotations

from pathlib import Path

import numpy as np

import growthplan as gp

__all__ = ["economy", "make_plan", "rescale", "two_sector", "random_plan", "regional_economy",
           "bea_tables", "bea_spec", "bea_economy", "bea_plan", "BEA_SIZES"]

BEA_SIZES = (15, 71)
"""Industries of the published BEA 2021 supply and use tables the tests read."""


def economy(n: int, seed: int = 1) -> gp.Economy:
    """A dense random productive economy with n sectors (20-year geometric lives)."""
    rng = np.random.default_rng(seed)
    a = rng.uniform(0, 1, (n, n))
    a *= 0.6 / a.sum(axis=0).max()
    b = rng.uniform(0, 1, (n, n))
    b *= 2.0 / b.sum(axis=0).max()
    names = [f"s{i}" for i in range(n)]
    cap = {s: gp.CapitalSpec(initial_capacity=float(rng.uniform(50, 150)),
                             mean_service_life=20.0) for s in names}
    return gp.Economy(sectors=names, input_coefficients=a, capital_coefficients=b,
                      labour_coefficients=[rng.uniform(0.1, 1.0, n)], capital=cap)


def make_plan(econ: gp.Economy, years: int) -> gp.Plan:
    """A terminal-capacity plan with a labour limit growing 1 % a year."""
    supply = float((np.asarray(econ.labour_coefficients) @ np.full(econ.n, 100.0))[0])
    return gp.Plan(economy=econ, years=range(2030, 2030 + years),
                   labour=gp.LabourSupply(start=supply, growth=0.01),
                   objective=gp.objectives.TerminalCapacity(
                       proportions={s: 1.0 for s in econ.names}))


def rescale(plan: gp.Plan, sector: str, f: float) -> gp.Plan:
    """The same plan with ``sector`` measured in a unit ``1/f`` as large.

    Its quantities are multiplied by ``f`` and its base-year price divided by
    ``f``: input, capital and labour coefficients, initial capacity, the
    consumption basket, exogenous demand and targets on it change accordingly,
    so the plan is the same plan in other units.
    """
    econ = plan.economy
    j = econ.names.index(sector)
    s = np.ones(econ.n)
    s[j] = f
    a = s[:, None] * np.asarray(econ.input_coefficients) / s[None, :]
    b = s[:, None] * np.asarray(econ.capital_coefficients) / s[None, :]
    lab = None if econ.labour_coefficients is None else \
        np.asarray(econ.labour_coefficients) / s[None, :]
    cap = {k: v.model_copy(update={"initial_capacity": v.initial_capacity * s[i]})
           for i, (k, v) in enumerate(econ.capital.items())}
    sectors = [gp.Sector(name=x.name, unit=f"{x.unit or econ.value_unit} / {f:g}"
                         if i == j else x.unit, price=x.price / s[i])
               for i, x in enumerate(econ.sectors)]
    basket = None if econ.consumption_basket is None else \
        np.asarray(econ.consumption_basket) * s
    new_econ = gp.Economy(sectors=sectors, input_coefficients=a, capital_coefficients=b,
                          labour_coefficients=lab, labour_kinds=econ.labour_kinds,
                          labour_units=econ.labour_units, capital=cap,
                          consumption_basket=basket, value_unit=econ.value_unit,
                          base_output=None if econ.base_output is None
                          else np.asarray(econ.base_output) * s)
    fields = {k: getattr(plan, k) for k in type(plan).model_fields}
    fields["economy"] = new_econ
    targets = []
    for t in plan.targets:
        if t.sector == sector and t.quantity != "consumption":
            targets.append(t.model_copy(update={f"{t.quantity}_at_least": t.required * f}))
        else:
            targets.append(t)
    fields["targets"] = targets
    if isinstance(plan.final_demand, dict) and sector in plan.final_demand:
        fd = dict(plan.final_demand)
        v = fd[sector]
        fd[sector] = v * f if isinstance(v, int | float) else [x * f for x in v]
        fields["final_demand"] = fd
    if plan.consumption is not None and plan.consumption.basket:
        basket_d = dict(plan.consumption.basket)
        if sector in basket_d:
            basket_d[sector] *= f
        fields["consumption"] = plan.consumption.model_copy(update={"basket": basket_d})
    return gp.Plan(**fields)


def two_sector() -> gp.Economy:
    """Machinery is the capital good; food is consumed. Invented for these tests."""
    return gp.Economy(
        sectors=["food", "machinery"], input_coefficients=[[0.2, 0.1], [0.1, 0.2]],
        capital_coefficients=[[0.0, 0.0], [1.5, 2.0]], labour_coefficients=[[0.4, 0.3]],
        consumption_basket=[1.0, 0.0],
        capital={"food": gp.CapitalSpec(initial_capacity=100, mean_service_life=20),
                 "machinery": gp.CapitalSpec(initial_capacity=40, mean_service_life=15)})


def random_plan(seed: int, n: int, T: int, profile: str = "geometric",
                lead: int = 1) -> tuple[gp.Plan, np.ndarray]:
    """A random plan with labour, a consumption floor and terminal growth, and ``I − A``."""
    from conftest import random_economy

    rng = np.random.default_rng(seed)
    econ = random_economy(rng, n, profile=profile, lead=lead)
    base = (np.eye(n) - econ.input_coefficients)
    supply = float(np.asarray(econ.labour_coefficients).sum() * 120)
    return gp.Plan(economy=econ, years=range(2030, 2030 + T),
                   labour=gp.LabourSupply(start=supply, growth=0.01),
                   consumption=gp.Consumption(floor=float(rng.uniform(1, 5))),
                   terminal=gp.TerminalGrowth(rate=0.02)), base


def switch_plan() -> gp.Plan:
    """One good made two ways: base (capital 0.4, labour 1) and a labour-saving
    alternative (capital 0.45, labour 0.5); capital lasts one year and labour
    grows 5 % a year, so the alternative is first started in 2032 (the closed
    form is derived in tests/lp/test_techniques.py)."""
    econ = gp.Economy(sectors=["goods"], input_coefficients=[[0.5]],
                      capital_coefficients=[[0.4]], labour_coefficients=[[1.0]],
                      capital={"goods": gp.CapitalSpec(initial_capacity=100,
                                                       mean_service_life=1,
                                                       retirement="sudden_exit")})
    return gp.Plan(economy=econ, years=range(2030, 2038),
                   labour=gp.LabourSupply(start=150, growth=0.05),
                   techniques=[gp.Technique(sector="goods", label="saving", labour=0.5,
                                            capital={"goods": 0.45})])


def bea_tables(size: int) -> tuple[Path, Path] | None:
    """The BEA 2021 supply ("make") and use tables of ``size`` industries, or None.

    Public-domain tables of the United States Bureau of Economic Analysis, as
    shipped in the registry package ``quantecon-book-networks`` (a test
    dependency); None when it is not installed.
    """
    from importlib.resources import files

    try:
        root = files("quantecon_book_networks") / "data" / "csv_files"
    except ModuleNotFoundError:
        return None
    supply, use = root / f"make_{size}.csv", root / f"use_{size}.csv"
    if not (supply.is_file() and use.is_file()):
        return None
    return Path(str(supply)), Path(str(use))


def bea_spec(folder: Path, size: int, *, capital: str = "{capital_output_ratio: 3.0}",
             extra: str = "") -> Path:
    """An economy spec in ``folder`` for the BEA tables: one line of capital, one of labour.

    The tables are copied beside it (specs read tables in their own folder).
    """
    found = bea_tables(size)
    assert found is not None, "quantecon-book-networks is not installed"
    folder.mkdir(parents=True, exist_ok=True)
    for src in found:
        (folder / src.name).write_bytes(src.read_bytes())
    spec = folder / "economy.yaml"
    spec.write_text(
        "layout_version: 1\n"
        "value_unit: million dollars at 2021 prices\n"
        "base_year: 2021\n"
        f"published: {{supply: make_{size}.csv, use: use_{size}.csv}}\n"
        f"capital: {capital}\n"
        "labour: {wage: 75, unit: thousand person-years}   # $75,000 a person-year\n"
        + extra, encoding="utf-8")
    return spec


def bea_economy(size: int, **options: object) -> tuple[gp.Economy, object]:
    """The economy built from the BEA tables of ``size`` industries, and its report.

    Capital–output ratio 3 on value added, 20-year lives, labour from
    compensation at $75,000 a person-year; ``options`` go to
    :func:`growthplan.statistics.published.published_economy`.
    """
    from growthplan.statistics.published import PublishedTables, published_economy

    found = bea_tables(size)
    assert found is not None, "quantecon-book-networks is not installed"
    kwargs: dict[str, object] = {"value_unit": "million dollars at 2021 prices",
                                 "capital_output_ratio": 3.0, "wage": 75.0}
    kwargs.update(options)
    return published_economy(PublishedTables.read(*found), **kwargs)  # type: ignore[arg-type]


def bea_plan(size: int, years: int = 30, *, floor_factor: float = 1.0,
             labour_factor: float = 1.0) -> gp.Plan:
    """A plan of the BEA economy: the plan skeleton ``economy build --plan`` writes.

    ``floor_factor`` and ``labour_factor`` scale the consumption floor and the
    labour supply (a floor far above the skeleton's, or labour far below the
    base year's use, makes the plan impossible).
    """
    from growthplan.statistics.skeleton import plan_skeleton

    econ, report = bea_economy(size)
    sk = plan_skeleton(econ, base_year=2021, years=years,
                       other_demand=report.other_demand().to_numpy(),  # type: ignore[attr-defined]
                       base_consumption=report.base_consumption())  # type: ignore[attr-defined]
    sec = sk.section
    return gp.Plan(economy=econ, years=range(2022, 2022 + years),
                   labour=[gp.LabourSupply(kind=lab["kind"], start=lab["start"] * labour_factor,
                                           growth=lab["growth"]) for lab in sec["labour"]],
                   consumption=gp.Consumption(floor=sec["consumption"]["floor"] * floor_factor,
                                              max_fall=0.0),
                   final_demand=sec.get("final_demand"),
                   terminal=gp.TerminalGrowth(rate=sec["terminal"]["rate"]),
                   objective=gp.objectives.TerminalCapacity())


def regional_economy(regions: list[str], n: int, seed: int = 1, *,
                     identical: bool = False) -> gp.MultiRegionalEconomy:
    """Dense random regions sharing ``n`` sectors (the last one, "haul", carries shipments).

    With ``identical`` every region has the same coefficients and capital.
    """
    names = [f"s{i}" for i in range(n - 1)] + ["haul"]
    econs = {}
    for k, r in enumerate(regions):
        rng = np.random.default_rng(seed if identical else seed + k)
        a = rng.uniform(0, 1, (n, n))
        a *= 0.5 / a.sum(axis=0).max()
        b = rng.uniform(0, 1, (n, n))
        b *= 2.0 / b.sum(axis=0).max()
        cap = {s: gp.CapitalSpec(initial_capacity=float(rng.uniform(50, 150)),
                                 mean_service_life=20.0) for s in names}
        econs[r] = gp.Economy(sectors=names, input_coefficients=a, capital_coefficients=b,
                              labour_coefficients=[rng.uniform(0.1, 1.0, n)], capital=cap,
                              consumption_basket=rng.uniform(0.1, 1.0, n))
    return gp.MultiRegionalEconomy.from_regions(econs)


def check_family(plan: gp.Plan, name: str, spoil, kind: str) -> dict:
    """What every condition family owes, checked on one solved plan.

    Its rows in the built matrix match its ``count``; its audit passes on the
    optimal schedules and catches ``spoil(schedules, data)`` as a violation of
    ``kind``; the elastic programme has one shortfall column per row exactly
    when the family is elastic; ``describe`` words each row with its year.
    Returns the result, the family, the built LP and its row block.
    """
    import copy

    from growthplan.lp.conditions import CONDITIONS
    from growthplan.results.diagnosis import elastic_program

    result = plan.solve()
    assert result.ok, (result.status, result.message)
    cond = next(c for c in CONDITIONS if c.name == name)
    d = result.data
    assert cond.applies(d)
    lp = plan.compile(size_limit=None)
    block = lp.rows.get(name)
    matrix = lp.matrix.tocsr()
    built = (0, 0) if block is None else (block.size, matrix[block.start:block.stop].nnz)
    widths = {k: b.size for k, b in lp.cols.items()}
    assert cond.count(d, widths) == built
    s = copy.deepcopy(result._schedules)
    before = [c for c in cond.audit(d, s) if c.kind == kind]
    assert before, f"{name} audits no {kind!r}"
    assert all(float(np.max(c.violation, initial=-np.inf)) <= 1e-7 * max(
        1.0, float(np.max(c.scale, initial=0.0))) for c in before)
    spoil(s, d)
    after = [c for c in cond.audit(d, s) if c.kind == kind]
    assert any(np.nanmax(np.where(np.isnan(c.violation), np.inf, c.violation)) > 1e-6
               for c in after), f"{name}: the audit missed a spoiled {kind!r}"
    _, info = elastic_program(lp)
    mine = [i for i in info if i["family"] == name]
    assert len(mine) == (built[0] if cond.elastic else 0)
    if block is not None:
        for i in range(block.size):
            label = block.label(i)
            words = cond.describe(label)
            assert words and words[0].isalpha() and "_" not in words.split(" of ")[0], words
            years = [p for p in label[1:] if isinstance(p, int | np.integer)]
            assert not years or str(years[0]) in words, (label, words)
    return {"result": result, "condition": cond, "lp": lp, "block": block}
