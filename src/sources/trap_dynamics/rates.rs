//! The rates of one species that do not depend on the state: electron-impact jumps and
//! radiative recombination at full overlap, charge exchange at a reference temperature,
//! the feed of new 1+ ions from the injected gas, and the beam heating per ion.

use crate::atoms::Species;
use crate::constants::{BOLTZMANN_EV_K, ELEMENTARY_CHARGE_C};
use crate::error::{Error, Result};
use crate::processes::beam_heating::landau_spitzer_heating_ev_per_s;
use crate::processes::coulomb_logarithm::beam_ion_coulomb_log;
use crate::processes::excitation_autoionization::single_ionization_cross_sections_cm2;
use crate::processes::ion_lotz::ionization_cross_sections_cm2;

use super::super::beam_trap::BeamTrap;
use super::TrapDynamics;

/// State-independent rates of one species in one trap.
#[derive(Clone, Debug)]
pub(crate) struct SpeciesRates {
    pub label: String,
    pub z: usize,
    pub mass_u: f64,
    /// Particles injected into the beam as neutral atoms at t = 0.
    pub initial_atoms: f64,
    /// Electron-impact jumps from each charge q: (to, rate s⁻¹ at overlap 1).
    pub impact: Vec<Vec<(usize, f64)>>,
    /// Radiative recombination q → q−1 (s⁻¹ at overlap 1); index q.
    pub recombination: Vec<f64>,
    /// Charge exchange q → q−1 (s⁻¹) at `cx_reference_ev`, on residual and fed gas.
    pub charge_exchange: Vec<f64>,
    pub cx_reference_ev: f64,
    /// New ions per second from the fed and residual gases, per charge (index q).
    pub feed_per_s: Vec<f64>,
    /// Landau–Spitzer heating of one ion of each charge inside the beam (eV/s).
    pub heating_ev_per_s: Vec<f64>,
}

impl SpeciesRates {
    pub(crate) fn new(
        trap: &BeamTrap,
        dynamics: &TrapDynamics,
        label: &str,
        species: &Species,
        initial_atoms: f64,
    ) -> Result<Self> {
        let element = species.element();
        let z = element.z() as usize;
        let mass_u = match species {
            Species::Natural(e) => e.atomic_weight_u(),
            Species::Isotope(_, iso) => iso.mass_u,
        };
        // The electron-impact part of the fixed model's network: no charge exchange, no
        // user loss or feed.
        let mut impact_trap = trap.clone();
        impact_trap.processes.charge_exchange = false;
        impact_trap.loss_per_s.clear();
        impact_trap.feed = None;
        let net = impact_trap.network(element)?;
        let mut impact = vec![Vec::new(); z + 1];
        let mut recombination = vec![0.0; z + 1];
        for q in 0..=z {
            for (to, rate) in net.rates_from(q).iter().enumerate() {
                if *rate <= 0.0 {
                    continue;
                }
                if to > q {
                    impact[q].push((to, *rate));
                } else if to + 1 == q {
                    recombination[q] = *rate;
                } else {
                    return Err(Error::invalid(
                        "network",
                        format!("{q} → {to}"),
                        "the dynamic model expects electron-impact jumps up and recombination one step down",
                    ));
                }
            }
        }
        // Charge exchange on the residual gas and the fed gases, at the trap's ion
        // temperature; the system rescales it with √(T/T_ref).
        let mut cx_trap = trap.clone();
        cx_trap
            .residual_gas
            .extend(dynamics.gas_feed.iter().cloned());
        let charge_exchange = (0..=z)
            .map(|q| {
                if trap.processes.charge_exchange {
                    cx_trap.charge_exchange_rate_per_s(element, q as u32)
                } else {
                    0.0
                }
            })
            .collect();
        // Ions from the fed and residual gases: molecules ionized with their molecular
        // cross section and dissociated by the bundled pattern (one rule, in
        // `sources::residual_gas`); a noble gas atom with the same single-ionization
        // channels as the network's 0 → 1 step.
        let beam = &trap.beam;
        let atom_sigma = |el: &'static crate::atoms::Element| -> Result<f64> {
            Ok(if trap.processes.excitation_autoionization {
                single_ionization_cross_sections_cm2(el, 0, &[beam.energy_ev], trap.lotz_constants)?
                    [0]
            } else {
                ionization_cross_sections_cm2(el, 0, &[beam.energy_ev], trap.lotz_constants)?[0]
            })
        };
        let mut feed_per_s = vec![0.0; z + 1];
        if species_takes_feed(species) {
            let sources: Vec<_> = dynamics.ion_sources(trap).into_iter().cloned().collect();
            for p in trap.gas_ion_production(&sources, &atom_sigma)? {
                if p.element.z() == element.z() && (p.charge as usize) <= z {
                    feed_per_s[p.charge as usize] += p.per_s;
                }
            }
        }
        // Beam heating: n_e = j/(e v), the beam's Coulomb logarithm for each charge.
        let v = beam.speed_m_s();
        let n_e_m3 = beam.current_density_a_cm2 * 1e4 / (ELEMENTARY_CHARGE_C * v);
        let heating_ev_per_s = (0..=z)
            .map(|q| {
                if q == 0 {
                    return 0.0;
                }
                let log = beam_ion_coulomb_log(n_e_m3 * 1e-6, beam.energy_ev, q as f64);
                landau_spitzer_heating_ev_per_s(n_e_m3, v, q as f64, mass_u, log)
            })
            .collect();
        Ok(SpeciesRates {
            label: label.to_string(),
            z,
            mass_u,
            initial_atoms,
            impact,
            recombination,
            charge_exchange,
            cx_reference_ev: trap.ion_temperature_ev,
            feed_per_s,
            heating_ev_per_s,
        })
    }
}

/// A fed gas of natural composition feeds the natural species of its elements, not a
/// single isotope listed separately.
fn species_takes_feed(species: &Species) -> bool {
    matches!(species, Species::Natural(_))
}

/// The gas temperature kT in eV.
pub(crate) fn gas_temperature_ev(trap: &BeamTrap) -> f64 {
    trap.gas_temperature_k * BOLTZMANN_EV_K
}
