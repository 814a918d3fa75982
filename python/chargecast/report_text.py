"""The text view of a :class:`chargecast.Report`: tables with units, no model decision.

Every number comes from the report (computed in the core by ``Scenario.run``); this module
only chooses which rows to print and how to format them.
"""

from __future__ import annotations

import math
import textwrap
from pathlib import Path
from typing import Any

__all__ = ["MODEL_NAMES", "SOURCE_NAMES", "render", "source_line"]

#: How each source kind is named in prose.
SOURCE_NAMES = {
    "beam_trap": "electron-beam trap",
    "photon_beam": "photon beam",
    "electron_impact": "single-collision electron source",
    "plasma": "plasma ion source",
}

#: How each model of the evolution is named in prose (keys: ``Report.model``).
MODEL_NAMES = {
    "fixed": "fixed (ions inside the beam at one temperature; linear rate equations)",
    "dynamic": (
        "dynamic (ion dynamics: beam heating, energy exchange, escape over the barriers, "
        "overlap with the beam, space charge; Penetrante et al. 1991)"
    ),
    "single_collision": "single collision (partial cross sections of one electron impact)",
    "plasma_balance": (
        "plasma_balance (zero-dimensional particle balance: Maxwellian Lotz and "
        "excitation-autoionization, Kim-Pratt and Burgess recombination, Müller-Salzborn "
        "charge exchange, confinement τ_q; continuous extraction)"
    ),
}


def render(report: Any) -> str:
    """The report as plain text.

    Parameters
    ----------
    report : chargecast.Report

    Returns
    -------
    str
    """
    return "\n".join(_TextReport(report).lines())


def source_line(report: Any) -> str:
    """One line naming the source's setting, for figure titles."""
    src = report.scenario.source
    if src.kind == "beam_trap":
        b = report.beam
        j = b.current_density_a_cm2
        return (
            f"{b.energy_ev:.5g} eV, {b.current_a:.3g} A, {j:.0f} A/cm²"
            if j >= 100
            else f"{b.energy_ev:.5g} eV, {b.current_a:.3g} A, {j:.3g} A/cm²"
        )
    if src.kind == "photon_beam":
        return f"{src.photon_energy_ev:.5g} eV photons, {src.flux_cm2_s:.3g} cm⁻² s⁻¹"
    if src.kind == "plasma":
        return f"plasma kT_e {src.electron_temperature_ev:.5g} eV, n_e {src.electron_density_cm3:.3g} cm⁻³"
    return f"{src.energy_ev:.5g} eV electrons, single collision"


def _table(header: list[str], rows: list[list[str]]) -> list[str]:
    """Right-aligned columns; a row of one cell is a section heading printed as it is."""
    cells = [r for r in rows if len(r) > 1]
    widths = [max([len(h)] + [len(r[j]) for r in cells]) for j, h in enumerate(header)]
    out = ["  ".join(h.rjust(w) for h, w in zip(header, widths))]
    out.append("  ".join("-" * w for w in widths))
    out += [r[0] if len(r) == 1 else "  ".join(c.rjust(w) for c, w in zip(r, widths)).rstrip() for r in rows]
    return out


def _g(v: Any, fmt: str = ".4g") -> str:
    if v is None or (isinstance(v, float) and math.isnan(v)):
        return "–"
    if isinstance(v, float) and math.isinf(v):
        return "never"
    return format(v, fmt)


def _ladder_rows(charges: list[int], subshells: list[str], target: int) -> set[int]:
    """Rows worth printing: all for short ladders, else the first two, every row where a new
    subshell opens, and the last few steps up to the target and beyond."""
    n = len(charges)
    if n <= 16:
        return set(range(n))
    keep = {0, 1}
    keep |= {i for i in range(1, n) if subshells[i] != subshells[i - 1]}
    keep |= {i for i, c in enumerate(charges) if c >= target - 4}
    return keep


class _TextReport:
    def __init__(self, report: Any) -> None:
        self.r = report
        self.s = report.scenario
        self.q = int(self.s.target.charge)

    def lines(self) -> list[str]:
        s, r = self.s, self.r
        t = s.target
        out = [f"chargecast plan: {s.title or Path(s.file).name}"]
        if s.description:
            out.append(s.description)
        out.append(f"scenario file: {s.file}")
        out.append(f"target: {t.label} (Z = {t.z}, A/q = {t.mass_number / t.charge:.4f})")
        out += self.source()
        out += self.ladder()
        out += self.one_photon()
        out += self.evolution()
        out += self.best_energy()
        out += self.ions()
        out += self.uncertainty()
        out += self.injection()
        out += self.dynamics()
        out += self.plasma()
        out += self.neighbourhood()
        out += self.recommendation()
        if r.warnings:
            out += ["", "Warnings (settings outside what the models were made for)"]
            out += [f"  - {w.message}" for w in r.warnings]
        if r.notes:
            out += ["", "Notes"] + [f"  - {n}" for n in r.notes]
        out += ["", "Cautions", *textwrap.wrap(r.cautions, 88, initial_indent="  ", subsequent_indent="  ")]
        return out

    def source(self) -> list[str]:
        s, r = self.s, self.r
        src = s.source
        out = ["", f"Source: {SOURCE_NAMES[src.kind]}"]
        if src.kind == "beam_trap":
            b = r.beam
            out.append(
                f"  beam {b.energy_ev:.6g} eV, {b.current_a:.4g} A, radius {b.radius_m * 1e6:.4g} µm, "
                f"current density {b.current_density_a_cm2:.4g} A/cm²; trap length {src.length_m:.4g} m, "
                f"ion temperature {src.ion_temperature_ev:.4g} eV"
            )
        elif src.kind == "photon_beam":
            out.append(f"  photons {src.photon_energy_ev:.6g} eV, flux {src.flux_cm2_s:.4g} cm⁻² s⁻¹")
        elif src.kind == "plasma":
            hot = (
                f", hot {src.hot_electron_temperature_ev:.5g} eV × {src.hot_electron_fraction:.3g}"
                if src.hot_electron_temperature_ev is not None and src.hot_electron_fraction > 0
                else ""
            )
            tau = src.confinement_time_s
            conf = (
                f"τ_q = {tau[0]:.3g} s · q^{src.confinement_exponent:g}"
                if src.confinement_exponent is not None
                else f"τ_q given for q = 1 … {len(tau)} ({tau[0]:.3g} … {tau[-1]:.3g} s)"
            )
            feed = ", ".join(f"{k} {v:.3g} Pa" for k, v in src.gas_feed_pa.items())
            out.append(
                f"  electrons kT_e {src.electron_temperature_ev:.5g} eV{hot}, "
                f"n_e {src.electron_density_cm3:.3g} cm⁻³; "
                f"ions kT_i {src.ion_temperature_ev:.3g} eV; confinement {conf}"
            )
            out.append(
                f"  gas fed: {feed}; neutral residence {src.neutral_residence_time_s:.3g} s, "
                f"wall recycling {src.wall_recycling:.3g}; volume {src.plasma_volume_m3 * 1e6:.4g} cm³, "
                f"extraction fraction {src.extraction_fraction:.3g}"
            )
        else:
            out.append(f"  electrons {src.energy_ev:.6g} eV, spread {src.energy_spread_ev:.4g} eV")
        out.append(f"  ion model: {MODEL_NAMES[r.model]}")
        d = r.dynamics
        if d is not None:
            feed = ", ".join(f"{k} {v:.3g} Pa" for k, v in d.gas_feed_pa.items()) or "none"
            out.append(
                f"  axial barrier {d.axial_barrier_v:.4g} V, "
                f"drift tube radius {d.drift_tube_radius_m * 1e3:.4g} mm, "
                f"{d.injected_atoms:.3e} atoms injected at t = 0; gas fed: {feed}"
            )
            out.append("  dynamic processes on: " + (", ".join(d.processes) or "none"))
        unit, fmt = (" cm⁻³", ".4g") if src.kind == "plasma" else ("", "g")
        species = ", ".join(
            f"{sp.name} ×{sp.amount:{fmt}}{unit}"
            + (f" (enters {sp.initial_charge}+)" if sp.initial_charge else "")
            for sp in s.species
        )
        out.append(f"  species: {species}")
        if s.residual_gas_pa:
            out.append(
                "  residual gas: " + ", ".join(f"{k} {v:.3g} Pa" for k, v in s.residual_gas_pa.items())
            )
        return out

    def ladder(self) -> list[str]:
        lad = self.r.ladder
        steps = lad.steps
        if not steps:
            return []
        s, q = self.s, self.q
        e = lad.energy_ev
        kind = s.source.kind
        sym = s.target.symbol
        sigma_name, time_name = "σ Lotz (cm²)", "breeding time (s)"
        if kind == "beam_trap":
            head = (
                f"Stepwise ionization of {sym} at {e:.6g} eV, {lad.current_density_a_cm2:.4g} A/cm² "
                "(ionization only: a lower bound on the time)"
            )
        elif kind == "photon_beam":
            head = (
                f"Stepwise photoionization of {sym} at {e:.6g} eV, "
                f"{s.source.flux_cm2_s:.3g} photons cm⁻² s⁻¹ "
                "(one charge per photon: an upper bound on the time)"
            )
            sigma_name, time_name = "σ photo (cm²)", "time (s)"
        elif kind == "plasma":
            head = (
                f"Stepwise ionization of {sym} in the plasma's electrons (cold kT_e {e:.6g} eV, "
                f"n_e {s.source.electron_density_cm3:.3g} cm⁻³; ionization only: a lower bound on the time)"
            )
            sigma_name, time_name = "⟨σv⟩/⟨v⟩ (cm²)", "time (s)"
        else:
            head = f"Ionization steps of {sym} (Lotz cross sections at {e:.6g} eV)"
        # Our layout: the steps grouped by the subshell they empty (a heading per group),
        # each with how far the beam is above its ionization energy, so an unopened step
        # or a step on a cliff shows at a glance.
        # One collision needs the sum of the ionization energies (the threshold), stepwise
        # sources each step's own.
        header = {
            "beam_trap": [
                "step",
                "IE (eV)",
                "beam − IE (eV)",
                sigma_name,
                time_name,
                "jτ (C/cm²)",
                "threshold (eV)",
            ],
            "photon_beam": ["step", "IE (eV)", "beam − IE (eV)", sigma_name, time_name, "threshold (eV)"],
            "electron_impact": ["step", "IE (eV)", "threshold (eV)", "beam − threshold (eV)", sigma_name],
            "plasma": ["step", "IE (eV)", sigma_name, time_name, "threshold (eV)"],
        }[kind]
        charges = [st.charge for st in steps]
        keep = _ladder_rows(charges, [st.subshell or "" for st in steps], q)
        rows: list[list[str]] = []
        group = None
        for i, st in enumerate(steps):
            if i not in keep:
                if i - 1 in keep:
                    rows.append(["⋮"] + [""] * (len(header) - 1))
                continue
            shell = st.subshell or "bare"
            if shell != group:
                group = shell
                rows.append([f"  · electron from {shell}" if st.subshell else "  · bare ion"])
            mark = " ◀ target" if st.charge == q else ""
            cells = {
                "step": f"{st.charge - 1}+→{st.charge}+{mark}",
                "IE (eV)": _g(st.ionization_energy_ev, ".5g"),
                "beam − IE (eV)": _g(e - st.ionization_energy_ev, "+.5g"),
                sigma_name: _g(st.cross_section_cm2, ".3e"),
                time_name: _g(st.breeding_time_s, ".3e"),
                "jτ (C/cm²)": _g(st.j_tau_c_cm2, ".3e"),
                "threshold (eV)": _g(st.threshold_ev, ".6g"),
                "beam − threshold (eV)": _g(e - st.threshold_ev, "+.5g"),
            }
            rows.append([cells[h] for h in header])
        out = ["", head, *_table(header, rows)]
        out.append(
            "  IE: energy to make q+ from (q−1)+ (negative beam − IE: the step is closed); "
            "threshold: sum from the neutral; σ at the beam energy"
        )
        if len(keep) < len(steps):
            out.append(
                "  (rows shown: the first steps, each newly opened subshell and the steps near the target; "
                "--json lists all)"
            )
        return out

    def one_photon(self) -> list[str]:
        th = self.r.photon_thresholds
        if th is None:
            return []
        header = ["charge", "Σ IE (eV)", "yield per photon", "via subshell (probability)"]
        rows = [
            [
                f"{row.charge}+",
                f"{row.threshold_ev:.6g}",
                _g(float(row.yield_per_photon), ".3g"),
                ", ".join(f"{rt.subshell} ({rt.probability:.2g})" for rt in row.routes) or "–",
            ]
            for row in th
            if row.yield_per_photon >= 1e-4
        ]
        top = max((row.charge for row in th), default=0)
        return [
            "",
            f"One photon of {self.s.source.photon_energy_ev:.6g} eV on neutral {self.s.target.symbol}: "
            f"charges it can make (up to {top}+ by energy; rows with yield ≥ 1e-4)",
            *_table(header, rows),
        ]

    def evolution(self) -> list[str]:
        r, q = self.r, self.q
        evo = r.target_evolution
        if evo is None:
            y = r.fractions_at_extraction[self.s.target_species.name]
            rows = [
                [f"{c}+" + (" ◀" if c == q else ""), _g(float(f), ".4f")] for c, f in enumerate(y) if f > 0.01
            ]
            if not rows:
                return []
            return [
                "",
                f"Single-collision yields of {self.s.target.symbol} (fraction of the ions made)",
                *_table(["charge", "yield (fraction)"], rows),
            ]
        header = ["charge", "peak fraction", "peak time (s)", "at extraction"]
        table = [
            [
                f"{x.charge}+" + (" ◀" if x.charge == q else ""),
                _g(x.peak_fraction, ".4f"),
                _g(x.peak_time_s, ".3e"),
                _g(x.fraction_at_extraction, ".4f"),
            ]
            for x in r.evolution_summary
            if max(1, q - 5) <= x.charge <= q + 3
        ]
        t = evo.times_s
        if r.plasma is not None:
            header[-1] = "steady state"
            return [
                "",
                f"Charge-state evolution of {evo.element} after the plasma is switched on "
                f"({t[0]:.3g} … {t[-1]:.3g} s, {len(t)} times; states near {q}+ above 1 %)",
                *_table(header, table),
                f"  continuous extraction from the steady state; mean charge there "
                f"{r.mean_charge_at_extraction:.2f} (neutrals included)",
            ]
        return [
            "",
            f"Charge-state evolution of {evo.element} ({t[0]:.3g} … {t[-1]:.3g} s, "
            f"{len(t)} times; states near {q}+ above 1 %)",
            *_table(header, table),
            f"  extraction at {r.extraction_time_s:.4g} s ({r.extraction_chosen}); mean charge there "
            f"{r.mean_charge_at_extraction:.2f}",
        ]

    def best_energy(self) -> list[str]:
        sc = self.r.best_energy
        s, q = self.s, self.q
        what = "photon" if s.source.kind == "photon_beam" else "electron"
        e = sc.energies_ev
        p = self.r.plasma
        if p is not None:
            t = p.scan_temperatures_ev
            k = int(abs(t - s.source.electron_temperature_ev).argmin())
            return [
                "",
                f"Best cold electron temperature for {s.target.isotope}{q}+ at steady state "
                f"({len(t)} temperatures {t[0]:.4g} … {t[-1]:.4g} eV, other settings kept)",
                f"  best: kT_e {p.best_temperature_ev:.5g} eV, {p.best_current_eua:.4g} eµA "
                f"of {s.target.isotope}{q}+",
                f"  near the scenario's {s.source.electron_temperature_ev:.5g} eV "
                f"({t[k]:.4g} eV on the grid): {float(p.scan_target_current_eua[k]):.4g} eµA, "
                f"fraction {float(p.scan_target_fraction[k]):.4f}",
                f"  after switch-on, over the time grid: the largest fraction {sc.best_fraction:.4f} "
                f"at {sc.best_energy_ev:.5g} eV and {sc.best_time_s:.3g} s",
            ]
        out = [
            "",
            f"Best {what} energy for {s.target.symbol}{q}+ ({len(e)} energies {e[0]:.4g} … {e[-1]:.4g} eV)",
        ]
        if sc.kind == "appearance":
            k = sc.own_index
            out[-1] += ": the largest partial cross section of one collision"
            out.append(
                f"  best: {sc.best_energy_ev:.5g} eV, σ({q}+) = {sc.best_cross_section_cm2:.3e} cm², "
                f"{sc.best_fraction:.4f} of the ions made"
            )
            out.append(
                f"  near the scenario's {sc.own_energy_ev:.5g} eV ({e[k]:.4g} eV on the grid): "
                f"σ({q}+) = {sc.target_cross_section_cm2[k]:.3e} cm², "
                f"{sc.target_share[k]:.4f} of the ions made"
            )
            return out
        line = f"  best: {sc.best_energy_ev:.5g} eV"
        if sc.best_time_s is not None:
            line += f" at {sc.best_time_s:.3g} s"
        out.append(line + f", fraction {sc.best_fraction:.4f}")
        if self.r.target_peak is not None:
            t, f = self.r.target_peak
            energy = s.source.energy_ev if s.source.energy_ev is not None else s.source.photon_energy_ev
            out.append(f"  at the scenario's {energy:.5g} eV: peak fraction {f:.4f} at {t:.3g} s")
        ro = self.r.robust_optimum
        if ro is not None:
            out.append(
                f"  robust (averaged over the beam's {ro.spread_ev:.3g} eV energy spread): "
                f"{ro.energy_ev:.5g} eV at {ro.time_s:.3g} s, fraction {ro.fraction:.4f}"
            )
            if ro.next_threshold_ev is not None and ro.margin_ev is not None:
                out.append(
                    f"  margin to the next threshold: {ro.margin_ev:.4g} eV "
                    f"(opens {s.target.symbol}{ro.next_threshold_charge}+ at {ro.next_threshold_ev:.5g} eV)"
                )
            if ro.sharp_near_threshold:
                out.append(
                    f"  ⚠ the sharp best {sc.best_energy_ev:.5g} eV sits on an ionization threshold (a cliff "
                    "within the beam's spread): use the robust energy"
                )
            if ro.on_scan_edge:
                out.append("  ⚠ the optimum is on the edge of the energy scan: widen [energy_scan]")
            if ro.at_last_time:
                out.append(
                    "  ⚠ the optimum is at the last time of the grid: the target may still be rising, "
                    "extend [time] stop_s"
                )
            if ro.near_threshold:
                out.append("  ⚠ the optimum lies within the energy spread of an ionization threshold")
            if ro.tube_voltage_v is not None:
                out.append(
                    f"  tube-to-cathode voltage for it on the beam axis (space-charge depression): "
                    f"{ro.tube_voltage_v:.5g} V"
                )
        return out

    def ions(self) -> list[str]:
        d = self.r.ions
        if d is None:
            return []
        t, q = self.s.target, self.q
        per = d.per_charge
        qs = range(max(1, q - 3), min(len(per) - 1, q + 3) + 1)
        rows = [
            [f"{t.isotope}{c}+" + (" ◀" if c == q else ""), _g(float(per[c]), ".3e")]
            for c in qs
            if per[c] >= 0.5 or c == q
        ]
        out = [
            "",
            f"Ions per extraction at {d.time_s:.4g} s (N_e = {d.electrons_in_trap:.4g} electrons, "
            f"compensation {d.compensation:.3g})",
            *_table(["ion", "ions per extraction"], rows),
        ]
        out.append(
            f"  {t.label}: {d.target:.3e} ions per extraction; all charge states of "
            f"{t.isotope}: {d.all_charges:.3e}"
        )
        iso = f"; isotopic share {d.isotope_share:.4g}" if d.isotope_share != 1.0 else ""
        if self.r.dynamics is not None:
            out.append(
                f"  N_q: the dynamic model's trapped ions of {d.species} (its share of the trapped charge "
                f"{d.species_share_of_charge:.3g}){iso}"
            )
        else:
            out.append("  N_q = f·N_e·F_q / Σ q·F_q, shared among species by amount × mean charge" + iso)
        return out

    def uncertainty(self) -> list[str]:
        u = self.r.uncertainty
        if u is None:
            return []
        f = u.factors
        t, peak, ions = self.r.target_peak, u.peak_time_s, u.ions_per_extraction
        nominal_ions = self.r.ions.target if self.r.ions is not None else None
        rows = [
            ["peak time (s)", _g(t[0], ".3e"), *(_g(v, ".3e") for v in peak)],
            ["peak fraction", _g(t[1], ".4f"), *(_g(v, ".4f") for v in u.peak_fraction)],
            ["ions per extraction", _g(nominal_ions, ".3e"), *(_g(v, ".3e") for v in ions)],
        ]
        return [
            "",
            f"Uncertainty of {self.s.target.label} (Monte Carlo over the process rates, {u.samples} samples, "
            f"seed {u.seed})",
            f"  1-σ lognormal factors: ionization ×{f['ionization_factor']:g}, radiative recombination "
            f"×{f['recombination_factor']:g}, charge exchange ×{f['charge_exchange_factor']:g}; "
            f"correlation along the charges {f['charge_correlation']:g}",
            *_table(["quantity", "nominal", "5 %", "50 %", "95 %"], rows),
            "  each sample extracts as the scenario does (at its own peak, or at the given time); "
            "other species keep their nominal fractions",
        ]

    def dynamics(self) -> list[str]:
        d = self.r.dynamics
        if d is None:
            return []
        t, q = self.s.target, self.q
        header = ["ion", "ions in trap", "kT (eV)", "overlap", "escape (ions/s)"]
        rows = [
            [
                f"{d.target_species}{row.charge}+" + (" ◀" if row.charge == q else ""),
                _g(row.ions, ".3e"),
                _g(row.temperature_ev, ".4g"),
                _g(row.overlap, ".3f"),
                _g(row.escape_per_s, ".3e"),
            ]
            for row in d.target_rows
        ]
        species = [
            [
                sp.label + (" (gas)" if sp.fed_only else ""),
                _g(sp.ions, ".3e"),
                _g(sp.mean_charge, ".2f"),
                _g(sp.mean_temperature_ev, ".4g"),
                _g(sp.escape_per_s, ".3e"),
            ]
            for sp in d.species_rows
        ]
        p, e = d.particles, d.energy_ev
        target_row = next((row for row in d.target_rows if row.charge == q), None)
        out = [
            "",
            f"Ion dynamics at {d.extraction_time_s:.4g} s (the extraction time): "
            f"{t.symbol}{q}+ and its neighbours",
            *_table(header, rows),
            "",
            "  species in the trap",
            *_table(["species", "ions", "mean charge", "mean kT (eV)", "escape (ions/s)"], species),
            "  (gas): ions of the fed gases and, unless residual_gas_ions is off, of the residual gas "
            "(molecules dissociated into atomic ions), made from their partial pressures",
            f"  compensation {d.compensation:.3g} of the electrons' charge; "
            f"radial well depth {d.well_depth_v:.4g} V",
            "  A/q spectrum: absolute ions per extraction for the target and the gas ions alike "
            "(purities are against this background)",
        ]
        if target_row is not None:
            out.append(
                f"  leaky-mode delivery of {d.target_species}{q}+ (escape over the barriers): "
                f"{target_row.escape_per_s:.3e} ions/s"
            )
        out.append(
            f"  bookkeeping: injected {p['injected']:.4g} + fed {p['fed']:.4g} − escaped {p['escaped']:.4g} "
            f"= trapped {p['trapped']:.4g} particles (largest miss {d.particle_balance:.1e} relative)"
        )
        out.append(
            f"  thermal energy: in {e['in']:.4g} eV, out {e['out']:.4g} eV, held {e['thermal']:.4g} eV "
            f"(largest miss {d.energy_balance:.1e} relative)"
        )
        return out

    def plasma(self) -> list[str]:
        p = self.r.plasma
        if p is None:
            return []
        t, q = self.s.target, self.q
        out = ["", "Extracted currents at steady state (eµA, I_q = η·q·e·n_q·V/τ_q)"]
        for e in p.elements:
            cur = e.currents_eua
            top = float(max(cur)) if len(cur) else 0.0
            rows = [
                [
                    f"{e.symbol}{c}+" + (" ◀" if e.symbol == t.symbol and c == q else ""),
                    _g(float(e.fractions[c]), ".4f"),
                    _g(float(e.densities_cm3[c]), ".3e"),
                    _g(float(cur[c]), ".4g"),
                ]
                for c in range(1, len(cur))
                if cur[c] >= 1e-3 * top or (e.symbol == t.symbol and c == q)
            ]
            tag = " (residual gas)" if e.residual else ""
            out += [
                "",
                f"  {e.symbol}{tag}: {e.total_current_eua:.4g} eµA in all charge states, "
                f"mean ion charge {e.mean_ion_charge:.2f}, fed {e.atom_density_cm3:.3e} atoms/cm³",
                *_table(["ion", "fraction", "n_q (cm⁻³)", "current (eµA)"], rows),
            ]
        iso = f" (isotopic share {p.isotope_share:.4g})" if p.isotope_share != 1.0 else ""
        out.append(f"  {t.label}: {p.target_current_eua:.4g} eµA{iso}")
        out.append(
            f"  ions' charge density Σ q·n_q = {p.ion_charge_density_cm3:.3e} cm⁻³ beside "
            f"n_e = {p.electron_density_cm3:.3e} cm⁻³ (the balance does not impose quasi-neutrality)"
        )
        out.append(
            "  the A/q spectrum below is the analysed beam: each line weighted by its extracted current "
            "(eµA), mixing and residual gas included; fractions in the ranking are shares of the "
            "isotope's current"
        )
        return out

    def injection(self) -> list[str]:
        c = self.r.injection
        if c is None:
            return []
        t, q = self.s.target, self.q
        parent = c.nuclides[0]
        eff = c.efficiency
        out = [
            "",
            f"Radioactive-beam cycle: {c.ions_per_bunch:.3e} {parent} ions per bunch at "
            f"{c.repetition_rate_hz:.4g} Hz, bred {c.breeding_time_s:.4g} s",
            "  decay daughters enter the network "
            + (
                'at their parent\'s charge state (daughter_charge = "parent")'
                if c.daughter_charge == "parent"
                else 'keeping the parent\'s electrons, at q + ΔZ (daughter_charge = "electrons_kept")'
            )
            + "; shake-off would raise them further",
            f"  per bunch: decayed before injection {c.decayed_before_injection:.3e}, not captured "
            f"{c.not_captured:.3e}; at extraction: extracted {c.trapped[-1]:.3e}, decayed in the trap "
            f"{c.decayed[-1] - c.decayed_before_injection:.3e}, lost {c.lost[-1] - c.not_captured:.3e}",
            f"  bookkeeping: extracted + decayed + lost = {c.trapped[-1] + c.decayed[-1] + c.lost[-1]:.6e} "
            f"of {c.ions_per_bunch:.6e} injected",
        ]
        rows = []
        for name, half in zip(c.nuclides, c.half_lives_s):
            per_s = c.extracted_per_s(name)
            total = float(per_s.sum())
            if total <= 0:
                continue
            best = int(per_s.argmax())
            at_q = float(per_s[q]) if q < len(per_s) else 0.0
            rows.append(
                [
                    name,
                    "stable" if half is None else f"{half:.4g} s",
                    f"{total:.3e}",
                    f"{at_q:.3e}",
                    f"{best}+",
                ]
            )
        out += _table(["nuclide", "half-life", "ions/s (all q)", f"ions/s at {q}+", "most ions"], rows)
        best, best_per_s = c.best_charge()
        out.append(
            f"  {t.isotope}{q}+: {float(c.extracted_per_s(parent)[q]):.3e} ions/s, efficiency "
            f"{float(eff[q]) * 100:.3g} % of the injected ions; most ions in {best}+: "
            f"{best_per_s:.3e} ions/s ({float(eff[best]) * 100:.3g} %)"
        )
        out.append(
            "  decay daughters are bred alongside and sit in the A/q spectrum as isobaric contaminants"
        )
        return out

    def neighbourhood(self) -> list[str]:
        o = self.r.neighbourhood
        if o is None:
            return ["", f"A/q neighbourhood of {self.s.target.label}: not computed (see the notes)"]
        header = [
            "ion",
            "m/q (u/e)",
            "A/q",
            "ions per extraction"
            if self.r.ions is not None
            else ("current (eµA)" if self.r.plasma is not None else "intensity"),
            "Δ(m/q)",
            "sep. (FWHM)",
            "contamination",
            "R needed",
        ]
        rows = [
            [
                i.ion + (" (gas)" if i.residual_gas else ""),
                f"{i.m_over_q:.5f}",
                f"{i.a_over_q:.4f}",
                _g(float(i.intensity), ".3g"),
                f"{i.delta_m_over_q:+.5f}",
                f"{i.separation_fwhm:.2f}",
                _g(float(i.contamination), ".3g"),
                f"{i.resolving_power_needed:.0f}",
            ]
            for i in o.interferers
        ]
        out = [
            "",
            f"A/q neighbourhood of {o.target} (m/q {o.m_over_q:.5f} u/e, A/q {o.a_over_q:.4f}; "
            f"R = {o.resolving_power:g}, {o.peak_shape} peaks, FWHM {o.fwhm:.4g} u/e)",
        ]
        if rows:
            out += _table(header, rows)
        else:
            out.append("  no other line within reach at this resolving power")
        out.append(f"  purity of {o.target} in its window: {o.purity:.4f}")
        if o.resolving_power_needed is not None:
            verdict = "resolved" if o.resolved else "NOT resolved"
            out.append(
                "  resolving power needed to split every interferer above 1 % contamination: "
                f"{o.resolving_power_needed:.0f} (separator: {o.resolving_power:g}: {verdict})"
            )
        return out

    def recommendation(self) -> list[str]:
        sep, q = self.s.separator, self.q
        header = ["ion", "A/q", "fraction", "purity", "score", "main contaminant"]
        rows = [
            [
                f"{rk.ion}" + (" ◀" if rk.charge == q else ""),
                f"{rk.a_over_q:.4f}",
                f"{rk.fraction:.4f}",
                f"{rk.purity:.4f}",
                f"{rk.score:.4f}",
                "–"
                if rk.main_contaminant is None
                else f"{rk.main_contaminant} ({rk.main_contaminant_share:.2g})",
            ]
            for rk in [rk for rk in self.r.ranking if rk.eligible][:8]
        ]
        rng = f", A/q {sep.aq_range[0]:g} … {sep.aq_range[1]:g}" if sep.aq_range is not None else ""
        out = ["", f"Charge states of {self.s.target.isotope} ranked by fraction × purity{rng}"]
        out += _table(header, rows) if rows else ["  none with at least 0.1 % of the isotope's ions"]
        rec = self.r.recommended
        if rec is not None:
            same = " (the target itself)" if rec.charge == q else ""
            t_ex = self.r.extraction_time_s
            at = f" at {t_ex:.3g} s" if t_ex is not None else ""
            share = "current" if self.r.plasma is not None else "ions"
            out.append(
                f"Recommended charge state: {rec.label}{same}: A/q {rec.a_over_q:.4f}, "
                f"{rec.fraction * 100:.3g} % of the isotope's {share}{at}, purity {rec.purity:.4f}"
            )
            if rec.peak_time_s is not None:
                out.append(
                    f"  {rec.label} itself peaks at {rec.peak_fraction * 100:.3g} % of the element's ions at "
                    f"{rec.peak_time_s:.3g} s: consider retuning the extraction time for it"
                )
        return out
