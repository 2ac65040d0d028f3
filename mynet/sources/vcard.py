"""The vCard importer (versions 2.1, 3.0 and 4.0): one record per card.

:func:`parse_vcard` reads a whole ``.vcf`` file. The text layer
(:mod:`mynet.sources.vcard_text`) turns bytes into cards of decoded
properties; this module undoes the escapes of each vCard version and maps the
properties a network needs onto :class:`mynet.model.Record`.

Escapes differ by version. In 3.0 and 4.0 ``\\,`` ``\\;`` ``\\\\`` and ``\\n``
are escapes (RFC 6350 §3.4; RFC 2426 §4, recalled from memory) and an
unescaped comma separates the values of a list (CATEGORIES, NICKNAME, the
parts of N); ``\\:`` is read as a colon too, as some exporters write it. In 2.1
only ``\\;`` is an escape: every other backslash and every comma is literal text
(vCard 2.1 specification, versit 1996), except that CATEGORIES and NICKNAME
(which 2.1 does not define) are split on commas as in 3.0.

Several cards with the same UID (RFC 6350 §7.2.4) are returned as separate
records with that UID; merging them is the job of :mod:`mynet.people.identity`.
"""

from __future__ import annotations

import re

from ..errors import RecordError
from ..model import Address, ParseResult, Record, Related, Skipped
from .vcard_text import Card, Prop, read_cards

__all__ = ["parse_vcard", "split_value", "unescape"]

NO_IDENTITY = "card has no name, e-mail, phone or organisation"
MAX_AGENT_DEPTH = 2

#: Vendor properties that name a related person, and the relation they mean.
RELATION_PROPS = {
    "X-MS-SPOUSE": "spouse",
    "X-MS-MANAGER": "manager",
    "X-MS-ASSISTANT": "assistant",
    "X-MS-CHILD": "child",
    "X-SPOUSE": "spouse",
    "X-MANAGER": "manager",
    "X-ASSISTANT": "assistant",
    "X-EVOLUTION-SPOUSE": "spouse",
    "X-EVOLUTION-MANAGER": "manager",
    "X-EVOLUTION-ASSISTANT": "assistant",
    "X-KADDRESSBOOK-X-SPOUSENAME": "spouse",
    "X-KADDRESSBOOK-X-MANAGERSNAME": "manager",
    "X-KADDRESSBOOK-X-ASSISTANTSNAME": "assistant",
    "X-ABRELATEDNAMES": "",
}
#: Relation types of the phone-export ``X-ANDROID-CUSTOM:vnd.android.cursor.item/relation`` line.
PHONE_RELATION_TYPES = {
    "1": "assistant", "2": "brother", "3": "child", "4": "domestic-partner", "5": "father", "6": "friend",
    "7": "manager", "8": "mother", "9": "parent", "10": "partner", "11": "referred-by", "12": "relative",
    "13": "sister", "14": "spouse",
}
_LABEL = re.compile(r"^_\$!<(.*)>!\$_$")
_SPLITTERS = {
    (sep, v21): re.compile((r"\\;|" if v21 else r"\\.|") + re.escape(sep), re.DOTALL)
    for sep in ",;" for v21 in (False, True)
}
_ESCAPE_3 = re.compile(r"\\([\\,;nN:])")
_ESCAPES_3 = {"\\": "\\", ",": ",", ";": ";", "n": "\n", "N": "\n", ":": ":"}


# ----------------------------------------------------------------- escapes


def split_value(value: str, sep: str, v21: bool) -> list[str]:
    """Split at every ``sep`` that is not escaped, keeping the escapes for :func:`unescape`.

    In 3.0/4.0 a backslash escapes the character after it; in 2.1 it escapes
    only a semicolon.
    """
    if sep not in value:
        return [value]
    pattern = _SPLITTERS[(sep, v21)]
    parts: list[str] = []
    start = 0
    for m in pattern.finditer(value):
        if m.group() == sep:
            parts.append(value[start : m.start()])
            start = m.end()
    parts.append(value[start:])
    return parts


def unescape(value: str, v21: bool) -> str:
    """Undo the text escapes of a version (3.0/4.0: ``\\\\ \\, \\; \\n``, also ``\\:``; 2.1: ``\\;`` only)."""
    if "\\" not in value:
        return value
    if v21:
        return value.replace("\\;", ";")
    return _ESCAPE_3.sub(lambda m: _ESCAPES_3[m.group(1)], value)


def _text(prop: Prop, v21: bool) -> str:
    return unescape(prop.value, v21)


def _list(prop: Prop, v21: bool) -> list[str]:
    """A comma-separated list (CATEGORIES, NICKNAME), without blank items."""
    items = [unescape(p, v21) for p in split_value(prop.value, ",", v21)]
    return [i for i in items if i.strip()]


def _structured(prop: Prop, v21: bool) -> list[str]:
    """The ``;`` components of a structured value, each unescaped (commas kept as text)."""
    return [unescape(p, v21) for p in split_value(prop.value, ";", v21)]


def _label(text: str) -> str:
    """An address-book label: ``_$!<Spouse>!$_`` becomes ``spouse``, a custom label stays as written."""
    m = _LABEL.match(text.strip())
    return m.group(1).strip().lower() if m else text.strip()


# ----------------------------------------------------------------- values


def _email(text: str) -> str:
    """The address alone: a display name (``"Omega" <omega@example.com>``) and ``mailto:`` are dropped."""
    s = text.strip()
    m = re.search(r"<([^<>]*)>", s)
    if m and m.group(1).strip():
        s = m.group(1).strip()
    if s[:7].lower() == "mailto:":
        s = s[7:].strip()
    return s


def _phone(text: str) -> str:
    s = text.strip()
    return s[4:].strip() if s[:4].lower() == "tel:" else s


def _name(rec: Record, prop: Prop, v21: bool) -> None:
    comps = split_value(prop.value, ";", v21)
    if len(comps) > 5 and any(c.strip() for c in comps[5:]):
        rec.warnings.append(f"line {prop.line}: N has {len(comps)} parts instead of 5; the extra parts were added to "
                            f"the suffix")
        comps = comps[:4] + [";".join(comps[4:])]
    comps += [""] * (5 - len(comps))
    joined = []
    for pos, comp in enumerate(comps[:5]):
        values = [comp] if v21 else split_value(comp, ",", v21)
        values = [unescape(v, v21) for v in values]
        joined.append((", " if pos == 4 else " ").join(v for v in values if v) if len(values) > 1 else values[0])
    rec.family, rec.given, rec.additional, rec.prefix, rec.suffix = joined


def _address(prop: Prop, v21: bool, labels: dict[str, str]) -> Address:
    comps = _structured(prop, v21)
    comps += [""] * (7 - len(comps))
    pobox, ext, street, locality, region, postcode = comps[:6]
    country = ";".join(comps[6:])
    # RFC 6350 §6.3.1 asks writers to leave the PO box and extended parts empty;
    # older writers use them for a suite or office, which is kept with the street.
    street = ", ".join(p for p in (street, ext, pobox) if p.strip()) if (ext.strip() or pobox.strip()) else street
    types = prop.types()
    if prop.group and prop.group in labels:
        types.append(labels[prop.group])
    return Address(street, locality, region, postcode, country, types)


# ----------------------------------------------------------------- cards


def _record(card: Card, path: str, agents: list[tuple[Prop, str]]) -> Record:
    """Map the properties of one card onto a record (AGENT values are collected in ``agents``)."""
    v21 = card.v21
    rec = Record(kind="vcard", source=path, index=card.index, line=card.line, version=card.version)
    rec.warnings.extend(card.notes)
    rec.warnings.extend(f"line {line}: {reason}" for line, reason in card.problems)
    labels = {p.group: _label(p.value) for p in card.props if p.name == "X-ABLABEL" and p.group}
    fns: list[str] = []
    names = 0
    address_labels: list[Prop] = []
    for prop in card.props:
        name = prop.name
        if name == "FN":
            fns.append(_text(prop, v21))
        elif name == "N":
            names += 1
            if names == 1:
                _name(rec, prop, v21)
            else:
                rec.warnings.append(f"line {prop.line}: a second N was ignored: {prop.value!r}")
        elif name == "NICKNAME":
            rec.nicknames.extend(_list(prop, v21))
        elif name == "CATEGORIES":
            rec.tags.extend(_list(prop, v21))
        elif name == "ORG":
            comps = _structured(prop, v21)
            while len(comps) > 1 and not comps[-1].strip():
                comps.pop()
            if any(c.strip() for c in comps):
                rec.orgs.append(comps[0])
                rec.org_units.append(comps[1:])
        elif name in ("TITLE", "ROLE", "NOTE", "URL"):
            text = _text(prop, v21)
            if text.strip():
                target = {"TITLE": rec.titles, "ROLE": rec.roles, "NOTE": rec.notes, "URL": rec.urls}[name]
                target.append(text.strip() if name == "URL" else text)
        elif name == "EMAIL":
            email = _email(_text(prop, v21))
            if email:
                rec.emails.append(email)
        elif name == "TEL":
            phone = _phone(_text(prop, v21))
            if phone:
                rec.phones.append(phone)
        elif name == "ADR":
            addr = _address(prop, v21, labels)
            if not addr.is_empty():
                rec.addresses.append(addr)
        elif name == "LABEL":
            address_labels.append(prop)
        elif name == "RELATED":
            text = _text(prop, v21).strip()
            if text:
                rec.related.append(Related(text, prop.types()))
        elif name in RELATION_PROPS:
            text = _text(prop, v21).strip()
            if text:
                kind = RELATION_PROPS[name] or labels.get(prop.group, "")
                rec.related.append(Related(text, [kind] if kind else []))
        elif name == "X-ANDROID-CUSTOM":
            parts = _structured(prop, v21)
            if parts[0].strip().lower() == "vnd.android.cursor.item/relation" and len(parts) > 1 and parts[1].strip():
                code = parts[2].strip() if len(parts) > 2 else ""
                kind = PHONE_RELATION_TYPES.get(code) or (parts[3].strip() if len(parts) > 3 else "")
                rec.related.append(Related(parts[1].strip(), [kind] if kind else []))
        elif name == "AGENT":
            agents.append((prop, _text(prop, v21)))
        elif name in ("KIND", "X-ADDRESSBOOKSERVER-KIND"):
            rec.card_kind = _text(prop, v21).strip().lower()
        elif name == "X-ABSHOWAS" and _text(prop, v21).strip().upper() == "COMPANY" and not rec.card_kind:
            rec.card_kind = "org"
        elif name in ("MEMBER", "X-ADDRESSBOOKSERVER-MEMBER"):
            text = _text(prop, v21).strip()
            if text:
                rec.members.append(text)
        elif name == "REV" and not rec.rev:
            rec.rev = _text(prop, v21).strip()
        elif name == "UID":
            text = _text(prop, v21).strip()
            if not rec.uid:
                rec.uid = text
            elif text != rec.uid:
                rec.warnings.append(f"line {prop.line}: a second UID was ignored: {text!r}")
    if fns:
        rec.full_name = next((f for f in fns if f.strip()), fns[0])
        extra = [f for f in fns if f.strip() and f != rec.full_name]
        if extra:
            rec.warnings.append(f"card has {len(fns)} FN lines; kept {rec.full_name!r}, not {extra!r}")
    if not rec.addresses:
        for prop in address_labels:
            text = _text(prop, v21)
            if text.strip():
                rec.addresses.append(Address(street=text, types=prop.types() + ["label"]))
    return rec


def _has_identity(rec: Record) -> bool:
    return bool(rec.display_name() or rec.phones)


def parse_vcard(data: bytes, path: str, *, strict: bool = False) -> ParseResult:
    """Read every card of a vCard file (2.1, 3.0 or 4.0) into records.

    Parameters
    ----------
    data : bytes
        The file's bytes, in any of UTF-8 (with or without a byte-order mark),
        UTF-16, or an 8-bit character set named by CHARSET or guessed.
    path : str
        The file's path, kept in each record and in messages.
    strict : bool
        Raise at the first bad card instead of skipping it.

    Returns
    -------
    ParseResult
        One record per card, nested cards (2.1 AGENT or distribution lists,
        3.0 AGENT values that hold a whole card) included, in order of their
        ``index``. Cards that cannot be used are listed in ``skipped``.

    Raises
    ------
    InputError
        When the file holds no ``BEGIN:VCARD`` block at all.
    RecordError
        With ``strict=True``: at the first card without END:VCARD, with a line
        that is not a vCard property, or without a name, e-mail, phone or
        organisation.
    """
    scan = read_cards(data, path)
    result = ParseResult(path=path, kind="vcard", warnings=list(scan.warnings))
    queue: list[tuple[Card, int]] = [(card, 0) for card in scan.cards]
    next_index = len(scan.cards)
    records: dict[int, Record] = {}
    pos = 0
    while pos < len(queue):
        card, depth = queue[pos]
        pos += 1
        if card.end_line is None:
            reason = "BEGIN:VCARD has no matching END:VCARD; the card was not read"
            if strict:
                raise RecordError(path, reason, card.line)
            result.skipped.append(Skipped(path, card.line, reason, card.index))
            continue
        if strict and card.problems:
            line, reason = card.problems[0]
            raise RecordError(path, reason, line)
        agents: list[tuple[Prop, str]] = []
        rec = _record(card, path, agents)
        for prop, text in agents:
            value_is_uri = any(v.lower() == "uri" for v in prop.params.get("VALUE", []))
            if text.lstrip()[:11].upper() == "BEGIN:VCARD" and not value_is_uri and depth < MAX_AGENT_DEPTH:
                inner = read_cards(text.encode("utf-8"), path, fixed_line=prop.line, default_version=card.version)
                for sub in inner.cards:
                    sub.index += next_index
                    queue.append((sub, depth + 1))
                next_index += len(inner.cards)
                rec.related.append(Related(f"urn:mynet:card:{inner.cards[0].index}", ["agent"]))
            else:  # an empty value is a 2.1 AGENT whose card follows, nested
                rec.related.append(Related(text.strip(), ["agent"]))
        if not _has_identity(rec):
            bad = [line for line, _ in card.problems]
            reason = NO_IDENTITY + (f" (line(s) {', '.join(map(str, bad))} could not be read)" if bad else "")
            if strict:
                raise RecordError(path, reason, card.line)
            result.skipped.append(Skipped(path, card.line, reason, card.index))
            continue
        records[card.index] = rec
    _link_nested_agents(scan.cards, records)
    _name_agent_links(records)
    result.records = [records[i] for i in sorted(records)]
    result.skipped.sort(key=lambda s: (s.index if s.index is not None else -1))
    return result


def _link_nested_agents(cards: list[Card], records: dict[int, Record]) -> None:
    """A 2.1 ``AGENT:`` line with no value is followed by the agent's own nested card: relate the two."""
    for card in cards:
        if card.parent is None or card.parent not in records or card.index not in records:
            continue
        parent = records[card.parent]
        for rel in parent.related:
            if rel.types == ["agent"] and rel.value == "":
                rel.value = f"urn:mynet:card:{card.index}"
                break


def _name_agent_links(records: dict[int, Record]) -> None:
    """Replace the internal pointer to an agent's card by that card's name (or drop it when unread)."""
    for rec in records.values():
        kept = []
        for rel in rec.related:
            if not rel.value:
                continue
            if rel.value.startswith("urn:mynet:card:"):
                target = records.get(int(rel.value.rsplit(":", 1)[1]))
                if target is None or not target.display_name():
                    continue
                rel = Related(target.uid or target.display_name(), rel.types)
            kept.append(rel)
        rec.related = kept
