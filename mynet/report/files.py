"""Owner-only files and folders for reports and exports.

A report or an export holds the user's contacts, so every file is created
readable and writable by its owner only (mode 0600) and every folder it needs
is created 0700. An existing file is truncated and its mode set again: a file
left group-readable by another program does not stay so.
"""

from __future__ import annotations

import os
from pathlib import Path

from ..errors import MynetError

#: Above this many contacts the picture shows the map of groups instead of every contact.
MAX_CONTACTS_DRAWN = 2000

#: The steps :func:`mynet.report.data.collect` and :func:`mynet.report.write_report` report to ``progress``.
STEPS = ("load network", "analyse", "audit", "intro paths", "timeline", "picture", "charts", "write")

#: The formats ``mynet export`` writes.
FORMATS = ("graphml", "csv", "json")

__all__ = ["write_private", "private_dir", "FILE_MODE", "DIR_MODE", "MAX_CONTACTS_DRAWN", "STEPS", "FORMATS"]

FILE_MODE = 0o600
DIR_MODE = 0o700


def write_private(path: str | os.PathLike, data: str | bytes) -> Path:
    """Write ``data`` (text is encoded as UTF-8) to ``path`` with mode 0600.

    Raises
    ------
    MynetError
        When the file cannot be written (the message names it).
    """
    p = Path(path)
    raw = data.encode("utf-8") if isinstance(data, str) else data
    try:
        fd = os.open(p, os.O_CREAT | os.O_WRONLY | os.O_TRUNC, FILE_MODE)
    except OSError as exc:
        raise MynetError(f"cannot write {p}: {exc.strerror or exc}") from exc
    try:
        os.fchmod(fd, FILE_MODE)
        view = memoryview(raw)
        while view:
            n = os.write(fd, view)
            view = view[n:]
    finally:
        os.close(fd)
    return p


def private_dir(path: str | os.PathLike) -> Path:
    """Create the folder ``path`` (mode 0700) if needed; an existing one is set to 0700.

    Raises
    ------
    MynetError
        When ``path`` exists and is not a folder, or cannot be created.
    """
    p = Path(path)
    try:
        p.mkdir(mode=DIR_MODE, exist_ok=True)
        if not p.is_dir():
            raise MynetError(f"{p} exists and is not a folder")
        os.chmod(p, DIR_MODE)
    except FileExistsError as exc:
        raise MynetError(f"{p} exists and is not a folder") from exc
    except OSError as exc:
        raise MynetError(f"cannot create the folder {p}: {exc.strerror or exc}") from exc
    return p
