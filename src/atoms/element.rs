//! Elements: lookup by symbol, name or Z, successive ionization energies, ground
//! configurations of every ion and the data of the neutral atom's X-ray levels.

use std::sync::OnceLock;

use super::binding::ion_shell_bindings;
use super::isotope::Isotope;
use super::subshell::{ionized_subshell, Configuration, Subshell};
use super::table::{self, parse_f64, parse_u32};
use super::xray::XrayLevel;
use super::{Ion, ShellState};
use crate::error::{Error, Result};

/// How a tabulated ionization energy was obtained (NIST ASD flags).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum EnergyKind {
    Experimental,
    SemiEmpirical,
    Theoretical,
}

impl EnergyKind {
    pub fn label(&self) -> &'static str {
        match self {
            EnergyKind::Experimental => "experimental",
            EnergyKind::SemiEmpirical => "semi_empirical",
            EnergyKind::Theoretical => "theoretical",
        }
    }
}

/// One chemical element with everything the tables hold about it.
#[derive(Debug)]
pub struct Element {
    z: u32,
    symbol: String,
    name: String,
    atomic_weight_u: f64,
    /// Energy of step q → q+1 for q = 0 … (contiguous from the neutral).
    ionization_energies_ev: Vec<f64>,
    uncertainties_ev: Vec<f64>,
    kinds: Vec<EnergyKind>,
    /// Ground configuration of charge q; one more entry than ionization energies when
    /// the chain reaches the bare ion.
    configurations: Vec<Configuration>,
    /// Occupied subshells with binding energies per charge state (complete chains only).
    ion_shells: Vec<Vec<ShellState>>,
    pub(crate) xray_levels: Vec<XrayLevel>,
    pub(crate) coster_kronig: Vec<(String, String, f64)>,
    isotopes: Vec<Isotope>,
}

impl Element {
    pub fn z(&self) -> u32 {
        self.z
    }
    pub fn symbol(&self) -> &str {
        &self.symbol
    }
    pub fn name(&self) -> &str {
        &self.name
    }
    /// Standard atomic weight (u).
    pub fn atomic_weight_u(&self) -> f64 {
        self.atomic_weight_u
    }
    /// Energy to go from charge q to q+1 for every tabulated step (length Z when complete).
    pub fn ionization_energies_ev(&self) -> &[f64] {
        &self.ionization_energies_ev
    }
    pub fn ionization_uncertainties_ev(&self) -> &[f64] {
        &self.uncertainties_ev
    }
    pub fn ionization_energy_kinds(&self) -> &[EnergyKind] {
        &self.kinds
    }
    /// True when ionization energies exist for every step up to the bare ion.
    pub fn is_complete(&self) -> bool {
        self.ionization_energies_ev.len() == self.z as usize
    }
    /// Highest charge state with a known configuration.
    pub fn max_charge_with_data(&self) -> Option<u32> {
        (self.configurations.len() as u32).checked_sub(1)
    }
    /// Isotopes with masses (and natural abundances where they occur naturally).
    pub fn isotopes(&self) -> &[Isotope] {
        &self.isotopes
    }
    /// Naturally occurring isotopes, most abundant first.
    pub fn natural_isotopes(&self) -> Vec<&Isotope> {
        let mut v: Vec<&Isotope> = self
            .isotopes
            .iter()
            .filter(|i| i.abundance.is_some())
            .collect();
        v.sort_by(|a, b| {
            b.abundance
                .partial_cmp(&a.abundance)
                .unwrap_or(std::cmp::Ordering::Equal)
        });
        v
    }
    pub fn isotope(&self, mass_number: u32) -> Result<&Isotope> {
        self.isotopes
            .iter()
            .find(|i| i.mass_number == mass_number)
            .ok_or_else(|| Error::NoData {
                what: format!("isotope {mass_number}{}", self.symbol),
                why: format!(
                    "known mass numbers of {} are {}..={}",
                    self.symbol,
                    self.isotopes.first().map_or(0, |i| i.mass_number),
                    self.isotopes.last().map_or(0, |i| i.mass_number)
                ),
            })
    }
    /// The X-ray levels of the neutral atom (empty above Z = 98).
    pub fn xray_levels(&self) -> &[XrayLevel] {
        &self.xray_levels
    }
    /// Coster–Kronig probabilities (initial edge, final edge, probability).
    pub fn coster_kronig(&self) -> &[(String, String, f64)] {
        &self.coster_kronig
    }

    /// The ion of charge `charge` (0 = neutral … Z = bare).
    pub fn ion(&'static self, charge: i64) -> Result<Ion> {
        self.check_charge(charge, self.z)?;
        let q = charge as u32;
        if q as usize >= self.configurations.len() || self.ion_shells.len() <= q as usize {
            return Err(Error::NoData {
                what: format!("{}{}+", self.symbol, q),
                why: format!(
                    "the ionization-energy tables for {} are incomplete (known steps: 0..{}); subshell data need the whole chain",
                    self.symbol,
                    self.ionization_energies_ev.len()
                ),
            });
        }
        Ok(Ion {
            element: self,
            charge: q,
        })
    }

    /// Error unless 0 ≤ charge ≤ max.
    pub fn check_charge(&self, charge: i64, max: u32) -> Result<()> {
        if charge < 0 || charge > max as i64 {
            return Err(Error::ChargeOutOfRange {
                symbol: self.symbol.clone(),
                z: self.z,
                charge,
                max,
            });
        }
        Ok(())
    }

    pub(crate) fn push_isotope(&mut self, isotope: Isotope) {
        self.isotopes.push(isotope);
    }
    pub(crate) fn configuration(&self, charge: u32) -> Option<&Configuration> {
        self.configurations.get(charge as usize)
    }
    pub(crate) fn shells_of(&self, charge: u32) -> &[ShellState] {
        self.ion_shells
            .get(charge as usize)
            .map_or(&[], |v| v.as_slice())
    }
}

/// Every element of the tables, parsed once.
pub fn all_elements() -> Result<&'static [Element]> {
    static TABLE: OnceLock<Result<Vec<Element>>> = OnceLock::new();
    match TABLE.get_or_init(build_elements) {
        Ok(v) => Ok(v.as_slice()),
        Err(e) => Err(e.clone()),
    }
}

/// Look an element up by symbol ("Kr"; any case where no formula could be meant, see
/// [`super::species`]), name ("krypton", any case) or atomic number ("36").
pub fn element(query: &str) -> Result<&'static Element> {
    let elements = all_elements()?;
    let q = query.trim();
    let unknown = || Error::UnknownElement {
        given: query.to_string(),
        max_z: elements.len() as u32,
    };
    if let Ok(z) = q.parse::<i64>() {
        return element_by_z(z).map_err(|_| unknown());
    }
    // The one species parser decides, so a formula ("CO") never resolves to an element.
    match super::species::parse_substance(q) {
        Ok(super::species::Substance::Atom(super::species::Species::Natural(e))) => Ok(e),
        Ok(super::species::Substance::Atom(super::species::Species::Isotope(..))) => Err(unknown()),
        Ok(super::species::Substance::Molecule(f)) => {
            Err(super::species::molecule_not_atom(query, &f))
        }
        Err(e) => Err(e),
    }
}

/// Look an element up by atomic number.
pub fn element_by_z(z: i64) -> Result<&'static Element> {
    let elements = all_elements()?;
    usize::try_from(z)
        .ok()
        .and_then(|z| z.checked_sub(1))
        .and_then(|i| elements.get(i))
        .ok_or_else(|| Error::UnknownElement {
            given: z.to_string(),
            max_z: elements.len() as u32,
        })
}

fn build_elements() -> Result<Vec<Element>> {
    let mut elements: Vec<Element> = Vec::new();
    for row in table::rows(
        "elements.csv",
        table::ELEMENTS_CSV,
        &["z", "symbol", "name", "atomic_weight_u"],
    )? {
        let z = parse_u32("elements.csv", row[0])?;
        if z as usize != elements.len() + 1 {
            return Err(table::corrupt(
                "elements.csv",
                format!("Z = {z} out of order"),
            ));
        }
        elements.push(Element {
            z,
            symbol: row[1].to_string(),
            name: row[2].to_string(),
            atomic_weight_u: parse_f64("elements.csv", row[3])?,
            ionization_energies_ev: Vec::new(),
            uncertainties_ev: Vec::new(),
            kinds: Vec::new(),
            configurations: Vec::new(),
            ion_shells: Vec::new(),
            xray_levels: Vec::new(),
            coster_kronig: Vec::new(),
            isotopes: Vec::new(),
        });
    }
    read_ionization_energies(&mut elements)?;
    super::xray::read_levels(&mut elements)?;
    super::isotope::read_isotopes(&mut elements)?;
    for e in elements.iter_mut() {
        e.ion_shells = shells_for(e);
    }
    Ok(elements)
}

fn read_ionization_energies(elements: &mut [Element]) -> Result<()> {
    const NAME: &str = "ionization_energies.csv";
    let columns = [
        "z",
        "charge",
        "ionization_energy_ev",
        "uncertainty_ev",
        "kind",
        "ground_shells",
    ];
    for row in table::rows(NAME, table::IONIZATION_CSV, &columns)? {
        let z = parse_u32(NAME, row[0])?;
        let charge = parse_u32(NAME, row[1])?;
        let e = elements
            .get_mut(z as usize - 1)
            .ok_or_else(|| table::corrupt(NAME, format!("Z = {z} not in elements.csv")))?;
        // Keep the contiguous chain from the neutral; later gaps (Z > 103) end it.
        if charge as usize != e.ionization_energies_ev.len() {
            continue;
        }
        let kind = match row[4] {
            "experimental" => EnergyKind::Experimental,
            "semi_empirical" => EnergyKind::SemiEmpirical,
            "theoretical" => EnergyKind::Theoretical,
            other => return Err(table::corrupt(NAME, format!("kind {other:?}"))),
        };
        let config =
            Configuration::parse(row[5]).map_err(|err| table::corrupt(NAME, err.to_string()))?;
        if config.electrons() != z - charge {
            return Err(table::corrupt(
                NAME,
                format!(
                    "Z = {z} charge {charge}: configuration has {} electrons",
                    config.electrons()
                ),
            ));
        }
        e.ionization_energies_ev.push(parse_f64(NAME, row[2])?);
        e.uncertainties_ev.push(parse_f64(NAME, row[3])?);
        e.kinds.push(kind);
        e.configurations.push(config);
    }
    for e in elements.iter_mut() {
        if e.is_complete() {
            e.configurations.push(Configuration::default());
        }
    }
    Ok(())
}

/// Subshell binding energies of every charge state ([`super::binding`]), for complete chains.
fn shells_for(e: &Element) -> Vec<Vec<ShellState>> {
    if !e.is_complete() {
        return Vec::new();
    }
    let ionized: Vec<Subshell> = e
        .configurations
        .windows(2)
        .map(|w| {
            ionized_subshell(&w[0], &w[1])
                .or_else(|| w[0].shells().last().map(|(s, _)| *s))
                .unwrap_or(Subshell::new(1, 0))
        })
        .collect();
    ion_shell_bindings(
        &e.configurations,
        &ionized,
        &e.ionization_energies_ev,
        &|s: Subshell| super::xray::edge_binding_ev(&e.xray_levels, s),
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lookup_by_symbol_name_and_number() {
        assert_eq!(element("kr").unwrap().z(), 36);
        assert_eq!(element("Krypton").unwrap().z(), 36);
        assert_eq!(element(" 36 ").unwrap().symbol(), "Kr");
        assert_eq!(element_by_z(92).unwrap().symbol(), "U");
        assert!(matches!(
            element("Kryptonite"),
            Err(Error::UnknownElement { .. })
        ));
        assert!(element_by_z(0).is_err());
        assert!(element_by_z(-3).is_err());
        assert!(element_by_z(1000).is_err());
    }

    #[test]
    fn chains_are_complete_to_lawrencium() {
        for z in 1..=103 {
            let e = element_by_z(z).unwrap();
            assert!(e.is_complete(), "{}", e.symbol());
            assert_eq!(e.max_charge_with_data(), Some(z as u32));
        }
    }

    #[test]
    fn charge_out_of_range_is_an_error() {
        let ar = element("Ar").unwrap();
        assert!(matches!(ar.ion(19), Err(Error::ChargeOutOfRange { .. })));
        assert!(matches!(ar.ion(-1), Err(Error::ChargeOutOfRange { .. })));
        assert!(ar.ion(18).is_ok());
    }

    #[test]
    fn incomplete_chains_have_no_subshell_data() {
        let ds = element("Ds").unwrap();
        assert!(matches!(ds.ion(0), Err(Error::NoData { .. })));
    }
}
