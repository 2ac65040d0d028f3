"""The text layer of the CSV importer: bytes to text, text to rows with their physical lines.

Kept apart from :mod:`mynet.sources.csv` (rows to records), as the vCard
and iCalendar importers keep theirs:

* :func:`decode_table` picks the encoding (a byte-order mark, a BOM-less
  UTF-16 pattern, UTF-8, else cp1252 or latin-1). A file that is UTF-8 but
  for a few bad bytes is not refused nor re-read as cp1252: each bad byte
  becomes U+FFFD and a warning names its line, so every other row keeps its
  text (the same for UTF-16 and UTF-32 with a BOM).
* :func:`read_rows` runs the standard library's CSV reader (RFC 4180 quoting:
  a quoted field may hold the delimiter, doubled quotes and line breaks) and
  yields each row with the physical lines it spans. A row the reader cannot
  take (a cell larger than the reader's field limit, 128 KiB) is reported
  with its line and skipped, up to the end of its record; the rows after it
  are read as usual.
"""

from __future__ import annotations

import codecs
import csv as _csv
import re
from typing import Iterator, NamedTuple

from ..errors import InputError

__all__ = ["decode_table", "read_rows", "Lines", "RawRow", "NEWLINE", "FIELD_LIMIT"]

NEWLINE = re.compile(r"\r\n|\r|\n")
#: The standard library reader's limit on one cell (``csv.field_size_limit()``, 128 KiB by default).
FIELD_LIMIT = _csv.field_size_limit()
#: Lines with bad bytes named one by one in the warning (the rest are counted).
MAX_LINES_NAMED = 12


class Lines:
    """Lazily iterate the lines of ``text`` from ``start``, ends kept.

    ``pos`` is the next line's offset and ``count`` how many lines were given.
    """

    def __init__(self, text: str, start: int = 0):
        self.text = text
        self.pos = start
        self.count = 0

    def __iter__(self) -> "Lines":
        return self

    def __next__(self) -> str:
        text, pos = self.text, self.pos
        if pos >= len(text):
            raise StopIteration
        match = NEWLINE.search(text, pos)
        self.pos = match.end() if match else len(text)
        self.count += 1
        return text[pos:self.pos]


def _looks_utf16(head: bytes) -> str | None:
    """Name a BOM-less UTF-16 byte order when every other byte is mostly NUL."""
    if len(head) < 4:
        return None
    even, odd = head[0::2], head[1::2]
    if head[0] and not head[1] and odd.count(0) >= 0.3 * len(odd) and even.count(0) <= 0.05 * len(even):
        return "utf-16-le"
    if head[1] and not head[0] and even.count(0) >= 0.3 * len(even) and odd.count(0) <= 0.05 * len(odd):
        return "utf-16-be"
    return None


# Undecodable bytes are first decoded as this non-character, so their places can be found in the
# text (then shown as U+FFFD); a stateless handler, safe in any thread.
_MARK = "\U0010fffe"
codecs.register_error("mynet-mark", lambda exc: (_MARK, exc.end))


def _decode_replacing(body: bytes, encoding: str) -> tuple[str, list[int]]:
    """Decode ``body``, each undecodable run as U+FFFD; also the text offsets of the replacements."""
    try:
        return body.decode(encoding), []
    except UnicodeDecodeError:
        pass
    text = body.decode(encoding, errors="mynet-mark")
    bad = [m.start() for m in re.finditer(_MARK, text)]
    return text.replace(_MARK, "\ufffd"), bad


def _lines_of(text: str, offsets: list[int]) -> list[int]:
    """1-based line numbers of sorted text offsets (CR, LF and CR LF all end a line)."""
    out, line, last = [], 1, 0
    for off in offsets:
        line += len(NEWLINE.findall(text, last, off))
        last = off
        out.append(line)
    return out


def _bad_bytes_note(text: str, bad: list[int], encoding: str) -> str:
    lines = sorted(set(_lines_of(text, bad)))
    named = ", ".join(map(str,
                          lines[:MAX_LINES_NAMED])) + (f" and {len(lines) - MAX_LINES_NAMED} more"
                                                       if len(lines) > MAX_LINES_NAMED else "")
    return (f"line{'s' if len(lines) > 1 else ''} {named}: bytes that are not valid {encoding.upper()} were replaced "
            f"by "
            "U+FFFD (the rest of each row was kept; export the file again if a name looks wrong)")


def decode_table(data: bytes, path: str) -> tuple[str, str, list[str]]:
    """Decode a table file's bytes.

    A byte-order mark decides first (UTF-8, UTF-16, UTF-32); then a BOM-less
    UTF-16 pattern; then UTF-8, when the file reads as UTF-8 but for fewer bad
    bytes than it has valid non-ASCII characters; then cp1252 when every byte
    decodes, else latin-1 (which always does). Bad bytes in a file read as
    UTF-8, UTF-16 or UTF-32 become U+FFFD, one warning naming their lines.

    Returns
    -------
    tuple of (str, str, list of str)
        The text (without BOM), the encoding used, and notes for the user
        (a guessed encoding, replaced bytes).
    """
    boms = (
        (codecs.BOM_UTF32_LE, "utf-32-le"), (codecs.BOM_UTF32_BE, "utf-32-be"), (codecs.BOM_UTF8, "utf-8"),
        (codecs.BOM_UTF16_LE, "utf-16-le"), (codecs.BOM_UTF16_BE, "utf-16-be"),
    )
    encoding, body, notes = "", data, []
    for bom, name in boms:
        if data.startswith(bom):
            encoding, body = name, data[len(bom):]
            break
    if not encoding:
        encoding = _looks_utf16(data[:4096]) or ""
        if encoding:
            notes.append(f"no byte-order mark; read as {encoding.upper()}")
    if encoding:
        text, bad = _decode_replacing(body, encoding)
        if bad:
            notes.append(_bad_bytes_note(text, bad, encoding))
        return text, encoding, notes
    text, bad = _decode_replacing(data, "utf-8")
    if not bad:
        return text, "utf-8", notes
    if len(bad) < sum(1 for ch in text if ch > "\x7f" and ch != "\ufffd"):
        notes.append(_bad_bytes_note(text, bad, "utf-8"))
        return text, "utf-8", notes
    try:
        text, encoding = data.decode("cp1252"), "cp1252"
    except UnicodeDecodeError:
        text, encoding = data.decode("latin-1"), "latin-1"  # decodes every byte
    notes.append(f"not UTF-8; read as {encoding} (if names look wrong, export the file again as UTF-8)")
    return text, encoding, notes


class RawRow(NamedTuple):
    """One row as the CSV reader gave it, with where it sits in the file.

    ``raw`` is the row's text when it spans more than one physical line or
    leaves a quote open (``""`` otherwise); ``unclosed`` says a quote opened in it is never
    closed; ``problem`` says why the reader could not take it (``cells`` is
    then empty and the row is skipped).
    """

    line: int
    end: int
    cells: list[str]
    raw: str = ""
    unclosed: bool = False
    problem: str = ""


def _record_end(text: str, start: int, quote: str = '"') -> int:
    """Offset just past the record starting at ``start``: the first line end outside quotes (RFC 4180 section 2)."""
    quoted = False
    i = start
    n = len(text)
    while i < n:
        ch = text[i]
        if ch == quote:
            quoted = not quoted
        elif not quoted and ch in "\r\n":
            return i + (2 if text.startswith("\r\n", i) else 1)
        i += 1
    return n


def read_rows(text: str, start: int, delimiter: str, first_line: int, path: str) -> Iterator[RawRow]:
    """Yield every row from offset ``start`` (1-based line ``first_line``); blank lines give empty cells.

    Raises
    ------
    InputError
        Only for a reader error other than an oversized cell (none is known
        with the settings used here); the message names the line.
    """
    lines = Lines(text, start)
    reader = _csv.reader(lines, delimiter=delimiter, quotechar='"', doublequote=True, skipinitialspace=True)
    offset = first_line - 1
    while True:
        before, row_start = lines.count, lines.pos
        try:
            cells = next(reader)
        except StopIteration:
            return
        except _csv.Error as exc:
            if "field limit" not in str(exc):
                raise InputError(path, f"cannot be read as CSV ({exc})", offset + lines.count) from exc
            end = _record_end(text, row_start)
            while lines.pos < end:
                next(lines)
            yield RawRow(offset + before + 1, offset + lines.count, [], problem=(
                f"a cell is larger than {FIELD_LIMIT // 1024} KiB, too large for a contact field; the row was skipped"))
            continue
        last = offset + lines.count
        unclosed = (lines.pos >= len(text) and text.find('"', row_start) >= 0
                    and _quote_left_open(text[row_start:lines.pos], delimiter))
        raw = text[row_start:lines.pos] if lines.count - before > 1 or unclosed else ""
        yield RawRow(offset + before + 1, last, cells, raw, unclosed)


def _quote_left_open(row_text: str, delimiter: str) -> bool:
    """True when the last row of a file opens a quoted cell it never closes."""
    try:
        list(_csv.reader(Lines(row_text), delimiter=delimiter, skipinitialspace=True, strict=True))
    except _csv.Error as exc:
        return "unexpected end of data" in str(exc)
    return False
