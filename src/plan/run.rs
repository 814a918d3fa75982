//! Running a scenario: every number of the report, computed once, here.

use super::defaults::{BAND_PERCENTILES, SPREAD_SAMPLES, THRESHOLD_SIDE_EV};
use super::report::*;
use super::settings::{geomspace, Scenario, SourceSettings, SpeciesEntry, Target};
use super::warnings::{source_warnings, threshold_warning, time_grid_warning, Warning};
use crate::atoms::Element;
use crate::error::Result;
use crate::processes::photoionization::subshell_cross_sections_cm2;
use crate::sources::appearance_curves;
use crate::sources::breeding::breeding_ladder;
use crate::sources::electron_beam::current_density_a_cm2;
use crate::sources::energy_map::{spread_averaged, EnergyTimeMap};
use crate::sources::photon_beam::photon_thresholds;
use crate::sources::rib_cycle::{run_cycle, CycleResult};
use crate::sources::Source;
use crate::spectrum::{
    aq_lines, clean_charge_states, overlaps, resolve_isotope, AcceptanceWindow, OverlapSettings,
    PeakShape, Peaks, SpeciesInput,
};

/// Progress callback: `(done, total, what)`.
pub type Progress<'a> = &'a mut dyn FnMut(usize, usize, &str);

/// Compute the report of a scenario. `progress(done, total, "energy scan")` is called
/// during the energy scan, the long step.
pub fn run(scenario: &Scenario, progress: Progress<'_>) -> Result<Report> {
    let s = scenario;
    let source = s.build_source()?;
    let target_el = s.target.element();
    let q = s.target.charge;
    let mut notes = Vec::new();
    let mut warnings: Vec<Warning> = source_warnings(&s.source);
    if let Some(w) = threshold_warning(s) {
        warnings.push(w);
    }

    let ladder = ladder(s, &source, target_el)?;
    let photon_thresholds = match &s.source {
        SourceSettings::PhotonBeam(p) => Some(photon_thresholds(target_el, p.photon_energy_ev)?),
        _ => None,
    };

    let mut evolutions = Vec::new();
    let mut extraction = None;
    let mut fractions_at_extraction = Vec::new();
    let mut ions = None;
    let mut robust = None;
    let mut dynamic_run = None;
    let mut dynamics = None;
    let mut plasma: Option<PlasmaReport> = None;
    let mut uncertainty: Option<UncertaintyBands> = None;
    let energy_scan;
    if let Source::ElectronImpact(src) = &source {
        for sp in &s.species {
            fractions_at_extraction.push(SpeciesFractions {
                name: sp.name.clone(),
                symbol: sp.symbol.clone(),
                fractions: src.charge_yields(sp.element())?,
            });
        }
        progress(0, 1, "energy scan");
        let scan = appearance_scan(s, src.energy_ev, src.energy_spread_ev, target_el)?;
        progress(1, 1, "energy scan");
        if scan.best_cross_section_cm2 <= 0.0 {
            notes.push(format!(
                "one collision never makes {}{q}+ on the energy grid: raise [energy_scan] stop_ev or choose a lower charge",
                s.target.symbol
            ));
        }
        energy_scan = EnergyScan::Appearance(scan);
    } else if let Source::Plasma(p) = &source {
        // Continuous extraction: the beam is the steady state; the evolution after the
        // plasma is switched on shows how soon it is reached.
        let times = s.time.times_s();
        for sp in &s.species {
            evolutions.push(SpeciesEvolution {
                name: sp.name.clone(),
                symbol: sp.symbol.clone(),
                times_s: times.clone(),
                fractions: p.evolve(sp.element(), &times, 0)?,
            });
        }
        let pr = plasma_report(s, p)?;
        for sp in &s.species {
            let el = pr.element(&sp.symbol).ok_or_else(|| {
                crate::error::Error::invalid("species", &sp.symbol, "must be fed to the plasma")
            })?;
            fractions_at_extraction.push(SpeciesFractions {
                name: sp.name.clone(),
                symbol: sp.symbol.clone(),
                fractions: el.fractions.clone(),
            });
        }
        notes.extend(crate::sources::plasma::quasi_neutrality_note(
            pr.ion_charge_density_cm3,
            pr.electron_density_cm3,
            "plasma.",
        ));
        plasma = Some(pr);
        let map = energy_map(s, &source, target_el, &times, progress)?;
        energy_scan = EnergyScan::Map(map);
    } else {
        let times = s.time.times_s();
        match &source {
            Source::BeamTrap(trap) if trap.model.dynamics().is_some() => {
                let (evos, run, injected) = super::dynamics::evolve(s, trap, &times)?;
                evolutions = evos;
                dynamic_run = Some((run, injected));
                notes.push(DYNAMIC_SCAN_NOTE.to_string());
            }
            _ => {
                for sp in &s.species {
                    evolutions.push(SpeciesEvolution {
                        name: sp.name.clone(),
                        symbol: sp.symbol.clone(),
                        times_s: times.clone(),
                        fractions: source.evolve(sp.element(), &times, sp.initial_charge)?,
                    });
                }
            }
        }
        let target_name = &s.target_species().name;
        let evo = evolutions
            .iter()
            .find(|e| &e.name == target_name)
            .expect("every species has an evolution");
        let (_, f_peak) = evo.peak(q);
        let t_ex = match s.time.extraction_s {
            Some(t) => (t, ExtractionChoice::Scenario),
            None => (evo.peak(q).0, ExtractionChoice::TargetPeak),
        };
        extraction = Some(t_ex);
        for e in &evolutions {
            fractions_at_extraction.push(SpeciesFractions {
                name: e.name.clone(),
                symbol: e.symbol.clone(),
                fractions: e.at(t_ex.0),
            });
        }
        let over_bred = time_grid_warning(s, times[0], evo.peak(q).0, evo.mean_charge()[0]);
        if let Some(w) = over_bred {
            notes.push(format!(
                "{}{q}+ is over-bred before the first time point {:.3e} s: lower [time] start_s (start earlier).",
                s.target.symbol, times[0]
            ));
            warnings.push(w);
        } else if f_peak < MIN_PRACTICAL_FRACTION {
            notes.push(format!(
                "{}{q}+ stays below 0.1 % on the time grid at this setting: see the best energy below, or extend [time] stop_s.",
                s.target.symbol
            ));
        }
        if let Source::BeamTrap(trap) = &source {
            if let Some((run, injected)) = dynamic_run.take() {
                let d = super::dynamics::report(s, trap, run, injected, t_ex.0)?;
                let iso = isotope_share(s.target_species(), &s.target);
                ions = Some(super::dynamics::ions_per_extraction(s, &d, iso)?);
                dynamics = Some(d);
            } else {
                ions = Some(ions_per_extraction(
                    s,
                    trap,
                    t_ex.0,
                    &fractions_at_extraction,
                )?);
                if let Some(u) = &s.uncertainty {
                    uncertainty = Some(uncertainty_bands(
                        s,
                        trap,
                        u,
                        &times,
                        t_ex,
                        &fractions_at_extraction,
                    )?);
                }
            }
        }
        let map = energy_map(s, &source, target_el, &times, progress)?;
        if let Source::BeamTrap(trap) = &source {
            let b = &trap.beam;
            let spread = trap.energy_spread_ev();
            let scan = (s.energy_scan.start_ev, s.energy_scan.stop_ev);
            let mut best = robust_optimum(&map, spread, target_el.ionization_energies_ev(), scan);
            if let (SourceSettings::BeamTrap(t), Some(tube)) =
                (&s.source, drift_tube_radius_m(s, &source))
            {
                best.tube_voltage_v = tube_voltage_v(
                    best.energy_ev,
                    t.current_a,
                    b.radius_m,
                    tube,
                    trap.compensation,
                );
            }
            robust = Some(best);
        }
        energy_scan = EnergyScan::Map(map);
    }

    let (evolution_summary, mean_charge_at_extraction, target_peak) = {
        let name = &s.target_species().name;
        // The fractions the ions leave with: at the extraction time, or a plasma's steady
        // state (its mean charge from the same formula, on that one row).
        let leaving = match (evolutions.iter().find(|e| &e.name == name), extraction) {
            (Some(evo), Some((t_ex, _))) => Some((
                evo,
                evo.at(t_ex),
                evo.mean_charge()[evo.nearest_index(t_ex)],
                Some(evo.peak(q)),
            )),
            (Some(evo), None) if plasma.is_some() => {
                let at = fractions_at_extraction
                    .iter()
                    .find(|f| &f.name == name)
                    .map(|f| f.fractions.clone())
                    .unwrap_or_default();
                let row = ndarray::Array2::from_shape_vec((1, at.len()), at.clone())
                    .map_err(|e| crate::error::Error::invalid("fractions", e, "one row"))?;
                let mean = crate::solve::evolution::mean_charge(row.view())[0];
                Some((evo, at, mean, None))
            }
            _ => None,
        };
        match leaving {
            Some((evo, at, mean, peak)) => {
                let rows = (0..=evo.fractions.ncols() as u32 - 1)
                    .filter(|c| {
                        evo.fractions
                            .column(*c as usize)
                            .iter()
                            .any(|v| *v > SUMMARY_THRESHOLD)
                    })
                    .map(|c| {
                        let (t, f) = evo.peak(c);
                        ChargeSummary {
                            charge: c,
                            peak_fraction: f,
                            peak_time_s: t,
                            final_fraction: evo.fractions[[evo.times_s.len() - 1, c as usize]],
                            fraction_at_extraction: at[c as usize],
                        }
                    })
                    .collect();
                (rows, Some(mean), peak)
            }
            None => (Vec::new(), None, None),
        }
    };

    // A plasma's residual-gas elements are weighted by their extracted current (eµA); with
    // the dynamic model the background ions are the run's own (fed and residual gas, from
    // the partial pressures) and already among its spectrum inputs.
    let residual_fractions = match (&plasma, &dynamics) {
        (Some(pr), _) => pr
            .elements
            .iter()
            .filter(|e| e.residual && e.total_current_eua > 0.0)
            .map(|e| (e.symbol.clone(), e.total_current_eua, e.current_shares()))
            .collect(),
        (None, Some(d)) => super::dynamics::background(s, d),
        (None, None) => residual_fractions(s, &source, extraction.map(|e| e.0))?,
    };
    let injection = match (&source, &s.injection) {
        (Source::BeamTrap(trap), Some(c)) => Some(run_cycle(trap, c, &[])?),
        _ => None,
    };
    if let (Some(c), Some(ions)) = (&injection, ions.as_mut()) {
        // The target's ions per extraction are the cycle's, not the trap's capacity.
        let per = c.extracted_per_bunch(0).to_vec();
        ions.isotope_share = 1.0;
        ions.target = per.get(q as usize).copied().unwrap_or(0.0);
        ions.all_charges = per.iter().sum();
        ions.per_charge = per;
    }
    if let (Source::BeamTrap(trap), Some(ions)) = (&source, &ions) {
        let residual_charge: f64 = residual_fractions
            .iter()
            .map(|(_, n, f)| n * f.iter().enumerate().map(|(q, v)| q as f64 * v).sum::<f64>())
            .sum();
        let capacity = trap.compensation * ions.electrons_in_trap;
        if residual_charge > RESIDUAL_CAPACITY_NOTE * capacity {
            notes.push(format!(
                "the residual-gas ions carry {:.0} % of the trap's compensated space charge ({:.3e} of {:.3e} charges): lower the pressures or breed shorter",
                100.0 * residual_charge / capacity,
                residual_charge,
                capacity
            ));
        }
    }
    let dynamic_inputs = match (&dynamics, &plasma) {
        (Some(d), _) => Some(super::dynamics::spectrum_inputs(s, d)),
        (None, Some(pr)) => Some(plasma_spectrum_inputs(s, pr)),
        _ => None,
    };
    let lines = spectrum_lines(
        s,
        &source,
        &fractions_at_extraction,
        // The dynamic model's inputs already hold its background ions; a plasma's inputs
        // are the fed gases only, its residual gas comes beside them.
        if dynamics.is_some() {
            &[]
        } else {
            &residual_fractions
        },
        injection.as_ref(),
        dynamic_inputs,
    )?;
    // An unreachable target has no line of its own: the report says so and goes on.
    let neighbourhood = match neighbourhood(s, &lines) {
        Ok(n) => Some(n),
        Err(crate::error::Error::NoData { what, why }) => {
            notes.push(format!(
                "no A/q neighbourhood of {}: no data for {what} ({why})",
                s.target.label()
            ));
            None
        }
        Err(e) => return Err(e),
    };
    let ranking = match ranking(s, &lines) {
        Ok(r) => r,
        Err(crate::error::Error::NoData { what, why }) => {
            notes.push(format!(
                "no charge-state ranking: no data for {what} ({why})"
            ));
            Vec::new()
        }
        Err(e) => return Err(e),
    };
    let recommended = ranking.iter().find(|r| r.eligible).map(|r| {
        let l = &r.rank.line;
        let own_peak = match (
            s.target_species(),
            evolutions
                .iter()
                .find(|e| e.name == s.target_species().name),
        ) {
            // A plasma extracts continuously: no extraction time to retune.
            (_, Some(evo)) if l.charge != q && plasma.is_none() => Some(evo.peak(l.charge)),
            _ => None,
        };
        Recommendation {
            charge: l.charge,
            label: l.label(),
            a_over_q: l.a_over_q,
            m_over_q: l.m_over_q,
            fraction: r.rank.fraction,
            purity: r.rank.purity,
            score: r.rank.score,
            main_contaminant: r.rank.main_contaminant.as_ref().map(|c| c.label()),
            own_peak,
        }
    });
    if recommended.is_none() {
        notes.push(
            "no charge state of the target isotope lies in the A/q range with ≥ 0.1 % of its ions"
                .to_string(),
        );
    }
    Ok(Report {
        scenario: s.clone(),
        source,
        ladder,
        photon_thresholds,
        evolutions,
        extraction,
        fractions_at_extraction,
        evolution_summary,
        mean_charge_at_extraction,
        target_peak,
        energy_scan,
        robust_optimum: robust,
        ions,
        residual_fractions,
        injection,
        lines,
        neighbourhood,
        ranking,
        recommended,
        notes,
        warnings,
        dynamics,
        plasma,
        uncertainty,
    })
}

/// The `[uncertainty]` bands of the target: Monte Carlo samples of the trap's process
/// rates, each sample's peak, and its ions per extraction read off as the nominal run
/// reads them.
fn uncertainty_bands(
    s: &Scenario,
    trap: &crate::sources::BeamTrap,
    u: &super::settings::UncertaintySettings,
    times: &[f64],
    extraction: (f64, ExtractionChoice),
    fractions: &[SpeciesFractions],
) -> Result<UncertaintyBands> {
    use crate::solve::evolution;
    let sp = s.target_species();
    let q = s.target.charge as usize;
    let pops = crate::sources::uncertainty::monte_carlo(
        trap,
        sp.element(),
        sp.initial_charge,
        times,
        &u.factors,
        u.seed,
        0,
        u.samples,
    )?;
    let (mut peak_t, mut peak_f, mut ions) = (Vec::new(), Vec::new(), Vec::new());
    for sample in pops.outer_iter() {
        let (t, f) = evolution::peak(times, sample, q);
        let t_ex = match extraction.1 {
            ExtractionChoice::TargetPeak => t,
            ExtractionChoice::Scenario => extraction.0,
        };
        let own: Vec<SpeciesFractions> = fractions
            .iter()
            .map(|x| SpeciesFractions {
                fractions: if x.name == sp.name {
                    evolution::interpolate(times, sample, t_ex)
                } else {
                    x.fractions.clone()
                },
                ..x.clone()
            })
            .collect();
        peak_t.push(t);
        peak_f.push(f);
        ions.push(ions_per_extraction(s, trap, t_ex, &own)?.target);
    }
    let band = |v: &mut Vec<f64>| BAND_PERCENTILES.map(|p| percentile(v, p));
    let column = |p: f64| -> Vec<f64> {
        (0..times.len())
            .map(|k| {
                let mut v: Vec<f64> = pops.outer_iter().map(|x| x[[k, q]]).collect();
                percentile(&mut v, p)
            })
            .collect()
    };
    Ok(UncertaintyBands {
        samples: u.samples,
        seed: u.seed,
        factors: u.factors,
        peak_time_s: band(&mut peak_t),
        peak_fraction: band(&mut peak_f),
        ions_per_extraction: band(&mut ions),
        target_fraction: BAND_PERCENTILES.map(column),
    })
}

/// The `p`-th percentile (0…100) of `values` (sorted in place), linear between the order
/// statistics at rank (n − 1)·p/100 — numpy's default method.
pub fn percentile(values: &mut [f64], p: f64) -> f64 {
    values.sort_by(f64::total_cmp);
    let n = values.len();
    if n == 0 {
        return f64::NAN;
    }
    let h = (n - 1) as f64 * p.clamp(0.0, 100.0) / 100.0;
    let lo = h.floor() as usize;
    let hi = (lo + 1).min(n - 1);
    values[lo] + (h - lo as f64) * (values[hi] - values[lo])
}

/// The steady state of every element of a plasma source, its extracted currents, and the
/// target's steady state over the cold electron temperatures of the energy grid.
fn plasma_report(s: &Scenario, p: &crate::sources::PlasmaSource) -> Result<PlasmaReport> {
    let mut elements = Vec::new();
    let mut charge_density = 0.0;
    for sp in p.species() {
        let n = p.steady_state(sp.element)?;
        let total: f64 = n.iter().sum();
        let ions: f64 = n.iter().skip(1).sum();
        let q_n: f64 = n.iter().enumerate().map(|(q, v)| q as f64 * v).sum();
        charge_density += q_n;
        let currents = p.currents_eua(&n)?;
        elements.push(PlasmaElement {
            symbol: sp.element.symbol().to_string(),
            residual: sp.residual,
            atom_density_cm3: sp.atom_density_cm3,
            fractions: n
                .iter()
                .map(|v| if total > 0.0 { v / total } else { 0.0 })
                .collect(),
            total_current_eua: currents.iter().sum(),
            currents_eua: currents,
            mean_ion_charge: if ions > 0.0 { q_n / ions } else { 0.0 },
            densities_cm3: n,
        });
    }
    let el = s.target.element();
    let q = s.target.charge as usize;
    let iso = isotope_share(s.target_species(), &s.target);
    let target_current = |src: &crate::sources::PlasmaSource| -> Result<(f64, f64)> {
        let n = src.steady_state(el)?;
        let total: f64 = n.iter().sum();
        let i = src.currents_eua(&n)?;
        Ok((
            if total > 0.0 { n[q] / total } else { 0.0 },
            iso * i.get(q).copied().unwrap_or(0.0),
        ))
    };
    let temperatures = s.energy_scan.energies_ev();
    let mut fraction = Vec::with_capacity(temperatures.len());
    let mut current = Vec::with_capacity(temperatures.len());
    for t in &temperatures {
        let (f, i) = target_current(&p.with_energy(*t)?)?;
        fraction.push(f);
        current.push(i);
    }
    let best = nearest_max(&current);
    Ok(PlasmaReport {
        target_current_eua: target_current(p)?.1,
        elements,
        electron_density_cm3: p.settings().electron_density_cm3,
        ion_charge_density_cm3: charge_density,
        isotope_share: iso,
        best_temperature_ev: temperatures[best],
        best_current_eua: current[best],
        scan_temperatures_ev: temperatures,
        scan_target_fraction: fraction,
        scan_target_current_eua: current,
    })
}

/// The fed elements of a plasma on the A/q axis, each weighted by its extracted current
/// (eµA): the analysed beam (residual-gas elements are added beside them).
fn plasma_spectrum_inputs(s: &Scenario, pr: &PlasmaReport) -> Vec<SpeciesInput> {
    s.species
        .iter()
        .filter_map(|sp| pr.element(&sp.symbol))
        .map(|e| SpeciesInput {
            spec: e.symbol.clone(),
            amount: e.total_current_eua,
            fractions: e.current_shares(),
            residual: false,
        })
        .collect()
}

/// Said in every dynamic-model report: which parts use which model.
pub const DYNAMIC_SCAN_NOTE: &str = "the evolution, fractions and ions per extraction come from the ion-dynamics model at the scenario's energy; the energy scan (best and robust energy) uses the fixed model, since one dynamic evolution costs about as much as the whole fixed-model map";

/// Stepwise breeding of the target element: Lotz steps in an electron beam (the time at the
/// trap's current density), photoionization steps in a photon beam with one charge per
/// photon (an upper bound on the time, since inner-shell holes add charges in jumps).
fn ladder(s: &Scenario, source: &Source, el: &'static Element) -> Result<Ladder> {
    let top = el.z().min(s.target.charge + LADDER_BEYOND_TARGET);
    let energy_ev = s.source.energy_ev();
    let ies = el.ionization_energies_ev();
    let step = |i: u32, sigma: f64, time: Option<f64>, j_tau: Option<f64>| -> Result<LadderStep> {
        Ok(LadderStep {
            charge: i + 1,
            ionization_energy_ev: ies[i as usize],
            threshold_ev: el.ion(i64::from(i) + 1)?.threshold_ev(),
            subshell: el.ion(i64::from(i))?.ionized_subshell().map(|x| x.label()),
            cross_section_cm2: sigma,
            breeding_time_s: time,
            j_tau_c_cm2: j_tau,
        })
    };
    let mut steps = Vec::with_capacity(top as usize);
    match source {
        Source::PhotonBeam(p) => {
            let mut time = 0.0;
            for i in 0..top {
                let ion = el.ion(i64::from(i))?;
                let sigma: f64 = subshell_cross_sections_cm2(&ion, energy_ev)?
                    .iter()
                    .map(|x| x.cross_section_cm2)
                    .sum();
                let rate = sigma * p.flux_cm2_s;
                time += if rate > 0.0 {
                    1.0 / rate
                } else {
                    f64::INFINITY
                };
                steps.push(step(i, sigma, Some(time), None)?);
            }
            return Ok(Ladder {
                energy_ev,
                current_density_a_cm2: None,
                cross_section_kind: "photoionization",
                steps,
            });
        }
        Source::BeamTrap(t) => {
            let j = current_density_a_cm2(t.beam.current_a, t.beam.radius_m);
            for b in breeding_ladder(el, i64::from(top), energy_ev, j, None)? {
                let i = b.charge;
                steps.push(step(
                    i,
                    b.cross_section_cm2,
                    Some(b.time_to_next_s),
                    Some(b.j_tau_c_cm2),
                )?);
            }
            return Ok(Ladder {
                energy_ev,
                current_density_a_cm2: Some(j),
                cross_section_kind: "lotz",
                steps,
            });
        }
        Source::Plasma(p) => {
            // Maxwellian steps: time 1/(n_e S_q); the cross section shown is the effective
            // ⟨σv⟩/⟨v⟩ of the electron distribution (⟨v⟩ of the cold Maxwellian).
            let settings = p.settings();
            let mean_speed_cm_s = crate::processes::lotz::maxwellian_speed_factor_cm_s()
                * settings.electron_temperature_ev.sqrt();
            let mut time = 0.0;
            for i in 0..top {
                let k = p.ionization_rate_coefficient_cm3_s(el, i)?;
                let rate = settings.electron_density_cm3 * k;
                time += if rate > 0.0 {
                    1.0 / rate
                } else {
                    f64::INFINITY
                };
                steps.push(step(i, k / mean_speed_cm_s, Some(time), None)?);
            }
            return Ok(Ladder {
                energy_ev,
                current_density_a_cm2: None,
                cross_section_kind: "lotz_maxwellian",
                steps,
            });
        }
        Source::ElectronImpact(_) => {
            for b in breeding_ladder(el, i64::from(top), energy_ev, 1.0, None)? {
                steps.push(step(
                    b.charge,
                    b.cross_section_cm2,
                    None,
                    Some(b.j_tau_c_cm2),
                )?);
            }
        }
    }
    Ok(Ladder {
        energy_ev,
        current_density_a_cm2: None,
        cross_section_kind: "lotz",
        steps,
    })
}

/// Target fraction over the energy × time grid, the scenario's own energy added to the
/// grid when it lies within it (so the best point is never worse than the scenario's).
fn energy_map(
    s: &Scenario,
    source: &Source,
    el: &'static Element,
    times: &[f64],
    progress: Progress<'_>,
) -> Result<crate::sources::energy_map::EnergyTimeMap> {
    let mut energies = s.energy_scan.energies_ev();
    let (lo, hi) = (energies[0], energies[energies.len() - 1]);
    let own = s.source.energy_ev();
    if lo <= own && own <= hi {
        energies.push(own);
    }
    // Both sides of the thresholds that open, and over-breed, the target: the fraction
    // jumps there, and the spread-averaged optimum must see the jump, not a straight line
    // across it.
    if let Source::BeamTrap(_) = source {
        let ies = el.ionization_energies_ev();
        let q = s.target.charge as usize;
        for ie in ies.iter().take(q + 2).skip(q.saturating_sub(1)) {
            for e in [ie - THRESHOLD_SIDE_EV, ie + THRESHOLD_SIDE_EV] {
                if lo < e && e < hi {
                    energies.push(e);
                }
            }
        }
    }
    energies.sort_by(f64::total_cmp);
    energies.dedup();
    source.energy_time_map(
        el,
        &[s.target.charge],
        &energies,
        times,
        &mut |done, total| progress(done, total, "energy scan"),
    )
}

/// The best point of the map averaged over the beam's energy spread, with its flags.
/// `ionization_energies_ev[k]` opens charge k + 1; `scan` is the scan's first and last
/// energy (eV).
pub fn robust_optimum(
    map: &EnergyTimeMap,
    spread_ev: f64,
    ionization_energies_ev: &[f64],
    scan: (f64, f64),
) -> RobustOptimum {
    let averaged = spread_averaged(&map.energies_ev, &map.fraction, spread_ev, SPREAD_SAMPLES);
    let mut best = (0, 0, f64::NEG_INFINITY);
    for (i, row) in averaged.iter().enumerate() {
        for (k, v) in row.iter().enumerate() {
            if *v > best.2 {
                best = (i, k, *v);
            }
        }
    }
    let energy_ev = map.energies_ev[best.0];
    let next = ionization_energies_ev
        .iter()
        .enumerate()
        .filter(|(_, ie)| **ie > energy_ev)
        .min_by(|a, b| a.1.total_cmp(b.1))
        .map(|(k, ie)| (k as u32 + 1, *ie));
    // Relative tolerance: the scan's ends are exact grid values, but say so for values
    // within rounding of them too.
    let tol = 1e-9 * scan.1.abs();
    let near = |e: f64| {
        ionization_energies_ev
            .iter()
            .any(|ie| (ie - e).abs() <= 0.5 * spread_ev.max(2.0 * THRESHOLD_SIDE_EV))
    };
    RobustOptimum {
        spread_ev,
        energy_ev,
        time_s: map.times_s[best.1],
        fraction: best.2.max(0.0),
        sharp_energy_ev: map.best_energy_ev,
        on_scan_edge: energy_ev <= scan.0 + tol || energy_ev >= scan.1 - tol,
        at_last_time: best.1 + 1 == map.times_s.len() && map.times_s.len() > 1,
        near_threshold: near(energy_ev),
        sharp_near_threshold: near(map.best_energy_ev),
        next_threshold: next,
        margin_ev: next.map(|(_, ie)| ie - energy_ev),
        tube_voltage_v: None,
    }
}

/// The drift-tube radius of a beam trap scenario, when given.
fn drift_tube_radius_m(s: &Scenario, source: &Source) -> Option<f64> {
    if let Source::BeamTrap(trap) = source {
        if let Some(d) = trap.model.dynamics() {
            return Some(d.drift_tube_radius_m);
        }
    }
    match &s.source {
        SourceSettings::BeamTrap(t) => t.drift_tube_radius_m,
        _ => None,
    }
}

/// Tube-to-cathode voltage (V) whose on-axis energy after the space-charge depression is
/// `energy_ev`: the inverse of [`crate::sources::electron_beam::effective_energy_ev`] by
/// bisection (the on-axis energy rises with the voltage). None if the beam cannot carry
/// its current at any voltage up to 10 × the energy.
fn tube_voltage_v(
    energy_ev: f64,
    current_a: f64,
    beam_radius_m: f64,
    tube_radius_m: f64,
    compensation: f64,
) -> Option<f64> {
    use crate::sources::electron_beam::effective_energy_ev;
    let on_axis =
        |u: f64| effective_energy_ev(u, current_a, beam_radius_m, tube_radius_m, compensation).ok();
    let (mut lo, mut hi) = (energy_ev, 10.0 * energy_ev);
    if on_axis(hi)? < energy_ev {
        return None;
    }
    for _ in 0..100 {
        let mid = 0.5 * (lo + hi);
        match on_axis(mid) {
            Some(e) if e >= energy_ev => hi = mid,
            _ => lo = mid,
        }
    }
    Some(hi)
}

fn appearance_scan(
    s: &Scenario,
    own_energy_ev: f64,
    spread_ev: f64,
    el: &'static Element,
) -> Result<AppearanceScan> {
    let energies = s.energy_scan.energies_ev();
    let sigma = appearance_curves(el, &energies, spread_ev)?;
    let q = s.target.charge as usize;
    let target: Vec<f64> = sigma.column(q).to_vec();
    let share: Vec<f64> = sigma
        .rows()
        .into_iter()
        .zip(&target)
        .map(|(row, t)| {
            let total: f64 = row.iter().skip(1).sum();
            if total > 0.0 {
                t / total
            } else {
                0.0
            }
        })
        .collect();
    let best = nearest_max(&target);
    Ok(AppearanceScan {
        own_index: crate::solve::evolution::nearest_index(&energies, own_energy_ev),
        best_energy_ev: energies[best],
        best_cross_section_cm2: target[best],
        best_fraction: share[best],
        energies_ev: energies,
        cross_sections_cm2: sigma,
        charge: s.target.charge,
        own_energy_ev,
        target_cross_section_cm2: target,
        target_share: share,
    })
}

/// Index of the largest value (the first if tied).
fn nearest_max(v: &[f64]) -> usize {
    let mut best = (0, f64::NEG_INFINITY);
    for (i, x) in v.iter().enumerate() {
        if *x > best.1 {
            best = (i, *x);
        }
    }
    best.0
}

/// Natural abundance of the target isotope in a species (1 for an isotope given alone).
fn isotope_share(species: &SpeciesEntry, target: &Target) -> f64 {
    if species.mass_number.is_some() {
        return 1.0;
    }
    species
        .element()
        .isotopes()
        .iter()
        .find(|i| i.mass_number == target.mass_number)
        .and_then(|i| i.abundance)
        .unwrap_or(0.0)
}

/// Ions per extraction of the target isotope. Ions of all species share the compensated
/// space charge in proportion to amount × mean charge.
fn ions_per_extraction(
    s: &Scenario,
    trap: &crate::sources::BeamTrap,
    time_s: f64,
    fractions: &[SpeciesFractions],
) -> Result<IonsPerExtraction> {
    let load = |sp: &SpeciesEntry| -> f64 {
        let f = &fractions
            .iter()
            .find(|x| x.name == sp.name)
            .expect("fractions per species")
            .fractions;
        sp.amount * f.iter().enumerate().map(|(q, v)| q as f64 * v).sum::<f64>()
    };
    let total: f64 = s.species.iter().map(load).sum();
    let sp = s.target_species();
    let share = if total > 0.0 { load(sp) / total } else { 0.0 };
    let f = &fractions
        .iter()
        .find(|x| x.name == sp.name)
        .expect("fractions per species")
        .fractions;
    let single = trap.ions_per_extraction(f)?;
    let iso = isotope_share(sp, &s.target);
    let per: Vec<f64> = single.iter().map(|n| n * share).collect();
    Ok(IonsPerExtraction {
        time_s,
        electrons_in_trap: trap.electrons_in_trap(),
        compensation: trap.compensation,
        species: sp.name.clone(),
        species_share_of_charge: share,
        isotope_share: iso,
        target: per[s.target.charge as usize] * iso,
        all_charges: per.iter().sum::<f64>() * iso,
        per_charge: per.iter().map(|n| n * iso).collect(),
    })
}

/// Residual-gas elements with their amounts and charge-state fractions (amount × fraction
/// is what the A/q spectrum shows).
///
/// * Beam trap: absolute ions per extraction from the partial pressures
///   ([`crate::sources::residual_gas`]: gas density × beam volume × Lotz ionization, bred
///   from an empty trap over the extraction time).
/// * Sources without a trap volume (photon beam, single collision): the species' `amount`
///   is read as its partial pressure (Pa), and each residual element gets the
///   atom-weighted partial pressure Σ_gas p·ν of its gases; a single collision gives it
///   its yields, a photon beam the time average of its evolution over ages 0…t (gas keeps
///   streaming in).
fn residual_fractions(
    s: &Scenario,
    source: &Source,
    extraction_s: Option<f64>,
) -> Result<Vec<(String, f64, Vec<f64>)>> {
    if let (Source::BeamTrap(trap), Some(t_ex)) = (source, extraction_s) {
        return Ok(trap
            .residual_ions(t_ex)?
            .into_iter()
            .filter_map(|r| {
                let total: f64 = r.per_charge.iter().sum();
                (total > 0.0).then(|| {
                    let f = r.per_charge.iter().map(|n| n / total).collect();
                    (r.symbol, total, f)
                })
            })
            .collect());
    }
    let mut out = Vec::new();
    for (symbol, pressure_pa) in residual_atom_pressures_pa(s)? {
        let el = crate::atoms::element(&symbol)?;
        let f = match (source, extraction_s) {
            (Source::ElectronImpact(src), _) => src.charge_yields(el)?,
            (_, Some(t_ex)) => {
                let t = geomspace(t_ex * RESIDUAL_AGE_START, t_ex, RESIDUAL_AGE_POINTS);
                let pops = source.evolve(el, &t, 0)?;
                let w = gradient(&t);
                let wsum: f64 = w.iter().sum();
                (0..pops.ncols())
                    .map(|c| {
                        pops.column(c)
                            .iter()
                            .zip(&w)
                            .map(|(p, w)| p * w)
                            .sum::<f64>()
                            / wsum
                    })
                    .collect()
            }
            _ => continue,
        };
        out.push((symbol, pressure_pa, f));
    }
    Ok(out)
}

/// Σ_gas p·ν per residual element (Pa): the partial pressure of its atoms.
fn residual_atom_pressures_pa(s: &Scenario) -> Result<Vec<(String, f64)>> {
    let mut out: Vec<(String, f64)> = Vec::new();
    for (name, p) in &s.residual_gas_pa {
        for (symbol, n) in crate::processes::gases::gas(name)?.atoms {
            match out.iter_mut().find(|(x, _)| x == symbol) {
                Some(slot) => slot.1 += p * f64::from(*n),
                None => out.push(((*symbol).to_string(), p * f64::from(*n))),
            }
        }
    }
    out.retain(|(_, p)| *p > 0.0);
    Ok(out)
}

/// Central differences of a sequence (one-sided at the ends), as weights of its points.
fn gradient(t: &[f64]) -> Vec<f64> {
    let n = t.len();
    (0..n)
        .map(|i| match i {
            0 => t[1] - t[0],
            _ if i == n - 1 => t[n - 1] - t[n - 2],
            _ => (t[i + 1] - t[i - 1]) / 2.0,
        })
        .collect()
}

/// The species' spectrum inputs. In a beam trap every species' ions per extraction are
/// absolute: the compensated space charge shared in proportion to amount × mean charge
/// ([`crate::sources::BeamTrap::ions_per_extraction`]); with a breeding cycle the target
/// species is replaced by the extracted ions of every nuclide of its decay chain (the
/// daughters are isobaric contaminants). Other sources keep the scenario's amounts.
fn species_inputs(
    s: &Scenario,
    source: &Source,
    fractions: &[SpeciesFractions],
    cycle: Option<&CycleResult>,
) -> Result<Vec<SpeciesInput>> {
    let of = |sp: &SpeciesEntry| -> Vec<f64> {
        fractions
            .iter()
            .find(|f| f.name == sp.name)
            .map(|f| f.fractions.clone())
            .unwrap_or_default()
    };
    let load = |sp: &SpeciesEntry| -> f64 {
        sp.amount
            * of(sp)
                .iter()
                .enumerate()
                .map(|(q, v)| q as f64 * v)
                .sum::<f64>()
    };
    let total: f64 = s.species.iter().map(load).sum();
    let target_name = &s.target_species().name;
    let mut inputs = Vec::new();
    for sp in &s.species {
        match (source, cycle) {
            (Source::BeamTrap(_), Some(c)) if &sp.name == target_name => {
                for (k, n) in c.nuclides.iter().enumerate() {
                    let per = c.extracted_per_bunch(k);
                    let sum: f64 = per.iter().sum();
                    if sum > 0.0 {
                        inputs.push(SpeciesInput {
                            spec: n.label(),
                            amount: sum,
                            fractions: per.iter().map(|x| x / sum).collect(),
                            residual: false,
                        });
                    }
                }
            }
            (Source::BeamTrap(trap), _) => {
                let share = if total > 0.0 { load(sp) / total } else { 0.0 };
                let per: Vec<f64> = trap
                    .ions_per_extraction(&of(sp))?
                    .iter()
                    .map(|n| n * share)
                    .collect();
                let sum: f64 = per.iter().sum();
                inputs.push(SpeciesInput {
                    spec: sp.name.clone(),
                    amount: sum,
                    fractions: if sum > 0.0 {
                        per.iter().map(|x| x / sum).collect()
                    } else {
                        of(sp)
                    },
                    residual: false,
                });
            }
            _ => inputs.push(SpeciesInput {
                spec: sp.name.clone(),
                amount: sp.amount,
                fractions: of(sp),
                residual: false,
            }),
        }
    }
    Ok(inputs)
}

/// The A/q lines of the species (or, with the dynamic model, of `species` as
/// [`super::dynamics::spectrum_inputs`] gives them) and the residual gas.
fn spectrum_lines(
    s: &Scenario,
    source: &Source,
    fractions: &[SpeciesFractions],
    residual: &[(String, f64, Vec<f64>)],
    cycle: Option<&CycleResult>,
    species: Option<Vec<SpeciesInput>>,
) -> Result<crate::spectrum::LineList> {
    let mut inputs: Vec<SpeciesInput> = match species {
        Some(v) => v,
        None => species_inputs(s, source, fractions, cycle)?,
    };
    inputs.extend(residual.iter().map(|(sym, amount, f)| SpeciesInput {
        spec: sym.clone(),
        amount: *amount,
        fractions: f.clone(),
        residual: true,
    }));
    aq_lines(&inputs)
}

fn peaks(s: &Scenario) -> Result<Peaks> {
    Peaks::new(
        s.separator.resolving_power,
        PeakShape::parse(&s.separator.peak_shape)?,
    )
}

fn neighbourhood(s: &Scenario, lines: &crate::spectrum::LineList) -> Result<Neighbourhood> {
    let sep = &s.separator;
    let settings = OverlapSettings::new(
        sep.resolving_power,
        PeakShape::parse(&sep.peak_shape)?,
        sep.window_fwhm,
        SEARCH_FWHM,
    )?;
    let iso = resolve_isotope(&s.target.isotope)?;
    let overlap = overlaps(lines, iso, i64::from(s.target.charge), &settings)?;
    let needed = overlap
        .interferences
        .iter()
        .filter(|i| i.contamination > STRONG_CONTAMINATION)
        .map(|i| i.resolving_power_needed)
        .fold(None, |m: Option<f64>, r| Some(m.map_or(r, |m| m.max(r))));
    Ok(Neighbourhood {
        resolved: needed.is_some_and(|r| r <= sep.resolving_power),
        resolving_power_needed: needed,
        overlap,
    })
}

fn ranking(s: &Scenario, lines: &crate::spectrum::LineList) -> Result<Vec<RankedCharge>> {
    let sep = &s.separator;
    let window = match (sep.aq_half_width, sep.relative_half_width) {
        (Some(w), _) => AcceptanceWindow::HalfWidth(w),
        (_, Some(w)) => AcceptanceWindow::Relative(w),
        _ => AcceptanceWindow::Fwhm(sep.window_fwhm),
    };
    let iso = resolve_isotope(&s.target.isotope)?;
    let ranks = clean_charge_states(lines, iso, window, Some(peaks(s)?))?;
    Ok(ranks
        .into_iter()
        .map(|rank| {
            let in_range = sep
                .aq_range
                .is_none_or(|(lo, hi)| lo <= rank.line.a_over_q && rank.line.a_over_q <= hi);
            RankedCharge {
                eligible: in_range && rank.fraction >= MIN_PRACTICAL_FRACTION,
                rank,
            }
        })
        .collect())
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A made-up one-time map over `energies` with fraction `f(e)`.
    fn map(energies: &[f64], f: impl Fn(f64) -> f64) -> EnergyTimeMap {
        let fraction: Vec<Vec<f64>> = energies.iter().map(|e| vec![f(*e)]).collect();
        let best = (0..energies.len())
            .max_by(|a, b| fraction[*a][0].total_cmp(&fraction[*b][0]))
            .unwrap();
        EnergyTimeMap {
            energies_ev: energies.to_vec(),
            times_s: vec![1.0],
            best_energy_ev: energies[best],
            best_time_s: 1.0,
            best_fraction: fraction[best][0],
            fraction,
        }
    }

    #[test]
    fn a_sharp_optimum_on_a_cliff_moves_away_by_the_spread_and_reports_its_margin() {
        // The fraction rises towards a threshold at 1000 eV and collapses above it.
        let e: Vec<f64> = (0..=60).map(|i| 700.0 + 5.0 * f64::from(i)).collect();
        let cliff = |x: f64| if x < 1000.0 { x / 1000.0 } else { 0.05 };
        let m = map(&e, cliff);
        assert_eq!(m.best_energy_ev, 995.0);
        // Without spread the optimum stays on the cliff, and is flagged there.
        let sharp = robust_optimum(&m, 10.0, &[1000.0], (700.0, 1000.0));
        assert_eq!(sharp.energy_ev, 990.0);
        assert!(!sharp.near_threshold);
        let r = robust_optimum(&m, 40.0, &[1000.0], (700.0, 1000.0));
        // The sharp optimum (995 eV) is within 20 eV of the cliff; the robust one is not.
        assert!(r.sharp_near_threshold);
        assert!(r.energy_ev <= 980.0, "{}", r.energy_ev);
        assert_eq!(r.next_threshold, Some((1, 1000.0)));
        assert_eq!(r.margin_ev, Some(1000.0 - r.energy_ev));
        assert!(!r.near_threshold && !r.on_scan_edge);
        // A peak that sits on a threshold stays there, flagged.
        let tent = map(&e, |x| 1.0 - (x - 1000.0).abs() / 1000.0);
        let near = robust_optimum(&tent, 40.0, &[1000.0], (700.0, 1000.0));
        assert_eq!(near.energy_ev, 1000.0);
        assert!(near.near_threshold);
    }

    #[test]
    fn an_optimum_at_either_end_of_the_scan_is_flagged() {
        let e: Vec<f64> = (0..=20).map(|i| 2000.0 + 100.0 * f64::from(i)).collect();
        let falling = robust_optimum(&map(&e, |x| 1.0 / x), 10.0, &[], (2000.0, 4000.0));
        assert!(falling.on_scan_edge);
        assert_eq!(falling.energy_ev, 2000.0);
        let rising = robust_optimum(&map(&e, |x| x), 10.0, &[], (2000.0, 4000.0));
        assert!(rising.on_scan_edge);
        let inside = robust_optimum(
            &map(&e, |x| -(x - 3000.0).powi(2)),
            10.0,
            &[],
            (2000.0, 4000.0),
        );
        assert!(!inside.on_scan_edge);
        assert_eq!(inside.next_threshold, None);
        assert!(
            !inside.at_last_time,
            "a one-time grid has no time edge to flag"
        );
    }

    #[test]
    fn an_optimum_at_the_last_time_is_flagged() {
        let e = [1000.0, 2000.0, 3000.0];
        let times = vec![0.1, 1.0, 10.0];
        let grid = |late_peak: bool| EnergyTimeMap {
            energies_ev: e.to_vec(),
            times_s: times.clone(),
            best_energy_ev: 2000.0,
            best_time_s: 10.0,
            best_fraction: 0.5,
            fraction: e
                .iter()
                .map(|x| {
                    let w = if *x == 2000.0 { 1.0 } else { 0.5 };
                    if late_peak {
                        vec![0.1 * w, 0.3 * w, 0.5 * w]
                    } else {
                        vec![0.1 * w, 0.5 * w, 0.3 * w]
                    }
                })
                .collect(),
        };
        assert!(robust_optimum(&grid(true), 1.0, &[], (1000.0, 3000.0)).at_last_time);
        assert!(!robust_optimum(&grid(false), 1.0, &[], (1000.0, 3000.0)).at_last_time);
    }

    #[test]
    fn the_tube_voltage_puts_the_energy_back_on_axis() {
        let u = tube_voltage_v(5000.0, 0.3, 100e-6, 5e-3, 0.5).unwrap();
        let e =
            crate::sources::electron_beam::effective_energy_ev(u, 0.3, 100e-6, 5e-3, 0.5).unwrap();
        assert!((e - 5000.0).abs() < 1e-6, "{e}");
        assert!(u > 5000.0);
    }
}
