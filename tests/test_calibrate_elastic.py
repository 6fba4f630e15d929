"""calibrate with the 2-D model: E and G of a deep test bar recovered from its partials."""

import pytest
from click.testing import CliRunner

from cutplan.cli import cli
from cutplan.materials import Material
from cutplan.physics.sections import bar
from cutplan.physics.solid3d import Orthotropic
from cutplan.tuning.calibrate_moduli import fit_moduli
from tests.physics.solid3d import vertical_bending

# Sugar maple along the grain (USDA Wood Handbook FPL-GTR-190, 2010: Table 5-3a MOE 12.6 GPa
# x 1.10 (from memory for the factor), Table 5-1 G_LR/E_L = 0.111, nu_LR = 0.424, SG 0.63 ->
# 706 kg/m3 (from memory for the SG basis)).
E, G, RHO, NU = 13.86e9, 0.111 * 13.86e9, 706.0, 0.424
WIDTH, THICK, LENGTH = 0.05, 0.022, 0.22  # depth / length = 0.1, as the thick test bar of a calibration


@pytest.fixture(scope="module")
def measured():
    # Stand-in for a recording, from an independent model: the 3-D elastic solid
    # (tests/physics/solid3d.py, 27-node bricks, half the width, mesh 32 x 2 x 4; within 0.2 cent
    # of a 48 x 3 x 4 mesh for modes 1-3, measured when written).  The plane-stress body is 0.9,
    # 1.9 and 2.0 cents below it here; the fit's model, the width resolved, recovered E within
    # 0.02 % and G within 0.2 % of the solid's when written.  (No published partials of a deep
    # wooden bar with its constants were found; a real recording would replace this.)
    f = vertical_bending([0.0, LENGTH], [THICK, THICK], WIDTH, E, 0.0, RHO, modes=3, along=32, across=2, through=4,
                         constants=Orthotropic(E, E, E, G, G, G, NU, NU, NU))
    return [(LENGTH, k + 1, x) for k, x in enumerate(f)]


def test_elastic_2d_fit_recovers_e_and_g_within_half_a_percent(measured):
    table = Material("maple", 0.9 * E, RHO, NU, shear_ratio=0.09)  # a table 10 % and 19 % off
    fit = fit_moduli(measured, table, bar(WIDTH, THICK), "elastic-2d")
    assert fit.shear == "fitted"
    assert fit.modulus == pytest.approx(E, rel=0.005)
    assert fit.shear_modulus == pytest.approx(G, rel=0.005)
    assert max(abs(r) for r in fit.residuals_cents) < 1.0


def test_calibrate_command_takes_the_2d_model(measured, tmp_path):
    # the measured bar is isotropic (E across = E along, one G, as the 3-D solid above), so the
    # table it starts from is too: a materials folder with the table of the test above (a wood
    # table with its across-grain constants would be another body)
    mats = tmp_path / "mats"
    mats.mkdir()
    (mats / "maple.toml").write_text('["maple-isotropic"]\ndescription = "maple along the grain, isotropic"\n'
                                     f'modulus = "{0.9 * E / 1e9} GPa"\ndensity = "{RHO} kg/m3"\npoisson = {NU}\n'
                                     "shear_ratio = 0.09\n", encoding="utf-8")
    freqs = ", ".join(f"{f:.3f}" for _, _, f in measured)
    result = CliRunner().invoke(cli, ["calibrate", "--kind", "bar", "--material", "maple-isotropic", "--materials",
                                      str(mats), "--bar", "50 mm x 22 mm", "--model", "elastic-2d", "--piece",
                                      f"220 mm @ {freqs}"])
    assert result.exit_code == 0, result.output
    assert "elastic-2d model" in result.output and "fitted from the partials" in result.output
