//! Collisions of trapped ions with each other: energy exchange between populations and the
//! total Coulomb collision rate that feeds the high-energy tail (and so escape).
//!
//! # Model
//! NRL Plasma Formulary (J. D. Huba; written here from memory, checked against its own
//! like-particle limit in the tests). Masses `m` in grams, temperatures `T` in eV, densities
//! in cm⁻³:
//!
//! - temperature relaxation `dT_α/dt = Σ_β ν_ε^{α|β} (T_β − T_α)`,
//!   `ν_ε^{α|β} = 1.8×10⁻¹⁹ (m_α m_β)^{1/2} Z_α² Z_β² n_β ln Λ_αβ / (m_α T_β + m_β T_α)^{3/2}` s⁻¹;
//!   energy is conserved pairwise because `n_α ν_ε^{α|β} = n_β ν_ε^{β|α}`;
//! - ion collision rate `ν_i = 4.80×10⁻⁸ Z⁴ μ^{−1/2} n_i ln Λ T_i^{−3/2}` s⁻¹ (μ = m_i/m_p) for
//!   one species. For a mixture we sum over the field populations β,
//!   `ν_α = Σ_β 4.80×10⁻⁸ Z_α² Z_β² μ_α^{−1/2} n_β ln Λ_αβ T_α^{−3/2}`, our generalisation in the
//!   spirit of Penetrante et al., Phys. Rev. A 43, 4861 (1991); it reduces to the NRL rate
//!   for one species.
//!
//! # Validity and accuracy
//! Weakly coupled plasmas (ln Λ ≳ 5); the rates inherit the Coulomb logarithm's ≈ 10 %
//! uncertainty, and the mixture rule is an estimate (factor ≲ 2 where the masses differ a lot).

use crate::constants::ATOMIC_MASS_UNIT_KG;

/// Atomic mass unit in grams.
const U_G: f64 = ATOMIC_MASS_UNIT_KG * 1e3;
/// Proton mass in u (CODATA 2018).
const PROTON_MASS_U: f64 = 1.007_276_466_621;

/// One ion population as the collision formulas see it.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct IonCloud {
    /// Charge state Z.
    pub charge: f64,
    /// Ion mass (u).
    pub mass_u: f64,
    /// Number density (cm⁻³).
    pub density_cm3: f64,
    /// Temperature kT (eV).
    pub temperature_ev: f64,
}

impl IonCloud {
    pub fn new(charge: f64, mass_u: f64, density_cm3: f64, temperature_ev: f64) -> Self {
        IonCloud {
            charge,
            mass_u,
            density_cm3,
            temperature_ev,
        }
    }
}

/// ν_ε^{α|β} (s⁻¹): the rate at which population `a` relaxes towards the temperature of the
/// field population `b` (whose density enters), with Coulomb logarithm `coulomb_log`.
pub fn energy_exchange_rate_per_s(a: &IonCloud, b: &IonCloud, coulomb_log: f64) -> f64 {
    let (ma, mb) = (a.mass_u * U_G, b.mass_u * U_G);
    let (za, zb) = (a.charge, b.charge);
    1.8e-19 * (ma * mb).sqrt() * za * za * zb * zb * b.density_cm3 * coulomb_log
        / (ma * b.temperature_ev + mb * a.temperature_ev).powf(1.5)
}

/// Coulomb collision rate (s⁻¹) of a test ion α (charge `z_a`, mass `mass_a_u`, temperature
/// `temperature_a_ev`) with one field population of charge `z_b` and density `density_b_cm3`.
/// Sum it over the field populations for a mixture.
pub fn ion_collision_rate_per_s(
    z_a: f64,
    mass_a_u: f64,
    temperature_a_ev: f64,
    z_b: f64,
    density_b_cm3: f64,
    coulomb_log: f64,
) -> f64 {
    let mu = mass_a_u / PROTON_MASS_U;
    4.80e-8 * z_a * z_a * z_b * z_b * density_b_cm3 * coulomb_log
        / (mu.sqrt() * temperature_a_ev.powf(1.5))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn like_particle_limit_matches_the_ion_collision_rate() {
        // For α = β at one temperature, ν_ε = 1.8e-19 m Z⁴ n lnΛ/(2 m T)^{3/2}: the NRL
        // formulary's own numbers give ν_ε ≈ 1.8e-19/(2^{3/2} √(m_p)) ≈ 4.9e-8 μ^{-1/2}…,
        // within 3 % of its ion collision rate 4.80e-8 (NRL Plasma Formulary, from memory).
        let p = IonCloud::new(1.0, 1.007_276, 1e10, 10.0);
        let nu_e = energy_exchange_rate_per_s(&p, &p, 10.0);
        let nu_i = ion_collision_rate_per_s(1.0, 1.007_276, 10.0, 1.0, 1e10, 10.0);
        assert!((nu_e / nu_i - 1.0).abs() < 0.03, "{nu_e} vs {nu_i}");
    }

    #[test]
    fn pairwise_energy_conservation() {
        // n_α ν^{α|β} = n_β ν^{β|α}: what α gains, β loses.
        let (na, nb) = (3e9, 7e8);
        let kr = IonCloud::new(30.0, 84.0, na, 200.0);
        let n = IonCloud::new(7.0, 14.0, nb, 20.0);
        let ab = energy_exchange_rate_per_s(&kr, &n, 12.0);
        let ba = energy_exchange_rate_per_s(&n, &kr, 12.0);
        assert!((na * ab / (nb * ba) - 1.0).abs() < 1e-12);
    }

    #[test]
    fn hand_value() {
        // Ar16+ (39.962 u) at 100 eV on N7+ (14.003 u), n = 1e9 cm⁻³, 20 eV, lnΛ = 10:
        // 1.8e-19·√(ma mb)·256·49·1e9·10/(ma·20 + mb·100)^{1.5} with m in g.
        let (ma, mb) = (39.962 * U_G, 14.003 * U_G);
        let hand =
            1.8e-19 * (ma * mb).sqrt() * 256.0 * 49.0 * 1e10 / (ma * 20.0 + mb * 100.0).powf(1.5);
        let ar = IonCloud::new(16.0, 39.962, 1e9, 100.0);
        let n = IonCloud::new(7.0, 14.003, 1e9, 20.0);
        let got = energy_exchange_rate_per_s(&ar, &n, 10.0);
        assert!((got / hand - 1.0).abs() < 1e-12);
        assert!(got > 1e3 && got < 1e6, "{got}");
    }
}
