"""What a report shows, gathered once as plain data (redacted before anything is written).

:func:`collect` loads the network and its analysis, runs the audit and the
intro-path search on them and returns a :class:`ReportData` that the HTML and
Markdown writers and the charts only format. With ``redact=True`` the network
and analysis are replaced by their redacted copies (:mod:`mynet.report.redact`)
*before* the audit, the intro paths and the evidence texts are computed, so
every text in the report is built from pseudonyms.
"""

from __future__ import annotations

from collections import Counter
from dataclasses import dataclass, field
from datetime import date
from typing import Any, Callable

from ..analysis.audit import WARM, audit
from ..analysis.intro_routes import Targets, path_index, reach
from ..analysis.snapshot import Analysis, tie_graph
from ..evidence.explain import basis, evidence_summary, tie_words
from ..evidence.network import AsOf, Network
from ..evidence.warmth import BEYOND, NONE, TIERS
from ..workspace import Workspace
from .files import MAX_CONTACTS_DRAWN, STEPS
from .redact import Pseudonyms, redact_analysis, redact_network

__all__ = ["ReportData", "collect", "STEPS", "MAX_CONTACTS_DRAWN"]




@dataclass
class ReportData:
    """Everything a report shows, already redacted when ``redacted`` is true."""

    generated: str
    redacted: bool
    net: Network
    analysis: Analysis
    findings: list[dict[str, Any]]
    groups: list[dict[str, Any]]
    unclustered: int
    brokers: list[dict[str, Any]]
    bridges: list[dict[str, Any]]
    intros: list[dict[str, Any]]
    timeline: list[dict[str, Any]]
    tiers: list[tuple[str, int]]
    summary: dict[str, Any]
    picture: str  # "contacts" or "groups"
    remarks: list[str] = field(default_factory=list)
    pseudonyms: Pseudonyms | None = None
    graph: Any = None  # the tie graph (networkx), built once for the pictures
    targets: dict[str, Any] | None = None  # your targets and the plan (:func:`_targets`); None without targets

    def group_name(self, gid: int | None) -> str:
        """The group's name (``no group`` for None)."""
        if gid is None:
            return "no group"
        g = self.analysis.group(gid)
        return g.name if g else f"group {gid}"

    def group_label(self, gid: int | None) -> str:
        """``G3 name``, as groups are numbered on the picture."""
        return self.group_name(gid) if gid is None else f"G{gid} {self.group_name(gid)}"


def _noop(_step: str) -> None:
    return None


def _tie_rows(net: Network) -> dict[tuple[int, int], int]:
    t = net.ties
    return {(int(a), int(b)): i for i, (a, b) in enumerate(zip(t.a.tolist(), t.b.tolist()))}


def _brokers(net: Network, a: Analysis, limit: int) -> list[dict[str, Any]]:
    ranked = sorted(a.measures.items(), key=lambda kv: (-(kv[1].get("betweenness") or 0.0), kv[0]))
    out = []
    for cid, m in ranked[:limit]:
        if not (m.get("betweenness") or 0) > 0:
            break
        w = net.warmth.get(cid)
        out.append({"id": cid, "name": net.name(cid), "group": a.group_of.get(cid), "role": m.get("role") or "",
                    "betweenness": m.get("betweenness"), "constraint": m.get("constraint"),
                    "effective_size": m.get("effective_size"), "participation": m.get("participation"),
                    "warmth": round(w.warmth, 4) if w else 0.0})
    return out


def _bridges(net: Network, a: Analysis, limit: int) -> list[dict[str, Any]]:
    rows = _tie_rows(net)
    out = []
    for b in a.bridges[:limit]:
        i = rows.get((min(b["a"], b["b"]), max(b["a"], b["b"])))
        ev = evidence_summary(net, i) if i is not None else []
        out.append(dict(b, a_name=net.name(b["a"]), b_name=net.name(b["b"]), why=tie_words(ev) if ev else "",
                        basis=basis(ev) if ev else b.get("basis", "assumed")))
    return out


def _intros(net: Network, a: Analysis, limit: int, k: int) -> list[dict[str, Any]]:
    """For each group where you have (almost) nobody warm, the best intro paths into it."""
    cands = sorted((g for g in a.groups if g.size and g.warm_share < 0.2),
                   key=lambda g: (g.warm > 0, g.warm_share, -g.size, g.id))
    if not cands:
        return []
    index = path_index(net)
    out = []
    for g in cands[:limit]:
        res = reach(net, Targets("group", g.name, list(g.members)), k=k, index=index, groups=a.group_of,
                    per_target=False)
        out.append({"group": g.id, "name": g.name, "size": g.size, "warm": g.warm,
                    "paths": res.paths, "direct": [d for d in res.direct if not d["weak"]],
                    "unreachable": len(res.unreachable)})
    return out


def _targets(ws: Workspace, net: Network, shown_net: Network, ps: Pseudonyms | None, today: date
             ) -> dict[str, Any] | None:
    """Your targets with their reachability, and the plan, in the names the report shows (pseudonyms when
    redacted: people by id in the redacted network, organisations, tags and domains through ``ps``)."""
    rows = ws.targets(net=net, today=today)
    if not rows:
        return None
    plan = ws.plan(net=net, today=today)
    kinds = {"organisation": "org", "tag": "tag", "domain": "domain"}

    def label(r: dict[str, Any]) -> str:
        if ps is None:
            return r["label"]
        if r["kind"] == "person":
            return shown_net.name(r["contact"]) if r["contact"] is not None else "a person"
        return getattr(ps, kinds[r["kind"]])(r["query"])

    labels = {r["id"]: label(r) for r in rows}

    def names(path: list[int]) -> list[str]:
        return [shown_net.name(c) for c in path]

    targets = [{"label": labels[r["id"]], "kind": r["kind"], "state": r["state"], "open": r["first_people"],
                "score": r["best"]["score"] if r["best"] and r["state"] == "open" else None,
                "observed": bool(r["observed"]) if r["state"] == "open" else None,
                "route": names(r["best"]["path"]) if r["best"] and r["state"] == "open" else []} for r in rows]
    asks = [{"name": shown_net.name(a["person"]), "warmth": a["warmth"],
             "targets": [{"label": labels[t["target"]], "score": t["route"]["score"], "basis": t["route"]["basis"],
                          "route": names(t["route"]["path"])} for t in a["targets"]]} for a in plan["asks"]]
    no_route = [{"label": labels[t["target"]], "dormant": [shown_net.name(d["person"]) for d in t["dormant"]],
                 "groups": [f"G{g['group']}" for g in t["groups"]]} for t in plan["no_route"]]
    return {"targets": targets, "asks": asks, "no_route": no_route, "objective": plan["objective"],
            "several_doors": [{"name": shown_net.name(d["person"]), "count": d["count"]}
                              for d in plan["several_doors"][:5]]}


def _tiers(net: Network) -> list[tuple[str, int]]:
    counts = Counter(w.tier for w in net.warmth.values())
    order = [t for t, _ in TIERS] + [BEYOND, NONE]
    missing = len(net.contacts) - sum(counts.values())
    counts[NONE] += max(0, missing)
    return [(t, counts.get(t, 0)) for t in order]


def collect(
    ws: Workspace,
    *,
    redact: bool = False,
    today: date | None = None,
    max_contacts: int = MAX_CONTACTS_DRAWN,
    limit: int = 10,
    progress: Callable[[str], None] | None = None,
    as_of: AsOf | date | str | None = None,
) -> ReportData:
    """Gather the report's content from the workspace.

    Parameters
    ----------
    ws : Workspace
    redact : bool, default False
        Build everything from pseudonyms (see :mod:`mynet.report.redact`).
    today : date, optional
        The report's date (warmth and dormancy depend on it); default today.
    max_contacts : int, default 2000
        Above this many contacts the picture is the map of groups.
    limit : int, default 10
        Rows in the brokers and bridges tables.
    progress : callable, optional
        Called with the name of each step (see ``STEPS``) as it starts.
    as_of : AsOf, date or str, optional
        See the network from this day (see :func:`mynet.evidence.network.resolve_as_of`).
    """
    step = progress or _noop
    today = today or date.today()
    step("load network")
    net = ws.network(as_of, today=today)
    step("analyse")
    analysis = ws.analysis(net)
    ps = None
    if redact:
        net_r, ps = redact_network(net, ws.setting("webmail_domains"))
        analysis_r = redact_analysis(analysis, net_r)
    else:
        net_r, analysis_r = net, analysis
    step("audit")
    findings = audit(net_r, analysis_r, today=net.as_of.day)
    step("intro paths")
    intros = _intros(net_r, analysis_r, limit=5, k=3)
    targets = _targets(ws, net, net_r, ps, today)
    step("timeline")
    timeline = ws.timeline(net)  # counts only: nothing of the original data leaves this function
    groups = [{"id": g.id, "name": g.name, "size": g.size, "warm": g.warm, "warm_share": g.warm_share,
               "user_named": g.user_named,
               "roles": dict(Counter(analysis_r.measures.get(m, {}).get("role") or "" for m in g.members))}
              for g in analysis_r.groups]
    unclustered = sum(1 for v in analysis_r.group_of.values() if v is None)
    picture = "contacts" if len(net.contacts) <= max_contacts else "groups"
    remarks = []
    if net.as_of.note or net.as_of.explicit:
        remarks.append(f"Seen from {net.as_of.day.isoformat()}: warmth is measured on that day"
                       + (" (your newest meeting or message; more than a year old)." if net.as_of.note
                          else "; meetings and mail after it are left out."))
    if picture == "groups":
        remarks.append(f"With {len(net.contacts):,} contacts (more than {max_contacts:,}) the picture shows the map of "
                       "groups: one circle per group, sized by its members, and lines sized by the ties between them.")
    if redact:
        remarks.append("Redacted: people, organisations, tags, places and mail domains are shown by consistent "
                       "pseudonyms; phones, titles and notes are left out.")
    return ReportData(
        generated=today.isoformat(), redacted=redact, net=net_r, analysis=analysis_r, findings=findings,
        groups=groups, unclustered=unclustered, brokers=_brokers(net_r, analysis_r, limit),
        bridges=_bridges(net_r, analysis_r, limit), intros=intros, timeline=timeline, tiers=_tiers(net_r),
        summary=dict(analysis_r.summary, modularity=analysis_r.modularity, contacts=len(net.contacts),
                     warm=sum(1 for w in net.warmth.values() if w.warmth >= WARM)),
        picture=picture, remarks=remarks, pseudonyms=ps, graph=tie_graph(net_r) if picture == "contacts" else None,
        targets=targets,
    )
