"""The UI's modules import each other without cycles, and never the command line.

Every ``import`` statement counts, including those inside functions (a lazy
import still ties the two modules together for the reader and for tools).
"""

from __future__ import annotations

import ast
from pathlib import Path

import tri

ROOT = Path(tri.__file__).parent


def module_name(path: Path) -> str:
    rel = path.relative_to(ROOT.parent).with_suffix("")
    parts = list(rel.parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def imports_of(path: Path) -> set[str]:
    out: set[str] = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.Import):
            out.update(a.name for a in node.names)
        elif isinstance(node, ast.ImportFrom) and node.module and node.level == 0:
            out.add(node.module)
            out.update(f"{node.module}.{a.name}" for a in node.names)
    return out


def ui_graph() -> dict[str, set[str]]:
    files = {module_name(p): p for p in (ROOT / "tui").rglob("*.py")}
    return {m: {x for x in imports_of(p) if x in files and x != m} for m, p in files.items()}


def find_cycle(graph: dict[str, set[str]]) -> list[str] | None:
    state: dict[str, int] = {}
    stack: list[str] = []

    def visit(m: str) -> list[str] | None:
        state[m] = 1
        stack.append(m)
        for n in sorted(graph[m]):
            if state.get(n) == 1:
                return [*stack[stack.index(n) :], n]
            if n not in state and (found := visit(n)):
                return found
        stack.pop()
        state[m] = 2
        return None

    for m in sorted(graph):
        if m not in state and (found := visit(m)):
            return found
    return None


def test_ui_modules_have_no_import_cycle() -> None:
    cycle = find_cycle(ui_graph())
    assert cycle is None, " -> ".join(cycle or [])


def test_cycle_finder_finds_a_cycle() -> None:
    # The checker itself can fail: a two-module loop is reported.
    assert find_cycle({"a": {"b"}, "b": {"a"}}) == ["a", "b", "a"]
    assert find_cycle({"a": {"b"}, "b": set()}) is None


def test_ui_never_imports_the_command_line() -> None:
    for path in (ROOT / "tui").rglob("*.py"):
        bad = {x for x in imports_of(path) if x == "tri.cli" or x.startswith("tri.cli.")}
        assert not bad, f"{path.relative_to(ROOT)} imports {sorted(bad)}"
