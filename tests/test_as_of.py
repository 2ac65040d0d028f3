"""--as-of: the analysis seen from a day; later evidence left out; warmth measured on that day; a stale mailbox
is measured at its newest interaction by default, said in one line; caches keyed on the day."""

from __future__ import annotations

import json
from datetime import date

import pytest

from mynet.cli import main
from mynet.evidence.network import load_network, resolve_as_of
from mynet.store import Store
from mynet.workspace.importing import import_paths
from mynet.workspace.people import set_me

ME = "you@example.org"


def run(capsys, *args):
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


def mbox(dates: list[tuple[str, str, list[str]]]) -> str:
    """Messages (RFC 5322 headers only) from you to the given addresses on the given dates."""
    out = []
    for k, (day, subject, to) in enumerate(dates):
        d = date.fromisoformat(day)
        out += [f"From {ME} {d.strftime('%a %b %d')} 10:00:00 {d.year}", f"From: Robin <{ME}>",
                f"To: {', '.join(to)}", f"Date: {d.strftime('%a, %d %b %Y')} 10:00:00 +0000",
                f"Subject: {subject}", f"Message-ID: <m{k}@t.example>", "", "(no body)", ""]
    return "\n".join(out)


def workspace(tmp_path, dates):
    (tmp_path / "p.csv").write_text("Name,Email\nAna Lind,ana@a.example\nBo Ek,bo@b.example\nCy Moss,cy@c.example\n",
                                    encoding="utf-8")
    (tmp_path / "m.mbox").write_text(mbox(dates), encoding="utf-8")
    store = Store(tmp_path / "ws.sqlite")
    set_me(store, [ME], ["Robin"])
    import_paths(store, [tmp_path / "p.csv", tmp_path / "m.mbox"])
    return store


OLD = [("2009-05-04", "Plans", ["ana@a.example", "bo@b.example"]),
       ("2010-03-01", "More plans", ["ana@a.example", "bo@b.example"]),
       ("2010-03-04", "Last word", ["cy@c.example", "bo@b.example"])]


def test_a_stale_mailbox_is_measured_at_its_newest_interaction_and_says_so(tmp_path, capsys):
    store = workspace(tmp_path, OLD)
    when = resolve_as_of(store, today=date(2026, 12, 1))
    assert when.day == date(2010, 3, 4) and not when.cut and "2010-03-04" in when.note
    assert resolve_as_of(store, today=date(2010, 12, 1)).note == ""  # within a year: today, silently
    ws = str(store.path)
    code, out, err = run(capsys, "--workspace", ws, "contacts", "--json")
    people = {p["name"]: p for p in json.loads(out)}
    assert code == 0 and err.count("more than a year ago") == 1 and "--as-of" in err
    assert people["Cy Moss"]["warmth"] > 0.05  # measured in March 2010: sixteen years later it would be ~0
    code, out, err = run(capsys, "--workspace", ws, "ties", "--json")
    assert code == 0 and "more than a year ago" in err and json.loads(out)
    # Asked for a day explicitly: no note.
    code, out, err = run(capsys, "--workspace", ws, "ties", "--as-of", "2010-03-04")
    assert code == 0 and "more than a year ago" not in err


def test_as_of_leaves_later_evidence_out_and_measures_warmth_then(tmp_path, capsys):
    store = workspace(tmp_path, OLD)
    full = load_network(store, today=date(2026, 12, 1))
    early = load_network(store, as_of="2010-03-02")
    ids = {c.name: c.id for c in full.contacts}
    pairs = lambda net: {(net.name(int(a)), net.name(int(b))) for a, b in zip(net.ties.a, net.ties.b)}  # noqa: E731
    assert ("Bo Ek", "Cy Moss") in pairs(full) or ("Cy Moss", "Bo Ek") in pairs(full)
    assert early.as_of.cut and early.as_of.day == date(2010, 3, 2)
    assert not ({("Bo Ek", "Cy Moss"), ("Cy Moss", "Bo Ek")} & pairs(early))  # their only thread is later
    assert early.warmth[ids["Cy Moss"]].warmth == 0 and early.warmth[ids["Ana Lind"]].warmth > 0
    assert early.warmth[ids["Ana Lind"]].last == "2010-03-01"
    # The cache is keyed on the day: the full network again, then the early one again, each as computed.
    again = load_network(store, today=date(2026, 12, 1))
    assert len(again.ties) == len(full.ties)
    assert len(load_network(store, as_of="2010-03-02").ties) == len(early.ties)
    ws = str(store.path)
    code, out, _ = run(capsys, "--workspace", ws, "why", "Bo Ek", "Cy Moss", "--as-of", "2010-03-02", "--json")
    ex = json.loads(out)
    assert code == 0 and ex["as_of"] == "2010-03-02" and not ex["evidence"]


@pytest.mark.parametrize("cmd", [
    ["ties"], ["why", "Ana Lind", "Bo Ek"], ["contacts"], ["groups"], ["brokers"], ["bridges"], ["audit"],
    ["reach", "--to", "Cy Moss"], ["report", "-o", "{tmp}/r.html"], ["export", "-o", "{tmp}/n.json"],
])
def test_every_analysis_command_takes_as_of(tmp_path, capsys, cmd):
    store = workspace(tmp_path, OLD)
    ws = str(store.path)
    args = [a.replace("{tmp}", str(tmp_path)) for a in cmd]
    code, out, err = run(capsys, "--workspace", ws, *args, "--as-of", "2010-03-02")
    assert code == 0, err
    code, _, err = run(capsys, "--workspace", ws, *args, "--as-of", "March 2010")
    assert code == 2 and "YYYY-MM-DD" in err


def test_looking_back_keeps_todays_groups(tmp_path):
    from mynet.analysis.snapshot import STATE_KEY, analyse

    store = workspace(tmp_path, OLD)
    analyse(store, load_network(store))
    state = store.meta(STATE_KEY)
    back = analyse(store, load_network(store, as_of="2009-06-01"))
    assert store.meta(STATE_KEY) == state  # a look at the past never renumbers today's groups
    assert back.fingerprint != analyse(store, load_network(store)).fingerprint


def test_browse_refuses_a_bad_day_before_opening(tmp_path, capsys):
    store = workspace(tmp_path, OLD)
    code, _, err = run(capsys, "--workspace", str(store.path), "browse", "--as-of", "yesterday")
    assert code == 2 and "YYYY-MM-DD" in err
