"""Exports: GraphML and JSON that read back into the same graph, CSV that is safe in a spreadsheet."""

from __future__ import annotations

import csv
import io
import json
import stat
from datetime import date

import networkx as nx
import pytest
from conftest import import_sample
from hypothesis import given
from hypothesis import strategies as st

from mynet.analysis.snapshot import analyse, tie_graph
from mynet.errors import MynetError
from mynet.evidence.network import load_network
from mynet.report.export import CONTACT_COLUMNS, TIE_COLUMNS, csv_paths, export_network, neutralise
from mynet.store import Store
from mynet.workspace import Workspace
from mynet.workspace.frames import network_graph
from mynet.workspace.importing import import_paths

TODAY = date(2026, 9, 1)
RISKY = ("=", "+", "-", "@", "\t", "\r")


@pytest.fixture(scope="module")
def sample(tmp_path_factory):
    """The sample scenario imported as the demo does it."""
    return import_sample(tmp_path_factory.mktemp("sample") / "ws.sqlite")[0]


@pytest.fixture
def injection(tmp_path):
    """Contacts whose names and labels look like spreadsheet formulas (OWASP CSV injection examples)."""
    p = tmp_path / "people.csv"
    p.write_text(
        "Name,Email,Company,Tags,Notes\n"
        '"=HYPERLINK(""http://x.example"")",hyper@cells.example,=1+1,+tag,-note\n'
        "@SUM(1),sum@cells.example,=1+1,@tag,\n"
        "Ana Lind,ana@cells.example,=1+1,-tag,\n"
        "Bo Ek,bo@cells.example,Plain Co,-tag,\n"
        "Cy Moss,cy@cells.example,Plain Co,x,\n",
        encoding="utf-8")
    store = Store(tmp_path / "ws.sqlite")
    import_paths(store, [p])
    return store


def test_graphml_reads_back_into_the_same_graph(sample, tmp_path):
    (path,) = export_network(Workspace.over(sample), tmp_path / "net.graphml", today=TODAY)
    H = nx.read_graphml(path, node_type=int)
    net = load_network(sample, today=TODAY)
    G = tie_graph(net)
    assert set(H.nodes) == set(G.nodes) and len(H) == 228  # 225 from the address books, 3 found in mail
    assert {tuple(sorted(e)) for e in H.edges} == {tuple(sorted(e)) for e in G.edges}
    for a, b, w in G.edges(data="weight"):
        assert H.edges[a, b]["weight"] == w  # GraphML keeps the float's repr, so the weight is exact
    a = analyse(sample, net)
    for cid in list(H.nodes)[:40]:
        d = H.nodes[cid]
        assert d["label"] == net.by_id[cid].name
        assert d.get("group") == a.group_of.get(cid)
        assert d["role"] == a.measures[cid]["role"]
        assert d["warmth"] == pytest.approx(net.warmth[cid].warmth)
        assert d["eigenvector"] == pytest.approx(a.measures[cid]["eigenvector"])  # in every export format
    some = next((a_, b_) for a_, b_, e in H.edges(data=True) if "both at" in e.get("evidence", ""))
    assert H.edges[some]["organisation"] > 0


def test_graphml_attribute_types(sample, tmp_path):
    (path,) = export_network(Workspace.over(sample), tmp_path / "net.graphml", today=TODAY)
    text = path.read_text(encoding="utf-8")
    assert 'attr.name="weight" attr.type="double"' in text
    assert 'attr.name="group" attr.type="long"' in text or 'attr.name="group" attr.type="int"' in text
    assert 'attr.name="between_groups" attr.type="boolean"' in text


def test_json_holds_the_contacts_and_ties_under_the_csv_names(sample, tmp_path):
    (path,) = export_network(Workspace.over(sample), tmp_path / "net.json", today=TODAY)
    data = json.loads(path.read_text(encoding="utf-8"))
    assert set(data) == {"network", "contacts", "ties"}
    net = load_network(sample, today=TODAY)
    G = network_graph(net, analyse(sample, net))
    contacts = {c["contact_id"]: c for c in data["contacts"]}
    assert set(contacts) == set(G.nodes)
    assert all(set(c) <= set(CONTACT_COLUMNS) for c in contacts.values())
    assert all(set(t) <= set(TIE_COLUMNS) for t in data["ties"])
    ties = {frozenset((t["contact_a"], t["contact_b"])): t for t in data["ties"]}
    assert set(ties) == {frozenset(e) for e in G.edges}
    for a, b, d in G.edges(data=True):
        t = ties[frozenset((a, b))]
        assert t["strength"] == d["weight"] and t["basis"] == d["basis"] in ("observed", "assumed")
        assert (t["name_a"], t["name_b"]) == (G.nodes[t["contact_a"]]["label"], G.nodes[t["contact_b"]]["label"])
    for n, d in G.nodes(data=True):
        assert contacts[n]["name"] == d["label"] and contacts[n].get("group_id") == d.get("group")
        assert contacts[n].get("places") == d.get("localities")
    assert data["network"]["contacts"] == 228 and data["network"]["redacted"] is False


def test_csv_neutralises_formulas_in_text_cells(injection, tmp_path):
    contacts, ties = export_network(Workspace.over(injection), tmp_path / "net.csv")
    assert (contacts.name, ties.name) == ("net-contacts.csv", "net-ties.csv")
    raw = contacts.read_text(encoding="utf-8-sig")
    rows = list(csv.DictReader(io.StringIO(raw)))
    names = {r["name"] for r in rows}
    assert "'=HYPERLINK(\"http://x.example\")" in names and "'@SUM(1)" in names
    orgs = {r["organisations"] for r in rows}
    assert "'=1+1" in orgs
    tags = {r["tags"] for r in rows}
    assert {"'+tag", "'@tag", "'-tag"} <= tags
    for r in rows:  # no text cell starts a formula
        for col, cell in r.items():
            assert not cell.startswith(RISKY), (col, cell)
    tie_rows = list(csv.DictReader(io.StringIO(ties.read_text(encoding="utf-8-sig"))))
    assert tie_rows and all(not c.startswith(RISKY) for r in tie_rows for c in r.values())
    assert any(r["name_a"].startswith("'=HYPERLINK") or r["name_b"].startswith("'=HYPERLINK")
               for r in tie_rows)
    assert list(rows[0]) == list(CONTACT_COLUMNS) and list(tie_rows[0]) == list(TIE_COLUMNS)


def test_csv_numbers_stay_numbers(sample, tmp_path):
    contacts, _ties = export_network(Workspace.over(sample), tmp_path / "net.csv", today=TODAY)
    raw = contacts.read_text(encoding="utf-8-sig")
    reader = csv.reader(io.StringIO(raw), quoting=csv.QUOTE_NONNUMERIC)  # unquoted cells must parse as numbers
    header = next(reader)
    z = header.index("within_z")
    rows = list(reader)
    negative = [r[z] for r in rows if isinstance(r[z], float) and r[z] < 0]
    assert negative, "the sample has contacts below their group's mean degree"
    assert all(isinstance(r[header.index("degree")], float) for r in rows)  # numeric, never quoted


@given(st.text())
def test_neutralise_never_leaves_a_formula(text):
    out = neutralise(text)
    assert not out.startswith(RISKY)
    assert out == text or out == "'" + text
    assert (out != text) == text.startswith(RISKY)


def test_neutralise_leaves_numbers_and_says_booleans():
    assert neutralise(-0.5) == -0.5 and neutralise(-3) == -3
    assert neutralise(None) == "" and neutralise(True) == "true" and neutralise("-0.5") == "'-0.5"


def test_csv_paths():
    assert [p.name for p in csv_paths("/x/net.csv")] == ["net-contacts.csv", "net-ties.csv"]
    assert [p.name for p in csv_paths("/x/net")] == ["net-contacts.csv", "net-ties.csv"]


def test_exports_are_owner_only_and_deterministic(sample, tmp_path):
    for fmt in ("graphml", "json", "csv"):
        a = export_network(Workspace.over(sample), tmp_path / f"a.{fmt}", today=TODAY)
        b = export_network(Workspace.over(sample), tmp_path / f"b.{fmt}", today=TODAY)
        for pa, pb in zip(a, b):
            assert stat.S_IMODE(pa.stat().st_mode) == 0o600
            assert pa.read_bytes() == pb.read_bytes()


def test_format_must_be_known(sample, tmp_path):
    with pytest.raises(MynetError, match="--format"):
        export_network(Workspace.over(sample), tmp_path / "net.txt")
    (p,) = export_network(Workspace.over(sample), tmp_path / "net.txt", "json", today=TODAY)
    assert json.loads(p.read_text(encoding="utf-8"))["network"]["generator"] == "mynet"
    with pytest.raises(MynetError, match="does not exist"):
        export_network(Workspace.over(sample), tmp_path / "missing" / "net.json")


def test_redacted_export_keeps_the_structure(sample, tmp_path):
    (plain,) = export_network(Workspace.over(sample), tmp_path / "p.graphml", today=TODAY)
    (red,) = export_network(Workspace.over(sample), tmp_path / "r.graphml", redact=True, today=TODAY)
    P = nx.read_graphml(plain, node_type=int)
    R = nx.read_graphml(red, node_type=int)
    assert set(P.nodes) == set(R.nodes) and {frozenset(e) for e in P.edges} == {frozenset(e) for e in R.edges}
    for a, b, d in P.edges(data=True):
        assert R.edges[a, b]["weight"] == d["weight"]
    assert all(R.nodes[n]["label"] == f"Person {n}" for n in R)
    assert all("phones" not in R.nodes[n] and "titles" not in R.nodes[n] for n in R)
    assert R.graph["redacted"] is True
