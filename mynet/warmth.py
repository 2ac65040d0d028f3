"""Warmth: how close you are to each contact, from your interactions or your rating.

The model
---------
Every interaction between you and a contact adds ``w * 2^(-age / half_life)``
to a decayed count ``D``, where ``w = 1 / (n - 1)`` for an event with ``n``
participants (a one-to-one counts 1, a ten-person meeting 1/9; the same
down-weighting as Newman 2001) and ``age`` is in days. Then

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

from .model import Contact, Interaction
from .settings import SettingsGroup, setting
from .normalise import normalise_email

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
    dormant_days: float = setting(365.0, "a once-active tie quiet for longer than this is dormant", low=0, low_open=True)
    unlisted_threshold: int = setting(3, "people outside your address book are shown from this many interactions",
                                      low=1)


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
    for it in interactions:
        if it.bulk:
            continue
        people = {normalise_email(p) for p in it.participants} - {""}
        if not people & me_emails:
            continue
        when = parse_when(it.when)
        if when is None or when.date() > now.date():
            continue
        others = {by_email[p] for p in people - me_emails if p in by_email}
        if not others:
            continue
        n = len(people)
        weight = 1.0 / max(1, n - 1)
        age = float((now.date() - when.date()).days)  # whole days: today's events are fresh
        day = when.date().isoformat()
        sender = normalise_email(it.sender) if it.sender else ""
        for cid in others:
            w = out[cid]
            decayed[cid] += weight * math.exp(-lam * age)
            if it.kind == "meeting":
                w.meetings += 1
                ch = "meeting"
            else:
                ch = "mail"
                if sender in me_emails:
                    w.messages_to += 1
                elif sender and by_email.get(sender) == cid:
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
