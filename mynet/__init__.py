"""mynet: your contact exports, turned into your professional network, on your own machine.

The public API below is the core (no terminal UI, no CLI): import files into a
workspace, resolve identities, and read the results.
"""

from __future__ import annotations

from .errors import AmbiguousError, InputError, MynetError, NotFoundError, RecordError, UnknownFormatError, WorkspaceError
from .model import Contact, Evidence, Interaction, ParseResult, Record, Skipped, Tie
from .store import Store
from .workspace.importing import (
    ImportReport,
    find_contact,
    import_paths,
    merge_contacts,
    merge_suggestions,
    open_workspace,
    set_me,
    unmerge_contact,
)

__version__ = "0.1.0"

__all__ = [
    "AmbiguousError",
    "Contact",
    "Evidence",
    "ImportReport",
    "InputError",
    "Interaction",
    "MynetError",
    "NotFoundError",
    "ParseResult",
    "Record",
    "RecordError",
    "Skipped",
    "Store",
    "Tie",
    "UnknownFormatError",
    "WorkspaceError",
    "find_contact",
    "import_paths",
    "merge_contacts",
    "merge_suggestions",
    "open_workspace",
    "set_me",
    "unmerge_contact",
]
