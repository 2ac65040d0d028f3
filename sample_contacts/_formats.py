"""Serialisers for the sample files: telephone formats, vCard 2.1 / 3.0 / 4.0, line folding, quoted-printable.

A card is a plain dict (see :func:`card`); the writers turn it into the text
of one vCard. They follow the vCard 2.1 specification, RFC 2426 (3.0) and
RFC 6350 (4.0): content lines end in CRLF, 3.0 and 4.0 lines are folded at 75
octets without splitting a UTF-8 sequence, 2.1 values may be quoted-printable
with soft line breaks whose continuation lines do not start with whitespace.
"""

from __future__ import annotations


def card(**fields) -> dict:
    """A card with every key the writers read, filled with empty defaults."""
    base = {"fn": "", "n": ["", "", "", "", ""], "nickname": "", "org": [], "title": "", "emails": [],
            "tels": [], "adrs": [], "categories": [], "note": "", "urls": [], "uid": "", "bday": "", "rev": "",
            "related": [], "kind": "", "members": [], "gender": "", "anniversary": "", "lower_params": False,
            "name_mode": "", "labels": True}
    base.update(fields)
    return base


# -- telephone numbers ----------------------------------------------------------------------------------
def _uk_groups(e164: str) -> list[str]:
    national = "0" + e164[3:]
    if national.startswith("07"):
        return [national[:5], national[5:8], national[8:]]
    if national.startswith("020"):
        return [national[:3], national[3:7], national[7:]]
    return [national[:4], national[4:7], national[7:]]


def fmt_phone(e164: str, style: str) -> str:
    """Write an E.164 number the way people and devices do (``intl``, ``national``, ``compact``, ...)."""
    if e164.startswith("+1"):
        area, exch, line = e164[2:5], e164[5:8], e164[8:]
        return {"national": f"({area}) {exch}-{line}", "compact": f"{area}{exch}{line}", "e164": e164,
                "dashed": f"{area}-{exch}-{line}", "uri": f"tel:+1-{area}-{exch}-{line}"}.get(
            style, f"+1 ({area}) {exch}-{line}")
    g = _uk_groups(e164)
    disp = [g[0], g[1] + g[2]] if g[0].startswith("07") else g  # 07700 900123, 020 7946 0123, 0117 496 0123
    rest = " ".join(disp[1:])
    return {
        "national": f"{disp[0]} {rest}",
        "intl": f"+44 {disp[0][1:]} {rest}",
        "intl0": f"+44 (0){disp[0][1:]} {rest}",
        "compact": "".join(g),
        "e164": e164,
        "paren0": f"(0){g[0][1:]}-{g[1]}-{g[2]}",
        "dashed": "-".join(g),
        "00": f"0044 {g[0][1:]} {g[1]} {g[2]}",
        "uri": f"tel:+44-{g[0][1:]}-{g[1]}-{g[2]}",
    }[style]


# -- text escaping and folding (RFC 6350 section 3.2 and 3.4) -------------------------------------------
def esc(value: str) -> str:
    return value.replace("\\", "\\\\").replace(",", "\\,").replace(";", "\\;").replace("\n", "\\n")


def structured(parts: list[str]) -> str:
    return ";".join(esc(p) for p in parts)


def fold(line: str, limit: int = 75) -> str:
    """Fold one content line into physical lines of at most ``limit`` octets, keeping UTF-8 sequences whole."""
    data = line.encode("utf-8")
    out, start, room = [], 0, limit
    while len(data) - start > room:
        cut = start + room
        while data[cut] & 0xC0 == 0x80:  # never split a multi-octet character
            cut -= 1
        out.append(data[start:cut])
        start, room = cut, limit - 1
    out.append(data[start:])
    return "\r\n ".join(chunk.decode("utf-8") for chunk in out) + "\r\n"


# -- vCard 3.0 (RFC 2426) -------------------------------------------------------------------------------
def _types30(types: list[str], lower: bool) -> str:
    if not types:
        return ""
    if lower:
        return "".join(f";type={t}" for t in types)
    return ";TYPE=" + ",".join(types)


def vcard30(c: dict) -> str:
    """One vCard 3.0 with item groups for labelled e-mails, folded at 75 octets."""
    lines = ["BEGIN:VCARD", "VERSION:3.0", "PRODID:-//Sample Phone Maker//Contacts Backup 7.2//EN",
             "N:" + structured(c["n"]), "FN:" + esc(c["fn"])]
    low = c["lower_params"]
    if c["nickname"]:
        lines.append("NICKNAME:" + esc(c["nickname"]))
    if c["org"]:
        lines.append("ORG:" + structured(c["org"]))
    if c["title"]:
        lines.append("TITLE:" + esc(c["title"]))
    item = 0
    for e in c["emails"]:
        types = ["INTERNET"] + e.get("types", []) + (["pref"] if e.get("pref") else [])
        if e.get("label"):
            item += 1
            lines.append(f"item{item}.EMAIL{_types30(types, low)}:{e['value']}")
            lines.append(f"item{item}.X-LABEL:{esc(e['label'])}")
        else:
            lines.append(f"EMAIL{_types30(types, low)}:{e['value']}")
    for t in c["tels"]:
        lines.append(f"TEL{_types30(t['types'] + (['pref'] if t.get('pref') else []), low)}:{t['value']}")
    for a in c["adrs"]:
        lines.append(f"ADR{_types30(a['types'], low)}:" + structured(a["parts"]))
    if c["categories"]:
        lines.append("CATEGORIES:" + ",".join(esc(x) for x in c["categories"]))
    if c["note"]:
        lines.append("NOTE:" + esc(c["note"]))
    lines += ["URL:" + u for u in c["urls"]]
    if c["bday"]:
        lines.append("BDAY:" + c["bday"])
    if c["uid"]:
        lines.append("UID:" + c["uid"])
    if c["rev"]:
        lines.append("REV:" + c["rev"])
    lines.append("END:VCARD")
    return "".join(fold(line) for line in lines)


# -- vCard 4.0 (RFC 6350) -------------------------------------------------------------------------------
def vcard40(c: dict) -> str:
    """One vCard 4.0: KIND, tel: URIs, PREF, RELATED and MEMBER."""
    lines = ["BEGIN:VCARD", "VERSION:4.0"]
    if c["kind"]:
        lines.append("KIND:" + c["kind"])
    if c["uid"]:
        lines.append("UID:urn:uuid:" + c["uid"])
    lines.append("FN:" + esc(c["fn"]))
    if any(c["n"]):
        lines.append("N:" + structured(c["n"]))
    if c["nickname"]:
        lines.append("NICKNAME:" + esc(c["nickname"]))
    if c["gender"]:
        lines.append("GENDER:" + c["gender"])
    if c["bday"]:
        lines.append("BDAY:" + c["bday"])
    if c["anniversary"]:
        lines.append("ANNIVERSARY:" + c["anniversary"])
    if c["org"]:
        lines.append("ORG:" + structured(c["org"]))
    if c["title"]:
        lines.append("TITLE:" + esc(c["title"]))
    for i, e in enumerate(c["emails"]):
        types = ";TYPE=" + ",".join(e["types"]).lower() if e.get("types") else ""
        lines.append(f"EMAIL{types}{';PREF=1' if i == 0 else ''}:{e['value']}")
    for i, t in enumerate(c["tels"]):
        types = ",".join(x.lower() for x in t["types"])
        lines.append(f'TEL;VALUE=uri;TYPE="{types}"{";PREF=1" if i == 0 else ""}:{t["value"]}')
    for a in c["adrs"]:
        label = "\\n".join(x for x in (a["parts"][2], a["parts"][3], a["parts"][5], a["parts"][6]) if x)
        lines.append(f'ADR;TYPE={",".join(a["types"]).lower()};LABEL="{label}":' + structured(a["parts"]))
    for kind, value in c["related"]:
        if value.startswith(("urn:", "mailto:", "http")):
            lines.append(f"RELATED;TYPE={kind}:{value}")
        else:
            lines.append(f"RELATED;VALUE=text;TYPE={kind}:{esc(value)}")
    lines += ["MEMBER:" + m for m in c["members"]]
    if c["categories"]:
        lines.append("CATEGORIES:" + ",".join(esc(x) for x in c["categories"]))
    if c["note"]:
        lines.append("NOTE:" + esc(c["note"]))
    lines += ["URL:" + u for u in c["urls"]]
    if c["rev"]:
        lines.append("REV:" + c["rev"])
    lines.append("END:VCARD")
    return "".join(fold(line) for line in lines)


# -- vCard 2.1 ------------------------------------------------------------------------------------------
def qp_lines(prefix: str, data: bytes, limit: int = 73) -> list[str]:
    """Quoted-printable value with soft line breaks ('=' at the end, the next line starts at column 0)."""
    lines, cur = [], prefix
    for i, b in enumerate(data):
        if b == 0x20 and i < len(data) - 1:
            token = " "
        elif 33 <= b <= 126 and b != 0x3D:
            token = chr(b)
        else:
            token = f"={b:02X}"
        if len(cur) + len(token) > limit:
            if cur.endswith(" "):
                cur = cur[:-1] + "=20"
            lines.append(cur + "=")
            cur = ""
            if token == " ":  # a continuation line never starts with whitespace
                token = "=20"
        cur += token
    lines.append(cur)
    return lines


def _text21(name: str, value: str, mode: str) -> list[bytes]:
    """One 2.1 property in a charset mode: ``ascii``, ``raw`` (cp1252 bytes), ``qp`` (cp1252) or ``utf8qp``."""
    if mode == "ascii" or (mode in ("raw", "qp") and value.isascii() and "\n" not in value):
        return [f"{name}:{value}".encode("ascii")]
    if mode == "raw":
        return [f"{name};CHARSET=windows-1252:".encode("ascii") + value.encode("cp1252")]
    charset, codec = ("UTF-8", "utf-8") if mode == "utf8qp" else ("windows-1252", "cp1252")
    data = value.replace("\n", "\r\n").encode(codec)
    prefix = f"{name};CHARSET={charset};ENCODING=QUOTED-PRINTABLE:"
    return [line.encode("ascii") for line in qp_lines(prefix, data)]


def vcard21(c: dict) -> bytes:
    """One vCard 2.1 in windows-1252 with CRLF line ends; accented names raw or quoted-printable."""
    mode = c["name_mode"] or "raw"
    out = [b"BEGIN:VCARD", b"VERSION:2.1"]
    out += _text21("N", ";".join(c["n"]), mode)
    out += _text21("FN", c["fn"], mode)
    if c["nickname"]:
        out += _text21("NICKNAME", c["nickname"], mode)
    if c["org"]:
        out += _text21("ORG", ";".join(c["org"]), "raw")
    if c["title"]:
        out += _text21("TITLE", c["title"], "raw")
    for t in c["tels"]:
        out.append((f"TEL;{';'.join(t['types'])}:{t['value']}").encode("ascii"))
    for i, e in enumerate(c["emails"]):
        out.append((f"EMAIL;{'PREF;' if i == 0 else ''}INTERNET:{e['value']}").encode("ascii"))
    for a in c["adrs"]:
        out += _text21(f"ADR;{';'.join(a['types'])}", ";".join(a["parts"]), "qp")
        if c["labels"]:
            label = "\n".join(x for x in (a["parts"][2], a["parts"][3], a["parts"][5], a["parts"][6]) if x)
            out += _text21(f"LABEL;{';'.join(a['types'])}", label, "qp")
    if c["note"]:
        out += _text21("NOTE", c["note"], "qp")
    if c["rev"]:
        out.append(f"REV:{c['rev']}".encode("ascii"))
    out.append(b"END:VCARD")
    return b"".join(line + b"\r\n" for line in out)
