//! Planning: the top core layer. A scenario file (TOML) describes a planned run — the
//! source and its settings, the species and their amounts, the residual gas, the target
//! isotope and charge, the separator, the time and energy grids; [`run`] computes the
//! [`Report`] of everything a plan shows.
//!
//! Reading goes in three passes so every error can name the file, the line and the field:
//! the TOML syntax, the serde schema ([`schema`]: unknown fields, wrong types), then the
//! values ([`checker`]: ranges, elements, isotopes, gases; the core source's constructor
//! checks its own settings). The schema is documented field by field in the docstring of
//! the Python loader (`python/chargecast/scenario.py`) and in the commented example
//! `python/chargecast/scenarios/reference.toml`; `tests/plan_schema.rs` fails when either
//! disagrees with the parser.

pub mod checker;
pub mod defaults;
pub mod dynamics;
pub mod positions;
pub mod report;
pub mod run;
pub(crate) mod schema;
pub mod settings;
pub mod warnings;

pub use checker::parse_scenario;
pub use dynamics::{DynamicChargeRow, DynamicReport, DynamicSpeciesRow};
pub use report::*;
pub use run::run;
pub use schema::{MAX_QUOTE_CHARS, MAX_SCENARIO_BYTES};
pub use settings::{
    BeamTrapSettings, ElectronImpactSettings, EnergyGrid, PhotonBeamSettings, Scenario, Separator,
    SourceSettings, SpeciesEntry, Target, TimeGrid, UncertaintySettings,
};
pub use warnings::Warning;
