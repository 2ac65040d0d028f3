"""The text layer of the vCard importer: bytes to cards of decoded properties.

Kept apart from :mod:`mynet.sources.vcard` (properties to records). This
pre-pass decides what text the content-line parser of vobject sees, because
vobject 0.9.9 loses text on many real exports:

* the file is read as bytes; a UTF-8 byte-order mark is dropped, UTF-16 is
  decoded, ``\\r+\\n`` (CR CR LF from some phones) and classic CR-only line ends
  are understood, also mixed within one file (once a lone CR ends a BEGIN, END or
  VERSION line, every lone CR ends a line, as in a CR-only file);
* physical lines are joined into logical lines on bytes: folding (a line that
  starts with a space or tab), quoted-printable soft breaks (a line that ends
  with ``=``, whose continuation need not start with whitespace, even when it
  starts with ``#``), a trailing backslash followed by a line that is not a
  property, and base64 lines that are not indented;
* the file is split into ``BEGIN:VCARD``/``END:VCARD`` blocks here (nested
  blocks too), so one bad card never loses the rest; BEGIN/END lines are
  matched without regard to case or surrounding spaces;
* each logical line goes through :func:`vobject.base.parseLine` (name, group,
  parameters, value) once a linear-time check has shown that its header is
  well formed (the vobject regular expression backtracks for a very long time
  on some malformed headers);
* values are decoded by us: quoted-printable, then UTF-8 when valid, else the
  line's CHARSET (SHIFT_JIS read as cp932, ISO-8859-1 and US-ASCII as cp1252),
  else one guess for the whole file (see :func:`guess_encoding`);
* parameter values get the RFC 6868 ``^n ^' ^^`` escapes undone;
* PHOTO, LOGO, SOUND and KEY values are neither kept nor decoded.

Escapes inside values (``\\,`` ``\\;`` ...) are left alone: they depend on the
vCard version and on the property, and are undone by the record layer.
"""

from __future__ import annotations

import base64
import binascii
import codecs
import logging
import re
from dataclasses import dataclass, field

import vobject.base

from ..errors import InputError

__all__ = ["Card", "Prop", "Scan", "decode_bytes", "guess_encoding", "read_cards"]

BOM = b"\xef\xbb\xbf"
MEDIA = frozenset({"PHOTO", "LOGO", "SOUND", "KEY"})
#: Parameters that 2.1 writes without a name but that are not TYPE values.
NOT_TYPES = frozenset({"QUOTED-PRINTABLE", "BASE64", "B", "8BIT", "7BIT", "INLINE", "URL", "CONTENT-ID", "CID"})
MAX_NESTING = 32

_BEGIN_END = re.compile(rb"^(BEGIN|END)[ \t]*:[ \t]*([A-Za-z0-9_-]+)[ \t]*$", re.IGNORECASE)
# A lone CR before a BEGIN, END or VERSION line: the file ends some of its lines with CR alone.
_CR_LINE_ENDS = re.compile(rb"\r[ \t]*(?:BEGIN|END|VERSION)[ \t]*:", re.IGNORECASE)
_NAME_START = re.compile(rb"^(?:[A-Za-z0-9_-]+\.)?([A-Za-z0-9_-]+)")
_PROPERTY_START = re.compile(rb"^(?:[A-Za-z0-9_-]+\.)?[A-Za-z0-9_-]+(?:;[^:\n]*)?:")
_B64_LINE = re.compile(rb"^[A-Za-z0-9+/=]+$")
_QP_IN_HEADER = re.compile(rb"(?:^|[;,=])[ \t]*QUOTED-PRINTABLE[ \t]*(?:$|[;,])", re.IGNORECASE)
_CHARSET_IN_HEADER = re.compile(rb"CHARSET[ \t]*=[ \t]*\"?([^;:,\"]+)", re.IGNORECASE)
_B64_IN_HEADER = re.compile(rb"(?:ENCODING[ \t]*=[ \t]*\"?(?:B|BASE64)\"?|;[ \t]*BASE64)[ \t]*(?:$|[;,])",
                            re.IGNORECASE)
_QP_HEX = re.compile(rb"=([0-9A-Fa-f]{2})")
_RFC6868 = re.compile(r"\^(.)", re.DOTALL)

# The content-line grammar vobject accepts, written with atomic groups so that
# checking a header takes linear time. Only headers that pass go to vobject.
_NAME = rb"[A-Za-z0-9_-]+"
_PVALUE = rb'(?:"[^"]*"|[^";:,]*)'
_PARAM = rb";" + _NAME + rb"(?>(?:=" + _PVALUE + rb")?(?:," + _PVALUE + rb")*)"
_HEADER = re.compile(rb"(?>(?:" + _NAME + rb"\.)?" + _NAME + rb")(?>" + _PARAM + rb")*")

_CHARSET_ALIASES = {name: "cp932" for name in ("SHIFT_JIS", "SHIFT-JIS", "SJIS", "X-SJIS", "MS_KANJI", "WINDOWS-31J")}
_CHARSET_ALIASES.update({name: "cp1252"
                         for name in ("ISO-8859-1", "ISO8859-1", "LATIN1", "LATIN-1", "US-ASCII", "ASCII")})

# vobject attaches a handler that prints to stderr to its logger when the root
# logger has none; the library must never print, so that handler is replaced by
# a NullHandler. Nothing here calls the vobject readers that log skipped lines:
# lines that cannot be read are reported by this pre-pass as card warnings.
_VOBJECT_LOG = logging.getLogger("vobject.base")
for _h in list(_VOBJECT_LOG.handlers):
    if isinstance(_h,
                  logging.StreamHandler) and getattr(_h.formatter, "_fmt", "") == "%(name)s %(levelname)s %(message)s":
        _VOBJECT_LOG.removeHandler(_h)
if not any(isinstance(_h, logging.NullHandler) for _h in _VOBJECT_LOG.handlers):
    _VOBJECT_LOG.addHandler(logging.NullHandler())


@dataclass(slots=True)
class Prop:
    """One property of a card, its value decoded to text but still escaped."""

    name: str
    group: str
    params: dict[str, list[str]]
    singles: list[str]
    value: str
    line: int
    raw: bytes = b""
    charset: str = ""

    def types(self) -> list[str]:
        """TYPE values in lower case: ``TYPE=a,b``, ``TYPE="a,b"``, repeated TYPE, 2.1 bare words."""
        out: list[str] = []
        for v in self.params.get("TYPE", []):
            out.extend(t.strip().lower() for t in v.split(",") if t.strip())
        out.extend(s.lower() for s in self.singles if s not in NOT_TYPES)
        return out


@dataclass(slots=True)
class Card:
    """One ``BEGIN:VCARD`` block: where it is, its properties and what went wrong."""

    index: int
    line: int
    end_line: int | None = None
    version: str = ""
    parent: int | None = None
    props: list[Prop] = field(default_factory=list)
    problems: list[tuple[int, str]] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    # logical lines and nested cards, in file order (filled by the scanner)
    items: list = field(default_factory=list, repr=False)

    @property
    def v21(self) -> bool:
        return self.version.startswith(("2", "1"))


@dataclass(slots=True)
class Scan:
    """Every card of a file, in order of their BEGIN lines, and file-level warnings."""

    cards: list[Card]
    warnings: list[str]


@dataclass(slots=True)
class _Logical:
    """One content line as physical pieces, joined later by the rules of the card's version."""

    line: int
    first: bytes
    segs: list[tuple[str, bytes]] = field(default_factory=list)
    qp: bool = False
    b64: bool = False
    media: bool = False
    soft: bool = False

    def add(self, kind: str, data: bytes) -> None:
        if not self.media:
            self.segs.append((kind, data))
        self.soft = self.qp and data.rstrip(b" \t").endswith(b"=")

    def materialise(self, v21: bool) -> bytes:
        """Join the physical lines: a 2.1 fold keeps its whitespace (RFC 822 style), a 3.0/4.0 fold drops one."""
        buf = bytearray(self.first)
        for kind, data in self.segs:
            if kind == "fold":
                buf += data if v21 else data[1:]
            elif kind == "soft":
                while buf[-1:] in (b" ", b"\t"):
                    del buf[-1]
                del buf[-1]  # the '='
                buf += data
            elif kind == "bs":
                del buf[-1]  # the trailing backslash
                buf += b"\n" + data
            else:
                buf += data
        return bytes(buf)


# --------------------------------------------------------------- decoding


def codec_for(charset: str) -> str | None:
    """The Python codec for a CHARSET parameter, or None when it is unknown."""
    name = charset.strip().strip('"').upper()
    if name in _CHARSET_ALIASES:
        return _CHARSET_ALIASES[name]
    try:
        return codecs.lookup(name).name
    except LookupError:
        return None


def decode_bytes(data: bytes, charset: str = "", fallback: str | None = "cp1252") -> tuple[str, str] | None:
    """Decode one value: UTF-8 when valid, else its CHARSET, else ``fallback`` (None: give up).

    Returns the text and the codec used when it came to the fallback (so the
    caller can warn that it was a guess; ``""`` otherwise).
    """
    try:
        return data.decode("utf-8"), ""
    except UnicodeDecodeError:
        pass
    codec = codec_for(charset) if charset else None
    if codec and codec != "utf-8":
        try:
            return data.decode(codec), ""
        except (UnicodeError, LookupError):
            pass
    if fallback is None:
        return None
    for codec in (fallback, "cp1252"):
        try:
            return data.decode(codec), codec
        except (UnicodeError, LookupError):
            continue
    return data.decode("latin-1"), "latin-1"


#: Codecs a whole-file guess may pick, in order of preference when the
#: detector finds several equally plausible (Western European first, then
#: Japanese as exported by phones, Cyrillic, Chinese, Korean, Central European).
GUESS_CODECS = ["cp1252", "cp932", "cp1251", "gb18030", "big5", "cp949", "cp1250", "cp1253", "cp1254",
                "cp1255", "cp1256", "cp1257", "euc_jp", "koi8_r"]


def guess_encoding(sample: bytes) -> str:
    """Guess the 8-bit encoding of the text of a file that does not say.

    charset-normalizer ranks the candidates in :data:`GUESS_CODECS` by how
    chaotic the decoded text looks; ties go to the earlier candidate. Short
    samples cannot tell cp1252 from cp1250 apart, so the result is a guess
    and every value read this way carries a warning.
    """
    try:
        from charset_normalizer import from_bytes
    except ImportError:  # pragma: no cover - a declared dependency
        return "cp1252"
    best: tuple[float, int, str] | None = None
    for match in from_bytes(sample[:65536], cp_isolation=GUESS_CODECS):
        names = [match.encoding, *getattr(match, "could_be_from_charset", [])]
        ranks = [GUESS_CODECS.index(n) for n in names if n in GUESS_CODECS]
        if not ranks:
            continue
        rank = min(ranks)
        key = (round(match.chaos, 2), rank, GUESS_CODECS[rank])
        if best is None or key < best:
            best = key
    return best[2] if best else "cp1252"


def qp_decode(data: bytes) -> bytes:
    """Undo quoted-printable ``=XX`` escapes (soft breaks were already joined); a stray ``=`` stays."""
    return _QP_HEX.sub(lambda m: bytes([int(m.group(1), 16)]), data)


def rfc6868(value: str) -> str:
    """Undo the RFC 6868 parameter escapes ``^n`` (newline), ``^'`` (quote), ``^^`` (caret)."""
    if "^" not in value:
        return value
    table = {"n": "\n", "N": "\n", "'": '"', "^": "^"}
    return _RFC6868.sub(lambda m: table.get(m.group(1), m.group(0)), value)


# --------------------------------------------------------------- physical lines


def physical_lines(data: bytes, warnings: list[str]) -> list[bytes]:
    """Split bytes into physical lines without their ends; UTF-16/UTF-32 become UTF-8."""
    codec = ""
    if data.startswith((b"\xff\xfe\x00\x00", b"\x00\x00\xfe\xff")):
        codec = "utf-32"
    elif data.startswith((b"\xff\xfe", b"\xfe\xff")):
        codec = "utf-16"
    elif re.match(rb"^(?:[ \t\r\n]\x00)*[Bb]\x00[Ee]\x00", data[:256]):
        codec = "utf-16-le"
    elif re.match(rb"^(?:\x00[ \t\r\n])*\x00[Bb]\x00[Ee]", data[:256]):
        codec = "utf-16-be"
    if codec:
        try:
            text = data.decode(codec)
        except UnicodeDecodeError:
            text = data.decode(codec, errors="replace")
            warnings.append(f"the file is {codec.upper()} with some invalid bytes; they were replaced by U+FFFD")
        data = text.lstrip("\ufeff").encode("utf-8", errors="surrogatepass")
    if data.startswith(BOM):
        data = data[3:]
    if b"\n" not in data and b"\r" in data:
        return data.split(b"\r")
    lines = data.split(b"\n")
    if lines and lines[-1] == b"":
        lines.pop()
    # An export with CR CR LF ends every line of a card that way, its BEGIN line
    # included, so the BEGIN line of each card sets how many CRs end a line: a
    # value may itself end with a CR, which must then be kept.
    # Mixed line ends: where some lines end with CR alone (a CR-only card among CR LF ones, or single
    # lines), every lone CR ends a line, as in a file written with CR only.
    mixed = b"\r" in data and bool(_CR_LINE_ENDS.search(data))
    crcr = False
    out = []
    for ln in lines:
        if ln.endswith(b"\r"):
            if _BEGIN_END.match(ln.strip()):
                crcr = ln.endswith(b"\r\r")
            ln = ln.rstrip(b"\r") if crcr else ln[:-1]
        if mixed and b"\r" in ln:
            out.extend(ln.split(b"\r"))
            continue
        out.append(ln)
    return out


def _snippet(data: bytes, limit: int = 60) -> str:
    text = data.decode("utf-8", errors="replace")
    return repr(text if len(text) <= limit else text[:limit] + "...")


def _header_end(raw: bytes) -> int:
    """Index of the colon that ends the header (the first one outside double quotes), or -1."""
    colon = raw.find(b":")
    quote = raw.find(b'"', 0, colon if colon >= 0 else len(raw))
    if quote < 0:
        return colon
    quoted = False
    for i, byte in enumerate(raw):
        if byte == 0x22:
            quoted = not quoted
        elif byte == 0x3A and not quoted:
            return i
    return raw.find(b":")


# --------------------------------------------------------------- blocks


def _scan(lines: list[bytes], fixed_line: int | None, warnings: list[str]) -> list[Card]:
    """Group physical lines into logical lines and BEGIN/END blocks (nested too)."""
    cards: list[Card] = []
    stack: list[tuple[str, Card | None, int]] = []  # (component, card or None, BEGIN line)
    cur: _Logical | None = None

    def where(n: int) -> int:
        return fixed_line if fixed_line is not None else n

    def open_card() -> Card | None:
        """The card the current line belongs to (None inside another component)."""
        return stack[-1][1] if stack and stack[-1][0] == "VCARD" else None

    def enclosing_card() -> Card | None:
        return next((c for _, c, _ in reversed(stack) if c is not None), None)

    for n, line in enumerate(lines, 1):
        if line.startswith(BOM):
            line = line[3:]
        if cur is not None and cur.soft:
            if _BEGIN_END.match(line.strip()):
                cur.soft = False
                card = enclosing_card()
                if card is not None:
                    card.notes.append(f"line {where(cur.line)}: quoted-printable value ends with '=' but the next line "
                                      f"is {line.strip().decode('latin-1')}")
            else:
                cur.add("soft", line)
                continue
        if line[:1] in (b" ", b"\t"):
            if cur is not None:
                cur.add("fold", line)
                continue
            if not line.strip():
                continue
            line = line.lstrip(b" \t")
        stripped = line.strip()
        if not stripped:
            cur = None
            continue
        if cur is not None and cur.b64 and _B64_LINE.match(stripped):
            cur.add("b64", line)
            continue
        marker = _BEGIN_END.match(stripped)
        cur = None
        if marker:
            word, comp = marker.group(1).upper(), marker.group(2).upper().decode("ascii")
            if word == b"BEGIN":
                card = None
                if comp == "VCARD":
                    parent = enclosing_card()
                    card = Card(index=len(cards), line=where(n), parent=parent.index if parent else None)
                    cards.append(card)
                    if parent is not None:
                        parent.items.append(card)
                    if len(stack) >= MAX_NESTING:
                        card.problems.append((where(n), f"cards nested more than {MAX_NESTING} deep"))
                elif enclosing_card() is not None:
                    enclosing_card().notes.append(f"line {where(n)}: a {comp} component inside the card was ignored")
                elif not stack:
                    warnings.append(f"line {where(n)}: BEGIN:{comp} is not a vCard; that block was ignored")
                stack.append((comp, card, where(n)))
            else:
                depth = next((i for i in range(len(stack) - 1, -1, -1) if stack[i][0] == comp), None)
                if depth is None:
                    card = enclosing_card()
                    msg = f"line {where(n)}: END:{comp} without a matching BEGIN was ignored"
                    (card.notes if card is not None else warnings).append(msg)
                    continue
                while len(stack) > depth + 1:
                    kind, inner, begun = stack.pop()
                    if inner is None and enclosing_card() is not None:
                        enclosing_card().notes.append(f"line {begun}: BEGIN:{kind} has no END:{kind}")
                _, card, _ = stack.pop()
                if card is not None:
                    card.end_line = where(n)
            continue
        card = open_card()
        if stripped.startswith(b"#"):
            if card is not None:
                card.notes.append(f"line {where(n)}: comment line ignored: {_snippet(stripped)}")
            continue
        if card is None:
            if not stack:
                warnings.append(f"line {where(n)}: text outside any BEGIN:VCARD ... END:VCARD block was ignored: "
                                f"{_snippet(stripped)}")
            continue
        end = _header_end(line)
        header = line[:end] if end >= 0 else line
        name_match = _NAME_START.match(line)
        name = name_match.group(1).upper().decode("ascii") if name_match else ""
        cur = _Logical(where(n), line)
        cur.qp = bool(_QP_IN_HEADER.search(header))
        cur.b64 = bool(_B64_IN_HEADER.search(header))
        cur.media = name in MEDIA
        if cur.media:
            cur.first = header + b":"
        cur.soft = cur.qp and line.rstrip(b" \t").endswith(b"=")
        card.items.append(cur)
    return cards


# --------------------------------------------------------------- properties


def _split_outside_quotes(data: bytes, sep: int) -> list[bytes]:
    """Split at every ``sep`` byte that is not inside double quotes (linear time)."""
    parts, start, quoted = [], 0, False
    for i, byte in enumerate(data):
        if byte == 0x22:
            quoted = not quoted
        elif byte == sep and not quoted:
            parts.append(data[start:i])
            start = i + 1
    parts.append(data[start:])
    return parts


def _loose_params(header: bytes) -> tuple[str, str, list[list[str]]] | None:
    """Read a header vobject refuses (spaces in parameter names, stray quotes): name, group, params."""
    parts = _split_outside_quotes(header, 0x3B)
    head = parts[0].strip()
    m = re.fullmatch(rb"(?:([A-Za-z0-9_-]+)\.)?([A-Za-z0-9_-]+)", head)
    if not m:
        return None
    params: list[list[str]] = []
    for part in parts[1:]:
        key, eq, val = part.partition(b"=")
        key_s = key.strip().decode("latin-1")
        if not key_s:
            continue
        if not eq:
            params.append([key_s])
            continue
        values = [v.strip().strip(b'"').decode("latin-1") for v in _split_outside_quotes(val, 0x2C)]
        params.append([key_s, *values])
    group = m.group(1).decode("ascii") if m.group(1) else ""
    return m.group(2).decode("ascii").replace("_", "-"), group, params


def _parse_line(lg: _Logical, card: Card) -> Prop | None:
    raw = lg.materialise(card.v21)
    end = _header_end(raw)
    if end < 0:
        card.problems.append((lg.line, f"not a vCard property (no ':'), ignored: {_snippet(raw)}"))
        return None
    header = raw[:end]
    group = ""
    if _HEADER.fullmatch(header):
        try:
            name, plist, value, grp = vobject.base.parseLine(raw.decode("latin-1"), lg.line)
            group = grp or ""
        except vobject.base.ParseError:
            plist = None
    else:
        plist = None
    if plist is None:
        loose = _loose_params(header)
        if loose is None:
            card.problems.append((lg.line, f"not a vCard property (bad name before ':'), ignored: {_snippet(raw)}"))
            return None
        name, group, plist = loose
        value = raw[end + 1 :].decode("latin-1")
        if name.upper() not in MEDIA:
            card.problems.append((lg.line, f"malformed parameters read loosely: {_snippet(header)}"))
    if b"^'" in header and name.upper() not in MEDIA:
        card.notes.append(f"line {lg.line}: a parameter holds an RFC 6868 quote (^') but is not quoted itself, so a "
                          f"':' "
                          f"inside it may have ended the parameters early; the {name.upper()} value may start with "
                          f"parameter text")
    params: dict[str, list[str]] = {}
    singles: list[str] = []
    for entry in plist:
        pname = entry[0].strip().upper()
        if len(entry) == 1:
            singles.append(pname)
            continue
        for v in entry[1:]:
            text, _ = decode_bytes(v.encode("latin-1"))
            params.setdefault(pname, []).append(rfc6868(text))
    charset = (params.get("CHARSET") or [""])[0]
    if not charset:
        m = _CHARSET_IN_HEADER.search(header)
        charset = m.group(1).decode("latin-1") if m else ""
    prop = Prop(name.upper(), group.lower(), params, singles, "", lg.line, charset=charset)
    if lg.media:
        return prop
    data = value.encode("latin-1")
    encodings = [e.upper() for e in params.get("ENCODING", [])]
    if lg.qp or "QUOTED-PRINTABLE" in singles or "QUOTED-PRINTABLE" in encodings:
        data = qp_decode(data)
    elif lg.b64 or "BASE64" in singles or {"B", "BASE64"} & set(encodings):
        try:
            data = base64.b64decode(re.sub(rb"\s+", b"", data), validate=True)
        except (binascii.Error, ValueError):
            card.problems.append((lg.line, f"{prop.name} value is marked base64 but is not valid base64"))
            return None
    prop.raw = data
    return prop


def _join_backslash_lines(card: Card) -> None:
    """Join a line that is not a property to the one before it when that one ends with a lone backslash.

    Some 2.1 writers continue an ADR this way (``...Brevern\\`` then ``9999999\\``
    then ``Packstation 999;Hamburg;...``); the lines are joined with a newline.
    """
    items: list = []
    for item in card.items:
        prev = items[-1] if items else None
        if isinstance(item, _Logical) and isinstance(prev, _Logical) and not prev.qp and not prev.media:
            tail = prev.segs[-1][1][1:] if prev.segs else prev.first
            if tail and not tail.endswith(b"\\"):
                items.append(item)
                continue
            raw = prev.materialise(card.v21)
            if (len(raw) - len(raw.rstrip(b"\\"))) % 2 == 1 and not _PROPERTY_START.match(item.materialise(card.v21)):
                prev.segs.append(("bs", item.first))
                prev.segs.extend(item.segs)
                continue
        items.append(item)
    card.items = items


def read_cards(data: bytes, path: str, *, fixed_line: int | None = None, default_version: str = "") -> Scan:
    """Split a vCard file into cards of decoded properties.

    Parameters
    ----------
    data : bytes
        The file's bytes.
    path : str
        The file's path, for messages.
    fixed_line : int, optional
        Report every line as this one (a card embedded in a property value).
    default_version : str
        Version for cards without a VERSION line (``"3.0"`` when empty).

    Raises
    ------
    InputError
        When there is no ``BEGIN:VCARD`` line at all.
    """
    warnings: list[str] = []
    lines = physical_lines(data, warnings)
    cards = _scan(lines, fixed_line, warnings)
    if not cards:
        raise InputError(path, "contains no vCard (no BEGIN:VCARD ... END:VCARD block)")
    for card in cards:
        for item in card.items:
            match = _NAME_START.match(item.first) if isinstance(item, _Logical) else None
            if match and match.group(1).upper() == b"VERSION" and _header_end(item.first) >= 0:
                card.version = item.first[_header_end(item.first) + 1 :].strip().decode("latin-1")
                break
        if not card.version:
            card.version = default_version or "3.0"
            card.notes.append(f"card has no VERSION line; read as vCard {card.version}")
        _join_backslash_lines(card)
        for item in card.items:
            if isinstance(item, _Logical):
                prop = _parse_line(item, card)
                if prop is not None:
                    card.props.append(prop)
        card.items = []
    _decode_values(cards)
    return Scan(cards, warnings)


def _decode_values(cards: list[Card]) -> None:
    """Decode every value; text that is neither UTF-8 nor its CHARSET is read with one guess per file."""
    undecided = [p.raw for c in cards for p in c.props
                 if not p.raw.isascii() and decode_bytes(p.raw, p.charset, None) is None]
    fallback = guess_encoding(b"\n".join(undecided)) if undecided else "cp1252"
    for card in cards:
        guessed: list[str] = []
        for prop in card.props:
            prop.value, how = decode_bytes(prop.raw, prop.charset, fallback)
            if how:
                guessed.append(str(prop.line))
            prop.raw = b""
        if guessed:
            card.notes.append(
                f"line(s) {', '.join(guessed)}: text is not UTF-8 and names no usable CHARSET; "
                f"read as {fallback} (a guess for the whole file)"
            )
