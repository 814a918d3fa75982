//! Stepwise breeding in an electron beam with ionization alone.
//!
//! # Model
//!
//! The rate of q → q+1 is λ_q = (j/e)·σ_q(E), j the current density (A/cm²) and σ_q the
//! Lotz cross section of the step ([`crate::processes::ion_lotz`]); the populations then
//! follow the Bateman chain (H. Bateman, Proc. Camb. Phil. Soc. 15, 423 (1910), from memory), and the time
//! to reach q is τ_q = Σ_{i<q} 1/λ_i, i.e. the ionization factor jτ_q = e·Σ_{i<q} 1/σ_i
//! (C/cm²), independent of the current density.
//!
//! # Validity and accuracy
//!
//! Ionization alone: recombination, charge exchange and losses make the real time longer,
//! so τ_q is a lower bound (the full rate network is [`super::beam_trap`]). Accuracy is that
//! of the Lotz cross sections (±30–40 % for ions, from memory). Checked: Ar¹⁶⁺ → Ar¹⁷⁺ needs
//! e/σ ≈ 83 C/cm² and Ar¹⁷⁺ → Ar¹⁸⁺ ≈ 193 C/cm² at 10 keV (simplified Lotz, worked by hand).

use crate::atoms::Element;
use crate::constants::ELEMENTARY_CHARGE_C;
use crate::error::{require_all_positive, require_positive, Error, Result};
use crate::processes::ion_lotz::{ionization_cross_sections_cm2, peak_energy_ev};
use crate::processes::lotz::LotzConstants;

/// One step q → q+1 of the breeding ladder.
#[derive(Clone, Debug, PartialEq)]
pub struct BreedingStep {
    pub charge: u32,
    pub ionization_energy_ev: f64,
    /// Lotz cross section of the step at the beam energy (0 when the energy is below threshold).
    pub cross_section_cm2: f64,
    pub rate_per_s: f64,
    /// Cumulative time to reach charge + 1 from the neutral (s; infinite when unreachable).
    pub time_to_next_s: f64,
    /// Cumulative ionization factor jτ to reach charge + 1 (C/cm²).
    pub j_tau_c_cm2: f64,
    /// Electron energy that maximises this step's cross section (eV).
    pub peak_energy_ev: f64,
}

/// The ladder of steps 0 → 1 → … → `target_charge` at one beam energy and current density.
pub fn breeding_ladder(
    element: &'static Element,
    target_charge: i64,
    energy_ev: f64,
    current_density_a_cm2: f64,
    constants: Option<LotzConstants>,
) -> Result<Vec<BreedingStep>> {
    require_positive("energy_ev", energy_ev)?;
    require_positive("current_density_a_cm2", current_density_a_cm2)?;
    element.check_charge(target_charge, element.z())?;
    let flux = current_density_a_cm2 / ELEMENTARY_CHARGE_C;
    if !flux.is_finite() {
        // Found by the long fuzz run: j = 1e308 A/cm² made j/e infinite and 0·∞ rates NaN.
        return Err(Error::invalid(
            "current_density_a_cm2",
            current_density_a_cm2,
            "must be small enough that the electron flux j/e is finite (below 1e289 A/cm²)",
        ));
    }
    let mut j_tau = 0.0;
    let mut steps = Vec::with_capacity(target_charge as usize);
    for q in 0..target_charge {
        let sigma = ionization_cross_sections_cm2(element, q, &[energy_ev], constants)?[0];
        j_tau += if sigma > 0.0 {
            ELEMENTARY_CHARGE_C / sigma
        } else {
            f64::INFINITY
        };
        steps.push(BreedingStep {
            charge: q as u32,
            ionization_energy_ev: element.ionization_energies_ev()[q as usize],
            cross_section_cm2: sigma,
            rate_per_s: flux * sigma,
            time_to_next_s: j_tau / current_density_a_cm2,
            j_tau_c_cm2: j_tau,
            peak_energy_ev: peak_energy_ev(element, q, constants)?,
        });
    }
    Ok(steps)
}

/// Ionization factor jτ (C/cm²) to reach `charge` from the neutral; infinite when the beam
/// energy lies below one of the steps' thresholds.
pub fn j_tau_c_cm2(
    element: &'static Element,
    charge: i64,
    energy_ev: f64,
    constants: Option<LotzConstants>,
) -> Result<f64> {
    Ok(breeding_ladder(element, charge, energy_ev, 1.0, constants)?
        .last()
        .map_or(0.0, |s| s.j_tau_c_cm2))
}

/// Time (s) to reach `charge` from the neutral at a current density (A/cm²).
pub fn breeding_time_s(
    element: &'static Element,
    charge: i64,
    energy_ev: f64,
    current_density_a_cm2: f64,
    constants: Option<LotzConstants>,
) -> Result<f64> {
    require_positive("current_density_a_cm2", current_density_a_cm2)?;
    Ok(j_tau_c_cm2(element, charge, energy_ev, constants)? / current_density_a_cm2)
}

/// [`j_tau_c_cm2`] at many beam energies at once: each step's Lotz shells are built once
/// and evaluated at every energy (the per-energy ladder would also rebuild them, and find
/// each step's peak energy, for every energy).
pub fn j_tau_c_cm2_at(
    element: &'static Element,
    charge: i64,
    energies_ev: &[f64],
    constants: Option<LotzConstants>,
) -> Result<Vec<f64>> {
    require_all_positive("energy_ev", energies_ev)?;
    element.check_charge(charge, element.z())?;
    let mut j_tau = vec![0.0; energies_ev.len()];
    for q in 0..charge {
        crate::interrupt::check()?;
        let sigma = ionization_cross_sections_cm2(element, q, energies_ev, constants)?;
        for (jt, s) in j_tau.iter_mut().zip(sigma) {
            *jt += if s > 0.0 {
                ELEMENTARY_CHARGE_C / s
            } else {
                f64::INFINITY
            };
        }
    }
    Ok(j_tau)
}

/// [`breeding_time_s`] at many beam energies at once (see [`j_tau_c_cm2_at`]).
pub fn breeding_times_s(
    element: &'static Element,
    charge: i64,
    energies_ev: &[f64],
    current_density_a_cm2: f64,
    constants: Option<LotzConstants>,
) -> Result<Vec<f64>> {
    require_positive("current_density_a_cm2", current_density_a_cm2)?;
    let mut out = j_tau_c_cm2_at(element, charge, energies_ev, constants)?;
    out.iter_mut().for_each(|t| *t /= current_density_a_cm2);
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::atoms::element;

    #[test]
    fn last_argon_steps_match_the_planning_values() {
        // Worked by hand while planning (simplified Lotz, E = 10 keV):
        // Ar16+ → Ar17+ needs e/σ ≈ 83 C/cm², Ar17+ → Ar18+ ≈ 193 C/cm².
        let ar = element("Ar").unwrap();
        let ladder = breeding_ladder(ar, 18, 1e4, 100.0, None).unwrap();
        let step = |q: usize| {
            ladder[q].j_tau_c_cm2
                - if q > 0 {
                    ladder[q - 1].j_tau_c_cm2
                } else {
                    0.0
                }
        };
        assert!((step(16) - 83.0).abs() < 2.0, "{}", step(16));
        assert!((step(17) - 193.0).abs() < 3.0, "{}", step(17));
    }

    #[test]
    fn an_overflowing_electron_flux_is_refused() {
        let ar = crate::atoms::element("Ar").unwrap();
        assert!(breeding_ladder(ar, 13, 3.4, 1e308, None).is_err());
        assert!(breeding_ladder(ar, 13, 3000.0, 1e4, None)
            .unwrap()
            .iter()
            .all(|s| s.rate_per_s.is_finite()));
    }

    #[test]
    fn time_scales_inversely_with_current_density() {
        let kr = element("Kr").unwrap();
        let t1 = breeding_time_s(kr, 20, 5000.0, 100.0, None).unwrap();
        let t2 = breeding_time_s(kr, 20, 5000.0, 400.0, None).unwrap();
        assert!((t1 / t2 - 4.0).abs() < 1e-12);
    }

    #[test]
    fn below_threshold_is_unreachable() {
        let ar = element("Ar").unwrap();
        // 1 keV cannot remove a 1s electron (IE of Ar16+ is 4.1 keV, NIST ASD).
        assert!(j_tau_c_cm2(ar, 17, 1000.0, None).unwrap().is_infinite());
    }

    #[test]
    fn many_energies_at_once_equal_one_at_a_time() {
        let au = element("Au").unwrap();
        let energies = [3e3, 1e4, 2.5e4, 6e4];
        let many = breeding_times_s(au, 60, &energies, 250.0, None).unwrap();
        for (e, t) in energies.iter().zip(&many) {
            let one = breeding_time_s(au, 60, *e, 250.0, None).unwrap();
            assert!(
                one == *t || (one - t).abs() <= 1e-12 * one,
                "{e}: {one} vs {t}"
            );
        }
        // A NaN energy is refused, as it is one at a time.
        assert!(breeding_times_s(au, 60, &[f64::NAN], 1.0, None).is_err());
    }
}
