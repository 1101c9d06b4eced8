"""Keyboard terminal UI (Textual): edit, analyse and rebalance a panel schedule."""
