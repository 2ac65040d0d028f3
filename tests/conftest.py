"""Shared fixtures: a workspace in tmp_path, the corpus location, the sample scenario."""

from __future__ import annotations

from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
CORPUS = ROOT.parent / "shared" / "corpus"
SAMPLE = ROOT / "sample_contacts"


@pytest.fixture
def corpus_dir() -> Path:
    """The shared test corpus, read in place; skipped when a clone has no ../shared.

    The one place the corpus is located: tests take this fixture (directly or through one of
    their own), and every test that does is marked ``corpus`` (see the hook below).
    """
    if not CORPUS.is_dir():
        pytest.skip(f"{CORPUS} is absent (a fresh clone has no ../shared/corpus)")
    return CORPUS


def pytest_collection_modifyitems(config, items):
    """Mark every test that reads the corpus (it uses ``corpus_dir``) with ``corpus``."""
    for item in items:
        if "corpus_dir" in getattr(item, "fixturenames", ()):
            item.add_marker(pytest.mark.corpus)


@pytest.fixture(autouse=True)
def _isolated_workspace(tmp_path, monkeypatch):
    """Never let a test touch the user's default workspace."""
    monkeypatch.setenv("MYNET_WORKSPACE", str(tmp_path / "workspace.sqlite"))
    monkeypatch.setenv("NO_COLOR", "1")
    yield


def import_sample(ws_path: Path):
    """The sample scenario imported the way ``mynet demo`` does it: you, its private mail domains, every file.

    Returns the open store and the scenario's ground truth.
    """
    import json

    from mynet.cli.demo import SOURCE_FILES, sample_dir
    from mynet.store import Store
    from mynet.workspace.importing import import_paths
    from mynet.workspace.people import set_me
    from mynet.workspace.settings import update_list_setting

    src = sample_dir()
    truth = json.loads((src / "ground_truth.json").read_text(encoding="utf-8"))
    store = Store(ws_path)
    set_me(store, truth["you"]["emails"], [truth["you"]["name"]])
    personal = [d for d in truth.get("personal_email_domains", []) if d != "example.org"]
    update_list_setting(store, "webmail_domains", ",".join(personal))
    import_paths(store, [src / f for f in SOURCE_FILES])  # the region (GB) is inferred, as in the demo
    return store, truth


def person_of(store, truth) -> dict[int, str]:
    """Contact id -> the scenario's true person id: by the records behind it, else (found in mail) by its address."""
    rec2person = {(r["file"], r["index"]): r.get("person") for r in truth["records"]}
    cmap = store.contact_map()
    out = {}
    for _rid, key, src, rec in store.records():
        p = rec2person.get((src["path"].rsplit("/", 1)[-1], rec.index))
        if key in cmap and p:
            out[cmap[key]] = p
    found = {f["email"]: f["id"] for f in truth.get("found_people", [])}
    for c in store.contacts():
        if c.id not in out:
            ids = {found[e] for e in c.emails if e in found}
            if len(ids) == 1:
                out[c.id] = ids.pop()
    return out
