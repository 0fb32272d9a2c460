"""The package's layers, read from its own imports with ``ast``.

A runtime import is one executed when the module is imported (not inside a
function, not under ``if TYPE_CHECKING``). The runtime graph has no cycle, and
the model (``growthplan/model/``) imports nothing of the pipeline above it:
not the LP, the back ends, the solve, the results, the scenarios or the
command line. A model method that hands the plan to the pipeline imports it
when called; those deferred imports are listed here, one by one, so that a
new one is a decision and not an accident.
"""

from __future__ import annotations

import ast
from pathlib import Path

import growthplan

PACKAGE = Path(growthplan.__file__).resolve().parent
PIPELINE = ("growthplan.lp", "growthplan.backends", "growthplan.solve", "growthplan.results",
            "growthplan.scenarios", "growthplan.cli", "growthplan.progress",
            "growthplan.statistics", "growthplan.demo")

# (model module, pipeline module) pairs imported inside a method, by design
DEFERRED = {
    # validation checks each series where the LP's arrays are computed, once
    ("growthplan.model.plan", "growthplan.lp.data"),
    ("growthplan.model.plan", "growthplan.solve"),
    ("growthplan.model.plan", "growthplan.lp.build"),
    ("growthplan.model.plan", "growthplan.results.charts"),
    ("growthplan.model.plan", "growthplan.backends.pulp"),  # Plan.to_pulp
    ("growthplan.model.objectives", "growthplan.lp.program"),  # an objective's stages
    ("growthplan.model.economy", "growthplan.statistics.tables"),
    ("growthplan.model.economy", "growthplan.statistics.supply_use"),
}


def _modules() -> dict[str, Path]:
    out = {}
    for path in PACKAGE.rglob("*.py"):
        parts = list(path.relative_to(PACKAGE.parent).with_suffix("").parts)
        if parts[-1] == "__init__":
            parts = parts[:-1]
        out[".".join(parts)] = path
    return out


def _is_type_checking(test: ast.expr) -> bool:
    return (isinstance(test, ast.Name) and test.id == "TYPE_CHECKING") or (
        isinstance(test, ast.Attribute) and test.attr == "TYPE_CHECKING")


def _imports(name: str, path: Path, modules: dict[str, Path]) -> tuple[set[str], set[str]]:
    """(runtime, deferred) imports of one module, as module names of the package."""
    is_pkg = path.name == "__init__.py"
    package = name if is_pkg else name.rsplit(".", 1)[0]
    runtime: set[str] = set()
    deferred: set[str] = set()

    def resolve(node: ast.ImportFrom | ast.Import) -> set[str]:
        found = set()
        if isinstance(node, ast.Import):
            for alias in node.names:
                if alias.name.startswith("growthplan"):
                    found.add(alias.name)
            return found
        if node.level:
            base = package.split(".")
            base = base[: len(base) - (node.level - 1)]
            target = ".".join(base + ([node.module] if node.module else []))
        else:
            target = node.module or ""
        if not target.startswith("growthplan"):
            return found
        for alias in node.names:
            sub = f"{target}.{alias.name}"
            found.add(sub if sub in modules else target)
        return found

    def walk(nodes: list[ast.stmt], deferred_here: bool) -> None:
        for node in nodes:
            if isinstance(node, ast.Import | ast.ImportFrom):
                (deferred if deferred_here else runtime).update(resolve(node))
            elif isinstance(node, ast.If) and _is_type_checking(node.test):
                walk(node.orelse, deferred_here)
            elif isinstance(node, ast.FunctionDef | ast.AsyncFunctionDef):
                walk(node.body, True)
            elif isinstance(node, ast.ClassDef):
                walk(node.body, deferred_here)
            else:
                for field in ("body", "orelse", "finalbody", "handlers"):
                    inner = getattr(node, field, None)
                    if isinstance(inner, list):
                        walk([n for n in inner if isinstance(n, ast.stmt | ast.ExceptHandler)]
                             if field != "handlers" else [s for h in inner for s in h.body],
                             deferred_here)

    walk(ast.parse(path.read_text(encoding="utf-8")).body, False)
    return runtime & set(modules), deferred & set(modules)


def _graph() -> tuple[dict[str, set[str]], dict[str, set[str]]]:
    modules = _modules()
    runtime, deferred = {}, {}
    for name, path in modules.items():
        runtime[name], deferred[name] = _imports(name, path, modules)
        runtime[name].discard(name)
    return runtime, deferred


def _cycles(graph: dict[str, set[str]]) -> list[list[str]]:
    """Strongly connected components of more than one module (Tarjan)."""
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    on: set[str] = set()
    out: list[list[str]] = []

    def visit(v: str) -> None:
        index[v] = low[v] = len(index)
        stack.append(v)
        on.add(v)
        for w in graph.get(v, ()):
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            comp = []
            while True:
                w = stack.pop()
                on.discard(w)
                comp.append(w)
                if w == v:
                    break
            if len(comp) > 1:
                out.append(sorted(comp))

    for v in sorted(graph):
        if v not in index:
            visit(v)
    return out


def test_the_graph_is_read():
    runtime, _ = _graph()
    assert "growthplan.model.economy" in runtime["growthplan.model.plan"]
    assert "growthplan.lp.program" in runtime["growthplan.lp.build"]


def test_no_runtime_import_cycle():
    runtime, _ = _graph()
    assert _cycles(runtime) == []


def test_a_cycle_is_found():
    assert _cycles({"a": {"b"}, "b": {"c"}, "c": {"a"}, "d": {"a"}}) == [["a", "b", "c"]]


def test_the_model_imports_nothing_of_the_pipeline():
    runtime, deferred = _graph()
    upward = {(m, t) for m in runtime if m.startswith("growthplan.model")
              for t in runtime[m] if t.startswith(PIPELINE)}
    assert upward == set()
    late = {(m, t) for m in deferred if m.startswith("growthplan.model")
            for t in deferred[m] if t.startswith(PIPELINE)}
    assert late <= DEFERRED, sorted(late - DEFERRED)


def test_the_door_loads_no_solver(tmp_path):
    import subprocess
    import sys

    code = ("import sys, growthplan\n"
            "heavy = [m for m in ('highspy', 'pulp', 'scipy', 'pandas', 'pydantic') "
            "if m in sys.modules]\nprint(','.join(heavy))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, cwd=tmp_path)
    assert out.stdout.strip() == ""


def test_help_loads_no_solver(tmp_path):
    import subprocess
    import sys

    code = ("import sys\nfrom growthplan.cli import main\n"
            "try:\n    main(['--help'])\nexcept SystemExit:\n    pass\n"
            "print(','.join(m for m in ('highspy', 'pulp', 'scipy', 'pandas') "
            "if m in sys.modules), 'loaded')")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, cwd=tmp_path)
    assert "Usage" in out.stdout
    assert out.stdout.strip().splitlines()[-1] == " loaded"
