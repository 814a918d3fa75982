//! Charge jumps through the vacancy cascade: one electron removed from a subshell of an
//! ion, then the hole relaxes ([`super::relaxation`]) and the ion ends some charges higher.
//!
//! For an ion of charge q whose subshells s lose an electron at weights w_s (a cross
//! section σ_s in cm², or a rate Φ·σ_s or (j/e)·σ_s in s⁻¹), the weight of ending at
//! charge c = q + 1 + k is
//!
//!   W(q → q+1+k) = Σ_s w_s · P_s(k),
//!
//! with P_s(k) the relaxation probabilities of a hole in s, made by a particle of energy E
//! (the electron or photon energy, which opens shake-off above its threshold; see
//! [`super::relaxation`]). Since Σ_k P_s(k) = 1 the jumps
//! add up to Σ_s w_s: relaxation spreads a single-ionization total over higher charges but
//! does not change it. This one sum serves the electron-beam trap (Lotz σ_s of every ion),
//! the single-collision electron-impact source (Lotz σ_s of the neutral atom) and the photon
//! beam (photoionization rates Φ·σ_s); its accuracy is that of the weights and of the
//! cascade model.

use crate::atoms::{Ion, Subshell};
use crate::error::Result;
use crate::processes::relaxation::{vacancy_relaxation_with, Relaxation};

/// Weights of ending at each final charge 0…Z (index = final charge; indices ≤ q are 0)
/// when subshell s of `ion` loses one electron at weight w_s, for `per_subshell` = (s, w_s)
/// pairs, the holes made by a photon or electron of energy `excitation_ev` (eV;
/// `f64::INFINITY` for the sudden limit) and relaxing with the channels of `relaxation`.
/// Subshells with a weight that is zero, negative or NaN are skipped (closed channels below
/// threshold).
pub fn vacancy_jumps(
    ion: &Ion,
    relaxation: Relaxation,
    excitation_ev: f64,
    per_subshell: impl IntoIterator<Item = (Subshell, f64)>,
) -> Result<Vec<f64>> {
    let mut per_charge = vec![0.0; ion.element.z() as usize + 1];
    let first = ion.charge as usize + 1;
    for (subshell, weight) in per_subshell {
        if weight.is_nan() || weight <= 0.0 {
            continue;
        }
        for (k, p) in vacancy_relaxation_with(ion, subshell, relaxation, excitation_ev)?
            .iter()
            .enumerate()
        {
            if let Some(slot) = per_charge.get_mut(first + k) {
                *slot += weight * p;
            }
        }
    }
    Ok(per_charge)
}

/// The non-zero entries of a per-charge vector as (final charge, value) pairs.
pub fn nonzero_jumps(per_charge: Vec<f64>) -> Vec<(u32, f64)> {
    per_charge
        .into_iter()
        .enumerate()
        .filter(|(_, v)| *v > 0.0)
        .map(|(to, v)| (to as u32, v))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::atoms::element;

    #[test]
    fn an_outer_hole_stays_and_the_total_is_kept() {
        let ar = element("Ar").unwrap();
        let ion = ar.ion(0).unwrap();
        let states = ion.subshells();
        // Weight 1 in the 3p subshell only: an outer hole cannot decay, so Ar → Ar+.
        let outer = states.last().unwrap().subshell;
        let j = vacancy_jumps(&ion, Relaxation::default(), f64::INFINITY, [(outer, 2.0)]).unwrap();
        assert_eq!(j[1], 2.0);
        assert_eq!(j.iter().sum::<f64>(), 2.0);
        // Every subshell at weight 1: the jumps sum to the number of subshells, and the
        // K hole reaches beyond Ar2+ (Carlson & Krause 1965 measured mostly Ar2+…Ar5+ after
        // a K hole; from memory).
        let all = vacancy_jumps(
            &ion,
            Relaxation::default(),
            f64::INFINITY,
            states.iter().map(|s| (s.subshell, 1.0)),
        )
        .unwrap();
        let total: f64 = all.iter().sum();
        assert!((total - states.len() as f64).abs() < 1e-12, "{total}");
        assert!(all[0] == 0.0 && all[4] > 0.0);
    }

    #[test]
    fn closed_channels_are_skipped() {
        let kr = element("Kr").unwrap();
        let ion = kr.ion(5).unwrap();
        let s = ion.subshells()[0].subshell;
        let j = vacancy_jumps(
            &ion,
            Relaxation::default(),
            1e4,
            [(s, 0.0), (s, -1.0), (s, f64::NAN)],
        )
        .unwrap();
        assert!(j.iter().all(|v| *v == 0.0));
        assert_eq!(j.len(), 37);
        assert!(nonzero_jumps(j).is_empty());
        assert_eq!(nonzero_jumps(vec![0.0, 0.0, 3.0]), vec![(2, 3.0)]);
    }
}
