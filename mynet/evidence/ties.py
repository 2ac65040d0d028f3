"""Evidence -> ties: who knows whom, how strongly, and why.

Every kind of evidence is counted as a sparse co-occurrence matrix product
(contacts x events, contacts x organisations, ...), so the whole step is a few
scipy.sparse products rather than per-event Python loops.

The strength model
------------------
Each kind of evidence ``k`` gives a pair a non-negative amount ``x_k``:

* ``meeting``: sum over events both attended of ``1 / (n - 1)``, where ``n`` is the
  number of attendees (Newman 2001); events larger than ``broadcast_cap`` count
  for nothing (an all-hands says little about who knows whom);
* ``thread``: the same over mail threads (``n`` = people in the thread);
* ``organisation``: for each organisation both are at now, ``-ln(1 - s)`` with
  ``s = org_current * min(1, sqrt(size_ref / size))``, so large organisations
  weigh less than small ones; organisations where either is only a *past*
  member use ``org_past`` instead; organisations larger than ``group_cap``
  give no pairwise evidence. That chance is then updated by the
  organisation's own pairs of people seen in meetings and threads (how many
  of them met; :func:`mynet.evidence.org_limit.org_weights`);
* ``domain``: the same for a shared e-mail domain that is not public webmail
  (only when the pair has no organisation evidence, which usually explains it);
* ``tag``: the same for a shared tag, category or spreadsheet group (generic
  labels such as "Work", and labels more than ``tag_share_cap`` of all contacts
  carry, are no evidence); placeholder employers ("Retired", "Freelance") are
  not organisations;
* ``related``: a vCard RELATED property (or a vendor relation field) naming the other.

Meetings, threads, RELATED and your own ties are *observed* evidence (something
happened or you said so); organisation, domain and tag are *assumed* (a shared
attribute). A tie resting on assumed evidence alone is only a "may know". In a
large organisation every pair shares the organisation, so assumed evidence alone
would make one complete clique of all its people; each person keeps only as many
of those links as the organisation's chance says they know (``TieModel.assumed_cap``).
A shared unit of an organisation (the department of a vCard ORG) is a smaller
group and counts as its own organisation evidence. See :mod:`mynet.evidence.org_limit`.

The strength is ``1 - exp(-sum_k x_k / scale_k)``: each kind acts as an
independent chance that the two know each other (a noisy-OR), so strength is
in (0, 1), grows with every piece of evidence and grows faster when the kinds
differ (multiplexity). Manual ties set a floor; suppressed ties are removed.

References
----------
.. [1] M. E. J. Newman, "Scientific collaboration networks. II. Shortest paths,
   weighted networks, and centrality", Phys. Rev. E 64, 016132 (2001).
.. [2] M. Á. Serrano, M. Boguñá, A. Vespignani, "Extracting the multiscale
   backbone of complex weighted networks", PNAS 106(16), 6483-6488 (2009).
.. [3] M. S. Granovetter, "The strength of weak ties", AJS 78(6) (1973).
"""

from __future__ import annotations

import io
import json
import math
from collections import defaultdict
from dataclasses import asdict, dataclass, field
from itertools import chain
from typing import Any, Iterable, Mapping, Sequence

import numpy as np

from ..lazy import lazy_module
from ..model import Contact, Interaction
from ..people.normalise import email_domain, fold_text, is_real_org, is_webmail, normalise_org
from ..settings import SettingsGroup, setting
from .events import Event, EventIndex, contact_of_email, event_lists, evidence_events
from .labels import judge_labels
from .org_limit import limit_large_orgs, org_weights

pd = lazy_module("pandas")
sp = lazy_module("scipy.sparse")

__all__ = [
    "TieModel",
    "TieTable",
    "incidence",
    "cooccurrence",
    "infer_ties",
    "disparity_filter",
    "KINDS",
    "OBSERVED_KINDS",
    "ASSUMED_KINDS",
    "Event",
    "evidence_events",
    "EventIndex",
]

KINDS = ("meeting", "thread", "organisation", "domain", "tag", "related")
#: Evidence of something that happened (or that you said): a meeting, a thread both wrote in, RELATED.
OBSERVED_KINDS = ("meeting", "thread", "related")
#: Evidence inferred from a shared attribute.
ASSUMED_KINDS = ("organisation", "domain", "tag")


@dataclass
class TieModel(SettingsGroup, group="tie_model"):
    """The settings of the strength model (stored in the workspace, see ``mynet settings``).

    The defaults are a judgement call, not a published calibration: one
    one-to-one meeting alone gives 0.39, three give 0.78; sharing a
    ten-person organisation gives 0.30, a hundred-person one 0.10.
    """

    meeting_scale: float = setting(2.0, "shared meetings needed (Newman weight) for a tie of strength 0.63; higher: "
                                   "meetings count less", low=0, low_open=True)
    thread_scale: float = setting(3.0, "the same for shared mail threads", low=0, low_open=True)
    org_current: float = setting(0.30, "chance that two people at a small organisation now know each other",
                                 low=0, high=1, high_open=True)
    org_past: float = setting(0.20, "the same when either was there only in the past", low=0, high=1, high_open=True)
    domain: float = setting(0.15, "the same for a shared work mail domain", low=0, high=1, high_open=True)
    tag: float = setting(0.20, "the same for a shared tag, category or group", low=0, high=1, high_open=True)
    related: float = setting(0.60, "the same for a RELATED link on a card", low=0, high=1, high_open=True)
    manual: float = setting(0.80, "strength of a tie you add without giving one", low=0, high=1, low_open=True)
    size_ref: int = setting(10, "organisations, tags and domains up to this size count in full", low=1)
    group_cap: int = setting(500, "larger organisations, tags and domains give no evidence", low=2)
    broadcast_cap: int = setting(50, "larger meetings and threads count for nothing", low=2)
    tag_share_cap: float = setting(0.25, "tags carried by a larger share of contacts say nothing",
                                   low=0, high=1, low_open=True)
    min_strength: float = setting(0.05, "ties weaker than this are left out of the graph", low=0, high=1,
                                  high_open=True)
    backbone_alpha: float = setting(0.0, "keep only locally significant ties (disparity filter) at this "
                                    "significance; 0 keeps every tie", low=0, high=1, high_open=True)
    size_exponent: float = setting(0.5, "how fast a shared group weighs less as it grows: base * (size_ref / size) "
                                   "to this power; 0: size does not matter", low=0)
    assumed_cap: int = setting(50, "per person and large organisation, the most assumed-only ties kept, best "
                               "first; each keeps as many as the organisation's chance says they know (0: all)",
                               low=0)
    org_prior_pairs: int = setting(45, "an organisation's chances above are worth this many pairs of its people seen "
                                   "in meetings and threads: more seen pairs that met raise them (at most to "
                                   "org_current), seen pairs that never met lower them (0: no such rule)", low=0)
    org_alone_max: int = setting(0, "larger organisations count only for pairs with other evidence (0: no such rule)",
                                 low=0)

    def to_dict(self) -> dict[str, Any]:
        return asdict(self)

    def group_weight(self, base: float, size: int) -> float:
        """``-ln(1 - s)`` for one shared group of ``size`` members (0 above the cap)."""
        if size < 2 or size > self.group_cap or base <= 0:
            return 0.0
        s = base * min(1.0, (self.size_ref / size) ** self.size_exponent)
        return -math.log1p(-min(s, 0.999))


@dataclass
class TieTable:
    """Every pair with any evidence, as parallel arrays (row ``i`` is one pair).

    ``a`` and ``b`` are contact ids with ``a < b``; ``parts[kind]`` holds the
    pair's amount of each kind of evidence (before scaling) and ``counts`` the
    number of shared meetings and threads. ``labels`` holds the verdict on
    every label (:class:`mynet.evidence.labels.LabelVerdict` as dicts) the tags were
    judged by.
    """

    a: np.ndarray
    b: np.ndarray
    strength: np.ndarray
    parts: dict[str, np.ndarray] = field(default_factory=dict)
    counts: dict[str, np.ndarray] = field(default_factory=dict)
    manual: np.ndarray | None = None
    labels: list[dict] = field(default_factory=list)

    def __len__(self) -> int:
        return int(self.a.shape[0])

    def observed(self) -> np.ndarray:
        """Per row: the tie rests on observed evidence (a meeting, a thread, RELATED or your own tie)."""
        obs = np.zeros(len(self), dtype=bool)
        for k in OBSERVED_KINDS:
            if k in self.parts:
                obs |= self.parts[k] > 0
        if self.manual is not None and len(self.manual):
            obs |= self.manual
        return obs

    def basis(self, i: int) -> str:
        """``"observed"`` or ``"assumed"`` (shared attributes only) for row ``i``."""
        if self.manual is not None and len(self.manual) and self.manual[i]:
            return "observed"
        return "observed" if any(self.parts[k][i] > 0 for k in OBSERVED_KINDS if k in self.parts) else "assumed"

    def order(self) -> np.ndarray:
        """Row indices, strongest first (ties broken by ids, so the order is stable)."""
        return np.lexsort((self.b, self.a, -self.strength))

    def select(self, mask: np.ndarray) -> "TieTable":
        return TieTable(
            self.a[mask], self.b[mask], self.strength[mask],
            {k: v[mask] for k, v in self.parts.items()},
            {k: v[mask] for k, v in self.counts.items()},
            None if self.manual is None else self.manual[mask],
            self.labels,
        )

    def to_json(self) -> dict[str, list]:
        out = {"a": self.a.tolist(), "b": self.b.tolist(), "strength": self.strength.tolist()}
        out |= {f"part_{k}": v.tolist() for k, v in self.parts.items()}
        out |= {f"count_{k}": v.tolist() for k, v in self.counts.items()}
        out["manual"] = [] if self.manual is None else self.manual.tolist()
        out["labels"] = self.labels
        return out

    def to_bytes(self) -> bytes:
        """The table as one ``.npz`` (arrays as they are in memory, the labels as JSON): loads without parsing text."""
        arrays = {"a": self.a, "b": self.b, "strength": self.strength}
        arrays |= {f"part_{k}": v for k, v in self.parts.items()}
        arrays |= {f"count_{k}": v for k, v in self.counts.items()}
        if self.manual is not None:
            arrays["manual"] = self.manual
        arrays["labels"] = np.frombuffer(json.dumps(self.labels).encode(), dtype=np.uint8)
        buf = io.BytesIO()
        np.savez(buf, **arrays)
        return buf.getvalue()

    @classmethod
    def from_bytes(cls, data: bytes) -> "TieTable":
        with np.load(io.BytesIO(data), allow_pickle=False) as z:
            d = {k: z[k] for k in z.files}
        parts = {k[5:]: v for k, v in d.items() if k.startswith("part_")}
        counts = {k[6:]: v for k, v in d.items() if k.startswith("count_")}
        manual = d.get("manual")
        manual = manual if manual is not None and len(manual) else None
        return cls(d["a"], d["b"], d["strength"], parts, counts, manual, json.loads(d["labels"].tobytes().decode()))

    @classmethod
    def from_json(cls, d: Mapping[str, list]) -> "TieTable":
        parts = {k[5:]: np.asarray(v, dtype=float) for k, v in d.items() if k.startswith("part_")}
        counts = {k[6:]: np.asarray(v, dtype=np.int64) for k, v in d.items() if k.startswith("count_")}
        manual = np.asarray(d["manual"], dtype=bool) if d.get("manual") else None
        return cls(np.asarray(d["a"], dtype=np.int64), np.asarray(d["b"], dtype=np.int64),
                   np.asarray(d["strength"], dtype=float), parts, counts, manual, list(d.get("labels", [])))


def incidence(groups: Sequence[Sequence[int]], n: int) -> sp.csr_matrix:
    """The n x len(groups) 0/1 incidence matrix of members (row) in groups (column)."""
    lengths = np.fromiter((len(g) for g in groups), dtype=np.int64, count=len(groups))
    rows = np.fromiter((i for g in groups for i in g), dtype=np.int64, count=int(lengths.sum()))
    cols = np.repeat(np.arange(len(groups), dtype=np.int64), lengths)
    m = sp.csr_matrix((np.ones(rows.shape[0]), (rows, cols)), shape=(n, len(groups)))
    m.data[:] = 1.0  # a member listed twice in one group counts once
    return m


def cooccurrence(B: sp.csr_matrix, weights: np.ndarray | None = None) -> sp.coo_matrix:
    """Upper triangle (i < j) of ``B diag(weights) B^T``: weighted shared groups per pair.

    With ``weights = 1 / (n_e - 1)`` this is Newman's (2001) weighted projection
    of a bipartite person-event network; with no weights it counts shared groups.
    """
    if weights is None:
        C = B @ B.T
    else:
        C = (B @ sp.diags(np.asarray(weights, dtype=float))) @ B.T
    return sp.triu(C, k=1).tocoo()


def _pairs_key(coo: sp.coo_matrix, n: int) -> np.ndarray:
    """Row-major pair keys ``i * n + j``; sorted when ``coo`` came from :func:`_clean`."""
    return coo.row.astype(np.int64) * n + coo.col.astype(np.int64)


def infer_ties(
    contacts: Sequence[Contact],
    interactions: Iterable[Interaction],
    me_emails: set[str],
    model: TieModel | None = None,
    *,
    related: Iterable[tuple[int, int]] = (),
    manual: Mapping[tuple[int, int], float] | None = None,
    suppressed: Iterable[tuple[int, int]] = (),
    extra_webmail: frozenset[str] = frozenset(),
    label_decisions: Mapping[str, str] | None = None,
) -> TieTable:
    """Every pair of contacts with any evidence, with its strength.

    Parameters
    ----------
    contacts : sequence of Contact
    interactions : iterable of Interaction
        Meetings and messages as evidence sees them
        (:func:`mynet.people.correspondence.clean`); bulk mail is ignored.
    me_emails : set of str
        The user's own addresses (they count towards an event's size, but the
        user is not a node of the tie graph).
    model : TieModel
    related : iterable of (id, id)
        Pairs linked by a RELATED property.
    manual : mapping (id, id) -> strength
        The user's own ties; the strength becomes at least this.
    suppressed : iterable of (id, id)
        Ties the user said are wrong; removed whatever the evidence.
    label_decisions : mapping of folded label -> "count" | "ignore"
        Your own verdicts on labels (see :mod:`mynet.evidence.labels`); the others are judged.

    Returns
    -------
    TieTable
        Pairs with ``a < b`` (contact ids), in no particular order, with the
        verdict on every label in ``labels``.
    """
    model = model or TieModel()
    contacts = sorted(contacts, key=lambda c: c.id)
    ids = np.array([c.id for c in contacts], dtype=np.int64)
    n = len(contacts)
    pos = {c.id: i for i, c in enumerate(contacts)}
    by_email = {e: pos[cid] for e, cid in contact_of_email(contacts).items()}

    mats: dict[str, sp.coo_matrix] = {}
    counts: dict[str, sp.coo_matrix] = {}

    # Meetings and threads: Newman weights 1/(n-1), broadcast events dropped.
    events = event_lists(interactions)
    emails_index = pd.Index(list(by_email)) if by_email else None
    email_pos = np.fromiter(by_email.values(), dtype=np.int64, count=len(by_email))
    for kind, parts in (("meeting", events.meeting_parts), ("thread", events.thread_parts)):
        B, sizes = _event_incidence(parts, emails_index, email_pos, n, model.broadcast_cap)
        if B is not None:
            w = 1.0 / (sizes - 1.0)
            mats[kind] = _clean(cooccurrence(B, w))
            counts[kind] = _clean(cooccurrence(B))

    rel = [(min(pos[a], pos[b]), max(pos[a], pos[b])) for a, b in related if a in pos and b in pos and a != b]
    if rel:
        r = np.array(sorted(set(rel)))
        mats["related"] = _clean(sp.coo_matrix(
            (np.full(len(r), -math.log1p(-model.related)), (r[:, 0], r[:, 1])), shape=(n, n)
        ))

    man_pairs = [(min(pos[a], pos[b]), max(pos[a], pos[b])) for a, b in (manual or {})
                 if a in pos and b in pos and a != b]
    seen_pairs = _observed_pairs(mats, man_pairs, n)

    # Organisations (current: both now; past: either only in the past), and units of organisations.
    cur_groups: dict[str, list[int]] = defaultdict(list)
    all_groups: dict[str, list[int]] = defaultdict(list)
    orgs_now: list[frozenset[str]] = []
    for i, c in enumerate(contacts):
        cur = {o for o in map(normalise_org, c.orgs) if is_real_org(o)}
        orgs_now.append(frozenset(cur))
        for o in cur:
            cur_groups[o].append(i)
        for o in cur | {o for o in map(normalise_org, c.past_orgs) if is_real_org(o)}:
            all_groups[o].append(i)
        for org, unit in c.org_units:
            key = _unit_key(org, unit)
            if key:
                all_groups[key].append(i)
                if normalise_org(org) in cur:
                    cur_groups[key].append(i)
    if all_groups:
        names = sorted(all_groups)
        sizes = np.array([len(all_groups[o]) for o in names])
        # A large organisation (unit keys are never "large": they are the smaller group)
        big = model.org_alone_max if model.org_alone_max > 0 else model.size_ref
        large = np.array([s > big and _UNIT_SEP not in o for o, s in zip(names, sizes)])
        for kind, sel in (("organisation", ~large), ("org_large", large)):
            if not sel.any():
                continue
            names_k = [o for o, keep in zip(names, sel) if keep]
            sizes_k = sizes[sel]
            B_all = incidence([all_groups[o] for o in names_k], n)
            w_cur, w_past = org_weights(B_all, sizes_k, seen_pairs, model)
            if kind == "org_large":
                chance = dict(zip(names_k, -np.expm1(-w_cur)))
            B_cur = incidence([cur_groups.get(o, []) for o in names_k], n)
            org = (cooccurrence(B_cur, w_cur) + cooccurrence(B_all, w_past) - cooccurrence(B_cur, w_past)).tocoo()
            org.eliminate_zeros()
            mats[kind] = _clean(org)
        large_groups = [(np.array(sorted(set(all_groups[o])), dtype=np.int64), float(chance[o]))
                        for o, s, big_one in zip(names, sizes, large) if big_one and s <= model.group_cap]
    else:
        large_groups = []

    # E-mail domains that are not public webmail.
    dom_groups: dict[str, list[int]] = defaultdict(list)
    for i, c in enumerate(contacts):
        for d in {email_domain(e) for e in c.emails} - {""}:
            if not is_webmail(d, extra_webmail):
                dom_groups[d].append(i)
    if dom_groups:
        names = sorted(dom_groups)
        w = np.array([model.group_weight(model.domain, len(dom_groups[g])) for g in names])
        if w.any():
            mats["domain"] = _clean(cooccurrence(incidence([dom_groups[g] for g in names], n), w))

    # Labels: judged by wording and by use against every other kind of evidence (see mynet.evidence.labels).
    tag_groups: dict[str, list[int]] = defaultdict(list)
    shown: dict[str, str] = {}
    for i, c in enumerate(contacts):
        for t in c.tags:
            key = fold_text(t)
            if key:
                shown.setdefault(key, t.strip())
                if not tag_groups[key] or tag_groups[key][-1] != i:
                    tag_groups[key].append(i)
    verdicts = {}
    if tag_groups:
        others = [m for k, m in mats.items()]
        if man_pairs:
            mp = np.array(man_pairs)
            others.append(sp.coo_matrix((np.ones(len(mp)), (mp[:, 0], mp[:, 1])), shape=(n, n)))
        linked = sum((sp.csr_matrix(m, shape=(n, n)) for m in others), sp.csr_matrix((n, n)))
        seen_m = sum((sp.csr_matrix(mats[k], shape=(n, n)) for k in OBSERVED_KINDS if k in mats), sp.csr_matrix((n, n)))
        if man_pairs:
            seen_m = seen_m + others[-1]
        seen = (np.asarray((seen_m != 0).sum(axis=0)).ravel() + np.asarray((seen_m != 0).sum(axis=1)).ravel()) > 0
        verdicts = judge_labels(tag_groups, shown, n, orgs=orgs_now, seen=seen, linked=linked,
                                decisions=label_decisions, share_cap=model.tag_share_cap)
        counted = sorted(k for k, v in verdicts.items() if v.counts and len(tag_groups[k]) >= 2)
        if counted:
            w = np.array([model.group_weight(model.tag, len(tag_groups[g])) for g in counted])
            if w.any():
                mats["tag"] = _clean(cooccurrence(incidence([tag_groups[g] for g in counted], n), w))

    table = _assemble(ids, pos, n, mats, counts, model, manual or {}, suppressed, large_groups)
    table.labels = [v.to_dict() for v in verdicts.values()]
    return table


_UNIT_SEP = "\x1f"


def _observed_pairs(mats: Mapping[str, sp.coo_matrix], man_pairs: list[tuple[int, int]], n: int) -> sp.csr_matrix:
    """The symmetric 0/1 matrix of pairs with observed evidence so far (meetings, threads, RELATED, your ties)."""
    rows = [mats[k].row for k in OBSERVED_KINDS if k in mats] + [np.array([p[0] for p in man_pairs], dtype=np.int64)]
    cols = [mats[k].col for k in OBSERVED_KINDS if k in mats] + [np.array([p[1] for p in man_pairs], dtype=np.int64)]
    r, c = np.concatenate(rows).astype(np.int64), np.concatenate(cols).astype(np.int64)
    O = sp.csr_matrix((np.ones(2 * r.size), (np.r_[r, c], np.r_[c, r])), shape=(n, n))
    O.data[:] = 1.0
    return O


def _unit_key(org: str, unit: str) -> str:
    """The group key of one unit of an organisation ("" for a placeholder organisation or an empty unit)."""
    o, u = normalise_org(org), fold_text(unit)
    return f"{o}{_UNIT_SEP}{u}" if u and is_real_org(o) else ""


def _event_incidence(parts: list[list[str]], emails_index, email_pos: np.ndarray, n: int, cap: int):
    """Contacts x events incidence for events of 2..cap people with at least two contacts, and their sizes.

    Vectorised: all addresses are looked up at once in a hash index (pandas), so
    a hundred thousand events cost a few tenths of a second.
    """
    if not parts or emails_index is None:
        return None, None
    sizes = np.fromiter((len(p) - (1 if p and p[0] == "" else 0) for p in parts), dtype=np.int64, count=len(parts))
    flat = list(chain.from_iterable(parts))
    event = np.repeat(np.arange(len(parts), dtype=np.int64),
                      np.fromiter(map(len, parts), dtype=np.int64, count=len(parts)))
    hit = emails_index.get_indexer(flat)
    ok = hit >= 0
    rows, cols = email_pos[hit[ok]], event[ok]
    keep_event = (sizes >= 2) & (sizes <= cap)
    sel = keep_event[cols]
    rows, cols = rows[sel], cols[sel]
    if rows.size == 0:
        return None, None
    B = sp.csr_matrix((np.ones(rows.size), (rows, cols)), shape=(n, len(parts)))
    B.data[:] = 1.0  # a contact listed under two addresses counts once
    members = np.asarray((B != 0).sum(axis=0)).ravel()
    used = np.nonzero(members >= 2)[0]
    if used.size == 0:
        return None, None
    return B[:, used].tocsr(), sizes[used].astype(float)


def _clean(m: sp.coo_matrix) -> sp.coo_matrix:
    """Drop explicit zeros and sort entries row-major (so pair keys come out sorted)."""
    m = m.tocsr()
    m.eliminate_zeros()
    m.sort_indices()
    return m.tocoo()


def _assemble(ids, pos, n, mats, counts, model: TieModel, manual, suppressed, large_groups=()) -> TieTable:
    scales = {"meeting": model.meeting_scale, "thread": model.thread_scale}
    keys_all = [_pairs_key(m, n) for m in mats.values()]
    for (a, b) in manual:
        if a in pos and b in pos and a != b:
            i, j = sorted((pos[a], pos[b]))
            keys_all.append(np.array([i * n + j], dtype=np.int64))
    if not keys_all:
        empty = np.zeros(0, dtype=np.int64)
        return TieTable(empty, empty.copy(), np.zeros(0), {k: np.zeros(0) for k in KINDS},
                        {"meeting": empty.copy(), "thread": empty.copy()}, np.zeros(0, dtype=bool))
    # Each array is sorted and unique already; one kind alone needs no merge.
    keys = keys_all[0] if len(keys_all) == 1 else np.unique(np.concatenate(keys_all))
    parts = {}
    for kind in (*KINDS, "org_large"):
        arr = np.zeros(keys.shape[0])
        if kind in mats:
            m = mats[kind]
            arr[np.searchsorted(keys, _pairs_key(m, n))] = m.data
        parts[kind] = arr
    cnt = {}
    for kind in ("meeting", "thread"):
        arr = np.zeros(keys.shape[0], dtype=np.int64)
        if kind in counts:
            m = counts[kind]
            arr[np.searchsorted(keys, _pairs_key(m, n))] = np.rint(m.data).astype(np.int64)
        cnt[kind] = arr
    man = np.zeros(keys.shape[0], dtype=bool)
    for a, b in manual:
        if a in pos and b in pos and a != b:
            i, j = sorted((pos[a], pos[b]))
            man[np.searchsorted(keys, i * n + j)] = True
    # A shared domain usually *is* the shared organisation: count it only without one.
    parts["domain"] = np.where((parts["organisation"] + parts["org_large"]) > 0, 0.0, parts["domain"])
    large = parts.pop("org_large")
    observed = man.copy()
    for k in OBSERVED_KINDS:
        observed |= parts[k] > 0
    ia, ib = keys // n, keys % n
    x_all = sum(parts[k] / scales.get(k, 1.0) for k in KINDS)
    parts["organisation"] = parts["organisation"] + limit_large_orgs(large, parts, x_all, observed, keys, n, model,
                                                                        large_groups, ids)
    total = sum(parts[k] / scales.get(k, 1.0) for k in KINDS)
    strength = -np.expm1(-total)
    for (a, b), s in manual.items():
        if a in pos and b in pos and a != b:
            i, j = sorted((pos[a], pos[b]))
            k = np.searchsorted(keys, i * n + j)
            strength[k] = max(strength[k], float(s) if s else model.manual)
    a, b = ids[ia], ids[ib]
    keep = np.ones(keys.shape[0], dtype=bool)
    for x, y in suppressed:
        if x in pos and y in pos:
            i, j = sorted((pos[x], pos[y]))
            k = np.searchsorted(keys, i * n + j)
            if k < keys.shape[0] and keys[k] == i * n + j:
                keep[k] = False
    keep &= strength > 0
    table = TieTable(a, b, strength, parts, cnt, man)
    return table if keep.all() else table.select(keep)


def disparity_filter(table: TieTable, alpha: float) -> np.ndarray:
    """Mask of the ties that are significant for at least one of their ends.

    For a node ``i`` with ``k`` ties and total strength ``s``, a tie of weight
    ``w`` is kept when ``(1 - w/s)^(k - 1) < alpha`` (Serrano, Boguñá &
    Vespignani 2009, eq. 2). Ties of nodes with a single tie are kept.

    References
    ----------
    .. [1] M. Á. Serrano, M. Boguñá, A. Vespignani, PNAS 106(16), 6483 (2009).
    """
    if len(table) == 0 or alpha <= 0:
        return np.ones(len(table), dtype=bool)
    nodes, inv = np.unique(np.concatenate([table.a, table.b]), return_inverse=True)
    ia, ib = inv[: len(table)], inv[len(table):]
    w = table.strength
    s = np.bincount(ia, w, len(nodes)) + np.bincount(ib, w, len(nodes))
    k = np.bincount(ia, minlength=len(nodes)) + np.bincount(ib, minlength=len(nodes))

    def significant(i):
        p = w / s[i]
        with np.errstate(divide="ignore", invalid="ignore"):
            a = np.power(1.0 - p, k[i] - 1)
        return (k[i] <= 1) | (a < alpha)

    return significant(ia) | significant(ib)
