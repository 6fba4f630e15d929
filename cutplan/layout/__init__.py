"""Laying a plan's pieces out on the stock: the cut list, its optimiser and identical kits."""
