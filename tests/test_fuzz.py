"""Property-based fuzzing of the four importers and of every text output (hypothesis, derandomised).

Three properties, each within a fixed budget of examples so the module runs in
well under a minute and the same examples run on every machine:

* any text (controls, bidi overrides, escape sequences, markup) in the values
  of a well-formed vCard, CSV, iCalendar or mbox file: every record survives
  and nothing stored holds a control character;
* any bytes spliced into those files: the importer returns or raises
  :class:`~mynet.errors.InputError`, never anything else, and nothing stored
  holds a control character;
* any text in a workspace (as one written before import cleaning may hold it):
  no character below U+0020 but tab and newline (nor DEL, C1, a bidi control)
  reaches the CLI's tables, its JSON, the report or the exports, and every
  export parses (the standard library's XML, CSV and JSON readers; networkx).
"""

from __future__ import annotations

import csv
import io
import json
import re
import xml.etree.ElementTree as ET

import networkx as nx
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from mynet.cli import main
from mynet.errors import InputError
from mynet.people.refresh import refresh_contacts
from mynet.safetext import BIDI_CONTROLS
from mynet.sources import parse_file
from mynet.store import Store
from mynet.workspace.importing import import_paths

RAW = re.compile("[\x00-\x08\x0b-\x1f\x7f-\x9f\ud800-\udfff" + BIDI_CONTROLS + "]")
PIECES = ["\x1b[2J", "\x1b]0;pwned\x07", "\x1b", "\x00", "\x07", "\x08", "\x7f", "\x9b", "\x9d0;x\x9c", "\x85",
          "\u202e", "\u2066", "\u2028", "\x0b", "\x0c", "[/]", "[@click=app.quit]", "$x^$", "=cmd|", "\t", "é", "周"]
#: Text with the characters that hurt drawn often; no CR or LF (they are structure in these formats).
HOSTILE_TEXT = st.lists(
    st.one_of(st.sampled_from(PIECES), st.characters(blacklist_categories=("Cs",), blacklist_characters="\r\n")),
    min_size=1, max_size=12).map("".join)
FUZZ = settings(derandomize=True, database=None, deadline=None,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])


def stored_text(result) -> str:
    return json.dumps([r.to_dict() for r in result.records] + [i.to_dict() for i in result.interactions],
                      ensure_ascii=False)


# ------------------------------------------------------------------ well-formed files with hostile values


def _vcard_escape(text: str) -> str:  # RFC 6350 section 3.4
    return text.replace("\\", "\\\\").replace(",", "\\,").replace(";", "\\;")


def vcard_file(texts: list[str]) -> tuple[bytes, int]:
    cards = [f"BEGIN:VCARD\r\nVERSION:3.0\r\nFN:{_vcard_escape(t)} {i}\r\nORG:{_vcard_escape(t)}\r\n"
             f"NOTE:{_vcard_escape(t)}\r\nEMAIL:p{i}@fuzz.example\r\nEND:VCARD\r\n" for i, t in enumerate(texts)]
    return "".join(cards).encode("utf-8", "surrogatepass"), len(texts)


def csv_file(texts: list[str]) -> tuple[bytes, int]:
    buf = io.StringIO()
    w = csv.writer(buf, quoting=csv.QUOTE_ALL, lineterminator="\r\n")
    w.writerow(["Full name", "Email", "Company", "Notes"])
    for i, t in enumerate(texts):
        w.writerow([f"{t} {i}", f"p{i}@fuzz.example", t, t])
    return buf.getvalue().encode("utf-8"), len(texts)


def ics_text(text: str) -> str:  # RFC 5545 section 3.3.11
    return text.replace("\\", "\\\\").replace(";", "\\;").replace(",", "\\,")


def ics_file(texts: list[str]) -> tuple[bytes, int]:
    events = []
    for i, t in enumerate(texts):
        cn = re.sub(r'[";:,]', " ", t)
        events.append(f"BEGIN:VEVENT\r\nUID:e{i}@fuzz.example\r\nDTSTART:20260105T1{i % 10}0000Z\r\n"
                      f"SUMMARY:{ics_text(t)}\r\nORGANIZER;CN=\"{cn}\":mailto:o@fuzz.example\r\n"
                      f"ATTENDEE;CN=\"{cn}\":mailto:p{i}@fuzz.example\r\nEND:VEVENT\r\n")
    return ("BEGIN:VCALENDAR\r\nVERSION:2.0\r\n" + "".join(events) + "END:VCALENDAR\r\n").encode("utf-8"), len(texts)


def mbox_file(texts: list[str]) -> tuple[bytes, int]:
    msgs = []
    for i, t in enumerate(texts):
        name = re.sub(r'[<>"@,:;\\()]', " ", t)
        msgs.append(f"From p{i}@fuzz.example Mon Jan  5 10:00:00 2026\nFrom: \"{name}\" <p{i}@fuzz.example>\n"
                    f"To: o@fuzz.example\nDate: Mon, 05 Jan 2026 10:{i % 60:02d}:00 +0000\nSubject: {t}\n"
                    f"Message-ID: <m{i}@fuzz.example>\n\nbody\n\n")
    return "".join(msgs).encode("utf-8"), len(texts)


BUILDERS = {"vcf": vcard_file, "csv": csv_file, "ics": ics_file, "mbox": mbox_file}


@pytest.mark.parametrize("suffix", sorted(BUILDERS))
@settings(FUZZ, max_examples=150)
@given(texts=st.lists(HOSTILE_TEXT, min_size=1, max_size=4))
def test_hostile_values_keep_every_record_and_store_no_control(suffix, texts, tmp_path_factory):
    data, expected = BUILDERS[suffix](texts)
    path = tmp_path_factory.mktemp("fuzz") / f"f.{suffix}"
    path.write_bytes(data)
    result = parse_file(path)
    assert len(result.records) + len(result.interactions) == expected, (result.skipped, result.warnings)
    assert not RAW.search(stored_text(result))


# ------------------------------------------------------------------ any bytes spliced in

SEEDS = {suffix: build(["Ana Lind", "Bo Ek", "Cy Moss"])[0] for suffix, build in BUILDERS.items()}


@pytest.mark.parametrize("suffix", sorted(BUILDERS))
@settings(FUZZ, max_examples=200)
@given(cuts=st.lists(st.tuples(st.floats(0, 1), st.integers(0, 40), st.binary(max_size=24)), min_size=1, max_size=6))
def test_any_bytes_give_records_or_a_clear_error(suffix, cuts, tmp_path_factory):
    data = bytearray(SEEDS[suffix])
    for where, drop, insert in cuts:
        at = int(where * len(data))
        data[at:at + drop] = insert
    path = tmp_path_factory.mktemp("fuzz") / f"f.{suffix}"
    path.write_bytes(bytes(data))
    try:
        result = parse_file(path)
    except InputError as exc:
        assert str(exc).startswith(str(path))
        return
    assert not RAW.search(stored_text(result))
    for skipped in result.skipped:
        assert skipped.line >= 1


# ------------------------------------------------------------------ every output of a workspace holding any text


@pytest.fixture(scope="module")
def base_workspace(tmp_path_factory):
    folder = tmp_path_factory.mktemp("fuzz-ws")
    src = folder / "people.csv"
    src.write_text("Full name,Email,Company,Tags\n" + "".join(
        f"Person "
        f"{i},p{i}@fuzz.example,{'Quillon Labs' if i < 4 else 'Velvane Robotics'},{'rowing' if i % 2 else 'chess'}\n"
        for i in range(8)), encoding="utf-8")
    ws = folder / "ws.sqlite"
    with Store(ws) as store:
        import_paths(store, [src])
    return ws


def run(capsys, *args) -> tuple[int, str, str]:
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


@settings(FUZZ, max_examples=25)
@given(names=st.lists(HOSTILE_TEXT, min_size=3, max_size=3), org=HOSTILE_TEXT, tag=HOSTILE_TEXT,
       report=st.booleans())
def test_no_control_reaches_any_output_and_exports_parse(base_workspace, tmp_path_factory, capsys, names, org, tag,
                                                         report):
    folder = tmp_path_factory.mktemp("out")
    ws = folder / "ws.sqlite"
    with Store(base_workspace) as src, Store(ws) as store:
        src.conn.backup(store.conn)
        with store.transaction():  # as a workspace written before import cleaning may hold them
            for n, (rid, data) in enumerate(store.conn.execute("SELECT id, data FROM records ORDER BY id").fetchall()):
                rec = json.loads(data)
                if n < len(names):
                    rec["full_name"] = f"{names[n]} {n}"  # never equal to the organisation (an org card)
                    rec["orgs"] = [org]
                    rec["tags"] = [tag]
                store.conn.execute("UPDATE records SET data = ? WHERE id = ?", (json.dumps(rec), rid))
            store.bump_data_version()
        refresh_contacts(store)
    w = ["--workspace", str(ws)]
    outputs = []
    for args in (["contacts"], ["contacts", "--json"], ["show", "1"], ["why", "1", "2"], ["ties", "--all"],
                 ["groups"], ["brokers"], ["reach", "--tag", "rowing"], ["audit"]):
        code, out, err = run(capsys, *w, *args)
        assert code in (0, 1, 4), (args, err)
        assert not RAW.search(out + err), (args, RAW.findall(out + err))
        outputs.append(out)
    assert len(json.loads(outputs[1])) == 8
    for name in ("net.graphml", "net.csv", "net.json"):
        assert run(capsys, *w, "export", "-o", str(folder / name))[0] == 0
    ET.parse(folder / "net.graphml")
    assert nx.read_graphml(folder / "net.graphml").number_of_nodes() == 8
    json.loads((folder / "net.json").read_text(encoding="utf-8"))
    for part in ("net-contacts.csv", "net-ties.csv"):
        with (folder / part).open(encoding="utf-8-sig", newline="") as f:
            rows = list(csv.reader(f))
        assert len({len(r) for r in rows}) == 1
    files = [folder / "net.graphml", folder / "net.json", folder / "net-contacts.csv", folder / "net-ties.csv"]
    if report:
        assert run(capsys, *w, "report", "-o", str(folder / "r.html"))[0] == 0
        html_text = (folder / "r.html").read_text(encoding="utf-8")
        ET.fromstring(html_text.split("\n", 1)[1])
        files.append(folder / "r.html")
    for f in files:
        text = f.read_text(encoding="utf-8-sig").replace("\r\n", "\n")  # CSV ends records with CR LF (RFC 4180)
        assert not RAW.search(text), (f.name, RAW.findall(text))
