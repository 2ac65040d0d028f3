"""Warmth: how close you are to each contact, from your interactions or your rating.

The model
---------
Every interaction between you and a contact adds ``w * 2^(-age / half_life)``
to a decayed count ``D``, where ``w = 1 / (n - 1)`` for an event with ``n``
participants (a one-to-one counts 1, a ten-person meeting 1/9; the same
down-weighting as Newman 2001) and ``age`` is in days. Mail counts what you
did: your message in a thread counts with everyone who wrote in it
(``1 / (w - 1)`` for ``w`` writers, so a list thread counts among the people
who wrote, not the subscribers), your reply to someone's message counts
``reply_boost`` times as much, their answer to you on a list counts too. Then

    warmth = 1 - (1 - (1 - exp(-D / scale)) * r) * m

where ``r`` is reciprocity for mail-only contacts (0.6 when they never wrote to
you, rising to 1 when the exchange is balanced; 1 when you have met) and ``m``
is 0.8 when you use two or more channels (meetings and mail), else 1, so
multiplex ties are warmer. Your own rating (0-1) overrides all of it.

Tiers follow the layering of about 5 / 15 / 50 / 150 close ties that studies
of personal networks keep finding; the cut-offs are a rule of thumb with no
single source, applied to the ranking by warmth.
"""

from __future__ import annotations

import math
from collections import defaultdict
from dataclasses import asdict, dataclass, field
from datetime import date, datetime, timezone
from typing import Iterable, Mapping, Sequence

from ..model import Contact, Interaction
from ..people.normalise import normalise_email
from ..settings import SettingsGroup, setting

__all__ = ["WarmthModel", "Warmth", "compute_warmth", "assign_tiers", "unlisted_people", "TIERS", "parse_when"]

#: (label, cumulative size) of the layers; a rule of thumb (see the module docstring).
TIERS = (("closest", 5), ("close", 15), ("regular", 50), ("known", 150))
BEYOND = "beyond"
NONE = "none"


@dataclass
class WarmthModel(SettingsGroup, group="warmth_model"):
    """The settings of the warmth model (stored in the workspace, see ``mynet settings``)."""

    half_life_days: float = setting(180.0, "days after which an interaction with you counts half", low=0, low_open=True)
    scale: float = setting(3.0, "recent one-to-one interactions needed for a warmth of 0.63", low=0, low_open=True)
    dormant_days: float = setting(365.0, "a once-active tie quiet for longer than this is dormant", low=0,
                                  low_open=True)
    unlisted_threshold: int = setting(3, "people outside your address book are shown from this many interactions",
                                      low=1)
    reply_boost: float = setting(2.0, "your reply to someone's message counts this many times a message "
                                 "(a judgement call)", low=1)


@dataclass
class Warmth:
    """Your tie to one contact."""

    contact_id: int
    warmth: float = 0.0
    computed: float = 0.0
    rated: float | None = None
    meetings: int = 0
    messages_from: int = 0
    messages_to: int = 0
    last: str | None = None  # ISO date of the last interaction
    first: str | None = None
    channels: list[str] = field(default_factory=list)
    tier: str = NONE

    def to_dict(self) -> dict:
        return asdict(self)


def parse_when(text: str) -> datetime | None:
    """An interaction's ISO date or date-time as an aware UTC datetime."""
    if not text:
        return None
    try:
        if len(text) == 10:
            d = date.fromisoformat(text)
            return datetime(d.year, d.month, d.day, tzinfo=timezone.utc)
        dt = datetime.fromisoformat(text.replace("Z", "+00:00"))
        return dt if dt.tzinfo else dt.replace(tzinfo=timezone.utc)
    except ValueError:
        return None


def compute_warmth(
    contacts: Sequence[Contact],
    interactions: Iterable[Interaction],
    me_emails: set[str],
    ratings: Mapping[int, float] | None = None,
    model: WarmthModel | None = None,
    today: date | None = None,
) -> dict[int, Warmth]:
    """Warmth of your tie to every contact (see the module docstring for the model)."""
    model = model or WarmthModel()
    now = datetime.combine(today or date.today(), datetime.max.time(), tzinfo=timezone.utc)
    by_email: dict[str, int] = {}
    for c in contacts:
        for e in c.emails:
            by_email.setdefault(e, c.id)
    out = {c.id: Warmth(c.id) for c in contacts}
    decayed: dict[int, float] = defaultdict(float)
    lam = math.log(2) / max(model.half_life_days, 1e-9)
    interactions = list(interactions)
    author_of, writers = _mail_threads(interactions)
    for it in interactions:
        if it.bulk:
            continue
        when = parse_when(it.when)
        if when is None or when.date() > now.date():
            continue
        if it.kind == "meeting":
            people = {normalise_email(p) for p in it.participants} - {""}
            if not people & me_emails:
                continue
            weight = 1.0 / max(1, len(people) - 1)
            credits = [(by_email[p], weight, "") for p in sorted(people - me_emails) if p in by_email]
        else:
            credits = _message_credits(it, me_emails, by_email, author_of, writers, model.reply_boost)
        if not credits:
            continue
        age = float((now.date() - when.date()).days)  # whole days: today's events are fresh
        day = when.date().isoformat()
        ch = "meeting" if it.kind == "meeting" else "mail"
        for cid, weight, direction in credits:
            w = out[cid]
            decayed[cid] += weight * math.exp(-lam * age)
            if ch == "meeting":
                w.meetings += 1
            elif direction == "to":
                w.messages_to += 1
            elif direction == "from":
                w.messages_from += 1
            if ch not in w.channels:
                w.channels.append(ch)
            w.last = max(w.last or day, day)
            w.first = min(w.first or day, day)
    for cid, w in out.items():
        d = decayed.get(cid, 0.0)
        if d > 0:
            base = -math.expm1(-d / model.scale)
            if w.meetings:
                r = 1.0
            else:
                sent, got = w.messages_to, w.messages_from
                r = 0.6 + 0.4 * (min(sent, got) / max(sent, got)) if max(sent, got) else 0.6
            m = 0.8 if len(w.channels) >= 2 else 1.0
            w.computed = round(1 - (1 - base * r) * m, 6)
        w.channels.sort()
        w.warmth = w.computed
        if ratings and cid in ratings:
            w.rated = float(ratings[cid])
            w.warmth = w.rated
    assign_tiers(out.values())
    return out


def _mail_threads(interactions: list[Interaction]) -> tuple[dict[str, str], dict[str, set[str]]]:
    """Author of each message (by Message-ID) and the people who wrote in each thread (bulk left out)."""
    author_of: dict[str, str] = {}
    writers: dict[str, set[str]] = defaultdict(set)
    for it in interactions:
        if it.kind == "message" and not it.bulk and it.sender:
            sender = normalise_email(it.sender)
            if it.key:
                author_of[it.key] = sender
            writers[it.thread or it.key].add(sender)
    return author_of, writers


def _message_credits(
    it: Interaction,
    me_emails: set[str],
    by_email: Mapping[str, int],
    author_of: Mapping[str, str],
    writers: Mapping[str, set[str]],
    reply_boost: float,
) -> list[tuple[int, float, str]]:
    """What one message adds to your warmth with each contact: ``(contact id, weight, "to"/"from"/"")``.

    * Mail you are in (From, To or Cc) counts ``1 / (n - 1)`` with everyone
      else in it, as a meeting does.
    * Your message in a thread counts also with the others who wrote in that
      thread but were not addressed (a list thread), ``1 / (w - 1)`` for ``w``
      people who wrote in it.
    * Your reply to someone's message (In-Reply-To) counts ``reply_boost``
      times as much with them; their answer to your message on a list counts
      ``1 / (w - 1)`` with them.
    """
    people = {normalise_email(p) for p in it.participants} - {""}
    sender = normalise_email(it.sender) if it.sender else ""
    ws = writers.get(it.thread or it.key, set())
    out: dict[int, tuple[float, str]] = {}
    if sender in me_emails:
        n = len(people)
        for p in sorted(people - me_emails):
            if p in by_email:
                out[by_email[p]] = (1.0 / max(1, n - 1), "to")
        for p in sorted(ws - me_emails - people):
            if p in by_email:
                out.setdefault(by_email[p], (1.0 / max(1, len(ws) - 1), "to"))
        parent = author_of.get(it.in_reply_to, "") if it.in_reply_to else ""
        if parent and parent not in me_emails and by_email.get(parent) in out:
            cid = by_email[parent]
            out[cid] = (out[cid][0] * reply_boost, "to")
    elif people & me_emails:
        n = len(people)
        for p in sorted(people - me_emails):
            if p in by_email:
                out.setdefault(by_email[p], (1.0 / max(1, n - 1), "from" if p == sender else ""))
    elif sender in by_email and it.in_reply_to and author_of.get(it.in_reply_to) in me_emails:
        out[by_email[sender]] = (1.0 / max(1, len(ws) - 1), "from")
    return [(cid, weight, direction) for cid, (weight, direction) in out.items()]


def assign_tiers(warmths: Iterable[Warmth]) -> None:
    """Label each contact with its layer by rank of warmth (5 / 15 / 50 / 150; rule of thumb)."""
    ranked = sorted((w for w in warmths if w.warmth > 0), key=lambda w: (-w.warmth, w.contact_id))
    bounds = [size for _, size in TIERS]
    for rank, w in enumerate(ranked):
        w.tier = next((label for label, size in TIERS if rank < size), BEYOND)
    del bounds


def unlisted_people(
    contacts: Sequence[Contact], interactions: Iterable[Interaction], me_emails: set[str], threshold: int = 3
) -> list[dict]:
    """People you met or wrote with who are not in your address book, seen at least ``threshold`` times."""
    known = {e for c in contacts for e in c.emails} | set(me_emails)
    seen: dict[str, dict] = {}
    for it in interactions:
        if it.bulk:
            continue
        for p in {normalise_email(x) for x in it.participants} - {""} - known:
            entry = seen.setdefault(p, {"email": p, "name": "", "count": 0, "last": "", "sources": set()})
            entry["count"] += 1
            entry["name"] = entry["name"] or (it.names or {}).get(p, "")
            day = (it.when or "")[:10]
            entry["last"] = max(entry["last"], day)
            entry["sources"].add(it.source.rsplit("/", 1)[-1])
    out = [dict(e, sources=sorted(e["sources"])) for e in seen.values() if e["count"] >= threshold]
    return sorted(out, key=lambda e: (-e["count"], e["email"]))
