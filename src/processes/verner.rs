//! Analytic fits to the ground-state outer-shell photoionization cross sections of atoms and
//! ions: D. A. Verner, G. J. Ferland, K. T. Korista and D. G. Yakovlev, ApJ 465, 487 (1996),
//! Table 1, embedded from `data/verner96_photoionization.csv` (185 ions of Z = 1–14, 16,
//! 18, 20 and 26, as shipped in the rabacus 0.9.5 package; `data/generate_verner.py`).
//!
//! # Formula
//!
//!   σ(E) = σ₀ · [(x − 1)² + y_w²] · y^(P/2 − 5.5) · (1 + √(y/y_a))^(−P)  Mb,
//!   x = E/E₀ − y₀,  y = √(x² + y₁²),
//!
//! valid from the fit's threshold E_th up to E_max (the next inner-shell edge, or 50 keV).
//! The fits reproduce the Opacity Project and Hartree–Dirac–Slater partial cross sections
//! of the outer shell with a typical error of about 10 % (Verner et al. 1996); they smooth
//! over autoionizing resonances.
//!
//! # Use in the project
//!
//! [`super::photoionization`] takes the fit for the outermost subshell of an ion (the one
//! that the step q → q+1 ionizes) wherever the fit exists and E ≤ E_max, for every ion
//! except the neutral atom above 100 eV, where the measured Elam table stays in charge. Below
//! the fit's own threshold (the project's thresholds are NIST values, the fit's may differ by
//! a few tenths of an eV) the fit's threshold value is used. Measured
//! (`tests/verner.rs`): just above the first threshold He, Ne and Ar come out 0.97, 1.07
//! and 0.89 times measured (Samson 1966, Marr & West 1976, from memory); the embedded H-like
//! fits are within 2 % of the exact hydrogenic (Stobbe) threshold values for H, He⁺, C⁵⁺,
//! O⁷⁺, Ne⁹⁺, Ar¹⁷⁺, Fe²⁵⁺ (one-electron ions use the exact result itself).

use std::sync::OnceLock;

use crate::atoms::table::{corrupt, parse_f64, parse_u32, rows};
use crate::error::Result;

const NAME: &str = "verner96_photoionization.csv";
const CSV: &str = include_str!("../../data/verner96_photoionization.csv");
const COLUMNS: [&str; 11] = [
    "z",
    "electrons",
    "threshold_ev",
    "max_ev",
    "e0_ev",
    "sigma0_mb",
    "ya",
    "p",
    "yw",
    "y0",
    "y1",
];

/// One ion's fit.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct VernerFit {
    pub z: u32,
    pub electrons: u32,
    pub threshold_ev: f64,
    pub max_ev: f64,
    pub e0_ev: f64,
    pub sigma0_mb: f64,
    pub ya: f64,
    pub p: f64,
    pub yw: f64,
    pub y0: f64,
    pub y1: f64,
}

impl VernerFit {
    /// The fitted cross section (cm²) at `photon_energy_ev`, evaluated at
    /// max(E, E_th); 0 above E_max and for non-finite energies.
    pub fn cross_section_cm2(&self, photon_energy_ev: f64) -> f64 {
        if !photon_energy_ev.is_finite() || photon_energy_ev > self.max_ev {
            return 0.0;
        }
        let e = photon_energy_ev.max(self.threshold_ev);
        let x = e / self.e0_ev - self.y0;
        let y = (x * x + self.y1 * self.y1).sqrt();
        let f = ((x - 1.0).powi(2) + self.yw * self.yw)
            * y.powf(0.5 * self.p - 5.5)
            * (1.0 + (y / self.ya).sqrt()).powf(-self.p);
        self.sigma0_mb * f * 1e-18
    }
}

fn parse() -> Result<Vec<VernerFit>> {
    rows(NAME, CSV, &COLUMNS)?
        .into_iter()
        .map(|r| {
            let v = |i: usize| parse_f64(NAME, r[i]);
            let fit = VernerFit {
                z: parse_u32(NAME, r[0])?,
                electrons: parse_u32(NAME, r[1])?,
                threshold_ev: v(2)?,
                max_ev: v(3)?,
                e0_ev: v(4)?,
                sigma0_mb: v(5)?,
                ya: v(6)?,
                p: v(7)?,
                yw: v(8)?,
                y0: v(9)?,
                y1: v(10)?,
            };
            if fit.electrons == 0 || fit.electrons > fit.z || fit.e0_ev <= 0.0 {
                return Err(corrupt(NAME, format!("bad row {r:?}")));
            }
            Ok(fit)
        })
        .collect()
}

/// All embedded fits, parsed once.
pub fn verner_fits() -> Result<&'static [VernerFit]> {
    static FITS: OnceLock<Result<Vec<VernerFit>>> = OnceLock::new();
    match FITS.get_or_init(parse) {
        Ok(v) => Ok(v),
        Err(e) => Err(e.clone()),
    }
}

/// The fit of the ion of element `z` with `electrons` electrons, if the table holds it.
pub fn verner_fit(z: u32, electrons: u32) -> Result<Option<VernerFit>> {
    Ok(verner_fits()?
        .iter()
        .find(|f| f.z == z && f.electrons == electrons)
        .copied())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn table_covers_the_documented_ions() {
        let fits = verner_fits().unwrap();
        assert_eq!(fits.len(), 185);
        // Every ion of Z = 1–14, 16, 18, 20, 26.
        for z in (1..=14).chain([16, 18, 20, 26]) {
            for n in 1..=z {
                assert!(verner_fit(z, n).unwrap().is_some(), "Z={z} N={n}");
            }
        }
        assert!(verner_fit(15, 15).unwrap().is_none());
    }

    #[test]
    fn zero_above_the_range_and_flat_below_threshold() {
        let ar = verner_fit(18, 18).unwrap().unwrap();
        assert_eq!(ar.cross_section_cm2(ar.max_ev * 1.01), 0.0);
        assert_eq!(ar.cross_section_cm2(f64::NAN), 0.0);
        assert_eq!(
            ar.cross_section_cm2(ar.threshold_ev - 0.3),
            ar.cross_section_cm2(ar.threshold_ev)
        );
    }
}
