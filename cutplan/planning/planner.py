"""Design -> Plan: every piece's length, cut length, nodes, partials, mass and trim data.

``plan(design)`` is a pure function of the validated design and the shop tables: no printing,
no file read per call (the packaged shop tables are read once per process, on first use, or
passed in as ``tables``).  Lengths
are solved with the set's model (shear-corrected Timoshenko by default, slender
Euler-Bernoulli on request) for chimes and bars, and with the air-column formulas, the speed of
sound at the set's temperature and the end corrections for air columns and resonators.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from cutplan import pitch
from cutplan.design import Design, DesignError, DesignErrors, SetSpec, notices
from cutplan.design.notices import Notice, set_key, stock_key
from cutplan.layout import cutlist, optimiser
from cutplan.layout.kits import kit_sets
from cutplan.physics import beam, timoshenko, undercut, uniform
from cutplan.physics.undercut import UndercutError
from cutplan.planning import air_calibrated, elastic, grain, hang_holes, other_modes, reach, thermal, uncertainty
from cutplan.planning.air import BAR_OVER_MOUTH, plan_air_set
from cutplan.planning.allowance import allowance_rule, allowances, risk_warning
from cutplan.planning.frequency import (
    STRIKE_NOTE_MODE,
    STUBBY_RATIO,
    beam_constants,
    beam_frequency_function,
    cents_per_mm,
    partial_notes,
    stubby_bar_warnings,
    undercut_frequency_function,
)
from cutplan.planning.hanging import hanging_for
from cutplan.planning.records import PARTIAL_COUNT, Arch, Piece, Plan, SetPlan
from cutplan.planning.shopping import shop_tables, with_shop_lists
from cutplan.tuning import advice
from cutplan.units import INCH_DENOMINATOR, ZERO_CELSIUS, format_length

__all__ = ["Arch", "Piece", "Plan", "SetPlan", "bars_to_solve", "plan"]

COMMON_STOCK_LENGTH = 3.66
"""Longest stick commonly sold [m] (12 ft; common practice): longer pieces get a warning."""


def _plan_beam_set(spec: SetSpec, design: Design, stock):
    assert spec.material is not None  # validated: a chime or bar set names its material
    model = spec.model
    strike = spec.target_mode == "strike-note"
    f_at = beam_frequency_function(spec.material, spec.section, model, strike)
    ratios_uncal = uncertainty.beam_ratios(spec.material, spec.section, spec.outer_tolerance, spec.wall_tolerance)
    ratios_cal = uncertainty.beam_ratios(spec.material, spec.section, calibrated=True)
    ei, mu, kga, rho_i = beam_constants(spec.material, spec.section, model)
    targets = np.array([t.frequency for t in spec.targets])
    # the whole set at once: lengths, modes, nodes, allowances (closed-form determinant, arrays)
    lengths = f_at.lengths_for(targets)
    # a bar of unknown sawing: the shortest (most shear-sensitive) bar's spread widens the allowance
    ratios_uncal = grain.unknown_grain_ratios(spec, ratios_uncal, float(np.min(lengths)))
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
    default_cents = shear_cents
    if model == "slender":  # the default model at the same lengths, with its own modulus (wood: the true E)
        own = beam_frequency_function(spec.material, spec.section, "timoshenko", strike)
        default_cents = 1200 * np.log2(own(lengths) / f_at(lengths))
    step = 0.5e-3  # cents per mm: central difference over +/- 0.5 mm, as cents_per_mm
    per_mm = 1200 * np.log2(f_at(lengths - step) / f_at(lengths + step))
    cuts, a_uncal, a_cal, risks = allowances(spec, stock, f_at, lengths, targets, ratios_uncal, ratios_cal)
    pieces = []
    depth = spec.section.depth
    for i, t in enumerate(spec.targets):
        length, cut = float(lengths[i]), float(cuts[i])
        warnings = []
        if length / depth < STUBBY_RATIO:
            warnings.append(Notice(
                notices.STUBBY, set_key(spec, "section"),
                f"stubby piece: length is {length / depth:.1f} x its depth; beam models are "
                "approximate here, so cut a test piece and calibrate"
            ))
        if model == "slender" and abs(default_cents[i]) > 5:
            warnings.append(Notice(
                notices.SLENDER_MODEL, set_key(spec, "model"),
                f"slender model: the default timoshenko model (shear, rotary inertia and its own modulus) puts "
                f"this piece {abs(default_cents[i]):.0f} cents {'higher' if default_cents[i] > 0 else 'lower'}"
            ))
        warnings += risk_warning(float(risks[i]), spec)
        if cut > COMMON_STOCK_LENGTH and not (stock and stock.lengths):
            warnings.append(Notice(notices.LONGER_THAN_COMMON_STOCK, stock_key(spec, "lengths"),
                                   f"longer than common stock ({COMMON_STOCK_LENGTH:.2f} m / 12 ft)"))
        row = partials[i, :PARTIAL_COUNT]
        pieces.append(
            Piece(
                set=spec.name, kind=spec.kind, label=f"{spec.name}-{i + 1}", note=t.name,
                target_hz=t.frequency, predicted_hz=float(predicted[i]), length=length, cut_length=cut,
                nodes=tuple(float(x) for x in nodes[i]), mass=spec.material.density * spec.section.area * length,
                partials_hz=tuple(float(f) for f in row),
                partial_notes=partial_notes(row, design.a4),
                cents_per_mm=float(per_mm[i]), model=model,
                shear_correction_cents=float(shear_cents[i]), warnings=tuple(warnings),
                fundamental_hz=float(partials[i, 0]), allowance_uncalibrated=float(a_uncal[i]),
                allowance_calibrated=float(a_cal[i]), sharp_risk=float(risks[i]),
            )
        )
    return pieces


def _plan_undercut_set(spec: SetSpec, design: Design, stock, progress=None):
    """Arched bars: solve each bar's length and arch, then its nodes, partials and allowances."""
    mat, sec, cut = spec.material, spec.section, spec.undercut
    assert mat is not None and cut is not None  # validated: an arched bar set has both
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
        try:
            result = undercut.design_undercut(t.frequency, cut.ratios, sec.width, sec.thickness, e, g, mat.density,
                                              kappa, cut.min_thickness, cut.arch_width, guess=guess, jacobian=jacobian)
        except UndercutError as exc:  # the refusal names the bar that cannot be tuned
            raise exc.named(f"{t.name} ({t.frequency:.1f} Hz): ") from None
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
        f_at = undercut_frequency_function(spec, arch, r.length)  # the arch stays put as the ends are trimmed
        slender = undercut.bar_modes(r.length, sec.width, sec.thickness, r.depth, r.arch_fraction, e, g,
                                     mat.density, kappa, r.exponent, modes=1, slender=True).frequencies[0]
        per_mm = cents_per_mm(f_at, r.length)
        # near the solved length f follows a power law f ~ L^-k; k from the trim rate (saves FE solves)
        k = per_mm * r.length * 1000 * np.log(2) / 1200

        def f_local(x, f0=float(r.frequencies[0]), length=r.length, k=k):
            return f0 * (length / x) ** k

        cut_length, a_uncal, a_cal, risk = allowances(spec, stock, f_local, r.length, t.frequency,
                                                       grain.unknown_grain_ratios(spec, ratios_uncal, r.length),
                                                       ratios_cal)
        warnings = risk_warning(risk, spec)
        warnings += stubby_bar_warnings(r.length, sec.thickness, set_key(spec, "section"))
        volume = sec.width * (sec.thickness * r.length - undercut.arch_area(r.length, r.thickness, r.depth, r.arch_fraction, r.exponent))
        partials = r.frequencies[:PARTIAL_COUNT]
        pieces.append(Piece(
            set=spec.name, kind=spec.kind, label=f"{spec.name}-{i + 1}", note=t.name, target_hz=t.frequency,
            predicted_hz=float(r.frequencies[0]), length=r.length, cut_length=cut_length, nodes=tuple(r.nodes),
            mass=mat.density * volume, partials_hz=tuple(partials),
            partial_notes=partial_notes(partials, design.a4), cents_per_mm=per_mm,
            model="timoshenko-undercut", shear_correction_cents=float(pitch.cents(r.frequencies[0], slender)),
            warnings=tuple(warnings), fundamental_hz=float(r.frequencies[0]), allowance_uncalibrated=a_uncal,
            allowance_calibrated=a_cal, sharp_risk=risk, arch=arch))
    return pieces


def _with_shop_facts(piece, spec):
    """The piece with the shop facts every output states: strike note, trim end, what to do if
    it comes out sharp."""
    strike = None
    if piece.kind == "chime" and len(piece.partials_hz) >= STRIKE_NOTE_MODE:
        strike = piece.partials_hz[STRIKE_NOTE_MODE - 1] / 2
    kind = "resonator" if piece.kind == "resonator" else piece.kind
    stoppered = bool(piece.stopper)
    return replace(piece, strike_note_hz=strike, trim_end=advice.trim_from(kind, spec.ends, stoppered),
                   if_sharp=advice.sharp_action(kind, stoppered))


def _set_summary(spec: SetSpec, units="mm", den=INCH_DENOMINATOR):
    assumptions, constants = [], ()
    if spec.kind in ("air-column", "resonator"):
        speed = air_calibrated.speed(spec)
        hum = (f"{air_calibrated.humidity(spec):.0f} % RH" + (" (assumed; give humidity to change it)"
                                                         if spec.humidity is None else ""))
        assumptions.append(f"air at {spec.temperature - ZERO_CELSIUS:.1f} C, {hum}: speed of sound {speed:.2f} m/s "
                           "in free air (Cramer 1993)")
        corr = spec.end_correction
        corr_text = (f"{corr:.6g} x inner radius" if isinstance(corr, (int, float))
                     else f"{corr}, falling with ka (Levine & Schwinger 1948 curve)" if corr != "none" else corr)
        assumptions.append(f"{spec.ends} column, end correction {corr_text} per open end, "
                           f"bore {format_length(spec.section.air_radius * 2, units, den)}")
        if air_calibrated.wall_losses(spec):
            assumptions.append("wall losses: viscous and thermal boundary layers slow sound in the pipe by "
                               "about 1.6e-3 / (a sqrt f) (Kirchhoff; Keefe 1984), each note at its own frequency")
        assumptions += air_calibrated.assumptions(spec)
        if spec.kind == "resonator":
            assumptions.append(BAR_OVER_MOUTH)
        if spec.temperature_range is not None:
            lo, hi = spec.temperature_range
            assumptions.append(f"stopper travel covers {lo - ZERO_CELSIUS:.0f} C to {hi - ZERO_CELSIUS:.0f} C")
        model = spec.ends
    else:
        mat = spec.material
        assert mat is not None  # validated: a chime or bar set names its material
        model = spec.model
        e = mat.modulus_for(model)
        assumptions.append(
            f"E = {e / 1e9:.2f} GPa, G = {mat.shear_modulus_for(model) / 1e9:.2f} GPa, "
            f"density {mat.density:.0f} kg/m3, Poisson {mat.poisson:.2f}"
        )
        assumptions += grain.assumptions(spec)
        if mat.modulus_basis == "static-bending":
            assumptions.append("wood: table modulus is a static-bending value"
                               + ("; raised 10 % to the true E for the shear-corrected and 2-D models" if model != "slender"
                                  else ""))
        assumptions.append({"timoshenko": "shear-corrected (Timoshenko) free-free beam, Cowper shear coefficient",
                            "slender": "slender (Euler-Bernoulli) free-free beam",
                            "elastic-2d": "2-D elastic body through the thickness, the width resolved (3-D "
                                          "elasticity, polynomial terms across the width; quadratic finite "
                                          "elements), free-free"}[model])
        constants = elastic.elastic_constants(spec)
        if model == "elastic-2d":
            across = dict(constants)["modulus_across"]
            assumptions.append(f"E across the bar {across / 1e9:.2f} GPa"
                               + (" (none tabled: taken equal to E along)" if across == e else ""))
        if spec.target_mode == "strike-note":
            assumptions.append("tuned to the strike note: half the mode-4 frequency")
        if spec.kind == "chime" and mat.material_class == "plastic":
            assumptions.append(PLASTIC_SUSTAIN)
        drift = thermal.assumption(mat)
        if drift:
            assumptions.append(drift)
        if spec.undercut is not None:
            u = spec.undercut
            ratio_text = ":".join(f"{r:g}" for r in (1,) + u.ratios)
            assumptions.append(f"undercut bars tuned {ratio_text}: arch over the middle {u.arch_width:g} of the length, "
                               f"centre at least {format_length(u.min_thickness, units, den)} thick ("
                               + ("2-D elastic body" if model == "elastic-2d" else
                                  "non-uniform shear-corrected finite elements") + ")")
            if model != "elastic-2d":
                model = "timoshenko-undercut"
    material = spec.material.name if spec.material is not None else "(not given)"
    if material == "inline" and spec.material is not None:
        material = f"inline: E {spec.material.modulus / 1e9:.2f} GPa, {spec.material.density:.0f} kg/m3"
    sec = spec.section
    return SetPlan(name=spec.name, kind=spec.kind, material=material, section=sec, model=model, pieces=(),
                   assumptions=tuple(assumptions), elastic_constants=constants)


PLASTIC_SUSTAIN = ("plastic tubes ring briefly: a struck PVC or acrylic chime dies away in about a second, "
                   "metal rings on for many; tune it by ear or tuner right after the strike")
"""Why a plastic chime sounds short: the loss factor of rigid plastics (about 0.01 to 0.05) is
some hundred times that of aluminium or brass (about 1e-4) (Cremer, Heckl and Petersson,
Structure-Borne Sound, 3rd ed., 2005, table of loss factors; from memory)."""


def bars_to_solve(design: Design):
    """How many arched bars a design has (each takes a small optimisation; for progress bars)."""
    return sum(len(s.targets) for s in design.sets if s.undercut is not None)


def plan(design: Design, progress=None, stock_override=None, tables=None) -> Plan:
    """Plan every set of a validated design, with its cut list on the stock on hand.

    Raises DesignErrors for pieces that cannot be made or stock that cannot hold them.
    ``progress(n)``, if given, is called as arched bars are solved (for a progress bar);
    ``stock_override`` (a StockSpec) lays the pieces out on other stock than the design's;
    ``tables`` (:class:`cutplan.planning.shopping.ShopTables`) are the shop tables, the packaged
    ones (read once per process) when None.  Reads no file of its own.
    """
    tables = tables if tables is not None else shop_tables()
    sets, errors = [], []
    by_name: dict[str, SetPlan] = {}
    ordered = sorted(design.sets, key=lambda s: s.kind == "resonator")
    for spec in ordered:
        spec = grain.applied(air_calibrated.applied(spec))  # a wood bar bends with G of its sawing's plane
        stock = spec.stock or design.stock
        summary = _set_summary(spec, design.units, design.inch_denominator)
        if spec.kind in ("chime", "bar"):
            try:
                if spec.model == "elastic-2d":
                    pieces = elastic.plan_set(spec, design, stock, progress)
                elif spec.undercut is not None:
                    pieces = _plan_undercut_set(spec, design, stock, progress)
                else:
                    pieces = _plan_beam_set(spec, design, stock)
                    missed = reach.missed_target(design, spec, pieces)
                    if missed is not None:  # a length on the wrong branch of the solver: refused, not printed
                        errors.append(missed)
                        continue
                pieces = other_modes.with_other_modes(spec, pieces)
                pieces = hang_holes.with_hang_holes(spec, pieces, tables.hang_holes, design.units)
            except UndercutError as exc:  # the arch cannot reach the ratios asked for (lengths in the design's units)
                why = exc.text(lambda m: format_length(m, design.units, design.inch_denominator))
                errors.append(DesignError(design.path, set_key(spec, "undercut.ratios"), list(spec.undercut.ratios),
                                          f'cannot be reached in set "{spec.name}": {why}', notices.UNREACHABLE))
                continue
            except ValueError:  # the key, the value and what is allowed, in a builder's words
                errors.append(reach.refusal(design, spec))
                continue
        else:
            if spec.kind == "resonator":
                served = by_name.get(spec.serves)
                if served is None:
                    errors.append(DesignError(design.path, f"set[{spec.index}].serves", spec.serves, "could not be planned"))
                    continue
                targets = [pitch.Target(p.note, p.fundamental_hz) for p in served.pieces]
                bar_drift = thermal.drift_for(next(s.material for s in design.sets if s.name == spec.serves))
                if bar_drift is not None and spec.temperature_range is not None:
                    summary = replace(summary, assumptions=summary.assumptions + (
                        f"stopper table follows the served pieces' own drift ({bar_drift.cents_per_kelvin:+.2f} "
                        "cents per kelvin): tune bar and resonator at the same temperature",))
            else:
                targets, bar_drift = list(spec.targets), None
            pieces, errs = plan_air_set(spec, design, targets, stock,
                                        bar_drift=bar_drift.per_kelvin if bar_drift is not None else 0.0)
            errors.extend(errs)
        if stock and stock.lengths:
            longest = max(s.length for s in stock.lengths)
            for p in pieces:
                need = p.cut_length + 2 * stock.end_trim  # both factory ends squared
                if need > longest:
                    errors.append(DesignError(
                        design.path, f"set[{spec.index}]", p.note,
                        f"needs {p.label} cut at {format_length(need, design.units, design.inch_denominator)} with end trim at both ends, "
                        f"longer than the longest stock ({format_length(longest, design.units, design.inch_denominator)}); add longer stock or "
                        "raise the note", notices.LONGER_THAN_STOCK))
        pieces = [_with_shop_facts(p, spec) for p in pieces]
        done = SetPlan(**{**summary.__dict__, "pieces": tuple(pieces),
                          "allowance_rule": allowance_rule(stock, design.units, design.inch_denominator),
                          "material_class": getattr(spec.material, "material_class", None) or ""})
        if spec.kind == "chime":
            done = SetPlan(**{**done.__dict__, "hanging": hanging_for(done, spec.hanging, spec.target_mode,
                                                                        tables.lines, units=design.units)})
        by_name[spec.name] = done
        sets.append(done)
    if errors:
        raise DesignErrors(errors)
    order = {s.name: i for i, s in enumerate(design.sets)}
    sets.sort(key=lambda s: order[s.name])
    try:
        cuts = cutlist.lay_out(kit_sets(sets, design.copies), {s.name: s for s in design.sets}, design.stock, stock_override,
                              units=design.units)
    except optimiser.StockError as exc:
        raise DesignErrors([DesignError(design.path, "stock", None, str(exc))]) from None
    return with_shop_lists(Plan(title=design.title, units=design.units, inch_denominator=design.inch_denominator,
                paper=design.paper, a4=design.a4,
                temperament=design.temperament, sets=tuple(sets), design_path=design.path, cut_list=cuts,
                classroom=design.classroom, copies=design.copies), tables)
