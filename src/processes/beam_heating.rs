//! Heating of trapped ions by the electrons of the beam that passes through them
//! (Landau–Spitzer heating).
//!
//! # Model
//! A fast electron passing a heavy ion of charge `q` at impact parameter `b` gives it the
//! momentum `Δp = 2 q e²/(4π ε₀ b v_e)` (small-angle Coulomb scattering; the same holds for
//! relativistic electrons, whose stronger transverse field lasts γ times shorter), so the ion
//! gains `Δp²/(2 m_i)`. Integrating over impact parameters between the screening length and
//! the distance of closest approach gives the Coulomb logarithm `ln Λ`, and a beam of density
//! `n_e` heats one ion at the rate
//!
//! `dE/dt = 4π n_e (q e²/4π ε₀)² ln Λ / (m_i v_e)`,
//!
//! the energy-transfer term of L. Spitzer, *Physics of Fully Ionized Gases* (1962), and of the
//! NRL Plasma Formulary's slowing-down rates for `m_e ≪ m_i`, as used for electron-beam traps
//! by Penetrante et al., Phys. Rev. A 43, 4861 (1991). As a temperature (three degrees of
//! freedom) `d(kT)/dt = (2/3) f dE/dt`, `f` the overlap of the cloud with the beam.
//!
//! # Validity and accuracy
//! Binary-collision theory, good to the accuracy of the Coulomb logarithm (≈ 10 % for
//! ln Λ ≳ 10). Check value (computed while planning): Kr³⁰⁺ in a 10 keV, 1000 A/cm² beam with
//! ln Λ = 10 gains 4.9 keV/s (two figures); the test gets 4.93 keV/s.

use crate::constants::{ATOMIC_MASS_UNIT_KG, ELEMENTARY_CHARGE_C, EPSILON_0};
use std::f64::consts::PI;

/// Energy (eV/s) one ion of charge `charge` and mass `ion_mass_u` (u) gains from a beam of
/// electron density `electron_density_m3` (m⁻³) and speed `electron_speed_m_s`, with Coulomb
/// logarithm `coulomb_log`, while it sits inside the beam.
pub fn landau_spitzer_heating_ev_per_s(
    electron_density_m3: f64,
    electron_speed_m_s: f64,
    charge: f64,
    ion_mass_u: f64,
    coulomb_log: f64,
) -> f64 {
    let k = charge * ELEMENTARY_CHARGE_C * ELEMENTARY_CHARGE_C / (4.0 * PI * EPSILON_0);
    let watts = 4.0 * PI * electron_density_m3 * k * k * coulomb_log
        / (ion_mass_u * ATOMIC_MASS_UNIT_KG * electron_speed_m_s);
    watts / ELEMENTARY_CHARGE_C
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::constants::ELECTRON_REST_EV;

    #[test]
    fn krypton_30_plus_check_value() {
        // 10 keV electrons: γ = 1 + 1e4/510998.95, v = βc.
        let gamma = 1.0 + 1e4 / ELECTRON_REST_EV;
        let v = (1.0 - 1.0 / (gamma * gamma)).sqrt() * crate::constants::SPEED_OF_LIGHT_M_S;
        // 1000 A/cm² = 1e7 A/m²: n_e = j/(e v).
        let n = 1e7 / (ELEMENTARY_CHARGE_C * v);
        let rate = landau_spitzer_heating_ev_per_s(n, v, 30.0, 83.798, 10.0);
        assert!((rate / 4.9e3 - 1.0).abs() < 1e-2, "{rate}");
    }

    #[test]
    fn scalings() {
        let base = landau_spitzer_heating_ev_per_s(1e18, 5e7, 10.0, 40.0, 10.0);
        assert!(
            (landau_spitzer_heating_ev_per_s(1e18, 5e7, 20.0, 40.0, 10.0) / base - 4.0).abs()
                < 1e-12
        );
        assert!(
            (landau_spitzer_heating_ev_per_s(1e18, 5e7, 10.0, 80.0, 10.0) / base - 0.5).abs()
                < 1e-12
        );
        assert!(
            (landau_spitzer_heating_ev_per_s(1e18, 1e8, 10.0, 40.0, 10.0) / base - 0.5).abs()
                < 1e-12
        );
    }
}
