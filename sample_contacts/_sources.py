"""What each sample file says about each person: one record (a card or a row) per appearance.

Every builder returns a list of :class:`Rec`, in file order. A record keeps the
true person id beside the fields it shows, and the identifiers it carries in
canonical form (lower-case e-mail, E.164 number), so the generator can tell
which duplicates an exact identifier match can find and which only a name
comparison can.
"""

from __future__ import annotations

import random
from dataclasses import dataclass, field

from _formats import card, fmt_phone
from _names import ORGS, ascii_fold, cp1252_fold
from _scenario import Person, World

H = "Harrowgate Logistics"
CATEGORY = {"quillon": "Work", "lantern": "Lantern", "club": "Rowing", "aldermoor": "Aldermoor",
            "family": "Family", "neighbours": "Neighbours", "brennick": "Brennick", "harrowgate": "Harrowgate"}
NATIVE = {"Chen": "陈", "Wang": "王", "Zhang": "张", "Liu": "刘", "Huang": "黄", "Zhao": "赵", "Wu": "吴", "Zhou": "周",
          "Lin": "林", "Wei": "伟", "Lei": "磊", "Hao": "浩", "Jun": "军", "Tao": "涛", "Bo": "波", "Jing": "静",
          "Mei": "梅", "Fang": "芳", "Ying": "英", "Lan": "兰", "Xiu": "秀"}


# The user's own workflow labels, filed the way a person does it on a phone and in a sheet: a few VIPs and
# favourites, people to call back or to follow up, where they met someone. They say something about the user's
# plans, nothing about who knows whom. Each is drawn from its own random stream (seeded by file and person), so
# adding them leaves every other part of the scenario exactly as it was.
WORKFLOW_ODDS = {  # label -> {main cluster: chance}
    "VIP": {"lantern": 0.3, "velvane": 0.5, "orsolan": 0.5, "thistlecombe": 0.5, "quillon": 0.06, "aldermoor": 0.1},
    "Favourites": {"family": 0.7, "neighbours": 0.2, "club": 0.12, "aldermoor": 0.15},
    "follow up": {"conference": 0.35, "lantern": 0.15, "aldermoor": 0.1, "harrowgate": 0.1, "brennick": 0.15,
                  "velvane": 0.3, "orsolan": 0.3},
    "to call": {"family": 0.2, "neighbours": 0.3, "services": 0.5, "club": 0.08, "brennick": 0.1},
    "met at Tidewater": {"conference": 0.5},
}
CLUB_WORKFLOW_ODDS = {"to call": 0.12, "VIP": 0.05}
#: Labels of the user's own workflow in the files (the conference sheet's own tags included).
WORKFLOW_LABELS = sorted({*WORKFLOW_ODDS, *CLUB_WORKFLOW_ODDS, "follow up", "hiring", "met at booth", "dinner"})


def _workflow(p: Person, where: str) -> list[str]:
    """The workflow labels the user put on one person in one file."""
    r = random.Random(f"workflow:{where}:{p.pid}")
    main = p.clusters[0] if p.clusters else ""
    labels = [label for label, odds in WORKFLOW_ODDS.items() if r.random() < odds.get(main, 0.0)]
    if "VIP" not in labels and any(w in p.title for w in ("Head", "Director", "Chief")) and r.random() < 0.4:
        labels.insert(0, "VIP")
    return labels


@dataclass
class Rec:
    """One record of one file: who it really is, what it shows, which identifiers it holds."""

    pid: str | None
    data: dict | list
    emails: list[str] = field(default_factory=list)
    phones: list[str] = field(default_factory=list)
    uid: str = ""
    kind: str = "person"  # or "organisation", "group"


def _rec(pid: str | None, data, kind: str = "person") -> Rec:
    r = Rec(pid, data, kind=kind)
    if isinstance(data, dict):
        r.emails = [e["canon"] for e in data["emails"]]
        r.phones = [t["canon"] for t in data["tels"]]
        r.uid = data["uid"]
    return r


def _email(value: str, types: list[str], label: str = "", pref: bool = False, shown: str = "") -> dict:
    return {"value": shown or value, "canon": value.lower(), "types": types, "label": label, "pref": pref}


def _tel(e164: str, types: list[str], style: str) -> dict:
    return {"value": fmt_phone(e164, style), "canon": e164, "types": types}


def _case_variant(rng: random.Random, address: str) -> str:
    """``anna.berg@quillon.example`` -> ``Anna.Berg@Quillon.example`` (same mailbox, other case)."""
    local, domain = address.split("@")
    return ".".join(x.capitalize() for x in local.split(".")) + "@" + domain.capitalize()


def _home_adr(p: Person, types: list[str]) -> dict:
    return {"types": types, "parts": ["", "", p.street, p.locality, p.region, p.postcode, p.country]}


def _work_adr(org: str) -> dict:
    o = ORGS[org]
    return {"types": ["WORK"], "parts": ["", "", o.street, o.town, "", "", o.country]}


# -- phone.vcf (vCard 3.0) ------------------------------------------------------------------------------
def phone_export(w: World) -> list[Rec]:
    """The recent phone export: current contacts, family, friends, a few duplicates, your own card."""
    rng = w.rng
    recs = []
    for p in w.people:
        if "phone" not in p.sources:
            continue
        c = _phone_card(w, p)
        recs.append(_rec(p.pid, c))
        if "phone_twice" in p.quirks:  # entered twice: once from an e-mail, once from a call
            first, second = dict(c), dict(c)
            first["tels"], first["adrs"] = [], []
            second["emails"], second["uid"] = [], w.uuid().upper()
            second["tels"] = [_tel(p.mobile, ["CELL"], "national")]
            recs[-1] = _rec(p.pid, first)
            recs.append(_rec(p.pid, second))
    dental = card(fn="Kestlebury Dental Practice", org=["Kestlebury Dental Practice"],
                  tels=[_tel(w.number("+44116496"), ["WORK", "VOICE"], "national")],
                  urls=["https://www.kestlebury-dental.example/"], uid=w.uuid().upper(), rev="2025-03-02T08:11:40Z")
    recs.append(_rec(None, dental, kind="organisation"))
    rng.shuffle(recs)
    return recs


def _phone_card(w: World, p: Person) -> dict:
    rng = w.rng
    main = p.clusters[0] if p.clusters else "you"
    c = card(n=[p.family, p.given, "", p.prefix, ""], uid=p.uid.upper(), lower_params=rng.random() < 0.4,
             rev=f"20{rng.choice(['24', '25', '26'])}-{rng.randint(1, 10):02d}-{rng.randint(1, 28):02d}T"
                 f"{rng.randint(7, 21):02d}:{rng.randint(0, 59):02d}:{rng.randint(0, 59):02d}Z")
    c["fn"] = " ".join(x for x in (p.prefix, p.given, p.family) if x)
    if p.nick and main in ("family",) and p.nick in ("Mum", "Dad"):
        c["fn"], c["nickname"] = p.nick, p.nick
    elif p.nick and rng.random() < 0.5:
        c["fn"], c["nickname"] = f"{p.nick} {p.family}", p.nick
    if main == "club" and rng.random() < 0.2:
        c["fn"] = f"{p.short} (rowing)"
    if main == "services" and not p.prefix:
        c["fn"] = f"{p.given} {p.family} - {p.title.lower()}"
    if p.culture == "zh" and p.given in NATIVE and p.family in NATIVE and rng.random() < 0.7:
        c["fn"] = NATIVE[p.family] + NATIVE[p.given]
        c["n"] = [NATIVE[p.family], NATIVE[p.given], "", "", ""]
    if p.org:
        c["org"] = [p.org, p.unit] if p.unit else [p.org]
        c["title"] = p.title
    work_first = main in ("you", "quillon", "lantern", "conference", "velvane", "orsolan", "thistlecombe")
    emails = []
    if p.work and "club_other_email" not in p.quirks:
        shown = _case_variant(rng, p.work) if main == "harrowgate" and rng.random() < 0.3 else ""
        if work_first or rng.random() < 0.35 or ("conf" in p.sources and "conf_alias" not in p.quirks):
            emails.append(_email(p.work, ["WORK"], shown=shown))
    if p.personal and (not work_first or rng.random() < 0.3 or p.pid == "you") and "name_changed" not in p.quirks:
        emails.insert(0 if not work_first else len(emails), _email(p.personal, ["HOME"]))
    for job in p.past:
        if job.get("email") and (("keeps_old_email" in p.quirks or "changed_mobile" in p.quirks)
                                 or (job["org"] == H and "name_changed" not in p.quirks and rng.random() < 0.3)):
            emails.append(_email(job["email"], ["WORK"], label=job["org"].split()[0]))
            break
    if p.alumni and rng.random() < 0.6:
        emails.append(_email(p.alumni, [], label="Aldermoor alumni"))
    if emails:
        emails[0]["pref"] = True
    c["emails"] = emails
    tels = []
    if "club_other_email" not in p.quirks:
        tels.append(_tel(p.mobile, ["CELL", "VOICE"] if rng.random() < 0.5 else ["CELL"],
                         rng.choices(["intl", "national", "e164"], [6, 3, 1])[0]))
    if p.work_phone and (rng.random() < 0.6 or main == "lantern"):
        tels.append(_tel(p.work_phone, ["WORK", "VOICE"], rng.choice(["intl", "national"])))
    if p.home_phone:
        tels.append(_tel(p.home_phone, ["HOME"], "national"))
    c["tels"] = tels
    if main in ("family", "neighbours") or (main in ("club", "aldermoor", "you") and rng.random() < 0.5):
        c["adrs"].append(_home_adr(p, ["HOME"]))
    if p.org in ORGS and ORGS[p.org].street and rng.random() < 0.2:
        c["adrs"].append(_work_adr(p.org))
    if main in CATEGORY and rng.random() < 0.6:
        c["categories"] = [CATEGORY[main]] + (["Work"] if main == "lantern" else [])
    c["categories"] = c["categories"] + _workflow(p, "phone")
    c["note"] = _phone_note(w, p, main)
    if "shared_card" in p.quirks:
        c["rev"] = "2025-05-20T21:04:00Z"  # added after the regatta the note mentions
    if main == "family" and p.birthday:
        c["bday"] = p.birthday
    if p.org in ORGS and rng.random() < 0.1:
        c["urls"] = [f"https://www.{ORGS[p.org].domain}/"]
    return c


def _phone_note(w: World, p: Person, main: str) -> str:
    rng = w.rng
    if "shared_card" in p.quirks:
        bridge = next(x for x in w.people if "club" in x.clusters and x.org == p.org)
        return (f"Card shared by {bridge.name} after the spring regatta. Runs engineering at {p.org}; "
                f"{bridge.short} offered to introduce us when the time is right.")
    if main == "harrowgate" and p.org != H:
        job = p.job_at(H)
        return f"ex-Harrowgate ({job['unit'] or job['title']}), moved to {p.org} in 20{rng.randint(22, 25)}"
    if main == "brennick":
        return "Brennick Maritime days, chartering desk.\nStill meets for the alumni dinner."
    if main == "aldermoor" and rng.random() < 0.6:
        return "Aldermoor MSc cohort 2012" + (", shared the flat on Cloister Lane" if "aldermoor/flatmates" in p.teams
                                             else "")
    if main == "conference":
        return "Met at Tidewater Data Forum 2025, talked about freight forecasting, data contracts and hiring"
    if main == "lantern" and rng.random() < 0.5:
        return f"Lantern project ({p.org}). Weekly steering on Thursdays, invoices via the programme office."
    return ""


# -- phone-recent.vcf (vCard 4.0) -----------------------------------------------------------------------
def recent_export(w: World) -> list[Rec]:
    """A small, newer export in vCard 4.0: the family with RELATED, a crew group and an organisation card."""
    rng = w.rng
    you = w.by_id["you"]
    fam = [p for p in w.people if "recent" in p.sources]
    by_team: dict[str, list[Person]] = {}
    for p in fam:
        by_team.setdefault(p.teams[0], []).append(p)
    recs = []
    for p in fam:
        c = card(kind="individual", uid=p.uid, fn=p.nick if p.nick in ("Mum", "Dad") else p.name,
                 n=[p.family, p.given, "", "", ""], nickname=p.nick, gender="F" if p.female else "M",
                 rev="20261102T091500Z")
        if p.birthday:
            c["bday"] = ("--" + p.birthday[5:].replace("-", "")) if rng.random() < 0.5 else p.birthday.replace("-", "")
        c["emails"] = [_email(p.personal, ["HOME"])] + ([_email(p.work, ["WORK"])] if p.work and
                                                         rng.random() < 0.5 else [])
        c["tels"] = [{"value": fmt_phone(p.mobile, "uri"), "canon": p.mobile, "types": ["CELL", "VOICE"]}]
        if p.home_phone:
            c["tels"].append({"value": fmt_phone(p.home_phone, "uri"), "canon": p.home_phone, "types": ["HOME"]})
        c["adrs"] = [_home_adr(p, ["HOME"])]
        if p.org:
            c["org"], c["title"] = [p.org], p.title
        team = p.teams[0]
        if team == "family/household" and p.nick in ("Mum", "Dad"):
            other = next(x for x in by_team[team] if x.nick in ("Mum", "Dad") and x is not p)
            c["related"] = [("spouse", f"urn:uuid:{other.uid}"), ("child", f"urn:uuid:{you.uid}")]
            c["anniversary"] = "19790616"
        elif team == "family/household":
            c["related"] = [("spouse", f"urn:uuid:{you.uid}"), ("co-resident", f"urn:uuid:{you.uid}")]
        elif team == "family/siblings":
            other = next(x for x in by_team[team] if x is not p)
            c["related"] = [("spouse", f"urn:uuid:{other.uid}")]
            if p.family == you.family:
                c["related"].append(("sibling", f"urn:uuid:{you.uid}"))
        elif team == "family/cousins":
            c["related"] = [("kin", "cousin on Dad's side")]
        else:
            c["related"] = [("neighbor", f"urn:uuid:{you.uid}")]
        recs.append(_rec(p.pid, c))
    crew = [p for p in w.people if "club/masters" in p.teams]
    members = [f"urn:uuid:{p.uid}" if "phone" in p.sources else f"mailto:{p.personal}" for p in crew]
    recs.append(_rec(None, card(kind="group", uid=w.uuid(), fn="Masters crew", members=members,
                                note="Saturday crew at Kestrel Reach", rev="20261102T091500Z"), kind="group"))
    o = ORGS["Velvane Robotics"]
    number = w.number(o.office)
    org_card = card(kind="org", uid=w.uuid(), fn=o.name, org=[o.name], urls=[f"https://www.{o.domain}/"],
                    tels=[{"value": fmt_phone(number, "uri"), "canon": number, "types": ["WORK"]}],
                    adrs=[_work_adr(o.name)], note="Robotics firm to approach about the freight pilot.",
                    rev="20261102T091500Z")
    recs.append(_rec(None, org_card, kind="organisation"))
    return recs


# -- old-work.vcf (vCard 2.1, windows-1252) -------------------------------------------------------------
OLD_NOTES = ["Covers the Fennmouth depot rota on Fridays. Prefers a call to e-mail, café on the ground floor.",
             "Résumé on file from the 2019 restructure. Knows everyone in the tender team and the customs brokers.",
             "Runs the quarterly capacity review, very good with the route optimiser and the night-shift planners.",
             "Ask about the Tarrowby Cross warehouse move (led the cut-over weekend)."]


def oldwork_export(w: World) -> list[Rec]:
    """The older work address book: Harrowgate-era jobs, old work e-mails and office numbers."""
    rng = w.rng
    recs = []
    for p in w.people:
        if "oldwork" not in p.sources:
            continue
        job = p.job_at(H)
        family = p.old_family or p.family
        given, fam = p.given, family
        mode = rng.choice(["raw", "qp"])
        if cp1252_fold(p.given + family) != p.given + family:
            if rng.random() < 0.5:
                mode = "utf8qp"
            else:
                given, fam = cp1252_fold(given), cp1252_fold(fam)
        fn = f"{fam}, {given}" if rng.random() < 0.25 else f"{given} {fam}"
        c = card(n=[fam, given, "", "", ""], fn=fn, org=[H, job["unit"]] if job["unit"] else [H],
                 title=job["title"], name_mode=mode, labels=rng.random() < 0.5,
                 rev=f"2021{rng.randint(1, 12):02d}{rng.randint(1, 28):02d}T{rng.randint(8, 18):02d}1500Z")
        c["emails"] = [_email(job["email"], [])]
        if p.personal and "name_changed" not in p.quirks and rng.random() < 0.2:
            c["emails"].append(_email(p.personal, []))
        if job.get("phone"):
            c["tels"].append(_tel(job["phone"], ["WORK", "VOICE"], rng.choice(["intl0", "national"])))
        mobile = p.old_mobile or p.mobile
        c["tels"].append(_tel(mobile, ["CELL", "VOICE"], rng.choice(["national", "intl0", "intl"])))
        if rng.random() < 0.4:
            c["adrs"].append(_work_adr(H))
        if rng.random() < 0.3:
            c["note"] = rng.choice(OLD_NOTES)
        recs.append(_rec(p.pid, c))
        if "oldwork_twice" in p.quirks:  # once from the global list, once typed in by hand
            d = card(n=c["n"], fn=f"{fam}, {given}", org=[H], name_mode=mode, rev="20200302T101500Z")
            d["emails"] = [_email(job["email"], [], shown=_case_variant(rng, job["email"]))]
            d["tels"] = [_tel(mobile, ["CELL"], "compact")]
            recs.append(_rec(p.pid, d))
    recs.sort(key=lambda r: (ascii_fold(r.data["n"][0]).lower(), ascii_fold(r.data["n"][1]).lower(), r.data["fn"]))
    return recs


# -- conference.csv and club-members.csv ----------------------------------------------------------------
CONF_HEADER = ["Full name", "Email", "Company", "Job title", "City", "Tags"]
CLUB_HEADER = ["First name", "Last name", "E-mail", "Mobile", "Employer", "Groups"]
CLUB_GROUPS = {"club/masters": "Masters crew", "club/novice": "Novice squad", "club/committee": "Committee",
               "club/coaching": "Coaching"}


def conference_rows(w: World) -> list[Rec]:
    """Attendees of the Tidewater Data Forum 2025, as the organisers' spreadsheet lists them."""
    rng = w.rng
    recs = []
    for p in w.people:
        if "conf" not in p.sources:
            continue
        style = rng.choices(["plain", "comma", "folded", "upper", "nick"], [13, 3, 2, 1, 1])[0]
        if "conf_alias" in p.quirks:  # only a name-and-organisation comparison can join this row
            style = rng.choice(["plain", "comma", "folded"])
        name = {"plain": p.name, "comma": f"{p.family}, {p.given}", "folded": ascii_fold(p.name),
                "upper": f"{p.family.upper()} {p.given}", "nick": f"{p.short} {p.family}"}[style]
        address = p.alias if "conf_alias" in p.quirks else (p.work or p.personal)
        canon = [address.lower()]
        shown = _case_variant(rng, address) if rng.random() < 0.2 else address
        roll = rng.random()
        if roll < 0.05 and p.sources == ["conf"]:
            shown, canon = "", []
        elif roll < 0.1 and p.personal and p.work:
            shown, canon = f"{address}; {p.personal}", [address.lower(), p.personal.lower()]
        company = p.org
        if p.org and rng.random() < 0.15 and "conf_alias" not in p.quirks:
            company = ORGS[p.org].short if p.org in ORGS else p.org
        city = p.locality + (f", {p.region}" if p.country == "United States" else "")
        tags = []
        if "conference/panel" in p.teams:
            tags.append("speaker")
        tags += rng.sample(["workshop: data contracts", "follow up", "hiring", "met at booth", "dinner"],
                           rng.randint(0, 2))
        row = [name, shown, company, p.title if p.org else "", city, "; ".join(tags)]
        if rng.random() < 0.03:
            row[0] = ""  # a badge scan that lost the name
        r = Rec(p.pid, row, emails=canon)
        recs.append(r)
    rng.shuffle(recs)
    return recs


def club_rows(w: World) -> list[Rec]:
    """Kestrel Reach Rowing Club's member list (exported from the club's spreadsheet in windows-1252)."""
    rng = w.rng
    recs = []
    for p in w.people:
        if "club" not in p.sources:
            continue
        first = p.nick if p.nick and rng.random() < 0.6 and "club_other_email" not in p.quirks else p.given
        emails, phones = [], []
        if "club_other_email" in p.quirks:
            email, mobile = p.alias, ""
        else:
            email = p.personal if rng.random() < 0.92 else ""
            mobile = fmt_phone(p.mobile, rng.choices(["compact", "paren0", "national", "e164", "00"],
                                                      [4, 2, 2, 1, 1])[0]) if rng.random() < 0.95 or not email else ""
            if mobile:
                phones = [p.mobile]
        if email:
            emails = [email.lower()]
            email = email.upper() if rng.random() < 0.05 else email
        employer = p.org
        if p.org in ORGS and rng.random() < 0.4 and "club_other_email" not in p.quirks:
            employer = ORGS[p.org].short
        elif not p.org:
            employer = rng.choice(["", "", "Self-employed", "Retired", "Student"])
        groups = [CLUB_GROUPS[t] for t in p.teams if t in CLUB_GROUPS]
        if rng.random() < 0.3:
            groups.append("Social")
        r = random.Random(f"workflow:club:{p.pid}")
        groups += [label for label, odds in CLUB_WORKFLOW_ODDS.items() if r.random() < odds]
        row = [cp1252_fold(first), cp1252_fold(p.family), email, mobile, employer, ", ".join(groups)]
        recs.append(Rec(p.pid, row, emails=emails, phones=phones))
    recs.sort(key=lambda r: (ascii_fold(r.data[1]).lower(), ascii_fold(r.data[0]).lower()))
    return recs
