//! Radiative recombination: the Kim–Pratt formula, and the summed Kramers cross section of
//! a bare ion as a check.
//!
//! # Model
//!
//! Y. S. Kim and R. H. Pratt, Phys. Rev. A 27, 2913 (1983) (journal and page from memory):
//! an ion of charge q of element Z captures an electron of energy E (eV),
//!
//!   σ_RR(E) = (8π/3√3)·α·ƛ_e²·χ·ln(1 + χ/(2 n_eff²)),  χ = 2 Z_eff² Ry / E,
//!
//! with Z_eff = (Z + q)/2, n_eff = n₀ + (1 − W) − 0.3, n₀ the principal quantum number of the
//! ion's outermost occupied shell (1 for a bare ion) and W the unoccupied fraction of the
//! 2n₀² states of that shell (from memory). The prefactor is 5.26×10⁻²³ cm² (ƛ_e the reduced
//! Compton wavelength; CODATA 2018). Pitfalls this form avoids: χ = Z²Ry/E would halve σ, the
//! unreduced Compton wavelength would make it 39 times too large.
//!
//! Check: H. A. Kramers, Phil. Mag. 46, 836 (1923), summed over n for a bare ion,
//! σ_n = (32π/3√3)·α³·a₀² · Z⁴Ry² / [n E (n²E + Z²Ry)], prefactor 2.105×10⁻²² cm².
//!
//! # Validity and accuracy
//!
//! Radiative capture only (no dielectronic recombination). Measured: for bare ions
//! (Z = 1–54, E = 0.01–100 Z²Ry) Kim–Pratt is 0.83–0.92 times the Kramers sum over n ≤ 2000
//! (the test below asks for agreement within a factor 1.5). For ions with electrons the
//! screening rule Z_eff = (Z + q)/2 is the formula's own approximation; no measured check
//! is made here.

use crate::constants::{ALPHA, BOHR_RADIUS_M, REDUCED_COMPTON_M, RYDBERG_EV};
use crate::error::{require_all_positive, Error, Result};
use std::f64::consts::PI;

/// (8π/3√3)·α·ƛ_e² in cm² (≈ 5.26×10⁻²³ cm²).
pub fn kim_pratt_prefactor_cm2() -> f64 {
    let lambda_bar_cm = REDUCED_COMPTON_M * 100.0;
    8.0 * PI / (3.0 * 3f64.sqrt()) * ALPHA * lambda_bar_cm * lambda_bar_cm
}

/// (32π/3√3)·α³·a₀² in cm² (≈ 2.105×10⁻²² cm²), the Kramers prefactor.
pub fn kramers_rr_prefactor_cm2() -> f64 {
    let a0_cm = BOHR_RADIUS_M * 100.0;
    32.0 * PI / (3.0 * 3f64.sqrt()) * ALPHA.powi(3) * a0_cm * a0_cm
}

/// Radiative-recombination cross section (cm²) of an ion of charge `charge` capturing an
/// electron of energy `energy_ev`, after Y. S. Kim and R. H. Pratt, Phys. Rev. A 27, 2913
/// (1983) (journal and page from memory):
///
/// σ = (8π/3√3)·α·ƛ_e²·χ·ln(1 + χ/(2 n_eff²)),  χ = 2 Z_eff² Ry / E,
/// Z_eff = (Z + q)/2,  n_eff = n₀ + (1 − W) − 0.3,  W = (2n₀² − occupancy)/(2n₀²)
///
/// `valence_n` is the principal quantum number n₀ of the capturing ion's outermost occupied
/// shell and `valence_occupancy` the electrons in that n; a bare ion takes n₀ = 1,
/// occupancy 0 (W = 1). Returns 0 for charge 0, charge > z, n₀ = 0 or a non-positive energy.
pub fn kim_pratt_cross_section_cm2(
    z: u32,
    charge: u32,
    valence_n: u32,
    valence_occupancy: u32,
    energy_ev: f64,
) -> f64 {
    if charge == 0 || charge > z || valence_n == 0 || energy_ev.is_nan() || energy_ev <= 0.0 {
        return 0.0;
    }
    let (z_eff, n_eff) = kim_pratt_effective_charge_and_n(z, charge, valence_n, valence_occupancy);
    let chi = 2.0 * z_eff * z_eff * RYDBERG_EV / energy_ev;
    kim_pratt_prefactor_cm2() * chi * (chi / (2.0 * n_eff * n_eff)).ln_1p()
}

/// Kim–Pratt's effective charge Z_eff = (Z + q)/2 and effective principal quantum number
/// n_eff = n₀ + (1 − W) − 0.3 of the capturing ion (the one definition of both, shared by the
/// cross section and its Maxwellian average).
pub fn kim_pratt_effective_charge_and_n(
    z: u32,
    charge: u32,
    valence_n: u32,
    valence_occupancy: u32,
) -> (f64, f64) {
    let z_eff = 0.5 * (f64::from(z) + f64::from(charge));
    let n0 = f64::from(valence_n);
    let states = 2.0 * n0 * n0;
    let unoccupied_fraction = ((states - f64::from(valence_occupancy)) / states).clamp(0.0, 1.0);
    (z_eff, n0 + (1.0 - unoccupied_fraction) - 0.3)
}

/// [`kim_pratt_cross_section_cm2`] at each energy, with validated arguments.
pub fn kim_pratt_cross_sections_cm2(
    z: u32,
    charge: u32,
    valence_n: u32,
    valence_occupancy: u32,
    energies_ev: &[f64],
) -> Result<Vec<f64>> {
    if z == 0 {
        return Err(Error::invalid("z", z, "must be >= 1"));
    }
    if charge == 0 || charge > z {
        return Err(Error::invalid(
            "charge",
            charge,
            &format!("the capturing ion must have charge 1..={z}"),
        ));
    }
    if valence_n == 0 {
        return Err(Error::invalid("valence_n", valence_n, "must be >= 1"));
    }
    let capacity = 2 * valence_n.saturating_mul(valence_n);
    if valence_occupancy > capacity {
        return Err(Error::invalid(
            "valence_occupancy",
            valence_occupancy,
            &format!("shell n = {valence_n} holds at most {capacity} electrons"),
        ));
    }
    require_all_positive("energy_ev", energies_ev)?;
    Ok(energies_ev
        .iter()
        .map(|&e| kim_pratt_cross_section_cm2(z, charge, valence_n, valence_occupancy, e))
        .collect())
}

/// Kramers radiative-recombination cross section of a bare ion of nuclear charge Z, summed
/// over capture into shells n = 1..=n_max (H. A. Kramers, Phil. Mag. 46, 836 (1923)):
///
/// σ_n = (32π/3√3)·α³·a₀² · Z⁴Ry² / [n E (n² E + Z² Ry)]
///
/// Used as a check of [`kim_pratt_cross_section_cm2`]; returns 0 for non-positive energy.
pub fn kramers_bare_ion_rr_cross_section_cm2(z: u32, energy_ev: f64, n_max: u32) -> f64 {
    if energy_ev.is_nan() || energy_ev <= 0.0 {
        return 0.0;
    }
    let z2ry = f64::from(z).powi(2) * RYDBERG_EV;
    let numerator = kramers_rr_prefactor_cm2() * z2ry * z2ry;
    (1..=n_max)
        .map(|n| {
            let n = f64::from(n);
            numerator / (n * energy_ev * (n * n * energy_ev + z2ry))
        })
        .sum()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn prefactors_match_the_formula_sheet() {
        // Quoted prefactors (from memory): (8π/3√3)αƛ_e² = 5.26e-23 cm²; Kramers 2.105e-22 cm².
        assert!((kim_pratt_prefactor_cm2() / 5.26e-23 - 1.0).abs() < 1e-3);
        assert!((kramers_rr_prefactor_cm2() / 2.105e-22 - 1.0).abs() < 1e-3);
    }

    #[test]
    fn bare_ion_agrees_with_summed_kramers_within_1_5() {
        // Kim–Pratt against Kramers (1923) summed over n for a bare ion (measured 0.83–0.92).
        for z in [1u32, 8, 18, 36, 54] {
            let z2ry = f64::from(z * z) * RYDBERG_EV;
            for factor in [0.01, 0.1, 1.0, 10.0, 100.0] {
                let e = factor * z2ry;
                let kp = kim_pratt_cross_section_cm2(z, z, 1, 0, e);
                let kr = kramers_bare_ion_rr_cross_section_cm2(z, e, 2000);
                let ratio = kp / kr;
                assert!(
                    (1.0 / 1.5..1.5).contains(&ratio),
                    "Z = {z}, E = {e} eV: Kim–Pratt {kp:e}, Kramers {kr:e}"
                );
            }
        }
    }

    #[test]
    fn hand_calculation_for_bare_argon_at_10_kev() {
        // Z = 18, q = 18, E = 10 keV: Z_eff = 18, n_eff = 0.7,
        // χ = 2·324·13.605693/1e4 = 0.88164891, χ/(2·0.49) = 0.89964175,
        // ln(1.89964175) = 0.64166532,
        // σ = 5.2632770e-23 · 0.88164891 · 0.64166532 = 2.9775597e-23 cm².
        let s = kim_pratt_cross_section_cm2(18, 18, 1, 0, 1e4);
        assert!((s / 2.977_559_7e-23 - 1.0).abs() < 1e-7, "{s:e}");
    }

    #[test]
    fn filled_valence_shell_pushes_capture_outward() {
        // A closed n0 shell (W = 0) gives n_eff = n0 + 0.7, smaller σ than a half-empty one.
        let closed = kim_pratt_cross_section_cm2(18, 8, 2, 8, 1000.0);
        let open = kim_pratt_cross_section_cm2(18, 12, 2, 4, 1000.0);
        assert!(closed > 0.0 && open > closed);
    }

    #[test]
    fn invalid_inputs_give_zero_or_error() {
        assert_eq!(kim_pratt_cross_section_cm2(18, 0, 3, 8, 100.0), 0.0);
        assert_eq!(kim_pratt_cross_section_cm2(18, 19, 1, 0, 100.0), 0.0);
        assert_eq!(kim_pratt_cross_section_cm2(18, 5, 0, 0, 100.0), 0.0);
        assert_eq!(kim_pratt_cross_section_cm2(18, 5, 2, 5, -1.0), 0.0);
        assert_eq!(kramers_bare_ion_rr_cross_section_cm2(18, 0.0, 10), 0.0);
        assert!(kim_pratt_cross_sections_cm2(18, 0, 3, 8, &[1.0]).is_err());
        assert!(kim_pratt_cross_sections_cm2(18, 5, 2, 9, &[1.0]).is_err());
        assert!(kim_pratt_cross_sections_cm2(18, 5, 2, 5, &[0.0]).is_err());
        assert_eq!(
            kim_pratt_cross_sections_cm2(18, 5, 2, 5, &[1.0, 2.0])
                .unwrap()
                .len(),
            2
        );
    }
}
