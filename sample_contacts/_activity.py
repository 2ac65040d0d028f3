"""Your calendar and mailbox in the invented scenario: meetings and threads within the clusters.

Events run from December 2024 to November 2026. Attendees are the contacts'
own addresses, plus a few people who are in no address book (some of them
recurring). While it draws, :class:`Activity` counts each contact's meetings
and messages with you and records which pairs of contacts met or wrote in a
small group, so the ground truth agrees with the files.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import date, datetime, timedelta

from _names import slug
from _scenario import Person, World

START, END = date(2024, 12, 1), date(2026, 11, 30)


def at(d: date, hour: int = 9, minute: int = 0) -> datetime:
    """A local (Europe/London) time on day ``d``."""
    return datetime(d.year, d.month, d.day, hour, minute)
SMALL = 12  # meetings and threads with at most this many contacts count as ties among them
BROADCAST = 40  # meetings with more attendees than this are announcements, not interactions


@dataclass
class Event:
    uid: str
    summary: str
    start: datetime | date
    end: datetime | date
    label: str
    organizer: tuple[str, str] | None = None  # (address, name)
    attendees: list[dict] = field(default_factory=list)
    utc: bool = False
    rrule: str = ""
    exdates: list[datetime] = field(default_factory=list)
    recurrence_id: datetime | None = None
    status: str = "CONFIRMED"
    location: str = ""
    transparent: bool = False
    occurrences: list[date] = field(default_factory=list)


@dataclass
class Message:
    sender: tuple[str, str]
    to: list[tuple[str, str]]
    cc: list[tuple[str, str]]
    when: datetime
    subject: str
    msgid: str
    in_reply_to: str = ""
    references: list[str] = field(default_factory=list)
    list_id: str = ""
    body: str = "(message body not included in this sample)"
    shown_from: tuple[str, str] | None = None  # the From a list relay wrote instead of the author's (``sender``)
    headers: list[str] = field(default_factory=list)  # further header lines (list fields), as written
    thread: str = ""  # the Message-ID that opened the thread


class Activity:
    """Draws the calendar and the mailbox and keeps the tallies the ground truth needs."""

    def __init__(self, w: World):
        self.w, self.rng = w, w.rng
        self.you = w.by_id["you"]
        self.owner = {e.lower(): p.pid for p in w.people for e in p.emails()}
        self.events: list[Event] = []
        self.messages: list[Message] = []
        self.stats: dict[str, dict] = {}
        self.pairs: dict[tuple[str, str], list[str]] = {}
        self.strangers: dict[str, dict] = {}  # address -> {"name", "count"}
        self._ids = 0
        # Every small meeting occurrence and message: (kind, label, addresses of the people in it), so that the
        # ground truth can say who else knows the strangers you corresponded with.
        self.groups: list[tuple[str, str, list[str]]] = []
        self.meetings_attended: list[list[str]] = []  # addresses at each meeting occurrence (rooms left out)

    # -- shared helpers ---------------------------------------------------------------------------------
    def people(self, *, cluster: str = "", team: str = "") -> list[Person]:
        return [p for p in self.w.people if p.pid != "you" and (not cluster or cluster in p.clusters)
                and (not team or team in p.teams)]

    def stranger(self, name: str, address: str) -> tuple[str, str]:
        self.strangers.setdefault(address, {"name": name, "count": 0})
        return address, name

    def new_stranger(self, domain: str) -> tuple[str, str]:
        given, family, _, _ = self.w.draw_name()
        self.w.name_keys[f"{slug(given)} {slug(family)}"] = "stranger"
        local = f"{slug(given)}.{slug(family)}"
        return self.stranger(f"{given} {family}", self.w.claim_email(local, domain, "stranger"))

    def me(self, context: str) -> tuple[str, str]:
        return self.you.address_for(context), self.you.name

    def who(self, p: Person, context: str) -> tuple[str, str]:
        return p.address_for(context), p.name

    def _tally(self, addresses: list[str], day: date, label: str, kind: str) -> None:
        pids = []
        for a in addresses:
            pid = self.owner.get(a.lower())
            if pid is None:
                if a.lower() in self.strangers:
                    self.strangers[a.lower()]["count"] += 1
                continue
            if pid == "you" or pid in pids:
                continue
            pids.append(pid)
            s = self.stats.setdefault(pid, {"meetings": 0, "broadcast_meetings": 0, "messages": 0, "last": ""})
            s[kind] += 1
            if kind != "broadcast_meetings":
                s["last"] = max(s["last"], day.isoformat())
        if kind != "broadcast_meetings" and len(pids) <= SMALL:
            self.groups.append((kind, label, [a.lower() for a in addresses]))
            for i, a in enumerate(pids):
                for b in pids[i + 1:]:
                    reasons = self.pairs.setdefault(tuple(sorted((a, b))), [])
                    if f"{kind[:-1]}:{label}" not in reasons:
                        reasons.append(f"{kind[:-1]}:{label}")

    # -- calendar ---------------------------------------------------------------------------------------
    def event(self, summary: str, start, minutes: int, label: str, organizer: tuple[str, str] | None,
              guests: list[tuple[str, str]], **kw) -> Event:
        rng = self.rng
        self._ids += 1
        end = start + timedelta(minutes=minutes) if isinstance(start, datetime) else start + timedelta(days=minutes)
        ev = Event(f"{rng.getrandbits(64):016x}-{self._ids:04d}@cal.quillon.example", summary, start, end, label,
                   organizer, **kw)
        for address, name in guests:
            if organizer and address == organizer[0]:
                continue
            part = rng.choices(["ACCEPTED", "TENTATIVE", "DECLINED", "NEEDS-ACTION"], [80, 6, 8, 6])[0]
            ev.attendees.append({"address": address, "name": name, "partstat": part,
                                 "shown": address if rng.random() > 0.04 else address.upper()})
        if organizer:
            ev.attendees.insert(0, {"address": organizer[0], "name": organizer[1], "partstat": "ACCEPTED",
                                    "shown": organizer[0], "chair": True})
        if not ev.occurrences:
            ev.occurrences = [start if isinstance(start, date) and not isinstance(start, datetime) else start.date()]
        if ev.status != "CANCELLED":
            going = [a["address"] for a in ev.attendees if a["partstat"] != "DECLINED"]
            kind = "broadcast_meetings" if len(ev.attendees) > BROADCAST else "meetings"
            for day in ev.occurrences:
                self._tally(going, day, label, kind)
                self.meetings_attended.append([a["address"].lower() for a in ev.attendees
                                               if a["partstat"] != "DECLINED" and a.get("cutype") != "ROOM"])
        self.events.append(ev)
        return ev

    def days(self, first: date, last: date, weekday: int, step: int = 1) -> list[date]:
        d = first + timedelta(days=(weekday - first.weekday()) % 7)
        out = []
        while d <= last:
            out.append(d)
            d += timedelta(weeks=step)
        return out

    def build_calendar(self) -> None:
        rng, w = self.rng, self.w
        platform = self.people(team="quillon/platform")
        room = self.stranger("Orchard Room", "room-orchard@quillon.example")
        # One weekly series with exceptions, and one moved occurrence.
        weekly = self.days(date(2024, 12, 3), date(2026, 11, 24), 1)
        skipped = [date(2024, 12, 24), date(2024, 12, 31), date(2025, 6, 10), date(2025, 12, 23),
                   date(2025, 12, 30), date(2026, 4, 7)]
        moved = date(2025, 9, 16)
        series = self.event("Platform team weekly", at(weekly[0], 10), 45, "quillon/platform", self.me("work"),
                            [self.who(p, "work") for p in platform] + [room],
                            rrule="FREQ=WEEKLY;BYDAY=TU;UNTIL=20261124T235959Z",
                            exdates=[at(d, 10) for d in skipped],
                            occurrences=[d for d in weekly if d not in skipped and d != moved],
                            location="Orchard Room, Wrenhallow")
        series.attendees[-1]["cutype"] = "ROOM"
        override = self.event("Platform team weekly (moved: release day)", at(moved + timedelta(days=1), 14), 45,
                              "quillon/platform", self.me("work"), [self.who(p, "work") for p in platform],
                              recurrence_id=at(moved, 10))
        override.uid = series.uid
        # One-to-ones: your manager every other Thursday, your reports monthly.
        manager = next(p for p in self.people(team="quillon/leadership") if "manager" in w.notes.get(p.pid, ""))
        for i, d in enumerate(self.days(date(2024, 12, 5), END, 3, step=2)):
            self.event(f"{manager.short} / {self.you.given} 1:1", at(d, 15), 30, "one-to-one",
                       self.who(manager, "work"), [self.me("work")],
                       status="CANCELLED" if i in (7, 31) else "CONFIRMED")
        reports = [p for p in platform if "reports to you" in w.notes.get(p.pid, "")]
        for k, p in enumerate(reports):
            for d in self.days(date(2024, 12, 2 + k), END, 2 + k, step=4):
                self.event(f"1:1 {self.you.given} / {p.short}", at(d, 11), 30, "one-to-one", self.me("work"),
                           [self.who(p, "work")])
        data, product = self.people(team="quillon/data"), self.people(team="quillon/product")
        for d in self.days(date(2024, 12, 11), END, 2, step=4):
            guests = [data[0], product[0]] + rng.sample(data[1:] + product[1:], 3)
            self.event("Roadmap review", at(d, 14), 60, "quillon/roadmap", self.who(product[0], "work"),
                       [self.me("work")] + [self.who(p, "work") for p in guests])
        # All-hands: every colleague in the address book plus many who are not.
        staff = self.people(cluster="quillon")
        others = [self.new_stranger("quillon.example") for _ in range(36)]
        ceo = next(p for p in staff if p.title == "Chief Executive Officer")
        for d in (date(2025, 1, 16), date(2025, 4, 10), date(2025, 7, 10), date(2025, 10, 9), date(2026, 1, 15),
                  date(2026, 4, 16), date(2026, 7, 9), date(2026, 10, 8)):
            self.event("Quillon all-hands", at(d, 16), 60, "quillon/all-hands", self.who(ceo, "work"),
                       [self.who(p, "work") for p in staff if p is not ceo] + [self.me("work")] + others,
                       location="Atrium and video link")
        self._lantern()
        self._conference()
        self._club()
        self._private()
        self.events.sort(key=lambda e: (e.start if isinstance(e.start, datetime) else
                                        datetime(e.start.year, e.start.month, e.start.day), e.uid))

    def _lantern(self) -> None:
        rng = self.rng
        corr, dun = self.people(team="lantern/corrimont"), self.people(team="lantern/dunmere")
        ours = self.people(team="lantern/quillon")
        pmo = [self.new_stranger("corrimont.example") for _ in range(2)]
        director = corr[0]
        for i, d in enumerate(self.days(date(2025, 2, 6), date(2026, 1, 22), 3, step=2)):
            guests = ([self.me("work")] + [self.who(p, "work") for p in ours + rng.sample(corr[1:], 4)
                                           + rng.sample(dun, 2)] + rng.sample(pmo, rng.randint(0, 2)))
            self.event("Lantern steering", at(d, 10, 30), 60, "lantern", self.who(director, "work"), guests,
                       status="CANCELLED" if i == 9 else "CONFIRMED", location="Video call")
        for d in (date(2025, 2, 18), date(2025, 6, 24), date(2025, 11, 4)):
            self.event("Lantern workshop", at(d, 9, 30), 360, "lantern", self.who(dun[0], "work"),
                       [self.me("work")] + [self.who(p, "work") for p in corr + dun + ours],
                       location="Corrimont Labs, 9 Beacon Row, Calderwyn")

    def _conference(self) -> None:
        rng = self.rng
        conf = self.people(cluster="conference")
        panel = [p for p in conf if "conference/panel" in p.teams]
        desk = self.stranger("Tidewater Data Forum programme team", "programme@tidewaterforum.example")
        self.event("Tidewater Data Forum 2025", date(2025, 6, 10), 3, "conference", None, [], transparent=True,
                   location="Fennmouth Exchange Hall")
        self.event("Panel: freight data at scale", at(date(2025, 6, 11), 14), 60, "conference/panel", desk,
                   [self.me("work")] + [self.who(p, "work") for p in panel])
        others = [p for p in conf if p not in panel and "velvane" not in p.clusters and "orsolan" not in p.clusters
                  and "thistlecombe" not in p.clusters]
        dinner = panel + rng.sample(others, 4)
        self.event("Speakers' dinner", at(date(2025, 6, 11), 19, 30), 150, "conference/dinner", desk,
                   [self.me("work")] + [self.who(p, "work") for p in dinner], location="The Ropewalk, Fennmouth")
        for k, p in enumerate(rng.sample(others, 3)):
            self.event(f"Follow-up call with {p.name}", at(date(2025, 7, 1) + timedelta(days=7 * k + 2), 16), 30,
                       "one-to-one", self.me("work"), [self.who(p, "work")], location="Video call")

    def _club(self) -> None:
        rng = self.rng
        club = self.people(cluster="club")
        crew = self.people(team="club/masters")
        captain = self.people(team="club/committee")[0]
        for d in self.days(date(2024, 12, 7), END, 5, step=4):
            self.event("Masters crew outing", at(d, 7, 30), 120, "club/masters", self.who(captain, "private"),
                       [self.me("private")] + [self.who(p, "private") for p in crew],
                       location="Kestrel Reach boathouse")
        for d in (date(2025, 5, 17), date(2026, 5, 16)):
            self.event("Kestrel Reach spring regatta", d, 1, "club", self.who(captain, "private"),
                       [self.me("private")] + [self.who(p, "private") for p in rng.sample(club, 20)])
        self.event("Club annual dinner", at(date(2025, 11, 22), 19), 240, "club", self.who(captain, "private"),
                   [self.me("private")] + [self.who(p, "private") for p in rng.sample(club, 25)])
        committee = self.people(team="club/committee")
        self.event("Club AGM", at(date(2026, 3, 14), 18), 90, "club", self.who(captain, "private"),
                   [self.me("private")] + [self.who(p, "private") for p in committee + rng.sample(club, 8)])

    def _private(self) -> None:
        rng = self.rng
        household = self.people(team="family/household") + self.people(team="family/siblings")
        for k in range(8):
            d = self.days(date(2024, 12, 1) + timedelta(days=90 * k), END, 6)[0]
            self.event("Sunday lunch at Mum and Dad's", at(d, 13), 180, "family", self.me("private"),
                       [self.who(p, "private") for p in household], location=household[0].locality)
        for p in household[:3]:
            if p.birthday:
                bday = date(2025, int(p.birthday[5:7]), int(p.birthday[8:]))
                self.event(f"{p.nick or p.given}'s birthday", bday, 1, "family", None, [], transparent=True,
                           rrule="FREQ=YEARLY")
        self.event("Larch Row street party", at(date(2025, 7, 12), 15), 300, "neighbours", self.me("private"),
                   [self.who(p, "private") for p in self.people(cluster="neighbours")])
        flatmates = self.people(team="aldermoor/flatmates")
        for k in range(8):
            p = flatmates[k % len(flatmates)]
            d = date(2024, 12, 10) + timedelta(days=88 * k + rng.randint(0, 20))
            utc = p.country == "United States"
            self.event(f"Catch-up with {p.short}", at(d, 18 if utc else 12, 30), 45, "one-to-one", self.me("private"),
                       [self.who(p, "private")], utc=utc, location="Video call" if utc else "Café on Cloister Lane")
        ex_h = [p for p in self.people(cluster="harrowgate") if p.org != "Harrowgate Logistics"
                and "quillon" not in p.clusters]
        for k, p in enumerate(rng.sample(ex_h, 5)):
            self.event(f"Coffee with {p.short}", at(date(2024, 12, 9) + timedelta(days=17 * k), 8, 30), 45,
                       "one-to-one", self.me("private"), [self.who(p, "private")])
        self.event("Harrowgate leavers' drinks", at(date(2025, 3, 28), 18), 180, "harrowgate", self.me("private"),
                   [self.who(p, "private") for p in rng.sample(self.people(cluster="harrowgate"), 11)])
        bridge = next(p for p in self.people(cluster="orsolan") if "harrowgate" in p.clusters)
        for d in (date(2025, 4, 23), date(2026, 9, 17)):
            self.event(f"Lunch with {bridge.short}", at(d, 12, 30), 60, "one-to-one", self.me("private"),
                       [self.who(bridge, "private")])
        self.event("Brennick alumni dinner", at(date(2025, 1, 24), 19), 180, "brennick", self.me("private"),
                   [self.who(p, "private") for p in self.people(cluster="brennick")])
        recruiter = next(p for p in self.people(cluster="services") if p.title == "Recruiter")
        desk = self.stranger("Talentmoor bookings", "bookings@talentmoor.example")
        for d in (date(2025, 2, 12), date(2025, 9, 3), date(2026, 5, 20)):
            self.event("Market check-in", at(d, 17), 30, "one-to-one", desk, [self.me("private"),
                                                                                self.who(recruiter, "work")])
        platform = self.people(team="quillon/platform")
        for k in range(6):
            cand = self.stranger(*self._candidate())
            d = date(2025, 3, 3) + timedelta(days=37 * k)
            self.event("Interview: platform engineer", at(d, 10), 60, "interview", self.me("work"),
                       [cand] + [self.who(p, "work") for p in rng.sample(platform, 2)])

    def _candidate(self) -> tuple[str, str]:
        given, family, _, _ = self.w.draw_name()
        self.w.name_keys[f"{slug(given)} {slug(family)}"] = "stranger"
        local = f"{slug(given)}{slug(family)}{self.rng.randint(1, 99)}"
        return f"{given} {family}", self.w.claim_email(local, self.rng.choice(["example.net", "mail.example"]),
                                                        "stranger")

    # -- mail -------------------------------------------------------------------------------------------
    def thread(self, subject: str, first: datetime, label: str, context: str, people: list[Person],
               n: int, *, cc: list[Person] = (), extra: list[tuple[str, str]] = ()) -> None:
        """A thread of ``n`` messages between you and ``people`` (first one from you or from people[0])."""
        rng = self.rng
        voices = [self.me(context)] + [self.who(p, context) for p in people] + list(extra)
        copied = [self.who(p, context) for p in cc]
        sender = voices[rng.randint(0, min(1, len(voices) - 1))]
        when, refs = first, []
        for i in range(n):
            to = [v for v in voices if v != sender]
            domain = sender[0].split("@")[1]
            msgid = f"<{rng.getrandbits(48):012x}.{len(self.messages):04d}@{domain}>"
            self.messages.append(Message(sender, to, copied, when, subject if i == 0 else f"Re: {subject}", msgid,
                                         in_reply_to=refs[-1] if refs else "", references=list(refs),
                                         thread=refs[0] if refs else msgid))
            self._tally([sender[0]] + [a for a, _ in to + copied], when.date(), label, "messages")
            refs.append(msgid)
            sender = rng.choice([v for v in voices if v != sender])
            when += timedelta(hours=rng.randint(1, 60), minutes=rng.randint(0, 59))
            if when.hour < 7:  # nobody here writes mail in the small hours
                when += timedelta(hours=7)

    def bulk(self, sender: tuple[str, str], to: tuple[str, str], when: datetime, subject: str, list_id: str) -> None:
        self.stranger(to[1], to[0])
        self.stranger(sender[1], sender[0])
        for address in dict.fromkeys((to[0], sender[0])):
            self.strangers[address]["count"] += 1
        msgid = f"<{self.rng.getrandbits(48):012x}@{sender[0].split('@')[1]}>"
        self.messages.append(Message(sender, [to], [], when, subject, msgid, list_id=list_id))

    def build_mail(self) -> None:
        rng = self.rng
        t = at
        platform = self.people(team="quillon/platform")
        subjects = ["Incident review: queue backlog", "On-call rota for December", "Proposal: retire the nightly batch",
                    "Flaky deploys on Fridays", "Capacity plan for Q3", "Postmortem draft", "Hiring loop feedback",
                    "Tracing costs", "Release train dates", "Runbook for the ingest service", "Team offsite ideas",
                    "Load test results"]
        for k, subject in enumerate(subjects):
            self.thread(subject, t(date(2024, 12, 16) + timedelta(days=58 * k), 9 + k % 7), "quillon/platform", "work",
                        rng.sample(platform, rng.randint(2, 4)), rng.randint(2, 5))
        manager = next(p for p in self.people(team="quillon/leadership") if "manager" in self.w.notes.get(p.pid, ""))
        for k, subject in enumerate(["Headcount plan", "Platform budget", "Your review notes", "Board deck input"]):
            self.thread(subject, t(date(2025, 1, 8) + timedelta(days=170 * k), 8), "one-to-one", "work", [manager], 2)
        data, product = self.people(team="quillon/data"), self.people(team="quillon/product")
        for k, subject in enumerate(["Metrics for the roadmap", "Churn model review", "Dashboard clean-up",
                                     "Experiment design for onboarding", "Data retention policy"]):
            self.thread(subject, t(date(2025, 1, 20) + timedelta(days=130 * k)), "quillon/roadmap", "work",
                        rng.sample(data, 2) + rng.sample(product, 1), rng.randint(2, 4))
        corr, dun = self.people(team="lantern/corrimont"), self.people(team="lantern/dunmere")
        ours = self.people(team="lantern/quillon")
        pmo = self.new_stranger("corrimont.example")
        for k, subject in enumerate(["Lantern: kick-off pack", "Lantern: data access request", "Lantern: sample rig",
                                     "Lantern: milestone 2 sign-off", "Lantern: risk log", "Lantern: invoices",
                                     "Lantern: pilot results", "Lantern: phase 2 scope", "Lantern: lessons learned",
                                     "Lantern: handover"]):
            self.thread(subject, t(date(2025, 2, 3) + timedelta(days=34 * k), 11), "lantern", "work",
                        rng.sample(corr, 2) + rng.sample(dun, 1), rng.randint(2, 5), cc=rng.sample(ours, 1),
                        extra=[pmo] if k % 3 == 0 else [])
        cohort = self.people(cluster="aldermoor")
        self.thread("Aldermoor MSc: 15 years on?", t(date(2026, 2, 2), 20), "aldermoor", "private", cohort, 6)
        flat = self.people(team="aldermoor/flatmates")
        self.thread("Flat reunion weekend", t(date(2025, 8, 4), 21), "aldermoor/flatmates", "private", flat, 5)
        self.thread("Photos from Cloister Lane", t(date(2026, 6, 14), 19), "aldermoor/flatmates", "private", flat, 3)
        crew = self.people(team="club/masters")
        for k, subject in enumerate(["Crew for Saturday", "Seat racing results", "Regatta entries"]):
            self.thread(subject, t(date(2025, 3, 5) + timedelta(days=150 * k), 20), "club/masters", "private", crew, 4)
        self.thread("Committee: boathouse repairs", t(date(2025, 10, 1), 19), "club/committee", "private",
                    self.people(team="club/committee"), 3)
        family = self.people(team="family/household") + self.people(team="family/siblings")
        for k, subject in enumerate(["Christmas plans", "Dad's 70th", "Holiday cottage booking"]):
            self.thread(subject, t(date(2024, 12, 2) + timedelta(days=200 * k), 20), "family", "private", family, 4)
        self.thread("Leavers' drinks on the 28th", t(date(2025, 3, 3), 12), "harrowgate", "private",
                    rng.sample(self.people(cluster="harrowgate"), 8), 4)
        self.thread("Brennick dinner: who's in?", t(date(2025, 1, 6), 19), "brennick", "private",
                    self.people(cluster="brennick")[:8], 3)
        velvane_club = next(p for p in self.people(cluster="club") if "velvane" in p.clusters)
        velvane_uni = next(p for p in self.people(cluster="aldermoor") if "velvane" in p.clusters)
        orsolan = next(p for p in self.people(cluster="orsolan") if "harrowgate" in p.clusters)
        self.thread("Freight pilot: worth a chat with our VP?", t(date(2026, 5, 19), 21), "one-to-one", "private",
                    [velvane_club], 3)
        self.thread("Visiting Cedarwick in the autumn", t(date(2026, 8, 30), 17), "one-to-one", "private",
                    [velvane_uni], 2)
        self.thread("Supply chain data at Orsolan", t(date(2026, 9, 3), 8), "one-to-one", "private", [orsolan], 2)
        conf = [p for p in self.people(cluster="conference") if len(p.clusters) == 1]
        for k, p in enumerate(rng.sample(conf, 4)):
            self.thread("Great to meet you at Tidewater", t(date(2025, 6, 13 + k), 10), "one-to-one", "work", [p], 2)
        recruiter = next(p for p in self.people(cluster="services") if p.title == "Recruiter")
        self.thread("A role you might like", t(date(2025, 11, 18), 8), "one-to-one", "private", [recruiter], 2)
        self.messages[-1].body = ">From the brief: platform lead, hybrid, Wrenhallow."
        captain = self.people(team="club/committee")[0]
        self.bulk(("news@kestrelreach.example", "Kestrel Reach Rowing Club"),
                  ("members@kestrelreach.example", "Club members"), t(date(2026, 3, 1), 7),
                  f"Newsletter: AGM, spring regatta and a word from {captain.short}", "<news.kestrelreach.example>")
        staff_list = ("all-staff@quillon.example", "Quillon all staff")
        self.bulk(staff_list, staff_list,
                  t(date(2026, 1, 12), 8), "Office move to Tanner's Yard: what you need to know",
                  "Quillon all staff <all-staff.quillon.example>")
        self.messages.sort(key=lambda m: (m.when, m.msgid))


# -- writers ------------------------------------------------------------------------------------------------
VTIMEZONE = ["BEGIN:VTIMEZONE", "TZID:Europe/London", "BEGIN:DAYLIGHT", "TZOFFSETFROM:+0000", "TZOFFSETTO:+0100",
             "TZNAME:BST", "DTSTART:19810329T010000", "RRULE:FREQ=YEARLY;BYMONTH=3;BYDAY=-1SU", "END:DAYLIGHT",
             "BEGIN:STANDARD", "TZOFFSETFROM:+0100", "TZOFFSETTO:+0000", "TZNAME:GMT", "DTSTART:19961027T020000",
             "RRULE:FREQ=YEARLY;BYMONTH=10;BYDAY=-1SU", "END:STANDARD", "END:VTIMEZONE"]


def _last_sunday(year: int, month: int) -> date:
    d = date(year, month, 31)
    return d - timedelta(days=(d.weekday() + 1) % 7)


def london_offset(dt: datetime) -> timedelta:
    """UK summer time (BST, UTC+1) from the last Sunday of March to the last Sunday of October."""
    on = datetime.combine(_last_sunday(dt.year, 3), datetime.min.time()).replace(hour=1)
    off = datetime.combine(_last_sunday(dt.year, 10), datetime.min.time()).replace(hour=2)
    return timedelta(hours=1) if on <= dt < off else timedelta(0)


def _ical_text(value: str) -> str:
    return value.replace("\\", "\\\\").replace(",", "\\,").replace(";", "\\;").replace("\n", "\\n")


def _cn(name: str) -> str:
    return f'"{name}"' if any(ch in name for ch in ',;:') else name


def _when(prop: str, value, utc: bool) -> str:
    if not isinstance(value, datetime):
        return f"{prop};VALUE=DATE:{value:%Y%m%d}"
    if utc:
        return f"{prop}:{value - london_offset(value):%Y%m%dT%H%M%S}Z"
    return f"{prop};TZID=Europe/London:{value:%Y%m%dT%H%M%S}"


def ics_text(events: list[Event], calname: str, fold) -> str:
    """The calendar as RFC 5545 text (CRLF, folded at 75 octets)."""
    lines = ["BEGIN:VCALENDAR", "VERSION:2.0", "PRODID:-//Sample Office Suite//Calendar Export 3.1//EN",
             "CALSCALE:GREGORIAN", "METHOD:PUBLISH", f"X-WR-CALNAME:{calname}"] + VTIMEZONE
    for ev in events:
        lines += ["BEGIN:VEVENT", f"UID:{ev.uid}", "DTSTAMP:20261130T120000Z"]
        if ev.recurrence_id:
            lines.append(_when("RECURRENCE-ID", ev.recurrence_id, False))
        lines += [_when("DTSTART", ev.start, ev.utc), _when("DTEND", ev.end, ev.utc)]
        if ev.rrule:
            lines.append("RRULE:" + ev.rrule)
        if ev.exdates:
            lines.append("EXDATE;TZID=Europe/London:" + ",".join(f"{d:%Y%m%dT%H%M%S}" for d in ev.exdates))
        lines.append("SUMMARY:" + _ical_text(ev.summary))
        if ev.location:
            lines.append("LOCATION:" + _ical_text(ev.location))
        lines.append(f"STATUS:{ev.status}")
        lines.append("TRANSP:TRANSPARENT" if ev.transparent else "TRANSP:OPAQUE")
        lines.append(f"SEQUENCE:{1 if ev.status == 'CANCELLED' or ev.recurrence_id else 0}")
        if ev.organizer:
            lines.append(f"ORGANIZER;CN={_cn(ev.organizer[1])}:mailto:{ev.organizer[0]}")
        for i, a in enumerate(ev.attendees):
            role = "CHAIR" if a.get("chair") else ("OPT-PARTICIPANT" if i % 9 == 8 else "REQ-PARTICIPANT")
            rsvp = ";RSVP=TRUE" if a["partstat"] == "NEEDS-ACTION" else ""
            scheme = "MAILTO" if a["shown"] != a["address"] else "mailto"
            lines.append(f"ATTENDEE;CUTYPE={a.get('cutype', 'INDIVIDUAL')};ROLE={role};PARTSTAT={a['partstat']}"
                         f"{rsvp};CN={_cn(a['name'])}:{scheme}:{a['shown']}")
        lines.append("END:VEVENT")
    lines.append("END:VCALENDAR")
    return "".join(fold(line) for line in lines)


def _encoded_word(name: str) -> str:
    """RFC 2047 encoded word: ISO-8859-1 or UTF-8, Q encoding, or B for names far from Latin script."""
    import base64
    if any(ord(ch) > 0x2FF for ch in name):
        return "=?UTF-8?B?" + base64.b64encode(name.encode("utf-8")).decode("ascii") + "?="
    try:
        data, charset = name.encode("iso-8859-1"), "ISO-8859-1"
        if len(name) % 2:
            data, charset = name.encode("utf-8"), "UTF-8"
    except UnicodeEncodeError:
        data, charset = name.encode("utf-8"), "UTF-8"
    text = "".join("_" if b == 0x20 else chr(b) if chr(b).isalnum() and b < 128 else f"={b:02X}" for b in data)
    return f"=?{charset}?Q?{text}?="


def _addr(pair: tuple[str, str]) -> str:
    address, name = pair
    if not name:
        return address
    if not name.isascii():
        return f"{_encoded_word(name)} <{address}>"
    if any(ch in name for ch in ',.;:@()"\''):
        return f'"{name}" <{address}>'
    return f"{name} <{address}>"


def _fold_header(name: str, items: list[str], sep: str = ", ") -> str:
    lines, cur = [], f"{name}: "
    for i, item in enumerate(items):
        piece = item + (sep.rstrip() if i < len(items) - 1 else "")
        if len(cur) + len(piece) > 78 and cur.strip() != f"{name}:":
            lines.append(cur.rstrip())
            cur = " "
        cur += piece + " "
    lines.append(cur.rstrip())
    return "\n".join(lines)


def mbox_text(messages: list[Message]) -> str:
    """Headers-only mbox (mboxrd), LF line ends, one dummy body line per message."""
    from datetime import timezone
    from email.utils import format_datetime
    out = []
    for m in messages:
        offset = london_offset(m.when)
        utc = m.when - offset
        shown = m.shown_from or m.sender
        out.append(f"From {shown[0]} {utc:%a %b} {utc.day:2d} {utc:%H:%M:%S %Y}")
        out.append("From: " + _addr(shown))
        out.append(_fold_header("To", [_addr(a) for a in m.to]))
        if m.cc:
            out.append(_fold_header("Cc", [_addr(a) for a in m.cc]))
        out.append("Date: " + format_datetime(m.when.replace(tzinfo=timezone(offset))))
        out.append("Subject: " + (m.subject if m.subject.isascii() else _encoded_word(m.subject)))
        out.append("Message-ID: " + m.msgid)
        if m.in_reply_to:
            out.append("In-Reply-To: " + m.in_reply_to)
            out.append(_fold_header("References", m.references, sep=" "))
        if m.list_id:
            out.append("List-Id: " + m.list_id)
        out += m.headers or (["Precedence: bulk"] if m.list_id else [])
        out += ["MIME-Version: 1.0", "Content-Type: text/plain; charset=UTF-8", "", m.body, ""]
    return "\n".join(out) + "\n"
