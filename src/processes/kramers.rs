//! Hydrogenic (Kramers) photoionization, the fallback where no photoabsorption table or fit
//! applies: below the first Henke energy (10 eV) of elements whose first ionization energy is
//! lower (alkali and alkaline-earth metals, the lanthanides …), Z = 93–98 below 100 eV and
//! Z > 98, and the subshells that are empty in the neutral atom.
//!
//! # Model
//!
//! H. A. Kramers, Phil. Mag. 46, 836 (1923): one electron in shell n bound by B (eV) absorbs
//! a photon of energy E ≥ B with
//!
//!   σ = (64π/3√3)·α·a₀² · (Ry/(n B)) · (B/E)³,  prefactor 7.907×10⁻¹⁸ cm².
//!
//! # Validity and accuracy
//!
//! Without the Gaunt factor it overestimates hydrogen 1s at threshold by 25 % (exact
//! 6.304×10⁻¹⁸ cm², Bethe & Salpeter 1957, from memory: Gaunt factor 0.797). For
//! many-electron atoms it misses screening, Cooper minima, resonances and the delayed onset
//! of d and f shells: summed over subshells it runs 2–30 times below the Elam et al. (2002)
//! photoabsorption of neutral atoms between 200 eV and 30 keV (measured while the project
//! was planned, against xraydb). Just above the first threshold the hydrogenic model of
//! [`super::photoionization`] (Stobbe 1s, Kramers n ≥ 2) gives 0.94 (He), 2.3 (Ne), 0.39 (Ar)
//! and 0.24 (Xe) times measured photoabsorption (He: Samson 1966, Ne, Ar, Xe: Marr & West
//! 1976, values from memory; `tests/python/test_photon.py`), and Xe 2.4 and 3.8 Mb at 20 and
//! 100 eV against about 35 and 26 Mb measured: a factor-of-five to ten model, used only where
//! no table exists (the Verner fits, [`super::verner`], and the Henke table,
//! [`super::henke`], replace it for those atoms).

use crate::constants::{ALPHA, BOHR_RADIUS_M, RYDBERG_EV};
use crate::error::{require_all_positive, require_positive, Error, Result};
use std::f64::consts::PI;

/// (64π/3√3)·α·a₀² in cm² (≈ 7.907×10⁻¹⁸ cm²): Kramers' hydrogen 1s threshold value.
pub fn kramers_photoionization_prefactor_cm2() -> f64 {
    let a0_cm = BOHR_RADIUS_M * 100.0;
    64.0 * PI / (3.0 * 3f64.sqrt()) * ALPHA * a0_cm * a0_cm
}

/// Kramers photoionization cross section (cm²) of one electron in shell n bound by B (eV),
/// H. A. Kramers, Phil. Mag. 46, 836 (1923):
///
/// σ = (64π/3√3)·α·a₀² · (Ry/(n B)) · (B/E)³,  E ≥ B; 0 below threshold
///
/// Accuracy: see the module documentation (25 % high at the hydrogen 1s threshold, a
/// factor of several for many-electron atoms), so it is a fallback where no table exists.
pub fn kramers_photoionization_cross_section_cm2(
    n: u32,
    binding_ev: f64,
    photon_energy_ev: f64,
) -> f64 {
    if n == 0
        || binding_ev.is_nan()
        || binding_ev <= 0.0
        || photon_energy_ev.is_nan()
        || photon_energy_ev < binding_ev
    {
        return 0.0;
    }
    let ratio = binding_ev / photon_energy_ev;
    kramers_photoionization_prefactor_cm2() * RYDBERG_EV / (f64::from(n) * binding_ev)
        * ratio.powi(3)
}

/// [`kramers_photoionization_cross_section_cm2`] at each photon energy, validated.
pub fn kramers_photoionization_cross_sections_cm2(
    n: u32,
    binding_ev: f64,
    photon_energies_ev: &[f64],
) -> Result<Vec<f64>> {
    if n == 0 {
        return Err(Error::invalid(
            "n",
            n,
            "the principal quantum number must be >= 1",
        ));
    }
    require_positive("binding_ev", binding_ev)?;
    require_all_positive("photon_energy_ev", photon_energies_ev)?;
    Ok(photon_energies_ev
        .iter()
        .map(|&e| kramers_photoionization_cross_section_cm2(n, binding_ev, e))
        .collect())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn hydrogen_threshold_value() {
        // Kramers (1923): 7.907e-18 cm² at the H 1s threshold; the exact value
        // 6.304e-18 cm² (Bethe & Salpeter 1957, from memory) corresponds to Gaunt factor 0.797.
        let s = kramers_photoionization_cross_section_cm2(1, RYDBERG_EV, RYDBERG_EV);
        assert!((s / 7.907e-18 - 1.0).abs() < 1e-3, "{s:e}");
        assert!((6.304e-18 / s - 0.797).abs() < 1e-3);
    }

    #[test]
    fn hydrogenic_scaling() {
        // Hydrogen-like ion Z with n = 2: B = Z²Ry/4; threshold σ ∝ n/Z² (Kramers).
        let z = 10.0;
        let b = z * z * RYDBERG_EV / 4.0;
        let s = kramers_photoionization_cross_section_cm2(2, b, b);
        assert!((s - 7.907e-18 * 2.0 / (z * z)).abs() / s < 1e-3);
        // E⁻³ above threshold.
        let s2 = kramers_photoionization_cross_section_cm2(2, b, 2.0 * b);
        assert!((s2 * 8.0 / s - 1.0).abs() < 1e-12);
    }

    #[test]
    fn zero_below_threshold_and_validation() {
        assert_eq!(
            kramers_photoionization_cross_section_cm2(1, 13.6, 13.0),
            0.0
        );
        assert_eq!(
            kramers_photoionization_cross_section_cm2(0, 13.6, 20.0),
            0.0
        );
        assert_eq!(
            kramers_photoionization_cross_section_cm2(1, 13.6, f64::NAN),
            0.0
        );
        assert!(kramers_photoionization_cross_sections_cm2(1, 13.6, &[-1.0]).is_err());
        assert!(kramers_photoionization_cross_sections_cm2(0, 13.6, &[20.0]).is_err());
        assert!(kramers_photoionization_cross_sections_cm2(1, 0.0, &[20.0]).is_err());
        let v = kramers_photoionization_cross_sections_cm2(1, 13.6, &[10.0, 20.0]).unwrap();
        assert_eq!(v[0], 0.0);
        assert!(v[1] > 0.0);
    }
}
