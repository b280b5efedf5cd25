"""Rules of dependency that the layout promises, checked on the source itself.

No import cycles among peakproof's modules, counting imports made inside functions too (a lazy
import still makes two modules depend on each other; a cycle is what lets a change in one break
the other at import time).
"""

from __future__ import annotations

import ast
from pathlib import Path

SRC = Path(__file__).resolve().parents[1] / "src"


def _modules() -> dict[str, tuple[Path, bool]]:
    out = {}
    for path in (SRC / "peakproof").rglob("*.py"):
        parts = list(path.relative_to(SRC).with_suffix("").parts)
        package = parts[-1] == "__init__"
        if package:
            parts = parts[:-1]
        out[".".join(parts)] = (path, package)
    return out


def _imports(name: str, path: Path, package: bool, modules) -> set[str]:
    found: set[str] = set()
    tree = ast.parse(path.read_text("utf-8"))
    # imports under ``if TYPE_CHECKING:`` are not dependencies at run time
    typing_only = {id(n) for top in ast.walk(tree) if isinstance(top, ast.If)
                   and "TYPE_CHECKING" in ast.dump(top.test) for n in ast.walk(top)}
    for node in ast.walk(tree):
        if id(node) in typing_only:
            continue
        if isinstance(node, ast.Import):
            found.update(a.name for a in node.names if a.name.split(".")[0] == "peakproof")
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = name.split(".") if package else name.split(".")[:-1]
                base = base[: len(base) - (node.level - 1)]
                target = ".".join(base + ([node.module] if node.module else []))
            else:
                target = node.module or ""
            if target.split(".")[0] != "peakproof":
                continue
            for alias in node.names:
                sub = f"{target}.{alias.name}"
                found.add(sub if sub in modules else target)
    return {m for m in found if m in modules and m != name}


def _cycles(graph: dict[str, set[str]]) -> list[list[str]]:
    """Strongly connected components with more than one module (Tarjan, iterative)."""
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    on_stack: set[str] = set()
    stack: list[str] = []
    out: list[list[str]] = []
    counter = 0
    for root in graph:
        if root in index:
            continue
        work = [(root, iter(sorted(graph[root])))]
        index[root] = low[root] = counter
        counter += 1
        stack.append(root)
        on_stack.add(root)
        while work:
            node, children = work[-1]
            child = next(children, None)
            if child is not None:
                if child not in index:
                    index[child] = low[child] = counter
                    counter += 1
                    stack.append(child)
                    on_stack.add(child)
                    work.append((child, iter(sorted(graph[child]))))
                elif child in on_stack:
                    low[node] = min(low[node], index[child])
                continue
            work.pop()
            if work:
                low[work[-1][0]] = min(low[work[-1][0]], low[node])
            if low[node] == index[node]:
                component = []
                while True:
                    member = stack.pop()
                    on_stack.discard(member)
                    component.append(member)
                    if member == node:
                        break
                if len(component) > 1:
                    out.append(sorted(component))
    return out


def test_no_import_cycles():
    modules = _modules()
    graph = {name: _imports(name, path, package, modules) for name, (path, package) in modules.items()}
    assert _cycles(graph) == []


def test_the_cycle_finder_finds_a_cycle():
    assert _cycles({"a": {"b"}, "b": {"c"}, "c": {"a"}, "d": {"a"}}) == [["a", "b", "c"]]
