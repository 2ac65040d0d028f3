"""Text from files made safe to store and to show.

Contact exports are written by other programs and sometimes by hostile ones:
a name may hold a terminal escape sequence (``ESC [ 2 J`` clears the screen,
``ESC ] 0 ; ... BEL`` retitles the window), a NUL, a C1 control (``U+009B``
acts like ``ESC [`` in some terminals), a bidirectional override that shows
the rest of a line backwards, or a lone surrogate that cannot be written out
at all. Two functions deal with them, one at each end:

* :func:`clean_imported` runs on every text an importer returns, before it is
  stored: escape sequences are cut out whole and the other control characters
  removed (a name keeps no line breaks either). :func:`clean_result` applies it
  to a whole :class:`mynet.model.ParseResult` and says which lines were changed.
* :func:`shown` runs at the boundary of every view (the command line, the
  terminal browser, the report, the exports): whatever a workspace holds, even
  one written before this cleaning existed, a control character is shown as a
  visible picture (``ESC`` as ``␛``, ``NUL`` as ``␀``, from Unicode's Control
  Pictures block), a C1 control, a bidi control, a lone surrogate and the
  non-characters U+FFFE/U+FFFF as U+FFFD. What comes out holds no character
  below U+0020 but tab and newline, so it is also valid XML 1.0 (its Char
  production: tab, newline, carriage return, U+0020-U+D7FF, U+E000-U+FFFD,
  U+10000-U+10FFFF).

:func:`json_escape` does the same for a JSON document without changing what it
says: the characters :func:`shown` would replace are written as ``\\uXXXX``
escapes, which every JSON reader turns back into the same text (RFC 8259
section 7).

The bidi controls are U+202A-U+202E (embeddings, overrides, pop) and
U+2066-U+2069 (isolates), after Unicode's bidirectional algorithm (UAX #9,
section 2); the marks U+200E/U+200F are harmless and kept.
"""

from __future__ import annotations

import re
from dataclasses import fields, is_dataclass
from pathlib import Path
from typing import Any

__all__ = ["shown", "clean_imported", "clean_result", "json_escape", "needs_cleaning", "BIDI_CONTROLS"]

#: Bidi embedding, override and isolate controls (UAX #9 section 2).
BIDI_CONTROLS = "\u202a\u202b\u202c\u202d\u202e\u2066\u2067\u2068\u2069"
_REPLACEMENT = "\ufffd"
_NAMES = {0x00: "NUL", 0x07: "BEL", 0x08: "BS", 0x0C: "FF", 0x1B: "ESC", 0x7F: "DEL"}

# Escape sequences (ECMA-48): CSI (ESC [ or 8-bit U+009B) parameters, intermediates and a final byte;
# OSC, DCS, SOS, PM and APC strings with their terminator (BEL or ST); any other ESC with the one
# character after it (so an OSC that is never terminated loses its introducer only, not the text after it).
_SEQUENCE = re.compile(
    r"(?:\x1b\[|\x9b)[0-?]*[ -/]*[@-~]?"
    r"|(?:\x1b[\]PX^_]|[\x90\x98\x9d\x9e\x9f])[^\x07\x1b\x9c\n]*(?:\x07|\x1b\\|\x9c)"
    r"|\x1b[ -~]?"
)
_UNSAFE = re.compile("[\x00-\x1f\x7f-\x9f\u2028\u2029\ufffe\uffff\ud800-\udfff" + BIDI_CONTROLS + "]")


def _shown_table(one_line: bool) -> dict[int, str]:
    table = {i: chr(0x2400 + i) for i in range(0x20)}
    table[0x7F] = "\u2421"
    for i in range(0x80, 0xA0):
        table[i] = _REPLACEMENT
    for ch in BIDI_CONTROLS + "\ufffe\uffff":
        table[ord(ch)] = _REPLACEMENT
    for i in range(0xD800, 0xE000):
        table[i] = _REPLACEMENT
    table[0x2028] = table[0x2029] = "\n"
    del table[0x09], table[0x0A]
    if one_line:
        table.update({0x09: " ", 0x0A: " ", 0x2028: " ", 0x2029: " "})
    return table


_SHOWN = _shown_table(False)
_SHOWN_ONE_LINE = _shown_table(True)


def shown(text: Any, *, one_line: bool = False) -> str:
    """``text`` as a string that is safe on a terminal and in any text file.

    Parameters
    ----------
    text : object
        Anything; ``str(text)`` is what is shown.
    one_line : bool
        Also turn tabs and line breaks into spaces (a table cell, a tab title).

    Returns
    -------
    str
        The text with CR LF read as a line break, every other character below
        U+0020 but tab and newline, and DEL, shown as its Control Picture
        (``␛`` for ESC), and C1 controls, bidi controls, lone surrogates and
        U+FFFE/U+FFFF shown as U+FFFD. Safe text comes back unchanged.
    """
    s = text if isinstance(text, str) else str(text)
    if s.isprintable() or not _UNSAFE.search(s):
        return s
    if "\r" in s:
        s = s.replace("\r\n", "\n")
    return s.translate(_SHOWN_ONE_LINE if one_line else _SHOWN)


def needs_cleaning(text: str) -> bool:
    """Whether :func:`clean_imported` would change ``text`` (ignoring line breaks)."""
    return not text.isprintable() and bool(_UNSAFE.search(text.replace("\n", "").replace("\r", "").replace("\t", "")))


def _described(removed: str) -> str:
    names: dict[str, int] = {}
    for ch in removed:
        code = ord(ch)
        if code in _NAMES:
            name = _NAMES[code]
        elif code < 0x20:
            name = f"U+{code:04X}"
        elif 0x80 <= code <= 0x9F:
            name = f"C1 control U+{code:04X}"
        elif ch in BIDI_CONTROLS:
            name = "bidi control"
        else:
            name = f"U+{code:04X}"
        names[name] = names.get(name, 0) + 1
    return ", ".join(n if k == 1 else f"{n} ×{k}" for n, k in names.items())


def clean_imported(text: str, *, multiline: bool = False) -> tuple[str, str]:
    """What an importer may store of ``text``, and what was taken out.

    Parameters
    ----------
    text : str
        A value as decoded from a file.
    multiline : bool
        Keep line breaks and tabs (a note, a street); otherwise they become
        spaces (a name, an address, an organisation).

    Returns
    -------
    tuple of (str, str)
        The cleaned text, and the characters removed as a short description
        (``"ESC ×2, BEL"``), empty when only line breaks or tabs were turned
        into spaces or nothing changed. Escape sequences are removed whole,
        their parameters with them; other control characters, bidi controls,
        lone surrogates and U+FFFE/U+FFFF are removed one by one.
    """
    if text.isprintable():
        return text, ""
    removed: list[str] = []
    if "\x1b" in text or any("\x90" <= ch <= "\x9f" for ch in text):
        def cut(m: re.Match) -> str:
            removed.extend(ch for ch in m.group() if ord(ch) < 0x20 or 0x7F <= ord(ch) <= 0x9F)
            return ""
        text = _SEQUENCE.sub(cut, text)
    if "\r" in text:
        text = text.replace("\r\n", "\n").replace("\r", "\n")
    text = text.replace("\u2028", "\n").replace("\u2029", "\n")
    out = []
    for ch in text:
        code = ord(ch)
        if ch in "\n\t":
            out.append(ch if multiline else " ")
        elif (code < 0x20 or 0x7F <= code <= 0x9F or ch in BIDI_CONTROLS or 0xD800 <= code <= 0xDFFF
              or code in (0xFFFE, 0xFFFF)):
            removed.append(ch)
        else:
            out.append(ch)
    return "".join(out), _described("".join(removed))


#: Fields kept with their line breaks; every other text field is one line.
_MULTILINE = {"notes", "street"}


def _clean_value(value: Any, name: str, found: list[str]) -> Any:
    if isinstance(value, str):
        if value.isprintable():
            return value
        new, what = clean_imported(value, multiline=name in _MULTILINE)
        if what:
            found.append(what)
        return new
    if isinstance(value, list):
        return [_clean_value(v, name, found) for v in value]
    if isinstance(value, dict):  # display names by address: the address is cleaned as the participants are
        return {_clean_value(k, name, found): _clean_value(v, name, found) for k, v in value.items()}
    if is_dataclass(value):
        _clean_object(value, found)
        return value
    return value


_FIELDS: dict[type, tuple[str, ...]] = {}


def _printable_list(values: list) -> bool:
    """A list of strings (or of lists of strings) that needs no cleaning: the quick test before the slow one."""
    flat = []
    for v in values:
        if v.__class__ is str:
            flat.append(v)
        elif v.__class__ is list and all(x.__class__ is str for x in v):
            flat.extend(v)
        else:
            return False
    return "".join(flat).isprintable()


def _clean_object(obj: Any, found: list[str], skip: tuple[str, ...] = ()) -> list[str]:
    """Clean every text field of a dataclass in place; returns the names of the fields changed."""
    changed = []
    names = _FIELDS.get(type(obj))
    if names is None:
        names = _FIELDS[type(obj)] = tuple(f.name for f in fields(obj))
    for name in names:
        if name in skip:
            continue
        value = getattr(obj, name)
        kind = value.__class__
        if kind is str:
            if value.isprintable():
                continue
        elif kind is list:
            if not value or _printable_list(value):
                continue
        elif value is None or kind in (int, float, bool):
            continue
        before = len(found)
        new = _clean_value(value, name, found)
        if new != value:
            setattr(obj, name, new)
        if len(found) > before:
            changed.append(name)
    return changed


_FIELD_WORDS = {"full_name": "the name", "given": "the given name", "family": "the family name",
                "nicknames": "a nickname", "emails": "an e-mail address", "orgs": "an organisation",
                "titles": "a title", "notes": "a note", "title": "the title", "names": "a display name",
                "tags": "a tag", "addresses": "a postal address", "phones": "a phone number",
                "participants": "an e-mail address", "organizer": "the organiser's address",
                "sender": "the sender's address", "key": "the identifier", "thread": "the thread", "uid": "the UID"}

#: At most this many lines are named one by one; the rest are counted.
MAX_LINES_NAMED = 20


def clean_result(result: Any) -> int:
    """Clean the records and interactions of a :class:`~mynet.model.ParseResult` in place.

    Adds one warning per changed record (file and line, what was removed,
    from which fields), at most :data:`MAX_LINES_NAMED` of them and then one
    that counts the rest. Returns how many records and interactions changed.
    """
    name = Path(result.path).name
    changed = 0
    notes: list[str] = []
    for item in [*result.records, *result.interactions]:
        found: list[str] = []
        where = _clean_object(item, found, skip=("source", "kind", "warnings"))
        if not found:
            continue
        changed += 1
        if len(notes) < MAX_LINES_NAMED:
            words = [_FIELD_WORDS.get(w, w.replace("_", " ")) for w in where]
            what = "; ".join(dict.fromkeys(found))
            notes.append(f"{shown(name, one_line=True)}:{item.line}: removed control characters ({what}) from "
                         f"{', '.join(words)}; they could act on a terminal")
    if changed > len(notes):
        notes.append(f"{shown(name, one_line=True)}: {changed - len(notes)} more record(s) had control characters "
                     f"removed")
    result.warnings.extend(notes)
    return changed


def json_escape(document: str) -> str:
    """A JSON document with every character :func:`shown` would replace written as a ``\\uXXXX`` escape.

    JSON's own writer escapes U+0000-U+001F already; this adds DEL, the C1
    controls, the bidi controls, U+2028/U+2029, U+FFFE/U+FFFF and lone
    surrogates. The document means exactly the same (RFC 8259 section 7).
    """
    if document.isascii() and "\x7f" not in document:
        return document
    return _JSON_EXTRA.sub(lambda m: f"\\u{ord(m.group()):04x}", document)


_JSON_EXTRA = re.compile("[\x7f-\x9f\u2028\u2029\ufffe\uffff\ud800-\udfff" + BIDI_CONTROLS + "]")
