"""The one public door: names import from growthplan and nothing private leaks."""

import ast
import importlib
import pkgutil
from pathlib import Path

import growthplan as gp

PACKAGE = Path(gp.__file__).parent


def test_public_names_import():
    for name in gp.__all__:
        assert hasattr(gp, name), name


def test_nothing_private_leaks():
    assert all(not n.startswith("_") or n == "__version__" for n in gp.__all__)
    assert len(set(gp.__all__)) == len(gp.__all__)


def _modules() -> list[str]:
    return [m.name for m in pkgutil.walk_packages([str(PACKAGE)], prefix="growthplan.")]


def test_modules_import():
    mods = _modules()
    for sub in ("growthplan.solve", "growthplan.lp.build", "growthplan.lp.conditions.balance",
                "growthplan.backends.highs", "growthplan.backends.pulp",
                "growthplan.results.audit", "growthplan.results.diagnosis",
                "growthplan.statistics.tables", "growthplan.io.planfile", "growthplan.io.atomic"):
        assert sub in mods
    for mod in mods:
        if mod != "growthplan.results.charts":  # needs the optional matplotlib extra
            importlib.import_module(mod)


def _module_imports(path: Path, name: str) -> set[str]:
    """Modules imported at module level (not under TYPE_CHECKING, not inside functions)."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    package = name if path.name == "__init__.py" else name.rsplit(".", 1)[0]
    out = set()
    for node in tree.body:
        if isinstance(node, ast.If) and "TYPE_CHECKING" in ast.unparse(node.test):
            continue
        for sub in ast.walk(node) if isinstance(node, ast.Import | ast.ImportFrom) else []:
            if isinstance(sub, ast.ImportFrom) and sub.level:
                base = package.split(".")
                base = base[: len(base) - sub.level + 1]
                target = ".".join(base + ([sub.module] if sub.module else []))
                out.add(target)
                out.update(f"{target}.{a.name}" for a in sub.names)
    return out


def _graph() -> dict[str, set[str]]:
    files = {}
    for path in PACKAGE.rglob("*.py"):
        rel = path.relative_to(PACKAGE.parent).with_suffix("")
        parts = list(rel.parts)
        if parts[-1] == "__init__":
            parts = parts[:-1]
        files[".".join(parts)] = path
    return {name: {m for m in _module_imports(path, name) if m in files and m != name}
            for name, path in files.items()}


def test_no_import_cycle_between_modules():
    """Module-level imports form no cycle (a package importing its own modules aside)."""
    graph = _graph()
    state: dict[str, int] = {}

    def visit(node: str, stack: list[str]) -> None:
        state[node] = 1
        for nxt in graph[node]:
            if nxt.startswith(node + "."):
                continue  # a package's __init__ importing its own modules
            if state.get(nxt) == 1 and not node.startswith(nxt + "."):
                raise AssertionError(" -> ".join([*stack, node, nxt]))
            if nxt not in state:
                visit(nxt, [*stack, node])
        state[node] = 2

    for node in graph:
        if node not in state:
            visit(node, [])


def test_pipeline_layers_never_call_back_into_plan():
    """Nothing under lp/, backends/ or results/ imports the Plan model to call back into it."""
    for sub in ("lp", "backends", "results"):
        for path in (PACKAGE / sub).rglob("*.py"):
            tree = ast.parse(path.read_text(encoding="utf-8"))
            for node in tree.body:
                if isinstance(node, ast.If) and "TYPE_CHECKING" in ast.unparse(node.test):
                    continue
                for sub_node in ast.walk(node):
                    if isinstance(sub_node, ast.ImportFrom) and (sub_node.module or "") \
                            .endswith("plan") and sub_node.level:
                        raise AssertionError(f"{path} imports {sub_node.module}")


def test_errors_subclass_builtins():
    assert issubclass(gp.InvalidInput, ValueError)
    assert issubclass(gp.UnproductiveEconomy, ValueError)
    assert issubclass(gp.PlanInfeasible, ValueError)
    assert issubclass(gp.SolverFailure, RuntimeError)
    assert issubclass(gp.EndEffectsWarning, gp.GrowthplanWarning)
