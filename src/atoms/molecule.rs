//! Molecules: composition (from the one species parser), masses and isotopologue patterns
//! from the isotope table, and the bundled data of common residual and process gases.
//!
//! * Mass of an isotopologue: Σ atomic masses (AME2020 via mendeleev, `data/isotopes.csv`).
//!   The ion mass is that minus q·mₑ; the binding energy of the removed electrons
//!   (≈ 15 eV per electron, 1.6×10⁻⁸ u) is neglected.
//! * Isotopologue pattern: for each element with n atoms in its natural mix, the multinomial
//!   n!/∏kᵢ! ∏pᵢ^kᵢ over its natural isotopes (IUPAC abundances pᵢ), multiplied across the
//!   elements; an atom written as one isotope ("13CO", "(15N)2", "D2O") takes only that
//!   isotope. Terms below 10⁻¹⁵ are dropped. Checked against `molmass` (PyPI) in
//!   `tests/python/test_molecules.py`: masses agree to 1e-6 u; fractions agree to the
//!   difference of the two packages' abundance tables (measured below 2×10⁻⁴ absolute for
//!   the bundled gases).
//! * First ionization energies of the bundled molecules (`data/molecules.csv`): NIST
//!   Chemistry WebBook (S. G. Lias, "Gas phase ion energetics data"); CO, H2O, NH3 and CH4
//!   were checked against the WebBook / CCCBDB pages on 2026-12-02, the others are from
//!   memory and say so in the table. No second ionization energy could be checked; none is
//!   given.
//! * Fragmentation patterns at 70 eV (`data/fragments.csv`): NIST Chemistry WebBook EI mass
//!   spectra, every value from memory with its uncertainty (20–60 % relative) in the table.

use std::collections::BTreeMap;
use std::sync::OnceLock;

use super::species::{parse_substance, read_exact, Formula, Substance};
use super::table::{self, parse_f64, parse_u32, FRAGMENTS_CSV, MOLECULES_CSV};
use super::{element_by_z, Isotope};
use crate::error::{Error, Result};

/// A row of `data/molecules.csv`.
#[derive(Clone, Debug)]
pub struct MoleculeData {
    pub formula: Formula,
    pub name: String,
    /// First (and where known second) ionization energy, eV.
    pub ionization_energies_ev: Vec<f64>,
    pub uncertainties_ev: Vec<f64>,
    /// Where each ionization energy comes from.
    pub sources: Vec<String>,
}

/// One ion of a bundled fragmentation pattern (a row of `data/fragments.csv`).
#[derive(Clone, Debug, PartialEq)]
pub struct PatternEntry {
    /// The ion's species string ("CO", "O", "CH3").
    pub ion: String,
    pub charge: u32,
    /// Relative intensity, base peak = 100.
    pub relative_intensity: f64,
    /// Relative uncertainty of the intensity (1 = 100 %).
    pub relative_uncertainty: f64,
    pub source: String,
}

struct Tables {
    molecules: Vec<MoleculeData>,
    patterns: Vec<(BTreeMap<u32, u32>, Vec<PatternEntry>)>,
}

fn formula_of(name: &str, text: &str) -> Result<Formula> {
    match read_exact(text) {
        Some(Ok(Substance::Molecule(f))) => Ok(f),
        _ => Err(table::corrupt(
            name,
            format!("{text:?} is not a molecular formula"),
        )),
    }
}

fn read_tables() -> Result<Tables> {
    const M: &str = "molecules.csv";
    let mut molecules = Vec::new();
    for row in table::rows(
        M,
        MOLECULES_CSV,
        &[
            "formula",
            "name",
            "ie1_ev",
            "ie1_uncertainty_ev",
            "ie1_source",
            "ie2_ev",
            "ie2_source",
        ],
    )? {
        let mut ies = Vec::new();
        let mut unc = Vec::new();
        let mut sources = Vec::new();
        for (value, u, source) in [(row[2], row[3], row[4]), (row[5], "", row[6])] {
            let v = parse_f64(M, value)?;
            if v.is_finite() {
                ies.push(v);
                unc.push(parse_f64(M, u)?);
                sources.push(source.to_string());
            }
        }
        molecules.push(MoleculeData {
            formula: formula_of(M, row[0])?,
            name: row[1].to_string(),
            ionization_energies_ev: ies,
            uncertainties_ev: unc,
            sources,
        });
    }
    const F: &str = "fragments.csv";
    let mut patterns: Vec<(BTreeMap<u32, u32>, Vec<PatternEntry>)> = Vec::new();
    for row in table::rows(
        F,
        FRAGMENTS_CSV,
        &[
            "molecule",
            "ion",
            "charge",
            "relative_intensity",
            "relative_uncertainty",
            "source",
        ],
    )? {
        let key = formula_of(F, row[0])?.composition();
        let entry = PatternEntry {
            ion: row[1].to_string(),
            charge: parse_u32(F, row[2])?,
            relative_intensity: parse_f64(F, row[3])?,
            relative_uncertainty: parse_f64(F, row[4])?,
            source: row[5].to_string(),
        };
        match patterns.iter_mut().find(|(k, _)| *k == key) {
            Some((_, v)) => v.push(entry),
            None => patterns.push((key, vec![entry])),
        }
    }
    Ok(Tables {
        molecules,
        patterns,
    })
}

fn tables() -> Result<&'static Tables> {
    static TABLES: OnceLock<Result<Tables>> = OnceLock::new();
    TABLES
        .get_or_init(read_tables)
        .as_ref()
        .map_err(Clone::clone)
}

/// Every bundled molecule.
pub fn bundled_molecules() -> Result<&'static [MoleculeData]> {
    Ok(&tables()?.molecules)
}

/// The bundled row of a formula (same elements and counts, isotopes ignored).
pub fn bundled(formula: &Formula) -> Option<&'static MoleculeData> {
    let key = formula.composition();
    tables()
        .ok()?
        .molecules
        .iter()
        .find(|m| m.formula.composition() == key)
}

/// True when the formula is one of the bundled molecules.
pub fn is_bundled(formula: &Formula) -> bool {
    bundled(formula).is_some()
}

/// The bundled name ("carbon monoxide"), if any.
pub fn bundled_name(formula: &Formula) -> Option<&'static str> {
    bundled(formula).map(|m| m.name.as_str())
}

/// The bundled 70 eV fragmentation pattern of a formula (isotopes ignored), if any.
pub fn bundled_pattern(formula: &Formula) -> Option<&'static [PatternEntry]> {
    let key = formula.composition();
    tables()
        .ok()?
        .patterns
        .iter()
        .find(|(k, _)| *k == key)
        .map(|(_, v)| v.as_slice())
}

/// One isotopic composition of a molecule with its mass and natural share.
#[derive(Clone, Debug, PartialEq)]
pub struct Isotopologue {
    /// (isotope, atoms of it), by Z then mass number.
    pub atoms: Vec<(&'static Isotope, u32)>,
    /// Neutral mass (u).
    pub mass_u: f64,
    /// Share among the molecule's isotopologues (the multinomial product).
    pub abundance: f64,
}

impl Isotopologue {
    /// Sum of the mass numbers.
    pub fn mass_number(&self) -> u32 {
        self.atoms.iter().map(|(i, n)| i.mass_number * n).sum()
    }

    /// Number of electrons of the neutral molecule.
    pub fn electrons(&self) -> u32 {
        self.atoms.iter().map(|(i, n)| i.z * n).sum()
    }

    /// "(12C)(16O)2": every isotope in parentheses, so the species parser reads it back.
    pub fn label(&self) -> String {
        self.atoms
            .iter()
            .map(|(iso, n)| {
                let symbol = element_by_z(iso.z as i64).map_or("?", |e| e.symbol());
                if *n > 1 {
                    format!("({}{symbol}){n}", iso.mass_number)
                } else {
                    format!("({}{symbol})", iso.mass_number)
                }
            })
            .collect()
    }
}

/// Drop terms below this share while building patterns.
const PATTERN_FLOOR: f64 = 1e-15;

/// A molecule: its formula and, for the bundled gases, its name and ionization energies.
#[derive(Clone, Debug)]
pub struct Molecule {
    formula: Formula,
    data: Option<&'static MoleculeData>,
}

impl Molecule {
    pub fn new(formula: Formula) -> Self {
        let data = bundled(&formula);
        Molecule { formula, data }
    }

    /// A molecule from its formula string; an element or isotope is refused.
    pub fn parse(spec: &str) -> Result<Self> {
        match parse_substance(spec)? {
            Substance::Molecule(f) => Ok(Molecule::new(f)),
            Substance::Atom(s) => Err(Error::invalid(
                "molecule",
                format!("{spec:?}"),
                &format!(
                    "{spec:?} names {} (an element or isotope); give a chemical formula such as \"CO2\" or \"H2O\" (capital letters start each symbol)",
                    s.element().name()
                ),
            )),
        }
    }

    pub fn formula(&self) -> &Formula {
        &self.formula
    }

    pub fn label(&self) -> String {
        self.formula.label()
    }

    pub fn name(&self) -> Option<&'static str> {
        self.data.map(|d| d.name.as_str())
    }

    pub fn electrons(&self) -> u32 {
        self.formula.electrons()
    }

    /// First (and where known second) ionization energy (eV); empty when not bundled.
    pub fn ionization_energies_ev(&self) -> &'static [f64] {
        self.data
            .map_or(&[], |d| d.ionization_energies_ev.as_slice())
    }

    pub fn ionization_uncertainties_ev(&self) -> &'static [f64] {
        self.data.map_or(&[], |d| d.uncertainties_ev.as_slice())
    }

    pub fn ionization_energy_sources(&self) -> &'static [String] {
        self.data.map_or(&[], |d| d.sources.as_slice())
    }

    /// The bundled 70 eV fragmentation pattern, if any.
    pub fn pattern(&self) -> Option<&'static [PatternEntry]> {
        bundled_pattern(&self.formula)
    }

    /// Every isotopologue with a share above 10⁻¹⁵, most abundant first.
    pub fn isotopologues(&self) -> Result<Vec<Isotopologue>> {
        // Composition → share, built element part by element part.
        let mut dist: BTreeMap<Vec<(u32, u32, u32)>, f64> = BTreeMap::new();
        dist.insert(Vec::new(), 1.0);
        for part in self.formula.parts() {
            let el = part.element;
            let choices: Vec<(&'static Isotope, f64)> = match part.mass_number {
                Some(a) => vec![(el.isotope(a)?, 1.0)],
                None => {
                    let natural: Vec<(&'static Isotope, f64)> = el
                        .natural_isotopes()
                        .into_iter()
                        .filter_map(|i| i.abundance.map(|p| (i, p)))
                        .collect();
                    if natural.is_empty() {
                        return Err(Error::NoData {
                            what: format!("natural isotopes of {}", el.symbol()),
                            why: format!(
                                "{} has none; write the isotope in the formula, e.g. \"({}{})\"",
                                el.symbol(),
                                el.isotopes().first().map_or(0, |i| i.mass_number),
                                el.symbol()
                            ),
                        });
                    }
                    natural
                }
            };
            // One atom at a time: the repeated product is the multinomial.
            for _ in 0..part.count {
                crate::interrupt::check()?;
                let mut next: BTreeMap<Vec<(u32, u32, u32)>, f64> = BTreeMap::new();
                for (key, share) in &dist {
                    for (iso, p) in &choices {
                        let s = share * p;
                        if s < PATTERN_FLOOR {
                            continue;
                        }
                        let mut k = key.clone();
                        match k
                            .iter_mut()
                            .find(|(z, a, _)| *z == iso.z && *a == iso.mass_number)
                        {
                            Some(entry) => entry.2 += 1,
                            None => {
                                k.push((iso.z, iso.mass_number, 1));
                                k.sort_unstable();
                            }
                        }
                        *next.entry(k).or_insert(0.0) += s;
                    }
                }
                if next.len() > 200_000 {
                    return Err(Error::invalid(
                        "molecule",
                        self.label(),
                        "has too many isotopologues to list (over 200 000); name isotopes in the formula",
                    ));
                }
                dist = next;
            }
        }
        let mut out = Vec::with_capacity(dist.len());
        for (key, abundance) in dist {
            let mut atoms = Vec::with_capacity(key.len());
            let mut mass_u = 0.0;
            for (z, a, n) in key {
                let iso = element_by_z(z as i64)?.isotope(a)?;
                mass_u += iso.mass_u * n as f64;
                atoms.push((iso, n));
            }
            out.push(Isotopologue {
                atoms,
                mass_u,
                abundance,
            });
        }
        out.sort_by(|a, b| b.abundance.total_cmp(&a.abundance));
        Ok(out)
    }

    /// Mass with every atom at its most abundant natural isotope (or the one written), u.
    pub fn monoisotopic_mass_u(&self) -> Result<f64> {
        let mut m = 0.0;
        for p in self.formula.parts() {
            let iso = match p.mass_number {
                Some(a) => p.element.isotope(a)?,
                None => *p
                    .element
                    .natural_isotopes()
                    .first()
                    .ok_or_else(|| Error::NoData {
                        what: format!("natural isotopes of {}", p.element.symbol()),
                        why: "write the isotope in the formula".into(),
                    })?,
            };
            m += iso.mass_u * p.count as f64;
        }
        Ok(m)
    }

    /// Mean mass over the isotopologue pattern, u.
    pub fn mass_u(&self) -> Result<f64> {
        let pattern = self.isotopologues()?;
        let total: f64 = pattern.iter().map(|i| i.abundance).sum();
        Ok(pattern.iter().map(|i| i.abundance * i.mass_u).sum::<f64>() / total)
    }
}

/// Mass of the ion of an isotopologue at `charge` (u): neutral mass − q·mₑ.
pub fn isotopologue_ion_mass_u(iso: &Isotopologue, charge: u32) -> f64 {
    iso.mass_u - charge as f64 * crate::constants::ELECTRON_MASS_U
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bundled_tables_read() {
        let all = bundled_molecules().unwrap();
        assert!(all.len() >= 8);
        let co = Molecule::parse("CO").unwrap();
        assert_eq!(co.name(), Some("carbon monoxide"));
        assert_eq!(co.ionization_energies_ev(), &[14.014]);
        assert_eq!(co.electrons(), 14);
        assert!(co.pattern().unwrap().iter().any(|p| p.ion == "C"));
        // Every pattern ion is a species the parser reads.
        for m in all {
            for p in bundled_pattern(&m.formula).unwrap_or(&[]) {
                parse_substance(&p.ion).unwrap();
            }
        }
    }

    #[test]
    fn isotopologue_shares_sum_to_the_abundance_product() {
        for f in ["CO2", "H2O", "CH4", "N2", "(15N)2", "13CO", "D2O", "HD"] {
            let m = Molecule::parse(f).unwrap();
            let pattern = m.isotopologues().unwrap();
            let total: f64 = pattern.iter().map(|i| i.abundance).sum();
            // Abundances in the table sum to 1 within 1e-5 per element.
            assert!((total - 1.0).abs() < 1e-4, "{f}: {total}");
            // Labels read back to a single isotopologue.
            for i in &pattern {
                let back = Molecule::parse(&i.label()).unwrap();
                let again = back.isotopologues().unwrap();
                assert_eq!(again.len(), 1, "{}", i.label());
                assert!((again[0].mass_u - i.mass_u).abs() < 1e-12);
            }
        }
        let n2 = Molecule::parse("(15N)2").unwrap().isotopologues().unwrap();
        assert_eq!(n2.len(), 1);
        assert_eq!(n2[0].mass_number(), 30);
    }

    #[test]
    fn elements_are_not_molecules() {
        assert!(Molecule::parse("Co").is_err());
        assert!(
            Molecule::parse("Tc2").is_err()
                || Molecule::parse("Tc2").unwrap().isotopologues().is_err()
        );
    }
}
