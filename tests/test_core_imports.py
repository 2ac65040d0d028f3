"""The core never imports the views (dependencies point one way): the command line, the browser, the report."""

from __future__ import annotations

import pkgutil
import subprocess
import sys

import mynet

VIEWS = ("mynet.cli", "mynet.tui", "mynet.report")
FORBIDDEN = ("textual", "rich", "click", "typer", *VIEWS)


def core_modules() -> list[str]:
    names = []
    for info in pkgutil.walk_packages(mynet.__path__, "mynet."):
        if info.name.startswith((*VIEWS, "mynet.__main__")):
            continue
        names.append(info.name)
    return sorted(names)


def test_core_modules_found():
    mods = core_modules()
    assert "mynet.store" in mods and "mynet.people.identity" in mods and "mynet.sources.vcard" in mods
    assert "mynet.workspace.api" in mods and not any(m.startswith(VIEWS) for m in mods)


def test_core_never_imports_a_view():
    code = (
        "import importlib, sys, json\n"
        f"bad = {{}}\n"
        f"for name in {core_modules()!r}:\n"
        "    importlib.import_module(name)\n"
        f"hits = sorted(m for m in sys.modules if m.split('.')[0] in {{'textual','rich','click','typer'}} "
        f"or m.startswith({VIEWS!r}))\n"
        "print(json.dumps(hits))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]", out.stdout


HEAVY = ("pandas", "textual", "igraph", "matplotlib", "networkx", "scipy", "numpy", "rich")


def test_help_and_version_import_no_heavy_library():
    """``mynet --help`` / ``--version`` register every command without loading what the commands use."""
    code = (
        "import sys, json, io, contextlib\n"
        "from mynet.cli import main\n"
        "for args in (['--help'], ['--version'], ['contacts', '--help'], ['report', '--help']):\n"
        "    with contextlib.redirect_stdout(io.StringIO()):\n"
        "        assert main(args) == 0\n"
        f"print(json.dumps(sorted(m for m in sys.modules if m.split('.')[0] in {HEAVY!r})))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]", out.stdout


def test_a_lazy_module_loads_on_first_use():
    code = ("import sys\n"
            "from mynet.lazy import lazy_module\n"
            "m = lazy_module('fractions')\n"
            "sys.modules.pop('fractions', None)\n"
            "before = 'fractions' in sys.modules\n"
            "print(before, m.Fraction(1, 2) == 0.5, 'fractions' in sys.modules)\n")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.split() == ["False", "True", "True"]
