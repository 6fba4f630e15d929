"""Section properties and Cowper shear coefficients."""

import math

import pytest

from cutplan.physics import sections


def test_tube_radius_of_gyration():
    # r_g = sqrt(D^2 + d^2)/4 from I = pi (D^4 - d^4)/64 and A = pi (D^2 - d^2)/4:
    # 1.000 in x 0.065 in wall -> 8.4168 mm (computed, exact)
    s = sections.tube(0.0254, 0.065 * 0.0254)
    assert s.radius_of_gyration == pytest.approx(8.4168e-3, abs=1e-7)


def test_bar_radius_of_gyration_is_thickness_over_root_12():
    s = sections.bar(0.04, 0.02)
    assert s.radius_of_gyration == pytest.approx(0.02 / 12**0.5)


@pytest.mark.parametrize(
    ("nu", "solid", "rect"),
    # Cowper 1966, J. Appl. Mech. 33, 335: solid circle 6(1+nu)/(7+6nu), rectangle
    # 10(1+nu)/(12+11nu): 0.8864/0.8497 at nu = 0.30, 0.8886/0.8509 at 0.33, rect 5/6 at 0
    [(0.30, 0.8864, 0.8497), (0.33, 0.8886, 0.8509), (0.0, 6 / 7, 5 / 6)],
)
def test_cowper_coefficients(nu, solid, rect):
    assert sections.shear_coefficient_cowper_hollow_circle(nu, 0.0) == pytest.approx(solid, abs=1e-4)
    assert sections.shear_coefficient_cowper_rectangle(nu) == pytest.approx(rect, abs=1e-4)


def test_thin_tube_limit_of_cowper_hollow_circle():
    # Cowper 1966 thin-walled round tube 2(1+nu)/(4+3nu) = 0.5331 at nu = 0.33 (from memory,
    # consistent with the hollow-circle formula as m -> 1; key cowper-1966)
    assert sections.shear_coefficient_cowper_hollow_circle(0.33, 0.99999) == pytest.approx(0.5331, abs=1e-4)


def test_pvc_chime_bends_with_the_same_wall_as_its_bore():
    # ASTM D1785 Table 1, 1 in schedule 40: OD 1.315 in, minimum wall 0.133 in (plus-only
    # tolerance); the bore of the air column is OD - 2 x 1.06 x the minimum wall (common practice),
    # and the chime's bending section takes the same average wall
    from cutplan.materials import load_library

    inch = 0.0254
    sec = load_library().stock["pvc-sch40-1"].section
    bore = (1.315 - 2 * 1.06 * 0.133) * inch
    assert sec.wall == pytest.approx(0.133 * inch)  # the table's wall, as the stock is sold
    assert 2 * sec.air_radius == pytest.approx(bore)
    assert sec.second_moment == pytest.approx(math.pi * ((1.315 * inch) ** 4 - bore**4) / 64)
    # at a fixed length a slender free-free tube's pitch goes as its radius of gyration
    # sqrt(D^2 + d^2) / 4 (Thomson & Dahleh, Theory of Vibration, App. D): the thicker average
    # wall lowers it by 1200 log2(r_g,avg / r_g,min) = -10.2 cents for this size (computed)
    d_min = (1.315 - 2 * 0.133) * inch
    cents = 1200 * math.log2(math.hypot(1.315 * inch, bore) / math.hypot(1.315 * inch, d_min))
    assert 1200 * math.log2(sec.radius_of_gyration / (math.hypot(1.315 * inch, d_min) / 4)) == pytest.approx(cents)
    assert cents == pytest.approx(-10.2, abs=0.1)
