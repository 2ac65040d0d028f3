"""mynet: your contact exports, turned into your professional network, on your own machine.

Use from Python (a notebook, a script)::

    import mynet

    ws = mynet.open_workspace("my.sqlite")
    ws.import_files(["phone.vcf", "calendar.ics"])
    frames = ws.frames()        # contacts, ties, groups, measures as pandas DataFrames
    G = ws.graph()              # a networkx Graph with every attribute

Importing this package is light: the workspace (and with it numpy, pandas,
networkx) is loaded on first use of :func:`open_workspace` or :class:`Workspace`.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from .errors import (
    AmbiguousError,
    InputError,
    MynetError,
    NotFoundError,
    RecordError,
    UnknownFormatError,
    WorkspaceError,
)

if TYPE_CHECKING:
    from .workspace import ImportReport, Workspace, open_workspace

__version__ = "0.1.0"

__all__ = [
    "AmbiguousError",
    "ImportReport",
    "InputError",
    "MynetError",
    "NotFoundError",
    "RecordError",
    "UnknownFormatError",
    "Workspace",
    "WorkspaceError",
    "open_workspace",
]

_LAZY = {"open_workspace", "Workspace", "ImportReport"}


def __getattr__(name: str) -> Any:
    """``mynet.open_workspace``, ``mynet.Workspace`` and ``mynet.ImportReport``, imported on first use."""
    if name in _LAZY:
        from . import workspace

        return getattr(workspace, name)
    raise AttributeError(f"module 'mynet' has no attribute {name!r}")
