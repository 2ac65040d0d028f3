"""Wording shared by the HTML and Markdown reports: section titles, number formats, the reading notes."""

from __future__ import annotations

from typing import Any

from ..analysis.reading import TOPICS
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

def _reading_notes() -> tuple[tuple[str, str], ...]:
    """(term, explanation) pairs of the closing section, from :data:`mynet.analysis.reading.TOPICS`: the plain
    reading, what each word means, then the method with its sources (every published method named there)."""
    notes = []
    for t in TOPICS:
        words = "; ".join(f"{w}: {m}" for w, m in t.words)
        notes.append((t.title, f"{t.plain} {words}. Method: {t.method}"))
    return tuple(notes)


#: (term, explanation) pairs of the closing section "How to read this".
READING_NOTES = _reading_notes()


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
    """A short summary of the roles in a group (members and people on the edge left out)."""
    shown = [(r, n) for r, n in sorted(roles.items(), key=lambda kv: (-kv[1], kv[0])) if r
             and r not in ("member", "on the edge")]
    return ", ".join(f"{n} {r}" for r, n in shown) or "-"


def plural(n: int, word: str, many: str | None = None) -> str:
    """``1 group``, ``3 groups``."""
    return f"{n:,} {word if n == 1 else (many or word + 's')}"


def headline(summary: dict[str, Any], groups: int, generated: str) -> str:
    """The report's one-line summary under its title."""
    s = summary
    return (f"{plural(s.get('contacts', 0), 'contact')}, {plural(s.get('ties', 0), 'tie')}, {plural(groups, 'group')} "
            f"(group clarity {num(s.get('modularity'))}); {plural(s.get('warm', 0), 'warm contact')}. Made by mynet on "
            f"{generated} from your own workspace; nothing in it is fetched from elsewhere.")
