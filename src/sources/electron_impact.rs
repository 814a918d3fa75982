//! The single-collision electron-impact source of a mass spectrometer:
//! each neutral atom meets at most one electron, so the charge states it forms are those one
//! collision can make.
//!
//! Partial cross section for charge c ≥ 1 at electron energy E:
//!
//!   σ_c(E) = Σ_s σ_s^Lotz(E) · P_s(c − 1) + δ_{c,2} · σ₂^direct(E) + δ_{c,3} · σ₃^direct(E)
//!
//! * σ_s^Lotz: Lotz ionization of subshell s of the neutral atom ([`crate::processes::lotz`],
//!   fitted constants where held, simplified elsewhere), with the subshell binding energies
//!   of [`crate::atoms::binding`];
//! * P_s(k): relaxation of the hole in s ([`crate::processes::relaxation`]) — an outer hole
//!   stays (k = 0), an inner hole whose binding exceeds the double-ionization threshold can
//!   add charges;
//! * σ₂^direct, σ₃^direct: direct double and triple ionization
//!   ([`crate::processes::double_ionization`]).
//!
//! Each σ_c is zero below its threshold Σ_{j<c} IE_j (the relaxation obeys the energy bound).
//! A spread of electron energies (Gaussian, FWHM) is folded in by averaging σ_c over it.
//! The relaxation includes shake-off and double Auger decay, and σ₃^direct is added, unless
//! the source's [`Relaxation`] switches the multi-electron channels off (then the results
//! are those of the one-electron cascade and σ₂^direct alone).
//! Not included: direct quadruple and higher ionization, excitation–autoionization.
//!
//! # Molecules
//!
//! [`ElectronImpactSource::molecule_yields`]: one collision with a molecule makes its parent
//! ion or a fragment ion. The total counting cross section is the additivity rule of
//! [`crate::processes::molecular_ionization`] (averaged over the energy spread), split by a
//! fragmentation pattern: the bundled 70 eV pattern of `data/fragments.csv` (NIST Chemistry
//! WebBook EI spectra, from memory, 20–60 % per ion) or the user's. Without either, every
//! ionization gives the parent ion. Fragments of an isotopically labelled parent ("13CO")
//! keep its isotopes where an element has only one.
//!
//! The sum Σ_s σ_s P_s(c − 1) is [`crate::processes::vacancy_jumps`].
//!
//! # Accuracy (measured)
//!
//! The single-ionization total is Lotz's: 0.94–1.24 times the measured totals of Ar, Kr and
//! Xe at 100–200 eV, 1.9–3.0 for Ne (Rapp & Englander-Golden 1965, from memory; see
//! [`crate::processes::lotz`]). σ(2+)/σ(1+) at 100 eV: Ar 0.046, Kr 0.109, Xe 0.21 against
//! measured 0.055 (Straub et al. 1995), 0.075 and 0.17 (Rejoub, Lindsay & Stebbings 2002),
//! measured values from memory (`tests/photon.rs`). Every partial cross section vanishes
//! below its threshold (tested for Kr at 5 eV steps to 2 keV).

use ndarray::Array2;
use rayon::prelude::*;

use crate::atoms::{parse_substance, Element, Formula, Molecule, Substance};
use crate::error::{require_all_positive, require_non_negative, require_positive, Error, Result};
use crate::processes::double_ionization::{
    direct_double_ionization_cm2, direct_triple_ionization_cm2,
};
use crate::processes::ion_lotz::ion_lotz_shells;
use crate::processes::lotz::lotz_subshell_cross_section_cm2;
use crate::processes::molecular_ionization::additivity_cross_section_cm2;
use crate::processes::relaxation::Relaxation;
use crate::processes::vacancy_jumps::vacancy_jumps;
use crate::sources::photon_beam::gaussian_nodes;

/// Partial cross sections of one collision with the neutral atom, by route; index = final
/// charge 0…Z (index 0 is always 0).
#[derive(Clone, Debug, PartialEq)]
pub struct ImpactCrossSections {
    /// Single ionization of a subshell followed by relaxation (cm²).
    pub subshell_ionization_cm2: Vec<f64>,
    /// Direct double ionization (cm²), non-zero at charge 2 only.
    pub direct_double_cm2: Vec<f64>,
    /// Direct triple ionization (cm²), non-zero at charge 3 only.
    pub direct_triple_cm2: Vec<f64>,
}

impl ImpactCrossSections {
    fn zeros(n: usize) -> Self {
        Self {
            subshell_ionization_cm2: vec![0.0; n],
            direct_double_cm2: vec![0.0; n],
            direct_triple_cm2: vec![0.0; n],
        }
    }

    /// Sum of both routes per charge (cm²).
    pub fn total_cm2(&self) -> Vec<f64> {
        self.subshell_ionization_cm2
            .iter()
            .zip(&self.direct_double_cm2)
            .zip(&self.direct_triple_cm2)
            .map(|((a, b), c)| a + b + c)
            .collect()
    }

    fn add_scaled(&mut self, other: &Self, weight: f64) {
        for (a, b) in self
            .subshell_ionization_cm2
            .iter_mut()
            .zip(&other.subshell_ionization_cm2)
        {
            *a += weight * b;
        }
        for (a, b) in self
            .direct_double_cm2
            .iter_mut()
            .zip(&other.direct_double_cm2)
        {
            *a += weight * b;
        }
        for (a, b) in self
            .direct_triple_cm2
            .iter_mut()
            .zip(&other.direct_triple_cm2)
        {
            *a += weight * b;
        }
    }
}

/// Partial cross sections at one electron energy (no spread), the vacancies relaxing
/// through `relaxation`'s channels (with the multi-electron channels, direct triple
/// ionization too).
pub fn impact_cross_sections_at(
    element: &'static Element,
    energy_ev: f64,
    relaxation: Relaxation,
) -> Result<ImpactCrossSections> {
    let neutral = element.ion(0)?;
    let n = element.z() as usize + 1;
    let lotz_per_subshell = neutral
        .subshells()
        .iter()
        .zip(ion_lotz_shells(&neutral, None))
        .map(|(state, lotz)| {
            (
                state.subshell,
                lotz_subshell_cross_section_cm2(&lotz, energy_ev),
            )
        });
    let mut out = ImpactCrossSections::zeros(n);
    out.subshell_ionization_cm2 =
        vacancy_jumps(&neutral, relaxation, energy_ev, lotz_per_subshell)?;
    if let Some(slot) = out.direct_double_cm2.get_mut(2) {
        *slot = direct_double_ionization_cm2(&neutral, energy_ev);
    }
    if let Some(slot) = out
        .direct_triple_cm2
        .get_mut(3)
        .filter(|_| relaxation.multi_electron)
    {
        *slot = direct_triple_ionization_cm2(&neutral, energy_ev);
    }
    Ok(out)
}

/// An electron-impact source in which every atom meets at most one electron: electron
/// energy (eV) and Gaussian energy spread (FWHM, eV; 0 = monoenergetic).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ElectronImpactSource {
    pub energy_ev: f64,
    pub energy_spread_ev: f64,
    /// Relaxation channels (all by default; off also drops direct triple ionization).
    pub relaxation: Relaxation,
}

impl ElectronImpactSource {
    /// A validated source: energy > 0, spread ≥ 0, both finite.
    pub fn new(energy_ev: f64, energy_spread_ev: f64) -> Result<Self> {
        require_positive("energy_ev", energy_ev)?;
        require_non_negative("energy_spread_ev", energy_spread_ev)?;
        Ok(Self {
            energy_ev,
            energy_spread_ev,
            relaxation: Relaxation::default(),
        })
    }

    /// The same source with `relaxation`'s channels.
    pub fn with_relaxation(mut self, relaxation: Relaxation) -> Self {
        self.relaxation = relaxation;
        self
    }

    /// Partial cross sections averaged over the energy spread.
    pub fn cross_sections(&self, element: &'static Element) -> Result<ImpactCrossSections> {
        let me = Self::new(self.energy_ev, self.energy_spread_ev)?;
        spread_cross_sections(element, me.energy_ev, me.energy_spread_ev, self.relaxation)
    }

    /// Relative yields of each final charge 0…Z (index 0 is 0) for one collision with the
    /// neutral atom; they sum to 1, or are all 0 below the first ionization energy.
    pub fn charge_yields(&self, element: &'static Element) -> Result<Vec<f64>> {
        let total = self.cross_sections(element)?.total_cm2();
        let sum: f64 = total.iter().sum();
        Ok(if sum > 0.0 {
            total.iter().map(|s| s / sum).collect()
        } else {
            total
        })
    }
}

/// One ion that a collision with a molecule makes.
#[derive(Clone, Debug, PartialEq)]
pub struct FragmentYield {
    /// The ion's species string ("CO", "O", "(13C)O"), as the species parser reads it.
    pub ion: String,
    pub charge: u32,
    /// Partial cross section (cm²).
    pub cross_section_cm2: f64,
    /// Share of all ions made (sums to 1 over the fragments, or all 0 below threshold).
    pub share: f64,
    /// Relative uncertainty of the pattern entry (NaN for a user pattern).
    pub relative_uncertainty: f64,
}

/// The ions one collision with a molecule makes, at the source's energy.
#[derive(Clone, Debug, PartialEq)]
pub struct MoleculeYields {
    pub molecule: String,
    /// Total counting ionization cross section (cm²).
    pub total_cm2: f64,
    pub fragments: Vec<FragmentYield>,
    /// Where the pattern comes from.
    pub pattern_source: String,
}

/// A fragment of `parent` as its species string, with the parent's isotopes where an element
/// of the parent is all one isotope; checked to hold no more atoms than the parent.
fn fragment_of(parent: &Formula, ion: &str, charge: u32) -> Result<String> {
    let (composition, label) = match parse_substance(ion)? {
        Substance::Molecule(f) => (f.composition(), f.label()),
        Substance::Atom(a) => {
            let e = a.element();
            (
                std::iter::once((e.z(), 1)).collect(),
                ion.trim().to_string(),
            )
        }
    };
    let parent_atoms = parent.composition();
    let electrons: u32 = composition.iter().map(|(z, n)| z * n).sum();
    for (z, n) in &composition {
        if parent_atoms.get(z).is_none_or(|m| m < n) {
            return Err(Error::invalid(
                "pattern",
                format!("{ion:?}"),
                &format!("a fragment of {} holds only atoms of it", parent.label()),
            ));
        }
    }
    if charge < 1 || charge > electrons {
        return Err(Error::invalid(
            "pattern",
            format!("{ion:?} at charge {charge}"),
            &format!("charges of {ion} are 1..={electrons}"),
        ));
    }
    // Carry a single isotope of the parent over to the fragment.
    let mut out = String::new();
    let mut relabelled = false;
    for (z, n) in &composition {
        let of_z: Vec<_> = parent
            .parts()
            .iter()
            .filter(|p| p.element.z() == *z)
            .collect();
        let symbol = of_z.first().map_or("?", |p| p.element.symbol());
        match of_z.as_slice() {
            [one] if one.mass_number.is_some() => {
                relabelled = true;
                out.push_str(&format!("({}{symbol})", one.mass_number.unwrap_or(0)));
            }
            _ => out.push_str(symbol),
        }
        if *n > 1 {
            out.push_str(&n.to_string());
        }
    }
    Ok(if relabelled { out } else { label })
}

impl ElectronImpactSource {
    /// Parent and fragment ions of one collision with `molecule`. `pattern`: the user's
    /// (ion, charge, relative intensity) list; None takes the bundled pattern, or the parent
    /// ion alone when none is bundled.
    pub fn molecule_yields(
        &self,
        molecule: &Molecule,
        pattern: Option<&[(String, u32, f64)]>,
    ) -> Result<MoleculeYields> {
        let me = Self::new(self.energy_ev, self.energy_spread_ev)?;
        let mut total_cm2 = 0.0;
        for (e, w) in gaussian_nodes(me.energy_ev, me.energy_spread_ev) {
            total_cm2 += w * additivity_cross_section_cm2(molecule, e)?;
        }
        let parent = molecule.formula();
        let (entries, pattern_source): (Vec<(String, u32, f64, f64)>, String) = match pattern {
            Some(p) => (
                p.iter()
                    .map(|(i, q, r)| (i.clone(), *q, *r, f64::NAN))
                    .collect(),
                "user pattern".into(),
            ),
            None => match molecule.pattern() {
                Some(b) => (
                    b.iter()
                        .map(|e| {
                            (
                                e.ion.clone(),
                                e.charge,
                                e.relative_intensity,
                                e.relative_uncertainty,
                            )
                        })
                        .collect(),
                    b.first().map_or_else(String::new, |e| e.source.clone()),
                ),
                None => (
                    vec![(parent.label(), 1, 1.0, f64::NAN)],
                    "no pattern bundled: parent ion only".into(),
                ),
            },
        };
        if entries.is_empty() {
            return Err(Error::invalid(
                "pattern",
                "[]",
                "give at least one (ion, charge, relative intensity)",
            ));
        }
        let mut sum = 0.0;
        for (_, _, r, _) in &entries {
            require_non_negative("relative intensity in the pattern", *r)?;
            sum += r;
        }
        if sum <= 0.0 || !sum.is_finite() {
            return Err(Error::invalid(
                "pattern",
                sum,
                "the relative intensities must have a positive, finite sum",
            ));
        }
        let mut fragments = Vec::with_capacity(entries.len());
        for (ion, charge, r, unc) in entries {
            let share = if total_cm2 > 0.0 { r / sum } else { 0.0 };
            fragments.push(FragmentYield {
                ion: fragment_of(parent, &ion, charge)?,
                charge,
                cross_section_cm2: total_cm2 * r / sum,
                share,
                relative_uncertainty: unc,
            });
        }
        Ok(MoleculeYields {
            molecule: molecule.label(),
            total_cm2,
            fragments,
            pattern_source,
        })
    }
}

fn spread_cross_sections(
    element: &'static Element,
    energy_ev: f64,
    spread_ev: f64,
    relaxation: Relaxation,
) -> Result<ImpactCrossSections> {
    let mut out = ImpactCrossSections::zeros(element.z() as usize + 1);
    for (e, w) in gaussian_nodes(energy_ev, spread_ev) {
        out.add_scaled(&impact_cross_sections_at(element, e, relaxation)?, w);
    }
    Ok(out)
}

/// Appearance curves: total partial cross section (cm²) of each final charge 0…Z at each
/// electron energy, `[energies, Z+1]`, averaged over a Gaussian spread (FWHM, eV).
pub fn appearance_curves(
    element: &'static Element,
    energies_ev: &[f64],
    energy_spread_ev: f64,
) -> Result<Array2<f64>> {
    appearance_curves_with(
        element,
        energies_ev,
        energy_spread_ev,
        Relaxation::default(),
    )
}

/// [`appearance_curves`] with `relaxation`'s channels.
pub fn appearance_curves_with(
    element: &'static Element,
    energies_ev: &[f64],
    energy_spread_ev: f64,
    relaxation: Relaxation,
) -> Result<Array2<f64>> {
    require_all_positive("energies_ev", energies_ev)?;
    require_non_negative("energy_spread_ev", energy_spread_ev)?;
    let n = element.z() as usize + 1;
    // The rows and the matrix built from them: twice energies × (Z+1) values.
    let what = "the appearance curves";
    crate::limits::check_memory(
        what,
        crate::limits::bytes_for(&[2, energies_ev.len(), n], 8),
    )?;
    let rows: Vec<Result<Vec<f64>>> = crate::interrupt::run_polled(|| {
        energies_ev
            .par_iter()
            .map(|&e| {
                crate::interrupt::check()?;
                Ok(spread_cross_sections(element, e, energy_spread_ev, relaxation)?.total_cm2())
            })
            .collect()
    });
    let mut out = crate::limits::try_zeros(what, energies_ev.len(), n)?;
    for (i, row) in rows.into_iter().enumerate() {
        for (j, v) in row?.into_iter().enumerate() {
            out[[i, j]] = v;
        }
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::atoms::element;

    #[test]
    fn nothing_below_the_first_ionization_energy() {
        let ar = element("Ar").unwrap();
        let y = ElectronImpactSource::new(15.0, 0.0)
            .unwrap()
            .charge_yields(ar)
            .unwrap();
        assert!(y.iter().all(|v| *v == 0.0));
        let y = ElectronImpactSource::new(30.0, 0.0)
            .unwrap()
            .charge_yields(ar)
            .unwrap();
        assert_eq!(y[1], 1.0);
    }

    #[test]
    fn spread_smears_the_threshold() {
        let ar = element("Ar").unwrap();
        let sharp = ElectronImpactSource::new(15.5, 0.0)
            .unwrap()
            .cross_sections(ar)
            .unwrap();
        let smeared = ElectronImpactSource::new(15.5, 1.0)
            .unwrap()
            .cross_sections(ar)
            .unwrap();
        assert_eq!(sharp.total_cm2()[1], 0.0);
        assert!(smeared.total_cm2()[1] > 0.0);
        assert!(ElectronImpactSource::new(70.0, -1.0).is_err());
        assert!(ElectronImpactSource::new(0.0, 0.0).is_err());
    }

    #[test]
    fn molecules_give_parent_and_fragment_ions() {
        let src = ElectronImpactSource::new(70.0, 0.5).unwrap();
        let co2 = Molecule::parse("CO2").unwrap();
        let y = src.molecule_yields(&co2, None).unwrap();
        let shares: f64 = y.fragments.iter().map(|f| f.share).sum();
        assert!((shares - 1.0).abs() < 1e-12);
        let parent = &y.fragments[0];
        assert_eq!((parent.ion.as_str(), parent.charge), ("CO2", 1));
        assert!(
            parent.share > 0.7 && parent.share < 0.85,
            "{}",
            parent.share
        );
        assert!(y.fragments.iter().any(|f| f.ion == "CO2" && f.charge == 2));
        // Isotopes of a labelled parent carry over to the fragments.
        let labelled = src
            .molecule_yields(&Molecule::parse("13CO").unwrap(), None)
            .unwrap();
        assert!(
            labelled.fragments.iter().any(|f| f.ion == "(13C)"),
            "{labelled:?}"
        );
        // A user pattern; fragments must be parts of the parent.
        let user = vec![("CO".to_string(), 1, 3.0), ("O".to_string(), 1, 1.0)];
        let y = src.molecule_yields(&co2, Some(&user)).unwrap();
        assert!((y.fragments[0].share - 0.75).abs() < 1e-12);
        assert!(src
            .molecule_yields(&co2, Some(&[("N2".to_string(), 1, 1.0)]))
            .is_err());
        assert!(src
            .molecule_yields(&co2, Some(&[("CO".to_string(), 0, 1.0)]))
            .is_err());
        assert!(src
            .molecule_yields(&co2, Some(&[("CO".to_string(), 1, -1.0)]))
            .is_err());
        assert!(src.molecule_yields(&co2, Some(&[])).is_err());
        // Below the molecule's ionization energy nothing forms.
        let low = ElectronImpactSource::new(13.0, 0.0)
            .unwrap()
            .molecule_yields(&co2, None)
            .unwrap();
        assert!(low.total_cm2 == 0.0 && low.fragments.iter().all(|f| f.share == 0.0));
        // No bundled pattern: the parent alone.
        let y = src
            .molecule_yields(&Molecule::parse("C2H6").unwrap(), None)
            .unwrap();
        assert_eq!(y.fragments.len(), 1);
    }

    #[test]
    fn appearance_curves_shape() {
        let ne = element("Ne").unwrap();
        let m = appearance_curves(ne, &[20.0, 100.0, 2000.0], 0.0).unwrap();
        assert_eq!(m.shape(), &[3, 11]);
        assert_eq!(m[[0, 1]], 0.0);
        assert!(m[[1, 2]] > 0.0);
        assert!(appearance_curves(ne, &[-1.0], 0.0).is_err());
    }
}
