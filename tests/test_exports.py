"""The one public door: names import from growthplan and nothing private leaks."""

import importlib

import growthplan as gp


def test_public_names_import():
    for name in gp.__all__:
        assert hasattr(gp, name), name


def test_nothing_private_leaks():
    assert all(not n.startswith("_") or n == "__version__" for n in gp.__all__)
    assert len(set(gp.__all__)) == len(gp.__all__)


def test_modules_import():
    for mod in ("economy", "io", "io.tables", "io.planfile", "io.atomic", "capital", "steady",
                "expanding", "plan", "compile", "solvers", "result", "audit", "objectives",
                "cli", "errors"):
        importlib.import_module(f"growthplan.{mod}")


def test_errors_subclass_builtins():
    assert issubclass(gp.InvalidInput, ValueError)
    assert issubclass(gp.UnproductiveEconomy, ValueError)
    assert issubclass(gp.PlanInfeasible, ValueError)
    assert issubclass(gp.SolverFailure, RuntimeError)
    assert issubclass(gp.EndEffectsWarning, gp.GrowthplanWarning)
