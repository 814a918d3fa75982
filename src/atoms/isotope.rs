//! Isotopes: atomic masses (AME2020) and natural abundances (IUPAC), via mendeleev, with
//! the half-lives and decay channels of [`super::decay`].

use std::collections::HashMap;

use super::decay::{read_decays, Decay};
use super::element::Element;
use super::table::{self, parse_f64, parse_u32};
use crate::error::Result;

#[derive(Clone, Debug, PartialEq)]
pub struct Isotope {
    pub z: u32,
    pub mass_number: u32,
    /// Atomic (neutral-atom) mass in u.
    pub mass_u: f64,
    /// Natural abundance as a mole fraction; None when it does not occur naturally.
    pub abundance: Option<f64>,
    /// Half-life and decay channels; None for a stable nuclide.
    pub decay: Option<Decay>,
}

impl Isotope {
    /// Half-life in s; None for a stable nuclide or where the data give none.
    pub fn half_life_s(&self) -> Option<f64> {
        self.decay.as_ref().and_then(|d| d.half_life_s)
    }
}

pub(crate) fn read_isotopes(elements: &mut [Element]) -> Result<()> {
    const NAME: &str = "isotopes.csv";
    let mut decays: HashMap<(u32, u32), Decay> = read_decays()?
        .into_iter()
        .map(|(z, a, d)| ((z, a), d))
        .collect();
    for row in table::rows(
        NAME,
        table::ISOTOPES_CSV,
        &["z", "mass_number", "mass_u", "abundance"],
    )? {
        let z = parse_u32(NAME, row[0])?;
        let abundance = parse_f64(NAME, row[3])?;
        let mass_number = parse_u32(NAME, row[1])?;
        let iso = Isotope {
            z,
            mass_number,
            decay: decays.remove(&(z, mass_number)),
            mass_u: parse_f64(NAME, row[2])?,
            abundance: (!abundance.is_nan()).then_some(abundance),
        };
        if let Some(e) = elements.get_mut((z as usize).wrapping_sub(1)) {
            e.push_isotope(iso);
        }
    }
    Ok(())
}
