"""The report: self-contained, well-formed HTML and Markdown, its pictures, and redaction that leaks nothing."""

from __future__ import annotations

import html
import json
import re
import stat
import xml.etree.ElementTree as ET
from datetime import date
from pathlib import Path

import click
import networkx as nx
import pytest
from click.testing import CliRunner
from conftest import import_sample

from mynet.analysis.audit import audit
from mynet.analysis.snapshot import analyse
from mynet.cli.common import Ctx
from mynet.cli.report import COMMANDS
from mynet.errors import MynetError
from mynet.evidence.network import load_network
from mynet.people.normalise import normalise_org
from mynet.report import RedactionError, check_redacted, collect, write_report
from mynet.report.charts import clean_svg, group_style
from mynet.report.export import export_network
from mynet.report.layout import group_layout, place_discs
from mynet.report.redact import Pseudonyms, find_leaks, redact_network
from mynet.store import Store
from mynet.workspace import Workspace
from mynet.workspace.importing import import_paths

TODAY = date(2026, 9, 1)
XHTML = "{http://www.w3.org/1999/xhtml}"
SVG = "{http://www.w3.org/2000/svg}"


@pytest.fixture(scope="module")
def sample(tmp_path_factory):
    """The sample scenario imported as the demo does it."""
    return import_sample(tmp_path_factory.mktemp("sample") / "ws.sqlite")


@pytest.fixture(scope="module")
def outputs(sample, tmp_path_factory):
    """Every report and export of the sample scenario, plain and redacted."""
    store, _ = sample
    d = tmp_path_factory.mktemp("out")
    out = {}
    for red in (False, True):
        tag = "red" if red else "plain"
        out[f"html-{tag}"] = write_report(Workspace.over(store), d / f"{tag}.html", redact=red, today=TODAY)
        out[f"md-{tag}"] = write_report(Workspace.over(store), d / f"{tag}.md", markdown=True, redact=red, today=TODAY)
        for fmt in ("graphml", "csv", "json"):
            out[f"{fmt}-{tag}"] = export_network(Workspace.over(store), d / f"{tag}.{fmt}", redact=red, today=TODAY)
    return out


def parse_html(path: Path) -> ET.Element:
    text = path.read_text(encoding="utf-8")
    assert text.startswith("<!DOCTYPE html>\n")
    return ET.fromstring(text.split("\n", 1)[1])


def all_text(el: ET.Element) -> str:
    return " ".join(" ".join(el.itertext()).split())


# ---------------------------------------------------------------- HTML

def test_html_is_well_formed_with_every_section_in_order(outputs, sample):
    root = parse_html(outputs["html-plain"])
    assert root.tag == XHTML + "html"
    ids = [s.get("id") for s in root.iter(XHTML + "section")]
    assert ids == ["findings", "picture", "groups", "time", "brokers", "bridges", "intros", "reading"]


def test_findings_appear_in_the_audit_order(outputs, sample):
    store, _ = sample
    net = load_network(store, today=TODAY)
    expected = [f["title"] for f in audit(net, analyse(store, net), today=TODAY)]
    root = parse_html(outputs["html-plain"])
    # the title is the heading's own text; the mark and words of what to do follow in a span of their own
    shown = [" ".join((h.text or "").split()) for h in root.iter(XHTML + "h3")][: len(expected)]
    assert shown == [" ".join(t.split()) for t in expected]
    marks = [all_text(h)[len(h.text or ""):].strip() for h in root.iter(XHTML + "h3")][: len(expected)]
    assert all(m in ("» act on this", "› worth a look", "· for context") for m in marks), marks


def test_html_is_self_contained(outputs):
    for key in ("html-plain", "html-red"):
        text = outputs[key].read_text(encoding="utf-8")
        root = parse_html(outputs[key])
        for el in root.iter():
            for name, value in el.attrib.items():
                if name.endswith("href") or name.endswith("src"):
                    assert value.startswith("#"), (el.tag, name, value)
                assert not re.search(r"https?:", value), (el.tag, name, value)
        low = text.lower()
        for bad in ("<script", "@import", "<link", "<img", "<iframe", "<object", "<embed", "@font-face"):
            assert bad not in low, bad
        assert not re.search(r"url\(\s*['\"]?(?!#)", text), "only url(#local) references"
        assert not re.search(r"<!DOCTYPE svg|<\?xml", text)


def test_picture_is_inline_svg_with_a_legend_naming_every_group(outputs, sample):
    store, _ = sample
    root = parse_html(outputs["html-plain"])
    pic = next(s for s in root.iter(XHTML + "section") if s.get("id") == "picture")
    svgs = list(pic.iter(SVG + "svg"))
    assert len(svgs) == 1
    raw = html.unescape(outputs["html-plain"].read_text(encoding="utf-8"))
    start = raw.index('<section id="picture">')
    part = raw[start: raw.index("</section>", start)]
    comments = " ".join(re.findall(r"<!-- (.*?) -->", part))  # matplotlib keeps each text as a comment
    net = load_network(store, today=TODAY)
    a = analyse(store, net)
    for g in a.groups[:14]:
        assert f"G{g.id}" in comments
        assert f"G{g.id}  {g.name[:20]}" in comments
    assert "warm contact (black outline)" in comments and "top bridge" in comments
    # Ids are prefixed per picture, so the inline SVGs share none.
    ids = [el.get("id") for el in root.iter() if el.get("id") and el.tag.startswith(SVG)]
    assert len(ids) == len(set(ids))


def test_report_is_deterministic(sample, tmp_path):
    store, _ = sample
    a = write_report(Workspace.over(store), tmp_path / "a.html", today=TODAY, seed=3).read_bytes()
    b = write_report(Workspace.over(store), tmp_path / "b.html", today=TODAY, seed=3).read_bytes()
    assert a == b


def test_files_are_owner_only(outputs, tmp_path, sample):
    store, _ = sample
    for key in ("html-plain", "html-red", "md-plain"):
        assert stat.S_IMODE(outputs[key].stat().st_mode) == 0o600
    folder = outputs["md-plain"].with_name("plain_files")
    assert stat.S_IMODE(folder.stat().st_mode) == 0o700
    for f in folder.iterdir():
        assert stat.S_IMODE(f.stat().st_mode) == 0o600
    old = tmp_path / "old.html"
    old.write_text("x")
    old.chmod(0o644)
    write_report(Workspace.over(store), old, today=TODAY)
    assert stat.S_IMODE(old.stat().st_mode) == 0o600


def test_large_network_is_drawn_as_a_map_of_groups_and_says_so(sample, tmp_path):
    store, _ = sample
    d = collect(Workspace.over(store), today=TODAY, max_contacts=100)
    assert d.picture == "groups"
    out = write_report(Workspace.over(store), tmp_path / "big.html", today=TODAY, max_contacts=100)
    text = all_text(parse_html(out))
    assert "the picture shows the map of groups" in text
    assert "Map of 7 groups" in text or re.search(r"Map of \d+ groups", text)


def test_intro_opportunities_cover_the_group_with_no_warm_contact(outputs, sample):
    store, _ = sample
    d = collect(Workspace.over(store), today=TODAY)
    cold = [g for g in d.analysis.groups if g.warm == 0]
    assert cold, "the sample scenario has a group with nobody warm"
    assert [i["group"] for i in d.intros][: len(cold)] == [g.id for g in cold]
    for it in d.intros:
        for p in it["paths"]:
            assert p["target"] in d.analysis.group(it["group"]).members
            assert p["ask"].startswith("Ask ")


# ---------------------------------------------------------------- escaping

@pytest.fixture
def crafted(tmp_path):
    """Names and labels full of markup; the odd-named person alone links two circles (a broker)."""
    p = tmp_path / "people.csv"
    p.write_text(
        "Name,Email,Company,Tags\n"
        '"<script>alert(1)</script> & ""Bo""",bo@bold.example,<b>Bold</b> | Ltd,|pipe|\n'
        "Cy Moss,cy@bold.example,<b>Bold</b> | Ltd,]]>\n"
        "Di Park,di@bold.example,<b>Bold</b> | Ltd,]]>\n"
        "Ed Nam,ed@other.example,Other & Co,|pipe|\n"
        "Fay Ro,fay@other.example,Other & Co,|pipe|\n",
        encoding="utf-8")
    store = Store(tmp_path / "ws.sqlite")
    import_paths(store, [p])
    return store


def test_every_name_is_escaped_in_html_and_markdown(crafted, tmp_path):
    out = write_report(Workspace.over(crafted), tmp_path / "r.html", today=TODAY)
    text = out.read_text(encoding="utf-8")
    assert "<script" not in text and "<b>" not in text
    root = parse_html(out)  # still well-formed
    brokers = next(s for s in root.iter(XHTML + "section") if s.get("id") == "brokers")
    assert '<script>alert(1)</script> & "Bo"' in all_text(brokers)
    md = write_report(Workspace.over(crafted), tmp_path / "r.md", markdown=True,
                      today=TODAY).read_text(encoding="utf-8")
    assert "<script" not in md and "<b>" not in md
    assert '&lt;script&gt;alert(1)&lt;/script&gt; &amp; "Bo"' in md
    tables = re.findall(r"(?m)(?:^\|.*\n)+", md)
    assert any("&lt;b&gt;Bold&lt;/b&gt; \\| Ltd" in t for t in tables)  # a group's name, escaped in its cell
    for t in tables:  # no cell holds a raw "|": every row has as many unescaped bars as the header
        bars = {len(re.findall(r"(?<!\\)\|", line)) for line in t.splitlines()}
        assert len(bars) == 1, t


def test_markdown_links_its_pictures_relatively(outputs):
    md = outputs["md-plain"]
    text = md.read_text(encoding="utf-8")
    links = re.findall(r"!\[[^\]]*\]\(([^)]+)\)", text)
    assert {Path(x).name for x in links} == {"picture.svg", "groups.svg", "time.svg", "tiers.svg"}
    for link in links:
        assert not link.startswith(("/", "http")) and (md.parent / link).is_file()
        ET.fromstring((md.parent / link).read_text(encoding="utf-8"))  # each picture is a well-formed SVG
    for _a, title in (("findings", "What stands out"), ("reading", "How to read this")):
        assert title in text


# ---------------------------------------------------------------- pictures

def test_discs_never_overlap():
    radii = [7.0, 1.0, 1.0, 3.0, 1.4, 1.0, 2.2]
    c = place_discs(radii, gap=1.0)
    for i in range(len(radii)):
        for j in range(i + 1, len(radii)):
            d = ((c[i] - c[j]) ** 2).sum() ** 0.5
            assert d >= radii[i] + radii[j] + 1.0 - 1e-9


def test_group_layout_is_seeded_and_keeps_members_in_their_disc():
    G = nx.les_miserables_graph()  # shipped by networkx (Knuth 1993)
    comms = nx.community.louvain_communities(G, seed=1)
    blocks = [(i, sorted(c)) for i, c in enumerate(comms)]
    pos1, discs = group_layout(G, blocks, seed=5)
    pos2, _ = group_layout(G, blocks, seed=5)
    assert pos1 == pos2 and set(pos1) == set(G)
    for key, members in blocks:
        x, y, r = discs[key]
        for m in members:
            assert ((pos1[m][0] - x) ** 2 + (pos1[m][1] - y) ** 2) ** 0.5 <= r + 1e-9


def test_clean_svg_prefixes_ids_and_drops_the_prolog():
    raw = ('<?xml version="1.0"?>\n<!DOCTYPE svg PUBLIC "x" "http://example.org/x.dtd">\n'
           '<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink"><metadata>m</metadata>'
           '<defs><path id="a1" d="M0 0"/><clipPath id="c"><rect/></clipPath></defs>'
           '<use xlink:href="#a1"/><g clip-path="url(#c)"/></svg>')
    out = clean_svg(raw, "p")
    assert out.startswith("<svg") and "metadata" not in out and "DOCTYPE" not in out
    assert 'id="p-a1"' in out and 'xlink:href="#p-a1"' in out and "url(#p-c)" in out
    ET.fromstring(out)


def test_group_styles_differ_for_sixty_groups():
    styles = [group_style(i) for i in range(60)]
    assert len(set(styles)) == 60
    assert len({(m, h) for _c, m, h in styles[:12]}) == 12  # in grey, marker and hatch alone tell the first 12 apart


# ---------------------------------------------------------------- redaction

def original_values(store, truth) -> dict[str, set[str]]:
    """Every name, e-mail, phone, organisation, tag, note, title and place of the scenario, by kind."""
    v: dict[str, set[str]] = {k: set() for k in ("names", "emails", "phones", "orgs", "notes", "other")}
    for p in [truth["you"], *truth["people"]]:
        v["names"].add(p.get("name", ""))
        v["orgs"].update([p.get("org", ""), *p.get("past_orgs", [])])
        v["emails"].update(p.get("emails", []))
        v["phones"].update(p.get("phones", []))
        v["other"].update([p.get("title", ""), p.get("locality", ""), p.get("nickname", "")])
    v["orgs"].update(t["org"] for t in truth["targets"])
    for nc in truth["non_contacts"]:
        v["names"].add(nc["name"])
        v["emails"].add(nc["email"])
    for _rid, _key, _src, rec in store.records():
        v["names"].add(rec.full_name)
        v["emails"].update(rec.emails)
        v["phones"].update(rec.phones)
        v["orgs"].update(rec.orgs)
        v["notes"].update(rec.notes)
        v["other"].update([rec.given, rec.family, rec.additional, *rec.nicknames, *rec.titles, *rec.tags, *rec.urls,
                           *(r.value for r in rec.related), *(u for units in rec.org_units for u in units)])
        for ad in rec.addresses:
            v["other"].update([ad.street, ad.locality, ad.postcode])
    for c in store.contacts():
        v["names"].add(c.name)
        v["emails"].update(c.emails)
        v["phones"].update(c.phones)
        v["orgs"].update(c.orgs + c.past_orgs)
        v["notes"].update(c.notes)
        v["other"].update([*c.tags, *c.localities, *c.titles])
    # Phones also as bare digits, the way a writer might reformat them.
    v["phones"].update(re.sub(r"\D", "", x) for x in list(v["phones"]) if len(re.sub(r"\D", "", x)) >= 6)
    return {k: {x.strip() for x in xs if x and x.strip()} for k, xs in v.items()}


def output_texts(paths) -> list[str]:
    texts = []
    for p in paths:
        folder = p.with_name(p.stem + "_files")
        for f in [p, *(sorted(folder.iterdir()) if p.suffix == ".md" and folder.is_dir() else [])]:
            t = f.read_text(encoding="utf-8-sig")
            texts += [t, html.unescape(t)]
            if f.suffix == ".json":
                texts.append(json.dumps(json.loads(t), ensure_ascii=False))
    return texts


REDACTED = ("html-red", "md-red", "graphml-red", "csv-red", "json-red")


def _paths(outputs, keys):
    return [p for k in keys for p in (outputs[k] if isinstance(outputs[k], list) else [outputs[k]])]


def test_redacted_outputs_leak_no_original_value(outputs, sample):
    """Every value, with no minimum length, as a whole word and case-sensitive.

    Case-sensitive so that a tag "Work" or an org unit "People" is not found in
    the words "work" or "people" of the report's own sentences.
    """
    store, truth = sample
    values = set().union(*original_values(store, truth).values())
    assert len(values) > 1000
    for text in output_texts(_paths(outputs, REDACTED)):
        assert find_leaks(text, values) == []
    # The same scan finds hundreds of them in the plain outputs (so it is not blind).
    plain = output_texts(_paths(outputs, ("html-plain", "md-plain", "csv-plain")))
    assert len(find_leaks(" ".join(plain), values)) > 200


def test_redacted_outputs_leak_no_identifier_in_any_case(outputs, sample):
    """Full names, e-mails, phones, organisations and notes are also looked for case-insensitively."""
    store, truth = sample
    v = original_values(store, truth)
    values = v["names"] | v["emails"] | v["phones"] | v["orgs"] | v["notes"]
    for text in output_texts(_paths(outputs, REDACTED)):
        assert find_leaks(text, values, ignore_case=True) == []


def test_pseudonyms_are_consistent(sample):
    store, _ = sample
    net = load_network(store, today=TODAY)
    red, ps = redact_network(net, store.setting("webmail_domains", []) or [])
    assert [c.id for c in red.contacts] == sorted(c.id for c in net.contacts)
    orig_orgs, red_orgs = {}, {}
    for c in net.contacts:
        r = red.by_id[c.id]
        assert r.name == f"Person {c.id}" and not r.phones and not r.notes and not r.titles
        assert all(e.endswith(".invalid") for e in r.emails) and len(r.emails) == len(set(c.emails))
        for o, ro in zip(c.orgs, r.orgs):
            orig_orgs.setdefault(normalise_org(o), set()).add(ro)
            red_orgs.setdefault(ro, set()).add(normalise_org(o))
    assert all(len(v) == 1 for v in orig_orgs.values())  # one organisation, one pseudonym
    assert all(len(v) == 1 for k, v in red_orgs.items() if k != "n/a")  # and never two organisations behind one
    d1 = collect(Workspace.over(store), redact=True, today=TODAY)
    d2 = collect(Workspace.over(store), redact=True, today=TODAY)
    assert [g["name"] for g in d1.groups] == [g["name"] for g in d2.groups]
    assert [b["name"] for b in d1.brokers] == [f"Person {b['id']}" for b in d1.brokers]


def test_redacted_report_has_the_same_numbers(sample):
    store, _ = sample
    plain = collect(Workspace.over(store), today=TODAY)
    red = collect(Workspace.over(store), redact=True, today=TODAY)
    assert [(g["id"], g["size"], g["warm"])
            for g in plain.groups] == [(g["id"], g["size"], g["warm"]) for g in red.groups]
    assert [f["id"] for f in plain.findings] == [f["id"] for f in red.findings]
    assert [b["id"] for b in plain.brokers] == [b["id"] for b in red.brokers]


def test_find_leaks_matches_whole_words_only():
    text = "Annual report of Person 3 <ann@x.example>; +44 7700 900123."
    assert find_leaks(text, ["Ann", "ann@x.example", "Person 3", "Person 31", "+44 7700 900123", "900"]) == [
        "+44 7700 900123", "Person 3", "ann@x.example"]
    assert find_leaks("ANNUAL ann", ["Ann"], ignore_case=True) == ["Ann"]


def test_a_leaking_identifier_stops_the_write():
    ps = Pseudonyms()
    ps.identifiers.update({"Zebedee Quartermaine", "zq@quillon.example"})
    check_redacted(["Person 1 and Person 2"], ps)
    with pytest.raises(RedactionError):
        check_redacted(["hello Zebedee&#32;Quartermaine"], ps)
    with pytest.raises(RedactionError):
        check_redacted(["<td>zq@quillon.example</td>"], ps)


# ---------------------------------------------------------------- command line

@pytest.fixture
def cli_group():
    @click.group()
    @click.option("--workspace", default=None)
    @click.pass_context
    def g(ctx, workspace):
        ctx.obj = Ctx(workspace)

    for command in COMMANDS:
        g.add_command(command)
    return g


def test_cli_report_and_export(cli_group, crafted, tmp_path):
    ws = str(crafted.path)
    crafted.close()
    runner = CliRunner()
    out = tmp_path / "r.html"
    res = runner.invoke(cli_group, ["--workspace", ws, "report", "-o", str(out), "--redact"])
    assert res.exit_code == 0, res.output
    assert str(out) in res.stdout and out.is_file()
    res = runner.invoke(cli_group, ["--workspace", ws, "report", "-o", str(tmp_path / "r.md"), "--markdown"])
    assert res.exit_code == 0 and (tmp_path / "r_files" / "picture.svg").is_file()
    res = runner.invoke(cli_group, ["--workspace", ws, "export", "--format", "csv", "-o", str(tmp_path / "n.csv")])
    assert res.exit_code == 0
    assert res.stdout.split() == [str(tmp_path / "n-contacts.csv"), str(tmp_path / "n-ties.csv")]
    res = runner.invoke(cli_group, ["--workspace", ws, "export", "-o", str(tmp_path / "n.txt")])
    assert res.exit_code != 0 and "--format" in str(res.exception or res.output)


def test_an_empty_workspace_still_gives_a_report(tmp_path):
    store = Store(tmp_path / "ws.sqlite")
    out = write_report(Workspace.over(store), tmp_path / "empty.html", today=TODAY)
    root = parse_html(out)
    assert "0 contacts" in all_text(root)
    md = write_report(Workspace.over(store), tmp_path / "empty.md", markdown=True,
                      today=TODAY).read_text(encoding="utf-8")
    assert "No dated meetings or messages imported yet." in md
    assert not (tmp_path / "empty_files" / "time.svg").exists()


def test_a_missing_folder_is_reported(sample, tmp_path):
    store, _ = sample
    with pytest.raises(MynetError, match="does not exist"):
        write_report(Workspace.over(store), tmp_path / "nope" / "r.html", today=TODAY)
