//! Defaults of the scenario fields that belong to the plan (grids, separator); the
//! defaults of a source's own settings are consts next to the source
//! (e.g. [`crate::sources::beam_trap::DEFAULT_ION_TEMPERATURE_EV`]).

use super::settings::{SourceSettings, Target};
use crate::atoms::{element, Element};
use crate::sources::beam_trap::{Processes, TrapModel};
use crate::sources::breeding::breeding_time_s;
use crate::sources::electron_beam::current_density_a_cm2;
use crate::sources::trap_dynamics::DynamicsSwitches;

/// Processes a beam trap can include (the core's list).
pub const PROCESSES: [&str; 6] = Processes::NAMES;
/// Ion models of a beam trap (the core's list, the default first).
pub const MODELS: [&str; 2] = TrapModel::NAMES;
/// Processes of the dynamic model (the core's list).
pub const DYNAMIC_PROCESSES: [&str; 7] = DynamicsSwitches::NAMES;
/// Peak shapes of the separator.
pub const PEAK_SHAPES: [&str; 3] = ["gaussian", "triangular", "rectangular"];
pub const DEFAULT_PEAK_SHAPE: &str = "gaussian";
/// Separator resolving power (m/q)/FWHM when none is given.
pub const DEFAULT_RESOLVING_POWER: f64 = 200.0;
/// Acceptance window width in FWHM when no half-width is given.
pub const DEFAULT_WINDOW_FWHM: f64 = 1.0;
/// Relative amount of a species.
pub const DEFAULT_AMOUNT: f64 = 1.0;
/// Points of the time grid.
pub const DEFAULT_TIME_POINTS: i64 = 300;
/// Points of the energy scan.
pub const DEFAULT_ENERGY_POINTS: i64 = 40;
/// start_s = stop_s × this when only stop_s (or nothing) is given.
pub const DEFAULT_START_OVER_STOP: f64 = 1e-5;
/// Most points a grid may have.
pub const MAX_POINTS: i64 = 100_000;

/// Without a [time] table: twenty times the stepwise breeding time of the target in a
/// beam trap (rounded up to a power of ten, 1 ms … 1000 s), else one second.
pub fn default_stop_s(source: &SourceSettings, target: &Target) -> f64 {
    let SourceSettings::BeamTrap(t) = source else {
        return 1.0;
    };
    let j = t
        .beam()
        .map_or(0.0, |b| current_density_a_cm2(b.current_a, b.radius_m));
    let tau = element(&target.symbol)
        .and_then(|el| breeding_time_s(el, i64::from(target.charge), t.energy_ev, j, None))
        .unwrap_or(f64::INFINITY);
    if tau.is_finite() && tau > 0.0 {
        10f64.powf((20.0 * tau).log10().ceil()).clamp(1e-3, 1e3)
    } else {
        1.0
    }
}

/// Without an [energy_scan] table: from 0.8 to 6 times the energy that opens the target
/// charge state (the last step's ionization energy for stepwise sources, the sum of
/// ionization energies for a single collision).
pub fn default_energy_range(source: &SourceSettings, target: &Target) -> (f64, f64) {
    let ies = element(&target.symbol)
        .map(Element::ionization_energies_ev)
        .unwrap_or(&[]);
    let q = target.charge as usize;
    let base = match source {
        SourceSettings::ElectronImpact(_) => ies.iter().take(q).sum::<f64>(),
        _ => ies.get(q.saturating_sub(1)).copied().unwrap_or(0.0),
    };
    if base.is_finite() && base > 0.0 {
        (0.8 * base, 6.0 * base)
    } else {
        (10.0, 1e5)
    }
}

/// Default energy spread of a trap's electron beam (one definition, next to the beam).
pub use crate::sources::electron_beam::beam_energy_spread_ev;

/// Points at which the spread-averaged fraction samples the beam's energy distribution.
pub const SPREAD_SAMPLES: usize = 17;
/// The energy scan of a beam trap adds points this far (eV) below and above the
/// thresholds that open and over-breed the target, so the map resolves their jumps.
pub const THRESHOLD_SIDE_EV: f64 = 0.01;

/// Without `injected_atoms`: the dynamic model starts from as many neutral atoms (of all
/// species together) as ions at the target charge would fill the trap's `compensation` of
/// the electrons' charge, `c·N_e/q` — the load the fixed model's ions per extraction assume.
pub fn default_injected_atoms(
    electrons_in_trap: f64,
    compensation: f64,
    target_charge: u32,
) -> f64 {
    compensation * electrons_in_trap / f64::from(target_charge.max(1))
}

/// Monte Carlo samples of `[uncertainty]` when none is given.
pub const DEFAULT_UNCERTAINTY_SAMPLES: i64 = 200;
/// Most Monte Carlo samples a scenario may ask for.
pub const MAX_UNCERTAINTY_SAMPLES: i64 = 100_000;
/// Seed of the Monte Carlo samples when none is given.
pub const DEFAULT_UNCERTAINTY_SEED: i64 = 0;
/// The percentiles of every uncertainty band in the report.
pub const BAND_PERCENTILES: [f64; 3] = [5.0, 50.0, 95.0];
