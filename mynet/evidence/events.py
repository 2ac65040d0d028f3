"""The meetings and mail threads that tie evidence is counted over, defined once.

:func:`evidence_events` says what a shared meeting or thread is; the tie
inference (:func:`mynet.evidence.ties.infer_ties`) counts over these events and
:class:`EventIndex` lists them for one pair (``mynet why``, the browser), so a
tie's counts and its explanation always agree.
"""

from __future__ import annotations

from collections import defaultdict
from dataclasses import dataclass
from typing import Iterable, Sequence

from ..model import Contact, Interaction

__all__ = ["Event", "EventLists", "event_lists", "evidence_events", "contact_of_email", "EventIndex", "shared_events"]


@dataclass
class Event:
    """One meeting, or one mail thread, as tie evidence.

    ``participants`` are the sorted, unique addresses of everyone in it (you
    included); ``items`` the interactions behind it (one for a meeting, the
    messages of a thread).
    """

    kind: str  # "meeting" or "thread"
    key: str
    participants: list[str]
    items: list[Interaction]

    @property
    def size(self) -> int:
        return len(self.participants)


@dataclass
class EventLists:
    """The evidence events as parallel lists (what :func:`mynet.evidence.ties.infer_ties` needs; no object each)."""

    meeting_parts: list[list[str]]
    meeting_items: list[Interaction]
    thread_keys: list[str]
    thread_parts: list[list[str]]
    thread_items: list[list[Interaction]]


def event_lists(interactions: Iterable[Interaction]) -> EventLists:
    """The meetings and threads that tie evidence is counted over (bulk mail left out).

    This is the one place that says what a shared meeting or thread is: a
    meeting's participants are its attendees; a thread's are everyone in any of
    its messages (grouped by thread root, else the message itself).
    :func:`mynet.evidence.ties.infer_ties` counts over these events and
    :class:`EventIndex` lists them for one pair, so a tie's counts and its
    explanation always agree.
    """
    meeting_parts: list[list[str]] = []
    meeting_items: list[Interaction] = []
    threads: dict[str, list[Interaction]] = defaultdict(list)
    for it in interactions:
        if it.bulk:
            continue
        if it.kind == "meeting":
            # importers give sorted, unique, normalised addresses; "" only when one was unreadable
            meeting_parts.append(it.participants if not it.participants or it.participants[0]
                                 else [p for p in it.participants if p])
            meeting_items.append(it)
        elif it.kind == "message":
            threads[it.thread or it.key].append(it)
    keys = sorted(threads)
    parts = [sorted({p for it in threads[k] for p in it.participants} - {""}) for k in keys]
    return EventLists(meeting_parts, meeting_items, keys, parts, [threads[k] for k in keys])


def evidence_events(interactions: Iterable[Interaction]) -> list[Event]:
    """:func:`event_lists` as one :class:`Event` per meeting and per thread (meetings first)."""
    ev = event_lists(interactions)
    out = [Event("meeting", it.key, p, [it]) for p, it in zip(ev.meeting_parts, ev.meeting_items)]
    out += [Event("thread", k, p, items) for k, p, items in zip(ev.thread_keys, ev.thread_parts, ev.thread_items)]
    return out


def contact_of_email(contacts: Sequence[Contact]) -> dict[str, int]:
    """Address -> contact id; an address on two contacts belongs to the one with the smaller id."""
    out: dict[str, int] = {}
    for c in sorted(contacts, key=lambda c: c.id):
        for e in c.emails:
            out.setdefault(e, c.id)
    return out


class EventIndex:
    """The evidence events of each contact, to list the meetings and threads two contacts share.

    Uses the same events, address mapping and size limits as :func:`infer_ties`,
    so ``len(index.shared(a, b, cap)["thread"])`` is the tie's thread count.
    """

    def __init__(self, contacts: Sequence[Contact], interactions: Iterable[Interaction]):
        self.events = evidence_events(interactions)
        owner = contact_of_email(contacts)
        self.of: dict[int, set[int]] = defaultdict(set)
        for k, ev in enumerate(self.events):
            for p in ev.participants:
                cid = owner.get(p)
                if cid is not None:
                    self.of[cid].add(k)

    def shared(self, a: int, b: int, cap: int) -> dict[str, list[Event]]:
        """The meetings and threads of 2..``cap`` people both ``a`` and ``b`` are in, oldest first."""
        return shared_events((self.events[k] for k in sorted(self.of.get(a, set()) & self.of.get(b, set()))), cap)


def shared_events(events: Iterable[Event], cap: int) -> dict[str, list[Event]]:
    """The events of 2..``cap`` people among ``events`` (two people's common ones), by kind, oldest first."""
    out: dict[str, list[Event]] = {"meeting": [], "thread": []}
    for ev in events:
        if 2 <= ev.size <= cap:
            out[ev.kind].append(ev)
    for evs in out.values():
        evs.sort(key=lambda ev: (min(it.when for it in ev.items), ev.key))
    return out
