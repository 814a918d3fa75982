//! Electron-impact single ionization of a whole ion: the Lotz formula ([`super::lotz`],
//! formula, sources and accuracy there) summed over the ion's occupied subshells, each with
//! its occupancy and its binding energy in that ion ([`crate::atoms::binding`]: exact for the
//! subshell that the step q → q+1 ionizes, interpolated for the others). Constants: Lotz's
//! fitted ones where held (H, He 1s), the simplified set elsewhere, or the user's, checked
//! once here (a > 0, 0 ≤ b ≤ 1, c ≥ 0). Valid for charges 0 … Z−1 (the bare ion cannot be
//! ionized); accuracy as the Lotz formula with these binding energies (±30–40 % for ions,
//! from memory).

use super::lotz::{
    lotz_cross_sections_cm2, lotz_fitted_constants, lotz_peak_energy_ev,
    lotz_rate_coefficient_cm3_s, LotzConstants, LotzShell,
};
use crate::atoms::{Element, Ion};
use crate::error::{Error, Result};

/// Lotz inputs of every occupied subshell of `ion`. With `constants = None` each subshell
/// takes Lotz's fitted constants where they are held, the simplified ones elsewhere.
pub fn ion_lotz_shells(ion: &Ion, constants: Option<LotzConstants>) -> Vec<LotzShell> {
    let z = ion.element.z();
    ion.subshells()
        .iter()
        .map(|s| LotzShell {
            binding_ev: s.binding_ev,
            occupancy: s.occupancy as f64,
            constants: constants
                .or_else(|| lotz_fitted_constants(z, ion.charge, s.subshell.n, s.subshell.l))
                .unwrap_or(LotzConstants::SIMPLIFIED),
        })
        .collect()
}

/// The ion of `charge` that can still be ionized (0 … Z−1).
pub fn ionizable_ion(element: &'static Element, charge: i64) -> Result<Ion> {
    element.check_charge(charge, element.z().saturating_sub(1))?;
    element.ion(charge)
}

/// Validate user Lotz constants: a > 0, 0 ≤ b ≤ 1, c ≥ 0.
pub fn check_constants(c: LotzConstants) -> Result<LotzConstants> {
    if !(c.a_cm2_ev2.is_finite() && c.a_cm2_ev2 > 0.0) {
        return Err(Error::invalid(
            "a",
            c.a_cm2_ev2,
            "Lotz a must be a finite number > 0 (cm² eV²)",
        ));
    }
    if !(c.b.is_finite() && (0.0..=1.0).contains(&c.b)) {
        return Err(Error::invalid("b", c.b, "Lotz b must lie in 0..=1"));
    }
    if !(c.c.is_finite() && c.c >= 0.0) {
        return Err(Error::invalid(
            "c",
            c.c,
            "Lotz c must be a finite number >= 0",
        ));
    }
    Ok(c)
}

/// Lotz single-ionization cross section (cm²) of ion `charge` of `element` at each energy.
pub fn ionization_cross_sections_cm2(
    element: &'static Element,
    charge: i64,
    energies_ev: &[f64],
    constants: Option<LotzConstants>,
) -> Result<Vec<f64>> {
    let constants = constants.map(check_constants).transpose()?;
    let ion = ionizable_ion(element, charge)?;
    lotz_cross_sections_cm2(&ion_lotz_shells(&ion, constants), energies_ev)
}

/// Maxwellian rate coefficient (cm³ s⁻¹) of ion `charge` at each electron temperature.
pub fn ionization_rate_coefficients_cm3_s(
    element: &'static Element,
    charge: i64,
    temperatures_ev: &[f64],
    constants: Option<LotzConstants>,
) -> Result<Vec<f64>> {
    let constants = constants.map(check_constants).transpose()?;
    let shells = ion_lotz_shells(&ionizable_ion(element, charge)?, constants);
    temperatures_ev
        .iter()
        .map(|t| lotz_rate_coefficient_cm3_s(&shells, *t))
        .collect()
}

/// Electron energy (eV) at which the step charge → charge+1 has its largest cross section.
pub fn peak_energy_ev(
    element: &'static Element,
    charge: i64,
    constants: Option<LotzConstants>,
) -> Result<f64> {
    let constants = constants.map(check_constants).transpose()?;
    Ok(lotz_peak_energy_ev(&ion_lotz_shells(
        &ionizable_ion(element, charge)?,
        constants,
    )))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::atoms::element;

    #[test]
    fn bare_ion_cannot_be_ionized() {
        let ar = element("Ar").unwrap();
        assert!(matches!(
            ionization_cross_sections_cm2(ar, 18, &[1e4], None),
            Err(Error::ChargeOutOfRange { .. })
        ));
    }

    #[test]
    fn hydrogen_like_argon_by_hand() {
        // Simplified Lotz, one 1s electron bound by IE = 4426.2 eV (NIST ASD), E = 10 keV:
        // σ = 4.5e-14 · ln(10000/4426.2) / (10000 · 4426.2) = 4.5e-14 · 0.81502 / 4.4262e7 = 8.286e-22 cm².
        let ar = element("Ar").unwrap();
        let s = ionization_cross_sections_cm2(ar, 17, &[1e4], None).unwrap()[0];
        let ie = ar.ionization_energies_ev()[17];
        let hand = 4.5e-14 * (1e4 / ie).ln() / (1e4 * ie);
        assert!((s / hand - 1.0).abs() < 1e-12);
        assert!((s - 8.286e-22).abs() < 0.002e-22, "{s}");
    }

    #[test]
    fn user_constants_are_checked() {
        let ar = element("Ar").unwrap();
        let bad = LotzConstants {
            a_cm2_ev2: 4.5e-14,
            b: 2.0,
            c: 0.0,
        };
        assert!(ionization_cross_sections_cm2(ar, 1, &[100.0], Some(bad)).is_err());
    }
}
