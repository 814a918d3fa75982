//! chargecast — plans ion-source runs.
//!
//! # Layers
//!
//! Each layer uses only the layers before it, as the code imports them (checked by
//! `tests/layers.rs`):
//!
//! 1. `data/` — embedded CSV tables with provenance headers (compiled in at build time);
//! 2. [`atoms`] — elements, ions, configurations, subshell binding energies, X-ray levels,
//!    isotopes;
//! 3. [`processes`] — one module per atomic process: cross sections, rate coefficients and
//!    the vacancy cascade, as functions of energies and of an [`atoms::Ion`];
//! 4. [`network`] — the rate network of one element (states 0…Z, jumps, losses, feeds);
//! 5. [`solve`] — time evolution and steady state of a network;
//! 6. [`sources`] — electron beam, electron-beam trap, photon beam, single-collision
//!    electron-impact source, breeding: settings → a [`network::RateNetwork`] per element;
//! 7. `plan` — the top core layer: a scenario run from its settings to the report; it may
//!    use everything below and [`spectrum`];
//! 8. `python` (feature `python`) — the PyO3 bindings, the only place with pyo3 types.
//!
//! [`spectrum`] (ion masses, A/q lines, peak shapes, overlaps) sits beside `plan`: it uses
//! [`atoms`] and [`processes`] only. [`constants`] and [`error`] are shared by every layer.
//!
//! # Model reference
//!
//! Each model's formula, published source, validity range and measured accuracy is in its
//! module's documentation: [`processes::lotz`], [`processes::ion_lotz`],
//! [`processes::radiative_recombination`], [`processes::charge_exchange`],
//! [`processes::photoionization`], [`processes::kramers`], [`processes::relaxation`],
//! [`processes::vacancy_jumps`], [`processes::double_ionization`], [`atoms::binding`],
//! [`sources::electron_beam`], [`sources::beam_trap`], [`sources::breeding`],
//! [`sources::photon_beam`], [`sources::electron_impact`], [`spectrum`] (ion masses, peaks,
//! overlaps) and the solver in [`solve`].

pub mod atoms;
pub mod constants;
pub mod error;
pub mod interrupt;
pub mod limits;
pub mod network;
pub mod plan;
pub mod processes;
pub mod solve;
pub mod sources;
pub mod spectrum;

#[cfg(feature = "python")]
mod python;

pub use error::{Error, Result};
