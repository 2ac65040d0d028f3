"""Reach: who can introduce you to a person, an organisation, a tag or a mail domain.

Resolves what the user typed into a set of target contacts (organisations
matched after normalisation and fuzzily, current and past staff), runs the
intro-path search of :mod:`mynet.analysis.intro_search` and explains every step in plain words,
with a suggested ask that never claims more than the evidence says.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import date
from typing import Any

import numpy as np

from ..errors import MynetError, NotFoundError
from ..evidence.explain import basis, describe, evidence_summary
from ..evidence.network import Network
from ..people.normalise import email_domain, fold_text, normalise_org
from .intro_search import IntroPath, PathIndex, best_per_target, direct_route, find_paths

__all__ = ["Targets", "resolve_targets", "path_index", "reach", "ReachResult", "org_catalogue", "tag_catalogue",
           "no_path_reason", "distinct_names"]


@dataclass
class Targets:
    """The contacts a query stands for, and how they were matched."""

    kind: str  # "person", "organisation", "tag", "domain"
    query: str
    members: list[int]
    matched: list[str] = field(default_factory=list)  # organisation/tag spellings matched
    past: set[int] = field(default_factory=set)  # members who were there only in the past


def org_catalogue(net: Network) -> dict[str, str]:
    """Folded organisation name -> display name, over current and past organisations."""
    out: dict[str, str] = {}
    for c in net.contacts:
        for o in c.orgs + c.past_orgs:
            out.setdefault(normalise_org(o), o)
    out.pop("", None)
    return out


def tag_catalogue(net: Network) -> dict[str, str]:
    out: dict[str, str] = {}
    for c in net.contacts:
        for t in c.tags:
            out.setdefault(fold_text(t), t)
    out.pop("", None)
    return out


def _fuzzy(query: str, catalogue: dict[str, str], cutoff: float = 85) -> list[str]:
    """Folded keys matching ``query``: exact, then containment of whole words, then fuzzy (rapidfuzz)."""
    from rapidfuzz import fuzz, process

    if query in catalogue:
        return [query]
    words = query.split()
    contained = [k for k in catalogue if words and k.split()[: len(words)] == words]
    if contained:
        return sorted(contained)
    hits = process.extract(query, list(catalogue), scorer=fuzz.WRatio, score_cutoff=cutoff, limit=5)
    return sorted(h[0] for h in hits)


def resolve_targets(
    net: Network, *, to: str | None = None, org: str | None = None, tag: str | None = None, domain: str | None = None,
    find_contact=None,
) -> Targets:
    """Turn a reach query into target contacts.

    Raises
    ------
    MynetError
        When not exactly one kind of target is given.
    NotFoundError
        When nothing matches (the message says what was looked for).
    """
    given = [(k, v) for k, v in (("person", to), ("organisation", org), ("tag", tag), ("domain", domain)) if v]
    if len(given) != 1:
        raise MynetError("say whom to reach with exactly one of --to, --org, --tag or --domain")
    kind, query = given[0]
    if kind == "person":
        if find_contact is None:
            raise MynetError("a person target needs the workspace")
        c = find_contact(query)
        return Targets("person", query, [c.id], [c.name])
    if kind == "organisation":
        cat = org_catalogue(net)
        keys = _fuzzy(normalise_org(query), cat)
        if not keys:
            raise NotFoundError(f"no contact works or worked at an organisation like {query!r}")
        members, past = [], set()
        for c in net.contacts:
            cur = {normalise_org(o) for o in c.orgs}
            old = {normalise_org(o) for o in c.past_orgs}
            if cur & set(keys):
                members.append(c.id)
            elif old & set(keys):
                members.append(c.id)
                past.add(c.id)
        return Targets("organisation", query, members, [cat[k] for k in keys], past)
    if kind == "tag":
        cat = tag_catalogue(net)
        keys = _fuzzy(fold_text(query), cat)
        if not keys:
            raise NotFoundError(f"no contact carries a tag like {query!r}")
        members = [c.id for c in net.contacts if {fold_text(t) for t in c.tags} & set(keys)]
        return Targets("tag", query, members, [cat[k] for k in keys])
    dom = query.strip().lstrip("@").lower()
    members = [c.id for c in net.contacts
               if any(email_domain(e) == dom or email_domain(e).endswith("." + dom) for e in c.emails)]
    if not members:
        raise NotFoundError(f"no contact has an e-mail address at {dom}")
    return Targets("domain", query, members, [dom])


def distinct_names(net: Network, ids: list[int]) -> list[str]:
    """The names of ``ids`` for one listing, each followed by its id when another in the list shares it.

    Two contacts may carry one name (the same person not merged yet, or two
    people); listed bare, they read as one person named twice.
    """
    names = [net.name(i) for i in ids]
    seen = {}
    for nm in names:
        seen[nm] = seen.get(nm, 0) + 1
    return [f"{nm} (id {i})" if seen[nm] > 1 else nm for nm, i in zip(names, ids)]


def path_index(net: Network) -> PathIndex:
    """The tie graph and your warmth compiled for intro-path queries."""
    warmth = {cid: w.warmth for cid, w in net.warmth.items() if w.warmth > 0}
    t = net.ties
    return PathIndex([c.id for c in net.contacts], t.a, t.b, np.clip(t.strength, 1e-9, 1.0), warmth)


@dataclass
class ReachResult:
    """The answer to one reach query.

    ``known`` is your own tie to a single target person when it is warm and recent enough
    to ask them yourself: then it is the answer, and ``paths`` are alternatives (each
    goes through someone else). ``direct`` lists every direct tie to a target (weak,
    dormant and insiders included), ``per_target`` the best path to each person of a set.
    """

    targets: Targets
    paths: list[dict[str, Any]]
    direct: list[dict[str, Any]]
    per_target: list[dict[str, Any]]
    unreachable: list[int]
    why_none: str = ""  # when there is no path: why, in plain words
    known: dict[str, Any] | None = None
    held_back: list[dict[str, Any]] = field(default_factory=list)  # people asked recently, ranked after others


def _warmth_words(net: Network, cid: int) -> str:
    w = net.warmth.get(cid)
    if w is None or w.warmth <= 0:
        return "no recorded contact"
    if w.rated is not None:
        return f"you rated your closeness {w.rated:.1f}"
    bits = []
    if w.meetings:
        bits.append(f"{w.meetings} meeting{'s' if w.meetings != 1 else ''}")
    mails = w.messages_from + w.messages_to
    if mails:
        bits.append(f"{mails} mail{'s' if mails != 1 else ''}")
    last = f", last {w.last}" if w.last else ""
    return f"{w.tier}: {' and '.join(bits)}{last}" if bits else w.tier


def _tie_row(net: Network, a: int, b: int) -> int | None:
    lo, hi = sorted((a, b))
    t = net.ties
    idx = np.nonzero((t.a == lo) & (t.b == hi))[0]
    return int(idx[0]) if idx.size else None


def _step_why(net: Network, a: int, b: int) -> tuple[str, list[dict]]:
    i = _tie_row(net, a, b)
    if i is None:
        return "", []
    ev = evidence_summary(net, i)
    words = "; ".join(describe(e) for e in ev)
    return (words if basis(ev) == "observed" else f"may know ({words})"), ev


def _step_basis(net: Network, a: int, b: int) -> str:
    i = _tie_row(net, a, b)
    return "observed" if i is not None and net.ties.observed()[i] else "assumed"


def _ask(net: Network, p: IntroPath, whys: list[str], bases: list[str]) -> str:
    """A one-line suggested ask, worded from the evidence only (its first, strongest item).

    A step that rests only on a shared attribute is never presented as an
    acquaintance: the ask says that the two may not know each other.
    """
    def reason(k: int) -> str:
        w = whys[k]
        if w.startswith("may know ("):
            return w[len("may know ("):-1].split("; ")[0] + "; they may not know each other"
        return w.split("; ")[0] or "linked"

    first = net.said(p.nodes[0])
    target = net.said(p.target)
    if len(p.nodes) == 2:
        why = reason(1) if whys[1] else "they are linked"
        return f"Ask {first} whether they would introduce you to {target} ({why})."
    second = net.said(p.nodes[1])
    return (f"Ask {first} to put you in touch with {second} ({reason(1)}), "
            f"who may introduce you to {target} ({reason(len(whys) - 1)}).")


def _describe_path(net: Network, p: IntroPath, groups: dict[int, Any] | None) -> dict[str, Any]:
    d = p.to_dict()
    whys = [_warmth_words(net, p.nodes[0])]
    bases = ["observed"]  # your own first step: your warmth
    for a, b in zip(p.nodes, p.nodes[1:]):
        whys.append(_step_why(net, a, b)[0])
        bases.append(_step_basis(net, a, b))
    for step, why, base in zip(d["steps"], whys, bases):
        step["why"] = why
        step["basis"] = base
        step["to_name"] = net.name(step["to"])
    d["assumed_steps"] = sum(1 for b in bases if b == "assumed")
    d["score"] = round(float(d["score"]), 6)
    for step in d["steps"]:
        step["strength"] = round(float(step["strength"]), 4)
    d["names"] = [net.name(n) for n in p.nodes]
    weakest = d["steps"][p.weakest_step]
    d["weakest_step"] = {"index": p.weakest_step, "from": weakest["from"], "to": weakest["to"],
                         "strength": weakest["strength"]}
    d["ask"] = _ask(net, p, whys, bases)
    if groups:
        chain = [None, *p.nodes]
        crossings = [i for i in range(1, len(chain) - 1) if groups.get(chain[i]) is not None
                     and groups.get(chain[i + 1]) is not None and groups.get(chain[i]) != groups.get(chain[i + 1])]
        d["crosses_groups"] = [{"step": i, "from_group": groups.get(chain[i]), "to_group": groups.get(chain[i + 1])}
                               for i in crossings]
    return d


#: Warmth from which your own tie counts as a way in (below it the direct route is "weak").
WARM_ENOUGH = 0.3


def warm_contacts(index: PathIndex) -> list[int]:
    """Contacts you are warm enough with to ask yourself: they may open a path, never continue one."""
    return [int(c) for c in index.ids[index.warmth >= WARM_ENOUGH]]


def _dormant(last: str | None, days: float, today: date) -> bool:
    if not last:
        return False
    return (today - date.fromisoformat(last[:10])).days > days


def _rank_observed_first(net: Network, paths: list[IntroPath]) -> list[IntroPath]:
    """Best score first; at an equal score, the path with fewer steps that rest on shared attributes only."""
    if len(paths) < 2:
        return paths
    observed = net.ties.observed()

    def assumed(p: IntroPath) -> int:
        rows = (_tie_row(net, a, b) for a, b in zip(p.nodes, p.nodes[1:]))
        return sum(1 for i in rows if i is None or not observed[i])

    order = sorted(range(len(paths)), key=lambda k: (-round(paths[k].score, 9), assumed(paths[k]), k))
    return [paths[k] for k in order]


def no_path_reason(net: Network, index: PathIndex, targets: list[int], *, max_intermediaries: int,
                   avoid: set[int] = frozenset(), min_strength: float = 0.0) -> str:  # type: ignore[assignment]
    """Why no intro path reaches ``targets``, in plain words (the first reason that applies)."""
    from scipy.sparse.csgraph import dijkstra

    from .intro_search import find_paths

    def names(ids: list[int]) -> str:
        shown = ", ".join(net.said(m) for m in ids[:3])
        return shown + (f" and {len(ids) - 3} more" if len(ids) > 3 else "")

    if not targets:
        return "Everyone there is on your --avoid list."
    warm = {cid: w for cid, w in net.warmth.items() if w.warmth > 0 and cid not in avoid}
    if not warm:
        lasts = sorted(w.last for w in net.warmth.values() if w.last)
        if lasts:
            return (f"Everyone you have met or written to is long dormant (your last contact was on {lasts[-1]}): "
                    f"mynet reach --as-of {lasts[-1]} looks from that day.")
        return ("You have no recorded contact with anyone yet: import your calendar or mail, "
                "or rate the people you know (mynet rate NAME 0.7).")
    t = net.ties
    keep = ~(np.isin(t.a, list(avoid)) | np.isin(t.b, list(avoid))) if avoid else np.ones(len(t), dtype=bool)
    tied = set(t.a[keep].tolist()) | set(t.b[keep].tolist())
    loose = [m for m in targets if m not in tied]
    if len(loose) == len(targets):
        return (f"{names(targets)} {'has' if len(targets) == 1 else 'have'} no ties to anyone else in your network: "
                "no meeting, thread, organisation or label links them to another contact. "
                "If you know who knows them: mynet tie A B.")
    if min_strength > 0 and find_paths(index, targets, k=1, max_intermediaries=max_intermediaries, avoid=avoid):
        return f"Every way in has a step weaker than --min-strength {min_strength}; lower it to see them."
    ids = index.ids
    pos = np.searchsorted(ids, [m for m in targets if m not in loose])
    hops = dijkstra(index.costs, unweighted=True, indices=pos, min_only=True, limit=12)
    friends = np.searchsorted(ids, list(warm))
    reach_hops = hops[friends]
    nearest = float(np.min(reach_hops)) if reach_hops.size else np.inf
    mine = [m for m in targets if m not in loose]
    only_assumed = all(not t.observed()[i] for i in np.nonzero(np.isin(t.a, mine) | np.isin(t.b, mine))[0])
    tail = (" Their ties rest only on something they share (an organisation, a domain, a label), "
            "not on meetings or mail.") if only_assumed else ""
    if np.isfinite(nearest):
        needed = int(nearest)
        return (f"The nearest person you know is {needed} introduction{'s' if needed != 1 else ''} away from "
                f"{names(mine)}: try --max-intermediaries {needed}.{tail}")
    return (f"Nobody you know connects to {names(mine)}: the people they are tied to have no ties "
            f"to yours.{tail} If you know who knows them: mynet tie A B.")


def reach(
    net: Network,
    targets: Targets,
    *,
    k: int = 5,
    max_intermediaries: int = 2,
    avoid: set[int] = frozenset(),  # type: ignore[assignment]
    min_strength: float = 0.0,
    index: PathIndex | None = None,
    groups: dict[int, Any] | None = None,
    per_target: bool = True,
    today: date | None = None,
    hold: dict[int, dict[str, Any]] | None = None,
) -> ReachResult:
    """Ranked intro paths to the targets, each step explained, plus your direct routes.

    ``today`` (default: the day the network is seen from, ``net.as_of``) decides which
    direct ties are dormant. ``hold`` maps people you asked recently to ``{"factor", ...}``
    (see :meth:`mynet.workspace.Workspace.held_back`): a path through one of them first is
    ranked at its score times ``factor`` (its score stays as it is, and the path says why it
    comes later). The search returns ``k`` plus as many paths as people held back, so the
    ``k`` best by that rank are among them.
    """
    hold = hold or {}
    today = today or net.as_of.day
    if max_intermediaries < 1:
        raise MynetError("an intro path has at least one intermediary (--max-intermediaries 1 or more)")
    index = index or path_index(net)
    members = [m for m in targets.members if m not in avoid]
    # For a set of targets, people there you are already warm with are insiders: they are
    # listed as your direct way in and may be intermediaries towards their colleagues.
    insiders = [m for m in members if len(members) > 1 and (direct_route(index, m) or 0) >= WARM_ENOUGH]
    outsiders = [m for m in members if m not in insiders] or members
    # Someone you already know warmly is never a later intermediary (you would ask them yourself):
    # the search applies this rule itself, so nobody loses a good path to a detour through them.
    first_only = warm_contacts(index)
    paths = find_paths(index, outsiders, k=k + len(hold) if hold else k, max_intermediaries=max_intermediaries,
                       avoid=avoid, min_strength=min_strength, first_only=first_only)
    paths = _rank_observed_first(net, paths)
    if hold:
        ranked = sorted(range(len(paths)), key=lambda i: (-round(paths[i].score * hold.get(paths[i].first, {})
                                                                  .get("factor", 1.0), 9), i))
        paths = [paths[i] for i in ranked[:k]]
    described = [_describe_path(net, p, groups) for p in paths]
    for p, d in zip(paths, described):
        if p.first in hold:
            h = hold[p.first]
            d["held_back"] = {"asked_on": h.get("asked_on"), "state": h.get("state"), "factor": h.get("factor"),
                              "about": h.get("target_label")}
    direct = []
    for m in members:
        w = direct_route(index, m)
        if w:
            info = net.warmth.get(m)
            direct.append({"target": m, "name": net.name(m), "warmth": round(float(w), 4),
                           "last": info.last if info else None, "weak": w < WARM_ENOUGH,
                           "dormant": _dormant(info.last if info else None, net.warmth_model.dormant_days, today),
                           "insider": m in insiders})
    by_target = []
    unreachable = []
    if per_target and len(outsiders) > 1:
        best = best_per_target(index, outsiders, k=1, max_intermediaries=max_intermediaries, avoid=avoid,
                               min_strength=min_strength, first_only=first_only)
        for m, ps in best.items():
            if ps:
                by_target.append({"target": m, "name": net.name(m), "past": m in targets.past,
                                  "best": _describe_path(net, ps[0], groups)})
            else:
                unreachable.append(m)
    elif outsiders and not paths:
        unreachable = list(outsiders)
    reason = ""
    if not paths:
        reason = no_path_reason(net, index, [m for m in outsiders if m not in avoid],
                                max_intermediaries=max_intermediaries, avoid=set(avoid), min_strength=min_strength)
    known = next((d for d in direct if targets.kind == "person" and not d["weak"] and not d["dormant"]), None)
    held = [{"person": c, "name": net.name(c)} | dict(h) for c, h in sorted(hold.items()) if index.pos(c) is not None]
    return ReachResult(targets, described, sorted(direct, key=lambda d: -d["warmth"]), by_target, unreachable, reason,
                       known, held)
