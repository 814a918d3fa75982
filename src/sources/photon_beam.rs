//! Photon beams: VUV lamps and lasers that ionize selectively, synchrotron and X-ray
//! free-electron beams that strip atoms through their inner shells.
//!
//! An ion of charge q absorbs a photon in subshell s at the rate Φ·σ_{s,q}(hν)
//! ([`crate::processes::photoionization`]); the vacancy then relaxes
//! ([`crate::processes::relaxation`]) and the ion ends at charge q + 1 + k with probability
//! P_s(k). The jump rates q → q+1+k go into a [`RateNetwork`], so the charge state builds up
//! photon by photon under high flux:
//!
//!   rate(q → q+1+k) = Σ_s Φ·σ̄_{s,q} · P_s(k)   ([`crate::processes::vacancy_jumps`]),
//!
//! with σ̄ the cross section averaged over a Gaussian bandwidth (41 nodes over ±4 standard
//! deviations, [`gaussian_nodes`]). One photon from the neutral atom can make charge c
//! only if Σ_{j<c} IE_j ≤ hν ([`photon_thresholds`]).
//!
//! # Validity and accuracy
//!
//! Linear (one-photon) absorption by ions at rest, an unattenuated beam. Not included:
//! direct multiple photoionization (shake-off, a few per cent of single photoionization;
//! from memory), non-linear (multi-photon) absorption below threshold, resonant excitation,
//! and the depletion of the beam in the target. Accuracy is that of its parts: the
//! photoionization tables (within 10 % of Elam et al. 2002 above 100 eV, a factor of several
//! for the hydrogenic model below; [`crate::processes::photoionization`]) and the cascade
//! (mean charge after an Ar K hole 4.09 against about 4 measured;
//! [`crate::processes::relaxation`]). Checked: no rate below the first ionization energy,
//! one-photon yields sum to 1, and a 150 eV beam leaves neon at Ne⁵⁺ (the Ne⁵⁺ → Ne⁶⁺ step
//! needs 157.9 eV, NIST ASD).

use ndarray::Array2;
use rayon::prelude::*;

use crate::atoms::{Element, Subshell};
use crate::error::{require_non_negative, require_positive, Error, Result};
use crate::network::RateNetwork;
use crate::processes::photoionization::subshell_cross_sections_cm2;
use crate::processes::relaxation::{vacancy_relaxation_with, Relaxation};
use crate::processes::vacancy_jumps::{nonzero_jumps, vacancy_jumps};
use crate::solve::{evolve, steady_state};

/// FWHM of a Gaussian in units of its standard deviation, 2√(2 ln 2).
pub const FWHM_PER_SIGMA: f64 = 2.354_820_045_030_949;

/// Quadrature of a Gaussian spectrum of full width at half maximum `fwhm_ev` around
/// `centre_ev`: (energy, weight) pairs with weights summing to 1, energies > 0 only.
/// 41 equally spaced nodes over ±4 standard deviations resolve thresholds inside the band.
pub fn gaussian_nodes(centre_ev: f64, fwhm_ev: f64) -> Vec<(f64, f64)> {
    if fwhm_ev.is_nan() || fwhm_ev <= 0.0 {
        return vec![(centre_ev, 1.0)];
    }
    const NODES: usize = 41;
    let sigma = fwhm_ev / FWHM_PER_SIGMA;
    let nodes: Vec<(f64, f64)> = (0..NODES)
        .map(|i| {
            let x = -4.0 + 8.0 * i as f64 / (NODES - 1) as f64;
            (centre_ev + x * sigma, (-0.5 * x * x).exp())
        })
        .collect();
    let total: f64 = nodes.iter().map(|n| n.1).sum();
    nodes
        .into_iter()
        .filter(|n| n.0 > 0.0)
        .map(|(e, w)| (e, w / total))
        .collect()
}

/// A photon beam: photon energy (eV), flux (photons cm⁻² s⁻¹) and Gaussian bandwidth
/// (FWHM, eV; 0 = monochromatic).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PhotonBeam {
    pub photon_energy_ev: f64,
    pub flux_cm2_s: f64,
    pub bandwidth_ev: f64,
    /// Relaxation channels of the vacancies the photons make (all by default).
    pub relaxation: Relaxation,
}

impl PhotonBeam {
    /// A validated beam: photon energy > 0, flux ≥ 0, bandwidth ≥ 0, all finite.
    pub fn new(photon_energy_ev: f64, flux_cm2_s: f64, bandwidth_ev: f64) -> Result<Self> {
        require_positive("photon_energy_ev", photon_energy_ev)?;
        require_non_negative("flux_cm2_s", flux_cm2_s)?;
        require_non_negative("bandwidth_ev", bandwidth_ev)?;
        Ok(Self {
            photon_energy_ev,
            flux_cm2_s,
            bandwidth_ev,
            relaxation: Relaxation::default(),
        })
    }

    /// The same beam with the vacancies relaxing through `relaxation`'s channels.
    pub fn with_relaxation(mut self, relaxation: Relaxation) -> Self {
        self.relaxation = relaxation;
        self
    }

    fn validated(&self) -> Result<Self> {
        Ok(
            Self::new(self.photon_energy_ev, self.flux_cm2_s, self.bandwidth_ev)?
                .with_relaxation(self.relaxation),
        )
    }

    /// Photoionization cross section (cm²) of each occupied subshell of ion `charge`,
    /// averaged over the beam's spectrum.
    pub fn subshell_cross_sections_cm2(
        &self,
        element: &'static Element,
        charge: u32,
    ) -> Result<Vec<(Subshell, f64)>> {
        let ion = element.ion(i64::from(charge))?;
        let mut out: Vec<(Subshell, f64)> =
            ion.subshells().iter().map(|s| (s.subshell, 0.0)).collect();
        for (e, w) in gaussian_nodes(self.photon_energy_ev, self.bandwidth_ev) {
            for (slot, s) in out.iter_mut().zip(subshell_cross_sections_cm2(&ion, e)?) {
                slot.1 += w * s.cross_section_cm2;
            }
        }
        Ok(out)
    }

    /// Jump rates (s⁻¹) out of ion `charge`: (final charge, rate), photoionization of every
    /// subshell followed by relaxation.
    pub fn jumps_from(&self, element: &'static Element, charge: u32) -> Result<Vec<(u32, f64)>> {
        let ion = element.ion(i64::from(charge))?;
        let rates_per_subshell = self
            .subshell_cross_sections_cm2(element, charge)?
            .into_iter()
            .map(|(subshell, sigma)| (subshell, self.flux_cm2_s * sigma));
        Ok(nonzero_jumps(vacancy_jumps(
            &ion,
            self.relaxation,
            self.photon_energy_ev,
            rates_per_subshell,
        )?))
    }

    /// Charge-state fractions [times, Z+1] of atoms that start as `initial_charge` at t = 0.
    pub fn evolve(
        &self,
        element: &'static Element,
        times_s: &[f64],
        initial_charge: u32,
    ) -> Result<Array2<f64>> {
        element.check_charge(i64::from(initial_charge), element.z())?;
        let net = photon_network(element, self, None)?;
        let mut initial = vec![0.0; net.n_states()];
        initial[initial_charge as usize] = 1.0;
        evolve(&net, &initial, times_s)
    }

    /// Long-time charge-state fractions of atoms that start neutral. Photons only raise the
    /// charge, so this is where the ladder ends: the probabilities of being absorbed in each
    /// charge state that no photon of this beam can ionize further.
    pub fn steady_state(&self, element: &'static Element) -> Result<Vec<f64>> {
        let net = photon_network(element, self, None)?;
        let mut p = vec![0.0; net.n_states()];
        p[0] = 1.0;
        for q in 0..net.n_states() {
            let out = net.total_out_rate_per_s(q);
            if out > 0.0 && p[q] > 0.0 {
                let here = p[q];
                p[q] = 0.0;
                for (to, r) in net.rates_from(q).iter().enumerate() {
                    if let Some(slot) = p.get_mut(to) {
                        *slot += here * r / out;
                    }
                }
            }
        }
        Ok(p)
    }

    /// Steady state of the photon rates added to another network (losses, feeds,
    /// recombination), e.g. a trap's.
    pub fn steady_state_with(
        &self,
        element: &'static Element,
        extra: &RateNetwork,
    ) -> Result<Vec<f64>> {
        steady_state(&photon_network(element, self, Some(extra))?)
    }
}

/// The rate network of `element` under `beam`: states 0…Z, jump rates q → q+1+k. With
/// `extra`, the photon rates are added to a copy of that network (same number of states).
pub fn photon_network(
    element: &'static Element,
    beam: &PhotonBeam,
    extra: Option<&RateNetwork>,
) -> Result<RateNetwork> {
    let beam = beam.validated()?;
    if !element.is_complete() {
        return Err(Error::NoData {
            what: format!("photon network of {}", element.symbol()),
            why: "the ionization-energy chain is incomplete above Z = 103".into(),
        });
    }
    let z = element.z();
    let n = z as usize + 1;
    let mut net = match extra {
        Some(other) if other.n_states() != n => {
            return Err(Error::invalid(
                "extra",
                format!("a network of {} states", other.n_states()),
                &format!("must have Z + 1 = {n} states for {}", element.symbol()),
            ))
        }
        Some(other) => other.clone(),
        None => RateNetwork::new(n)?,
    };
    if beam.flux_cm2_s == 0.0 {
        return Ok(net);
    }
    // Heavy elements take seconds here (a cascade per subshell per charge): poll for Ctrl-C
    // between charges.
    let jumps: Vec<Result<Vec<(u32, f64)>>> = crate::interrupt::run_polled(|| {
        (0..z)
            .into_par_iter()
            .map(|q| {
                crate::interrupt::check()?;
                beam.jumps_from(element, q)
            })
            .collect()
    });
    for (q, row) in jumps.into_iter().enumerate() {
        for (to, rate) in row? {
            net.add_rate(q, to as usize, rate)?;
        }
    }
    Ok(net)
}

/// One way a photon makes a given charge from the neutral atom: photoionization of
/// `subshell` followed by relaxation, with the probability of ending at that charge.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ThresholdRoute {
    pub subshell: Subshell,
    pub binding_ev: f64,
    pub probability: f64,
}

/// A charge state one photon can make from the neutral atom.
#[derive(Clone, Debug, PartialEq)]
pub struct ChargeThreshold {
    pub charge: u32,
    /// Σ_{j<charge} IE_j: the least photon energy that can make this charge (eV).
    pub threshold_ev: f64,
    /// Photoionization of a subshell plus relaxation that lead here (empty where only direct
    /// multiple photoionization, which the rate model leaves out, is energetically open).
    pub routes: Vec<ThresholdRoute>,
    /// Fraction of the photons absorbed by the neutral atom that end at this charge:
    /// Σ_s σ_s P_s(charge − 1) / Σ_s σ_s.
    pub yield_per_photon: f64,
}

/// Every charge state one photon of `photon_energy_ev` can make from the neutral atom:
/// those with Σ IE ≤ hν (direct multiple photoionization is energetically open), each with
/// the subshells whose photoionization and relaxation end there.
pub fn photon_thresholds(
    element: &'static Element,
    photon_energy_ev: f64,
) -> Result<Vec<ChargeThreshold>> {
    photon_thresholds_with(element, photon_energy_ev, Relaxation::default())
}

/// [`photon_thresholds`] with the vacancies relaxing through `relaxation`'s channels.
pub fn photon_thresholds_with(
    element: &'static Element,
    photon_energy_ev: f64,
    relaxation: Relaxation,
) -> Result<Vec<ChargeThreshold>> {
    require_positive("photon_energy_ev", photon_energy_ev)?;
    let neutral = element.ion(0)?;
    let ies = element.ionization_energies_ev();
    let mut out = Vec::new();
    let mut threshold = 0.0;
    for (q, ie) in ies.iter().enumerate() {
        threshold += ie;
        if threshold > photon_energy_ev {
            break;
        }
        out.push(ChargeThreshold {
            charge: q as u32 + 1,
            threshold_ev: threshold,
            routes: Vec::new(),
            yield_per_photon: 0.0,
        });
    }
    let sigma = subshell_cross_sections_cm2(&neutral, photon_energy_ev)?;
    let total: f64 = sigma.iter().map(|s| s.cross_section_cm2).sum();
    let absorbs = total.is_finite() && total > 0.0;
    if !absorbs && !out.is_empty() {
        // Far above every edge the cross section falls below the smallest f64: no photon
        // is absorbed in the model, so there are no yields to share out.
        return Err(Error::invalid(
            "photon_energy_ev",
            photon_energy_ev,
            &format!(
                "the photoionization cross section of {} is {total} cm² there (below the                  range of 64-bit floats); use a photon energy nearer the physical range",
                element.symbol()
            ),
        ));
    }
    let per_charge_cm2 = vacancy_jumps(
        &neutral,
        relaxation,
        photon_energy_ev,
        sigma.iter().map(|s| (s.subshell, s.cross_section_cm2)),
    )?;
    for entry in out.iter_mut() {
        if total > 0.0 {
            entry.yield_per_photon = per_charge_cm2[entry.charge as usize] / total;
        }
    }
    // The routes: which open subshells relax to each charge, and how probably.
    for (s, sig) in neutral.subshells().iter().zip(&sigma) {
        if sig.cross_section_cm2.is_nan() || sig.cross_section_cm2 <= 0.0 {
            continue;
        }
        let yields = vacancy_relaxation_with(&neutral, s.subshell, relaxation, photon_energy_ev)?;
        for (k, &p) in yields.iter().enumerate() {
            if let Some(entry) = out.get_mut(k).filter(|_| p > 0.0) {
                entry.routes.push(ThresholdRoute {
                    subshell: s.subshell,
                    binding_ev: s.binding_ev,
                    probability: p,
                });
            }
        }
    }
    Ok(out)
}

/// Whether one photon ionizes an element: the selectivity of a VUV source.
#[derive(Clone, Debug, PartialEq)]
pub struct Selectivity {
    pub symbol: String,
    pub first_ionization_ev: f64,
    pub ionizes: bool,
    /// Highest charge one photon can make (Σ IE ≤ hν); 0 if none.
    pub max_charge: u32,
    /// Photoionization cross section of the neutral atom at hν (cm²).
    pub cross_section_cm2: f64,
}

/// For each element, whether a photon of `photon_energy_ev` ionizes the neutral atom.
pub fn photon_selectivity(
    elements: &[&'static Element],
    photon_energy_ev: f64,
) -> Result<Vec<Selectivity>> {
    require_positive("photon_energy_ev", photon_energy_ev)?;
    elements
        .iter()
        .map(|el| {
            let ies = el.ionization_energies_ev();
            let first = ies.first().copied().ok_or_else(|| Error::NoData {
                what: format!("ionization energies of {}", el.symbol()),
                why: "not tabulated".into(),
            })?;
            let mut sum = 0.0;
            let max_charge = ies
                .iter()
                .take_while(|ie| {
                    sum += *ie;
                    sum <= photon_energy_ev
                })
                .count() as u32;
            let ion = el.ion(0)?;
            let cross_section_cm2 =
                crate::processes::photoionization::photoionization_cross_section_cm2(
                    &ion,
                    photon_energy_ev,
                )?;
            Ok(Selectivity {
                symbol: el.symbol().to_string(),
                first_ionization_ev: first,
                ionizes: first <= photon_energy_ev,
                max_charge,
                cross_section_cm2,
            })
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::atoms::element;

    #[test]
    fn rejects_bad_beams() {
        assert!(PhotonBeam::new(0.0, 1e10, 0.0).is_err());
        assert!(PhotonBeam::new(-5.0, 1e10, 0.0).is_err());
        assert!(PhotonBeam::new(100.0, -1.0, 0.0).is_err());
        assert!(PhotonBeam::new(100.0, 1.0, -0.1).is_err());
        assert!(PhotonBeam::new(f64::NAN, 1.0, 0.0).is_err());
    }

    #[test]
    fn gaussian_nodes_are_normalised() {
        let nodes = gaussian_nodes(100.0, 5.0);
        let sum: f64 = nodes.iter().map(|n| n.1).sum();
        assert!((sum - 1.0).abs() < 1e-12);
        let mean: f64 = nodes.iter().map(|n| n.0 * n.1).sum();
        assert!((mean - 100.0).abs() < 1e-9);
        assert_eq!(gaussian_nodes(7.0, 0.0), vec![(7.0, 1.0)]);
    }

    #[test]
    fn vuv_photon_below_first_ie_does_nothing() {
        let ar = element("Ar").unwrap();
        let beam = PhotonBeam::new(15.0, 1e18, 0.0).unwrap();
        let net = photon_network(ar, &beam, None).unwrap();
        assert_eq!(net.total_out_rate_per_s(0), 0.0);
        assert!(photon_thresholds(ar, 15.0).unwrap().is_empty());
        let sel = photon_selectivity(&[ar, element("Xe").unwrap()], 15.0).unwrap();
        assert!(!sel[0].ionizes && sel[1].ionizes);
    }

    #[test]
    fn steady_state_ends_where_photons_stop() {
        let ne = element("Ne").unwrap();
        // 150 eV: Ne ionizes stepwise until the step energy passes 150 eV (Ne5+ → Ne6+ needs 157.9 eV).
        let beam = PhotonBeam::new(150.0, 1e20, 0.0).unwrap();
        let p = beam.steady_state(ne).unwrap();
        assert!((p.iter().sum::<f64>() - 1.0).abs() < 1e-12);
        assert!(p[5] > 0.99, "{p:?}");
    }
}
