"""Routes to each of your targets, and the dormant contacts who would open more of them.

For one target (a person, or everyone at an organisation, with a tag or at a
mail domain) :func:`routes_to` lists every first person who can open it: for
each person you are warm with (warmth at least ``WARM_ENOUGH``: someone you
could ask today), their best intro path to the target (the
search of :mod:`.intro_search`, one path per first intermediary, under the
reach rules of :mod:`.intro_routes`: someone you know warmly is asked
directly, never reached through somebody else). A route is *observed* when
every step of it rests on something that happened (a meeting, mail, a card
naming the other, your own word), else it rests at least partly on something
the two only share (an organisation, a domain, a label).

A route through someone you asked recently (an open or declined ask) keeps its
score but is *ranked* lower: its score times ``asks.hold_back``. The path chosen
for each first person does not depend on your warmth to them (the search runs
from the targets), so ranking after the search is the same as searching with
the lowered warmth.

Dormant contacts are people you were warm with once (warmth at least
``WARM_ENOUGH`` on the day of your last interaction, by the warmth model run
backwards: after the last interaction the decayed count only fades) and quiet
for longer than ``warmth_model.dormant_days``. :func:`revived_routes` asks, for a
target, which of them would open it if you got back in touch (their warmth as
it was at your last interaction).
"""

from __future__ import annotations

import copy
import math
from dataclasses import dataclass, field
from datetime import date

import numpy as np

from ..evidence.network import Network
from ..evidence.warmth import Warmth, WarmthModel
from .intro_routes import WARM_ENOUGH, Targets, warm_contacts
from .intro_search import IntroPath, PathIndex, direct_route, find_paths

__all__ = ["Route", "TargetRoutes", "routes_to", "observed_pairs", "warmth_at_last", "dormant_contacts",
           "revived_routes"]


@dataclass(frozen=True)
class Route:
    """The best way in through one first person."""

    first: int
    score: float  # product of the step strengths
    rank: float  # score, lowered for someone asked recently
    nodes: tuple[int, ...]  # first person ... target
    observed: bool  # every step rests on something that happened

    def to_dict(self, net: Network) -> dict:
        return {"first": self.first, "first_name": net.name(self.first), "score": round(self.score, 6),
                "rank": round(self.rank, 6), "path": list(self.nodes), "names": [net.name(n) for n in self.nodes],
                "basis": "observed" if self.observed else "assumed"}


@dataclass
class TargetRoutes:
    """Every way in to one target: whom you already know there, and the routes by rank."""

    members: list[int]
    known: list[int] = field(default_factory=list)  # people there you are warm with: ask them yourself
    routes: list[Route] = field(default_factory=list)

    @property
    def best(self) -> Route | None:
        return self.routes[0] if self.routes else None


def observed_pairs(net: Network) -> dict[tuple[int, int], bool]:
    """(a, b) with a < b -> whether the tie rests on observed evidence, for every tie of the network."""
    t = net.ties
    obs = t.observed()
    return {(int(a), int(b)): bool(o) for a, b, o in zip(t.a, t.b, obs)}


def _observed(path: IntroPath, pairs: dict[tuple[int, int], bool]) -> bool:
    return all(pairs.get((min(a, b), max(a, b)), False) for a, b in zip(path.nodes, path.nodes[1:]))


def _dormant_day(last: str | None, days: float, today: date) -> bool:
    return bool(last) and (today - date.fromisoformat(str(last)[:10])).days > days


def routes_to(net: Network, index: PathIndex, targets: Targets, *, max_intermediaries: int = 2,
              hold: dict[int, float] | None = None, exclude: set[int] = frozenset(),  # type: ignore[assignment]
              pairs: dict[tuple[int, int], bool] | None = None) -> TargetRoutes:
    """Every first person who can open ``targets``, best rank first.

    Parameters
    ----------
    net : Network
    index : PathIndex
        From :func:`mynet.analysis.intro_routes.path_index`.
    targets : Targets
        What the target stands for (:func:`mynet.analysis.intro_routes.resolve_targets`).
    max_intermediaries : int, default 2
    hold : dict, optional
        First person -> the factor their routes' rank is multiplied by (asked recently).
    exclude : set of int
        People who are never the first person here (they declined this very target).
    pairs : dict, optional
        :func:`observed_pairs` of ``net``, to share between calls.

    Returns
    -------
    TargetRoutes
        ``known`` lists the people of the target you are warm with (and not dormant):
        you need no introduction to them. Equal ranks go to the higher score, then the
        smaller first person id.
    """
    hold = hold or {}
    pairs = pairs if pairs is not None else observed_pairs(net)
    members = list(targets.members)
    today = net.as_of.day
    known = []
    for m in members:
        w = direct_route(index, m) or 0.0
        info = net.warmth.get(m)
        if w >= WARM_ENOUGH and not _dormant_day(info.last if info else None, net.warmth_model.dormant_days, today):
            known.append(m)
    outsiders = [m for m in members if m not in known]
    out = TargetRoutes(members, known)
    if not outsiders:
        return out
    paths = find_paths(index, outsiders, k=index.n, max_intermediaries=max_intermediaries, avoid=exclude,
                       distinct_second=False, first_only=warm_contacts(index))
    routes = [Route(p.first, p.score, p.score * hold.get(p.first, 1.0), p.nodes, _observed(p, pairs)) for p in paths
              if index.warmth[index.pos(p.first)] >= WARM_ENOUGH]
    routes.sort(key=lambda r: (-round(r.rank, 12), -round(r.score, 12), r.first))
    out.routes = routes
    return out


def warmth_at_last(w: Warmth, model: WarmthModel, today: date) -> float:
    """Your warmth to a contact on the day of your last interaction with them, by the warmth model run backwards.

    After the last interaction the decayed count ``D`` only fades by ``2^(-age / half_life)``;
    undoing that fade on today's computed warmth gives the warmth of that day. A rating
    is your word for now and is returned as it is; no interaction gives 0.
    """
    if w.rated is not None:
        return float(w.rated)
    if not w.last or w.computed <= 0:
        return 0.0
    m = 0.8 if len(w.channels) >= 2 else 1.0
    if w.meetings:
        r = 1.0
    else:
        sent, got = w.messages_to, w.messages_from
        r = 0.6 + 0.4 * (min(sent, got) / max(sent, got)) if max(sent, got) else 0.6
    base = (1.0 - (1.0 - w.computed) / m) / r
    if base <= 0:
        return 0.0
    if base >= 1:
        return float(w.computed)
    d_now = -model.scale * math.log1p(-base)
    age = max(0, (today - date.fromisoformat(w.last[:10])).days)
    d_then = d_now * 2.0 ** (age / max(model.half_life_days, 1e-9))
    return float(1.0 - (1.0 - (-math.expm1(-d_then / model.scale)) * r) * m)


def dormant_contacts(net: Network) -> dict[int, float]:
    """Contacts warm once and quiet for long: id -> your warmth to them at your last interaction.

    Warm once: at least ``WARM_ENOUGH`` then; quiet: no interaction for more than
    ``warmth_model.dormant_days``; and not warm enough now to ask directly. A contact you
    rated is never dormant (your rating says how close you are now).
    """
    today = net.as_of.day
    model = net.warmth_model
    out = {}
    for cid, w in sorted(net.warmth.items()):
        if w.rated is not None or w.warmth >= WARM_ENOUGH or not _dormant_day(w.last, model.dormant_days, today):
            continue
        then = warmth_at_last(w, model, today)
        if then >= WARM_ENOUGH:
            out[cid] = round(then, 6)
    return out


def revived_index(index: PathIndex, dormant: dict[int, float]) -> PathIndex:
    """The index with only the dormant contacts as possible first people, at their warmth of old."""
    revived = copy.copy(index)
    warm = np.zeros(index.n)
    for cid, w in dormant.items():
        p = index.pos(cid)
        if p is not None:
            warm[p] = w
    revived.warmth = warm
    return revived


def revived_routes(index: PathIndex, revived: PathIndex, targets: Targets, *, max_intermediaries: int = 2
                   ) -> list[IntroPath]:
    """The paths to ``targets`` that a dormant contact would open (one per dormant first person), best first.

    People you are warm with now stay asked directly, never reached through someone
    (the reach rule), and so do the dormant ones.
    """
    first_only = set(warm_contacts(index)) | {int(c) for c in revived.ids[revived.warmth > 0]}
    return find_paths(revived, targets.members, k=revived.n, max_intermediaries=max_intermediaries,
                      distinct_second=False, first_only=first_only)
