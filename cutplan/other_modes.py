"""The modes a piece is not tuned by: sideways bending of bars, twisting of bars and tubes, and
the ring (ovalling) modes of tubes.

For each planned chime or bar this lists the sideways (bars) and twisting (bars and tubes) modes
up to just above its highest reported partial, and warns, naming the mode, when one falls within
``clearance_cents`` of a tuned partial (the two beat, or the piece buzzes) or below the
fundamental (an off-centre strike sounds the wrong note).  The tuned partials are those the ear
uses: modes 1 and 2 of a uniform bar or chime (mode 2 is the loudest overtone), the modes an
undercut sets (1, 2 and 3 when a third ratio is tuned), and mode 4 of a chime tuned to its
strike note (the strike pitch is about an octave below it).  Called by the planner after each
piece is built; the result goes on ``Piece.other_modes`` as ``(kind, mode, hz)`` tuples.
"""

from __future__ import annotations

import dataclasses
import math

from cutplan.physics import side_modes

CLEARANCE_CENTS = 30.0
"""Distance from a partial within which another mode is flagged [cents] (common practice: beats
slower than about a second between two partials a few hundred hertz apart start at this order)."""
REPORT_ABOVE = 1.06
"""Modes are listed up to this factor above the highest reported partial [-] (a semitone)."""
MAX_MODES = 6
"""Most modes of each kind computed [-]."""


def _cents(a, b):
    return 1200 * math.log2(a / b)


def piece_other_modes(spec, piece):
    """((kind, mode, hz), ...) of a chime or bar piece, sideways modes first; () for air columns."""
    if spec.kind not in ("chime", "bar") or spec.material is None:
        return ()
    mat, sec = spec.material, spec.section
    model = "timoshenko" if spec.model == "slender" else spec.model
    e, g, rho = mat.modulus_for(model), mat.shear_modulus_for(model), mat.density
    length = piece.length
    if sec.shape == "bar":
        kappa = sec.shear_coefficient(mat.poisson)
        arch = piece.arch
        if arch is not None:
            side = side_modes.sideways_frequencies_arched(length, sec.width, sec.thickness, arch.depth,
                                                          arch.arch_width, arch.exponent, e, g, rho, kappa, MAX_MODES)
            twist = side_modes.twisting_frequencies_arched(length, sec.width, sec.thickness, arch.depth,
                                                           arch.arch_width, arch.exponent, g, rho, MAX_MODES)
        else:
            try:
                side = side_modes.sideways_frequencies(length, sec.width, sec.thickness, e, g, rho, kappa, MAX_MODES)
            except ValueError:  # wider than about half its length: no beam model sideways; nothing to list
                side = ()
            twist = side_modes.twisting_frequencies_bar(length, sec.width, sec.thickness, g, rho, MAX_MODES)
        found = [("sideways", side), ("twisting", twist)]
    else:
        found = [("twisting", side_modes.twisting_frequencies_tube(length, sec.outer, sec.inner, g, rho, MAX_MODES))]
        found += _ring_modes(sec, e, rho, mat.poisson)
    top = max(piece.partials_hz) * REPORT_ABOVE if piece.partials_hz else 0.0
    out = []
    for kind, freqs in found:
        first = RING_FIRST_LOBES if kind == "ring" else 1
        for n, f in enumerate(freqs, start=first):
            if n == first or f <= top:
                out.append((kind, n, float(f)))
    return tuple(out)


RING_FIRST_LOBES = 2
"""Ring modes are numbered by their lobes around the circumference; the first (ovalling) has 2."""


def _ring_modes(sec, modulus, density, poisson):
    """[("ring", frequencies)] of a tube's ring (ovalling) modes, n = 2, 3, ...; [] for a rod."""
    from cutplan.physics.ring_modes import ring_frequencies

    inner = getattr(sec, "solid_inner", sec.inner)
    if not inner > 0:
        return []
    return [("ring", ring_frequencies(sec.outer, inner, modulus, density, poisson, MAX_MODES))]


def tuned_partials(spec, piece):
    """Mode numbers (1-based) of the partials that are tuned or heard as the note, see the module notes."""
    if piece.arch is not None:
        return tuple(range(1, 2 + len(piece.arch.ratios)))
    if getattr(spec, "target_mode", "fundamental") == "strike-note":
        return (1, 4)
    return (1, 2)


def mode_warnings(piece, other, clearance_cents=CLEARANCE_CENTS, tuned=(1, 2)):
    """Warnings naming each other mode below the fundamental or within ``clearance_cents`` of a
    tuned partial (mode numbers ``tuned``)."""
    out = []
    fundamental = piece.fundamental_hz or (piece.partials_hz[0] if piece.partials_hz else 0.0)
    for kind, n, f in other:
        name = f"{kind} mode {n} ({f:.0f} Hz)"
        if fundamental and f < fundamental:
            fix = ("make the bar wider than it is thick" if kind == "sideways"
                   else "a thicker wall raises it" if kind == "ring"
                   else "a narrower bar twists higher against its note")
            out.append(f"{name} is below the fundamental ({fundamental:.0f} Hz): a glancing or off-centre "
                       f"strike can sound it; {fix}")
            continue
        for k, p in enumerate(piece.partials_hz, start=1):
            if k not in tuned:
                continue
            off = _cents(f, p)
            if abs(off) <= clearance_cents:
                mover = ("a tube of another wall or diameter moves it away (ring modes do not change "
                         "with length)" if kind == "ring" else
                         f"a few mm more or less {'width' if kind == 'sideways' else 'width or thickness'} moves it away")
                out.append(f"{name} is {abs(off):.0f} cent{'' if round(abs(off)) == 1 else 's'} {'above' if off > 0 else 'below'} partial {k} "
                           f"({p:.0f} Hz): the two can beat or buzz; {mover}")
    return out


def with_other_modes(spec, pieces, clearance_cents=None):
    """The pieces with ``other_modes`` filled in and their warnings added (others unchanged).

    ``clearance_cents`` defaults to the set's ``mode_clearance`` [cents] when the design gives one,
    else :data:`CLEARANCE_CENTS`.
    """
    if clearance_cents is None:
        clearance_cents = getattr(spec, "mode_clearance", None) or CLEARANCE_CENTS
    out = []
    for p in pieces:
        other = piece_other_modes(spec, p)
        if not other:
            out.append(p)
            continue
        warnings = tuple(p.warnings) + tuple(mode_warnings(p, other, clearance_cents, tuned_partials(spec, p)))
        out.append(dataclasses.replace(p, other_modes=other, warnings=warnings))
    return out
