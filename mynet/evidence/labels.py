"""Labels (tags, vCard CATEGORIES, spreadsheet groups): which ones say that people know each other.

A label that names an affiliation (a club, a team, a class, a project) is
*assumed* evidence that the people carrying it know each other. Many labels are
the user's own workflow instead ("follow up", "to call", "met at the booth",
"VIP", "dinner"): they say something about the user's plans, nothing about
whether two of the people know each other. Each label gets a verdict:

1. **Your decision** (``mynet tags count LABEL`` / ``mynet tags ignore LABEL``)
   wins over everything below and is kept across re-imports.
2. **Generic**: labels nearly every address book carries ("Work", "Personal",
   "My contacts"); see :data:`mynet.people.normalise.GENERIC_TAGS`.
3. **Too common**: a label carried by more than ``tag_share_cap`` of all
   contacts is a filing habit, not a circle.
4. **Wording**: the label reads like a to-do, a reminder, a ranking or a note of
   where you met (:func:`workflow_wording`). The word list covers English and a
   few common words of other European languages; it is a rule of thumb, not a
   standard, and it will miss labels in other languages (usage catches some).
5. **Usage**: the label is applied across unrelated organisations to people who
   share nothing else, although mynet does see those people elsewhere
   (:func:`usage_verdict`).

Everything else counts. The numbers of the usage test are rules of thumb
(common practice, no single source): see :data:`USAGE_MIN_USES` and the others.
"""

from __future__ import annotations

from collections import Counter
from dataclasses import asdict, dataclass
from typing import Mapping, Sequence

import numpy as np

from ..lazy import lazy_module
from ..people.normalise import GENERIC_TAGS, fold_text

sp = lazy_module("scipy.sparse")

__all__ = ["LabelVerdict", "workflow_wording", "usage_verdict", "judge_labels", "WORKFLOW_PHRASES", "WORKFLOW_WORDS",
           "USAGE_MIN_USES", "USAGE_MIN_SEEN", "USAGE_MIN_ORGS", "USAGE_MAX_LINKED"]

# Folded phrases that, at the start of a label, make it a workflow label ("met at booth", "to call back").
# A rule of thumb: English first, then the same ideas in French, German, Spanish, Italian, Dutch, Portuguese
# and the Nordic languages as people commonly type them.
WORKFLOW_PHRASES = tuple(sorted({
    "follow up", "to follow up", "to call", "call back", "to email", "to mail", "to contact", "to meet", "to invite",
    "to do", "to ask", "to thank", "to see", "reach out", "keep in touch", "catch up", "check in", "get back to",
    "met at", "met in", "met on", "met via", "met through", "met during", "introduced by", "intro from",
    "referred by", "referral", "lead from", "scanned at", "badge scan", "cold lead", "warm lead", "hot lead",
    "christmas card", "xmas card", "holiday card", "card list", "thank you", "send ", "waiting for",
    "a rappeler", "a relancer", "a contacter", "rencontre a", "rencontre au", "rencontre lors",
    "zuruckrufen", "anrufen", "nachfassen", "kennengelernt", "getroffen auf", "getroffen bei",
    "llamar", "por llamar", "seguimiento", "conocido en", "conocida en",
    "da chiamare", "richiamare", "conosciuto a", "conosciuta a",
    "terugbellen", "opvolgen", "ontmoet op", "ligar", "retornar", "conheci em",
    "ring tilbake", "ringa", "folj upp", "traffade pa", "motte pa",
}))

# Folded single words that make any label holding them a workflow label ("VIP", "dinner 2025", "hot prospect").
WORKFLOW_WORDS = frozenset("""
    followup todo todos tbd later pending waiting remind reminder reminders callback recontact
    vip vips favourite favourites favorite favorites fav favs starred important priority urgent
    prospect prospects hot cold warm rsvp invited invite invitees newsletter
    dinner lunch breakfast brunch coffee drinks beer beers
    relance relancer rappeler suivi favoris diner dejeuner
    nachfassen wiedervorlage favoriten wichtig abendessen mittagessen
    pendiente favoritos importante cena comida almuerzo
    preferiti pranzo
    favorieten belangrijk
    jantar almoco
    middag lunsj favoritter viktig
""".split())

#: Fewer uses than this: the usage test has too little to go on.
USAGE_MIN_USES = 4
#: Share of the label's people mynet must see in meetings, threads or your own ties before judging by usage.
USAGE_MIN_SEEN = 1 / 3
#: Distinct organisations the label must span (and no organisation may hold half of its people).
USAGE_MIN_ORGS = 3
#: Share of the label's pairs linked by other evidence below which it "shares nothing else".
USAGE_MAX_LINKED = 0.25


@dataclass
class LabelVerdict:
    """Whether one label counts as evidence, and why (in plain words)."""

    label: str  # as first written
    key: str  # folded
    uses: int
    counts: bool
    reason: str
    rule: str  # "you", "generic", "common", "wording", "usage", "circle", "few"
    decision: str | None = None  # "count" or "ignore" when you decided

    def to_dict(self) -> dict:
        return asdict(self)


def workflow_wording(label: str) -> bool:
    """Whether a label reads like a to-do, a reminder, a ranking or a note of where you met.

    A rule of thumb (see :data:`WORKFLOW_PHRASES` and :data:`WORKFLOW_WORDS`):
    ``"Follow up"``, ``"met at booth"``, ``"VIP"``, ``"Dinner 2025"``, ``"à rappeler"``
    are workflow labels; ``"Rowing"``, ``"Masters crew"``, ``"Class of 2012"`` are not.
    """
    key = fold_text(label)
    if not key:
        return False
    if any(key == p.strip() or key.startswith(p if p.endswith(" ") else p + " ") for p in WORKFLOW_PHRASES):
        return True
    return any(w in WORKFLOW_WORDS for w in key.split())


def usage_verdict(
    members: Sequence[int], orgs: Sequence[frozenset[str]], seen: np.ndarray, linked_pairs: int
) -> tuple[bool, str] | None:
    """Judge a label by how it is used; ``None`` when its use says nothing either way.

    A label is judged a workflow label when it is applied across unrelated
    organisations (at least :data:`USAGE_MIN_ORGS`, none holding half its
    people) to people who share nothing else (under :data:`USAGE_MAX_LINKED`
    of its pairs are linked by a meeting, a thread, a shared organisation or
    mail domain, a RELATED property or your own tie), while mynet does see at
    least :data:`USAGE_MIN_SEEN` of them in meetings, threads or ties with
    someone. The last condition keeps an address book without calendars or
    mail from condemning every club: there, nothing shows whom the people meet.

    Parameters
    ----------
    members : sequence of int
        Row positions of the label's contacts.
    orgs : sequence of frozenset of str
        Folded current organisations of every contact (by row).
    seen : numpy.ndarray of bool
        Per row: the contact has observed evidence with someone.
    linked_pairs : int
        Pairs of members linked by evidence other than labels.

    Returns
    -------
    (bool, str) or None
        (counts, reason) when the use decides, else None.
    """
    m = len(members)
    if m < USAGE_MIN_USES:
        return None
    if seen[list(members)].mean() < USAGE_MIN_SEEN:
        return None
    counts = Counter(o for i in members for o in orgs[i])
    with_org = sum(1 for i in members if orgs[i])
    if len(counts) < USAGE_MIN_ORGS or (counts and counts.most_common(1)[0][1] * 2 >= with_org):
        return None
    share = linked_pairs / (m * (m - 1) / 2)
    if share < USAGE_MAX_LINKED:
        return False, (f"applied across {len(counts)} organisations to people who share nothing else "
                       f"({share:.0%} of its pairs are linked otherwise)")
    return True, f"its people are linked otherwise too ({share:.0%} of its pairs)"


def judge_labels(
    groups: Mapping[str, Sequence[int]],
    shown: Mapping[str, str],
    n: int,
    *,
    orgs: Sequence[frozenset[str]],
    seen: np.ndarray,
    linked: sp.spmatrix | None,
    decisions: Mapping[str, str] | None = None,
    share_cap: float = 0.25,
) -> dict[str, LabelVerdict]:
    """A verdict for every label (see the module docstring for the order of the rules).

    Parameters
    ----------
    groups : mapping of folded label -> row positions of its contacts
    shown : mapping of folded label -> the label as first written
    n : int
        Number of contacts.
    orgs, seen : see :func:`usage_verdict`
    linked : scipy.sparse matrix, n x n, optional
        Non-zero where two contacts are linked by evidence other than labels
        (either triangle or both; it is made symmetric here).
    decisions : mapping of folded label -> "count" | "ignore"
    share_cap : float
        Labels carried by a larger share of contacts are too common to count
        (only with 20 contacts or more).
    """
    decisions = decisions or {}
    internal = _internal_links(groups, n, linked)
    out: dict[str, LabelVerdict] = {}
    for key in sorted(groups):
        rows = groups[key]
        uses = len(rows)
        label = shown.get(key, key)
        decided = decisions.get(key)
        if decided in ("count", "ignore"):
            v = LabelVerdict(label, key, uses, decided == "count", f"you said to {decided} it", "you", decided)
        elif key in GENERIC_TAGS:
            v = LabelVerdict(label, key, uses, False, "too generic: nearly every address book has it", "generic")
        elif n >= 20 and uses > share_cap * n:
            v = LabelVerdict(label, key, uses, False, f"too common: {uses / n:.0%} of your contacts carry it", "common")
        elif workflow_wording(label):
            v = LabelVerdict(label, key, uses, False,
                             "reads like a note of your own (a to-do, a ranking, where you met)",
                             "wording")
        else:
            judged = usage_verdict(rows, orgs, seen, int(internal.get(key, 0)))
            if judged is not None and not judged[0]:
                v = LabelVerdict(label, key, uses, False, judged[1], "usage")
            elif uses < 2:
                v = LabelVerdict(label, key, uses, True, "only one person carries it so far", "few")
            else:
                v = LabelVerdict(label, key, uses, True, judged[1] if judged
                                 else "nothing marks it as a note of your own",
                                 "circle")
        out[key] = v
    return out


def _internal_links(groups: Mapping[str, Sequence[int]], n: int, linked: sp.spmatrix | None) -> dict[str, float]:
    """Per label, the number of its pairs linked in ``linked`` (one sparse product for all labels)."""
    if linked is None or not groups or n == 0:
        return {}
    keys = sorted(groups)
    L = sp.csr_matrix(linked, shape=(n, n))
    L = ((L + L.T) != 0).astype(np.float64)
    L.setdiag(0)
    L.eliminate_zeros()
    lengths = np.array([len(groups[k]) for k in keys], dtype=np.int64)
    rows = np.fromiter((i for k in keys for i in groups[k]), dtype=np.int64, count=int(lengths.sum()))
    cols = np.repeat(np.arange(len(keys)), lengths)
    B = sp.csr_matrix((np.ones(rows.size), (rows, cols)), shape=(n, len(keys)))
    B.data[:] = 1.0
    inside = np.asarray(B.multiply(L @ B).sum(axis=0)).ravel() / 2.0
    return {k: float(v) for k, v in zip(keys, inside)}
