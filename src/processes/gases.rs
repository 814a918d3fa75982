//! The target gases (residual, buffer, coolant or fed gas) that charge exchange and the gas
//! feeds know, read from the one definition of each substance:
//!
//! * molecules: the bundled gases of `data/molecules.csv` ([`crate::atoms::Molecule`]) that
//!   have a bundled electron-ionization pattern (`data/fragments.csv`), i.e. the stable
//!   gases H₂, N₂, O₂, CO, CO₂, H₂O, CH₄, NH₃; the radicals of that table (OH, CH₃, …) are
//!   fragments, not gases one can feed, and are left out. First ionization energy and its
//!   source from the table (NIST Chemistry WebBook, S. G. Lias), composition from the
//!   formula parser, molar mass the abundance-weighted mean over the isotopologues
//!   (AME2020 masses, IUPAC abundances);
//! * the noble gases He, Ne, Ar, Kr, Xe: first ionization energy from the atomic table
//!   (NIST ASD via mendeleev), molar mass the abundance-weighted mean of the natural
//!   isotopes.
//!
//! Lookup goes through the one species parser ([`crate::atoms::parse_substance`]), so
//! formulas are case-sensitive as everywhere else: "CO" is carbon monoxide, "Co" (cobalt)
//! is not a gas, and "n2" is refused (it used to be read as N₂ when this module kept its
//! own table). An isotopologue ("13CO", "(15N)2", "D2") finds the gas of its composition.
//!
//! Accuracy: the ionization energies carry the table's uncertainties (≤ 0.02 eV); the molar
//! masses agree with the IUPAC standard atomic weights summed over the atoms to 1e-4
//! relative (the standard weights are rounded conventional values; tested).

use std::sync::OnceLock;

use crate::atoms::{
    bundled_molecules, bundled_pattern, element, parse_substance, Molecule, MoleculeData, Species,
    Substance,
};
use crate::error::{Error, Result};

/// A target gas: first ionization energy, molar mass and composition.
#[derive(Clone, Debug)]
pub struct Gas {
    /// Chemical formula, also the lookup key ("H2", "CO2", "Ar").
    pub formula: &'static str,
    /// First ionization energy in eV.
    pub ionization_energy_ev: f64,
    /// Molar mass in g/mol: the abundance-weighted mean mass from the isotope table.
    pub molar_mass_g_mol: f64,
    /// Elements and how many atoms of each, e.g. `[("N", 2)]`.
    pub atoms: &'static [(&'static str, u32)],
    /// Where the ionization energy comes from.
    pub source: &'static str,
    /// The bundled molecule (None for a noble gas).
    pub molecule: Option<&'static MoleculeData>,
}

/// Gases are one table row each: equal when their formulas are.
impl PartialEq for Gas {
    fn eq(&self, other: &Self) -> bool {
        self.formula == other.formula
    }
}

impl Gas {
    /// The molecule of a molecular gas (None for a noble gas).
    pub fn as_molecule(&self) -> Option<Molecule> {
        self.molecule.map(|m| Molecule::new(m.formula.clone()))
    }
}

/// The noble gases that are target gases (atoms; everything else is a bundled molecule).
const NOBLE_GASES: [&str; 5] = ["He", "Ne", "Ar", "Kr", "Xe"];

/// Source note of the atoms' ionization energies.
const ASD: &str = "NIST Atomic Spectra Database (via mendeleev, data/ionization_energies.csv)";

/// Formula label and composition of each gas, in table order: the storage the `&'static`
/// fields of [`Gas`] point into.
struct Names {
    rows: Vec<(String, Vec<(&'static str, u32)>)>,
}

fn molecular_gases() -> Result<Vec<&'static MoleculeData>> {
    Ok(bundled_molecules()?
        .iter()
        .filter(|m| bundled_pattern(&m.formula).is_some())
        .collect())
}

fn names() -> Result<&'static Names> {
    static NAMES: OnceLock<Result<Names>> = OnceLock::new();
    NAMES
        .get_or_init(|| {
            let mut rows = Vec::new();
            for m in molecular_gases()? {
                let atoms = m
                    .formula
                    .parts()
                    .iter()
                    .map(|p| (p.element.symbol(), p.count))
                    .collect();
                rows.push((m.formula.label(), atoms));
            }
            for symbol in NOBLE_GASES {
                rows.push((symbol.to_string(), vec![(element(symbol)?.symbol(), 1)]));
            }
            Ok(Names { rows })
        })
        .as_ref()
        .map_err(Clone::clone)
}

fn build() -> Result<Vec<Gas>> {
    let names = names()?;
    let molecules = molecular_gases()?;
    let mut out = Vec::with_capacity(names.rows.len());
    for (i, (formula, atoms)) in names.rows.iter().enumerate() {
        let gas = match molecules.get(i) {
            Some(m) => {
                let molecule = Molecule::new(m.formula.clone());
                let ie = *m
                    .ionization_energies_ev
                    .first()
                    .ok_or_else(|| Error::NoData {
                        what: format!("first ionization energy of {formula}"),
                        why: "empty in data/molecules.csv".into(),
                    })?;
                Gas {
                    formula,
                    ionization_energy_ev: ie,
                    molar_mass_g_mol: molecule.mass_u()?,
                    atoms,
                    source: m.sources.first().map_or("", String::as_str),
                    molecule: Some(*m),
                }
            }
            None => {
                let el = element(formula)?;
                let isotopes = Species::Natural(el).isotopes();
                let total: f64 = isotopes.iter().map(|(_, p)| p).sum();
                let mass = isotopes.iter().map(|(i, p)| i.mass_u * p).sum::<f64>() / total;
                Gas {
                    formula,
                    ionization_energy_ev: *el.ionization_energies_ev().first().ok_or_else(
                        || Error::NoData {
                            what: format!("first ionization energy of {formula}"),
                            why: "not tabulated".into(),
                        },
                    )?,
                    molar_mass_g_mol: mass,
                    atoms,
                    source: ASD,
                    molecule: None,
                }
            }
        };
        out.push(gas);
    }
    Ok(out)
}

fn table() -> Result<&'static [Gas]> {
    static GASES: OnceLock<Result<Vec<Gas>>> = OnceLock::new();
    GASES
        .get_or_init(build)
        .as_ref()
        .map(Vec::as_slice)
        .map_err(Clone::clone)
}

/// Every gas in the table (an empty list if the embedded tables could not be read, which
/// the data tests rule out).
pub fn gases() -> &'static [Gas] {
    table().unwrap_or(&[])
}

/// Look a gas up by formula through the species parser ("N2", "CO2", "Ar", "13CO").
pub fn gas(name: &str) -> Result<&'static Gas> {
    let all = table()?;
    let unknown = || Error::UnknownGas {
        given: name.to_string(),
        allowed: format!(
            "{} (chemical formulas are case-sensitive: \"CO\" is carbon monoxide, \"Co\" cobalt)",
            all.iter().map(|g| g.formula).collect::<Vec<_>>().join(", ")
        ),
    };
    let found = match parse_substance(name) {
        Ok(Substance::Molecule(f)) => {
            let key = f.composition();
            all.iter()
                .find(|g| g.molecule.is_some_and(|m| m.formula.composition() == key))
        }
        Ok(Substance::Atom(s)) => all
            .iter()
            .find(|g| g.molecule.is_none() && g.formula == s.element().symbol()),
        Err(_) => None,
    };
    found.ok_or_else(unknown)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lookup_uses_the_species_parser_and_errors_list_the_table() {
        assert_eq!(gas("N2").unwrap().formula, "N2");
        assert_eq!(gas(" CO2 ").unwrap().formula, "CO2");
        assert_eq!(gas("argon").unwrap().formula, "Ar");
        // Isotopologues find the gas of their composition.
        assert_eq!(gas("13CO").unwrap().formula, "CO");
        assert_eq!(gas("(15N)2").unwrap().formula, "N2");
        assert_eq!(gas("D2").unwrap().formula, "H2");
        // Case-sensitive formulas: cobalt is no gas, "n2" is no formula.
        for bad in ["Co", "n2", "SF6", "OH", "N"] {
            let msg = gas(bad).unwrap_err().to_string();
            assert!(msg.contains(bad) && msg.contains("H2, N2"), "{msg}");
        }
        let formulas: Vec<&str> = gases().iter().map(|g| g.formula).collect();
        assert_eq!(
            formulas,
            ["H2", "N2", "O2", "CO", "CO2", "H2O", "CH4", "NH3", "He", "Ne", "Ar", "Kr", "Xe"]
        );
    }

    #[test]
    fn ionization_energies_match_the_formula_sheet() {
        // NIST Chemistry WebBook (from memory), the values the former built-in table held.
        for (f, ie) in [
            ("H2", 15.42593),
            ("N2", 15.581),
            ("O2", 12.0697),
            ("CO", 14.014),
            ("CO2", 13.777),
            ("H2O", 12.621),
            ("CH4", 12.61),
        ] {
            assert_eq!(gas(f).unwrap().ionization_energy_ev, ie, "{f}");
        }
        // NH3: NIST Chemistry WebBook IE (evaluated), 10.070 eV (checked 2026-12-02, as the
        // molecule table says).
        assert_eq!(gas("NH3").unwrap().ionization_energy_ev, 10.070);
        // Atoms: NIST ASD first ionization energies as carried by mendeleev 1.3.0.
        for (f, ie) in [
            ("He", 24.587389011),
            ("Ne", 21.564541),
            ("Ar", 15.7596119),
            ("Kr", 13.9996055),
            ("Xe", 12.1298437),
        ] {
            assert_eq!(gas(f).unwrap().ionization_energy_ev, ie, "{f}");
        }
    }

    #[test]
    fn molar_masses_match_sums_of_standard_atomic_weights() {
        // Standard atomic weights as given by mendeleev 1.3.0 (IUPAC); the isotope table's
        // abundance-weighted means differ from these rounded conventional values by less
        // than 1e-4 relative (H: 1.00794 against 1.008).
        let weight = |s: &str| match s {
            "H" => 1.008,
            "He" => 4.002602,
            "C" => 12.011,
            "N" => 14.007,
            "O" => 15.999,
            "Ne" => 20.1797,
            "Ar" => 39.948,
            "Kr" => 83.798,
            "Xe" => 131.293,
            _ => f64::NAN,
        };
        for g in gases() {
            let sum: f64 = g.atoms.iter().map(|(s, k)| weight(s) * f64::from(*k)).sum();
            assert!(
                ((sum - g.molar_mass_g_mol) / sum).abs() < 1e-4,
                "{}: {sum} against {}",
                g.formula,
                g.molar_mass_g_mol
            );
            assert!(!g.source.is_empty());
            assert_eq!(
                g.as_molecule().is_some(),
                g.atoms.len() > 1 || g.atoms[0].1 > 1
            );
        }
    }
}
