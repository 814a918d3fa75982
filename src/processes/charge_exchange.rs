//! Charge exchange of slow ions with neutral gas: the Müller–Salzborn scaling, plus the
//! kinematic helpers a charge-exchange rate needs.
//!
//! # Model
//!
//! A. Müller and E. Salzborn, Phys. Lett. A 62, 391 (1977): single-electron capture by an
//! ion of charge q from a target of first ionization energy I_t (eV) in slow collisions,
//!
//!   σ_CX = 1.43×10⁻¹² · q^1.17 · I_t^(−2.76) cm².
//!
//! The rate of q → q−1 in a gas mixture is λ = Σ_gas n_gas σ_CX v̄_ion, with the ideal-gas
//! density n = p/(k_B T_gas) and the Maxwellian mean ion speed v̄ = √(8 kT_i/(π m_ion)).
//! Target ionization energies: [`super::gases`].
//!
//! # Validity and accuracy
//!
//! Slow collisions (ion speeds well below the orbital speed of the captured electron), best
//! for q ≳ 3; a scaling law good to about a factor of 2 (from memory). Checked: Ar¹⁰⁺ on Ar
//! gives 1.05×10⁻¹⁴ cm² (the value quoted with the formula, from memory) within 1 %.

use crate::constants::{ATOMIC_MASS_UNIT_KG, BOLTZMANN_J_K, ELEMENTARY_CHARGE_C};
use std::f64::consts::PI;

/// Single-electron capture cross section (cm²) of an ion of charge q in slow collisions with
/// a gas of first ionization energy I_t (eV), after A. Müller and E. Salzborn, Phys. Lett. A
/// 62, 391 (1977):
///
/// σ = 1.43×10⁻¹² · q^1.17 · I_t^(−2.76) cm²
///
/// Best for q ≳ 3. Returns 0 for a neutral projectile or a non-positive ionization energy.
pub fn muller_salzborn_cross_section_cm2(charge: u32, target_ionization_ev: f64) -> f64 {
    if charge == 0 || target_ionization_ev.is_nan() || target_ionization_ev <= 0.0 {
        return 0.0;
    }
    1.43e-12 * f64::from(charge).powf(1.17) * target_ionization_ev.powf(-2.76)
}

/// Mean speed √(8kT/(πm)) in m/s of ions of temperature kT (eV) and mass m (u).
pub fn mean_ion_speed_m_s(temperature_ev: f64, ion_mass_u: f64) -> f64 {
    (8.0 * temperature_ev * ELEMENTARY_CHARGE_C / (PI * ion_mass_u * ATOMIC_MASS_UNIT_KG)).sqrt()
}

/// Ideal-gas number density p/(k_B T) in m⁻³.
pub fn gas_number_density_m3(pressure_pa: f64, gas_temperature_k: f64) -> f64 {
    pressure_pa / (BOLTZMANN_J_K * gas_temperature_k)
}

/// Charge-exchange rate coefficient ⟨σ_CX v⟩ ≈ σ_CX(q, I_t)·v̄_ion (cm³ s⁻¹) of an ion of
/// charge `charge`, mass `ion_mass_u` (u) and temperature kT_i = `ion_temperature_ev` on a
/// gas at rest of first ionization energy I_t: Müller–Salzborn times the Maxwellian mean ion
/// speed. The channel is closed (0) when the capture would be endothermic, i.e. when the
/// recombined ion binds the captured electron (`recombined_binding_ev`, its ionization
/// energy) no more strongly than the target does.
pub fn charge_exchange_rate_coefficient_cm3_s(
    charge: u32,
    recombined_binding_ev: f64,
    target_ionization_ev: f64,
    ion_temperature_ev: f64,
    ion_mass_u: f64,
) -> f64 {
    // NaN bindings compare false and close the channel too.
    let exothermic = recombined_binding_ev > target_ionization_ev;
    if !exothermic {
        return 0.0;
    }
    muller_salzborn_cross_section_cm2(charge, target_ionization_ev)
        * mean_ion_speed_m_s(ion_temperature_ev, ion_mass_u)
        * 100.0
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn argon_10_plus_on_argon() {
        // Müller & Salzborn 1977 (check value from memory): Ar10+ on Ar (I = 15.7596 eV, NIST ASD)
        // → 1.05e-14 cm².
        let s = muller_salzborn_cross_section_cm2(10, 15.7596119);
        assert!((s / 1.05e-14 - 1.0).abs() < 0.01, "{s:e}");
        assert_eq!(muller_salzborn_cross_section_cm2(0, 15.76), 0.0);
        assert_eq!(muller_salzborn_cross_section_cm2(3, 0.0), 0.0);
    }

    #[test]
    fn scaling_exponents() {
        let ratio = muller_salzborn_cross_section_cm2(20, 15.0)
            / muller_salzborn_cross_section_cm2(10, 15.0);
        assert!((ratio - 2f64.powf(1.17)).abs() < 1e-12);
        let ratio = muller_salzborn_cross_section_cm2(10, 24.0)
            / muller_salzborn_cross_section_cm2(10, 12.0);
        assert!((ratio - 2f64.powf(-2.76)).abs() < 1e-12);
    }

    #[test]
    fn mean_speed_hand_value() {
        // Ar (39.948 u) at kT = 50 eV:
        // √(8·50·1.602176634e-19 / (π·39.948·1.66053906660e-27)) = 17536.31 m/s
        let v = mean_ion_speed_m_s(50.0, 39.948);
        assert!((v - 17_536.308_9).abs() < 1e-3, "{v}");
    }

    #[test]
    fn rate_coefficient_is_cross_section_times_mean_speed() {
        // Ar8+ (39.948 u, kT = 1 eV) on O2 (I = 12.0697 eV): σ·v̄ with v̄ = √(8kT/πm).
        let k = charge_exchange_rate_coefficient_cm3_s(8, 143.46, 12.0697, 1.0, 39.948);
        let hand = muller_salzborn_cross_section_cm2(8, 12.0697) * 2_480.0 * 100.0;
        assert!((k / hand - 1.0).abs() < 1e-3, "{k:e} vs {hand:e}");
        // Endothermic capture (the recombined ion binds less than the target) is closed.
        assert_eq!(
            charge_exchange_rate_coefficient_cm3_s(1, 12.0, 15.4, 1.0, 40.0),
            0.0
        );
    }

    #[test]
    fn number_density_reproduces_loschmidt_constant() {
        // Loschmidt constant n0(273.15 K, 101.325 kPa) = 2.686780111e25 m⁻³ (CODATA 2018,
        // scipy.constants).
        let n = gas_number_density_m3(101_325.0, 273.15);
        assert!((n / 2.686_780_111_798_444e25 - 1.0).abs() < 1e-12);
    }
}
