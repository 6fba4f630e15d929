"""Searching what fits the stock on hand: the sets of a scale that can be cut from it."""
