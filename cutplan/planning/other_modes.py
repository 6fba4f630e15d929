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

from cutplan.design.notices import MODE_BELOW_FUNDAMENTAL, MODE_NEAR_PARTIAL, Notice, set_key
from cutplan.physics import side_modes
from cutplan.physics.ring_modes import ring_frequencies
from cutplan.planning import grain

__all__ = [
    "CLEARANCE_CENTS", "REPORT_ABOVE", "MAX_MODES", "piece_other_modes", "RING_FIRST_LOBES",
    "tuned_partials", "mode_warnings", "with_other_modes", "resize_advice",
]

CLEARANCE_CENTS = 30.0
"""Distance from a partial within which another mode is flagged [cents] (common practice: beats
slower than about a second between two partials a few hundred hertz apart start at this order)."""
REPORT_ABOVE = 1.06
"""Modes are listed up to this factor above the highest reported partial [-] (a semitone)."""
MAX_MODES = 6
"""Most modes of each kind computed [-]."""


def resize_advice(what):
    """How to move a mode off a partial, in words that hold in an inch design and an mm one
    (``what``: "width", "width or thickness")."""
    return f"a few mm (about 1/8 in) more or less {what} moves it away"


def _cents(a, b):
    return 1200 * math.log2(a / b)


def piece_other_modes(spec, piece):
    """((kind, mode, hz), ...) of a chime or bar piece, sideways modes first; () for air columns."""
    if spec.kind not in ("chime", "bar") or spec.material is None:
        return ()
    mat, sec = spec.material, spec.section
    model = "timoshenko" if spec.model == "slender" else spec.model
    g, rho = mat.shear_modulus_for(model), mat.density
    length = piece.length
    if sec.shape == "bar":
        found = _bar_modes(spec, piece)
    else:
        found = [("twisting", side_modes.twisting_frequencies_tube(length, sec.outer, sec.inner, g, rho, MAX_MODES))]
        found += _ring_modes(sec, mat.modulus_for(model), rho, mat.poisson)
    top = max(piece.partials_hz) * REPORT_ABOVE if piece.partials_hz else 0.0
    out = []
    for kind, freqs in found:
        first = RING_FIRST_LOBES if kind == "ring" else 1
        for n, f in enumerate(freqs, start=first):
            if n == first or f <= top:
                out.append((kind, n, float(f)))
    return tuple(out)


def _bar_modes(spec, piece):
    """[("sideways", freqs), ("twisting", freqs)] of a bar, with the constants of the set's sawing:
    the 3-D model for an arched bar; for a uniform one the shear-corrected beam sideways and
    Saint-Venant twisting (for wood, stiffened by warping as fitted once per section to the 3-D
    model, :func:`cutplan.physics.side_modes.twisting_stiffening`)."""
    mat, sec, length = spec.material, spec.section, piece.length
    sawing = getattr(spec, "grain", "unknown")
    arch = piece.arch
    if arch is not None:
        modes = side_modes.solid_side_modes(length, sec.width, sec.thickness, arch.depth, arch.arch_width,
                                            arch.exponent, grain.solid_constants(mat, sawing), mat.density, MAX_MODES)
        return [("sideways", modes.sideways), ("twisting", modes.twisting)]
    e_x, _, _, g_xy, g_xz, _, nu_xy, _, _ = grain.axis_constants(mat, sawing)
    kappa = sec.shear_coefficient(nu_xy)
    try:
        side = side_modes.sideways_frequencies(length, sec.width, sec.thickness, e_x, g_xy, mat.density, kappa,
                                               MAX_MODES)
    except ValueError:  # wider than about half its length: no beam model sideways; nothing to list
        side = ()
    if grain.is_orthotropic(mat):  # wood: Saint-Venant with the warping stiffening the 3-D model gives
        twist = side_modes.twisting_frequencies_bar_solid(length, sec.width, sec.thickness,
                                                          grain.solid_constants(mat, sawing), mat.density, MAX_MODES)
    else:
        twist = side_modes.twisting_frequencies_bar_orthotropic(length, sec.width, sec.thickness, g_xy, g_xz,
                                                                mat.density, MAX_MODES)
    return [("sideways", side), ("twisting", twist)]


RING_FIRST_LOBES = 2
"""Ring modes are numbered by their lobes around the circumference; the first (ovalling) has 2."""


def _ring_modes(sec, modulus, density, poisson):
    """[("ring", frequencies)] of a tube's ring (ovalling) modes, n = 2, 3, ...; [] for a rod."""
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


_ORDINALS = ("first", "second", "third", "fourth", "fifth", "sixth", "seventh", "eighth")


def _ordinal(n):
    return _ORDINALS[n - 1] if 1 <= n <= len(_ORDINALS) else f"{n}th"


def mode_warnings(piece, other, clearance_cents=CLEARANCE_CENTS, tuned=(1, 2), spread_cents=None, key=None):
    """Warnings (Notices keyed ``key``, the section that sets the modes) naming each other mode below the fundamental or within ``clearance_cents`` of a
    tuned partial (mode numbers ``tuned``), in a builder's words.

    ``spread_cents`` ({kind: cents}) widens the window for a mode whose place is uncertain (a bar
    of unknown sawing, :func:`cutplan.planning.grain.grain_spread_cents`)."""
    out = []
    spread_cents = spread_cents or {}
    fundamental = piece.fundamental_hz or (piece.partials_hz[0] if piece.partials_hz else 0.0)
    for kind, n, f in other:
        name = f"the {'bar' if piece.kind == 'bar' else 'piece'}'s {_ordinal(n)} {kind} mode ({f:.0f} Hz)"
        if fundamental and f < fundamental:
            fix = ("make the bar wider than it is thick" if kind == "sideways"
                   else "a thicker wall raises it" if kind == "ring"
                   else "a narrower bar twists higher against its note")
            out.append(Notice(MODE_BELOW_FUNDAMENTAL, key,
                              f"{kind} mode {n}: {name} is below the fundamental ({fundamental:.0f} Hz): a glancing "
                              f"or off-centre strike can sound it; {fix}"))
            continue
        extra = spread_cents.get(kind, 0.0)
        for k, p in enumerate(piece.partials_hz, start=1):
            if k not in tuned:
                continue
            off = _cents(f, p)
            if abs(off) > clearance_cents + extra:
                continue
            tuned_word = "tuned " if piece.arch is not None else ""
            partial = ("fundamental (partial 1" if k == 1
                       else f"{tuned_word}{_ordinal(k)} partial (partial {k}, {p / fundamental:.1f} x f1")
            cents = f"{abs(off):.0f} cent{'' if round(abs(off)) == 1 else 's'} {'above' if off > 0 else 'below'}"
            move = ("a tube of another wall or diameter moves it away (ring modes do not change with length)"
                    if kind == "ring" else
                    resize_advice('width' if kind == 'sideways' else 'width or thickness'))
            text = (f"{kind} mode {n}: {name} lies {cents} the {partial}, {p:.0f} Hz): "
                    f"expect a buzz or a beat; {move}")
            if extra:
                text += (f"; sawing unknown: it may lie up to {extra:.0f} cents either side "
                         '(give grain = "flat" or "quarter")')
            out.append(Notice(MODE_NEAR_PARTIAL, key, text))
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
        spread = _grain_spread(spec, p)
        warnings = tuple(p.warnings) + tuple(mode_warnings(p, other, clearance_cents, tuned_partials(spec, p),
                                                           spread, set_key(spec, "section")))
        out.append(dataclasses.replace(p, other_modes=other, warnings=warnings))
    return out


def _grain_spread(spec, piece):
    """{kind: cents} the warning window widens by for a bar of unknown sawing; {} otherwise.

    Twisting: half the flat-to-quarter spread of the blank's Saint-Venant twisting
    (:func:`cutplan.planning.grain.grain_spread_cents`).  Sideways: half the spread of the blank's
    sideways mode 1, whose shear part alone feels the sawing."""
    sawing = getattr(spec, "grain", "unknown")
    sec, mat = spec.section, spec.material
    if sec is None or sec.shape != "bar" or sawing != "unknown" or not grain.is_orthotropic(mat):
        return {}
    twist = grain.grain_spread_cents(mat, sawing, sec.width, sec.thickness)
    side = []
    for g in ("flat", "quarter"):
        e_x, _, _, g_xy, _, _, nu_xy, _, _ = grain.axis_constants(mat, g)
        try:
            side.append(side_modes.sideways_frequencies(piece.length, sec.width, sec.thickness, e_x, g_xy,
                                                        mat.density, sec.shear_coefficient(nu_xy), 1)[0])
        except ValueError:
            return {"twisting": twist, "sideways": twist}
    return {"twisting": twist, "sideways": abs(_cents(side[0], side[1])) / 2}
