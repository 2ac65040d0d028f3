"""Pictures of each view at 80x24 on the sample scenario (pytest-textual-snapshot).

The test suite runs with NO_COLOR set (tests/conftest.py), so these pictures show
the monochrome rendering: every meaning must be readable from glyphs and words
alone. One picture of the map is taken in colour to keep our palette in view.
Update after checking the pictures by eye: ``pytest tests/test_tui_snapshots.py --snapshot-update``.
"""

from __future__ import annotations

import pytest

pytest.importorskip("pytest_textual_snapshot")

import shutil  # noqa: E402

from test_tui import TODAY, build_sample, settle  # noqa: E402

from mynet.tui import create_app  # noqa: E402

SIZE = (80, 24)


@pytest.fixture(scope="module")
def pictured_sample(tmp_path_factory):
    return build_sample(tmp_path_factory.mktemp("tui-pictures"))


@pytest.fixture
def workspace(pictured_sample, tmp_path):
    """A private copy of the sample workspace, always at the same file name (it shows in the top bar)."""
    dst = tmp_path / "ws.sqlite"
    shutil.copy(pictured_sample, dst)
    return dst


def keys(*presses: str):
    """A run_before that waits for loading, presses keys, and waits for the work they start."""

    async def run_before(pilot) -> None:
        await settle(pilot)
        for key in presses:
            await pilot.press(key)
            await settle(pilot)
        for inp in pilot.app.screen.query("Input"):
            inp.cursor_blink = False
        await settle(pilot)

    return run_before


def typed(text: str) -> list[str]:
    return list(text)


def app_for(workspace):
    return create_app(workspace, today=TODAY, watch_interval=0)


def test_groups(snap_compare, workspace):
    assert snap_compare(app_for(workspace), terminal_size=SIZE, run_before=keys())


def test_groups_large_terminal(snap_compare, workspace):
    assert snap_compare(app_for(workspace), terminal_size=(120, 40), run_before=keys())


def test_group_rename_in_place(snap_compare, workspace):
    assert snap_compare(app_for(workspace), terminal_size=SIZE, run_before=keys("down", "n", *typed("Old crew")))


def test_group_members(snap_compare, workspace):
    assert snap_compare(app_for(workspace), terminal_size=SIZE, run_before=keys("down", "down", "enter"))


def test_person(snap_compare, workspace):
    assert snap_compare(app_for(workspace), terminal_size=SIZE, run_before=keys("down", "down", "enter", "enter"))


def test_connections(snap_compare, workspace):
    assert snap_compare(app_for(workspace), terminal_size=SIZE, run_before=keys("c"))


def test_map(snap_compare, workspace):
    assert snap_compare(app_for(workspace), terminal_size=SIZE, run_before=keys("2", "right", "down", "down"))


def test_map_in_colour(snap_compare, workspace, monkeypatch):
    monkeypatch.delenv("NO_COLOR", raising=False)
    assert snap_compare(app_for(workspace), terminal_size=SIZE, run_before=keys("2", "right"))


def test_people_search(snap_compare, workspace):
    assert snap_compare(app_for(workspace), terminal_size=SIZE, run_before=keys("slash", *typed("quillon")))


def test_reach_completion(snap_compare, workspace):
    assert snap_compare(app_for(workspace), terminal_size=SIZE, run_before=keys("4", *typed("vel")))


def test_reach_paths(snap_compare, workspace):
    assert snap_compare(app_for(workspace), terminal_size=SIZE, run_before=keys("4", *typed("Velvane"), "enter"))


def test_duplicates(snap_compare, workspace):
    assert snap_compare(app_for(workspace), terminal_size=SIZE, run_before=keys("5"))


def test_findings(snap_compare, workspace):
    assert snap_compare(app_for(workspace), terminal_size=SIZE, run_before=keys("6"))


def test_help(snap_compare, workspace):
    assert snap_compare(app_for(workspace), terminal_size=SIZE, run_before=keys("question_mark"))


def test_plan(snap_compare, workspace):
    from test_tui_plan import add_sample_targets

    add_sample_targets(workspace)
    assert snap_compare(app_for(workspace), terminal_size=SIZE, run_before=keys("7"))


def test_plan_asks_after_keeping_one(snap_compare, workspace):
    from test_tui_plan import add_sample_targets

    add_sample_targets(workspace)
    assert snap_compare(app_for(workspace), terminal_size=SIZE, run_before=keys("7", "enter", "a"))
