"""The README and DEVELOPERS.md say what the code does."""

from __future__ import annotations

import re
from pathlib import Path

from mynet.analysis.centrality import EXACT_LIMIT, ROLES, contact_role

ROOT = Path(__file__).resolve().parents[1]


def test_readme_lists_exactly_the_roles_the_code_gives():
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    block = text[text.index("- **Roles**"):text.index("- **Bridges**")]
    named = set(re.findall(r"\*([a-z][a-z -]+?)\*", block))
    assert named == set(ROLES)
    # ... and the code gives nothing else: every combination of the rules' inputs lands in ROLES.
    for degree in (0, 1, 5):
        for z in (-2.0, 0.0, 3.0):
            for p in (0.1, 0.5, 0.7):
                for b in (0.0, 0.5):
                    m = {"degree": degree, "within_z": z, "participation": p, "betweenness": b, "constraint": 0.1}
                    for grouped in (True, False):
                        for previous in (None, *ROLES):
                            assert contact_role(m, grouped=grouped, previous=previous) in ROLES


def test_readme_states_the_exact_betweenness_limit_and_the_distance():
    text = " ".join((ROOT / "README.md").read_text(encoding="utf-8").split())
    assert f"exact up to {EXACT_LIMIT:,} contacts" in text
    assert "distance `1/w`" in text
