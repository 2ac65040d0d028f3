"""What your asks do to the network: an introduction that happened warms two of your ties.

When you close an ask as *introduced*, you say that the introduction took place:

* you now have an observed tie to the person you were introduced to: your
  warmth to them is at least ``asks.introduced_warmth`` on the day, fading from
  there with the warmth model's half-life (``2^(-age / half_life)``, as every
  interaction does);
* the person who introduced you is a little warmer: ``asks.thanks_warmth``
  (faded the same way) is added to your warmth to them, up to 1.

Both values are judgement calls (settings, see ``mynet settings``); your own
rating of a person (``mynet rate``) stays in force over them. An introduction
dated after the day looked from (``--as-of``) has not happened yet on that day
and changes nothing. The channel ``introduction`` is added to the warmth, so
every view can say where the warmth came from.

The other settings of the ``asks`` group are read by the plan and by reach:
recent open or declined asks lower a first person's rank (``hold_back``).
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import date
from typing import Iterable

from ..settings import SettingsGroup, setting
from .warmth import Warmth, assign_tiers

__all__ = ["AskModel", "OUTCOMES", "Introduction", "apply_introductions"]

#: The outcomes you may give an ask (your decision, never inferred).
OUTCOMES = ("introduced", "declined", "no-answer", "not-needed")


@dataclass
class AskModel(SettingsGroup, group="asks"):
    """Settings of targets, asks and the plan (``mynet settings asks.max_per_person=2``)."""

    follow_up_days: int = setting(7, "an open ask is due for a follow-up after this many days", low=1)
    recent_days: int = setting(60, "an open or declined ask this recent makes reach and the plan prefer other first "
                               "people", low=0)
    hold_back: float = setting(0.5, "the score of a route through someone asked recently is multiplied by this when "
                               "routes are ranked (a judgement call)", low=0, high=1)
    max_per_person: int = setting(3, "the plan asks one person for at most this many introductions", low=1)
    introduced_warmth: float = setting(0.5, "your warmth to someone you were introduced to, on the day (a judgement "
                                       "call; it fades with the warmth half-life)", low=0, high=1, low_open=True)
    thanks_warmth: float = setting(0.1, "what an introduction adds to your warmth to the person who made it (a "
                                   "judgement call)", low=0, high=1)


@dataclass(frozen=True)
class Introduction:
    """One ask closed as introduced, resolved to current contact ids (None: no such contact now)."""

    helper: int | None
    person: int | None
    day: date


def apply_introductions(warmth: dict[int, Warmth], intros: Iterable[Introduction], *, today: date,
                        half_life_days: float, model: AskModel | None = None) -> dict[int, Warmth]:
    """Your warmth with the introductions that happened by ``today`` applied (see the module notes).

    Changes the given :class:`Warmth` objects in place (callers pass fresh ones) and
    returns the same mapping; the tiers are assigned again when anything changed.
    """
    model = model or AskModel()
    changed = False
    for it in intros:
        age = (today - it.day).days
        if age < 0:
            continue
        fade = 2.0 ** (-age / max(half_life_days, 1e-9))
        day = it.day.isoformat()
        for cid, kind in ((it.person, "met"), (it.helper, "helped")):
            w = warmth.get(cid) if cid is not None else None
            if w is None:
                continue
            if w.rated is None:
                if kind == "met":
                    w.warmth = max(w.warmth, round(model.introduced_warmth * fade, 6))
                else:
                    w.warmth = min(1.0, round(w.warmth + model.thanks_warmth * fade, 6))
            if "introduction" not in w.channels:
                w.channels = sorted([*w.channels, "introduction"])
            w.last = max(w.last or day, day)
            w.first = min(w.first or day, day)
            changed = True
    if changed:
        assign_tiers(warmth.values())
    return warmth
