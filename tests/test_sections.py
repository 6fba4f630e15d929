"""Section properties and Cowper shear coefficients."""

import pytest

from cutplan import sections


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
