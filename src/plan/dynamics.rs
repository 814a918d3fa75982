//! The planner's view of the ion-dynamics model ([`crate::sources::trap_dynamics`]): with
//! `model = "dynamic"` the scenario's species are evolved together (with the fed gases'
//! elements as species of their own), and the report adds, at the extraction time, the
//! temperatures, escape fluxes and overlaps of the target and its neighbours, every
//! species' trapped ions and temperature, the compensation and well depth, and the run's
//! particle and energy bookkeeping. The full histories stay in the report for the figure
//! of kT and overlap against time.
//!
//! The energy scan stays on the fixed model: one dynamic evolution takes about as long
//! as the whole fixed-model energy × time map, so the best energy is searched with the
//! fixed model and the dynamic model is run at the scenario's own energy (the report says
//! so in a note).

use super::defaults::default_injected_atoms;
use super::report::{IonsPerExtraction, SpeciesEvolution};
use super::settings::Scenario;
use crate::error::{Error, Result};
use crate::solve::evolution::interpolate;
use crate::sources::trap_dynamics::{DynamicRun, SpeciesHistory};
use crate::sources::BeamTrap;
use crate::spectrum::SpeciesInput;
use ndarray::{Array1, Array2};

/// Neighbours of the target charge shown in the report and its figure (each side).
pub const DYNAMIC_NEIGHBOURS: u32 = 2;

/// One charge state of the target species at the extraction time.
#[derive(Clone, Debug, PartialEq)]
pub struct DynamicChargeRow {
    pub charge: u32,
    /// Ions of the species in the trap (all isotopes of a natural mix).
    pub ions: f64,
    pub temperature_ev: f64,
    /// Overlap of the cloud with the beam (0…1).
    pub overlap: f64,
    /// Ions leaving over both barriers per second: what a leaky-mode extraction delivers.
    pub escape_per_s: f64,
}

/// One species in the trap at the extraction time.
#[derive(Clone, Debug, PartialEq)]
pub struct DynamicSpeciesRow {
    /// "Ar", "129Xe", or a fed gas's element ("N").
    pub label: String,
    /// Fed continuously: an element of a `gas_feed_pa` gas or (with `residual_gas_ions`) of
    /// the residual gas that is not a scenario species.
    pub fed_only: bool,
    /// Ions (charge ≥ 1) in the trap.
    pub ions: f64,
    /// Mean charge of those ions.
    pub mean_charge: f64,
    /// Ion-weighted mean kT (eV) over charges ≥ 1.
    pub mean_temperature_ev: f64,
    /// Ions leaving per second, all charges.
    pub escape_per_s: f64,
}

/// What the dynamic model adds to the report.
#[derive(Clone, Debug)]
pub struct DynamicReport {
    pub axial_barrier_v: f64,
    pub drift_tube_radius_m: f64,
    /// Fed gases (formula, Pa).
    pub gas_feed_pa: Vec<(String, f64)>,
    /// The dynamic processes that were on.
    pub processes: Vec<&'static str>,
    /// Atoms of all scenario species injected at t = 0.
    pub injected_atoms: f64,
    /// Label of the species that carries the target.
    pub target_species: String,
    pub extraction_s: f64,
    /// Target charge and its neighbours at the extraction time.
    pub target_rows: Vec<DynamicChargeRow>,
    pub species_rows: Vec<DynamicSpeciesRow>,
    pub compensation: f64,
    pub well_depth_v: f64,
    /// The whole evolution (histories of every species, compensation, well depth,
    /// bookkeeping).
    pub run: DynamicRun,
}

impl DynamicReport {
    /// The history of the species that carries the target.
    pub fn target_history(&self) -> Option<&SpeciesHistory> {
        self.run.species(&self.target_species)
    }
}

/// Evolve the scenario's species with the dynamic model at the scenario's settings:
/// the per-species evolutions (fractions of the particles present) and the dynamic report
/// at `extraction` (None: when the target peaks).
pub(crate) fn evolve(
    s: &Scenario,
    trap: &BeamTrap,
    times: &[f64],
) -> Result<(Vec<SpeciesEvolution>, DynamicRun, f64)> {
    let dynamics = trap.require_dynamic()?;
    let injected = match &s.source {
        super::settings::SourceSettings::BeamTrap(t) => t.injected_atoms,
        _ => None,
    }
    .unwrap_or_else(|| {
        default_injected_atoms(trap.electrons_in_trap(), trap.compensation, s.target.charge)
    });
    let total: f64 = s.species.iter().map(|sp| sp.amount).sum();
    let loads: Vec<(String, f64)> = s
        .species
        .iter()
        .map(|sp| (sp.name.clone(), injected * sp.amount / total))
        .collect();
    let run = dynamics.evolve(trap, &loads, times)?;
    let evolutions = s
        .species
        .iter()
        .map(|sp| {
            let h = history(&run, &sp.name)?;
            Ok(SpeciesEvolution {
                name: sp.name.clone(),
                symbol: sp.symbol.clone(),
                times_s: times.to_vec(),
                fractions: h.fractions(),
            })
        })
        .collect::<Result<Vec<_>>>()?;
    Ok((evolutions, run, injected))
}

fn history<'a>(run: &'a DynamicRun, label: &str) -> Result<&'a SpeciesHistory> {
    run.species(label).ok_or_else(|| Error::NoData {
        what: format!("the dynamic history of {label}"),
        why: "the dynamic run has no such species".to_string(),
    })
}

/// Values of a `[times, charges]` array at `t` (linear between grid times).
fn at(times: &[f64], a: &Array2<f64>, t: f64) -> Vec<f64> {
    interpolate(times, a.view(), t)
}

fn scalar_at(times: &[f64], a: &Array1<f64>, t: f64) -> f64 {
    let col = a.clone().insert_axis(ndarray::Axis(1));
    interpolate(times, col.view(), t)[0]
}

/// The dynamic report at the extraction time `t_ex`.
pub(crate) fn report(
    s: &Scenario,
    trap: &BeamTrap,
    run: DynamicRun,
    injected_atoms: f64,
    t_ex: f64,
) -> Result<DynamicReport> {
    let dynamics = trap.require_dynamic()?;
    let times = run.times_s.clone();
    let target_species = s.target_species().name.clone();
    let q = s.target.charge;
    let h = history(&run, &target_species)?;
    let (n, kt, ov, esc) = (
        at(&times, &h.ions, t_ex),
        at(&times, &h.temperatures_ev, t_ex),
        at(&times, &h.overlap, t_ex),
        at(&times, &h.escape_per_s, t_ex),
    );
    let target_rows = (q.saturating_sub(DYNAMIC_NEIGHBOURS).max(1)
        ..=(q + DYNAMIC_NEIGHBOURS).min(h.z))
        .map(|c| {
            let i = c as usize;
            DynamicChargeRow {
                charge: c,
                ions: n[i],
                temperature_ev: kt[i],
                overlap: ov[i],
                escape_per_s: esc[i],
            }
        })
        .collect();
    let species_rows = run
        .species
        .iter()
        .map(|sp| {
            let (n, kt, esc) = (
                at(&times, &sp.ions, t_ex),
                at(&times, &sp.temperatures_ev, t_ex),
                at(&times, &sp.escape_per_s, t_ex),
            );
            let ions: f64 = n.iter().skip(1).sum();
            let weighted = |w: &dyn Fn(usize) -> f64| -> f64 {
                if ions > 0.0 {
                    (1..n.len()).map(|c| n[c] * w(c)).sum::<f64>() / ions
                } else {
                    0.0
                }
            };
            DynamicSpeciesRow {
                label: sp.label.clone(),
                fed_only: !s.species.iter().any(|x| x.name == sp.label),
                ions,
                mean_charge: weighted(&|c| c as f64),
                mean_temperature_ev: weighted(&|c| kt[c]),
                escape_per_s: esc.iter().sum(),
            }
        })
        .collect();
    Ok(DynamicReport {
        axial_barrier_v: dynamics.axial_barrier_v,
        drift_tube_radius_m: dynamics.drift_tube_radius_m,
        gas_feed_pa: dynamics
            .gas_feed
            .iter()
            .map(|g| (g.gas.formula.to_string(), g.pressure_pa))
            .collect(),
        processes: dynamics.switches.names(),
        injected_atoms,
        target_species,
        extraction_s: t_ex,
        target_rows,
        species_rows,
        compensation: scalar_at(&times, &run.compensation, t_ex),
        well_depth_v: scalar_at(&times, &run.well_depth_v, t_ex),
        run,
    })
}

/// Ions per extraction from the dynamic model's ion numbers at `t_ex`: the target
/// species' N_q times the isotope's share; its share of the trapped charge among all
/// species (fed gases included).
pub(crate) fn ions_per_extraction(
    s: &Scenario,
    d: &DynamicReport,
    isotope_share: f64,
) -> Result<IonsPerExtraction> {
    let times = &d.run.times_s;
    let t_ex = d.extraction_s;
    let charge = |h: &SpeciesHistory| -> f64 {
        at(times, &h.ions, t_ex)
            .iter()
            .enumerate()
            .map(|(c, v)| c as f64 * v)
            .sum()
    };
    let total: f64 = d.run.species.iter().map(charge).sum();
    let h = history(&d.run, &d.target_species)?;
    let n = at(times, &h.ions, t_ex);
    // Neutral atoms in the beam are not extracted.
    let per: Vec<f64> = n
        .iter()
        .enumerate()
        .map(|(c, v)| if c == 0 { 0.0 } else { v * isotope_share })
        .collect();
    Ok(IonsPerExtraction {
        time_s: t_ex,
        electrons_in_trap: d.run.electrons_in_trap,
        compensation: d.compensation,
        species: d.target_species.clone(),
        species_share_of_charge: if total > 0.0 { charge(h) / total } else { 0.0 },
        isotope_share,
        target: per[s.target.charge as usize],
        all_charges: per.iter().sum(),
        per_charge: per,
    })
}

/// The species of the A/q spectrum with the dynamic model: every species in the trap at
/// `t_ex` (fed and residual gases included, marked as background), its amount the
/// particles still trapped — absolute numbers per extraction for the analyte and the
/// background alike, so the spectrum's purities weigh the scenario's ions against the
/// residual-gas ions the partial pressures make, and escaped ions are not counted as
/// extracted.
pub(crate) fn spectrum_inputs(s: &Scenario, d: &DynamicReport) -> Vec<SpeciesInput> {
    let times = &d.run.times_s;
    d.run
        .species
        .iter()
        .map(|h| {
            let n = at(times, &h.ions, d.extraction_s);
            let total: f64 = n.iter().sum();
            SpeciesInput {
                spec: h.label.clone(),
                amount: total,
                fractions: if total > 0.0 {
                    n.iter().map(|v| v / total).collect()
                } else {
                    n
                },
                residual: !s.species.iter().any(|x| x.name == h.label),
            }
        })
        .collect()
}

/// The background of the dynamic run (the species of the fed and residual gases that are
/// not scenario species): label, particles in the trap at extraction, charge fractions —
/// the report's residual-gas table, in absolute numbers.
pub(crate) fn background(s: &Scenario, d: &DynamicReport) -> Vec<(String, f64, Vec<f64>)> {
    spectrum_inputs(s, d)
        .into_iter()
        .filter(|i| i.residual && i.amount > 0.0)
        .map(|i| (i.spec, i.amount, i.fractions))
        .collect()
}
