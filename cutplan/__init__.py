"""cutplan: cut plans for hand-built tuned percussion (chimes, bars, air columns, resonators)."""

__version__ = "0.1.0"
