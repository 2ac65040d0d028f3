"""The plan: whom to ask, in which order, so that the fewest and warmest asks open the most targets.

The problem
-----------
Each target can be opened by some first people (the first intermediary of an
intro path to it), each with a score in (0, 1]. Asking one person is one
conversation in which you may ask them for at most ``capacity`` introductions.
A plan chooses a set ``S`` of people to ask and assigns each target it opens to
one person of ``S`` who can open it, at most ``capacity`` targets per person.
Plans are compared in this order (the *objective*, the same one the tests'
brute force optimises):

1. the most targets opened;
2. the fewest people asked;
3. the largest sum of the scores of the assignment.

Method
------
How many targets a set of people can open, ``f(S)``, is the size of a largest
assignment with capacities (a bipartite b-matching). ``f`` is the rank function
of a transversal matroid, hence monotone and submodular, so choosing people
greedily by their *gain* ``f(S + p) - f(S)`` is the greedy algorithm for
submodular set cover (Wolsey 1982), the generalisation of the greedy set cover
of Johnson (1974) and Chvátal (1979) to people who may each open at most
``capacity`` targets. The greedy always reaches the largest number of targets
any plan opens (a set short of ``f(everyone)`` always has a person with a
positive gain), and it asks at most ``H(capacity) = 1 + 1/2 + ... + 1/capacity``
(below ``1 + ln(capacity)``) times as many people as the fewest possible
(Wolsey 1982, Theorem 1; Chvátal 1979 for plain set cover). Ties in the gain go to the
person whose addition gives the largest score sum, then to the smaller contact
id: the plan is deterministic. A last pass drops, latest choice first, anybody
whose targets the others can take over (it only removes asks).

For a fixed set of people, the assignment that opens the most targets and,
among those, has the largest score sum is a rectangular linear assignment
(targets against ``capacity`` copies of each person, weight ``M + score`` for
a possible pair with ``M`` larger than any score sum, 0 otherwise) solved
exactly with :func:`scipy.optimize.linear_sum_assignment`.

References
----------
.. [1] D. S. Johnson, "Approximation algorithms for combinatorial problems",
   Journal of Computer and System Sciences 9(3), 256-278 (1974).
.. [2] V. Chvátal, "A greedy heuristic for the set-covering problem",
   Mathematics of Operations Research 4(3), 233-235 (1979).
.. [3] L. A. Wolsey, "An analysis of the greedy algorithm for the submodular set
   covering problem", Combinatorica 2(4), 385-393 (1982).
.. [4] D. F. Crouse, "On implementing 2D rectangular assignment algorithms",
   IEEE Transactions on Aerospace and Electronic Systems 52(4), 1679-1696 (2016)
   (the algorithm behind ``linear_sum_assignment``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Hashable, Mapping

import numpy as np
from scipy.optimize import linear_sum_assignment

__all__ = ["Cover", "assign", "cover", "greedy_bound"]


@dataclass
class Cover:
    """A plan's choice of people and who opens which target.

    Attributes
    ----------
    order : list of int
        The people to ask, in the order the greedy chose them (most targets first).
    assignment : dict
        Target -> the person of ``order`` who opens it (targets no plan opens are absent).
    score : float
        Sum of the scores of the assignment.
    """

    order: list[int] = field(default_factory=list)
    assignment: dict[Hashable, int] = field(default_factory=dict)
    score: float = 0.0

    @property
    def opened(self) -> int:
        return len(self.assignment)

    def targets_of(self, person: int) -> list[Hashable]:
        """The targets assigned to ``person``, in the order of the options given."""
        return [t for t, p in self.assignment.items() if p == person]


def assign(options: Mapping[Hashable, Mapping[int, float]], people: list[int], capacity: int
           ) -> tuple[dict[Hashable, int], float]:
    """The best assignment of targets to ``people``: most targets, then largest score sum.

    Parameters
    ----------
    options : mapping
        Target -> {person: score}; a person absent from a target's mapping cannot open it.
    people : list of int
        Who may be assigned.
    capacity : int
        Most targets per person.

    Returns
    -------
    (dict, float)
        Target -> person, and the sum of the scores of that assignment.
    """
    targets = [t for t in options if any(p in options[t] for p in people)]
    if not targets or not people or capacity < 1:
        return {}, 0.0
    cols = [p for p in sorted(people) for _ in range(min(capacity, len(targets)))]
    big = float(len(targets) + 1)  # more than any sum of scores in (0, 1]
    weight = np.zeros((len(targets), len(cols)))
    for i, t in enumerate(targets):
        for j, p in enumerate(cols):
            s = options[t].get(p)
            if s is not None and s > 0:
                weight[i, j] = big + s
    rows, picked = linear_sum_assignment(weight, maximize=True)
    out: dict[Hashable, int] = {}
    total = 0.0
    for i, j in zip(rows, picked):
        if weight[i, j] > 0:
            out[targets[i]] = cols[j]
            total += weight[i, j] - big
    return {t: out[t] for t in options if t in out}, total


def _value(options, people, capacity) -> tuple[int, float]:
    got, total = assign(options, people, capacity)
    return len(got), round(total, 9)


def cover(options: Mapping[Hashable, Mapping[int, float]], capacity: int = 3) -> Cover:
    """Greedy submodular set cover of the targets by the people who can open them (see the module notes).

    Parameters
    ----------
    options : mapping
        Target -> {person (contact id): score in (0, 1]}.
    capacity : int, default 3
        Most introductions asked of any one person (at least 1).

    Returns
    -------
    Cover
        Deterministic for given options: equal gains go to the larger score sum, then the smaller id.

    Raises
    ------
    ValueError
        When ``capacity`` is below 1.

    Notes
    -----
    The number of people asked is at most ``greedy_bound(capacity)`` times the fewest
    possible for the same number of targets opened (Wolsey 1982).
    """
    if capacity < 1:
        raise ValueError("capacity must be at least 1")
    people = sorted({p for opts in options.values() for p, s in opts.items() if s > 0})
    best_count, _ = _value(options, people, capacity)
    chosen: list[int] = []
    current = (0, 0.0)
    while current[0] < best_count:
        best = None
        for p in people:
            if p in chosen:
                continue
            value = _value(options, chosen + [p], capacity)
            if value[0] <= current[0]:
                continue
            key = (value[0], value[1], -p)
            if best is None or key > best[0]:
                best = (key, p, value)
        if best is None:  # cannot happen for a submodular f (see the notes); guards an endless loop
            break
        chosen.append(best[1])
        current = best[2]
    for p in reversed(list(chosen)):
        rest = [q for q in chosen if q != p]
        if _value(options, rest, capacity)[0] == current[0]:
            chosen = rest
            current = _value(options, chosen, capacity)
    assignment, total = assign(options, chosen, capacity)
    return Cover(chosen, assignment, total)


def greedy_bound(capacity: int) -> float:
    """How many times the fewest asks the greedy plan may need at worst: ``H(capacity)`` (Wolsey 1982).

    The harmonic number ``1 + 1/2 + ... + 1/capacity`` (at most ``1 + ln(capacity)``): a
    person opens at most ``capacity`` targets, so ``max f({p}) <= capacity``.
    """
    return math.fsum(1.0 / i for i in range(1, max(1, capacity) + 1))
