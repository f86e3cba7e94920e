"""The package's layering rules (DEVELOPERS.md "Layout"), checked on the source itself.

Project rules, not outside facts: analytic imports neither sim nor compare; sim never imports
compare; only sim imports Meep or mpi4py; inside compare only jobs/ and regress/ reach sim
(the case room may read the pure-data FdtdSettings and the pure grid rules of sim/grid_fit.py); no private name crosses a module; no
import statement runs inside a loop.
"""

import ast
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parents[1] / "hornproof"
MODULES = sorted(p for p in PACKAGE.rglob("*.py") if "__pycache__" not in p.parts)
CALLERS_OF_SIM = ("hornproof.compare.jobs", "hornproof.compare.regress")


def module_name(path):
    parts = list(path.relative_to(PACKAGE.parent).with_suffix("").parts)
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def room_of(module):
    parts = module.split(".")
    return ".".join(parts[:3]) if parts[:2] == ["hornproof", "compare"] else ".".join(parts[:2])


def imports(tree, module, is_package):
    """(imported module, imported names, aliases, node) of every import statement."""
    package = module.split(".") if is_package else module.split(".")[:-1]
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            for alias in node.names:
                yield alias.name, (), (alias.asname,), node
        elif isinstance(node, ast.ImportFrom):
            base = package[:len(package) - node.level + 1] if node.level else []
            target = ".".join(base + ([node.module] if node.module else []))
            yield target, tuple(a.name for a in node.names), tuple(a.asname for a in node.names), node


def _private(name):
    return bool(name) and name.startswith("_") and not name.startswith("__")


def layering_violations(text, module, is_package=False):
    """One line per broken rule in the source ``text`` of ``module``."""
    tree = ast.parse(text)
    room = room_of(module)
    found = []
    for target, names, aliases, node in imports(tree, module, is_package):
        where = f"{module}:{node.lineno}"
        reached = [target] + [f"{target}.{name}" for name in names]
        if target.split(".")[0] in ("meep", "mpi4py") and room != "hornproof.sim":
            found.append(f"{where}: only sim/ imports {target}")
        if room == "hornproof.analytic" and any(t.startswith(("hornproof.sim", "hornproof.compare")) for t in reached):
            found.append(f"{where}: analytic/ imports {target}")
        if room == "hornproof.sim" and any(t.startswith("hornproof.compare") for t in reached):
            found.append(f"{where}: sim/ imports {target}")
        if room.startswith("hornproof.compare") and room not in CALLERS_OF_SIM:
            sim = [t for t in reached if t.startswith("hornproof.sim.")]
            allowed = ("hornproof.sim.settings", "hornproof.sim.grid_fit") if room == "hornproof.compare.case" else ()
            if any(not t.startswith(allowed) for t in sim) if allowed else sim:
                found.append(f"{where}: {room} calls sim/ ({target})")
        if target.startswith("hornproof") and (any(map(_private, names)) or any(map(_private, aliases))):
            found.append(f"{where}: a private name crosses a module ({target}: {names})")
    for loop in ast.walk(tree):
        if isinstance(loop, (ast.For, ast.While)):
            for statement in loop.body + loop.orelse:
                for node in ast.walk(statement):
                    if isinstance(node, (ast.Import, ast.ImportFrom)):
                        found.append(f"{module}:{node.lineno}: import inside a loop")
    return found


@pytest.mark.parametrize("path", MODULES, ids=lambda p: str(p.relative_to(PACKAGE)))
def test_module_follows_the_layering(path):
    assert layering_violations(path.read_text(encoding="utf-8"), module_name(path),
                               path.name == "__init__.py") == []


@pytest.mark.parametrize("text, module, expected", [
    ("from ..sim import run\n", "hornproof.analytic.probe", "analytic/ imports hornproof.sim"),
    ("import meep\n", "hornproof.compare.report.probe", "only sim/ imports meep"),
    ("from ...compare.jobs import verify\n", "hornproof.sim.probe.deep", "sim/ imports"),
    ("from ...sim.run import simulate\n", "hornproof.compare.cli.probe", "calls sim/"),
    ("from ...sim.run import simulate\n", "hornproof.compare.case.probe", "calls sim/"),
    ("from .ladder import _secret\n", "hornproof.compare.jobs.probe", "private name"),
    ("for x in y:\n    import json\n", "hornproof.compare.jobs.probe", "inside a loop"),
])
def test_the_rules_catch_a_violation(text, module, expected):
    # the checker must be able to fail: each probe breaks one rule
    found = layering_violations(text, module)
    assert any(expected in line for line in found), found


def test_allowed_imports_pass():
    assert layering_violations("from ...sim.settings import FdtdSettings\n", "hornproof.compare.case.probe") == []
    assert layering_violations("from ...sim.run import simulate\n", "hornproof.compare.jobs.probe") == []
