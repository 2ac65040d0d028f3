"""Network analysis over the tie graph (networkx style: G first, seed=)."""
