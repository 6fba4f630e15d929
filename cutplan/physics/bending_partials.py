"""Which solved modes of a 2-D bar are its bending partials, and what the others are.

Used by :mod:`cutplan.physics.elastic2d` on every solve: partial n is told by the nodes of the
width-mean deflection of the top (n + 1 on a free bar) and its bending share (the mode's kinetic
energy in the width-mean motion across the bar, as a fraction of the mode's); on a short, wide
bar bending along the bar mixes with bending across the width, and a partial may be split
between two modes (:class:`OtherMode` keeps which partial a mode splits).
"""

from __future__ import annotations

import math

import numpy as np

__all__ = ["CANDIDATE_SHARE", "CLEAR_SHARE", "OtherMode", "SPLIT_BAND", "SPLIT_SHARE", "sort_modes", "zero_crossings"]


def sort_modes(vals, vecs, m, means, top, omega1):
    """(bending [Hz], other modes [Hz], nodes of each bending mode) of the eigenpairs given (the
    lowest ones, ascending), the rigid-body modes dropped.  Bending partial n is the mode with the
    largest bending share (kinetic energy in the width-mean motion across the bar, as a fraction of
    the mode's) among those whose width-mean deflection of the top has n + 1 nodes (:func:`_partials`):
    one mode holds 0.6 to 0.95 on a long bar; on a short, wide bar bending along the bar mixes with
    bending across the width and two or three modes near each other share it.  The others are
    :class:`OtherMode` (lengthwise or cross-width; tagged with the partial they split)."""
    elastic = vals > 1e-6 * omega1**2
    vals, vecs = vals[elastic], vecs[:, elastic]
    # kinetic energies of every mode at once (a sparse product with a block of vectors)
    mean_x, mean_z = means(vecs)
    total = np.einsum("ij,ij->j", vecs, m @ vecs)
    ey = np.einsum("ij,ij->j", mean_z, m @ mean_z)
    ex = np.einsum("ij,ij->j", mean_x, m @ mean_x)
    freqs = [math.sqrt(lam) / (2 * math.pi) for lam in vals]
    share = ey / total
    across = [bool(ey[j] >= ex[j]) for j in range(len(freqs))]
    picks, split = _partials(freqs, share, across, _node_counts(mean_z[top[0]]))
    bending = [freqs[j] for j in picks]
    others = [OtherMode(freqs[j], "lengthwise" if ex[j] > ey[j] and 2 * ex[j] >= total[j] else "cross-width",
                        split.get(j, 0))
              for j in range(len(freqs)) if j not in picks]
    return bending, others, [zero_crossings(top[1], mean_z[top[0], j]) for j in picks]


def zero_crossings(x, w):
    """Places where a sampled deflection changes sign, by linear interpolation [m]."""
    out = []
    for i in range(x.size - 1):
        a, b = w[i], w[i + 1]
        if a == 0.0:
            out.append(float(x[i]))
        elif a * b < 0:
            out.append(float(x[i] + (x[i + 1] - x[i]) * a / (a - b)))
    return tuple(out)


SPLIT_SHARE = 0.5
"""A mode with a partial's nodes that holds at least this fraction of the partial's bending share
splits it [-]: their strengths are within 3 dB (energy), so a strike sounds both as that partial."""
SPLIT_BAND = 0.25
"""A mode splits a partial only this close to it (as a fraction of it) [-], as the cross-width mode
the arch search names (solved short bars: the modes that share a partial lie 1 to 15 % apart)."""
CANDIDATE_SHARE = 0.1
"""Least bending share of a mode that may be a partial [-]: a mode of the width alone holds 0.01
to 0.05 of its energy in the width's mean, the strongest mode of a mixed partial 0.39 or more
(solved short, wide bars)."""
CLEAR_SHARE = 0.5
"""A partial whose share is at least this [-] is known before the modes above it are solved:
the shares of one shape add up to at most one, so no other mode can hold more of it."""


def _node_counts(w):
    """The number of places where each column of sampled deflections ``w`` changes sign [-] (as
    :func:`zero_crossings` finds them)."""
    a, b = w[:-1], w[1:]
    return [int(c) for c in np.count_nonzero((a == 0.0) | (a * b < 0), axis=0)]


class OtherMode(float):
    """A solved mode that is not a bending partial: its frequency [Hz] (a float), ``kind``
    ("lengthwise": most of its energy in the width's mean along the bar; "cross-width": bending
    across the width, or the width's own motion) and ``partial`` (the partial n it splits, with
    :data:`SPLIT_SHARE` or more of its share; else 0)."""

    kind: str
    partial: int

    def __new__(cls, hz, kind, partial=0):
        self = super().__new__(cls, hz)
        self.kind, self.partial = kind, int(partial)
        return self

    def __reduce__(self):
        return OtherMode, (float(self), self.kind, self.partial)


def _partials(freqs, share, across, node_counts):
    """(indices of partials 1, 2, ... in order, {index: partial n} of the modes that split one) from
    each mode's frequency (ascending), bending share, whether it moves the width's mean more across
    than along, and the nodes of its width-mean deflection of the top.

    The candidates (moving across, share at least :data:`CANDIDATE_SHARE`, at least two nodes, none
    above a clear mode with more nodes) grouped by node count, in order of it, are partials 1, 2,
    ... (n + 1 nodes on a free bar; a count with no candidate is skipped), each the strongest member
    above the partial before it.  A partial is known once its
    share is at least :data:`CLEAR_SHARE` or a group with more nodes is found (the modes it mixes
    with lie near it), so the caller solves more modes while the last is open.  Another mode with
    its nodes, between the partials either side and within :data:`SPLIT_BAND` of it, that holds
    :data:`SPLIT_SHARE` of its share splits it."""
    clear = [i for i, (s, a) in enumerate(zip(share, across, strict=True)) if a and s >= CLEAR_SHARE]
    groups: dict[int, list[int]] = {}
    for j, (s, a, count) in enumerate(zip(share, across, node_counts, strict=True)):
        # a mode above a clear partial with more nodes is of another kind (the section's own
        # motion through the thickness, say), not a lower partial
        if a and s >= CANDIDATE_SHARE and count >= 2 and not any(
                freqs[i] < freqs[j] and node_counts[i] > count for i in clear):
            groups.setdefault(count, []).append(j)
    picks: list[int] = []
    for count in sorted(groups):
        members = [j for j in groups[count] if not picks or freqs[j] > freqs[picks[-1]]]
        if members:
            picks.append(max(members, key=lambda j: (share[j], -j)))
    split = {}
    for n, best in enumerate(picks, start=1):
        low = freqs[picks[n - 2]] if n > 1 else 0.0
        high = freqs[picks[n]] if n < len(picks) else math.inf
        # a mode that moves more along the bar than across it (a lengthwise mode an arch couples
        # to bending) splits the partial too when it holds as much of the same shape
        low, high = max(low, freqs[best] / (1 + SPLIT_BAND)), min(high, freqs[best] * (1 + SPLIT_BAND))
        split.update({j: n for j, count in enumerate(node_counts)
                      if j != best and count == node_counts[best] and low < freqs[j] < high
                      and share[j] >= SPLIT_SHARE * share[best]})
    if picks and share[picks[-1]] < CLEAR_SHARE:  # the last group's stronger member may not be solved yet
        split = {j: n for j, n in split.items() if n < len(picks)}
        picks.pop()
    return picks, split
