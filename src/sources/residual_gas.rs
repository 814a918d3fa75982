//! Residual-gas ions of an electron-beam trap from the gas partial pressures: how many ions
//! of each residual-gas element, in each charge state, the trap holds at extraction.
//!
//! # Model
//!
//! Gas molecules of partial pressure p at temperature T_gas fill the beam volume
//! V = π r_e² L at density n = p/(k_B T_gas). The beam ionizes them at
//!
//!   R_gas = n_gas · V · (j/e) · σ_gas(E)
//!
//! per second, σ_gas the molecule's total ionization cross section by the additivity rule
//! ([`crate::processes::molecular_ionization`]: Σ atoms of the neutral atoms' Lotz cross
//! sections above the molecule's ionization energy; J. W. Otvos and D. P. Stevenson, J. Am.
//! Chem. Soc. 78, 546 (1956), from memory), or for a noble gas the atom's own single
//! ionization cross section (the caller's, see [`BeamTrap::gas_ion_production`]).
//!
//! **Dissociation.** The molecular ion is not kept: it dissociates in the beam into one
//! atomic ion and neutral atoms, the atomic ion's element and charge drawn from the
//! atomic-ion entries of the molecule's bundled 70 eV fragmentation pattern
//! (`data/fragments.csv`, NIST Chemistry WebBook EI spectra from memory): element X at
//! charge q gets the share I_Xq / Σ_atomic I of R_gas ([`dissociation_shares`]; CO gives
//! C⁺ : O⁺ = 4.5 : 1.7, N₂ only N⁺). A molecule without a bundled pattern shares its ion
//! among its atoms by their count (our approximation). Using the atomic end of the
//! pattern for the dissociated parent and molecular fragments is our approximation: it
//! takes the charge to stay on the atom that carries it in the 70 eV spectrum.
//!
//! Rate estimate behind not keeping molecular ions: a molecular ion in the beam is
//! dissociated by any ionization (the doubly charged diatomic is unbound) and by
//! dissociative excitation, so its dissociation rate (j/e)·σ_d is at least the ionization
//! rate of its two atomic ions together, (j/e)(σ_A⁺ + σ_B⁺) ≥ 2 × the N⁺ → N²⁺ step for N₂⁺,
//! and with dissociative excitation, whose cross section is several times the ionization
//! one (from memory, order of magnitude), 5–20 × that step. The other rates a cold
//! molecular ion sees are far slower: charge exchange on 10⁻⁷ Pa of gas ≈ n σ v ≈ 10⁻³ s⁻¹,
//! escape at kT ≈ 0.03 eV over a ≥ 1 V barrier ≈ e^(−30) of the collision rate. So the
//! molecular ion lives at most half, typically a tenth, of the first breeding step of its
//! atomic ion; dropping it shifts the light ions' early charge-state history by that
//! delay and leaves the steady state and the heavy species unchanged.
//!
//! **Neutral fragments** leave the beam (our approximation): born with a few eV of
//! dissociation energy (from memory), an N atom crosses a 100 µm beam in about 20 ns, and
//! its ionization probability on the way, (j/e) σ₀ r_e / v, is below 10⁻² even at
//! 10³ A/cm². They carry no charge, so the ion bookkeeping counts R_gas ions fed per gas.
//!
//! Element X thus gains ions at the constant rate F_Xq = Σ_gas share_Xq,gas · R_gas, and
//! from an empty trap its populations follow dN/dt = M_X N + F_X over the breeding time,
//! M_X the element's rate network in this trap (ionization, recombination, charge
//! exchange). The gas is not depleted (its molecules keep streaming in from the walls).
//! The dynamic trap model ([`crate::sources::trap_dynamics`]) uses the same production.
//!
//! # Validity
//!
//! The additivity rule overestimates molecular ionization by up to a factor 1.6 at 100 eV
//! (N₂; see its module) and by 10–20 % at keV beam energies (from memory); the fragment
//! shares carry the pattern's 20–60 % uncertainties. Ions born outside the beam and ions
//! from the gas feed of an injected species are not counted. The trap's capacity (the
//! compensated electron space charge) is not imposed on the gas ions:
//! [`ResidualIons::charge`] lets the caller compare.

use super::beam_trap::{BeamTrap, GasComponent};
use crate::atoms::{parse_substance, Element, Molecule, Substance};
use crate::error::{require_positive, Result};
use crate::processes::charge_exchange::gas_number_density_m3;
use crate::processes::ion_lotz::ionization_cross_sections_cm2;
use crate::processes::molecular_ionization::additivity_cross_section_cm2;
use crate::solve::evolve;

/// Where a dissociated molecular ion's charge goes: (element, charge of its atomic ion,
/// share of the molecule's ionizations), shares summing to 1. From the atomic-ion entries
/// of the bundled fragmentation pattern, else by atom count at charge 1 (see the module
/// documentation).
pub fn dissociation_shares(molecule: &Molecule) -> Result<Vec<(&'static Element, u32, f64)>> {
    let mut out: Vec<(&'static Element, u32, f64)> = Vec::new();
    for entry in molecule.pattern().unwrap_or(&[]) {
        if entry.charge == 0 || entry.relative_intensity <= 0.0 {
            continue;
        }
        if let Substance::Atom(sp) = parse_substance(&entry.ion)? {
            let el = sp.element();
            match out
                .iter_mut()
                .find(|(e, q, _)| e.z() == el.z() && *q == entry.charge)
            {
                Some(slot) => slot.2 += entry.relative_intensity,
                None => out.push((el, entry.charge, entry.relative_intensity)),
            }
        }
    }
    if out.is_empty() {
        for part in molecule.formula().parts() {
            match out.iter_mut().find(|(e, _, _)| e.z() == part.element.z()) {
                Some(slot) => slot.2 += f64::from(part.count),
                None => out.push((part.element, 1, f64::from(part.count))),
            }
        }
    }
    let total: f64 = out.iter().map(|(_, _, w)| w).sum();
    for slot in &mut out {
        slot.2 /= total;
    }
    Ok(out)
}

/// Atomic ions of one element and charge born per second from the trap's gases.
#[derive(Clone, Debug)]
pub struct GasIonProduction {
    pub element: &'static Element,
    pub charge: u32,
    pub per_s: f64,
}

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
    /// Molecules (or noble-gas atoms) of `component` ionized per second in the beam volume,
    /// R = n V (j/e) σ, with the additivity cross section for a molecule and `atom_sigma_cm2`
    /// for an atom.
    pub fn gas_ionizations_per_s(
        &self,
        component: &GasComponent,
        atom_sigma_cm2: &dyn Fn(&'static Element) -> Result<f64>,
    ) -> Result<f64> {
        let volume_cm3 =
            std::f64::consts::PI * (self.beam.radius_m * 100.0).powi(2) * self.length_m * 100.0;
        let flux = self.beam.electron_flux_per_cm2_s();
        let n_cm3 = gas_number_density_m3(component.pressure_pa, self.gas_temperature_k) * 1e-6;
        let sigma = match component.gas.as_molecule() {
            Some(m) => additivity_cross_section_cm2(&m, self.beam.energy_ev)?,
            None => {
                let (symbol, _) = component.gas.atoms.first().copied().unwrap_or(("", 0));
                atom_sigma_cm2(crate::atoms::element(symbol)?)?
            }
        };
        Ok(n_cm3 * volume_cm3 * flux * sigma)
    }

    /// Atomic ions born per second from `gases` (each molecule ionized, its ion
    /// dissociated by [`dissociation_shares`]), merged by element and charge in the order
    /// they first appear.
    pub fn gas_ion_production(
        &self,
        gases: &[GasComponent],
        atom_sigma_cm2: &dyn Fn(&'static Element) -> Result<f64>,
    ) -> Result<Vec<GasIonProduction>> {
        let mut out: Vec<GasIonProduction> = Vec::new();
        for component in gases {
            let rate = self.gas_ionizations_per_s(component, atom_sigma_cm2)?;
            let shares = match component.gas.as_molecule() {
                Some(m) => dissociation_shares(&m)?,
                None => {
                    let (symbol, _) = component.gas.atoms.first().copied().unwrap_or(("", 0));
                    vec![(crate::atoms::element(symbol)?, 1, 1.0)]
                }
            };
            for (el, charge, share) in shares {
                match out
                    .iter_mut()
                    .find(|p| p.element.z() == el.z() && p.charge == charge)
                {
                    Some(slot) => slot.per_s += rate * share,
                    None => out.push(GasIonProduction {
                        element: el,
                        charge,
                        per_s: rate * share,
                    }),
                }
            }
        }
        Ok(out)
    }

    /// The fixed model's atomic cross section: the neutral atom's Lotz single ionization.
    fn lotz_sigma_cm2(&self, el: &'static Element) -> Result<f64> {
        Ok(ionization_cross_sections_cm2(el, 0, &[self.beam.energy_ev], self.lotz_constants)?[0])
    }

    /// Ions of each residual-gas element made per second in the beam volume (all charges),
    /// in the order the elements first appear in the gas list.
    pub fn residual_production_per_s(&self) -> Result<Vec<(&'static Element, f64)>> {
        let mut out: Vec<(&'static Element, f64)> = Vec::new();
        for p in self.gas_ion_production(&self.residual_gas, &|el| self.lotz_sigma_cm2(el))? {
            match out.iter_mut().find(|(e, _)| e.z() == p.element.z()) {
                Some(slot) => slot.1 += p.per_s,
                None => out.push((p.element, p.per_s)),
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
        let production =
            self.gas_ion_production(&self.residual_gas, &|el| self.lotz_sigma_cm2(el))?;
        let mut out: Vec<ResidualIons> = Vec::new();
        for p in production {
            // The network is linear in its feed: each charge's feed is evolved on its own
            // and the populations added.
            trap.feed = Some((p.charge, p.per_s));
            let net = trap.network(p.element)?;
            let zeros = vec![0.0; net.n_states()];
            let pops = evolve(&net, &zeros, &[breeding_time_s])?;
            let symbol = p.element.symbol();
            match out.iter_mut().find(|r| r.symbol == symbol) {
                Some(r) => {
                    r.production_per_s += p.per_s;
                    for (a, b) in r.per_charge.iter_mut().zip(pops.row(0)) {
                        *a += b;
                    }
                }
                None => out.push(ResidualIons {
                    symbol: symbol.to_string(),
                    production_per_s: p.per_s,
                    per_charge: pops.row(0).to_vec(),
                }),
            }
        }
        Ok(out)
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

    #[test]
    fn a_molecule_s_ions_follow_its_fragmentation_pattern() {
        // data/fragments.csv (NIST Chemistry WebBook EI spectra, from memory): CO gives
        // C⁺ 4.5 and O⁺ 1.7 (parent 100), so its atomic ions split 4.5 : 1.7; the total is
        // n V (j/e) σ_additivity, σ_additivity = σ_C + σ_O (Otvos & Stevenson 1956) with the
        // neutral atoms' Lotz cross sections.
        let t = trap(&[("CO", 1e-8)]);
        let prod = t.residual_production_per_s().unwrap();
        let symbols: Vec<&str> = prod.iter().map(|(e, _)| e.symbol()).collect();
        assert_eq!(symbols, ["C", "O"]);
        assert!((prod[0].1 / prod[1].1 - 4.5 / 1.7).abs() < 1e-12);
        let lotz = |s: &str| {
            crate::processes::ion_lotz::ionization_cross_sections_cm2(
                crate::atoms::element(s).unwrap(),
                0,
                &[5000.0],
                None,
            )
            .unwrap()[0]
        };
        let n_cm3 = 1e-8 / (1.380649e-23 * 300.0) * 1e-6;
        let v_cm3 = std::f64::consts::PI * 0.01f64.powi(2) * 50.0;
        let flux = 0.2 / (std::f64::consts::PI * 0.01f64.powi(2)) / 1.602176634e-19;
        let total = n_cm3 * v_cm3 * flux * (lotz("C") + lotz("O"));
        assert!(((prod[0].1 + prod[1].1) / total - 1.0).abs() < 1e-12);
        // N₂: only N⁺ in its pattern, so every ionization gives one N⁺ (no "N2" element).
        let n2 = trap(&[("N2", 1e-8)]).residual_ions(1e-3).unwrap();
        assert_eq!(n2.len(), 1);
        assert_eq!(n2[0].symbol, "N");
    }

    #[test]
    fn dissociation_shares_sum_to_one_and_fall_back_to_atom_counts() {
        use super::dissociation_shares;
        use crate::atoms::Molecule;
        // CH4 in data/fragments.csv: C⁺ 3, H⁺ 3 are its atomic ions.
        let ch4 = dissociation_shares(&Molecule::parse("CH4").unwrap()).unwrap();
        let got: Vec<(&str, u32, f64)> = ch4.iter().map(|(e, q, w)| (e.symbol(), *q, *w)).collect();
        assert_eq!(got, [("C", 1, 0.5), ("H", 1, 0.5)]);
        // OH has no bundled pattern: shared by atom count.
        let oh = dissociation_shares(&Molecule::parse("OH").unwrap()).unwrap();
        assert_eq!(oh.len(), 2);
        assert!(oh
            .iter()
            .all(|(_, q, w)| *q == 1 && (*w - 0.5).abs() < 1e-15));
        let c2h6 = dissociation_shares(&Molecule::parse("C2H6").unwrap()).unwrap();
        assert!((c2h6[0].2 - 0.25).abs() < 1e-15 && (c2h6[1].2 - 0.75).abs() < 1e-15);
        for f in ["H2", "N2", "O2", "CO", "CO2", "H2O", "NH3"] {
            let s = dissociation_shares(&Molecule::parse(f).unwrap()).unwrap();
            assert!(
                (s.iter().map(|x| x.2).sum::<f64>() - 1.0).abs() < 1e-14,
                "{f}"
            );
        }
    }
}
