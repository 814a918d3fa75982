//! Cross sections and rate coefficients as pure functions of plain numbers (energies,
//! binding energies, occupancies, charges). One module per physical process; element data
//! are wired in by the callers.

pub mod charge_exchange;
pub mod double_ionization;
pub mod gases;
pub mod ion_lotz;
pub mod kramers;
pub mod lotz;
pub mod photoionization;
pub mod radiative_recombination;
pub mod relaxation;
pub mod special;
pub mod vacancy_jumps;
