"""One settings object for every solve: the Python API, plan files and the command line."""

from __future__ import annotations

import numpy as np
import pytest
from conftest import assert_optimal, one_sector

import growthplan as gp
from growthplan.backends.highs import HighsBackend
from growthplan.backends.options import SolveOptions, default_backend, highs_backend
from growthplan.io.planfile import SolveOptions as PlanFileOptions

YEARS = range(2030, 2036)


def _plan() -> gp.Plan:
    return gp.Plan(economy=one_sector(), years=YEARS, terminal=gp.TerminalGrowth(rate=0.02))


def test_the_plan_file_section_is_the_same_object():
    assert PlanFileOptions is SolveOptions


def test_an_object_and_keywords_solve_alike():
    by_keywords = assert_optimal(_plan().solve(method="simplex", threads=1))
    by_object = assert_optimal(_plan().solve(solver=SolveOptions(method="simplex", threads=1)))
    assert by_object.objective == by_keywords.objective
    assert by_object.solver["method"] == by_keywords.solver["method"] == "simplex"
    # one sector, a = 0.6, b = 2, 20-year geometric life: capacity grows at
    # (1 − a)/b − 1/20 = 0.15 a year (the Harrod–Domar closed form of the docs)
    np.testing.assert_allclose(by_object.capacity["goods"].to_numpy(),
                               100 * 1.15 ** np.arange(len(YEARS) + 1), rtol=1e-7)


def test_an_object_and_keywords_together_are_refused():
    with pytest.raises(gp.InvalidInput, match="solver must come alone.*time_limit"):
        _plan().solve(solver=SolveOptions(), time_limit=5)


@pytest.mark.parametrize(("field", "value", "words"), [
    ("method", "simplx", "method must be 'auto' or one of simplex"),
    ("time_limit", 0, "time_limit must be greater than 0"),
    ("time_limit", float("inf"), "time_limit must be a finite number"),
    ("threads", True, "threads must be a whole number"),
    ("tolerance", 2.0, "tolerance must be less than 1"),
    ("audit_tolerance", -1.0, "audit_tolerance must be greater than 0"),
])
def test_a_setting_is_refused_in_the_same_words_everywhere(field, value, words):
    with pytest.raises(gp.InvalidInput, match=words):
        _plan().solve(**{field: value})
    with pytest.raises(gp.InvalidInput, match=words):
        SolveOptions.model_validate({field: value})  # a plan file's solve section
    if field != "audit_tolerance":
        with pytest.raises(gp.InvalidInput, match=words):
            HighsBackend(**({field: value} if field != "method" else {"method": value}))


def test_the_default_back_end_comes_from_one_factory():
    made = default_backend(SolveOptions(method="ipm", time_limit=9.0, threads=2))
    assert isinstance(made, HighsBackend)
    assert (made.method, made.time_limit, made.threads) == ("ipm", 9.0, 2)
    own = gp.PulpBackend()
    assert default_backend(SolveOptions(backend=own)) is own
    assert isinstance(highs_backend(SolveOptions(backend=own)), HighsBackend)


def test_a_back_end_is_never_read_from_a_file():
    with pytest.raises(gp.InvalidInput, match="backend must be a back end"):
        SolveOptions.model_validate({"backend": "highs"})
    assert "backend" not in SolveOptions.model_json_schema()["properties"]


def test_keywords_round_trip():
    opts = SolveOptions(method="simplex", time_limit=5, options={"presolve": "off"})
    assert SolveOptions.of(**opts.keywords()) == opts
