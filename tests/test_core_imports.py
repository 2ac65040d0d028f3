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
