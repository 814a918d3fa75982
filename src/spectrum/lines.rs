//! Line lists: every (isotope, charge) of the ions in a source with its m/q, A/q and relative
//! intensity, sorted along the m/q axis. Molecules ("CO", "H2O") give one line per
//! isotopologue and charge, with the isotopologue's share of the natural pattern
//! ([`crate::atoms::Molecule::isotopologues`]); their ion mass is Σ atomic masses − q·mₑ.

use std::cmp::Ordering;
use std::collections::HashMap;

use super::masses::ion_mass_u;
use crate::atoms::{element_by_z, isotopologue_ion_mass_u, Isotope, Isotopologue, Molecule};
use crate::atoms::{isotope_label, parse_substance, Substance};
use crate::error::{require_non_negative, Error, Result};

/// One species of a source: what it is, how much of it there is, and its charge-state
/// fractions (index = charge 0 … Z; the neutral never makes a line).
#[derive(Clone, Debug, PartialEq)]
pub struct SpeciesInput {
    /// Element ("Kr", natural isotopic mix), isotope ("84Kr", "Kr-84") or molecule ("CO",
    /// "13CO").
    pub spec: String,
    /// Relative amount (any unit shared by all species), ≥ 0.
    pub amount: f64,
    /// Charge-state fractions, length Z + 1 (for a molecule: its number of electrons + 1),
    /// each ≥ 0.
    pub fractions: Vec<f64>,
    /// True for residual-gas species (only used to mark their lines).
    pub residual: bool,
}

/// One ion on the m/q axis: an atomic ion (z ≥ 1) or a molecular ion (z = 0, `formula` set).
#[derive(Clone, Debug, PartialEq)]
pub struct Line {
    /// Atomic number; 0 for a molecular ion.
    pub z: u32,
    /// Mass number (for a molecule the sum over its atoms: the nominal mass).
    pub mass_number: u32,
    /// The isotopologue of a molecular ion, as the parser reads it back ("(12C)(16O)").
    pub formula: Option<String>,
    pub charge: u32,
    /// Ion mass (u).
    pub mass_u: f64,
    /// m/q (u/e).
    pub m_over_q: f64,
    /// A/q (mass number over charge).
    pub a_over_q: f64,
    /// amount × isotopic share × charge-state fraction.
    pub intensity: f64,
    /// True when every contribution to this line came from residual gas.
    pub residual: bool,
}

impl Line {
    /// The line of isotope (z, mass_number) at `charge` ≥ 1 with `intensity` ≥ 0.
    pub fn new(
        z: i64,
        mass_number: i64,
        charge: i64,
        intensity: f64,
        residual: bool,
    ) -> Result<Self> {
        let el = element_by_z(z)?;
        let a = u32::try_from(mass_number).map_err(|_| {
            Error::invalid("mass_number", mass_number, "must be a known mass number")
        })?;
        let iso = el.isotope(a)?;
        Line::of(iso, charge, intensity, residual)
    }

    fn of(iso: &Isotope, charge: i64, intensity: f64, residual: bool) -> Result<Self> {
        require_non_negative("intensity", intensity)?;
        if charge == 0 {
            return Err(Error::invalid(
                "charge",
                0,
                "a line needs a charge of 1 or more",
            ));
        }
        let mass_u = ion_mass_u(iso, charge)?;
        let q = charge as f64;
        Ok(Line {
            z: iso.z,
            mass_number: iso.mass_number,
            formula: None,
            charge: charge as u32,
            mass_u,
            m_over_q: mass_u / q,
            a_over_q: iso.mass_number as f64 / q,
            intensity,
            residual,
        })
    }

    /// The line of one isotopologue of a molecule at `charge` (1 … electrons).
    pub fn molecular(
        iso: &Isotopologue,
        charge: i64,
        intensity: f64,
        residual: bool,
    ) -> Result<Self> {
        require_non_negative("intensity", intensity)?;
        let electrons = iso.electrons();
        if charge < 1 || charge > i64::from(electrons) {
            return Err(Error::invalid(
                "charge",
                charge,
                &format!(
                    "a line of {} needs a charge of 1..={electrons}",
                    iso.label()
                ),
            ));
        }
        let q = charge as u32;
        let mass_u = isotopologue_ion_mass_u(iso, q);
        let a = iso.mass_number();
        Ok(Line {
            z: 0,
            mass_number: a,
            formula: Some(iso.label()),
            charge: q,
            mass_u,
            m_over_q: mass_u / q as f64,
            a_over_q: a as f64 / q as f64,
            intensity,
            residual,
        })
    }

    /// A line from its identifying columns: (z, mass number) for an atomic ion, or z = 0 and
    /// the isotopologue label ("(12C)(16O)", one isotope per atom) for a molecular ion.
    pub fn from_columns(
        z: i64,
        mass_number: i64,
        label: &str,
        charge: i64,
        intensity: f64,
        residual: bool,
    ) -> Result<Self> {
        if z != 0 {
            return Line::new(z, mass_number, charge, intensity, residual);
        }
        let pattern = Molecule::parse(label)?.isotopologues()?;
        match pattern.as_slice() {
            [one] if i64::from(one.mass_number()) == mass_number => {
                Line::molecular(one, charge, intensity, residual)
            }
            _ => Err(Error::invalid(
                "lines",
                format!("{label:?} with mass number {mass_number}"),
                "a molecular line (z = 0) needs one isotopologue with every isotope named, e.g. \"(12C)(16O)\", and its mass number",
            )),
        }
    }

    /// "84Kr", or the isotopologue of a molecular ion ("(12C)(16O)").
    pub fn isotope_label(&self) -> String {
        if let Some(f) = &self.formula {
            return f.clone();
        }
        let symbol = element_by_z(self.z as i64).map_or("?", |e| e.symbol());
        format!("{}{}", self.mass_number, symbol)
    }

    /// "84Kr26+"; for a molecular ion the isotopologue, a space and the charge:
    /// "(12C)(16O) 1+".
    pub fn label(&self) -> String {
        match &self.formula {
            Some(f) => format!("{f} {}+", self.charge),
            None => format!("{}{}+", self.isotope_label(), self.charge),
        }
    }

    pub(crate) fn is(&self, z: u32, mass_number: u32, charge: u32) -> bool {
        self.formula.is_none()
            && self.z == z
            && self.mass_number == mass_number
            && self.charge == charge
    }
}

/// Lines sorted by m/q; each (isotope, charge) appears once.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct LineList {
    lines: Vec<Line>,
}

impl LineList {
    /// Sort, and merge lines of the same isotope and charge (their intensities add). The
    /// total intensity must stay finite.
    pub fn new(lines: Vec<Line>) -> Result<Self> {
        let total: f64 = lines.iter().map(|l| l.intensity).sum();
        if !total.is_finite() {
            return Err(Error::invalid(
                "intensity",
                total,
                "the summed intensity of all lines must be finite (scale amounts and fractions down)",
            ));
        }
        let mut index: HashMap<(u32, u32, u32, Option<String>), usize> =
            HashMap::with_capacity(lines.len());
        let mut merged: Vec<Line> = Vec::with_capacity(lines.len());
        for line in lines {
            let key = (line.z, line.mass_number, line.charge, line.formula.clone());
            match index.get(&key).and_then(|&i| merged.get_mut(i)) {
                Some(m) => {
                    m.intensity += line.intensity;
                    m.residual &= line.residual;
                }
                None => {
                    index.insert(key, merged.len());
                    merged.push(line);
                }
            }
        }
        merged.sort_by(|a, b| {
            a.m_over_q
                .partial_cmp(&b.m_over_q)
                .unwrap_or(Ordering::Equal)
                .then(a.z.cmp(&b.z))
                .then(a.mass_number.cmp(&b.mass_number))
                .then(a.charge.cmp(&b.charge))
                .then(a.formula.cmp(&b.formula))
        });
        Ok(LineList { lines: merged })
    }

    pub fn lines(&self) -> &[Line] {
        &self.lines
    }

    pub fn len(&self) -> usize {
        self.lines.len()
    }

    pub fn is_empty(&self) -> bool {
        self.lines.is_empty()
    }

    /// The line of isotope (z, mass_number) at `charge`, if present.
    pub fn find(&self, z: u32, mass_number: u32, charge: u32) -> Option<&Line> {
        self.lines.iter().find(|l| l.is(z, mass_number, charge))
    }
}

/// The line list of a source: one line per isotope and charge ≥ 1 with a non-zero intensity
/// = amount × isotopic share (natural abundance, or 1 for a named isotope) × fraction.
pub fn aq_lines(species: &[SpeciesInput]) -> Result<LineList> {
    let mut lines = Vec::new();
    for s in species {
        require_non_negative(&format!("amount of {}", s.spec), s.amount)?;
        let parsed = match parse_substance(&s.spec)? {
            Substance::Atom(a) => a,
            Substance::Molecule(f) => {
                molecular_lines(s, &Molecule::new(f), &mut lines)?;
                continue;
            }
        };
        let el = parsed.element();
        check_fractions(s, el.z(), el.symbol())?;
        let isotopes = parsed.isotopes();
        if isotopes.is_empty() {
            let example = el
                .isotopes()
                .first()
                .map_or_else(String::new, isotope_label);
            return Err(Error::NoData {
                what: format!("natural isotopes of {}", el.symbol()),
                why: format!(
                    "{} has none; name an isotope, e.g. \"{example}\"",
                    el.symbol()
                ),
            });
        }
        for (iso, share) in isotopes {
            for (q, f) in s.fractions.iter().enumerate().skip(1) {
                let intensity = s.amount * share * f;
                if intensity > 0.0 {
                    lines.push(Line::of(iso, q as i64, intensity, s.residual)?);
                }
            }
        }
    }
    LineList::new(lines)
}

/// One fraction per charge 0..=`top`, each ≥ 0.
fn check_fractions(s: &SpeciesInput, top: u32, what: &str) -> Result<()> {
    let expected = top as usize + 1;
    if s.fractions.len() != expected {
        return Err(Error::invalid(
            &format!("fractions of {}", s.spec),
            format!("{} values", s.fractions.len()),
            &format!("give one fraction per charge 0..={top} of {what} ({expected} values)"),
        ));
    }
    for f in &s.fractions {
        require_non_negative(&format!("fractions of {}", s.spec), *f)?;
    }
    Ok(())
}

/// The lines of a molecule: each isotopologue at each charge with a non-zero fraction.
fn molecular_lines(s: &SpeciesInput, m: &Molecule, lines: &mut Vec<Line>) -> Result<()> {
    check_fractions(s, m.electrons(), &m.label())?;
    let charged: Vec<(usize, f64)> = s
        .fractions
        .iter()
        .enumerate()
        .skip(1)
        .filter(|(_, f)| **f > 0.0)
        .map(|(q, f)| (q, *f))
        .collect();
    if charged.is_empty() || s.amount == 0.0 {
        return Ok(());
    }
    for iso in m.isotopologues()? {
        for &(q, f) in &charged {
            let intensity = s.amount * iso.abundance * f;
            if intensity > 0.0 {
                lines.push(Line::molecular(&iso, q as i64, intensity, s.residual)?);
            }
        }
    }
    Ok(())
}

/// A line list from (Z, A, charge, intensity) tuples, for tests.
#[cfg(test)]
pub(crate) fn test_list(lines: &[(i64, i64, i64, f64)]) -> LineList {
    LineList::new(
        lines
            .iter()
            .map(|&(z, a, q, i)| Line::new(z, a, q, i, false).unwrap())
            .collect(),
    )
    .unwrap()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn input(spec: &str, amount: f64, fractions: Vec<f64>) -> SpeciesInput {
        SpeciesInput {
            spec: spec.into(),
            amount,
            fractions,
            residual: false,
        }
    }

    #[test]
    fn natural_mix_splits_by_abundance_and_skips_the_neutral() {
        // Neon: 20, 21, 22 occur naturally; only charges with a non-zero fraction make lines.
        let mut f = vec![0.0; 11];
        f[0] = 0.5;
        f[2] = 0.5;
        let list = aq_lines(&[input("Ne", 2.0, f)]).unwrap();
        assert_eq!(list.len(), 3);
        let total: f64 = list.lines().iter().map(|l| l.intensity).sum();
        assert!((total - 1.0).abs() < 1e-6, "{total}");
        assert!(list.lines().iter().all(|l| l.charge == 2));
        assert!(list
            .lines()
            .windows(2)
            .all(|w| w[0].m_over_q <= w[1].m_over_q));
    }

    #[test]
    fn the_same_ion_from_two_species_is_one_line() {
        let mut f = vec![0.0; 19];
        f[1] = 1.0;
        let mut residual = input("Ar", 1.0, f.clone());
        residual.residual = true;
        let list = aq_lines(&[input("40Ar", 1.0, f), residual]).unwrap();
        let ar40 = list.find(18, 40, 1).unwrap();
        assert!(ar40.intensity > 1.99 && ar40.intensity < 2.0);
        assert!(!ar40.residual);
        assert!(list.find(18, 36, 1).unwrap().residual);
        assert_eq!(ar40.label(), "40Ar1+");
    }

    #[test]
    fn molecules_and_atoms_share_one_axis() {
        let mut co = vec![0.0; 15];
        co[1] = 1.0;
        let mut n = vec![0.0; 8];
        n[1] = 1.0;
        let list = aq_lines(&[
            input("CO", 1.0, co.clone()),
            input("Co", 1.0, vec![0.0; 28]),
            input("N", 1.0, n),
        ])
        .unwrap();
        let main = list
            .lines()
            .iter()
            .find(|l| l.formula.as_deref() == Some("(12C)(16O)"))
            .unwrap();
        assert_eq!((main.z, main.mass_number, main.charge), (0, 28, 1));
        assert!(main.intensity > 0.98 && main.intensity < 0.99);
        assert_eq!(main.label(), "(12C)(16O) 1+");
        // 12C16O+ = 12 + 15.994914619 − mₑ (AME2020 via the isotope table).
        assert!((main.mass_u - (12.0 + 15.994_914_619_26 - 5.485_799_090_65e-4)).abs() < 1e-9);
        let total: f64 = list
            .lines()
            .iter()
            .filter(|l| l.z == 0)
            .map(|l| l.intensity)
            .sum();
        assert!((total - 1.0).abs() < 1e-4, "{total}");
        assert!(list.find(7, 14, 1).is_some());
        // A molecular line rebuilt from its columns is the same line.
        let back = Line::from_columns(0, 28, "(12C)(16O)", 1, main.intensity, false).unwrap();
        assert_eq!(&back, main);
        assert!(Line::from_columns(0, 29, "(12C)(16O)", 1, 1.0, false).is_err());
        assert!(Line::from_columns(0, 28, "CO", 1, 1.0, false).is_err());
        assert!(Line::from_columns(0, 28, "(12C)(16O)", 15, 1.0, false).is_err());
        assert!(aq_lines(&[input("CO", 1.0, vec![0.0; 28])]).is_err());
    }

    #[test]
    fn bad_inputs_are_errors() {
        assert!(aq_lines(&[input("Ne", 1.0, vec![0.0; 10])]).is_err());
        assert!(aq_lines(&[input("Ne", -1.0, vec![0.0; 11])]).is_err());
        let mut f = vec![0.0; 11];
        f[3] = f64::NAN;
        assert!(aq_lines(&[input("Ne", 1.0, f)]).is_err());
        assert!(aq_lines(&[input("Tc", 1.0, vec![0.0; 44])]).is_err());
        assert!(aq_lines(&[input("99Tc", 1.0, vec![0.0; 44])])
            .unwrap()
            .is_empty());
        // Each line finite, their sum not.
        let one = vec![0.0, 1.0];
        let err =
            aq_lines(&[input("1H", 1.5e308, one.clone()), input("H", 1.5e308, one)]).unwrap_err();
        assert!(err.to_string().contains("summed intensity"), "{err}");
        assert!(Line::new(36, 84, 0, 1.0, false).is_err());
        assert!(Line::new(36, -84, 1, 1.0, false).is_err());
        assert!(Line::new(36, 84, 37, 1.0, false).is_err());
    }
}
