"""Quick answers to "do these pieces fit the sticks on hand?" before the exact packer runs.

:class:`StockRoom` holds the stock on hand in the optimiser's terms (a stick of length S holds
pieces l_i when sum(l_i + kerf) <= S - end_trim + kerf; see :mod:`cutplan.stock`) and gives
bounds that prove a set cannot fit, and a first-fit-decreasing layout that proves it can.
Only when neither settles it does the search call the exact packer.
"""

from __future__ import annotations

import math

from cutplan import stock as optimiser

TOL = optimiser.FIT_TOLERANCE


class StockRoom:
    """The stock on hand (a design's ``StockSpec``) as capacities [m] and counts."""

    def __init__(self, stock):
        self.kerf, self.end_trim = stock.kerf, stock.end_trim
        self.types = [optimiser.StockType(x.length, x.count, x.price) for x in stock.lengths]
        self.longest = max(t.length for t in self.types)
        cap = [t.length - stock.end_trim + stock.kerf for t in self.types]
        self.total_cap = sum(math.inf if t.count is None else t.count * c for t, c in zip(self.types, cap, strict=True))
        self.sticks_on_hand = sum(math.inf if t.count is None else t.count for t in self.types)
        self.cap_longest = self.longest - stock.end_trim + stock.kerf
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
        if max(cuts) > self.longest - self.end_trim + TOL:
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
