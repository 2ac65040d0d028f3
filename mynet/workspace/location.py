"""Every file location mynet uses, in one place.

The workspace lives in the platform's user data directory unless the
``MYNET_WORKSPACE`` environment variable or the CLI's ``--workspace`` option
names another file, so tests and demos never touch a user's real data.
"""

from __future__ import annotations

import os
from pathlib import Path

__all__ = ["ENV_VAR", "default_workspace_path", "resolve_workspace_path"]

ENV_VAR = "MYNET_WORKSPACE"
WORKSPACE_FILENAME = "workspace.sqlite"


def default_workspace_path() -> Path:
    """The workspace file in the platform's user data directory."""
    from platformdirs import user_data_dir

    return Path(user_data_dir("mynet", appauthor=False)) / WORKSPACE_FILENAME


def resolve_workspace_path(explicit: str | os.PathLike | None = None) -> Path:
    """The workspace to open: ``explicit``, else ``$MYNET_WORKSPACE``, else the default."""
    if explicit:
        return Path(explicit).expanduser()
    env = os.environ.get(ENV_VAR)
    if env:
        return Path(env).expanduser()
    return default_workspace_path()
