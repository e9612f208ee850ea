"""The dashboard's layout rules (DEVELOPERS.md, "Dashboard"), checked on the source itself.

- no import cycle between the dashboard's modules (imports inside functions count too);
- no module of ``dashboard/`` over 400 lines;
- the folders import one way: ``present/`` and ``compute/`` (but its Streamlit cache) have no Streamlit and
  import no view, service or page module; ``services/`` imports no view; no view imports the page modules;
- every session-state key the code uses is described in ``dashboard/state.py``;
- the app picks tabs by view name, never by a tab's title.
"""

from __future__ import annotations

import ast
import pathlib
import re

import pytest

ROOT = pathlib.Path(__file__).resolve().parents[1]
DASHBOARD = ROOT / "dashboard"
MAX_MODULE_LINES = 400
PAGE_MODULES = {"dashboard.app", "dashboard.sidebar", "dashboard.header", "dashboard.loading", "dashboard.url_state"}


def _modules() -> dict[str, pathlib.Path]:
    out = {}
    for path in sorted(DASHBOARD.rglob("*.py")):
        parts = list(path.relative_to(ROOT).with_suffix("").parts)
        if parts[-1] == "__init__":
            parts = parts[:-1]
        out[".".join(parts)] = path
    return out


MODULES = _modules()


def _imports(name: str, path: pathlib.Path) -> set[str]:
    """The dashboard modules ``name`` imports (at any depth of its code)."""
    package = name if path.name == "__init__.py" else name.rsplit(".", 1)[0]
    found = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        targets = []
        if isinstance(node, ast.Import):
            targets = [a.name for a in node.names]
        elif isinstance(node, ast.ImportFrom):
            base = node.module or ""
            if node.level:
                anchor = package.split(".")
                anchor = anchor[:len(anchor) - (node.level - 1)]
                base = ".".join(anchor + ([base] if base else []))
            targets = [base] + [f"{base}.{a.name}" for a in node.names]
        for target in targets:
            while target and target not in MODULES:
                target = target.rsplit(".", 1)[0] if "." in target else ""
            if target and target != name:
                found.add(target)
    return found


GRAPH = {name: _imports(name, path) for name, path in MODULES.items()}


def test_no_import_cycle():
    """Depth-first search for a back edge; the cycle is named when there is one."""
    state, stack, cycles = {}, [], []

    def visit(node):
        state[node] = "open"
        stack.append(node)
        for nxt in sorted(GRAPH[node]):
            if nxt == "dashboard" or node == "dashboard":
                continue            # the package's own __init__ imports nothing
            if state.get(nxt) == "open":
                cycles.append(stack[stack.index(nxt):] + [nxt])
            elif nxt not in state:
                visit(nxt)
        stack.pop()
        state[node] = "done"

    for name in sorted(GRAPH):
        if name not in state:
            visit(name)
    assert not cycles, cycles


def test_the_cycle_check_finds_a_cycle():
    """The check above can fail: two modules importing each other are found."""
    saved = dict(GRAPH)
    try:
        GRAPH["dashboard.present.display"] = GRAPH["dashboard.present.display"] | {"dashboard.present.tables"}
        with pytest.raises(AssertionError):
            test_no_import_cycle()
    finally:
        GRAPH.clear()
        GRAPH.update(saved)


def test_no_module_over_400_lines():
    long = {str(p.relative_to(ROOT)): n for p in MODULES.values()
            if (n := len(p.read_text(encoding="utf-8").splitlines())) > MAX_MODULE_LINES}
    assert not long, long


def _imports_streamlit(path: pathlib.Path) -> bool:
    return bool(re.search(r"^\s*(import streamlit|from streamlit)", path.read_text(encoding="utf-8"), re.M))


def test_folders_import_one_way():
    wrong = []
    for name, targets in GRAPH.items():
        if name.startswith(("dashboard.present", "dashboard.compute")):
            if name != "dashboard.compute.cache" and _imports_streamlit(MODULES[name]):
                wrong.append((name, "streamlit"))
            wrong += [(name, t) for t in targets
                      if t.startswith(("dashboard.views", "dashboard.services")) or t in PAGE_MODULES]
        if name.startswith("dashboard.services"):
            wrong += [(name, t) for t in targets if t.startswith("dashboard.views") or t in PAGE_MODULES]
        if name.startswith("dashboard.views"):
            wrong += [(name, t) for t in targets if t in PAGE_MODULES]
    assert not wrong, wrong


KEY_USE = re.compile(r"""(?:session_state|\bss)(?:\.get\(|\.pop\(|\.setdefault\(|\[)\s*f?["']([^"'{|]+)""")
WIDGET_KEY = re.compile(r"""\bkey=f?["']([^"'{|]+)""")


def test_every_session_key_is_described_in_the_state_module():
    from dashboard import state

    undeclared = []
    for name, path in MODULES.items():
        text = path.read_text(encoding="utf-8")
        for key in KEY_USE.findall(text) + WIDGET_KEY.findall(text):
            if not state.declared(key):
                undeclared.append((name, key))
    assert not undeclared, undeclared
    assert not state.declared("no_such_key")


def test_the_app_picks_tabs_by_view_name():
    from dashboard.views import VIEW_TITLES

    tree = ast.parse((DASHBOARD / "app.py").read_text(encoding="utf-8"))
    titles = {n.value for n in ast.walk(tree) if isinstance(n, ast.Constant) and isinstance(n.value, str)}
    assert not titles & set(VIEW_TITLES.values())
