//! Where ions land on the mass-to-charge axis: exact ion masses, line lists of a source's
//! ions with their relative intensities, overlaps at a given resolving power and the ranking
//! of a target isotope's charge states by how cleanly they can be selected.
//!
//! # Models
//!
//! * Ion masses ([`ion_mass_u`], source file `masses.rs`): m_ion = m_atom(A) − q·m_e +
//!   B_q/c², B_q = Σ_{j<q} IE_j; atomic masses AME2020 (Wang et al. 2021), ionization
//!   energies NIST ASD, constants CODATA 2018. As accurate as those tables.
//! * Molecular ions (`lines.rs`, [`crate::atoms::Molecule`]): one line per isotopologue,
//!   mass Σ atomic masses − q·mₑ (electron binding, ~1.6×10⁻⁸ u per electron, neglected),
//!   share from the multinomial isotopologue pattern; masses checked against `molmass`.
//!   The m/z 28 doublet ¹⁴N₂⁺ / ¹²C¹⁶O⁺ needs R ≈ 2 500 (`tests/molecules.rs`).
//! * Peaks ([`Peaks`], `peaks.rs`): FWHM = (m/q)/R, Gaussian, triangular or rectangular;
//!   idealised instrument responses (common practice).
//! * Overlaps ([`overlaps`], `overlaps.rs`): two peaks count as separated when their centres
//!   are at least one FWHM apart, so the resolving power needed is (m/q)/|Δ(m/q)|;
//!   contamination is the interferer's area inside the target's acceptance window relative
//!   to the target's.
//! * Clean charge states ([`clean_charge_states`], `clean.rs`): each charge state of the
//!   target isotope scored by produced fraction × purity in its window.
//!
//! Checked against hand calculations with periodictable masses, mendeleev's IEs and
//! scipy.constants / scipy.special in `tests/python/test_spectrum.py`.
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
