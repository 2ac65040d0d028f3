"""Consistent pseudonyms for reports and exports (``--redact``).

The redacted views are built from redacted data, never by replacing strings
in a finished text: :func:`redact_network` copies the network with every
name, organisation, e-mail, phone, note, tag and place replaced, and
:func:`redact_analysis` relabels the groups from those pseudonyms. Audit
findings, intro-path asks and evidence texts computed from the copies can
then only contain pseudonyms. :func:`find_leaks` scans a finished text for
original values as a safety net.

Pseudonyms are consistent within one output: the same contact is always
``Person 17`` (its contact id), the same organisation (compared after
:func:`mynet.people.normalise.normalise_org`) always ``Org 3``, the same tag ``Tag 2``,
the same place ``Place 5``, the same mail domain ``domain4.redacted.invalid``
(``.invalid`` is reserved by RFC 2606, so no pseudonymous address can reach
anyone). Numbers of organisations, tags, places and domains follow the first
appearance over contacts in id order. Phones, titles, nicknames, web
addresses, notes and your notes on manual ties are dropped. Placeholder
employers ("Retired", "Self-employed") become ``n/a`` and address-book labels
that say nothing ("Work", "VIP") become ``other``, so the relabelled groups
follow the same rules as the originals.
"""

from __future__ import annotations

import re
from dataclasses import replace
from typing import Iterable

from ..analysis.groups import suggest_label
from ..analysis.snapshot import Analysis, contact_attrs
from ..evidence.network import Network
from ..model import Contact
from ..people.normalise import GENERIC_TAGS, email_domain, fold_text, is_real_org, is_webmail, normalise_org

__all__ = ["Pseudonyms", "redact_network", "redact_analysis", "find_leaks", "WEBMAIL", "PLACEHOLDER_ORG", "GENERIC_TAG"]

#: The pseudonym of every public webmail domain (they say nothing about an employer).
WEBMAIL = "webmail.redacted.invalid"
#: The pseudonym of placeholder employers; folds to a placeholder too (see ``is_real_org``).
PLACEHOLDER_ORG = "n/a"
#: The pseudonym of generic address-book labels; one of ``GENERIC_TAGS``.
GENERIC_TAG = "other"


class Pseudonyms:
    """The pseudonyms of one output, handed out on first use.

    Parameters
    ----------
    webmail : iterable of str, optional
        Extra mail domains to treat as webmail (the workspace setting
        ``webmail_domains``), besides the built-in list.
    """

    def __init__(self, webmail: Iterable[str] = ()):
        self.webmail = frozenset(d.strip().lower() for d in webmail if d.strip())
        self._orgs: dict[str, str] = {}
        self._tags: dict[str, str] = {}
        self._places: dict[str, str] = {}
        self._domains: dict[str, str] = {}
        #: Original values that must never appear in a redacted output (for :func:`find_leaks`).
        self.originals: set[str] = set()
        #: The originals that identify a person beyond doubt (addresses, phones, names of two or
        #: more words): checked in every redacted output before it is written.
        self.identifiers: set[str] = set()

    def _remember(self, *values: str) -> None:
        self.originals.update(v.strip() for v in values if v and v.strip())

    @staticmethod
    def person(cid: int) -> str:
        """The pseudonym of contact ``cid``."""
        return f"Person {cid}"

    def org(self, name: str) -> str:
        """``Org N`` for an organisation, ``n/a`` for a placeholder employer."""
        self._remember(name)
        key = normalise_org(name)
        if not is_real_org(key):
            return PLACEHOLDER_ORG
        return self._orgs.setdefault(key, f"Org {len(self._orgs) + 1}")

    def tag(self, tag: str) -> str:
        """``Tag N`` for a tag, ``other`` for a generic address-book label."""
        self._remember(tag)
        key = fold_text(tag)
        if not key or key in GENERIC_TAGS:
            return GENERIC_TAG
        return self._tags.setdefault(key, f"Tag {len(self._tags) + 1}")

    def place(self, place: str) -> str:
        """``Place N`` for a locality."""
        self._remember(place)
        return self._places.setdefault(fold_text(place), f"Place {len(self._places) + 1}")

    def domain(self, domain: str) -> str:
        """``domainN.redacted.invalid`` for a mail domain, one shared name for webmail."""
        d = domain.strip().lower()
        if not d or is_webmail(d, self.webmail):
            return WEBMAIL
        self._remember(d)
        return self._domains.setdefault(d, f"domain{len(self._domains) + 1}.redacted.invalid")

    def emails(self, cid: int, emails: list[str]) -> list[str]:
        """Addresses ``personN@<domain pseudonym>``, numbered when a domain repeats."""
        out: list[str] = []
        for e in emails:
            self._remember(e)
            self.identifiers.add(e.strip())
            base = f"person{cid}@{self.domain(email_domain(e))}"
            k = 2
            addr = base
            while addr in out:
                addr = base.replace("@", f".{k}@")
                k += 1
            out.append(addr)
        return out

    def contact(self, c: Contact) -> Contact:
        """A copy of ``c`` holding pseudonyms only (ids and record ids are kept)."""
        self._remember(c.name, *c.phones, *c.nicknames, *c.notes, *c.titles, *c.urls)
        self.identifiers.update(p.strip() for p in c.phones if sum(ch.isdigit() for ch in p) >= 6)
        if len(c.name.split()) >= 2:
            self.identifiers.add(c.name.strip())
        return Contact(
            id=c.id,
            name=self.person(c.id),
            emails=self.emails(c.id, c.emails),
            phones=[],
            orgs=_unique(self.org(o) for o in c.orgs),
            past_orgs=_unique(self.org(o) for o in c.past_orgs),
            titles=[],
            tags=_unique(self.tag(t) for t in c.tags),
            localities=_unique(self.place(p) for p in c.localities),
            nicknames=[],
            urls=[],
            notes=[],
            sources=[],
            record_ids=list(c.record_ids),
        )


def _unique(values: Iterable[str]) -> list[str]:
    out: list[str] = []
    for v in values:
        if v not in out:
            out.append(v)
    return out


def redact_network(net: Network, webmail: Iterable[str] = ()) -> tuple[Network, Pseudonyms]:
    """A copy of ``net`` in which every contact holds pseudonyms only.

    Ties, warmth and contact ids are unchanged, so every measure computed on
    the copy equals the original; your own addresses and the notes on manual
    ties are dropped.

    Parameters
    ----------
    net : Network
    webmail : iterable of str, optional
        Extra webmail domains (the workspace setting ``webmail_domains``).

    Returns
    -------
    network : Network
    pseudonyms : Pseudonyms
        Holds the original values seen, for :func:`find_leaks`.
    """
    ps = Pseudonyms(webmail)
    contacts = [ps.contact(c) for c in sorted(net.contacts, key=lambda c: c.id)]
    ps._remember(*net.me_emails, *net.notes.values())
    ps.identifiers.update(net.me_emails)
    labels: dict[str, dict] = {}
    for key, v in sorted((getattr(net, "labels", {}) or {}).items()):
        shown = ps.tag(v.get("label") or key)
        red_key = fold_text(shown)
        if red_key in labels:  # several labels under one pseudonym ("other"): it counts if any of them does
            labels[red_key]["counts"] = labels[red_key]["counts"] or v.get("counts", True)
            continue
        labels[red_key] = dict(v, label=shown, key=red_key)
    red = replace(
        net,
        contacts=contacts,
        by_id={c.id: c for c in contacts},
        me_emails=set(),
        notes={pair: "" for pair in net.notes},
        labels=labels,
        all_ties=replace(net.all_ties, labels=list(labels.values())),
        ties=replace(net.ties, labels=list(labels.values())),
    )
    return red, ps


def redact_analysis(analysis: Analysis, red_net: Network) -> Analysis:
    """A copy of ``analysis`` whose groups are labelled from the redacted contacts.

    Your own group names are replaced too (they are free text): each group
    gets the label :func:`mynet.analysis.groups.suggest_label` gives its
    members' pseudonymous organisations, tags, domains and places.
    """
    out = Analysis.from_json(analysis.to_json())
    attrs = contact_attrs(red_net)
    attrs["domain"] = {k: [d for d in v if d != WEBMAIL] for k, v in attrs["domain"].items()}
    for g in out.groups:
        label, share = suggest_label(g.members, attrs) if g.members else ("empty", 0.0)
        g.label = g.name = label
        g.share = round(float(share), 4)
        g.user_named = False
    return out


_WORD = re.compile(r"\w+")


def find_leaks(text: str, values: Iterable[str], *, ignore_case: bool = False) -> list[str]:
    """The values that occur in ``text`` as whole words (sorted).

    A value matches where it is not part of a longer word (``"Ann"`` does not
    match in ``"Annual"``); with ``ignore_case`` the comparison is case-folded.
    A value whose words do not all occur in ``text`` is ruled out first, so a
    long list of values is cheap to scan.
    """
    hay = text.casefold() if ignore_case else text
    words = set(_WORD.findall(hay))
    found = []
    for v in sorted({v.strip() for v in values if v and v.strip()}):
        needle = v.casefold() if ignore_case else v
        toks = _WORD.findall(needle)
        if toks and not all(t in words for t in toks):
            continue
        if len(toks) == 1 and toks[0] == needle:
            found.append(v)  # a single word: a whole-word occurrence is exactly membership in ``words``
            continue
        if _whole_word_in(needle, hay):
            found.append(v)
    return found


def _is_word_char(ch: str) -> bool:
    return ch.isalnum() or ch == "_"


def _whole_word_in(needle: str, hay: str) -> bool:
    """Whether ``needle`` occurs in ``hay`` not inside a longer word (str.find, no regex backtracking)."""
    check_left, check_right = _is_word_char(needle[0]), _is_word_char(needle[-1])
    start = hay.find(needle)
    while start != -1:
        end = start + len(needle)
        left_ok = not check_left or start == 0 or not _is_word_char(hay[start - 1])
        right_ok = not check_right or end == len(hay) or not _is_word_char(hay[end])
        if left_ok and right_ok:
            return True
        start = hay.find(needle, start + 1)
    return False
