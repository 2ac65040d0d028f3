"""Workspace operations on ties and warmth: manual ties, suppressed ties, ratings, settings."""

from __future__ import annotations

from typing import Any

from .errors import MynetError
from .network import anchor_key
from .store import Store
from .ties import TieModel
from .warmth import WarmthModel

__all__ = ["add_tie", "remove_tie", "rate_contact", "update_settings", "update_list_setting", "decide_label", "SETTING_GROUPS",
           "LIST_SETTINGS", "LABEL_VERDICTS"]

def _analysis_model():
    from .analysis.snapshot import AnalysisModel

    return AnalysisModel


SETTING_GROUPS = {"tie_model": TieModel, "warmth_model": WarmthModel, "analysis": _analysis_model()}


def _pair_keys(store: Store, a: int, b: int) -> tuple[str, str]:
    if a == b:
        raise MynetError("a tie needs two different people")
    return anchor_key(store, a), anchor_key(store, b)


def add_tie(store: Store, a: int, b: int, note: str = "", strength: float | None = None) -> None:
    """Say that two contacts know each other (kept across re-imports)."""
    if strength is not None and not 0 < strength <= 1:
        raise MynetError("a tie's strength is between 0 (exclusive) and 1")
    ka, kb = _pair_keys(store, a, b)
    with store.transaction():
        store.delete_decisions("untie", ka, kb)
        store.delete_decisions("untie", kb, ka)
        store.delete_decisions("tie", ka, kb)
        store.delete_decisions("tie", kb, ka)
        store.add_decision("tie", ka, kb, {"note": note, "strength": strength})


def remove_tie(store: Store, a: int, b: int) -> None:
    """Suppress the tie between two contacts, whatever the evidence says (kept across re-imports)."""
    ka, kb = _pair_keys(store, a, b)
    with store.transaction():
        for kind in ("tie", "untie"):
            store.delete_decisions(kind, ka, kb)
            store.delete_decisions(kind, kb, ka)
        store.add_decision("untie", ka, kb, None)


def rate_contact(store: Store, cid: int, value: float | None) -> None:
    """Set (or, with None, clear) your own closeness to a contact, 0-1."""
    if value is not None and not 0 <= value <= 1:
        raise MynetError("a warmth is between 0 (not close) and 1 (closest)")
    key = anchor_key(store, cid)
    with store.transaction():
        store.delete_decisions("rate", key)
        store.add_decision("rate", key, "", value)


LIST_SETTINGS = {
    "webmail_domains": "mail domains that say nothing about an employer, besides the built-in list",
    "org_aliases": "organisation aliases, ALIAS=NAME pairs",
}


def update_list_setting(store: Store, name: str, value: str) -> Any:
    """Set ``webmail_domains`` (comma-separated) or ``org_aliases`` (``A=B`` pairs, comma-separated).

    A leading ``+`` adds to the current value instead of replacing it.
    """
    from .workspace import refresh_contacts

    add = value.startswith("+")
    items = [v.strip() for v in value.lstrip("+").split(",") if v.strip()]
    if name == "webmail_domains":
        current = list(store.setting(name, []) or []) if add else []
        new: Any = sorted({*current, *(i.lower().lstrip("@") for i in items)})
    elif name == "org_aliases":
        new = dict(store.setting(name, {}) or {}) if add else {}
        for item in items:
            if "=" not in item:
                raise MynetError(f"an organisation alias is written ALIAS=NAME, got {item!r}")
            alias, target = item.split("=", 1)
            new[alias.strip()] = target.strip()
    else:
        raise MynetError(f"unknown setting {name!r}; known lists: {', '.join(LIST_SETTINGS)}")
    with store.transaction():
        store.set_setting(name, new)
        refresh_contacts(store)
    return new


def update_settings(store: Store, group: str, key: str, value: str) -> dict[str, Any]:
    """Change one model setting (``tie_model.meeting_scale = 3``); returns the new settings."""
    if group not in SETTING_GROUPS:
        raise MynetError(f"unknown settings group {group!r}; choose from {', '.join(SETTING_GROUPS)}")
    cls = SETTING_GROUPS[group]
    defaults = cls().__dict__
    if key not in defaults:
        raise MynetError(f"unknown setting {group}.{key}; known: {', '.join(sorted(defaults))}")
    try:
        parsed = type(defaults[key])(float(value)) if isinstance(defaults[key], (int, float)) else value
    except ValueError as exc:
        raise MynetError(f"{group}.{key} takes a number, got {value!r}") from exc
    if isinstance(parsed, (int, float)) and parsed < 0:
        raise MynetError(f"{group}.{key} cannot be negative")
    current = dict(store.setting(group, {}) or {})
    current[key] = parsed
    store.set_setting(group, current)
    return current


LABEL_VERDICTS = ("count", "ignore")


def decide_label(store: Store, label: str, verdict: str | None) -> str:
    """Say whether a label counts as evidence (``"count"``, ``"ignore"``; ``None``: let mynet judge again).

    The decision is kept across re-imports (a row of the decisions table keyed by
    the folded label). Returns the label as your contacts carry it.

    Raises
    ------
    NotFoundError
        When no contact carries a label like ``label``.
    MynetError
        For a verdict other than "count", "ignore" or None.
    """
    from .errors import NotFoundError
    from .normalise import fold_text

    if verdict is not None and verdict not in LABEL_VERDICTS:
        raise MynetError(f"a label is either counted or ignored, not {verdict!r}")
    key = fold_text(label)
    shown = {}
    for c in store.contacts():
        for t in c.tags:
            shown.setdefault(fold_text(t), t)
    if not key or key not in shown:
        near = sorted(k for k in shown if key and (key in k or k in key))[:5]
        hint = f"; did you mean {', '.join(repr(shown[k]) for k in near)}?" if near else " (see: mynet tags)"
        raise NotFoundError(f"no contact carries the label {label!r}{hint}")
    with store.transaction():
        store.delete_decisions("label", key)
        if verdict is not None:
            store.add_decision("label", key, "", verdict)
        else:
            store.bump_data_version()
    return shown[key]
