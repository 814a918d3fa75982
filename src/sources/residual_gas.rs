//! Residual-gas ions of an electron-beam trap from the gas partial pressures: how many ions
//! of each residual-gas element, in each charge state, the trap holds at extraction.
//!
//! # Model
//!
//! Gas molecules of partial pressure p at temperature T_gas fill the beam volume
//! V = π r_e² L at density n = p/(k_B T_gas). Each atom of a molecule is ionized by the beam
//! at its own neutral-atom Lotz rate (j/e)·σ₀(E) — the additivity rule for molecular
//! ionization cross sections (J. W. Otvos and D. P. Stevenson, J. Am. Chem. Soc. 78, 546
//! (1956); from memory) — and the molecule's other fragments, neutral, leave the trap. So
//! element X gains singly charged ions at the constant rate
//!
//!   F_X = Σ_gas n_gas · V · ν_X,gas · (j/e) · σ₀,X(E)
//!
//! (ν_X,gas atoms of X per molecule), and from an empty trap its populations follow
//! dN/dt = M_X N + F_X e₁ over the breeding time, M_X the element's rate network in this trap
//! (ionization, recombination, charge exchange). The gas is not depleted (its molecules keep
//! streaming in from the walls).
//!
//! # Validity
//!
//! Molecular ions and dissociation channels are not followed (each ionized molecule counts
//! as one atomic ion); the additivity rule overestimates molecular ionization by tens of
//! percent near threshold and is good to about 10–20 % at beam energies of keV (from memory).
//! Ions born outside the beam and ions from the gas feed of an injected species are not
//! counted. The trap's capacity (the compensated electron space charge) is not imposed on
//! the gas ions: [`ResidualIons::charge`] lets the caller compare.

use super::beam_trap::BeamTrap;
use crate::atoms::{element, Element};
use crate::error::{require_positive, Result};
use crate::processes::charge_exchange::gas_number_density_m3;
use crate::processes::ion_lotz::ionization_cross_sections_cm2;
use crate::solve::evolve;

/// Ions of one residual-gas element at extraction.
#[derive(Clone, Debug, PartialEq)]
pub struct ResidualIons {
    pub symbol: String,
    /// Singly charged ions made per second, F_X.
    pub production_per_s: f64,
    /// Ions of each charge state 0…Z at the end of the breeding time.
    pub per_charge: Vec<f64>,
}

impl ResidualIons {
    /// Ions of charge ≥ 1 in all.
    pub fn ions(&self) -> f64 {
        self.per_charge.iter().skip(1).sum()
    }
    /// Total charge Σ q N_q (elementary charges).
    pub fn charge(&self) -> f64 {
        self.per_charge
            .iter()
            .enumerate()
            .map(|(q, n)| q as f64 * n)
            .sum()
    }
}

impl BeamTrap {
    /// Singly charged ions of each residual-gas element made per second in the beam volume,
    /// in the order the elements first appear in the gas list.
    pub fn residual_production_per_s(&self) -> Result<Vec<(&'static Element, f64)>> {
        let volume_cm3 =
            std::f64::consts::PI * (self.beam.radius_m * 100.0).powi(2) * self.length_m * 100.0;
        let flux = self.beam.electron_flux_per_cm2_s();
        let mut out: Vec<(&'static Element, f64)> = Vec::new();
        for component in &self.residual_gas {
            let n_cm3 = gas_number_density_m3(component.pressure_pa, self.gas_temperature_k) * 1e-6;
            for (symbol, count) in component.gas.atoms {
                let el = element(symbol)?;
                let sigma = ionization_cross_sections_cm2(
                    el,
                    0,
                    &[self.beam.energy_ev],
                    self.lotz_constants,
                )?[0];
                let rate = n_cm3 * volume_cm3 * f64::from(*count) * flux * sigma;
                match out.iter_mut().find(|(e, _)| e.z() == el.z()) {
                    Some(slot) => slot.1 += rate,
                    None => out.push((el, rate)),
                }
            }
        }
        Ok(out)
    }

    /// Ions of each residual-gas element and charge state after `breeding_time_s` of
    /// breeding in an initially empty trap (see the module documentation).
    pub fn residual_ions(&self, breeding_time_s: f64) -> Result<Vec<ResidualIons>> {
        require_positive("breeding_time_s", breeding_time_s)?;
        let mut trap = self.clone();
        // The gas ions' own network: no escape rates or feed of the analyte.
        trap.loss_per_s = Vec::new();
        trap.feed = None;
        self.residual_production_per_s()?
            .into_iter()
            .map(|(el, rate)| {
                trap.feed = Some((1, rate));
                let net = trap.network(el)?;
                let zeros = vec![0.0; net.n_states()];
                let pops = evolve(&net, &zeros, &[breeding_time_s])?;
                Ok(ResidualIons {
                    symbol: el.symbol().to_string(),
                    production_per_s: rate,
                    per_charge: pops.row(0).to_vec(),
                })
            })
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use crate::sources::{BeamTrap, ElectronBeam};

    fn trap(gases: &[(&str, f64)]) -> BeamTrap {
        let beam = ElectronBeam::with_radius(5000.0, 0.2, 100e-6).unwrap();
        let gases: Vec<(String, f64)> = gases.iter().map(|(n, p)| (n.to_string(), *p)).collect();
        BeamTrap::new(beam, 0.5, &gases, 50.0).unwrap()
    }

    #[test]
    fn production_follows_the_ideal_gas_and_the_beam_volume() {
        // n = p/(k_B T) (CODATA k_B), V = π r² L, rate = n V (j/e) σ₀ per atom.
        let t = trap(&[("N2", 1e-8)]);
        let prod = t.residual_production_per_s().unwrap();
        assert_eq!(prod.len(), 1);
        let n_cm3 = 1e-8 / (1.380649e-23 * 300.0) * 1e-6;
        let v_cm3 = std::f64::consts::PI * 0.01f64.powi(2) * 50.0;
        let flux = 0.2 / (std::f64::consts::PI * 0.01f64.powi(2)) / 1.602176634e-19;
        let n = crate::atoms::element("N").unwrap();
        let sigma =
            crate::processes::ion_lotz::ionization_cross_sections_cm2(n, 0, &[5000.0], None)
                .unwrap()[0];
        let expected = n_cm3 * v_cm3 * 2.0 * flux * sigma;
        assert!((prod[0].1 / expected - 1.0).abs() < 1e-12);
    }

    #[test]
    fn ions_grow_linearly_at_first_and_scale_with_pressure() {
        let t1 = trap(&[("H2", 1e-9), ("CO", 1e-9)]);
        let t2 = trap(&[("H2", 2e-9), ("CO", 2e-9)]);
        let a = t1.residual_ions(1e-4).unwrap();
        let b = t2.residual_ions(1e-4).unwrap();
        assert_eq!(
            a.iter().map(|r| r.symbol.as_str()).collect::<Vec<_>>(),
            ["H", "C", "O"]
        );
        for (x, y) in a.iter().zip(&b) {
            // Linear in the feed: twice the pressure, twice the ions (charge exchange on the
            // gas changes with pressure too, but is negligible over 0.1 ms).
            assert!((y.ions() / x.ions() - 2.0).abs() < 1e-6, "{}", x.symbol);
            // Early on nearly every ion made is still there.
            let made = x.production_per_s * 1e-4;
            assert!(x.per_charge.iter().sum::<f64>() <= made * (1.0 + 1e-9));
            assert!(x.per_charge.iter().sum::<f64>() > 0.99 * made);
        }
        assert!(t1.residual_ions(0.0).is_err());
    }
}
