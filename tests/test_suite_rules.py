"""Rules the test suite keeps about itself: one corpus location, every corpus test marked."""

from __future__ import annotations

import inspect
import re
from pathlib import Path

TESTS = Path(__file__).resolve().parent


def test_only_conftest_locates_the_corpus():
    where = [p.name for p in sorted(TESTS.glob("*.py"))
             if re.search(r"""["']shared["']""", p.read_text(encoding="utf-8"))]
    assert where == ["conftest.py"]


def test_every_test_that_reads_the_corpus_is_marked(request):
    # A test reads the corpus through the corpus_dir fixture (directly or via one of its own) or
    # through conftest's CORPUS constant; either way it must carry the corpus marker.
    unmarked = []
    for item in request.session.items:
        fn = getattr(item, "function", None)
        if fn is None or item is request.node:
            continue
        module_src = inspect.getsource(inspect.getmodule(fn))
        reads = "corpus_dir" in getattr(item, "fixturenames", ()) or re.search(r"\bCORPUS\b", inspect.getsource(fn))
        if "from conftest import CORPUS" in module_src and "pytestmark = pytest.mark.corpus" not in module_src:
            reads = True
        if reads and item.get_closest_marker("corpus") is None:
            unmarked.append(item.nodeid)
    assert unmarked == []
