r"""An oracle for tests: exact free-free modes of a stepped beam by the transfer-matrix method.

A bar of piecewise-uniform thickness (a flat top, the underside stepped, as a crude undercut) is
a chain of uniform Timoshenko beam segments.  Each segment's state

.. math::
    y = (u, N, w, \psi, M, Q)

(axial displacement and force at the segment's centroid, deflection, section rotation, bending
moment, shear force) obeys, for harmonic motion at omega, the constant-coefficient system

.. math::
    u' = N / EA, \quad N' = -\rho A \omega^2 u, \quad
    w' = \psi + Q / \kappa G A, \quad \psi' = M / EI, \quad
    M' = -Q - \rho I \omega^2 \psi, \quad Q' = -\rho A \omega^2 w,

so its transfer matrix over a length l is exactly expm(A l) (in closed form, below): no mesh, no
shape functions.  With a
flat top the centroid jumps by dz at a step; the joint keeps the section plane and the work of
the forces: u_2 = u_1 - dz psi and M_2 = M_1 + dz N (the eccentric step couples stretching and
bending; ``eccentric=False`` drops it, the textbook stepped beam on one centre line).  Free ends
(N = M = Q = 0) give a 3 x 3 frequency determinant whose sign changes are bracketed on a fine
scan and refined by bisection, in mpmath at 30 digits (the matrix exponentials of the stiff
axial and shear terms lose digits in double precision).

This is a different method from the finite-element models it checks (elastic2d's plane-stress
mesh and the 3-D solid): an exact solution of beam theory, which the 2-D body must approach for
a slender bar.

References
----------
.. [1] Pestel, E. C. and Leckie, F. A., Matrix Methods in Elastomechanics, McGraw-Hill, 1963
   (transfer matrices of beam segments chained across discontinuities; from memory for the
   chapter).
.. [2] Naguleswaran, S., "Natural frequencies, sensitivity and mode shape details of an
   Euler-Bernoulli beam with one-step change in cross-section and with ends on classical
   supports", Journal of Sound and Vibration 252(4) (2002) 751-767 (stepped beams solved
   exactly segment by segment; from memory for the page numbers).
.. [3] Timoshenko, S. P., Philosophical Magazine 41 (1921) 744-746, and Cowper, G. R., J. Appl.
   Mech. 33 (1966) 335-340 (the segment equations and the shear coefficient of a rectangle).
"""

import mpmath as mp

DIGITS = 30


def _segment_matrix(omega2, length, thick, width, e, g, rho, kappa):
    """expm(A l) of one uniform segment, in closed form.

    Stretching and bending do not couple inside a segment.  The rod part is cos / sin.  The
    bending matrix B has an even characteristic polynomial (eigenvalues +-sqrt(r1), +-sqrt(r2),
    r1 + r2 = tr(B^2) / 2, r1 r2 = det B), so by Cayley-Hamilton
    expm(B l) = C(B^2) + S(B^2) B, with C, S the linear interpolants in r of cosh(sqrt(r) l) and
    sinh(sqrt(r) l) / sqrt(r) through r1 and r2 (cos and sin for r < 0).
    """
    area, second = width * thick, width * thick**3 / 12
    ea, ei, kga = mp.mpf(e * area), mp.mpf(e * second), mp.mpf(kappa * g * area)
    m_a, m_i = rho * area * omega2, rho * second * omega2
    t = mp.zeros(6, 6)
    k = mp.sqrt(m_a / ea)  # rod: u'' = -(rho A omega^2 / EA) u
    t[0, 0], t[0, 1] = mp.cos(k * length), mp.sin(k * length) / (k * ea)
    t[1, 0], t[1, 1] = -k * ea * mp.sin(k * length), mp.cos(k * length)
    b = mp.matrix([[0, 1, 0, 1 / kga], [0, 0, 1 / ei, 0], [0, -m_i, 0, -1], [-m_a, 0, 0, 0]])
    b2 = b * b
    total, product = (b2[0, 0] + b2[1, 1] + b2[2, 2] + b2[3, 3]) / 2, mp.det(b)
    root = mp.sqrt(total**2 / 4 - product)
    r1, r2 = total / 2 + root, total / 2 - root

    def cosh_sinh(r):
        if r >= 0:
            q = mp.sqrt(r)
            return mp.cosh(q * length), mp.sinh(q * length) / q
        q = mp.sqrt(-r)
        return mp.cos(q * length), mp.sin(q * length) / q

    (c1, s1), (c2, s2) = cosh_sinh(r1), cosh_sinh(r2)
    c_slope, s_slope = (c1 - c2) / (r1 - r2), (s1 - s2) / (r1 - r2)
    eye = mp.eye(4)
    block = (c1 - c_slope * r1) * eye + c_slope * b2 + ((s1 - s_slope * r1) * eye + s_slope * b2) * b
    for i in range(4):
        for j in range(4):
            t[2 + i, 2 + j] = block[i, j]
    return t


def _joint(dz):
    j = mp.eye(6)
    j[0, 3] = -dz   # axial displacement at the new centroid
    j[4, 1] = dz    # moment about the new centroid
    return j


def _determinant(omega, segments, width, e, g, rho, kappa, eccentric):
    omega2 = mp.mpf(omega) ** 2
    t = mp.eye(6)
    previous = None
    made = {}  # equal segments (the same length and thickness) have the same matrix: made once
    for length, thick in segments:
        if previous is not None and eccentric:
            # flat top at z = 0: the centroid sits at -h/2, so it moves by (h_prev - h) / 2 upward
            t = _joint(mp.mpf(previous - thick) / 2) * t
        if (length, thick) not in made:
            made[length, thick] = _segment_matrix(omega2, length, thick, width, e, g, rho, kappa)
        t = made[length, thick] * t
        previous = thick
    # start free: u, w, psi unknown (columns 0, 2, 3); end free: rows N, M, Q vanish
    rows, cols = (1, 4, 5), (0, 2, 3)
    return mp.det(mp.matrix([[t[r, c] for c in cols] for r in rows]))


def stepped_frequencies(segments, width, e, g, rho, kappa, modes=3, eccentric=True, f_max=None, scan=48):
    """Free-free bending frequencies [Hz] of a stepped beam (longitudinal modes left out).

    Parameters
    ----------
    segments : sequence of (length [m], thickness [m])
        End A to end B; the top is flat.
    width, e, g, rho, kappa : float
        b [m], E [Pa], G [Pa], density [kg/m^3], shear coefficient [-] (a large G and kappa = 1
        approach Euler-Bernoulli).
    f_max : float, optional
        Top of the scan [Hz]; by default three times the slender uniform estimate of mode
        ``modes`` on the thinnest segment.
    """
    with mp.workdps(DIGITS):
        length = sum(s[0] for s in segments)
        thin = min(s[1] for s in segments)
        thick = max(s[1] for s in segments)
        beta = [4.730, 7.853, 10.996, 14.137, 17.279, 20.420][:modes][-1] if modes <= 6 else 3.1416 * (modes + 0.5)
        top = f_max or 3 * (beta / length) ** 2 * (e * thick**2 / 12 / rho) ** 0.5 / (2 * 3.141592653589793)
        low = 0.2 * (4.73 / length) ** 2 * (e * thin**2 / 12 / rho) ** 0.5 / (2 * 3.141592653589793)
        # even steps in sqrt(f), as the bending roots are (about pi apart in beta L)
        grid = [(low**0.5 + (top**0.5 - low**0.5) * k / scan) ** 2 for k in range(scan + 1)]

        def det(f):
            return _determinant(2 * mp.pi * f, segments, width, e, g, rho, kappa, eccentric)

        # up the grid until the wanted bending modes are found (the roots come in rising order, so
        # the ones above would be cut off anyway)
        found = []
        fa, da = grid[0], det(grid[0])
        for fb in grid[1:]:
            db = det(fb)
            if mp.sign(da) * mp.sign(db) < 0:
                found.append(float(mp.findroot(det, (fa, fb), solver="anderson")))
                if len(_bending_only(found, segments, e, rho)) == modes:
                    break
            fa, da = fb, db
        return _bending_only(found, segments, e, rho)[:modes]


def _bending_only(roots, segments, e, rho):
    """Drop the lengthwise (rod) modes: near n c / 2L, far above the low bending modes here."""
    length = sum(s[0] for s in segments)
    rod = (e / rho) ** 0.5 / (2 * length)
    return [f for f in roots if f < 0.8 * rod]
