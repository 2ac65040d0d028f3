"""Targets and asks on the sample scenario: outcomes change later reach results, they survive re-imports,
forget removes them, and the CLI's listings (--json included)."""

from __future__ import annotations

import json
import shutil
from datetime import date, timedelta

import pytest

import mynet
from mynet.cli import main
from mynet.errors import MynetError, NotFoundError

TODAY = date.today()


@pytest.fixture(scope="module")
def sample_file(tmp_path_factory):
    from conftest import import_sample

    path = tmp_path_factory.mktemp("asks") / "ws.sqlite"
    store, _truth = import_sample(path)
    store.close()
    return path


@pytest.fixture
def ws(sample_file, tmp_path):
    path = tmp_path / "workspace.sqlite"  # MYNET_WORKSPACE of every test (conftest), so the CLI uses it too
    shutil.copy(sample_file, path)
    w = mynet.open_workspace(path)
    yield w
    w.close()


def run(capsys, *args):
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


def a_person_with_routes(ws):
    """A person (not known warmly) whom at least two warm people can open, and its best route."""
    from collections import Counter

    orgs = Counter(o for c in ws.network().contacts for o in c.orgs)
    for name in sorted(o for o, n in orgs.items() if 3 <= n <= 12):
        org = ws.add_target(org=name)
        row = next(r for r in ws.targets() if r["id"] == org["id"])
        ws.remove_target(org["id"])
        if row["state"] != "open":
            continue
        person = row["best"]["path"][-1]
        t = ws.add_target(to=person)
        prow = next(r for r in ws.targets() if r["id"] == t["id"])
        if prow["state"] == "open" and prow["first_people"] >= 2:
            return t, prow
        ws.remove_target(t["id"])
    raise AssertionError("no person target with two ways in")


def test_an_open_ask_makes_reach_and_the_plan_prefer_other_first_people(ws):
    target, row = a_person_with_routes(ws)
    helper = row["best"]["first"]
    before = ws.reach(to=target["contact"], k=3)
    assert before.paths and before.paths[0]["path"][0] == helper
    ask = ws.ask(helper, target["id"], note="met at the fair", on=TODAY - timedelta(days=3))
    assert ask["days_waiting"] == 3 and not ask["due"] and ask["note"] == "met at the fair"
    after = ws.reach(to=target["contact"], k=3)
    assert after.paths[0]["path"][0] != helper
    assert [h["person"] for h in after.held_back] == [helper]
    held_paths = [p for p in after.paths if p["path"][0] == helper]
    assert all(p["held_back"]["state"] == "open" for p in held_paths)
    # The target now waits on the ask; the plan says so and routes nothing else through it.
    plan = ws.plan()
    assert [w["target"] for w in plan["waiting"]] == [target["id"]]
    assert [h["person"] for h in plan["held_back"]] == [helper]


def test_follow_up_is_due_after_the_set_number_of_days(ws):
    target, row = a_person_with_routes(ws)
    ws.ask(row["best"]["first"], target["id"], on=TODAY - timedelta(days=10))
    assert ws.asks()[0]["due"]  # default 7 days
    ws.set_setting("asks.follow_up_days", "14")
    assert not ws.asks()[0]["due"]
    assert ws.asks()[0]["follow_up_on"] == (TODAY + timedelta(days=4)).isoformat()


def test_introduced_makes_an_observed_tie_and_warms_the_helper(ws):
    target, row = a_person_with_routes(ws)
    helper, person = row["best"]["first"], target["contact"]
    w0 = ws.network().warmth
    assert ws.reach(to=person).known is None
    ask = ws.ask(helper, target["id"], on=TODAY - timedelta(days=5))
    ws.close_ask(ask["id"], "introduced", on=TODAY)
    net = ws.network()
    assert net.warmth[person].warmth >= 0.5 - 1e-9  # asks.introduced_warmth, on the day
    assert "introduction" in net.warmth[person].channels
    assert net.warmth[helper].warmth == pytest.approx(min(1.0, w0[helper].warmth + 0.1), abs=1e-6)
    later = ws.reach(to=person)
    assert later.known is not None and later.known["target"] == person  # ask them yourself now
    assert next(r for r in ws.targets() if r["id"] == target["id"])["state"] == "introduced"
    # An introduction is the helper's favour, not an open ask: they are not held back.
    assert helper not in ws.held_back()
    # Taking the outcome back takes the tie back.
    ws.reopen_ask(ask["id"])
    assert ws.network().warmth[person].warmth == pytest.approx(w0[person].warmth)


def test_an_introduction_on_a_later_day_does_not_change_an_earlier_view(ws):
    target, row = a_person_with_routes(ws)
    ask = ws.ask(row["best"]["first"], target["id"], on=TODAY - timedelta(days=40))
    ws.close_ask(ask["id"], "introduced", on=TODAY - timedelta(days=10))
    early = ws.network(as_of=(TODAY - timedelta(days=20)).isoformat())
    assert "introduction" not in early.warmth[target["contact"]].channels


def test_declined_rules_the_helper_out_for_that_target(ws):
    target, row = a_person_with_routes(ws)
    helper = row["best"]["first"]
    ask = ws.ask(helper, target["id"], on=TODAY - timedelta(days=2))
    ws.close_ask(ask["id"], "declined")
    after = next(r for r in ws.targets() if r["id"] == target["id"])
    assert after["state"] == "open"
    assert helper not in [r["first"] for r in after["routes"]]
    assert after["first_people"] == row["first_people"] - 1
    assert ws.held_back()[helper]["state"] == "declined"  # recent: other people first elsewhere too
    ws.set_setting("asks.recent_days", "1")
    assert helper not in ws.held_back()


def test_org_introduction_needs_the_person(ws):
    from collections import Counter

    orgs = Counter(o for c in ws.network().contacts for o in c.orgs)
    name = sorted(o for o, n in orgs.items() if 3 <= n <= 12)[0]
    org = ws.add_target(org=name)
    members = [c.id for c in ws.network().contacts if name in c.orgs]
    warm = max(ws.network().warmth.values(), key=lambda w: (w.warmth, -w.contact_id)).contact_id
    ask = ws.ask(warm, name)
    assert ask["target"] == org["id"]  # the kept target, by its name
    with pytest.raises(MynetError, match="--person"):
        ws.close_ask(ask["id"], "introduced")
    ws.close_ask(ask["id"], "introduced", person=members[0])
    assert "introduction" in ws.network().warmth[members[0]].channels
    with pytest.raises(MynetError):
        ws.close_ask(ask["id"], "maybe")
    with pytest.raises(NotFoundError):
        ws.close_ask(999, "declined")


def test_targets_and_asks_survive_a_reimport_and_a_moved_record(ws, tmp_path):
    from mynet.cli.demo import SOURCE_FILES, sample_dir

    target, row = a_person_with_routes(ws)
    ask = ws.ask(row["best"]["first"], target["id"], note="kept")
    ws.import_files([sample_dir() / f for f in SOURCE_FILES])
    assert [a["id"] for a in ws.asks()] == [ask["id"]]
    assert ws.asks()[0]["via"] == row["best"]["first"]
    assert next(r for r in ws.targets() if r["id"] == target["id"])["contact"] == target["contact"]
    # A person known from two files: removing the file their rows are anchored to moves the anchor.
    store = ws.store
    two = next(c for c in store.contacts() if len({r[2]["path"] for r in store.records_by_id(c.record_ids)}) >= 2
               and c.id not in (row["best"]["first"], target["contact"]))
    t2 = ws.add_target(to=two.id)
    first_key = store.keys_of(two.id)[0]
    anchored = next(r for r in store.targets() if r["id"] == t2["id"])["anchor"]
    source = next(r[2]["path"] for r in store.records_by_id(two.record_ids) if r[1] == anchored)
    assert anchored == first_key
    ws.remove_source(source)
    moved = next((r for r in store.targets() if r["id"] == t2["id"]), None)
    assert moved is not None and moved["anchor"] != anchored
    assert next(r for r in ws.targets() if r["id"] == t2["id"])["label"] == two.name


def test_forget_removes_targets_and_asks_of_the_helper_and_of_the_target(ws):
    target, row = a_person_with_routes(ws)
    helper = row["best"]["first"]
    ws.ask(helper, target["id"], note="secret note about them")
    assert ws.store.asks()
    ws.forget(helper)
    assert ws.store.asks() == []  # the ask through the forgotten helper is gone
    assert [t["id"] for t in ws.store.targets()] == [target["id"]]
    ws.forget(target["contact"])
    assert ws.store.targets() == []
    data = open(ws.path, "rb").read()
    assert b"secret note about them" not in data


def test_targets_from_a_file_lines_and_csv_column(ws, tmp_path):
    from collections import Counter

    orgs = Counter(o for c in ws.network().contacts for o in c.orgs)
    names = sorted(o for o, n in orgs.items() if 3 <= n <= 12)[:3]
    lines = tmp_path / "list.txt"
    lines.write_text("# my list\n" + "\n".join(names) + "\n\nNo Such Company Ltd\n" + names[0] + "\n", "utf-8")
    got = ws.add_targets_from_file(lines)
    assert [r["label"] for r in got["added"]] == names
    assert [r["text"] for r in got["not_found"]] == ["No Such Company Ltd"]
    table = tmp_path / "list.csv"
    table.write_text("Company,Why\n" + "\n".join(f"{n},growth" for n in names) + "\n", "utf-8")
    again = ws.add_targets_from_file(table, column="company")
    assert again["added"] == [] and len(again["already"]) == 3
    with pytest.raises(MynetError, match="no column"):
        ws.add_targets_from_file(table, column="Sector")


def test_cli_loop_and_json(ws, capsys, tmp_path, monkeypatch):
    monkeypatch.setenv("COLUMNS", "120")
    target, row = a_person_with_routes(ws)
    ws.close()
    helper = row["best"]["first_name"]
    code, out, _ = run(capsys, "targets", "--json")
    assert code == 0 and json.loads(out)[0]["id"] == target["id"]
    code, out, _ = run(capsys, "plan", "--json")
    plan = json.loads(out)
    assert code == 0 and plan["objective"]["opened"] == 1
    code, out, err = run(capsys, "plan")
    assert code == 0 and "Ask 1 person to open 1 target" in out
    code, out, _ = run(capsys, "ask", str(row["best"]["first"]), "--for", str(target["id"]), "--json")
    ask = json.loads(out)
    assert code == 0 and ask["via_name"] == helper
    code, out, _ = run(capsys, "asks", "--json")
    assert [a["id"] for a in json.loads(out)] == [ask["id"]]
    code, out, _ = run(capsys, "reach", "--to", str(target["contact"]))
    assert "Asked recently, so paths through others come first" in out
    code, out, _ = run(capsys, "asks", "close", str(ask["id"]), "--outcome", "introduced")
    assert code == 0 and "observed tie" in out
    code, out, _ = run(capsys, "asks")
    assert "No asks waiting" in out
    code, out, _ = run(capsys, "targets", "remove", str(target["id"]))
    assert code == 0
    code, out, _ = run(capsys, "dormant", "--json")
    assert code == 0 and isinstance(json.loads(out), list)
    code, _, err = run(capsys, "asks", "close", "77", "--outcome", "declined")
    assert code == 4 and "no ask #77" in err


def test_report_shows_targets_and_the_plan_as_a_picture_also_redacted(ws, tmp_path):
    from mynet.report import write_report

    target, row = a_person_with_routes(ws)
    org_row = ws.add_target(org=next(c for c in ws.network().contacts if c.orgs).orgs[0])
    out = write_report(ws, tmp_path / "r.html")
    text = out.read_text("utf-8")
    assert "Your targets and the plan" in text and 'id="targets-' in text  # the picture, inline
    assert row["best"]["first_name"] in text or "No route yet" in text
    red = write_report(ws, tmp_path / "red.html", redact=True).read_text("utf-8")  # the leak check passed
    assert "Your targets and the plan" in red
    assert target["label"] not in red and org_row["label"] not in red
    md = write_report(ws, tmp_path / "r.md", markdown=True)
    assert (tmp_path / "r_files" / "targets.svg").exists() and "targets.svg" in md.read_text("utf-8")


def test_a_version_3_workspace_gains_the_targets_and_asks_tables(tmp_path):
    import sqlite3

    from mynet.store import SCHEMA_VERSION, Store

    path = tmp_path / "old.sqlite"
    Store(path).close()
    conn = sqlite3.connect(path)
    conn.execute("DROP TABLE asks")
    conn.execute("DROP TABLE targets")
    conn.execute("INSERT INTO decisions(kind, a, b, value, created_at) VALUES ('rate', 'k', '', '0.5', 'x')")
    conn.execute("PRAGMA user_version = 3")
    conn.commit()
    conn.close()
    store = Store(path)
    assert SCHEMA_VERSION == 4 and store.conn.execute("PRAGMA user_version").fetchone()[0] == 4
    assert store.targets() == [] and store.asks() == [] and len(store.decisions()) == 1
    tid = store.add_target("organisation", "Velvane Robotics")
    assert store.add_ask(tid, "k", "2026-11-02") == 1
    store.close()
