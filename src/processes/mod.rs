//! Atomic processes: cross sections, rate coefficients and the vacancy cascade, one module
//! per process. They are functions of energies and either plain atomic numbers (binding
//! energies, occupancies, charges) or an [`crate::atoms::Ion`] whose data they read (its
//! subshells, binding energies and X-ray yields); they know nothing of beams, traps or
//! rate networks, which the layers above build from them.

pub mod beam_heating;
pub mod charge_exchange;
pub mod core_excitation;
pub mod coulomb_logarithm;
pub mod dielectronic;
pub mod double_ionization;
pub mod escape;
pub mod excitation_autoionization;
pub mod gases;
pub mod henke;
pub mod ion_collisions;
pub mod ion_lotz;
pub mod kramers;
pub mod lotz;
pub mod memo;
pub mod molecular_ionization;
pub mod photoionization;
pub mod radial_well;
pub mod radiative_recombination;
pub mod radiative_recombination_rate;
pub mod relaxation;
pub mod special;
pub mod vacancy_jumps;
pub mod verner;
