"""Wording shared by the HTML and Markdown reports: section titles, number formats, the reading notes."""

from __future__ import annotations

from typing import Any

from ..safetext import shown

__all__ = ["SECTIONS", "READING_NOTES", "xml_safe", "num", "pct", "path_chain", "group_roles", "plural", "headline"]

#: (anchor, title) of each section, in order.
SECTIONS = (
    ("findings", "What stands out"),
    ("picture", "The picture of your network"),
    ("groups", "Groups"),
    ("time", "Over time and by warmth"),
    ("brokers", "Top brokers"),
    ("bridges", "Top bridges"),
    ("intros", "Intro opportunities"),
    ("reading", "How to read this"),
)

#: (term, explanation) pairs of the closing section; every published method is named with its source.
READING_NOTES = (
    ("Groups", "Clusters found by Louvain community detection (Blondel, Guillaume, Lambiotte & Lefebvre 2008), "
               "which gathers contacts with more ties among themselves than chance would give; modularity "
               "(Newman & Girvan 2004) measures how clear-cut the clusters are (above 0.3 is clear). A group's "
               "name is suggested from what most of its members share; give your own with `mynet groups name`."),
    ("Ties", "A tie between two contacts adds up the evidence that they know each other (a shared organisation, "
             "meetings and mail threads together, a shared mail domain or tag, a card naming the other, or your own "
             "word); its strength runs from 0 to 1."),
    ("Warmth", "Your own tie to a contact, from how often and how recently you met or wrote (older contact counts "
               "less, with a half-life), or from your own rating. The layers of about 5, 15, 50 and 150 people are "
               "a rule of thumb, not a measurement. A warm contact has warmth 0.3 or more."),
    ("Brokers", "Betweenness (Freeman 1977, computed with Brandes 2001) is the share of shortest routes between "
                "other contacts that pass through a person. Constraint (Burt 1992) is low when a person's contacts "
                "do not know each other, so the person spans a structural hole; effective size counts their "
                "non-redundant contacts. Roles come from the participation coefficient and within-group degree "
                "(Guimerà & Amaral 2005): a gateway spreads ties over several groups, a hub has many ties in its own."),
    ("Bridges", "Ties that link two groups, ranked by a rule of our own: strength divided by the number of ties "
                "between the same two groups, doubled for a local bridge (its ends share no other contact). Overlap "
                "is the neighbourhood overlap of Onnela et al. (2007): the share of the two ends' contacts they "
                "share; low overlap marks the weak ties that carry new information (Granovetter 1973)."),
    ("Intro paths", "A chain from you through people you know to someone in a group you do not reach yourself. "
                    "Its score multiplies the strengths along the chain, starting with your warmth to the first "
                    "person, so a short chain of strong ties scores highest; the suggested ask only claims what the "
                    "evidence says."),
)

def xml_safe(text: Any) -> str:
    """``text`` as a string safe in XML 1.0 and on a terminal (see :func:`mynet.safetext.shown`)."""
    return shown(text)


def num(x: Any, digits: int = 2) -> str:
    """A measure for a table: fixed decimals, ``-`` when missing."""
    if x is None:
        return "-"
    if isinstance(x, bool):
        return "yes" if x else "no"
    if isinstance(x, int):
        return f"{x:,}"
    try:
        return f"{float(x):.{digits}f}"
    except (TypeError, ValueError):
        return str(x)


def pct(x: float | None) -> str:
    return "-" if x is None else f"{x:.0%}"


def path_chain(p: dict[str, Any]) -> list[str]:
    """The names along an intro path, you first."""
    return ["you", *p.get("names", [])]


def group_roles(roles: dict[str, int]) -> str:
    """A short summary of the roles in a group (members and peripheral ones left out)."""
    shown = [(r, n) for r, n in sorted(roles.items(), key=lambda kv: (-kv[1], kv[0])) if r
             and r not in ("member", "peripheral")]
    return ", ".join(f"{n} {r}" for r, n in shown) or "-"


def plural(n: int, word: str, many: str | None = None) -> str:
    """``1 group``, ``3 groups``."""
    return f"{n:,} {word if n == 1 else (many or word + 's')}"


def headline(summary: dict[str, Any], groups: int, generated: str) -> str:
    """The report's one-line summary under its title."""
    s = summary
    return (f"{plural(s.get('contacts', 0), 'contact')}, {plural(s.get('ties', 0), 'tie')}, {plural(groups, 'group')} "
            f"(modularity {num(s.get('modularity'))}); {plural(s.get('warm', 0), 'warm contact')}. Made by mynet on "
            f"{generated} from your own workspace; nothing in it is fetched from elsewhere.")
