"""Cached reads: the analysis kept in rows and read without the ties when it is current, the tie table kept as
bytes, a page of contacts, and the event index behind ``mynet why``. Each answer equals the one computed afresh."""

from __future__ import annotations

import json

import numpy as np
import pytest
from conftest import import_sample

from mynet import open_workspace
from mynet.analysis.snapshot import analyse, stamped_analysis
from mynet.evidence.explain import explain_tie
from mynet.evidence.network import load_network
from mynet.evidence.ties import TieTable


@pytest.fixture(scope="module")
def sample(tmp_path_factory):
    path = tmp_path_factory.mktemp("cached") / "ws.sqlite"
    store, truth = import_sample(path)
    store.close()
    return path


def _plain(a) -> dict:
    d = a.to_json()
    d.pop("events")
    return json.loads(json.dumps(d))


def test_tie_table_bytes_round_trip(sample):
    with open_workspace(sample) as ws:
        t = ws.network().all_ties
    back = TieTable.from_bytes(t.to_bytes())
    assert np.array_equal(back.a, t.a) and np.array_equal(back.b, t.b) and np.array_equal(back.strength, t.strength)
    assert set(back.parts) == set(t.parts) and all(np.array_equal(back.parts[k], t.parts[k]) for k in t.parts)
    assert all(np.array_equal(back.counts[k], t.counts[k]) for k in t.counts)
    assert back.labels == t.labels
    assert (back.manual is None) == (t.manual is None)
    assert back.to_json() == TieTable.from_json(json.loads(json.dumps(t.to_json()))).to_json()


def test_kept_analysis_is_read_without_the_ties_and_equals_the_computed_one(sample):
    with open_workspace(sample) as ws:
        computed = ws.analysis(ws.network())  # checks the digest of every input, stamps it
        when = ws.as_of()
        assert stamped_analysis(ws.store, when) is not None
        kept = ws.analysis()  # no network loaded
        assert _plain(kept) == _plain(computed)
        light = ws.analysis(measures=False)
        assert light.measures == {} and light.group_of == computed.group_of
        assert [g.name for g in light.groups] == [g.name for g in computed.groups]
        assert [g.warm for g in light.groups] == [g.warm for g in computed.groups]


@pytest.mark.parametrize("change", ["rate", "resolution", "webmail", "group name"])
def test_kept_analysis_is_never_served_after_a_change(sample, tmp_path, change):
    # Any change bumps the data version: the kept analysis is no longer stamped current, and the answer
    # equals a fresh computation (the digest of cache_inputs decides whether it is recomputed).
    path = tmp_path / "ws.sqlite"
    path.write_bytes(sample.read_bytes())
    with open_workspace(path) as ws:
        ws.analysis(ws.network())
        before = _plain(ws.analysis())
        who = ws.contacts(limit=3, with_groups=False)[2]["id"]
        if change == "rate":
            ws.rate(who, 0.9)
        elif change == "resolution":
            ws.set_setting("analysis.resolution", "2.5")
        elif change == "webmail":
            ws.set_setting("webmail_domains", "quillon.example")
        else:
            ws.name_group(before["groups"][0]["id"], "The rowers")
        # A group's name is applied on every read (never part of the key): the kept analysis stays current.
        assert (stamped_analysis(ws.store, ws.as_of()) is None) == (change != "group name")
        after = ws.analysis()
        with_net = ws.analysis(ws.network())  # the same through a loaded network (stamped at this version now)
        fresh = analyse(ws.store, load_network(ws.store), force=True)
        assert _plain(after) == _plain(fresh) == _plain(with_net)
        assert ws.analysis(ws.network(), measures=False).group_of == fresh.group_of
        if change == "group name":
            assert after.groups[0].name == "The rowers"
        elif change == "resolution":
            assert after.fingerprint != before["fingerprint"]


def test_a_page_of_contacts_equals_the_head_of_the_whole_list(sample):
    with open_workspace(sample) as ws:
        ws.analysis()
        whole = ws.contacts()
        page = ws.contacts(limit=7)
        assert list(page) == list(whole[:7]) and page.total == len(whole) == whole.total
        assert all("group" in r for r in page)


def test_why_from_the_kept_index_equals_the_scan(sample):
    with open_workspace(sample) as ws:
        net = ws.network()
        order = net.ties.order()
        pairs = [(int(net.ties.a[i]), int(net.ties.b[i])) for i in order[:25]]
        scanned = []
        for a, b in pairs:
            plain = ws.network()
            plain.data_version = None  # not at the workspace's version: the index is built in memory
            scanned.append(explain_tie(ws.store, plain, a, b))
        first = ws.network()
        built = [explain_tie(ws.store, first, a, b) for a, b in pairs]  # builds and keeps the index
        kept_net = ws.network()
        kept = [explain_tie(ws.store, kept_net, a, b) for a, b in pairs]  # reads it
        assert type(kept_net.evidence_index).__name__ == "_KeptIndex"
    assert kept == scanned and built == scanned
    assert any(e["kind"] in ("meeting", "thread") for ex in kept for e in ex["evidence"])
