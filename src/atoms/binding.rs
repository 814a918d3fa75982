//! Binding energies of every occupied subshell of every ion.
//!
//! # Model
//!
//! Rule (our own documented approximation): the subshell ionized in step
//! q → q+1 is bound by exactly IE_q; any other subshell s interpolates between its
//! neutral binding B_s(0) and the exact value IE_{q*} at the first step q* ≥ q that
//! removes an electron from it, with a Coulomb-shift weight
//!
//!   B_s(q) = B_s(0) + [IE_{q*} − B_s(0)] · W_q / W_{q*},  W_q = Σ_{j<q} 2√(Ry·IE_j)/n_j,
//!
//! n_j the principal quantum number of the subshell ionized at step j: removing an
//! electron of binding I from shell n raises the potential inside its orbit by about
//! e²/⟨r⟩ = 2√(Ry·I)/n for a hydrogenic orbital. No subshell is bound less than IE_q, the
//! least energy that removes any electron of ion q (the interpolation can dip a few eV below
//! it where two subshells are close, e.g. 2s and 2p of F-like ions).
//!
//! The ionized subshell of step q → q+1 is the one whose occupancy drops between the ground
//! configurations of q and q+1 (where several drop, the highest n, then the highest l: ions
//! lose 4s before 3d). Neutral bindings B_s(0) are the edges of Elam, Ravel & Sieber,
//! Radiat. Phys. Chem. 63, 121 (2002) (via xraydb), spin–orbit pairs merged by occupancy,
//! and never below IE₀ (the edges refer to the Fermi level of the solid: Fe 3d shows 2 eV).
//! Where the tables have no edge (Z > 98) the unscaled sum predicts it,
//! B_s(0) = IE_{q*} − W_{q*}, never below IE₀.
//!
//! # Validity and accuracy
//!
//! Exact at both ends by construction (q = 0: max(edge, IE₀); q = q*(s): IE_{q*}), both
//! tested for every ion of Kr. In between it is an interpolation of about 1–10 %
//! (estimated; no measured ion bindings are compared here). Measured: the unscaled sum
//! IE_{q*} − W_{q*} reproduces the xraydb K edge of neutral atoms within 3 % for Z = 10–98
//! (`tests/python/test_atoms_data.py`; within 1 % above Z = 14, 23 % off for Li, computed
//! while the project was planned); for argon W₁₆ = 911 eV against the needed
//! IE₁₆ − B_1s(0) = 915 eV. Binding energies never decrease with charge for Z = 1–103
//! (`tests/atoms_data.rs`). Values worked by hand: Ar⁺ 3s ≈ 38 eV, Ar⁸⁺ 1s ≈ 3366 eV.

use super::subshell::{Configuration, Subshell};
use super::ShellState;
use crate::constants::RYDBERG_EV;

/// Coulomb-shift weights W_q for q = 0 … len (W_0 = 0).
pub(crate) fn coulomb_shift_sums(ionized: &[Subshell], ionization_energies_ev: &[f64]) -> Vec<f64> {
    let mut sums = Vec::with_capacity(ionized.len() + 1);
    let mut w = 0.0;
    sums.push(w);
    for (s, ie) in ionized.iter().zip(ionization_energies_ev) {
        w += 2.0 * (RYDBERG_EV * ie).sqrt() / s.n.max(1) as f64;
        sums.push(w);
    }
    sums
}

/// Binding energies of the occupied subshells of every charge state.
///
/// `configurations[q]` for q = 0 … Z (the last is the bare ion), `ionized[q]` and
/// `ionization_energies_ev[q]` for q = 0 … Z−1; `neutral_binding_ev(s)` returns the
/// tabulated neutral binding (already max(edge, IE₀)) or None.
pub(crate) fn ion_shell_bindings(
    configurations: &[Configuration],
    ionized: &[Subshell],
    ionization_energies_ev: &[f64],
    neutral_binding_ev: &dyn Fn(Subshell) -> Option<f64>,
) -> Vec<Vec<ShellState>> {
    let w = coulomb_shift_sums(ionized, ionization_energies_ev);
    let ie0 = ionization_energies_ev.first().copied().unwrap_or(0.0);
    let steps = ionized.len().min(ionization_energies_ev.len());
    (0..configurations.len())
        .map(|q| {
            let config = &configurations[q];
            config
                .shells()
                .iter()
                .map(|&(s, occupancy)| {
                    let binding_ev = if q < steps && ionized[q] == s {
                        ionization_energies_ev[q]
                    } else {
                        match end_step(configurations, ionized, q, s) {
                            Some(q_star) => {
                                let ie_star = ionization_energies_ev[q_star];
                                // Where the tables have no edge, the unscaled Coulomb-shift sum
                                // predicts the neutral binding (see the module documentation).
                                let b0 = neutral_binding_ev(s)
                                    .unwrap_or(ie_star - w[q_star])
                                    .max(ie0);
                                let interpolated = if w[q_star] > 0.0 {
                                    b0 + (ie_star - b0) * w[q] / w[q_star]
                                } else {
                                    b0
                                };
                                // IE_q is the least energy that removes any electron of ion q.
                                interpolated
                                    .max(ionization_energies_ev.get(q).copied().unwrap_or(0.0))
                            }
                            None => neutral_binding_ev(s).unwrap_or(ie0).max(ie0),
                        }
                    };
                    ShellState {
                        subshell: s,
                        occupancy,
                        binding_ev,
                    }
                })
                .collect()
        })
        .collect()
}

/// First step j ≥ q at which subshell s is the ionized one; failing that (rearrangements
/// in open d and f shells) the first step at which its occupancy drops.
fn end_step(
    configurations: &[Configuration],
    ionized: &[Subshell],
    q: usize,
    s: Subshell,
) -> Option<usize> {
    (q..ionized.len()).find(|&j| ionized[j] == s).or_else(|| {
        (q..ionized.len()).find(|&j| {
            configurations.get(j + 1).map_or(0, |c| c.occupancy(s)) < configurations[j].occupancy(s)
        })
    })
}
