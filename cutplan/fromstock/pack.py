"""Quick answers to "do these pieces fit the sticks on hand?" before the exact packer runs.

:class:`StockRoom` holds the stock on hand in the optimiser's terms (a stick of length S holds
pieces l_i when sum(l_i + kerf) <= S - 2 end_trim + kerf; see :mod:`cutplan.layout.optimiser`) and gives
bounds that prove a set cannot fit, and a first-fit-decreasing layout that proves it can.
Only when neither settles it does the search call the exact packer.
"""

from __future__ import annotations

import math

from cutplan.layout import optimiser

__all__ = ["TOL", "NODE_LIMIT", "StockRoom"]

TOL = optimiser.FIT_TOLERANCE
NODE_LIMIT = 200_000
"""Placements the exact search may try before it gives up [-] (a count, not a time, so the answer
does not change with the machine's load)."""


class StockRoom:
    """The stock on hand (a design's ``StockSpec``) as capacities [m] and counts."""

    def __init__(self, stock):
        self.kerf, self.end_trim = stock.kerf, stock.end_trim
        self.types = [optimiser.StockType(x.length, x.count, x.price) for x in stock.lengths]
        self.longest = max(t.length for t in self.types)
        cap = [optimiser.usable_length(t.length, stock.end_trim) + stock.kerf for t in self.types]
        self.total_cap = sum(math.inf if t.count is None else t.count * c for t, c in zip(self.types, cap, strict=True))
        self.sticks_on_hand = sum(math.inf if t.count is None else t.count for t in self.types)
        self.cap_longest = optimiser.usable_length(self.longest, stock.end_trim) + stock.kerf
        self.caps = sorted(set(cap))
        self.room_above = {t: sum(math.inf if x.count is None else x.count * c
                                  for x, c in zip(self.types, cap, strict=True) if c > t) for t in self.caps}
        order = sorted(range(len(cap)), key=lambda i: -cap[i])
        self.stick_caps = [cap[i] for i in order]
        self.stick_counts = [self.types[i].count for i in order]

    def sizes(self, cuts):
        """Cut lengths plus one kerf each [m]: the optimiser's item sizes."""
        return [c + self.kerf for c in cuts]

    def cannot_fit(self, cuts):
        """Whether a bound proves the pieces (cut lengths [m]) cannot all be cut from the stock.

        The longest piece against the longest stick; all pieces plus kerfs against all the
        stock; the pieces too long for the shorter sticks against the room of the longer ones;
        and the Martello-Toth L2 bound (sticks needed if all were the longest) against the
        number of sticks.
        """
        if max(cuts) > optimiser.usable_length(self.longest, self.end_trim) + TOL:
            return True
        sizes = self.sizes(cuts)
        if sum(sizes) > self.total_cap + TOL:
            return True
        for threshold in self.caps[:-1]:
            big = sum(x for x in sizes if x > threshold + TOL)
            if big > self.room_above[threshold] + TOL:
                return True
        return optimiser.lower_bound_l2(sizes, self.cap_longest) > self.sticks_on_hand

    def first_fit(self, cuts):
        """Whether first fit decreasing places every piece on the sticks on hand.

        Pieces longest first, each on the open stick it fills best; a new stick is the longest
        free one, or (second try) the shortest free one that holds the piece.
        """
        order = sorted(self.sizes(cuts), reverse=True)
        caps = self.stick_caps
        for shortest_first in (False, True):
            left = [math.inf if c is None else c for c in self.stick_counts]
            room = []  # room left on each open stick
            for x in order:
                spot = min((i for i, r in enumerate(room) if r >= x - TOL), key=lambda i: room[i], default=None)
                if spot is None:
                    free = [t for t in range(len(caps)) if left[t] > 0 and caps[t] >= x - TOL]
                    if not free:
                        break
                    t = free[-1] if shortest_first else free[0]
                    left[t] -= 1
                    room.append(caps[t])
                    spot = len(room) - 1
                room[spot] -= x
            else:
                return True
        return False

    def exact_fit(self, cuts, node_limit=NODE_LIMIT):
        """Whether the pieces can all be cut: True, False, or None when the exhaustive search
        (:meth:`exact_assignment`) stops at ``node_limit`` placements.

        Examples
        --------
        Two 1.5 m sticks, no kerf: 0.6 + 0.5 + 0.4 m fills each exactly, but five 0.6 m pieces
        need three sticks (two per stick), although their total is 3.0 m.

        >>> from cutplan.design import StockLength, StockSpec
        >>> room = StockRoom(StockSpec((StockLength(1.5, 2),), kerf=0.0, end_trim=0.0))
        >>> room.exact_fit([0.6, 0.6, 0.5, 0.5, 0.4, 0.4]), room.exact_fit([0.6] * 5)
        (True, False)
        """
        found = self.exact_assignment(cuts, node_limit)
        return found if found is None else bool(found)

    def exact_assignment(self, cuts, node_limit=NODE_LIMIT):
        """A layout by exhaustive search: [(stick length [m], [piece indices]), ...] for the
        sticks used, [] when the pieces cannot all be cut, None at the node limit.

        Depth-first, longest piece first, into each stick with room; sticks with the same room
        left are interchangeable, so only one of them is tried.  A branch stops when the pieces
        left exceed the room that can still take a piece.
        """
        order = sorted(range(len(cuts)), key=lambda i: -cuts[i])
        sizes = [cuts[i] + self.kerf for i in order]
        caps = []
        for cap, count in zip(self.stick_caps, self.stick_counts, strict=True):
            caps += [cap] * (len(sizes) if count is None else min(count, len(sizes)))
        rooms = list(caps)
        where = [None] * len(sizes)
        rest = [sum(sizes[i:]) for i in range(len(sizes) + 1)]
        nodes = 0

        def place(i):
            nonlocal nodes
            if i == len(sizes):
                return True
            if sum(r for r in rooms if r >= sizes[-1] - TOL) < rest[i] - TOL:
                return False
            tried = set()
            for b, r in enumerate(rooms):
                key = round(r, 9)
                if r < sizes[i] - TOL or key in tried:
                    continue
                tried.add(key)
                nodes += 1
                if nodes > node_limit:
                    raise _Undecided
                rooms[b] -= sizes[i]
                where[i] = b
                if place(i + 1):
                    return True
                rooms[b] += sizes[i]
            return False

        try:
            if not place(0):
                return []
        except _Undecided:
            return None
        used = sorted(set(where))
        return [(caps[b] + 2 * self.end_trim - self.kerf, [order[i] for i in range(len(sizes)) if where[i] == b])
                for b in used]


class _Undecided(Exception):
    """The exact search reached its node limit."""
