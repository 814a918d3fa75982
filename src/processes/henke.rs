//! Photoabsorption of neutral atoms below 200 eV from the Henke, Gullikson & Davis (1993)
//! tables, for the elements without a Verner et al. (1996) fit ([`super::verner`]): Z = 15,
//! 17, 19, 21–25, 27–30 and 31–92.
//!
//! # Source and formula
//!
//! B. L. Henke, E. M. Gullikson and J. C. Davis, At. Data Nucl. Data Tables 54, 181 (1993):
//! atomic scattering factors f₂ compiled from measured photoabsorption (theory and
//! interpolation across Z where no measurement exists), with the later updates of the files,
//! as shipped in the `periodictable` package; σ = 2 r_e λ f₂. Embedded from
//! `data/henke93_photoabsorption.csv` (`data/generate_henke.py`): every tabulated energy
//! from the first ionization energy, or the file's first energy above it (10 eV for most
//! elements), to 200 eV.
//!
//! # Use in the project
//!
//! [`super::photoionization::neutral_photoabsorption_cm2`] takes this table below 100 eV and
//! blends it into the Elam table over 100–200 eV, log-linearly in energy,
//! σ = σ_H^(1−w) · σ_E^w with w = ln(E/100 eV)/ln 2, so the total is continuous at both ends.
//! The blend sits above 100 eV, not below, because there the Elam table (built from
//! single-particle theory) misses the delayed 4d → f giant resonance of Z ≈ 47–56 and the
//! 5d resonance of Z ≈ 80–92: at 100 eV Elam gives Xe 3.8 Mb against Henke's 26.9 Mb, and
//! the measured Xe peak is about 25–30 Mb near 100 eV (West & Morton 1978, from memory);
//! at 200 eV, where the blend ends, the two tables differ by less than 30 % for 41 of these
//! 74 elements and by at most a factor 2.8 (Henke/Elam 0.18–2.7, median 1.24; Cl sits on
//! its 2p edge, Cs is the low one; measured on the embedded tables against xraydb's Elam
//! values), so the blend bends the curve by that much over one octave. Below the first
//! ionization energy the photoionization cross section is zero whatever the table holds
//! (no subshell is open), see [`super::photoionization`].
//!
//! # Validity and accuracy
//!
//! Henke et al. state the tables describe the element in its elemental state (gases as
//! atoms, metals as solids) and that within some tens of eV of a threshold the chemical
//! state matters; for the noble gases and the other gaseous elements this is the free
//! atom, for metals (Cu, Ag, Sn, W, Au, …) near their thresholds treat it as a
//! factor-of-two estimate. Measured (`tests/henke.rs`, `tests/python/test_photon.py`):
//! the embedded values equal `periodictable`'s f₂ converted with scipy's constants within
//! 2×10⁻⁵; Xe at 20, 50 and 100 eV is 1.01, 0.69 and 1.03 times measured (35, 2 and 26 Mb;
//! Marr & West 1976, West & Morton 1978, from memory), where the hydrogenic model gave 0.07
//! at 20 eV and 0.15 at 100 eV; Kr at 15 and 20 eV 1.01 and 1.03 times 37 Mb (Marr & West
//! 1976, from memory). Just above the Xe threshold the table rises more slowly than
//! measured: 0.23 × at 1.02 × threshold, 0.98 × at 1.05 ×. The rows start at the first
//! ionization energy (the generator drops the file's sub-threshold tail and repeats a first
//! point that lies within 1 eV above it at the ionization energy).

use std::collections::BTreeMap;
use std::sync::OnceLock;

use crate::atoms::table::{corrupt, parse_f64, parse_u32, rows};
use crate::error::Result;

const NAME: &str = "henke93_photoabsorption.csv";
const CSV: &str = include_str!("../../data/henke93_photoabsorption.csv");
const COLUMNS: [&str; 3] = ["z", "energy_ev", "cross_section_cm2"];

/// Photon energy (eV) from which the Elam table takes over, blended from 100 eV.
pub const JOIN_END_EV: f64 = 200.0;
/// Photon energy (eV) below which the Henke table alone gives the neutral total.
pub const JOIN_START_EV: f64 = 100.0;

type Tables = BTreeMap<u32, Vec<(f64, f64)>>;

fn parse() -> Result<Tables> {
    let mut out: Tables = BTreeMap::new();
    for r in rows(NAME, CSV, &COLUMNS)? {
        let z = parse_u32(NAME, r[0])?;
        let e = parse_f64(NAME, r[1])?;
        let sigma = parse_f64(NAME, r[2])?;
        let table = out.entry(z).or_default();
        let increasing = table.last().is_none_or(|last| e > last.0);
        if !(e > 0.0 && sigma > 0.0 && increasing) {
            return Err(corrupt(NAME, format!("bad row {r:?}")));
        }
        table.push((e, sigma));
    }
    if out
        .values()
        .any(|t| t.last().is_none_or(|l| l.0 < JOIN_END_EV))
    {
        return Err(corrupt(
            NAME,
            format!("a table ends below {JOIN_END_EV} eV"),
        ));
    }
    Ok(out)
}

fn tables() -> Result<&'static Tables> {
    static TABLES: OnceLock<Result<Tables>> = OnceLock::new();
    match TABLES.get_or_init(parse) {
        Ok(t) => Ok(t),
        Err(e) => Err(e.clone()),
    }
}

/// The Henke table of element `z`, (energy_ev, cross_section_cm2) sorted by energy, if one is
/// embedded.
pub fn henke_photoabsorption(z: u32) -> Result<Option<&'static [(f64, f64)]>> {
    Ok(tables()?.get(&z).map(Vec::as_slice))
}

/// Atomic numbers with an embedded Henke table.
pub fn henke_elements() -> Result<Vec<u32>> {
    Ok(tables()?.keys().copied().collect())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::processes::verner::verner_fit;

    #[test]
    fn covers_exactly_the_elements_without_a_verner_fit() {
        let zs = henke_elements().unwrap();
        let expected: Vec<u32> = (1..=92)
            .filter(|&z| verner_fit(z, z).unwrap().is_none())
            .collect();
        assert_eq!(zs, expected);
        assert!(zs.contains(&54) && !zs.contains(&18) && !zs.contains(&93));
    }

    #[test]
    fn tables_start_low_and_reach_the_join() {
        for z in henke_elements().unwrap() {
            let t = henke_photoabsorption(z).unwrap().unwrap();
            // From the first ionization energy, or from 10 eV where that lies lower (the CSV
            // keeps 6 significant digits).
            let ie = crate::atoms::element_by_z(i64::from(z))
                .unwrap()
                .ionization_energies_ev()[0];
            assert!(
                t[0].0 <= ie.max(10.0) * (1.0 + 1e-5),
                "Z={z} starts at {}",
                t[0].0
            );
            assert!(t[0].0 >= ie * (1.0 - 1e-5), "Z={z} starts below its IE");
            assert!(t.last().unwrap().0 >= JOIN_END_EV);
        }
        assert!(henke_photoabsorption(18).unwrap().is_none());
    }
}
