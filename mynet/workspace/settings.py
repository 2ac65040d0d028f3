"""Settings of a workspace: the whole typed schema, and changing one setting from the text a user typed.

The schema's machinery (:class:`~mynet.settings.Spec`, :class:`~mynet.settings.SettingsGroup`)
is :mod:`mynet.settings`; the models that declare settings register themselves
when imported, which this module does, so :func:`schema` always lists them all.
"""

from __future__ import annotations

from typing import Any, Mapping

from ..analysis import snapshot  # noqa: F401  (AnalysisModel registers its settings)
from ..evidence import introductions, ties, warmth  # noqa: F401  (AskModel, TieModel, WarmthModel register theirs)
from ..people.refresh import refresh_contacts
from ..settings import SettingError, Spec, registered
from ..store import Store

__all__ = ["groups", "schema", "stored_value", "parse", "update_setting", "update_list_setting", "update_settings",
           "current_settings", "SettingsMixin"]


def groups() -> dict[str, type]:
    """Group name -> its model dataclass (``tie_model``, ``warmth_model``, ``analysis``)."""
    return registered()[0]


def schema() -> dict[str, Spec]:
    """Every setting: full name -> :class:`~mynet.settings.Spec`, model groups first, then the workspace-wide ones."""
    model_groups, declared = registered()
    out: dict[str, Spec] = {}
    for cls in model_groups.values():
        out.update({spec.name: spec for spec in cls.specs().values()})
    out.update(declared)
    return out


def stored_value(settings: Mapping[str, Any], name: str) -> Any:
    """The value in force for a full setting name, from the stored settings (its default when unset)."""
    spec = schema()[name]
    if "." in name and name.split(".", 1)[0] in groups():
        group, key = name.split(".", 1)
        raw = settings.get(group) or {}
        return raw.get(key, spec.default)
    value = settings.get(name)
    return spec.default if value is None else value


def parse(name: str, text: str, current: Any = None) -> Any:
    """Check the value typed for setting ``name``.

    Raises
    ------
    SettingError
        For an unknown name (with the closest known one) or a value the setting does not accept.
    """
    specs = schema()
    if name not in specs:
        import difflib

        close = difflib.get_close_matches(name, list(specs), n=1)
        hint = f"; did you mean {close[0]}?" if close else ""
        raise SettingError(f"unknown setting {name!r}{hint} (mynet settings lists them all)")
    return specs[name].parse(text, current)


def current_settings(store: Store) -> dict[str, Any]:
    """Every setting's value in force (its default when unset), by full name, in schema order."""
    stored = store.settings()
    return {name: stored_value(stored, name) for name in schema()}


def update_setting(store: Store, name: str, text: str) -> Any:
    """Change one setting (``tie_model.meeting_scale``, ``webmail_domains``...) from the text a user typed.

    The value is checked against the setting's schema entry before anything is
    stored; a list setting takes a leading ``+`` to add to its current value.
    Returns the value stored.

    Raises
    ------
    SettingError
        For an unknown setting or a value it does not accept (nothing is stored).
    """
    spec = schema().get(name)
    group = name.split(".", 1)[0] if "." in name and name.split(".", 1)[0] in groups() else None
    current = stored_value(store.settings(), name) if spec else None
    value = parse(name, text, current)
    with store.transaction():
        if group:
            stored = dict(store.setting(group, {}) or {})
            stored[name.split(".", 1)[1]] = value
            store.set_setting(group, stored)
        else:
            store.set_setting(name, value)
        if spec is not None and spec.affects == "contacts":
            refresh_contacts(store)
    return value


def update_list_setting(store: Store, name: str, value: str) -> Any:
    """Set a workspace-wide list setting (``webmail_domains``, ``org_aliases``); see :func:`update_setting`."""
    return update_setting(store, name, value)


def update_settings(store: Store, group: str, key: str, value: str) -> dict[str, Any]:
    """Change one model setting (``tie_model``, ``meeting_scale``, ``"3"``); returns the group's stored values."""
    update_setting(store, f"{group}.{key}", value)
    return dict(store.setting(group, {}) or {})


class SettingsMixin:
    """Settings, typed through the schema (part of :class:`~mynet.workspace.Workspace`)."""

    store: Store

    def settings(self) -> dict[str, Any]:
        """Every setting's value in force, by full name (``tie_model.min_strength``, ``webmail_domains``...)."""
        return current_settings(self.store)

    def setting(self, name: str) -> Any:
        """One setting's value in force (its default when unset).

        Raises
        ------
        SettingError
            For an unknown setting.
        """
        if name not in schema():
            parse(name, "")  # the same message as setting it: unknown, with the closest known name
        return stored_value(self.store.settings(), name)

    def set_setting(self, name: str, value: Any) -> Any:
        """Change a setting; ``value`` is checked against the schema (text as typed, or a value). Returns it as stored.

        A list setting given as text takes a leading ``+`` to add to its current value.
        """
        return update_setting(self.store, name, value if isinstance(value, str) else _as_text(value))

    def settings_schema(self) -> dict[str, Spec]:
        """Every setting's spec (kind, accepted values, meaning, default), by full name."""
        return schema()


def _as_text(value: Any) -> str:
    """A value written the way :meth:`~mynet.settings.Spec.parse` reads it."""
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, dict):
        return ",".join(f"{k}={v}" for k, v in value.items())
    if isinstance(value, (list, tuple, set)):
        return ",".join(str(v) for v in value)
    return str(value)
