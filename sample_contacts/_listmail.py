"""A discussion list you are on, in the mailbox as list servers deliver it.

The freight-data list of the Tidewater Data Forum: threads among people you met
there (and two list members who are in no address book), March 2025 to October
2026, some started or answered by you; what a list relay does to From (a
"Name via List" From with X-Original-From and Reply-To, a ``user=domain@relay``
From); a build robot and a call for talks nobody answers; two older threads
(2023) copied from the list's public archive, where every address is hidden
behind a token (``local-TOKEN@archive...``), yours included.

Drawn from its own ``random.Random(LIST_SEED)``, so that the rest of the
scenario does not move when this part changes.
"""

from __future__ import annotations

import random
from datetime import datetime, timedelta

from _activity import Activity, Message, _addr

LIST_SEED = 202610
LIST = ("freight-data@lists.tidewaterforum.example", "Freight data practitioners")
LIST_ID = "Freight data practitioners <freight-data.lists.tidewaterforum.example>"
RELAY = "lists.tidewaterforum.example"
ARCHIVE = "archive.tidewaterforum.example"
BOT = ("ci-bot@ci.tidewaterforum.example", "Freight data CI")
DESK = ("programme@tidewaterforum.example", "Tidewater Data Forum programme team")
# RFC 2369 (List-Post, List-Unsubscribe), RFC 2919 (List-Id), RFC 5322 (Sender); Precedence is common practice.
LIST_FIELDS = [f"List-Post: <mailto:{LIST[0]}>",
               f"List-Unsubscribe: <mailto:freight-data-request@{RELAY}?subject=unsubscribe>",
               f"Sender: freight-data-bounces@{RELAY}", "Precedence: list"]
MEMBERS = [("Ines Varro", "ines.varro@dunlinfreight.example"), ("Tobiah Quell", "tquell@saltmarsh.example")]
SUBJECTS = ["Schema for container events", "Anyone using the port call feed?", "Dwell time outliers",
            "Open data licence for the rail set", "Meet-up at the spring workshop?", "Deduplicating carrier codes",
            "Time zones in berth schedules", "Draft: data quality checklist"]
ARCHIVED = ["Naming the forum's shared datasets", "Welcome thread: who is here?"]


def _token(rng: random.Random, n: int = 10) -> str:
    chars = "ABCDEFGHJKLMNPQRSTUVWXYZabcdefghijkmnopqrstuvwxyz23456789"
    return "".join(rng.choice(chars) for _ in range(n))


def _pairs(act: Activity, addresses: list[str], label: str) -> None:
    """The people who wrote in one list thread know each other (those subscribed who did not write: no)."""
    act.groups.append(("messages", label, [a.lower() for a in addresses]))
    pids = sorted({act.owner[a.lower()] for a in addresses if act.owner.get(a.lower()) not in (None, "you")})
    for i, a in enumerate(pids):
        for b in pids[i + 1:]:
            reasons = act.pairs.setdefault((a, b), [])
            if f"message:{label}" not in reasons:
                reasons.append(f"message:{label}")


def build_list_mail(act: Activity) -> dict:
    """Add the list's messages to ``act.messages``; return what the ground truth needs to know about them."""
    rng = random.Random(LIST_SEED)
    w = act.w
    conf = [p for p in act.people(cluster="conference") if p.clusters == ["conference"]]
    people = [act.who(p, "work") for p in rng.sample(conf, 6)]
    strangers = [act.stranger(name, w.claim_email(*address.split("@"), "stranger")) for name, address in MEMBERS]
    pool = people + strangers
    you = act.me("work")
    via = {pool[1][0], pool[4][0]}  # authors at domains whose mail the relay must rewrite (common since DMARC)
    relayed = pool[2][0]  # one whose address the relay writes as user=domain@relay
    aliases: dict[str, str] = {}
    not_people = {LIST[0]: "list", f"freight-data-request@{RELAY}": "list", f"freight-data-bounces@{RELAY}": "list",
                  BOT[0]: "bot", DESK[0]: "role"}
    threads: list[dict] = []

    def post(author: tuple[str, str], when: datetime, subject: str, refs: list[str], cc=(), *, extra=(),
             shown: tuple[str, str] | None = None, fields=LIST_FIELDS) -> str:
        domain = RELAY if shown or author[0] in via else author[0].split("@")[1]
        msgid = f"<{rng.getrandbits(48):012x}.fd@{domain}>"
        headers = list(extra)
        if shown is None and author[0] in via:
            shown = (LIST[0], f"{author[1]} via Freight data")
            headers += [f"X-Original-From: {_addr(author)}"]
            if rng.random() < 0.5:
                headers.append(f"Reply-To: {_addr(author)}")
            not_people[LIST[0]] = "list"
        elif shown is None and author[0] == relayed:
            local, dom = author[0].split("@")
            shown = (f"{local}={dom}@{RELAY}", author[1])
            aliases[shown[0]] = author[0]
        if author[0] in act.strangers:
            act.strangers[author[0]]["count"] += 1
        act.messages.append(Message(author, [LIST], list(cc), when, subject, msgid,
                                    in_reply_to=refs[-1] if refs else "", references=list(refs), list_id=LIST_ID,
                                    shown_from=shown, headers=headers + list(fields), thread=refs[0] if refs
                                    else msgid))
        return msgid

    # Discussions, half of them with you writing.
    for k, subject in enumerate(SUBJECTS):
        writers = rng.sample(pool, rng.randint(2, 3)) + ([you] if k % 2 == 0 else [])
        rng.shuffle(writers)
        when = datetime(2025, 3, 4, 9) + timedelta(days=71 * k, hours=rng.randint(0, 8))
        refs: list[str] = []
        order = writers + [rng.choice(writers) for _ in range(rng.randint(0, 2))]
        for i, author in enumerate(order):
            if i and author == order[i - 1]:
                continue
            cc = [order[i - 1]] if i and rng.random() < 0.4 and order[i - 1] != you else []
            refs.append(post(author, when, subject if not refs else f"Re: {subject}", refs, cc))
            when += timedelta(hours=rng.randint(2, 40))
        threads.append({"subject": subject, "writers": sorted({a for a, _ in writers}), "when": refs and when})
    # A robot's report, answered by one person; a call for talks nobody answers.
    robot = post(BOT, datetime(2025, 9, 2, 3, 10), "Nightly schema check failed", [],
                 extra=["Auto-Submitted: auto-generated"], shown=BOT)
    post(pool[0], datetime(2025, 9, 2, 8, 40), "Re: Nightly schema check failed", [robot])
    post(DESK, datetime(2026, 1, 20, 10), "[ANN] Call for talks: Tidewater Data Forum 2026", [], shown=DESK)
    # Older threads copied from the public archive: every address hidden behind a token.
    for k, subject in enumerate(ARCHIVED):
        writers = [you] + rng.sample(people[:4], 2)
        when = datetime(2023, 4, 12, 10) + timedelta(days=150 * k)
        refs = []
        for author in writers:
            local = author[0].split("@")[0]
            hidden = (f"{local}-{_token(rng)}@{ARCHIVE}", author[1])
            aliases[hidden[0]] = author[0]
            refs.append(post(author, when, subject if not refs else f"Re: {subject}", refs, shown=hidden))
            when += timedelta(hours=rng.randint(3, 30))
        threads.append({"subject": subject, "writers": sorted({a for a, _ in writers}), "archived": True})
    for t in threads:
        t.pop("when", None)
        _pairs(act, t["writers"], "list/freight-data")
    return {"list": LIST[0], "list_id": LIST_ID, "not_people": dict(sorted(not_people.items())),
            "aliases": dict(sorted(aliases.items())), "threads": threads}
