"""Targets, the plan, asks and dormant contacts as Workspace methods (see :mod:`.asks` for the stored side).

* :meth:`AsksMixin.targets`: each target with its best route, whether that route
  rests on observed evidence, and how many first people can open it;
* :meth:`AsksMixin.plan`: whom to ask, in order (:func:`mynet.analysis.plan.cover`),
  the people who open several doors, the targets no plan opens and what would help;
* :meth:`AsksMixin.dormant`: people you were warm with once and have not heard from
  for long, ranked by how many targets and quiet groups they would reopen.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import date
from pathlib import Path
from typing import Any, Iterable

from ..analysis.intro_routes import Targets, no_path_reason, path_index
from ..analysis.plan import Cover, cover, greedy_bound
from ..analysis.target_routes import (
    TargetRoutes,
    dormant_contacts,
    observed_pairs,
    revived_index,
    revived_routes,
    routes_to,
)
from ..errors import MynetError, NotFoundError
from ..evidence.network import Network
from ..store import Store
from .asks import add_target as keep_target
from .asks import (
    ask_model,
    ask_rows,
    find_target,
    hold_backs,
    read_target_file,
    record_ask,
    resolve_target_row,
    target_row,
)
from .asks import close_ask as give_outcome
from .asks import remove_target as drop_target

__all__ = ["AsksMixin", "target_overview", "TargetState"]


@dataclass
class TargetState:
    """One target as the plan sees it."""

    row: dict[str, Any]
    targets: Targets
    routes: TargetRoutes
    state: str  # introduced, waiting, known, open, no route, nobody there
    open_asks: list[dict[str, Any]] = field(default_factory=list)


def target_overview(store: Store, net: Network, *, max_intermediaries: int = 2, today: date | None = None,
                    index=None) -> tuple[list[TargetState], dict[int, dict[str, Any]]]:
    """Every kept target with its routes and its state, and who is held back (see :func:`.asks.hold_backs`)."""
    index = index or path_index(net)
    held, declined = hold_backs(store, today=today)
    hold = {cid: h["factor"] for cid, h in held.items()}
    asks = ask_rows(store, include_closed=True, today=today)
    cmap = store.contact_map()
    pairs = observed_pairs(net)
    out = []
    for row in store.targets():
        t = resolve_target_row(net, store, row, cmap)
        mine = [a for a in asks if a["target"] == row["id"]]
        routes = routes_to(net, index, t, max_intermediaries=max_intermediaries, hold=hold,
                           exclude=declined.get(row["id"], set()), pairs=pairs) if t.members else TargetRoutes([])
        if any(a["outcome"] == "introduced" for a in mine):
            state = "introduced"
        elif any(not a["outcome"] for a in mine):
            state = "waiting"
        elif not t.members:
            state = "nobody there"
        elif routes.known:
            state = "known"
        elif routes.routes:
            state = "open"
        else:
            state = "no route"
        out.append(TargetState(target_row(store, row, cmap), t, routes, state,
                               [a for a in mine if not a["outcome"]]))
    return out, held


def _day(today: date | None) -> date:
    return today or date.today()


class AsksMixin:
    """Targets, asks, the plan and dormant contacts (part of :class:`~mynet.workspace.Workspace`)."""

    store: Store

    # -- targets ----------------------------------------------------------------------
    def add_target(self, *, to: str | int | None = None, org: str | None = None, tag: str | None = None,
                   domain: str | None = None, net: Network | None = None) -> dict[str, Any]:
        """Keep a target: a person (``to``), an organisation, a tag or a mail domain (exactly one).

        Returns its row (id, kind, label, query, contact, added) with ``new`` false when it was kept before.

        Raises
        ------
        MynetError
            When not exactly one is given; NotFoundError when nobody matches.
        """
        given = [(k, v) for k, v in (("person", to), ("organisation", org), ("tag", tag), ("domain", domain))
                 if v not in (None, "")]
        if len(given) != 1:
            raise MynetError("say which target with exactly one of --to, --org, --tag or --domain")
        kind, text = given[0]
        row, new = keep_target(self.store, net or self.network(), kind, str(text), self.find)  # type: ignore
        return row | {"new": new}

    def add_targets_from_file(self, path: str | Path, *, kind: str = "organisation", column: str | None = None,
                              net: Network | None = None) -> dict[str, list]:
        """Keep every target named in a file (one per line, or a CSV column); ``kind`` says what each names.

        Returns ``{"added": rows, "already": rows, "not_found": [{"text", "reason"}]}``: a line nobody
        matches is reported, never fatal.
        """
        net = net or self.network()  # type: ignore[attr-defined]
        out: dict[str, list] = {"added": [], "already": [], "not_found": []}
        for text in read_target_file(path, column):
            try:
                row, new = keep_target(self.store, net, kind, text, self.find)  # type: ignore[attr-defined]
            except NotFoundError as exc:
                out["not_found"].append({"text": text, "reason": str(exc)})
                continue
            out["added" if new else "already"].append(row)
        return out

    def remove_target(self, ref: str | int) -> dict[str, Any]:
        """Remove a target (by id or name) and the asks about it; returns it as it was."""
        return drop_target(self.store, ref)

    def targets(self, *, as_of=None, net: Network | None = None, max_intermediaries: int = 2,
                today: date | None = None) -> list[dict[str, Any]]:
        """Your targets as rows, in the order you added them.

        Each row: id, kind, label, query, contact, added, members (how many people it stands
        for), state (``introduced``, ``waiting`` for an open ask, ``known``: you know someone
        there, ``open``: some route, ``no route``, ``nobody there``), known (names), best (the
        best-ranked route: first, first_name, score, rank, path, names, basis), observed (the best
        route rests only on observed evidence), first_people (how many people can open it),
        routes (the first five), open_asks (their ids).
        """
        net = net or self.network(as_of)  # type: ignore[attr-defined]
        states, _held = target_overview(self.store, net, max_intermediaries=max_intermediaries, today=_day(today))
        return [_target_fields(net, s) for s in states]

    # -- the plan -----------------------------------------------------------------------
    def plan(self, *, max_per_person: int | None = None, as_of=None, net: Network | None = None,
             max_intermediaries: int = 2, today: date | None = None) -> dict[str, Any]:
        """Whom to ask, in order, so that the fewest and warmest asks open the most targets.

        ``max_per_person`` (default: the setting ``asks.max_per_person``) caps the introductions
        asked of one person. Returns a dict: asks (in order: person, name, warmth, targets with the
        route of each), several_doors, known, waiting, introduced, not_opened, no_route (each with
        why and what would help: dormant contacts to revive, groups with nobody warm), held_back,
        and objective (opened, people, score, capacity, bound). Deterministic.
        """
        net = net or self.network(as_of)  # type: ignore[attr-defined]
        model = ask_model(self.store)
        capacity = max_per_person if max_per_person is not None else model.max_per_person
        if capacity < 1:
            raise MynetError("a person can be asked for at least one introduction (--max-per-person 1 or more)")
        index = path_index(net)
        states, held = target_overview(self.store, net, max_intermediaries=max_intermediaries, today=_day(today),
                                       index=index)
        candidates = [s for s in states if s.state == "open"]
        options = {s.row["id"]: {r.first: r.rank for r in s.routes.routes} for s in candidates}
        chosen = cover(options, capacity)
        analysis = self.analysis(net)  # type: ignore[attr-defined]
        return {
            "asks": _plan_asks(net, candidates, chosen),
            "several_doors": _several_doors(net, candidates),
            "known": [{"target": s.row["id"], "label": s.row["label"],
                       "people": [net.name(m) for m in s.routes.known]} for s in states if s.state == "known"],
            "waiting": [{"target": s.row["id"], "label": s.row["label"], "asks": s.open_asks}
                        for s in states if s.state == "waiting"],
            "introduced": [{"target": s.row["id"], "label": s.row["label"]} for s in states
                           if s.state == "introduced"],
            "not_opened": [{"target": s.row["id"], "label": s.row["label"],
                            "people": [net.name(r.first) for r in s.routes.routes[:3]]}
                           for s in candidates if s.row["id"] not in chosen.assignment],
            "no_route": _no_route(net, index, analysis, [s for s in states if s.state in ("no route", "nobody there")],
                                  max_intermediaries),
            "held_back": [{"person": cid} | h for cid, h in sorted(held.items())],
            "objective": {"opened": chosen.opened, "people": len(chosen.order), "score": round(chosen.score, 6),
                          "capacity": capacity, "bound": round(greedy_bound(capacity), 4)},
        }

    # -- asks -------------------------------------------------------------------------------
    def ask(self, via: str | int, target: str | int, *, note: str = "", on: date | str | None = None,
            net: Network | None = None) -> dict[str, Any]:
        """Keep an ask: you asked ``via`` (a contact) for an introduction to ``target``.

        ``target`` is a kept target (id or name); otherwise a contact (kept as a new person
        target), otherwise an organisation (kept as a new one). Returns the ask's row.
        """
        helper = self.find(via)  # type: ignore[attr-defined]
        try:
            row = find_target(self.store, target)
        except NotFoundError:
            try:
                made = self.add_target(to=target, net=net)
            except NotFoundError:
                try:
                    made = self.add_target(org=str(target), net=net)
                except NotFoundError:
                    raise NotFoundError(f"{target!r} is neither one of your targets, nor a contact, nor an "
                                        "organisation anyone works at (mynet targets add --tag/--domain ...)") from None
            row = find_target(self.store, made["id"])
        if row["kind"] == "person" and target_row(self.store, row)["contact"] == helper.id:
            raise MynetError(f"{helper.name} is the target: ask them yourself, no introduction needed")
        ask_id = record_ask(self.store, helper.id, row["id"], note=note, on=on)
        return next(a for a in ask_rows(self.store, include_closed=True) if a["id"] == ask_id)

    def asks(self, *, include_closed: bool = False, today: date | None = None) -> list[dict[str, Any]]:
        """Your asks, oldest first (open ones only unless ``include_closed``), with days waiting and when to
        follow up (``asks.follow_up_days`` after asking; ``due`` once that day has come)."""
        return ask_rows(self.store, include_closed=include_closed, today=_day(today))

    def close_ask(self, ask_id: int, outcome: str, *, person: str | int | None = None,
                  on: date | str | None = None) -> dict[str, Any]:
        """Give an ask its outcome: introduced, declined, no-answer or not-needed (your decision).

        ``introduced`` makes an observed tie between you and the person you met (the target,
        or ``person`` for an organisation, tag or domain) and warms the one who helped.
        """
        pid = self.find(person).id if person not in (None, "") else None  # type: ignore[attr-defined]
        give_outcome(self.store, int(ask_id), outcome, person_id=pid, on=on)
        return next(a for a in ask_rows(self.store, include_closed=True) if a["id"] == int(ask_id))

    def reopen_ask(self, ask_id: int) -> None:
        """Take an ask's outcome back (it is open again)."""
        if not self.store.reopen_ask(int(ask_id)):
            raise NotFoundError(f"no ask #{ask_id} (see: mynet asks --all)")

    def held_back(self, *, today: date | None = None) -> dict[int, dict[str, Any]]:
        """People asked recently (open or declined, within ``asks.recent_days``): id -> the ask and the factor
        their routes' rank is multiplied by in reach and the plan."""
        return hold_backs(self.store, today=_day(today))[0]

    # -- dormant contacts ----------------------------------------------------------------
    def dormant(self, *, as_of=None, net: Network | None = None, limit: int = 0, max_intermediaries: int = 2,
                today: date | None = None) -> list[dict[str, Any]]:
        """People you were warm with once and have not heard from for long, most useful to revive first.

        Each row: id, name, warmth_then (at your last interaction), warmth_now, last, first,
        meetings, mails, channels, organisations, targets (labels of the targets they would open
        if you got back in touch), groups (groups where you are warm with nobody, which they belong
        to). Ranked by how many targets, then groups, they would reopen, then warmth_then.
        """
        net = net or self.network(as_of)  # type: ignore[attr-defined]
        dormant = dormant_contacts(net)
        if not dormant:
            return []
        index = path_index(net)
        states, _held = target_overview(self.store, net, max_intermediaries=max_intermediaries, today=_day(today),
                                        index=index)
        revived = revived_index(index, dormant)
        opens: dict[int, list[str]] = {c: [] for c in dormant}
        for s in states:
            if s.state in ("introduced", "known") or not s.targets.members:
                continue
            for p in revived_routes(index, revived, s.targets, max_intermediaries=max_intermediaries):
                opens[p.first].append(s.row["label"])
        analysis = self.analysis(net)  # type: ignore[attr-defined]
        quiet = {g.id: g.name for g in analysis.groups if g.warm == 0}
        rows = []
        for cid, then in dormant.items():
            w = net.warmth[cid]
            c = net.by_id.get(cid)
            gid = analysis.group_of.get(cid)
            rows.append({"id": cid, "name": net.name(cid), "warmth_then": round(then, 4),
                         "warmth_now": round(float(w.warmth), 4), "last": w.last, "first": w.first,
                         "meetings": w.meetings, "mails": w.messages_from + w.messages_to, "channels": w.channels,
                         "organisations": list(c.orgs) if c else [], "targets": opens[cid],
                         "groups": [{"group": gid, "name": quiet[gid]}] if gid in quiet else []})
        rows.sort(key=lambda r: (-len(r["targets"]), -len(r["groups"]), -r["warmth_then"], r["id"]))
        return rows[:limit] if limit else rows


def _target_fields(net: Network, s: TargetState) -> dict[str, Any]:
    best = s.routes.best
    return s.row | {"members": len(s.targets.members), "state": s.state,
                    "known": [net.name(m) for m in s.routes.known],
                    "best": best.to_dict(net) if best else None, "observed": best.observed if best else None,
                    "first_people": len(s.routes.routes),
                    "routes": [r.to_dict(net) for r in s.routes.routes[:5]],
                    "open_asks": [a["id"] for a in s.open_asks]}


def _plan_asks(net: Network, candidates: list[TargetState], chosen: Cover) -> list[dict[str, Any]]:
    by_id = {s.row["id"]: s for s in candidates}
    out = []
    for person in chosen.order:
        items = []
        for tid in chosen.targets_of(person):
            s = by_id[tid]
            route = next(r for r in s.routes.routes if r.first == person)
            items.append({"target": tid, "label": s.row["label"], "route": route.to_dict(net)})
        w = net.warmth.get(person)
        out.append({"person": person, "name": net.name(person), "warmth": round(float(w.warmth), 4) if w else 0.0,
                    "last": w.last if w else None, "targets": items})
    return out


def _several_doors(net: Network, candidates: list[TargetState], limit: int = 10, best: int = 3
                   ) -> list[dict[str, Any]]:
    """People among the ``best`` ways in to at least two targets, most targets first."""
    doors: dict[int, list[tuple[str, float]]] = {}
    for s in candidates:
        for r in s.routes.routes[:best]:
            doors.setdefault(r.first, []).append((s.row["label"], r.rank))
    ranked = sorted(((p, v) for p, v in doors.items() if len(v) >= 2),
                    key=lambda pv: (-len(pv[1]), -round(sum(x for _, x in pv[1]), 9), pv[0]))
    return [{"person": p, "name": net.name(p), "count": len(v), "targets": [label for label, _ in v]}
            for p, v in ranked[:limit]]


def _no_route(net: Network, index, analysis, states: Iterable[TargetState], max_intermediaries: int
              ) -> list[dict[str, Any]]:
    states = list(states)
    if not states:
        return []
    dormant = dormant_contacts(net)
    revived = revived_index(index, dormant) if dormant else None
    quiet = {g.id: g for g in analysis.groups if g.warm == 0}
    out = []
    for s in states:
        entry: dict[str, Any] = {"target": s.row["id"], "label": s.row["label"], "dormant": [], "groups": []}
        if not s.targets.members:
            entry["why"] = "Nobody in your contacts matches it any more."
            out.append(entry)
            continue
        entry["why"] = no_path_reason(net, index, s.targets.members, max_intermediaries=max_intermediaries)
        if revived is not None:
            for p in revived_routes(index, revived, s.targets, max_intermediaries=max_intermediaries)[:3]:
                w = net.warmth[p.first]
                entry["dormant"].append({"person": p.first, "name": net.name(p.first), "last": w.last,
                                         "score": round(p.score, 6), "names": [net.name(n) for n in p.nodes]})
        gids = sorted({analysis.group_of.get(m) for m in s.targets.members} & set(quiet))
        entry["groups"] = [{"group": g, "name": quiet[g].name, "size": quiet[g].size} for g in gids]
        out.append(entry)
    return out
