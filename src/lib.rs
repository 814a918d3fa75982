//! chargecast — plans ion-source runs.
//!
//! Layers, each depending only on those before it:
//! `data` (embedded CSV tables) → [`atoms`] (elements, ions, subshells, isotopes) →
//! [`processes`] (cross sections as pure functions of energy) → [`sources`] (electron-beam
//! traps, photon beams, single-collision sources: per-charge rates) → [`network`] (the rate
//! network of one element) → [`solve`] (time evolution and steady state) → [`spectrum`]
//! (ion masses, A/q lines, overlaps) → `python` (PyO3 bindings, feature `python`).

pub mod atoms;
pub mod constants;
pub mod error;
pub mod network;
pub mod plan;
pub mod processes;
pub mod solve;
pub mod sources;
pub mod spectrum;

#[cfg(feature = "python")]
mod python;

pub use error::{Error, Result};
