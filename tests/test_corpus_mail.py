"""Real mailboxes and calendars of the shared corpus, imported the way a user would (read in place).

``wild/getpatchwork__patchwork``: 71 mailboxes from public mailing lists (List-Id,
Sender, Precedence, threads; some broken on purpose under ``fuzz/``);
``wild/ical4j__ical4j``: 104 calendars. Every one must import or be refused
with a clear message (never another exception), a folder of them must import
in one go, and no list address may end up a person. Skipped when the corpus
is absent.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from mynet.errors import InputError
from mynet.people.mailpeople import evidence_interactions, mail_facts
from mynet.sources import iter_input_files, parse_file
from mynet.store import Store
from mynet.workspace.importing import import_paths
from mynet.workspace.people import set_me

pytestmark = pytest.mark.corpus

MAIL = Path("wild/getpatchwork__patchwork/patchwork/tests/data")
CALENDARS = Path("wild/ical4j__ical4j")


def test_every_mailbox_reads_or_is_refused_cleanly(corpus_dir):
    files = sorted((corpus_dir / MAIL).rglob("*.mbox"))
    assert len(files) == 71
    read = 0
    for path in files:
        try:
            result = parse_file(path)
        except InputError as exc:
            assert str(path) in str(exc)
            continue
        read += 1
        assert result.kind == "mbox"
        for it in result.interactions:
            assert it.kind == "message" and all("@" in p for p in it.participants)
    assert read >= 60


def test_the_list_folder_imports_in_one_go_and_lists_are_no_people(corpus_dir, tmp_path):
    store = Store(tmp_path / "ws.sqlite")
    report = import_paths(store, [corpus_dir / MAIL], skip_bad_files=True)
    assert len(report.files) == 71 and all(f.status in ("imported", "refused") for f in report.files)
    assert report.who_are_you  # no "me" yet: the import says which address to declare
    set_me(store, [report.who_are_you], [])
    facts = mail_facts(store)
    lists = {a for a, kind in facts.kinds.items() if kind == "list"}
    # Real list traffic: RFC 2919 List-Id and RFC 2369 List-Post name the lists; RFC 5322 Sender the owners.
    assert any(a.endswith("-owner@vger.kernel.org") for a in lists) and len(lists) >= 5
    emails = {e for c in store.contacts() for e in c.emails}
    assert not emails & set(facts.kinds)
    for it in evidence_interactions(store):
        assert not set(it.participants) & lists


def test_every_calendar_imports_or_is_refused_cleanly(corpus_dir, tmp_path):
    files = sorted((corpus_dir / CALENDARS).rglob("*.ics"))
    assert len(files) == 104
    store = Store(tmp_path / "ws.sqlite")
    report = import_paths(store, files, skip_bad_files=True)
    assert len(report.files) == 104
    refused = [f for f in report.files if f.status == "refused"]
    assert all(f.error.startswith(f.path) for f in refused)
    assert len(refused) < len(files) / 2
    assert list(iter_input_files([corpus_dir / CALENDARS])) == files
