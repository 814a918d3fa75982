//! The scenario file as written: one serde struct per TOML table, every field optional
//! where the schema gives a default. `deny_unknown_fields` makes a misspelt field an error
//! that lists the accepted ones (the schema/parser agreement test reads those lists).

use std::collections::BTreeMap;

use serde::Deserialize;

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawScenario {
    pub title: Option<String>,
    pub description: Option<String>,
    pub target: Option<RawTarget>,
    pub species: Option<Vec<RawSpecies>>,
    pub beam_trap: Option<RawBeamTrap>,
    pub photon_beam: Option<RawPhotonBeam>,
    pub electron_impact: Option<RawElectronImpact>,
    pub plasma: Option<RawPlasma>,
    pub residual_gas_pa: Option<BTreeMap<String, f64>>,
    pub time: Option<RawTime>,
    pub energy_scan: Option<RawEnergyScan>,
    pub separator: Option<RawSeparator>,
    pub injection: Option<RawInjection>,
    pub uncertainty: Option<RawUncertainty>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawTarget {
    pub isotope: String,
    pub charge: i64,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawSpecies {
    pub name: String,
    pub amount: Option<f64>,
    pub initial_charge: Option<i64>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawBeamTrap {
    pub energy_ev: f64,
    pub current_a: f64,
    pub radius_m: Option<f64>,
    pub current_density_a_cm2: Option<f64>,
    pub magnetic_field_t: Option<f64>,
    pub cathode_radius_m: Option<f64>,
    pub cathode_temperature_k: Option<f64>,
    pub cathode_field_t: Option<f64>,
    pub length_m: f64,
    pub ion_temperature_ev: Option<f64>,
    pub gas_temperature_k: Option<f64>,
    pub compensation: Option<f64>,
    pub processes: Option<Vec<String>>,
    pub drift_tube_radius_m: Option<f64>,
    pub model: Option<String>,
    pub axial_barrier_v: Option<f64>,
    pub gas_feed_pa: Option<BTreeMap<String, f64>>,
    pub dynamic_processes: Option<Vec<String>>,
    pub injected_atoms: Option<f64>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawPhotonBeam {
    pub photon_energy_ev: f64,
    pub flux_cm2_s: f64,
    pub bandwidth_ev: Option<f64>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawElectronImpact {
    pub energy_ev: f64,
    pub energy_spread_ev: Option<f64>,
}

/// The plasma ion source (ECR type): every input of the core's `PlasmaSettings`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawPlasma {
    pub electron_temperature_ev: f64,
    pub electron_density_cm3: f64,
    pub hot_electron_temperature_ev: Option<f64>,
    pub hot_electron_fraction: Option<f64>,
    pub ion_temperature_ev: Option<f64>,
    pub confinement_time_s: OneOrMany,
    pub confinement_exponent: Option<f64>,
    pub gas_feed_pa: BTreeMap<String, f64>,
    pub gas_temperature_k: Option<f64>,
    pub neutral_residence_time_s: Option<f64>,
    pub wall_recycling: Option<f64>,
    pub plasma_volume_m3: Option<f64>,
    pub extraction_fraction: Option<f64>,
}

/// A number, or an array of numbers (one per charge state).
#[derive(Debug, Deserialize)]
#[serde(
    untagged,
    expecting = "expected a number (τ₁, s) or an array of numbers (one time per charge 1, 2, …)"
)]
pub(crate) enum OneOrMany {
    One(f64),
    Many(Vec<f64>),
}

#[derive(Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawTime {
    pub start_s: Option<f64>,
    pub stop_s: Option<f64>,
    pub points: Option<i64>,
    pub extraction_s: Option<f64>,
}

#[derive(Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawEnergyScan {
    pub start_ev: Option<f64>,
    pub stop_ev: Option<f64>,
    pub points: Option<i64>,
    pub scale: Option<String>,
}

#[derive(Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawSeparator {
    pub resolving_power: Option<f64>,
    pub peak_shape: Option<String>,
    pub aq_half_width: Option<f64>,
    pub relative_half_width: Option<f64>,
    pub window_fwhm: Option<f64>,
    pub aq_range: Option<Vec<f64>>,
}

/// Monte Carlo uncertainty bands (beam trap, fixed model).
#[derive(Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawUncertainty {
    pub samples: Option<i64>,
    pub seed: Option<i64>,
    pub ionization_factor: Option<f64>,
    pub recombination_factor: Option<f64>,
    pub charge_exchange_factor: Option<f64>,
    pub charge_correlation: Option<f64>,
}

/// The radioactive-beam breeding cycle (beam trap only).
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawInjection {
    pub isotope: Option<String>,
    pub ions_per_s: Option<f64>,
    pub ions_per_bunch: Option<f64>,
    pub capture_efficiency: Option<f64>,
    pub repetition_rate_hz: f64,
    pub breeding_time_s: Option<f64>,
    pub injected_charge: Option<i64>,
    pub daughter_charge: Option<String>,
    pub max_nuclides: Option<i64>,
}

/// Largest scenario file read (bytes): 1 MiB. A scenario is a few kB; the limit keeps a
/// mistaken path (`/dev/zero`, a data file) from being read without bound, and bounds the
/// parser's own working set (the TOML tree and the field positions take a small multiple
/// of the text), far below the memory limit of the size model (`crate::limits`).
pub const MAX_SCENARIO_BYTES: usize = 1 << 20;

/// Longest quote of a value in an error message: a longer token is cut to this many
/// characters and "…".
pub const MAX_QUOTE_CHARS: usize = 40;
