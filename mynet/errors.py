"""A small exception hierarchy whose messages a user can act on.

The CLI turns these into one line on stderr and a non-zero exit code; the core
never prints or exits.
"""

from __future__ import annotations

__all__ = [
    "MynetError",
    "InputError",
    "UnknownFormatError",
    "RecordError",
    "WorkspaceError",
    "NotFoundError",
    "AmbiguousError",
]


class MynetError(Exception):
    """Base class for every error mynet reports to a user."""

    exit_code = 1


class InputError(MynetError):
    """A file cannot be read or understood at all (nothing from it is stored)."""

    exit_code = 2

    def __init__(self, path: str, reason: str, line: int | None = None):
        self.path = str(path)
        self.reason = reason
        self.line = line
        where = f"{self.path}:{line}" if line else self.path
        super().__init__(f"{where}: {reason}")


class UnknownFormatError(InputError):
    """A file whose kind (vCard, CSV, ...) cannot be recognised."""


class RecordError(InputError):
    """One record of a file is malformed (raised only in --strict mode)."""


class WorkspaceError(MynetError):
    """The workspace file is missing, locked, corrupt or from a newer version."""

    exit_code = 3


class NotFoundError(MynetError):
    """A person, group or source named on the command line does not exist."""

    exit_code = 4


class AmbiguousError(MynetError):
    """A name matches several people; the message lists them."""

    exit_code = 4
