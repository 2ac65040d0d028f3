"""Heavy libraries loaded on first use, so that ``mynet --help`` and a cached answer never pay for them.

``nx = lazy_module("networkx")`` at the top of a module reads like an import;
the library is imported the first time one of its names is used. Type
annotations stay plain (every module uses ``from __future__ import annotations``).
"""

from __future__ import annotations

import importlib
from types import ModuleType
from typing import Any

__all__ = ["lazy_module"]


class LazyModule:
    """A stand-in for a module: the first attribute looked up imports it."""

    __slots__ = ("_name", "_module")

    def __init__(self, name: str):
        object.__setattr__(self, "_name", name)
        object.__setattr__(self, "_module", None)

    def _load(self) -> ModuleType:
        module = self._module
        if module is None:
            module = importlib.import_module(self._name)
            object.__setattr__(self, "_module", module)
        return module

    def __getattr__(self, attr: str) -> Any:
        return getattr(self._load(), attr)

    def __repr__(self) -> str:
        return f"<lazy module {self._name!r}{'' if self._module is None else ' (loaded)'}>"


def lazy_module(name: str) -> Any:
    """``name`` (a dotted module name), imported on first attribute access."""
    return LazyModule(name)
