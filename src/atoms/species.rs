//! Naming isotopes: "84Kr", "Kr84", "Kr-84", "krypton-84", or an element alone ("Kr",
//! "krypton", "36") for its natural isotopic mix.

use super::{element, element_by_z, Element, Isotope};
use crate::error::{Error, Result};

/// An element in its natural isotopic mix, or one isotope of it.
#[derive(Clone, Copy, Debug)]
pub enum Species {
    Natural(&'static Element),
    Isotope(&'static Element, &'static Isotope),
}

impl Species {
    pub fn element(&self) -> &'static Element {
        match self {
            Species::Natural(e) | Species::Isotope(e, _) => e,
        }
    }

    /// The isotopes this species stands for with the share each gets: the natural abundances
    /// for an element, 1 for a single isotope (whether or not it occurs naturally).
    pub fn isotopes(&self) -> Vec<(&'static Isotope, f64)> {
        match self {
            Species::Isotope(_, iso) => vec![(*iso, 1.0)],
            Species::Natural(e) => e
                .natural_isotopes()
                .into_iter()
                .filter_map(|i| i.abundance.map(|a| (i, a)))
                .collect(),
        }
    }
}

/// Label of an isotope such as "84Kr".
pub fn isotope_label(isotope: &Isotope) -> String {
    let symbol = element_by_z(isotope.z as i64).map_or("?", |e| e.symbol());
    format!("{}{}", isotope.mass_number, symbol)
}

/// Split an element or isotope name ("Xe", "xenon", "54", "129Xe", "Xe129", "Xe-129",
/// "xenon-129") into the element and the mass number if one was written. The mass number is
/// not checked against the isotope table: [`parse_species`] does that.
pub fn split_species(spec: &str) -> Result<(&'static Element, Option<u32>)> {
    let s = spec.trim();
    let bad = || {
        Error::invalid(
            "isotope",
            format!("{:?}", short(spec)),
            "give an isotope as \"84Kr\", \"Kr84\" or \"Kr-84\", or an element (\"Kr\", \"krypton\", 36) for its natural mix",
        )
    };
    if s.is_empty() {
        return Err(bad());
    }
    if s.chars().all(|c| c.is_ascii_digit()) {
        return Ok((element(s)?, None));
    }
    let lead: String = s.chars().take_while(char::is_ascii_digit).collect();
    let rest = &s[lead.len()..];
    let letters: String = rest.chars().take_while(char::is_ascii_alphabetic).collect();
    let after = &rest[letters.len()..];
    let tail = after.strip_prefix('-').unwrap_or(after);
    // A hyphen belongs between the symbol and a trailing mass number only.
    if letters.is_empty()
        || !tail.chars().all(|c| c.is_ascii_digit())
        || (after.starts_with('-') && tail.is_empty())
    {
        return Err(bad());
    }
    let mass_number = match (lead.is_empty(), tail.is_empty()) {
        (true, true) => None,
        (false, true) => Some(lead.as_str()),
        (true, false) => Some(tail),
        (false, false) => return Err(bad()),
    };
    let el = element(&letters).map_err(|_| Error::UnknownElement {
        given: short(spec),
        max_z: 118,
    })?;
    let mass_number = mass_number
        .map(|a| a.parse::<u32>().map_err(|_| bad()))
        .transpose()?;
    Ok((el, mass_number))
}

/// Read an isotope or element specification (see [`split_species`]); a mass number must
/// name an isotope in the table.
pub fn parse_species(spec: &str) -> Result<Species> {
    match split_species(spec)? {
        (el, None) => Ok(Species::Natural(el)),
        (el, Some(a)) => Ok(Species::Isotope(el, el.isotope(a)?)),
    }
}

/// A user-given name as quoted in an error message: at most 40 characters, so a huge value
/// does not flood the message.
fn short(spec: &str) -> String {
    let mut out: String = spec.chars().take(40).collect();
    if spec.chars().count() > 40 {
        out.push('…');
    }
    out
}

/// One isotope from a specification; an element alone is accepted when it has a single
/// naturally occurring isotope ("Au" → 197Au).
pub fn resolve_isotope(spec: &str) -> Result<&'static Isotope> {
    match parse_species(spec)? {
        Species::Isotope(_, iso) => Ok(iso),
        Species::Natural(e) => {
            let natural = e.natural_isotopes();
            match natural.as_slice() {
                [only] => Ok(*only),
                _ => {
                    let names: Vec<String> = natural.iter().map(|i| isotope_label(i)).collect();
                    Err(Error::invalid(
                        "isotope",
                        format!("{spec:?}"),
                        &if names.is_empty() {
                            format!(
                                "{} has no natural isotope; give a mass number, e.g. \"{}{}\"",
                                e.symbol(),
                                e.isotopes().first().map_or(0, |i| i.mass_number),
                                e.symbol()
                            )
                        } else {
                            format!(
                                "{} has several isotopes, name one of {}",
                                e.symbol(),
                                names.join(", ")
                            )
                        },
                    ))
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn iso(spec: &str) -> (u32, u32) {
        match parse_species(spec).unwrap() {
            Species::Isotope(_, i) => (i.z, i.mass_number),
            Species::Natural(e) => (e.z(), 0),
        }
    }

    #[test]
    fn every_isotope_spelling_is_read() {
        for spec in ["84Kr", "Kr84", "Kr-84", "kr-84", " 84kr ", "krypton-84"] {
            assert_eq!(iso(spec), (36, 84), "{spec}");
        }
        assert_eq!(iso("Kr"), (36, 0));
        assert_eq!(iso("krypton"), (36, 0));
        assert_eq!(iso("36"), (36, 0));
    }

    #[test]
    fn malformed_specs_are_invalid_parameters() {
        for spec in [
            "", "84Kr86", "Kr-", "-84Kr", "Kr 84", "K r", "84-Kr", "Kr84x",
        ] {
            let err = parse_species(spec);
            assert!(err.is_err(), "{spec:?} accepted");
        }
        assert!(matches!(
            parse_species("Xx12"),
            Err(Error::UnknownElement { .. })
        ));
        assert!(matches!(parse_species("Kr-300"), Err(Error::NoData { .. })));
    }

    #[test]
    fn a_single_isotope_is_resolved_from_a_monoisotopic_element_only() {
        assert_eq!(resolve_isotope("Au").unwrap().mass_number, 197);
        assert!(resolve_isotope("Kr").is_err());
        assert!(resolve_isotope("Tc").is_err());
        assert_eq!(isotope_label(resolve_isotope("Kr-84").unwrap()), "84Kr");
    }
}
