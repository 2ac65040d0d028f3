"""The workspace: one file holding your imports, your decisions and what mynet derived from them.

:func:`open_workspace` returns a :class:`Workspace`, the one object the command
line, the terminal browser, the report and a notebook use. Its modules hold
one concern each: ``location`` (where the file lives), ``importing``,
``people``, ``decisions``, ``settings``, ``privacy``, ``results`` and
``frames``; ``api`` puts them together.
"""

from __future__ import annotations

from ..store.watch import ChangeWatch
from .api import Workspace, open_workspace
from .importing import FileReport, ImportReport
from .location import resolve_workspace_path

__all__ = ["Workspace", "open_workspace", "ImportReport", "FileReport", "ChangeWatch", "resolve_workspace_path"]
