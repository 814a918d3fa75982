//! Excitations of one bound electron of an ion to a higher shell (Δn ≥ 1): the shared
//! ingredient of excitation–autoionization ([`super::excitation_autoionization`]) and
//! dielectronic recombination ([`super::dielectronic`]). One definition of the excitation
//! energy, the oscillator strength, the radiative and the autoionization rates.
//!
//! # Model (configuration average, shell by shell)
//!
//! For an occupied subshell s (principal number n_s, binding B_s in the ion, from
//! [`crate::atoms::binding`]) and a shell n > n_s with vacancies:
//!
//! * **Excited electron's binding**: screened hydrogenic, B_n = Ry·ζ²/n², ζ = Z − σ, with
//!   J. C. Slater's screening constants (Phys. Rev. 36, 57 (1930); constants from memory):
//!   0.35 for each other electron of shell n, 0.85 for each electron of shell n − 1, 1.0 for
//!   each electron deeper, 0 for electrons outside. The configuration is the ion's with one
//!   electron moved from s to n. **Excitation energy** ΔE = B_s − B_n (our documented
//!   estimate). It gives 3120 eV for Ar¹⁶⁺ 1s → 2 (the measured 1s² – 1s2p ¹P line is
//!   3139.6 eV), 6677 eV for Fe²⁴⁺ (6700.4 eV) and 770 eV for Fe¹⁶⁺ 2p → 3 (the 2p – 3s and
//!   2p – 3d lines lie at 727 and 826 eV); line energies from the NIST ASD, from memory.
//! * **Oscillator strength** (absorption, whole subshell): f = N_s · f_H(n_s → n) · v_n,
//!   N_s the electrons in s, v_n the vacant fraction of shell n, f_H the hydrogenic
//!   shell-averaged value per electron (H. A. Bethe and E. E. Salpeter, *Quantum Mechanics of
//!   One- and Two-Electron Atoms*, 1957, table of f_{nn'}; values from memory) for
//!   n_s ≤ 4, n ≤ 5; elsewhere Kramers's semiclassical value
//!   f_K = 32/(3√3 π) · 1/(n_s⁵ n³) · (1/n_s² − 1/n²)⁻³ times 0.76 (the ratio of the exact to
//!   the Kramers value for n_s = 2, 3, Δn = 1).
//! * **Radiative decay** of one electron in shell n back into the hole:
//!   A_r = 4.339×10⁷ s⁻¹ · (ΔE/eV)² · f_H · h_s/(2n²), from A = (g_l/g_u)·(2πe²ν²/ε₀m_ec³)·f
//!   with shell weights 2n_s², 2n² and h_s holes in shell n_s (the numerical factor is
//!   8π²e²/(ε₀ m_e c h²)·(eV)² in SI, checked in the tests).
//! * **Autoionization**: A_a = 10¹⁴ s⁻¹ for an electron in the lowest shell the excitation
//!   reaches, scaled as (n_low/n)³ for higher shells (common practice: Auger rates depend
//!   little on Z and fall as n⁻³ along a Rydberg series; the 10¹⁴ s⁻¹ is an order of
//!   magnitude, from memory), plus the same 10¹⁴ s⁻¹ for each electron of the ion above
//!   shell n_s that can fill the hole by an Auger step of its own.
//!
//! # Validity
//!
//! Δn = 0 excitations (2s → 2p, 3p → 3d, 4d → 4f) are not included, and a subshell whose
//! Δn = 0 partner (n, l + 1) has a vacancy is left out altogether: that transition takes most
//! of its oscillator strength, which the hydrogenic Δn ≥ 1 values would count again (Ar⁺ 3s,
//! Li-like 2s, Xe 4d with 4f empty). Fine structure and term splitting are averaged away
//! (each band is one configuration-average energy).

use crate::atoms::Ion;
use crate::constants::RYDBERG_EV;

/// Autoionization rate (s⁻¹) of a doubly excited configuration whose outer electron sits in
/// the lowest shell the excitation reaches (order of magnitude, from memory).
pub const AUTOIONIZATION_RATE_PER_S: f64 = 1e14;

/// Highest Δn of the excitations listed.
pub const MAX_DELTA_N: u32 = 4;

/// (2πe²/(ε₀ m_e c³))·ν² per eV², i.e. A = A_FACTOR·ΔE²·(g_l/g_u)·f (s⁻¹, ΔE in eV).
pub const EINSTEIN_A_PER_EV2_S: f64 = 4.3393e7;

/// One excitation s → n of an ion.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct CoreExcitation {
    /// Principal and orbital quantum numbers of the subshell that loses the electron.
    pub from_n: u32,
    pub from_l: u32,
    /// Shell that receives it.
    pub to_n: u32,
    /// Excitation energy ΔE (eV).
    pub energy_ev: f64,
    /// Absorption oscillator strength of the whole subshell.
    pub oscillator_strength: f64,
    /// Radiative decay rate (s⁻¹) of one electron of shell `to_n` into the hole.
    pub radiative_rate_per_s: f64,
    /// Rate (s⁻¹) at which the other electrons above the hole fill it by Auger steps.
    pub spectator_auger_per_s: f64,
    /// Electrons in shell `to_n` after the excitation.
    pub electrons_in_upper_shell: u32,
}

/// Exact hydrogenic shell-averaged absorption oscillator strengths f(n → n') per electron
/// (Bethe & Salpeter 1957; from memory), rows n = 1…4, columns n' = n+1 … 5.
fn hydrogenic_table(n: u32, n_up: u32) -> Option<f64> {
    let v = match (n, n_up) {
        (1, 2) => 0.4162,
        (1, 3) => 0.07910,
        (1, 4) => 0.02899,
        (1, 5) => 0.01394,
        (2, 3) => 0.6407,
        (2, 4) => 0.1193,
        (2, 5) => 0.04467,
        (3, 4) => 0.8421,
        (3, 5) => 0.1506,
        (4, 5) => 1.038,
        _ => return None,
    };
    Some(v)
}

/// Kramers's semiclassical f(n → n') = 32/(3√3π) · 1/(n⁵ n'³) · (1/n² − 1/n'²)⁻³.
pub fn kramers_oscillator_strength(n: u32, n_up: u32) -> f64 {
    let (a, b) = (f64::from(n), f64::from(n_up));
    32.0 / (3.0 * 3f64.sqrt() * std::f64::consts::PI)
        / (a.powi(5) * b.powi(3))
        / (1.0 / (a * a) - 1.0 / (b * b)).powi(3)
}

/// Shell-averaged hydrogenic oscillator strength per electron (table, else 0.76·Kramers).
pub fn hydrogenic_oscillator_strength(n: u32, n_up: u32) -> f64 {
    if n_up <= n {
        return 0.0;
    }
    hydrogenic_table(n, n_up).unwrap_or_else(|| 0.76 * kramers_oscillator_strength(n, n_up))
}

/// Electrons in each shell n of the ion (index n, 0 unused), with room for the shells an
/// excitation can reach.
pub fn shell_occupancy(ion: &Ion) -> Vec<u32> {
    let top = ion
        .subshells()
        .iter()
        .map(|s| s.subshell.n)
        .max()
        .unwrap_or(1);
    let mut shells = vec![0u32; (top + MAX_DELTA_N + 2) as usize];
    for s in ion.subshells() {
        shells[s.subshell.n as usize] += s.occupancy;
    }
    shells
}

/// Slater-screened hydrogenic binding (eV) of one more electron in shell `n` of a
/// configuration with `shells[k]` electrons in shell k (not counting the added one).
pub fn slater_binding_ev(z: u32, shells: &[u32], n: u32) -> f64 {
    let n_us = n as usize;
    let sigma: f64 = shells
        .iter()
        .enumerate()
        .map(|(k, &count)| {
            let c = f64::from(count);
            if k == n_us {
                0.35 * c
            } else if k + 1 == n_us {
                0.85 * c
            } else if k + 1 < n_us {
                c
            } else {
                0.0
            }
        })
        .sum();
    let zeta = (f64::from(z) - sigma).max(1.0);
    RYDBERG_EV * zeta * zeta / f64::from(n * n)
}

/// Every excitation s → n (Δn = 1 … [`MAX_DELTA_N`], n with vacancies) of the ion's
/// occupied subshells, with energy ΔE > 0.
pub fn core_excitations(ion: &Ion) -> Vec<CoreExcitation> {
    let z = ion.element.z();
    let shells = shell_occupancy(ion);
    let mut out = Vec::new();
    for s in ion.subshells() {
        let n_s = s.subshell.n;
        if has_open_partner(ion, s.subshell.n, s.subshell.l) {
            continue;
        }
        // Electrons above shell n_s (or in it, besides s's own) that could fill a hole in s by
        // an Auger step.
        let above: u32 = shells
            .iter()
            .enumerate()
            .filter(|(k, _)| *k as u32 > n_s)
            .map(|(_, c)| *c)
            .sum();
        for n in n_s + 1..=n_s + MAX_DELTA_N {
            let capacity = 2 * n * n;
            let present = shells.get(n as usize).copied().unwrap_or(0);
            if present >= capacity {
                continue;
            }
            let mut excited = shells.clone();
            excited[n_s as usize] -= 1;
            let b_n = slater_binding_ev(z, &excited, n);
            let energy_ev = s.binding_ev - b_n;
            if energy_ev.is_nan() || energy_ev <= 0.0 {
                continue;
            }
            let f_h = hydrogenic_oscillator_strength(n_s, n);
            let vacant = 1.0 - f64::from(present) / f64::from(capacity);
            let holes = f64::from(2 * n_s * n_s - excited[n_s as usize]);
            out.push(CoreExcitation {
                from_n: n_s,
                from_l: s.subshell.l,
                to_n: n,
                energy_ev,
                oscillator_strength: f64::from(s.occupancy) * f_h * vacant,
                radiative_rate_per_s: EINSTEIN_A_PER_EV2_S * energy_ev * energy_ev * f_h * holes
                    / f64::from(capacity),
                spectator_auger_per_s: AUTOIONIZATION_RATE_PER_S * f64::from(above),
                electrons_in_upper_shell: present + 1,
            });
        }
    }
    out
}

/// Whether the subshell (n, l + 1) of the same shell exists and has a vacancy: then the
/// Δn = 0 excitation l → l + 1 takes most of the subshell's oscillator strength (the
/// hydrogenic Δn ≥ 1 values assume it cannot), and the Δn ≥ 1 excitations are left out.
fn has_open_partner(ion: &Ion, n: u32, l: u32) -> bool {
    if l + 1 >= n {
        return false;
    }
    let capacity = 2 * (2 * (l + 1) + 1);
    let present = ion
        .subshells()
        .iter()
        .find(|s| s.subshell.n == n && s.subshell.l == l + 1)
        .map_or(0, |s| s.occupancy);
    present < capacity
}

/// Autoionization rate (s⁻¹) of an outer electron in shell `n` when the lowest shell the
/// excitation reaches is `n_low`: A_a (n_low/n)³.
pub fn autoionization_rate_per_s(n_low: u32, n: u32) -> f64 {
    AUTOIONIZATION_RATE_PER_S * (f64::from(n_low) / f64::from(n.max(n_low))).powi(3)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::atoms::element;
    use crate::constants::{ELECTRON_MASS_KG, ELEMENTARY_CHARGE_C, EPSILON_0, SPEED_OF_LIGHT_M_S};

    #[test]
    fn einstein_factor_from_constants() {
        // A = (2π e² ν² / (ε₀ m_e c³)) f with hν = 1 eV.
        let h = 6.626_070_15e-34;
        let nu = ELEMENTARY_CHARGE_C / h;
        let a = 2.0 * std::f64::consts::PI * ELEMENTARY_CHARGE_C.powi(2) * nu * nu
            / (EPSILON_0 * ELECTRON_MASS_KG * SPEED_OF_LIGHT_M_S.powi(3));
        assert!((a / EINSTEIN_A_PER_EV2_S - 1.0).abs() < 2e-4, "{a}");
        // Hydrogen 2p → 1s: 6.27e8 s⁻¹ (exact hydrogenic value, from memory); the shell
        // average over 2s, 2p (2s does not decay) is 3/4 of it.
        let de = 0.75 * RYDBERG_EV;
        let shell = EINSTEIN_A_PER_EV2_S * de * de * 0.4162 * 2.0 / 8.0;
        assert!((shell / (0.75 * 6.27e8) - 1.0).abs() < 0.01, "{shell}");
    }

    #[test]
    fn kramers_runs_above_the_exact_values() {
        for (n, m) in [(1, 2), (2, 3), (3, 4), (2, 5)] {
            let ratio = hydrogenic_table(n, m).unwrap() / kramers_oscillator_strength(n, m);
            assert!((0.68..0.86).contains(&ratio), "{n}->{m}: {ratio}");
        }
        assert_eq!(hydrogenic_oscillator_strength(3, 3), 0.0);
    }

    #[test]
    fn resonance_line_energies_of_he_like_ions() {
        // 1s² ¹S – 1s2p ¹P: Ar¹⁶⁺ 3139.6 eV, Fe²⁴⁺ 6700.4 eV, Kr³⁴⁺ 13114 eV (NIST ASD,
        // from memory). The configuration-average estimate lies within 1 %.
        for (sym, q, line) in [("Ar", 16, 3139.6), ("Fe", 24, 6700.4), ("Kr", 34, 13114.0)] {
            let ion = element(sym).unwrap().ion(q).unwrap();
            let k = core_excitations(&ion);
            let first = k.iter().find(|x| x.from_n == 1 && x.to_n == 2).unwrap();
            assert!(
                (first.energy_ev / line - 1.0).abs() < 0.01,
                "{sym}: {}",
                first.energy_ev
            );
            // Two 1s electrons into an empty n = 2 shell: f = 2 × 0.4162.
            assert!((first.oscillator_strength - 0.8324).abs() < 1e-9);
        }
    }

    #[test]
    fn full_shells_take_no_electron() {
        // Ne-like Fe¹⁶⁺: n = 2 is full, so 1s goes to n ≥ 3 only, 2p to n = 3…6.
        let ion = element("Fe").unwrap().ion(16).unwrap();
        let k = core_excitations(&ion);
        assert!(k.iter().all(|x| x.to_n > 2));
        let lmm = k
            .iter()
            .find(|x| x.from_n == 2 && x.from_l == 1 && x.to_n == 3)
            .unwrap();
        // Between the 2p – 3s (727 eV) and 2p – 3d (826 eV) lines (NIST ASD, from memory).
        assert!((720.0..830.0).contains(&lmm.energy_ev), "{}", lmm.energy_ev);
    }
}
