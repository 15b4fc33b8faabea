"""No private reportlab API anywhere in the repository: no reportlab name with a leading underscore is imported,
read or overridden, and no reportlab object's ``__dict__`` is reached into (layout code, no published source)."""

from __future__ import annotations

import ast
import importlib
import inspect
import pkgutil
from functools import lru_cache
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
SOURCES = [p for d in ("machines", "reports", "wizard", "benchmarks", "tests") for p in (ROOT / d).rglob("*.py")]


def _private(name: str) -> bool:
    return name.startswith("_") and not name.startswith("__")


@lru_cache(maxsize=1)
def reportlab_private_names() -> frozenset[str]:
    """Every single-underscore name reportlab defines: in its modules and classes, and every ``obj._name`` its
    source reads or sets (instance attributes such as ``Table._cellvalues``). Dunders are Python's own."""
    import reportlab

    names: set[str] = set()
    for info in pkgutil.walk_packages(reportlab.__path__, "reportlab."):
        if ".tests" in info.name or info.name.endswith("__main__"):
            continue
        try:
            module = importlib.import_module(info.name)
        except Exception:  # optional parts (renderPM, rlextra): not used here
            continue
        for name, value in vars(module).items():
            if _private(name):
                names.add(name)
            if inspect.isclass(value) and value.__module__ == module.__name__:
                names |= {n for n in vars(value) if _private(n)}
    for path in Path(reportlab.__file__).parent.rglob("*.py"):
        try:
            tree = ast.parse(path.read_text("utf-8", errors="replace"))
        except SyntaxError:
            continue
        names |= {n.attr for n in ast.walk(tree) if isinstance(n, ast.Attribute) and _private(n.attr)}
    return frozenset(names)


def uses(tree: ast.AST, private: frozenset[str]) -> list[str]:
    found = []
    imports_reportlab = any(isinstance(n, (ast.Import, ast.ImportFrom)) and
                            ("reportlab" in (getattr(n, "module", "") or "") or
                             any(a.name.startswith("reportlab") for a in n.names)) for n in ast.walk(tree))
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom) and (node.module or "").startswith("reportlab"):
            found += [f"import {a.name}" for a in node.names if a.name.startswith("_")]
        elif isinstance(node, ast.Attribute) and node.attr in private:
            found.append(f".{node.attr} (line {node.lineno})")
        elif isinstance(node, ast.Attribute) and node.attr == "__dict__" and imports_reportlab:
            found.append(f".__dict__ (line {node.lineno})")
        elif isinstance(node, ast.ClassDef) and node.bases:  # a subclass overriding a private method
            found += [f"def {f.name} (line {f.lineno})" for f in node.body
                      if isinstance(f, (ast.FunctionDef, ast.AsyncFunctionDef)) and f.name in private]
    return sorted(found, key=lambda f: int(f.rsplit("line ", 1)[1].rstrip(")")) if "line " in f else 0)


def test_the_check_finds_what_it_looks_for():
    private = reportlab_private_names()
    assert {"_drawCell", "_textOut", "_cellvalues", "_startPage", "_code"} <= private
    tree = ast.parse("from reportlab.platypus import Table\nclass T(Table):\n    def _drawCell(self): pass\n"
                     "t = T([[1]])\nt._cellvalues\nt.__dict__\n")
    assert uses(tree, private) == ["def _drawCell (line 3)", "._cellvalues (line 5)", ".__dict__ (line 6)"]


def test_no_private_reportlab_name_in_the_repository():
    private = reportlab_private_names()
    bad = {}
    for path in SOURCES:
        if path.name == Path(__file__).name:
            continue
        found = uses(ast.parse(path.read_text("utf-8")), private)
        if found:
            bad[str(path.relative_to(ROOT))] = found
    assert bad == {}


def test_reportlab_is_not_capped_below_6():
    text = (ROOT / "pyproject.toml").read_text("utf-8")
    line = next(x for x in text.splitlines() if '"reportlab' in x)
    assert "<6" not in line.replace(" ", "") and ">=5" in line
