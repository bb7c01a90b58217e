"""The package's layers: imports run one way (engine → physics → sweep → cube → plots → cli),
no module imports another's private names, there is no import cycle, and the engine loads
without the workflow, plotting or NetCDF libraries."""

from __future__ import annotations

import ast
import subprocess
import sys
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parents[1] / "src" / "boundscape"
# Rank of each layer; a module may import only from its own layer or lower ones.  The shared
# base modules (errors, checks, labels, version, report_layout) sit below everything.
LAYERS = {"base": 0, "engine": 1, "physics": 2, "sweep": 3, "cube": 4, "plots": 5, "cli": 6}
BASE_MODULES = {"errors", "checks", "labels", "version", "lazy", "report_layout"}


def module_name(path: Path) -> str:
    parts = path.relative_to(PACKAGE.parent).with_suffix("").parts
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def layer_of(module: str) -> str:
    """The layer of a module ``boundscape.x.y``; the package root counts as the engine's
    (it re-exports the engine's names)."""
    parts = module.split(".")
    if len(parts) == 1:
        return "engine"
    if parts[1] in BASE_MODULES:
        return "base"
    assert parts[1] in LAYERS, f"{module} is in no layer: add it to LAYERS or BASE_MODULES"
    return parts[1]


def lazy_targets(node, package: str):
    """The modules a ``lazy_exports(__name__, {name: ".module"})`` call defers (boundscape.lazy):
    imports like any other, only later."""
    if not (isinstance(node, ast.Call) and getattr(node.func, "id", getattr(node.func, "attr", "")) == "lazy_exports"
            and len(node.args) == 2):
        return []
    mapping = node.args[1]
    if isinstance(mapping, ast.Dict):
        values = mapping.values
    elif isinstance(mapping, ast.DictComp):
        values = [mapping.value]
    else:
        raise AssertionError(f"lazy_exports in {package} needs a literal mapping, so that its imports can be read")
    out = []
    for value in values:
        assert isinstance(value, ast.Constant) and isinstance(value.value, str), "lazy_exports targets must be literals"
        relative = value.value
        level = len(relative) - len(relative.lstrip("."))
        base = package.split(".")[: len(package.split(".")) - level + 1]
        out.append(".".join(base + [relative.lstrip(".")]) if relative.lstrip(".") else ".".join(base))
    return out


def imports_of(path: Path, here: str | None = None):
    """(imported module, imported names, line) for every import of the package's own modules,
    deferred ones (:func:`lazy_targets`) included; ``here`` is the module's dotted name (default:
    from its path in the package)."""
    tree = ast.parse(path.read_text(), filename=str(path))
    here = here or module_name(path)
    package = here if path.name == "__init__.py" else here.rpartition(".")[0]
    for node in ast.walk(tree):
        for target in lazy_targets(node, package):
            yield target, [], node.lineno
        if isinstance(node, ast.Import):
            for alias in node.names:
                if alias.name.split(".")[0] == "boundscape":
                    yield alias.name, [], node.lineno
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.split(".")
                base = base[: len(base) - node.level + 1]
                target = ".".join(base + ([node.module] if node.module else []))
            else:
                target = node.module or ""
            if target.split(".")[0] != "boundscape":
                continue
            names = [a.name for a in node.names]
            # `from . import x` imports the module `package.x`
            submodules = [n for n in names if (PACKAGE.parent / Path(*target.split("."), n)).with_suffix(".py").exists()
                          or (PACKAGE.parent / Path(*target.split("."), n, "__init__.py")).exists()]
            for name in submodules:
                yield f"{target}.{name}", [], node.lineno
            rest = [n for n in names if n not in submodules]
            if rest or not submodules:
                yield target, rest, node.lineno


SOURCES = sorted(PACKAGE.rglob("*.py"))


def test_every_module_is_in_a_layer():
    for path in SOURCES:
        layer_of(module_name(path))


@pytest.mark.parametrize("path", SOURCES, ids=lambda p: module_name(p))
def test_imports_run_one_way(path):
    here = module_name(path)
    mine = LAYERS[layer_of(here)]
    against = [f"line {line}: {target}" for target, _, line in imports_of(path)
               if LAYERS[layer_of(target)] > mine]
    assert not against, f"{here} ({layer_of(here)}) imports from a higher layer: {against}"


@pytest.mark.parametrize("path", SOURCES, ids=lambda p: module_name(p))
def test_no_private_names_cross_modules(path):
    here = module_name(path)
    private = [f"line {line}: {target}.{name}" for target, names, line in imports_of(path)
               for name in names if name.startswith("_") and target != here]
    assert not private, f"{here} imports private names: {private}"


def find_cycle(graph: dict[str, set[str]]) -> list[str] | None:
    """A cycle of the import graph as a list of modules, or None.  A package's ``__init__`` is a
    module like any other: a submodule that imports from its own package while the package
    re-exports that submodule closes a cycle."""
    state, path = {}, []

    def visit(node):
        state[node] = "open"
        path.append(node)
        for nxt in sorted(graph.get(node, ())):
            if nxt == node or nxt not in graph:
                continue
            if state.get(nxt) == "open":
                return path[path.index(nxt):] + [nxt]
            if nxt not in state and (cycle := visit(nxt)):
                return cycle
        path.pop()
        state[node] = "done"
        return None

    for node in sorted(graph):
        if node not in state and (cycle := visit(node)):
            return cycle
    return None


def test_no_import_cycle():
    graph = {module_name(p): {t for t, _, _ in imports_of(p)} for p in SOURCES}
    assert find_cycle(graph) is None, "import cycle: " + " -> ".join(find_cycle(graph))
    # Negative control: the search finds a cycle where there is one.
    assert find_cycle({"a": {"b"}, "b": {"c"}, "c": {"a"}}) == ["a", "b", "c", "a"]
    # ... and through a package's re-exports: pkg/__init__ imports pkg.m, which imports from pkg.
    assert find_cycle({"pkg": {"pkg.m"}, "pkg.m": {"pkg"}}) == ["pkg", "pkg.m", "pkg"]


def test_the_layer_check_catches_a_wrong_import(tmp_path):
    # Negative control: an engine module that imports the plots and a private name must be caught.
    probe = tmp_path / "probe.py"
    probe.write_text("from ..plots import style\nfrom ..cube.model import _listing\n")
    targets = list(imports_of(probe, here="boundscape.engine.probe"))
    assert any(layer_of(t) == "plots" for t, _, _ in targets)
    assert any("_listing" in names for _, names, _ in targets)


def test_deferred_imports_are_counted(tmp_path):
    # Negative control: a lazy import of a higher layer is an import like any other.
    probe = tmp_path / "__init__.py"
    probe.write_text("from ..lazy import lazy_exports\n__getattr__, __dir__ = lazy_exports(__name__, {'x': '..plots.style'})\n")
    targets = [t for t, _, _ in imports_of(probe, here="boundscape.engine")]
    assert "boundscape.plots.style" in targets
    # the engine's own deferred solvers are edges of the import graph
    engine = [t for t, _, _ in imports_of(PACKAGE / "engine" / "__init__.py")]
    assert {"boundscape.engine.bound", "boundscape.engine.continuum", "boundscape.engine.transitions"} <= set(engine)


def test_no_string_named_imports():
    # every import is an import statement or a lazy_exports mapping: no importlib.import_module of
    # a name the layer check cannot see (the one helper that does it is boundscape.lazy)
    offenders = [module_name(p) for p in SOURCES
                 if "import_module(" in p.read_text() and module_name(p) != "boundscape.lazy"]
    assert not offenders, f"string-named imports in {offenders}"


def test_the_engine_stands_alone():
    # numba, the engine's compiler, imports yaml itself (for its own config file): what numba
    # alone loads is not held against the engine
    code = ("import sys, numba; own = set(sys.modules); import boundscape.engine as e; "
            "e.bound_levels(e.potential('yukawa', 1.0, 10.0), 0); "
            "print(' '.join(sorted(m for m in ('matplotlib', 'snakemake', 'netCDF4', 'xarray', 'pandas', 'yaml') "
            "if m in sys.modules and m not in own)))")
    run = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120, check=True)
    assert run.stdout.strip() == "", f"importing the engine loaded: {run.stdout.strip()}"
