"""How the package's modules import each other, read from their source (AST): every module
imports, module-level imports form no cycle (so none depends on import order), no module
imports or reads another module's private (``_name``) names, and imports inside functions are
kept to the measured or cycle-breaking cases.  Common practice for a layered package (a one-way
import graph)."""

from __future__ import annotations

import ast
import functools
import importlib
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parent.parent / "cutplan"

LAZY_PACKAGES = {"scipy", "skfem", "threadpoolctl", "fcntl"}
"""Third-party modules imported inside functions: a chime plan never needs them and they cost
start-up time (figures beside the imports; median CPU of 9 runs: scipy.fft with scipy.ndimage
0.32 s, scipy.optimize 0.47 s, on top of 0.52 s for ``import cutplan.cli``), or a platform may
lack them (fcntl)."""

LAZY_MODULES = {"cutplan"}
"""Modules whose in-function imports keep ``import cutplan`` light (figures in its comment)."""

HEAVY_IMPORTS = {
    ("cutplan.cli.plans", "cutplan.render.packet"),  # reportlab: only for -o
    ("cutplan.cli.serve", "cutplan.web.server"),  # flask and waitress: only for the page
}
"""(module, imported) pairs imported inside a command so that ``cutplan --help`` starts fast
(figures in :mod:`cutplan.cli`)."""

CYCLE_BREAKS = {
    ("cutplan.layout.optimiser", "cutplan.layout.columns"),
    ("cutplan.tuning.trim_service", "cutplan.tuning.arched"),
    ("cutplan.tuning.profile_model", "cutplan.physics.elastic2d"),  # the 2-D model or the 1-D fallback
    ("cutplan.web.workers", "cutplan.planning.planner"), ("cutplan.web.workers", "cutplan.web.service"),  # warm-up
    ("cutplan.physics.blas", "numpy"),  # loaded before the thread controller is built
}
"""(module, imported) pairs imported inside a function, each for the reason in its comment."""


def _modules():
    out = {}
    for path in sorted(PACKAGE.rglob("*.py")):
        parts = path.relative_to(PACKAGE.parent).with_suffix("").parts
        name = ".".join(parts[:-1] if parts[-1] == "__init__" else parts)
        out[name] = path
    return out


MODULES = _modules()


def _is_package(name):
    return MODULES[name].name == "__init__.py"


@functools.cache
def _tree(name):
    """The module's syntax tree, parsed once per test process (the tests only read it)."""
    return ast.parse(MODULES[name].read_text(encoding="utf-8"))


@functools.cache
def _imports(name):
    """(node, imported module names, imported names, inside a function) for every import statement."""
    tree = _tree(name)
    found = []

    def visit(node, in_function, type_checking):
        for child in ast.iter_child_nodes(node):
            fn = in_function or isinstance(child, (ast.FunctionDef, ast.AsyncFunctionDef, ast.Lambda))
            tc = type_checking or (isinstance(child, ast.If) and "TYPE_CHECKING" in ast.unparse(child.test))
            if isinstance(child, ast.Import):
                found.append((child, [a.name for a in child.names], [], fn, tc))
            elif isinstance(child, ast.ImportFrom):
                base = child.module or ""
                if child.level:
                    package = name.split(".") if _is_package(name) else name.split(".")[:-1]
                    package = package[: len(package) - child.level + 1]
                    base = ".".join(package + ([base] if base else []))
                targets = [f"{base}.{a.name}" if f"{base}.{a.name}" in MODULES else base for a in child.names]
                found.append((child, targets, [a.name for a in child.names], fn, tc))
            visit(child, fn, tc)

    visit(tree, False, False)
    return tuple(found)


def _edges():
    """Module -> modules it imports at module level (with their packages), within the package."""
    edges = {}
    for name in MODULES:
        edges[name] = set()
        for _node, targets, _names, in_function, type_checking in _imports(name):
            if in_function or type_checking:
                continue
            for target in targets:
                parts = target.split(".")
                for i in range(2, len(parts) + 1):
                    up = ".".join(parts[:i])
                    if up in MODULES and up != name and not name.startswith(up + "."):
                        edges[name].add(up)
    return edges


@pytest.mark.parametrize("name", sorted(MODULES))
def test_every_module_imports(name):
    importlib.import_module(name)


def test_module_level_imports_form_no_cycle():
    edges = _edges()
    state, cycles = {}, []

    def walk(node, path):
        state[node] = "open"
        for nxt in sorted(edges[node]):
            if state.get(nxt) == "open":
                cycles.append(" -> ".join(path[path.index(nxt):] + [nxt]))
            elif nxt not in state:
                walk(nxt, path + [nxt])
        state[node] = "done"

    for name in sorted(MODULES):
        if name not in state:
            walk(name, [name])
    assert not cycles, cycles


THIRD_PARTY_PRIVATE = {
    # the HiGHS model bundled with scipy: kept across column-generation rounds (a warm start); the
    # module falls back to scipy.optimize.linprog from scratch when a scipy lacks it
    ("cutplan.layout.master", ("scipy.optimize._highspy",)),
}


def test_no_module_imports_another_modules_private_names():
    found = []
    for name in MODULES:
        for node, targets, names, _fn, _tc in _imports(name):
            private = [n for n in names if n.startswith("_") and not n.startswith("__")]
            private += [t for t in targets if any(p.startswith("_") and not p.startswith("__") for p in t.split("."))]
            if private and (name, tuple(targets)) not in THIRD_PARTY_PRIVATE:
                found.append(f"{name}:{node.lineno} imports {', '.join(private)}")
    assert not found, found


def test_no_module_reads_another_modules_private_attributes():
    # ``module._name`` on a module imported by name is the same reach past the public API
    found = []
    for name in MODULES:
        tree = _tree(name)
        imported = {}
        for node, targets, _names, _fn, _tc in _imports(name):
            if isinstance(node, ast.Import):
                imported.update({(a.asname or a.name.split(".")[0]): a.name for a in node.names})
            else:
                for alias, target in zip(node.names, targets, strict=True):
                    if target in MODULES and target.endswith("." + alias.name):
                        imported[alias.asname or alias.name] = target
        for node in ast.walk(tree):
            if (isinstance(node, ast.Attribute) and isinstance(node.value, ast.Name) and node.value.id in imported
                    and imported[node.value.id].startswith("cutplan") and node.attr.startswith("_")
                    and not node.attr.startswith("__")):
                found.append(f"{name}:{node.lineno} reads {node.value.id}.{node.attr}")
    assert not found, found


def test_imports_inside_functions_are_only_the_measured_or_cycle_breaking_ones():
    found = []
    for name in MODULES:
        for node, targets, _names, in_function, _tc in _imports(name):
            if not in_function or name in LAZY_MODULES:
                continue
            for target in targets:
                if target.split(".")[0] in LAZY_PACKAGES or (name, target) in CYCLE_BREAKS | HEAVY_IMPORTS:
                    continue
                found.append(f"{name}:{node.lineno} imports {target} inside a function")
    assert not found, found


@pytest.mark.parametrize("name", sorted(MODULES))
def test_a_module_with_public_names_lists_them_in_all_and_each_exists(name):
    tree = _tree(name)
    public = [n.name for n in tree.body if isinstance(n, (ast.FunctionDef, ast.ClassDef)) and not n.name.startswith("_")]
    module = importlib.import_module(name)
    if public:
        assert hasattr(module, "__all__"), f"{name} defines {public[:3]}... but has no __all__"
    missing = [n for n in getattr(module, "__all__", ()) if not hasattr(module, n)]
    assert not missing, f"{name}.__all__ names {missing}, which it does not define"
