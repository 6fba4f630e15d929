"""Design -> Plan: every piece's length, cut length, nodes, partials, mass and trim data.

``plan(design)`` is a pure function of the validated design: no printing, no files.  Lengths
are solved with the set's model (shear-corrected Timoshenko by default, slender
Euler-Bernoulli on request) for chimes and bars, and with the air-column formulas, the speed of
sound at the set's temperature and the end corrections for air columns and resonators.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from cutplan import advice, air_stock, other_modes, pitch, uncertainty
from cutplan.design import DEFAULT_SHARP_RISK, Design, DesignError, DesignErrors, SetSpec
from cutplan.physics import air_column, beam, timoshenko
from cutplan.units import INCH_DENOMINATOR, format_length

PARTIAL_COUNT = 4
"""Partials reported per piece [-]."""
COMMON_STOCK_LENGTH = 3.66
"""Longest stick commonly sold [m] (12 ft; common practice): longer pieces get a warning."""
STUBBY_RATIO = 8.0
"""Length-to-depth ratio under which a beam model is flagged as approximate [-] (common practice)."""
STRIKE_NOTE_MODE = 4
"""Mode whose half sets the strike note of a tubular bell: the strike pitch is about an octave
below mode 4 (Fletcher & Rossing, The Physics of Musical Instruments, 2nd ed. 1998, ch. 19, via
the Wikipedia "Tubular bells" article; Rossing, Science of Percussion Instruments, 2000)."""


@dataclass(frozen=True)
class Piece:
    """One piece to cut. Lengths in m, frequencies in Hz, mass in kg (SI; renderers convert)."""

    set: str
    kind: str
    label: str
    note: str
    target_hz: float
    predicted_hz: float
    length: float
    cut_length: float
    nodes: tuple
    mass: float | None
    partials_hz: tuple
    partial_notes: tuple
    cents_per_mm: float
    model: str
    shear_correction_cents: float
    warnings: tuple = ()
    fundamental_hz: float = 0.0
    bore: float = 0.0
    allowance_uncalibrated: float = 0.0
    allowance_calibrated: float = 0.0
    sharp_risk: float = 0.0
    arch: object = None
    stopper: tuple = ()
    strike_note_hz: float | None = None
    trim_end: str = ""
    if_sharp: str = ""
    other_modes: tuple = ()  # ((kind "sideways" | "twisting", mode, hz), ...): see other_modes.py

    @property
    def allowance(self):
        """The allowance this piece is cut with [m]: cut length minus finished length, the one
        number the cut list, tuning sheet, templates and JSON state (for a stoppered resonator,
        the tube beyond the column at the design temperature)."""
        return self.cut_length - self.length


@dataclass(frozen=True)
class Arch:
    """The undercut of a bar: blank thickness, centre depth [m], arch width (fraction of the
    length), shape exponent, remaining thickness at stations ((x, h) [m], end to centre) and the
    residual of each tuned ratio [cents]."""

    thickness: float
    depth: float
    arch_width: float
    exponent: float
    stations: tuple
    ratios: tuple
    ratio_residuals_cents: tuple
    outline: tuple = ()  # (x, h) [m] along the whole bar, for drawing the side profile


@dataclass(frozen=True)
class SetPlan:
    """The pieces of one set with the facts they depend on; ``section`` is the Section itself."""

    name: str
    kind: str
    material: str
    section: object
    model: str
    pieces: tuple
    assumptions: tuple = ()
    allowance_rule: str = ""

    @property
    def section_text(self):
        """The section as shown to the builder, e.g. "al-1.000x0.065 tube 25.40 x 1.65 mm wall"."""
        return self.section_label("mm")

    def section_label(self, units="mm"):
        """The section's stock name and size, the chosen unit first."""
        sec = self.section
        return (sec.name + " " if sec.name else "") + sec.describe(units)

    @property
    def shape(self):
        """"tube", "rod" or "bar"."""
        return self.section.shape

    @property
    def outer(self):
        """Outside diameter of a tube or rod [m]."""
        return self.section.outer

    @property
    def width(self):
        """Width of a bar [m]."""
        return self.section.width


@dataclass(frozen=True)
class Plan:
    """Everything a renderer needs; plain data, SI units."""

    title: str
    units: str
    paper: str
    a4: float
    temperament: str
    sets: tuple
    design_path: str = ""
    cut_list: object = None
    warnings: tuple = field(default=())
    inch_denominator: int = INCH_DENOMINATOR
    shopping: tuple = ()  # cutplan.shopping.Item, ...
    cautions: tuple = ()  # cutplan.shopping.Caution, ...

    @property
    def pieces(self):
        """All pieces, set by set."""
        return tuple(p for s in self.sets for p in s.pieces)


def _partial_notes(freqs, a4):
    return tuple(pitch.nearest_note(float(f), a4) for f in freqs)


def _cents_per_mm(frequency_at, length):
    """Cents the pitch rises per millimetre removed (central difference over +/- 0.5 mm)."""
    step = 0.5e-3
    hi, lo = frequency_at(length - step), frequency_at(length + step)
    return pitch.cents(hi, lo)


def beam_constants(mat, sec, model):
    """(EI [N m^2], mu [kg/m], kappa G A [N], rho I [kg m]) of a material and section for a model."""
    e = mat.modulus_for(model)
    g = mat.shear_modulus_for(model)
    ei = e * sec.second_moment
    mu = mat.density * sec.area
    kga = sec.shear_coefficient(mat.poisson) * g * sec.area
    rho_i = mat.density * sec.second_moment
    return ei, mu, kga, rho_i


def beam_frequency_function(material, section, model, strike=False):
    """f(L) [Hz] of the mode a chime or bar is tuned by (mode 1, or half of mode 4 for the strike
    note), for this material, section and model."""
    from cutplan.physics import uniform

    ei, mu, kga, rho_i = beam_constants(material, section, model)
    n = STRIKE_NOTE_MODE if strike else 1
    scale = 0.5 if strike else 1.0

    # vectorised over L (a float in, a float out); .lengths_for solves the inverse in closed form
    def f_at(x):
        lengths = np.atleast_1d(np.asarray(x, dtype=float))
        if model == "slender":
            f = beam.free_free_frequency(n, lengths, ei, mu)
        elif n == 1:
            f = timoshenko.fundamental_frequencies(lengths, ei, mu, kga, rho_i)
        else:
            g, s2 = timoshenko.uniform_parameters(lengths, ei, mu, kga, rho_i)
            f = uniform.omegas(g, s2, n)[:, n - 1] / (2 * np.pi * lengths**2) * np.sqrt(ei / mu)
        f = scale * np.asarray(f, dtype=float)
        return float(f[0]) if np.ndim(x) == 0 else f.reshape(np.shape(x))

    def lengths_for(hz):
        hz = np.atleast_1d(np.asarray(hz, dtype=float)) / scale
        if model == "slender":
            return np.atleast_1d(beam.free_free_length(hz, ei, mu, mode=n))
        if n == 1:
            return timoshenko.fundamental_lengths(hz, ei, mu, kga, rho_i)
        return uniform.mode_lengths(hz, n, ei, mu, kga, rho_i)

    f_at.lengths_for = lengths_for
    return f_at


def air_frequency_function(spec):
    """f(L) [Hz] of an air-column or resonator set's fundamental at its temperature."""
    spec = air_stock.applied(spec)
    speed = air_stock.speed(spec)
    radius = spec.section.air_radius
    freq_of = air_column.closed_open_frequency if spec.ends == "closed-open" else air_column.open_open_frequency
    return lambda x: float(freq_of(x, radius, speed, correction=spec.end_correction))


def piece_frequency_function(spec, piece):
    """f(L) [Hz] of the mode a planned piece is tuned by, with the plan's own model (for trimming)."""
    if piece.arch is not None:
        return undercut_frequency_function(spec, piece.arch)
    if spec.kind in ("chime", "bar"):
        return beam_frequency_function(spec.material, spec.section, spec.model, spec.target_mode == "strike-note")
    return air_frequency_function(spec)


def _allowances(spec, stock, frequency_at, length, target, ratios_uncal, ratios_cal):
    """(cut length, uncalibrated allowance, calibrated allowance, risk of coming out sharp)."""
    risk = stock.allowance_risk if stock is not None and stock.allowance_risk else DEFAULT_SHARP_RISK
    # a set solved in closed form (frequency_at.lengths_for) gets every piece's allowance at once
    solve = getattr(frequency_at, "lengths_for", None)

    def cut_for(ratios):
        if solve is None:
            return uncertainty.cut_length_for_risk(frequency_at, length, target, ratios, risk)
        q = uncertainty.risk_quantile(ratios, risk)
        return solve(np.asarray(target, dtype=float) / q) if q > 1.0 else np.asarray(length, dtype=float)

    uncal, cal = cut_for(ratios_uncal), cut_for(ratios_cal)
    if stock is not None and stock.allowance_risk is None:
        cut = length * (1 + stock.allowance) + stock.allowance_length
    else:
        cut = uncal
    if solve is None:
        return cut, uncal - length, cal - length, uncertainty.sharp_risk(frequency_at, cut, target, ratios_uncal)
    return cut, uncal - length, cal - length, uncertainty.sharp_risks(frequency_at(cut), target, ratios_uncal)


def _mode_length(frequency, mode, ei, mu, kga, rho_i):
    """Timoshenko length whose mode ``mode`` sounds ``frequency`` (closed-form determinant)."""
    from cutplan.physics import uniform

    return float(uniform.mode_lengths(frequency, mode, ei, mu, kga, rho_i)[0])


SHARP_RISK_WARNING = 0.10
"""Chance of coming out sharp above which a fixed allowance gets a warning [-]."""


def _risk_warning(risk):
    if risk > SHARP_RISK_WARNING:
        return [f"the fixed allowance leaves a {risk * 100:.0f} % chance of cutting this piece too short; "
                'allowance = "risk 5 %" sizes it from the material spreads']
    return []


def _plan_beam_set(spec: SetSpec, design: Design, stock):
    from cutplan.physics import uniform

    model = spec.model
    strike = spec.target_mode == "strike-note"
    f_at = beam_frequency_function(spec.material, spec.section, model, strike)
    ratios_uncal = uncertainty.beam_ratios(spec.material, spec.section, spec.outer_tolerance, spec.wall_tolerance)
    ratios_cal = uncertainty.beam_ratios(spec.material, spec.section, calibrated=True)
    ei, mu, kga, rho_i = beam_constants(spec.material, spec.section, model)
    targets = np.array([t.frequency for t in spec.targets])
    # the whole set at once: lengths, modes, nodes, allowances (closed-form determinant, arrays)
    lengths = f_at.lengths_for(targets)
    modes = max(PARTIAL_COUNT, STRIKE_NOTE_MODE) if strike else PARTIAL_COUNT
    g, s2 = timoshenko.uniform_parameters(lengths, ei, mu, kga, rho_i)
    to_hz = np.sqrt(ei / mu) / (2 * np.pi * lengths[:, None] ** 2)
    timo = uniform.omegas(g, s2, modes) * to_hz
    slender = beam.free_free_roots(modes)[None, :] ** 2 * to_hz
    if model == "slender":
        partials = slender
        xi = beam.node_positions(1)
        nodes = [tuple(x * length for x in xi) for length in lengths]
    else:
        partials = timo
        xi = uniform.fundamental_nodes(timo[:, 0] / to_hz[:, 0], g, s2)
        nodes = [(x * length, (1 - x) * length) for x, length in zip(xi, lengths, strict=True)]
    predicted = partials[:, STRIKE_NOTE_MODE - 1] / 2 if strike else partials[:, 0]
    shear_cents = 1200 * np.log2(timo[:, 0] / slender[:, 0])
    step = 0.5e-3  # cents per mm: central difference over +/- 0.5 mm, as _cents_per_mm
    per_mm = 1200 * np.log2(f_at(lengths - step) / f_at(lengths + step))
    cuts, a_uncal, a_cal, risks = _allowances(spec, stock, f_at, lengths, targets, ratios_uncal, ratios_cal)
    pieces = []
    depth = spec.section.depth
    for i, t in enumerate(spec.targets):
        length, cut = float(lengths[i]), float(cuts[i])
        warnings = []
        if length / depth < STUBBY_RATIO:
            warnings.append(
                f"stubby piece: length is {length / depth:.1f} x its depth; beam models are "
                "approximate here, so cut a test piece and calibrate"
            )
        if model == "slender" and abs(shear_cents[i]) > 5:
            warnings.append(
                f"slender model: shear and rotary inertia would lower this piece by "
                f"{-shear_cents[i]:.0f} cents; the default timoshenko model includes them"
            )
        warnings += _risk_warning(float(risks[i]))
        if cut > COMMON_STOCK_LENGTH and not (stock and stock.lengths):
            warnings.append(f"longer than common stock ({COMMON_STOCK_LENGTH:.2f} m / 12 ft)")
        row = partials[i, :PARTIAL_COUNT]
        pieces.append(
            Piece(
                set=spec.name, kind=spec.kind, label=f"{spec.name}-{i + 1}", note=t.name,
                target_hz=t.frequency, predicted_hz=float(predicted[i]), length=length, cut_length=cut,
                nodes=tuple(float(x) for x in nodes[i]), mass=spec.material.density * spec.section.area * length,
                partials_hz=tuple(float(f) for f in row),
                partial_notes=_partial_notes(row, design.a4),
                cents_per_mm=float(per_mm[i]), model=model,
                shear_correction_cents=float(shear_cents[i]), warnings=tuple(warnings),
                fundamental_hz=float(partials[i, 0]), allowance_uncalibrated=float(a_uncal[i]),
                allowance_calibrated=float(a_cal[i]), sharp_risk=float(risks[i]),
            )
        )
    return pieces


def undercut_frequency_function(spec, arch):
    """f(L) [Hz] of mode 1 of an arched bar with this arch (depth and shape kept) at length L."""
    from cutplan.physics import undercut

    mat, sec = spec.material, spec.section
    e, g = mat.modulus_for("timoshenko"), mat.shear_modulus_for("timoshenko")
    kappa = sec.shear_coefficient(mat.poisson)

    def f(length):
        return float(undercut.bar_modes(length, sec.width, sec.thickness, arch.depth, arch.arch_width, e, g,
                                        mat.density, kappa, arch.exponent, modes=1).frequencies[0])

    return f


def _plan_undercut_set(spec: SetSpec, design: Design, stock, progress=None):
    """Arched bars: solve each bar's length and arch, then its nodes, partials and allowances."""
    from cutplan.physics import undercut

    mat, sec, cut = spec.material, spec.section, spec.undercut
    e, g = mat.modulus_for("timoshenko"), mat.shear_modulus_for("timoshenko")
    kappa = sec.shear_coefficient(mat.poisson)
    ratios_uncal = uncertainty.beam_ratios(mat, sec, spec.outer_tolerance, spec.wall_tolerance)
    ratios_cal = uncertainty.beam_ratios(mat, sec, calibrated=True)
    pieces, guess, jacobian = [], None, None
    order = sorted(range(len(spec.targets)), key=lambda i: spec.targets[i].frequency)
    solved = {}
    for i in order:
        # lowest note first; each bar starts from its neighbour's arch and Jacobian (the first
        # Newton step then does the length scaling)
        t = spec.targets[i]
        result = undercut.design_undercut(t.frequency, cut.ratios, sec.width, sec.thickness, e, g, mat.density,
                                          kappa, cut.min_thickness, cut.arch_width, guess=guess, jacobian=jacobian)
        guess, jacobian = (result.length, result.depth, result.exponent), result.jacobian
        solved[i] = result
        if progress is not None:
            progress(1)
    for i, t in enumerate(spec.targets):
        r = solved[i]
        xs = np.linspace(0.0, r.length, 161)
        hs = undercut.arch_thickness(xs, r.length, sec.thickness, r.depth, r.arch_fraction, r.exponent)
        arch = Arch(thickness=sec.thickness, depth=r.depth, arch_width=r.arch_fraction, exponent=r.exponent,
                    stations=r.stations(11), ratios=cut.ratios, ratio_residuals_cents=r.ratio_residuals_cents,
                    outline=tuple((float(x), float(h)) for x, h in zip(xs, hs, strict=True)))
        f_at = undercut_frequency_function(spec, arch)
        slender = undercut.bar_modes(r.length, sec.width, sec.thickness, r.depth, r.arch_fraction, e, g,
                                     mat.density, kappa, r.exponent, modes=1, slender=True).frequencies[0]
        per_mm = _cents_per_mm(f_at, r.length)
        # near the solved length f follows a power law f ~ L^-k; k from the trim rate (saves FE solves)
        k = per_mm * r.length * 1000 * np.log(2) / 1200

        def f_local(x, f0=float(r.frequencies[0]), length=r.length, k=k):
            return f0 * (length / x) ** k

        cut_length, a_uncal, a_cal, risk = _allowances(spec, stock, f_local, r.length, t.frequency, ratios_uncal,
                                                       ratios_cal)
        warnings = _risk_warning(risk)
        if r.length / sec.thickness < STUBBY_RATIO:
            warnings.append(f"stubby bar: length is {r.length / sec.thickness:.1f} x its thickness; cut a test "
                            "bar and calibrate")
        volume = sec.width * (sec.thickness * r.length - _arch_area(r))
        partials = r.frequencies[:PARTIAL_COUNT]
        pieces.append(Piece(
            set=spec.name, kind=spec.kind, label=f"{spec.name}-{i + 1}", note=t.name, target_hz=t.frequency,
            predicted_hz=float(r.frequencies[0]), length=r.length, cut_length=cut_length, nodes=tuple(r.nodes),
            mass=mat.density * volume, partials_hz=tuple(partials),
            partial_notes=_partial_notes(partials, design.a4), cents_per_mm=per_mm,
            model="timoshenko-undercut", shear_correction_cents=float(pitch.cents(r.frequencies[0], slender)),
            warnings=tuple(warnings), fundamental_hz=float(r.frequencies[0]), allowance_uncalibrated=a_uncal,
            allowance_calibrated=a_cal, sharp_risk=risk, arch=arch))
    return pieces


def _arch_area(result):
    """Side area removed by the arch [m^2] (numerical, from the profile)."""
    from cutplan.physics import undercut

    xs = np.linspace(0.0, result.length, 2001)
    hs = undercut.arch_thickness(xs, result.length, result.thickness, result.depth, result.arch_fraction,
                                 result.exponent)
    gap = result.thickness - hs
    return float(np.sum((gap[1:] + gap[:-1]) / 2 * np.diff(xs)))


STOPPER_MARGIN = 0.010
"""Tube left beyond the deepest stopper setting [m] (room for the plug itself; common practice)."""
STOPPER_STEP = 5.0
"""Temperature step of the stopper-setting table [K]."""


def _stopper_settings(spec, frequency, radius):
    """((temperature [K], depth from the open end to the stopper face [m]), ...) over the range.

    The closed end of a resonator is a movable stopper; as the air warms the speed of sound rises
    and the column must be longer to stay in tune (c ~ sqrt(T), ISO 9613-1).
    """
    lo, hi = spec.temperature_range
    temps = list(np.arange(lo, hi, STOPPER_STEP)) + [hi]
    if spec.temperature not in temps and lo < spec.temperature < hi:
        temps.append(spec.temperature)
    out = []
    for t in sorted(temps):
        speed = air_stock.speed(spec, float(t))
        out.append((float(t), air_column.closed_open_length(frequency, radius, speed, correction=spec.end_correction)))
    return tuple(out)


def _plan_air_set(spec: SetSpec, design: Design, targets, stock):
    temperature = spec.temperature
    speed = air_stock.speed(spec)
    radius = spec.section.air_radius
    closed = spec.ends == "closed-open"
    length_of = air_column.closed_open_length if closed else air_column.open_open_length
    freq_of = air_column.closed_open_frequency if closed else air_column.open_open_frequency
    pieces, errors = [], []
    for i, t in enumerate(targets, start=1):
        length = length_of(t.frequency, radius, speed, correction=spec.end_correction)
        label = f"{spec.name}-{i}"
        if length <= 2 * radius:
            errors.append(DesignError(design.path, f"set[{spec.index}]", t.name,
                                      f"is too high for a {format_length(2 * radius, design.units)} bore: the column would be "
                                      f"{format_length(length, design.units)} long ({label}); use a narrower tube"))
            continue
        harmonics = [2 * n - 1 for n in range(1, PARTIAL_COUNT + 1)] if closed else list(range(1, PARTIAL_COUNT + 1))
        f1 = float(freq_of(length, radius, speed, correction=spec.end_correction))
        partials = [f1 * h for h in harmonics]
        warnings = []
        if length < 2 * radius * 2:
            warnings.append("short column: under two bores long, the end correction dominates; cut long and trim")
        if spec.kind == "resonator" and length > spec.max_length:
            warnings.append(f"resonator {format_length(length, design.units)} is longer than the limit "
                            f"{format_length(spec.max_length, design.units)}; use a folded tube or a wider bore")
        ka = 2 * np.pi * t.frequency / speed * radius
        if ka > 0.5:
            warnings.append(f"wide bore for this pitch (ka = {ka:.2f}): the end correction shrinks at high "
                            "frequency, so the column may sound flat; trim to tune")
        mass = spec.material.density * spec.section.area * length if spec.material is not None else None
        f_at = air_frequency_function(spec)
        factor = air_column.end_correction(1.0, spec.end_correction)
        open_ends = 1 if closed else 2
        cut, a_uncal, a_cal, risk = _allowances(
            spec, stock, f_at, length, t.frequency,
            uncertainty.air_ratios(length, radius, factor, open_ends, temperature,
                                   calibrated=air_stock.calibration(spec) is not None),
            uncertainty.air_ratios(length, radius, factor, open_ends, temperature, calibrated=True))
        warnings += _risk_warning(risk)
        stopper = ()
        if spec.temperature_range is not None:
            stopper = _stopper_settings(spec, t.frequency, radius)
            deepest = max(depth for _, depth in stopper)
            cut = max(cut, deepest + STOPPER_MARGIN)
            if spec.kind == "resonator" and cut > spec.max_length:
                warnings.append(f"with the stopper travel the tube is {format_length(cut, design.units)}, longer than the limit "
                                f"{format_length(spec.max_length, design.units)}")
        pieces.append(
            Piece(
                set=spec.name, kind=spec.kind, label=label, note=t.name, target_hz=t.frequency,
                predicted_hz=f1, length=length, cut_length=cut,
                nodes=(), mass=mass, partials_hz=tuple(partials),
                partial_notes=_partial_notes(partials, design.a4),
                cents_per_mm=_cents_per_mm(f_at, length),
                model=spec.ends, shear_correction_cents=0.0, warnings=tuple(warnings),
                fundamental_hz=f1, bore=2 * radius, allowance_uncalibrated=a_uncal,
                allowance_calibrated=a_cal, sharp_risk=risk, stopper=stopper,
            )
        )
    return pieces, errors


def _with_shop_facts(piece, spec):
    """The piece with the shop facts every output states: strike note, trim end, what to do if
    it comes out sharp."""
    from dataclasses import replace

    strike = None
    if piece.kind == "chime" and len(piece.partials_hz) >= STRIKE_NOTE_MODE:
        strike = piece.partials_hz[STRIKE_NOTE_MODE - 1] / 2
    kind = "resonator" if piece.kind == "resonator" else piece.kind
    return replace(piece, strike_note_hz=strike, trim_end=advice.trim_from(kind, spec.ends),
                   if_sharp=advice.sharp_action(kind))


def allowance_rule(stock, units="mm"):
    """The design's allowance rule as the builder wrote it: "risk 5 %", "0.5 %" or a length."""
    if stock is None or stock.allowance_risk is not None:
        risk = stock.allowance_risk if stock is not None else DEFAULT_SHARP_RISK
        return f"risk {risk * 100:g} %"
    if stock.allowance_length:
        return format_length(stock.allowance_length, units)
    return f"{stock.allowance * 100:g} %"


def _set_summary(spec: SetSpec, units="mm"):
    assumptions = []
    if spec.kind in ("air-column", "resonator"):
        speed = air_stock.speed(spec)
        hum = "dry air (ISO 9613-1)" if spec.humidity is None else f"{spec.humidity:.0f} % RH (Cramer 1993)"
        assumptions.append(f"air at {spec.temperature - 273.15:.1f} C, {hum}: speed of sound {speed:.2f} m/s")
        corr = spec.end_correction
        corr_text = f"{corr} x inner radius" if isinstance(corr, (int, float)) else corr
        assumptions.append(f"{spec.ends} column, end correction {corr_text} per open end, "
                           f"bore {format_length(spec.section.air_radius * 2, units)}")
        assumptions += air_stock.assumptions(spec)
        if spec.temperature_range is not None:
            lo, hi = spec.temperature_range
            assumptions.append(f"stopper travel covers {lo - 273.15:.0f} C to {hi - 273.15:.0f} C")
        model = spec.ends
    else:
        mat = spec.material
        model = spec.model
        e = mat.modulus_for(model)
        assumptions.append(
            f"E = {e / 1e9:.2f} GPa, G = {mat.shear_modulus_for(model) / 1e9:.2f} GPa, "
            f"density {mat.density:.0f} kg/m3, Poisson {mat.poisson:.2f}"
        )
        if mat.modulus_basis == "static-bending":
            assumptions.append("wood: table modulus is a static-bending value"
                               + ("; raised 10 % to the true E for the shear-corrected model" if model == "timoshenko" else ""))
        assumptions.append("shear-corrected (Timoshenko) free-free beam, Cowper shear coefficient"
                           if model == "timoshenko" else "slender (Euler-Bernoulli) free-free beam")
        if spec.target_mode == "strike-note":
            assumptions.append("tuned to the strike note: half the mode-4 frequency")
        if spec.undercut is not None:
            u = spec.undercut
            ratio_text = ":".join(f"{r:g}" for r in (1,) + u.ratios)
            assumptions.append(f"undercut bars tuned {ratio_text}: arch over the middle {u.arch_width:g} of the length, "
                               f"centre at least {format_length(u.min_thickness, units)} thick (non-uniform shear-corrected "
                               "finite elements)")
            model = "timoshenko-undercut"
    material = spec.material.name if spec.material is not None else "(not given)"
    if material == "inline" and spec.material is not None:
        material = f"inline: E {spec.material.modulus / 1e9:.2f} GPa, {spec.material.density:.0f} kg/m3"
    sec = spec.section
    return SetPlan(name=spec.name, kind=spec.kind, material=material, section=sec, model=model, pieces=(),
                   assumptions=tuple(assumptions))


def bars_to_solve(design: Design):
    """How many arched bars a design has (each takes a small optimisation; for progress bars)."""
    return sum(len(s.targets) for s in design.sets if s.undercut is not None)


def plan(design: Design, progress=None, stock_override=None) -> Plan:
    """Plan every set of a validated design, with its cut list on the stock on hand.

    Raises DesignErrors for pieces that cannot be made or stock that cannot hold them.
    ``progress(n)``, if given, is called as arched bars are solved (for a progress bar);
    ``stock_override`` (a StockSpec) lays the pieces out on other stock than the design's.
    """
    sets, errors, by_name = [], [], {}
    ordered = sorted(design.sets, key=lambda s: s.kind == "resonator")
    for spec in ordered:
        spec = air_stock.applied(spec)
        stock = spec.stock or design.stock
        summary = _set_summary(spec, design.units)
        if spec.kind in ("chime", "bar"):
            try:
                if spec.undercut is not None:
                    pieces = _plan_undercut_set(spec, design, stock, progress)
                else:
                    pieces = _plan_beam_set(spec, design, stock)
                pieces = other_modes.with_other_modes(spec, pieces)
            except ValueError as exc:
                errors.append(DesignError(design.path, f"set[{spec.index}]", spec.name, f"cannot be planned: {exc}"))
                continue
        else:
            if spec.kind == "resonator":
                served = by_name.get(spec.serves)
                if served is None:
                    errors.append(DesignError(design.path, f"set[{spec.index}].serves", spec.serves, "could not be planned"))
                    continue
                targets = [pitch.Target(p.note, p.fundamental_hz) for p in served.pieces]
            else:
                targets = list(spec.targets)
            pieces, errs = _plan_air_set(spec, design, targets, stock)
            errors.extend(errs)
        if stock and stock.lengths:
            longest = max(s.length for s in stock.lengths)
            for p in pieces:
                need = p.cut_length + stock.end_trim
                if need > longest:
                    errors.append(DesignError(
                        design.path, f"set[{spec.index}]", p.note,
                        f"needs {p.label} cut at {format_length(need, design.units)} with end trim, longer than the "
                        f"longest stock ({format_length(longest, design.units)}); add longer stock or raise the note"))
        pieces = [_with_shop_facts(p, spec) for p in pieces]
        done = SetPlan(**{**summary.__dict__, "pieces": tuple(pieces),
                          "allowance_rule": allowance_rule(stock, design.units)})
        by_name[spec.name] = done
        sets.append(done)
    if errors:
        raise DesignErrors(errors)
    order = {s.name: i for i, s in enumerate(design.sets)}
    sets.sort(key=lambda s: order[s.name])
    from cutplan import cutlist, stock

    try:
        cuts = cutlist.lay_out(sets, {s.name: s for s in design.sets}, design.stock, stock_override,
                              units=design.units)
    except stock.StockError as exc:
        raise DesignErrors([DesignError(design.path, "stock", None, str(exc))]) from None
    from cutplan.shopping import with_shop_lists  # noqa: I001 (shopping list and cautions)
    return with_shop_lists(Plan(title=design.title, units=design.units, paper=design.paper, a4=design.a4,
                temperament=design.temperament, sets=tuple(sets), design_path=design.path, cut_list=cuts))
