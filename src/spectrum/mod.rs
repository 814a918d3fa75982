//! Where ions land on the mass-to-charge axis: exact ion masses (physics.md §11), line lists
//! of a source's ions with their relative intensities, overlaps at a given resolving power and
//! the ranking of a target isotope's charge states by how cleanly they can be selected.
//!
//! Conventions: m/q in u per elementary charge (u/e), A/q with A the mass number, resolving
//! power R = (m/q)/Δ(m/q) with Δ(m/q) the full width at half maximum (FWHM) of a peak. At a
//! fixed R every peak's FWHM is its own m/q divided by R.

mod clean;
mod lines;
mod masses;
mod overlaps;
mod peaks;

pub use crate::atoms::{isotope_label, parse_species, resolve_isotope, Species};
pub use clean::{clean_charge_states, AcceptanceWindow, ChargeStateRank};
pub use lines::{aq_lines, Line, LineList, SpeciesInput};
pub use masses::{binding_energy_ev, binding_mass_u, ion_mass_u, mass_over_charge};
pub use overlaps::{overlaps, Interference, OverlapReport, OverlapSettings};
pub use peaks::{erf, erfc, PeakShape, Peaks};
