"""Group membership for the CLI views, when the analysis has run (empty before it exists)."""

from __future__ import annotations


def group_of(store, net) -> dict[int, int | None]:
    from ..analysis.snapshot import load_analysis

    return load_analysis(store, net).group_of
