"""The plan view of the browser (key 7), driven with Textual's Pilot: targets, the plan, keeping an ask and
giving it an outcome, all written through the workspace."""

from __future__ import annotations

import asyncio
from collections import Counter

import pytest

pytest.importorskip("textual")

import shutil  # noqa: E402

from test_tui import TODAY, build_sample, rows, settle, until  # noqa: E402

import mynet  # noqa: E402
from mynet.tui import create_app  # noqa: E402


@pytest.fixture(scope="module")
def plan_sample(tmp_path_factory):
    return build_sample(tmp_path_factory.mktemp("tui-plan"))


@pytest.fixture
def workspace(plan_sample, tmp_path):
    dst = tmp_path / "ws.sqlite"
    shutil.copy(plan_sample, dst)
    return dst


def add_sample_targets(path, n: int = 6) -> list[int]:
    """The sample's organisations of 3 to 12 people as targets: the first ``n`` by name that need an introduction."""
    with mynet.open_workspace(path) as ws:
        net = ws.network(TODAY.isoformat())
        orgs = Counter(o for c in net.contacts for o in c.orgs)
        for name in sorted(o for o, k in orgs.items() if 3 <= k <= 12):
            ws.add_target(org=name)
        rows = ws.targets(net=net, today=TODAY)
        keep = [r["id"] for r in rows if r["state"] == "open"][:n]
        for r in rows:
            if r["id"] not in keep:
                ws.remove_target(r["id"])
        return keep


def test_plan_view_keeps_an_ask_and_closes_it(workspace):
    ids = add_sample_targets(workspace)
    with mynet.open_workspace(workspace) as ws:
        expected = ws.plan(today=TODAY, net=ws.network(TODAY.isoformat()))
    first = expected["asks"][0]

    async def go():
        app = create_app(workspace, today=TODAY, watch_interval=0)
        async with app.run_test(size=(80, 24)) as pilot:
            await settle(pilot)
            await pilot.press("7")
            await until(pilot, lambda: any(not r.heading for r in rows(app, "#plan-list")))
            shown = rows(app, "#plan-list")
            assert shown[0].heading and first["name"] in shown[0].values()[0]
            assert shown[1].key == ("p", first["person"], first["targets"][0]["target"])
            # Enter keeps the ask, dated the browser's day.
            await pilot.press("enter")
            await settle(pilot)
            with mynet.open_workspace(workspace) as ws:
                asks = ws.asks(today=TODAY)
            assert [(a["via"], a["target"], a["asked_on"]) for a in asks] == [
                (first["person"], first["targets"][0]["target"], TODAY.isoformat())]
            # The asks list, and an outcome by key.
            await pilot.press("a")
            await until(pilot, lambda: any(r.key == ("a", asks[0]["id"]) for r in rows(app, "#plan-list")))
            assert "1 open ask" in str(app.screen.query_one("#plan-head").render())
            await pilot.press("d")
            await settle(pilot)
            with mynet.open_workspace(workspace) as ws:
                closed = ws.asks(include_closed=True, today=TODAY)
            assert closed[0]["outcome"] == "declined" and closed[0]["closed_on"] == TODAY.isoformat()
            # The targets list: one row per target, in the order they were added.
            await pilot.press("t")
            await until(pilot, lambda: [r.key for r in rows(app, "#plan-list")] == [("t", i) for i in ids])
            # An outcome key outside the asks says where outcomes are given.
            await pilot.press("i")
            assert "asks (a)" in app.status_text

    asyncio.run(go())


def test_plan_view_without_targets_says_how_to_add_them(workspace):
    async def go():
        app = create_app(workspace, today=TODAY, watch_interval=0)
        async with app.run_test(size=(80, 24)) as pilot:
            await settle(pilot)
            await pilot.press("7")
            await until(pilot, lambda: "add targets" in str(app.screen.query_one("#plan-head").render()))
            await pilot.press("t")
            await settle(pilot)
            assert "mynet targets add" in str(app.screen.query_one("#plan-head").render())

    asyncio.run(go())
