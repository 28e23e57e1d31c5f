"""The package's layers hold: every import (module-level and inside functions) points down.

input (units, fileformat, model) → physics (numbers only) → planning → reports → front ends
(commands, cli, tui); materials are data and formulas; errors, atomic_write and numfmt are
ground-level helpers.  See DEVELOPERS.md for the rule of each layer.
"""

from __future__ import annotations

import ast
from pathlib import Path

PKG = Path(__file__).resolve().parent.parent / "regentime"


def _module_name(path: Path) -> str:
    rel = path.relative_to(PKG.parent).with_suffix("")
    parts = list(rel.parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def _imports() -> dict[str, set[str]]:
    """{module: {imported regentime modules}} for every module of the package."""
    out: dict[str, set[str]] = {}
    for path in PKG.rglob("*.py"):
        name = _module_name(path)
        found: set[str] = set()
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.Import):
                found |= {a.name for a in node.names if a.name.startswith("regentime")}
            elif isinstance(node, ast.ImportFrom) and node.module and node.level == 0 \
                    and node.module.startswith("regentime"):
                found.add(node.module)
                for a in node.names:  # "from regentime.planning import contrast"
                    sub = f"{node.module}.{a.name}"
                    if (PKG.parent / (sub.replace(".", "/") + ".py")).exists():
                        found.add(sub)
        out[name] = found - {name}
    return out


def _layer(module: str) -> str:
    parts = module.split(".")
    return parts[1] if len(parts) > 1 else "regentime"


def test_physics_imports_only_physics_and_materials():
    for mod, deps in _imports().items():
        if _layer(mod) == "physics":
            bad = {d for d in deps if _layer(d) not in ("physics", "materials")}
            assert not bad, (mod, bad)


def test_materials_import_nothing_of_the_input_layer():
    for mod, deps in _imports().items():
        if _layer(mod) == "materials":
            bad = {d for d in deps if _layer(d) not in ("materials", "physics")}
            assert not bad, (mod, bad)


def test_nothing_below_the_front_ends_imports_them():
    front = {"commands", "cli", "tui", "__main__", "completion"}  # completion: scripts from the parser
    for mod, deps in _imports().items():
        if _layer(mod) in front or mod == "regentime":
            continue
        bad = {d for d in deps if _layer(d) in front}
        assert not bad, (mod, bad)


def test_physics_and_planning_do_not_import_reports():
    for mod, deps in _imports().items():
        if _layer(mod) in ("physics", "planning", "fileformat", "materials", "model", "units"):
            bad = {d for d in deps if _layer(d) == "reports"}
            assert not bad, (mod, bad)


def test_no_import_cycles():
    graph = {m: {d for d in deps if d in _imports_cache} for m, deps in _imports_cache.items()}
    state: dict[str, int] = {}
    stack: list[str] = []

    def visit(m: str) -> None:
        state[m] = 1
        stack.append(m)
        for d in sorted(graph[m]):
            if d == "regentime" or d.startswith(m + "."):  # a package importing its own children
                continue
            if state.get(d) == 1:
                raise AssertionError("import cycle: " + " → ".join(stack[stack.index(d):] + [d]))
            if d not in state:
                visit(d)
        stack.pop()
        state[m] = 2

    for m in sorted(graph):
        if m not in state:
            visit(m)


def test_no_module_over_600_lines():
    long = {str(p.relative_to(PKG)): n for p in PKG.rglob("*.py")
            if (n := len(p.read_text(encoding="utf-8").splitlines())) > 600}
    assert not long, long


_imports_cache = _imports()
