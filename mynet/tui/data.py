"""What the browser shows, loaded from the workspace in a worker thread.

A :class:`Snapshot` holds the network and its analysis at one moment; the app
swaps in a new one after an edit or when another process changed the
workspace. Every function here that reads the workspace opens it in its own
thread (:func:`with_workspace`). Nothing here imports Textual.
"""

from __future__ import annotations

import sqlite3
import time
from collections import Counter
from dataclasses import dataclass, field
from datetime import date
from pathlib import Path
from typing import Any, Callable

import numpy as np

from ..analysis.audit import audit
from ..analysis.intro_routes import org_catalogue, tag_catalogue
from ..analysis.snapshot import Analysis, GroupInfo
from ..errors import WorkspaceError
from ..evidence.explain import evidence_summary, tie_words
from ..evidence.network import Network
from ..model import Contact
from ..people.identity import Suggestion
from ..people.normalise import fold_text, normalise_org
from ..workspace import Workspace

__all__ = ["Snapshot", "Extras", "peek_snapshot", "load_snapshot", "load_extras", "with_workspace", "BusyWait",
           "tier_of", "Choice", "choices"]

Status = Callable[[str], None]

#: Seconds a worker waits for the write lock before it says the workspace is busy (then it keeps waiting).
LOCK_PATIENCE = 0.5


class BusyWait(Exception):
    """Raised by a status callback to stop waiting (the app is closing)."""


def _busy(exc: BaseException) -> bool:
    text = str(exc).lower()
    return isinstance(exc, (WorkspaceError, sqlite3.OperationalError)) and ("busy" in text or "locked" in text)


def with_workspace(path: Path, fn: Callable[[Workspace], Any], status: Status | None = None, *,
                   patience: float = 600.0) -> Any:
    """Run ``fn`` on the workspace opened in this thread; wait (and say so) while another process writes.

    Every change runs in one transaction that rolls back on failure, so trying
    again after a lock timeout is safe.
    """
    start = time.monotonic()
    said = False
    while True:
        ws = Workspace(path, create=False, timeout=LOCK_PATIENCE)
        try:
            return fn(ws)
        except Exception as exc:  # only lock contention is retried
            if not _busy(exc) or time.monotonic() - start > patience:
                raise
            if status and not said:
                status("The workspace is busy: another mynet process is writing to it (an import?). Waiting…")
                said = True
        finally:
            ws.close()
        time.sleep(0.2)


def tier_of(net: Network, cid: int) -> tuple[float, str, str | None]:
    """(warmth, tier word, last interaction) for a contact."""
    w = net.warmth.get(cid)
    if w is None:
        return 0.0, "none", None
    return float(w.warmth), w.tier, w.last


@dataclass
class Choice:
    """One completion for a reach target: a person, an organisation or a tag."""

    kind: str  # "person", "organisation", "tag"
    value: str  # what resolve_targets receives (a contact id for a person)
    label: str
    folded: str
    count: int = 1


@dataclass
class Extras:
    """The slower parts, loaded after the first screen: duplicates and findings."""

    suggestions: list[Suggestion] = field(default_factory=list)
    findings: list[dict[str, Any]] | None = None
    findings_error: str = ""


@dataclass
class Snapshot:
    """The network, its analysis and the indexes the views need, at one moment."""

    path: Path
    today: date
    net: Network  # None in a preview (see :func:`peek_snapshot`)
    analysis: Analysis
    data_version: int
    extras: Extras | None = None
    preview: bool = False
    #: The newest decision when the snapshot was read (group names change no data version).
    decisions_seen: int = 0
    _hay: list[str] | None = None
    _choices: list[Choice] | None = None
    _internal: dict[int, tuple[int, float]] | None = None
    _links: dict[tuple[int, int], dict[str, Any]] | None = None
    _bridges: dict[tuple[int, int], list[dict[str, Any]]] | None = None
    _fragile: dict[tuple[int, int], bool] = field(default_factory=dict)

    # -- people ----------------------------------------------------------------
    @property
    def contacts(self) -> list[Contact]:
        return self.net.contacts if self.net is not None else []

    def group_of(self, cid: int) -> int | None:
        return self.analysis.group_of.get(cid)

    def group(self, gid: int | None) -> GroupInfo | None:
        return self.analysis.group(gid) if gid is not None else None

    def group_name(self, gid: int | None) -> str:
        g = self.group(gid)
        return g.name if g else "not in a group"

    def role(self, cid: int) -> str:
        m = self.analysis.measures.get(cid)
        return (m or {}).get("role") or "no ties"

    def ungrouped(self) -> list[int]:
        grouped = {m for g in self.analysis.groups for m in g.members}
        return sorted(c for c in self.analysis.group_of if c not in grouped)

    def search(self, text: str) -> list[Contact]:
        """Contacts matching ``text`` by name, e-mail, phone, organisation, title, tag or place.

        The same fields and folding as :func:`mynet.workspace.people.search_contacts`, with
        the folded text prepared once so each keystroke is a plain substring scan.
        """
        needle = fold_text(text)
        if not needle:
            return list(self.net.contacts)
        if self._hay is None:
            self._hay = [
                fold_text(" | ".join([c.name, *c.nicknames, *c.emails, *c.phones, *c.orgs, *c.past_orgs, *c.titles,
                                      *c.tags, *c.localities])) + "\0" + "".join(c.phones)
                for c in self.net.contacts
            ]
        digits = needle.replace(" ", "")
        out = []
        for c, hay in zip(self.net.contacts, self._hay):
            folded, _, phones = hay.partition("\0")
            if needle in folded or digits in phones:
                out.append(c)
        return out

    # -- ties --------------------------------------------------------------------
    def ties_of(self, cid: int) -> list[tuple[int, float, int]]:
        """(other contact, strength, row of ``net.ties``) for a contact, strongest first."""
        t = self.net.ties
        rows = np.nonzero((t.a == cid) | (t.b == cid))[0]
        out = [(int(t.b[i]) if int(t.a[i]) == cid else int(t.a[i]), float(t.strength[i]), int(i)) for i in rows]
        out.sort(key=lambda x: (-x[1], self.net.name(x[0])))
        return out

    def why(self, row: int) -> str:
        return tie_words(evidence_summary(self.net, row))

    def maybe_same(self, a: int, b: int) -> bool:
        """Whether two contacts are a suggested duplicate still to decide (then their link is no tie to show)."""
        if self.extras is None:
            return False
        return any({s.a, s.b} == {a, b} for s in self.extras.suggestions)

    def internal(self, gid: int) -> tuple[int, float]:
        """(ties inside the group, density inside it); (-1, 0) in a preview."""
        if self.net is None:
            return -1, 0.0
        if self._internal is None:
            t = self.net.ties
            gof = self.analysis.group_of
            ga = np.array([gof.get(int(x)) if gof.get(int(x)) is not None else -1 for x in t.a], dtype=np.int64)
            gb = np.array([gof.get(int(x)) if gof.get(int(x)) is not None else -1 for x in t.b], dtype=np.int64)
            same = (ga == gb) & (ga >= 0)
            counts = Counter(ga[same].tolist())
            self._internal = {}
            for g in self.analysis.groups:
                n = counts.get(g.id, 0)
                pairs = g.size * (g.size - 1) / 2
                self._internal[g.id] = (n, n / pairs if pairs else 0.0)
        return self._internal.get(gid, (0, 0.0))

    def link(self, g: int, h: int) -> dict[str, Any] | None:
        """The ties between two groups (count, density, carriers), or None."""
        if self._links is None:
            self._links = {(x["a"], x["b"]): x for x in self.analysis.links}
        return self._links.get((min(g, h), max(g, h)))

    def bridges_between(self, g: int, h: int) -> list[dict[str, Any]]:
        if self._bridges is None:
            self._bridges = {}
            for b in self.analysis.bridges:
                if len(b["groups"]) == 2:
                    self._bridges.setdefault((min(b["groups"]), max(b["groups"])), []).append(b)
        return self._bridges.get((min(g, h), max(g, h)), [])

    def fragile(self, g: int, h: int) -> bool:
        """Whether the pair hangs on one person on either side, or on a local bridge."""
        key = (min(g, h), max(g, h))
        if key not in self._fragile:
            link = self.link(g, h)
            here, there = (link.get("carriers") or ([], [])) if link else ([], [])
            self._fragile[key] = bool(link) and (len(here) == 1 or len(there) == 1 or
                                                 any(b.get("local_bridge") for b in self.bridges_between(g, h)))
        return self._fragile[key]

    # -- evidence with its files -----------------------------------------------------
    def explain(self, a: int, b: int) -> dict[str, Any]:
        """:meth:`mynet.workspace.Workspace.explain` on this snapshot's network.

        Call from a worker thread: the first call reads every record of the workspace
        (the network keeps what it read for the next calls).
        """
        return with_workspace(self.path, lambda ws: ws.explain(a, b, net=self.net))

    # -- reach completion ------------------------------------------------------------
    def choices(self) -> list[Choice]:
        if self._choices is None:
            self._choices = choices(self.net)
        return self._choices


def choices(net: Network) -> list[Choice]:
    """Every reach target a user may type: organisations, tags, then people."""
    orgs, tags = org_catalogue(net), tag_catalogue(net)
    org_count: Counter = Counter()
    tag_count: Counter = Counter()
    for c in net.contacts:
        for o in {normalise_org(o) for o in c.orgs + c.past_orgs}:
            org_count[o] += 1
        for t in {fold_text(t) for t in c.tags}:
            tag_count[t] += 1
    out = [Choice("organisation", orgs[k], orgs[k], fold_text(orgs[k]), org_count[k]) for k in sorted(orgs)]
    out += [Choice("tag", tags[k], tags[k], k, tag_count[k]) for k in sorted(tags)]
    for c in net.contacts:
        where = f" ({c.orgs[0]})" if c.orgs else ""
        out.append(Choice("person", str(c.id), c.name + where, fold_text(c.name)))
    return out


def peek_snapshot(path: Path, today: date | None = None, as_of: date | str | None = None) -> Snapshot | None:
    """The groups as last analysed, read straight from the workspace cache, for a first screen at once.

    ``None`` when there is no cached analysis or no warmth for ``today`` yet. The
    full :func:`load_snapshot` follows and replaces it (it checks that the cached
    analysis still matches the ties).
    """
    today = today or date.today()

    def run(ws: Workspace) -> Snapshot | None:
        cached = ws.cached_analysis(as_of, today=today)
        if cached is None:
            return None
        when, analysis = cached
        return Snapshot(path, when.day, None, analysis, ws.data_version, preview=True)

    try:
        return with_workspace(path, run, patience=0)
    except Exception:  # a preview is only a head start; the full load reports real problems
        return None


def load_snapshot(path: Path, today: date | None = None, status: Status | None = None,
                  as_of: date | str | None = None) -> Snapshot:
    """The network and its analysis (from the workspace cache when current).

    The snapshot's ``today`` is the day the network is seen from: ``as_of``
    when given, else today, else your newest interaction when it is over a
    year old (see :meth:`mynet.workspace.Workspace.as_of`).
    """
    today = today or date.today()

    def run(ws: Workspace) -> Snapshot:
        version = ws.data_version
        decisions = ws.last_decision_id()
        net = ws.network(as_of, today=today)
        if status and not ws.analysis_is_cached(net):
            status("Finding groups and measuring the network (first time after an import)…")
        analysis = ws.analysis(net)
        return Snapshot(path, net.as_of.day, net, analysis, version, decisions_seen=decisions)

    return with_workspace(path, run, status)


def load_extras(path: Path, snap: Snapshot, status: Status | None = None) -> Extras:
    """Merge suggestions and the audit findings."""

    def run(ws: Workspace) -> Extras:
        extras = Extras(suggestions=ws.suggestions())
        # Through the workspace when there are contacts: your own brokerage is then kept per data version.
        extras.findings = (list(ws.audit(net=snap.net, analysis=snap.analysis)) if snap.net.contacts
                           else list(audit(snap.net, snap.analysis, today=snap.today)))
        return extras

    return with_workspace(path, run, status)
