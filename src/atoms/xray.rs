//! Neutral-atom X-ray levels (Elam, Ravel & Sieber 2002 via xraydb) and the tabulated
//! neutral photoabsorption cross sections.

use std::sync::OnceLock;

use super::element::Element;
use super::subshell::Subshell;
use super::table::{self, parse_f64, parse_u32};
use crate::error::Result;

/// One absorption edge of the neutral atom.
#[derive(Clone, Debug, PartialEq)]
pub struct XrayLevel {
    /// Edge name: K, L1, L2, L3, M1 … P3.
    pub edge: String,
    pub subshell: Subshell,
    /// Binding energy relative to the Fermi level of the solid (eV).
    pub binding_ev: f64,
    pub jump_ratio: f64,
    pub fluorescence_yield: f64,
}

impl XrayLevel {
    /// Electrons the edge's spin–orbit component holds when full: 2j+1.
    pub fn capacity(&self) -> u32 {
        let l = self.subshell.l;
        if l == 0 {
            return 2;
        }
        // The lower-numbered edge of a pair (L2, M2, M4, N2, N4, N6 …) is j = l − 1/2.
        let lower = matches!(
            self.edge.as_str(),
            "L2" | "M2" | "M4" | "N2" | "N4" | "N6" | "O2" | "O4" | "P2"
        );
        if lower {
            2 * l
        } else {
            2 * l + 2
        }
    }
}

/// Capacity-weighted mean edge energy of a subshell (spin–orbit pairs merged), if tabulated.
pub fn edge_binding_ev(levels: &[XrayLevel], subshell: Subshell) -> Option<f64> {
    let (sum, weight) = levels
        .iter()
        .filter(|l| l.subshell == subshell && l.binding_ev > 0.0)
        .fold((0.0, 0.0), |(s, w), l| {
            (
                s + l.binding_ev * l.capacity() as f64,
                w + l.capacity() as f64,
            )
        });
    (weight > 0.0).then(|| sum / weight)
}

pub(crate) fn read_levels(elements: &mut [Element]) -> Result<()> {
    const NAME: &str = "xray_levels.csv";
    let columns = [
        "z",
        "edge",
        "subshell",
        "binding_ev",
        "jump_ratio",
        "fluorescence_yield",
    ];
    for row in table::rows(NAME, table::XRAY_LEVELS_CSV, &columns)? {
        let z = parse_u32(NAME, row[0])?;
        let level = XrayLevel {
            edge: row[1].to_string(),
            subshell: Subshell::parse(row[2]).map_err(|e| table::corrupt(NAME, e.to_string()))?,
            binding_ev: parse_f64(NAME, row[3])?,
            jump_ratio: parse_f64(NAME, row[4])?,
            fluorescence_yield: parse_f64(NAME, row[5])?,
        };
        if let Some(e) = elements.get_mut((z as usize).wrapping_sub(1)) {
            e.xray_levels.push(level);
        }
    }
    const CK: &str = "coster_kronig.csv";
    for row in table::rows(
        CK,
        table::COSTER_KRONIG_CSV,
        &["z", "initial", "final", "probability"],
    )? {
        let z = parse_u32(CK, row[0])?;
        let p = parse_f64(CK, row[3])?;
        if let Some(e) = elements.get_mut((z as usize).wrapping_sub(1)) {
            e.coster_kronig
                .push((row[1].to_string(), row[2].to_string(), p));
        }
    }
    Ok(())
}

/// (energy_ev, cross_section_cm2) rows of every element, index Z − 1.
type PerElementTable = Vec<Vec<(f64, f64)>>;

/// Tabulated neutral photoabsorption (energy_ev, cross_section_cm2), sorted by energy,
/// 100 eV – 800 keV, for Z = 1 … 98; None elsewhere.
pub fn neutral_photoabsorption(z: u32) -> Result<Option<&'static [(f64, f64)]>> {
    static TABLE: OnceLock<Result<PerElementTable>> = OnceLock::new();
    let table = TABLE.get_or_init(|| {
        const NAME: &str = "photoabsorption.csv";
        let mut per_z: Vec<Vec<(f64, f64)>> = Vec::new();
        for row in table::rows(
            NAME,
            table::PHOTOABSORPTION_CSV,
            &["z", "energy_ev", "cross_section_cm2"],
        )? {
            let z = parse_u32(NAME, row[0])? as usize;
            if z == 0 {
                return Err(table::corrupt(NAME, "Z = 0".into()));
            }
            if per_z.len() < z {
                per_z.resize(z, Vec::new());
            }
            per_z[z - 1].push((parse_f64(NAME, row[1])?, parse_f64(NAME, row[2])?));
        }
        Ok(per_z)
    });
    match table {
        Ok(t) => Ok(t
            .get((z as usize).wrapping_sub(1))
            .filter(|v| !v.is_empty())
            .map(|v| v.as_slice())),
        Err(e) => Err(e.clone()),
    }
}
