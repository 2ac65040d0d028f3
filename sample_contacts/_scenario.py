"""The invented world behind the sample files: who the people are, where they work, whom they know.

:func:`build_world` draws every person from one seeded :class:`random.Random`,
so the same seed always gives the same world. Clusters are the ground-truth
communities (past employers, the current employer, a university cohort, a
rowing club, a client project, a conference, family and neighbours); teams are
the finer groups whose members know each other well.
"""

from __future__ import annotations

import random
import uuid
from dataclasses import dataclass, field

from _names import (
    COUNTIES,
    CULTURE_WEIGHTS,
    CULTURES,
    JOB_TITLES,
    NICKNAMES,
    ORGS,
    OTHER_EMPLOYERS,
    PERSONAL_DOMAINS,
    STREET_KINDS,
    STREET_WORDS,
    TOWNS_ABROAD,
    TOWNS_UK,
    name_key,
    slug,
)

# Fictitious telephone ranges (recalled from memory, not checked against the regulators' current lists):
# UK Ofcom drama numbers 07700 900000-900999 (mobile) and 0xx1 496 0000-0999 / 020 7946 0000-0999
# (geographic); North American 555-0100..555-0199, reserved for fiction in every area code.
UK_MOBILE = "+447700900"
HOME_RANGES = ["+44121496", "+44118496", "+44114496", "+44116496"]
US_AREAS = ["503", "617", "720", "206"]


@dataclass
class Person:
    """One invented person: identity, jobs, addresses, and which files hold a record of them."""

    pid: str
    given: str
    family: str
    culture: str
    female: bool
    clusters: list[str] = field(default_factory=list)
    teams: list[str] = field(default_factory=list)
    org: str = ""
    unit: str = ""
    title: str = ""
    past: list[dict] = field(default_factory=list)  # {"org", "title", "unit", "email"}
    nick: str = ""
    prefix: str = ""
    old_family: str = ""  # family name before a change (shown by older files)
    personal: str = ""
    work: str = ""
    alias: str = ""  # a second work address, used by one file only
    alumni: str = ""
    mobile: str = ""
    old_mobile: str = ""
    work_phone: str = ""
    home_phone: str = ""
    street: str = ""
    locality: str = ""
    region: str = ""
    postcode: str = ""
    country: str = "United Kingdom"
    birthday: str = ""
    uid: str = ""
    sources: list[str] = field(default_factory=list)  # phone, recent, oldwork, conf, club
    quirks: list[str] = field(default_factory=list)
    note: str = ""

    @property
    def name(self) -> str:
        return f"{self.given} {self.family}"

    @property
    def short(self) -> str:
        return self.nick or self.given

    def emails(self) -> list[str]:
        found = [self.personal, self.work, self.alias, self.alumni] + [p.get("email", "") for p in self.past]
        return [e for i, e in enumerate(found) if e and e not in found[:i]]

    def phones(self) -> list[str]:
        found = [self.mobile, self.old_mobile, self.work_phone, self.home_phone]
        found += [job.get("phone", "") for job in self.past]
        return [p for i, p in enumerate(found) if p and p not in found[:i]]

    def job_at(self, org: str) -> dict:
        """The job held at ``org`` (current or past), as a dict like the ``past`` entries."""
        if self.org == org:
            return {"org": self.org, "title": self.title, "unit": self.unit, "email": self.work,
                    "phone": self.work_phone}
        return next(job for job in self.past if job["org"] == org)

    def address_for(self, context: str) -> str:
        """The address this person would use in a context (``work`` or ``private``)."""
        if context == "work" and self.work:
            return self.work
        return self.personal or self.work


class World:
    """All people of the scenario plus the draws that keep names, numbers and addresses unique."""

    def __init__(self, rng: random.Random):
        self.rng = rng
        self.people: list[Person] = []
        self.by_id: dict[str, Person] = {}
        self.name_keys: dict[str, str] = {}
        self.emails: dict[str, str] = {}
        self._mobiles = [f"{UK_MOBILE}{n:03d}" for n in range(1000)]
        rng.shuffle(self._mobiles)
        self._ranges: dict[str, list[str]] = {}
        self.notes: dict[str, str] = {}  # pid -> why this person matters (bridges, targets)

    # -- unique draws -------------------------------------------------------------------------------
    def uuid(self) -> str:
        return str(uuid.UUID(int=self.rng.getrandbits(128), version=4))

    def mobile(self) -> str:
        return self._mobiles.pop()

    def number(self, prefix: str) -> str:
        """A unique number of a fictitious range (``+44207946`` -> ``+442079460xyz``)."""
        if prefix not in self._ranges:
            if prefix.startswith("+1"):
                pool = [f"{prefix}01{n:02d}" for n in range(100)]
            else:
                pool = [f"{prefix}0{n:03d}" for n in range(1000)]
            self.rng.shuffle(pool)
            self._ranges[prefix] = pool
        return self._ranges[prefix].pop()

    def us_mobile(self) -> str:
        return self.number("+1" + self.rng.choice(US_AREAS) + "555")

    def claim_email(self, local: str, domain: str, owner: str) -> str:
        address = f"{local}@{domain}"
        n = 2
        while address in self.emails:
            address, n = f"{local}{n}@{domain}", n + 1
        self.emails[address] = owner
        return address

    def draw_name(self, culture: str | None = None, female: bool | None = None) -> tuple[str, str, str, bool]:
        """A (given, family, culture, female) not yet used by anyone (compared folded)."""
        rng = self.rng
        while True:
            cult = culture or rng.choices(list(CULTURE_WEIGHTS), weights=list(CULTURE_WEIGHTS.values()))[0]
            fem = rng.random() < 0.5 if female is None else female
            females, males, families = CULTURES[cult]
            given = rng.choice(females if fem else males)
            fam = rng.choice(families)
            if "|" in fam:
                fam = fam.split("|")[1 if fem else 0]
            if name_key(given, fam) not in self.name_keys:
                return given, fam, cult, fem

    # -- people -------------------------------------------------------------------------------------
    def person(self, clusters: list[str], teams: list[str] = (), *, given: str = "", family: str = "",
               culture: str | None = None, female: bool | None = None, org: str = "", title: str = "",
               unit: str = "", pid: str = "", abroad: float = 0.0, personal: bool = True) -> Person:
        """Create a person, give them a name, home, mobile, private and work e-mail."""
        rng = self.rng
        if given and family:
            cult, fem = culture or "en", bool(female)
        else:
            given, family, cult, fem = self.draw_name(culture, female)
        pid = pid or f"p{len(self.people) + 1:03d}"
        p = Person(pid, given, family, cult, fem, list(clusters), list(teams), org=org, title=title, unit=unit)
        self.name_keys.setdefault(name_key(given, family), pid)
        p.uid = self.uuid()
        if rng.random() < abroad:
            p.locality, p.region, p.country = rng.choice(TOWNS_ABROAD)
        else:
            p.locality, p.region = rng.choice(TOWNS_UK), rng.choice(COUNTIES)
            p.postcode = f"Q{rng.choice('ABDEHKLNRTW')}{rng.randint(1, 9)} {rng.randint(1, 9)}" \
                         f"{rng.choice('ABDEFGHJLNPQRSTUWXYZ')}{rng.choice('ABDEFGHJLNPQRSTUWXYZ')}"
        p.street = f"{rng.randint(1, 88)} {rng.choice(STREET_WORDS)} {rng.choice(STREET_KINDS)}"
        p.mobile = self.us_mobile() if p.country == "United States" else self.mobile()
        if rng.random() < 0.25:
            p.nick = NICKNAMES.get(given, "")
        if personal:
            g, f = slug(given), slug(family)
            local = rng.choice([f"{g}.{f}", f"{g}{f}{rng.randint(70, 99)}", f"{g[0]}{f}", f"{f}.{g}", f"{g}_{f}"])
            p.personal = self.claim_email(local, rng.choice(PERSONAL_DOMAINS), pid)
        if org:
            self.employ(p, org, title, unit)
        self.people.append(p)
        self.by_id[pid] = p
        return p

    def work_email(self, p: Person, org: str, family: str | None = None) -> str:
        o = ORGS[org]
        g, f = slug(p.given), slug(family or p.family)
        local = {"first.last": f"{g}.{f}", "flast": f"{g[0]}{f}", "f.last": f"{g[0]}.{f}", "first": g,
                 "firstl": f"{g}{f[0]}", "last.first": f"{f}.{g}"}[o.style]
        return self.claim_email(local, o.domain, p.pid)

    def employ(self, p: Person, org: str, title: str = "", unit: str = "") -> None:
        """Make ``org`` the current job; the previous one (if any) moves to ``past``."""
        if p.org:
            p.past.insert(0, {"org": p.org, "title": p.title, "unit": p.unit, "email": p.work,
                              "phone": p.work_phone})
        p.org, p.title, p.unit = org, title or self.rng.choice(JOB_TITLES), unit
        p.work = self.work_email(p, org) if org in ORGS else ""
        o = ORGS.get(org)
        p.work_phone = self.number(o.office) if o and o.office and self.rng.random() < 0.5 else ""

    def leave_to(self, p: Person, org: str | None = None, title: str = "") -> None:
        """The person changes jobs (to a random other employer by default)."""
        choices = [o for o in OTHER_EMPLOYERS if o != p.org]
        self.employ(p, org or self.rng.choice(choices), title)

    def join(self, p: Person, cluster: str, team: str = "") -> None:
        if cluster not in p.clusters:
            p.clusters.append(cluster)
        if team and team not in p.teams:
            p.teams.append(team)

    def named(self, pid: str, why: str) -> None:
        self.notes[pid] = why


def _members(w: World, n: int, cluster: str, team: str, titles: list[str], org: str = "", unit: str | None = None,
             **kw) -> list[Person]:
    """``n`` new people of one team; the unit defaults to the team's name (``harrowgate/it`` -> ``IT``)."""
    if unit is None:
        unit = team.split("/")[-1].replace("-", " ").title().replace("It", "IT") if org else ""
    return [w.person([cluster], [team], org=org, title=titles[i % len(titles)], unit=unit, **kw) for i in range(n)]


def build_world(rng: random.Random) -> World:
    """Draw the whole scenario; see the module docstring for its shape."""
    w = World(rng)
    for given, family in (("Daniel", "Kim"), ("Maria", "Santos"), ("Priya", "Sharma"), ("Margaret", "Avenell"),
                          ("David", "Avenell"), ("Samantha", "Avenell")):
        w.name_keys[name_key(given, family)] = "reserved"
    you = w.person([], [], given="Robin", family="Avenell", pid="you", personal=False)
    you.personal = w.claim_email("you", "example.org", "you")
    you.past = [{"org": "Harrowgate Logistics", "title": "Freight Planning Lead", "unit": "Freight Planning",
                 "email": w.claim_email("ravenell", "harrowgate.example", "you")},
                {"org": "Brennick Maritime", "title": "Graduate Analyst", "unit": "Analysis",
                 "email": w.claim_email("r.avenell", "brennick.example", "you")}]
    you.org, you.title, you.unit = "Quillon Labs", "Head of Platform Engineering", "Platform"
    you.work = w.claim_email("robin.avenell", "quillon.example", "you")
    you.locality, you.region, you.street, you.postcode = "Kestlebury", "Wexmoor", "14 Larch Row", "QK4 7TD"
    you.sources, you.teams = ["phone", "oldwork", "club"], ["club/masters"]
    _family(w, you)
    quillon = _quillon(w)
    _harrowgate(w)
    _brennick(w)
    _lantern(w, quillon)
    _aldermoor(w)
    _club(w)
    _conference(w)
    _services(w)
    return w


def _family(w: World, you: Person) -> None:
    rng = w.rng
    mum = w.person(["family"], ["family/household"], given="Margaret", family="Avenell", female=True)
    dad = w.person(["family"], ["family/household"], given="David", family="Avenell", female=False)
    mum.nick, dad.nick = "Mum", "Dad"
    dad.home_phone = mum.home_phone = w.number(HOME_RANGES[0])
    dad.street, dad.locality, dad.postcode, dad.region = mum.street, mum.locality, mum.postcode, mum.region
    mum.birthday, dad.birthday = "1957-04-12", "1955-09-30"
    sib = w.person(["family"], ["family/siblings"], given="Samantha", family="Avenell", female=True,
                   org=rng.choice(OTHER_EMPLOYERS))
    sib.nick, sib.birthday = "Sam", "1987-02-03"
    inlaw = w.person(["family", "thistlecombe"], ["family/siblings", "thistlecombe/staff"], culture="ar",
                     org="Thistlecombe Energy", title="Grid Integration Manager")
    inlaw.street, inlaw.locality, inlaw.postcode = sib.street, sib.locality, sib.postcode
    w.named(inlaw.pid, "bridge: your sibling's partner works at Thistlecombe Energy")
    partner = w.person(["family"], ["family/household"], female=True, org=rng.choice(OTHER_EMPLOYERS))
    partner.street, partner.locality, partner.postcode = you.street, you.locality, you.postcode
    partner.region = you.region
    partner.birthday = "1986-11-19"
    w.named(partner.pid, "your partner")
    family = [mum, dad, sib, inlaw, partner]
    for _ in range(2):
        family.append(w.person(["family"], ["family/cousins"], org=rng.choice(OTHER_EMPLOYERS), abroad=0.3))
    for i, p in enumerate(family):
        p.sources = ["phone", "recent"] if i < 6 else ["phone"]
    for i in range(5):
        n = w.person(["neighbours"], ["neighbours/larch-row"], culture=None)
        n.street, n.locality, n.postcode = f"{(8, 10, 12, 16, 18)[i]} Larch Row", "Kestlebury", "QK4 7TD"
        n.sources = ["phone", "recent"] if i < 2 else ["phone"]


def _quillon(w: World) -> dict[str, list[Person]]:
    rng = w.rng
    q = "Quillon Labs"
    teams = {
        "leadership": ["Chief Executive Officer", "Chief Technology Officer", "Chief Operating Officer",
                       "Chief Financial Officer", "VP Sales"],
        "platform": ["Staff Engineer", "Senior Engineer", "Senior Engineer", "Engineer", "Engineer",
                     "Site Reliability Engineer", "Engineer"],
        "data": ["Head of Data", "Data Scientist", "Data Scientist", "Data Engineer", "Data Engineer",
                 "Analytics Engineer", "Analytics Engineer"],
        "product": ["Director of Product", "Product Manager", "Product Manager", "Product Manager",
                    "Product Designer", "Product Designer"],
        "sales": ["Account Executive", "Account Executive", "Account Executive", "Solutions Consultant",
                  "Solutions Consultant", "Sales Operations Lead"],
        "people": ["People Partner", "Talent Partner", "Office Manager", "People Operations Lead"],
        "support": ["Support Lead", "Support Engineer", "Support Engineer", "Support Engineer"],
    }
    out = {}
    for team, titles in teams.items():
        out[team] = _members(w, len(titles), "quillon", f"quillon/{team}", titles, org=q)
    # Near-duplicate: a second "Daniel Kim" will be met at the conference.
    dk = w.person(["quillon"], ["quillon/data"], given="Daniel", family="Kim", culture="ko", female=False,
                  org=q, title="Data Scientist", unit="Data")
    out["data"].append(dk)
    w.named(out["leadership"][1].pid, "your manager")
    for p in (out["platform"][:3]):
        w.named(p.pid, "reports to you")
    for members in out.values():
        for p in members:
            p.sources = ["phone"]
            if rng.random() < 0.3:
                p.work_phone = p.work_phone or w.number(ORGS[q].office)
    dup = out["sales"][1]
    dup.quirks.append("phone_twice")  # two phone cards sharing no e-mail or number
    alias = out["product"][2]
    alias.alias = w.claim_email(f"{slug(alias.given)[0]}.{slug(alias.family)}", "quillon.example", alias.pid)
    alias.quirks.append("conf_alias")
    alias.sources = ["phone", "conf"]
    out["sales"][0].sources = ["phone", "conf"]
    return out


def _harrowgate(w: World) -> list[Person]:
    rng = w.rng
    h = "Harrowgate Logistics"
    teams = {
        "freight-planning": ["Senior Planner", "Planner", "Planner", "Route Analyst", "Planning Manager",
                             "Planner", "Capacity Planner", "Junior Planner", "Planner"],
        "analytics": ["Analytics Lead", "Data Analyst", "Data Analyst", "BI Developer", "Data Analyst",
                      "Forecasting Analyst", "Data Analyst"],
        "operations": ["Operations Director", "Depot Manager", "Shift Supervisor", "Fleet Coordinator",
                       "Depot Manager", "Operations Analyst", "Fleet Manager", "Health and Safety Lead",
                       "Warehouse Manager", "Shift Supervisor"],
        "finance": ["Finance Director", "Management Accountant", "Payroll Officer", "Credit Controller",
                    "Accounts Assistant", "Financial Analyst"],
        "it": ["IT Manager", "Systems Administrator", "Service Desk Analyst", "Developer", "Developer",
               "Network Engineer", "Business Analyst", "Developer"],
        "commercial": ["Commercial Director", "Account Manager", "Account Manager", "Tender Manager",
                       "Customer Success Manager", "Key Account Manager", "Account Manager", "Pricing Analyst"],
    }
    by_team = {team: _members(w, len(titles), "harrowgate", f"harrowgate/{team}", titles, org=h)
               for team, titles in teams.items()}
    ms = w.person(["harrowgate"], ["harrowgate/finance"], given="Maria", family="Santos", culture="pt",
                  female=True, org=h, title="Accounts Assistant", unit="Finance")
    by_team["finance"].append(ms)
    everyone = [p for members in by_team.values() for p in members]
    for p in everyone:
        p.sources = ["oldwork"]
    movers = [p for p in everyone if rng.random() < 0.4]
    for p in movers:
        w.leave_to(p)
    # Two cohort friends from university joined Harrowgate and are still there.
    uni = [by_team["analytics"][1], by_team["it"][3]]
    for p in uni:
        _reset_to(p, h)
        w.join(p, "aldermoor", "aldermoor/cohort")
        w.named(p.pid, "bridge: university cohort, now at Harrowgate Logistics")
    # Someone who came with you from Brennick Maritime.
    bren = by_team["operations"][2]
    bren.past.append({"org": "Brennick Maritime", "title": "Operations Analyst", "unit": "",
                      "email": w.work_email(bren, "Brennick Maritime")})
    w.join(bren, "brennick", "brennick/analysts")
    w.named(bren.pid, "bridge: Brennick Maritime and Harrowgate Logistics")
    # Two followed you to Quillon, one went to Orsolan Biotech, one was met again at the conference.
    to_quillon = [by_team["freight-planning"][0], by_team["analytics"][3]]
    for p, team in zip(to_quillon, ("platform", "data"), strict=True):
        _reset_to(p, h)
        w.employ(p, "Quillon Labs", "Senior Engineer" if team == "platform" else "Data Engineer", team.title())
        w.join(p, "quillon", f"quillon/{team}")
        w.named(p.pid, "bridge: Harrowgate Logistics and Quillon Labs (followed you)")
    ors = by_team["operations"][0]
    _reset_to(ors, h)
    w.employ(ors, "Orsolan Biotech", "Head of Supply Chain")
    w.join(ors, "orsolan", "orsolan/staff")
    w.named(ors.pid, "bridge: ex-Harrowgate, now at target Orsolan Biotech")
    conf = by_team["commercial"][2]
    _reset_to(conf, h)
    w.employ(conf, "Ombrelle Systems", "Head of Logistics Data")
    w.join(conf, "conference", "conference/panel")
    conf.sources = ["oldwork", "conf"]
    w.named(conf.pid, "bridge: ex-Harrowgate, met again at the Tidewater Data Forum")
    special = to_quillon + uni + [ors, conf, bren]
    movers = [p for p in everyone if p.org != h and all(p is not s for s in special)]
    # A changed family name (linked only by the mobile) and a changed mobile (linked by the old e-mail).
    married = next(p for p in movers if p.female and p.culture in ("en", "nordic", "de", "nl"))
    married.old_family = married.family
    while name_key(married.given, married.family) in w.name_keys:
        married.family = w.draw_name(married.culture, True)[1]
    w.name_keys[name_key(married.given, married.family)] = married.pid
    married.work = w.work_email(married, married.org)
    married.quirks.append("name_changed")
    changed = next(p for p in movers if p is not married)
    changed.old_mobile, changed.mobile = changed.mobile, w.mobile()
    changed.quirks.append("changed_mobile")
    by_team["finance"][1].quirks.append("oldwork_twice")
    for p in everyone:
        if any(p is s for s in special + [married, changed]) or rng.random() < 0.3:
            p.sources.append("phone")
    return everyone


def _reset_to(p: Person, org: str) -> None:
    """Undo a random move so that ``org`` is the current job again."""
    while p.org != org and p.past:
        prev = p.past.pop(0)
        p.org, p.title, p.unit, p.work = prev["org"], prev["title"], prev["unit"], prev["email"]
        p.work_phone = prev.get("phone", "")


def _brennick(w: World) -> None:
    rng = w.rng
    for team, n in (("brennick/analysts", 5), ("brennick/operations", 5)):
        for p in _members(w, n, "brennick", team, ["Analyst", "Operations Coordinator", "Chartering Assistant"],
                          org="Brennick Maritime"):
            w.leave_to(p)
            p.sources = ["phone"]
            if rng.random() < 0.5:
                p.quirks.append("keeps_old_email")


def _lantern(w: World, quillon: dict[str, list[Person]]) -> None:
    """The client project "Lantern": Corrimont Labs (client), Dunmere Consulting (partner) and a Quillon crew."""
    titles = ["Programme Director", "Research Lead", "Lab Operations Manager", "Data Lead", "Senior Scientist",
              "Scientist", "Procurement Lead", "IT Architect", "Scientist", "Quality Manager"]
    corr = _members(w, len(titles), "lantern", "lantern/corrimont", titles, org="Corrimont Labs", unit="Research")
    ps = w.person(["lantern"], ["lantern/corrimont"], given="Priya", family="Sharma", culture="in", female=True,
                  org="Corrimont Labs", title="Bioinformatics Lead", unit="Research")
    corr.append(ps)
    dun = _members(w, 5, "lantern", "lantern/dunmere", ["Partner", "Senior Consultant", "Consultant",
                                                        "Consultant", "Analyst"], org="Dunmere Consulting", unit="")
    for p in corr + dun:
        p.sources = ["phone"]
        p.work_phone = p.work_phone or w.number(ORGS[p.org].office)
    corr[3].sources = ["phone", "conf"]
    corr[3].alias = w.claim_email(f"{slug(corr[3].given)[0]}.{slug(corr[3].family)}", "corrimont.example",
                                  corr[3].pid)
    corr[3].quirks.append("conf_alias")
    for p in (quillon["platform"][1], quillon["data"][1], quillon["sales"][0]):
        w.join(p, "lantern", "lantern/quillon")
        w.named(p.pid, "bridge: Quillon Labs and the Lantern client project")


def _aldermoor(w: World) -> None:
    rng = w.rng
    cohort = _members(w, 17, "aldermoor", "aldermoor/cohort", [""], abroad=0.25)
    for p in cohort:
        w.leave_to(p)
        p.sources = ["phone"]
        if rng.random() < 0.4:
            p.alumni = w.claim_email(f"{slug(p.given)}.{slug(p.family)}", "alumni.aldermoor.example", p.pid)
    for p in cohort[:4]:
        w.join(p, "aldermoor", "aldermoor/flatmates")
    for p in cohort[4:9]:
        w.join(p, "aldermoor", "aldermoor/project-group")
    ps = w.person(["aldermoor"], ["aldermoor/cohort"], given="Priya", family="Sharma", culture="in", female=True)
    w.leave_to(ps, "Fairhollow Foods", "Research Scientist")
    ps.sources = ["phone"]
    q = cohort[5]
    w.employ(q, "Quillon Labs", "Analytics Engineer", "Data")
    w.join(q, "quillon", "quillon/data")
    w.named(q.pid, "bridge: university cohort and Quillon Labs")
    v = cohort[2]
    w.employ(v, "Velvane Robotics", "Perception Engineer")
    v.mobile, v.locality, v.region, v.country, v.postcode = w.us_mobile(), "Cedarwick", "MA", "United States", ""
    w.join(v, "velvane", "velvane/staff")
    w.named(v.pid, "bridge: university flatmate, now at target Velvane Robotics")
    c = cohort[12]
    w.join(c, "conference", "conference/panel")
    c.sources = ["phone", "conf"]
    w.named(c.pid, "bridge: university cohort, met again at the Tidewater Data Forum")


def _club(w: World) -> None:
    """Kestrel Reach Rowing Club: crews, squads, committee."""
    rng = w.rng
    plan = [("club/masters", 7), ("club/novice", 8), ("club/committee", 5), ("club/coaching", 3), ("club/members", 9)]
    members = []
    for team, n in plan:
        for p in _members(w, n, "club", team, [""]):
            if team == "club/members":
                p.teams = []  # members without a crew or a role: they know the club, not each other
            p.org = ""
            if rng.random() < 0.7:
                w.employ(p, rng.choice(OTHER_EMPLOYERS))
            members.append(p)
    velv = members[1]
    w.employ(velv, "Velvane Robotics", "Field Robotics Lead")
    w.join(velv, "velvane", "velvane/staff")
    w.named(velv.pid, "bridge: rows in your masters crew, works at target Velvane Robotics")
    qc = members[9]
    w.employ(qc, "Quillon Labs", "Account Executive", "Sales")
    w.join(qc, "quillon", "quillon/sales")
    w.named(qc.pid, "bridge: rowing club and Quillon Labs")
    ms = w.person(["club"], [], given="Maria", family="Santos", culture="es", female=True,
                  org="Kestlebury Academy", title="Teacher")
    members.append(ms)
    for p in members:
        p.sources = ["club"]
        if p.teams[:1] in (["club/masters"], ["club/committee"]) or p in (velv, qc) or rng.random() < 0.3:
            p.sources.append("phone")
    other = members[4]  # phone card and club row share only the name and the employer
    other.quirks.append("club_other_email")
    if not other.org:
        w.employ(other, "Oxhollow Engineering")
    other.alias = w.claim_email(f"{slug(other.family)}.{slug(other.given)}", "post.example", other.pid)
    if "phone" not in other.sources:
        other.sources.append("phone")


def _conference(w: World) -> None:
    """People met at the invented Tidewater Data Forum 2025."""
    rng = w.rng
    for org, cluster, titles in (("Velvane Robotics", "velvane", ["Director of Partnerships", "Robotics Engineer"]),
                                 ("Orsolan Biotech", "orsolan", ["Chief Data Officer", "Bioprocess Engineer",
                                                                 "Lab Automation Lead"]),
                                 ("Thistlecombe Energy", "thistlecombe", ["Head of Analytics", "Grid Data Scientist"])):
        for title in titles:
            p = w.person(["conference", cluster], [f"{cluster}/staff"], org=org, title=title,
                         abroad=0.8 if cluster == "velvane" else 0.0)
            p.sources = ["conf"]
            w.named(p.pid, f"target: works at {org}")
    vp = w.person(["velvane"], ["velvane/staff"], org="Velvane Robotics", title="VP Engineering", abroad=1.0)
    vp.sources = ["phone"]
    vp.quirks.append("shared_card")
    w.named(vp.pid, "target: works at Velvane Robotics (card shared by a bridge)")
    dk = w.person(["conference"], ["conference/panel"], given="Daniel", family="Kim", culture="ko", female=False,
                  org="Ombrelle Systems", title="Machine Learning Engineer")
    dk.sources = ["conf"]
    panel = 2
    for i in range(29):
        p = w.person(["conference"], ["conference/panel"] if i < panel else [], org=rng.choice(OTHER_EMPLOYERS),
                     abroad=0.3)
        p.sources = ["conf", "phone"] if rng.random() < 0.15 else ["conf"]


def _services(w: World) -> None:
    """The everyday entries of an address book: a GP, a plumber, an accountant, a recruiter."""
    for title, org, prefix in (("General Practitioner", "Fennmouth Health Trust", "Dr"), ("Plumber", "", ""),
                               ("Accountant", "", ""), ("Recruiter", "Talentmoor Partners", ""),
                               ("Driving Instructor", "", "")):
        p = w.person(["services"], [], org=org, title=title, personal=not org)
        p.prefix = prefix
        p.sources = ["phone"]
