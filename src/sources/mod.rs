//! Sources: turn a source description (electron-beam trap, photon beam, single-collision
//! electron-impact source) into per-charge rates and rate networks
//! ([`crate::network::RateNetwork`]), which [`crate::solve`] evolves.

pub mod beam_trap;
pub mod breeding;
pub mod electron_beam;
pub mod electron_impact;
pub mod energy_map;
pub mod photon_beam;
pub mod scenario;

pub use beam_trap::BeamTrap;
pub use electron_beam::ElectronBeam;
pub use electron_impact::ElectronImpactSource;
pub use photon_beam::PhotonBeam;
