//! The checked scenario: every field of the file with its defaults filled in, and the core
//! source its settings describe ([`SourceSettings::build`]).

use std::collections::BTreeMap;

use crate::atoms::{element, Element};
use crate::error::Result;
use crate::sources::beam_trap::{Processes, TrapModel};
use crate::sources::electron_beam::BeamSize;
use crate::sources::plasma::{PlasmaSettings, PlasmaSource};
use crate::sources::rib_cycle::BreedingCycle;
use crate::sources::trap_dynamics::DynamicsSwitches;
use crate::sources::{BeamTrap, ElectronBeam, ElectronImpactSource, PhotonBeam, Source};

/// The target ion: one isotope at one charge state.
#[derive(Clone, Debug, PartialEq)]
pub struct Target {
    /// Isotope label, mass number first ("129Xe").
    pub isotope: String,
    pub symbol: String,
    pub z: u32,
    pub mass_number: u32,
    pub charge: u32,
}

impl Target {
    /// The target ion's label, e.g. "129Xe43+".
    pub fn label(&self) -> String {
        format!("{}{}+", self.isotope, self.charge)
    }

    pub fn element(&self) -> &'static Element {
        element(&self.symbol).expect("the checker resolved the target element")
    }
}

/// One species put into the source.
#[derive(Clone, Debug, PartialEq)]
pub struct SpeciesEntry {
    /// "Xe" for the natural isotopic mix, "129Xe" for one isotope.
    pub name: String,
    pub symbol: String,
    pub z: u32,
    pub mass_number: Option<u32>,
    /// Relative amount (any unit; only ratios matter).
    pub amount: f64,
    /// Charge state in which it enters the source (0 = neutral atoms).
    pub initial_charge: u32,
}

impl SpeciesEntry {
    pub fn element(&self) -> &'static Element {
        element(&self.symbol).expect("the checker resolved every species")
    }
}

/// Electron-beam trap settings; exactly one of radius, current density or field sizes the beam.
#[derive(Clone, Debug, PartialEq)]
pub struct BeamTrapSettings {
    pub energy_ev: f64,
    pub current_a: f64,
    pub radius_m: Option<f64>,
    pub current_density_a_cm2: Option<f64>,
    pub magnetic_field_t: Option<f64>,
    pub cathode_radius_m: Option<f64>,
    pub cathode_temperature_k: Option<f64>,
    pub cathode_field_t: f64,
    pub length_m: f64,
    pub ion_temperature_ev: f64,
    pub gas_temperature_k: f64,
    pub compensation: f64,
    pub processes: Vec<String>,
    /// Drift-tube radius (m): when given, the report's robust optimum also states the
    /// tube-to-cathode voltage that puts it on the beam axis after the space-charge
    /// depression.
    pub drift_tube_radius_m: Option<f64>,
    /// The ion model by name, one of [`TrapModel::NAMES`] ("fixed" by default).
    pub model: String,
    /// Dynamic model only: axial barrier (V); None: the model's default.
    pub axial_barrier_v: Option<f64>,
    /// Dynamic model only: neutral gases fed continuously (formula, Pa).
    pub gas_feed_pa: Vec<(String, f64)>,
    /// Dynamic model only: the dynamic processes that are on (None: the model's default).
    pub dynamic_processes: Option<Vec<String>>,
    /// Dynamic model only: atoms of all species injected into the beam at t = 0 (None:
    /// [`super::defaults::default_injected_atoms`]).
    pub injected_atoms: Option<f64>,
}

impl BeamTrapSettings {
    /// The electron beam: the one place where the beam-size fields choose the model
    /// (radius, current density, Brillouin radius, or Herrmann radius with the cathode).
    pub fn beam(&self) -> Result<ElectronBeam> {
        let size = BeamSize::from_fields(
            self.radius_m,
            self.current_density_a_cm2,
            self.magnetic_field_t,
            self.cathode_radius_m,
            self.cathode_temperature_k,
            self.magnetic_field_t.map(|_| self.cathode_field_t),
        )?;
        ElectronBeam::new(self.energy_ev, self.current_a, size)
    }

    fn processes(&self) -> Result<Processes> {
        Processes::from_names(&self.processes)
    }

    /// Whether the trap runs the ion-dynamics model.
    pub fn is_dynamic(&self) -> bool {
        self.model == TrapModel::NAMES[1]
    }

    /// The core trap with the scenario's residual gas, built by the core's validating
    /// builder (which also refuses dynamic settings with the fixed model). With the fixed
    /// model the drift-tube radius only serves the report's tube voltage.
    pub fn build(&self, residual_gas_pa: &[(String, f64)]) -> Result<BeamTrap> {
        let mut b = BeamTrap::builder(self.beam()?, self.length_m)
            .residual_gas_pa(residual_gas_pa.to_vec())
            .ion_temperature_ev(self.ion_temperature_ev)
            .gas_temperature_k(self.gas_temperature_k)
            .compensation(self.compensation)
            .processes(self.processes()?)
            .model(&self.model);
        if self.is_dynamic() {
            if let Some(tube) = self.drift_tube_radius_m {
                b = b.drift_tube_radius_m(tube);
            }
            if let Some(v) = self.axial_barrier_v {
                b = b.axial_barrier_v(v);
            }
            b = b.gas_feed_pa(self.gas_feed_pa.clone());
            if let Some(names) = &self.dynamic_processes {
                b = b.dynamic_processes(DynamicsSwitches::from_names(names)?);
            }
        } else {
            if !self.gas_feed_pa.is_empty() {
                b = b.gas_feed_pa(self.gas_feed_pa.clone());
            }
            if let Some(v) = self.axial_barrier_v {
                b = b.axial_barrier_v(v);
            }
            if let Some(names) = &self.dynamic_processes {
                b = b.dynamic_processes(DynamicsSwitches::from_names(names)?);
            }
        }
        b.build()
    }
}

/// Photon-beam settings.
#[derive(Clone, Debug, PartialEq)]
pub struct PhotonBeamSettings {
    pub photon_energy_ev: f64,
    pub flux_cm2_s: f64,
    /// Gaussian bandwidth (FWHM, eV); None: monochromatic.
    pub bandwidth_ev: Option<f64>,
}

/// Single-collision electron-impact source settings.
#[derive(Clone, Debug, PartialEq)]
pub struct ElectronImpactSettings {
    pub energy_ev: f64,
    pub energy_spread_ev: f64,
}

/// The source of a scenario.
#[derive(Clone, Debug, PartialEq)]
// One value per scenario, matched by reference everywhere: boxing the larger trap
// settings would save a few hundred bytes once and cost every match a deref.
#[allow(clippy::large_enum_variant)]
pub enum SourceSettings {
    BeamTrap(BeamTrapSettings),
    PhotonBeam(PhotonBeamSettings),
    ElectronImpact(ElectronImpactSettings),
    /// The plasma source's own settings (the core struct; its residual gas is the
    /// scenario's `[residual_gas_pa]`, filled in by [`SourceSettings::build`]).
    Plasma(PlasmaSettings),
}

/// The source tables of the schema, in the order the documentation lists them.
pub const SOURCE_KINDS: [&str; 4] = ["beam_trap", "photon_beam", "electron_impact", "plasma"];

impl SourceSettings {
    /// The table name that holds these settings in the file (also the module and class
    /// stem of the core source).
    pub fn kind(&self) -> &'static str {
        match self {
            SourceSettings::BeamTrap(_) => SOURCE_KINDS[0],
            SourceSettings::PhotonBeam(_) => SOURCE_KINDS[1],
            SourceSettings::ElectronImpact(_) => SOURCE_KINDS[2],
            SourceSettings::Plasma(_) => SOURCE_KINDS[3],
        }
    }

    /// The beam energy the source runs at (electron or photon energy, eV; for a plasma the
    /// cold electron temperature kT_e, eV).
    pub fn energy_ev(&self) -> f64 {
        match self {
            SourceSettings::BeamTrap(t) => t.energy_ev,
            SourceSettings::PhotonBeam(p) => p.photon_energy_ev,
            SourceSettings::ElectronImpact(s) => s.energy_ev,
            SourceSettings::Plasma(p) => p.electron_temperature_ev,
        }
    }

    /// The core source these settings describe; every range is checked by the source's
    /// own constructor.
    pub fn build(&self, residual_gas_pa: &[(String, f64)]) -> Result<Source> {
        Ok(match self {
            SourceSettings::BeamTrap(t) => Source::BeamTrap(t.build(residual_gas_pa)?),
            SourceSettings::PhotonBeam(p) => Source::PhotonBeam(PhotonBeam::new(
                p.photon_energy_ev,
                p.flux_cm2_s,
                p.bandwidth_ev.unwrap_or(0.0),
            )?),
            SourceSettings::ElectronImpact(s) => {
                Source::ElectronImpact(ElectronImpactSource::new(s.energy_ev, s.energy_spread_ev)?)
            }
            SourceSettings::Plasma(p) => {
                let mut settings = p.clone();
                settings.residual_gas_pa = residual_gas_pa.to_vec();
                Source::Plasma(PlasmaSource::new(settings)?)
            }
        })
    }
}

/// Confinement-time grid (log-spaced) and the time of extraction.
#[derive(Clone, Debug, PartialEq)]
pub struct TimeGrid {
    pub start_s: f64,
    pub stop_s: f64,
    pub points: usize,
    /// None: extract when the target charge state peaks.
    pub extraction_s: Option<f64>,
}

impl TimeGrid {
    /// The grid's times (s), log-spaced from start to stop.
    pub fn times_s(&self) -> Vec<f64> {
        geomspace(self.start_s, self.stop_s, self.points)
    }
}

/// Grid of beam (electron or photon) energies for the best-energy search.
#[derive(Clone, Debug, PartialEq)]
pub struct EnergyGrid {
    pub start_ev: f64,
    pub stop_ev: f64,
    pub points: usize,
    pub log: bool,
}

impl EnergyGrid {
    /// The grid's energies (eV), log- or linearly spaced.
    pub fn energies_ev(&self) -> Vec<f64> {
        if self.log {
            geomspace(self.start_ev, self.stop_ev, self.points)
        } else {
            linspace(self.start_ev, self.stop_ev, self.points)
        }
    }
}

/// The mass separator after the source.
#[derive(Clone, Debug, PartialEq)]
pub struct Separator {
    pub resolving_power: f64,
    pub peak_shape: String,
    pub aq_half_width: Option<f64>,
    pub relative_half_width: Option<f64>,
    pub window_fwhm: f64,
    pub aq_range: Option<(f64, f64)>,
}

/// The `[uncertainty]` table: how many samples, the seed, and the core's factors.
#[derive(Clone, Debug, PartialEq)]
pub struct UncertaintySettings {
    pub samples: usize,
    pub seed: u64,
    pub factors: crate::sources::uncertainty::UncertaintyFactors,
}

/// A checked scenario with every default filled in.
#[derive(Clone, Debug, PartialEq)]
pub struct Scenario {
    pub file: String,
    pub title: String,
    pub description: String,
    pub target: Target,
    pub species: Vec<SpeciesEntry>,
    pub source: SourceSettings,
    /// Residual gases (formula, partial pressure in Pa).
    pub residual_gas_pa: Vec<(String, f64)>,
    /// Residual-gas elements (symbol, share of the residual atoms), from the gases'
    /// composition weighted by partial pressure; shares sum to 1 (empty without gas).
    pub residual_elements: Vec<(String, f64)>,
    pub time: TimeGrid,
    pub energy_scan: EnergyGrid,
    pub separator: Separator,
    /// The radioactive-beam breeding cycle of the target isotope (`[injection]`, beam trap
    /// only); its breeding time is the extraction time.
    pub injection: Option<BreedingCycle>,
    /// Monte Carlo uncertainty bands (`[uncertainty]`, beam trap with the fixed model).
    pub uncertainty: Option<UncertaintySettings>,
    /// Line (1-based) of every field and table written in the file, by dotted path
    /// (`beam_trap.energy_ev`, `species[1].name`).
    pub lines: BTreeMap<String, usize>,
}

impl Scenario {
    /// The core source of the scenario.
    pub fn build_source(&self) -> Result<Source> {
        self.source.build(&self.residual_gas_pa)
    }

    /// The species entry that provides the target isotope.
    pub fn target_species(&self) -> &SpeciesEntry {
        let t = &self.target;
        self.species
            .iter()
            .find(|s| s.z == t.z && s.mass_number.is_none_or(|a| a == t.mass_number))
            .unwrap_or(&self.species[0])
    }
}

/// `n` numbers from `start` to `stop` evenly spaced: `start + i·step`, the last one exactly
/// `stop` (the same arithmetic as numpy's `linspace`, so grids agree to the last bit).
pub fn linspace(start: f64, stop: f64, n: usize) -> Vec<f64> {
    if n == 1 {
        return vec![start];
    }
    let step = (stop - start) / (n - 1) as f64;
    let mut v: Vec<f64> = (0..n).map(|i| i as f64 * step + start).collect();
    if let Some(last) = v.last_mut() {
        *last = stop;
    }
    v
}

/// `n` numbers from `start` to `stop` evenly spaced in the logarithm: 10^linspace(log10),
/// both ends exact (numpy's `geomspace` arithmetic).
pub fn geomspace(start: f64, stop: f64, n: usize) -> Vec<f64> {
    let mut v: Vec<f64> = linspace(start.log10(), stop.log10(), n)
        .into_iter()
        .map(|x| 10f64.powf(x))
        .collect();
    if let Some(first) = v.first_mut() {
        *first = start;
    }
    if n > 1 {
        v[n - 1] = stop;
    }
    v
}
