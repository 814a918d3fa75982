//! Reading the embedded CSV tables of `data/` (provenance lines start with `#`).

use crate::error::{Error, Result};

/// The rows of an embedded CSV file as string fields, header checked, comments skipped.
pub(crate) fn rows<'a>(name: &str, text: &'a str, columns: &[&str]) -> Result<Vec<Vec<&'a str>>> {
    let mut lines = text
        .lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty());
    let header: Vec<&str> = lines.next().unwrap_or("").split(',').collect();
    if header != columns {
        return Err(corrupt(
            name,
            format!("header {header:?}, expected {columns:?}"),
        ));
    }
    lines
        .enumerate()
        .map(|(i, line)| {
            let fields: Vec<&str> = line.split(',').collect();
            if fields.len() == columns.len() {
                Ok(fields)
            } else {
                Err(corrupt(
                    name,
                    format!("data row {} has {} fields", i + 1, fields.len()),
                ))
            }
        })
        .collect()
}

pub(crate) fn corrupt(name: &str, why: String) -> Error {
    Error::NoData {
        what: format!("embedded table {name}"),
        why,
    }
}

pub(crate) fn parse_f64(name: &str, field: &str) -> Result<f64> {
    if field.is_empty() {
        return Ok(f64::NAN);
    }
    field
        .parse()
        .map_err(|_| corrupt(name, format!("{field:?} is not a number")))
}

pub(crate) fn parse_u32(name: &str, field: &str) -> Result<u32> {
    field
        .parse()
        .map_err(|_| corrupt(name, format!("{field:?} is not a whole number")))
}

pub(crate) const ELEMENTS_CSV: &str = include_str!("../../data/elements.csv");
pub(crate) const IONIZATION_CSV: &str = include_str!("../../data/ionization_energies.csv");
pub(crate) const XRAY_LEVELS_CSV: &str = include_str!("../../data/xray_levels.csv");
pub(crate) const COSTER_KRONIG_CSV: &str = include_str!("../../data/coster_kronig.csv");
pub(crate) const ISOTOPES_CSV: &str = include_str!("../../data/isotopes.csv");
pub(crate) const DECAYS_CSV: &str = include_str!("../../data/decays.csv");
pub(crate) const PHOTOABSORPTION_CSV: &str = include_str!("../../data/photoabsorption.csv");
pub(crate) const MOLECULES_CSV: &str = include_str!("../../data/molecules.csv");
pub(crate) const FRAGMENTS_CSV: &str = include_str!("../../data/fragments.csv");
