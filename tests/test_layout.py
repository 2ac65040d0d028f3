"""The shape of the code: no import cycles, no private names across modules, SQL only in the store,
views only through the workspace object, migrations as single statements, a light ``import mynet``,
and DEVELOPERS.md's module table naming exactly the modules there are."""

from __future__ import annotations

import ast
import importlib
import inspect
import re
import sqlite3
import subprocess
import sys
from pathlib import Path

import networkx as nx
import pytest

ROOT = Path(__file__).resolve().parents[1]
PACKAGE = ROOT / "mynet"
VIEWS = ("mynet.cli", "mynet.tui", "mynet.report")


def module_name(path: Path) -> str:
    parts = list(path.relative_to(ROOT).with_suffix("").parts)
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


MODULES = {module_name(p): p for p in sorted(PACKAGE.rglob("*.py"))}


def parsed(path: Path) -> ast.Module:
    return ast.parse(path.read_text(encoding="utf-8"), str(path))


def runtime_nodes(tree: ast.Module):
    """Every node except those under ``if TYPE_CHECKING:`` (never run)."""
    skip: set[int] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.If) and "TYPE_CHECKING" in ast.unparse(node.test):
            skip.update(id(n) for n in ast.walk(node))
    return [n for n in ast.walk(tree) if id(n) not in skip]


def imported(name: str, path: Path, node: ast.ImportFrom) -> str:
    """The absolute module an ``from ... import`` reads from."""
    if not node.level:
        return node.module or ""
    base = name.split(".") if path.name == "__init__.py" else name.split(".")[:-1]
    base = base[: len(base) - (node.level - 1)]
    return ".".join(base + ([node.module] if node.module else []))


def import_graph() -> nx.DiGraph:
    """Module -> the mynet modules it imports (at the top or inside functions)."""
    G = nx.DiGraph()
    for name, path in MODULES.items():
        G.add_node(name)
        for node in runtime_nodes(parsed(path)):
            targets: list[str] = []
            if isinstance(node, ast.Import):
                targets = [a.name for a in node.names]
            elif isinstance(node, ast.ImportFrom):
                base = imported(name, path, node)
                targets = [base] + [f"{base}.{a.name}" for a in node.names]
            G.add_edges_from((name, t) for t in targets if t in MODULES and t != name)
    return G


def test_the_import_graph_is_read():
    G = import_graph()
    assert G.has_edge("mynet.workspace.api", "mynet.store")
    assert G.has_edge("mynet.cli.people", "mynet.workspace.results")


def test_no_import_cycles():
    cycles = sorted(nx.simple_cycles(import_graph()), key=len)
    assert not cycles, "import cycles: " + "; ".join(" -> ".join(c + c[:1]) for c in cycles[:10])


def private_imports(paths) -> list[str]:
    """``from mynet... import _name``, and a ``_module`` imported from outside its own package."""
    found = []
    for path in paths:
        name = module_name(path) if path.is_relative_to(PACKAGE) else "tests." + path.stem
        for node in ast.walk(parsed(path)):
            if not isinstance(node, ast.ImportFrom):
                continue
            source = imported(name, path, node) if node.level else node.module or ""
            if not source.startswith("mynet"):
                continue
            for alias in node.names:
                if alias.name.startswith("_") and not alias.name.startswith("__"):
                    found.append(f"{path.relative_to(ROOT)}:{node.lineno}: {alias.name} from {source}")
            for i, part in enumerate(source.split(".")):
                if part.startswith("_") and not part.startswith("__"):
                    owner = ".".join(source.split(".")[:i])
                    if not (name == owner or name.startswith(owner + ".")):
                        found.append(f"{path.relative_to(ROOT)}:{node.lineno}: module {source}")
    return found


def test_no_private_name_is_imported_from_another_module():
    paths = sorted(PACKAGE.rglob("*.py")) + sorted((ROOT / "tests").glob("*.py")) + \
        sorted((ROOT / "benchmarks").glob("*.py"))
    assert private_imports(paths) == []


def test_the_private_import_check_finds_one():
    probe = ROOT / "tests" / "__probe_private.py"
    try:
        probe.write_text("from mynet.analysis.groups import _fold\nfrom mynet.sources._csv_text import decode\n",
                         encoding="utf-8")
        found = private_imports([probe])
    finally:
        probe.unlink()
    assert len(found) == 2, found


SQL = re.compile(r"^\s*(SELECT|INSERT|UPDATE|DELETE|CREATE|ALTER|DROP|PRAGMA|VACUUM|BEGIN|COMMIT|ROLLBACK|WITH"
                 r"|REPLACE)\s", re.IGNORECASE)


def sql_strings(path: Path) -> list[str]:
    out = []
    for node in ast.walk(parsed(path)):
        if isinstance(node, ast.Constant) and isinstance(node.value, str) and SQL.match(node.value):
            # a statement names a table or a pragma; plain words ("Delete them") do not look like one
            if re.search(r"\b(FROM|INTO|TABLE|SET|WHERE|PRAGMA|VACUUM|BEGIN|COMMIT|ROLLBACK)\b", node.value):
                out.append(f"{path.relative_to(ROOT)}:{node.lineno}: {node.value.strip()[:60]}")
    return out


def test_sql_lives_only_in_the_store():
    outside = [hit for name, path in MODULES.items() if not name.startswith("mynet.store")
               for hit in sql_strings(path)]
    assert outside == []
    assert sql_strings(MODULES["mynet.store.database"]), "the check reads the store's statements"


def test_migrations_are_lists_of_single_statements():
    from mynet.store.schema import MIGRATIONS, SCHEMA_VERSION

    assert len(MIGRATIONS) == SCHEMA_VERSION
    for step in MIGRATIONS:
        assert isinstance(step, tuple) and step
        for statement in step:
            assert sqlite3.complete_statement(statement + ";"), statement
            # one statement: no ";" outside its string literals
            assert ";" not in re.sub(r"'[^']*'", "", statement), statement


def test_migrations_build_the_schema_the_store_opens(tmp_path):
    from mynet.store import SCHEMA_VERSION, Store

    with Store(tmp_path / "ws.sqlite") as store:
        assert store.conn.execute("PRAGMA user_version").fetchone()[0] == SCHEMA_VERSION
        tables = {r[0] for r in store.conn.execute("SELECT name FROM sqlite_master WHERE type = 'table'")}
    assert {"meta", "sources", "records", "interactions", "contact_map", "contacts", "decisions", "settings",
            "cache"} <= tables


def view_modules():
    return {n: p for n, p in MODULES.items() if n.startswith(VIEWS)}


def test_views_never_hold_a_store():
    for name, path in view_modules().items():
        for node in ast.walk(parsed(path)):
            if isinstance(node, ast.ImportFrom):
                source = imported(name, path, node)
                assert not source.startswith("mynet.store"), (name, node.lineno)
                assert "Store" not in [a.name for a in node.names], (name, node.lineno)
            if isinstance(node, ast.Attribute):
                assert node.attr not in ("store", "conn"), (name, node.lineno, ast.unparse(node))


def test_views_call_no_function_that_takes_a_store():
    """The core's loose functions over a store are the workspace's business; views call its methods."""
    for name, path in view_modules().items():
        for node in ast.walk(parsed(path)):
            if not isinstance(node, ast.ImportFrom):
                continue
            source = imported(name, path, node)
            if not source.startswith("mynet") or source.startswith(VIEWS):
                continue
            module = importlib.import_module(source)
            for alias in node.names:
                obj = getattr(module, alias.name, None)
                if inspect.isfunction(obj):
                    assert "store" not in inspect.signature(obj).parameters, (name, f"{source}.{alias.name}")


def test_importing_mynet_is_light():
    code = ("import sys, mynet\n"
            "heavy = ['pandas', 'networkx', 'igraph', 'matplotlib', 'textual', 'numpy', 'scipy', 'click', 'rich']\n"
            "print(sorted(m for m in heavy if m in sys.modules))\n"
            "assert callable(mynet.open_workspace) and mynet.Workspace.__name__ == 'Workspace'\n")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"


def module_table() -> str:
    text = (ROOT / "DEVELOPERS.md").read_text(encoding="utf-8")
    start = text.index("| module | holds |")
    return text[start:text.index("\n\n", start)]


def test_developers_module_table_names_exactly_the_modules():
    named = set(re.findall(r"`(mynet/[\w/]+\.py)`", module_table()))
    files = {str(p.relative_to(ROOT)) for p in PACKAGE.rglob("*.py")}
    assert named - files == set(), "named in DEVELOPERS.md but not in the tree"
    assert files - named == set(), "in the tree but not in DEVELOPERS.md's module table"


@pytest.mark.parametrize("name", sorted(MODULES))
def test_every_module_says_what_it_holds(name):
    assert ast.get_docstring(parsed(MODULES[name])), f"{name} has no module docstring"
