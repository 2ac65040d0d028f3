"""The workspace object: one open workspace file and everything you can do with it.

``open_workspace(path)`` returns a :class:`Workspace`; the command line, the
terminal browser, the report and a notebook all work through it::

    ws = open_workspace("my.sqlite")
    ws.import_files(["phone.vcf", "calendar.ics"])
    ws.set_me(emails=["me@example.org"])
    frames = ws.frames()           # contacts, ties, groups, measures as DataFrames
    G = ws.graph()                 # a networkx Graph with every attribute

Its methods come by concern: importing (:mod:`.importing`), people
(:mod:`.people`), decisions (:mod:`.decisions`), settings (:mod:`.settings`),
privacy (:mod:`.privacy`), results (:mod:`.results`, :mod:`.frames`) and targets, asks and
the plan (:mod:`.planning`, :mod:`.asks`).
Every change runs in one transaction, so a failure leaves the file as it was.
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Callable

from ..store import Store
from .decisions import DecisionsMixin
from .importing import ImportingMixin
from .location import resolve_workspace_path
from .people import PeopleMixin
from .planning import AsksMixin
from .privacy import PrivacyMixin
from .results import ResultsMixin
from .settings import SettingsMixin

__all__ = ["Workspace", "open_workspace"]


class Workspace(ImportingMixin, PeopleMixin, DecisionsMixin, SettingsMixin, PrivacyMixin, ResultsMixin, AsksMixin):
    """One workspace file: your imports, your decisions, and what mynet derives from them.

    Parameters
    ----------
    path : path-like, optional
        The workspace file; default ``$MYNET_WORKSPACE``, else the platform's user data folder.
    create : bool, default True
        Create the file (mode 0600) when it is missing; when false a missing file raises
        :class:`~mynet.errors.WorkspaceError`.
    timeout : float, default 30
        Seconds to wait while another process writes.

    Attributes
    ----------
    path : pathlib.Path
    read_only : bool
        True when the file, its folder or its disk cannot be written: results work, changes raise
        :class:`~mynet.errors.WorkspaceError`.
    store : mynet.store.Store
        The SQLite file underneath (for the core; the views use the methods).
    progress : callable or None
        Called with the name of each step of a fresh analysis (``mynet.analysis.snapshot.STEPS``);
        the command line sets it to a progress bar on stderr.
    """

    progress: Callable[[str], None] | None = None

    def __init__(self, path: str | os.PathLike | None = None, *, create: bool = True, timeout: float = 30.0):
        self.store = Store(resolve_workspace_path(path), create=create, timeout=timeout)

    @classmethod
    def over(cls, store: Store) -> "Workspace":
        """A workspace over a store that is already open (closing the workspace closes the store)."""
        ws = cls.__new__(cls)
        ws.store = store
        return ws

    @property
    def path(self) -> Path:
        return self.store.path

    @property
    def read_only(self) -> bool:
        return self.store.read_only

    @property
    def data_version(self) -> int:
        """Goes up with every change that any derived result depends on."""
        return self.store.data_version

    def last_decision_id(self) -> int:
        """The newest decision's id (some decisions, such as a group's name, change no data version)."""
        return self.store.last_decision_id()

    def close(self) -> None:
        self.store.close()

    def __enter__(self) -> "Workspace":
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    def __repr__(self) -> str:
        return f"<Workspace {str(self.path)!r}{' read-only' if self.read_only else ''}>"


def open_workspace(path: str | os.PathLike | None = None, *, create: bool = True) -> Workspace:
    """Open (or create) the workspace at ``path``, ``$MYNET_WORKSPACE`` or the default place."""
    return Workspace(path, create=create)
