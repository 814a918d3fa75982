//! Coulomb logarithms for the collisions of trapped ions: with the beam electrons and with
//! each other.
//!
//! # Model
//! From the NRL Plasma Formulary (J. D. Huba, Naval Research Laboratory; the forms below are
//! unchanged across the recent editions; written here from memory and checked against
//! hand values in the tests). Densities in cm⁻³, temperatures and energies in eV.
//!
//! - Electron–ion, with the electron energy `E` in place of the electron temperature (common
//!   practice when the "electrons" are a monoenergetic beam):
//!   - `ln Λ = 23 − ln(n_e^{1/2} Z E^{−3/2})` for `E < 10 Z²` eV,
//!   - `ln Λ = 24 − ln(n_e^{1/2} E^{−1})` above.
//! - Mixed ion–ion (species α, β with charges Z, masses μ in proton masses, temperatures T):
//!   `ln Λ = 23 − ln[ Z_α Z_β (μ_α + μ_β) / (μ_α T_β + μ_β T_α) · (n_α Z_α²/T_α + n_β Z_β²/T_β)^{1/2} ]`.
//!
//! # Validity
//! The logarithm is meaningful where it is large (≳ 5): dilute, weakly coupled plasmas. In an
//! electron-beam trap ln Λ ≈ 10–20 for beam–ion and 5–20 for ion–ion collisions. Where the
//! formula falls below [`MIN_COULOMB_LOG`] (cold, dense, highly charged clouds, where the ions
//! become strongly coupled) it is held at that floor, as is usual in rate modelling; the
//! result then carries a factor-of-a-few uncertainty.

use super::ion_collisions::IonCloud;

/// Floor of every Coulomb logarithm (see the module documentation).
pub const MIN_COULOMB_LOG: f64 = 2.0;
/// Cap of every Coulomb logarithm: no laboratory plasma exceeds about 35.
pub const MAX_COULOMB_LOG: f64 = 50.0;

/// Coulomb logarithm of a beam of electrons of energy `electron_energy_ev` and density
/// `electron_density_cm3` on ions of charge `charge`.
pub fn beam_ion_coulomb_log(
    electron_density_cm3: f64,
    electron_energy_ev: f64,
    charge: f64,
) -> f64 {
    let (n, e, z) = (electron_density_cm3, electron_energy_ev, charge.max(1.0));
    let value = if e < 10.0 * z * z {
        23.0 - (n.sqrt() * z * e.powf(-1.5)).ln()
    } else {
        24.0 - (n.sqrt() / e).ln()
    };
    floor(value)
}

/// Coulomb logarithm of collisions between two ion populations α and β (the NRL form uses
/// masses in proton masses; only their ratio enters, so u serve as well).
pub fn ion_ion_coulomb_log(a: &IonCloud, b: &IonCloud) -> f64 {
    let (ta, tb) = (a.temperature_ev, b.temperature_ev);
    let screening = (a.density_cm3 * a.charge * a.charge / ta
        + b.density_cm3 * b.charge * b.charge / tb)
        .sqrt();
    let value = 23.0
        - (a.charge * b.charge * (a.mass_u + b.mass_u) / (a.mass_u * tb + b.mass_u * ta)
            * screening)
            .ln();
    floor(value)
}

fn floor(value: f64) -> f64 {
    // A vanishing density gives +inf (nothing screens): the cap keeps rates finite, and they
    // are proportional to that (zero) density anyway.
    if value.is_nan() {
        MIN_COULOMB_LOG
    } else {
        value.clamp(MIN_COULOMB_LOG, MAX_COULOMB_LOG)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn beam_log_hand_values() {
        // 10 keV beam, n_e = 1.07e12 cm⁻³ (1000 A/cm²), Z = 30: E = 1e4 > 10·900, so
        // ln Λ = 24 − ln(√1.07e12 / 1e4) = 24 − ln(103.44) = 19.361 (hand value).
        let l = beam_ion_coulomb_log(1.07e12, 1.0e4, 30.0);
        assert!((l - (24.0 - (1.07e12f64.sqrt() / 1e4).ln())).abs() < 1e-12);
        assert!((l - 19.361).abs() < 1e-3, "{l}");
        // Low-energy branch: E = 100 eV, Z = 10 (E < 1000): 23 − ln(1e6·10·1e-3) = 23 − ln(1e4).
        let l = beam_ion_coulomb_log(1e12, 100.0, 10.0);
        assert!((l - (23.0 - 1e4f64.ln())).abs() < 1e-12, "{l}");
    }

    #[test]
    fn ion_log_is_symmetric_and_floored() {
        let kr = IonCloud::new(30.0, 84.0, 1e9, 100.0);
        let n = IonCloud::new(7.0, 14.0, 5e8, 20.0);
        let a = ion_ion_coulomb_log(&kr, &n);
        let b = ion_ion_coulomb_log(&n, &kr);
        assert!((a - b).abs() < 1e-12);
        // Hand value of the same: 23 − ln[210·98/(84·20 + 14·100) · √(1e9·900/100 + 5e8·49/20)].
        let hand = 23.0
            - (30.0 * 7.0 * 98.0 / (84.0 * 20.0 + 14.0 * 100.0)
                * (1e9 * 900.0 / 100.0 + 5e8 * 49.0 / 20.0f64).sqrt())
            .ln();
        assert!((a - hand).abs() < 1e-12);
        // A cold dense cloud of highly charged ions hits the floor.
        let cold = IonCloud::new(60.0, 200.0, 1e12, 0.1);
        assert_eq!(ion_ion_coulomb_log(&cold, &cold), MIN_COULOMB_LOG);
        let empty = IonCloud::new(1.0, 1.0, 0.0, 1.0);
        assert_eq!(ion_ion_coulomb_log(&empty, &empty), MAX_COULOMB_LOG);
    }
}
