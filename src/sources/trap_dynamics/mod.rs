//! Ion dynamics in an electron-beam trap: several species, their temperatures, heating,
//! energy exchange, escape and evaporative cooling, overlap with the beam, continuous gas
//! feeds and the space-charge limit.
//!
//! # State
//! For every species s (an element in its natural mix, or one isotope) and charge q = 0…Z:
//! the number of particles in the trap `N_sq` and their thermal content `U_sq = N_sq kT_sq`
//! (eV; the thermal energy is (3/2)U). Charge 0 holds the atoms injected into the beam at
//! t = 0 (as in the fixed-temperature model) and the neutrals that charge exchange makes.
//! Six running totals close the bookkeeping: ions fed in, particles escaped, and the
//! thermal energy brought in by beam heating, by ionization heating and by the feed, and
//! carried out by escape.
//!
//! # Equations
//! With `f_sq` the overlap of the cloud with the beam, `T = U/N`:
//! - electron impact (ionization q → q′ ≥ q+1 and radiative recombination q → q−1, the rates
//!   of the fixed model at the beam energy) × `f_sq`;
//! - charge exchange q → q−1 on the residual and fed gases, `Σ n σ_MS v̄(T)`, with the ion
//!   speed at the population's own temperature;
//! - every transfer of particles between charge states carries their thermal content;
//! - Landau–Spitzer heating `dU = (2/3) f H N` (see `processes::beam_heating`), with the
//!   beam's Coulomb logarithm;
//! - energy exchange between every pair of populations, `dT_a/dt = Σ_b ν_ε^{a|b}(T_b − T_a)`
//!   (see `processes::ion_collisions`), with the density of b seen by a taken over the larger
//!   of the two clouds' volumes, `n_b = N_b/(L·max(A_a, A_b))`, which keeps the exchange
//!   exactly energy-conserving (`N_a ν^{a|b} = N_b ν^{b|a}`);
//! - escape over the axial barrier `V_ax` and the radial well `V_rad` (which shrinks with
//!   the compensation), each at `escape_rate_per_s(ν_i, ω, v̄/length)` with `ω = qV/T`, and
//!   `(2/3)(qV + T)` of U leaving with each ion (see `processes::escape`); neutrals fly out
//!   at `v̄/L`;
//! - optional ionization heating: an ion ionized inside the beam gains the mean potential
//!   `⟨φ⟩` of its place in the well (see `processes::radial_well`);
//! - gas feeds and residual gas: neutral gas of density `n₀ = p/(k_B T_gas)` is ionized
//!   inside the beam volume at `n₀ π r_e² L (j/e) σ(E)` per second — σ a noble gas atom's
//!   single-ionization cross section (the network's 0 → 1 step), a molecule's additivity
//!   cross section — and a molecular ion dissociates at once into one atomic ion, its
//!   element and charge shared by the bundled fragmentation pattern, while the neutral
//!   fragments leave (see [`crate::sources::residual_gas`] for the rule, its sources and the
//!   rate estimate that lets molecular ions go unkept). The new ions are born at the gas
//!   temperature (the few eV of dissociation energy are neglected: our approximation). The
//!   trap's residual gas (`residual_gas_pa`, a continuous source in a real trap) is such a
//!   source by default; with the switch `residual_gas_ions` off it is only a
//!   charge-exchange target, as in the fixed model;
//! - the space-charge limit: compensation `c = Σ q N / N_e` (N_e = IL/(ev)) sets the well
//!   `φ₀(1 − c)`; it replaces the fixed compensation when `space_charge` is on.
//!
//! Sources: B. M. Penetrante, J. N. Bardsley, D. DeWitt, M. Clark and D. Schneider, Phys.
//! Rev. A 43, 4861 (1991) for the structure of the model; the process modules cite theirs.
//!
//! # Limits and accuracy
//! With every dynamic process off (overlap, heating, exchange, escape, ionization heating),
//! temperatures stay at their initial value and the populations follow the fixed model's
//! linear network: the tests check the two agree to 1e-9. Particle and energy bookkeeping
//! balance to the solver tolerance (tested to 1e-9 and 1e-6 relative). The model inherits
//! the process modules' accuracies (Lotz ±30–40 %, escape and Coulomb logarithms ≈ 10–50 %);
//! the qualitative behaviour it reproduces (light ions leave first, a light coolant raises
//! the heavy species' high charge states and lowers their temperature, a deeper barrier holds
//! ions longer) is what Penetrante et al. (1991) and M. A. Levine et al., Physica Scripta
//! T22, 157 (1988) describe.

mod rates;
mod run;
mod steady;
mod system;

pub(crate) use system::TrapSystem;

use crate::atoms::{parse_species, Species};
use crate::error::{require_positive, Error, Result};
use crate::processes::gases::gas;
use crate::solve::stiff::integrate_stiff;
pub use run::{Bookkeeping, DynamicRun, SpeciesHistory};
pub use steady::SteadyMethod;

use super::beam_trap::{BeamTrap, GasComponent};
use rates::SpeciesRates;

/// Default axial barrier (V) of the dynamic model.
pub const DEFAULT_AXIAL_BARRIER_V: f64 = 100.0;
/// Default drift-tube radius (m) of the dynamic model.
pub const DEFAULT_DRIFT_TUBE_RADIUS_M: f64 = 5e-3;
/// Default relative tolerance of the nonlinear solve.
pub const DEFAULT_RTOL: f64 = 1e-8;

/// The one rule for the solver's relative tolerance: 1e-14 … 1e-2.
pub fn require_rtol(rtol: f64) -> Result<f64> {
    if rtol.is_finite() && (1e-14..=1e-2).contains(&rtol) {
        Ok(rtol)
    } else {
        Err(Error::invalid("rtol", rtol, "must lie in 1e-14 … 1e-2"))
    }
}

/// Atoms loaded when a species is named without an amount: a trace, 1e-3 of the electrons
/// in the trap, so that its ions barely change the space charge.
pub const DEFAULT_LOAD_PER_ELECTRON: f64 = 1e-3;

/// The trace load of [`DEFAULT_LOAD_PER_ELECTRON`] for `trap`.
pub fn default_load(trap: &BeamTrap) -> f64 {
    DEFAULT_LOAD_PER_ELECTRON * trap.electrons_in_trap()
}

/// Which dynamic processes are on (all but ionization heating by default).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DynamicsSwitches {
    /// Electron-impact rates scaled by the cloud's overlap with the beam.
    pub overlap: bool,
    /// Landau–Spitzer heating by the beam.
    pub heating: bool,
    /// Energy exchange between all populations.
    pub exchange: bool,
    /// Escape over the axial and radial barriers (and neutrals flying out).
    pub escape: bool,
    /// Potential energy gained by ions ionized inside the well.
    pub ionization_heating: bool,
    /// Compensation and well depth from the trapped charge (else the trap's fixed value).
    pub space_charge: bool,
    /// The trap's residual gas (`residual_gas_pa`) is ionized in the beam like a fed gas,
    /// so its ions are populations of the run; off, it is a charge-exchange target only.
    pub residual_gas_ions: bool,
}

impl Default for DynamicsSwitches {
    fn default() -> Self {
        DynamicsSwitches {
            overlap: true,
            heating: true,
            exchange: true,
            escape: true,
            ionization_heating: false,
            space_charge: true,
            residual_gas_ions: true,
        }
    }
}

impl DynamicsSwitches {
    /// Names of the dynamic processes, in the order of the fields.
    pub const NAMES: [&'static str; 7] = [
        "overlap",
        "heating",
        "exchange",
        "escape",
        "ionization_heating",
        "space_charge",
        "residual_gas_ions",
    ];

    fn flags(&mut self) -> [&mut bool; 7] {
        [
            &mut self.overlap,
            &mut self.heating,
            &mut self.exchange,
            &mut self.escape,
            &mut self.ionization_heating,
            &mut self.space_charge,
            &mut self.residual_gas_ions,
        ]
    }

    /// The set named by `names` (each one of [`DynamicsSwitches::NAMES`]); the others off.
    pub fn from_names<S: AsRef<str>>(names: &[S]) -> Result<Self> {
        let mut sw = Self::none();
        for name in names {
            let Some(k) = Self::NAMES.iter().position(|n| *n == name.as_ref()) else {
                return Err(Error::invalid(
                    "dynamic_processes",
                    format!("{:?}", name.as_ref()),
                    &format!("each must be one of \"{}\"", Self::NAMES.join("\", \"")),
                ));
            };
            *sw.flags()[k] = true;
        }
        Ok(sw)
    }

    /// The names of the processes that are on.
    pub fn names(&self) -> Vec<&'static str> {
        let mut copy = *self;
        let on: Vec<bool> = copy.flags().iter().map(|f| **f).collect();
        Self::NAMES
            .iter()
            .zip(on)
            .filter(|(_, on)| *on)
            .map(|(n, _)| *n)
            .collect()
    }

    /// Everything off: the fixed-temperature model, solved as a nonlinear system (the
    /// residual gas a charge-exchange target only, as there).
    pub fn none() -> Self {
        DynamicsSwitches {
            overlap: false,
            heating: false,
            exchange: false,
            escape: false,
            ionization_heating: false,
            space_charge: false,
            residual_gas_ions: false,
        }
    }
}

/// The settings the dynamic model adds to a beam trap.
#[derive(Clone, Debug)]
pub struct TrapDynamics {
    /// Axial barrier (V) at the trap's ends.
    pub axial_barrier_v: f64,
    /// Drift-tube radius (m), larger than the beam radius.
    pub drift_tube_radius_m: f64,
    /// Neutral gases injected continuously (coolant, buffer, analyte or residual gas).
    pub gas_feed: Vec<GasComponent>,
    pub switches: DynamicsSwitches,
    /// Relative tolerance of the nonlinear solve.
    pub rtol: f64,
}

impl TrapDynamics {
    /// Validated settings: barrier ≥ 0 V, drift tube wider than the beam of `trap`, feed
    /// pressures ≥ 0 for gases in the gas table.
    pub fn new(
        trap: &BeamTrap,
        axial_barrier_v: f64,
        drift_tube_radius_m: f64,
        gas_feed_pa: &[(String, f64)],
    ) -> Result<Self> {
        if trap.photon_beam.is_some() {
            return Err(photon_beam_error());
        }
        crate::error::require_non_negative("axial_barrier_v", axial_barrier_v)?;
        require_positive("drift_tube_radius_m", drift_tube_radius_m)?;
        if drift_tube_radius_m <= trap.beam.radius_m {
            return Err(Error::invalid(
                "drift_tube_radius_m",
                drift_tube_radius_m,
                &format!(
                    "must exceed the beam radius ({:.4e} m): the drift tube surrounds the beam",
                    trap.beam.radius_m
                ),
            ));
        }
        let gas_feed = gas_feed_pa
            .iter()
            .map(|(name, p)| {
                crate::error::require_non_negative(&format!("gas_feed_pa[{name:?}]"), *p)?;
                Ok(GasComponent {
                    gas: gas(name)?,
                    pressure_pa: *p,
                })
            })
            .collect::<Result<Vec<_>>>()?;
        Ok(TrapDynamics {
            axial_barrier_v,
            drift_tube_radius_m,
            gas_feed,
            switches: DynamicsSwitches::default(),
            rtol: DEFAULT_RTOL,
        })
    }

    /// Evolve the species `loads` (name → atoms injected into the beam at t = 0, neutral,
    /// at the trap's `ion_temperature_ev`) in `trap`. Elements of the fed gases join
    /// as species of their own (with no initial load) unless listed.
    pub fn evolve(
        &self,
        trap: &BeamTrap,
        loads: &[(String, f64)],
        times_s: &[f64],
    ) -> Result<DynamicRun> {
        let system = self.system(trap, loads)?;
        // The states and the run's four arrays per species: about three times the state.
        crate::limits::check_memory(
            "the dynamic run",
            crate::limits::bytes_for(&[times_s.len(), system.dim, 3], 8),
        )?;
        let tolerances = system.tolerances(self.rtol);
        let y = integrate_stiff(&system, &system.initial_state(), times_s, &tolerances)?;
        Ok(DynamicRun::from_states(&system, times_s, &y))
    }

    /// The right-hand side the model integrates, for external checks (scipy) and steady
    /// states.
    pub(crate) fn system(&self, trap: &BeamTrap, loads: &[(String, f64)]) -> Result<TrapSystem> {
        if trap.photon_beam.is_some() {
            return Err(photon_beam_error());
        }
        if loads.is_empty() && self.ion_sources(trap).is_empty() {
            return Err(Error::invalid(
                "species",
                "none",
                "give at least one species with its initial number of atoms, or a gas feed (or residual gas with residual_gas_ions on)",
            ));
        }
        let mut species: Vec<(String, Species, f64)> = Vec::new();
        for (name, ions) in loads {
            crate::error::require_non_negative(&format!("species[{name:?}]"), *ions)?;
            let sp = parse_species(name)?;
            let label = label(&sp);
            if species.iter().any(|(l, _, _)| *l == label) {
                return Err(Error::invalid(
                    "species",
                    name,
                    "is listed twice: give each species once",
                ));
            }
            species.push((label, sp, *ions));
        }
        for feed in self.ion_sources(trap) {
            for (symbol, _) in feed.gas.atoms {
                let sp = parse_species(symbol)?;
                let label = label(&sp);
                if !species.iter().any(|(l, _, _)| *l == label) {
                    species.push((label, sp, 0.0));
                }
            }
        }
        let rates = species
            .iter()
            .map(|(label, sp, ions)| SpeciesRates::new(trap, self, label, sp, *ions))
            .collect::<Result<Vec<_>>>()?;
        TrapSystem::new(trap, self, rates)
    }
}

impl TrapDynamics {
    /// The gases whose ions the run makes: the feeds, and the trap's residual gas unless
    /// `residual_gas_ions` is off; gases at zero pressure make none and add no species.
    pub(crate) fn ion_sources<'a>(&'a self, trap: &'a BeamTrap) -> Vec<&'a GasComponent> {
        let residual: &[GasComponent] = if self.switches.residual_gas_ions {
            &trap.residual_gas
        } else {
            &[]
        };
        self.gas_feed
            .iter()
            .chain(residual)
            .filter(|g| g.pressure_pa > 0.0)
            .collect()
    }
}

fn photon_beam_error() -> Error {
    Error::invalid(
        "photon_beam",
        "set",
        "the dynamic model does not include a photon beam yet: use model \"fixed\"",
    )
}

fn label(sp: &Species) -> String {
    match sp {
        Species::Natural(e) => e.symbol().to_string(),
        Species::Isotope(e, iso) => format!("{}{}", iso.mass_number, e.symbol()),
    }
}

#[cfg(test)]
mod tests;
