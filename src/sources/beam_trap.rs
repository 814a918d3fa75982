//! The electron-beam ion trap: an electron beam of given energy and current density
//! holding ions of one element for a confinement time, with radiative recombination and
//! charge exchange on the residual gas. Turns the settings into the rate network of an
//! element.
//!
//! # Model
//!
//! States 0…Z of one element, with the electron flux j/e (cm⁻² s⁻¹) of
//! [`super::electron_beam`]:
//!
//! * ionization q → q+1 at (j/e)·σ_q^Lotz(E) ([`crate::processes::ion_lotz`]); with
//!   `multiple_ionization`, each subshell's Lotz term relaxes through the vacancy cascade to
//!   q → q+1+k ([`crate::processes::vacancy_jumps`]) and direct double ionization adds
//!   q → q+2 ([`crate::processes::double_ionization`]);
//! * radiative recombination q → q−1 at (j/e)·σ_RR (Kim & Pratt 1983,
//!   [`crate::processes::radiative_recombination`]);
//! * charge exchange q → q−1 at Σ_gas n_gas σ_CX v̄_ion (Müller & Salzborn 1977,
//!   [`crate::processes::charge_exchange`]), a channel open only where the recombined ion
//!   binds the captured electron more strongly than the gas does (exothermic capture);
//! * excitation–autoionization q → q+1 at (j/e)·σ_EA (van Regemorter 1962 excitation of
//!   inner electrons above the ionization limit, [`crate::processes::excitation_autoionization`]);
//! * dielectronic recombination q → q−1 at (j/e)·Σ_r S_r G(E − E_r), the resonance
//!   strengths of [`crate::processes::dielectronic`] folded with a Gaussian of the beam's
//!   energy spread (FWHM: the beam's `energy_spread_ev`, else the space-charge width
//!   [`super::electron_beam::beam_energy_spread_ev`] at this trap's compensation);
//! * optional escape rates per charge, a constant feed, and the jump rates of a photon beam
//!   crossing the ions ([`super::photon_beam`]).
//!
//! Ions per extraction: the trap fills until the ions' charge compensates the fraction f of
//! the electron space charge, N_q = f · N_e · F_q / Σ_{q'≥1} q' F_q', with N_e = I L/(e v).
//!
//! # Validity and accuracy
//!
//! The ions are taken to sit inside the beam (no radial overlap factor), at one fixed ion
//! temperature; no ion heating or evaporative escape (give escape rates explicitly). Accuracy is that of the cross sections
//! (Lotz ±30–40 % for ions, Müller–Salzborn about a factor 2, from memory); the solved
//! populations match scipy's `expm` and `solve_ivp(Radau)` on the same networks
//! (`tests/python/test_trap.py`), and ionization alone reproduces the Bateman chain.

use super::electron_beam::{beam_energy_spread_ev, electrons_in_trap, ElectronBeam};
use super::photon_beam::{photon_network, PhotonBeam};
use crate::atoms::Element;
use crate::error::{require_non_negative, require_positive, Error, Result};
use crate::network::RateNetwork;
use crate::processes::charge_exchange::{
    charge_exchange_rate_coefficient_cm3_s, gas_number_density_m3,
};
use crate::processes::dielectronic::{beam_cross_section_cm2, resonances as dr_resonances};
use crate::processes::double_ionization::direct_double_ionization_cm2;
use crate::processes::excitation_autoionization::cross_section_cm2 as ea_cross_section_cm2;
use crate::processes::gases::{gas, Gas};
use crate::processes::ion_lotz::{ion_lotz_shells, ionization_cross_sections_cm2};
use crate::processes::lotz::lotz_subshell_cross_section_cm2;
use crate::processes::lotz::LotzConstants;
use crate::processes::radiative_recombination::kim_pratt_cross_section_cm2;
use crate::processes::relaxation::Relaxation;
use crate::processes::vacancy_jumps::{nonzero_jumps, vacancy_jumps};
use crate::solve::{evolve, steady_state};

use super::trap_dynamics::{DynamicRun, DynamicsSwitches, TrapDynamics};

/// Ion temperature kT (eV) of a trap when none is given.
pub const DEFAULT_ION_TEMPERATURE_EV: f64 = 50.0;
/// Residual-gas temperature (K) of a trap when none is given (room temperature).
pub const DEFAULT_GAS_TEMPERATURE_K: f64 = 300.0;
/// Fraction of the electron space charge compensated by ions when none is given.
pub const DEFAULT_COMPENSATION: f64 = 0.5;

/// The one rule for the space-charge compensation: a fraction 0…1.
pub fn require_compensation(compensation: f64) -> Result<f64> {
    if compensation.is_finite() && (0.0..=1.0).contains(&compensation) {
        Ok(compensation)
    } else {
        Err(Error::invalid(
            "compensation",
            compensation,
            "must lie in 0..=1",
        ))
    }
}

/// One residual-gas component.
#[derive(Clone, Debug)]
pub struct GasComponent {
    pub gas: &'static Gas,
    pub pressure_pa: f64,
}

/// Which processes the network includes. By default: single ionization (Lotz),
/// radiative recombination, charge exchange, excitation–autoionization and dielectronic
/// recombination; `multiple_ionization` (off by default) lets each subshell's ionization
/// relax by Auger cascades (q → q+1+k) and adds direct double ionization (q → q+2).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Processes {
    pub ionization: bool,
    pub multiple_ionization: bool,
    pub radiative_recombination: bool,
    pub charge_exchange: bool,
    /// Excitation–autoionization q → q+1 ([`crate::processes::excitation_autoionization`]).
    pub excitation_autoionization: bool,
    /// Dielectronic recombination q → q−1 ([`crate::processes::dielectronic`]), folded with
    /// the beam's energy spread.
    pub dielectronic_recombination: bool,
}

impl Default for Processes {
    fn default() -> Self {
        Processes {
            ionization: true,
            multiple_ionization: false,
            radiative_recombination: true,
            charge_exchange: true,
            excitation_autoionization: true,
            dielectronic_recombination: true,
        }
    }
}

impl Processes {
    /// Names of the processes a trap can include, in the order the network adds them.
    pub const NAMES: [&'static str; 6] = [
        "ionization",
        "radiative_recombination",
        "charge_exchange",
        "multiple_ionization",
        "excitation_autoionization",
        "dielectronic_recombination",
    ];

    /// The set named by `names` (each one of [`Processes::NAMES`]); the others are off.
    pub fn from_names<S: AsRef<str>>(names: &[S]) -> Result<Self> {
        let mut p = Processes {
            ionization: false,
            multiple_ionization: false,
            radiative_recombination: false,
            charge_exchange: false,
            excitation_autoionization: false,
            dielectronic_recombination: false,
        };
        for name in names {
            match name.as_ref() {
                "ionization" => p.ionization = true,
                "radiative_recombination" => p.radiative_recombination = true,
                "charge_exchange" => p.charge_exchange = true,
                "multiple_ionization" => p.multiple_ionization = true,
                "excitation_autoionization" => p.excitation_autoionization = true,
                "dielectronic_recombination" => p.dielectronic_recombination = true,
                other => {
                    return Err(Error::invalid(
                        "processes",
                        format!("{other:?}"),
                        &format!("each must be one of \"{}\"", Self::NAMES.join("\", \"")),
                    ))
                }
            }
        }
        Ok(p)
    }

    /// The names of the processes that are on.
    pub fn names(&self) -> Vec<&'static str> {
        let on = [
            self.ionization,
            self.radiative_recombination,
            self.charge_exchange,
            self.multiple_ionization,
            self.excitation_autoionization,
            self.dielectronic_recombination,
        ];
        Self::NAMES
            .iter()
            .zip(on)
            .filter(|(_, on)| *on)
            .map(|(n, _)| *n)
            .collect()
    }
}

/// The ion model a trap runs: the linear fixed-temperature network (the default), or the
/// nonlinear ion dynamics of several species with heating, exchange, escape, overlap and
/// space charge ([`super::trap_dynamics`]).
#[derive(Clone, Debug, Default)]
pub enum TrapModel {
    /// Ions of one element inside the beam at the trap's fixed ion temperature.
    #[default]
    Fixed,
    /// The ion-dynamics model with its settings.
    Dynamic(Box<TrapDynamics>),
}

impl TrapModel {
    /// The models by name, the default first.
    pub const NAMES: [&'static str; 2] = ["fixed", "dynamic"];

    /// "fixed" or "dynamic".
    pub fn name(&self) -> &'static str {
        match self {
            TrapModel::Fixed => "fixed",
            TrapModel::Dynamic(_) => "dynamic",
        }
    }

    /// The dynamic settings, if this is the dynamic model.
    pub fn dynamics(&self) -> Option<&TrapDynamics> {
        match self {
            TrapModel::Fixed => None,
            TrapModel::Dynamic(d) => Some(d),
        }
    }
}

/// An electron-beam trap: beam, trap length, residual gas, ion temperature.
#[derive(Clone, Debug)]
pub struct BeamTrap {
    pub beam: ElectronBeam,
    pub length_m: f64,
    pub residual_gas: Vec<GasComponent>,
    /// Ion temperature kT (eV): sets the ion speed in charge-exchange collisions.
    pub ion_temperature_ev: f64,
    /// Residual-gas temperature (K) for n = p/(k_B T).
    pub gas_temperature_k: f64,
    /// Fraction of the electron space charge compensated by ions (0…1), for yields.
    pub compensation: f64,
    pub lotz_constants: Option<LotzConstants>,
    pub processes: Processes,
    /// Escape rate per charge state (s⁻¹), charge 0…Z; empty for none.
    pub loss_per_s: Vec<f64>,
    /// Continuous injection (charge, particles per s in units of the initial population).
    pub feed: Option<(u32, f64)>,
    /// A photon beam crossing the trapped ions (photoionization and relaxation jumps are
    /// added to the network), e.g. a synchrotron or free-electron-laser beam.
    pub photon_beam: Option<PhotonBeam>,
    /// The ion model: fixed (default) or dynamic.
    pub model: TrapModel,
    /// Relaxation channels of the inner-shell vacancies electron impact makes (used with
    /// `multiple_ionization`; all channels by default).
    pub relaxation: Relaxation,
}

impl BeamTrap {
    /// A trap with the default gas temperature (300 K), compensation 0.5 and all processes.
    pub fn new(
        beam: ElectronBeam,
        length_m: f64,
        residual_gas: &[(String, f64)],
        ion_temperature_ev: f64,
    ) -> Result<Self> {
        require_positive("length_m", length_m)?;
        require_positive("ion_temperature_ev", ion_temperature_ev)?;
        let residual_gas = residual_gas
            .iter()
            .map(|(name, p)| {
                require_non_negative(&format!("residual_gas_pa[{name:?}]"), *p)?;
                Ok(GasComponent {
                    gas: gas(name)?,
                    pressure_pa: *p,
                })
            })
            .collect::<Result<Vec<_>>>()?;
        Ok(BeamTrap {
            beam,
            length_m,
            residual_gas,
            ion_temperature_ev,
            gas_temperature_k: DEFAULT_GAS_TEMPERATURE_K,
            compensation: DEFAULT_COMPENSATION,
            lotz_constants: None,
            processes: Processes::default(),
            loss_per_s: Vec::new(),
            feed: None,
            photon_beam: None,
            model: TrapModel::Fixed,
            relaxation: Relaxation::default(),
        })
    }

    /// The same trap with another beam energy (current density unchanged).
    pub fn with_energy(&self, energy_ev: f64) -> Result<Self> {
        require_positive("energy_ev", energy_ev)?;
        let mut t = self.clone();
        t.beam.energy_ev = energy_ev;
        Ok(t)
    }

    /// Check the settings that do not depend on an element: gas temperature, compensation,
    /// escape rates and the feed rate.
    pub fn check_settings(&self) -> Result<()> {
        require_positive("gas_temperature_k", self.gas_temperature_k)?;
        require_compensation(self.compensation)?;
        for (q, loss) in self.loss_per_s.iter().enumerate() {
            require_non_negative(&format!("loss_per_s[{q}]"), *loss)?;
        }
        if let Some((_, rate)) = self.feed {
            require_non_negative("feed_per_s", rate)?;
        }
        Ok(())
    }

    /// Check the settings against an element.
    fn check(&self, element: &Element) -> Result<()> {
        self.check_settings()?;
        let n = element.z() as usize + 1;
        if !self.loss_per_s.is_empty() && self.loss_per_s.len() != n {
            return Err(Error::invalid(
                "loss_per_s",
                format!("{} values", self.loss_per_s.len()),
                &format!(
                    "give one escape rate per charge state 0..={} ({n} values)",
                    element.z()
                ),
            ));
        }
        if let Some((q, _)) = self.feed {
            element.check_charge(q as i64, element.z())?;
        }
        Ok(())
    }

    /// Cross sections (cm²) of ion `charge` → each higher charge in one electron collision:
    /// Lotz ionization of every subshell followed by its vacancy cascade, plus direct double
    /// ionization. Their sum exceeds the single-ionization Lotz total only by the direct
    /// double term.
    pub fn impact_jumps_cm2(
        &self,
        element: &'static Element,
        charge: u32,
    ) -> Result<Vec<(u32, f64)>> {
        let ion = element.ion(i64::from(charge))?;
        let energy_ev = self.beam.energy_ev;
        let lotz_per_subshell = ion
            .subshells()
            .iter()
            .zip(ion_lotz_shells(&ion, self.lotz_constants))
            .map(|(state, lotz)| {
                (
                    state.subshell,
                    lotz_subshell_cross_section_cm2(&lotz, energy_ev),
                )
            });
        let mut per_charge = vacancy_jumps(&ion, self.relaxation, energy_ev, lotz_per_subshell)?;
        if let Some(slot) = per_charge.get_mut(charge as usize + 2) {
            *slot += direct_double_ionization_cm2(&ion, energy_ev);
        }
        Ok(nonzero_jumps(per_charge))
    }

    /// Energy spread (FWHM, eV) of the beam's electrons: the beam's own setting, else the
    /// space-charge default [`beam_energy_spread_ev`] with this trap's compensation.
    pub fn energy_spread_ev(&self) -> f64 {
        let b = &self.beam;
        b.energy_spread_ev.unwrap_or_else(|| {
            beam_energy_spread_ev(b.energy_ev, b.current_a, b.radius_m, self.compensation)
        })
    }

    /// Excitation–autoionization rate q → q+1 (s⁻¹): (j/e)·σ_EA.
    pub fn excitation_autoionization_rate_per_s(
        &self,
        element: &'static Element,
        charge: u32,
    ) -> Result<f64> {
        let ion = element.ion(i64::from(charge))?;
        Ok(self.beam.electron_flux_per_cm2_s() * ea_cross_section_cm2(&ion, self.beam.energy_ev))
    }

    /// Dielectronic-recombination rate q → q−1 (s⁻¹): (j/e)·Σ_r S_r G(E − E_r), the
    /// resonances folded with the beam's energy spread.
    pub fn dielectronic_rate_per_s(&self, element: &'static Element, charge: u32) -> Result<f64> {
        let ion = element.ion(i64::from(charge))?;
        Ok(self.beam.electron_flux_per_cm2_s()
            * beam_cross_section_cm2(
                &dr_resonances(&ion),
                self.beam.energy_ev,
                self.energy_spread_ev(),
            ))
    }

    /// Radiative-recombination rate of charge q → q−1 (s⁻¹): (j/e)·σ_RR (Kim & Pratt 1983).
    pub fn recombination_rate_per_s(&self, element: &'static Element, charge: u32) -> Result<f64> {
        let ion = element.ion(charge as i64)?;
        let (n0, occupancy) = ion.valence_shell();
        let sigma =
            kim_pratt_cross_section_cm2(element.z(), charge, n0, occupancy, self.beam.energy_ev);
        Ok(self.beam.electron_flux_per_cm2_s() * sigma)
    }

    /// Charge-exchange rate of charge q → q−1 (s⁻¹) on the residual gas:
    /// Σ_gas n_gas σ_CX v̄_ion (Müller & Salzborn 1977). Channels whose capture would be
    /// endothermic (the ion's recombined state binds the electron less than the target does)
    /// are closed.
    pub fn charge_exchange_rate_per_s(&self, element: &'static Element, charge: u32) -> f64 {
        if charge == 0 {
            return 0.0;
        }
        let recombined_binding_ev = element
            .ionization_energies_ev()
            .get(charge as usize - 1)
            .copied()
            .unwrap_or(0.0);
        self.residual_gas
            .iter()
            .map(|g| {
                let n_cm3 = gas_number_density_m3(g.pressure_pa, self.gas_temperature_k) * 1e-6;
                n_cm3
                    * charge_exchange_rate_coefficient_cm3_s(
                        charge,
                        recombined_binding_ev,
                        g.gas.ionization_energy_ev,
                        self.ion_temperature_ev,
                        element.atomic_weight_u(),
                    )
            })
            .sum()
    }

    /// The rate network of `element` in this trap: states 0…Z.
    pub fn network(&self, element: &'static Element) -> Result<RateNetwork> {
        self.check(element)?;
        if !element.is_complete() {
            return Err(Error::NoData {
                what: format!("charge-state network of {}", element.symbol()),
                why: "the ionization-energy chain is incomplete above Z = 103".into(),
            });
        }
        let z = element.z();
        let mut net = RateNetwork::new(z as usize + 1)?;
        let flux = self.beam.electron_flux_per_cm2_s();
        for q in 0..z {
            if !self.processes.ionization {
                continue;
            }
            if self.processes.multiple_ionization {
                for (to, sigma) in self.impact_jumps_cm2(element, q)? {
                    net.add_rate(q as usize, to as usize, flux * sigma)?;
                }
            } else {
                let sigma = ionization_cross_sections_cm2(
                    element,
                    q as i64,
                    &[self.beam.energy_ev],
                    self.lotz_constants,
                )?[0];
                net.add_rate(q as usize, q as usize + 1, flux * sigma)?;
            }
        }
        if self.processes.excitation_autoionization {
            for q in 0..z {
                let rate = self.excitation_autoionization_rate_per_s(element, q)?;
                net.add_rate(q as usize, q as usize + 1, rate)?;
            }
        }
        for q in 1..=z {
            let mut down = 0.0;
            if self.processes.radiative_recombination {
                down += self.recombination_rate_per_s(element, q)?;
            }
            if self.processes.charge_exchange {
                down += self.charge_exchange_rate_per_s(element, q);
            }
            if self.processes.dielectronic_recombination {
                down += self.dielectronic_rate_per_s(element, q)?;
            }
            net.add_rate(q as usize, q as usize - 1, down)?;
        }
        for (q, loss) in self.loss_per_s.iter().enumerate() {
            net.set_loss(q, *loss)?;
        }
        if let Some((q, rate)) = self.feed {
            net.set_feed(q as usize, rate)?;
        }
        match &self.photon_beam {
            Some(photons) => photon_network(element, photons, Some(&net)),
            None => Ok(net),
        }
    }

    /// Charge-state populations at each time (rows) for atoms starting as `initial_charge`.
    pub fn evolve(
        &self,
        element: &'static Element,
        times_s: &[f64],
        initial_charge: u32,
    ) -> Result<ndarray::Array2<f64>> {
        element.check_charge(initial_charge as i64, element.z())?;
        let net = self.network(element)?;
        let mut initial = vec![0.0; net.n_states()];
        initial[initial_charge as usize] = 1.0;
        evolve(&net, &initial, times_s)
    }

    /// The dynamic model's evolution of `loads` (species → atoms injected at t = 0); an
    /// error naming the model for a trap running the fixed model.
    pub fn evolve_dynamic(&self, loads: &[(String, f64)], times_s: &[f64]) -> Result<DynamicRun> {
        self.require_dynamic()?.evolve(self, loads, times_s)
    }

    /// The dynamic model's steady state (see [`TrapDynamics::steady_state`]).
    pub fn steady_state_dynamic(&self, loads: &[(String, f64)]) -> Result<DynamicRun> {
        self.require_dynamic()?.steady_state(self, loads)
    }

    /// The dynamic settings, or an error saying the trap runs the fixed model.
    pub fn require_dynamic(&self) -> Result<&TrapDynamics> {
        self.model.dynamics().ok_or_else(|| {
            Error::invalid(
                "model",
                "\"fixed\"",
                "this needs the ion-dynamics model: build the trap with model \"dynamic\"",
            )
        })
    }

    /// Equilibrium charge-state populations.
    pub fn steady_state(&self, element: &'static Element) -> Result<Vec<f64>> {
        steady_state(&self.network(element)?)
    }

    /// Electrons inside the trap, N_e = I L/(e v).
    pub fn electrons_in_trap(&self) -> f64 {
        electrons_in_trap(self.beam.current_a, self.beam.energy_ev, self.length_m)
    }

    /// Ions of each charge state per extraction for charge-state fractions `fractions`:
    ///
    ///   N_q = f · N_e · F_q / Σ_{q'≥1} q' F_q',
    ///
    /// the trap filled with ions until their charge compensates the fraction f of the
    /// electron space charge, shared as the fractions say (neutrals are not trapped).
    pub fn ions_per_extraction(&self, fractions: &[f64]) -> Result<Vec<f64>> {
        self.check_settings()?;
        // Fractions of a charge-state distribution: each finite and in [0, 1].
        if let Some((q, f)) = fractions
            .iter()
            .enumerate()
            .find(|(_, f)| !(f.is_finite() && (0.0..=1.0).contains(*f)))
        {
            return Err(Error::invalid(
                &format!("fractions[{q}]"),
                f,
                "each charge-state fraction must be a finite number in [0, 1]",
            ));
        }
        let charge_sum: f64 = fractions
            .iter()
            .enumerate()
            .map(|(q, f)| q as f64 * f)
            .sum();
        let capacity = self.compensation * self.electrons_in_trap();
        Ok(fractions
            .iter()
            .enumerate()
            .map(|(q, f)| {
                if q == 0 || charge_sum <= 0.0 {
                    0.0
                } else {
                    capacity * f / charge_sum
                }
            })
            .collect())
    }
}

/// Every setting of a trap with its default, for building one in a single validated step
/// (the bindings and the scenario settings use it, so each rule is checked in one place).
#[derive(Clone, Debug)]
pub struct BeamTrapBuilder {
    beam: ElectronBeam,
    length_m: f64,
    residual_gas_pa: Vec<(String, f64)>,
    ion_temperature_ev: f64,
    gas_temperature_k: f64,
    compensation: f64,
    processes: Processes,
    loss_per_s: Vec<f64>,
    feed: Option<(u32, f64)>,
    photon_beam: Option<PhotonBeam>,
    model: String,
    axial_barrier_v: Option<f64>,
    drift_tube_radius_m: Option<f64>,
    gas_feed_pa: Option<Vec<(String, f64)>>,
    dynamic_processes: Option<DynamicsSwitches>,
}

impl BeamTrap {
    /// A builder for a trap of this beam and length; every other setting has its default.
    pub fn builder(beam: ElectronBeam, length_m: f64) -> BeamTrapBuilder {
        BeamTrapBuilder {
            beam,
            length_m,
            residual_gas_pa: Vec::new(),
            ion_temperature_ev: DEFAULT_ION_TEMPERATURE_EV,
            gas_temperature_k: DEFAULT_GAS_TEMPERATURE_K,
            compensation: DEFAULT_COMPENSATION,
            processes: Processes::default(),
            loss_per_s: Vec::new(),
            feed: None,
            photon_beam: None,
            model: TrapModel::NAMES[0].to_string(),
            axial_barrier_v: None,
            drift_tube_radius_m: None,
            gas_feed_pa: None,
            dynamic_processes: None,
        }
    }
}

impl BeamTrapBuilder {
    /// Partial pressures (Pa) of residual gases by formula.
    pub fn residual_gas_pa(mut self, gases: Vec<(String, f64)>) -> Self {
        self.residual_gas_pa = gases;
        self
    }
    /// Ion temperature kT (eV).
    pub fn ion_temperature_ev(mut self, value: f64) -> Self {
        self.ion_temperature_ev = value;
        self
    }
    /// Residual-gas temperature (K).
    pub fn gas_temperature_k(mut self, value: f64) -> Self {
        self.gas_temperature_k = value;
        self
    }
    /// Compensated fraction of the electron space charge (0…1).
    pub fn compensation(mut self, value: f64) -> Self {
        self.compensation = value;
        self
    }
    /// The processes of the network.
    pub fn processes(mut self, processes: Processes) -> Self {
        self.processes = processes;
        self
    }
    /// Escape rate of each charge state 0…Z (s⁻¹).
    pub fn loss_per_s(mut self, loss: Vec<f64>) -> Self {
        self.loss_per_s = loss;
        self
    }
    /// Continuous injection of charge state `charge` at `rate_per_s`.
    pub fn feed(mut self, charge: u32, rate_per_s: f64) -> Self {
        self.feed = Some((charge, rate_per_s));
        self
    }
    /// A photon beam crossing the trapped ions.
    pub fn photon_beam(mut self, beam: PhotonBeam) -> Self {
        self.photon_beam = Some(beam);
        self
    }
    /// The ion model by name, one of [`TrapModel::NAMES`] ("fixed" by default).
    pub fn model(mut self, name: &str) -> Self {
        self.model = name.to_string();
        self
    }
    /// Axial barrier (V) of the dynamic model.
    pub fn axial_barrier_v(mut self, value: f64) -> Self {
        self.axial_barrier_v = Some(value);
        self
    }
    /// Drift-tube radius (m) of the dynamic model.
    pub fn drift_tube_radius_m(mut self, value: f64) -> Self {
        self.drift_tube_radius_m = Some(value);
        self
    }
    /// Neutral gases fed continuously (formula, partial pressure in Pa), dynamic model.
    pub fn gas_feed_pa(mut self, gases: Vec<(String, f64)>) -> Self {
        self.gas_feed_pa = Some(gases);
        self
    }
    /// The dynamic processes that are on (dynamic model).
    pub fn dynamic_processes(mut self, switches: DynamicsSwitches) -> Self {
        self.dynamic_processes = Some(switches);
        self
    }

    /// The trap, with every setting validated.
    pub fn build(self) -> Result<BeamTrap> {
        let mut trap = BeamTrap::new(
            self.beam,
            self.length_m,
            &self.residual_gas_pa,
            self.ion_temperature_ev,
        )?;
        trap.gas_temperature_k = self.gas_temperature_k;
        trap.compensation = self.compensation;
        trap.processes = self.processes;
        trap.loss_per_s = self.loss_per_s;
        trap.feed = self.feed;
        trap.photon_beam = self.photon_beam;
        trap.check_settings()?;
        trap.model = match self.model.as_str() {
            "fixed" => {
                let given = [
                    ("axial_barrier_v", self.axial_barrier_v.is_some()),
                    ("drift_tube_radius_m", self.drift_tube_radius_m.is_some()),
                    ("gas_feed_pa", self.gas_feed_pa.is_some()),
                    ("dynamic_processes", self.dynamic_processes.is_some()),
                ];
                if let Some((name, _)) = given.iter().find(|(_, set)| *set) {
                    return Err(Error::invalid(
                        name,
                        "set",
                        "belongs to the ion-dynamics model: add model=\"dynamic\" (the fixed model keeps the ions inside the beam at one temperature)",
                    ));
                }
                TrapModel::Fixed
            }
            "dynamic" => {
                let mut d = TrapDynamics::new(
                    &trap,
                    self.axial_barrier_v
                        .unwrap_or(super::trap_dynamics::DEFAULT_AXIAL_BARRIER_V),
                    self.drift_tube_radius_m
                        .unwrap_or(super::trap_dynamics::DEFAULT_DRIFT_TUBE_RADIUS_M),
                    &self.gas_feed_pa.unwrap_or_default(),
                )?;
                if let Some(sw) = self.dynamic_processes {
                    d.switches = sw;
                }
                TrapModel::Dynamic(Box::new(d))
            }
            other => {
                return Err(Error::invalid(
                    "model",
                    format!("{other:?}"),
                    &format!("must be one of \"{}\"", TrapModel::NAMES.join("\", \"")),
                ))
            }
        };
        Ok(trap)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::atoms::element;

    fn trap(energy_ev: f64) -> BeamTrap {
        let beam = ElectronBeam::with_radius(energy_ev, 0.2, 60e-6).unwrap();
        BeamTrap::new(
            beam,
            0.5,
            &[("H2".into(), 1e-8), ("N2".into(), 2e-9)],
            100.0,
        )
        .unwrap()
    }

    #[test]
    fn network_has_ionization_up_and_recombination_down() {
        let ar = element("Ar").unwrap();
        let net = trap(5000.0).network(ar).unwrap();
        assert_eq!(net.n_states(), 19);
        assert!(net.rate(0, 1) > net.rate(10, 11));
        assert!(net.rate(18, 17) > 0.0);
        // 5 keV cannot ionize Ar17+ (IE 4426 eV, NIST ASD) at a rate comparable to lower steps,
        // but it is above threshold, so the rate is positive.
        assert!(net.rate(17, 18) > 0.0);
    }

    #[test]
    fn charge_exchange_needs_an_exothermic_channel() {
        let ar = element("Ar").unwrap();
        let t = trap(5000.0);
        // Ar+ recombined to Ar binds by 15.76 eV (NIST ASD) > H2 15.43 eV: open;
        // an N2-only trap: 15.76 > 15.58: open as well; neutral Ar: nothing.
        assert!(t.charge_exchange_rate_per_s(ar, 1) > 0.0);
        assert_eq!(t.charge_exchange_rate_per_s(ar, 0), 0.0);
        let he = element("He").unwrap();
        assert!(t.charge_exchange_rate_per_s(he, 2) > 0.0);
    }

    #[test]
    fn ions_per_extraction_share_the_compensated_charge() {
        let t = trap(5000.0);
        let fr = [0.0, 0.0, 0.5, 0.5];
        let n = t.ions_per_extraction(&fr).unwrap();
        let total_charge: f64 = n.iter().enumerate().map(|(q, v)| q as f64 * v).sum();
        assert!((total_charge / (0.5 * t.electrons_in_trap()) - 1.0).abs() < 1e-12);
        for bad in [-0.5, f64::NAN, f64::INFINITY, 1.5] {
            assert!(t.ions_per_extraction(&[0.5, bad, 1.0]).is_err(), "{bad}");
        }
    }

    #[test]
    fn a_photon_beam_adds_its_jump_rates_to_the_trap() {
        let ne = element("Ne").unwrap();
        let mut t = trap(3000.0);
        let without = t.network(ne).unwrap();
        let photons = PhotonBeam::new(1500.0, 1e22, 0.0).unwrap();
        let alone = photon_network(ne, &photons, None).unwrap();
        t.photon_beam = Some(photons);
        let with = t.network(ne).unwrap();
        for from in 0..11 {
            for to in 0..11 {
                if from != to {
                    let sum = without.rate(from, to) + alone.rate(from, to);
                    assert!((with.rate(from, to) - sum).abs() <= 1e-12 * sum.max(1e-300));
                }
            }
        }
    }

    #[test]
    fn multiple_ionization_spreads_the_lotz_total_and_adds_direct_double() {
        let kr = element("Kr").unwrap();
        let mut t = trap(20_000.0);
        t.processes.multiple_ionization = true;
        for q in [0u32, 5, 20, 33] {
            let jumps = t.impact_jumps_cm2(kr, q).unwrap();
            let total: f64 = jumps.iter().map(|(_, s)| s).sum();
            let single = ionization_cross_sections_cm2(kr, q as i64, &[20_000.0], None).unwrap()[0];
            let ion = kr.ion(q as i64).unwrap();
            let double = direct_double_ionization_cm2(&ion, 20_000.0);
            assert!(
                (total - single - double).abs() <= 1e-12 * total,
                "{q}: {total} vs {single} + {double}"
            );
            assert!(jumps.iter().all(|(to, _)| *to > q && *to <= 36));
        }
        // A K-shell hole in neutral krypton relaxes to several charges: jumps beyond q+2 exist.
        let net = t.network(kr).unwrap();
        assert!(net.max_jump_up() > 2);
    }

    #[test]
    fn the_builder_validates_every_setting() {
        let beam = || ElectronBeam::with_radius(5000.0, 0.2, 60e-6).unwrap();
        let t = BeamTrap::builder(beam(), 0.5).build().unwrap();
        assert_eq!(t.ion_temperature_ev, DEFAULT_ION_TEMPERATURE_EV);
        assert_eq!(t.compensation, DEFAULT_COMPENSATION);
        for bad in [
            BeamTrap::builder(beam(), 0.5).compensation(1.5),
            BeamTrap::builder(beam(), 0.5).gas_temperature_k(0.0),
            BeamTrap::builder(beam(), 0.5).loss_per_s(vec![1.0, -1.0]),
            BeamTrap::builder(beam(), 0.5).feed(1, f64::NAN),
            BeamTrap::builder(beam(), 0.0),
            BeamTrap::builder(beam(), 0.5).model("hot"),
            // Dynamic settings need the dynamic model.
            BeamTrap::builder(beam(), 0.5).axial_barrier_v(100.0),
            BeamTrap::builder(beam(), 0.5).gas_feed_pa(vec![("N2".into(), 1e-8)]),
            BeamTrap::builder(beam(), 0.5)
                .model("dynamic")
                .drift_tube_radius_m(1e-6),
            BeamTrap::builder(beam(), 0.5)
                .model("dynamic")
                .axial_barrier_v(-1.0),
        ] {
            assert!(matches!(bad.build(), Err(Error::InvalidParameter { .. })));
        }
        assert_eq!(t.model.name(), "fixed");
        let d = BeamTrap::builder(beam(), 0.5)
            .model("dynamic")
            .gas_feed_pa(vec![("N2".into(), 1e-8)])
            .build()
            .unwrap();
        assert_eq!(d.model.name(), "dynamic");
        assert!(t.evolve_dynamic(&[("Ar".into(), 1.0)], &[1e-3]).is_err());
    }

    #[test]
    fn processes_by_name() {
        let p = Processes::from_names(&["ionization", "charge_exchange"]).unwrap();
        assert!(p.ionization && p.charge_exchange && !p.radiative_recombination);
        assert_eq!(p.names(), vec!["ionization", "charge_exchange"]);
        assert_eq!(
            Processes::default().names(),
            vec![
                "ionization",
                "radiative_recombination",
                "charge_exchange",
                "excitation_autoionization",
                "dielectronic_recombination"
            ]
        );
        assert!(Processes::from_names(&["fusion"]).is_err());
    }

    #[test]
    fn ea_and_dr_switched_off_leave_lotz_rr_and_cx_alone() {
        let fe = element("Fe").unwrap();
        let mut t = trap(4600.0);
        t.processes.excitation_autoionization = false;
        t.processes.dielectronic_recombination = false;
        let off = t.network(fe).unwrap();
        let flux = t.beam.electron_flux_per_cm2_s();
        for q in 0..26u32 {
            let up =
                flux * ionization_cross_sections_cm2(fe, q as i64, &[4600.0], None).unwrap()[0];
            let r = off.rate(q as usize, q as usize + 1);
            assert!((r - up).abs() <= 1e-12 * up.max(1e-300), "{q}");
        }
        for q in 1..=26u32 {
            let down =
                t.recombination_rate_per_s(fe, q).unwrap() + t.charge_exchange_rate_per_s(fe, q);
            let r = off.rate(q as usize, q as usize - 1);
            assert!((r - down).abs() <= 1e-12 * down, "{q}");
        }
        // Switched on, the network adds exactly the EA and DR rates; at 4.6 keV He-like iron
        // sits on its KLL resonances, and DR outweighs radiative recombination there.
        let on = trap(4600.0).network(fe).unwrap();
        let dr = t.dielectronic_rate_per_s(fe, 24).unwrap();
        assert!(dr > t.recombination_rate_per_s(fe, 24).unwrap());
        let d = on.rate(24, 23) - off.rate(24, 23);
        assert!((d - dr).abs() <= 1e-12 * dr);
        let ea = t.excitation_autoionization_rate_per_s(fe, 15).unwrap();
        assert!(ea > 0.0);
        assert!((on.rate(15, 16) - off.rate(15, 16) - ea).abs() <= 1e-9 * ea);
    }

    #[test]
    fn the_beam_spread_setting_overrides_the_space_charge_default() {
        let mut t = trap(4600.0);
        let default = t.energy_spread_ev();
        let b = &t.beam;
        assert_eq!(
            default,
            beam_energy_spread_ev(b.energy_ev, b.current_a, b.radius_m, t.compensation)
        );
        t.beam = t.beam.clone().with_energy_spread(Some(5.0)).unwrap();
        assert_eq!(t.energy_spread_ev(), 5.0);
        assert!(t.beam.clone().with_energy_spread(Some(-1.0)).is_err());
        // A narrower spread raises the peak of an on-resonance DR rate.
        let fe = element("Fe").unwrap();
        let kll = dr_resonances(&fe.ion(24).unwrap())[0].energy_ev;
        t.beam.energy_ev = kll;
        let narrow = t.dielectronic_rate_per_s(fe, 24).unwrap();
        t.beam.energy_spread_ev = Some(200.0);
        assert!(t.dielectronic_rate_per_s(fe, 24).unwrap() < narrow);
    }

    #[test]
    fn wrong_loss_length_is_rejected() {
        let ar = element("Ar").unwrap();
        let mut t = trap(5000.0);
        t.loss_per_s = vec![1.0; 3];
        assert!(matches!(t.network(ar), Err(Error::InvalidParameter { .. })));
    }
}
