//! Maxwellian rate coefficient of radiative recombination: the Kim–Pratt cross section
//! ([`super::radiative_recombination`]) averaged over a Maxwellian electron distribution, in
//! closed form.
//!
//! # Model
//!
//! With χ = 2 Z_eff² Ry / E the Kim–Pratt cross section times the energy is
//! σE = P·2Z_eff²Ry·ln(1 + a/E), a = Z_eff²Ry/n_eff², P = (8π/3√3)αƛ_e². Over a
//! non-relativistic Maxwellian of temperature kT,
//!
//!   ⟨σv⟩ = √(8/(π m_e)) (kT)^(−3/2) ∫₀^∞ σE e^(−E/kT) dE
//!        = √(8 eV/(π m_e)) (kT)^(−1/2) · P · 2Z_eff²Ry · G(a/kT),
//!   G(b) = ln b + γ + e^b E₁(b)
//!
//! (∫₀^∞ e^(−x) ln(x + b) dx = ln b + e^b E₁(b) and ∫₀^∞ e^(−x) ln x dx = −γ; derived here).
//! For b < 10⁻³ G is evaluated from the series of E₁ with the cancelling logarithms removed.
//!
//! # Validity and accuracy
//!
//! Radiative capture only (dielectronic recombination is a separate channel). Measured for
//! bare hydrogen-like ions against the exact hydrogenic total rate coefficients (case A,
//! all shells): 1.019, 1.008 and 0.993 times the values 6.82, 4.18 and 2.51×10⁻¹³ cm³/s at
//! 5 000, 10 000 and 20 000 K (Osterbrock & Ferland 2006, Table 2.1, from Storey & Hummer
//! 1995; values from memory); 0.81–1.04 times M. J. Seaton, MNRAS 119, 81 (1959), asymptotic
//! formula (from memory) over λ = 157 890 Z²/T[K] = 0.1–100 (0.92–1.04 for λ ≥ 1). The
//! low-λ shortfall (kT ≳ 10 Z²Ry) is the cross section's own (0.83–0.92 of Kramers). For
//! ions with electrons the accuracy is that of the Kim–Pratt screening rule, about a factor
//! 1.5 (from memory).

use super::lotz::maxwellian_speed_factor_cm_s;
use super::radiative_recombination::{kim_pratt_effective_charge_and_n, kim_pratt_prefactor_cm2};
use super::special::{exp1_scaled, EULER_GAMMA};
use crate::atoms::Element;
use crate::constants::RYDBERG_EV;
use crate::error::{require_all_positive, Result};

/// G(b) = ln b + γ + e^b E₁(b) = ∫₀^∞ e^(−x) ln(1 + b/x) dx, for b > 0.
fn log_average(b: f64) -> f64 {
    if b <= 0.0 {
        // G(b) ~ b ln(1/b) → 0: reached when n²·kT overflows (kT near 1e308 eV), where
        // the series below would give (−∞)·0 = NaN.
        0.0
    } else if b < 1e-3 {
        // e^b E₁(b) = e^b (−γ − ln b − Σ_{k≥1} (−b)^k/(k·k!)): the logarithms cancel to
        // −(ln b + γ)(e^b − 1), leaving no subtraction of large numbers.
        let series = b - b * b / 4.0 + b * b * b / 18.0 - b.powi(4) / 96.0;
        -(b.ln() + EULER_GAMMA) * b.exp_m1() + b.exp() * series
    } else {
        b.ln() + EULER_GAMMA + exp1_scaled(b)
    }
}

/// Maxwellian rate coefficient (cm³ s⁻¹) of Kim–Pratt radiative recombination of an ion of
/// charge `charge` (1…Z) of element Z with valence shell (n₀, occupancy), at electron
/// temperature kT = `temperature_ev`. Returns 0 for charge 0, charge > Z, n₀ = 0 or a
/// non-positive temperature (the validated entry point is
/// [`radiative_recombination_rate_coefficients_cm3_s`]).
pub fn kim_pratt_rate_coefficient_cm3_s(
    z: u32,
    charge: u32,
    valence_n: u32,
    valence_occupancy: u32,
    temperature_ev: f64,
) -> f64 {
    if charge == 0
        || charge > z
        || valence_n == 0
        || temperature_ev.is_nan()
        || temperature_ev <= 0.0
    {
        return 0.0;
    }
    let (z_eff, n_eff) = kim_pratt_effective_charge_and_n(z, charge, valence_n, valence_occupancy);
    let z2ry = z_eff * z_eff * RYDBERG_EV;
    let b = z2ry / (n_eff * n_eff * temperature_ev);
    maxwellian_speed_factor_cm_s() / temperature_ev.sqrt()
        * kim_pratt_prefactor_cm2()
        * 2.0
        * z2ry
        * log_average(b)
}

/// Radiative-recombination rate coefficient (cm³ s⁻¹) of the ion `charge` → `charge − 1`
/// of `element` at each electron temperature (eV): [`kim_pratt_rate_coefficient_cm3_s`]
/// with the ion's own valence shell. `charge` must be 1…Z, temperatures > 0.
pub fn radiative_recombination_rate_coefficients_cm3_s(
    element: &'static Element,
    charge: i64,
    temperatures_ev: &[f64],
) -> Result<Vec<f64>> {
    element.check_charge(charge, element.z())?;
    if charge == 0 {
        return Err(crate::error::Error::invalid(
            "charge",
            charge,
            &format!(
                "the capturing ion must have charge 1..={} (a neutral atom does not recombine)",
                element.z()
            ),
        ));
    }
    require_all_positive("temperature_ev", temperatures_ev)?;
    let (n0, occupancy) = element.ion(charge)?.valence_shell();
    Ok(temperatures_ev
        .iter()
        .map(|&t| kim_pratt_rate_coefficient_cm3_s(element.z(), charge as u32, n0, occupancy, t))
        .collect())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::atoms::element;
    use crate::constants::BOLTZMANN_EV_K;

    #[test]
    fn huge_temperatures_give_a_finite_rate() {
        // The 1M-call fuzz run: kT = 1e308 eV gave NaN (n²·kT overflowed to ∞, b = 0).
        for (symbol, q) in [("Xe", 23), ("U", 66), ("Au", 17)] {
            let v = radiative_recombination_rate_coefficients_cm3_s(
                element(symbol).unwrap(),
                q,
                &[1e308, f64::MAX],
            )
            .unwrap();
            assert!(
                v.iter().all(|x| x.is_finite() && *x >= 0.0),
                "{symbol}{q}+: {v:?}"
            );
        }
    }
    use crate::processes::radiative_recombination::kim_pratt_cross_section_cm2;

    #[test]
    fn hydrogen_against_exact_hydrogenic_case_a() {
        // Exact hydrogenic total (case A) coefficients, Osterbrock & Ferland 2006 Table 2.1
        // after Storey & Hummer 1995 (from memory). Measured 0.99–1.02; the 5 % tolerance
        // covers the memory of the table's third digit and Kim–Pratt's own error at λ ≈ 16.
        for (t_k, table) in [(5e3, 6.82e-13), (1e4, 4.18e-13), (2e4, 2.51e-13)] {
            let a = kim_pratt_rate_coefficient_cm3_s(1, 1, 1, 0, t_k * BOLTZMANN_EV_K);
            assert!(
                (a / table - 1.0).abs() < 0.05,
                "T = {t_k} K: {a:e} vs {table:e}"
            );
        }
    }

    #[test]
    fn hydrogen_like_ions_against_seaton_1959() {
        // M. J. Seaton, MNRAS 119, 81 (1959), asymptotic hydrogenic formula (from memory):
        // α = 5.197e-14 Z λ^½ (0.4288 + ½ ln λ + 0.469 λ^(−1/3)), λ = 157890 Z²/T[K].
        // Measured 0.92–1.04 for λ = 1–100; 15 % tolerance (Kim–Pratt's cross section is
        // 0.83–0.92 of Kramers', and Seaton's form is itself asymptotic in λ).
        for z in [1u32, 6, 18, 26] {
            for lambda in [1.0f64, 3.0, 10.0, 30.0, 100.0] {
                let t_k = 157_890.0 * f64::from(z * z) / lambda;
                let seaton = 5.197e-14
                    * f64::from(z)
                    * lambda.sqrt()
                    * (0.4288 + 0.5 * lambda.ln() + 0.469 * lambda.powf(-1.0 / 3.0));
                let a = kim_pratt_rate_coefficient_cm3_s(z, z, 1, 0, t_k * BOLTZMANN_EV_K);
                assert!((a / seaton - 1.0).abs() < 0.15, "Z = {z}, λ = {lambda}");
            }
        }
    }

    #[test]
    fn closed_form_equals_quadrature_of_the_cross_section() {
        // ⟨σv⟩ = √(8/(π m_e)) (kT)^(−3/2) ∫ σ E e^(−E/kT) dE by the trapezoid rule in ln E.
        for (z, q, n0, occ, t) in [
            (18u32, 8u32, 2u32, 8u32, 500.0),
            (1, 1, 1, 0, 0.5),
            (26, 20, 2, 4, 5e4),
        ] {
            let n = 40_000;
            let (lo, hi) = ((t * 1e-9f64).ln(), (t * 60.0f64).ln());
            let h = (hi - lo) / n as f64;
            let integral: f64 = (0..=n)
                .map(|i| {
                    let e = (lo + h * i as f64).exp();
                    let w = if i == 0 || i == n { 0.5 } else { 1.0 };
                    w * kim_pratt_cross_section_cm2(z, q, n0, occ, e) * e * (-e / t).exp() * e * h
                })
                .sum();
            let quad = maxwellian_speed_factor_cm_s() * t.powf(-1.5) * integral;
            let closed = kim_pratt_rate_coefficient_cm3_s(z, q, n0, occ, t);
            assert!((closed / quad - 1.0).abs() < 1e-4, "{closed:e} vs {quad:e}");
        }
    }

    #[test]
    fn small_argument_series_joins_the_direct_form() {
        let direct = |b: f64| b.ln() + EULER_GAMMA + exp1_scaled(b);
        let b = 1e-3;
        assert!((log_average(b * (1.0 - 1e-12)) / direct(b) - 1.0).abs() < 1e-9);
        assert!(log_average(1e-12) > 0.0 && log_average(1e-12) < 1e-10);
    }

    #[test]
    fn validated_entry_point() {
        let h = element("H").unwrap();
        let a = radiative_recombination_rate_coefficients_cm3_s(h, 1, &[0.8617]).unwrap();
        assert!(a[0] > 4e-13 && a[0] < 4.4e-13);
        assert!(radiative_recombination_rate_coefficients_cm3_s(h, 0, &[1.0]).is_err());
        assert!(radiative_recombination_rate_coefficients_cm3_s(h, 2, &[1.0]).is_err());
        assert!(radiative_recombination_rate_coefficients_cm3_s(h, 1, &[0.0]).is_err());
        assert_eq!(kim_pratt_rate_coefficient_cm3_s(1, 0, 1, 0, 1.0), 0.0);
    }
}
