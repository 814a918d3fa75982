//! Sources: turn a source description (electron-beam trap, photon beam, single-collision
//! electron-impact source, plasma source) into per-charge rates and rate networks
//! ([`crate::network::RateNetwork`]), which [`crate::solve`] evolves.

pub mod beam_trap;
pub mod breeding;
pub mod electron_beam;
pub mod electron_impact;
pub mod energy_map;
pub mod photon_beam;
pub mod plasma;
pub mod residual_gas;
pub mod rib_cycle;
pub mod trap_dynamics;
pub mod uncertainty;

use ndarray::Array2;

use crate::atoms::Element;
use crate::error::{Error, Result};
use energy_map::{energy_time_map_with_progress, EnergyTimeMap};

pub use beam_trap::BeamTrap;
pub use electron_beam::ElectronBeam;
pub use electron_impact::{appearance_curves, ElectronImpactSource};
pub use photon_beam::PhotonBeam;
pub use plasma::PlasmaSource;

/// One of the core sources, as a scenario builds it. Each variant is named like the
/// scenario table, the module and the class stem of its source.
#[derive(Clone, Debug)]
pub enum Source {
    BeamTrap(BeamTrap),
    PhotonBeam(PhotonBeam),
    ElectronImpact(ElectronImpactSource),
    Plasma(PlasmaSource),
}

impl Source {
    /// The scenario table, module and class stem of the source ("beam_trap", …).
    pub fn kind(&self) -> &'static str {
        match self {
            Source::BeamTrap(_) => "beam_trap",
            Source::PhotonBeam(_) => "photon_beam",
            Source::ElectronImpact(_) => "electron_impact",
            Source::Plasma(_) => "plasma",
        }
    }

    /// Charge-state populations [T, Z+1] of atoms entering as `initial_charge`, for the
    /// sources that hold ions over time (a single collision has no time evolution).
    pub fn evolve(
        &self,
        element: &'static Element,
        times_s: &[f64],
        initial_charge: u32,
    ) -> Result<Array2<f64>> {
        match self {
            Source::BeamTrap(t) => t.evolve(element, times_s, initial_charge),
            Source::PhotonBeam(p) => p.evolve(element, times_s, initial_charge),
            Source::Plasma(p) => p.evolve(element, times_s, initial_charge),
            Source::ElectronImpact(_) => Err(Error::invalid(
                "source",
                "electron_impact",
                "a single-collision source has no time evolution: use its charge yields",
            )),
        }
    }

    /// The same source at another beam energy (electron or photon energy, eV; for a plasma
    /// the cold electron temperature kT_e, eV).
    pub fn with_energy(&self, energy_ev: f64) -> Result<Source> {
        Ok(match self {
            Source::BeamTrap(t) => Source::BeamTrap(t.with_energy(energy_ev)?),
            Source::PhotonBeam(p) => {
                Source::PhotonBeam(PhotonBeam::new(energy_ev, p.flux_cm2_s, p.bandwidth_ev)?)
            }
            Source::ElectronImpact(s) => {
                Source::ElectronImpact(ElectronImpactSource::new(energy_ev, s.energy_spread_ev)?)
            }
            Source::Plasma(p) => Source::Plasma(p.with_energy(energy_ev)?),
        })
    }

    /// The summed fraction of the `targets` charge states of atoms that start neutral over
    /// a beam-energy × time grid, and its maximum; `progress(done, total)` counts energies.
    pub fn energy_time_map(
        &self,
        element: &'static Element,
        targets: &[u32],
        energies_ev: &[f64],
        times_s: &[f64],
        progress: &mut dyn FnMut(usize, usize),
    ) -> Result<EnergyTimeMap> {
        // The grid is named as the source's own entry point names it, for error messages.
        let name = match self {
            Source::PhotonBeam(_) => "photon_energies_ev",
            Source::Plasma(_) => "electron_temperatures_ev",
            _ => "energies_ev",
        };
        energy_time_map_with_progress(
            element,
            targets,
            name,
            energies_ev,
            times_s,
            |e| self.with_energy(e)?.evolve(element, times_s, 0),
            progress,
        )
    }
}
