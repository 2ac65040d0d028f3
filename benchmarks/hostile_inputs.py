"""Hostile and broken input, end to end: many bad files through the CLI, counted.

Run: python benchmarks/hostile_inputs.py [--fuzz 256] [--seed 7] [--no-report] [--list]

Builds hand-made bad files (terminal escape sequences, NUL and C1 controls,
bidi overrides, hostile file names, quotes that swallow rows, bad bytes after
a byte-order mark, oversized fields, mixed line endings, truncated blocks, a
huge header...) and seeded fuzzed variants of four small valid files (vCard,
CSV, iCalendar, mbox). Each case gets a fresh workspace holding a small clean
address book, then runs the CLI in this process (``mynet.cli.main``) on it:
``import``, ``sources``, ``contacts`` (table, ``--json``, ``--unlisted``),
``show``, ``ties``, ``why``, ``groups``, ``export`` to GraphML, CSV and JSON,
and ``report`` (HTML and Markdown).

A case is *handled* when nothing crashed (no uncaught exception, i.e. no
traceback) or hung (30 s), every exit code is 0 or a documented error code,
no byte below 0x20 other than tab and newline (nor DEL, a C1 control, a lone
surrogate or a bidi override) reached the terminal output or a written text file (a CR LF line
end of a CSV file aside, as RFC 4180 writes them), every export parses (the
standard library's XML, CSV and JSON readers, networkx's and igraph's GraphML
readers) and no record was lost. *Records lost* counts, for the cases whose
good records are known (every hand-made case, and fuzzed cases whose mutation
only touches the text of values or the line ends), the good records that did
not reach the workspace.

Prints one line per failing case and the totals (tried / handled / records
lost), by importer. This is a trial of the whole program, not a test: it
prints figures and never asserts.
"""

from __future__ import annotations

import argparse
import csv
import io
import json
import random
import signal
import sys
import tempfile
import traceback
import xml.etree.ElementTree as ET
from collections import Counter, defaultdict
from dataclasses import dataclass, field
from pathlib import Path

#: What may end a command: 0, or a MynetError's code (1 general, 2 input, 3 workspace, 4 not found).
OK_CODES = {0, 1, 2, 3, 4}
TIMEOUT = 30
#: Bidi embedding, override and isolate controls (they reorder the text shown after them).
BIDI = frozenset("\u202a\u202b\u202c\u202d\u202e\u2066\u2067\u2068\u2069")

ESC_SEQ = "\x1b[2J\x1b]0;pwned\x07"
HOSTILE = [ESC_SEQ, "\x1b[31m", "\x00", "\x07", "\x08\x08", "\x9b2J", "\x9d0;t\x9c", "\u202e", "\u2066", "\x7f",
           "\u2028", "\x1b]8;;http://x.example\x07", "\x0c", "\x1b"]

BASE_VCF = (
    "BEGIN:VCARD\r\nVERSION:3.0\r\nN:Lind;Ana;;;\r\nFN:Ana Lind\r\nEMAIL:ana@quillon.example\r\nORG:Quillon "
    "Labs\r\nEND:VCARD\r\n"
    "BEGIN:VCARD\r\nVERSION:3.0\r\nN:Reyes;Tom;;;\r\nFN:Tom Reyes\r\nEMAIL:tom@quillon.example\r\nORG:Quillon "
    "Labs\r\nEND:VCARD\r\n"
    "BEGIN:VCARD\r\nVERSION:3.0\r\nN:Ek;Bo;;;\r\nFN:Bo Ek\r\nEMAIL:bo@velvane.example\r\nORG:Velvane "
    "Robotics\r\nEND:VCARD\r\n"
)

SEED_VCF = (
    "BEGIN:VCARD\r\nVERSION:3.0\r\nN:Moss;Cara;;;\r\nFN:Cara Moss\r\nEMAIL:cara@post.example\r\nORG:Velvane "
    "Robotics\r\n"
    "TITLE:Engineer\r\nNOTE:Met at the workshop\r\nCATEGORIES:rowing\r\nEND:VCARD\r\n"
    "BEGIN:VCARD\r\nVERSION:3.0\r\nN:Park;Di;;;\r\nFN:Di Park\r\nEMAIL:di@quillon.example\r\nORG:Quillon "
    "Labs\r\nEND:VCARD\r\n"
    "BEGIN:VCARD\r\nVERSION:3.0\r\nN:Vale;Ed;;;\r\nFN:Ed Vale\r\nTEL:+44 7700 900123\r\nORG:Corrimont "
    "Labs\r\nEND:VCARD\r\n"
)
SEED_CSV = (
    "Full name,Email,Company,Job title,Tags\n"
    "Cara Moss,cara@post.example,Velvane Robotics,Engineer,rowing\n"
    "Di Park,di@quillon.example,Quillon Labs,Designer,rowing\n"
    "Ed Vale,ed@corrimont.example,Corrimont Labs,CTO,\n"
    "Fay Holm,fay@corrimont.example,Corrimont Labs,Lead,chess\n"
)


def _event(n: int, summary: str, cn: str, email: str) -> str:
    return (f"BEGIN:VEVENT\r\nUID:ev{n}@cal.example\r\nDTSTAMP:20260101T120000Z\r\nDTSTART:2026010{n}T100000Z\r\n"
            f"DTEND:2026010{n}T110000Z\r\nSUMMARY:{summary}\r\nORGANIZER;CN=Ana Lind:mailto:ana@quillon.example\r\n"
            f"ATTENDEE;CN={cn}:mailto:{email}\r\nATTENDEE;CN=Tom Reyes:mailto:tom@quillon.example\r\nEND:VEVENT\r\n")


SEED_ICS = ("BEGIN:VCALENDAR\r\nVERSION:2.0\r\nPRODID:-//Invented//Cal//EN\r\n"
            + _event(1, "Planning", "Bo Ek", "bo@velvane.example")
            + _event(2, "Review", "Cara Moss", "cara@post.example")
            + _event(3, "Retro", "Di Park", "di@quillon.example")
            + "END:VCALENDAR\r\n")


def _message(n: int, subject: str, name: str, email: str, extra: str = "") -> str:
    return (f"From {email} Mon Jan  5 10:00:00 2026\nFrom: {name} <{email}>\n"
            f"To: Ana Lind <ana@quillon.example>, Tom Reyes <tom@quillon.example>{extra}\n"
            f"Date: Mon, 0{n} Jan 2026 10:00:00 +0000\nSubject: {subject}\nMessage-ID: <m{n}@mail.example>\n\nbody\n\n")


SEED_MBOX = (_message(1, "Plans", "Bo Ek", "bo@velvane.example")
             + _message(2, "Re: Plans", "Cara Moss", "cara@post.example")
             + _message(3, "Lunch", "Di Park", "di@quillon.example"))
SEEDS = {"vcard": ("seed.vcf", SEED_VCF, 3), "csv": ("seed.csv", SEED_CSV, 4), "ics": ("seed.ics", SEED_ICS, 3),
         "mbox": ("seed.mbox", SEED_MBOX, 3)}


@dataclass
class Case:
    name: str
    kind: str  # the importer it aims at
    filename: str
    data: bytes
    expected: int | None  # good records (cards, rows, events, messages) the workspace should get; None: unknown


def _card(fn: str, email: str, extra: str = "", eol: str = "\r\n") -> str:
    lines = ["BEGIN:VCARD", "VERSION:3.0", f"FN:{fn}", f"EMAIL:{email}", *([extra] if extra else []), "END:VCARD"]
    return eol.join(lines) + eol


def hand_made() -> list[Case]:
    """Bad files written by hand, each with the number of good records it holds."""
    u8 = lambda s: s.encode("utf-8")  # noqa: E731
    c: list[Case] = []
    add = lambda *a: c.append(Case(*a))  # noqa: E731
    # -- vCard
    add("vcf: escape sequences in FN", "vcard", "e.vcf", u8(_card(f"{ESC_SEQ}X", "x@e.example")), 1)
    add("vcf: escapes in ORG, TITLE, NOTE", "vcard", "e2.vcf",
        u8(_card("Ana Vik", "av@e.example", "ORG:\x1b[8mAcme\r\nTITLE:\x1b]0;t\x07Boss\r\nNOTE:\x1b[2Jnote")), 1)
    add("vcf: NUL in FN", "vcard", "nul.vcf", u8(_card("Ana\x00Lind", "al@e.example")), 1)
    add("vcf: C1 CSI in FN (UTF-8)", "vcard", "c1.vcf", u8(_card("Ana\x9b2JVik", "c1@e.example")), 1)
    add("vcf: bidi override in FN", "vcard", "bidi.vcf", u8(_card("\u202eAna Vik", "bd@e.example")), 1)
    add("vcf: DEL and backspaces in FN", "vcard", "del.vcf", u8(_card("Ana\x7f\x08\x08Vik", "dl@e.example")), 1)
    add("vcf: line separator in FN", "vcard", "ls.vcf", u8(_card("Ana\u2028Vik", "ls@e.example")), 1)
    add("vcf: escapes in a quoted-printable FN", "vcard", "qp.vcf",
        b"BEGIN:VCARD\r\nVERSION:2.1\r\nFN;ENCODING=QUOTED-PRINTABLE:=1B[2J=1B]0;x=07Ana\r\n"
        b"EMAIL:qp@e.example\r\nEND:VCARD\r\n", 1)
    add("vcf: escape sequence in the file name", "vcard", "\x1b]0;pwned\x07\x1b[2Jname.vcf",
        u8(_card("Ana Vik", "fn@e.example")), 1)
    add("vcf: CR-only card after CRLF cards", "vcard", "mixed.vcf",
        u8(_card("Ana One", "a1@e.example") + _card("Bo Two", "b2@e.example")
           + _card("Cy Three", "c3@e.example", eol="\r")), 3)
    add("vcf: LF, CRLF and CR cards mixed", "vcard", "mixed2.vcf",
        u8(_card("Ana One", "a1@e.example", eol="\n") + _card("Bo Two", "b2@e.example", eol="\r")
           + _card("Cy Three", "c3@e.example", eol="\r\n") + _card("Di Four", "d4@e.example", eol="\r")), 4)
    add("vcf: FN with a comma, N says otherwise", "vcard", "comma.vcf",
        u8(_card("Lind, Ana", "cm@e.example", "N:Lind;Ana;;;")), 1)
    add("vcf: card without END, then a good one", "vcard", "trunc.vcf",
        u8("BEGIN:VCARD\r\nVERSION:3.0\r\nFN:Ana Cut\r\n" + _card("Bo Whole", "bw@e.example")), 1)
    add("vcf: one bad byte in a UTF-8 card", "vcard", "badbyte.vcf",
        u8(_card("Ana Vik", "v1@e.example"))
        + b"BEGIN:VCARD\r\nVERSION:3.0\r\nFN:Bo \xff Ek\r\nEMAIL:v2@e.example\r\nEND:VCARD\r\n", 2)
    add("vcf: 1 MiB value", "vcard", "big.vcf", u8(_card("Ana Big", "big@e.example", "NOTE:" + "x" * (1 << 20))), 1)
    add("vcf: AGENT nested 40 deep", "vcard", "deep.vcf",
        u8("BEGIN:VCARD\r\nVERSION:2.1\r\nFN:Top\r\nAGENT:\r\n" * 40 + "END:VCARD\r\n" * 40), None)
    add("vcf: binary with a .vcf name", "vcard", "bin.vcf",
        bytes(random.Random(1).randrange(256) for _ in range(4096)), 0)
    add("vcf: UTF-16 with a lone surrogate", "vcard", "u16.vcf",
        b"\xff\xfe" + _card("Ana Vik", "u16@e.example").encode("utf-16-le") + b"\x00\xd8A\x00", 1)
    # -- CSV
    add("csv: escape sequences in cells", "csv", "e.csv",
        u8(f"Full name,Email,Company\n{ESC_SEQ}Ana,a@e.example,\x1b[5mAcme\nBo Ek,b@e.example,Velvane\n"), 2)
    add("csv: quote closing on a later line", "csv", "u.csv",
        u8('Full name,Email\n"Alice,a@e.example\nBob,b@e.example\n"Carl, "x,c@e.example\n'), 3)
    add("csv: quote swallowing many rows", "csv", "u2.csv",
        u8('Full name,Email\nAna,a@e.example\n"Bo,b@e.example\n' + "".join(f"P{i},p{i}@e.example\n" for i in range(8))
           + 'Cy",c@e.example\nDi,d@e.example\n'), 12)
    add("csv: legitimate quoted line break", "csv", "ml.csv",
        u8('Full name,Email,Notes\nAna Vik,a@e.example,"first line\nsecond line"\nBo Ek,b@e.example,plain\n'), 2)
    add("csv: UTF-8 BOM and one bad byte", "csv", "bom.csv",
        b"\xef\xbb\xbfFull name,Email\nAna Vik,a@e.example\nBo \xff Ek,b@e.example\nCy Moss,c@e.example\n", 3)
    add("csv: UTF-16 BOM and a cut-off last unit", "csv", "u16.csv",
        b"\xff\xfe" + "Full name,Email\nAna Vik,a@e.example\nBo Ek,b@e.example\n".encode("utf-16-le") + b"A", 2)
    add("csv: 200 KiB field in one row", "csv", "wide.csv",
        u8("Full name,Email,Notes\nAna Vik,a@e.example,short\nBo Ek,b@e.example,\"" + "y" * 200_000
           + "\"\nCy Moss,c@e.example,\n"), 2)
    add("csv: NUL in a cell", "csv", "nul.csv", u8("Full name,Email\nAna\x00Vik,a@e.example\nBo Ek,b@e.example\n"), 2)
    add("csv: latin-1 C1 byte in a name", "csv", "c1.csv",
        b"Full name,Email\nAna \x81Vik,a@e.example\nBo \xe9k,b@e.example\n", 2)
    add("csv: bidi override and line separator", "csv", "bidi.csv",
        u8("Full name,Email\n\u202eAna Vik,a@e.example\nBo\u2028Ek,b@e.example\n"), 2)
    add("csv: formulas in cells", "csv", "formula.csv",
        u8("Full name,Email,Company\n=cmd|' /C calc'!A0,f@e.example,+Acme\n@SUM(1),g@e.example,-x\n"), 2)
    add("csv: unclosed quote on the last row", "csv", "open.csv",
        u8('Full name,Email\nAna Vik,a@e.example\nBo Ek,b@e.example\n"Cy Moss,c@e.example\n'), 2)
    add("csv: escape sequence in the file name", "csv", "\x1b[2J\x1b]0;x\x07.csv",
        u8("Full name,Email\nAna Vik,a@e.example\n"), 1)
    add("csv: ragged rows", "csv", "ragged.csv",
        u8("Full name,Email\nAna Vik,a@e.example,x,y,z\nBo Ek\nCy Moss,c@e.example\n"), None)
    add("csv: header only", "csv", "head.csv", u8("Full name,Email\n"), 0)
    # -- iCalendar
    add("ics: escape sequences in SUMMARY and CN", "ics", "e.ics",
        u8(SEED_ICS.replace("SUMMARY:Planning", f"SUMMARY:{ESC_SEQ}Planning").replace("CN=Bo Ek", "CN=\x1b[31mBo Ek")),
        3)
    add("ics: NUL and C1 in CN", "ics", "nul.ics", u8(SEED_ICS.replace("CN=Cara Moss", "CN=Cara\x00\x9bMoss")), 3)
    add("ics: CR-only line ends", "ics", "cr.ics", u8(SEED_ICS.replace("\r\n", "\r")), 3)
    add("ics: event without END", "ics", "trunc.ics", u8(SEED_ICS.rsplit("END:VEVENT", 1)[0]), 2)
    add("ics: bidi override in the organizer's name", "ics", "bidi.ics",
        u8(SEED_ICS.replace("CN=Ana Lind", "CN=\u202eAna Lind")), 3)
    # -- mail
    add("mbox: escapes in From name and Subject", "mbox", "e.mbox",
        u8(SEED_MBOX.replace("From: Bo Ek",
                             f"From: {ESC_SEQ}Bo Ek").replace("Subject: Lunch", "Subject: \x1b]0;x\x07Lunch")), 3)
    add("mbox: escape in an encoded word", "mbox", "ew.mbox",
        u8(SEED_MBOX.replace("Subject: Plans", "Subject: =?utf-8?b?G1sySkcbXTA7eAdv?=")), 3)
    add("mbox: NUL in a header", "mbox", "nul.mbox", u8(SEED_MBOX.replace("Subject: Lunch", "Subject: Lu\x00nch")), 3)
    add("mbox: 100,000 recipients in To", "mbox", "wide.mbox",
        u8(_message(1, "All hands", "Bo Ek", "bo@velvane.example",
                    "," + ",".join(f" p{i}@big.example" for i in range(100_000)))
                    + _message(2, "Small", "Di Park", "di@quillon.example")), 2)
    add("eml: escapes in Subject", "mbox", "e.eml",
        u8("From: Bo Ek <bo@velvane.example>\nTo: Ana Lind <ana@quillon.example>\nDate: Mon, 05 Jan 2026 10:00:00 "
           "+0000\n"
           f"Subject: {ESC_SEQ}hi\nMessage-ID: <x@mail.example>\n\nbody\n"), 1)
    # -- anything
    add("empty file", "csv", "empty.csv", b"", 0)
    add("only NULs", "csv", "zeros.csv", b"\x00" * 512, 0)
    return c


def _mutate_values(text: str, kind: str, rng: random.Random) -> str:
    """Hostile characters inside values only (records must all survive)."""
    lines = text.splitlines(keepends=True)
    out = []
    for ln in lines:
        bare = ln.rstrip("\r\n")
        end = ln[len(bare):]
        if rng.random() < 0.5 and bare:
            keep = ("BEGIN", "END", "VERSION", "DT", "UID", "EMAIL", "ATTENDEE", "ORGANIZER")
            if kind in ("vcard", "ics") and ":" in bare and not bare.upper().startswith(keep):
                head, _, val = bare.partition(":")
                pos = rng.randrange(len(val) + 1)
                bare = head + ":" + val[:pos] + rng.choice(HOSTILE).replace("\u2028", " ") + val[pos:]
            elif kind == "csv" and "," in bare and not bare.startswith("Full name"):
                cells = bare.split(",")
                i = rng.choice([0, 2, 3])
                cells[i] = cells[i] + rng.choice(HOSTILE).replace(",", "")
                bare = ",".join(cells)
            elif kind == "mbox" and bare.startswith(("Subject:", "From: ")):
                name, _, val = bare.partition(": ")
                bare = name + ": " + rng.choice(HOSTILE).replace("\u2028", " ") + val
        out.append(bare + end)
    return "".join(out)


def _mutate_line_ends(text: str, rng: random.Random) -> str:
    ends = ["\n", "\r\n", "\r"]
    return "".join(ln.rstrip("\r\n") + rng.choice(ends) for ln in text.splitlines(keepends=True))


def _mutate_bytes(data: bytes, rng: random.Random) -> bytes:
    buf = bytearray(data)
    for _ in range(rng.randint(1, 8)):
        op = rng.randrange(6)
        pos = rng.randrange(len(buf) + 1) if buf else 0
        if op == 0 and buf:
            buf[min(pos, len(buf) - 1)] = rng.randrange(256)
        elif op == 1:
            buf[pos:pos] = bytes(rng.randrange(256) for _ in range(rng.randint(1, 12)))
        elif op == 2 and buf:
            del buf[pos:pos + rng.randint(1, 40)]
        elif op == 3:
            buf[pos:pos] = rng.choice([b'"', b"\r", b"\n", b"\x00", b"=", b";", b",", b":", b"\\",
                                       b"BEGIN:VCARD\r\n", b"END:VEVENT\r\n", b"\nFrom x@y Mon Jan  1 00:00:00 2026\n",
                                       b"\xef\xbb\xbf", b"\xff\xfe"])
        elif op == 4 and buf:
            del buf[pos:]
        elif op == 5 and buf:
            a = rng.randrange(len(buf))
            buf[pos:pos] = buf[a:a + rng.randint(1, 200)]
    return bytes(buf)


def fuzzed(n: int, seed: int) -> list[Case]:
    rng = random.Random(seed)
    out = []
    kinds = list(SEEDS)
    for i in range(n):
        kind = kinds[i % len(kinds)]
        fname, text, count = SEEDS[kind]
        how = rng.choice(["values", "values", "line ends", "bytes", "bytes", "bytes"])
        if how == "values":
            data, expected = _mutate_values(text, kind, rng).encode("utf-8"), count
        elif how == "line ends":
            data, expected = _mutate_line_ends(text, rng).encode("utf-8"), count
        else:
            data, expected = _mutate_bytes(text.encode("utf-8"), rng), None
        out.append(Case(f"fuzz {i} ({kind}, {how})", kind, f"f{i}-{fname}", data, expected))
    return out


# ------------------------------------------------------------------ running the CLI in this process

class Hang(Exception):
    pass


def _alarm(_sig, _frame):
    raise Hang()


def run_cli(args: list[str]) -> tuple[int | str, bytes, bytes]:
    """Run ``mynet ARGS`` here: (exit code or "crash"/"hang", stdout bytes, stderr bytes)."""
    from mynet.cli import main

    out_b, err_b = io.BytesIO(), io.BytesIO()
    out = io.TextIOWrapper(out_b, encoding="utf-8", errors="strict", newline="")
    err = io.TextIOWrapper(err_b, encoding="utf-8", errors="strict", newline="")
    old = sys.stdout, sys.stderr, sys.stdin
    sys.stdout, sys.stderr, sys.stdin = out, err, io.StringIO("")
    signal.signal(signal.SIGALRM, _alarm)
    signal.alarm(TIMEOUT)
    try:
        code: int | str = main(args)
    except Hang:
        code = "hang"
    except BaseException:  # noqa: BLE001 - an uncaught exception is what this trial counts
        code = "crash"
        err.write(traceback.format_exc())
    finally:
        signal.alarm(0)
        try:
            out.flush()
            err.flush()
        except Exception:  # noqa: BLE001
            code = "crash"
        sys.stdout, sys.stderr, sys.stdin = old
    return code, out_b.getvalue(), err_b.getvalue()


def raw_controls(data: bytes, *, crlf_ok: bool = False) -> int:
    """How many characters a terminal would act on: C0 but tab/newline, DEL, C1, lone surrogates, bidi controls."""
    if crlf_ok:
        data = data.replace(b"\r\n", b"\n")
    text = data.decode("utf-8", errors="surrogateescape")
    return sum(1 for ch in text if (ord(ch) < 0x20 and ch not in "\t\n") or 0x7F <= ord(ch) <= 0x9F
               or 0xD800 <= ord(ch) <= 0xDFFF or ch in BIDI)


def _parses(path: Path) -> str:
    """"" when the export reads back in every reader, else what failed."""
    import networkx as nx

    try:
        if path.suffix == ".graphml":
            ET.parse(path)
            nx.read_graphml(path)
            import igraph

            igraph.Graph.Read_GraphML(str(path))
        elif path.suffix == ".csv":
            with path.open(encoding="utf-8-sig", newline="") as f:
                rows = list(csv.reader(f))
            if not rows or len({len(r) for r in rows}) != 1:
                return f"{path.name}: rows of different widths"
        elif path.suffix == ".json":
            json.loads(path.read_text(encoding="utf-8"))
        elif path.suffix == ".html":
            text = path.read_text(encoding="utf-8")
            ET.fromstring(text.split("\n", 1)[1] if text.startswith("<!DOCTYPE") else text)
    except Exception as exc:  # noqa: BLE001
        return f"{path.name}: {type(exc).__name__}: {str(exc)[:80]}"
    return ""


@dataclass
class Outcome:
    case: Case
    problems: list[str] = field(default_factory=list)
    lost: int = 0
    got: int | None = None


def run_case(case: Case, root: Path, *, report: bool) -> Outcome:
    res = Outcome(case)
    ws = root / "ws.sqlite"
    base = root / "base.vcf"
    base.write_bytes(BASE_VCF.encode())
    try:
        target = root / case.filename
        target.write_bytes(case.data)
    except OSError:
        target = root / f"case{abs(hash(case.filename))}.bin"
        target.write_bytes(case.data)
    W = ["--workspace", str(ws)]
    steps: list[list[str]] = [["import", str(base)], ["import", str(target)], ["import", str(target), "--json"],
                              ["sources", "--json"], ["sources"], ["contacts"], ["contacts", "--json"],
                              ["contacts", "--unlisted"], ["contacts", "--suggested"], ["ties", "--all"], ["groups"]]
    outputs: dict[str, bytes] = {}
    for args in steps:
        code, out, err = run_cli(W + args)
        key = " ".join(args[:2])
        if code in ("crash", "hang"):
            res.problems.append(f"{code} in `mynet {key}`: {err.decode('utf-8', 'replace').strip().splitlines()[-1:]} ")
            return res
        if code not in OK_CODES:
            res.problems.append(f"`mynet {key}` exit {code}")
        if args[0] != "import" or args[-1] != "--json":
            for stream, data in (("stdout", out), ("stderr", err)):
                if raw_controls(data):
                    res.problems.append(f"raw control characters on {stream} of `mynet {key}`")
        outputs[" ".join(args)] = out
    try:
        sources = json.loads(outputs["sources --json"] or b"[]")
        people = json.loads(outputs["contacts --json"] or b"[]")
    except json.JSONDecodeError as exc:
        res.problems.append(f"--json output is not JSON ({exc})")
        return res
    mine = [s for s in sources if Path(s["path"]).name != "base.vcf"]
    res.got = sum(s["n_records"] for s in mine)
    if case.expected is not None and res.got < case.expected:
        res.lost = case.expected - res.got
        res.problems.append(f"{res.lost} of {case.expected} good records lost")
    ids = [p["id"] for p in people]
    more: list[list[str]] = []
    if ids:
        more.append(["show", str(ids[-1])])
    if len(ids) >= 2:
        more.append(["why", str(ids[0]), str(ids[-1])])
    more += [["export", "-o", str(root / "net.graphml")], ["export", "-o", str(root / "net.csv")],
             ["export", "-o", str(root / "net.json")]]
    if report:
        more += [["report", "-o", str(root / "r.html")], ["report", "--markdown", "-o", str(root / "r.md")]]
    for args in more:
        code, out, err = run_cli(W + args)
        key = " ".join(args[:1])
        if code in ("crash", "hang"):
            res.problems.append(f"{code} in `mynet {key}`: {err.decode('utf-8', 'replace').strip().splitlines()[-1:]}")
            continue
        if code not in OK_CODES:
            res.problems.append(f"`mynet {key}` exit {code}")
        for stream, data in (("stdout", out), ("stderr", err)):
            if raw_controls(data):
                res.problems.append(f"raw control characters on {stream} of `mynet {key}`")
    for f in sorted(root.iterdir()):
        if f.suffix in (".graphml", ".csv", ".json", ".html", ".md", ".svg") and f.name.startswith(("net", "r.", "r_")):
            if raw_controls(f.read_bytes(), crlf_ok=f.suffix == ".csv"):
                res.problems.append(f"raw control characters in {f.name}")
            why = _parses(f)
            if why:
                res.problems.append(f"export does not parse: {why}")
    return res


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--fuzz", type=int, default=256, help="How many fuzzed files (default 256).")
    ap.add_argument("--seed", type=int, default=7)
    ap.add_argument("--no-report", action="store_true", help="Skip the HTML/Markdown report (faster).")
    ap.add_argument("--list", action="store_true", help="List every case with its verdict.")
    args = ap.parse_args()
    import logging

    logging.disable(logging.CRITICAL)
    cases = hand_made() + fuzzed(args.fuzz, args.seed)
    tried, handled, lost = Counter(), Counter(), Counter()
    known = Counter()
    failures: dict[str, list[str]] = defaultdict(list)
    for case in cases:
        group = ("hand-made " if not case.name.startswith("fuzz") else "fuzzed ") + case.kind
        with tempfile.TemporaryDirectory(prefix="mynet-hostile-") as tmp:
            out = run_case(case, Path(tmp), report=not args.no_report)
        tried[group] += 1
        if case.expected:
            known[group] += case.expected
        lost[group] += out.lost
        if out.problems:
            failures[group].append(f"{case.name}: " + "; ".join(dict.fromkeys(out.problems)))
        else:
            handled[group] += 1
        if args.list:
            print(f"{'ok  ' if not out.problems else 'FAIL'} {case.name!r} got={out.got} expected={case.expected}")
    for group in sorted(failures):
        print(f"\n{group}: {len(failures[group])} case(s) not handled")
        for line in failures[group]:
            print("  " + line.encode("unicode_escape").decode("ascii")[:300])
    print(f"\n{'cases':<20}{'tried':>7}{'handled':>9}{'good records':>14}{'lost':>6}")
    for group in sorted(tried):
        print(f"{group:<20}{tried[group]:>7}{handled[group]:>9}{known[group]:>14}{lost[group]:>6}")
    totals = [sum(d.values()) for d in (tried, handled, known, lost)]
    print(f"{'total':<20}{totals[0]:>7}{totals[1]:>9}{totals[2]:>14}{totals[3]:>6}")


if __name__ == "__main__":
    main()
