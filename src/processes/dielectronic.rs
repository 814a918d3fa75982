//! Dielectronic recombination (DR): a free electron is captured while it lifts a bound
//! electron of the ion to a higher shell (the doubly excited state of the ion of one charge
//! less); when the core then decays by a photon instead of autoionizing, the ion has
//! recombined. Resonant: only at E = E_r.
//!
//! # Resonances (for an electron beam)
//!
//! For each core excitation s → n_e of the recombining ion q (Δn = 1…4, from
//! [`super::core_excitation`]: KLL, KLM… for a K-shell core, LMM, LMN… for an L-shell core)
//! and each capture shell n_c ≥ n_e with room for the electron:
//!
//! * **Energy**: E_r = ΔE − B_c, the excitation energy minus the captured electron's
//!   Slater-screened hydrogenic binding in the doubly excited configuration (J. C. Slater,
//!   Phys. Rev. 36, 57 (1930); our documented estimate).
//! * **Strength** (the energy-integrated cross section), from detailed balance with the
//!   autoionization rate (see e.g. the standard derivation from the Breit–Wigner form; from
//!   memory):
//!
//!   S = (π² ħ³/(m_e E_r)) · g_d/(2 g_i) · A_a A_r/(A_a + A_x + A_r)   (cm² eV)
//!
//!   with configuration-average statistical weights g: binomial counts of the subshell s and
//!   of the lowest shell n_low an electron of s can reach receiving both electrons. Every
//!   group of the same core subshell keeps that weight and takes A_a ∝ (n_low/n_c)³, so the
//!   capture width g·A_a falls as n_c⁻³ (the hydrogenic scaling of the strengths along a
//!   Rydberg series) and groups with both electrons above n_low (KMM for a K-shell core
//!   with an empty L shell) come out weaker than KLL, as measured spectra show; A_a is the
//!   autoionization rate of the captured electron
//!   back to the ion, A_x the Auger rate of the other electrons above the hole and A_r the
//!   radiative decay of the shell-n_e electrons into the hole, all from the scaling laws of
//!   [`super::core_excitation`].
//! * **In a beam** the resonances are folded with a Gaussian of the beam's energy spread
//!   (FWHM), widened in quadrature by the natural width ħ·(A_a + A_x + A_r).
//!
//! # Maxwellian rate coefficient (for plasmas)
//!
//! A. Burgess, ApJ 141, 1588 (1965), the general formula (constants from memory):
//!
//!   α(T) = 3.0×10⁻³ T^(−3/2) B(z) Σ_j f_j A(x_j) exp(−β ΔE_j/kT)  cm³ s⁻¹ (T in K),
//!
//! x = ΔE_j/((z+1) Ry), A(x) = √x/(1 + 0.105x + 0.015x²), B(z) = √z (z+1)^{5/2}/√(z² + 13.4),
//! β = 1/(1 + 0.015 z³/(z+1)²), z the charge of the recombined ion (q − 1; the formula gives
//! 0 for recombination to the neutral atom, where it does not apply), f_j and ΔE_j the
//! oscillator strengths and energies of the recombining ion's core excitations.
//!
//! # Validity and accuracy
//!
//! Δn ≥ 1 core excitations only (no Δn = 0 DR, which dominates at low temperature for L- and
//! M-shell ions), configuration-average energies (a band of unresolved lines for each
//! resonance group). Measured (tests/python/test_ea_dr.py, sources named there): KLL energies
//! of He-like Ar, Fe and Kr 2160, 4585 and 8975 eV, within 1 % of the centres of the KLL
//! groups measured in electron-beam traps (2.10–2.20, 4.55–4.70, 8.90–9.20 keV, from
//! memory). The Burgess rate of Fe²⁴⁺ at kT = 1–5 keV is 1.24–1.25 × the same formula with
//! the Fe XXV line data (the hydrogenic f of 1s → 2 is 0.83 against 0.70), and within a
//! factor 3 of the detailed-balance sum over the listed resonances. The strengths are
//! order-of-magnitude estimates (factor 2–3; the KLL group of Fe²⁴⁺ comes out at
//! 2.0×10⁻¹⁸ cm² eV).

use std::sync::{Arc, OnceLock};

use crate::atoms::Ion;
use crate::constants::{BOLTZMANN_EV_K, ELECTRON_REST_EV, RYDBERG_EV, SPEED_OF_LIGHT_M_S};
use crate::error::{require_non_negative, require_positive, Result};
use crate::processes::core_excitation::{
    autoionization_rate_per_s, core_excitations, shell_occupancy, slater_binding_ev,
};
use crate::processes::lotz::maxwellian_speed_factor_cm_s;
use crate::processes::memo::{get_or_compute, Memo};

/// ħ in eV s (CODATA 2018).
pub const HBAR_EV_S: f64 = 6.582_119_569e-16;
/// Highest capture shell listed.
pub const MAX_CAPTURE_N: u32 = 30;
/// FWHM of a Gaussian over its standard deviation, 2√(2 ln 2).
const FWHM_OVER_SIGMA: f64 = 2.354_820_045;

/// One resonance group: core excitation s → n_e with capture into n_c.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DrResonance {
    /// Subshell (n, l) of the core electron that is excited and the shell it reaches.
    pub core_from_n: u32,
    pub core_from_l: u32,
    pub core_to_n: u32,
    /// Shell of the captured electron.
    pub capture_n: u32,
    /// Resonance energy E_r (eV) of the free electron.
    pub energy_ev: f64,
    /// Resonance strength (cm² eV).
    pub strength_cm2_ev: f64,
    /// Natural width ħ·(total decay rate) (eV).
    pub natural_width_ev: f64,
}

/// π² ħ³/m_e in cm² eV² s.
fn detailed_balance_constant() -> f64 {
    let c_cm_s = SPEED_OF_LIGHT_M_S * 100.0;
    let m_e = ELECTRON_REST_EV / (c_cm_s * c_cm_s); // eV s² / cm²
    std::f64::consts::PI.powi(2) * HBAR_EV_S.powi(3) / m_e
}

/// C(g, n + k)/C(g, n) for adding k electrons to n in g states (0 when they do not fit).
fn add_weight(states: u32, present: u32, k: u32) -> f64 {
    if present + k > states {
        return 0.0;
    }
    (0..k)
        .map(|i| f64::from(states - present - i) / f64::from(present + i + 1))
        .product()
}

/// The DR resonances of the recombining ion (charge ≥ 1 with at least one electron);
/// empty for a bare ion or a neutral atom. They depend on the ion alone, so each (Z, q) is
/// listed once per process and shared: building them (and sorting) was two thirds of the
/// cost of a trap's rate network.
pub fn resonances(ion: &Ion) -> Arc<Vec<DrResonance>> {
    static MEMO: Memo<(u32, u32), Arc<Vec<DrResonance>>> = OnceLock::new();
    get_or_compute(&MEMO, (ion.element.z(), ion.charge), || {
        Arc::new(list_resonances(ion))
    })
}

fn list_resonances(ion: &Ion) -> Vec<DrResonance> {
    if ion.charge == 0 || ion.electrons() == 0 {
        return Vec::new();
    }
    let z = ion.element.z();
    let k_db = detailed_balance_constant();
    let shells = shell_occupancy(ion);
    let excitations = core_excitations(ion);
    let mut out = Vec::new();
    for k in &excitations {
        let occupancy = ion
            .subshells()
            .iter()
            .find(|s| s.subshell.n == k.from_n && s.subshell.l == k.from_l)
            .map_or(0, |s| s.occupancy);
        let sub_capacity = 2 * (2 * k.from_l + 1);
        // g of the subshell with one electron fewer over g with all of them.
        let g_sub = f64::from(occupancy) / f64::from(sub_capacity - occupancy + 1);
        // The lowest shell an electron of this subshell can reach sets the capture width.
        let n_low = excitations
            .iter()
            .filter(|o| o.from_n == k.from_n && o.from_l == k.from_l)
            .map(|o| o.to_n)
            .min()
            .unwrap_or(k.to_n);
        let g_shells = add_weight(2 * n_low * n_low, shells[n_low as usize], 2);
        let mut excited = shells.clone();
        excited[k.from_n as usize] -= 1;
        excited[k.to_n as usize] += 1;
        let n_e = k.to_n;
        let present_e = shells[n_e as usize];
        for n_c in n_e..=MAX_CAPTURE_N {
            let b_c = slater_binding_ev(z, &excited, n_c);
            let energy_ev = k.energy_ev - b_c;
            if energy_ev <= 0.0 {
                continue;
            }
            let decaying = if n_c == n_e {
                present_e + 2
            } else {
                present_e + 1
            };
            let present_c = excited.get(n_c as usize).copied().unwrap_or(0);
            if present_c >= 2 * n_c * n_c {
                continue;
            }
            if g_shells == 0.0 {
                continue;
            }
            let a_a = autoionization_rate_per_s(n_low, n_c);
            let a_r = k.radiative_rate_per_s * f64::from(decaying);
            let total = a_a + k.spectator_auger_per_s + a_r;
            let strength = k_db / energy_ev * g_sub * g_shells / 2.0 * a_a * a_r / total;
            out.push(DrResonance {
                core_from_n: k.from_n,
                core_from_l: k.from_l,
                core_to_n: n_e,
                capture_n: n_c,
                energy_ev,
                strength_cm2_ev: strength,
                natural_width_ev: HBAR_EV_S * total,
            });
        }
    }
    out.sort_by(|a, b| a.energy_ev.total_cmp(&b.energy_ev));
    out
}

/// DR cross section (cm²) seen by a beam of mean energy E and energy spread (FWHM, eV):
/// Σ_r S_r G(E − E_r), G a unit-area Gaussian of FWHM √(spread² + Γ_r²).
pub fn beam_cross_section_cm2(
    resonances: &[DrResonance],
    energy_ev: f64,
    spread_fwhm_ev: f64,
) -> f64 {
    resonances
        .iter()
        .map(|r| {
            let fwhm =
                (spread_fwhm_ev * spread_fwhm_ev + r.natural_width_ev * r.natural_width_ev).sqrt();
            let sigma = fwhm / FWHM_OVER_SIGMA;
            let u = (energy_ev - r.energy_ev) / sigma;
            if u.abs() > 40.0 {
                return 0.0;
            }
            r.strength_cm2_ev * (-0.5 * u * u).exp() / (sigma * (2.0 * std::f64::consts::PI).sqrt())
        })
        .sum()
}

/// [`beam_cross_section_cm2`] for `ion` at each energy, with the spread checked (≥ 0).
pub fn beam_cross_sections_cm2(
    ion: &Ion,
    energies_ev: &[f64],
    spread_fwhm_ev: f64,
) -> Result<Vec<f64>> {
    require_non_negative("energy_spread_ev", spread_fwhm_ev)?;
    let list = resonances(ion);
    Ok(energies_ev
        .iter()
        .map(|&e| beam_cross_section_cm2(&list, e, spread_fwhm_ev))
        .collect())
}

/// Maxwellian rate coefficient (cm³ s⁻¹) summed over the listed resonances:
/// Σ_r S_r v_r f(E_r) = √(8 eV/πm_e) (kT)^(−3/2) Σ_r S_r E_r e^(−E_r/kT).
pub fn resonance_rate_coefficient_cm3_s(ion: &Ion, temperature_ev: f64) -> Result<f64> {
    require_positive("temperature_ev", temperature_ev)?;
    let kt = temperature_ev;
    // (kT)^(−3/2) goes inside each exponential: for a tiny kT it overflows while the
    // Boltzmann factor underflows, and their product is 0, not ∞·0 = NaN.
    let log_pre = -1.5 * kt.ln();
    let sum: f64 = resonances(ion)
        .iter()
        .map(|r| r.strength_cm2_ev * r.energy_ev * (log_pre - r.energy_ev / kt).exp())
        .sum();
    Ok(maxwellian_speed_factor_cm_s() * sum)
}

/// Burgess (1965) general-formula DR rate coefficient (cm³ s⁻¹) of the recombining ion at
/// electron temperature kT (eV), over the ion's Δn ≥ 1 core excitations.
pub fn rate_coefficient_cm3_s(ion: &Ion, temperature_ev: f64) -> Result<f64> {
    require_positive("temperature_ev", temperature_ev)?;
    if ion.charge <= 1 || ion.electrons() == 0 {
        return Ok(0.0);
    }
    let z = f64::from(ion.charge - 1);
    let b = z.sqrt() * (z + 1.0).powf(2.5) / (z * z + 13.4).sqrt();
    let beta = 1.0 / (1.0 + 0.015 * z.powi(3) / (z + 1.0).powi(2));
    let t_k = temperature_ev / BOLTZMANN_EV_K;
    let sum: f64 = core_excitations(ion)
        .iter()
        .map(|k| {
            let x = k.energy_ev / ((z + 1.0) * RYDBERG_EV);
            let a = x.sqrt() / (1.0 + 0.105 * x + 0.015 * x * x);
            // T^(−3/2) inside the exponential, as in the resonance sum above.
            k.oscillator_strength
                * a
                * (-1.5 * t_k.ln() - beta * k.energy_ev / temperature_ev).exp()
        })
        .sum();
    Ok(3.0e-3 * b * sum)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::atoms::element;

    #[test]
    fn detailed_balance_constant_value() {
        // π²ħ³/m_e = 4.95e-30 cm² eV² s (computed by hand from CODATA 2018).
        assert!((detailed_balance_constant() / 4.950e-30 - 1.0).abs() < 2e-3);
    }

    #[test]
    fn tiny_temperatures_give_zero_not_nan() {
        // The 1M-call fuzz run: kT = 2.2e-308 eV gave ∞·0 = NaN.
        for (symbol, q) in [("Xe", 12), ("U", 83)] {
            let ion = element(symbol).unwrap().ion(q).unwrap();
            for t in [5e-324, 2.2e-308, 1e-300] {
                assert_eq!(rate_coefficient_cm3_s(&ion, t).unwrap(), 0.0);
                assert_eq!(resonance_rate_coefficient_cm3_s(&ion, t).unwrap(), 0.0);
            }
            let warm = rate_coefficient_cm3_s(&ion, 500.0).unwrap();
            assert!(warm.is_finite() && warm > 0.0);
        }
    }

    #[test]
    fn kll_of_he_like_iron() {
        let fe = element("Fe").unwrap().ion(24).unwrap();
        let list = resonances(&fe);
        let kll = list
            .iter()
            .find(|r| r.core_from_n == 1 && r.core_to_n == 2 && r.capture_n == 2)
            .unwrap();
        assert!(
            (4500.0..4700.0).contains(&kll.energy_ev),
            "{}",
            kll.energy_ev
        );
        // Order of magnitude of the summed KLL strength, 1e-19 … 1e-17 cm² eV.
        assert!(
            (1e-19..1e-17).contains(&kll.strength_cm2_ev),
            "{}",
            kll.strength_cm2_ev
        );
        // The KLn series converges on the 1s → 2 excitation energy from below.
        let kl: Vec<_> = list
            .iter()
            .filter(|r| r.core_from_n == 1 && r.core_to_n == 2)
            .collect();
        assert!(kl.windows(2).all(|w| w[0].energy_ev < w[1].energy_ev));
        assert!(kl.last().unwrap().energy_ev < 6700.0);
    }

    #[test]
    fn no_resonances_without_a_core() {
        let ar = element("Ar").unwrap();
        assert!(resonances(&ar.ion(18).unwrap()).is_empty());
        assert!(resonances(&ar.ion(0).unwrap()).is_empty());
        // H-like ions have KLL resonances (1s → 2 with capture into 2).
        assert!(!resonances(&ar.ion(17).unwrap()).is_empty());
    }

    #[test]
    fn beam_profile_integrates_to_the_strength() {
        let fe = element("Fe").unwrap().ion(24).unwrap();
        let list = resonances(&fe);
        let total: f64 = list.iter().map(|r| r.strength_cm2_ev).sum();
        let (lo, hi, n) = (3000.0, 9000.0, 60_000);
        let de = (hi - lo) / n as f64;
        let integral: f64 = (0..n)
            .map(|i| beam_cross_section_cm2(&list, lo + (i as f64 + 0.5) * de, 20.0) * de)
            .sum();
        assert!((integral / total - 1.0).abs() < 1e-3, "{integral} {total}");
    }

    #[test]
    fn burgess_and_resonance_sum_agree_within_a_factor_of_three() {
        let fe = element("Fe").unwrap().ion(24).unwrap();
        for kt in [1000.0, 2000.0, 5000.0] {
            let gf = rate_coefficient_cm3_s(&fe, kt).unwrap();
            let sum = resonance_rate_coefficient_cm3_s(&fe, kt).unwrap();
            assert!(
                (gf / sum) > 1.0 / 3.0 && (gf / sum) < 3.0,
                "{kt}: {gf} {sum}"
            );
        }
    }
}
