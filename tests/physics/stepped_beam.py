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
axial and shear terms lose digits in double precision).  The matrices are lists of mpf, not
mpmath's matrix class (whose indexing cost more than the arithmetic), and only the three columns
of the free start's unknowns are carried along the chain; when this was changed, the roots of
every test's bar came out the same to the last digit of a double as with the matrix class.

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


def _product(a, b):
    """a b of two matrices held as lists of rows of mpf (mpmath's matrix class costs more in
    indexing than in arithmetic at this size)."""
    columns = list(zip(*b))
    return [[mp.fdot(row, col) for col in columns] for row in a]


def _det(a):
    """Determinant of a small square matrix (list of rows), as mpmath's det finds it: elimination
    with scaled row pivoting, and 0 once a pivot falls to the matrix's 1-norm times the working
    precision (numerically singular: at a root, to working precision)."""
    a = [list(row) for row in a]
    n, out = len(a), mp.mpf(1)
    tol = max(mp.fsum(abs(row[j]) for row in a) for j in range(n)) * mp.eps
    for j in range(n):
        sums = [mp.fsum(abs(x) for x in a[k][j:]) for k in range(j, n)]
        if min(sums) <= tol:
            return mp.mpf(0)
        p = max(range(j, n), key=lambda k: abs(a[k][j]) / sums[k - j])
        if abs(a[p][j]) <= tol:
            return mp.mpf(0)
        if p != j:
            a[j], a[p], out = a[p], a[j], -out
        out *= a[j][j]
        for i in range(j + 1, n):
            factor = a[i][j] / a[j][j]
            a[i] = a[i][:j + 1] + [x - factor * y for x, y in zip(a[i][j + 1:], a[j][j + 1:])]
    return out


def _segment_matrix(omega2, length, thick, width, e, g, rho, kappa):
    """expm(A l) of one uniform segment, in closed form: its rod block (2 x 2, on u and N) and its
    bending block (4 x 4, on w, psi, M, Q), as lists of rows.

    Stretching and bending do not couple inside a segment.  The rod part is cos / sin.  The
    bending matrix B has an even characteristic polynomial (eigenvalues +-sqrt(r1), +-sqrt(r2),
    r1 + r2 = tr(B^2) / 2, r1 r2 = det B), so by Cayley-Hamilton
    expm(B l) = C(B^2) + S(B^2) B, with C, S the linear interpolants in r of cosh(sqrt(r) l) and
    sinh(sqrt(r) l) / sqrt(r) through r1 and r2 (cos and sin for r < 0).
    """
    area, second = width * thick, width * thick**3 / 12
    ea, ei, kga = mp.mpf(e * area), mp.mpf(e * second), mp.mpf(kappa * g * area)
    m_a, m_i = rho * area * omega2, rho * second * omega2
    k = mp.sqrt(m_a / ea)  # rod: u'' = -(rho A omega^2 / EA) u
    cos, sin = mp.cos(k * length), mp.sin(k * length)
    rod = [[cos, sin / (k * ea)], [-k * ea * sin, cos]]
    # B = [[0, 1, 0, 1/kGA], [0, 0, 1/EI, 0], [0, -m_i, 0, -1], [-m_a, 0, 0, 0]] on (w, psi, M, Q);
    # with so few entries its products are written out: B^2 row by row, and X B for any X by its
    # columns (X B)[:, 0] = -m_a X[:, 3], [:, 1] = X[:, 0] - m_i X[:, 2], [:, 2] = X[:, 1] / EI,
    # [:, 3] = X[:, 0] / kGA - X[:, 2]
    c, d, zero = 1 / kga, 1 / ei, mp.mpf(0)
    b2 = [[-c * m_a, zero, d, zero], [zero, -d * m_i, zero, -d], [m_a, zero, -m_i * d, zero],
          [zero, -m_a, zero, -m_a * c]]

    def times_b(x):
        return [[-m_a * r[3], r[0] - m_i * r[2], d * r[1], c * r[0] - r[2]] for r in x]

    # det B by its last row (one entry, -m_a): -m_a (1 - m_i / kGA) / EI
    total, product = (b2[0][0] + b2[1][1] + b2[2][2] + b2[3][3]) / 2, -m_a * (1 - m_i / kga) / ei
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
    c0, s0 = c1 - c_slope * r1, s1 - s_slope * r1
    s_part = [[s_slope * x + (s0 if i == j else 0) for j, x in enumerate(row)] for i, row in enumerate(b2)]
    s_b = times_b(s_part)
    block = [[c_slope * x + (c0 if i == j else 0) + y for j, (x, y) in enumerate(zip(row, sb))]
             for i, (row, sb) in enumerate(zip(b2, s_b))]
    return rod, block


def _determinant(omega, segments, width, e, g, rho, kappa, eccentric):
    omega2 = mp.mpf(omega) ** 2
    # the chain's product so far, kept as its rod rows (u, N) and bending rows (w, psi, M, Q), and
    # only the columns of the free start's unknowns u, w, psi (0, 2, 3): the product acts on them
    # alone.  A segment acts on each group of rows alone; a joint mixes the two groups.
    zero, one = mp.mpf(0), mp.mpf(1)
    rows = [[one if i == j else zero for j in (0, 2, 3)] for i in range(6)]
    previous = None
    made = {}  # equal segments (the same length and thickness) have the same matrix: made once
    for length, thick in segments:
        if previous is not None and eccentric:
            # flat top at z = 0: the centroid sits at -h/2, so it moves by (h_prev - h) / 2 upward;
            # u_2 = u_1 - dz psi_1 (the axial displacement at the new centroid), M_2 = M_1 + dz N_1
            dz = mp.mpf(previous - thick) / 2
            rows[0] = [u - dz * psi for u, psi in zip(rows[0], rows[3])]
            rows[4] = [m + dz * n for m, n in zip(rows[4], rows[1])]
        if (length, thick) not in made:
            made[length, thick] = _segment_matrix(omega2, length, thick, width, e, g, rho, kappa)
        rod, block = made[length, thick]
        rows = _product(rod, rows[:2]) + _product(block, rows[2:])
        previous = thick
    # end free: rows N, M, Q vanish
    return _det([rows[1], rows[4], rows[5]])


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
