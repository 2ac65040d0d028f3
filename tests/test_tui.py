"""The terminal browser, driven headless with Textual's Pilot: keys in, state and workspace out.

Every test works on its own copy of the invented sample scenario (sample_contacts/),
imported the way ``mynet demo`` does it, with the day frozen at the scenario's end.
"""

from __future__ import annotations

import asyncio
import shutil
import sqlite3
from datetime import date
from pathlib import Path

import pytest

pytest.importorskip("textual")

from conftest import import_sample  # noqa: E402

from mynet.analysis.intro_routes import reach, resolve_targets  # noqa: E402
from mynet.analysis.snapshot import analyse  # noqa: E402
from mynet.evidence.network import load_network  # noqa: E402
from mynet.store import Store  # noqa: E402
from mynet.tui import create_app  # noqa: E402
from mynet.tui.data import load_extras, load_snapshot  # noqa: E402
from mynet.tui.rowlist import RowList  # noqa: E402
from mynet.workspace.people import merge_suggestions, search_contacts  # noqa: E402

#: The day after the scenario's last day (sample_contacts/_activity.py ends it on 2026-11-30).
TODAY = date(2026, 12, 1)


def build_sample(folder: Path) -> Path:
    """The sample scenario imported like ``mynet demo`` does, with every cache filled for TODAY."""
    ws = folder / "sample.sqlite"
    store, _truth = import_sample(ws)
    with store:
        net = load_network(store, today=TODAY)
        analyse(store, net)
    return ws


@pytest.fixture(scope="session")
def sample_master(tmp_path_factory) -> Path:
    return build_sample(tmp_path_factory.mktemp("tui-sample"))


@pytest.fixture
def workspace(sample_master, tmp_path) -> Path:
    """A private copy of the sample workspace (tests change it)."""
    dst = tmp_path / "ws.sqlite"
    shutil.copy(sample_master, dst)
    return dst


def _run(coro) -> None:
    asyncio.run(coro)


async def settle(pilot) -> None:
    """Wait for every worker (loading, saving) and for the screen to catch up."""
    from textual.worker import WorkerCancelled, WorkerFailed

    app = pilot.app
    for _ in range(50):
        try:
            await app.workers.wait_for_complete()
        except (WorkerCancelled, WorkerFailed):  # a newer look-up replaced an older one
            pass
        await pilot.pause()
        if not app.workers._workers and not app._jobs:
            return


async def until(pilot, condition, seconds: float = 10.0) -> None:
    """Wait (settling workers) until ``condition()`` holds."""
    for _ in range(int(seconds / 0.05)):
        await settle(pilot)
        if condition():
            return
        await pilot.pause(0.05)
    assert condition()


async def started(pilot) -> None:
    await settle(pilot)
    assert pilot.app.snapshot is not None, pilot.app.error
    assert pilot.app.snapshot.extras is not None


def rows(app, selector: str) -> list:
    return app.screen.query_one(selector, RowList).rows


def test_first_screen_lists_every_group(workspace):
    async def run():
        app = create_app(workspace, today=TODAY, watch_interval=0)
        async with app.run_test(size=(80, 24)) as pilot:
            await started(pilot)
            snap = app.snapshot
            keys = [r.key for r in rows(app, "#group-list")]
            assert keys[: len(snap.analysis.groups)] == [g.id for g in snap.analysis.groups]
            assert keys[-1] == "none"  # the people in no group come last
            assert len(snap.ungrouped()) > 0
            # The highlighted group's facts are shown below the list.
            detail = str(app.screen.query_one("#group-detail").render())
            assert f"{snap.analysis.groups[0].size} people" in detail

    _run(run())


def test_rename_persists_and_the_cli_sees_it(workspace):
    async def run():
        app = create_app(workspace, today=TODAY, watch_interval=0)
        async with app.run_test(size=(80, 24)) as pilot:
            await started(pilot)
            gid = app.snapshot.analysis.groups[1].id
            await pilot.press("down", "n")
            assert app.focused.id == "name-input"
            await pilot.press(*"Old colleagues", "enter")
            await settle(pilot)
            assert app.snapshot.group(gid).name == "Old colleagues"
            assert app.snapshot.group(gid).user_named
            assert "Old colleagues" in str(rows(app, "#group-list")[1].values()[1])
        # A fresh connection (as a CLI run would open) sees the name.
        with Store(workspace) as store:
            names = {g.id: g.name for g in analyse(store).groups}
        assert names[gid] == "Old colleagues"

    _run(run())


def test_rename_escape_changes_nothing(workspace):
    async def run():
        app = create_app(workspace, today=TODAY, watch_interval=0)
        async with app.run_test(size=(80, 24)) as pilot:
            await started(pilot)
            await pilot.press("n", *"Nope", "escape")
            await settle(pilot)
            assert isinstance(app.focused, RowList)
        with Store(workspace) as store:
            assert store.decisions("group_name") == []

    _run(run())


def test_search_filters_like_the_core_search(workspace):
    async def run():
        app = create_app(workspace, today=TODAY, watch_interval=0)
        async with app.run_test(size=(80, 24)) as pilot:
            await started(pilot)
            await pilot.press("slash")
            assert app.focused.id == "search"
            await pilot.press(*"quillon")
            await pilot.pause()
            shown = {r.key for r in rows(app, "#people-list")}
            expected = {c.id for c in search_contacts(app.snapshot.contacts, "quillon")}
            assert shown == expected and 0 < len(shown) < len(app.snapshot.contacts)
            # Tags and accents fold the same way as the core search.
            await pilot.press(*("backspace",) * 7, *"rowing")
            await pilot.pause()
            assert {r.key
                    for r in rows(app,
                                  "#people-list")} == {c.id for c in search_contacts(app.snapshot.contacts, "rowing")}
            # Enter goes to the list, Enter again opens the first person.
            first = rows(app, "#people-list")[0].key
            await pilot.press("enter", "enter")
            await settle(pilot)
            assert type(app.screen).__name__ == "PersonScreen" and app.screen.cid == first

    _run(run())


def test_accepting_a_merge_merges(workspace):
    async def run():
        app = create_app(workspace, today=TODAY, watch_interval=0)
        async with app.run_test(size=(100, 30)) as pilot:
            await started(pilot)
            before = len(app.snapshot.contacts)
            await pilot.press("5")
            first = rows(app, "#dupes-list")[0].key
            await pilot.press("m")
            await settle(pilot)
            assert len(app.snapshot.contacts) == before - 1
            assert first not in {r.key for r in rows(app, "#dupes-list")}
        with Store(workspace) as store:
            a, b = first
            cmap = store.contact_map()
            ids = {cid for cid in cmap.values()}
            assert len(store.contacts()) == before - 1
            assert not (a in ids and b in ids)  # one id took the other's records
            assert (a, b) not in {(s.a, s.b) for s in merge_suggestions(store)}

    _run(run())


def test_keeping_apart_and_skipping(workspace):
    async def run():
        app = create_app(workspace, today=TODAY, watch_interval=0)
        async with app.run_test(size=(100, 30)) as pilot:
            await started(pilot)
            await pilot.press("5")
            first, second = [r.key for r in rows(app, "#dupes-list")][:2]
            await pilot.press("s")  # skip: nothing saved, the cursor moves on
            assert app.screen.query_one("#dupes-list", RowList).current_key == second
            await pilot.press("k")
            await settle(pilot)
            left = {r.key for r in rows(app, "#dupes-list")}
            assert first in left and second not in left
        with Store(workspace) as store:
            assert second not in {(s.a, s.b) for s in merge_suggestions(store)}
            assert first in {(s.a, s.b) for s in merge_suggestions(store)}
            assert len(store.decisions("different")) == 1

    _run(run())


def test_reach_shows_the_best_path_first(workspace):
    async def run():
        app = create_app(workspace, today=TODAY, watch_interval=0)
        async with app.run_test(size=(80, 24)) as pilot:
            await started(pilot)
            await pilot.press("4")
            await pilot.press(*"Velvane")
            await pilot.pause()
            options = app.screen.query_one("#reach-options")
            assert options.display and options.option_count >= 1
            await pilot.press("enter")
            await settle(pilot)
            snap = app.snapshot
            expected = reach(snap.net, resolve_targets(snap.net, org="Velvane Robotics"), k=5,
                             groups=snap.analysis.group_of)
            shown = rows(app, "#reach-paths")
            assert len(shown) == len(expected.paths) > 0
            assert str(shown[0].values()[2]) == " → ".join(["you", *expected.paths[0]["names"]])
            scores = [float(r.values()[1]) for r in shown]
            assert scores == sorted(scores, reverse=True)
            detail = str(app.screen.query_one("#reach-detail").render())
            assert "Ask:" in detail and expected.paths[0]["names"][0] in detail

    _run(run())


def test_person_shows_ties_strongest_first_with_evidence(workspace):
    async def run():
        app = create_app(workspace, today=TODAY, watch_interval=0)
        async with app.run_test(size=(100, 36)) as pilot:
            await started(pilot)
            snap = app.snapshot
            # The warmest member of the Quillon group has many ties.
            cid = max(snap.analysis.groups, key=lambda g: g.warm).members[0]
            app.open_person(cid)
            await settle(pilot)
            ties = rows(app, "#tie-list")
            strengths = [s for _o, s, _r in snap.ties_of(cid)]
            assert [r.key for r in ties] == [o for o, _s, _r in snap.ties_of(cid)]
            assert strengths == sorted(strengths, reverse=True) and strengths
            await until(pilot, lambda: " per " in str(app.screen.query_one("#evidence").render()))
            evidence = str(app.screen.query_one("#evidence").render())
            assert snap.net.name(ties[0].key) in evidence and ".vcf:" in evidence  # file:line provenance
            card = str(app.screen.query_one("#person-card").render())
            assert snap.net.name(cid) in card and ".vcf:" in card  # the sources with their lines
            eig = snap.analysis.measures[cid]["eigenvector"]
            assert "Standing" in card and f"{eig:.2f} of 1" in card  # plain words, then the number
            assert "eigenvector" not in card  # the method's name is one step away (mynet explain, help)
            assert "#" + str(cid) not in card and f"mynet show {cid}" in card  # no raw id in a sentence
            await pilot.press("enter")  # the other end of the tie
            await settle(pilot)
            assert app.screen.cid == ties[0].key
            await pilot.press("escape", "escape")
            assert type(app.screen).__name__ == "MainScreen"

    _run(run())


def test_a_suggested_duplicate_is_not_shown_as_a_tie(workspace):
    from mynet.tui.person import SAME_WORDS

    async def run():
        app = create_app(workspace, today=TODAY, watch_interval=0)
        async with app.run_test(size=(100, 36)) as pilot:
            await started(pilot)
            snap = app.snapshot
            linked = [(s.a, s.b) for s in snap.extras.suggestions
                      if any(o == s.b for o, _s, _r in snap.ties_of(s.a))]
            assert linked, "the sample has duplicates that share an employer, so mynet links them"
            a, b = linked[0]
            app.open_person(a)
            await settle(pilot)
            row = next(r for r in rows(app, "#tie-list") if r.key == b)
            assert row.values()[2] == SAME_WORDS
            others = [r for r in rows(app, "#tie-list") if r.key != b]
            assert all(r.values()[2] != SAME_WORDS for r in others)

    _run(run())


def test_rating_and_ties_are_saved_at_once(workspace):
    async def run():
        app = create_app(workspace, today=TODAY, watch_interval=0)
        async with app.run_test(size=(100, 30)) as pilot:
            await started(pilot)
            snap = app.snapshot
            cid = snap.analysis.groups[0].members[0]
            other = next(c for c in snap.contacts if c.id != cid and c.id not in {o for o, _s, _r in snap.ties_of(cid)})
            app.open_person(cid)
            await settle(pilot)
            await pilot.press("w", *"0.9", "enter")
            await settle(pilot)
            assert app.snapshot.net.warmth[cid].rated == pytest.approx(0.9)
            await pilot.press("t", *other.name, "enter")
            await pilot.press(*"same choir", "enter")
            await settle(pilot)
            assert other.id in {o for o, _s, _r in app.snapshot.ties_of(cid)}
            # Remove the strongest tie, after saying yes.
            first = app.screen.query_one("#tie-list", RowList).current_key
            await pilot.press("x", "y")
            await settle(pilot)
            assert first not in {o for o, _s, _r in app.snapshot.ties_of(cid)}
        with Store(workspace) as store:
            kinds = sorted(d["kind"] for d in store.decisions() if d["kind"] in ("rate", "tie", "untie"))
            assert kinds == ["rate", "tie", "untie"]
            assert next(d for d in store.decisions("tie"))["value"]["note"] == "same choir"

    _run(run())


def test_connections_of_a_group(workspace):
    async def run():
        app = create_app(workspace, today=TODAY, watch_interval=0)
        async with app.run_test(size=(80, 24)) as pilot:
            await started(pilot)
            gid = app.snapshot.analysis.groups[0].id
            await pilot.press("c")
            await settle(pilot)
            keys = [r.key for r in rows(app, "#links-list")]
            linked = {x["b"] if x["a"] == gid else x["a"] for x in app.snapshot.analysis.links
                      if gid in (x["a"], x["b"])}
            assert {k[1] for k in keys if isinstance(k, tuple) and k[0] == "group"} == linked
            assert any(isinstance(k, tuple) and k[0] == "person" and len(k) == 3 for k in keys)  # bridges
            await pilot.press("enter")  # the most tied group opens
            await settle(pilot)
            assert type(app.screen).__name__ == "GroupScreen" and app.screen.gid in linked

    _run(run())


def test_map_matrix_and_its_detail(workspace):
    async def run():
        app = create_app(workspace, today=TODAY, watch_interval=0)
        async with app.run_test(size=(80, 24)) as pilot:
            await started(pilot)
            await pilot.press("2")
            grid = app.screen.query_one("#map-grid")
            text = str(grid.render())
            n = len(app.snapshot.analysis.groups)
            assert len(text.splitlines()) == n + 1
            await pilot.press("right")
            g, h = grid.gids[0], grid.gids[1]
            link = app.snapshot.link(g, h)
            detail = str(app.screen.query_one("#map-detail").render())
            assert f"{link['ties']} ties" in detail
            await pilot.press("enter")
            await settle(pilot)
            assert type(app.screen).__name__ == "LinksScreen" and app.screen.gid == g

    _run(run())


def test_findings_view_lists_the_audit(workspace):
    async def run():
        app = create_app(workspace, today=TODAY, watch_interval=0)
        async with app.run_test(size=(80, 24)) as pilot:
            await started(pilot)
            await pilot.press("6")
            findings = app.snapshot.extras.findings
            if findings is None:
                pytest.skip(app.snapshot.extras.findings_error)
            shown = rows(app, "#findings-list")
            assert [str(r.values()[1]) for r in shown] == [f["title"] for f in findings]
            detail = str(app.screen.query_one("#finding-detail").render())
            assert findings[0]["title"] in detail

    _run(run())


def test_help_lists_every_key(workspace):
    from mynet.tui.screens import help_sections

    async def run():
        app = create_app(workspace, today=TODAY, watch_interval=0)
        async with app.run_test(size=(80, 24)) as pilot:
            await started(pilot)
            await pilot.press("question_mark")
            assert type(app.screen).__name__ == "HelpScreen"
            text = str(app.screen.query_one("#help-text").render())
            for _title, keys in help_sections(app):
                for _key, desc in keys:
                    assert desc in text
            for word in ("Name group", "Merge", "Keep apart", "Set warmth", "Search", "Quit"):
                assert word in text
            await pilot.press("escape")
            assert type(app.screen).__name__ == "MainScreen"
            await pilot.press("q")
        assert app.return_code == 0 or app.return_code is None

    _run(run())


def test_a_busy_workspace_waits_and_says_so(workspace):
    """Another process holding the write lock (an import) makes the app wait, then load."""

    async def run():
        holder = sqlite3.connect(workspace, timeout=5, isolation_level=None)
        holder.execute("BEGIN IMMEDIATE")
        holder.execute("UPDATE meta SET value = value WHERE key = 'data_version'")
        app = create_app(workspace, today=date(2026, 12, 2), watch_interval=0)  # a new day: warmth is recomputed
        async with app.run_test(size=(80, 24)) as pilot:
            for _ in range(60):
                await pilot.pause(0.05)
                if "busy" in app.busy_label:
                    break
            assert "busy" in app.busy_label and app.snapshot is None
            holder.execute("COMMIT")
            await started(pilot)
            assert app.snapshot.contacts
        holder.close()

    _run(run())


def test_changes_made_elsewhere_show_up(workspace):
    async def run():
        app = create_app(workspace, today=TODAY, watch_interval=0.2)
        async with app.run_test(size=(80, 24)) as pilot:
            await started(pilot)
            gid = app.snapshot.analysis.groups[0].id
            from mynet.workspace.decisions import name_group

            with Store(workspace) as store:  # as `mynet groups name` would
                name_group(store, gid, "Named elsewhere")
            for _ in range(40):
                await pilot.pause(0.1)
                await settle(pilot)
                if app.snapshot.group(gid).name == "Named elsewhere":
                    break
            assert app.snapshot.group(gid).name == "Named elsewhere"

    _run(run())


def test_a_rename_in_this_window_is_never_taken_for_a_change_elsewhere(workspace):
    import mynet.tui.app as tui_app

    async def run():
        app = create_app(workspace, today=TODAY, watch_interval=0.1)
        async with app.run_test(size=(80, 24)) as pilot:
            await started(pilot)
            said = []
            gid = app.snapshot.analysis.groups[0].id
            await pilot.press("n", *"Rowing club", "enter")
            for _ in range(20):  # the watcher looks every 0.1 s; give it time to (wrongly) notice the rename
                await pilot.pause(0.1)
                await settle(pilot)
                said.append(app.status_text)
            assert app.snapshot.group(gid).name == "Rowing club"
            assert tui_app.CHANGED_ELSEWHERE not in said
            # A reload that was already under way when the name was saved is not "elsewhere" either.
            app._rebaseline(app.snapshot)
            await settle(pilot)
            assert app.status_text != tui_app.CHANGED_ELSEWHERE

    _run(run())


def test_bulk_merge_of_the_surest_duplicates_asks_first(workspace):
    async def run():
        app = create_app(workspace, today=TODAY, watch_interval=0)
        async with app.run_test(size=(100, 30)) as pilot:
            await started(pilot)
            before = len(app.snapshot.contacts)
            sure = [s for s in app.snapshot.extras.suggestions if s.score >= 0.9]
            assert len(sure) >= 2
            await pilot.press("5", "M")
            question = str(app.screen.query_one("#ask-question").render())
            assert f"{len(sure)} pairs" in question and "unmerge" in question
            await pilot.press("n")  # no: nothing merged
            await settle(pilot)
            assert len(app.snapshot.contacts) == before
            await pilot.press("M", "y")
            await until(pilot, lambda: len(app.snapshot.contacts) == before - len(sure))
        with Store(workspace) as store:
            assert not [s for s in merge_suggestions(store) if s.score >= 0.9]

    _run(run())


def test_an_import_while_the_network_loads_is_noticed(workspace, tmp_path, monkeypatch):
    # Another process imports right after the browser has read the workspace but before it shows it:
    # the browser must not take that import as already shown (no polling here: watch_interval=0).
    import mynet.tui.app as tui_app
    from mynet.workspace.importing import import_paths

    extra = tmp_path / "late.vcf"
    extra.write_text("BEGIN:VCARD\r\nVERSION:3.0\r\nFN:Late Arrival\r\nEMAIL:late@arrival.example\r\nEND:VCARD\r\n")
    real, calls = tui_app.load_snapshot, []

    def load_then_someone_imports(*args, **kw):
        snap = real(*args, **kw)
        calls.append(1)
        if len(calls) == 1:
            with Store(workspace) as store:
                import_paths(store, [extra])
        return snap

    monkeypatch.setattr(tui_app, "load_snapshot", load_then_someone_imports)

    async def run():
        app = create_app(workspace, today=TODAY, watch_interval=0)
        async with app.run_test(size=(80, 24)) as pilot:
            await until(pilot, lambda: app.snapshot is not None and len(calls) >= 2
                        and any(c.name == "Late Arrival" for c in app.snapshot.contacts))
            assert app.status_text == tui_app.CHANGED_ELSEWHERE

    _run(run())


def test_snapshot_search_matches_core_search_everywhere(workspace):
    snap = load_snapshot(workspace, TODAY)
    for text in ("", "kamau", "QUILLON", "rowing", "example.com", "Öztürk", "ozturk", "4477009", "nobody-at-all"):
        assert [c.id for c in snap.search(text)] == [c.id for c in search_contacts(snap.contacts, text)], text
    extras = load_extras(workspace, snap)
    assert len(extras.suggestions) == 5


def test_empty_workspace_says_what_to_do(tmp_path):
    ws = tmp_path / "empty.sqlite"
    Store(ws).close()

    async def run():
        app = create_app(ws, today=TODAY, watch_interval=0)
        async with app.run_test(size=(80, 24)) as pilot:
            await settle(pilot)
            assert app.snapshot is not None or app.error
            assert "import" in (app.status_text + app.error).lower()

    _run(run())


def test_missing_workspace_is_a_clear_error(tmp_path):
    from mynet.errors import WorkspaceError

    with pytest.raises(WorkspaceError, match="no workspace"):
        create_app(tmp_path / "nothing.sqlite")


def test_browse_command_is_registered_by_its_module():
    from mynet.cli import cli
    from mynet.cli.browse import browse_cmd

    assert cli.commands["browse"] is browse_cmd
