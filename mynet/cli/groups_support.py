"""Group membership for the CLI views, when the analysis has run (empty before it exists)."""

from __future__ import annotations


def group_of(store, net) -> dict[int, int | None]:
    try:
        from ..analysis.snapshot import load_analysis
    except ImportError:
        return {}
    return load_analysis(store, net).group_of
