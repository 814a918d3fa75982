//! Atoms and ions: embedded tables, element lookup, ion configurations, subshell binding
//! energies ([`binding`]) and isotopes.
//!
//! Data (embedded from `data/` at build time, each file with a provenance header):
//! successive ionization energies and ground configurations from the NIST Atomic Spectra
//! Database (A. Kramida, Yu. Ralchenko, J. Reader and NIST ASD Team; via mendeleev),
//! complete for Z = 1–103 and partial to 110; neutral-atom X-ray levels, edge jump ratios,
//! fluorescence and Coster–Kronig yields and photoabsorption from Elam, Ravel & Sieber,
//! Radiat. Phys. Chem. 63, 121 (2002) and Krause & Oliver (1979) (via xraydb, Z = 1–98);
//! isotope masses from AME2020 (M. Wang et al., Chin. Phys. C 45, 030003 (2021)) and IUPAC
//! abundances (via mendeleev); half-lives and decay channels of radioactive nuclides (via
//! mendeleev, see [`decay`]).

pub mod binding;
pub mod decay;
mod element;
mod isotope;
mod molecule;
mod species;
mod subshell;
pub(crate) mod table;
mod xray;

pub use decay::{Decay, DecayMode};
pub use element::{all_elements, element, element_by_z, Element, EnergyKind};
pub use isotope::Isotope;
pub use molecule::{
    bundled_molecules, bundled_pattern, isotopologue_ion_mass_u, Isotopologue, Molecule,
    MoleculeData, PatternEntry,
};
pub use species::{
    isotope_label, molecule_not_atom, parse_species, parse_substance, resolve_isotope,
    split_species, Formula, FormulaPart, Species, Substance, MAX_FORMULA_ATOMS,
};
pub use subshell::{Configuration, Subshell};
pub use xray::{edge_binding_ev, neutral_photoabsorption, XrayLevel};

/// An occupied subshell of an ion with its binding energy.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ShellState {
    pub subshell: Subshell,
    pub occupancy: u32,
    pub binding_ev: f64,
}

/// One charge state of an element (0 = neutral, Z = bare).
#[derive(Clone, Copy, Debug)]
pub struct Ion {
    pub element: &'static Element,
    pub charge: u32,
}

impl Ion {
    /// Ground configuration of this ion.
    pub fn configuration(&self) -> Configuration {
        self.element
            .configuration(self.charge)
            .cloned()
            .unwrap_or_default()
    }

    /// Occupied subshells with occupancy and binding energy (eV), inner first.
    pub fn subshells(&self) -> &'static [ShellState] {
        self.element.shells_of(self.charge)
    }

    /// The subshell that loses an electron in the step to charge + 1 (None for the bare ion).
    pub fn ionized_subshell(&self) -> Option<Subshell> {
        let next = self.element.configuration(self.charge + 1)?;
        let this = self.element.configuration(self.charge)?;
        subshell::ionized_subshell(this, next)
    }

    /// Energy to go from this charge to the next (None for the bare ion).
    pub fn ionization_energy_ev(&self) -> Option<f64> {
        self.element
            .ionization_energies_ev()
            .get(self.charge as usize)
            .copied()
    }

    /// Energy to make this ion from the neutral atom: the sum of the ionization energies below it.
    pub fn threshold_ev(&self) -> f64 {
        self.element.ionization_energies_ev()[..self.charge as usize]
            .iter()
            .sum()
    }

    /// Outermost occupied shell (n, electrons in it); (1, 0) for a bare ion.
    pub fn valence_shell(&self) -> (u32, u32) {
        self.element
            .configuration(self.charge)
            .map_or((1, 0), |c| c.valence_shell())
    }

    /// Bound electrons.
    pub fn electrons(&self) -> u32 {
        self.element.z() - self.charge
    }

    /// Binding energy of one subshell of this ion, if occupied.
    pub fn binding_ev(&self, subshell: Subshell) -> Option<f64> {
        self.subshells()
            .iter()
            .find(|s| s.subshell == subshell)
            .map(|s| s.binding_ev)
    }

    /// Label such as "Kr8+".
    pub fn label(&self) -> String {
        format!("{}{}+", self.element.symbol(), self.charge)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ar(q: i64) -> Ion {
        element("Ar").unwrap().ion(q).unwrap()
    }

    #[test]
    fn ionized_subshell_is_bound_by_its_ionization_energy() {
        for q in 0..18 {
            let ion = ar(q);
            let s = ion.ionized_subshell().unwrap();
            assert_eq!(ion.binding_ev(s), ion.ionization_energy_ev());
        }
    }

    #[test]
    fn planning_check_values_for_argon() {
        // The binding-energy rule (atoms::binding) worked by hand while planning:
        // Ar+ 3s ≈ 38 eV, Ar8+ 1s ≈ 3366 eV.
        let b3s = ar(1).binding_ev(Subshell::new(3, 0)).unwrap();
        assert!((b3s - 38.0).abs() < 1.5, "{b3s}");
        let b1s = ar(8).binding_ev(Subshell::new(1, 0)).unwrap();
        assert!((b1s - 3366.0).abs() < 10.0, "{b1s}");
    }

    #[test]
    fn threshold_is_the_sum_of_lower_ionization_energies() {
        let ion = ar(3);
        let ies = ion.element.ionization_energies_ev();
        assert_eq!(ion.threshold_ev(), ies[0] + ies[1] + ies[2]);
        assert_eq!(ar(0).threshold_ev(), 0.0);
    }

    #[test]
    fn bare_ion_has_no_subshells() {
        let ion = ar(18);
        assert!(ion.subshells().is_empty());
        assert_eq!(ion.ionized_subshell(), None);
        assert_eq!(ion.valence_shell(), (1, 0));
    }
}
