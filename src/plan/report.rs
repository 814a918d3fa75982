//! The report of a scenario: everything a plan shows, as plain data. [`super::run`] makes
//! it; text, JSON, HTML and figures are views of it (in the Python package) that make no
//! model decision of their own.

use ndarray::Array2;

use super::settings::Scenario;
use crate::solve::evolution;
use crate::sources::energy_map::EnergyTimeMap;
use crate::sources::photon_beam::ChargeThreshold;
use crate::sources::Source;
use crate::spectrum::{ChargeStateRank, LineList, OverlapReport};

/// Printed at the end of every report.
pub const CAUTIONS: &str =
    "These results are planning estimates from empirical cross sections (typically within \
tens of percent), not a substitute for measurement. Ion sources involve high voltage, \
X-rays from electron beams and hot plasma electrons, microwave power, intense UV/X-ray \
photon beams, strong magnets and \
cryogens, and sometimes radioactive species: follow local codes, the facility's \
radiation-safety officer and licensed practice.";

/// Model names of the non-trap sources in [`Report::model`] (a trap names its own).
pub const MODEL_FIXED: &str = crate::sources::beam_trap::TrapModel::NAMES[0];
pub const MODEL_SINGLE_COLLISION: &str = "single_collision";
/// The zero-dimensional particle balance of [`crate::sources::plasma`].
pub const MODEL_PLASMA: &str = "plasma_balance";

/// A charge state below this fraction of the isotope's ions is not a practical choice:
/// the recommendation skips it (and a target peaking below it gets a note).
pub const MIN_PRACTICAL_FRACTION: f64 = 1e-3;
/// Interferers above this contamination must be split by the separator.
pub const STRONG_CONTAMINATION: f64 = 0.01;
/// Charge states whose fraction ever exceeds this are listed in the evolution summary.
pub const SUMMARY_THRESHOLD: f64 = 0.01;
/// Interferers within this many target FWHM are examined (the overlap search range).
pub const SEARCH_FWHM: f64 = 3.0;
/// Residual gas streams in continuously: its ions are averaged over ages from this
/// fraction of the extraction time up to the extraction time …
pub const RESIDUAL_AGE_START: f64 = 1e-4;
/// … on this many log-spaced ages.
pub const RESIDUAL_AGE_POINTS: usize = 200;
/// A note is written when the residual-gas ions carry more than this share of the trap's
/// compensated space charge (the model does not impose the capacity on them).
pub const RESIDUAL_CAPACITY_NOTE: f64 = 0.1;
/// The breeding ladder goes this many charge states past the target.
pub const LADDER_BEYOND_TARGET: u32 = 2;

/// One step (q−1)+ → q+ of the breeding ladder.
#[derive(Clone, Debug, PartialEq)]
pub struct LadderStep {
    /// The charge state made, q.
    pub charge: u32,
    /// Energy to make q+ from (q−1)+ (eV).
    pub ionization_energy_ev: f64,
    /// Sum of the ionization energies from the neutral to q+ (eV).
    pub threshold_ev: f64,
    /// The subshell the electron is removed from (None for a bare ion).
    pub subshell: Option<String>,
    /// Cross section of the step at the beam energy (cm²): Lotz, or photoionization.
    pub cross_section_cm2: f64,
    /// Time to reach q+ from the neutral (s; infinite if unreachable; None for a single
    /// collision).
    pub breeding_time_s: Option<f64>,
    /// Ionization factor jτ to reach q+ (C/cm²; None for a photon beam).
    pub j_tau_c_cm2: Option<f64>,
}

/// Stepwise breeding of the target element up to two states past the target.
#[derive(Clone, Debug, PartialEq)]
pub struct Ladder {
    /// Beam energy (electron or photon, eV).
    pub energy_ev: f64,
    /// Electron current density (A/cm²; beam trap only).
    pub current_density_a_cm2: Option<f64>,
    /// "lotz" or "photoionization".
    pub cross_section_kind: &'static str,
    pub steps: Vec<LadderStep>,
}

/// The charge-state evolution of one species (time sources).
#[derive(Clone, Debug, PartialEq)]
pub struct SpeciesEvolution {
    /// Species name as in the scenario ("Xe", "129Xe").
    pub name: String,
    pub symbol: String,
    pub times_s: Vec<f64>,
    /// Fractions [times, charge 0…Z].
    pub fractions: Array2<f64>,
}

impl SpeciesEvolution {
    /// Time (s) and value of the largest fraction of `charge` on the grid (first if tied).
    pub fn peak(&self, charge: u32) -> (f64, f64) {
        evolution::peak(&self.times_s, self.fractions.view(), charge as usize)
    }

    /// Fractions at `time_s`, linear between grid points (held at the grid's ends).
    pub fn at(&self, time_s: f64) -> Vec<f64> {
        evolution::interpolate(&self.times_s, self.fractions.view(), time_s)
    }

    /// Mean charge Σ q·F_q / Σ F_q at every time.
    pub fn mean_charge(&self) -> Vec<f64> {
        evolution::mean_charge(self.fractions.view())
    }

    /// Index of the grid time nearest to `time_s`.
    pub fn nearest_index(&self, time_s: f64) -> usize {
        evolution::nearest_index(&self.times_s, time_s)
    }
}

/// How the extraction time was chosen.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ExtractionChoice {
    /// Given in the scenario ([time] extraction_s).
    Scenario,
    /// When the target charge state peaks on the time grid.
    TargetPeak,
}

impl ExtractionChoice {
    pub fn label(&self) -> &'static str {
        match self {
            ExtractionChoice::Scenario => "scenario",
            ExtractionChoice::TargetPeak => "peak of the target",
        }
    }
}

/// One charge state of the target element in the evolution summary.
#[derive(Clone, Debug, PartialEq)]
pub struct ChargeSummary {
    pub charge: u32,
    pub peak_fraction: f64,
    pub peak_time_s: f64,
    pub final_fraction: f64,
    pub fraction_at_extraction: f64,
}

/// Fractions of each species when the ions leave the source.
#[derive(Clone, Debug, PartialEq)]
pub struct SpeciesFractions {
    pub name: String,
    pub symbol: String,
    /// Fraction of each charge 0…Z.
    pub fractions: Vec<f64>,
}

/// The electron energy that maximises the target's partial cross section in one collision,
/// with the appearance curves behind it.
#[derive(Clone, Debug, PartialEq)]
pub struct AppearanceScan {
    pub energies_ev: Vec<f64>,
    /// Partial cross section (cm²) of each final charge 0…Z at each energy.
    pub cross_sections_cm2: Array2<f64>,
    pub charge: u32,
    /// The scenario's own electron energy (eV).
    pub own_energy_ev: f64,
    /// Partial cross section of the target charge at each energy (cm²).
    pub target_cross_section_cm2: Vec<f64>,
    /// Its share of all ions made at each energy.
    pub target_share: Vec<f64>,
    pub best_energy_ev: f64,
    pub best_cross_section_cm2: f64,
    pub best_fraction: f64,
    /// Grid index nearest to the scenario's energy.
    pub own_index: usize,
}

/// The best-energy search.
#[derive(Clone, Debug)]
pub enum EnergyScan {
    /// Target fraction over a beam-energy × time grid (beam trap, photon beam); the
    /// scenario's own energy is on the grid when it lies within it.
    Map(EnergyTimeMap),
    /// Partial cross sections of one collision over energy (electron impact).
    Appearance(AppearanceScan),
}

impl EnergyScan {
    pub fn energies_ev(&self) -> &[f64] {
        match self {
            EnergyScan::Map(m) => &m.energies_ev,
            EnergyScan::Appearance(a) => &a.energies_ev,
        }
    }
    pub fn best_energy_ev(&self) -> f64 {
        match self {
            EnergyScan::Map(m) => m.best_energy_ev,
            EnergyScan::Appearance(a) => a.best_energy_ev,
        }
    }
    pub fn best_fraction(&self) -> f64 {
        match self {
            EnergyScan::Map(m) => m.best_fraction,
            EnergyScan::Appearance(a) => a.best_fraction,
        }
    }
    /// None for a single collision (no time).
    pub fn best_time_s(&self) -> Option<f64> {
        match self {
            EnergyScan::Map(m) => Some(m.best_time_s),
            EnergyScan::Appearance(_) => None,
        }
    }
}

/// The best energy and time when the beam's energy spread is taken into account, with the
/// flags a planner needs: an optimum on the edge of the scan, or within the spread of an
/// ionization threshold, and the margin to the next threshold.
#[derive(Clone, Debug, PartialEq)]
pub struct RobustOptimum {
    /// Full width (eV) of the beam's energy distribution averaged over (see
    /// [`super::defaults::beam_energy_spread_ev`]).
    pub spread_ev: f64,
    /// Beam energy (eV) and time (s) that maximise the spread-averaged target fraction.
    pub energy_ev: f64,
    pub time_s: f64,
    /// The spread-averaged target fraction there.
    pub fraction: f64,
    /// The best energy of the sharp (spread-free) map, for comparison.
    pub sharp_energy_ev: f64,
    /// The optimum is the first or last energy of the scan: the true optimum may lie outside.
    pub on_scan_edge: bool,
    /// The optimum is at the last time of the grid: the fraction may still be rising, so a
    /// longer confinement could do better (extend [time] stop_s).
    pub at_last_time: bool,
    /// An ionization threshold of the target element lies within ± spread/2 of the optimum.
    pub near_threshold: bool,
    /// The same for the sharp optimum: it sits on a cliff that the spread falls over.
    pub sharp_near_threshold: bool,
    /// The next ionization threshold above the optimum: the charge it opens and its
    /// energy (eV), and the margin (eV) from the optimum to it.
    pub next_threshold: Option<(u32, f64)>,
    pub margin_ev: Option<f64>,
    /// When the drift-tube radius is known: the tube-to-cathode voltage (V) that puts the
    /// optimum on the beam axis after the space-charge depression; else None.
    pub tube_voltage_v: Option<f64>,
}

/// Ions per extraction of a beam trap.
#[derive(Clone, Debug, PartialEq)]
pub struct IonsPerExtraction {
    pub time_s: f64,
    pub electrons_in_trap: f64,
    pub compensation: f64,
    /// The species that provides the target isotope.
    pub species: String,
    /// Its share of the trapped charge: ions of all species share the compensated space
    /// charge in proportion to amount × mean charge.
    pub species_share_of_charge: f64,
    /// Share of the target isotope in the species (its natural abundance, or 1).
    pub isotope_share: f64,
    /// Ions of the target isotope per extraction at each charge 0…Z.
    pub per_charge: Vec<f64>,
    pub target: f64,
    pub all_charges: f64,
}

/// The target's A/q neighbourhood at the separator's resolving power.
#[derive(Clone, Debug, PartialEq)]
pub struct Neighbourhood {
    pub overlap: OverlapReport,
    /// Resolving power needed to split every interferer above [`STRONG_CONTAMINATION`]
    /// (None when there is none).
    pub resolving_power_needed: Option<f64>,
    /// Whether the separator reaches it.
    pub resolved: bool,
}

/// One charge state of the target isotope in the ranking.
#[derive(Clone, Debug, PartialEq)]
pub struct RankedCharge {
    pub rank: ChargeStateRank,
    /// In the separator's A/q range and at least [`MIN_PRACTICAL_FRACTION`] of the isotope's ions.
    pub eligible: bool,
}

/// The recommended charge state: the best-scored eligible one.
#[derive(Clone, Debug, PartialEq)]
pub struct Recommendation {
    pub charge: u32,
    pub label: String,
    pub a_over_q: f64,
    pub m_over_q: f64,
    pub fraction: f64,
    pub purity: f64,
    pub score: f64,
    pub main_contaminant: Option<String>,
    /// When it is not the target: time (s) and fraction of its own peak in the evolution
    /// (time sources), to suggest retuning the extraction time.
    pub own_peak: Option<(f64, f64)>,
}

/// Everything a plan shows.
#[derive(Clone, Debug)]
pub struct Report {
    pub scenario: Scenario,
    /// The core source that was run.
    pub source: Source,
    pub ladder: Ladder,
    /// Charges one photon makes from the neutral target atom (photon beam).
    pub photon_thresholds: Option<Vec<ChargeThreshold>>,
    /// Per species (beam trap, photon beam; empty for a single collision).
    pub evolutions: Vec<SpeciesEvolution>,
    /// Extraction time (s) and how it was chosen (None for a single collision).
    pub extraction: Option<(f64, ExtractionChoice)>,
    /// Per species: fractions at extraction (the yields of a single collision).
    pub fractions_at_extraction: Vec<SpeciesFractions>,
    /// The target element's charge states above [`SUMMARY_THRESHOLD`] (time sources).
    pub evolution_summary: Vec<ChargeSummary>,
    /// Mean charge of the target element at the grid time nearest to the extraction.
    pub mean_charge_at_extraction: Option<f64>,
    /// Time (s) and fraction of the target's peak at the scenario's settings.
    pub target_peak: Option<(f64, f64)>,
    pub energy_scan: EnergyScan,
    /// The spread-averaged optimum (beam trap; None for other sources).
    pub robust_optimum: Option<RobustOptimum>,
    pub ions: Option<IonsPerExtraction>,
    /// Residual-gas elements in the spectrum: symbol, amount, fractions 0…Z.
    pub residual_fractions: Vec<(String, f64, Vec<f64>)>,
    /// The radioactive-beam breeding cycle (`[injection]`): ions per bunch of every nuclide
    /// of the decay chain at extraction, efficiency and bookkeeping.
    pub injection: Option<crate::sources::rib_cycle::CycleResult>,
    pub lines: LineList,
    /// None when the target isotope makes no line at this setting (see the notes).
    pub neighbourhood: Option<Neighbourhood>,
    /// Charge states of the target isotope, best score first.
    pub ranking: Vec<RankedCharge>,
    pub recommended: Option<Recommendation>,
    pub notes: Vec<String>,
    /// Plausibility warnings (settings outside what the models were made for).
    pub warnings: Vec<super::warnings::Warning>,
    /// What the ion-dynamics model adds (beam trap with model "dynamic"; else None).
    pub dynamics: Option<super::dynamics::DynamicReport>,
    /// The plasma source's steady state, currents and temperature scan (else None).
    pub plasma: Option<PlasmaReport>,
    /// Monte Carlo bands of the target (`[uncertainty]`; else None).
    pub uncertainty: Option<UncertaintyBands>,
}

/// Percentile bands of the target from Monte Carlo samples of the process rates
/// ([`crate::sources::uncertainty`]); every triple is the 5th, 50th and 95th percentile
/// ([`super::defaults::BAND_PERCENTILES`], linear interpolation between order statistics,
/// numpy's default).
#[derive(Clone, Debug, PartialEq)]
pub struct UncertaintyBands {
    pub samples: usize,
    pub seed: u64,
    pub factors: crate::sources::uncertainty::UncertaintyFactors,
    /// Time (s) of the target's largest fraction on the time grid.
    pub peak_time_s: [f64; 3],
    /// The target's largest fraction.
    pub peak_fraction: [f64; 3],
    /// Ions of the target isotope per extraction; each sample extracts at its own peak
    /// when the scenario extracts at the peak, else at the scenario's extraction time.
    /// The other species keep their nominal fractions.
    pub ions_per_extraction: [f64; 3],
    /// The target fraction's band at every time of the grid: 5th, 50th, 95th percentile.
    pub target_fraction: [Vec<f64>; 3],
}

/// One element of a plasma source at steady state.
#[derive(Clone, Debug, PartialEq)]
pub struct PlasmaElement {
    pub symbol: String,
    /// Brought only by the residual gas (an element also fed counts as fed).
    pub residual: bool,
    /// Atoms of the element per cm³ in the gas as fed (cm⁻³).
    pub atom_density_cm3: f64,
    /// Steady-state densities n_q (cm⁻³), charge 0…Z.
    pub densities_cm3: Vec<f64>,
    /// Steady-state fractions n_q / Σ n (neutrals included), charge 0…Z.
    pub fractions: Vec<f64>,
    /// Extracted current I_q (eµA) of each charge 0…Z (0 for the neutral).
    pub currents_eua: Vec<f64>,
    /// Σ_q I_q (eµA).
    pub total_current_eua: f64,
    /// Σ q·n_q / Σ n_q over the ions (q ≥ 1).
    pub mean_ion_charge: f64,
}

impl PlasmaElement {
    /// Share of the element's extracted current in each charge 0…Z (what the A/q
    /// spectrum weights its lines by; zeros without current).
    pub fn current_shares(&self) -> Vec<f64> {
        let total = self.total_current_eua;
        self.currents_eua
            .iter()
            .map(|i| if total > 0.0 { i / total } else { 0.0 })
            .collect()
    }
}

/// A plasma source at steady state, as the report shows it.
#[derive(Clone, Debug, PartialEq)]
pub struct PlasmaReport {
    /// Fed elements first (in the core's order), then residual-gas elements.
    pub elements: Vec<PlasmaElement>,
    /// n_e (cm⁻³), for comparison with the ions' charge density.
    pub electron_density_cm3: f64,
    /// Σ over every element and charge of q·n_q (cm⁻³).
    pub ion_charge_density_cm3: f64,
    /// Natural abundance of the target isotope in its element.
    pub isotope_share: f64,
    /// Extracted current (eµA) of the target isotope at the target charge.
    pub target_current_eua: f64,
    /// Cold electron temperatures kT_e (eV) of the steady-state scan (the energy grid).
    pub scan_temperatures_ev: Vec<f64>,
    /// Steady-state fraction of the target charge of its element at each temperature.
    pub scan_target_fraction: Vec<f64>,
    /// Extracted current (eµA) of the target isotope at each temperature.
    pub scan_target_current_eua: Vec<f64>,
    /// The temperature of the largest target current on the scan (eV), and that current.
    pub best_temperature_ev: f64,
    pub best_current_eua: f64,
}

impl PlasmaReport {
    /// The steady state of element `symbol` (None if the gases do not bring it).
    pub fn element(&self, symbol: &str) -> Option<&PlasmaElement> {
        self.elements.iter().find(|e| e.symbol == symbol)
    }
}

impl Report {
    /// The model the report's evolution used: "fixed" or "dynamic" for a beam trap,
    /// "fixed" for a photon beam (ions at one temperature, linear rate equations),
    /// "single_collision" for an electron-impact source, "plasma_balance" for a plasma.
    pub fn model(&self) -> &'static str {
        match &self.source {
            Source::BeamTrap(t) => t.model.name(),
            Source::PhotonBeam(_) => MODEL_FIXED,
            Source::Plasma(_) => MODEL_PLASMA,
            Source::ElectronImpact(_) => MODEL_SINGLE_COLLISION,
        }
    }

    /// The evolution of the species that provides the target (None for a single collision).
    pub fn target_evolution(&self) -> Option<&SpeciesEvolution> {
        let name = &self.scenario.target_species().name;
        self.evolutions.iter().find(|e| &e.name == name)
    }

    /// Fractions at extraction of the species that provides the target.
    pub fn target_fractions(&self) -> &SpeciesFractions {
        let name = &self.scenario.target_species().name;
        self.fractions_at_extraction
            .iter()
            .find(|e| &e.name == name)
            .unwrap_or(&self.fractions_at_extraction[0])
    }
}
