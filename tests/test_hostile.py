"""Hostile text from files: cleaned at import, shown (never obeyed) by every view, exports that always parse.

The people here are invented. Workspaces written before import cleaning existed
are simulated by writing control characters straight into the stored records.
"""

from __future__ import annotations

import ast
import asyncio
import csv
import io
import json
import re
import xml.etree.ElementTree as ET
from pathlib import Path

import networkx as nx
import pytest

from mynet.cli import main
from mynet.people.refresh import refresh_contacts
from mynet.safetext import BIDI_CONTROLS, clean_imported, json_escape, shown
from mynet.sources import parse_file
from mynet.store import Store
from mynet.workspace.importing import import_paths
from mynet.workspace.location import resolve_workspace_path

ROOT = Path(__file__).resolve().parents[1]
ESC_SEQ = "\x1b[2J\x1b]0;pwned\x07"
#: What a terminal would act on: C0 but tab and newline, DEL, C1, bidi controls, lone surrogates.
RAW = re.compile("[\x00-\x08\x0b-\x1f\x7f-\x9f\ud800-\udfff" + BIDI_CONTROLS + "]")


def run(capsys, *args):
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


def assert_clean(text: str, where: str = "") -> None:
    found = RAW.findall(text)
    assert not found, f"raw control characters {found[:5]!r} in {where}"


# -------------------------------------------------------------------------------- the sanitiser


def xml_char(ch: str) -> bool:
    """XML 1.0 (Fifth Edition) section 2.2, production [2] Char."""
    c = ord(ch)
    return c in (0x9, 0xA, 0xD) or 0x20 <= c <= 0xD7FF or 0xE000 <= c <= 0xFFFD or 0x10000 <= c <= 0x10FFFF


def test_shown_makes_every_character_visible_and_xml_safe():
    every = "".join(chr(c) for c in range(0x0, 0x3000)) + "\ud800\udfff\ufffe\uffff\U0001f600"
    out = shown(every)
    assert all(xml_char(ch) for ch in out)
    assert_clean(out)
    assert shown(ESC_SEQ + "X") == "␛[2J␛]0;pwned␇X"
    assert shown("a\x00b\x7fc\x9bd\u202ee") == "a␀b␡c\ufffdd\ufffde"
    assert shown("one\r\ntwo\rthree\u2028four") == "one\ntwo␍three\nfour"
    assert shown("tab\tand\nline", one_line=True) == "tab and line"
    for fine in ("Zoë Brønholt", "周静", "Ngọc Phạm", "عائشة", "x\u200fy", "👩‍💻 coder", "a\u00a0b"):
        assert shown(fine) == fine  # printable text (an RTL mark, a joiner, a no-break space too) is untouched


def test_clean_imported_cuts_escape_sequences_out_whole():
    assert clean_imported(ESC_SEQ + "X") == ("X", "ESC ×2, BEL")
    assert clean_imported("\x1b[31mBo Ek\x1b[0m") == ("Bo Ek", "ESC ×2")
    assert clean_imported("Ana\x00Lind")[0] == "AnaLind"
    assert clean_imported("Ana\x9b2JVik")[0] == "AnaVik"  # the 8-bit CSI too
    assert clean_imported("\u202eAna")[0] == "Ana"
    assert clean_imported("\x1b]never ended")[0] == "never ended"  # an unterminated OSC keeps its text
    assert clean_imported("first\r\nsecond", multiline=True) == ("first\nsecond", "")
    assert clean_imported("first\r\nsecond") == ("first second", "")


def test_json_escape_keeps_the_meaning():
    data = {"name": "a\x9bb\u202ec\x7f\u2028", "n": [1, "\udc80"]}
    doc = json_escape(json.dumps(data, ensure_ascii=False))
    assert_clean(doc)
    assert json.loads(doc) == data


# -------------------------------------------------------------------------------- import


def test_the_reproduction_is_cleaned_at_import_with_file_and_line(tmp_path, capsys):
    e = tmp_path / "e.vcf"
    e.write_bytes(b"BEGIN:VCARD\r\nVERSION:3.0\r\nFN:\033[2J\033]0;pwned\007X\r\nEMAIL:x@e.example\r\nEND:VCARD\r\n")
    code, out, err = run(capsys, "import", str(e))
    assert code == 0
    assert_clean(out + err, "import")
    assert "e.vcf:1: removed control characters (ESC ×2, BEL) from the name" in err  # the card starting on line 1
    with Store(resolve_workspace_path()) as store:
        (record,) = [r for _i, _k, _s, r in store.records()]
        assert record.full_name == "X"
        assert not RAW.search(store.conn.execute("SELECT group_concat(data) FROM records").fetchone()[0])
    code, out, err = run(capsys, "contacts")
    assert code == 0 and "X" in out
    assert_clean(out + err, "contacts")


@pytest.mark.parametrize("name, data", [
    ("nul.csv", b"Full name,Email\nAna\x00Vik,a@e.example\nBo Ek,b@e.example\n"),
    ("c1.csv", "Full name,Email\nAna\x9b2JVik,a@e.example\nBo Ek,b@e.example\n".encode()),
    ("ev.ics", ("BEGIN:VCALENDAR\r\nVERSION:2.0\r\nBEGIN:VEVENT\r\nUID:1@e.example\r\nDTSTART:20260105T100000Z\r\n"
                "SUMMARY:\x1b]0;x\x07Plan\r\nORGANIZER;CN=\x1b[31mAna:mailto:a@e.example\r\n"
                "ATTENDEE;CN=Bo\x00Ek:mailto:b@e.example\r\nEND:VEVENT\r\nEND:VCALENDAR\r\n").encode()),
    ("m.mbox", ("From a@e.example Mon Jan  5 10:00:00 2026\nFrom: \x1b[2JAna <a@e.example>\nTo: Bo <b@e.example>\n"
                "Date: Mon, 05 Jan 2026 10:00:00 +0000\nSubject: =?utf-8?b?G1sySkcbXTA7eAdv?=\n"
                "Message-ID: <m1@e.example>\n\nbody\n").encode()),
])
def test_every_importer_stores_no_control_character(tmp_path, name, data):
    path = tmp_path / name
    path.write_bytes(data)
    result = parse_file(path)
    stored = json.dumps([r.to_dict() for r in result.records] + [i.to_dict() for i in result.interactions],
                        ensure_ascii=False)
    assert_clean(stored, name)
    assert result.records or result.interactions
    assert any(f"{name}:" in w and "control characters" in w for w in result.warnings)


# -------------------------------------------------------------------------------- a workspace full of hostile text

HOSTILE_CSV = (
    "Full name,Email,Company,Tags,Notes\n"
    "Ana Lind,ana@quillon.example,Quillon Labs,rowing,plain\n"
    "[/],close@quillon.example,Quillon Labs,rowing,\n"
    "[@click=app.quit]Quit me[/],quit@quillon.example,Quillon Labs,rowing,\n"
    "Dollar $\\frac{$ Sign,dollar@quillon.example,Quillon Labs,rowing,\n"
    "Bo Ek,bo@velvane.example,Velvane Robotics,chess,\n"
    "Cy Moss,cy@velvane.example,Velvane Robotics,chess,\n"
    "Di Park,di@velvane.example,Velvane Robotics,chess,\n"
)
#: Names as a workspace written before import cleaning may hold them.
LEGACY = {"Ana Lind": f"{ESC_SEQ}Ana\x00 Lind\u202e", "Bo Ek": "Bo\x9b2J Ek\x7f\x08",
          "Cy Moss": "Cy\rMoss\x1b]8;;x\x07"}


@pytest.fixture
def hostile(tmp_path):
    """A workspace whose names, organisations, tags, meeting titles and group names carry controls and markup."""
    src = tmp_path / "people.csv"
    src.write_text(HOSTILE_CSV, encoding="utf-8")
    cal = tmp_path / "cal.ics"
    events = "".join(
        f"BEGIN:VEVENT\r\nUID:{n}@cal.example\r\nDTSTART:2026010{n}T100000Z\r\nSUMMARY:Plan {n}\r\n"
        "ORGANIZER;CN=Ana Lind:mailto:ana@quillon.example\r\nATTENDEE;CN=Bo Ek:mailto:bo@velvane.example\r\n"
        "ATTENDEE;CN=Cy Moss:mailto:cy@velvane.example\r\nEND:VEVENT\r\n" for n in range(1, 4))
    cal.write_text(f"BEGIN:VCALENDAR\r\nVERSION:2.0\r\n{events}END:VCALENDAR\r\n", encoding="utf-8")
    ws = tmp_path / "ws.sqlite"
    with Store(ws) as store:
        import_paths(store, [src, cal])
        with store.transaction():
            for rid, data in store.conn.execute("SELECT id, data FROM records").fetchall():
                rec = json.loads(data)
                if rec["full_name"] in LEGACY:
                    rec["full_name"] = LEGACY[rec["full_name"]]
                    rec["orgs"] = [o + "\x1b[5m" for o in rec["orgs"]]
                    rec["tags"] = [t + "\x9d0;t\x9c" for t in rec["tags"]]
                    store.conn.execute("UPDATE records SET data = ? WHERE id = ?", (json.dumps(rec), rid))
            for iid, data in store.conn.execute("SELECT id, data FROM interactions").fetchall():
                it = json.loads(data)
                it["title"] = "\x1b]0;owned\x07" + it["title"] + "\x00"
                store.conn.execute("UPDATE interactions SET data = ? WHERE id = ?", (json.dumps(it), iid))
            store.bump_data_version()
        refresh_contacts(store)
        from mynet.analysis.snapshot import analyse
        from mynet.evidence.network import load_network
        from mynet.workspace.decisions import name_group

        a = analyse(store, load_network(store))
        name_group(store, a.groups[0].id, "\x1b[2J[b]Team[/b] \u202eexcept")
        assert any(RAW.search(c.name) for c in store.contacts())
    return ws


def test_every_command_shows_hostile_text_without_obeying_it(hostile, tmp_path, capsys):
    w = ["--workspace", str(hostile)]
    people = json.loads(run(capsys, *w, "contacts", "--json")[1])
    ana = next(p for p in people if "Lind" in p["name"])
    assert ana["name"] == LEGACY["Ana Lind"]  # JSON keeps the data exactly, escaped
    ids = [str(p["id"]) for p in people]
    commands = [["contacts"], ["contacts", "--json"], ["contacts", "--unlisted"], ["contacts", "--suggested"],
                ["sources"], ["show", str(ana["id"])], ["show", str(ana["id"]), "--json"], ["why", ids[0], ids[-1]],
                ["ties", "--all"], ["ties", "--json"], ["groups"], ["groups", "--json"], ["brokers"], ["bridges"],
                ["audit"], ["audit", "--markdown"], ["reach", "--org", "Quillon"], ["reach", "--tag", "chess"],
                ["settings"], ["merge", ids[0], ids[1]], ["show", "Lind"]]
    for args in commands:
        code, out, err = run(capsys, *w, *args)
        assert code in (0, 1, 4), (args, err)
        assert_clean(out + err, " ".join(args))
        if "--json" in args:
            json.loads(out)
    code, out, _err = run(capsys, *w, "show", str(ana["id"]))
    assert "␛[2J␛]0;pwned␇Ana␀ Lind" in out


def test_file_names_and_click_errors_are_shown_safely(tmp_path, capsys):
    odd = tmp_path / "\x1b]0;pwned\x07\x1b[2Jcontacts.vcf"
    odd.write_bytes(b"BEGIN:VCARD\r\nVERSION:3.0\r\nFN:Ana Vik\r\nEMAIL:a@e.example\r\nEND:VCARD\r\n")
    seen = []
    for args in (["import", str(odd)], ["sources"], ["import", str(tmp_path / "\x1b[31mmissing.vcf")],
                 ["import", str(odd), "--mapping-file", str(tmp_path / "\x1b[2Jno-such-map")],
                 ["--workspace", str(odd / "ws.sqlite"), "contacts"]):  # a file where a folder should be
        code, out, err = run(capsys, *args)
        assert_clean(out + err, " ".join(args))
        assert "␛" in out + err or "\\x1b" in err or code == 0  # click quotes a missing file as \x1b itself
        seen.append(out + err)
    assert "␛]0;pwned␇␛[2Jcontacts.vcf: imported, 1 record" in seen[0]


def test_only_the_common_helpers_print():
    # Every line the CLI prints goes through mynet/cli/common.py (echo, note, table, emit_json, confirm).
    for path in sorted((ROOT / "mynet" / "cli").glob("*.py")):
        if path.name == "common.py":
            continue
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if isinstance(node, ast.Call):
                f = node.func
                name = f.attr if isinstance(f, ast.Attribute) else getattr(f, "id", "")
                base = getattr(f.value, "id", "") if isinstance(f, ast.Attribute) else ""
                assert not (base == "click"
                            and name in ("echo", "secho", "confirm", "prompt")), (path.name, node.lineno)
                assert name != "print", (path.name, node.lineno)
                assert not (base in ("stdout", "stderr") or name == "write"
                            and "std" in ast.unparse(f)), (path.name, node.lineno)


def test_the_browser_uses_only_our_text_widgets():
    # Textual's own Static and Label read strings as markup; ours (mynet/tui/look.py) never do.
    for path in sorted((ROOT / "mynet" / "tui").glob("*.py")):
        if path.name == "look.py":
            continue
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if isinstance(node, ast.ImportFrom) and node.module == "textual.widgets":
                assert not {"Static", "Label"} & {a.name for a in node.names}, path.name


# -------------------------------------------------------------------------------- exports and the report


def test_exports_parse_everywhere_whatever_the_data(hostile, tmp_path, capsys):
    igraph = pytest.importorskip("igraph")
    w = ["--workspace", str(hostile)]
    for name in ("net.graphml", "net.csv", "net.json"):
        assert run(capsys, *w, "export", "-o", str(tmp_path / name))[0] == 0
    graphml = tmp_path / "net.graphml"
    text = graphml.read_text(encoding="utf-8")
    assert_clean(text, "GraphML")
    ET.parse(graphml)                      # the standard library's XML parser
    G = nx.read_graphml(graphml)           # networkx
    g = igraph.Graph.Read_GraphML(str(graphml))  # igraph
    assert G.number_of_nodes() == g.vcount() == 7 and G.number_of_edges() == g.ecount() > 0
    labels = {d["label"] for _n, d in G.nodes(data=True)}
    assert shown(LEGACY["Ana Lind"]) in labels and "[@click=app.quit]Quit me[/]" in labels
    for part in ("net-contacts.csv", "net-ties.csv"):
        raw = (tmp_path / part).read_bytes()
        assert b"\x1b" not in raw
        assert_clean(raw.decode("utf-8").replace("\r\n", "\n"), part)  # RFC 4180 ends records with CR LF
        rows = list(csv.reader(io.StringIO(raw.decode("utf-8-sig"), newline="")))
        assert len({len(r) for r in rows}) == 1 and len(rows) > 1
    data = json.loads((tmp_path / "net.json").read_text(encoding="utf-8"))
    assert_clean(json.dumps(data, ensure_ascii=False), "JSON export")
    assert len(data["contacts"]) == 7


def test_the_report_shows_hostile_text_safely(hostile, tmp_path, capsys):
    w = ["--workspace", str(hostile)]
    assert run(capsys, *w, "report", "-o", str(tmp_path / "r.html"))[0] == 0
    assert run(capsys, *w, "report", "--markdown", "-o", str(tmp_path / "r.md"))[0] == 0
    html_text = (tmp_path / "r.html").read_text(encoding="utf-8")
    assert_clean(html_text, "HTML report")
    ET.fromstring(html_text.split("\n", 1)[1])  # well-formed once the doctype line is gone
    assert "␛[2J␛]0;pwned␇Ana" in html_text
    for md in [tmp_path / "r.md", *sorted((tmp_path / "r_files").glob("*"))]:
        assert_clean(md.read_text(encoding="utf-8"), md.name)


# -------------------------------------------------------------------------------- the browser


def test_the_browser_shows_hostile_text_without_obeying_it(hostile):
    pytest.importorskip("textual")
    from mynet.tui import create_app

    async def visit():
        app = create_app(hostile, watch_interval=0)
        shots = []
        async with app.run_test(size=(100, 30)) as pilot:
            for _ in range(100):
                await pilot.pause(0.05)
                if app.snapshot is not None and not app.snapshot.preview and app.snapshot.extras is not None:
                    break
            assert app.snapshot is not None, app.error
            for key in "123456":
                await pilot.press("escape", key)  # escape first: the reach view's box takes keys
                await pilot.pause(0.2)
                shots.append(app.export_screenshot())
            await pilot.press("escape", "3")
            await pilot.pause(0.1)
            await pilot.press("down", "enter")  # the first person by name (the one with the escape sequence)
            await pilot.pause(0.5)
            shots.append(app.export_screenshot())
            await pilot.press("escape", "1", "enter")  # a group
            await pilot.pause(0.5)
            shots.append(app.export_screenshot())
            await pilot.press("escape", "4")
            await pilot.press(*"quillon")
            await pilot.pause(0.3)
            shots.append(app.export_screenshot())
            assert app.is_running and not app.error
        return shots

    shots = asyncio.run(visit())
    for n, svg in enumerate(shots):
        assert_clean(svg, f"screen {n}")
    seen = "".join(shots).replace("&#160;", " ")
    assert "␛[2J" in seen and "[/]" in seen
    assert "pwned␇Ana␀" in shots[6]  # the person card shows BEL and NUL too (rich would drop BEL silently)
