r"""Undercut (arched) bars: a central arch cut from the underside tunes the overtones.

The arch is parametric.  Over the middle ``arch_fraction`` of the length the thickness is

.. math:: h(x) = t - d \, (1 - |u|^p), \qquad u = \frac{x - L/2}{\alpha L / 2}, \quad |u| \le 1

and the bar keeps its full thickness t outside it: d is the depth of the cut at the centre,
alpha the arch width as a fraction of L and p the arch shape (2 = parabola).  Removing wood
near the middle lowers mode 1 most, which is how makers pull mode 2 up to two octaves (4 : 1,
marimba) or an octave and a fifth (3 : 1, xylophone) above mode 1.

The modes are those of the non-uniform shear-corrected beam, from the finite-element solver in
:mod:`beam_fe` with element boundaries at the arch edges.  :func:`design_undercut` finds L and d
(and the shape p, when a third ratio is asked for) by a Newton iteration in cents: a
finite-difference Jacobian (or the neighbouring bar's), Broyden updates after each step, bounds
kept by fixing a variable that would leave its range, and a stop at 1e-6 cent.

References
----------
.. [1] Fletcher, N. H. and Rossing, T. D., The Physics of Musical Instruments, 2nd ed., 1998,
   ch. 19 (marimba bars tuned 1 : 4, xylophone 1 : 3; undercutting; from memory for the chapter).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from cutplan.physics import beam_fe
from cutplan.physics.blas import single_thread
from cutplan.physics.remember import remembered
from cutplan.physics.timoshenko import fundamental_length
from cutplan.units import format_length

__all__ = [
    "ELEMENTS_END", "ELEMENTS_ARCH", "ORDER", "UndercutError", "arch_thickness", "arch_area", "bar_modes",
    "SolvedArch", "TOLERANCE_CENTS", "MAX_SOLVES", "design_undercut", "FD_STEPS", "MAX_STEP", "bounded_step"
]

ELEMENTS_END = 6
"""Elements in each solid end region [-] (0.001 cent level for a uniform bar; bench/)."""
ELEMENTS_ARCH = 10
"""Elements in each half of the arch [-]."""
ORDER = 3
"""Polynomial order of the elements [-]."""


class UndercutError(ValueError):
    """No arch within the limits reaches the asked-for tuning.

    The lengths in the message stay numbers [m] until it is shown: ``template`` names them
    (``{left}``, ``{width}``, ...) and :meth:`text` writes them with the caller's length formatter,
    so a design in inches reads inches first; ``str()`` writes millimetres first, both units shown.
    """

    def __init__(self, template, prefix="", **lengths):
        self.template, self.prefix, self.lengths = template, prefix, lengths
        super().__init__(self.text())

    def text(self, length=format_length):
        """The message, each length written by ``length(metres)``."""
        return self.prefix + self.template.format(**{k: length(v) for k, v in self.lengths.items()})

    def named(self, prefix):
        """The same refusal with ``prefix`` (which bar) in front."""
        return UndercutError(self.template, prefix + self.prefix, **self.lengths)


def arch_thickness(x, length, thickness, depth, arch_fraction, exponent=2.0):
    """Thickness h(x) [m] of the arched bar at x [m] from one end (vectorised)."""
    x = np.asarray(x, dtype=float)
    half = arch_fraction * length / 2
    u = np.abs(x - length / 2) / half
    cut = np.where(u < 1.0, depth * (1.0 - np.minimum(u, 1.0) ** exponent), 0.0)
    return thickness - cut


def arch_area(length, thickness, depth, arch_fraction, exponent=2.0):
    """Side area the arch removes from a bar [m^2] (trapezoid rule over 2000 steps).

    Parameters: length [m], thickness of the blank [m], depth of the arch at the centre [m],
    arch_fraction [-] of the length it spans, exponent [-] of its shape.

    >>> round(arch_area(0.4, 0.02, 0.008, 0.5, 2.0) * 1e6, 1)  # parabola: 2/3 x 0.2 m x 8 mm
    1066.7
    """
    xs = np.linspace(0.0, length, 2001)
    gap = thickness - arch_thickness(xs, length, thickness, depth, arch_fraction, exponent)
    return float(np.sum((gap[1:] + gap[:-1]) / 2 * np.diff(xs)))


def _breaks(length, arch_fraction):
    a = (1 - arch_fraction) * length / 2
    ends = np.linspace(0.0, a, ELEMENTS_END + 1)
    arch = np.linspace(a, length / 2, ELEMENTS_ARCH + 1)
    left = np.concatenate([ends, arch[1:]])
    right = length - left[::-1]
    return np.concatenate([left, right[1:]])


@remembered(1024)  # the design search, the planner and the checks ask again at the same blanks
def bar_modes(length, width, thickness, depth, arch_fraction, modulus, shear_modulus, density, kappa,
              exponent=2.0, modes=3, slender=False):
    """Free-free modes of an arched bar (shear-corrected, non-uniform).

    Parameters
    ----------
    length, width, thickness : float
        Bar blank L, b, t [m].
    depth : float
        Arch depth d at the centre [m] (0 for a uniform bar).
    arch_fraction : float
        Arch width alpha as a fraction of L [-].
    modulus, shear_modulus : float
        E along the bar and G in the bending plane [Pa].
    density : float
        rho [kg/m^3].
    kappa : float
        Shear coefficient of the rectangular section [-].
    exponent : float
        Arch shape p [-].
    modes : int
        Number of modes [-].
    slender : bool
        Leave out shear and rotary inertia (to a thousandth), for comparison.

    Returns
    -------
    BeamModes
        From :func:`beam_fe.free_free_modes`.
    """
    def h(x):
        return arch_thickness(x, length, thickness, depth, arch_fraction, exponent)

    stiff = 1e3 if slender else 1.0
    rotary = 1e-3 if slender else 1.0  # a trace keeps the mass matrix positive definite
    return beam_fe.free_free_modes(
        length,
        lambda x: modulus * width * h(x) ** 3 / 12,
        lambda x: stiff * kappa * shear_modulus * width * h(x),
        lambda x: density * width * h(x),
        lambda x: rotary * density * width * h(x) ** 3 / 12,
        modes=modes, order=ORDER, breaks=_breaks(length, max(arch_fraction, 1e-6)), symmetric=True,
    )


@dataclass(frozen=True)
class SolvedArch:
    """A solved arch: blank length [m], centre depth [m], arch width fraction, modes and nodes."""

    length: float
    depth: float
    arch_fraction: float
    exponent: float
    thickness: float
    frequencies: tuple[float, ...]
    nodes: tuple[tuple[float, ...], ...]
    ratio_residuals_cents: tuple[float, ...]
    fundamental_residual_cents: float
    jacobian: tuple[tuple[float, ...], ...] = ()
    solves: int = 0

    def stations(self, count=11):
        """(x [m], remaining thickness [m]) from one end to the centre."""
        xs = np.linspace(0.0, self.length / 2, count)
        hs = arch_thickness(xs, self.length, self.thickness, self.depth, self.arch_fraction, self.exponent)
        return tuple((float(x), float(h)) for x, h in zip(xs, hs, strict=True))


TOLERANCE_CENTS = 1e-6
"""Newton stops when every residual (mode 1 against the target, each ratio) is below this [cents]."""
MAX_SOLVES = 60
"""Most finite-element solves one bar may take [-] (a work bound; about 5-13 are used)."""


def design_undercut(target, ratios, width, thickness, modulus, shear_modulus, density, kappa,
                    min_thickness, arch_fraction=0.5, exponent=2.0, guess=None, jacobian=None):
    """Blank length and arch so that mode 1 sounds ``target`` and modes 2 (and 3) sit at ``ratios``.

    Parameters
    ----------
    target : float
        Mode-1 frequency [Hz].
    ratios : sequence of float
        (f2/f1,) or (f2/f1, f3/f1) [-]; with two ratios the arch shape exponent is solved too.
    width, thickness : float
        Bar blank b and t [m].
    modulus, shear_modulus, density, kappa :
        As for :func:`bar_modes`.
    min_thickness : float
        Thinnest the centre may be left [m].
    arch_fraction : float
        Arch width as a fraction of L [-].
    exponent : float
        Arch shape p (2 = parabola); solved for when two ratios are given [-].
    guess : (length, depth, exponent), optional
        Start values, e.g. from the neighbouring bar.
    jacobian : tuple, optional
        The neighbouring bar's Jacobian (``SolvedArch.jacobian``): saves the finite differences.

    Raises
    ------
    UndercutError
        When the tuning cannot be reached without leaving the centre thinner than
        ``min_thickness``.
    """
    ratios = tuple(ratios)
    max_depth = thickness - min_thickness
    if max_depth <= 0:
        raise UndercutError("the minimum thickness is not less than the bar thickness")
    three = len(ratios) >= 2
    if guess is None:
        area, second = width * thickness, width * thickness**3 / 12
        uniform = fundamental_length(target, modulus * second, density * area, kappa * shear_modulus * area,
                                     density * second)
        guess = (0.8 * uniform, 0.5 * max_depth, 3.5 if three else exponent)
    length0, depth0, shape0 = guess
    # unknowns: log L, depth as a fraction of the most allowed, and (three ratios) the shape p
    lower = np.array([-np.inf, 0.0] + ([1.0] if three else []))
    upper = np.array([np.inf, 1.0] + ([10.0] if three else []))
    v = np.array([math.log(length0), min(max(depth0 / max_depth, 0.02), 0.98)]
                 + ([min(max(shape0, 1.2), 8.0)] if three else []))
    count = [0]

    def evaluate(v):
        count[0] += 1
        depth, shape = v[1] * max_depth, v[2] if three else exponent
        modes = bar_modes(math.exp(v[0]), width, thickness, depth, arch_fraction, modulus, shear_modulus, density,
                          kappa, shape, modes=4)
        f = modes.frequencies
        res = [1200 * math.log2(f[0] / target), 1200 * math.log2(f[1] / f[0] / ratios[0])]
        if three:
            res.append(1200 * math.log2(f[2] / f[0] / ratios[1]))
        return np.array(res), modes

    with single_thread():
        r, modes = evaluate(v)
        jac = _finite_differences(evaluate, v, r, upper) if jacobian is None or len(jacobian) != v.size else \
            np.array(jacobian, dtype=float)
        while np.max(np.abs(r)) >= TOLERANCE_CENTS and count[0] < MAX_SOLVES:
            step = bounded_step(jac, r, v, lower, upper)
            if not np.any(step):
                break  # pinned at a bound: the best that can be done
            v_new = np.clip(v + step, lower, upper)
            r_new, modes_new = evaluate(v_new)
            for _ in range(3):  # a step that makes things much worse is halved (a safety net)
                if np.linalg.norm(r_new) <= 2.0 * np.linalg.norm(r) + 1.0 or count[0] >= MAX_SOLVES:
                    break
                step = step / 2.0
                v_new = np.clip(v + step, lower, upper)
                r_new, modes_new = evaluate(v_new)
            taken = v_new - v
            # Broyden's update keeps the Jacobian current at one solve per step
            jac = jac + np.outer(r_new - r - jac @ taken, taken) / float(taken @ taken)
            if np.linalg.norm(r_new) >= np.linalg.norm(r) and np.max(np.abs(r)) < 1e-3:
                break  # converged to rounding
            v, r, modes = v_new, r_new, modes_new
    length, depth = math.exp(v[0]), v[1] * max_depth
    exponent = v[2] if three else exponent
    if abs(r[0]) > 0.5 or any(abs(x) > 5.0 for x in r[1:]):
        raise UndercutError(
            f"no arch of width {arch_fraction:g} x L reaches {':'.join(f'{x:g}' for x in (1,) + ratios)} "
            f"(best leaves {{left}} at the centre, min {{least}}, and misses "
            f"by {max(abs(x) for x in r[1:]):.0f} cents); try another arch width, a thicker blank or a "
            "lower min_thickness", left=thickness - depth, least=min_thickness)
    nodes = tuple(beam_fe.node_positions(modes, 1))
    return SolvedArch(length=length, depth=depth, arch_fraction=arch_fraction, exponent=exponent, thickness=thickness,
                    frequencies=tuple(float(f) for f in modes.frequencies), nodes=nodes,
                    ratio_residuals_cents=tuple(float(x) for x in r[1:]), fundamental_residual_cents=float(r[0]),
                    jacobian=tuple(map(tuple, jac)), solves=count[0])


FD_STEPS = (1e-5, 1e-5, 1e-4)
"""Finite-difference steps for log L, depth fraction and shape [-]."""


def _finite_differences(evaluate, v, r, upper):
    """Forward-difference Jacobian of the residuals [cents per unit of each unknown]."""
    jac = np.empty((r.size, v.size))
    for j in range(v.size):
        h = FD_STEPS[j] if v[j] + FD_STEPS[j] <= upper[j] else -FD_STEPS[j]
        w = v.copy()
        w[j] += h
        jac[:, j] = (evaluate(w)[0] - r) / h
    return jac


MAX_STEP = (0.3, 0.25, 1.5)
"""Largest Newton step in log L, depth fraction and shape [-] (keeps early steps sane)."""


def bounded_step(jac, r, v, lower, upper):
    """Newton step for J dv = -r; a variable at a bound that the step would push out is held."""
    free = np.ones(v.size, dtype=bool)
    step = np.zeros(v.size)
    for _ in range(v.size):
        cols = np.nonzero(free)[0]
        if cols.size == 0:
            return np.zeros(v.size)
        step[:] = 0.0
        step[cols] = np.linalg.lstsq(jac[:, cols], -r, rcond=None)[0]
        out = ((v <= lower) & (step < 0)) | ((v >= upper) & (step > 0))
        if not np.any(out & free):
            break
        free &= ~out
    limit = np.array(MAX_STEP[: v.size])
    scale = np.max(np.abs(step) / limit)
    return step / scale if scale > 1 else step
