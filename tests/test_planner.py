"""The planner against independent calculations, and the JSON contract."""

import json
import math

import mpmath
import pytest

from cutplan.design import load_design
from cutplan.materials import load_library
from cutplan.physics import air_column, beam_fe
from cutplan.planning.planner import plan
from cutplan.render.table import plan_dict

INLINE = """
title = "inline"
[[set]]
name = "t"
kind = "chime"
notes = ["C5", "G5", "C6"]
model = "{model}"
material = {{ modulus = "70 GPa", density = "2700 kg/m3", poisson = 0.33 }}
section = {{ shape = "tube", outer = "25 mm", wall = "1.5 mm" }}
"""


def make_plan(tmp_path, text):
    path = tmp_path / "d.toml"
    path.write_text(text, encoding="utf-8")
    design, _ = load_design(path, lambda dirs: load_library(dirs))
    return plan(design)


def test_slender_model_reproduces_closed_form_to_a_hundredth_of_a_cent(tmp_path):
    # Independent calculation with mpmath from Blevins 1979 Table 8-1's frequency equation
    # cos(x)cosh(x) = 1 and f = (beta L)^2 / (2 pi L^2) sqrt(EI/mu), solved for L.
    p = make_plan(tmp_path, INLINE.format(model="slender"))
    with mpmath.workdps(30):
        b1 = mpmath.findroot(lambda x: mpmath.cos(x) * mpmath.cosh(x) - 1, 4.73)
        d_o, d_i = mpmath.mpf("0.025"), mpmath.mpf("0.022")
        ei = mpmath.mpf(70e9) * mpmath.pi * (d_o**4 - d_i**4) / 64
        mu = mpmath.mpf(2700) * mpmath.pi * (d_o**2 - d_i**2) / 4
        for piece in p.pieces:
            f = mpmath.mpf(piece.target_hz)
            length = b1 * (ei / mu / (2 * mpmath.pi * f) ** 2) ** 0.25
            # cents error of using the planned length = 2 x 1200 log2(L_ref / L)
            err = 2400 * math.log2(float(length) / piece.length)
            assert abs(err) < 0.01


def test_default_model_reproduces_the_finite_element_solver(tmp_path):
    # the planned (transfer-matrix) length, put through the independent FE solver, sounds the target
    p = make_plan(tmp_path, INLINE.format(model="timoshenko"))
    e, rho, nu = 70e9, 2700.0, 0.33
    from cutplan.physics.sections import tube

    s = tube(0.025, 0.0015)
    g = e / (2 * (1 + nu))
    for piece in p.pieces:
        fe = beam_fe.free_free_modes(piece.length, e * s.second_moment, s.shear_coefficient(nu) * g * s.area,
                                     rho * s.area, rho * s.second_moment, modes=1, elements=30, order=4)
        assert abs(1200 * math.log2(fe.frequencies[0] / piece.target_hz)) < 0.01
        assert piece.predicted_hz == pytest.approx(piece.target_hz, rel=1e-9)


def test_chime_hang_points_near_the_published_node(tmp_path):
    # Blevins 1979 Table 8-1: mode-1 node at 0.2242 L (shear moves it by < 0.1 % of L)
    p = make_plan(tmp_path, INLINE.format(model="timoshenko"))
    for piece in p.pieces:
        assert piece.nodes[0] / piece.length == pytest.approx(0.2242, abs=0.001)
        assert piece.nodes[0] + piece.nodes[1] == pytest.approx(piece.length, rel=1e-9)


def test_slender_cents_per_mm_matches_the_derivative_of_one_over_l_squared(tmp_path):
    # f ~ 1/L^2 -> d(cents)/dL = 2 x 1200 / (ln 2 x L) per unit length (calculus)
    p = make_plan(tmp_path, INLINE.format(model="slender"))
    for piece in p.pieces:
        assert piece.cents_per_mm == pytest.approx(2400 / (math.log(2) * piece.length * 1000), rel=1e-4)


def test_shear_correction_is_reported_and_negative(tmp_path):
    p = make_plan(tmp_path, INLINE.format(model="timoshenko"))
    corr = [piece.shear_correction_cents for piece in p.pieces]
    assert all(c < 0 for c in corr)
    assert corr == sorted(corr, reverse=True)  # higher, shorter pieces feel shear more


def _column_reference(frequency, radius, kelvin):
    """(phase speed [m/s], unflanged end correction [m]) of a pipe at ``frequency``: Cramer 1993
    (JASA 93(5) 2510, Eq. 15) at the default 50 % RH, slowed by the wall losses (Keefe 1984, JASA
    75(1) 58), and the end correction at ka (Dalmont et al. 2001, J. Sound Vib. 244, 505, fitting
    Levine & Schwinger 1948); each piece tested against its published values in tests/physics."""
    import math

    from cutplan.physics import wall_losses

    c = air_column.speed_of_sound_cramer_1993(kelvin, 50.0)
    ka = 2 * math.pi * frequency * radius / c
    return (wall_losses.phase_speed(c, frequency, radius, kelvin),
            air_column.end_correction_dalmont_nederveen_2001(ka) * radius)


def test_air_column_length_uses_temperature_and_end_corrections(tmp_path):
    text = """
[[set]]
name = "pipes"
kind = "air-column"
notes = ["A4"]
section = { shape = "tube", outer = "30 mm", inner = "25 mm" }
ends = "open-open"
temperature = "20 C"
"""
    p = make_plan(tmp_path, text)
    # L = v / 2f - 2 delta(ka), a = 12.5 mm (see _column_reference)
    length = p.pieces[0].length
    v, delta = _column_reference(440.0, 0.0125, 293.15)
    assert length == pytest.approx(v / 880 - 2 * delta, rel=1e-9)
    # against the lossless, low-frequency model (ISO 9613-1 c = 343.2 m/s, 0.6133 a): the wall
    # losses shorten it by 2.4 mm, the humid air lengthens it by 0.7 mm
    assert (length - (343.2 / 880 - 2 * 0.6133 * 0.0125)) * 1000 == pytest.approx(-1.5, abs=0.1)
    assert p.pieces[0].nodes == ()
    # the n-th resonance of an open pipe is n v(f_n) / (2 (L + 2 delta(k_n a))): close to, but
    # not exactly, a harmonic series (higher modes: thinner boundary layers, smaller delta)
    partials = p.pieces[0].partials_hz
    for n, f in enumerate(partials, start=1):
        v, delta = _column_reference(f, 0.0125, 293.15)
        assert f == pytest.approx(n * v / (2 * (length + 2 * delta)), rel=1e-9)
        assert f == pytest.approx(440 * n, rel=5e-3)
    assert partials[3] / partials[0] > 4.0  # stretched, never compressed


def test_closed_column_has_odd_harmonics(tmp_path):
    text = """
[[set]]
kind = "air-column"
notes = ["A3"]
section = { stock = "pvc-sch40-2" }
ends = "closed-open"
"""
    p = make_plan(tmp_path, text)
    # closed-open: only odd resonances, (2n - 1) v(f_n) / (4 (L + delta(k_n a))); ASTM D1785 2 in
    # schedule 40 (OD 2.375 in, minimum wall 0.154 in, bore at 1.06 x the wall; common practice)
    radius = 0.5 * (2.375 - 2 * 1.06 * 0.154) * 0.0254
    piece = p.pieces[0]
    assert piece.partials_hz[0] == pytest.approx(220, rel=1e-9)
    for n, f in enumerate(piece.partials_hz, start=1):
        v, delta = _column_reference(f, radius, 293.15)
        assert f == pytest.approx((2 * n - 1) * v / (4 * (piece.length + delta)), rel=1e-9)
        assert f == pytest.approx(220 * (2 * n - 1), rel=1e-2)


def test_resonators_take_their_pitch_from_the_served_set(tmp_path):
    text = INLINE.format(model="timoshenko") + """
[[set]]
name = "res"
kind = "resonator"
serves = "t"
section = { stock = "pvc-sch40-2" }
temperature = "25 C"
"""
    p = make_plan(tmp_path, text)
    chimes = [x for x in p.pieces if x.set == "t"]
    res = [x for x in p.pieces if x.set == "res"]
    assert [r.target_hz for r in res] == pytest.approx([c.predicted_hz for c in chimes])
    radius = res[0].bore / 2
    v, delta = _column_reference(chimes[0].predicted_hz, radius, 298.15)
    assert res[0].length == pytest.approx(v / (4 * chimes[0].predicted_hz) - delta, rel=1e-9)


def test_strike_note_target_uses_half_of_mode_four(tmp_path):
    # Strike pitch of tubular bells: about an octave below mode 4 (Fletcher & Rossing 1998 ch. 19,
    # quoted in the Wikipedia "Tubular bells" article; HyperPhysics "Tubular Bells", after Rossing)
    text = INLINE.format(model="timoshenko").replace('notes = ["C5", "G5", "C6"]', 'notes = ["C5"]') + 'target = "strike-note"\n'
    p = make_plan(tmp_path, text)
    piece = p.pieces[0]
    assert piece.partials_hz[3] / 2 == pytest.approx(piece.target_hz, rel=1e-9)
    assert piece.predicted_hz == pytest.approx(piece.target_hz, rel=1e-9)
    # slender ratio f4/f1 = 8.933, so the fundamental sits well below the strike note
    assert piece.fundamental_hz < piece.target_hz / 2


def test_allowance_makes_the_cut_longer(tmp_path):
    p = make_plan(tmp_path, INLINE.format(model="slender") + '[stock]\nallowance = "1 %"\n')
    for piece in p.pieces:
        assert piece.cut_length == pytest.approx(piece.length * 1.01)
    p = make_plan(tmp_path, INLINE.format(model="slender") + '[stock]\nallowance = "3 mm"\n')
    for piece in p.pieces:
        assert piece.cut_length == pytest.approx(piece.length + 0.003)


CONTRACT_KEYS = {"set", "kind", "label", "note", "target_hz", "predicted_hz", "length_mm", "cut_length_mm",
                 "nodes_mm", "mass_g", "partials_hz", "cents_per_mm", "model", "shear_correction_cents", "warnings"}


def test_json_matches_the_contract(tmp_path):
    data = json.loads(json.dumps(plan_dict(make_plan(tmp_path, INLINE.format(model="timoshenko")))))
    assert data["format"] == "cutplan-plan/1"
    assert isinstance(data["a4_hz"], float)
    for piece in data["pieces"]:
        assert CONTRACT_KEYS <= set(piece)
        assert len(piece["partials_hz"]) == 4
        assert len(piece["nodes_mm"]) == 2


def test_mass_of_a_tube(tmp_path):
    p = make_plan(tmp_path, INLINE.format(model="slender"))
    piece = p.pieces[0]
    area = math.pi * (0.025**2 - 0.022**2) / 4
    assert piece.mass == pytest.approx(2700 * area * piece.length)


def test_a_plastic_chime_set_says_it_rings_briefly():
    # rigid PVC damps some hundred times more than aluminium (loss factor about 0.01-0.05 against
    # about 1e-4: Cremer, Heckl & Petersson, Structure-Borne Sound, 3rd ed., 2005; from memory)
    import cutplan
    from cutplan.planning.planner import PLASTIC_SUSTAIN

    def assumptions(stock):
        design = {"set": [{"kind": "chime", "notes": ["C5"], "section": {"stock": stock}}]}
        return cutplan.plan(cutplan.design_from_mapping(design)).sets[0].assumptions

    assert PLASTIC_SUSTAIN in assumptions("pvc-sch40-1")
    assert PLASTIC_SUSTAIN not in assumptions("al-1.000x0.065")
