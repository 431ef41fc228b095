"""The architecture, enforced: layers, no cycles, modules of a readable size.

``model`` is the core, in layers; each may import only its own layer and the
ones below it::

    site  <-  rules  <-  storage  <-  visits  <-  plan  <-  reports

``model`` never imports ``tui`` or ``textual``.  No import cycle anywhere in
``model`` (imports inside functions and under ``TYPE_CHECKING`` count too).
No module in ``model`` or ``tui`` is over 400 lines.

The graph is read from the source with :mod:`ast`, so a lazy import inside a
function is seen as well as one at the top of a module.
"""

from __future__ import annotations

import ast
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]

#: The core's layers, lowest first.
LAYERS = ("site", "rules", "storage", "visits", "plan", "reports")
MAX_LINES = 400


def _module_name(path: Path) -> str:
    parts = list(path.relative_to(ROOT).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts = parts[:-1]
    return ".".join(parts)


def _modules(package: str) -> dict[str, Path]:
    return {_module_name(p): p for p in sorted((ROOT / package).rglob("*.py"))}


def _imports(path: Path, name: str) -> set[str]:
    """Every module named by an import statement anywhere in the file."""
    tree = ast.parse(path.read_text(encoding="utf-8"), filename=str(path))
    package = name if path.name == "__init__.py" else name.rpartition(".")[0]
    found: set[str] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            found.update(alias.name for alias in node.names)
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.split(".")
                base = base[: len(base) - node.level + 1]
                mod = ".".join([*base, node.module] if node.module else base)
            else:
                mod = node.module or ""
            found.add(mod)
            # "from model.reports.render import pdf" imports model.reports.render.pdf
            found.update(f"{mod}.{alias.name}" for alias in node.names)
    return found


def _graph() -> dict[str, set[str]]:
    mods = _modules("model")
    graph: dict[str, set[str]] = {}
    for name, path in mods.items():
        graph[name] = {m for m in _imports(path, name) if m in mods and m != name}
    return graph


def _layer(module: str) -> int | None:
    parts = module.split(".")
    if len(parts) < 2 or parts[1] not in LAYERS:
        return None  # the package root (model/__init__.py) sits below every layer
    return LAYERS.index(parts[1])


def test_the_layers_exist() -> None:
    for layer in LAYERS:
        assert (ROOT / "model" / layer / "__init__.py").is_file(), layer


def test_model_never_imports_the_interface() -> None:
    bad = []
    for name, path in _modules("model").items():
        for mod in _imports(path, name):
            top = mod.split(".")[0]
            if top in ("tui", "textual", "textual_plotext", "plotext"):
                bad.append(f"{name} imports {mod}")
    assert bad == []


def test_every_core_module_loads_without_the_interface() -> None:
    """At run time too: importing every module of model/ loads no textual and no tui."""
    code = (
        "import sys, pkgutil, importlib, model\n"
        "for m in pkgutil.walk_packages(model.__path__, 'model.'):\n"
        "    importlib.import_module(m.name)\n"
        "print(','.join(sorted(k for k in sys.modules if k.split('.')[0] in ('textual', 'tui'))))\n"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, check=True
    )
    assert out.stdout.strip() == ""


def test_lower_layers_never_import_higher_ones() -> None:
    bad = []
    for name, deps in _graph().items():
        mine = _layer(name)
        for dep in deps:
            theirs = _layer(dep)
            if theirs is None:
                continue
            if mine is None or theirs > mine:
                bad.append(f"{name} ({LAYERS[mine] if mine is not None else 'root'}) imports {dep}")
    assert bad == [], "\n".join(sorted(bad))


def _cycle(graph: dict[str, set[str]]) -> list[str] | None:
    """One import cycle as a list of modules, or None."""
    state: dict[str, int] = {}  # 1 on the current path, 2 done
    stack: list[str] = []

    def visit(node: str) -> list[str] | None:
        state[node] = 1
        stack.append(node)
        for dep in sorted(graph.get(node, ())):
            if state.get(dep) == 1:
                return [*stack[stack.index(dep) :], dep]
            if dep not in state:
                found = visit(dep)
                if found:
                    return found
        stack.pop()
        state[node] = 2
        return None

    for node in sorted(graph):
        if node not in state:
            found = visit(node)
            if found:
                return found
    return None


def test_no_import_cycle_in_the_core() -> None:
    assert _cycle(_graph()) is None


def test_cycle_finder_finds_a_planted_cycle() -> None:
    """The cycle test can fail: a graph with a cycle is reported."""
    graph = {"a": {"b"}, "b": {"c"}, "c": {"a"}, "d": {"a"}}
    assert _cycle(graph) == ["a", "b", "c", "a"]
    assert _cycle({"a": {"b"}, "b": set()}) is None


@pytest.mark.parametrize("package", ["model", "tui"])
def test_no_module_over_the_size_limit(package: str) -> None:
    long = {
        name: n
        for name, path in _modules(package).items()
        if (n := len(path.read_text(encoding="utf-8").splitlines())) > MAX_LINES
    }
    assert long == {}
