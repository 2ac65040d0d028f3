"""The store: the one SQLite file of a workspace, and every SQL statement mynet runs.

``database.py`` opens the file (0600, WAL, read-only when it cannot be written),
runs the migrations of ``schema.py`` and holds the reads and writes the rest of
mynet calls; ``watch.py`` notices changes made by another process. No module
outside this package writes SQL (``tests/test_layout.py`` checks it).
"""

from __future__ import annotations

from .database import SCHEMA_VERSION, SourceRow, Store

__all__ = ["Store", "SCHEMA_VERSION", "SourceRow"]
