"""What a first-time user reads: plain words first, one group id, widths by display width, empty workspaces in words,
--help in a start-here order, mynet explain, the reviewed bulk merge, the demo cleaning up after itself."""

from __future__ import annotations

import json
import re

import pytest
from conftest import import_sample
from rich.cells import cell_len

from mynet.analysis.groups import group_ref, parse_group_ref
from mynet.analysis.reading import ROLE_WORDS, TOPICS, clarity_words, topic
from mynet.cli import SECTIONS, main
from mynet.cli.common import clip, fit_widths, table, wrap_cells
from mynet.evidence.network import in_words


def run(capsys, *args):
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


# -- words ------------------------------------------------------------------------------------------------------

FRONT_LINE_JARGON = ("(Louvain)", "Granovetter 1973", "∏", "node-link", "▲", "◆", "count: ", "Blau)", "(Shannon)")


def test_help_lists_commands_in_start_here_sections(capsys, monkeypatch):
    monkeypatch.setenv("COLUMNS", "80")
    code, out, _ = run(capsys, "--help")
    assert code == 0
    titles = [t for t, _names in SECTIONS]
    positions = [out.index(f"{t}:") for t in titles if f"{t}:" in out]
    assert len(positions) >= 5 and positions == sorted(positions)
    assert out.index("import") < out.index("contacts") < out.index("groups") < out.index("reach") < out.index("report")
    assert not any(j in out for j in FRONT_LINE_JARGON)
    # every command line fits 80 columns
    assert [line for line in out.splitlines() if cell_len(line) > 80] == []


def test_explain_lists_topics_and_gives_the_method_one_step_away(capsys):
    code, out, _ = run(capsys, "explain")
    assert code == 0 and all(t.name in out for t in TOPICS)
    code, out, _ = run(capsys, "explain", "roles")
    assert code == 0
    assert all(role in out for role in ROLE_WORDS)
    assert "Guimerà & Amaral 2005" in out and out.index("Method:") > out.index("member")
    code, out, _ = run(capsys, "explain", "groups", "--json")
    assert "Louvain" in json.loads(out)["method"] and "Louvain" not in json.loads(out)["plain"]
    code, _out, err = run(capsys, "explain", "nonsense")
    assert code != 0 and "roles" in err
    assert topic("bri").name == "bridges"


def test_a_person_without_a_name_is_the_person_at_their_address():
    assert in_words("hnguyen@orsolan.example") == "the person at hnguyen@orsolan.example"
    assert in_words("+44 7700 900527") == "the person with phone +44 7700 900527"
    assert in_words("Hương Nguyễn") == "Hương Nguyễn"
    assert in_words("") == "someone without a name"


def test_group_refs_read_and_write_the_same_way():
    assert group_ref(7) == "G7" and group_ref(None) == "no group"
    assert parse_group_ref("G7") == parse_group_ref("g7") == parse_group_ref("7") == 7
    assert parse_group_ref("seven") is None


def test_clarity_words_follow_the_modularity():
    # above 0.3 is clear: common practice after Newman & Girvan 2004
    assert clarity_words(0.6) == "very clearly" and clarity_words(0.35) == "clearly"
    assert clarity_words(0.1) == "only loosely"


# -- widths -------------------------------------------------------------------------------------------------------

def test_table_aligns_by_display_width(monkeypatch):
    monkeypatch.setenv("COLUMNS", "100")
    out = table(["id", "name", "e-mail or phone"], [(1, "王小明", "wang@x.example"), (22, "Anna Berg", "+441234")])
    lines = out.splitlines()
    # the third column starts in the same terminal column on every line (wide characters count two)
    starts = [cell_len(line[: line.index(cell)]) for line, cell in zip(lines[2:], ("wang@", "+4412"))]
    assert starts[0] == starts[1] == cell_len(lines[0][: lines[0].index("e-mail")])


def test_widest_column_gives_way_first_and_the_last_column_wraps(monkeypatch):
    assert fit_widths([10, 40, 30], 60, [4, 4, 4]) == [10, 23, 23]  # 10 + 23 + 23 + 2 gaps of 2 = 60
    assert fit_widths([5, 5], 80, [2, 2]) == [5, 5]
    assert clip("王小明张三", 6) == "王小…" and cell_len(clip("王小明张三", 6)) <= 6
    assert wrap_cells("share +441214960803 but the names differ", 20) == ["share +441214960803", "but the names differ"]
    assert wrap_cells("lena.kohler@ombrelle.example", 12) == ["lena.kohler@", "ombrelle.exa", "mple"]
    assert wrap_cells("王小明张三", 4) == ["王小", "明张", "三"]
    monkeypatch.setenv("COLUMNS", "60")
    out = table(["a", "why"], [("x" * 20, "share +441214960803 but the names differ from each other")])
    assert "…" not in out and "each other" in out
    assert all(cell_len(line) <= 60 for line in out.splitlines())


# -- empty workspaces -----------------------------------------------------------------------------------------------

def test_an_empty_workspace_says_so_in_words(capsys, tmp_path):
    w = ("--workspace", str(tmp_path / "empty.sqlite"))
    for cmd in (["brokers"], ["bridges"], ["groups"]):
        code, out, _ = run(capsys, *w, *cmd)
        assert code == 0 and "No contacts yet" in out and "mynet import" in out, cmd
        assert "---" not in out  # no empty table
    code, out, err = run(capsys, *w, "report", "-o", str(tmp_path / "r.html"))
    assert code == 0 and "no contacts yet" in err
    code, out, err = run(capsys, *w, "audit")
    assert "import" in out + err


# -- the sample: group ids, audit, bulk merge ---------------------------------------------------------------------

@pytest.fixture(scope="module")
def sample_path(tmp_path_factory):
    path = tmp_path_factory.mktemp("wording") / "ws.sqlite"
    store, _truth = import_sample(path)
    store.close()
    return path


def test_one_group_id_everywhere(capsys, sample_path):
    w = ("--workspace", str(sample_path))
    code, out, _ = run(capsys, *w, "groups", "--json")
    gids = [g["id"] for g in json.loads(out)["groups"]]
    code, out, _ = run(capsys, *w, "groups")
    assert [f"G{g}" for g in gids] == re.findall(r"^(G\d+)\s", out, flags=re.M)
    code, out, _ = run(capsys, *w, "groups", "show", f"G{gids[0]}")
    assert code == 0 and out.startswith(f"G{gids[0]} ")
    code, out, _ = run(capsys, *w, "brokers")
    listed = set(re.findall(r"\bG(\d+)\b", out))
    assert listed and listed <= {str(g) for g in gids}
    code, out, _ = run(capsys, *w, "bridges")
    assert re.search(r"G\d+ - G\d+", out)
    code, out, _ = run(capsys, *w, "audit")
    assert not any(j in out for j in FRONT_LINE_JARGON)
    assert "»" in out or "›" in out


def test_audit_findings_do_not_repeat_and_are_not_padded(sample_path):
    from mynet import open_workspace

    with open_workspace(sample_path) as ws:
        net = ws.network()
        a = ws.analysis(net)
        findings = ws.audit(net=net, analysis=a)
    ids = [f["id"] for f in findings]
    assert len(ids) == len(set(ids))
    brokers = next(f for f in findings if f["id"] == "brokers")
    assert all((a.measures[c].get("betweenness") or 0) > 0 for c in brokers["numbers"]["people"])
    # In the sample the warm contacts' largest group is the employer's: one finding, not two.
    if "concentration-org" in ids:
        org = next(f for f in findings if f["id"] == "concentration-org")
        if "largest_group" in org["numbers"]:
            assert "concentration-group" not in ids
    assert all(f["priority"] in ("act on this", "worth a look", "for context") for f in findings)


def test_a_large_group_with_one_warm_contact_is_thin(sample_path):
    from mynet.analysis.audit import THIN_GROUP, audit
    from mynet.workspace import Workspace

    with Workspace(sample_path) as ws:
        net = ws.network()
        a = ws.analysis(net)
        big = max(a.groups, key=lambda g: g.size)
        assert big.size >= THIN_GROUP
        keep = big.members[0]
        # Only one of its members stays warm: the group is thin, and the finding names that person.
        for m in big.members:
            if m != keep and m in net.warmth:
                net.warmth[m].warmth = 0.0
        if keep in net.warmth:
            net.warmth[keep].warmth = 0.9
        from mynet.analysis.snapshot import apply_user_decisions

        apply_user_decisions(ws.store, net, a)
        thin = [f for f in audit(net, a) if f["id"] == "thin-groups"]
    assert thin and big.id in thin[0]["numbers"]["groups"]
    assert net.said(keep) in thin[0]["detail"] and group_ref(big.id) in thin[0]["detail"]


def test_bulk_merge_of_sure_suggestions_is_previewed_confirmed_and_undoable(capsys, sample_path, tmp_path):
    import shutil

    path = tmp_path / "ws.sqlite"
    shutil.copy(sample_path, path)
    w = ("--workspace", str(path))
    code, out, _ = run(capsys, *w, "contacts", "--suggested", "--json")
    sure = [s for s in json.loads(out) if s["score"] >= 0.9]
    assert len(sure) >= 2
    code, out, err = run(capsys, *w, "contacts", "--suggested", "--merge-above", "0.9")
    assert code != 0 and "--yes" in err and f"These {len(sure)} pairs" in out  # previewed, not merged
    code, out, _ = run(capsys, *w, "contacts", "--suggested", "--json")
    assert len([s for s in json.loads(out) if s["score"] >= 0.9]) == len(sure)
    code, out, _ = run(capsys, *w, "contacts", "--suggested", "--merge-above", "0.9", "--yes", "--json")
    merged = json.loads(out)
    assert code == 0 and len(merged) == len(sure)
    code, out, _ = run(capsys, *w, "contacts", "--suggested", "--json")
    assert not [s for s in json.loads(out) if s["score"] >= 0.9]
    # Undo one: unmerge splits it again.
    first = merged[0]
    code, out, _ = run(capsys, *w, "unmerge", str(first["id"]), "--json")
    assert code == 0 and len(json.loads(out)) == 2
    code, _out, _err = run(capsys, *w, "contacts", "--merge-above", "0.9")
    assert code != 0  # only with --suggested


def test_contacts_column_holds_what_its_header_says(capsys, sample_path):
    code, out, _ = run(capsys, "--workspace", str(sample_path), "contacts")
    header = out.splitlines()[0]
    assert "e-mail or phone" in header and not re.search(r"e-mail\s*$", header)


# -- the demo -------------------------------------------------------------------------------------------------------

def test_the_demo_names_people_not_ids_and_leaves_nothing_behind(capsys, tmp_path, monkeypatch):
    import tempfile

    monkeypatch.setattr(tempfile, "tempdir", str(tmp_path))
    code, out, err = run(capsys, "demo")
    assert code == 0
    assert not list(tmp_path.glob("mynet-demo-*")), "the throw-away workspace is removed"
    assert "deleted" in err and "--keep" in err
    assert not re.search(r"mynet why \d+ \d+", out)
    assert re.search(r'mynet why "[^"]+" ', out)
    assert not any(j in out for j in FRONT_LINE_JARGON)


def test_a_suggested_duplicate_is_never_shown_as_a_tie(capsys, sample_path):
    w = ("--workspace", str(sample_path))
    code, out, _ = run(capsys, *w, "contacts", "--suggested", "--json")
    pair = next(s for s in json.loads(out) if s["score"] >= 0.9)
    code, out, _ = run(capsys, *w, "why", str(pair["a"]), str(pair["b"]))
    assert code == 0 and "may be the same person" in out.splitlines()[0] and "strength" not in out.splitlines()[0]
    code, out, _ = run(capsys, *w, "ties", "--of", str(pair["a"]), "--all", "--limit", "0")
    line = next((ln for ln in out.splitlines() if f"id {pair['b']}" in ln), None)
    if line is not None:  # when the two are linked at all, the link reads as what it is
        assert "may be the same person" in line


def test_an_ask_names_a_nameless_target_by_their_address(capsys, sample_path):
    code, out, _ = run(capsys, "--workspace", str(sample_path), "reach", "--to", "hnguyen@orsolan.example")
    assert code == 0 and out.startswith("Reaching ")
    asks = [ln for ln in out.splitlines() if "ask:" in ln]
    assert asks and all("the person at hnguyen@orsolan.example" in a for a in asks)
    assert not any(re.search(r"introduce you to hnguyen@", a) for a in asks)


def test_forget_drops_the_persons_remembered_role(sample_path, tmp_path):
    import shutil

    from mynet.workspace import Workspace

    path = tmp_path / "ws.sqlite"
    shutil.copy(sample_path, path)
    with Workspace(path) as ws:
        ws.analysis(ws.network())
        state = json.loads(ws.store.meta("groups_state", "{}"))
        cid = int(next(iter(state["roles"])))
        ws.forget(cid)
        state = json.loads(ws.store.meta("groups_state", "{}"))
    assert str(cid) not in state.get("roles", {})
    assert all(cid not in members for members in state["groups"].values())
