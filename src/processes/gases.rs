//! A small built-in table of target (residual or buffer) gases for charge exchange.

use crate::error::{Error, Result};

/// A target gas: first ionization energy, molar mass and composition.
#[derive(Clone, Debug, PartialEq)]
pub struct Gas {
    /// Chemical formula, also the lookup key ("H2", "CO2", "Ar").
    pub formula: &'static str,
    /// First ionization energy in eV.
    pub ionization_energy_ev: f64,
    /// Molar mass in g/mol (IUPAC standard atomic weights).
    pub molar_mass_g_mol: f64,
    /// Elements and how many atoms of each, e.g. `[("N", 2)]`.
    pub atoms: &'static [(&'static str, u32)],
    /// Where the ionization energy comes from.
    pub source: &'static str,
}

const WEBBOOK: &str = "NIST Chemistry WebBook, adiabatic ionization energy (from memory)";
const ASD: &str = "NIST Atomic Spectra Database (checked against mendeleev 1.3.0)";

static GASES: [Gas; 12] = [
    Gas {
        formula: "H2",
        ionization_energy_ev: 15.425_93,
        molar_mass_g_mol: 2.016,
        atoms: &[("H", 2)],
        source: WEBBOOK,
    },
    Gas {
        formula: "He",
        ionization_energy_ev: 24.587_389_011,
        molar_mass_g_mol: 4.002_602,
        atoms: &[("He", 1)],
        source: ASD,
    },
    Gas {
        formula: "N2",
        ionization_energy_ev: 15.581,
        molar_mass_g_mol: 28.014,
        atoms: &[("N", 2)],
        source: WEBBOOK,
    },
    Gas {
        formula: "O2",
        ionization_energy_ev: 12.069_7,
        molar_mass_g_mol: 31.998,
        atoms: &[("O", 2)],
        source: WEBBOOK,
    },
    Gas {
        formula: "CO",
        ionization_energy_ev: 14.014,
        molar_mass_g_mol: 28.010,
        atoms: &[("C", 1), ("O", 1)],
        source: WEBBOOK,
    },
    Gas {
        formula: "CO2",
        ionization_energy_ev: 13.777,
        molar_mass_g_mol: 44.009,
        atoms: &[("C", 1), ("O", 2)],
        source: WEBBOOK,
    },
    Gas {
        formula: "H2O",
        ionization_energy_ev: 12.621,
        molar_mass_g_mol: 18.015,
        atoms: &[("H", 2), ("O", 1)],
        source: WEBBOOK,
    },
    Gas {
        formula: "CH4",
        ionization_energy_ev: 12.61,
        molar_mass_g_mol: 16.043,
        atoms: &[("C", 1), ("H", 4)],
        source: WEBBOOK,
    },
    Gas {
        formula: "Ne",
        ionization_energy_ev: 21.564_541,
        molar_mass_g_mol: 20.179_7,
        atoms: &[("Ne", 1)],
        source: ASD,
    },
    Gas {
        formula: "Ar",
        ionization_energy_ev: 15.759_611_9,
        molar_mass_g_mol: 39.948,
        atoms: &[("Ar", 1)],
        source: ASD,
    },
    Gas {
        formula: "Kr",
        ionization_energy_ev: 13.999_605_5,
        molar_mass_g_mol: 83.798,
        atoms: &[("Kr", 1)],
        source: ASD,
    },
    Gas {
        formula: "Xe",
        ionization_energy_ev: 12.129_843_7,
        molar_mass_g_mol: 131.293,
        atoms: &[("Xe", 1)],
        source: ASD,
    },
];

/// Every gas in the table.
pub fn gases() -> &'static [Gas] {
    &GASES
}

/// Look a gas up by formula, case-insensitively ("n2", "CO2").
pub fn gas(name: &str) -> Result<&'static Gas> {
    let key = name.trim();
    GASES
        .iter()
        .find(|g| g.formula.eq_ignore_ascii_case(key))
        .ok_or_else(|| Error::UnknownGas {
            given: name.to_string(),
            allowed: GASES
                .iter()
                .map(|g| g.formula)
                .collect::<Vec<_>>()
                .join(", "),
        })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lookup_is_case_insensitive_and_errors_list_the_table() {
        assert_eq!(gas("n2").unwrap().formula, "N2");
        assert_eq!(gas(" CO2 ").unwrap().formula, "CO2");
        let err = gas("SF6").unwrap_err();
        let msg = err.to_string();
        assert!(msg.contains("SF6") && msg.contains("H2, He, N2"), "{msg}");
        assert_eq!(gases().len(), 12);
    }

    #[test]
    fn ionization_energies_match_the_formula_sheet() {
        // NIST Chemistry WebBook (from memory).
        for (f, ie) in [
            ("H2", 15.43),
            ("N2", 15.58),
            ("O2", 12.07),
            ("CO", 14.01),
            ("CO2", 13.78),
            ("H2O", 12.62),
            ("CH4", 12.61),
        ] {
            assert!(
                (gas(f).unwrap().ionization_energy_ev - ie).abs() < 0.006,
                "{f}"
            );
        }
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
    fn molar_masses_are_sums_of_standard_atomic_weights() {
        // Standard atomic weights as given by mendeleev 1.3.0 (IUPAC).
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
                (sum - g.molar_mass_g_mol).abs() < 1e-9,
                "{}: {sum}",
                g.formula
            );
            assert!(!g.source.is_empty());
        }
    }
}
