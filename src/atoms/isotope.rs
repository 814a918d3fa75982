//! Isotopes: atomic masses (AME2020) and natural abundances (IUPAC), via mendeleev.

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
}

pub(crate) fn read_isotopes(elements: &mut [Element]) -> Result<()> {
    const NAME: &str = "isotopes.csv";
    for row in table::rows(
        NAME,
        table::ISOTOPES_CSV,
        &["z", "mass_number", "mass_u", "abundance"],
    )? {
        let z = parse_u32(NAME, row[0])?;
        let abundance = parse_f64(NAME, row[3])?;
        let iso = Isotope {
            z,
            mass_number: parse_u32(NAME, row[1])?,
            mass_u: parse_f64(NAME, row[2])?,
            abundance: (!abundance.is_nan()).then_some(abundance),
        };
        if let Some(e) = elements.get_mut((z as usize).wrapping_sub(1)) {
            e.push_isotope(iso);
        }
    }
    Ok(())
}
