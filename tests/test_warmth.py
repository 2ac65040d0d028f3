"""Warmth of your tie to each contact, and the 5/15/50/150 tiers."""

from __future__ import annotations

import math
from datetime import date

import pytest

from mynet.evidence.warmth import Warmth, WarmthModel, assign_tiers, compute_warmth, unlisted_people
from mynet.model import Contact, Interaction

ME = {"you@example.org"}
TODAY = date(2026, 11, 30)


def c(i):
    return Contact(id=i, name=f"P{i}", emails=[f"p{i}@x.example"])


def meet(k, who, when, extra=()):
    return Interaction(kind="meeting", source="cal.ics", index=k, line=1, when=when, key=f"m{k}",
                       participants=sorted({"you@example.org", *who, *extra}))


def mail(k, sender, to, when):
    return Interaction(kind="message", source="m.mbox", index=k, line=1, when=when, key=f"x{k}", thread=f"x{k}",
                       sender=sender, participants=sorted({sender, *to}))


def test_recency_decay_with_half_life():
    model = WarmthModel(half_life_days=100, scale=1)
    w = compute_warmth([c(1), c(2)], [meet(0, ["p1@x.example"], "2026-11-30T12:00:00+00:00"),
                                      meet(1, ["p2@x.example"], "2026-08-22T12:00:00+00:00")], ME, model=model,
                                      today=TODAY)
    # 100 days old -> counts half (exponential decay with a 100-day half-life).
    assert w[1].computed == pytest.approx(1 - math.exp(-1), rel=1e-3)
    assert w[2].computed == pytest.approx(1 - math.exp(-0.5), rel=2e-3)
    assert w[1].last == "2026-11-30" and w[2].meetings == 1


def test_group_meetings_count_less_than_one_to_ones():
    w = compute_warmth([c(1), c(2), c(3)], [meet(0, ["p1@x.example"], "2026-11-01"),
                                            meet(1, ["p2@x.example", "p3@x.example"], "2026-11-01")], ME, today=TODAY)
    assert w[1].warmth > w[2].warmth == pytest.approx(w[3].warmth)


def test_reciprocity_and_multiplexity():
    one_way = [mail(k, "you@example.org", ["p1@x.example"], "2026-11-01") for k in range(4)]
    both = [mail(k, "you@example.org", ["p2@x.example"], "2026-11-01") for k in range(2)] + \
           [mail(k + 2, "p2@x.example", ["you@example.org"], "2026-11-01") for k in range(2)]
    w = compute_warmth([c(1), c(2)], one_way + both, ME, today=TODAY)
    assert w[2].warmth > w[1].warmth > 0
    assert w[1].messages_to == 4 and w[2].messages_from == 2
    multi = compute_warmth([c(3)],
                           [meet(0, ["p3@x.example"], "2026-11-01"),
                            mail(1, "p3@x.example", ["you@example.org"], "2026-11-01")], ME, today=TODAY)
    single = compute_warmth([c(3)], [meet(0, ["p3@x.example"], "2026-11-01"), meet(1, ["p3@x.example"], "2026-11-01")],
                            ME, today=TODAY)
    assert multi[3].channels == ["mail", "meeting"]
    assert multi[3].warmth > single[3].warmth


def test_reciprocity_is_graded_by_hand():
    # Four mails each, same day, so the decayed count D = 4 and base = 1 - exp(-4/3) for all three;
    # r = 0.6 + 0.4 * min(sent, got) / max(sent, got): one-way 0.6, 3 to 1 gives 0.6 + 0.4/3, 2 to 2 gives 1.
    def exchange(i, sent, got):
        return ([mail(10 * i + k, "you@example.org", [f"p{i}@x.example"], "2026-11-30") for k in range(sent)]
                + [mail(10 * i + 5 + k, f"p{i}@x.example", ["you@example.org"], "2026-11-30") for k in range(got)])

    w = compute_warmth([c(1), c(2), c(3)], exchange(1, 4, 0) + exchange(2, 3, 1) + exchange(3, 2, 2), ME, today=TODAY)
    base = 1 - math.exp(-4 / 3)
    assert w[1].computed == pytest.approx(base * 0.6, abs=1e-6)
    assert w[2].computed == pytest.approx(base * (0.6 + 0.4 / 3), abs=1e-6)
    assert w[3].computed == pytest.approx(base * 1.0, abs=1e-6)


def test_rating_overrides_and_future_ignored():
    w = compute_warmth([c(1)], [meet(0, ["p1@x.example"], "2027-05-01")], ME, {1: 0.7}, today=TODAY)
    assert w[1].computed == 0 and w[1].warmth == 0.7 and w[1].rated == 0.7


def test_tiers_follow_5_15_50_150():
    ws = [Warmth(i, warmth=1 - i / 1000) for i in range(200)] + [Warmth(999, warmth=0.0)]
    assign_tiers(ws)
    tiers = [w.tier for w in ws]
    assert tiers[:5] == ["closest"] * 5 and tiers[5:15] == ["close"] * 10
    assert tiers[15:50] == ["regular"] * 35 and tiers[50:150] == ["known"] * 100
    assert tiers[150] == "beyond" and ws[-1].tier == "none"


def test_unlisted_people_need_to_recur():
    evs = [meet(k, ["stranger@else.example"], "2026-10-01")
           for k in range(3)] + [meet(9, ["once@else.example"], "2026-10-01")]
    out = unlisted_people([c(1)], evs, ME, threshold=3)
    assert [e["email"] for e in out] == ["stranger@else.example"] and out[0]["count"] == 3


def _msg(k, sender, to, when, *, thread, reply=""):
    return Interaction(kind="message", source="m.mbox", index=k, line=1, when=when, key=f"y{k}", thread=thread,
                       sender=sender, participants=sorted({sender, *to}), in_reply_to=reply)


def test_your_message_in_a_list_thread_counts_with_those_who_wrote_in_it():
    # A list thread as evidence sees it: each message keeps only its author (mynet.people.correspondence.clean).
    when = "2026-11-30T10:00:00+00:00"
    items = [_msg(0, "p1@x.example", [], when, thread="t"), _msg(1, "p2@x.example", [], when, thread="t"),
             _msg(2, "you@example.org", [], when, thread="t"), _msg(3, "p3@x.example", [], when, thread="other")]
    model = WarmthModel(scale=1)
    w = compute_warmth([c(1), c(2), c(3)], items, ME, model=model, today=TODAY)
    # Three people wrote in the thread: your message counts 1/(3-1) with each of the other two; neither
    # answered you, so reciprocity is 0.6 (the module's model).
    assert w[1].computed == pytest.approx(0.6 * (1 - math.exp(-0.5)), rel=1e-5) and w[1].messages_to == 1
    assert w[2].computed == w[1].computed
    assert w[3].computed == 0  # a thread you did not write in says nothing about you


def test_a_reply_counts_more_than_a_message_and_their_answer_to_you_counts():
    when = "2026-11-30T10:00:00+00:00"
    model = WarmthModel(scale=1, reply_boost=2.0)
    replied = [_msg(0, "p1@x.example", [], when, thread="t"), _msg(1, "p2@x.example", [], when, thread="t"),
               _msg(2, "you@example.org", [], when, thread="t", reply="y0")]
    w = compute_warmth([c(1), c(2)], replied, ME, model=model, today=TODAY)
    assert w[1].computed == pytest.approx(0.6 * (1 - math.exp(-1.0)), rel=1e-5)  # 2 x 1/(3-1): you answered p1
    assert w[2].computed == pytest.approx(0.6 * (1 - math.exp(-0.5)), rel=1e-5)
    answered = [_msg(0, "you@example.org", [], when, thread="t"), _msg(1, "p1@x.example", [], when, thread="t",
                                                                       reply="y0")]
    w = compute_warmth([c(1)], answered, ME, model=model, today=TODAY)
    assert w[1].messages_from == 1 and w[1].messages_to == 1
    # Mail both ways, one message each: reciprocity 1; two credits of 1/(2-1).
    assert w[1].computed == pytest.approx(1 - math.exp(-2.0), rel=1e-5)
