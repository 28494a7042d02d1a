"""The layer rules of DEVELOPERS.md, read from the source with ``ast`` (no import is run).

Every ``import`` and ``from ... import`` of a taumatch module is an edge: at module level,
inside a function (lazy), or under ``if TYPE_CHECKING:``.  The checks:

* no module imports from a higher layer than its own, in any of the three forms; the one
  exception is a result's ``plot`` method importing ``taumatch.plot`` lazily (the result
  delegates its picture, python-control's and scikit-rf's pattern);
* ``taumatch.plot`` imports nothing of taumatch but the foundation and itself: it draws
  what results carry and knows none of their types;
* ``taumatch.cli`` is imported by nothing but ``taumatch.__main__``;
* no import cycle, lazy and ``TYPE_CHECKING`` imports included, except the known one inside ``lti`` (its
  ``Rational`` reaches its responses lazily, which return ``Rational``s).

Project rule, no outside source: DESIGN.md's data flow and DEVELOPERS.md's layer table.
"""

from __future__ import annotations

import ast
from collections import defaultdict
from pathlib import Path


ROOT = Path(__file__).resolve().parents[1] / "src" / "taumatch"
PKG = "taumatch"

#: layer of each top-level module or package (DEVELOPERS.md's table); a module may import
#: from its own layer and those below.
LAYERS = {
    0: ("taumatch", "errors", "units", "atomic", "safety", "ranges"),
    1: ("lti",),
    2: ("network",),
    3: ("chain",),
    4: ("capture", "pulse"),
    5: ("fit",),
    6: ("analysis", "design", "diagnosis", "diagnosis_text", "diagnosis_curves", "chain_facts",
        "assumptions", "budget", "trimming", "fitted_chain", "resolution", "no_divider",
        "edge_diagnosis", "edge_adjustments", "correct", "demo"),
    7: ("plot",),
    8: ("report",),
    9: ("workbench",),
    10: ("cli", "__main__"),
}
_TOP = {name: k for k, names in LAYERS.items() for name in names}
FOUNDATION = set(LAYERS[0])
#: cycles allowed, by the package that holds all of their modules
KNOWN_CYCLES = {"lti"}


def _name(path: Path) -> str:
    parts = list(path.relative_to(ROOT.parent).with_suffix("").parts)
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


MODULES = {_name(p): p for p in sorted(ROOT.rglob("*.py"))}


def _lazy_names() -> dict:
    """The root package's lazily resolved names (``taumatch.diagnose`` → its module)."""
    tree = ast.parse((ROOT / "__init__.py").read_text(encoding="utf-8"))
    for node in tree.body:
        if isinstance(node, ast.Assign) and getattr(node.targets[0], "id", "") == "_LAZY":
            return {k: v[0] for k, v in ast.literal_eval(node.value).items()}
    return {}


LAZY_ROOT = _lazy_names()


def top(module: str) -> str:
    parts = module.split(".")
    return parts[1] if len(parts) > 1 else PKG


def layer(module: str) -> int:
    return _TOP[top(module)]


def _targets(module: str, is_package: bool, node) -> list:
    if isinstance(node, ast.Import):
        return [a.name for a in node.names if a.name.split(".")[0] == PKG]
    if node.level:
        base = module.split(".") if is_package else module.split(".")[:-1]
        base = base[: len(base) - (node.level - 1)]
        target = ".".join(base + ([node.module] if node.module else []))
    else:
        target = node.module or ""
    if target.split(".")[0] != PKG:
        return []
    out = []
    for alias in node.names:
        sub = f"{target}.{alias.name}"
        if sub in MODULES:
            out.append(sub)
        elif target == PKG and alias.name in LAZY_ROOT:
            out.append(LAZY_ROOT[alias.name])
        else:
            out.append(target)
    return out


def _is_type_checking(node) -> bool:
    t = node.test
    return getattr(t, "id", None) == "TYPE_CHECKING" or getattr(t, "attr", None) == "TYPE_CHECKING"


def _edges():
    """``(source, target, how, function, line)``; ``how`` is "module", "lazy" or "typing"."""
    out = []

    def walk(module, is_package, body, how, function):
        for node in body:
            if isinstance(node, (ast.Import, ast.ImportFrom)):
                for target in _targets(module, is_package, node):
                    out.append((module, target, how, function, node.lineno))
            elif isinstance(node, ast.If) and _is_type_checking(node):
                walk(module, is_package, node.body, "typing", function)
                walk(module, is_package, node.orelse, how, function)
            elif isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)):
                walk(module, is_package, node.body, "lazy" if how == "module" else how,
                     node.name)
            else:
                for name in ("body", "orelse", "finalbody", "handlers"):
                    sub = getattr(node, name, None)
                    if isinstance(sub, list):
                        walk(module, is_package, sub, how, function)

    for module, path in MODULES.items():
        tree = ast.parse(path.read_text(encoding="utf-8"))
        walk(module, path.name == "__init__.py", tree.body, "module", None)
    return out


EDGES = _edges()


def _delegates_picture(edge) -> bool:
    """A result's ``plot`` method importing the plotting package lazily."""
    _source, target, how, function, _line = edge
    return how == "lazy" and function == "plot" and top(target) == "plot"


def upward_imports():
    return [e for e in EDGES if layer(e[1]) > layer(e[0]) and not _delegates_picture(e)]


def cycles():
    """Strongly connected groups of more than one module in the import graph: module-level,
    lazy and ``TYPE_CHECKING`` imports alike (a circle a type checker walks is a circle in
    the design, even when no import runs it)."""
    graph = defaultdict(set)
    for source, target, _how, _f, _l in EDGES:
        if source != target:
            graph[source].add(target)
    index, low, stack, on, found = {}, {}, [], set(), []

    def connect(v):
        index[v] = low[v] = len(index)
        stack.append(v)
        on.add(v)
        for w in sorted(graph[v]):
            if w not in index:
                connect(w)
                low[v] = min(low[v], low[w])
            elif w in on:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            group = []
            while True:
                w = stack.pop()
                on.discard(w)
                group.append(w)
                if w == v:
                    break
            if len(group) > 1:
                found.append(sorted(group))

    for v in sorted(MODULES):
        if v not in index:
            connect(v)
    return found


def _package(group) -> str | None:
    """The one package all modules of a cycle sit in, or None."""
    tops = {top(m) for m in group}
    return tops.pop() if len(tops) == 1 else None


def test_every_module_has_a_layer():
    assert {top(m) for m in MODULES} <= set(_TOP), sorted({top(m) for m in MODULES} - set(_TOP))


def test_the_graph_is_read():
    """Guards the check itself: the reader sees the imports it must see."""
    pairs = {(s, t, how) for s, t, how, _f, _l in EDGES}
    assert ("taumatch.lti.responses", "taumatch.lti.rational", "module") in pairs
    assert any(s == "taumatch.cli.cmd_diagnose" and how == "lazy" for s, _t, how in pairs)
    assert any(_delegates_picture(e) for e in EDGES)


def test_no_upward_import():
    bad = [f"{s} → {t} ({how}, line {line})" for s, t, how, _f, line in upward_imports()]
    assert not bad, "\n".join(bad)


def test_plot_knows_no_result_type():
    bad = [f"{s} → {t} ({how}, line {line})" for s, t, how, _f, line in EDGES
           if top(s) == "plot" and top(t) not in FOUNDATION | {"plot"}]
    assert not bad, "\n".join(bad)


def test_cli_is_imported_by_nothing_below_it():
    bad = [f"{s} → {t} (line {line})" for s, t, _how, _f, line in EDGES
           if top(t) == "cli" and top(s) not in ("cli", "__main__")]
    assert not bad, "\n".join(bad)


def test_no_import_cycle_but_the_known_ones():
    bad = [g for g in cycles() if _package(g) not in KNOWN_CYCLES]
    assert not bad, bad
    lti = [g for g in cycles() if _package(g) == "lti"]
    assert len(lti) <= 1


def test_no_import_cycle_in_network():
    """Regression: band → pencil → transfer → band was a circle until the transfer record
    (``network/info.py``) became a leaf."""
    assert not [g for g in cycles() if _package(g) == "network"]


def _third_party_imports():
    """``(module, top-level name imported, how)`` for imports of other packages."""
    out = []

    def walk(module, body, how):
        for node in body:
            if isinstance(node, ast.Import):
                out.extend((module, a.name.split(".")[0], how) for a in node.names)
            elif isinstance(node, ast.ImportFrom) and not node.level and node.module:
                out.append((module, node.module.split(".")[0], how))
            elif isinstance(node, ast.If) and _is_type_checking(node):
                walk(module, node.body, "typing")
            elif isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)):
                walk(module, node.body, "lazy" if how == "module" else how)
            else:
                for name in ("body", "orelse", "finalbody", "handlers"):
                    sub = getattr(node, name, None)
                    if isinstance(sub, list):
                        walk(module, sub, how)

    for module, path in MODULES.items():
        walk(module, ast.parse(path.read_text(encoding="utf-8")).body, "module")
    return out


def test_click_in_cli_only_and_matplotlib_inside_functions_only():
    """DESIGN.md: only the edges import click, and matplotlib only inside functions, so that
    ``import taumatch`` stays fast and works without a display."""
    found = _third_party_imports()
    assert not [m for m, name, _ in found if name == "click" and top(m) != "cli"]
    assert not [m for m, name, how in found if name == "matplotlib" and how == "module"]
