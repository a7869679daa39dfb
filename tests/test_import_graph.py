"""The flow goes one way: no module of planpack imports another in a circle.

Every ``import`` statement counts, also those inside functions (a lazy import
still ties two modules together; it only hides the circle from Python). The
graph is read from the source with ``ast``, so nothing is imported to build it.
"""

from __future__ import annotations

import ast
from pathlib import Path

PACKAGE = Path(__file__).resolve().parents[1] / "planpack"


def module_name(path: Path) -> str:
    rel = path.relative_to(PACKAGE.parent).with_suffix("")
    parts = list(rel.parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def modules() -> dict[str, Path]:
    return {module_name(p): p for p in sorted(PACKAGE.rglob("*.py"))}


def imports_of(name: str, path: Path, known: set[str]) -> set[str]:
    """The project modules ``name`` imports anywhere in its source."""
    tree = ast.parse(path.read_text(encoding="utf-8"), str(path))
    is_package = path.name == "__init__.py"
    out: set[str] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            for alias in node.names:
                if alias.name in known:
                    out.add(alias.name)
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = name.split(".") if is_package else name.split(".")[:-1]
                base = base[: len(base) - (node.level - 1)]
                target = ".".join(base + ([node.module] if node.module else []))
            else:
                target = node.module or ""
            for alias in node.names:
                sub = f"{target}.{alias.name}"
                if sub in known:
                    out.add(sub)  # "from planpack.publish import site": the module site
                elif target in known:
                    out.add(target)  # "from planpack.cli import main": the module cli
    out.discard(name)
    return out


def import_graph() -> dict[str, set[str]]:
    mods = modules()
    known = set(mods)
    graph = {name: imports_of(name, path, known) for name, path in mods.items()}
    # the command registry names its modules as strings; they count as imports of the entry point
    from planpack.commands import COMMANDS

    graph["planpack.cli"] |= {f"planpack.commands.{c}" for c in COMMANDS}
    return graph


def cycles(graph: dict[str, set[str]]) -> list[list[str]]:
    """Strongly connected components with more than one module (Tarjan, iterative)."""
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    on_stack: set[str] = set()
    stack: list[str] = []
    found: list[list[str]] = []
    counter = 0
    for root in sorted(graph):
        if root in index:
            continue
        work = [(root, iter(sorted(graph[root])))]
        index[root] = low[root] = counter
        counter += 1
        stack.append(root)
        on_stack.add(root)
        while work:
            node, children = work[-1]
            advanced = False
            for child in children:
                if child not in index:
                    index[child] = low[child] = counter
                    counter += 1
                    stack.append(child)
                    on_stack.add(child)
                    work.append((child, iter(sorted(graph.get(child, ())))))
                    advanced = True
                    break
                if child in on_stack:
                    low[node] = min(low[node], index[child])
            if advanced:
                continue
            work.pop()
            if work:
                low[work[-1][0]] = min(low[work[-1][0]], low[node])
            if low[node] == index[node]:
                comp = []
                while True:
                    m = stack.pop()
                    on_stack.discard(m)
                    comp.append(m)
                    if m == node:
                        break
                if len(comp) > 1:
                    found.append(sorted(comp))
    return found


def test_the_cycle_finder_finds_a_circle():
    graph = {"a": {"b"}, "b": {"c"}, "c": {"a"}, "d": {"a"}, "e": set()}
    assert cycles(graph) == [["a", "b", "c"]]
    assert cycles({"a": {"b"}, "b": set()}) == []


def test_the_graph_sees_lazy_and_relative_imports(tmp_path):
    pkg = tmp_path / "planpack"
    (pkg / "sub").mkdir(parents=True)
    (pkg / "__init__.py").write_text("")
    (pkg / "sub" / "__init__.py").write_text("from . import leaf\n")
    (pkg / "sub" / "leaf.py").write_text("def f():\n    from planpack import top\n")
    (pkg / "top.py").write_text("from planpack.sub.leaf import f\n")
    known = {"planpack", "planpack.sub", "planpack.sub.leaf", "planpack.top"}
    assert imports_of("planpack.sub", pkg / "sub" / "__init__.py", known) == {"planpack.sub.leaf"}
    assert imports_of("planpack.sub.leaf", pkg / "sub" / "leaf.py", known) == {"planpack.top"}
    assert imports_of("planpack.top", pkg / "top.py", known) == {"planpack.sub.leaf"}


def test_no_module_imports_another_in_a_circle():
    found = cycles(import_graph())
    assert found == [], "import circles: " + "; ".join(" <-> ".join(c) for c in found)


def test_the_shared_command_module_imports_no_command():
    from planpack.commands import COMMANDS

    graph = import_graph()
    commands = {f"planpack.commands.{c}" for c in COMMANDS}
    assert not graph["planpack.commands.common"] & commands
    # and nothing below the commands imports a command back
    for name, deps in graph.items():
        if not name.startswith("planpack.commands") and name != "planpack.cli":
            assert not deps & commands, f"{name} imports a command module"
