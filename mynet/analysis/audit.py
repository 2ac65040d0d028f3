"""The audit: what the shape of your network means for you, finding by finding.

Each finding carries the numbers behind it and a plain-language suggestion,
and the list is ordered so that the most useful finding comes first (a score
of our own: how far a figure is from a healthy range, times how much it
matters for reaching new people).

References
----------
.. [1] P. M. Blau, *Inequality and Heterogeneity*, Free Press (1977) (Blau's index).
.. [2] C. E. Shannon, "A mathematical theory of communication", Bell Syst. Tech. J. 27 (1948).
.. [3] R. S. Burt, *Structural Holes*, Harvard University Press (1992).
.. [4] M. S. Granovetter, "The strength of weak ties", AJS 78(6) (1973).
"""

from __future__ import annotations

import math
from collections import Counter
from datetime import date
from typing import Any, Iterable

from ..evidence.network import Network
from ..lazy import lazy_module
from ..people.normalise import is_real_org, normalise_org
from .bridges import EGO
from .centrality import structural_holes
from .snapshot import Analysis, tie_graph

nx = lazy_module("networkx")

__all__ = ["blau_index", "shannon_evenness", "ego_brokerage", "audit", "small_world_words", "WARM"]

#: Warmth from which a contact counts as warm in the audit.
WARM = 0.3


def blau_index(counts: Iterable[int]) -> float:
    """Blau's heterogeneity index 1 - sum p_i^2 (0: everyone in one category).

    References
    ----------
    .. [1] P. M. Blau, *Inequality and Heterogeneity* (1977).
    """
    c = [x for x in counts if x > 0]
    n = sum(c)
    return 0.0 if n == 0 else 1.0 - sum((x / n) ** 2 for x in c)


def shannon_evenness(counts: Iterable[int]) -> tuple[float, float]:
    """Shannon entropy H = -sum p ln p and its evenness H / ln k (1: spread evenly over k categories)."""
    c = [x for x in counts if x > 0]
    n = sum(c)
    if n == 0:
        return 0.0, 0.0
    h = -sum((x / n) * math.log(x / n) for x in c)
    return h, (h / math.log(len(c)) if len(c) > 1 else 0.0)


def ego_brokerage(G: nx.Graph, warmth: dict[int, float]) -> dict[str, float]:
    """Your constraint and effective size (Burt 1992), with you added to the tie graph.

    You are tied to every contact with positive warmth, weighted by warmth. Only
    your two-step neighbourhood matters for your own scores, so they are
    computed on it (exact, since each neighbour keeps all of its ties).
    """
    ego_ties = {c: w for c, w in warmth.items() if w > 0 and c in G}
    if not ego_ties:
        return {"constraint": float("nan"), "effective_size": 0.0, "size": 0}
    near = set(ego_ties)
    for c in list(ego_ties):
        near.update(G.neighbors(c))
    H = G.subgraph(near).copy()
    H.add_node(EGO)
    H.add_weighted_edges_from((EGO, c, w) for c, w in sorted(ego_ties.items()))
    con, eff = structural_holes(H)
    return {"constraint": float(con[EGO]), "effective_size": float(eff[EGO]), "size": len(ego_ties)}


def small_world_words(sw: dict[str, Any]) -> str:
    """The small-world comparison in words; it says "a small world" only when every random graph of the ensemble does.

    ``sw`` is the ``small_world`` entry of the network summary (sigma, its lowest and
    highest value over the random graphs, the verdict; Humphries & Gurney 2008).
    """
    sigma, low, high = sw.get("sigma"), sw.get("sigma_low"), sw.get("sigma_high")
    if sigma is None or (isinstance(sigma, float) and math.isnan(sigma)):
        return "too small or too sparse to compare with random networks"
    if low is None or (isinstance(low, float) and math.isnan(low)):
        spread = f"sigma {sigma:.1f}"
    else:
        top = "upwards" if high is None or math.isinf(high) else f"to {high:.1f}"
        spread = (f"sigma {sigma:.1f}, from {low:.1f} {top} over {sw.get('ensemble', 0)} random networks; "
                  "Watts & Strogatz 1998, Humphries & Gurney 2008")
    verdict = sw.get("verdict")
    if verdict == "small world":
        return f"a small world: far more clustered than a random network, with paths almost as short ({spread})"
    if verdict == "not a small world":
        return f"not a small world ({spread})"
    return f"too close to a random network to call it a small world ({spread})"


def _finding(fid: str, title: str, detail: str, numbers: dict, suggestion: str, score: float) -> dict[str, Any]:
    severity = "high" if score >= 0.6 else "medium" if score >= 0.3 else "low"
    return {"id": fid, "title": title, "detail": detail, "numbers": numbers, "suggestion": suggestion,
            "severity": severity, "score": round(score, 4)}


def audit(net: Network, analysis: Analysis, *, today: date | None = None,
          ego: dict[str, float] | None = None) -> list[dict[str, Any]]:
    """Findings about your network, most useful first (see the module docstring).

    ``ego`` is :func:`ego_brokerage` of this network when already known (the workspace keeps it).
    """
    today = today or date.today()
    findings: list[dict[str, Any]] = []
    warmth = {cid: w.warmth for cid, w in net.warmth.items()}
    warm = {cid for cid, w in warmth.items() if w >= WARM}
    groups = analysis.groups
    name = {g.id: g.name for g in groups}
    n_contacts = len(net.contacts)

    # 1. Concentration: where your warm contacts sit.
    warm_by_group = Counter(analysis.group_of.get(c) for c in warm if analysis.group_of.get(c) is not None)
    all_by_group = Counter(g for g in analysis.group_of.values() if g is not None)
    if warm:
        blau_w = blau_index(warm_by_group.values())
        h_w, even_w = shannon_evenness(warm_by_group.values())
        top_g, top_n = (warm_by_group.most_common(1)[0] if warm_by_group else (None, 0))
        share = top_n / len(warm)
        findings.append(_finding(
            "concentration-group",
            f"{share:.0%} of your warm contacts are in one group: {name.get(top_g, 'unclustered')}" if top_g is not None
            else "Your warm contacts are not in any group",
            f"{len(warm)} warm contacts (warmth >= {WARM}) over {len(warm_by_group)} groups; "
            f"diversity (Blau) {blau_w:.2f}, evenness (Shannon) {even_w:.2f}. "
            f"All contacts: Blau {blau_index(all_by_group.values()):.2f} over {len(all_by_group)} groups.",
            {"warm": len(warm), "largest_group_share": round(share, 4), "blau_warm": round(blau_w, 4),
             "shannon_warm": round(h_w, 4), "evenness_warm": round(even_w, 4),
             "blau_all": round(blau_index(all_by_group.values()), 4), "groups_with_warm": len(warm_by_group)},
            "Spend some of your time on the groups you have drifted from: news travels within a group, new "
            "openings come from outside it (Granovetter 1973).",
            min(1.0, max(0.0, (share - 0.35) / 0.4)) * 0.9,
        ))
    orgs = Counter()
    for c in net.contacts:
        if c.id in warm:
            for o in {normalise_org(o) for o in c.orgs if is_real_org(normalise_org(o))}:
                orgs[o] += 1
    if orgs and warm:
        shown = {normalise_org(o): o for c in net.contacts for o in c.orgs}
        org, k = orgs.most_common(1)[0]
        share = k / len(warm)
        findings.append(_finding(
            "concentration-org", f"{share:.0%} of your warm contacts work at {shown.get(org, org)}",
            f"{k} of {len(warm)} warm contacts are at one organisation now.",
            {"organisation": shown.get(org, org), "warm_there": k, "share": round(share, 4)},
            "If you left (or it changed), these ties would weaken together; keep a few warm ties elsewhere.",
            min(1.0, max(0.0, (share - 0.25) / 0.4)) * 0.8,
        ))

    # 2. Groups where you have nobody warm.
    cold = [g for g in groups if g.warm == 0]
    if cold:
        findings.append(_finding(
            "cold-groups", f"{len(cold)} group{'s' if len(cold) != 1 else ''} where you have no warm contact",
            "; ".join(f"{g.name}: {g.size} people" for g in cold[:6])
            + (f"; and {len(cold) - 6} more" if len(cold) > 6 else ""),
            {"groups": [g.id for g in cold], "people": sum(g.size for g in cold)},
            "Pick one person in each whom you know a little and get back in touch; mynet reach shows who can "
            "introduce you.",
            min(1.0, 0.3 + 0.1 * len(cold) + sum(g.size for g in cold) / max(1, n_contacts)),
        ))

    # 3. Dormant ties: once warm, quiet for longer than the setting.
    limit = net.warmth_model.dormant_days
    dormant = []
    for cid, w in net.warmth.items():
        active = w.meetings + w.messages_from + w.messages_to
        if active >= 3 and w.last and (today - date.fromisoformat(w.last[:10])).days > limit:
            dormant.append((w.last, cid, active))
    if dormant:
        dormant.sort()
        findings.append(_finding(
            "dormant",
            f"{len(dormant)} once-active tie{'s' if len(dormant) != 1 else ''} gone quiet for over {int(limit)} days",
            "; ".join(f"{net.name(c)} (last {last}, {n} interactions)" for last, c, n in dormant[:6])
            + (f"; and {len(dormant) - 6} more" if len(dormant) > 6 else ""),
            {"count": len(dormant), "days": limit, "people": [c for _l, c, _n in dormant]},
            "Dormant ties are cheap to revive and often know things your current circle does not.",
            min(1.0, 0.25 + 0.05 * len(dormant)),
        ))

    # 4. Your brokerage, with you in the graph.
    broker = ego if ego is not None else ego_brokerage(tie_graph(net), warmth)
    if broker["size"]:
        con = broker["constraint"]
        findings.append(_finding(
            "brokerage",
            f"Your constraint is {con:.2f}; {broker['effective_size']:.0f} of the {broker['size']} people you are in "
            f"touch with are non-redundant",
            "Constraint measures how much your contacts are tied to each other (1: one closed circle; low: you "
            "span structural holes). Effective size counts your non-redundant contacts (Burt 1992).",
            {k: round(v, 4) if isinstance(v, float) else v for k, v in broker.items()},
            "To lower it, invest in people who do not know your other contacts." if con > 0.3
            else "You bridge several circles: you are well placed to make introductions.",
            min(1.0, max(0.0, (con - 0.15) / 0.5)) * 0.7,
        ))

    # 5. Single points of access.
    spof = [a for a in analysis.access if a.get("groups")]
    if spof:
        findings.append(_finding(
            "single-access",
            f"{len(spof)} {'people alone connect' if len(spof) != 1 else 'person alone connects'} you to a group",
            "; ".join(f"{net.name(a['person'])} -> {', '.join(name.get(g, str(g)) for g in a['groups'])}"
                      for a in spof[:6]),
            {"people": [a["person"] for a in spof], "groups": sorted({g for a in spof for g in a["groups"]})},
            "Without them those groups are out of reach: get to know a second person there.",
            min(1.0, 0.35 + 0.1 * len(spof)),
        ))
    cut = [a for a in analysis.access if not a.get("groups") and len(a.get("cut_off", [])) >= 2]
    if cut:
        a = cut[0]
        findings.append(_finding(
            "cut-points", f"{len(cut)} contact{'s hold' if len(cut) != 1 else ' holds'} the only path to others",
            f"For example {net.name(a['person'])}: without them you could not reach "
            + ", ".join(net.name(c) for c in a["cut_off"][:5]) + ("..." if len(a["cut_off"]) > 5 else ""),
            {"people": [x["person"] for x in cut], "largest_cut": len(a["cut_off"])},
            "These are fragile routes; a second tie into the same people makes them safe.",
            min(0.6, 0.2 + 0.05 * len(cut)),
        ))

    # 6. The shape in numbers (always last but one: context, not a problem).
    s = analysis.summary
    sw = s.get("small_world", {}) or {}
    findings.append(_finding(
        "shape", f"{s.get('nodes', 0)} contacts, {s.get('ties', 0)} ties, {len(groups)} groups (modularity "
        f"{analysis.modularity:.2f})",
        f"density {s.get('density', 0):.3f}; {s.get('components', 0)} components, the largest with "
        f"{s.get('largest_component', 0)}; clustering {s.get('average_clustering', 0):.2f} against "
        f"{(sw.get('C_random') or 0):.2f} for a random network of the same size, average path "
        f"{(s.get('average_path_length') or 0):.2f} against {(sw.get('L_random') or 0):.2f}; "
        f"{small_world_words(sw)}; E-I index {s.get('ei_index', 0) or 0:.2f} "
        "(-1: all ties inside groups; Krackhardt & Stern 1988).",
        {k: s.get(k) for k in ("nodes", "ties", "density", "components", "largest_component", "average_clustering",
                               "average_path_length",
                               "ei_index")} | {"sigma": sw.get("sigma"), "sigma_low": sw.get("sigma_low"),
                                                                       "sigma_high": sw.get("sigma_high"),
                                                                       "small_world": sw.get("verdict"),
                                                                       "modularity": analysis.modularity,
                                                                       "homophily": s.get("homophily")},
        "Context for the findings above.",
        0.05,
    ))

    # 7. Who holds it together.
    ranked = sorted(analysis.measures.items(), key=lambda kv: -(kv[1].get("betweenness") or 0))[:5]
    if ranked and (ranked[0][1].get("betweenness") or 0) > 0:
        findings.append(_finding(
            "brokers", "The people who hold your network together",
            "; ".join(f"{net.name(c)} ({m.get('role')}, betweenness {m.get('betweenness', 0):.2f})" for c, m in ranked),
            {"people": [c for c, _ in ranked]},
            "Keep these ties warm: they carry news and introductions between your groups.",
            0.28,
        ))
    return sorted(findings, key=lambda f: -f["score"])
