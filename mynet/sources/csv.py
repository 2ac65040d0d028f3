"""CSV importer: one :class:`mynet.model.Record` per data row of a contact table.

The first non-empty row holds the column names. Columns are matched to record
fields by common header words (case, accents, spaces, punctuation and column
numbers ignored; English plus a few words of German, French, Spanish, Italian,
Dutch and Portuguese). Cell text is kept exactly as the file has it, except
that surrounding whitespace is stripped; nothing is normalised or neutralised.

Mappable fields
---------------
``--map FIELD=COLUMN`` (the ``mapping`` argument) accepts these field names
(also exported as :data:`MAPPABLE_FIELDS`):

* record fields: ``uid``, ``full_name``, ``given``, ``family``, ``additional``,
  ``prefix``, ``suffix``, ``nicknames``, ``emails``, ``phones``, ``orgs``,
  ``org_units``, ``titles``, ``roles``, ``tags``, ``notes``, ``urls``, ``related``;
* short names: ``name`` (= full_name), ``first`` (= given), ``middle``
  (= additional), ``last`` (= family), ``nickname``, ``email``, ``phone``,
  ``org``, ``unit`` (= org_units, a department), ``title``, ``role``, ``tag``,
  ``note``, ``url``;
* address parts: ``street``, ``locality``, ``region``, ``postcode``, ``country``.

For single-valued fields (names, uid, address parts) a mapped column replaces
the columns found automatically for that field; for list fields (e-mails,
phones, ...) it is added to them. Columns naming a past employer ("previous
company", "former employer") are deliberately left unmapped and reported.

Multi-valued cells are split: tags on ``;``, ``,``, ``|`` and `` ::: ``;
e-mails on ``;``, ``,`` and `` ::: ``; phones on ``;`` and `` ::: ``; URLs on
`` ::: ``. Other cells are kept whole.

Broken files
------------
Bytes are decoded and rows read by :mod:`mynet.sources.csv_text` (bad bytes
become U+FFFD with a warning naming their lines; a cell too large for the
reader skips its row only). A quoted field may hold line breaks (RFC 4180
section 2, rule 6); but a row whose quote is never closed, or closes on a
later line after swallowing what reads as whole rows (the row then does not
fit the header, or a line break sits in a one-line column such as a name),
is read again line by line, with a warning naming the lines, so no row it
swallowed is lost.
"""

from __future__ import annotations

import csv as _csv
import json
import re
import unicodedata
from dataclasses import dataclass
from itertools import islice
from pathlib import Path
from typing import Callable

from ..errors import InputError, RecordError
from ..lazy import lazy_module
from ..model import Address, ParseResult, Record, Related, Skipped
from .csv_headers import BLOCK as _BLOCK
from .csv_headers import QUALIFIERS as _QUALIFIERS
from .csv_headers import SUFFIX_OK as _SUFFIX_OK
from .csv_headers import SYNONYM_TEXT as _SYNONYM_TEXT
from .csv_text import NEWLINE, Lines, RawRow, decode_table, read_rows

pd = lazy_module("pandas")

__all__ = ["parse_csv", "load_mapping_file", "classify_header", "MAPPABLE_FIELDS"]

_SCALAR = ("uid", "full_name", "given", "family", "additional", "prefix", "suffix")
_LIST = ("nicknames", "emails", "phones", "orgs", "org_units", "titles", "roles", "tags", "notes", "urls", "related")
_ADDRESS = ("street", "locality", "region", "postcode", "country")
_ALIASES = {
    "name": "full_name", "first": "given", "middle": "additional", "last": "family", "nickname": "nicknames",
    "email": "emails", "phone": "phones", "org": "orgs", "unit": "org_units", "title": "titles", "role": "roles",
    "tag": "tags", "note": "notes", "url": "urls",
}
#: Field names accepted by ``--map FIELD=COLUMN`` and in a mapping file.
MAPPABLE_FIELDS: tuple[str, ...] = tuple(sorted({*_SCALAR, *_LIST, *_ADDRESS, *_ALIASES}))
_NOT_MAPPABLE = ("kind", "source", "index", "line", "addresses", "card_kind", "members", "version", "warnings")
_IDENTIFYING = {"full_name", "given", "family", "additional", "nicknames", "emails", "phones"}

_CHUNK_ROWS = 2000


def detect_delimiter(text: str) -> tuple[str, int, int]:
    """Choose the delimiter among comma, semicolon, tab and pipe.

    An Excel-style first line ``sep=X`` decides when present. Otherwise each
    candidate parses the first rows (quotes respected); candidates that split
    the header into fewer than two columns drop out, and the one whose data
    rows most often have the header's width wins (then the wider header, then
    the order above).

    Returns
    -------
    tuple of (str, int, int)
        The delimiter, the text offset where the table starts and its 1-based line.
    """
    hint = re.match(r"[ \t]*sep=([^\r\n])[ \t]*(?:\r\n|\r|\n|$)", text, re.IGNORECASE)
    if hint:
        return hint.group(1), hint.end(), 2
    sample = text[:65536]
    best: tuple[tuple[float, int, int], str] | None = None
    for order, delimiter in enumerate(",;\t|"):
        widths: list[int] = []
        try:
            for cells in _csv.reader(Lines(sample), delimiter=delimiter, skipinitialspace=True):
                if any(c.strip() for c in cells):
                    widths.append(len(cells))
                if len(widths) >= 40:
                    break
        except _csv.Error:
            continue
        if len(text) > len(sample) and len(widths) > 2:
            widths.pop()  # the sample may cut the last row short
        if not widths or widths[0] < 2:
            continue
        rest = widths[1:]
        agree = sum(w == widths[0] for w in rest) / len(rest) if rest else 1.0
        score = (agree, widths[0], -order)
        if best is None or score > best[0]:
            best = (score, delimiter)
    return (best[1] if best else ","), 0, 1


def _tokens(text: str) -> list[str]:
    """Lower-case, accent-free word tokens of a header, without column numbers."""
    folded = unicodedata.normalize("NFKD", text.casefold())
    folded = "".join(ch for ch in folded if not unicodedata.combining(ch))
    folded = re.sub(r"(?<=[^\W\d_])(?=\d)|(?<=\d)(?=[^\W\d_])", " ", folded)
    return [t for t in re.split(r"[\W_]+", folded) if t and not t.isdigit()]


def _build_synonyms() -> dict[str, str]:
    table: dict[str, str] = {}
    for slot, text in _SYNONYM_TEXT.items():
        for phrase in text.split("|"):
            table.setdefault("".join(_tokens(phrase)), slot)
    return table


_SYNONYMS = _build_synonyms()


def classify_header(header: str) -> tuple[str, str] | None:
    """Match a column header to a record slot.

    Parameters
    ----------
    header : str
        The column name as the file gives it.

    Returns
    -------
    tuple of (str, str) or None
        The slot (a record field name or an address part) and an address type
        (``"home"``, ``"work"``, ``"other"`` or ``""``), or None when the header
        names nothing mynet uses.
    """
    toks = _tokens(header)
    slot = _SYNONYMS.get("".join(toks))
    if slot:
        return slot, ""
    if not toks or _BLOCK.intersection(toks):
        return None
    kind = next((_QUALIFIERS[t] for t in toks if _QUALIFIERS.get(t)), "")
    rest = [t for t in toks if t not in _QUALIFIERS]
    if rest and len(rest) < len(toks):
        slot = _SYNONYMS.get("".join(rest))
        if slot:
            return slot, kind
    for start in range(1, len(rest)):
        slot = _SYNONYMS.get("".join(rest[start:]))
        if slot in _SUFFIX_OK:
            return slot, kind
    return None


def _field_slot(field_name: str) -> str | None:
    """The slot for a mappable field name, or None when it is not one."""
    name = field_name.strip().lower()
    if name in _ALIASES:
        return _ALIASES[name]
    if name in _SCALAR or name in _LIST or name in _ADDRESS:
        return name
    return None


def _unknown_field_reason(field_name: str) -> str:
    fields_list = ", ".join(MAPPABLE_FIELDS)
    name = field_name.strip()
    if name.lower() in _NOT_MAPPABLE:
        return (f"field {name!r} is set by the importer and cannot be mapped to a column; "
                f"mappable fields are: {fields_list}")
    return f"unknown field {name!r} in a column mapping; mappable fields are: {fields_list}"


def load_mapping_file(path: str | Path) -> dict[str, str]:
    """Read a column mapping file: ``field = Column`` lines or one JSON object.

    Blank lines and lines starting with ``#`` are ignored. A column name may be
    wrapped in double quotes to keep surrounding spaces.

    Parameters
    ----------
    path : path-like
        The mapping file (UTF-8).

    Returns
    -------
    dict of str to str
        Field name -> column header, as ``parse_csv(mapping=...)`` takes it.

    Raises
    ------
    InputError
        When the file cannot be read, is not a mapping, names an unknown field,
        names a field twice or has a line without ``=``; the message names the line.
    """
    path = str(path)
    try:
        text = Path(path).read_bytes().decode("utf-8-sig")
    except OSError as exc:
        raise InputError(path, f"cannot be read ({exc.strerror})") from exc
    except UnicodeDecodeError as exc:
        raise InputError(path, f"is not UTF-8 text (bad byte at offset {exc.start})") from exc
    if text.lstrip().startswith(("{", "[")):
        try:
            obj = json.loads(text)
        except json.JSONDecodeError as exc:
            raise InputError(path, f"is not valid JSON ({exc.msg})", exc.lineno) from exc
        if not isinstance(obj, dict):
            raise InputError(path, "must hold one JSON object of field: column pairs")
        result: dict[str, str] = {}
        for key, value in obj.items():
            if not isinstance(value, str) or not value.strip():
                raise InputError(path, f"field {key!r} must map to a column name (a non-empty string)")
            if _field_slot(key) is None:
                raise InputError(path, _unknown_field_reason(key))
            result[key.strip().lower()] = value
        return result
    result = {}
    for lineno, raw in enumerate(text.splitlines(), start=1):
        line = raw.strip()
        if not line or line.startswith("#"):
            continue
        if "=" not in line:
            raise InputError(path, f"expected 'field = Column', got {line!r}", lineno)
        key, _, column = (part.strip() for part in line.partition("="))
        if len(column) >= 2 and column[0] == column[-1] == '"':
            column = column[1:-1]
        if not key or not column:
            raise InputError(path, f"expected 'field = Column', got {line!r}", lineno)
        if _field_slot(key) is None:
            raise InputError(path, _unknown_field_reason(key), lineno)
        if key.lower() in result:
            raise InputError(path, f"field {key!r} is mapped twice", lineno)
        result[key.lower()] = column
    if not result:
        raise InputError(path, "holds no 'field = Column' lines")
    return result


@dataclass
class _Column:
    pos: int
    slot: str
    kind: str = ""  # address type


def _plan_columns(header: list[str], mapping: dict[str, str] | None, path: str) -> tuple[list[_Column], list[str]]:
    """Decide which column feeds which slot; return the plan and the unused headers."""
    auto: list[_Column] = []
    for pos, name in enumerate(header):
        found = classify_header(name) if name else None
        if found:
            auto.append(_Column(pos, *found))
    chosen: list[_Column] = []
    listed = ", ".join(repr(h) for h in header if h) or "(none)"
    for field_name, column in (mapping or {}).items():
        slot = _field_slot(field_name)
        if slot is None:
            raise InputError(path, _unknown_field_reason(field_name))
        pos = _find_column(header, column)
        if pos is None:
            reason = f"--map {field_name}={column}: no column named {column!r}; the columns are: {listed}"
            raise InputError(path, reason)
        auto = [c for c in auto if c.pos != pos and (slot in _LIST or c.slot != slot)]
        chosen.append(_Column(pos, slot))
    plan = sorted(auto + chosen, key=lambda c: c.pos)
    used = {c.pos for c in plan}
    unused = [h for pos, h in enumerate(header) if h and pos not in used]
    return plan, unused


def _find_column(header: list[str], column: str) -> int | None:
    if column in header:
        return header.index(column)
    loose = [i for i, h in enumerate(header) if h.casefold() == column.strip().casefold()]
    return loose[0] if len(loose) == 1 else None


def _splitter(slot: str) -> Callable[[str], list[str]]:
    pattern = {
        "tags": r"\s*(?::::|[;,|])\s*",
        "emails": r"\s*(?::::|[;,])\s*",
        "phones": r"\s*(?::::|;)\s*",
        "urls": r"\s+:::\s+",
    }.get(slot)
    if pattern is None:
        return lambda cell: [cell]
    regex = re.compile(pattern)
    return lambda cell: [part for part in regex.split(cell) if part]


def _build_record(values: list[str], plan: list[_Column], splitters: dict[str, Callable[[str], list[str]]],
                  path: str, index: int, line: int) -> Record:
    """Fill one record from a row's stripped cells following the column plan."""
    rec = Record(kind="csv", source=path, index=index, line=line)
    addresses: dict[str, Address] = {}
    units: list[str] = []
    for col in plan:
        cell = values[col.pos]
        if not cell:
            continue
        slot = col.slot
        if slot in _SCALAR:
            if not getattr(rec, slot):
                setattr(rec, slot, cell)
        elif slot in _ADDRESS:
            addr = addresses.setdefault(col.kind, Address(types=[col.kind] if col.kind else []))
            old = getattr(addr, slot)
            setattr(addr, slot, f"{old}, {cell}" if old and slot == "street" else old or cell)
        elif slot == "org_units":
            units.append(cell)
        elif slot == "related":
            rec.related.append(Related(cell))
        else:
            target = getattr(rec, slot)
            for part in splitters[slot](cell):
                if part not in target:
                    target.append(part)
    rec.addresses = [a for a in addresses.values() if not a.is_empty()]
    if units:
        if rec.orgs:
            rec.org_units = [units] + [[] for _ in rec.orgs[1:]]
        else:
            rec.warnings.append(f"department {', '.join(units)!r} given without a company; not kept")
    elif rec.orgs:
        rec.org_units = [[] for _ in rec.orgs]
    return rec


def _has_identity(rec: Record) -> bool:
    return any(getattr(rec, slot) for slot in _IDENTIFYING)


def parse_csv(data: bytes, path: str, *, strict: bool = False, mapping: dict[str, str] | None = None) -> ParseResult:
    """Parse a CSV contact export into records.

    Parameters
    ----------
    data : bytes
        The whole file. The encoding is detected (BOM, else UTF-8, else cp1252,
        else latin-1), as is the delimiter (comma, semicolon, tab or pipe; an
        Excel ``sep=X`` first line is honoured).
    path : str
        The file's path, used in records and messages.
    strict : bool
        Raise :class:`mynet.errors.RecordError` at the first row that would be
        skipped (wrong number of cells, no name/e-mail/phone, unclosed quote).
    mapping : dict of str to str, optional
        Field name -> column header overrides (see the module docstring).

    Returns
    -------
    ParseResult
        ``kind="csv"``; one record per data row, ``index`` counting non-blank
        data rows from 0 and ``line`` the 1-based physical line where the row
        starts. Blank rows are ignored; unused columns are named in ``warnings``.

    Raises
    ------
    InputError
        When the file cannot be decoded, has no header row, a mapping names an
        unknown field or column, or no column gives a name, e-mail or phone.
    """
    result = ParseResult(path=path, kind="csv")
    text, _encoding, notes = decode_table(data, path)
    result.warnings.extend(notes)
    delimiter, start, first_line = detect_delimiter(text)
    rows = read_rows(text, start, delimiter, first_line, path)
    header_line, header = 0, []
    for row in rows:
        header_line = row.line
        if row.problem:
            raise InputError(path, f"the header row cannot be read: {row.problem}", row.line)
        if row.unclosed:
            raise InputError(path, "a quote opened in the header row is never closed", header_line)
        if any(c.strip() for c in row.cells):
            header = [c.strip() for c in row.cells]
            break
    if not header:
        raise InputError(path, "has no header row (the first non-empty row must name the columns)")
    plan, unused = _plan_columns(header, mapping, path)
    if not any(c.slot in _IDENTIFYING for c in plan):
        found = ", ".join(repr(h) for h in header if h) or "(none)"
        hint = ""
        if any("@" in h for h in header):
            hint = " The first row looks like data, not column names: add a header row."
        raise InputError(
            path,
            f"no column gives a name, e-mail or phone (columns found: {found}).{hint} "
            "Say which column holds one with --map, e.g. --map name=COLUMN or --map email=COLUMN",
            header_line,
        )
    if unused:
        names = ", ".join(repr(h) for h in unused)
        result.warnings.append(f"columns not used: {names} (use --map FIELD=COLUMN to import one)")
    rows_out = _Rows(header, plan, path, strict, result, delimiter)
    while chunk := list(islice(rows, _CHUNK_ROWS)):
        rows_out.add_chunk(chunk)
    return result


#: Slots whose cells may hold line breaks (RFC 4180 allows them in any quoted field; these are where
#: exports put them). A line break in any other column hints at a quote that swallowed rows.
_MULTILINE_SLOTS = frozenset({"notes", "street"})


class _Rows:
    """Turns chunks of rows (:class:`~mynet.sources.csv_text.RawRow`) into records and skips, in file order."""

    def __init__(self, header: list[str], plan: list[_Column], path: str, strict: bool, result: ParseResult,
                 delimiter: str = ","):
        self.width = len(header)
        self.named_width = max(i for i, h in enumerate(header) if h) + 1
        self.plan, self.path, self.strict, self.result = plan, path, strict, result
        self.delimiter = delimiter
        self.splitters = {c.slot: _splitter(c.slot) for c in plan}
        self.single_line = {c.pos for c in plan if c.slot not in _MULTILINE_SLOTS}
        self.identifying = [c.pos for c in plan if c.slot in _IDENTIFYING]
        self.index = 0

    def skip(self, line: int, reason: str) -> None:
        if self.strict:
            raise RecordError(self.path, reason, line)
        self.result.skipped.append(Skipped(self.path, line, reason, self.index))
        self.index += 1

    def fit(self, cells: list[str]) -> list[str] | None:
        """The cells padded or trimmed to the header's width, or None when the row does not fit it."""
        width = self.width
        if len(cells) > width and not any(c.strip() for c in cells[width:]):
            cells = cells[:width]
        elif self.named_width <= len(cells) < width:
            cells = cells + [""] * (width - len(cells))
        return cells if len(cells) == width else None

    # -- a quote that swallows rows -------------------------------------------------
    def _swallowing(self, row: RawRow) -> bool:
        """Whether a row spanning several lines looks like rows merged by a stray quote.

        RFC 4180 (section 2, rule 6) lets a quoted field hold line breaks, so a
        multi-line row alone is fine. It is suspect when its quote is never
        closed, when it does not fit the header, or when a line break sits in
        a column that holds one line (a name, an address, a number).
        """
        if row.unclosed:
            return True
        fitted = self.fit(row.cells)
        if fitted is None:
            return True
        return any(("\n" in c or "\r" in c) for pos, c in enumerate(fitted) if pos in self.single_line)

    def _alone(self, text: str) -> list[str] | None:
        """One physical line read as a row of its own; the quote that does not pair up is read as a stray mark."""
        if text.count('"') % 2:
            return self.fit([c.strip().strip('"') for c in text.split(self.delimiter)])
        cells = next(_csv.reader([text], delimiter=self.delimiter, skipinitialspace=True), [])
        return self.fit(cells) if cells else []

    def split_swallowed(self, row: RawRow) -> list[tuple[int, list[str] | None]] | None:
        """The physical lines of a swallowing row as rows of their own, or None when they do not look like rows.

        Every non-blank line must read alone as a row of the header's width,
        and a line after the first must give a name, e-mail or phone;
        otherwise the row is left as the reader gave it (a quoted field whose
        lines happen to hold delimiters is not torn apart).
        """
        physical = NEWLINE.split(row.raw)
        if physical and physical[-1] == "":
            physical.pop()
        parts = [(row.line + k, self._alone(text)) for k, text in enumerate(physical)]
        if any(cells is None for _ln, cells in parts):
            return None
        if not any(cells and any(cells[p].strip() for p in self.identifying) for _ln, cells in parts[1:] or parts):
            return None
        return parts

    def _expand(self, chunk: list[RawRow]) -> list[tuple[int, list[str] | None, str]]:
        """(line, cells or None, reason) per row, swallowing rows split back into their lines."""
        out: list[tuple[int, list[str] | None, str]] = []
        for row in chunk:
            if row.problem:
                out.append((row.line, None, row.problem))
                continue
            if row.raw and self._swallowing(row):
                parts = self.split_swallowed(row)
                how = "is never closed" if row.unclosed else f"closes only on line {row.end}"
                if parts is not None:
                    if len(parts) == 1:
                        reason = f"line {row.line}: a quote opened in this row is never closed; it was read as text"
                    else:
                        reason = (f"lines {row.line}-{row.end}: a quote opened on line {row.line} {how}, which would "
                                  f"have merged {len(parts)} lines into one row; each line was read as a row of its "
                                  "own")
                    if self.strict:
                        raise RecordError(self.path, reason.split(": ", 1)[1], row.line)
                    self.result.warnings.append(reason)
                    out.extend((line, cells, "") for line, cells in parts)
                    continue
                if row.unclosed:
                    out.append((row.line, None,
                                f"a quote opened in this row is never closed, so lines {row.line}-{row.end} "
                                                "were read as one row"))
                    continue
            out.append((row.line, row.cells, ""))
        return out

    def add_chunk(self, chunk: list[RawRow]) -> None:
        # Ragged, unreadable and unclosed rows are decided here; rows of the header's width go to one
        # frame for the column-wise work (strip, blank rows), then become records.
        width, verdicts, framed = self.width, [], []
        for line, cells, problem in self._expand(chunk):
            if cells is None:
                verdicts.append((line, problem))
                continue
            fitted = self.fit(cells)
            if fitted is not None:
                verdicts.append((line, None))
                framed.append(fitted)
            elif any(c.strip() for c in cells):
                verdicts.append((line, f"row has {len(cells)} cells but the header has {self.named_width}"))
        if not verdicts:
            return
        frame = pd.DataFrame(framed, columns=range(width), dtype=object).map(str.strip)
        rows = iter(zip(frame.to_numpy().tolist(), frame.ne("").any(axis=1).tolist()))
        for line, reason in verdicts:
            if reason is not None:
                self.skip(line, reason)
                continue
            cells, non_blank = next(rows)
            if not non_blank:
                continue
            rec = _build_record(cells, self.plan, self.splitters, self.path, self.index, line)
            if not _has_identity(rec):
                self.skip(line, "row has no name, e-mail or phone")
                continue
            self.result.records.append(rec)
            self.index += 1
