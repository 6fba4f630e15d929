"""calibrate with the 2-D model: E and G of a deep test bar recovered from its partials."""

import pytest
from click.testing import CliRunner

from cutplan.cli import cli
from cutplan.materials import Material
from cutplan.physics import elastic2d
from cutplan.physics.sections import bar
from cutplan.tuning.calibrate_moduli import fit_moduli

# Sugar maple along the grain (USDA Wood Handbook FPL-GTR-190, 2010: Table 5-3a MOE 12.6 GPa
# x 1.10 (from memory for the factor), Table 5-1 G_LR/E_L = 0.111, nu_LR = 0.424, SG 0.63 ->
# 706 kg/m3 (from memory for the SG basis)).
E, G, RHO, NU = 13.86e9, 0.111 * 13.86e9, 706.0, 0.424
WIDTH, THICK, LENGTH = 0.05, 0.022, 0.22  # depth / length = 0.1, as the thick test bar of a calibration


@pytest.fixture(scope="module")
def measured():
    # Stand-in for a recording, from an independent solve: the same body on a mesh twice as fine
    # each way as the one the fit uses.  (No published partials of a deep wooden bar with its
    # constants were found; a real recording would replace this.)
    m = elastic2d.profile_modes([0.0, LENGTH], [THICK, THICK], WIDTH, E, E, G, NU, RHO, modes=3,
                                elements_along=2 * elastic2d.ELEMENTS_ALONG,
                                elements_through=2 * elastic2d.ELEMENTS_THROUGH)
    return [(LENGTH, k + 1, f) for k, f in enumerate(m.frequencies)]


def test_elastic_2d_fit_recovers_e_and_g_within_half_a_percent(measured):
    table = Material("maple", 0.9 * E, RHO, NU, shear_ratio=0.09)  # a table 10 % and 19 % off
    fit = fit_moduli(measured, table, bar(WIDTH, THICK), "elastic-2d")
    assert fit.shear == "fitted"
    assert fit.modulus == pytest.approx(E, rel=0.005)
    assert fit.shear_modulus == pytest.approx(G, rel=0.005)
    assert max(abs(r) for r in fit.residuals_cents) < 1.0


def test_calibrate_command_takes_the_2d_model(measured):
    freqs = ", ".join(f"{f:.3f}" for _, _, f in measured)
    result = CliRunner().invoke(cli, ["calibrate", "--kind", "bar", "--material", "maple-sugar", "--bar",
                                      "50 mm x 22 mm", "--model", "elastic-2d", "--piece", f"220 mm @ {freqs}"])
    assert result.exit_code == 0, result.output
    assert "elastic-2d model" in result.output and "fitted from the partials" in result.output
