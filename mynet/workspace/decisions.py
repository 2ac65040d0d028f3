"""Your decisions about ties, warmth, labels and groups: kept across re-imports, each one row of the decisions table."""

from __future__ import annotations

from ..errors import MynetError
from ..evidence.network import anchor_key
from ..store import Store

__all__ = ["add_tie", "remove_tie", "rate_contact", "decide_label", "LABEL_VERDICTS", "name_group", "DecisionsMixin"]


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
    from ..errors import NotFoundError
    from ..people.normalise import fold_text

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


def name_group(store: Store, gid: int, name: str | None) -> None:
    """Give a group your own name (``None`` or empty: back to the suggested label).

    The name belongs to the group's stable id, which follows the group across
    re-imports and re-analysis as long as most of its members stay together.
    """
    with store.transaction():
        store.delete_decisions("group_name", str(gid))
        if name and name.strip():
            store.add_decision("group_name", str(gid), "", name.strip(), bump=False)


class DecisionsMixin:
    """Your decisions about ties, warmth, labels and groups (part of :class:`~mynet.workspace.Workspace`)."""

    store: Store

    def tie(self, a: int, b: int, *, note: str = "", strength: float | None = None) -> None:
        """Say that two contacts know each other (``strength`` 0-1, default 0.8; kept across re-imports)."""
        add_tie(self.store, a, b, note, strength)

    def untie(self, a: int, b: int) -> None:
        """Suppress the tie between two contacts, whatever the evidence says."""
        remove_tie(self.store, a, b)

    def rate(self, contact_id: int, warmth: float | None) -> None:
        """Set your own warmth to a contact, 0-1 (None: back to the computed one)."""
        rate_contact(self.store, contact_id, warmth)

    def decide_label(self, label: str, verdict: str | None) -> str:
        """Count a label as evidence (``"count"``), never (``"ignore"``), or let mynet judge (None)."""
        return decide_label(self.store, label, verdict)

    def name_group(self, group_id: int, name: str | None) -> None:
        """Give a group your own name (None or empty: back to the suggested label)."""
        name_group(self.store, group_id, name)
