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
from .groups import group_ref
from .reading import clarity_words
from .snapshot import Analysis, tie_graph

nx = lazy_module("networkx")

__all__ = ["blau_index", "shannon_evenness", "ego_brokerage", "audit", "small_world_words", "WARM", "PRIORITY",
           "THIN_GROUP"]

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
        spread = f"small-world figure {sigma:.1f}"
    else:
        top = "upwards" if high is None or math.isinf(high) else f"to {high:.1f}"
        spread = f"small-world figure {sigma:.1f}, from {low:.1f} {top} over {sw.get('ensemble', 0)} random networks"
    verdict = sw.get("verdict")
    if verdict == "small world":
        return f"a small world: far more close-knit than a random network, with routes almost as short ({spread})"
    if verdict == "not a small world":
        return f"not a small world ({spread})"
    return f"too close to a random network to call it a small world ({spread})"


#: A finding's mark and words by its level (the JSON's ``severity``): what to do with it, not how bad it is.
PRIORITY: dict[str, tuple[str, str]] = {"high": ("»", "act on this"), "medium": ("›", "worth a look"),
                                        "low": ("·", "for context")}

#: A group of at least this many people where you are warm with only one is thin (our own rule of thumb).
THIN_GROUP = 15


def _finding(fid: str, title: str, detail: str, numbers: dict, suggestion: str, score: float) -> dict[str, Any]:
    severity = "high" if score >= 0.6 else "medium" if score >= 0.3 else "low"
    return {"id": fid, "title": title, "detail": detail, "numbers": numbers, "suggestion": suggestion,
            "severity": severity, "priority": PRIORITY[severity][1], "score": round(score, 4)}


def _listing(items: list[str], most: int = 6) -> str:
    return "; ".join(items[:most]) + (f"; and {len(items) - most} more" if len(items) > most else "")


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
    name = {g.id: f"{group_ref(g.id)} {g.name}" for g in groups}
    n_contacts = len(net.contacts)
    if not n_contacts:
        return []

    # 1. Concentration: where your warm contacts sit, by group and by employer (one finding when both are the
    # same people: a group that is that employer).
    warm_by_group = Counter(analysis.group_of.get(c) for c in warm if analysis.group_of.get(c) is not None)
    all_by_group = Counter(g for g in analysis.group_of.values() if g is not None)
    orgs: Counter = Counter()
    at_org: dict[str, set[int]] = {}
    for c in net.contacts:
        if c.id in warm:
            for o in {normalise_org(o) for o in c.orgs if is_real_org(normalise_org(o))}:
                orgs[o] += 1
                at_org.setdefault(o, set()).add(c.id)
    org_finding = None
    if orgs and warm:
        shown = {normalise_org(o): o for c in net.contacts for o in c.orgs}
        org, k = orgs.most_common(1)[0]
        share = k / len(warm)
        org_finding = _finding(
            "concentration-org", f"{share:.0%} of your warm contacts work at {shown.get(org, org)}",
            f"{k} of your {len(warm)} warm contacts are at one organisation now.",
            {"organisation": shown.get(org, org), "warm_there": k, "share": round(share, 4)},
            "If you left (or it changed), these ties would weaken together; keep a few warm ties elsewhere.",
            min(1.0, max(0.0, (share - 0.25) / 0.4)) * 0.8,
        )
        org_people = at_org[org]
    if warm:
        blau_w = blau_index(warm_by_group.values())
        h_w, even_w = shannon_evenness(warm_by_group.values())
        top_g, top_n = (warm_by_group.most_common(1)[0] if warm_by_group else (None, 0))
        share = top_n / len(warm)
        in_top = {c for c in warm if analysis.group_of.get(c) == top_g}
        same_people = bool(org_finding and in_top and len(in_top & org_people) >= 0.8 * len(in_top))
        numbers = {"warm": len(warm), "largest_group": top_g, "largest_group_share": round(share, 4),
                   "blau_warm": round(blau_w, 4), "shannon_warm": round(h_w, 4), "evenness_warm": round(even_w, 4),
                   "blau_all": round(blau_index(all_by_group.values()), 4), "groups_with_warm": len(warm_by_group)}
        variety = (f"Variety of your warm contacts over groups {blau_w:.2f}, of all your contacts "
                   f"{blau_index(all_by_group.values()):.2f} (0: all in one group).")
        if same_people and org_finding is not None:
            # The same people twice: one finding, the employer's, with the group named in it.
            org_finding["detail"] += (f" Nearly all of them are in {name.get(top_g)}, where {share:.0%} of your warm "
                                      f"contacts are. {variety}")
            org_finding["numbers"] |= numbers
            org_finding["score"] = round(max(org_finding["score"], min(1.0, max(0.0, (share - 0.35) / 0.4)) * 0.9), 4)
            org_finding["severity"] = "high" if org_finding["score"] >= 0.6 else \
                "medium" if org_finding["score"] >= 0.3 else "low"
            org_finding["priority"] = PRIORITY[org_finding["severity"]][1]
        else:
            findings.append(_finding(
                "concentration-group",
                f"{share:.0%} of your warm contacts are in one group: {name.get(top_g)}" if top_g is not None
                else "None of your warm contacts is in a group",
                f"{len(warm)} warm contacts (warmth {WARM} or more) in {len(warm_by_group)} groups. {variety}",
                numbers,
                "Spend some of your time on the groups you have drifted from: news travels within a group, new "
                "openings mostly come from outside it.",
                min(1.0, max(0.0, (share - 0.35) / 0.4)) * 0.9,
            ))
    if org_finding is not None:
        findings.append(org_finding)

    # 2. Groups where you have nobody warm, and large groups where you have only one warm contact.
    cold = [g for g in groups if g.warm == 0]
    if cold:
        findings.append(_finding(
            "cold-groups", f"{len(cold)} group{'s' if len(cold) != 1 else ''} where you have no warm contact",
            _listing([f"{name[g.id]}: {g.size} people" for g in cold]),
            {"groups": [g.id for g in cold], "people": sum(g.size for g in cold)},
            "Pick one person in each whom you know a little and get back in touch; mynet reach shows who can "
            "introduce you.",
            min(1.0, 0.3 + 0.1 * len(cold) + sum(g.size for g in cold) / max(1, n_contacts)),
        ))
    thin = [g for g in groups if g.warm == 1 and g.size >= THIN_GROUP]
    if thin:
        def only(g) -> str:
            return next((net.said(m) for m in g.members if m in warm), "one person")
        findings.append(_finding(
            "thin-groups", f"{len(thin)} large group{'s' if len(thin) != 1 else ''} where you are warm with "
            "only one person",
            _listing([f"{name[g.id]}: {g.size} people, only {only(g)} warm" for g in thin]),
            {"groups": [g.id for g in thin], "people": sum(g.size for g in thin), "least_size": THIN_GROUP},
            "One warm contact is a thin thread into a whole group: if it goes quiet, so does the group. Get back "
            "in touch with a second person there.",
            min(1.0, 0.3 + 0.08 * len(thin) + sum(g.size for g in thin) / max(1, n_contacts)),
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
            f"{len(dormant)} {'people' if len(dormant) != 1 else 'person'} you were in touch with "
            f"{'have' if len(dormant) != 1 else 'has'} gone quiet for over {_span(limit)}",
            _listing([f"{net.said(c)} (last on {last[:10]}, {n} times before)" for last, c, n in dormant]),
            {"count": len(dormant), "days": limit, "people": [c for _l, c, _n in dormant]},
            "Quiet ties are easy to revive and often know things your current circle does not.",
            min(1.0, 0.25 + 0.05 * len(dormant)),
        ))

    # 4. Your brokerage, with you in the graph.
    broker = ego if ego is not None else ego_brokerage(tie_graph(net), warmth)
    if broker["size"]:
        con = broker["constraint"]
        separate = broker["effective_size"]
        findings.append(_finding(
            "brokerage",
            ("Many of the people you are in touch with do not know each other" if con <= 0.3
             else "The people you are in touch with mostly know each other"),
            f"About {separate:.0f} of the {broker['size']} people you are in touch with are in separate circles; "
            f"how closed in you are: {con:.2f} (1: one closed circle).",
            {k: round(v, 4) if isinstance(v, float) else v for k, v in broker.items()},
            "Spend time with people who do not know your other contacts." if con > 0.3
            else "You link circles that do not know each other: you are well placed to make introductions.",
            min(1.0, max(0.0, (con - 0.15) / 0.5)) * 0.7,
        ))

    # 5. Single points of access.
    spof = [a for a in analysis.access if a.get("groups")]
    if spof:
        findings.append(_finding(
            "single-access",
            f"{len(spof)} {'people alone connect' if len(spof) != 1 else 'person alone connects'} you to a group",
            _listing([f"{net.said(a['person'])} -> {', '.join(name.get(g, group_ref(g)) for g in a['groups'])}"
                      for a in spof]),
            {"people": [a["person"] for a in spof], "groups": sorted({g for a in spof for g in a["groups"]})},
            "Without them those groups are out of reach: get to know a second person there.",
            min(1.0, 0.35 + 0.1 * len(spof)),
        ))
    cut = [a for a in analysis.access if not a.get("groups") and len(a.get("cut_off", [])) >= 2]
    if cut:
        a = cut[0]
        findings.append(_finding(
            "cut-points", f"{len(cut)} contact{'s hold' if len(cut) != 1 else ' holds'} the only way to others",
            f"For example {net.said(a['person'])}: without them you could not reach "
            + ", ".join(net.said(c) for c in a["cut_off"][:5]) + (" and others" if len(a["cut_off"]) > 5 else ""),
            {"people": [x["person"] for x in cut], "largest_cut": len(a["cut_off"])},
            "These are fragile routes; a second tie into the same people makes them safe.",
            min(0.6, 0.2 + 0.05 * len(cut)),
        ))

    # 6. The shape in numbers (context, not a problem).
    s = analysis.summary
    sw = s.get("small_world", {}) or {}
    ei = s.get("ei_index", 0) or 0
    pieces = ("all in one piece" if s.get("components", 0) == 1 else
              f"{s.get('components', 0)} separate pieces, the largest with {s.get('largest_component', 0)} people")
    findings.append(_finding(
        "shape", f"{s.get('nodes', 0)} contacts in {len(groups)} groups, {clarity_words(analysis.modularity)} apart",
        f"Group clarity {analysis.modularity:.2f} (0-1, above 0.3 is clear). {s.get('ties', 0)} ties, "
        f"{s.get('density', 0):.1%} of all that could be; "
        f"{pieces}. "
        f"Close-knit: {s.get('average_clustering', 0):.2f} of a person's contacts know each other, against "
        f"{(sw.get('C_random') or 0):.2f} in a random network of the same size; {small_world_words(sw)}. "
        f"{_ei_words(ei)} ({ei:+.2f}).",
        {k: s.get(k) for k in ("nodes", "ties", "density", "components", "largest_component", "average_clustering",
                               "average_path_length", "ei_index")}
        | {"sigma": sw.get("sigma"), "sigma_low": sw.get("sigma_low"), "sigma_high": sw.get("sigma_high"),
           "small_world": sw.get("verdict"), "modularity": analysis.modularity, "homophily": s.get("homophily")},
        "Context for the findings above (mynet explain shape).",
        0.05,
    ))

    # 7. Who holds it together: only people who do sit between others (never padded with people at zero).
    ranked = [(c, m) for c, m in sorted(analysis.measures.items(), key=lambda kv: -(kv[1].get("betweenness") or 0))
              if (m.get("betweenness") or 0) > 0][:5]
    if ranked:
        findings.append(_finding(
            "brokers", "The people who hold your network together",
            "; ".join(f"{net.said(c)} ({m.get('role')}, between others {m.get('betweenness', 0):.2f})"
                      for c, m in ranked),
            {"people": [c for c, _ in ranked]},
            "Keep these ties warm: they carry news and introductions between your groups.",
            0.28,
        ))
    return sorted(findings, key=lambda f: -f["score"])


def _span(days: float) -> str:
    """A number of days in words: "a year", "2 years", "90 days"."""
    if days % 365 == 0:
        years = int(days // 365)
        return "a year" if years == 1 else f"{years} years"
    return f"{int(days)} days"


def _ei_words(ei: float) -> str:
    """The E-I index in words (-1: every tie inside a group; +1: every tie between groups)."""
    if ei <= -0.5:
        return "Most ties stay inside their group"
    if ei < 0:
        return "More ties stay inside groups than leave them"
    if ei < 0.5:
        return "About as many ties leave groups as stay inside"
    return "Most ties run between groups"
