"""The layout rules of DEVELOPERS.md, checked on the source (every import, also those inside functions).

Why a test: an import circle or an upward import creeps in one convenient lazy import at a time, and
the layout is only worth something while the folder names tell the truth about the pipeline.
"""

from __future__ import annotations

import ast
import types
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent

# The pipeline's floors, lowest first: a subpackage may import only from its own floor or lower ones.
FLOORS = ("core", "expressions", "geometry", "text", "solvers", "claims", "regimes", "rates", "report")


def _module_name(path: Path) -> str:
    parts = list(path.relative_to(ROOT).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def _imports(path: Path) -> set[str]:
    """Every module named by an import statement anywhere in the file (absolute or relative)."""
    name = _module_name(path)
    package = name if path.name == "__init__.py" else name.rpartition(".")[0]
    found = set()
    for node in ast.walk(ast.parse(path.read_text(), str(path))):
        if isinstance(node, ast.Import):
            found.update(a.name for a in node.names)
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.split(".")[: len(package.split(".")) - node.level + 1]
                target = ".".join(base + ([node.module] if node.module else []))
            else:
                target = node.module
            found.add(target)
            found.update(f"{target}.{a.name}" for a in node.names)   # `from pkg import module`
    return found


def _graph(top: str) -> dict[str, set[str]]:
    modules = {_module_name(p): p for p in (ROOT / top).rglob("*.py")}
    graph = {}
    for name, path in modules.items():
        graph[name] = {m for m in _imports(path) if m in modules and m != name}
    return graph


def _cycle(graph: dict[str, set[str]]):
    """One import circle as a list of module names, or None (iterative depth-first search)."""
    colour = dict.fromkeys(graph, 0)
    for start in sorted(graph):
        if colour[start]:
            continue
        stack = [(start, iter(sorted(graph[start])))]
        colour[start], path = 1, [start]
        while stack:
            node, children = stack[-1]
            child = next(children, None)
            if child is None:
                colour[node] = 2
                stack.pop()
                path.pop()
            elif colour[child] == 1:
                return path[path.index(child):] + [child]
            elif colour[child] == 0:
                colour[child] = 1
                path.append(child)
                stack.append((child, iter(sorted(graph[child]))))
    return None


def _floor(module: str) -> str | None:
    parts = module.split(".")
    return parts[1] if len(parts) > 2 and parts[1] in FLOORS else None


@pytest.mark.parametrize("top", ["verifier", "bounds", "workbench"])
def test_no_import_circle(top):
    # A package __init__ that lists its modules' public names is not a circle member: skip the
    # edges from a package to its own submodules.
    graph = {m: {d for d in deps if not d.startswith(m + ".")} for m, deps in _graph(top).items()}
    assert _cycle(graph) is None, " -> ".join(_cycle(graph))


def test_the_acyclic_checker_finds_a_planted_circle():
    assert _cycle({"a": {"b"}, "b": {"c"}, "c": {"a"}, "d": set()}) == ["a", "b", "c", "a"]
    assert _cycle({"a": {"b"}, "b": set()}) is None


def test_subpackages_import_only_their_floor_or_lower():
    upward = []
    for module, deps in _graph("verifier").items():
        mine = _floor(module)
        for dep in deps:
            theirs = _floor(dep)
            if mine and theirs and FLOORS.index(theirs) > FLOORS.index(mine):
                upward.append(f"{module} imports {dep}")
    assert not upward, "\n".join(upward)


def test_every_verifier_module_lives_in_a_floor():
    loose = [p.name for p in (ROOT / "verifier").glob("*.py") if p.name != "__init__.py"]
    assert not loose, loose
    folders = {p.name for p in (ROOT / "verifier").iterdir() if p.is_dir() and not p.name.startswith("_")}
    assert folders == set(FLOORS) | {"standalone"}


def test_engine_knows_nothing_of_channels_or_the_command_line():
    bad = []
    for path in (ROOT / "verifier").rglob("*.py"):
        for m in _imports(path):
            if m.split(".")[0] in ("bounds", "workbench"):
                bad.append(f"{_module_name(path)} imports {m}")
    assert not bad, bad


def test_only_the_solver_layer_imports_pysmt():
    users = sorted(_module_name(p) for top in ("verifier", "bounds", "workbench") for p in (ROOT / top).rglob("*.py")
                   if any(m.split(".")[0] == "pysmt" for m in _imports(p)))
    assert users == ["verifier.solvers.smt"]


def test_the_standalone_checker_uses_only_the_standard_library():
    import sys
    path = ROOT / "verifier" / "standalone" / "check_certificates.py"
    outside = {m.split(".")[0] for m in _imports(path)} - set(sys.stdlib_module_names) - {"__future__"}
    assert not outside, outside


def test_each_subpackage_lists_its_public_names():
    import importlib
    for floor in FLOORS:
        package = importlib.import_module(f"verifier.{floor}")
        assert package.__doc__ and package.__all__, floor
        for name in package.__all__:
            value = getattr(package, name)
            # a listed name that is also a submodule's name would give the module, not the name
            assert value is not None and not isinstance(value, types.ModuleType), f"verifier.{floor}.{name}"
