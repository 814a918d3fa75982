//! Ion masses: m_ion = m_atom − q·m_e + B_q/c² with B_q = Σ_{j<q} IE_j the sum of the first
//! q ionization energies: the energy spent removing the electrons is given back as mass.
//!
//! Atomic masses from AME2020 (M. Wang et al., Chin. Phys. C 45, 030003 (2021)), ionization
//! energies from NIST ASD, m_e and u from CODATA 2018 (B_q in u is B_q[eV]/931494102.42).
//! m/q in u per elementary charge; A/q with A the mass number. Valid for every tabulated
//! isotope and charge 0…Z; accurate to the mass tables (the binding term, up to 8.2×10⁻⁴ u
//! for bare uranium, is exact given the tabulated IEs). Checked against periodictable's
//! masses, scipy.constants and mendeleev's IEs in `tests/python/test_spectrum.py`.

use crate::atoms::{element_by_z, Isotope};
use crate::constants::{ATOMIC_MASS_UNIT_EV, ELECTRON_MASS_U};
use crate::error::{Error, Result};

/// B_q in eV: the sum of the ionization energies of the steps 0 → 1 … q−1 → q of element `z`.
pub fn binding_energy_ev(z: u32, charge: i64) -> Result<f64> {
    let el = element_by_z(z as i64)?;
    el.check_charge(charge, el.z())?;
    let q = charge as usize;
    let ies = el.ionization_energies_ev();
    ies.get(..q)
        .map(|s| s.iter().sum())
        .ok_or_else(|| Error::NoData {
            what: format!("binding energy of {}{}+", el.symbol(), q),
            why: format!(
                "ionization energies of {} are tabulated up to charge {} only",
                el.symbol(),
                ies.len()
            ),
        })
}

/// B_q/c² in u.
pub fn binding_mass_u(z: u32, charge: i64) -> Result<f64> {
    Ok(binding_energy_ev(z, charge)? / ATOMIC_MASS_UNIT_EV)
}

/// Mass of the ion of charge `charge` (0 = the neutral atom) of `isotope`, in u.
pub fn ion_mass_u(isotope: &Isotope, charge: i64) -> Result<f64> {
    let binding = binding_mass_u(isotope.z, charge)?;
    Ok(isotope.mass_u - charge as f64 * ELECTRON_MASS_U + binding)
}

/// m/q in u/e of the ion of charge `charge` ≥ 1.
pub fn mass_over_charge(isotope: &Isotope, charge: i64) -> Result<f64> {
    if charge == 0 {
        return Err(Error::invalid(
            "charge",
            0,
            "m/q needs a charge of 1 or more",
        ));
    }
    Ok(ion_mass_u(isotope, charge)? / charge as f64)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::atoms::element;

    fn iso(symbol: &str, a: u32) -> &'static Isotope {
        element(symbol).unwrap().isotope(a).unwrap()
    }

    #[test]
    fn the_neutral_atom_keeps_its_atomic_mass() {
        let c12 = iso("C", 12);
        assert_eq!(ion_mass_u(c12, 0).unwrap(), 12.0);
    }

    #[test]
    fn a_bare_ion_weighs_the_atom_minus_its_electrons_plus_their_total_binding() {
        let c12 = iso("C", 12);
        let total_ev: f64 = element("C").unwrap().ionization_energies_ev().iter().sum();
        let expected = 12.0 - 6.0 * ELECTRON_MASS_U + total_ev / ATOMIC_MASS_UNIT_EV;
        assert!((ion_mass_u(c12, 6).unwrap() - expected).abs() < 1e-14);
    }

    #[test]
    fn ionizing_lowers_the_mass_by_less_than_an_electron_mass() {
        let kr = iso("Kr", 84);
        for q in 1..=36 {
            let step = ion_mass_u(kr, q - 1).unwrap() - ion_mass_u(kr, q).unwrap();
            assert!(step > 0.0 && step < ELECTRON_MASS_U, "q {q}: {step}");
        }
    }

    #[test]
    fn charges_outside_zero_to_z_are_refused() {
        let kr = iso("Kr", 84);
        assert!(matches!(
            ion_mass_u(kr, 37),
            Err(Error::ChargeOutOfRange { .. })
        ));
        assert!(matches!(
            ion_mass_u(kr, -1),
            Err(Error::ChargeOutOfRange { .. })
        ));
        assert!(matches!(
            mass_over_charge(kr, 0),
            Err(Error::InvalidParameter { .. })
        ));
        assert!(
            (mass_over_charge(kr, 2).unwrap() - ion_mass_u(kr, 2).unwrap() / 2.0).abs() < 1e-15
        );
    }
}
