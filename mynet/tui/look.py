"""The browser's look: our palette, and glyphs that carry meaning without colour.

Every meaning shown in colour is also shown by a glyph or a word, so a
monochrome terminal (or ``NO_COLOR``) loses nothing. The palette pairs a blue
ramp with an amber accent, which stay apart for the common kinds of colour
blindness; the ramp changes in lightness, not only in hue.


Every text the browser shows from the workspace passes through
:func:`mynet.safetext.shown` on its way to the screen: :func:`safe` for a
string or a rich ``Text``, :func:`clip` for a short label, and the
:class:`Static` and :class:`Label` here, which every view uses instead of
Textual's own. Theirs read a string as markup, so a name such as
``[@click=app.quit]x`` would be a link and ``[/]`` an error; ours show text as
it is, and a control character (``ESC``...) as a visible picture.
"""

from __future__ import annotations

from typing import Any

from rich.cells import cell_len, set_cell_size
from rich.text import Text
from textual import widgets
from textual.theme import Theme

from ..safetext import shown

__all__ = ["THEME", "RAMP", "SHADES", "density_class", "density_cell", "warmth_bar", "clip", "priority_tag",
           "pad", "plural", "SUGGESTED", "safe", "Static", "Label"]

THEME = Theme(
    name="mynet-dusk",
    primary="#4f8fd6",
    secondary="#e3a33b",
    accent="#e3a33b",
    warning="#e3a33b",
    error="#d9634c",
    success="#5fb3a1",
    foreground="#dfe4ec",
    background="#14171c",
    surface="#191d23",
    panel="#232932",
    dark=True,
)

#: Density of ties, light to heavy: glyph and ramp colour per class (blue, darkening to bright).
SHADES = ("·", "░", "▒", "▓", "█")
RAMP = ("#3b4a5e", "#3f6a99", "#4f8fd6", "#86b6ea", "#cfe3fa")
#: Upper bounds of each density class but the last (ties / possible pairs).
BOUNDS = (0.002, 0.01, 0.05, 0.2)

#: Marks a group label mynet suggested (the user has not named the group yet).
SUGGESTED = "~"


def plural(n: int, word: str, many: str | None = None) -> str:
    return f"{n:,} {word if n == 1 else (many or word + 's')}"


def safe(content: Any, *, one_line: bool = False) -> Text:
    """A rich ``Text`` to show ``content`` (a string, never read as markup, or a ``Text``) with its controls shown.

    A ``Text`` keeps its styles: :func:`~mynet.safetext.shown` replaces one
    character by one (a CR LF pair aside), so the spans still fit.
    """
    if isinstance(content, Text):
        plain = shown(content.plain, one_line=one_line)
        if plain == content.plain:
            return content
        out = content.copy()
        out.plain = plain
        return out
    return Text(shown("" if content is None else content, one_line=one_line))


class _SafeText:
    """Text from the workspace: no markup, controls shown (see :func:`safe`); mixed into Textual's widgets."""

    def __init__(self, content: Any = "", **kw: Any) -> None:
        kw.setdefault("markup", False)
        super().__init__(safe(content), **kw)  # type: ignore[call-arg]

    def update(self, content: Any = "", *, layout: bool = True) -> None:
        super().update(safe(content), layout=layout)  # type: ignore[misc]


class Static(_SafeText, widgets.Static):
    """Textual's ``Static`` for text from the workspace."""


class Label(_SafeText, widgets.Label):
    """Textual's ``Label`` for text from the workspace."""


def clip(text: str, width: int) -> str:
    """Text cut to ``width`` cells with an ellipsis; a trailing "(…)" aside goes first; controls shown."""
    text = " ".join(shown(text, one_line=True).split())
    if cell_len(text) > width and text.endswith(")") and " (" in text:
        text = text[: text.rindex(" (")]
    if cell_len(text) <= width:
        return text
    return set_cell_size(text, max(0, width - 1)).rstrip() + "…" if width > 0 else ""


def pad(text: str, width: int) -> str:
    """``text`` padded with spaces to ``width`` terminal cells (wide characters count two)."""
    return text + " " * max(0, width - cell_len(text))


def density_class(density: float) -> int:
    for i, bound in enumerate(BOUNDS):
        if density < bound:
            return i
    return len(BOUNDS)


def density_cell(density: float, width: int = 2) -> Text:
    """A run of one shade glyph (the meaning) in the ramp colour (a help, not the meaning)."""
    k = density_class(density)
    return Text(SHADES[k] * width, style=RAMP[k])


def warmth_bar(warmth: float, width: int = 5) -> Text:
    """Warmth 0-1 as filled and empty blocks plus the number: ``■■■□□ 0.62``."""
    filled = int(round(max(0.0, min(1.0, warmth)) * width))
    bar = Text("■" * filled, style="#e3a33b") + Text("□" * (width - filled), style="#56606e")
    return bar + Text(f" {warmth:.2f}")


def priority_tag(severity: str) -> Text:
    """A finding's mark and the words that say what to do with it (see :data:`mynet.analysis.audit.PRIORITY`)."""
    from ..analysis.audit import PRIORITY  # on first use: the browser's start stays light

    mark, words = PRIORITY.get(severity, PRIORITY["low"])
    style = {"high": "bold #e0784f", "medium": "#c9a44a"}.get(severity, "#8a96a8")
    return Text(f"{mark} {words}", style=style)
