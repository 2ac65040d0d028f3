"""The network for a notebook: one networkx graph with every attribute, and pandas DataFrames.

:func:`network_graph` is the single source of the exports (GraphML, CSV, JSON:
:mod:`mynet.report.export`) and of ``ws.graph()``; ``ws.frames()`` gives the
contacts, ties (with their evidence and basis), groups and measures as tables.
pandas is imported only when frames are asked for.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any

from ..analysis.bridges import neighbourhood_overlap
from ..analysis.snapshot import Analysis, tie_graph
from ..evidence.explain import basis, evidence_summary, tie_words
from ..evidence.network import Network
from ..evidence.ties import KINDS
from ..lazy import lazy_module

nx = lazy_module("networkx")

if TYPE_CHECKING:
    import pandas as pd

__all__ = ["network_graph", "network_frames", "MEASURES_INT", "MEASURES_FLOAT", "TIE_FRAME_COLUMNS"]

MEASURES_INT = ("degree",)
MEASURES_FLOAT = ("strength", "betweenness", "closeness", "pagerank", "eigenvector", "clustering", "constraint",
                  "effective_size", "participation", "within_z")


def _finite(x: Any) -> float | None:
    if x is None:
        return None
    x = float(x)
    return x if math.isfinite(x) else None


def _put(d: dict[str, Any], key: str, value: Any) -> None:
    """Set ``key`` unless ``value`` is missing (None, NaN or an empty list)."""
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return
    if isinstance(value, (list, tuple)):
        if not value:
            return
        value = "; ".join(str(v) for v in value)
    d[key] = value


def network_graph(net: Network, analysis: Analysis, *, redacted: bool = False) -> nx.Graph:
    """The tie graph with every contact's and every tie's attributes.

    Node ids are contact ids; a node carries label, emails, phones, organisations,
    past_organisations, titles, tags, localities (lists joined with "; "), group,
    group_name, role, the measures, warmth, warmth_tier, meetings, messages and
    last_contact. An edge carries weight (the tie's strength), the amount of each
    kind of evidence, meetings, threads, manual, overlap, between_groups,
    source_group, target_group, basis and evidence (in words). Missing values are
    left out; text is as stored (the exports pass it through
    :func:`mynet.safetext.shown`).
    """
    G = tie_graph(net)
    groups = {g.id: g for g in analysis.groups}
    G.graph.update({"generator": "mynet", "redacted": bool(redacted), "modularity": float(analysis.modularity),
                    "groups": len(analysis.groups), "contacts": len(net.contacts), "ties": G.number_of_edges()})
    for c in net.contacts:
        attrs: dict[str, Any] = {}
        _put(attrs, "label", c.name)
        for key, values in (("emails", c.emails), ("phones", c.phones), ("organisations", c.orgs),
                            ("past_organisations", c.past_orgs), ("titles", c.titles), ("tags", c.tags),
                            ("localities", c.localities)):
            _put(attrs, key, list(values))
        gid = analysis.group_of.get(c.id)
        if gid is not None:
            attrs["group"] = int(gid)
            _put(attrs, "group_name", groups[gid].name if gid in groups else None)
        m = analysis.measures.get(c.id, {})
        _put(attrs, "role", m.get("role"))
        for key in MEASURES_INT:
            if m.get(key) is not None:
                attrs[key] = int(m[key])
        for key in MEASURES_FLOAT:
            _put(attrs, key, _finite(m.get(key)))
        w = net.warmth.get(c.id)
        if w is not None:
            attrs.update(warmth=float(w.warmth), warmth_tier=w.tier, meetings=int(w.meetings),
                         messages=int(w.messages_from + w.messages_to))
            _put(attrs, "last_contact", w.last)
        G.nodes[c.id].update(attrs)
    overlap = neighbourhood_overlap(G)
    t = net.ties
    for i in range(len(t)):
        a, b = int(t.a[i]), int(t.b[i])
        e = G.edges[a, b]
        for kind, arr in t.parts.items():
            e[kind] = float(arr[i])
        e["meetings"] = int(t.counts["meeting"][i]) if "meeting" in t.counts else 0
        e["threads"] = int(t.counts["thread"][i]) if "thread" in t.counts else 0
        e["manual"] = bool(t.manual[i]) if t.manual is not None else False
        e["overlap"] = float(overlap.get((min(a, b), max(a, b)), 0.0))
        ga, gb = analysis.group_of.get(a), analysis.group_of.get(b)
        e["between_groups"] = ga is not None and gb is not None and ga != gb
        _put(e, "source_group", ga)
        _put(e, "target_group", gb)
        items = evidence_summary(net, i)
        e["basis"] = basis(items)
        _put(e, "evidence", tie_words(items))
    return G


def network_frames(net: Network, analysis: Analysis, contacts: list[dict[str, Any]]) -> dict[str, "pd.DataFrame"]:
    """The DataFrames of ``ws.frames()`` from a loaded network, its analysis and the contact rows."""
    import pandas as pd

    contact_frame = pd.DataFrame(contacts)
    ties = pd.DataFrame(_tie_rows(net), columns=TIE_FRAME_COLUMNS)
    groups = pd.DataFrame([{"id": g.id, "name": g.name, "label": g.label, "user_named": g.user_named,
                            "size": g.size, "warm": g.warm, "members": g.members} for g in analysis.groups],
                          columns=["id", "name", "label", "user_named", "size", "warm", "members"])
    measures = pd.DataFrame([{"id": c, "name": net.name(c), "group": analysis.group_of.get(c)} | m
                             for c, m in sorted(analysis.measures.items())])
    return {"contacts": contact_frame.set_index("id") if len(contact_frame) else contact_frame,
            "ties": ties,
            "groups": groups.set_index("id"),
            "measures": measures.set_index("id") if len(measures) else measures}


#: The columns of ``ws.frames()["ties"]``.
TIE_FRAME_COLUMNS = ["a", "b", "a_name", "b_name", "strength", "basis", "words", "evidence", *KINDS,
                     "meetings", "threads", "manual"]


def _tie_rows(net: Network) -> list[dict[str, Any]]:
    t = net.ties
    out = []
    for i in t.order():
        i = int(i)
        a, b = int(t.a[i]), int(t.b[i])
        ev = evidence_summary(net, i)
        row: dict[str, Any] = {"a": a, "b": b, "a_name": net.name(a), "b_name": net.name(b),
                               "strength": float(t.strength[i]), "basis": basis(ev), "words": tie_words(ev),
                               "evidence": ev}
        row |= {k: float(t.parts[k][i]) if k in t.parts else 0.0 for k in KINDS}
        row["meetings"] = int(t.counts["meeting"][i]) if "meeting" in t.counts else 0
        row["threads"] = int(t.counts["thread"][i]) if "thread" in t.counts else 0
        row["manual"] = bool(t.manual[i]) if t.manual is not None and len(t.manual) else False
        out.append(row)
    return out
