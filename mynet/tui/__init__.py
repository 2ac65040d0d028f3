"""The terminal browser (``mynet browse``): one Textual app over one workspace."""

from .app import MynetApp, create_app

__all__ = ["MynetApp", "create_app"]
