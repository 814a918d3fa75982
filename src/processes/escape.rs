//! Escape of trapped ions over a potential barrier, and the energy each escaping ion takes
//! with it (evaporative cooling).
//!
//! # Model
//! Ions of charge `q` at temperature `kT` held by a barrier of `V` volts: `ω = q V / kT`
//! (V in volts, kT in eV). Collisions keep refilling the Maxwellian tail above the barrier,
//! and the ions in it leave. For `ω ≫ 1` the loss rate is Pastuszak's asymptotic form as
//! used for electron-beam traps by Penetrante, Bardsley, DeWitt, Clark & Schneider,
//! Phys. Rev. A 43, 4861 (1991) (from memory):
//!
//! `ν_esc = ν_i (3/√2) e^{−ω}/ω`,
//!
//! `ν_i` the ion's total Coulomb collision rate (see `ion_collisions`). The asymptotic form
//! diverges as `ω → 0`, where the ions are not held at all and fly out within a transit of
//! the trap; we therefore combine the two as rates in series,
//! `1/ν = 1/(ν_i (3/√2) e^{−ω}/ω) + 1/(ν_transit e^{−ω})`, with `ν_transit = v̄/L` the
//! free-flight rate (our own bridge between the two limits; smooth, so a stiff solver's
//! Newton iteration sees no kink).
//!
//! **Energy carried away.** In a collisional, truncated Maxwellian the escaping ions are
//! scattered just over the edge: each leaves with the barrier energy `qV` in the escape
//! direction and the mean energy of the other two degrees of freedom, `kT`: it takes
//! `E_out = qV + kT` (our derivation; the flux-weighted collisionless value would be
//! `qV + 2kT`). With `U = (3/2) N kT`, `dN/dt = −ν N` and `dU/dt = −ν N E_out`, the cloud's
//! temperature changes by `d(kT)/dt = −(2/3) ν (qV − kT/2)`: escape cools for ω > 1/2.
//!
//! # Validity and accuracy
//! The asymptotic rate is good to ≈ 10 % for ω ≳ 3 and a factor of ~2 for ω ≈ 1 (Penetrante
//! et al. 1991 discuss its use); below that the bridge is a rough estimate. Axial and radial
//! barriers are treated separately, each with this form.

/// Asymptotic escape rate (s⁻¹) over a barrier of reduced height `omega` = qV/kT for an ion
/// whose total collision rate is `collision_rate_per_s`, bridged to free flight at
/// `transit_rate_per_s` for low barriers (see the module documentation).
pub fn escape_rate_per_s(collision_rate_per_s: f64, omega: f64, transit_rate_per_s: f64) -> f64 {
    if omega.is_nan() {
        return 0.0;
    }
    let omega = omega.max(0.0);
    let free = transit_rate_per_s * (-omega).exp();
    if omega == 0.0 {
        return free;
    }
    let held = collision_rate_per_s * 3.0 / std::f64::consts::SQRT_2 * (-omega).exp() / omega;
    if held <= 0.0 || free <= 0.0 {
        return 0.0;
    }
    held * free / (held + free)
}

/// Energy (eV) one escaping ion takes away: the barrier energy `barrier_energy_ev` (= qV)
/// plus `temperature_ev` for its two other degrees of freedom.
pub fn escape_energy_ev(barrier_energy_ev: f64, temperature_ev: f64) -> f64 {
    barrier_energy_ev + temperature_ev
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn large_omega_is_pastuszak() {
        for omega in [3.0, 10.0, 30.0] {
            // Free flight far faster than collisions: the Pastuszak form to 1e-6.
            let nu = escape_rate_per_s(100.0, omega, 1e9);
            let expect = 100.0 * 3.0 / 2f64.sqrt() * (-omega).exp() / omega;
            assert!((nu / expect - 1.0).abs() < 1e-6);
        }
    }

    #[test]
    fn low_barrier_is_free_flight_and_rate_falls_with_barrier() {
        assert_eq!(escape_rate_per_s(100.0, 0.0, 5e4), 5e4);
        assert_eq!(escape_rate_per_s(100.0, -3.0, 5e4), 5e4);
        let mut last = f64::INFINITY;
        for k in 0..200 {
            let nu = escape_rate_per_s(1e3, 0.1 * k as f64, 1e4);
            assert!(nu <= last && nu >= 0.0);
            last = nu;
        }
        assert_eq!(escape_rate_per_s(1e3, f64::NAN, 1e4), 0.0);
    }

    #[test]
    fn escape_cools_above_half_kt() {
        // d(kT)/dt ∝ −(E_out − (3/2) kT) = −(qV − kT/2).
        let kt = 10.0;
        assert!(escape_energy_ev(100.0, kt) > 1.5 * kt);
        assert!(escape_energy_ev(4.0, kt) < 1.5 * kt);
    }
}
